"""Editing a plan on the page: moving, turning and nudging pieces, the building's rooms, doors
and windows, and undo and redo. Plain functions a test can call; ``app.py`` only calls them.

Every edit returns a *new* plan validated like a plan file (:func:`roomfit.page.validated`),
so a bad value raises :class:`~roomfit.errors.PlanError` with the field path it belongs to
(``doors[1].hinge``) and the caller keeps the old plan. Lengths are integer millimetres.

>>> from roomfit.plan.data import Plan, Room, Piece
>>> room = Room("r", "Room", "living", ((0, 0), (4000, 0), (4000, 3000), (0, 3000)))
>>> p = Plan("demo", (room,), furniture=(Piece("s", "sofa-3", ("r",)),))
>>> p = place_piece(p, "s", 1000, 1000, 0)
>>> p = snap_to_wall(p, "s")
>>> p.piece("s").placement.y  # the sofa's back (south at rotation 0) on the south wall
0
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from typing import Any

from shapely import Point, Polygon

from roomfit.audit.geometry import footprint_box, side_direction, turned_size, wall_direction
from roomfit.errors import PlanError, Problem
from roomfit.page import EDITED_SOURCE, new_id, validated
from roomfit.plan.data import Door, Leaf, Placement, Plan, Room, Window
from roomfit.rules.catalog import PieceSpec, resolve_pieces
from roomfit.rules.sets import rules_for

__all__ = [
    "History",
    "record",
    "undo",
    "redo",
    "room_at",
    "place_piece",
    "nudge_piece",
    "turn_piece",
    "snap_to_wall",
    "edit_door",
    "door_slide_way",
    "slide_door",
    "wall_choices",
    "on_wall",
    "add_door",
    "remove_door",
    "add_window",
    "edit_window",
    "set_outline",
    "piece_at",
    "Sketch",
    "sketch",
]

#: How many earlier plans undo keeps (common practice for an editing session).
HISTORY_DEPTH = 50


@dataclass(frozen=True)
class History:
    """Plans to go back to (``past``, newest last) and forward to (``future``, newest last)."""

    past: tuple[Plan, ...] = ()
    future: tuple[Plan, ...] = ()


def record(history: History, before: Plan) -> History:
    """``history`` after an edit made from ``before``: it can be undone; redo is cleared."""
    return History((*history.past, before)[-HISTORY_DEPTH:], ())


def undo(history: History, current: Plan) -> tuple[History, Plan]:
    """Step back: the plan before the last edit (``current`` when there is none)."""
    if not history.past:
        return history, current
    return History(history.past[:-1], (*history.future, current)), history.past[-1]


def redo(history: History, current: Plan) -> tuple[History, Plan]:
    """Step forward again after :func:`undo`."""
    if not history.future:
        return history, current
    return History((*history.past, current), history.future[:-1]), history.future[-1]


def _piece_index(plan: Plan, piece_id: str) -> int:
    for i, p in enumerate(plan.furniture):
        if p.id == piece_id:
            return i
    raise PlanError(Problem("furniture", f"no piece with id {piece_id!r}"), EDITED_SOURCE)


def room_at(plan: Plan, x: float, y: float) -> str | None:
    """The id of the room whose floor holds the point (x, y), or None."""
    for r in plan.rooms:
        poly = Polygon(r.outline)
        if poly.covers(Point(x, y)):
            return r.id
    return None


def _spec(plan: Plan, piece_id: str) -> PieceSpec:
    return next(s for s in resolve_pieces(plan, rules_for(plan)) if s.id == piece_id)


def _size(plan: Plan, piece_id: str, rotation: int) -> tuple[int, int]:
    spec = _spec(plan, piece_id)
    return turned_size(spec.width, spec.depth, rotation)


def place_piece(plan: Plan, piece_id: str, x: int, y: int, rotation: int,
                room: str | None = None) -> Plan:
    """``plan`` with the piece's lower-left corner at (x, y) mm, turned ``rotation`` degrees
    (0, 90, 180 or 270). The room is ``room``, else the room under the piece's centre, else
    the room it stood in, else its first allowed room. A locked piece stays locked where it
    is put. Raises :class:`PlanError` at ``furniture[i].placement`` for a bad rotation or a
    room the piece may not stand in."""
    i = _piece_index(plan, piece_id)
    p = plan.furniture[i]
    if rotation % 90 or not 0 <= rotation < 360:
        raise PlanError(Problem(f"furniture[{i}].placement.rotation",
                                f"turn by 0, 90, 180 or 270 degrees, not {rotation}"), EDITED_SOURCE)
    w, d = _size(plan, piece_id, rotation)
    here = room or room_at(plan, x + w / 2, y + d / 2)
    if here is None:
        here = p.placement.room if p.placement is not None else p.rooms[0]
    if here not in p.rooms:
        raise PlanError(Problem(f"furniture[{i}].placement.room",
                                f"{p.label or p.id} may stand only in {', '.join(p.rooms)}, not {here}",
                                "add the room to the rooms it may stand in first"), EDITED_SOURCE)
    pieces = list(plan.furniture)
    pieces[i] = replace(p, placement=Placement(int(x), int(y), int(rotation), here))
    return validated(replace(plan, furniture=tuple(pieces)))


def _placed(plan: Plan, piece_id: str) -> Placement:
    i = _piece_index(plan, piece_id)
    pl = plan.furniture[i].placement
    if pl is None:
        raise PlanError(Problem(f"furniture[{i}].placement",
                                f"{piece_id} has no place yet: give it a position first"),
                        EDITED_SOURCE)
    return pl


def nudge_piece(plan: Plan, piece_id: str, dx: int, dy: int) -> Plan:
    """``plan`` with the piece moved by (dx, dy) mm."""
    pl = _placed(plan, piece_id)
    return place_piece(plan, piece_id, pl.x + dx, pl.y + dy, pl.rotation, pl.room)


def turn_piece(plan: Plan, piece_id: str, by: int = 90) -> Plan:
    """``plan`` with the piece turned ``by`` degrees counter-clockwise about its centre
    (rounded to the millimetre)."""
    pl = _placed(plan, piece_id)
    w, d = _size(plan, piece_id, pl.rotation)
    rot = (pl.rotation + by) % 360
    w2, d2 = _size(plan, piece_id, rot)
    cx2, cy2 = 2 * pl.x + w, 2 * pl.y + d  # twice the centre: stays in integers
    return place_piece(plan, piece_id, (cx2 - w2) // 2, (cy2 - d2) // 2, rot, pl.room)


def snap_to_wall(plan: Plan, piece_id: str) -> Plan:
    """``plan`` with the piece moved straight back until its back meets its room's wall.

    The distance is measured from the middle of the back edge along the back direction to
    the room outline; a piece whose back already touches a wall stays where it is."""
    pl = _placed(plan, piece_id)
    spec = _spec(plan, piece_id)
    x0, y0, x1, y1 = footprint_box(spec, pl)
    bx, by = side_direction("back", pl.rotation)
    mid = ((x0 + x1) / 2 if bx == 0 else (x1 if bx > 0 else x0),
           (y0 + y1) / 2 if by == 0 else (y1 if by > 0 else y0))
    room = Polygon(plan.room(pl.room).outline)
    reach = max(room.bounds[2] - room.bounds[0], room.bounds[3] - room.bounds[1])
    if not room.covers(Point(mid)):
        return plan
    # bisect along the back direction for the farthest point still on the floor: the wall
    lo, hi = 0.0, float(reach)
    for _ in range(40):
        m = (lo + hi) / 2
        if room.covers(Point(mid[0] + bx * m, mid[1] + by * m)):
            lo = m
        else:
            hi = m
    best = round(lo)
    if best == 0:
        return plan
    return place_piece(plan, piece_id, pl.x + bx * best, pl.y + by * best, pl.rotation, pl.room)


def _door_index(plan: Plan, door_id: str) -> int:
    for i, d in enumerate(plan.doors):
        if d.id == door_id:
            return i
    raise PlanError(Problem("doors", f"no door with id {door_id!r}"), EDITED_SOURCE)


def edit_door(plan: Plan, door_id: str, *, width: int | None = None, at: tuple[int, int] | None = None,
              leaf: str | None = None, swings_into: str | None = None,
              hinge: str | None = None) -> Plan:
    """``plan`` with one door's clear width, centre, leaf (``hinged``, ``sliding``,
    ``none``), the room its leaf swings into and its hinge side (``left``/``right`` as seen
    from that room) changed; None keeps a value. A sliding leaf or open doorway drops the
    swing and hinge."""
    i = _door_index(plan, door_id)
    d: Door = plan.doors[i]
    kind = Leaf(leaf) if leaf is not None else d.leaf
    new = replace(d, width=int(width) if width is not None else d.width,
                  at=(int(at[0]), int(at[1])) if at is not None else d.at, leaf=kind,
                  swings_into=(swings_into or d.swings_into) if kind == Leaf.HINGED else None,
                  hinge=(hinge or d.hinge) if kind == Leaf.HINGED else None)
    doors = list(plan.doors)
    doors[i] = new
    return validated(replace(plan, doors=tuple(doors)))


def _slide_axis(plan: Plan, door: Door) -> tuple[float, float]:
    """Unit vector along the door's wall, turned to point east (or north on a wall running
    north-south), so that a positive slide has a compass name whatever the outline's order."""
    ux, uy = wall_direction(plan.room(door.rooms[0]).outline, door.at)
    if ux < -1e-9 or (abs(ux) <= 1e-9 and uy < 0):
        ux, uy = -ux, -uy
    return ux, uy


