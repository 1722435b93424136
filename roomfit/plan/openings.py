"""Doors and windows of a plan file: each on a wall of its room, leading where it says.

A door joins two rooms on either side of one wall (at most :data:`MAX_WALL_THICKNESS` thick)
or a room and ``outside``; a window sits on a wall of its room. Openings on one wall may not
overlap.
"""

from __future__ import annotations

import math

from shapely import LineString, Point, Polygon

from roomfit.audit.geometry import nearest_edge, wall_direction
from roomfit.plan.data import OUTSIDE, Door, Leaf, Room, Window
from roomfit.plan.fields import FieldReader, array_items, known_ids

__all__ = ["ON_WALL_TOLERANCE", "MAX_WALL_THICKNESS", "read_doors", "read_windows",
           "openings_apart"]

_DOOR_KEYS = {"id", "rooms", "at", "width", "leaf", "swings_into", "hinge"}
_WINDOW_KEYS = {"id", "room", "at", "width", "sill"}

#: A door or window centre may lie this far (mm) off its wall and still count as on it.
ON_WALL_TOLERANCE = 5

#: A door joins two rooms whose walls are at most this far apart (mm): the wall thickness.
MAX_WALL_THICKNESS = 600

def _on_wall(r: FieldReader, room: Room, at: tuple[int, int], width: int, field: str) -> None:
    """Check that an opening of ``width`` centred at ``at`` lies on an edge of ``room``."""
    i, dist = nearest_edge(room.outline, at)
    if dist > ON_WALL_TOLERANCE:
        r.add(f"{field}.at", f"({at[0]}, {at[1]}) is {dist:.0f} mm off the nearest wall of room "
              f"{room.id!r} (edge {i}); it must lie on a wall",
              f"allowed: within {ON_WALL_TOLERANCE} mm")
        return
    (x0, y0), (x1, y1) = _straight_run(room.outline, i)
    edge = math.hypot(x1 - x0, y1 - y0)
    if width > edge:
        r.add(f"{field}.width", f"{width} mm is wider than its wall (edge {i} of room "
              f"{room.id!r} is {edge:.0f} mm long)")
        return
    along = ((at[0] - x0) * (x1 - x0) + (at[1] - y0) * (y1 - y0)) / edge
    if along - width / 2 < -0.5 or along + width / 2 > edge + 0.5:
        over = max(width / 2 - along, along + width / 2 - edge)
        r.add(f"{field}.at", f"the opening runs {over:.0f} mm past the end of its wall (edge {i} "
              f"of room {room.id!r}, {edge:.0f} mm long)", "move it along the wall")


def _straight_run(outline: tuple[tuple[int, int], ...], i: int) -> tuple[tuple[int, int], ...]:
    """Ends of the straight wall holding edge ``i``: neighbouring edges that carry on in the
    same direction (a corner listed in the middle of a wall, or a repeated corner) belong
    to it, so an opening may span them."""
    n = len(outline)

    def straight(a: tuple[int, int], b: tuple[int, int], c: tuple[int, int]) -> bool:
        ux, uy, vx, vy = b[0] - a[0], b[1] - a[1], c[0] - b[0], c[1] - b[1]
        return ux * vy - uy * vx == 0 and ux * vx + uy * vy >= 0

    start, end = i, (i + 1) % n
    for _ in range(n - 2):
        if not straight(outline[(start - 1) % n], outline[start], outline[end]):
            break
        start = (start - 1) % n
    for _ in range(n - 2):
        if not straight(outline[start], outline[end], outline[(end + 1) % n]):
            break
        end = (end + 1) % n
    return outline[start], outline[end]


def _reaches_other_room(r: FieldReader, host: Room, other: Room, at: tuple[int, int], width: int,
                        wall: float, field: str) -> None:
    """Check that the whole opening leads into ``other``, not partly into a wall beyond it.

    The opening is carried across the wall (``wall`` mm thick) and must then lie on
    ``other``'s floor or wall, within :data:`ON_WALL_TOLERANCE`.
    """
    u = wall_direction(host.outline, at)
    n = (-u[1], u[0])
    if Polygon(host.outline).contains(Point(at[0] + n[0] * 5, at[1] + n[1] * 5)):
        n = (-n[0], -n[1])  # point away from the host room, towards the other one
    step, half = wall + ON_WALL_TOLERANCE, width / 2
    seg = LineString([(at[0] - u[0] * half + n[0] * step, at[1] - u[1] * half + n[1] * step),
                      (at[0] + u[0] * half + n[0] * step, at[1] + u[1] * half + n[1] * step)])
    room = Polygon(other.outline)
    if seg.length - seg.intersection(room.buffer(ON_WALL_TOLERANCE)).length > 1:
        beyond = seg.length - seg.intersection(room).length
        r.add(f"{field}.at", f"{beyond:.0f} mm of the {width} mm opening leads past the end of "
              f"the wall of room {other.id!r}", "move the door along the wall or make it narrower")


