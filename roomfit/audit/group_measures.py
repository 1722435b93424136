"""What the layout-quality rules share: the measured record (:class:`GroupCheck`), the
arrangement as the rules see it (:class:`Ctx`: each placed piece with its catalogue entry and
footprint), and the measures several rules and other modules use (a piece's back edge, its
share on a wall, the free depth out from a side, the catalogue's viewing and reach ranges).

Lengths in millimetres, angles in degrees; values and their sources are in
``data/groups.toml`` (:mod:`roomfit.rules.groups`) and the catalogue.
"""

from __future__ import annotations

import functools
import math
import tomllib
from collections.abc import Callable, Iterable
from dataclasses import dataclass
from enum import StrEnum
from importlib import resources

from shapely import LineString, Point, Polygon, box, get_parts
from shapely.geometry.base import BaseGeometry

from roomfit.audit.geometry import (
    fixture_polygon,
    footprint,
    footprint_box,
    lies_flat,
    room_polygon,
    side_direction,
)
from roomfit.plan.data import Placement, Plan
from roomfit.rules.catalog import PieceSpec, resolve_pieces
from roomfit.rules.groups import param
from roomfit.rules.sets import RuleSet

__all__ = [
    "Kind",
    "GroupCheck",
    "metres",
    "back_edge",
    "wall_share",
    "wall_categories",
    "reach_range",
    "view_range",
    "used_long_sides",
    "compass",
    "Placed",
    "Ctx",
    "context",
    "front_mid",
    "centre",
    "of_category",
    "angle",
    "group_check",
    "side_segment",
    "free_depth",
]

#: How far (mm) the free depth in front of a seated edge is looked for.
_LOOK = 3000


class Kind(StrEnum):
    """A functional-group rule (a designer would not sign a layout failing it) or a softer
    preference."""

    GROUP = "group"
    PREFERENCE = "preference"


@dataclass(frozen=True)
class GroupCheck:
    """One measured rule on one group: ``measured`` in ``unit`` (``mm``, ``deg`` or ``%``),
    ``target`` the wanted value in words ("1.66-3.49 m", "touching", "at least 80 %")."""

    rule: str
    kind: Kind
    label: str
    ok: bool
    measured: float
    unit: str
    target: str
    source: str
    pieces: tuple[str, ...]
    room: str
    where: tuple[float, float] | None = None

    @property
    def shown(self) -> str:
        """The measured value as printed: metres for lengths, degrees, per cent."""
        return _show(self.measured, self.unit)

    @property
    def text(self) -> str:
        """``"sofa to TV: 2.4 m, 1.66-3.49 m ✓"``: label, measured value, target, verdict."""
        return f"{self.label}: {self.shown}, {self.target} " + ("✓" if self.ok else "✗")


def _show(v: float, unit: str) -> str:
    if unit == "mm":
        return f"{v / 1000:.2f} m"
    if unit == "deg":
        return f"{v:.1f}°"
    return f"{v:.0f} %"


def metres(mm: float) -> str:
    """A length in mm as metres with two decimals (``"2.42 m"``)."""
    return f"{mm / 1000:.2f} m"


# --------------------------------------------------------------------------- shared measures


def back_edge(bounds: tuple[float, float, float, float], rotation: int) -> LineString:
    """The back edge of a footprint box ``(x0, y0, x1, y1)`` turned by ``rotation``.

    >>> back_edge((0, 0, 1000, 500), 0).coords[:]
    [(0.0, 0.0), (1000.0, 0.0)]
    """
    x0, y0, x1, y1 = bounds
    dx, dy = side_direction("back", rotation)
    if dx == 1:
        return LineString([(x1, y0), (x1, y1)])
    if dx == -1:
        return LineString([(x0, y0), (x0, y1)])
    if dy == 1:
        return LineString([(x0, y1), (x1, y1)])
    return LineString([(x0, y0), (x1, y0)])


