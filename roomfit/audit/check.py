"""The exact-geometry audit of an arrangement: the judge of every layout.

``audit(plan, rules)`` looks at the pieces of ``plan`` that have a placement and returns one
:class:`Finding` per thing checked. It works on exact shapes (shapely), independent of the
solver's grid, so every candidate the solver proposes can be judged here. Lengths in mm,
areas in mm2; two shapes *touch* without overlapping when they share less than 1 mm2, and a
point lies on a line when it is within 1 mm of it.

Rule ids (see ``docs/audit.md`` for each method):

- ``piece.room``: a piece stands in one of its allowed rooms (and is placed at all);
- ``piece.inside``: its footprint lies inside that room;
- ``piece.overlap``: footprints overlap neither each other nor fittings;
- ``wall.against``: pieces that need a wall have at least 80 % of their back on the room
  boundary;
- ``zone.clear``: every use zone lies inside its room and is free of other footprints and of
  fittings; every fitting's zone is free of footprints (zones may overlap zones, door swings
  and turning spaces);
- ``door.width``: clear width of each door against ``door.min_width``;
- ``door.swing_clear``: each door's swing and approach floor are free of furniture;
- ``window.clear``: nothing taller than the sill (or tall by the catalogue's measure) within
  ``window.band`` of a window;
- ``route.reach``: every door side, use zone, fitting zone and turning space reachable from
  the entrance at ``route.width`` (with the rule set's pinch allowance);
- ``route.width``: per room, the narrowest passage on the way to everything in it;
- ``turning.space``: a turning space of ``turning.size`` in each room when the set asks for one.

Reachability (``route.reach``) follows the configuration-space idea of motion planning: a
person is a disc of diameter ``route.width``; its centre may go wherever the free floor
shrunk by half the width (a negative buffer, i.e. erosion by a disc) reaches. Connected parts
of that shrunk floor in one room are joined through doors. References: T. Lozano-Perez,
"Spatial planning: a configuration space approach", IEEE Trans. Computers C-32 (1983);
J. Serra, *Image Analysis and Mathematical Morphology* (1982) for erosion and opening.

Worked example (checked by hand): in an empty 3000 x 3000 mm room with a 760 mm route, the
shrunk floor is the 2240 x 2240 mm square inset by 380 mm; a free 1500 x 1500 mm room holds a
1500 mm turning circle and a 1490 mm room does not.
"""

from __future__ import annotations

import math
from collections.abc import Iterable
from dataclasses import dataclass, field

import numpy as np
import shapely
from shapely import MultiPoint, Point, Polygon
from shapely.affinity import translate
from shapely.geometry.base import BaseGeometry
from shapely.ops import nearest_points, unary_union

from roomfit.audit import geometry as geo
from roomfit.audit.marks import Mark
from roomfit.audit.quality import back_edge, wall_share
from roomfit.plan.data import OUTSIDE, Placement, Plan
from roomfit.rules.catalog import PieceSpec, resolve_pieces
from roomfit.rules.groups import param
from roomfit.rules.sets import Rule, RuleSet

__all__ = [
    "RULE_IDS",
    "TOUCH_MM",
    "TOUCH_MM2",
    "WALL_SHARE",
    "WIDTH_STEP",
    "WIDTH_TOL",
    "RASTER_CELL",
    "Finding",
    "Audit",
    "audit",
    "turning_space",
    "TurningResult",
    "marks_for",
    "AREA_RULES",
    "audit_record",
    "summary_text",
]

#: Every rule id an audit can report, in the order the summary lists them.
RULE_IDS = ("piece.room", "piece.inside", "piece.overlap", "wall.against", "zone.clear",
            "door.width", "door.swing_clear", "door.approach", "window.clear", "route.reach", "route.width",
            "turning.space")

#: Distance (mm) within which two shapes count as touching / a point as on a line.
TOUCH_MM = 1.0
#: Overlap area (mm2) below which two shapes only touch.
TOUCH_MM2 = 1.0
#: Share of a piece's back edge that must lie on the room boundary (``wall.against``): the
#: ``wall.share`` value of ``data/groups.toml`` (its gap ``wall.gap``), measured by
#: :func:`roomfit.audit.quality.wall_share`, the one "against a wall" measure.
WALL_SHARE = param("wall.share").value
#: Precision (mm) of the widest-route search.
WIDTH_STEP = 5.0
#: A passage this much narrower (mm) than asked still counts as wide enough, so that a hall
#: exactly as wide as the route passes (its shrunk floor would otherwise be a bare line).
WIDTH_TOL = 0.5
#: Raster cell (mm) for the square and T-shaped turning-space tests.
RASTER_CELL = 10.0
#: Segments per quarter circle in negative buffers.
_QUAD_SEGS = 8
#: ... and in the narrow-stretch measure when a stretch is within 25 mm of the allowed
#: length, where a coarse arc would shorten it by up to ~15 mm (a chord cuts the corner an
#: arc only touches).
_PINCH_SEGS = 64


@dataclass(frozen=True)
class Finding:
    """One audited rule on one subject (a piece, door, window, room or target).

    ``measured`` and ``required`` are in mm (mm2 for areas); ``where`` is a point to mark on
    the drawing and ``outline`` an optional polygon (empty when none). For ``route.reach``
    failures ``pieces`` names the pieces and fittings next to the bottleneck at ``where``.
    """

    rule: str
    ok: bool
    message: str
    measured: float | None = None
    required: float | None = None
    source: str = ""
    pieces: tuple[str, ...] = ()
    room: str | None = None
    where: tuple[float, float] | None = None
    outline: tuple[tuple[float, float], ...] = ()


@dataclass(frozen=True)
class Audit:
    """Every finding of one audit."""

    findings: tuple[Finding, ...]

    @property
    def passed(self) -> bool:
        return all(f.ok for f in self.findings)

    @property
    def failures(self) -> tuple[Finding, ...]:
        return tuple(f for f in self.findings if not f.ok)

    def by_rule(self, rule: str) -> tuple[Finding, ...]:
        return tuple(f for f in self.findings if f.rule == rule)


# --------------------------------------------------------------------------- shapes


def _polys(g: BaseGeometry) -> list[Polygon]:
    """The polygons of ``g`` with more than a touch of area."""
    if g.is_empty:
        return []
    if isinstance(g, Polygon):
        return [g] if g.area > TOUCH_MM2 else []
    return [p for p in getattr(g, "geoms", []) for p in _polys(p)]


def _outline(g: BaseGeometry) -> tuple[tuple[float, float], ...]:
    """Outline of the largest polygon in ``g`` (rounded to 0.1 mm), empty if none."""
    ps = _polys(g)
    if not ps:
        return ()
    p = max(ps, key=lambda q: q.area)
    return tuple((round(x, 1), round(y, 1)) for x, y in p.exterior.coords[:-1])


