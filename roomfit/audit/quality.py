"""Layout quality: does each functional group work as a group? Advisory, apart from safety.

The clearance audit (``roomfit.audit.check``) says whether every piece can be reached and
used; this module says whether the pieces that belong together stand together, the way a
designer would arrange them. Each rule is measured, never just counted, and every record
carries the measured value, its target and the target's source:

- ``group.view``: a seat faces the screen within the viewing distance (screen diagonals,
  catalogue ``view_min``..``view_max``) and ``group.view_angle``: within ``view.off_axis``
  degrees of the screen's axis and of the seat's;
- ``group.reach``: the coffee table stands in front of its seat, the catalogue's gap from
  the seat front (:func:`reach_range`), and ``group.reach_axis``: on the seat's centre line;
- ``group.bedside``: a nightstand touches the head half of a long side the bed is used
  from (one nightstand per used side while there are free sides);
- ``group.bed_wall``: the bed's head against a wall; ``group.bed_window``: not under a window;
- ``group.dining``: every seated edge of a dining table has its chairs' pull-out depth free;
- ``group.desk_chair``: the desk's chair has its depth free; ``group.desk_height``: the top
  is at a height that leaves knee space;
- ``group.talk`` / ``group.talk_turn``: seats of a conversation group within speaking
  distance of another seat (front middle to front middle) and turned towards it: the other
  seat's front not behind this seat's back (angle from the back middle to it, off the
  seat's axis, at most ``talk.turn``);
- ``group.rug``: a rug lies under the centre of the group of its room.

Preferences (``Kind.PREFERENCE``) are measured the same way: ``pref.wall``, a piece of a
wall-loving category (``data/preferences.toml``) with its back to a wall. "Tall pieces do
not block windows" is the clearance audit's ``window.clear`` rule and is not repeated here.

Values come from ``data/groups.toml`` (:mod:`roomfit.rules.groups`) and the catalogue, each
with its source. Which types form which group is the catalogue's ``groups`` field.
"""

from __future__ import annotations

import functools
import math
import tomllib
from collections.abc import Callable, Iterable
from dataclasses import dataclass
from enum import StrEnum
from importlib import resources

from shapely import LineString, Point, Polygon, box
from shapely.geometry.base import BaseGeometry

from roomfit.audit.geometry import (
    fixture_polygon,
    footprint,
    footprint_box,
    lies_flat,
    room_polygon,
    side_direction,
    window_segment,
)
from roomfit.plan.data import Placement, Plan
from roomfit.rules.catalog import PieceSpec, resolve_pieces
from roomfit.rules.groups import param
from roomfit.rules.sets import RuleSet

__all__ = [
    "Kind",
    "GroupCheck",
    "QUALITY_RULES",
    "back_edge",
    "wall_share",
    "wall_categories",
    "reach_range",
    "view_range",
    "used_long_sides",
    "quality",
    "group_failures",
    "group_summary",
    "quality_record",
    "quality_lines",
    "compass",
]

#: Every rule this module measures, with what it asks (the texts in ``docs/quality.md``).
QUALITY_RULES = (
    "group.view", "group.view_angle", "group.reach", "group.reach_axis", "group.bedside",
    "group.bed_wall", "group.bed_window", "group.dining", "group.desk_chair",
    "group.desk_height", "group.talk", "group.talk_turn", "group.rug", "pref.wall",
)

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


def _m(mm: float) -> str:
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
class _Placed:
    spec: PieceSpec
    at: Placement
    shape: Polygon


@dataclass(frozen=True)
class _Ctx:
    plan: Plan
    placed: dict[str, _Placed]
    rooms: dict[str, Polygon]

    def in_room(self, room: str, pred: Callable[[PieceSpec], bool]) -> list[tuple[str, _Placed]]:
        return [(pid, p) for pid, p in self.placed.items() if p.at.room == room and pred(p.spec)]

    def in_room_all(self, pred: Callable[[PieceSpec], bool]) -> list[tuple[str, _Placed]]:
        return [(pid, p) for pid, p in self.placed.items() if pred(p.spec)]

    def name(self, pid: str) -> str:
        return self.placed[pid].spec.label.lower() if pid in self.placed else pid