def door_slide_way(plan: Plan, door_id: str) -> str:
    """The compass word of a positive :func:`slide_door` (``east``, ``north``, or the nearer
    of the two for an angled wall: ``north-east``-ish walls slide towards ``east``).

    >>> from roomfit.plan.data import Room
    >>> r = Room("r", "Room", "hall", ((0, 0), (3000, 0), (3000, 2000), (0, 2000)))
    >>> p = Plan("t", (r,), (Door("d", ("r", "outside"), (3000, 1000), 800, Leaf.NONE),))
    >>> door_slide_way(p, "d")
    'north'
    """
    ux, uy = _slide_axis(plan, plan.doors[_door_index(plan, door_id)])
    return "east" if abs(ux) >= abs(uy) else "north"


def slide_door(plan: Plan, door_id: str, by: int) -> Plan:
    """``plan`` with one door moved ``by`` mm along its wall (positive: towards
    :func:`door_slide_way`), as the building findings propose ("move door d 400 mm east").
    A door that would leave its wall or overlap another opening is refused with the field.

    >>> from roomfit.plan.data import Room
    >>> r = Room("r", "Room", "hall", ((0, 0), (3000, 0), (3000, 2000), (0, 2000)))
    >>> p = Plan("t", (r,), (Door("d", ("r", "outside"), (1000, 0), 800, Leaf.NONE),))
    >>> slide_door(p, "d", 400).doors[0].at
    (1400, 0)
    """
    d = plan.doors[_door_index(plan, door_id)]
    ux, uy = _slide_axis(plan, d)
    return edit_door(plan, door_id, at=(round(d.at[0] + by * ux), round(d.at[1] + by * uy)))