def _pt(g: BaseGeometry) -> tuple[float, float]:
    """A representative point of ``g`` (rounded to 0.1 mm)."""
    p = g.centroid if not g.is_empty else Point(0, 0)
    if not g.is_empty and isinstance(g, Polygon) and not g.contains(p):
        p = g.representative_point()
    return (round(p.x, 1), round(p.y, 1))


def _source(rule: Rule) -> str:
    """The rule's source for a finding; when the client's plan overrode the value, says so
    first (the set's source speaks of the set's own value, not of the client's)."""
    if not rule.overridden:
        return rule.source
    return f"value set by the plan for this client (the rule set's own value: {rule.source})"


def _fmt(mm: float) -> str:
    # Round to 0.1 mm first, as ``Finding.measured`` is, so a message and its measured value
    # never read 699 mm and 700 mm for the same width.
    return f"{round(mm, 1):.0f} mm"


def _cm2(mm2: float) -> str:
    """An area given in mm2 as whole square centimetres (1 cm2 = 100 mm2)."""
    return f"{mm2 / 100:.0f} cm2"


@dataclass(frozen=True)
class _Placed:
    spec: PieceSpec
    placement: Placement
    shape: Polygon


@dataclass(frozen=True)
class _Target:
    """Something that must be reachable: ``geom`` in ``room``; a body centre can go
    ``depth`` mm into it (a zone's depth, half a door's width, a turning space's clearance)."""

    label: str
    room: str
    geom: BaseGeometry
    depth: float
    ids: tuple[str, ...]
    door: str | None = None   # a door side: reached through the door's own mouth point


@dataclass
class _Ctx:
    plan: Plan
    rules: RuleSet
    placed: dict[str, _Placed]
    rooms: dict[str, Polygon]
    fixtures: dict[str, Polygon]
    free: dict[str, BaseGeometry]
    doors: list[geo.DoorShape]
    cache: dict[tuple[float, str], _Reach] = field(default_factory=dict)
    bases: dict[tuple[str, str], tuple[float, float]] = field(default_factory=dict)


def _standing(ctx: _Ctx) -> list[tuple[str, _Placed]]:
    """Placed pieces that stand on the floor, leaving out rugs (:func:`geometry.lies_flat`)."""
    return [(pid, pc) for pid, pc in ctx.placed.items() if not geo.lies_flat(pc.spec)]


def _context(plan: Plan, rules: RuleSet) -> _Ctx:
    specs = {s.id: s for s in resolve_pieces(plan, rules)}
    placed = {
        pid: _Placed(specs[pid], pl, geo.footprint(specs[pid], pl)) for pid, pl in plan.layout
    }
    rooms = geo.room_polygons(plan)
    fixtures = {f.id: geo.fixture_polygon(f) for f in plan.fixtures}
    taken = unary_union([p.shape for p in placed.values() if not geo.lies_flat(p.spec)]
                        + list(fixtures.values()))
    free = {rid: poly.difference(taken) if not taken.is_empty else poly
            for rid, poly in rooms.items()}
    return _Ctx(plan, rules, placed, rooms, fixtures, free, geo.door_shapes(plan, rules))


# --------------------------------------------------------------------------- simple rules


def _check_rooms(ctx: _Ctx) -> list[Finding]:
    out: list[Finding] = []
    missing = [p.id for p in ctx.plan.furniture if p.placement is None]
    if missing:
        out.append(Finding("piece.room", False,
                           f"{len(missing)} piece(s) not placed: {', '.join(missing)}",
                           pieces=tuple(missing)))
    for pid, pc in ctx.placed.items():
        room = pc.placement.room
        allowed = pc.spec.rooms
        ok = room in allowed and room in ctx.rooms
        msg = (f"{pid} stands in {room}" if ok else
               f"{pid} stands in {room!r}, allowed: {', '.join(allowed)}")
        out.append(Finding("piece.room", ok, msg, pieces=(pid,), room=room,
                           where=_pt(pc.shape), outline=() if ok else _outline(pc.shape)))
        if room not in ctx.rooms:
            continue
        outside = pc.shape.difference(ctx.rooms[room])
        ok = outside.area <= TOUCH_MM2
        msg = (f"{pid} lies inside {room}" if ok else
               f"{pid} reaches {_cm2(outside.area)} beyond the walls of {room}")
        out.append(Finding("piece.inside", ok, msg, measured=round(outside.area, 1),
                           required=0.0, pieces=(pid,), room=room,
                           where=_pt(outside if not ok else pc.shape),
                           outline=_outline(outside) if not ok else ()))
    return out


def _check_overlap(ctx: _Ctx) -> list[Finding]:
    out: list[Finding] = []
    items = [(pid, pc.shape, pc.placement.room) for pid, pc in _standing(ctx)]
    fixtures = [(f.id, ctx.fixtures[f.id], f.room) for f in ctx.plan.fixtures]
    for i, (a, sa, room) in enumerate(items):
        for b, sb, _ in items[i + 1:] + fixtures:
            if not sa.intersects(sb):
                continue
            inter = sa.intersection(sb)
            if inter.area > TOUCH_MM2:
                out.append(Finding(
                    "piece.overlap", False,
                    f"{a} and {b} overlap by {_cm2(inter.area)}",
                    measured=round(inter.area, 1), required=0.0, pieces=(a, b), room=room,
                    where=_pt(inter), outline=_outline(inter)))
    if not out:
        out.append(Finding("piece.overlap", True,
                           f"no overlap among {len(items)} pieces and {len(fixtures)} fittings",
                           measured=0.0, required=0.0, pieces=tuple(ctx.placed)))
    return out


def _check_walls(ctx: _Ctx) -> list[Finding]:
    out: list[Finding] = []
    for pid, pc in ctx.placed.items():
        if not pc.spec.against_wall or pc.placement.room not in ctx.rooms:
            continue
        edge = back_edge(pc.shape.bounds, pc.placement.rotation)
        share = wall_share(edge, ctx.rooms[pc.placement.room].boundary)
        on = share * edge.length
        ok = share >= WALL_SHARE - 1e-9
        msg = (f"{pid} has {share:.0%} of its back against a wall"
               + ("" if ok else f" (needs {WALL_SHARE:.0%})"))
        out.append(Finding("wall.against", ok, msg, measured=round(on, 1),
                           required=round(WALL_SHARE * edge.length, 1), pieces=(pid,),
                           room=pc.placement.room, where=_pt(edge),
                           outline=() if ok else _outline(pc.shape)))
    return out


def _blockers(zone: BaseGeometry, shapes: Iterable[tuple[str, BaseGeometry]],
              skip: str = "") -> tuple[list[str], BaseGeometry]:
    ids: list[str] = []
    parts: list[BaseGeometry] = []
    for sid, s in shapes:
        if sid == skip or not zone.intersects(s):
            continue
        inter = zone.intersection(s)
        if inter.area > TOUCH_MM2:
            ids.append(sid)
            parts.append(inter)
    return ids, unary_union(parts) if parts else Polygon()