def _context(plan: Plan, rules: RuleSet) -> _Ctx:
    specs = {s.id: s for s in resolve_pieces(plan, rules)}
    placed = {pid: _Placed(specs[pid], pl, footprint(specs[pid], pl)) for pid, pl in plan.layout}
    return _Ctx(plan, placed, {r.id: room_polygon(r) for r in plan.rooms})


def _front_mid(p: _Placed) -> tuple[float, float]:
    x0, y0, x1, y1 = footprint_box(p.spec, p.at)
    dx, dy = side_direction("front", p.at.rotation)
    cx, cy = (x0 + x1) / 2, (y0 + y1) / 2
    return cx + dx * (x1 - x0) / 2, cy + dy * (y1 - y0) / 2


def _centre(p: _Placed) -> tuple[float, float]:
    c = p.shape.centroid
    return c.x, c.y


def _of_category(category: str) -> Callable[[PieceSpec], bool]:
    """A test for pieces of ``category``."""
    return lambda s: s.category == category


def _angle(direction: tuple[int, int], vec: tuple[float, float]) -> float:
    """Degrees between a unit axis and a vector (0 when the vector is null)."""
    n = math.hypot(*vec)
    if n == 0:
        return 0.0
    cos = (direction[0] * vec[0] + direction[1] * vec[1]) / n
    return math.degrees(math.acos(max(-1.0, min(1.0, cos))))


def _check(rule: str, label: str, ok: bool, measured: float, unit: str, target: str,
           source: str, pieces: Iterable[str], room: str, where: tuple[float, float] | None,
           kind: Kind = Kind.GROUP) -> GroupCheck:
    return GroupCheck(rule, kind, label, ok, round(measured, 1), unit, target, source,
                      tuple(pieces), room, where)


def _side_segment(p: _Placed, side: str) -> LineString:
    """The edge of a placed footprint on ``side`` (in the piece's own frame)."""
    x0, y0, x1, y1 = footprint_box(p.spec, p.at)
    dx, dy = side_direction(side, p.at.rotation)
    if dx:
        x = x1 if dx > 0 else x0
        return LineString([(x, y0), (x, y1)])
    y = y1 if dy > 0 else y0
    return LineString([(x0, y), (x1, y)])


def _free_depth(ctx: _Ctx, pid: str, side: str) -> float:
    """Free floor (mm) straight out from ``side`` of a piece, over that side's whole length,
    to the nearest wall, fitting or other standing piece (at most :data:`_LOOK`)."""
    p = ctx.placed[pid]
    seg = _side_segment(p, side)
    dx, dy = side_direction(side, p.at.rotation)
    (ax, ay), (bx, by) = seg.coords
    band = box(min(ax, bx, ax + dx * _LOOK), min(ay, by, ay + dy * _LOOK),
               max(ax, bx, ax + dx * _LOOK), max(ay, by, ay + dy * _LOOK))
    room = ctx.rooms.get(p.at.room)
    blocks: list[BaseGeometry] = [band.difference(room)] if room is not None else []
    blocks += [fixture_polygon(f) for f in ctx.plan.fixtures]
    blocks += [q.shape for qid, q in ctx.placed.items() if qid != pid and not lies_flat(q.spec)]
    hits = [h for h in (b.intersection(band) for b in blocks) if h.area >= 1.0]  # not touches
    return min((float(seg.distance(h)) for h in hits), default=float(_LOOK))


# --------------------------------------------------------------------------- the rules


def _view(ctx: _Ctx) -> list[GroupCheck]:
    out: list[GroupCheck] = []
    angle_max = param("view.off_axis")
    for sid, screen in ctx.placed.items():
        if "viewing" not in screen.spec.groups or not screen.spec.screen:
            continue
        seats = ctx.in_room(screen.at.room, lambda s: "viewing" in s.groups and s.view_max > 0)
        best = None
        for pid, seat in seats:
            lo, hi = view_range(seat.spec, screen.spec)
            a, b = _front_mid(seat), _front_mid(screen)
            dist = round(math.dist(a, b), 1)
            off = max(_angle(side_direction("front", screen.at.rotation), (a[0] - b[0], a[1] - b[1])),
                      _angle(side_direction("front", seat.at.rotation), (b[0] - a[0], b[1] - a[1])))
            miss = max(0.0, lo - dist, dist - hi) + 100 * max(0.0, off - angle_max.value)
            if best is None or miss < best[0]:
                best = (miss, pid, seat, lo, hi, dist, off, a)
        if best is None:
            continue
        _, pid, seat, lo, hi, dist, off, a = best
        pair = f"{ctx.name(pid)} to {ctx.name(sid)}"
        out.append(_check("group.view", pair, lo <= dist <= hi, dist, "mm",
                          f"{_m(lo)}-{_m(hi)}", seat.spec.label + ": catalogue viewing range",
                          (pid, sid), seat.at.room, a))
        out.append(_check("group.view_angle", pair + ", off axis", off <= angle_max.value, off,
                          "deg", f"at most {angle_max.value:.0f}°", angle_max.cited,
                          (pid, sid), seat.at.room, a))
    return out