def read_doors(r: FieldReader, data: dict, rooms: dict[str, Room]) -> list[Door]:
    """The ``[[doors]]`` tables; a plan with doors needs one that leads outside."""
    doors = []
    names_outside = False  # a door leads outside, even one with a problem of its own
    for f, raw in array_items(r, data, "doors"):
        t = r.table(raw, f, _DOOR_KEYS, {"id", "rooms", "at", "width"})
        if t is None:
            continue
        did = r.ident(t, "id", f)
        pair = t.get("rooms")
        ok_pair = (isinstance(pair, list) and len(pair) == 2
                   and all(isinstance(x, str) for x in pair))
        if "rooms" in t and not ok_pair:
            r.add(f"{f}.rooms", 'expected two room ids, e.g. ["hall", "bedroom"] or '
                  '["hall", "outside"]')
        at = r.point(t["at"], f"{f}.at") if "at" in t else None
        width = r.length(t, "width", f)
        leaf_s = r.text(t, "leaf", f, default="hinged")
        leaf = None
        if leaf_s is not None:
            try:
                leaf = Leaf(leaf_s)
            except ValueError:
                r.add(f"{f}.leaf", f"unknown leaf {leaf_s!r}",
                      f"use one of {', '.join(x.value for x in Leaf)}")
        swings, hinge = r.text(t, "swings_into", f), r.text(t, "hinge", f)
        if not ok_pair or not isinstance(pair, list):
            continue
        a, b = pair
        names_outside = names_outside or OUTSIDE in pair
        if a not in rooms:
            r.add(f"{f}.rooms[0]", f"unknown room {a!r}", known_ids(rooms))
            continue
        if b != OUTSIDE and b not in rooms:
            r.add(f"{f}.rooms[1]", f"unknown room {b!r}", known_ids(rooms) + f", or {OUTSIDE!r}")
            continue
        if a == b:
            r.add(f"{f}.rooms", f"a door joins two different rooms, found {a!r} twice")
            continue
        if leaf == Leaf.HINGED:
            if swings not in (a, b):
                r.add(f"{f}.swings_into", f"a hinged door swings into one of its rooms "
                      f"({a!r} or {b!r}), found {swings!r}")
            if hinge not in ("left", "right"):
                r.add(f"{f}.hinge", f"expected 'left' or 'right', found {hinge!r}",
                      "as seen standing in the room the door swings into, facing the door")
        elif swings is not None or hinge is not None:
            r.add(f"{f}.swings_into" if swings is not None else f"{f}.hinge",
                  f"only hinged doors swing; this door's leaf is {leaf_s!r}")
        if at is None or width is None or did is None or leaf is None:
            continue
        before = len(r.problems)
        _on_wall(r, rooms[a], at, width, f)
        if b != OUTSIDE:
            _, dist = nearest_edge(rooms[b].outline, at)
            if dist > MAX_WALL_THICKNESS:
                r.add(f"{f}.at", f"({at[0]}, {at[1]}) is {dist:.0f} mm from the nearest wall of "
                      f"room {b!r}; a door joins rooms on either side of one wall",
                      f"walls up to {MAX_WALL_THICKNESS} mm thick are allowed")
            elif len(r.problems) == before:
                _reaches_other_room(r, rooms[a], rooms[b], at, width, dist, f)
        doors.append(Door(did, (a, b), at, width, leaf,
                          swings if leaf == Leaf.HINGED else None,
                          hinge if leaf == Leaf.HINGED else None))
    if rooms and doors and not names_outside:
        r.add("doors", "no entrance: no door joins a room to 'outside'",
              'give the flat\'s entrance door rooms = ["<room>", "outside"]')
    return doors


def read_windows(r: FieldReader, data: dict, rooms: dict[str, Room]) -> list[Window]:
    """The ``[[windows]]`` tables, each on a wall of its room."""
    out = []
    for f, raw in array_items(r, data, "windows"):
        t = r.table(raw, f, _WINDOW_KEYS, {"id", "room", "at", "width", "sill"})
        if t is None:
            continue
        wid, room = r.ident(t, "id", f), r.text(t, "room", f)
        at = r.point(t["at"], f"{f}.at") if "at" in t else None
        width = r.length(t, "width", f)
        sill = r.length(t, "sill", f, low=0)
        if room is not None and room not in rooms:
            r.add(f"{f}.room", f"unknown room {room!r}", known_ids(rooms))
            continue
        if None in (wid, room, at, width, sill):
            continue
        _on_wall(r, rooms[room], at, width, f)  # type: ignore[index,arg-type]
        out.append(Window(wid, room, at, width, sill))  # type: ignore[arg-type]
    return out


def openings_apart(r: FieldReader, data: dict, rooms: dict[str, Room], doors: list[Door],
                    windows: list[Window]) -> None:
    """Report doors and windows whose openings overlap on a wall (more than 1 mm)."""
    fields = {t.get("id"): f"{key}[{i}]" for key in ("doors", "windows")
              if isinstance(data.get(key), list)
              for i, t in enumerate(data[key])
              if isinstance(t, dict) and isinstance(t.get("id"), str)}
    spans = []
    for what, oid, room, at, width in (
            [("door", d.id, d.rooms[0], d.at, d.width) for d in doors]
            + [("window", w.id, w.room, w.at, w.width) for w in windows]):
        u = wall_direction(rooms[room].outline, at)
        half = width / 2
        spans.append((what, oid, LineString([(at[0] - u[0] * half, at[1] - u[1] * half),
                                             (at[0] + u[0] * half, at[1] + u[1] * half)])))
    for i, (what_a, a, sa) in enumerate(spans):
        for what_b, b, sb in spans[i + 1:]:
            shared = sa.intersection(sb).length
            if shared > 1.0 and b in fields:
                r.add(f"{fields[b]}.at", f"the {what_b}'s opening overlaps {what_a} {a!r} by "
                      f"{shared:.0f} mm", "openings on one wall must stand apart")