def wall_share(edge: LineString, walls: BaseGeometry) -> float:
    """Share (0..1) of ``edge`` within ``wall.gap`` of ``walls`` (a room's boundary): the one
    measure of "against a wall" (its pass mark is ``wall.share``, both in ``data/groups.toml``)."""
    near = edge.intersection(walls.buffer(param("wall.gap").mm, cap_style="flat")).length
    return near / edge.length if edge.length else 0.0


@functools.cache
def _preferences() -> dict:
    path = resources.files("roomfit") / "data" / "preferences.toml"
    return tomllib.loads(path.read_text(encoding="utf-8"))


def wall_categories() -> tuple[str, ...]:
    """Categories that usually stand with their back to a wall when the catalogue does not
    demand it (``[wall].categories`` of ``data/preferences.toml``, common practice)."""
    return tuple(_preferences()["wall"]["categories"])


def reach_range(table: PieceSpec, seat: PieceSpec) -> tuple[int, int]:
    """Gap (mm) from a seat's front to the coffee table in front of it: the catalogue's
    ``gap_min``..``gap_max`` of the table, moved out to the seat's front use zone when the
    rule set asks more (the zone stays free), keeping at least 100 mm of play.

    >>> from roomfit.rules.catalog import PieceSpec
    >>> t = PieceSpec("t", "t", "coffee-table", "coffee_table", 1100, 600, 450, False, (), (),
    ...               ("l",), gap_min=355, gap_max=455)
    >>> s = PieceSpec("s", "s", "sofa-3", "sofa", 2135, 890, 850, False, (), (), ("l",))
    >>> reach_range(t, s)
    (355, 455)
    """
    zone = max((z.depth for z in seat.zones if z.side == "front"), default=0)
    lo = max(table.gap_min, zone)
    return lo, max(table.gap_max, lo + 100)


def view_range(seat: PieceSpec, screen: PieceSpec) -> tuple[int, int]:
    """Distance (mm) from a seat's front to the screen's front: ``view_min``..``view_max``
    screen diagonals (catalogue, with sources); (0, 0) when either is not given.

    A 55 in (1397 mm) screen and a sofa at 1.19 to 2.5 diagonals: 1663 to 3492 mm.
    """
    if not screen.screen or not seat.view_max:
        return 0, 0
    return math.ceil(seat.view_min * screen.screen), math.floor(seat.view_max * screen.screen)


def used_long_sides(spec: PieceSpec) -> tuple[str, ...]:
    """The long sides (``left``, ``right``) a bed is used from: those with a use zone; both
    when it has none on either."""
    used = tuple(s for s in ("left", "right") if any(z.side == s for z in spec.zones))
    return used or ("left", "right")


def compass(direction: tuple[int, int]) -> str:
    """A plan direction as a compass word (y runs north).

    >>> compass((0, 1)), compass((-1, 0))
    ('north', 'west')
    """
    return {(0, 1): "north", (0, -1): "south", (1, 0): "east", (-1, 0): "west"}[direction]


# --------------------------------------------------------------------------- context


@dataclass(frozen=True)
class Placed:
    spec: PieceSpec
    at: Placement
    shape: Polygon


@dataclass(frozen=True)
class Ctx:
    plan: Plan
    placed: dict[str, Placed]
    rooms: dict[str, Polygon]
    rules: RuleSet

    def in_room(self, room: str, pred: Callable[[PieceSpec], bool]) -> list[tuple[str, Placed]]:
        return [(pid, p) for pid, p in self.placed.items() if p.at.room == room and pred(p.spec)]

    def in_room_all(self, pred: Callable[[PieceSpec], bool]) -> list[tuple[str, Placed]]:
        return [(pid, p) for pid, p in self.placed.items() if pred(p.spec)]

    def name(self, pid: str) -> str:
        return self.placed[pid].spec.label.lower() if pid in self.placed else pid