def _reach(ctx: _Ctx) -> list[GroupCheck]:
    out: list[GroupCheck] = []
    tol = param("reach.off_axis")
    for tid, table in ctx.placed.items():
        for relation, cat in table.spec.relations:
            if relation != "in_front":
                continue
            seats = ctx.in_room(table.at.room, _of_category(cat))
            best = None
            for pid, seat in seats:
                lo, hi = reach_range(table.spec, seat.spec)
                u = side_direction("front", seat.at.rotation)
                fx, fy = _front_mid(seat)
                gap = min((cx - fx) * u[0] + (cy - fy) * u[1] for cx, cy in table.shape.exterior.coords)
                (sx, sy), (tx, ty) = _centre(seat), _centre(table)
                lateral = abs((tx - sx) * u[1] - (ty - sy) * u[0])
                miss = max(0.0, lo - gap, gap - hi) + max(0.0, lateral - tol.mm)
                if best is None or miss < best[0]:
                    best = (miss, pid, seat, lo, hi, gap, lateral)
            if best is None:
                continue
            _, pid, seat, lo, hi, gap, lateral = best
            pair = f"{ctx.name(tid)} to {ctx.name(pid)} front"
            out.append(_check("group.reach", pair, lo <= gap <= hi, gap, "mm",
                              f"{_m(lo)}-{_m(hi)}", table.spec.label + ": catalogue gap range",
                              (tid, pid), table.at.room, _centre(table)))
            out.append(_check("group.reach_axis", f"{ctx.name(tid)} off the {ctx.name(pid)}'s "
                              "centre line", lateral <= tol.mm, lateral, "mm",
                              f"at most {_m(tol.mm)}", tol.cited, (tid, pid), table.at.room,
                              _centre(table)))
    return out


def _head_half(bed: _Placed, side: str) -> LineString:
    """The half of a long side of a bed next to its head."""
    seg = _side_segment(bed, side)
    head = back_edge(bed.shape.bounds, bed.at.rotation)
    (ax, ay), (bx, by) = seg.coords
    mx, my = (ax + bx) / 2, (ay + by) / 2
    end = (ax, ay) if head.distance(Point(ax, ay)) < head.distance(Point(bx, by)) else (bx, by)
    return LineString([end, (mx, my)])


def _bedside(ctx: _Ctx) -> list[GroupCheck]:
    out: list[GroupCheck] = []
    stands = [(pid, p, cat) for pid, p in ctx.placed.items()
              for rel, cat in p.spec.relations if rel == "beside_head"]
    options = []  # (distance, stand, bed, side)
    for pid, p, cat in stands:
        for bid, bed in ctx.in_room(p.at.room, _of_category(cat)):
            for side in used_long_sides(bed.spec):
                options.append((p.shape.distance(_head_half(bed, side)), pid, bid, side))
    options.sort()
    taken: set[tuple[str, str]] = set()
    chosen: dict[str, tuple[float, str, str]] = {}
    for free_only in (True, False):  # first one nightstand per free side, then any side
        for d, pid, bid, side in options:
            if pid in chosen or (free_only and (bid, side) in taken):
                continue
            chosen[pid] = (d, bid, side)
            taken.add((bid, side))
    for pid, p, _ in stands:
        if pid not in chosen:
            continue
        d, bid, side = chosen[pid]
        gap = p.spec.gap_max
        out.append(_check("group.bedside", f"{ctx.name(pid)} to {ctx.name(bid)} head ({side} side)",
                          d <= gap, d, "mm", f"touching (within {_m(gap)})",
                          p.spec.label + ": catalogue gap range", (pid, bid), p.at.room,
                          _centre(p)))
    return out


