"""Tests of the exact-geometry audit against outside facts (sources named beside each)."""

from __future__ import annotations

from shapely import box

from roomfit.check import turning_space


def test_circle_fits_square_room_worked_example() -> None:
    # worked example by hand: a 1500 mm circle fits a free 1500 x 1500 mm square, not 1490
    assert turning_space(box(0, 0, 1500, 1500), 1500, "circle").fits
    assert not turning_space(box(0, 0, 1490, 1500), 1500, "circle").fits