def wall_choices(room: Room) -> list[str]:
    """One label per wall of ``room``, in outline order: its two corners and length (mm), so
    a person can tell the walls apart ("wall 1: (0, 0) to (4000, 0), 4000 mm")."""
    pts = room.outline
    out = []
    for i, (a, b) in enumerate(zip(pts, pts[1:] + pts[:1], strict=True)):
        out.append(f"wall {i + 1}: ({a[0]}, {a[1]}) to ({b[0]}, {b[1]}), "
                   f"{round(math.dist(a, b))} mm")
    return out


def on_wall(room: Room, wall: int, along: int) -> tuple[int, int]:
    """The point ``along`` mm from the first corner of wall ``wall`` (0-based, outline order)
    towards its second: where a new door or window is centred.

    >>> r = Room("r", "Room", "hall", ((0, 0), (3000, 0), (3000, 2000), (0, 2000)))
    >>> on_wall(r, 1, 500)
    (3000, 500)
    """
    a, b = room.outline[wall], room.outline[(wall + 1) % len(room.outline)]
    k = along / math.dist(a, b)
    return round(a[0] + k * (b[0] - a[0])), round(a[1] + k * (b[1] - a[1]))


def add_door(plan: Plan, rooms: tuple[str, str], at: tuple[int, int], width: int,
             leaf: str = "hinged", swings_into: str | None = None,
             hinge: str | None = None) -> Plan:
    """``plan`` with a new door on a wall of ``rooms[0]`` joining it to ``rooms[1]`` (a room
    or ``outside``); a hinged leaf swings into ``rooms[0]`` with its hinges on the left unless
    told otherwise. Refused at its field like a plan file's door (off the wall, not reaching
    the other room, overlapping another opening)."""
    kind = Leaf(leaf)
    hinged = kind == Leaf.HINGED
    door = Door(new_id(plan, "d"), (rooms[0], rooms[1]), (int(at[0]), int(at[1])), int(width),
                kind, (swings_into or rooms[0]) if hinged else None,
                (hinge or "left") if hinged else None)
    return validated(replace(plan, doors=(*plan.doors, door)))


def remove_door(plan: Plan, door_id: str) -> Plan:
    """``plan`` without one door (routines that named it are refused at their field)."""
    i = _door_index(plan, door_id)
    return validated(replace(plan, doors=plan.doors[:i] + plan.doors[i + 1:]))


def add_window(plan: Plan, room: str, at: tuple[int, int], width: int, sill: int) -> Plan:
    """``plan`` with a new window on a wall of ``room`` (centre ``at``, ``width`` and ``sill``
    height in mm), refused at its field like a plan file's window."""
    window = Window(new_id(plan, "w"), room, (int(at[0]), int(at[1])), int(width), int(sill))
    return validated(replace(plan, windows=(*plan.windows, window)))


