"""What a client notices about an arrangement: where the main pieces are, the idea of the
arrangement in one line, how two arrangements differ, and the moving list from today's.

A *main piece* is one that sets how a room is used: beds, the seats of a viewing or lounge
group, dining tables, desks, and any piece the plan allows in several rooms. Its *spot* is
what a client sees of it: the room; for a bed the wall its head is on; for a seat, table or
desk the part of the room it stands in (a compass third along each axis) and the way it
faces; for a desk also whether it stands by a window. Two arrangements differ *visibly* when
some main piece's spot differs (:func:`visible_changes`); a moved lamp or a turned chest does
not count.

>>> compass_part((500, 500), (0, 0, 3000, 3000))
'south-west'
"""

from __future__ import annotations

from dataclasses import dataclass

from shapely import Point

from roomfit.audit.geometry import footprint, room_polygon, side_direction, window_segment
from roomfit.audit.group_measures import compass
from roomfit.plan.data import Placement, Plan
from roomfit.rules.catalog import PieceSpec, resolve_pieces
from roomfit.rules.sets import RuleSet

__all__ = ["Spot", "is_main", "compass_part", "spots", "describe", "visible_changes", "moves",
           "WINDOW_NEAR"]

#: A desk whose footprint is this close (mm) to a window stands "by the window": daylight on
#: the work surface from the side or front (common practice).
WINDOW_NEAR = 1000


@dataclass(frozen=True)
class Spot:
    """Where a main piece is, in a client's words: ``room`` (its label), ``where`` (wall or
    part of the room), ``facing`` (compass word, "" for a bed) and ``by_window``."""

    piece: str
    name: str
    room: str
    where: str
    facing: str
    by_window: bool = False
    free_room: bool = False

    @property
    def words(self) -> str:
        """``"bed head on the west wall"``, ``"sofa in the north, facing south"``,
        ``"desk by the window"``; the room is named when the piece could choose it."""
        room = f" of the {self.room.lower()}" if self.free_room else ""
        if self.where.endswith("wall"):
            return f"{self.name} head on the {self.where}" + (
                f" in the {self.room.lower()}" if self.free_room else "")
        if self.by_window:
            return f"{self.name} by the window" + (
                f" in the {self.room.lower()}" if self.free_room else "")
        text = f"{self.name} in the {self.where}{room}"
        return text + (f", facing {self.facing}" if self.facing else "")


def is_main(spec: PieceSpec) -> bool:
    """Beds, seats of a viewing or lounge group (not armchairs), dining tables, desks, and
    any piece allowed in several rooms."""
    return (len(spec.rooms) > 1 or spec.category in ("bed", "sofa", "dining_table", "desk"))


def compass_part(point: tuple[float, float], bounds: tuple[float, float, float, float]) -> str:
    """The part of a box a point is in: thirds along x and y, named by compass ("middle"
    in the centre third of both)."""
    x0, y0, x1, y1 = bounds
    fx = (point[0] - x0) / (x1 - x0) if x1 > x0 else 0.5
    fy = (point[1] - y0) / (y1 - y0) if y1 > y0 else 0.5
    ns = "south" if fy < 1 / 3 else "north" if fy > 2 / 3 else ""
    ew = "west" if fx < 1 / 3 else "east" if fx > 2 / 3 else ""
    return f"{ns}-{ew}" if ns and ew else (ns or ew or "middle")


#: Short names of main pieces by category (the label is used when a plan has two of one).
_SHORT = {"bed": "bed", "sofa": "sofa", "dining_table": "table", "desk": "desk"}


def _spot(plan: Plan, spec: PieceSpec, at: Placement, name: str) -> Spot:
    room = plan.room(at.room)
    shape = footprint(spec, at)
    free = len(spec.rooms) > 1
    if spec.category == "bed":
        wall = compass(side_direction("back", at.rotation)) + " wall"
        return Spot(spec.id, name, room.label, wall, "", free_room=free)
    c = shape.centroid
    part = compass_part((c.x, c.y), room_polygon(room).bounds)
    wins = [window_segment(plan, w) for w in plan.windows if w.room == at.room]
    near = spec.category == "desk" and any(shape.distance(w) <= WINDOW_NEAR for w in wins)
    # a table with chairs all round looks the same whichever way it is turned
    facing = "" if spec.category == "dining_table" else compass(side_direction("front", at.rotation))
    return Spot(spec.id, name, room.label, part, facing, near, free)


def _names(specs: list[PieceSpec]) -> dict[str, str]:
    """A short name per piece: the category's word, or the label where two share it."""
    short = {s.id: _SHORT.get(s.category, s.label.lower()) for s in specs}
    counts: dict[str, int] = {}
    for n in short.values():
        counts[n] = counts.get(n, 0) + 1
    return {pid: n if counts[n] == 1 else next(s.label.lower() for s in specs if s.id == pid)
            for pid, n in short.items()}


def spots(plan: Plan, rules: RuleSet) -> tuple[Spot, ...]:
    """The spot of every placed main piece, in plan order."""
    specs = {s.id: s for s in resolve_pieces(plan, rules)}
    names = _names(list(specs.values()))
    return tuple(_spot(plan, specs[pid], at, names[pid]) for pid, at in plan.layout
                 if is_main(specs[pid]))


def describe(plan: Plan, rules: RuleSet) -> str:
    """The arrangement's idea in one line: each main piece's spot, rooms named when the plan
    lets a piece choose its room ("bed head on the east wall; desk by the window in the
    bedroom")."""
    parts = [s.words for s in spots(plan, rules)]
    return "; ".join(parts) if parts else "no main piece placed"


def visible_changes(a: tuple[Spot, ...], b: tuple[Spot, ...]) -> tuple[str, ...]:
    """The main pieces whose spot differs between two arrangements (another room, wall,
    part of the room, facing, or window), by piece id."""
    where = {s.piece: s for s in a}
    return tuple(s.piece for s in b if s.piece in where and where[s.piece] != s)


def moves(before: Plan, after: Plan, rules: RuleSet, least: int = 100) -> tuple[str, ...]:
    """The moving list from the arrangement as it stands (``before``'s placements) to
    ``after``'s: one line per piece that moves ``least`` mm or more, or turns, or changes room
    ("sofa: to the north-east of the living room, facing south (3.1 m)", "bed: head to the
    south wall (2.0 m, turned)"). Pieces that had no placement are listed as "new"."""
    specs = {s.id: s for s in resolve_pieces(after, rules)}
    names = _names(list(specs.values()))
    now = dict(before.layout)
    out = []
    for pid, at in after.layout:
        spec = specs[pid]
        old = now.get(pid)
        if old == at:
            continue
        spot = _spot(after, spec, at, names[pid])
        place = (f"head to the {spot.where}" if spot.where.endswith("wall")
                 else f"to the {spot.where} of the {spot.room.lower()}"
                 + (f", facing {spot.facing}" if spot.facing else ""))
        if old is None:
            out.append(f"{names[pid]} (new): {place}")
            continue
        dist = Point(footprint(spec, old).centroid).distance(footprint(spec, at).centroid)
        if dist < least and old.rotation == at.rotation and old.room == at.room:
            continue
        how = f"{dist / 1000:.1f} m" + (", turned" if old.rotation != at.rotation else "")
        if old.room != at.room:
            how = f"from the {before.room(old.room).label.lower()}, " + how
        out.append(f"{names[pid]}: {place} ({how})")
    return tuple(out)