def context(plan: Plan, rules: RuleSet) -> Ctx:
    specs = {s.id: s for s in resolve_pieces(plan, rules)}
    placed = {pid: Placed(specs[pid], pl, footprint(specs[pid], pl)) for pid, pl in plan.layout}
    return Ctx(plan, placed, {r.id: room_polygon(r) for r in plan.rooms}, rules)


def front_mid(p: Placed) -> tuple[float, float]:
    x0, y0, x1, y1 = footprint_box(p.spec, p.at)
    dx, dy = side_direction("front", p.at.rotation)
    cx, cy = (x0 + x1) / 2, (y0 + y1) / 2
    return cx + dx * (x1 - x0) / 2, cy + dy * (y1 - y0) / 2


def centre(p: Placed) -> tuple[float, float]:
    c = p.shape.centroid
    return c.x, c.y


def of_category(category: str) -> Callable[[PieceSpec], bool]:
    """A test for pieces of ``category``."""
    return lambda s: s.category == category


def angle(direction: tuple[int, int], vec: tuple[float, float]) -> float:
    """Degrees between a unit axis and a vector (0 when the vector is null)."""
    n = math.hypot(*vec)
    if n == 0:
        return 0.0
    cos = (direction[0] * vec[0] + direction[1] * vec[1]) / n
    return math.degrees(math.acos(max(-1.0, min(1.0, cos))))


def group_check(rule: str, label: str, ok: bool, measured: float, unit: str, target: str,
           source: str, pieces: Iterable[str], room: str, where: tuple[float, float] | None,
           kind: Kind = Kind.GROUP) -> GroupCheck:
    return GroupCheck(rule, kind, label, ok, round(measured, 1), unit, target, source,
                      tuple(pieces), room, where)


def side_segment(p: Placed, side: str) -> LineString:
    """The edge of a placed footprint on ``side`` (in the piece's own frame)."""
    x0, y0, x1, y1 = footprint_box(p.spec, p.at)
    dx, dy = side_direction(side, p.at.rotation)
    if dx:
        x = x1 if dx > 0 else x0
        return LineString([(x, y0), (x, y1)])
    y = y1 if dy > 0 else y0
    return LineString([(x0, y), (x1, y)])


def free_depth(ctx: Ctx, pid: str, side: str, inset: float = 0) -> float:
    """Free floor (mm) straight out from ``side`` of a piece, over that side's whole length
    less ``inset`` at the back end (a bed's head end, as its side zones leave out), to the
    nearest wall, fitting or other standing piece (at most :data:`_LOOK`)."""
    p = ctx.placed[pid]
    seg = side_segment(p, side)
    if inset:
        head = back_edge(p.shape.bounds, p.at.rotation)
        a, b = (Point(c) for c in seg.coords)
        near, far = (a, b) if head.distance(a) <= head.distance(b) else (b, a)
        t = min(1.0, inset / seg.length)
        seg = LineString([(near.x + (far.x - near.x) * t, near.y + (far.y - near.y) * t),
                          (far.x, far.y)])
    dx, dy = side_direction(side, p.at.rotation)
    (ax, ay), (bx, by) = seg.coords
    band = box(min(ax, bx, ax + dx * _LOOK), min(ay, by, ay + dy * _LOOK),
               max(ax, bx, ax + dx * _LOOK), max(ay, by, ay + dy * _LOOK))
    room = ctx.rooms.get(p.at.room)
    blocks: list[BaseGeometry] = [band.difference(room)] if room is not None else []
    blocks += [fixture_polygon(f) for f in ctx.plan.fixtures]
    blocks += [q.shape for qid, q in ctx.placed.items() if qid != pid and not lies_flat(q.spec)]
    # only the parts of a block that cover floor in the band: an L-shaped fitting may
    # overlap the band far off and touch the side at one corner, which blocks nothing
    hits = [h for b in blocks for h in get_parts(b.intersection(band)) if h.area >= 1.0]
    return min((float(seg.distance(h)) for h in hits), default=float(_LOOK))

