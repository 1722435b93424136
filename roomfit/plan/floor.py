"""A neutral floor description (:mod:`roomfit.plan.floordata`) -> a :class:`Plan` and a report.

Pure shapely, no ifcopenshell: the rules live in :mod:`roomfit.plan.floor_base` (turning,
rooms), :mod:`roomfit.plan.floor_doors` and :mod:`roomfit.plan.floor_items`; this module runs
them in order and collects the report. Every line of the report names the IFC GlobalId it is
about and says whether a value was guessed, assumed, skipped or is to be confirmed.
"""

from __future__ import annotations

import fnmatch
import math
from collections.abc import Sequence
from dataclasses import dataclass, replace

from shapely import LineString, Point, Polygon, union_all

from roomfit.audit.geometry import wall_direction
from roomfit.errors import Problem, RoomfitError
from roomfit.plan.data import OUTSIDE, Door, Plan, Room, RuleChoice, Window
from roomfit.plan.floor_base import (
    Note,
    Placed,
    clean_outline,
    largest_polygon,
    main_angle,
    make_rooms,
    plan_unit,
    rooms_from_walls,
    slug,
    turn,
    unique_id,
)
from roomfit.plan.floor_doors import DoorIn, make_door, open_links, stair_arrival
from roomfit.plan.floor_items import ThingIn, WindowIn, make_things, make_windows
from roomfit.plan.floordata import Floor, FloorWall

__all__ = ["FloorError", "Imported", "floor_to_plan", "report_text"]


class FloorError(RoomfitError):
    """The floor cannot become a plan (no rooms, an unknown entrance door)."""


@dataclass(frozen=True)
class Imported:
    """The plan made from a floor, the report lines, and the storey's turn (model -> plan)."""

    plan: Plan
    notes: tuple[Note, ...]
    placed: Placed

    @property
    def angle(self) -> float:
        """Degrees the model's main walls ran off the axes (the plan is turned back by this)."""
        return self.placed.angle


def _wall_depth(walls: Sequence[FloorWall], turned: list[Polygon], centre: tuple[float, float]) -> float:
    """Thickness (mm) of the wall nearest ``centre``: its layers', else its footprint's width."""
    if not walls:
        return 200.0
    i = min(range(len(walls)), key=lambda k: turned[k].distance(Point(centre)))
    layers = walls[i].layers_thickness
    if layers:
        return float(layers)
    box = largest_polygon(turned[i].minimum_rotated_rectangle)
    if box is None:
        return 200.0
    ring = list(box.exterior.coords)
    return min(math.dist(ring[0], ring[1]), math.dist(ring[1], ring[2]))


def _rooms(floor: Floor, at: Placed, walls_t: list[Polygon], used: set[str],
           notes: list[Note]) -> tuple[list[Room], dict[str, str]]:
    if floor.spaces:
        made = make_rooms([(s.gid, s.name, s.long_name, at.poly(s.outline)) for s in floor.spaces],
                          used, notes)
        return [r for r, _ in made], {r.id: g for r, g in made}
    rooms, gids = [], {}
    for i, hole in enumerate(rooms_from_walls(walls_t), start=1):
        outline = clean_outline(hole)
        if outline is None:
            continue
        rid = f"room-{i}"
        used.add(rid)
        rooms.append(Room(rid, f"Room {i}", "room", outline))
        gids[rid] = ""
    if rooms:
        notes.append(Note("assumed", floor.storey_gid, f"the storey has no IfcSpace: {len(rooms)} "
                          "rooms derived from the floor areas its walls enclose; name them and "
                          "give their uses by hand"))
    return rooms, gids


