"""Turning spaces: does a wheelchair turning space of the rule set's size and shape fit in a
room's free floor?

Shapes: a circle (ISO 21542 §A.2, 2010 ADA §304.3.1), an axis-parallel square (DIN 18040-2
movement area), or the circle or else the T-shaped space of 2010 ADA §304.3.2. Door swings
and use zones are part of the free floor (2010 ADA §304.4 allows the turning space to
overlap them). Thresholds are exact: a space passes at the published size and fails 1 mm
below it (a circle at ``size - WIDTH_TOL`` in diameter passes, so inch sizes such as
60 in = 1524 mm are met by the whole millimetre). Reported sizes are the measured ones,
rounded down.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import shapely
from shapely import MultiPoint, Point
from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from roomfit.audit.findings import Finding, fmt_mm, outline, source_of
from roomfit.audit.places import Target
from roomfit.audit.walkway import QUAD_SEGS, TOUCH_MM, WIDTH_TOL, Floor, polys

__all__ = ["RASTER_CELL", "TurningResult", "turning_space", "check_turning"]

#: Raster cell (mm) for the square and T-shaped turning-space tests.
RASTER_CELL = 10.0
#: Tolerance (mm) of the largest-circle search; the circle reported is the found centre's
#: own clearance, so it is never larger than the true one.
_MIC_TOL = 0.01


@dataclass(frozen=True)
class TurningResult:
    """Outcome of the turning-space test in one free floor.

    ``fits``: a turning space of the asked shape fits; ``shape``: which one was found
    (``circle``, ``square``, ``t`` or ``""``); ``measured``: the largest circle diameter, or
    square side when ``measure`` is ``square``, found (mm); ``centre``: its centre; ``centres``: points where
    a person turning in the found space has its centre (for reachability), ``clearance``: how
    far those points are from any obstacle at least (mm).
    """

    fits: bool
    shape: str
    measured: float
    centre: tuple[float, float] | None
    centres: tuple[tuple[float, float], ...]
    clearance: float
    measure: str = "circle"


def _raster(free: BaseGeometry, cell: float) -> tuple[np.ndarray, float, float]:
    """Cells fully inside ``free``: a bool array [row (y), col (x)] and its origin.

    A cell counts as free only when all of it is free floor (conservative): its centre must
    lie in the floor shrunk by half a cell (exactly, for axis-parallel walls) or by half its
    diagonal (any other wall).
    """
    x0, y0, x1, y1 = free.bounds
    nx, ny = max(int(math.ceil((x1 - x0) / cell)), 1), max(int(math.ceil((y1 - y0) / cell)), 1)
    axis = all(
        abs(a[0] - b[0]) < 1e-6 or abs(a[1] - b[1]) < 1e-6
        for p in polys(free) for ring in [p.exterior, *p.interiors]
        for a, b in zip(ring.coords[:-1], ring.coords[1:], strict=True)
    )
    inner = (free.buffer(-(cell / 2 - 1e-6), join_style="mitre") if axis
             else free.buffer(-cell / math.sqrt(2), quad_segs=QUAD_SEGS))
    xs = x0 + (np.arange(nx) + 0.5) * cell
    ys = y0 + (np.arange(ny) + 0.5) * cell
    gx, gy = np.meshgrid(xs, ys)
    if inner.is_empty:
        return np.zeros((ny, nx), bool), x0, y0
    shapely.prepare(inner)
    return np.asarray(shapely.contains_xy(inner, gx, gy), dtype=bool), x0, y0


def _rect_free(sat: np.ndarray, h: int, w: int) -> np.ndarray:
    """[i, j] True when the h x w cell block with lower-left cell (i, j) has no blocked cell.

    ``sat`` is the summed-area table of blocked cells padded with a zero row and column
    (F. C. Crow, "Summed-area tables for texture mapping", SIGGRAPH 1984).
    """
    ny, nx = sat.shape[0] - 1, sat.shape[1] - 1
    if h > ny or w > nx or h <= 0 or w <= 0:
        return np.zeros((0, 0), bool)
    s = sat[h:, w:] - sat[:-h, w:] - sat[h:, :-w] + sat[:-h, :-w]
    return s == 0


def _sat(grid: np.ndarray) -> np.ndarray:
    blocked = (~grid).astype(np.int64)
    sat = np.zeros((grid.shape[0] + 1, grid.shape[1] + 1), np.int64)
    sat[1:, 1:] = blocked.cumsum(0).cumsum(1)
    return sat


def _cells(mm: float, cell: float) -> int:
    """Whole cells covering ``mm`` (less the 1 mm touch tolerance)."""
    return max(int(math.ceil((mm - TOUCH_MM) / cell - 1e-9)), 1)


def _t_rects(size: float, cell: float) -> tuple[int, int, list[tuple[int, int, int, int]]]:
    """The T-shaped turning space of 2010 ADA §304.3.2 as cell rectangles (x, y, w, h).

    Stem down: a bar across the full width, 0.6 D deep (36 in of 60 in), and a stem 0.6 D
    wide and 0.4 D long (24 in) under its middle, leaving arms 0.2 D (12 in) each side;
    sizes scale with ``size`` and are rounded up to whole cells.
    """
    arm, a, stem = _cells(0.2 * size, cell), _cells(0.6 * size, cell), _cells(0.4 * size, cell)
    bar = a
    w, h = 2 * arm + a, stem + bar
    return w, h, [(0, stem, w, bar), (arm, 0, a, stem)]


def _rot_rects(w: int, h: int, rects: list[tuple[int, int, int, int]]
               ) -> tuple[int, int, list[tuple[int, int, int, int]]]:
    """Turn cell rectangles inside a w x h box by 90 degrees counter-clockwise."""
    return h, w, [(h - y - rh, x, rh, rw) for x, y, rw, rh in rects]


def _fits(sat: np.ndarray, w: int, h: int, rects: list[tuple[int, int, int, int]]) -> np.ndarray:
    """[i, j] True when the shape made of ``rects`` (in a w x h box) fits at cell (i, j)."""
    ny, nx = sat.shape[0] - 1, sat.shape[1] - 1
    if w > nx or h > ny:
        return np.zeros((0, 0), bool)
    ok = np.ones((ny - h + 1, nx - w + 1), bool)
    for x, y, rw, rh in rects:
        f = _rect_free(sat, rh, rw)
        ok &= f[y:y + ny - h + 1, x:x + nx - w + 1]
    return ok


def _sample(points: list[tuple[float, float]], limit: int = 400) -> tuple[tuple[float, float], ...]:
    if len(points) <= limit:
        return tuple(points)
    step = len(points) / limit
    return tuple(points[int(k * step)] for k in range(limit))


def _circle(floor: BaseGeometry, size: float) -> tuple[float, tuple[float, float], list]:
    """The largest circle in ``floor`` (diameter, rounded down to 0.1 mm, and centre) and
    centres where a circle of ``size`` fits, each confirmed by its exact distance to the
    floor's outline (the shrunk floor's arcs are chords, a little too generous)."""
    mic = shapely.maximum_inscribed_circle(floor, _MIC_TOL)  # type: ignore[call-overload]
    (cx, cy), (bx, by) = mic.coords[0], mic.coords[1]
    # the centre's own clearance: a lower bound of the largest circle within 2 * _MIC_TOL
    # of it, to 0.1 mm (messages then round down to the whole millimetre)
    diam = round(2 * math.hypot(bx - cx, by - cy), 1)
    need = size / 2 - WIDTH_TOL / 2
    region = floor.buffer(-need, quad_segs=QUAD_SEGS)
    edge = floor.boundary
    pts = [p for g in polys(region) for p in g.exterior.coords[:-1]]
    pts += [g.representative_point().coords[0] for g in getattr(region, "geoms", [region])
            if not g.is_empty]
    if diam / 2 >= need:
        pts.append((cx, cy))
    ok = [p for p in pts if edge.distance(Point(p)) >= need - 1e-6]
    return diam, (round(cx, 1), round(cy, 1)), ok


def turning_space(free: BaseGeometry, size: float, shape: str,
                  cell: float = RASTER_CELL) -> TurningResult:
    """Does a turning space of ``size`` (mm) and ``shape`` fit in the free floor ``free``?

    ``circle``: some point of the floor lies at least ``size / 2`` (less ``WIDTH_TOL / 2``)
    from every obstacle, confirmed exactly; door swings and use zones are part of ``free``
    (2010 ADA §304.4). ``square``: an axis-parallel ``size`` square; ``circle-or-t``: the
    circle, or else the T-shaped space of 2010 ADA §304.3.2 in any of four orientations. The
    square and the T are tested on a raster of about ``cell`` mm that divides the size,
    where a cell partly blocked counts as blocked: conservative, never early, and exact for
    walls on the grid of the room's corner.

    >>> from shapely import box
    >>> turning_space(box(0, 0, 1500, 1500), 1500, "circle").fits
    True
    >>> turning_space(box(0, 0, 1499, 1500), 1500, "circle").fits
    False
    """
    parts = polys(free)
    if not parts:
        return TurningResult(False, "", 0.0, None, (), 0.0)
    floor = unary_union(parts)
    diam, centre, pts = _circle(floor, size)
    if shape in ("circle", "circle-or-t") and pts:
        return TurningResult(True, "circle", diam, centre, _sample(pts),
                            size / 2 - WIDTH_TOL / 2)
    bx0, by0, bx1, by1 = floor.bounds
    if (shape == "circle" or diam + 2 * TOUCH_MM < (size if shape == "square" else 0.6 * size)
            or min(bx1 - bx0, by1 - by0) < size - TOUCH_MM):
        # a square of side D holds a circle of diameter D, the T's bar one of 0.6 D, and both
        # need a floor at least D across each way
        return TurningResult(False, "", diam, centre, (), 0.0)
    if shape == "square" and diam >= size * math.sqrt(2):
        region = floor.buffer(-size * math.sqrt(2) / 2, quad_segs=QUAD_SEGS)
        sq = [g.representative_point().coords[0] for g in getattr(region, "geoms", [region])
              if not g.is_empty] or [centre]
        return TurningResult(True, "square", math.floor(10 * diam / math.sqrt(2)) / 10, sq[0],
                             tuple(sq), size / 2, "square")
    # a cell that divides the size and its fifths exactly, so a room exactly as large as
    # the space holds it: D / (5 m) with m the least whole number giving cells <= ``cell``
    cell = size / (5 * math.ceil(size / (5 * cell)))
    grid, x0, y0 = _raster(floor, cell)
    if shape == "square":
        return _square(grid, x0, y0, cell, size, centre)
    return _t_space(grid, x0, y0, cell, size, diam, centre)


def _square(grid: np.ndarray, x0: float, y0: float, cell: float, size: float,
            centre: tuple[float, float]) -> TurningResult:
    """The square test on the raster ``grid``; reports the largest square found."""
    sat = _sat(grid)
    k = _cells(size, cell)
    ok = _fits(sat, k, k, [(0, 0, k, k)])
    lo, hi = 0, min(grid.shape)
    while lo < hi:  # the largest block that fits, for the report
        mid = (lo + hi + 1) // 2
        if _fits(sat, mid, mid, [(0, 0, mid, mid)]).any():
            lo = mid
        else:
            hi = mid - 1
    best = math.floor(10 * lo * cell) / 10
    pts = _centres(ok, x0, y0, cell, k / 2, k / 2)
    if pts:
        return TurningResult(True, "square", best, pts[0], pts, k * cell / 2, "square")
    return TurningResult(False, "", best, centre, (), 0.0, "square")


def _t_space(grid: np.ndarray, x0: float, y0: float, cell: float, size: float, diam: float,
             centre: tuple[float, float]) -> TurningResult:
    """The T-shaped space of 2010 ADA §304.3.2 in any of four orientations on ``grid``."""
    sat = _sat(grid)
    w, h, rects = _t_rects(size, cell)
    pts: tuple[tuple[float, float], ...] = ()
    for turn in range(4):
        # the body turns at the middle of the bar: the bar's centre
        bx0, by0, bw, bh = rects[0]
        pts += _centres(_fits(sat, w, h, rects), x0, y0, cell, bx0 + bw / 2, by0 + bh / 2)
        if turn < 3:
            w, h, rects = _rot_rects(w, h, rects)
    if pts:
        return TurningResult(True, "t", diam, pts[0], _sample(list(pts)), 0.3 * size)
    return TurningResult(False, "", diam, centre, (), 0.0)


def _centres(ok: np.ndarray, x0: float, y0: float, cell: float, dx: float, dy: float,
             limit: int = 200) -> tuple[tuple[float, float], ...]:
    """Up to ``limit`` points (dx, dy) cells from the positions where ``ok`` holds."""
    if not ok.size or not ok.any():
        return ()
    ii, jj = np.nonzero(ok)
    pick = np.linspace(0, len(ii) - 1, min(limit, len(ii))).astype(int)
    return tuple((round(float(x0 + (jj[n] + dx) * cell), 1),
                  round(float(y0 + (ii[n] + dy) * cell), 1)) for n in pick)


def check_turning(ctx: Floor) -> tuple[list[Finding], list[Target]]:
    """One ``turning.space`` finding per room when the set asks for a turning space, and the
    turning spaces found, as places the route must reach."""
    size_rule = ctx.rules.get("turning.size")
    size = size_rule.exact_mm
    if size <= 0:
        return [], []
    shape = ctx.rules.text("turning.shape")
    out: list[Finding] = []
    targets: list[Target] = []
    for room in ctx.plan.rooms:
        res = turning_space(ctx.free[room.id], size, shape)
        what = {"circle": "circle", "square": "square", "t": "T-shaped space"}.get(res.shape, "")
        if res.fits:
            msg = (f"a {fmt_mm(size)} turning {what} fits in {room.id}"
                   f" (largest {res.measure} {fmt_mm(res.measured)})")
            targets.append(Target(f"the turning space in {room.id}", room.id,
                                  MultiPoint(list(res.centres)), res.clearance, ()))
        else:
            kind = {"circle": "circle", "square": "square",
                    "circle-or-t": "circle nor T-shaped space"}[shape]
            msg = (f"no {fmt_mm(size)} turning {kind} fits in {room.id}; "
                   + (f"the largest circle that fits is {fmt_mm(res.measured)} across, too small "
                      "to hold the square" if shape == "square" and res.measure == "circle" else
                      f"the largest {res.measure} is {fmt_mm(res.measured)}"))
        ring: tuple[tuple[float, float], ...] = ()
        if res.centre is not None and res.shape in ("circle", ""):
            r = (size if res.fits else res.measured) / 2
            ring = outline(Point(res.centre).buffer(max(r, 1.0), quad_segs=8))
        out.append(Finding("turning.space", res.fits, msg, measured=res.measured,
                           required=size, source=source_of(size_rule), room=room.id,
                           where=res.centre, outline=ring))
    return out, targets

