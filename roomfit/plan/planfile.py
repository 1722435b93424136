"""Reading, validating and writing plan files (TOML).

A plan file is TOML with ``roomfit_plan = 1`` (the format version) at the top; see
``docs/plan-format.md`` for every key. Lengths are numbers in the file's ``units`` (mm by
default; cm, m, in, ft) or strings with a unit (``"36 in"``). Reading collects *every*
problem before raising one :class:`PlanError` whose problems each name the field path
(``rooms[2].outline``) and say what is wrong, with numbers. Unknown keys are rejected.

Writing keeps the file's unit and writes atomically; read -> write -> read gives an equal
:class:`~roomfit.plan.data.Plan`.
"""

from __future__ import annotations

import math
import re
import tomllib
from fractions import Fraction
from functools import cache
from pathlib import Path
from typing import Any

import tomli_w
from shapely import LineString, Point, Polygon
from shapely.validation import explain_validity

from roomfit.audit.geometry import nearest_edge, wall_direction
from roomfit.errors import PlanError, Problem, RoomfitError
from roomfit.files import atomic_write
from roomfit.plan.data import (
    FORMAT_VERSION,
    OUTSIDE,
    ROTATIONS,
    Door,
    Fixture,
    Leaf,
    Piece,
    Placement,
    Plan,
    Room,
    RuleChoice,
    Trip,
    Window,
)
from roomfit.plan.units import MM_PER, UNITS, parse_length
from roomfit.rules.catalog import load_catalog
from roomfit.rules.sets import load_ruleset

__all__ = [
    "VERSION_KEY",
    "ON_WALL_TOLERANCE",
    "MAX_WALL_THICKNESS",
    "read_plan",
    "loads_plan",
    "dumps_plan",
    "write_plan",
    "plan_places",
]

VERSION_KEY = "roomfit_plan"

#: A door or window centre may lie this far (mm) off its wall and still count as on it.
ON_WALL_TOLERANCE = 5

#: A door joins two rooms whose walls are at most this far apart (mm): the wall thickness.
MAX_WALL_THICKNESS = 600

_TOP_KEYS = {VERSION_KEY, "name", "client", "address", "notes", "units", "rules", "rooms",
             "doors", "windows", "fixtures", "furniture", "routines"}
_ROOM_KEYS = {"id", "label", "use", "outline"}
_DOOR_KEYS = {"id", "rooms", "at", "width", "leaf", "swings_into", "hinge"}
_WINDOW_KEYS = {"id", "room", "at", "width", "sill"}
_FIXTURE_KEYS = {"id", "room", "kind", "label", "outline", "height", "zone"}
_PIECE_KEYS = {"id", "type", "room", "rooms", "label", "width", "depth", "height", "placement",
               "locked", "access"}
_PLACEMENT_KEYS = {"x", "y", "rotation", "room"}
_RULE_KEYS = {"set", "overrides"}
_TRIP_KEYS = {"from", "to", "per_day", "label", "night"}
_ID = re.compile(r"^[A-Za-z0-9][A-Za-z0-9_.-]*$")
_RESERVED = {OUTSIDE, "entrance"}