def _check_zones(ctx: _Ctx) -> list[Finding]:
    out: list[Finding] = []
    pieces = [(pid, pc.shape) for pid, pc in _standing(ctx)]
    solid = pieces + list(ctx.fixtures.items())
    for pid, pc in ctx.placed.items():
        room = ctx.rooms.get(pc.placement.room)
        for z, zp in geo.use_zones(pc.spec, pc.placement):
            source = _source(ctx.rules.get(z.rule)) if ctx.rules.has(z.rule) else ""
            ids, blocked = _blockers(zp, solid, skip=pid)
            through = zp.difference(room).area if room is not None else 0.0
            ok = not ids and through <= TOUCH_MM2
            what = f"{z.side} zone of {pid} ({z.depth} mm, {z.kind})"
            if ok:
                msg = f"the {what} is clear"
            elif ids:
                msg = f"the {what} is blocked by {', '.join(ids)}"
            else:
                msg = f"the {what} reaches through a wall ({_cm2(through)} outside)"
            out.append(Finding("zone.clear", ok, msg, measured=round(blocked.area + through, 1),
                               required=0.0, source=source, pieces=(pid, *ids),
                               room=pc.placement.room,
                               where=_pt(blocked if ids else zp), outline=_outline(zp)))
    for f in ctx.plan.fixtures:
        zp = geo.fixture_zone(f)
        if zp is None:
            continue
        ids, blocked = _blockers(zp, pieces)
        ok = not ids
        msg = (f"the zone of fitting {f.id} is clear" if ok else
               f"the zone of fitting {f.id} is blocked by {', '.join(ids)}")
        out.append(Finding("zone.clear", ok, msg, measured=round(blocked.area, 1),
                           required=0.0, pieces=(f.id, *ids), room=f.room,
                           where=_pt(blocked if ids else zp), outline=_outline(zp)))
    return out


def _check_doors(ctx: _Ctx) -> list[Finding]:
    out: list[Finding] = []
    need = ctx.rules.get("door.min_width")
    pieces = [(pid, pc.shape) for pid, pc in _standing(ctx)]
    for ds in ctx.doors:
        d = ds.door
        ok = d.width + 1e-9 >= need.exact_mm
        msg = (f"door {d.id} is {d.width} mm wide"
               + ("" if ok else f", narrower than {need.exact_mm:.0f} mm"))
        out.append(Finding("door.width", ok, msg, measured=float(d.width),
                           required=need.exact_mm, source=_source(need), pieces=(d.id,),
                           room=d.rooms[0], where=_pt(ds.opening)))
        floor = [g for g in [ds.swing, *ds.approach.values()] if g is not None]
        if not floor:
            continue
        clear = unary_union(floor)
        ids, blocked = _blockers(clear, pieces)
        ok = not ids
        msg = (f"the swing and approach of door {d.id} are clear" if ok else
               f"the swing or approach of door {d.id} is blocked by {', '.join(ids)}")
        src = _source(ctx.rules.get("door.approach_swing"))
        out.append(Finding("door.swing_clear", ok, msg, measured=round(blocked.area, 1),
                           required=0.0, source=src, pieces=(d.id, *ids), room=d.rooms[0],
                           where=_pt(blocked if ids else ds.opening),
                           outline=_outline(clear)))
        out += _leaf_through_wall(ctx, ds)
        out += _approach_through_wall(ctx, ds)
    return out


def _far_face(ctx: _Ctx, ds: geo.DoorShape, rid: str, shape: BaseGeometry) -> BaseGeometry:
    """``shape`` drawn from the host room's wall line, moved across a thick wall to the face
    of room ``rid`` (a no-op for the host room and for walls drawn at zero thickness)."""
    if rid == ds.door.rooms[0]:
        return shape
    t = ctx.rooms[rid].exterior.distance(Point(ds.door.at))
    n = ds.inward[rid]
    return translate(shape, n[0] * t, n[1] * t)


def _approach_through_wall(ctx: _Ctx, ds: geo.DoorShape) -> list[Finding]:
    """``door.approach``: fails when walls cut short the clear floor the rule set asks in
    front of a door (a door in a corner with no room beyond its latch: 2010 ADA Table
    404.2.4.1 asks 18 in there on the pull side)."""
    out: list[Finding] = []
    d = ds.door
    for rid, want in ds.asked.items():
        room = ctx.rooms.get(rid)
        if room is None:
            continue
        through = _far_face(ctx, ds, rid, want).difference(room)
        if ds.swing is not None and rid == d.swings_into:
            through = through.difference(_far_face(ctx, ds, rid, ds.swing))  # reported above
        if through.area <= TOUCH_MM2 * 100:
            continue
        rule = ctx.rules.get("door.approach_swing" if rid == d.swings_into
                             else "door.approach_other")
        out.append(Finding(
            "door.approach", False,
            f"walls cut {_cm2(through.area)} off the clear floor asked in front of door {d.id} "
            f"in {rid} ({rule.exact_mm:.0f} mm deep"
            + (f", {ctx.rules.get('door.approach_latch').exact_mm:.0f} mm beyond the latch"
               if rid == d.swings_into and ctx.rules.mm("door.approach_latch") else "")
            + ")", measured=round(through.area, 1), required=0.0, source=_source(rule),
            pieces=(d.id,), room=rid, where=_pt(through), outline=_outline(want)))
    if ds.asked and not out:
        out.append(Finding("door.approach", True,
                           f"the clear floor asked in front of door {d.id} fits between the walls",
                           measured=0.0, required=0.0, pieces=(d.id,), room=d.rooms[0],
                           where=_pt(ds.opening)))
    return out


def _leaf_through_wall(ctx: _Ctx, ds: geo.DoorShape) -> list[Finding]:
    """A failing ``door.swing_clear`` when the leaf's sweep runs through the walls of the room
    it opens into (a 900 mm leaf into a 600 mm deep cupboard): it cannot open fully. Across
    a thick wall the leaf is taken as hung at the far face, so the wall itself does not count."""
    d = ds.door
    room = ctx.rooms.get(d.swings_into or "")
    if ds.swing is None or room is None:
        return []
    swing = _far_face(ctx, ds, d.swings_into, ds.swing)
    through = swing.difference(room)
    if through.area <= TOUCH_MM2:
        return []
    return [Finding("door.swing_clear", False,
                    f"the leaf of door {d.id} cannot open fully: its swing runs "
                    f"{_cm2(through.area)} through the walls of {d.swings_into}",
                    measured=round(through.area, 1), required=0.0, pieces=(d.id,),
                    room=d.swings_into, where=_pt(through), outline=_outline(swing))]