def _bed(ctx: _Ctx) -> list[GroupCheck]:
    out: list[GroupCheck] = []
    share, gap = param("wall.share"), param("wall.gap")
    for bid, bed in ctx.in_room_all(lambda s: "sleeping" in s.groups and s.category == "bed"):
        edge = back_edge(bed.shape.bounds, bed.at.rotation)
        room = ctx.rooms.get(bed.at.room)
        on = wall_share(edge, room.exterior) if room is not None else 0.0
        mid = edge.interpolate(0.5, normalized=True)
        out.append(_check("group.bed_wall", f"{ctx.name(bid)} head against a wall",
                          on >= share.value - 1e-9, 100 * on, "%",
                          f"at least {100 * share.value:.0f} %", share.cited, (bid,),
                          bed.at.room, (mid.x, mid.y)))
        wins = [window_segment(ctx.plan, w) for w in ctx.plan.windows if w.room == bed.at.room]
        under = sum(edge.intersection(w.buffer(gap.mm, cap_style="flat")).length for w in wins)
        out.append(_check("group.bed_window", f"{ctx.name(bid)} head under a window",
                          under <= 0, under, "mm", "none",
                          "draughts and cold glass at the pillow, the window hard to reach "
                          "(common-practice)", (bid,), bed.at.room, (mid.x, mid.y)))
    return out


def _dining(ctx: _Ctx) -> list[GroupCheck]:
    out: list[GroupCheck] = []
    need = param("dining.pull_out")
    for tid, t in ctx.in_room_all(lambda s: "dining" in s.groups):
        for z in t.spec.zones:
            if z.kind != "dining_seat":
                continue
            depth = _free_depth(ctx, tid, z.side)
            way = compass(side_direction(z.side, t.at.rotation))
            out.append(_check("group.dining", f"chairs at {ctx.name(tid)} ({way} side), free depth",
                              depth >= need.mm, depth, "mm", f"at least {_m(need.mm)}",
                              need.cited, (tid,), t.at.room, _centre(t)))
    return out


def _desk(ctx: _Ctx) -> list[GroupCheck]:
    out: list[GroupCheck] = []
    need, lo, hi = param("desk.chair"), param("desk.height_min"), param("desk.height_max")
    for did, d in ctx.in_room_all(lambda s: "work" in s.groups):
        depth = _free_depth(ctx, did, "front")
        out.append(_check("group.desk_chair", f"chair room at {ctx.name(did)}", depth >= need.mm,
                          depth, "mm", f"at least {_m(need.mm)}", need.cited, (did,), d.at.room,
                          _front_mid(d)))
        h = d.spec.height
        out.append(_check("group.desk_height", f"{ctx.name(did)} top height (knee space)",
                          lo.mm <= h <= hi.mm, h, "mm", f"{_m(lo.mm)}-{_m(hi.mm)}", lo.cited,
                          (did,), d.at.room, _centre(d)))
    return out


def _talk(ctx: _Ctx) -> list[GroupCheck]:
    out: list[GroupCheck] = []
    far, turn = param("talk.distance"), param("talk.turn")
    rooms = {p.at.room for p in ctx.placed.values()}
    for room in sorted(rooms):
        seats = ctx.in_room(room, lambda s: "conversation" in s.groups)
        if len(seats) < 2:
            continue
        for pid, seat in seats:
            a = _front_mid(seat)
            u = side_direction("front", seat.at.rotation)
            qid, other = min(((q, o) for q, o in seats if q != pid),
                             key=lambda qo: math.dist(a, _front_mid(qo[1])))
            b = _front_mid(other)
            d = round(math.dist(a, b), 1)
            back = a[0] - u[0] * seat.spec.depth, a[1] - u[1] * seat.spec.depth
            ang = _angle(u, (b[0] - back[0], b[1] - back[1]))
            pair = f"{ctx.name(pid)} to {ctx.name(qid)}"
            out.append(_check("group.talk", pair, d <= far.mm, d, "mm", f"at most {_m(far.mm)}",
                              far.cited, (pid, qid), room, a))
            out.append(_check("group.talk_turn", pair + ", turned away by", ang <= turn.value,
                              ang, "deg", f"at most {turn.value:.0f}°", turn.cited, (pid, qid),
                              room, a))
    return out