class _Reader:
    """Walks the TOML tree, turning values into model types and collecting problems."""

    def __init__(self, unit: str) -> None:
        self.unit = unit
        self.problems: list[Problem] = []

    def add(self, field: str, message: str, hint: str = "") -> None:
        self.problems.append(Problem(field, message, hint))

    def table(self, raw: Any, field: str, allowed: set[str], required: set[str]) -> dict | None:
        if not isinstance(raw, dict):
            self.add(field, f"expected a table, found {_kind(raw)}")
            return None
        for k in sorted(set(raw) - allowed):
            self.add(f"{field}.{k}", "unknown key", f"allowed keys: {', '.join(sorted(allowed))}")
        for k in sorted(required - set(raw)):
            self.add(f"{field}.{k}", "missing key")
        return raw

    def text(self, raw: dict, key: str, field: str, default: str | None = None) -> str | None:
        if key not in raw:
            return default
        v = raw[key]
        if not isinstance(v, str):
            self.add(f"{field}.{key}", f"expected text, found {_kind(v)}")
            return None
        return v

    def ident(self, raw: dict, key: str, field: str) -> str | None:
        v = self.text(raw, key, field)
        if v is not None and not _ID.match(v):
            self.add(f"{field}.{key}", f"id {v!r} must start with a letter or digit and use only "
                     "letters, digits, '-', '_' and '.'")
            return None
        return v

    def length(self, raw: dict, key: str, field: str, low: int | None = 1) -> int | None:
        """A length in mm; ``low`` is the least value allowed (1: positive, 0: not negative,
        None: any, e.g. a coordinate)."""
        if key not in raw:
            return None
        try:
            v = parse_length(raw[key], self.unit, f"{field}.{key}")
        except RoomfitError as e:
            self.problems.extend(e.problems)
            return None
        if low is not None and v < low:
            need = "greater than 0" if low == 1 else f"at least {low} mm"
            self.add(f"{field}.{key}", f"must be {need}, found {v} mm")
            return None
        return v

    def point(self, raw: Any, field: str) -> tuple[int, int] | None:
        if not isinstance(raw, list) or len(raw) != 2:
            self.add(field, f"expected a point [x, y], found {_kind(raw)}")
            return None
        try:
            return (parse_length(raw[0], self.unit, field + "[0]"),
                    parse_length(raw[1], self.unit, field + "[1]"))
        except RoomfitError as e:
            self.problems.extend(e.problems)
            return None

    def outline(self, raw: dict, key: str, field: str) -> tuple[tuple[int, int], ...] | None:
        if key not in raw:
            return None
        pts_raw = raw[key]
        f = f"{field}.{key}"
        if not isinstance(pts_raw, list) or len(pts_raw) < 3:
            self.add(f, "expected a list of at least 3 points [[x, y], ...]")
            return None
        pts = [self.point(p, f"{f}[{i}]") for i, p in enumerate(pts_raw)]
        if any(p is None for p in pts):
            return None
        pts_ok: list[tuple[int, int]] = [p for p in pts if p is not None]
        if len(pts_ok) > 3 and pts_ok[0] == pts_ok[-1]:
            pts_ok = pts_ok[:-1]
        poly = Polygon(pts_ok)
        if not poly.is_valid:
            self.add(f, f"not a simple polygon: {explain_validity(poly)}",
                     "list the corners in order around the outline, without crossing edges")
            return None
        if poly.area <= 0:
            self.add(f, "outline encloses no area")
            return None
        return tuple(pts_ok)


def _kind(v: Any) -> str:
    return {dict: "a table", list: "a list", str: "text", bool: "true/false", int: "a number",
            float: "a number"}.get(type(v), type(v).__name__)


def _array(r: _Reader, data: dict, key: str) -> list[tuple[str, Any]]:
    raw = data.get(key, [])
    if not isinstance(raw, list):
        r.add(key, f"expected an array of tables ([[{key}]]), found {_kind(raw)}")
        return []
    return [(f"{key}[{i}]", item) for i, item in enumerate(raw)]


def _read_rooms(r: _Reader, data: dict) -> list[Room]:
    rooms = []
    for f, raw in _array(r, data, "rooms"):
        t = r.table(raw, f, _ROOM_KEYS, {"id", "use", "outline"})
        if t is None:
            continue
        rid, use = r.ident(t, "id", f), r.text(t, "use", f)
        outline = r.outline(t, "outline", f)
        label = r.text(t, "label", f, default=rid or "")
        if rid and use and outline and label is not None:
            rooms.append(Room(rid, label, use, outline))
    if not rooms and not r.problems:
        r.add("rooms", "a plan needs at least one room", "add a [[rooms]] table")
    polys = [(i, rm, Polygon(rm.outline)) for i, rm in enumerate(rooms)]
    for a in range(len(polys)):
        for b in range(a + 1, len(polys)):
            ov = polys[a][2].intersection(polys[b][2])
            if ov.area > 1.0:
                c = ov.representative_point()
                r.add(f"rooms[{polys[b][0]}].outline",
                      f"room {polys[b][1].id!r} overlaps room {polys[a][1].id!r} by "
                      f"{ov.area / 1e6:.3f} m2 around ({c.x:.0f}, {c.y:.0f})")
    return rooms


def _on_wall(r: _Reader, room: Room, at: tuple[int, int], width: int, field: str) -> None:
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