def _check_windows(ctx: _Ctx) -> list[Finding]:
    out: list[Finding] = []
    rule = ctx.rules.get("window.band")
    for w in ctx.plan.windows:
        band = geo.window_band(ctx.plan, w, rule.mm)
        tall = [(pid, pc.shape) for pid, pc in ctx.placed.items()
                if pc.spec.height > w.sill or pc.spec.tall]
        ids, blocked = _blockers(band, tall)
        ok = not ids
        msg = (f"window {w.id} is clear of pieces taller than its {w.sill} mm sill" if ok else
               f"window {w.id} is blocked by {', '.join(ids)} (taller than its {w.sill} mm sill,"
               f" within {rule.mm} mm)")
        out.append(Finding("window.clear", ok, msg, measured=round(blocked.area, 1),
                           required=0.0, source=_source(rule), pieces=(w.id, *ids), room=w.room,
                           where=_pt(blocked if ids else band), outline=_outline(band)))
    return out


# --------------------------------------------------------------------------- turning space


@dataclass(frozen=True)
class TurningResult:
    """Outcome of the turning-space test in one free floor.

    ``fits``: a turning space of the asked shape fits; ``shape``: which one was found
    (``circle``, ``square``, ``t`` or ``""``); ``measured``: the largest circle diameter, or
    square side when ``measure`` is ``square``, found (mm); ``centre``: its centre; ``centres``: points where
    a person turning in the found space has its centre (for reachability), ``clearance``: how
    far those points are from any obstacle at least (mm).
    """

    fits: bool
    shape: str
    measured: float
    centre: tuple[float, float] | None
    centres: tuple[tuple[float, float], ...]
    clearance: float
    measure: str = "circle"


def _raster(free: BaseGeometry, cell: float) -> tuple[np.ndarray, float, float]:
    """Cells fully inside ``free``: a bool array [row (y), col (x)] and its origin.

    A cell counts as free only when all of it is free floor (conservative): its centre must
    lie in the floor shrunk by half a cell (exactly, for axis-parallel walls) or by half its
    diagonal (any other wall).
    """
    x0, y0, x1, y1 = free.bounds
    nx, ny = max(int(math.ceil((x1 - x0) / cell)), 1), max(int(math.ceil((y1 - y0) / cell)), 1)
    axis = all(
        abs(a[0] - b[0]) < 1e-6 or abs(a[1] - b[1]) < 1e-6
        for p in _polys(free) for ring in [p.exterior, *p.interiors]
        for a, b in zip(ring.coords[:-1], ring.coords[1:], strict=True)
    )
    inner = (free.buffer(-(cell / 2 - 1e-6), join_style="mitre") if axis
             else free.buffer(-cell / math.sqrt(2), quad_segs=_QUAD_SEGS))
    xs = x0 + (np.arange(nx) + 0.5) * cell
    ys = y0 + (np.arange(ny) + 0.5) * cell
    gx, gy = np.meshgrid(xs, ys)
    if inner.is_empty:
        return np.zeros((ny, nx), bool), x0, y0
    shapely.prepare(inner)
    return shapely.contains_xy(inner, gx, gy), x0, y0


def _rect_free(sat: np.ndarray, h: int, w: int) -> np.ndarray:
    """[i, j] True when the h x w cell block with lower-left cell (i, j) has no blocked cell.

    ``sat`` is the summed-area table of blocked cells padded with a zero row and column
    (F. C. Crow, "Summed-area tables for texture mapping", SIGGRAPH 1984).
    """
    ny, nx = sat.shape[0] - 1, sat.shape[1] - 1
    if h > ny or w > nx or h <= 0 or w <= 0:
        return np.zeros((0, 0), bool)
    s = sat[h:, w:] - sat[:-h, w:] - sat[h:, :-w] + sat[:-h, :-w]
    return s == 0


def _sat(grid: np.ndarray) -> np.ndarray:
    blocked = (~grid).astype(np.int64)
    sat = np.zeros((grid.shape[0] + 1, grid.shape[1] + 1), np.int64)
    sat[1:, 1:] = blocked.cumsum(0).cumsum(1)
    return sat


def _cells(mm: float, cell: float) -> int:
    """Whole cells covering ``mm`` (less the 1 mm touch tolerance)."""
    return max(int(math.ceil((mm - TOUCH_MM) / cell - 1e-9)), 1)


def _t_rects(size: float, cell: float) -> tuple[int, int, list[tuple[int, int, int, int]]]:
    """The T-shaped turning space of 2010 ADA §304.3.2 as cell rectangles (x, y, w, h).

    Stem down: a bar across the full width, 0.6 D deep (36 in of 60 in), and a stem 0.6 D
    wide and 0.4 D long (24 in) under its middle, leaving arms 0.2 D (12 in) each side;
    sizes scale with ``size`` and are rounded up to whole cells.
    """
    arm, a, stem = _cells(0.2 * size, cell), _cells(0.6 * size, cell), _cells(0.4 * size, cell)
    bar = a
    w, h = 2 * arm + a, stem + bar
    return w, h, [(0, stem, w, bar), (arm, 0, a, stem)]


def _rot_rects(w: int, h: int, rects: list[tuple[int, int, int, int]]
               ) -> tuple[int, int, list[tuple[int, int, int, int]]]:
    """Turn cell rectangles inside a w x h box by 90 degrees counter-clockwise."""
    return h, w, [(h - y - rh, x, rh, rw) for x, y, rw, rh in rects]


def _fits(sat: np.ndarray, w: int, h: int, rects: list[tuple[int, int, int, int]]) -> np.ndarray:
    """[i, j] True when the shape made of ``rects`` (in a w x h box) fits at cell (i, j)."""
    ny, nx = sat.shape[0] - 1, sat.shape[1] - 1
    if w > nx or h > ny:
        return np.zeros((0, 0), bool)
    ok = np.ones((ny - h + 1, nx - w + 1), bool)
    for x, y, rw, rh in rects:
        f = _rect_free(sat, rh, rw)
        ok &= f[y:y + ny - h + 1, x:x + nx - w + 1]
    return ok


def _sample(points: list[tuple[float, float]], limit: int = 400) -> tuple[tuple[float, float], ...]:
    if len(points) <= limit:
        return tuple(points)
    step = len(points) / limit
    return tuple(points[int(k * step)] for k in range(limit))