def edit_window(plan: Plan, window_id: str, *, width: int | None = None,
                sill: int | None = None, at: tuple[int, int] | None = None,
                remove: bool = False) -> Plan:
    """``plan`` with one window's width, sill height or centre changed, or the window removed."""
    idx = next((i for i, w in enumerate(plan.windows) if w.id == window_id), None)
    if idx is None:
        raise PlanError(Problem("windows", f"no window with id {window_id!r}"), EDITED_SOURCE)
    windows = list(plan.windows)
    if remove:
        del windows[idx]
    else:
        w: Window = windows[idx]
        windows[idx] = replace(w, width=int(width) if width is not None else w.width,
                               sill=int(sill) if sill is not None else w.sill,
                               at=(int(at[0]), int(at[1])) if at is not None else w.at)
    return validated(replace(plan, windows=tuple(windows)))


def set_outline(plan: Plan, room_id: str, corners: list[tuple[int, int]]) -> Plan:
    """``plan`` with the room's corners replaced (corners added, moved or removed), in order
    round the room. Raises :class:`PlanError` for fewer than three corners or an outline the
    plan reader refuses (one that crosses itself, say), at the room's field."""
    plan.room(room_id)
    if len(corners) < 3:
        idx = next(i for i, r in enumerate(plan.rooms) if r.id == room_id)
        raise PlanError(Problem(f"rooms[{idx}].outline", "a room needs at least three corners"),
                        EDITED_SOURCE)
    outline = tuple((int(x), int(y)) for x, y in corners)
    rooms = tuple(replace(r, outline=outline) if r.id == room_id else r for r in plan.rooms)
    return validated(replace(plan, rooms=rooms))


def piece_at(plan: Plan, x: float, y: float) -> str | None:
    """The id of the placed piece whose footprint holds the point (x, y) mm; where pieces
    overlap (a rug under a table), the smallest one."""
    best: tuple[float, str] | None = None
    for spec in resolve_pieces(plan, rules_for(plan)):
        pl = plan.piece(spec.id).placement
        if pl is None:
            continue
        x0, y0, x1, y1 = footprint_box(spec, pl)
        if x0 <= x <= x1 and y0 <= y <= y1:
            area = (x1 - x0) * (y1 - y0)
            if best is None or area < best[0]:
                best = (area, spec.id)
    return best[1] if best else None


@dataclass(frozen=True)
class Sketch:
    """A plain picture of the plan to click on: ``scale`` mm per pixel, ``minx``/``maxy`` the
    plan point at the picture's top-left corner."""

    image: Any
    scale: float
    minx: float
    maxy: float

    def to_plan(self, px: float, py: float) -> tuple[float, float]:
        """A picture pixel as plan millimetres (y flipped)."""
        return self.minx + px * self.scale, self.maxy - py * self.scale


def sketch(plan: Plan, width_px: int = 640, picked: str | None = None) -> Sketch:
    """Rooms and placed pieces as a small picture (PIL image), the picked piece filled dark,
    for choosing a piece by clicking it."""
    from PIL import Image, ImageDraw

    xs = [x for r in plan.rooms for x, _ in r.outline]
    ys = [y for r in plan.rooms for _, y in r.outline]
    pad = 200
    minx, maxx, miny, maxy = min(xs) - pad, max(xs) + pad, min(ys) - pad, max(ys) + pad
    scale = (maxx - minx) / width_px
    out = Sketch(Image.new("RGB", (width_px, max(1, round((maxy - miny) / scale))), "white"),
                 scale, minx, maxy)

    def px(x: float, y: float) -> tuple[float, float]:
        return (x - minx) / scale, (maxy - y) / scale

    draw = ImageDraw.Draw(out.image)
    for r in plan.rooms:
        draw.polygon([px(x, y) for x, y in r.outline], fill=(244, 242, 236), outline=(59, 62, 70),
                     width=2)
    for spec in resolve_pieces(plan, rules_for(plan)):
        pl = plan.piece(spec.id).placement
        if pl is None:
            continue
        x0, y0, x1, y1 = footprint_box(spec, pl)
        (a, b), (c, d) = px(x0, y1), px(x1, y0)
        dark = spec.id == picked
        draw.rectangle((a, b, c, d), fill=(134, 102, 58) if dark else (234, 216, 186),
                       outline=(134, 102, 58), width=2)
        draw.text((a + 3, b + 2), spec.id, fill="white" if dark else (42, 44, 49))
    return out
