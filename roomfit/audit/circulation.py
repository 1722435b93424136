"""Circulation rules of the audit, all judged by the walkway engine
(:mod:`roomfit.audit.walkway`):

- ``route.reach``: every door side, use zone, fitting zone and turning space reachable from
  the entrance at ``route.width`` (or through narrow stretches the pinch allowance admits);
- ``route.width``: per room, the narrowest passage on the way to everything in it;
- ``route.trip``: every trip of the plan's routine (or of the default routine) can be walked
  or wheeled at ``route.width``; a failing trip names its narrowest place.

A failure names the widest way that does exist (always below the width asked: it is found
by bisection below it) and the place it narrows, by room and the nearest door or piece.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from shapely import MultiPoint, Point

from roomfit.audit.bottleneck import bottleneck, widest
from roomfit.audit.findings import Finding, fmt_mm, outline, point, source_of
from roomfit.audit.pinch import pinch_walkway
from roomfit.audit.places import Target, joined, place_target, reached, targets
from roomfit.audit.routines import routines_for
from roomfit.audit.walkway import TOUCH_MM2, Floor, room_at, standing
from roomfit.plan.data import Trip

__all__ = ["place_words", "check_routes", "trip_finding", "check_trips"]

XY = tuple[float, float]

_DOORWAY = 50  # mm: a piece this close to a doorway's opening stands in the doorway


@dataclass(frozen=True)
class _Row:
    """One target's outcome for the room's ``route.width`` finding."""

    best: float
    where: XY | None
    ids: tuple[str, ...]
    ok: bool


def place_words(floor: Floor, where: XY, ids: tuple[str, ...] = ()) -> str:
    """A place a person can find: the room, then the nearest door within a route width or
    else the nearest piece or fitting named in ``ids``, then the plan point.

    >>> # e.g. "in hall at door d1 (950, 0)" or "in bedroom beside bed (1200, 3400)"
    """
    p = Point(where)
    room = room_at(floor, p)
    words = f"in {room}" if room else "outside every room"
    route = floor.rules.get("route.width").exact_mm
    doors = sorted((Point(ds.door.at).distance(p), ds.door.id) for ds in floor.doors
                   if room in ds.door.rooms)
    if doors and doors[0][0] <= route:
        words += f" at door {doors[0][1]}"
    elif ids:
        words += f" beside {ids[0]}"
    return words + f" ({where[0]:.0f}, {where[1]:.0f})"


def _reach_one(floor: Floor, t: Target, width: float, pinch: float | None
               ) -> tuple[Finding, _Row]:
    """The ``route.reach`` finding of one target (see the module docstring)."""
    rw = floor.rules.get("route.width")
    src = source_of(rw)
    if reached(floor, t, width):
        return (Finding("route.reach", True, f"{t.label} is reachable from the entrance at "
                        f"{fmt_mm(width)}", measured=width, required=width, source=src,
                        pieces=t.ids, room=t.room), _Row(math.inf, None, t.ids, True))
    note, ok, lo = "", False, 0.0
    narrow = pinch_walkway(floor) if pinch is not None else None
    if narrow is not None and pinch is not None and reached(floor, t, pinch):
        st, longest = narrow
        length = floor.rules.get("route.pinch_length").exact_mm
        if reached(floor, t, pinch, st):
            ok, lo = True, pinch
            note = (f" only through narrow stretches of at least {fmt_mm(pinch)}, the longest"
                    f" {fmt_mm(longest)} (up to {fmt_mm(length)} allowed)")
        else:
            note = f"; at {fmt_mm(pinch)} it needs a narrow stretch longer than {fmt_mm(length)}"
    if ok or reached(floor, t, 0.0):
        best, fail = widest(lambda w: reached(floor, t, w), lo, width)
    else:
        best, fail = 0.0, 0.0
    where, ids = bottleneck(floor, t, fail)
    at = place_words(floor, where, ids)
    if ok:
        msg = f"{t.label} is reachable{note}; the widest route to it is {fmt_mm(best)}, " \
              f"narrowest {at}"
    else:
        msg = (f"{t.label} is not reachable from the entrance at {fmt_mm(width)}; "
               + (f"the widest route to it is {fmt_mm(best)}, narrowest {at}" if best > 0 else
                  f"it is cut off at any width, {at}") + note)
        if ids:
            msg += f", next to {', '.join(ids)}"
    ring = () if ok or isinstance(t.geom, (Point, MultiPoint)) else outline(t.geom)
    return (Finding("route.reach", ok, msg, measured=round(best, 1), required=width, source=src,
                    pieces=t.ids if ok else ids, room=t.room, where=where, outline=ring),
            _Row(best, where, ids, ok))


def check_routes(floor: Floor, extra: list[Target], widths: bool = True) -> list[Finding]:
    """``route.reach`` for every target (``extra``: the turning spaces found) and one
    ``route.width`` per room; ``widths=False`` stops the width search at the route width."""
    rw = floor.rules.get("route.width")
    width = rw.exact_mm
    if not any(ds.door.is_entrance for ds in floor.doors):
        return [Finding("route.reach", False, "the plan has no entrance door to start from",
                        required=width, source=source_of(rw))]
    found = targets(floor) + extra
    doored = {rid for ds in floor.doors for rid in ds.door.rooms}
    out: list[Finding] = [  # a room without a door has nothing to aim at, yet cannot be entered
        Finding("route.reach", False, f"room {room.id} has no door: it cannot be reached from "
                "the entrance", measured=0.0, required=width, source=source_of(rw), room=room.id,
                where=point(floor.rooms[room.id]), outline=outline(floor.rooms[room.id]))
        for room in floor.plan.rooms if room.id not in doored]
    pinch = floor.rules.get("route.pinch_width").exact_mm if floor.rules.has(
        "route.pinch_width") else None
    per_room: dict[str, list[_Row]] = {}
    for t in found:
        f, row = _reach_one(floor, t, width, pinch)
        out.append(f)
        per_room.setdefault(t.room, []).append(row)
    out += _route_widths(floor, found, per_room, width, source_of(rw),
                         2 * width if widths else width)
    return out


def _route_widths(floor: Floor, found: list[Target], per_room: dict[str, list[_Row]],
                  width: float, source: str, cap: float) -> list[Finding]:
    """One ``route.width`` finding per room: the narrowest passage on the way to everything
    in it, searched up to ``cap`` (a room fine at ``cap`` is reported as "at least")."""
    out: list[Finding] = []
    for room in floor.plan.rooms:
        rows = per_room.get(room.id, [])
        if not rows:
            continue
        mine = [t for t in found if t.room == room.id]
        if all(r.best == math.inf for r in rows):
            def pred(w: float, mine: list[Target] = mine) -> bool:
                return all(reached(floor, t, w) for t in mine)
            if pred(cap):
                out.append(Finding("route.width", True,
                                   f"the way to everything in {room.id} is at least "
                                   f"{fmt_mm(cap)} wide", measured=cap, required=width,
                                   source=source, room=room.id))
                continue
            best, fail = widest(pred, width, cap)
            t = next(t for t in mine if not reached(floor, t, fail))
            where, ids = bottleneck(floor, t, fail)
            row = _Row(best, where, ids, True)
        else:
            row = min(rows, key=lambda r: r.best)
            row = _Row(row.best, row.where, row.ids, all(r.ok for r in rows))
        msg = (f"the narrowest passage on the way to {room.id} is {fmt_mm(row.best)}"
               + (f" {place_words(floor, row.where, row.ids)}" if row.where else "")
               + (f", next to {', '.join(row.ids)}" if row.ids else "")
               + ("" if row.ok else f", under the {fmt_mm(width)} asked"))
        out.append(Finding("route.width", row.ok, msg, measured=round(row.best, 1),
                           required=width, source=source, pieces=row.ids, room=room.id,
                           where=row.where))
    return out


def _trip_joined(floor: Floor, a: list[Target], b: list[Target], width: float) -> bool:
    return any(joined(floor, x, y, width) for x in a for y in b)


def trip_finding(floor: Floor, trip: Trip, width: float, a: list[Target] | None = None,
                 b: list[Target] | None = None) -> Finding:
    """The ``route.trip`` finding of one routine trip (``a`` and ``b``: the places of its
    ends, when the caller has them, say plan points)."""
    rw = floor.rules.get("route.width")
    name = trip.label or f"{trip.origin} to {trip.target}"
    a = a if a is not None else place_target(floor, trip.origin)
    b = b if b is not None else place_target(floor, trip.target)
    if not a or not b:  # check_trips leaves such trips out; a caller's plan point
        missing = trip.origin if not a else trip.target
        return Finding("route.trip", False, f"trip {name}: {missing} is not a placed piece, "
                       "fitting, door or room of the plan", required=width, source=source_of(rw))
    if _trip_joined(floor, a, b, width):
        return Finding("route.trip", True, f"trip {name} can be made at {fmt_mm(width)}",
                       measured=width, required=width, source=source_of(rw), room=b[0].room)
    narrow = pinch_walkway(floor)
    if narrow is not None:
        st = narrow[0]
        pinch = st.width
        if any(joined(floor, x, y, pinch, st) for x in a for y in b):
            return Finding("route.trip", True, f"trip {name} can be made only through narrow "
                           f"stretches of at least {fmt_mm(pinch)} (allowed)", measured=pinch,
                           required=width, source=source_of(rw), room=b[0].room)
    if _trip_joined(floor, a, b, 0.0):
        best, fail = widest(lambda w: _trip_joined(floor, a, b, w), 0.0, width)
        x, y = next((x, y) for x in a for y in b if joined(floor, x, y, best))
        where, ids = bottleneck(floor, y, fail, origin=x)
        msg = (f"trip {name}: no way {fmt_mm(width)} wide joins {trip.origin} and "
               f"{trip.target}; the widest way is about {fmt_mm(best)}, narrowest "
               f"{place_words(floor, where, ids)}")
    else:
        best = 0.0
        where, ids = bottleneck(floor, b[0], 0.0, origin=a[0])
        shut = blocked_doors(floor)
        msg = (f"trip {name}: no way {fmt_mm(width)} wide joins {trip.origin} and "
               f"{trip.target}, nor any narrower one; "
               + ("; ".join(shut) if shut else "they are walled apart"))
    if ids and best > 0:
        msg += f" between {' and '.join(ids[:2])}" if len(ids) > 1 else f" next to {ids[0]}"
    return Finding("route.trip", False, msg, measured=round(best, 1), required=width,
                   source=source_of(rw), pieces=ids, room=room_at(floor, Point(where)),
                   where=where)


def blocked_doors(floor: Floor) -> list[str]:
    """Sentences naming the doorways pieces or fittings stand in (within 50 mm of the
    opening, either side)."""
    out = []
    solid = [(pid, pc.shape) for pid, pc in standing(floor)] + list(floor.fixtures.items())
    for ds in floor.doors:
        rect = ds.opening.buffer(_DOORWAY, cap_style="flat")
        ids = [sid for sid, g in solid if g.intersection(rect).area > TOUCH_MM2]
        if ids:
            out.append(f"door {ds.door.id!r} is blocked by {' and '.join(ids)}")
    return out


def check_trips(floor: Floor) -> list[Finding]:
    """One ``route.trip`` finding per trip of the plan's routine (or the default routine
    where the plan has none) whose two places are in this arrangement: a trip to a piece
    without a placement (or left out, as the solver leaves out pieces of other rooms while
    it places one group) waits until the piece stands somewhere; ``piece.room`` already
    fails for a piece not placed."""
    width = floor.rules.get("route.width").exact_mm
    trips, _ = routines_for(floor.plan)
    out: list[Finding] = []
    for trip in trips:
        a, b = place_target(floor, trip.origin), place_target(floor, trip.target)
        if a and b:
            out.append(trip_finding(floor, trip, width, a, b))
    return out