def turning_space(free: BaseGeometry, size: float, shape: str,
                  cell: float = RASTER_CELL) -> TurningResult:
    """Does a turning space of ``size`` (mm) and ``shape`` fit in the free floor ``free``?

    ``circle``: the largest inscribed circle (shapely's ``maximum_inscribed_circle``, to
    0.1 mm) must reach ``size - 1`` mm; door swings and use zones are part of ``free`` (2010
    ADA §304.4, §603.2.2). ``square``: an axis-parallel ``size`` square; ``circle-or-t``: the
    circle, or else the T-shaped space of 2010 ADA §304.3.2 in any of four orientations. The
    square and the T are tested on a raster of ``cell`` mm (10 mm) where a cell partly
    blocked counts as blocked, which is conservative: a space that fits only off the grid
    by less than a cell may be missed.

    >>> from shapely import box
    >>> turning_space(box(0, 0, 1500, 1500), 1500, "circle").fits
    True
    >>> turning_space(box(0, 0, 1490, 1500), 1500, "circle").fits
    False
    """
    polys = _polys(free)
    if not polys:
        return TurningResult(False, "", 0.0, None, (), 0.0)
    floor = unary_union(polys)
    mic = shapely.maximum_inscribed_circle(floor, TOUCH_MM)
    (cx, cy), (bx, by) = mic.coords[0], mic.coords[1]
    diam = round(2 * math.hypot(bx - cx, by - cy), 1)  # within 2 mm below the true one
    centre = (round(cx, 1), round(cy, 1))
    if shape in ("circle", "circle-or-t"):
        # exact test: the floor shrunk by the radius (less 1 mm) keeps some centres
        region = floor.buffer(-(size / 2 - TOUCH_MM), quad_segs=_QUAD_SEGS)
        pts = [p for g in _polys(region) for p in g.exterior.coords[:-1]]
        pts += [p for g in getattr(region, "geoms", [region]) if not g.is_empty
                for p in [g.representative_point().coords[0]]]
        if pts:
            return TurningResult(True, "circle", max(diam, size), centre, _sample(pts),
                                 size / 2 - TOUCH_MM)
        diam = min(diam, size - TOUCH_MM)
    bx0, by0, bx1, by1 = floor.bounds
    if (shape == "circle" or diam + 2 * TOUCH_MM < (size if shape == "square" else 0.6 * size)
            or min(bx1 - bx0, by1 - by0) < size - TOUCH_MM):
        # a square of side D holds a circle of diameter D, the T's bar one of 0.6 D, and both
        # need a floor at least D across each way
        return TurningResult(False, "", diam, centre, (), 0.0)
    if shape == "square" and diam >= size * math.sqrt(2):
        region = floor.buffer(-size * math.sqrt(2) / 2, quad_segs=_QUAD_SEGS)
        pts = [g.representative_point().coords[0] for g in getattr(region, "geoms", [region])
               if not g.is_empty] or [centre]
        return TurningResult(True, "square", round(diam / math.sqrt(2), 1), pts[0], tuple(pts),
                             size / 2, "square")
    # a cell that divides the size and its fifths exactly, so a room exactly as large as
    # the space holds it: D / (5 m) with m the least whole number giving cells <= ``cell``
    cell = size / (5 * math.ceil(size / (5 * cell)))
    grid, x0, y0 = _raster(floor, cell)
    sat = _sat(grid)
    if shape == "square":
        k = _cells(size, cell)
        ok = _fits(sat, k, k, [(0, 0, k, k)])
        lo, hi = 0, min(grid.shape)
        while lo < hi:  # the largest block that fits, for the report
            mid = (lo + hi + 1) // 2
            if _fits(sat, mid, mid, [(0, 0, mid, mid)]).any():
                lo = mid
            else:
                hi = mid - 1
        best = round(lo * cell, 1)
        pts = _centres(ok, x0, y0, cell, k / 2, k / 2)
        if pts:
            return TurningResult(True, "square", best, pts[0], pts, k * cell / 2, "square")
        return TurningResult(False, "", best, centre, (), 0.0, "square")
    w, h, rects = _t_rects(size, cell)
    pts: tuple[tuple[float, float], ...] = ()
    for turn in range(4):
        # the body turns at the middle of the bar: the bar's centre
        bx0, by0, bw, bh = rects[0]
        pts += _centres(_fits(sat, w, h, rects), x0, y0, cell, bx0 + bw / 2, by0 + bh / 2)
        if turn < 3:
            w, h, rects = _rot_rects(w, h, rects)
    if pts:
        return TurningResult(True, "t", round(diam, 1), pts[0], _sample(list(pts)), 0.3 * size)
    return TurningResult(False, "", round(diam, 1), centre, (), 0.0)


def _centres(ok: np.ndarray, x0: float, y0: float, cell: float, dx: float, dy: float,
             limit: int = 200) -> tuple[tuple[float, float], ...]:
    """Up to ``limit`` points (dx, dy) cells from the positions where ``ok`` holds."""
    if not ok.size or not ok.any():
        return ()
    ii, jj = np.nonzero(ok)
    pick = np.linspace(0, len(ii) - 1, min(limit, len(ii))).astype(int)
    return tuple((round(float(x0 + (jj[n] + dx) * cell), 1),
                  round(float(y0 + (ii[n] + dy) * cell), 1)) for n in pick)


def _check_turning(ctx: _Ctx) -> tuple[list[Finding], list[_Target]]:
    size_rule = ctx.rules.get("turning.size")
    size = size_rule.exact_mm
    if size <= 0:
        return [], []
    shape = ctx.rules.text("turning.shape")
    out: list[Finding] = []
    targets: list[_Target] = []
    for room in ctx.plan.rooms:
        res = turning_space(ctx.free[room.id], size, shape)
        what = {"circle": "circle", "square": "square", "t": "T-shaped space"}.get(res.shape, "")
        if res.fits:
            msg = (f"a {_fmt(size)} turning {what} fits in {room.id}"
                   f" (largest {res.measure} {_fmt(res.measured)})")
            targets.append(_Target(f"the turning space in {room.id}", room.id,
                                   MultiPoint(list(res.centres)), res.clearance, ()))
        else:
            kind = {"circle": "circle", "square": "square",
                    "circle-or-t": "circle nor T-shaped space"}[shape]
            msg = (f"no {_fmt(size)} turning {kind} fits in {room.id}; "
                   + (f"the largest circle that fits is {_fmt(res.measured)} across, too small "
                      "to hold the square" if shape == "square" and res.measure == "circle" else
                      f"the largest {res.measure} is {_fmt(res.measured)}"))
        outline: tuple[tuple[float, float], ...] = ()
        if res.centre is not None and res.shape in ("circle", ""):
            r = (size if res.fits else res.measured) / 2
            outline = _outline(Point(res.centre).buffer(max(r, 1.0), quad_segs=8))
        out.append(Finding("turning.space", res.fits, msg, measured=res.measured,
                           required=size, source=_source(size_rule), room=room.id,
                           where=res.centre, outline=outline))
    return out, targets


# --------------------------------------------------------------------------- reachability


@dataclass
class _Reach:
    """The shrunk floor at one route width, split into connected parts joined by doors."""

    width: float
    comps: list[tuple[str, Polygon]]
    root: list[int]
    start: set[int]           # roots reached from the entrance
    mouths: dict[tuple[str, str], tuple[Point, list[int]]]  # (door, room) -> point, parts near

    def tol(self, depth: float) -> float:
        return max(0.0, self.width / 2 - depth) + TOUCH_MM

    def near(self, room: str, g: BaseGeometry, depth: float) -> list[int]:
        t = self.tol(depth)
        return [i for i, (rid, p) in enumerate(self.comps) if rid == room and p.distance(g) <= t]

    def reached(self, target: _Target) -> bool:
        return any(self.root[i] in self.start for i in self.near(target.room, target.geom,
                                                                 target.depth))