def floor_to_plan(floor: Floor, *, rules: str | None = None, entrance: str | None = None,
                  name: str | None = None) -> Imported:
    """The plan of one imported storey, with the report of everything guessed or left out.

    ``entrance`` names the entrance door by GlobalId, IFC name or plan id; by default every
    door to no imported space leads ``outside``. Raises :class:`FloorError` when no room
    results or the named entrance is not a door of the plan.
    """
    notes: list[Note] = [Note("skipped", s.gid, f"{s.ifc_class}: {s.reason}")
                         for s in floor.skipped]
    walls_w = [Polygon(w.outline) for w in floor.walls]
    angle = main_angle([w.outline for w in floor.walls] or [s.outline for s in floor.spaces])
    at = turn(angle, walls_w + [Polygon(s.outline) for s in floor.spaces])
    if angle:
        notes.append(Note("info", floor.storey_gid, f"storey turned by {-angle:.2f} degrees so its "
                          "main walls run along the axes"))
    walls_t = [at.poly(w.outline) for w in floor.walls]
    used: set[str] = set()
    rooms, gids = _rooms(floor, at, walls_t, used, notes)
    if not rooms:
        raise FloorError(Problem("--storey", f"storey {floor.storey!r} gives no room (no IfcSpace "
                                 "and no floor area enclosed by walls)", "pick another storey"),
                         floor.source)
    polys = {r.id: Polygon(r.outline) for r in rooms}
    by_id = {r.id: r for r in rooms}
    doors: list[Door] = []
    door_gid: dict[str, str] = {}
    for d in floor.doors:
        fr = at.frame(d.frame)
        door = make_door(DoorIn(d.gid, d.name, fr, d.overall_width, d.operation, d.lining,
                                _wall_depth(floor.walls, walls_t, fr.centre), d.mirrored_x,
                                d.mirrored_y),
                         unique_id(slug(d.name, "d-") if d.name else "d", used), by_id, polys, notes)
        if door is not None:
            doors.append(door)
            door_gid[door.id] = d.gid
    doors = _entrance(doors, entrance, floor, door_gid, notes)
    links = open_links(rooms, polys, union_all(walls_t) if walls_t else None, notes, gids)
    for gid, stair in floor.stairs_up_to_here:
        arrival = stair_arrival(gid, at.poly(stair), rooms, polys, notes)
        if arrival is not None:
            doors.append(replace(arrival, id=unique_id(arrival.id, used)))
    windows = make_windows([WindowIn(w.gid, w.name, at.frame(w.frame), w.overall_width, w.sill,
                                     _wall_depth(floor.walls, walls_t, at.frame(w.frame).centre))
                            for w in floor.windows], by_id, polys, notes)
    doors, windows = _keep_apart(doors, links, windows, by_id, notes)
    used |= {w.id for w in windows}
    fixtures, pieces = make_things(
        [ThingIn(t.gid, t.ifc_class, t.name, t.type_name, at.poly(t.outline), t.height,
                 at.frame(t.frame)) for t in floor.things], by_id, polys, used, notes)
    title = name or f"{floor.storey} ({floor.source.rsplit('/', 1)[-1]})"
    plan = Plan(title, tuple(rooms), tuple(doors), tuple(windows), tuple(fixtures),
                tuple(pieces), RuleChoice(set=rules) if rules else RuleChoice(),
                unit=plan_unit(floor.unit),
                notes=f"Imported from IFC ({floor.schema}, {floor.unit}); storey {floor.storey!r} "
                      f"({floor.storey_gid}) turned by {-angle:.2f} degrees.")
    return Imported(plan, tuple(notes), at)


