"""Reading and validating plan files (TOML).

A plan file is TOML with ``roomfit_plan = 1`` (the format version) at the top; see
``docs/plan-format.md`` for every key. Lengths are numbers in the file's ``units`` (mm by
default; cm, m, in, ft) or strings with a unit (``"36 in"``). Reading collects *every*
problem before raising one :class:`PlanError` whose problems each name the field path
(``rooms[2].outline``) and say what is wrong, with numbers. Unknown keys are rejected.
"""

from __future__ import annotations

import re
import tomllib
from functools import cache
from pathlib import Path
from typing import Any

from shapely import MultiPolygon, Polygon, STRtree

from roomfit.errors import PlanError, Problem, RoomfitError
from roomfit.plan.data import (
    FORMAT_VERSION,
    OUTSIDE,
    ROTATIONS,
    VERSION_KEY,
    Fixture,
    Piece,
    Placement,
    Plan,
    Room,
    RuleChoice,
    Trip,
)
from roomfit.plan.fields import FieldReader, array_items, kind_of, known_ids
from roomfit.plan.limits import (
    MAX_DEPTH,
    MAX_FILE_BYTES,
    MAX_FLAT_MM,
    MAX_OVERRIDE_MM,
    MAX_PER_DAY,
    check_shape,
)
from roomfit.plan.openings import openings_apart, read_doors, read_windows
from roomfit.plan.units import UNITS
from roomfit.rules.catalog import GROUPS, SIDES, load_catalog, zone_kinds
from roomfit.rules.sets import load_ruleset

__all__ = ["read_plan", "loads_plan", "plan_places"]

_TOP_KEYS = {VERSION_KEY, "name", "client", "address", "notes", "units", "rules", "rooms",
             "doors", "windows", "fixtures", "furniture", "routines"}
_ROOM_KEYS = {"id", "label", "use", "outline"}
_FIXTURE_KEYS = {"id", "room", "kind", "label", "outline", "height", "zone", "transfer"}
_PIECE_KEYS = {"id", "type", "room", "rooms", "label", "width", "depth", "height", "placement",
               "locked", "access", "category", "zones", "groups", "transfer"}
_PLACEMENT_KEYS = {"x", "y", "rotation", "room"}
_RULE_KEYS = {"set", "overrides"}
_TRIP_KEYS = {"from", "to", "per_day", "label", "night"}
_RESERVED = {OUTSIDE, "entrance"}


def _read_rooms(r: FieldReader, data: dict) -> list[Room]:
    rooms = []
    for f, raw in array_items(r, data, "rooms"):
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
    _rooms_apart(r, data, rooms)
    return rooms


def _rooms_apart(r: FieldReader, data: dict, rooms: list[Room]) -> None:
    """Report rooms that overlap (more than 1 mm2) and a flat wider than
    :data:`~roomfit.plan.limits.MAX_FLAT_MM`. Only rooms whose boxes meet are intersected,
    so a plan of many rooms costs about one test per neighbour, not one per pair."""
    raw = data.get("rooms")
    fields = {t.get("id"): f"rooms[{i}]" for i, t in enumerate(raw if isinstance(raw, list) else [])
              if isinstance(t, dict) and isinstance(t.get("id"), str)}
    polys = [Polygon(rm.outline) for rm in rooms]
    if polys:
        x0, y0, x1, y1 = MultiPolygon(polys).bounds
        if max(x1 - x0, y1 - y0) > MAX_FLAT_MM:
            r.add("rooms", f"the rooms span {x1 - x0:.0f} x {y1 - y0:.0f} mm; a plan may span "
                  f"at most {MAX_FLAT_MM} mm each way", "check the units and the coordinates")
    tree = STRtree(polys)
    for b, pb in enumerate(polys):
        for a in sorted(int(i) for i in tree.query(pb)):
            if a >= b:
                break
            ov = polys[a].intersection(pb)
            if ov.area > 1.0:
                c = ov.representative_point()
                r.add(f"{fields.get(rooms[b].id, 'rooms')}.outline",
                      f"room {rooms[b].id!r} overlaps room {rooms[a].id!r} by "
                      f"{ov.area / 1e6:.3f} m2 around ({c.x:.0f}, {c.y:.0f})")