def _erosion(width: float) -> float:
    """How far the floor is shrunk for a route ``width`` wide: half of it, less the slack."""
    return max(width - WIDTH_TOL, 0.0) / 2


def _find(parent: list[int], i: int) -> int:
    while parent[i] != i:
        parent[i] = parent[parent[i]]
        i = parent[i]
    return i


def _mouth(ctx: _Ctx, ds: geo.DoorShape, room: str, r: float) -> Point:
    """The point half a route width in front of the door's centre, in ``room``.

    The door's centre lies on the wall of ``door.rooms[0]``; on the other side it is taken
    at the nearest point of that room's outline, so walls drawn with a thickness work too.
    """
    n = ds.inward[room]
    key = (ds.door.id, room)
    if key not in ctx.bases:
        ring = ctx.rooms[room].exterior
        p = ring.interpolate(ring.project(Point(ds.door.at)))
        ctx.bases[key] = (p.x, p.y)
    bx, by = ctx.bases[key]
    return Point(bx + n[0] * r, by + n[1] * r)


def _reach(ctx: _Ctx, width: float, floors: dict[str, BaseGeometry] | None = None,
           key: str = "") -> _Reach:
    """Connected parts of the floor shrunk by ``width / 2`` and which the entrance reaches.

    A door side counts as reached by a part that comes within ``max(0, r - w/2) + 1`` mm of
    the door's mouth point (r half the route width, w the door's width): a piece may come up
    to the door jamb but not into the opening. ``floors`` replaces the shrunk floors (the
    pinch test passes its own).
    """
    ck = (round(width, 3), key)
    if ck in ctx.cache:
        return ctx.cache[ck]
    r = width / 2
    comps: list[tuple[str, Polygon]] = []
    for rid, free in ctx.free.items():
        if floors is not None:
            shrunk = floors[rid]
        else:
            e = _erosion(width)
            shrunk = free.buffer(-e, quad_segs=_QUAD_SEGS) if e > 0 else free
        comps += [(rid, p) for p in _polys(shrunk)]
    parent = list(range(len(comps)))
    state = _Reach(width, comps, parent, set(), {})
    start: list[int] = []
    for ds in ctx.doors:
        sides = [rid for rid in ds.door.rooms if rid != OUTSIDE and rid in ctx.rooms]
        near: list[int] = []
        for rid in sides:
            p = _mouth(ctx, ds, rid, r)
            idx = state.near(rid, p, ds.door.width / 2)
            state.mouths[(ds.door.id, rid)] = (p, idx)
            near += idx
        if ds.door.is_entrance:
            start += near
        for i in near[1:]:
            a, b = _find(parent, near[0]), _find(parent, i)
            parent[a] = b
    state.root = [_find(parent, i) for i in range(len(comps))]
    state.start = {state.root[i] for i in start}
    ctx.cache[ck] = state
    return state


def _targets(ctx: _Ctx) -> list[_Target]:
    out: list[_Target] = []
    for ds in ctx.doors:
        for rid in ds.door.rooms:
            if rid == OUTSIDE or rid not in ctx.rooms:
                continue
            out.append(_Target(f"the {rid} side of door {ds.door.id}", rid, Point(ds.door.at),
                               ds.door.width / 2, (ds.door.id,), ds.door.id))
    for pid, pc in ctx.placed.items():
        room = ctx.rooms.get(pc.placement.room)
        if room is None:
            continue
        for z, zp in geo.use_zones(pc.spec, pc.placement):
            g = zp.intersection(room)
            out.append(_Target(f"the {z.side} zone of {pid}", pc.placement.room,
                               g if not g.is_empty else zp, z.depth, (pid,)))
    for f in ctx.plan.fixtures:
        zp = geo.fixture_zone(f)
        if zp is None or f.room not in ctx.rooms:
            continue
        rect = zp.minimum_rotated_rectangle
        xs = list(rect.exterior.coords)
        sides = [math.dist(xs[0], xs[1]), math.dist(xs[1], xs[2])]
        out.append(_Target(f"the zone of fitting {f.id}", f.room, zp, min(sides), (f.id,)))
    return out


def _target_reached(ctx: _Ctx, t: _Target, width: float) -> bool:
    """Is ``t`` reached from the entrance at ``width``?"""
    return _reached_in(_reach(ctx, width), t)


def _reached_in(st: _Reach, t: _Target) -> bool:
    if t.door is not None:
        _, idx = st.mouths.get((t.door, t.room), (None, []))
        return any(st.root[i] in st.start for i in idx)
    return st.reached(t)


def _widest(pred, lo: float, hi: float) -> tuple[float, float]:
    """Bisection: ``pred(lo)`` holds and ``pred(hi)`` fails; the last width that holds and the
    first that fails, ``WIDTH_STEP`` apart at most."""
    while hi - lo > WIDTH_STEP:
        mid = (lo + hi) / 2
        if pred(mid):
            lo = mid
        else:
            hi = mid
    return lo, hi


def _bottleneck(ctx: _Ctx, t: _Target, width: float) -> tuple[tuple[float, float], tuple[str, ...]]:
    """Where the route to ``t`` breaks at ``width``, and the pieces and fittings next to it.

    The nearest points between the part the entrance reaches and the part around the target
    (in one room, or across a door whose mouth one of them misses); the midpoint is the
    bottleneck.
    """
    st = _reach(ctx, width)
    if t.door is not None:
        p, idx = st.mouths[(t.door, t.room)]
        t_idx = idx
        t_geom = p
    else:
        t_idx = st.near(t.room, t.geom, t.depth)
        t_geom = t.geom
    t_roots = {st.root[i] for i in t_idx}
    start_by: dict[str, list[BaseGeometry]] = {}
    for i, (rid, p) in enumerate(st.comps):
        if st.root[i] in st.start:
            start_by.setdefault(rid, []).append(p)
    if not start_by:
        for ds in ctx.doors:
            if ds.door.is_entrance:
                for rid in ds.door.rooms:
                    if rid in ctx.rooms:
                        start_by.setdefault(rid, []).append(_mouth(ctx, ds, rid, width / 2))
    targ_by: dict[str, list[BaseGeometry]] = {}
    for i, (rid, p) in enumerate(st.comps):
        if st.root[i] in t_roots and st.root[i] not in st.start:
            targ_by.setdefault(rid, []).append(p)
    if not targ_by:
        targ_by[t.room] = [t_geom]
    pairs: list[tuple[BaseGeometry, BaseGeometry]] = []
    for rid in start_by.keys() & targ_by.keys():
        pairs.append((unary_union(start_by[rid]), unary_union(targ_by[rid])))
    for ds in ctx.doors:
        a, b = ds.door.rooms
        for ra, rb in ((a, b), (b, a)):
            if ra not in start_by or rb not in targ_by or rb in start_by:
                continue
            _, near_a = st.mouths.get((ds.door.id, ra), (None, []))
            _, near_b = st.mouths.get((ds.door.id, rb), (None, []))
            if any(st.root[i] in st.start for i in near_a):  # blocked on the target's side
                pairs.append((_mouth(ctx, ds, rb, width / 2), unary_union(targ_by[rb])))
            elif any(st.root[i] in t_roots for i in near_b):  # blocked on the entrance's side
                pairs.append((unary_union(start_by[ra]), _mouth(ctx, ds, ra, width / 2)))
    if not pairs:
        pairs.append((unary_union([g for v in start_by.values() for g in v]),
                      unary_union([g for v in targ_by.values() for g in v])))
    best = min(pairs, key=lambda ab: ab[0].distance(ab[1]))
    pa, pb = nearest_points(best[0], best[1])
    where = Point((pa.x + pb.x) / 2, (pa.y + pb.y) / 2)
    route = ctx.rules.get("route.width").exact_mm
    ids = [pid for pid, pc in _standing(ctx) if pc.shape.distance(where) <= route]
    ids += [fid for fid, g in ctx.fixtures.items() if g.distance(where) <= route]
    return (round(where.x, 1), round(where.y, 1)), tuple(ids)