def _reaches_other_room(r: _Reader, host: Room, other: Room, at: tuple[int, int], width: int,
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


def _read_doors(r: _Reader, data: dict, rooms: dict[str, Room]) -> list[Door]:
    doors = []
    names_outside = False  # a door leads outside, even one with a problem of its own
    for f, raw in _array(r, data, "doors"):
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
        if not ok_pair:
            continue
        a, b = pair
        names_outside = names_outside or OUTSIDE in pair
        if a not in rooms:
            r.add(f"{f}.rooms[0]", f"unknown room {a!r}", _known(rooms))
            continue
        if b != OUTSIDE and b not in rooms:
            r.add(f"{f}.rooms[1]", f"unknown room {b!r}", _known(rooms) + f", or {OUTSIDE!r}")
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


def _known(rooms: dict[str, Any]) -> str:
    return "known: " + ", ".join(sorted(rooms)) if rooms else "no rooms are defined"


def _read_windows(r: _Reader, data: dict, rooms: dict[str, Room]) -> list[Window]:
    out = []
    for f, raw in _array(r, data, "windows"):
        t = r.table(raw, f, _WINDOW_KEYS, {"id", "room", "at", "width", "sill"})
        if t is None:
            continue
        wid, room = r.ident(t, "id", f), r.text(t, "room", f)
        at = r.point(t["at"], f"{f}.at") if "at" in t else None
        width = r.length(t, "width", f)
        sill = r.length(t, "sill", f, low=0)
        if room is not None and room not in rooms:
            r.add(f"{f}.room", f"unknown room {room!r}", _known(rooms))
            continue
        if None in (wid, room, at, width, sill):
            continue
        _on_wall(r, rooms[room], at, width, f)  # type: ignore[index,arg-type]
        out.append(Window(wid, room, at, width, sill))  # type: ignore[arg-type]
    return out


def _openings_apart(r: _Reader, data: dict, rooms: dict[str, Room], doors: list[Door],
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


def _read_fixtures(r: _Reader, data: dict, rooms: dict[str, Room]) -> list[Fixture]:
    out = []
    for f, raw in _array(r, data, "fixtures"):
        t = r.table(raw, f, _FIXTURE_KEYS, {"id", "room", "kind", "outline", "height"})
        if t is None:
            continue
        fid, room, kind = r.ident(t, "id", f), r.text(t, "room", f), r.text(t, "kind", f)
        label = r.text(t, "label", f, default=kind or "")
        outline = r.outline(t, "outline", f)
        zone = r.outline(t, "zone", f)
        height = r.length(t, "height", f)
        if room is not None and room not in rooms:
            r.add(f"{f}.room", f"unknown room {room!r}", _known(rooms))
            continue
        if None in (fid, room, kind, label, outline, height) or ("zone" in t and zone is None):
            continue
        rp = Polygon(rooms[room].outline)  # type: ignore[index]
        outside = Polygon(outline).difference(rp).area  # type: ignore[arg-type]
        if outside > 1.0:
            r.add(f"{f}.outline", f"{outside / 1e6:.3f} m2 of the fitting lies outside room {room!r}")
            continue
        if zone is not None:
            beyond = Polygon(zone).difference(rp).area
            if beyond > 1.0:
                r.add(f"{f}.zone", f"{beyond / 1e6:.3f} m2 of the fitting's zone lies outside room "
                      f"{room!r}", "the zone is floor in front of the fitting, inside its room")
                continue
        out.append(Fixture(fid, room, kind, label, outline, height, zone))  # type: ignore[arg-type]
    return out


@cache
def _catalog_ids() -> frozenset[str]:
    """Ids of the bundled furniture types (the data file does not change while we run)."""
    return frozenset(load_catalog())


def _read_furniture(r: _Reader, data: dict, rooms: dict[str, Room]) -> list[Piece]:
    catalog = _catalog_ids()
    out = []
    for f, raw in _array(r, data, "furniture"):
        t = r.table(raw, f, _PIECE_KEYS, {"id", "type"})
        if t is None:
            continue
        pid, ptype = r.ident(t, "id", f), r.text(t, "type", f)
        label = r.text(t, "label", f, default="")
        if ptype is not None and ptype != "custom" and ptype not in catalog:
            r.add(f"{f}.type", f"unknown furniture type {ptype!r}",
                  'run `roomfit catalog` to list the types, or use type = "custom"')
            ptype = None
        sizes = {k: r.length(t, k, f, low=1 if k != "height" else 0) for k in ("width", "depth", "height")}
        if ptype == "custom":
            for k in sizes:
                if k not in t:
                    r.add(f"{f}.{k}", "missing key", "a custom piece needs width, depth and height")
        if "room" in t and "rooms" in t:
            r.add(f"{f}.rooms", "give either room or rooms, not both")
            continue
        allowed: list[str] = []
        if "room" in t:
            v = r.text(t, "room", f)
            allowed = [v] if v is not None else []
        elif "rooms" in t:
            v = t["rooms"]
            if not isinstance(v, list) or not v or not all(isinstance(x, str) for x in v):
                r.add(f"{f}.rooms", "expected a non-empty list of room ids")
            else:
                allowed = list(v)
        else:
            r.add(f"{f}.room", "missing key", "name the room it stands in (room = ...) or the "
                  "rooms it may stand in (rooms = [...])")
        for j, rid in enumerate(allowed):
            if rid not in rooms:
                key = f"{f}.room" if "room" in t else f"{f}.rooms[{j}]"
                r.add(key, f"unknown room {rid!r}", _known(rooms))
        access = r.text(t, "access", f)
        if access is not None and access not in ("both", "left", "right"):
            r.add(f"{f}.access", f"unknown access {access!r}", "use both, left or right")
        elif access is not None and ptype is not None and (
                ptype == "custom" or load_catalog()[ptype].category != "bed"):
            r.add(f"{f}.access", f"access applies to beds only, not to a {ptype!r} piece",
                  "leave access out")
        locked = t.get("locked", False)
        if not isinstance(locked, bool):
            r.add(f"{f}.locked", f"expected true or false, found {_kind(locked)}")
            locked = False
        placement = None
        if "placement" in t:
            placement = _read_placement(r, t["placement"], f"{f}.placement", allowed, rooms)
        elif locked:
            r.add(f"{f}.locked", "a locked piece needs a placement", "add placement = {x, y, rotation, room}")
        if pid is None or ptype is None or label is None or not allowed:
            continue
        if any(rid not in rooms for rid in allowed):
            continue
        out.append(Piece(pid, ptype, tuple(allowed), label, sizes["width"], sizes["depth"],
                         sizes["height"], placement, bool(locked), access))
    return out


def _read_placement(r: _Reader, raw: Any, f: str, allowed: list[str],
                    rooms: dict[str, Room]) -> Placement | None:
    t = r.table(raw, f, _PLACEMENT_KEYS, {"x", "y", "rotation"})
    if t is None:
        return None
    x, y = r.length(t, "x", f, low=None), r.length(t, "y", f, low=None)
    rot = t.get("rotation")
    if "rotation" in t and (isinstance(rot, bool) or rot not in ROTATIONS):
        r.add(f"{f}.rotation", f"expected one of {', '.join(map(str, ROTATIONS))} degrees, "
              f"found {rot!r}")
        return None
    room = r.text(t, "room", f, default=allowed[0] if len(allowed) == 1 else None)
    if room is None:
        r.add(f"{f}.room", "missing key", "the piece may stand in several rooms: say which one")
        return None
    if allowed and room not in allowed:
        r.add(f"{f}.room", f"room {room!r} is not among the piece's rooms ({', '.join(allowed)})")
        return None
    if x is None or y is None or rot is None:
        return None
    return Placement(x, y, int(rot), room)


def _read_rules(r: _Reader, data: dict) -> RuleChoice:
    raw = data.get("rules", {"set": "everyday"})
    t = r.table(raw, "rules", _RULE_KEYS, {"set"})
    if t is None:
        return RuleChoice()
    name = r.text(t, "set", "rules") or "everyday"
    over_raw = t.get("overrides", {})
    overrides: dict[str, int | str] = {}
    if not isinstance(over_raw, dict):
        r.add("rules.overrides", f"expected a table of rule id = value, found {_kind(over_raw)}")
    else:
        for k, v in over_raw.items():
            if k == "turning.shape":
                overrides[k] = v
            else:
                mm = r.length(over_raw, k, "rules.overrides", low=0)
                if mm is not None:
                    overrides[k] = mm
    try:
        load_ruleset(name, overrides)
    except RoomfitError as e:
        r.problems.extend(e.problems)
    return RuleChoice(name, tuple(overrides.items()))


def plan_places(plan: Plan) -> set[str]:
    """Names a routine trip may start or end at."""
    return ({"entrance"} | {r.id for r in plan.rooms} | {d.id for d in plan.doors}
            | {f.id for f in plan.fixtures} | {p.id for p in plan.furniture})


def _read_routines(r: _Reader, data: dict) -> list[Trip]:
    out = []
    for f, raw in _array(r, data, "routines"):
        t = r.table(raw, f, _TRIP_KEYS, {"from", "to", "per_day"})
        if t is None:
            continue
        a, b = r.text(t, "from", f), r.text(t, "to", f)
        label = r.text(t, "label", f, default="")
        per = t.get("per_day")
        if "per_day" in t and (isinstance(per, bool) or not isinstance(per, int | float)
                               or not per > 0 or per == math.inf):
            r.add(f"{f}.per_day", f"expected a number of trips greater than 0, found {per!r}")
            per = None
        night = t.get("night", False)
        if not isinstance(night, bool):
            r.add(f"{f}.night", f"expected true or false, found {_kind(night)}")
            night = False
        if None in (a, b, per, label):
            continue
        out.append(Trip(a, b, float(per), label, night))  # type: ignore[arg-type]
    return out


def loads_plan(text: str, source: str = "<plan>") -> Plan:
    """Parse and validate plan-file text; raise :class:`PlanError` listing every problem."""
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as e:
        m = re.search(r"\(at line (\d+), column (\d+)\)", str(e))
        line, col = (int(m.group(1)), int(m.group(2))) if m else (None, None)
        msg = re.sub(r"\s*\(at line \d+, column \d+\)", "", str(e)) or "invalid TOML"
        raise PlanError(Problem("", f"not a valid TOML file: {msg}", line=line, column=col),
                        source) from None
    version = data.get(VERSION_KEY)
    if version != FORMAT_VERSION:
        found = "missing" if version is None else f"found {version!r}"
        raise PlanError(Problem(VERSION_KEY, f"expected format version {FORMAT_VERSION}, {found}",
                                f"start the file with {VERSION_KEY} = {FORMAT_VERSION}"), source)
    unit = data.get("units", "mm")
    r = _Reader("mm")
    if unit not in UNITS:
        r.add("units", f"unknown unit {unit!r}", f"use one of {', '.join(UNITS)}")
        unit = "mm"
    r.unit = unit
    for k in sorted(set(data) - _TOP_KEYS):
        r.add(k, "unknown key", f"allowed keys: {', '.join(sorted(_TOP_KEYS))}")
    name = r.text(data, "name", "", default="") or ""
    meta = {k: r.text(data, k, "", default="") or "" for k in ("client", "address", "notes")}
    rooms = _read_rooms(r, data)
    by_id = {rm.id: rm for rm in rooms}
    doors = _read_doors(r, data, by_id)
    windows = _read_windows(r, data, by_id)
    _openings_apart(r, data, by_id, doors, windows)
    fixtures = _read_fixtures(r, data, by_id)
    furniture = _read_furniture(r, data, by_id)
    rules = _read_rules(r, data)
    routines = _read_routines(r, data)
    plan = Plan(name, tuple(rooms), tuple(doors), tuple(windows), tuple(fixtures),
                tuple(furniture), rules, tuple(routines), unit, **meta)
    _check_ids(r, plan)
    for i, trip in enumerate(plan.routines):
        for key, place in (("from", trip.origin), ("to", trip.target)):
            if place not in plan_places(plan):
                r.add(f"routines[{i}].{key}", f"unknown place {place!r}",
                      "use 'entrance' or the id of a room, door, fitting or piece")
    if r.problems:
        raise PlanError(r.problems, source)
    return plan


def _check_ids(r: _Reader, plan: Plan) -> None:
    seen: dict[str, str] = {}
    groups = (("rooms", plan.rooms), ("doors", plan.doors), ("windows", plan.windows),
              ("fixtures", plan.fixtures), ("furniture", plan.furniture))
    for key, items in groups:
        for i, item in enumerate(items):
            f = f"{key}[{i}].id"
            if item.id in _RESERVED:
                r.add(f, f"{item.id!r} is a reserved name", "choose another id")
            elif item.id in seen:
                r.add(f, f"duplicate id {item.id!r}, already used by {seen[item.id]}",
                      "ids must be unique across the whole plan")
            else:
                seen[item.id] = f


def read_plan(path: str | Path) -> Plan:
    """Read and validate a plan file; every problem names ``path`` and the field."""
    p = Path(path)
    try:
        text = p.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise PlanError(Problem("", "no such file"), str(p)) from None
    except IsADirectoryError:
        raise PlanError(Problem("", "is a folder, not a plan file"), str(p)) from None
    except UnicodeDecodeError as e:
        raise PlanError(Problem("", f"not UTF-8 text (byte {e.start})"), str(p)) from None
    except OSError as e:
        raise PlanError(Problem("", f"cannot read: {e.strerror}"), str(p)) from None
    return loads_plan(text, str(p))


def _out(mm: int, unit: str) -> int | float:
    """``mm`` in ``unit``: a whole number when exact, else the shortest decimal that reads
    back as the same millimetre (``5486`` mm is ``215.98`` in, not ``215.98425196850394``)."""
    if unit == "mm":
        return mm
    v = Fraction(mm) / MM_PER[unit]
    if v.denominator == 1:
        return int(v)
    for digits in range(1, 7):
        short = round(float(v), digits)
        if parse_length(short, unit) == mm:
            return short
    return float(v)


def _plan_to_dict(plan: Plan) -> dict[str, Any]:
    u = plan.unit

    def pt(p: tuple[int, int]) -> list[int | float]:
        return [_out(p[0], u), _out(p[1], u)]

    d: dict[str, Any] = {VERSION_KEY: FORMAT_VERSION, "name": plan.name}
    for k in ("client", "address", "notes"):
        if getattr(plan, k):
            d[k] = getattr(plan, k)
    d["units"] = u
    rules: dict[str, Any] = {"set": plan.rules.set}
    if plan.rules.overrides:
        rules["overrides"] = {k: (v if isinstance(v, str) else _out(v, u))
                              for k, v in plan.rules.overrides}
    d["rules"] = rules
    d["rooms"] = [{"id": r.id, "label": r.label, "use": r.use,
                   "outline": [pt(p) for p in r.outline]} for r in plan.rooms]
    if plan.doors:
        d["doors"] = []
        for door in plan.doors:
            dd: dict[str, Any] = {"id": door.id, "rooms": list(door.rooms), "at": pt(door.at),
                                  "width": _out(door.width, u), "leaf": door.leaf.value}
            if door.swings_into is not None:
                dd["swings_into"] = door.swings_into
            if door.hinge is not None:
                dd["hinge"] = door.hinge
            d["doors"].append(dd)
    if plan.windows:
        d["windows"] = [{"id": w.id, "room": w.room, "at": pt(w.at), "width": _out(w.width, u),
                         "sill": _out(w.sill, u)} for w in plan.windows]
    if plan.fixtures:
        d["fixtures"] = []
        for fx in plan.fixtures:
            fd: dict[str, Any] = {"id": fx.id, "room": fx.room, "kind": fx.kind,
                                  "label": fx.label, "outline": [pt(p) for p in fx.outline],
                                  "height": _out(fx.height, u)}
            if fx.zone:
                fd["zone"] = [pt(p) for p in fx.zone]
            d["fixtures"].append(fd)
    if plan.furniture:
        d["furniture"] = [_piece_to_dict(p, u) for p in plan.furniture]
    if plan.routines:
        d["routines"] = []
        for t in plan.routines:
            td: dict[str, Any] = {"from": t.origin, "to": t.target, "per_day": t.per_day}
            if t.label:
                td["label"] = t.label
            if t.night:
                td["night"] = True
            d["routines"].append(td)
    return d


def _piece_to_dict(p: Piece, u: str) -> dict[str, Any]:
    d: dict[str, Any] = {"id": p.id, "type": p.type}
    if p.label:
        d["label"] = p.label
    if len(p.rooms) == 1:
        d["room"] = p.rooms[0]
    else:
        d["rooms"] = list(p.rooms)
    for k in ("width", "depth", "height"):
        if getattr(p, k) is not None:
            d[k] = _out(getattr(p, k), u)
    if p.access is not None:
        d["access"] = p.access
    if p.placement is not None:
        pl = p.placement
        d["placement"] = {"x": _out(pl.x, u), "y": _out(pl.y, u), "rotation": pl.rotation,
                          "room": pl.room}
    if p.locked:
        d["locked"] = True
    return d


def dumps_plan(plan: Plan) -> str:
    """The plan as plan-file text, in the plan's own unit."""
    return tomli_w.dumps(_plan_to_dict(plan))


def write_plan(plan: Plan, path: str | Path) -> Path:
    """Write ``plan`` to ``path`` atomically."""
    return atomic_write(path, dumps_plan(plan))
