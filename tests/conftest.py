"""Shared fixtures: the bundled sample plans."""

from __future__ import annotations

from pathlib import Path

import pytest

PLANS = Path(__file__).resolve().parent.parent / "plans"
SAMPLES = sorted(PLANS.glob("*.toml"))


@pytest.fixture(params=SAMPLES, ids=[p.stem for p in SAMPLES])
def sample_path(request: pytest.FixtureRequest) -> Path:
    return request.param


#: A one-room flat with an entrance, the smallest valid plan (invented), for tests that
#: break one thing at a time.
PROBE_FLAT = '''roomfit_plan = 1
name = "Probe flat (invented)"
units = "mm"

[[rooms]]
id = "room"
use = "living"
outline = [[0, 0], [4000, 0], [4000, 3000], [0, 3000]]

[[doors]]
id = "d"
rooms = ["room", "outside"]
at = [2000, 0]
width = 900
swings_into = "room"
hinge = "left"
'''