def _read_fixtures(r: FieldReader, data: dict, rooms: dict[str, Room]) -> list[Fixture]:
    out = []
    for f, raw in array_items(r, data, "fixtures"):
        t = r.table(raw, f, _FIXTURE_KEYS, {"id", "room", "kind", "outline", "height"})
        if t is None:
            continue
        fid, room, kind = r.ident(t, "id", f), r.text(t, "room", f), r.text(t, "kind", f)
        label = r.text(t, "label", f, default=kind or "")
        outline = r.outline(t, "outline", f)
        zone = r.outline(t, "zone", f)
        height = r.length(t, "height", f)
        transfer = r.text(t, "transfer", f)
        if transfer is not None and (transfer not in ("left", "right") or kind != "wc"):
            r.add(f"{f}.transfer", f"transfer {transfer!r} on a {kind!r} fitting",
                  "a WC fitting (kind = \"wc\") takes transfer = \"left\" or \"right\"")
            continue
        if room is not None and room not in rooms:
            r.add(f"{f}.room", f"unknown room {room!r}", known_ids(rooms))
            continue
        if None in (fid, room, kind, label, outline, height) or ("zone" in t and zone is None):
            continue
        rp = Polygon(rooms[room].outline)  # type: ignore[index]
        outside = Polygon(outline).difference(rp).area
        if outside > 1.0:
            r.add(f"{f}.outline", f"{outside / 1e6:.3f} m2 of the fitting lies outside room {room!r}")
            continue
        if zone is not None:
            beyond = Polygon(zone).difference(rp).area
            if beyond > 1.0:
                r.add(f"{f}.zone", f"{beyond / 1e6:.3f} m2 of the fitting's zone lies outside room "
                      f"{room!r}", "the zone is floor in front of the fitting, inside its room")
                continue
        out.append(Fixture(fid, room, kind, label, outline, height, zone,  # type: ignore[arg-type]
                           transfer))
    return out


@cache
def _catalog_ids() -> frozenset[str]:
    """Ids of the bundled furniture types (the data file does not change while we run)."""
    return frozenset(load_catalog())


def _read_custom_use(r: FieldReader, t: dict, f: str, ptype: str | None
                     ) -> tuple[str, tuple[tuple[str, str], ...], tuple[str, ...]]:
    """A custom piece's own ``category``, use ``zones`` (a table side -> zone kind) and
    functional ``groups``, checked against the catalogue's categories, sides, zone kinds and
    groups; a catalogue type may not redefine them."""
    given = [k for k in ("category", "zones", "groups") if k in t]
    if given and ptype not in (None, "custom"):
        r.add(f"{f}.{given[0]}", f"only a custom piece declares {given[0]}; the type "
              f"{ptype!r} has its own", "leave it out, or use type = \"custom\"")
        return "", (), ()
    cat = load_catalog()
    category = r.text(t, "category", f, default="") or ""
    if category and category not in {c.category for c in cat.values()}:
        r.add(f"{f}.category", f"unknown category {category!r}",
              "use a category of `roomfit catalog`, e.g. bed, sofa, armchair")
        category = ""
    zones: list[tuple[str, str]] = []
    raw = t.get("zones", {})
    kinds = zone_kinds(cat)
    if not isinstance(raw, dict):
        r.add(f"{f}.zones", f"expected a table such as {{ left = \"bed_side\" }}, found {kind_of(raw)}")
        raw = {}
    for side, kind in raw.items():
        if side not in SIDES:
            r.add(f"{f}.zones.{side}", f"unknown side {side!r}", f"use one of {', '.join(SIDES)}")
        elif kind not in kinds:
            r.add(f"{f}.zones.{side}", f"unknown zone kind {kind!r}", f"use one of {', '.join(kinds)}")
        else:
            zones.append((side, kind))
    groups = t.get("groups", [])
    if not isinstance(groups, list) or not all(g in GROUPS for g in groups):
        r.add(f"{f}.groups", f"expected a list of groups out of {', '.join(GROUPS)}")
        groups = []
    return category, tuple(zones), tuple(groups)