def _pinch_floors(ctx: _Ctx, width: float, pinch: float, length: float
                  ) -> tuple[dict[str, BaseGeometry], float]:
    """Shrunk floors at the pinch width with narrow stretches longer than ``length`` removed.

    A narrow stretch is a connected part of the floor shrunk by half the pinch width that
    the floor shrunk by half the route width, grown back by the difference, does not cover.
    Its length is the shorter side of the smallest rectangle around the floor it leaves
    unswept at the full width; that is the stretch's length whenever the stretch is longer
    across than along (and when it is not, both sides exceed a pinch length no longer than
    the pinch width). Returns the floors and the longest stretch kept.
    """
    R, p = _erosion(width), _erosion(pinch)
    floors: dict[str, BaseGeometry] = {}
    longest = 0.0
    for rid, free in ctx.free.items():
        floor, drop, kept = _pinch_room(free, R, p, length, _QUAD_SEGS)
        if any(abs(ln - length) < 25.0 for ln in drop + kept):  # close call: finer arcs
            floor, drop, kept = _pinch_room(free, R, p, length, _PINCH_SEGS)
        floors[rid] = floor
        longest = max([longest, *kept])
    return floors, longest


def _pinch_room(free: BaseGeometry, R: float, p: float, length: float, segs: int
                ) -> tuple[BaseGeometry, list[float], list[float]]:
    """One room's floor shrunk by ``p`` less its narrow stretches longer than ``length``, and
    the lengths of the stretches dropped and kept."""
    narrow_ok = free.buffer(-p, quad_segs=segs)
    wide = free.buffer(-R, quad_segs=segs)
    swept = wide.buffer(R, quad_segs=segs)
    grown = wide.buffer(R - p, quad_segs=segs)
    drop: list[BaseGeometry] = []
    dropped: list[float] = []
    kept: list[float] = []
    for n in _polys(narrow_ok.difference(grown)):
        unswept = n.buffer(p, quad_segs=segs).intersection(free).difference(swept)
        if unswept.is_empty or unswept.area <= TOUCH_MM2:
            continue
        xs = list(unswept.minimum_rotated_rectangle.exterior.coords)
        ln = min(math.dist(xs[0], xs[1]), math.dist(xs[1], xs[2]))
        if ln > length + TOUCH_MM:
            drop.append(n)
            dropped.append(ln)
        else:
            kept.append(ln)
    # grown a hair so that no zero-width sliver along a removed stretch's edge joins the two
    # sides again
    floor = narrow_ok.difference(unary_union(drop).buffer(WIDTH_TOL / 10)) if drop else narrow_ok
    return floor, dropped, kept


def _check_routes(ctx: _Ctx, extra: list[_Target], widths: bool = True) -> list[Finding]:
    rw = ctx.rules.get("route.width")
    width = rw.exact_mm
    pinch = ctx.rules.get("route.pinch_width").exact_mm
    plength = ctx.rules.get("route.pinch_length").exact_mm
    if not any(ds.door.is_entrance for ds in ctx.doors):
        return [Finding("route.reach", False, "the plan has no entrance door to start from",
                        required=width, source=_source(rw))]
    targets = _targets(ctx) + extra
    doored = {rid for ds in ctx.doors for rid in ds.door.rooms}
    out: list[Finding] = [  # a room without a door has nothing to aim at, yet cannot be entered
        Finding("route.reach", False, f"room {room.id} has no door: it cannot be reached from "
                "the entrance", measured=0.0, required=width, source=_source(rw), room=room.id,
                where=_pt(ctx.rooms[room.id]), outline=_outline(ctx.rooms[room.id]))
        for room in ctx.plan.rooms if room.id not in doored]
    pinch_state: _Reach | None = None
    pinch_long = 0.0
    per_room: dict[str, list[tuple[float, tuple[float, float] | None, tuple[str, ...], bool]]] = {}
    for t in targets:
        ok = _target_reached(ctx, t, width)
        note = ""
        if not ok and plength > 0 and pinch < width and _target_reached(ctx, t, pinch):
            if pinch_state is None:
                floors, pinch_long = _pinch_floors(ctx, width, pinch, plength)
                pinch_state = _reach(ctx, pinch, floors, key="pinch")
            if _reached_in(pinch_state, t):
                ok = True
                note = (f" only through narrow stretches of at least {_fmt(pinch)}, the longest"
                        f" {_fmt(pinch_long)} (up to {_fmt(plength)} allowed)")
            else:
                note = (f"; at {_fmt(pinch)} it needs a narrow stretch longer than"
                        f" {_fmt(plength)}")
        if ok and not note:
            out.append(Finding("route.reach", True,
                               f"{t.label} is reachable from the entrance at {_fmt(width)}",
                               measured=width, required=width, source=_source(rw),
                               pieces=t.ids, room=t.room))
            per_room.setdefault(t.room, []).append((math.inf, None, t.ids, True))
            continue
        if ok:
            best, fail = _widest(lambda w, t=t: _target_reached(ctx, t, w), pinch, width)
            where, ids = _bottleneck(ctx, t, fail)
            out.append(Finding("route.reach", True,
                               f"{t.label} is reachable{note}; the widest route to it is "
                               f"{_fmt(best)}, narrowest near ({where[0]:.0f}, {where[1]:.0f})",
                               measured=round(best, 1), required=width, source=_source(rw),
                               pieces=t.ids, room=t.room, where=where))
            per_room.setdefault(t.room, []).append((best, where, ids, True))
            continue
        if _target_reached(ctx, t, 0.0):
            best, fail = _widest(lambda w, t=t: _target_reached(ctx, t, w), 0.0, width)
        else:
            best, fail = 0.0, 0.0
        where, ids = _bottleneck(ctx, t, fail)
        msg = (f"{t.label} is not reachable from the entrance at {_fmt(width)}; "
               + (f"the widest route to it is {_fmt(best)}, narrowest near "
                  f"({where[0]:.0f}, {where[1]:.0f})" if best > 0 else
                  "it is cut off at any width") + note)
        if ids:
            msg += f", next to {', '.join(ids)}"
        out.append(Finding("route.reach", False, msg, measured=round(best, 1), required=width,
                           source=_source(rw), pieces=ids, room=t.room, where=where,
                           outline=_outline(t.geom) if not isinstance(t.geom, (Point, MultiPoint))
                           else ()))
        per_room.setdefault(t.room, []).append((best, where, ids, False))
    out += _route_widths(ctx, targets, per_room, width, _source(rw), 2 * width if widths else width)
    return out