#: The centre of each group a rug may lie under, in the order a rug is given to a group.
_RUG_CENTRES: tuple[Callable[[PieceSpec], bool], ...] = (
    lambda s: any(r == "in_front" for r, _ in s.relations),  # coffee table
    lambda s: "dining" in s.groups,
    lambda s: "sleeping" in s.groups and s.category == "bed",
    lambda s: "conversation" in s.groups,
)


def _rug(ctx: _Ctx) -> list[GroupCheck]:
    out: list[GroupCheck] = []
    need = param("rug.under")
    for rid, rug in ctx.in_room_all(lambda s: "rug" in s.groups):
        centres = next((c for pred in _RUG_CENTRES if (c := ctx.in_room(rug.at.room, pred))), [])
        if not centres:
            continue
        qid, p = max(centres, key=lambda qp: qp[1].shape.intersection(rug.shape).area)
        share = p.shape.intersection(rug.shape).area / p.shape.area
        out.append(_check("group.rug", f"{ctx.name(qid)} on {ctx.name(rid)}",
                          share >= need.value - 1e-9, 100 * share, "%",
                          f"at least {100 * need.value:.0f} %", need.cited, (rid, qid),
                          rug.at.room, _centre(rug)))
    return out


def _wall_pref(ctx: _Ctx) -> list[GroupCheck]:
    out: list[GroupCheck] = []
    share = param("wall.share")
    cats = set(wall_categories())
    for pid, p in ctx.in_room_all(lambda s: s.category in cats and not s.against_wall):
        room = ctx.rooms.get(p.at.room)
        edge = back_edge(p.shape.bounds, p.at.rotation)
        on = wall_share(edge, room.exterior) if room is not None else 0.0
        out.append(_check("pref.wall", f"{ctx.name(pid)} back to a wall",
                          on >= share.value - 1e-9, 100 * on, "%",
                          f"at least {100 * share.value:.0f} %",
                          "storage and seating backed by a wall leave the room open "
                          "(common-practice)", (pid,), p.at.room, _centre(p), Kind.PREFERENCE))
    return out


_RULES: tuple[Callable[[_Ctx], list[GroupCheck]], ...] = (
    _view, _reach, _bedside, _bed, _dining, _desk, _talk, _rug, _wall_pref)


def quality(plan: Plan, rules: RuleSet) -> tuple[GroupCheck, ...]:
    """Measure every functional-group rule and preference on the plan's as-is arrangement.

    Only groups the plan has are measured (no TV: no viewing rule). Advisory: a failure is
    a layout a designer would rearrange, not a safety fault.
    """
    ctx = _context(plan, rules)
    return tuple(c for rule in _RULES for c in rule(ctx))


def group_failures(plan: Plan, rules: RuleSet) -> int:
    """How many functional-group rules (not preferences) the arrangement misses."""
    return sum(not c.ok for c in quality(plan, rules) if c.kind == Kind.GROUP)


def group_summary(plan: Plan, rules: RuleSet) -> dict[str, object]:
    """Group-rule satisfaction of an arrangement as plain data (for the benchmark):
    ``group_met`` and ``group_total`` checks, and the rule ids that failed."""
    groups = [c for c in quality(plan, rules) if c.kind == Kind.GROUP]
    return {"group_met": sum(c.ok for c in groups), "group_total": len(groups),
            "group_failed": sorted({c.rule for c in groups if not c.ok})}


def quality_record(checks: Iterable[GroupCheck]) -> list[dict[str, object]]:
    """The checks as plain data (for ``--json`` and the page)."""
    return [{"rule": c.rule, "kind": str(c.kind), "label": c.label, "ok": c.ok,
             "measured": c.measured, "unit": c.unit, "target": c.target, "source": c.source,
             "pieces": list(c.pieces), "room": c.room, "text": c.text} for c in checks]


def quality_lines(checks: Iterable[GroupCheck]) -> list[str]:
    """One line per check, failures first, for a terminal summary."""
    cs = sorted(checks, key=lambda c: (c.ok, c.kind != Kind.GROUP))
    return [("  " if c.ok else "! ") + ("preference: " if c.kind == Kind.PREFERENCE else "")
            + c.text for c in cs]
