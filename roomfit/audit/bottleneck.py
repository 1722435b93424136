"""How wide the widest way between two places is, and where it breaks.

The widest way between two places is the largest width at which the walkway joins them
(bisection to :data:`~roomfit.audit.walkway.WIDTH_STEP`); the bottleneck is where the two
sides come closest at the first width that parts them. It is always below the width asked
when the way is missing. The blockers named there are the pieces and fittings of the
bottleneck's room, or those standing in a doorway near it, never pieces behind a wall.
"""

from __future__ import annotations

from collections.abc import Callable

from shapely import Point
from shapely.geometry.base import BaseGeometry
from shapely.ops import nearest_points, unary_union

from roomfit.audit.places import PlaceKind, Target, roots_in
from roomfit.audit.walkway import (
    WIDTH_STEP,
    Floor,
    Walkway,
    erosion,
    mouth,
    room_at,
    standing,
    walkway,
)

__all__ = ["widest", "bottleneck"]


def widest(pred: Callable[[float], bool], lo: float, hi: float) -> tuple[float, float]:
    """Bisection: ``pred(lo)`` holds and ``pred(hi)`` fails; the last width that holds and
    the first that fails, ``WIDTH_STEP`` apart at most (so the widest is below ``hi``)."""
    while hi - lo > WIDTH_STEP:
        mid = (lo + hi) / 2
        if pred(mid):
            lo = mid
        else:
            hi = mid
    return lo, hi


def _near_geom(floor: Floor, st: Walkway, t: Target) -> tuple[list[int], BaseGeometry]:
    if t.kind is PlaceKind.DOOR and t.door is not None:
        p, idx = st.mouths[(t.door, t.room)]
        return idx, p
    if t.kind is PlaceKind.ZONE:
        return st.within(t.room, t.geom, st.side_reach()), t.geom
    return st.near(t.room, t.geom, t.depth), t.geom


def bottleneck(floor: Floor, t: Target, width: float, origin: Target | None = None
               ) -> tuple[tuple[float, float], tuple[str, ...]]:
    """Where the way to ``t`` (from ``origin``, by default the entrance) breaks at
    ``width``, and the pieces and fittings of that room within a route width of it.

    The nearest points between the side ``origin`` reaches and the side around the target
    (in one room, or across a door whose mouth one of them misses); the midpoint is the
    bottleneck.
    """
    st = walkway(floor, width)
    if origin is None:
        start = st.start
    else:
        start = roots_in(floor, st, origin)
    t_idx, t_geom = _near_geom(floor, st, t)
    t_roots = {st.root[i] for i in t_idx}
    start_by = _by_room(st, start)
    if not start_by:
        for ds in floor.doors:
            if ds.door.is_entrance if origin is None else ds.door.id == origin.door:
                for rid in ds.door.rooms:
                    if rid in floor.rooms:
                        start_by.setdefault(rid, []).append(mouth(floor, ds, rid, erosion(width)))
        if origin is not None and not start_by:
            start_by[origin.room] = [origin.geom]
    targ_by = _by_room(st, t_roots - start)
    if not targ_by:
        targ_by[t.room] = [t_geom]
    best = min(_pairs(floor, st, start, t_roots, start_by, targ_by, width),
               key=lambda ab: ab[0].distance(ab[1]))
    pa, pb = nearest_points(best[0], best[1])
    where = Point((pa.x + pb.x) / 2, (pa.y + pb.y) / 2)
    return (round(where.x, 1), round(where.y, 1)), _next_to(floor, where)


def _by_room(st: Walkway, roots: set[int]) -> dict[str, list[BaseGeometry]]:
    out: dict[str, list[BaseGeometry]] = {}
    for i, (rid, p) in enumerate(st.comps):
        if st.root[i] in roots:
            out.setdefault(rid, []).append(p)
    return out


def _pairs(floor: Floor, st: Walkway, start: set[int], t_roots: set[int],
           start_by: dict[str, list[BaseGeometry]], targ_by: dict[str, list[BaseGeometry]],
           width: float) -> list[tuple[BaseGeometry, BaseGeometry]]:
    """Candidate (start side, target side) shapes between which the way breaks."""
    pairs = [(unary_union(start_by[rid]), unary_union(targ_by[rid]))
             for rid in start_by.keys() & targ_by.keys()]
    for ds in floor.doors:
        a, b = ds.door.rooms
        for ra, rb in ((a, b), (b, a)):
            if ra not in start_by or rb not in targ_by or rb in start_by:
                continue
            _, near_a = st.mouths.get((ds.door.id, ra), (None, []))
            _, near_b = st.mouths.get((ds.door.id, rb), (None, []))
            if any(st.root[i] in start for i in near_a):  # blocked on the target's side
                pairs.append((mouth(floor, ds, rb, erosion(width)), unary_union(targ_by[rb])))
            elif any(st.root[i] in t_roots for i in near_b):  # blocked on the start's side
                pairs.append((unary_union(start_by[ra]), mouth(floor, ds, ra, erosion(width))))
    if not pairs:
        pairs.append((unary_union([g for v in start_by.values() for g in v]),
                      unary_union([g for v in targ_by.values() for g in v])))
    return pairs


def _next_to(floor: Floor, where: Point) -> tuple[str, ...]:
    """Pieces and fittings within a route width of ``where``, nearest first: the blockers to
    name. Only those of the room at ``where``, and those standing in a doorway near it
    (within 50 mm of its opening); pieces behind a wall are left out."""
    route = floor.rules.get("route.width").exact_mm
    room = room_at(floor, where)
    doorways = [ds.opening.buffer(50.0) for ds in floor.doors
                if ds.opening.distance(where) <= route]
    near: list[tuple[float, str]] = []
    solid = [(pid, pc.placement.room, pc.shape) for pid, pc in standing(floor)]
    solid += [(f.id, f.room, floor.fixtures[f.id]) for f in floor.plan.fixtures]
    for sid, rid, shape in solid:
        if rid == room or any(shape.intersects(d) for d in doorways):
            near.append((shape.distance(where), sid))
    return tuple(i for d, i in sorted(near) if d <= route)