def _route_widths(ctx: _Ctx, targets: list[_Target], per_room: dict, width: float,
                  source: str, cap: float) -> list[Finding]:
    """One ``route.width`` finding per room: the narrowest passage on the way to everything
    in it, searched up to ``cap`` (a room fine at ``cap`` is reported as "at least")."""
    out: list[Finding] = []
    for room in ctx.plan.rooms:
        rows = per_room.get(room.id, [])
        if not rows:
            continue
        mine = [t for t in targets if t.room == room.id]
        if all(r[0] == math.inf for r in rows):
            def pred(w: float, mine: list[_Target] = mine) -> bool:
                return all(_target_reached(ctx, t, w) for t in mine)
            if pred(cap):
                out.append(Finding("route.width", True,
                                   f"the way to everything in {room.id} is at least "
                                   f"{_fmt(cap)} wide", measured=cap, required=width,
                                   source=source, room=room.id))
                continue
            best, fail = _widest(pred, width, cap)
            t = next(t for t in mine if not _target_reached(ctx, t, fail))
            where, ids = _bottleneck(ctx, t, fail)
            ok = True
        else:
            best, where, ids, _ = min(rows, key=lambda r: r[0])
            ok = all(r[3] for r in rows)
        msg = (f"the narrowest passage on the way to {room.id} is {_fmt(best)}"
               + (f" near ({where[0]:.0f}, {where[1]:.0f})" if where else "")
               + (f", next to {', '.join(ids)}" if ids else "")
               + ("" if ok else f", under the {_fmt(width)} asked"))
        out.append(Finding("route.width", ok, msg, measured=round(best, 1), required=width,
                           source=source, pieces=ids, room=room.id, where=where))
    return out


# --------------------------------------------------------------------------- entry points


def audit(plan: Plan, rules: RuleSet, *, widths: bool = True) -> Audit:
    """Audit the placed pieces of ``plan`` under ``rules`` with exact geometry.

    Pieces without a placement are reported in one failing ``piece.room`` finding; every
    other rule is checked on the pieces that are placed. ``widths=False`` skips measuring
    how much wider than the route the way into each passing room is (its ``route.width``
    finding then says "at least" the route width); every verdict, and every failure's
    widest route and bottleneck, stay the same, in a fraction of the time.
    """
    ctx = _context(plan, rules)
    findings: list[Finding] = []
    findings += _check_rooms(ctx)
    findings += _check_overlap(ctx)
    findings += _check_walls(ctx)
    findings += _check_zones(ctx)
    findings += _check_doors(ctx)
    findings += _check_windows(ctx)
    turning, spaces = _check_turning(ctx)
    findings += _check_routes(ctx, spaces, widths)
    findings += turning
    order = {r: i for i, r in enumerate(RULE_IDS)}
    findings.sort(key=lambda f: order.get(f.rule, len(order)))
    return Audit(tuple(findings))


#: Rules whose ``measured`` and ``required`` are areas (mm2) rather than lengths.
AREA_RULES = ("piece.inside", "piece.overlap", "zone.clear", "door.swing_clear", "door.approach",
              "window.clear")


def audit_record(result: Audit) -> dict[str, object]:
    """The audit as plain data for ``--json``: ``passed``, counts and every finding."""
    return {
        "passed": result.passed,
        "checked": len(result.findings),
        "failed": len(result.failures),
        "findings": [
            {"rule": f.rule, "ok": f.ok, "message": f.message, "measured": f.measured,
             "required": f.required, "unit": "mm2" if f.rule in AREA_RULES else "mm",
             "source": f.source, "pieces": list(f.pieces), "room": f.room,
             "where": list(f.where) if f.where else None,
             "outline": [list(p) for p in f.outline]}
            for f in result.findings
        ],
    }


#: Rules whose passing findings the summary lists too (they carry the key measures).
_ALWAYS_SHOWN = ("route.width", "turning.space")


def _amount(f: Finding, value: float, inches: bool) -> str:
    if f.rule in AREA_RULES:
        return _cm2(value) if value >= 100 else f"{value:.0f} mm2"
    text = f"{value:.0f} mm"
    return text + f" ({value / 25.4:.1f} in)" if inches else text


def summary_text(result: Audit, rules: RuleSet) -> str:
    """A readable summary: per rule pass or fail, then each failure with measured against
    required (in inches too for sets stated in inches), where, which pieces and the source."""
    inches = rules.get("route.width").unit == "in"
    lines = [f"rule set: {rules.id} ({rules.label})"
             + (f", {len(rules.overridden)} values overridden by the plan" if rules.overridden
                else "")]
    for rule in RULE_IDS + tuple(sorted({f.rule for f in result.findings} - set(RULE_IDS))):
        mine = result.by_rule(rule)
        if not mine:
            continue
        bad = [f for f in mine if not f.ok]
        head = "FAIL" if bad else "pass"
        lines.append(f"{head}  {rule:<17} {len(mine) - len(bad)} of {len(mine)} pass")
        if rule in _ALWAYS_SHOWN:  # the narrowest passages and turning spaces, even when fine
            lines += [f"      ok: {f.message}" for f in mine if f.ok]
        for f in bad:
            lines.append(f"      - {f.message}")
            facts = []
            if f.measured is not None and f.required is not None:
                facts.append(f"measured {_amount(f, f.measured, inches)}, required "
                             + ("none" if f.rule in AREA_RULES and f.required == 0 else
                                _amount(f, f.required, inches)))
            if f.where is not None:
                facts.append(f"at ({f.where[0]:.0f}, {f.where[1]:.0f})")
            if f.room:
                facts.append(f"room {f.room}")
            if f.pieces:
                facts.append("involves " + ", ".join(f.pieces))
            if facts:
                lines.append("        " + "; ".join(facts))
            if f.source:
                lines.append(f"        source: {f.source}")
    n, k = len(result.findings), len(result.failures)
    lines.append(f"result: all {n} checks pass" if not k else f"result: {k} of {n} checks fail")
    return "\n".join(lines)


def marks_for(result: Audit) -> list:
    """Marks for a drawing: one ``fail`` mark per failed finding (``marks.Mark``)."""

    return [Mark("fail", f"{f.rule}: {f.message}", f.where, f.outline) for f in result.failures]
