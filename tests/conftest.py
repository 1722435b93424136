"""Shared fixtures: the bundled sample plans."""

from __future__ import annotations

from pathlib import Path

import pytest

PLANS = Path(__file__).resolve().parent.parent / "plans"
SAMPLES = sorted(PLANS.glob("*.toml"))


@pytest.fixture(params=SAMPLES, ids=[p.stem for p in SAMPLES])
def sample_path(request: pytest.FixtureRequest) -> Path:
    return request.param
