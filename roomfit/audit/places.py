"""Places a person must get to, how the walkway serves them, and where a trip starts or
ends at them.

- **Places** (:class:`Target`): both sides of each door, each use zone and fitting zone, a
  turning space's centres, a room, a plan point.
- **Served**: a door side by the walkway parts near its mouth; a use zone or fitting zone
  by the parts whose bodies adjoin one full side of it, or by the parts serving another
  clear zone one full side of it adjoins (2010 ADA §305.6: "one full unobstructed side of
  the clear floor space shall adjoin or overlap an accessible route or adjoin another clear
  floor space"); a point (a turning space's centres, a room's floor) by the parts within
  ``max(0, r - depth) + 1`` mm of it. A side adjoins the route when every point of it lies
  within ``r * sqrt(2)`` of a body centre: a person of the route width standing square to
  the side covers it out to a square corner, where a disc would leave the corner itself
  untouched.
- **Trip ends** (:func:`end_point`, :attr:`Target.aim`): the one rule for where a trip
  starts or ends, used by the route scorer and by the solver's model (its routine term):
  a door at its centre, a clear floor space at its middle (:func:`zone_point`), a room at
  the centre of the largest circle in its floor less its fittings (:func:`room_point`),
  which does not depend on where the furniture stands, so a model that has not placed the
  pieces yet aims at the same point the scorer measures to.

References: 2010 ADA Standards §305.3, §305.6.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from enum import StrEnum

import shapely
from shapely import LineString, Point
from shapely.geometry.base import BaseGeometry

from roomfit.audit import geometry as geo
from roomfit.audit.walkway import (
    TOUCH_MM,
    TOUCH_MM2,
    Floor,
    Walkway,
    polys,
    standing,
    walkway,
)
from roomfit.plan.data import OUTSIDE, Plan

__all__ = [
    "PlaceKind",
    "Target",
    "targets",
    "roots_in",
    "reached",
    "joined",
    "place_target",
    "zone_point",
    "room_point",
    "end_point",
]

XY = tuple[float, float]

class PlaceKind(StrEnum):
    """How a place is served by the walkway (see the module docstring)."""

    DOOR = "door"
    ZONE = "zone"
    POINT = "point"
    BESIDE = "beside"   # a piece or fitting without a zone: served by the parts beside it


@dataclass(frozen=True)
class Target:
    """A place a person must get to: ``geom`` in ``room``.

    ``depth``: how far (mm) a body centre can go into it (half a door's width, a turning
    space's clearance, 0 for a point); ``door``: the door of a door side; ``kind``: how it
    is served; ``ids``: the pieces, fittings or doors it belongs to.
    """

    label: str
    room: str
    geom: BaseGeometry
    depth: float
    ids: tuple[str, ...]
    door: str | None = None
    kind: PlaceKind = PlaceKind.POINT
    key: int = -1   # a plan zone's index into the floor's zones, -1 for any other place
    aim: XY | None = None   # where a route to it ends (see the module docstring)



def _zone_target(label: str, room: str, zone: BaseGeometry, ids: tuple[str, ...],
                 key: int) -> Target:
    return Target(label, room, zone, 0.0, ids, kind=PlaceKind.ZONE, key=key,
                  aim=zone_point(zone))


def targets(floor: Floor) -> list[Target]:
    """Every place the audit asks to reach: both sides of each door, each use zone (the
    part inside its room) and each fitting's zone."""
    out: list[Target] = []
    for ds in floor.doors:
        for rid in ds.door.rooms:
            if rid == OUTSIDE or rid not in floor.rooms:
                continue
            out.append(Target(f"the {rid} side of door {ds.door.id}", rid, Point(ds.door.at),
                              ds.door.width / 2, (ds.door.id,), ds.door.id, PlaceKind.DOOR,
                              aim=(float(ds.door.at[0]), float(ds.door.at[1]))))
    return out + _zones(floor)


def _zones(floor: Floor) -> list[Target]:
    if floor.zones is not None:
        return floor.zones
    out: list[Target] = []
    for pid, pc in floor.placed.items():
        room = floor.rooms.get(pc.placement.room)
        if room is None:
            continue
        for z, zp in geo.use_zones(pc.spec, pc.placement):
            g = zp.intersection(room)
            out.append(_zone_target(f"the {z.side} zone of {pid}", pc.placement.room,
                                    g if polys(g) else zp, (pid,), len(out)))
    for f in floor.plan.fixtures:
        fz = geo.fixture_zone(f)
        if fz is not None and f.room in floor.rooms:
            out.append(_zone_target(f"the zone of fitting {f.id}", f.room, fz, (f.id,),
                                    len(out)))
    floor.zones = out
    return out


def _sides(g: BaseGeometry) -> list[LineString]:
    """The straight sides of a zone's outline (of its largest polygon)."""
    ps = polys(g)
    if not ps:
        return []
    ring = list(max(ps, key=lambda q: q.area).exterior.coords)
    return [LineString([a, b]) for a, b in zip(ring, ring[1:], strict=False)
            if math.dist(a, b) > TOUCH_MM]


def _clear(floor: Floor, t: Target) -> bool:
    """A zone free at its own size: inside its room and free of footprints and fittings
    other than its owner's."""
    room = floor.rooms.get(t.room)
    if room is None or t.geom.difference(room).area > TOUCH_MM2:
        return False
    solid = [pc.shape for pid, pc in standing(floor) if pid not in t.ids]
    solid += [g for fid, g in floor.fixtures.items() if fid not in t.ids]
    return all(t.geom.intersection(s).area <= TOUCH_MM2 for s in solid if t.geom.intersects(s))


def _zone_links(floor: Floor) -> tuple[list[list[LineString]], list[tuple[int, int]]]:
    """The sides of each zone, and the pairs (k, m) where one full side of zone k adjoins
    the clear zone m (the same for every width: computed once per floor)."""
    if floor.zone_links is None:
        zones = _zones(floor)
        sides = [_sides(z.geom) for z in zones]
        clear = [k for k, z in enumerate(zones) if _clear(floor, z)]
        grown = {k: zones[k].geom.buffer(TOUCH_MM) for k in clear}
        links = [(k, m) for k, z in enumerate(zones) for m in clear
                 if m != k and zones[m].room == z.room
                 and any(grown[m].covers(s) for s in sides[k])]
        floor.zone_links = (sides, links)
    return floor.zone_links


def _zone_roots(floor: Floor, st: Walkway, room: str) -> dict[int, set[int]]:
    """For each zone of ``room`` (index into :func:`_zones`), the roots of the joined parts
    that serve it: directly (one full side adjoins their bodies) or through a chain of clear
    zones, each adjoining the next by one full side (zones adjoin only within a room, so a
    room's zones are worked out on their own, when first asked for at this width)."""
    if room in st.zone_roots:
        return st.zone_roots[room]
    zones = _zones(floor)
    sides, links = _zone_links(floor)
    served: dict[int, set[int]] = {k: _adjoined(st, z, sides[k]) for k, z in enumerate(zones)
                                   if z.room == room}
    links = [(k, m) for k, m in links if k in served]
    changed = True
    while changed:  # adjoining clear zones pass on the parts that serve them
        changed = False
        for k, m in links:
            if served[m] - served[k]:
                served[k] |= served[m]
                changed = True
    st.zone_roots[room] = served
    return served


def roots_in(floor: Floor, st: Walkway, t: Target) -> set[int]:
    """Roots of the joined parts that serve ``t`` in walkway ``st``."""
    if t.kind is PlaceKind.DOOR and t.door is not None:
        _, idx = st.mouths.get((t.door, t.room), (None, []))
        return {st.root[i] for i in idx}
    if t.kind is PlaceKind.ZONE:
        if t.key >= 0:
            return _zone_roots(floor, st, t.room)[t.key]
        return _adjoined(st, t, _sides(t.geom))
    return {st.root[i] for i in st.near(t.room, t.geom, t.depth)}


def _adjoined(st: Walkway, z: Target, sides: list[LineString]) -> set[int]:
    """Roots of the joined parts whose bodies adjoin one full side of zone ``z``."""
    roots = {st.root[i] for i in st.within(z.room, z.geom, st.side_reach())}
    return {rt for rt in roots if any(st.reach(z.room, rt).covers(s) for s in sides)}


def reached(floor: Floor, t: Target, width: float, st: Walkway | None = None) -> bool:
    """Is ``t`` reached from the entrance at ``width`` (or in walkway ``st``)?"""
    st = st if st is not None else walkway(floor, width)
    return bool(roots_in(floor, st, t) & st.start)


def joined(floor: Floor, a: Target, b: Target, width: float, st: Walkway | None = None
           ) -> bool:
    """Are the places ``a`` and ``b`` joined by a way ``width`` wide (or in walkway ``st``)?"""
    st = st if st is not None else walkway(floor, width)
    return bool(roots_in(floor, st, a) & roots_in(floor, st, b))


def place_target(floor: Floor, name: str) -> list[Target]:
    """The targets that serve a named place of a trip: ``"entrance"``, a door, a room (its
    free floor), a fitting (its zone, else its outline), or a piece (each use zone, else
    its footprint). Empty when there is no such place (or the piece is not placed)."""
    plan = floor.plan
    entries = [ds for ds in floor.doors if ds.door.is_entrance]
    if name == "entrance" and entries:
        name = entries[0].door.id
    for t in targets(floor):
        if t.kind is PlaceKind.DOOR and t.door == name:
            return [t]
    if name in floor.rooms:
        return [Target(f"room {name}", name, floor.free[name], 0.0, (), kind=PlaceKind.POINT,
                       aim=room_point(plan, name))]
    for f in plan.fixtures:
        if f.id == name and f.room in floor.rooms:
            zs = [z for z in _zones(floor) if z.ids == (f.id,)]
            return zs or [Target(f"fitting {f.id}", f.room, floor.fixtures[f.id], 0.0, (f.id,),
                                 kind=PlaceKind.BESIDE)]
    if name in floor.placed:
        pc = floor.placed[name]
        zs = [z for z in _zones(floor) if z.ids == (name,)]
        return zs or [Target(f"piece {name}", pc.placement.room, pc.shape, 0.0, (name,),
                             kind=PlaceKind.BESIDE)]
    return []


def zone_point(zone: BaseGeometry) -> XY:
    """Where a trip to a clear floor space ends: its centroid, or a point inside it when
    the centroid is not (an L-shaped zone).

    >>> from shapely import box
    >>> zone_point(box(0, 0, 1000, 600))
    (500.0, 300.0)
    """
    c = zone.centroid
    if not zone.covers(c):
        c = zone.representative_point()
    return (c.x, c.y)


def room_point(plan: Plan, room: str) -> XY:
    """Where a trip to room ``room`` starts or ends: the centre of the largest circle in its
    floor less its fittings (of its largest part). It lies on the floor even in an L-shaped
    room, where the centroid can fall outside, and does not move with the furniture.

    >>> from roomfit.plan.data import Room
    >>> ell = Room("r", "R", "living", ((0, 0), (4000, 0), (4000, 1000), (1000, 1000),
    ...                                  (1000, 4000), (0, 4000)))
    >>> x, y = room_point(Plan("p", (ell,)), "r")
    >>> 0 <= x <= 1000 or 0 <= y <= 1000   # in one of the arms (the centroid is not)
    True
    """
    floor = geo.free_floor(plan.room(room), plan)
    big = max(polys(floor), key=lambda p: p.area, default=None)
    if big is None:
        c = floor.representative_point() if not floor.is_empty else Point(0, 0)
        return (c.x, c.y)
    x, y = shapely.maximum_inscribed_circle(big, 1.0).coords[0]
    return (float(x), float(y))


def end_point(plan: Plan, name: str) -> tuple[XY, tuple[str, ...]] | None:
    """Where a trip to the fixed place ``name`` starts or ends, and the rooms it is entered
    from: ``"entrance"`` or a door (its centre; the rooms it joins), a fitting (the middle
    of its zone by :func:`zone_point`, else of its outline; its room), a room
    (:func:`room_point`). None for a piece (it moves: the scorer ends at its zones, the
    solver's model at its footprint's centre) and for a name the plan does not have.

    The route scorer's targets carry the same points (:attr:`Target.aim`).
    """
    if name == "entrance":
        name = next((d.id for d in plan.doors if d.is_entrance), "")
    for d in plan.doors:
        if d.id == name:
            return (float(d.at[0]), float(d.at[1])), d.rooms
    for f in plan.fixtures:
        if f.id == name:
            return zone_point(geo.fixture_zone(f) or geo.fixture_polygon(f)), (f.room,)
    if any(r.id == name for r in plan.rooms):
        return room_point(plan, name), (name,)
    return None