def _read_furniture(r: FieldReader, data: dict, rooms: dict[str, Room]) -> list[Piece]:
    catalog = _catalog_ids()
    out = []
    for f, raw in array_items(r, data, "furniture"):
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
                r.add(key, f"unknown room {rid!r}", known_ids(rooms))
        access = r.text(t, "access", f)
        if access is not None and access not in ("both", "left", "right"):
            r.add(f"{f}.access", f"unknown access {access!r}", "use both, left or right")
        elif access is not None and ptype is not None and (
                ptype == "custom" or load_catalog()[ptype].category != "bed"):
            r.add(f"{f}.access", f"access applies to beds only, not to a {ptype!r} piece",
                  "leave access out")
        transfer = _read_transfer(r, t, f, ptype, access)
        locked = t.get("locked", False)
        if not isinstance(locked, bool):
            r.add(f"{f}.locked", f"expected true or false, found {kind_of(locked)}")
            locked = False
        placement = None
        if "placement" in t:
            placement = _read_placement(r, t["placement"], f"{f}.placement", allowed, rooms)
        elif locked:
            r.add(f"{f}.locked", "a locked piece needs a placement", "add placement = {x, y, rotation, room}")
        use = _read_custom_use(r, t, f, ptype)
        if pid is None or ptype is None or label is None or not allowed:
            continue
        if any(rid not in rooms for rid in allowed):
            continue
        out.append(Piece(pid, ptype, tuple(allowed), label, sizes["width"], sizes["depth"],
                         sizes["height"], placement, bool(locked), access, *use, transfer))
    return out


def _read_transfer(r: FieldReader, t: dict, f: str, ptype: str | None, access: str | None) -> str | None:
    """A bed's ``transfer`` side (``left`` or ``right``), which must be a side ``access``
    keeps free; None when absent or wrong (the problem is recorded on ``r``)."""
    side = r.text(t, "transfer", f)
    if side is None:
        return None
    bed = ptype is not None and (t.get("category") == "bed" if ptype == "custom"
                                 else ptype in load_catalog() and load_catalog()[ptype].category == "bed")
    if side not in ("left", "right"):
        r.add(f"{f}.transfer", f"unknown transfer side {side!r}", "use left or right")
    elif not bed:
        r.add(f"{f}.transfer", f"transfer applies to beds only, not to a {ptype!r} piece",
              "leave transfer out")
    elif access in ("left", "right") and access != side:
        r.add(f"{f}.transfer", f"the client transfers from the {side} side but access keeps "
              f"only the {access} side free", f"set access = \"{side}\" or \"both\"")
    else:
        return side
    return None


def _read_placement(r: FieldReader, raw: Any, f: str, allowed: list[str],
                    rooms: dict[str, Room]) -> Placement | None:
    t = r.table(raw, f, _PLACEMENT_KEYS, {"x", "y", "rotation"})
    if t is None:
        return None
    x, y = r.length(t, "x", f, low=None), r.length(t, "y", f, low=None)
    rot = t.get("rotation")
    if "rotation" in t and (type(rot) is not int or rot not in ROTATIONS):
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


def _read_rules(r: FieldReader, data: dict) -> RuleChoice:
    raw = data.get("rules", {"set": "everyday"})
    t = r.table(raw, "rules", _RULE_KEYS, {"set"})
    if t is None:
        return RuleChoice()
    name = r.text(t, "set", "rules") or "everyday"
    over_raw = t.get("overrides", {})
    overrides: dict[str, int | str] = {}
    if not isinstance(over_raw, dict):
        r.add("rules.overrides", f"expected a table of rule id = value, found {kind_of(over_raw)}")
    else:
        for k, v in over_raw.items():
            if k == "turning.shape":
                overrides[k] = v
            else:
                mm = r.length(over_raw, k, "rules.overrides", low=0, high=MAX_OVERRIDE_MM)
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


def _read_routines(r: FieldReader, data: dict) -> list[Trip]:
    out = []
    for f, raw in array_items(r, data, "routines"):
        t = r.table(raw, f, _TRIP_KEYS, {"from", "to", "per_day"})
        if t is None:
            continue
        a, b = r.text(t, "from", f), r.text(t, "to", f)
        label = r.text(t, "label", f, default="")
        per = t.get("per_day")
        if "per_day" in t and (isinstance(per, bool) or not isinstance(per, int | float)
                               or not 0 < per <= MAX_PER_DAY):
            r.add(f"{f}.per_day", f"expected a number of trips greater than 0, found {per!r}",
                  f"allowed: more than 0 and at most {MAX_PER_DAY} a day")
            per = None
        night = t.get("night", False)
        if not isinstance(night, bool):
            r.add(f"{f}.night", f"expected true or false, found {kind_of(night)}")
            night = False
        if None in (a, b, per, label):
            continue
        out.append(Trip(a, b, float(per), label, night))  # type: ignore[arg-type]
    return out


