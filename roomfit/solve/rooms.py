"""Rooms as the placement model sees them: a bounding box, fixed obstacles and free floor.

A room is its bounding box plus fixed obstacles covering the parts of the box outside the
room: exact for axis-aligned walls; for an angled wall every grid cell the wall cuts is
blocked, so the model is conservative there. Fittings are obstacles for furniture and zones;
door approach floor and fitting use zones are floor kept clear of furniture; window bands keep
tall pieces away. All lengths are integer millimetres in plan coordinates (y up).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import shapely
from shapely import box
from shapely.geometry import Polygon
from shapely.geometry.base import BaseGeometry

from roomfit.audit.geometry import (
    door_shapes,
    fixture_polygon,
    room_polygon,
    window_band,
)
from roomfit.audit.transfer import fitting_zone
from roomfit.plan.data import Plan, Room
from roomfit.rules.sets import RuleSet

__all__ = ["Rect", "Wall", "RoomGeo", "cover_rects", "room_geometry", "cross_thickness"]

Rect = tuple[int, int, int, int]
"""``(x0, y0, x1, y1)`` in mm, x0 < x1 and y0 < y1."""


@dataclass(frozen=True)
class Wall:
    """An axis-aligned wall segment of a room: ``axis`` is ``"x"`` for a wall at x = ``at``
    (running along y from ``lo`` to ``hi``) or ``"y"`` for a wall at y = ``at``; ``outward``
    is the unit normal pointing out of the room."""

    axis: str
    at: int
    lo: int
    hi: int
    outward: tuple[int, int]


@dataclass(frozen=True)
class RoomGeo:
    """A room as the model sees it.

    ``hard``: floor nothing may use (outside the room, fittings); ``clear``: floor kept free of
    furniture but usable by zones (door approach, fitting use zones), by door id / fitting id, covered
    by grid cells (conservative); ``inner_clear``: the same covered by the cells inside it (for
    the relaxed model);
    ``walkways``: door walkways (strengthening only); ``bands``: window bands with the sill.
    """

    room: Room
    bbox: Rect
    hard: tuple[Rect, ...]
    clear: tuple[tuple[str, tuple[Rect, ...]], ...]
    inner_clear: tuple[tuple[str, tuple[Rect, ...]], ...]
    walkways: tuple[Rect, ...]
    bands: tuple[tuple[str, int, tuple[Rect, ...]], ...]
    walls: tuple[Wall, ...]
    windows: tuple[tuple[Wall, int, int, int, int], ...]  # wall, lo, hi, centre x, centre y
    fittings: tuple[Rect, ...]


def _is_rectilinear(geom: BaseGeometry) -> bool:
    polys = getattr(geom, "geoms", [geom])
    for p in polys:
        if not isinstance(p, Polygon):
            return False
        for ring in (p.exterior, *p.interiors):
            c = list(ring.coords)
            for (ax, ay), (bx, by) in zip(c, c[1:], strict=False):
                if ax != bx and ay != by:
                    return False
                if ax != int(ax) or ay != int(ay):
                    return False
    return True


def _merge(mask: np.ndarray, xs: list[int], ys: list[int]) -> list[Rect]:
    """Greedy merge of marked cells ``mask[i, j]`` (cell i along x, j along y) into rectangles."""
    used = np.zeros_like(mask)
    out: list[Rect] = []
    nx, ny = mask.shape
    for j in range(ny):
        for i in range(nx):
            if not mask[i, j] or used[i, j]:
                continue
            i1 = i
            while i1 + 1 < nx and mask[i1 + 1, j] and not used[i1 + 1, j]:
                i1 += 1
            j1 = j
            while j1 + 1 < ny and all(mask[k, j1 + 1] and not used[k, j1 + 1] for k in range(i, i1 + 1)):
                j1 += 1
            used[i:i1 + 1, j:j1 + 1] = True
            out.append((xs[i], ys[j], xs[i1 + 1], ys[j1 + 1]))
    return out


#: Most grid cells one cover may test (a bound on time and memory for huge shapes: beyond it
#: the cells grow, which keeps a cover conservative and an inner cover inside the shape).
MAX_CELLS = 40_000


def cover_rects(geom: BaseGeometry, step: int, inner: bool = False) -> list[Rect]:
    """Axis-aligned integer rectangles whose union covers ``geom`` (conservatively), or, with
    ``inner``, lies inside it.

    Rectilinear shapes with integer corners are covered exactly; other shapes (arcs, angled
    walls) are covered by every ``step``-mm grid cell their interior touches (``inner``: every
    cell wholly inside). Cells grow beyond ``step`` when a shape would need more than
    ``MAX_CELLS`` of them.

    >>> cover_rects(Polygon([(0, 0), (100, 0), (0, 100)]), 50, inner=True)
    [(0, 0, 50, 50)]

    >>> cover_rects(box(0, 0, 100, 50), 50)
    [(0, 0, 100, 50)]
    """
    if geom.is_empty or geom.area <= 1e-6:
        return []
    x0, y0, x1, y1 = geom.bounds
    if _is_rectilinear(geom):
        xs = sorted({int(c[0]) for p in getattr(geom, "geoms", [geom]) for c in p.exterior.coords}
                    | {int(c[0]) for p in getattr(geom, "geoms", [geom]) for r in p.interiors
                       for c in r.coords})
        ys = sorted({int(c[1]) for p in getattr(geom, "geoms", [geom]) for c in p.exterior.coords}
                    | {int(c[1]) for p in getattr(geom, "geoms", [geom]) for r in p.interiors
                       for c in r.coords})
    else:
        lo_x, hi_x = math.floor(x0), math.ceil(x1)
        lo_y, hi_y = math.floor(y0), math.ceil(y1)
        count = (hi_x - lo_x) * (hi_y - lo_y) / (step * step)
        if count > MAX_CELLS:
            step = math.ceil(step * math.sqrt(count / MAX_CELLS))
        xs = sorted({lo_x, hi_x} | set(range((lo_x // step + 1) * step, hi_x, step)))
        ys = sorted({lo_y, hi_y} | set(range((lo_y // step + 1) * step, hi_y, step)))
    nx, ny = len(xs) - 1, len(ys) - 1
    gx0 = np.repeat(np.array(xs[:-1]), ny)
    gx1 = np.repeat(np.array(xs[1:]), ny)
    gy0 = np.tile(np.array(ys[:-1]), nx)
    gy1 = np.tile(np.array(ys[1:]), nx)
    grid = shapely.box(gx0, gy0, gx1, gy1)
    area = shapely.area(shapely.intersection(grid, geom))
    full = shapely.area(grid)
    mask = ((area >= full - 1e-3) if inner else (area > 1e-3)).reshape(nx, ny)
    return _merge(mask, xs, ys)


def _walls(room: Room) -> list[Wall]:
    poly = room_polygon(room)
    pts = list(room.outline)
    out = []
    for i, (a, b) in enumerate(zip(pts, pts[1:] + pts[:1], strict=True)):
        del i
        if a[0] == b[0]:
            lo, hi = sorted((a[1], b[1]))
            inside_right = poly.contains(shapely.Point(a[0] + 1, (lo + hi) / 2))
            out.append(Wall("x", a[0], lo, hi, (-1, 0) if inside_right else (1, 0)))
        elif a[1] == b[1]:
            lo, hi = sorted((a[0], b[0]))
            inside_up = poly.contains(shapely.Point((lo + hi) / 2, a[1] + 1))
            out.append(Wall("y", a[1], lo, hi, (0, -1) if inside_up else (0, 1)))
    return out


def room_geometry(plan: Plan, rules: RuleSet, room: Room, grid: int) -> RoomGeo:
    """Derive a room's model geometry from the plan and the rule set."""
    poly = room_polygon(room)
    bx0, by0, bx1, by1 = (int(math.floor(v)) for v in poly.bounds)
    bbox = (bx0, by0, bx1, by1)
    fittings = []
    clear: list[tuple[str, tuple[Rect, ...]]] = []
    inner: list[tuple[str, tuple[Rect, ...]]] = []
    solid = [box(*bbox).difference(poly)]
    for f in plan.fixtures:
        if f.room != room.id:
            continue
        shape = fixture_polygon(f).intersection(poly)
        solid.append(shape)
        fittings += cover_rects(shape, grid)
        z = fitting_zone(plan, rules, f)  # with a WC's transfer clearance
        if z is not None:
            clear.append((f"fixture.{f.id}", tuple(cover_rects(z.intersection(poly), grid))))
            inner.append((f"fixture.{f.id}", tuple(cover_rects(z.intersection(poly), grid, True))))
    hard = cover_rects(shapely.union_all(solid), grid)
    route = rules.mm("route.width")
    walkways: list[Rect] = []
    for ds in door_shapes(plan, rules):
        if room.id not in ds.inward:
            continue
        if room.id in ds.approach:
            clear.append((f"door.{ds.door.id}", tuple(cover_rects(ds.approach[room.id], grid))))
            inner.append((f"door.{ds.door.id}", tuple(cover_rects(ds.approach[room.id], grid, True))))
        n = ds.inward[room.id]
        (ax, ay), (bx, by) = ds.opening.coords
        half = max(ds.door.width, route) / 2
        cx, cy = (ax + bx) / 2, (ay + by) / 2
        ux, uy = (bx - ax) / ds.door.width, (by - ay) / ds.door.width
        depth = 2 * route
        corners = [(cx - ux * half, cy - uy * half), (cx + ux * half, cy + uy * half)]
        corners += [(px + n[0] * depth, py + n[1] * depth) for px, py in reversed(corners)]
        walkways += cover_rects(Polygon(corners).intersection(poly), grid)
    band_depth = rules.mm("window.band")
    walls = _walls(room)
    bands = []
    windows = []
    for w in plan.windows:
        if w.room != room.id:
            continue
        if band_depth > 0:
            bands.append((w.id, w.sill, tuple(cover_rects(window_band(plan, w, band_depth), grid))))
        for wall in walls:
            along = w.at[1] if wall.axis == "x" else w.at[0]
            across = w.at[0] if wall.axis == "x" else w.at[1]
            if across == wall.at and wall.lo <= along <= wall.hi:
                windows.append((wall, along - w.width // 2, along + (w.width + 1) // 2, w.at[0], w.at[1]))
    return RoomGeo(room, bbox, tuple(hard), tuple(clear), tuple(inner), tuple(walkways), tuple(bands),
                   tuple(walls), tuple(windows), tuple(fittings))


def cross_thickness(diameter: int) -> int:
    """Thickness of each bar of the cross that holds a turning circle of ``diameter`` (mm).

    A circle of radius r lies inside the union of the bars |x| <= t/2 and |y| <= t/2 (each r
    long either way) when t/2 >= r sin 45 deg = 0.7071 r; we round 0.71 D up and add 1 mm for
    the integer centre.

    >>> cross_thickness(1500)
    1066
    """
    return math.ceil(0.71 * diameter) + 1