def _entrance(doors: list[Door], entrance: str | None, floor: Floor, gid_of: dict[str, str],
              notes: list[Note]) -> list[Door]:
    """Put the entrance first: the door the user named, else the doors to no space (reported)."""
    names = {f.gid: f.name for f in floor.doors}
    if entrance:
        hit = [d for d in doors if entrance in (d.id, gid_of.get(d.id), names.get(gid_of.get(d.id, "")))
               or fnmatch.fnmatchcase(names.get(gid_of.get(d.id, ""), ""), entrance)]
        if not hit:
            known = ", ".join(f"{d.id} ({gid_of.get(d.id, '')})" for d in doors) or "none"
            raise FloorError(Problem("--entrance", f"{entrance!r} is not a door of the plan",
                                     f"doors: {known}"), floor.source)
        door = hit[0]
        if not door.is_entrance:
            door = replace(door, rooms=(door.rooms[0], OUTSIDE),
                           swings_into=(OUTSIDE if door.swings_into == door.rooms[1]
                                        else door.swings_into))
        notes.append(Note("info", gid_of.get(door.id, ""), f"entrance {door.id}: named by the user",
                          door.id))
        return [door] + [d for d in doors if d.id != door.id]
    for d in doors:
        if d.is_entrance:
            notes.append(Note("assumed", gid_of.get(d.id, ""), f"entrance {d.id}: the door leads "
                              "to no imported space, so it is taken to lead outside", d.id))
    return sorted(doors, key=lambda d: not d.is_entrance)


def _span(room: Room, at: tuple[int, int], width: int) -> LineString:
    u = wall_direction(room.outline, at)
    return LineString([(at[0] - u[0] * width / 2, at[1] - u[1] * width / 2),
                       (at[0] + u[0] * width / 2, at[1] + u[1] * width / 2)])


def _trim(room: Room, at: tuple[int, int], width: int,
          taken: list[LineString]) -> tuple[tuple[int, int], int] | None:
    """The longest part of an opening clear of ``taken`` openings (None: under 300 mm left)."""
    span = _span(room, at, width)
    if all(span.intersection(t).length <= 1.0 for t in taken):
        return at, width
    rest = span.difference(union_all([t.buffer(2, cap_style="flat") for t in taken]))
    parts = [g for g in getattr(rest, "geoms", [rest]) if g.geom_type == "LineString"]
    if not parts or max(p.length for p in parts) < 300:
        return None
    part = max(parts, key=lambda g: g.length)
    mid = part.interpolate(0.5, normalized=True)
    return (round(mid.x), round(mid.y)), int(part.length) - 1


def _clear_of(item: Door | Window, room: Room, taken: list[LineString],
             notes: list[Note]) -> Door | Window | None:
    """``item`` moved or narrowed clear of the ``taken`` openings (appended to), or None."""
    fit = _trim(room, item.at, item.width, taken)
    if fit is None:
        notes.append(Note("skipped", "", f"{item.id}: its opening overlaps a door", item.id))
        return None
    if fit[1] != item.width:
        notes.append(Note("assumed", "", f"{item.id}: narrowed from {item.width} to {fit[1]} mm "
                          "to stand clear of a door", item.id))
    taken.append(_span(room, *fit))
    return replace(item, at=fit[0], width=fit[1])


def _keep_apart(doors: list[Door], links: list[Door], windows: list[Window],
                rooms: dict[str, Room], notes: list[Note]) -> tuple[list[Door], list[Window]]:
    """Trim open links, then windows, clear of the doors' openings (a plan file's rule)."""
    taken = [_span(rooms[d.rooms[0]], d.at, d.width) for d in doors]
    kept_links = [x for x in (_clear_of(d, rooms[d.rooms[0]], taken, notes) for d in links)
                  if isinstance(x, Door)]
    kept_windows = [x for x in (_clear_of(w, rooms[w.room], taken, notes) for w in windows)
                    if isinstance(x, Window)]
    return doors + kept_links, kept_windows


def report_text(imported: Imported, caution: str) -> str:
    """The report as plain lines (printed by the CLI, and the comment block of the file)."""
    head = [f"Imported plan: {imported.plan.name}",
            f"{len(imported.plan.rooms)} rooms, {len(imported.plan.doors)} doors, "
            f"{len(imported.plan.windows)} windows, {len(imported.plan.fixtures)} fittings, "
            f"{len(imported.plan.furniture)} pieces",
            "kind     IFC GlobalId            what"]
    return "\n".join(head + [n.line() for n in imported.notes] + ["", caution])