def _parse_toml(text: str | bytes, source: str) -> dict[str, Any]:
    """The TOML tree of plan-file text or bytes (UTF-8, a byte-order mark allowed), refused
    beyond :data:`~roomfit.plan.limits.MAX_FILE_BYTES` or nested too deep."""
    size = len(text) if isinstance(text, bytes) else len(text.encode("utf-8", "replace"))
    if size > MAX_FILE_BYTES:
        raise PlanError(Problem("", f"larger than {MAX_FILE_BYTES // 1024} KiB, the largest plan "
                                "file roomfit reads", "see the limits in docs/plan-format.md"),
                        source)
    if isinstance(text, bytes):
        try:
            text = text.decode("utf-8")
        except UnicodeDecodeError as e:
            raise PlanError(Problem("", f"not UTF-8 text (byte {e.start})",
                                    "save the plan as UTF-8 plain text (.toml)"), source) from None
    try:
        return tomllib.loads(text.removeprefix("\ufeff"))
    except tomllib.TOMLDecodeError as e:
        m = re.search(r"\(at line (\d+), column (\d+)\)", str(e))
        line, col = (int(m.group(1)), int(m.group(2))) if m else (None, None)
        msg = re.sub(r"\s*\(at line \d+, column \d+\)", "", str(e)) or "invalid TOML"
        raise PlanError(Problem("", f"not a valid TOML file: {msg}", line=line, column=col),
                        source) from None
    except RecursionError:
        raise PlanError(Problem("", f"nested more than {MAX_DEPTH} levels deep",
                                "a plan needs 4 levels; see docs/plan-format.md"), source) from None
    except ValueError:  # an integer too long to convert (Python's 4300-digit limit)
        m = re.search(r"[0-9_]{4000,}", text)
        line = text.count("\n", 0, m.start()) + 1 if m else None
        raise PlanError(Problem("", "a number is too long to read (thousands of digits)",
                                "lengths have at most 10 digits", line=line), source) from None


def loads_plan(text: str | bytes, source: str = "<plan>") -> Plan:
    """Parse and validate plan-file text (or UTF-8 bytes, as uploaded); raise
    :class:`PlanError` listing every problem."""
    data = _parse_toml(text, source)
    version = data.get(VERSION_KEY)
    if type(version) is not int or version != FORMAT_VERSION:  # not true, not 1.0
        found = ("missing" if version is None else
                 f"found {str(version).lower() if isinstance(version, bool) else repr(version)}")
        raise PlanError(Problem(VERSION_KEY, f"expected format version {FORMAT_VERSION}, {found}",
                                f"start the file with {VERSION_KEY} = {FORMAT_VERSION}"), source)
    check_shape(data, source)
    unit = data.get("units", "mm")
    r = FieldReader("mm")
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
    doors = read_doors(r, data, by_id)
    windows = read_windows(r, data, by_id)
    openings_apart(r, data, by_id, doors, windows)
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


def _check_ids(r: FieldReader, plan: Plan) -> None:
    seen: dict[str, str] = {}
    groups = (("rooms", [x.id for x in plan.rooms]), ("doors", [x.id for x in plan.doors]),
              ("windows", [x.id for x in plan.windows]),
              ("fixtures", [x.id for x in plan.fixtures]),
              ("furniture", [x.id for x in plan.furniture]))
    for key, ids in groups:
        for i, iid in enumerate(ids):
            f = f"{key}[{i}].id"
            if iid in _RESERVED:
                r.add(f, f"{iid!r} is a reserved name", "choose another id")
            elif iid in seen:
                r.add(f, f"duplicate id {iid!r}, already used by {seen[iid]}",
                      "ids must be unique across the whole plan")
            else:
                seen[iid] = f


def read_plan(path: str | Path) -> Plan:
    """Read and validate a plan file; every problem names ``path`` and the field."""
    p = Path(path)
    try:
        with p.open("rb") as fh:  # no more than the limit: a device or a huge file stops here
            raw = fh.read(MAX_FILE_BYTES + 1)
    except FileNotFoundError:
        raise PlanError(Problem("", "no such file"), str(p)) from None
    except IsADirectoryError:
        raise PlanError(Problem("", "is a folder, not a plan file"), str(p)) from None
    except OSError as e:
        raise PlanError(Problem("", f"cannot read: {e.strerror}"), str(p)) from None
    return loads_plan(raw, str(p))


