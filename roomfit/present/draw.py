"""SVG drawings of a plan to scale: rooms, walls, openings, fittings, furniture, marks, routes.

The drawing's user units are millimetres (``viewBox`` in mm, 1 unit = 1 mm) with the plan's y
axis flipped so that north is up on screen. ``width``/``height`` attributes give the size in
pixels; text and line weights are set in pixels and converted, so labels read the same for a
studio and a large flat. The visual language (colours, line styles, symbols) is explained in
``docs/drawing.md``.

The output is a standalone SVG document without an XML declaration, so it can be written to a
file or embedded in an HTML page as it is.

>>> from roomfit.plan.data import Plan, Room
>>> from roomfit.rules.sets import load_ruleset
>>> plan = Plan("Box", (Room("r", "Room", "living", ((0, 0), (3000, 0), (3000, 2000), (0, 2000))),))
>>> svg = draw_svg(plan, load_ruleset("everyday"))
>>> svg.startswith("<svg") and "6.00 m²" in svg
True
"""

from __future__ import annotations

import math
import textwrap
from collections.abc import Sequence
from xml.sax.saxutils import escape, quoteattr

from shapely import LineString, Point, Polygon, box
from shapely.geometry.base import BaseGeometry
from shapely.ops import polylabel, unary_union

from roomfit.audit.geometry import (
    door_leaf,
    door_shape,
    fixture_polygon,
    fixture_zone,
    footprint_box,
    lies_flat,
    room_polygon,
    side_direction,
    use_zones,
    window_segment,
)
from roomfit.audit.marks import Mark, Path
from roomfit.caution import CAUTION
from roomfit.plan.data import Leaf, Plan
from roomfit.plan.openings import MAX_WALL_THICKNESS
from roomfit.rules.catalog import resolve_pieces
from roomfit.rules.sets import RuleSet

__all__ = ["STYLE", "SCALE_BAR_MM", "EXTERIOR_WALL", "draw_svg"]

#: Length of the scale bar (mm).
SCALE_BAR_MM = 1000

#: Thickness (mm) drawn for outer walls; plans give rooms, not walls, so this is a drawing
#: convention. Gaps between rooms up to twice this are drawn as solid wall.
EXTERIOR_WALL = 250

#: Our colours and line weights (weights in pixels of the output). See docs/drawing.md.
STYLE: dict[str, str] = {
    "paper": "#fbfaf6",
    "ink": "#2a2c31",
    "wall": "#3b3e46",
    "floor": "#f4f2ec",
    "floor.bath": "#e3eef1",
    "floor.kitchen": "#f3eddc",
    "floor.bedroom": "#eeedf5",
    "floor.hall": "#efefec",
    "fitting": "#4d7580",
    "zone.fitting": "#6d9aa5",
    "piece": "#ead8ba",
    "piece.edge": "#86663a",
    "zone.piece": "#a98650",
    "door": "#2a2c31",
    "window": "#5a8fb8",
    "fail": "#cf3a2c",
    "note": "#c98700",
    "path": "#2b63a6",
    "path.night": "#5a3f9c",
    "faint": "#77787c",
}

_FONT = "DejaVu Sans, Helvetica, Arial, sans-serif"
_MARGIN_MM = 500


def _num(v: float) -> str:
    """Compact number for SVG attributes: 0.1 mm precision."""
    s = f"{v:.1f}"
    s = s.rstrip("0").rstrip(".") if "." in s else s
    return "0" if s in ("-0", "") else s


class _Canvas:
    """Maps plan coordinates (mm, y up) to SVG user units (mm, y down) and collects elements."""

    def __init__(self, minx: float, maxy: float, upp: float) -> None:
        self.minx, self.maxy, self.upp = minx, maxy, upp
        self.parts: list[str] = []

    def px(self, pixels: float) -> float:
        """A length given in output pixels, in user units."""
        return pixels * self.upp

    def pt(self, x: float, y: float) -> tuple[float, float]:
        return x - self.minx, self.maxy - y

    def pts(self, coords: Sequence[Sequence[float]]) -> str:
        return " ".join(f"{_num(a)},{_num(b)}" for a, b in (self.pt(c[0], c[1]) for c in coords))

    def add(self, text: str) -> None:
        self.parts.append(text)

    def path_d(self, geom: BaseGeometry) -> str:
        """SVG path data for a (multi)polygon, holes included (use fill-rule evenodd)."""
        polys = [geom] if isinstance(geom, Polygon) else [
            g for g in getattr(geom, "geoms", []) if isinstance(g, Polygon)]
        d = []
        for p in polys:
            if p.is_empty:
                continue
            for ring in (p.exterior, *p.interiors):
                d.append("M" + self.pts(list(ring.coords)[:-1]) + "Z")
        return " ".join(d)

    def text(self, x: float, y: float, s: str, size_px: float, *, anchor: str = "middle",
             weight: str = "normal", fill: str = STYLE["ink"], halo: bool = False,
             rotate: bool = False, plan: bool = True, cls: str = "") -> str:
        """A text element; (x, y) in plan coordinates when ``plan`` else in user units."""
        sx, sy = self.pt(x, y) if plan else (x, y)
        size = self.px(size_px)
        attrs = [f'x="{_num(sx)}"', f'y="{_num(sy + size * 0.35)}"', f'font-size="{_num(size)}"',
                 f'text-anchor="{anchor}"', f'fill="{fill}"']
        if weight != "normal":
            attrs.append(f'font-weight="{weight}"')
        if halo:
            attrs.append(f'stroke="{STYLE["paper"]}" stroke-width="{_num(self.px(3))}" '
                         'stroke-linejoin="round" paint-order="stroke"')
        if rotate:
            attrs.append(f'transform="rotate(-90 {_num(sx)} {_num(sy)})"')
        if cls:
            attrs.append(f'class="{cls}"')
        return f"<text {' '.join(attrs)}>{escape(s)}</text>"


def _floor_colour(use: str) -> str:
    key = {"wc": "bath", "shower": "bath", "bathroom": "bath", "corridor": "hall",
           "entrance": "hall"}.get(use, use)
    return STYLE.get(f"floor.{key}", STYLE["floor"])


def _wall_mass(plan: Plan) -> BaseGeometry:
    """Solid wall: a band round the flat and the gaps between neighbouring rooms."""
    rooms = [room_polygon(r) for r in plan.rooms]
    grown = unary_union([p.buffer(EXTERIOR_WALL, join_style="mitre") for p in rooms])
    # walls up to MAX_WALL_THICKNESS thick join rooms (plan format): close gaps that wide,
    # which the exterior band alone (2 x EXTERIOR_WALL) leaves open
    half = MAX_WALL_THICKNESS / 2 + 1
    closed = unary_union([p.buffer(half, join_style="mitre") for p in rooms]).buffer(
        -half, join_style="mitre")
    # and the notch left where such a gap meets the exterior band (2 x 250 < 600)
    notch = (MAX_WALL_THICKNESS - 2 * EXTERIOR_WALL) / 2 + 1
    mass = unary_union([grown, closed]).buffer(notch, join_style="mitre").buffer(
        -notch, join_style="mitre")
    return mass.difference(unary_union(rooms))


def _through_wall(mass: BaseGeometry, at: tuple[float, float], out: tuple[float, float]) -> float:
    """How far (mm) the wall mass reaches from ``at`` along ``out``, without leaving it."""
    reach = 2 * EXTERIOR_WALL + 700
    ray = LineString([at, (at[0] + out[0] * reach, at[1] + out[1] * reach)])
    hit = ray.intersection(mass.buffer(1))
    parts = [hit] if isinstance(hit, LineString) else list(getattr(hit, "geoms", []))
    for seg in parts:
        if isinstance(seg, LineString) and not seg.is_empty and seg.distance(Point(at)) < 2:
            return max(seg.length - 1, 0.0)
    return 0.0


def _band(at: tuple[float, float], u: tuple[float, float], out: tuple[float, float], half: float,
          inner: float, outer: float) -> list[tuple[float, float]]:
    """Corners of the rectangle along a wall: ``-half..half`` along u, ``-inner..outer`` along out."""
    def p(s: float, t: float) -> tuple[float, float]:
        return (at[0] + u[0] * s + out[0] * t, at[1] + u[1] * s + out[1] * t)
    return [p(-half, -inner), p(half, -inner), p(half, outer), p(-half, outer)]


def _defs(c: _Canvas) -> str:
    h = c.px(7)
    return (
        "<defs>"
        f'<pattern id="rf-hatch" patternUnits="userSpaceOnUse" width="{_num(h)}" '
        f'height="{_num(h)}" patternTransform="rotate(45)">'
        f'<rect width="{_num(h)}" height="{_num(h)}" fill="#dfe9eb"/>'
        f'<line x1="0" y1="0" x2="0" y2="{_num(h)}" stroke="{STYLE["fitting"]}" '
        f'stroke-width="{_num(c.px(1))}"/></pattern>'
        "</defs>"
    )


def _draw_rooms(c: _Canvas, plan: Plan) -> None:
    c.add('<g class="floors">')
    for r in plan.rooms:
        c.add(f'<polygon class="room" id={quoteattr("room-" + r.id)} points="{c.pts(r.outline)}" '
              f'fill="{_floor_colour(r.use)}"/>')
    c.add("</g>")


def _draw_walls(c: _Canvas, plan: Plan, mass: BaseGeometry) -> None:
    c.add('<g class="walls">')
    c.add(f'<path d="{c.path_d(mass)}" fill="{STYLE["wall"]}" fill-rule="evenodd"/>')
    for r in plan.rooms:
        c.add(f'<polygon points="{c.pts(r.outline)}" fill="none" stroke="{STYLE["wall"]}" '
              f'stroke-width="{_num(c.px(4))}" stroke-linejoin="miter"/>')
    c.add("</g>")


def _draw_fittings(c: _Canvas, plan: Plan) -> None:
    c.add('<g class="fittings">')
    for f in plan.fixtures:
        c.add(f'<g class="fitting" id={quoteattr("fitting-" + f.id)}>')
        z = fixture_zone(f)
        if z is not None:
            c.add(f'<polygon class="zone" points="{c.pts(list(z.exterior.coords)[:-1])}" '
                  f'fill="{STYLE["zone.fitting"]}" fill-opacity="0.07" stroke="{STYLE["zone.fitting"]}" '
                  f'stroke-width="{_num(c.px(1))}" stroke-dasharray="{_num(c.px(5))} {_num(c.px(3))}"/>')
        c.add(f'<polygon points="{c.pts(f.outline)}" fill="url(#rf-hatch)" '
              f'stroke="{STYLE["fitting"]}" stroke-width="{_num(c.px(1.5))}"/>')
        poly = fixture_polygon(f)
        lp = _middle(poly)
        minx, miny, maxx, maxy = poly.bounds
        label, size, vertical = _fit_label(f.label, f.id, maxx - minx, maxy - miny, c.upp)
        c.add(c.text(lp.x, lp.y, label, size, fill=STYLE["fitting"], halo=True, rotate=vertical))
        c.add("</g>")
    c.add("</g>")


def _draw_openings(c: _Canvas, plan: Plan, rules: RuleSet, mass: BaseGeometry) -> None:
    wall_px = c.px(4)
    c.add('<g class="windows">')
    for w in plan.windows:
        seg = window_segment(plan, w)
        (ax, ay), (bx, by) = seg.coords
        u = ((bx - ax) / w.width, (by - ay) / w.width)
        at = ((ax + bx) / 2, (ay + by) / 2)
        inward = _inward(room_polygon(plan.room(w.room)), at, u)
        out = (-inward[0], -inward[1])
        t = max(_through_wall(mass, at, out), c.px(6))
        band = _band(at, u, out, w.width / 2, wall_px / 2, t + wall_px / 2)
        c.add(f'<g class="window" id={quoteattr("window-" + w.id)}>')
        c.add(f'<polygon points="{c.pts(band)}" fill="{STYLE["paper"]}" stroke="{STYLE["window"]}" '
              f'stroke-width="{_num(c.px(0.8))}"/>')
        for frac in (0.3, 0.7):
            k = -wall_px / 2 + frac * (t + wall_px)
            p0 = (at[0] - u[0] * w.width / 2 + out[0] * k, at[1] - u[1] * w.width / 2 + out[1] * k)
            p1 = (at[0] + u[0] * w.width / 2 + out[0] * k, at[1] + u[1] * w.width / 2 + out[1] * k)
            c.add(f'<polyline points="{c.pts([p0, p1])}" stroke="{STYLE["window"]}" '
                  f'stroke-width="{_num(c.px(1.2))}" fill="none"/>')
        c.add("</g>")
    c.add("</g>")
    c.add('<g class="doors">')
    for d in plan.doors:
        shape = door_shape(plan, d, rules)
        (ax, ay), (bx, by) = shape.opening.coords
        u = ((bx - ax) / d.width, (by - ay) / d.width)
        at = (float(d.at[0]), float(d.at[1]))
        n0 = shape.inward[d.rooms[0]]
        out = (-n0[0], -n0[1])
        t = _through_wall(mass, at, out)
        c.add(f'<g class="door" id={quoteattr("door-" + d.id)}>')
        gap = _band(at, u, out, d.width / 2, wall_px, t + wall_px)
        c.add(f'<polygon points="{c.pts(gap)}" fill="{STYLE["paper"]}"/>')
        for s in (-1, 1):
            j0 = (at[0] + u[0] * s * d.width / 2 - out[0] * wall_px / 2,
                  at[1] + u[1] * s * d.width / 2 - out[1] * wall_px / 2)
            j1 = (j0[0] + out[0] * (t + wall_px), j0[1] + out[1] * (t + wall_px))
            c.add(f'<polyline points="{c.pts([j0, j1])}" stroke="{STYLE["wall"]}" '
                  f'stroke-width="{_num(c.px(2))}" fill="none"/>')
        leaf = door_leaf(plan, d)
        if leaf is not None:
            hinge, arc = leaf
            c.add(f'<polyline class="leaf" points="{c.pts([hinge, arc[-1]])}" stroke="{STYLE["door"]}" '
                  f'stroke-width="{_num(c.px(2.5))}" fill="none"/>')
            c.add(f'<polyline class="swing" points="{c.pts(arc)}" stroke="{STYLE["door"]}" '
                  f'stroke-width="{_num(c.px(0.9))}" stroke-dasharray="{_num(c.px(4))} {_num(c.px(3))}" '
                  'fill="none"/>')
        elif d.leaf == Leaf.SLIDING:
            k = -wall_px * 1.5  # just inside rooms[0], running half past the opening
            p0 = (at[0] + out[0] * k, at[1] + out[1] * k)
            p1 = (at[0] + u[0] * d.width + out[0] * k, at[1] + u[1] * d.width + out[1] * k)
            c.add(f'<polyline class="leaf" points="{c.pts([p0, p1])}" stroke="{STYLE["door"]}" '
                  f'stroke-width="{_num(c.px(2.5))}" fill="none"/>')
        c.add("</g>")
    c.add("</g>")


def _inward(poly: Polygon, at: tuple[float, float], u: tuple[float, float]) -> tuple[float, float]:
    """Unit normal to the wall direction ``u`` at ``at`` pointing into ``poly``."""
    n = (-u[1], u[0])
    return n if poly.contains(Point(at[0] + n[0] * 5, at[1] + n[1] * 5)) else (-n[0], -n[1])


def _fit_label(label: str, short: str, w: float, h: float, upp: float) -> tuple[str, float, bool]:
    """Text, size (px) and whether to run it vertically, so that it fits a w x h box (mm).

    Tries the label from 9 px down to 6 px, then ``short`` (the id) down to 5 px, along the
    longer side.
    """
    vertical = h > 1.3 * w
    along, across = (h, w) if vertical else (w, h)
    for text, sizes in ((label, (9.0, 8.0, 7.0, 6.0)), (short, (9.0, 8.0, 7.0, 6.0, 5.0))):
        for size in sizes:
            if size * upp * 1.3 <= across and len(text) * size * 0.56 * upp <= along * 0.92:
                return text, size, vertical
    return short, 5.0, vertical


def _draw_furniture(c: _Canvas, plan: Plan, rules: RuleSet,
                    taken: dict[str, list[BaseGeometry]]) -> list[str]:
    """Draw placed pieces with their use zones; return the ids of pieces not placed.

    Adds each footprint to ``taken[room id]`` (used to keep room labels off the furniture).
    """
    specs = {s.id: s for s in resolve_pieces(plan, rules)}
    missing = []
    zones, pieces = [], []
    # rugs first, so the pieces standing on them are drawn on top
    for p in sorted(plan.furniture, key=lambda p: not lies_flat(specs[p.id])):
        pl = p.placement
        if pl is None:
            missing.append(p.id)
            continue
        spec = specs[p.id]
        for _, z in use_zones(spec, pl):
            zones.append(f'<polygon class="use-zone" points="{c.pts(list(z.exterior.coords)[:-1])}" '
                         f'fill="{STYLE["zone.piece"]}" fill-opacity="0.06" stroke="{STYLE["zone.piece"]}" '
                         f'stroke-width="{_num(c.px(1))}" '
                         f'stroke-dasharray="{_num(c.px(5))} {_num(c.px(3))}"/>')
        x0, y0, x1, y1 = footprint_box(spec, pl)
        taken.setdefault(pl.room, []).append(box(x0, y0, x1, y1))
        dx, dy = side_direction("front", pl.rotation)
        # the front edge, its middle third drawn heavy
        if dy:
            fy = y1 if dy > 0 else y0
            third = (x1 - x0) / 3
            front = [(x0 + third, fy), (x1 - third, fy)]
        else:
            fx = x1 if dx > 0 else x0
            third = (y1 - y0) / 3
            front = [(fx, y0 + third), (fx, y1 - third)]
        w, h = x1 - x0, y1 - y0
        label, size, vertical = _fit_label(spec.label, p.id, w, h, c.upp)
        pieces.append(
            f'<g class="piece" id={quoteattr("piece-" + p.id)}>'
            f'<rect x="{_num(x0 - c.minx)}" y="{_num(c.maxy - y1)}" width="{_num(w)}" '
            f'height="{_num(h)}" fill="{STYLE["piece"]}" stroke="{STYLE["piece.edge"]}" '
            f'stroke-width="{_num(c.px(1.2))}"/>'
            f'<polyline class="front" points="{c.pts(front)}" stroke="{STYLE["piece.edge"]}" '
            f'stroke-width="{_num(c.px(4))}" fill="none"/>'
            + c.text((x0 + x1) / 2, (y0 + y1) / 2, label, size, rotate=vertical)
            + "</g>"
        )
    c.add('<g class="use-zones">' + "".join(zones) + "</g>")
    c.add('<g class="furniture">' + "".join(pieces) + "</g>")
    return missing


def _label_point(room: Polygon, taken: list[BaseGeometry]) -> tuple[float, float]:
    """Where a room's label goes: the middle of its largest free patch of floor."""
    free = room.difference(unary_union(taken)) if taken else room
    parts = [free] if isinstance(free, Polygon) else [
        g for g in getattr(free, "geoms", []) if isinstance(g, Polygon)]
    parts = [p for p in parts if p.area > 0]
    best = max(parts, key=lambda p: p.area) if parts else room
    lp = _middle(best)
    return lp.x, lp.y


def _middle(poly: Polygon) -> Point:
    """A label point: the point farthest from the edges (``polylabel``), or the centroid when
    that is as far (a long strip has a whole line of farthest points, and ``polylabel`` may
    pick one near an end, pushing a centred label past the shape)."""
    lp = polylabel(poly, tolerance=10)
    cen = poly.centroid
    edge = poly.exterior
    if poly.contains(cen) and edge.distance(cen) >= edge.distance(lp) - 10:
        return cen
    return lp


def _draw_room_labels(c: _Canvas, plan: Plan, taken: dict[str, list[BaseGeometry]]) -> None:
    c.add('<g class="room-labels">')
    for r in plan.rooms:
        poly = room_polygon(r)
        x, y = _label_point(poly, taken.get(r.id, []))
        c.add(c.text(x, y + c.px(7), r.label, 11, weight="bold", halo=True, cls="room-label"))
        c.add(c.text(x, y - c.px(7), f"{poly.area / 1e6:.2f} m²", 10, halo=True,
                     cls="room-area"))
    c.add("</g>")


def _draw_paths(c: _Canvas, paths: Sequence[Path]) -> None:
    c.add('<g class="paths">')
    for p in paths:
        if len(p.points) < 2:
            continue
        colour = STYLE["path.night"] if p.night else STYLE["path"]
        dash = f' stroke-dasharray="{_num(c.px(7))} {_num(c.px(4))}"' if p.night else ""
        line = LineString(p.points)
        mid = line.interpolate(0.3, normalized=True)
        c.add(f'<g class="path"><polyline points="{c.pts(p.points)}" stroke="{colour}" '
              f'stroke-width="{_num(c.px(3))}" stroke-opacity="0.85" fill="none" '
              f'stroke-linejoin="round" stroke-linecap="round"{dash}/>'
              f'<circle cx="{_num(c.pt(*p.points[0])[0])}" cy="{_num(c.pt(*p.points[0])[1])}" '
              f'r="{_num(c.px(3.5))}" fill="{colour}"/>'
              + c.text(mid.x, mid.y + c.px(9), p.label, 9, fill=colour, halo=True)
              + "</g>")
    c.add("</g>")


def _draw_marks(c: _Canvas, marks: Sequence[Mark]) -> None:
    c.add('<g class="marks">')
    placed: list[tuple[float, float]] = []
    for i, m in enumerate(marks, start=1):
        colour = STYLE["fail"] if m.kind == "fail" else STYLE["note"]
        c.add(f'<g class="mark mark-{escape(m.kind)}">')
        where = m.where
        if len(m.outline) >= 3:
            poly = Polygon(m.outline)
            c.add(f'<polygon points="{c.pts(m.outline)}" fill="{colour}" fill-opacity="0.14" '
                  f'stroke="{colour}" stroke-width="{_num(c.px(2.5))}"/>')
            if where is None and poly.is_valid and not poly.is_empty:
                rp = poly.representative_point()
                where = (rp.x, rp.y)
        if where is not None:
            sx, sy = c.pt(*where)
            r = c.px(8)
            while any(math.hypot(sx - ox, sy - oy) < 2 * r for ox, oy in placed):
                sx += 2.2 * r  # several marks at one point: set the discs side by side
            placed.append((sx, sy))
            c.add(f'<circle cx="{_num(sx)}" cy="{_num(sy)}" r="{_num(r)}" fill="{colour}" '
                  f'stroke="{STYLE["paper"]}" stroke-width="{_num(c.px(1.5))}"/>')
            c.add(c.text(sx, sy, str(i), 9, weight="bold", fill=STYLE["paper"], plan=False))
        c.add("</g>")
    c.add("</g>")


def _wrap(s: str, width_px: float, size_px: float) -> list[str]:
    return textwrap.wrap(s, max(20, int(width_px / (size_px * 0.56)))) or [""]


def _legend_lines(marks: Sequence[Mark], paths: Sequence[Path], missing: list[str],
                  width_px: float) -> list[tuple[str, str, str]]:
    """(number, text, colour) rows for the legend under the plan."""
    rows: list[tuple[str, str, str]] = []
    for i, m in enumerate(marks, start=1):
        colour = STYLE["fail"] if m.kind == "fail" else STYLE["note"]
        for k, line in enumerate(_wrap(m.label, width_px - 60, 10)):
            rows.append((str(i) if k == 0 else "", line, colour))
    for p in paths:
        colour = STYLE["path.night"] if p.night else STYLE["path"]
        night = "night, " if p.night else ""
        length = LineString(p.points).length / 1000 if len(p.points) > 1 else 0.0
        rows.append(("—", f"{p.label} ({night}{length:.1f} m)", colour))
    if missing:
        for line in _wrap("Not placed: " + ", ".join(missing), width_px - 60, 10):
            rows.append(("", line, STYLE["faint"]))
    return rows


def _title_block(c: _Canvas, plan: Plan, rules: RuleSet, title: str | None, top: float,
                 width: float, width_px: int) -> float:
    """Draw the title block from ``top`` (user units); return its height."""
    pad = c.px(14)
    line = c.px(15)
    left = [(title or plan.name, 15, "bold")]
    if title and plan.name:
        left.append((plan.name, 10, "normal"))
    for label, v in (("Client", plan.client), ("Address", plan.address)):
        if v:
            left.append((f"{label}: {v}", 10, "normal"))
    right = [(f"Rule set: {rules.id}, {rules.label}", 10, "normal"),
             ("Drawn to scale, 1 unit = 1 mm; north up", 10, "normal")]
    # the left column ends where the right one starts (56 % across): long names wrap
    column_px = width_px * 0.56 - 14 - 12
    left = [(part, size, weight) for s, size, weight in left
            for part in _wrap(s, column_px, size * (1.1 if weight == "bold" else 1.0))]
    caution = _wrap(CAUTION, width_px - 2 * 14, 9)
    feet = plan.unit in ("in", "ft")  # a plan measured in feet and inches gets a feet bar too
    rows = max(sum(1.25 if size > 12 else 1 for _, size, _ in left),
               len(right) + 2.2 + (1.8 if feet else 0))
    height = pad * 2 + rows * line + len(caution) * c.px(12) + c.px(6)
    c.add(f'<g class="title-block"><rect x="{_num(c.px(6))}" y="{_num(top)}" '
          f'width="{_num(width - c.px(12))}" height="{_num(height)}" fill="#ffffff" '
          f'stroke="{STYLE["ink"]}" stroke-width="{_num(c.px(1.2))}"/>')
    y = top + pad + c.px(4)
    for s, size, weight in left:
        c.add(c.text(pad, y, s, size, anchor="start", weight=weight, plan=False))
        y += line * (1.25 if size > 12 else 1)
    rx = width * 0.56
    y = top + pad + c.px(4)
    for s, size, weight in right:
        c.add(c.text(rx, y, s, size, anchor="start", weight=weight, plan=False))
        y += line
    _scale_bar(c, rx, y + c.px(6))
    if feet:
        _scale_bar_feet(c, rx, y + c.px(33))
    y = top + pad + rows * line + c.px(6)
    c.add(f'<line x1="{_num(c.px(6))}" y1="{_num(y - c.px(8))}" x2="{_num(width - c.px(6))}" '
          f'y2="{_num(y - c.px(8))}" stroke="{STYLE["ink"]}" stroke-width="{_num(c.px(0.6))}"/>')
    for s in caution:
        c.add(c.text(pad, y + c.px(4), s, 9, anchor="start", fill=STYLE["faint"], plan=False,
                     cls="caution"))
        y += c.px(12)
    c.add("</g>")
    return height


def _scale_bar_feet(c: _Canvas, x: float, y: float) -> None:
    """A 3 ft bar (914.4 user units, 1 ft = 304.8 mm) with a tick every foot."""
    ft = 304.8
    parts = ['<g class="scale-bar-ft">',
             f'<line class="scale-bar-ft-line" x1="{_num(x)}" y1="{_num(y)}" '
             f'x2="{_num(x + 3 * ft)}" y2="{_num(y)}" stroke="{STYLE["ink"]}" '
             f'stroke-width="{_num(c.px(2))}"/>']
    for k in range(4):
        parts.append(f'<line x1="{_num(x + k * ft)}" y1="{_num(y - c.px(5))}" '
                     f'x2="{_num(x + k * ft)}" y2="{_num(y)}" stroke="{STYLE["ink"]}" '
                     f'stroke-width="{_num(c.px(1.2))}"/>')
        parts.append(c.text(x + k * ft, y + c.px(10), "3 ft" if k == 3 else str(k), 9,
                            plan=False))
    parts.append("</g>")
    c.add("".join(parts))


def _scale_bar(c: _Canvas, x: float, y: float) -> None:
    """A bar of :data:`SCALE_BAR_MM` user units with ticks every 250 mm."""
    tick = c.px(5)
    sw = _num(c.px(1.2))
    parts = ['<g class="scale-bar" id="scale-bar">',
             f'<line class="scale-bar-line" x1="{_num(x)}" y1="{_num(y)}" '
             f'x2="{_num(x + SCALE_BAR_MM)}" y2="{_num(y)}" stroke="{STYLE["ink"]}" '
             f'stroke-width="{_num(c.px(2))}"/>']
    for k in range(5):
        tx = x + k * SCALE_BAR_MM / 4
        h = tick if k in (0, 2, 4) else tick * 0.6
        parts.append(f'<line x1="{_num(tx)}" y1="{_num(y - h)}" x2="{_num(tx)}" y2="{_num(y)}" '
                     f'stroke="{STYLE["ink"]}" stroke-width="{sw}"/>')
    for k, s in ((0, "0"), (2, "0.5"), (4, "1 m")):
        parts.append(c.text(x + k * SCALE_BAR_MM / 4, y + c.px(10), s, 9, plan=False))
    parts.append("</g>")
    c.add("".join(parts))


def _extent(plan: Plan, rules: RuleSet, marks: Sequence[Mark],
            paths: Sequence[Path]) -> tuple[float, float, float, float]:
    """Bounds (mm) of everything drawn on the plan: the rooms, and also placed pieces, their
    use zones, marks and paths that reach past the walls (a piece placed partly outside the
    flat, a zone through a wall), so that nothing is cut off at the drawing's edge."""
    shapes: list[BaseGeometry] = [room_polygon(r) for r in plan.rooms]
    specs = {s.id: s for s in resolve_pieces(plan, rules)}
    for p in plan.furniture:
        if p.placement is not None and p.id in specs:
            shapes.append(box(*footprint_box(specs[p.id], p.placement)))
            shapes += [z for _, z in use_zones(specs[p.id], p.placement)]
    points = [pt for m in marks for pt in m.outline] + [m.where for m in marks if m.where]
    points += [pt for path in paths for pt in path.points]
    minx, miny, maxx, maxy = unary_union(shapes).bounds
    for x, y in points:
        minx, miny, maxx, maxy = min(minx, x), min(miny, y), max(maxx, x), max(maxy, y)
    return minx, miny, maxx, maxy


def draw_svg(plan: Plan, rules: RuleSet, marks: Sequence[Mark] = (), paths: Sequence[Path] = (),
             title: str | None = None, width_px: int = 900) -> str:
    """The plan drawn to scale as a standalone SVG document (no XML declaration).

    ``marks`` are numbered on the plan and listed in a legend below it; ``paths`` are drawn
    as polylines (dashed at night). ``title`` replaces the plan's name as the headline.
    ``width_px`` is the drawing's width in pixels; its height follows from the plan.
    Pieces without a placement are listed as not placed.
    """
    if not plan.rooms:
        raise ValueError("a plan needs at least one room to draw")
    mass = _wall_mass(plan)
    minx, miny, maxx, maxy = _extent(plan, rules, marks, paths)
    minx, miny = minx - EXTERIOR_WALL - _MARGIN_MM, miny - EXTERIOR_WALL - _MARGIN_MM
    maxx, maxy = maxx + EXTERIOR_WALL + _MARGIN_MM, maxy + EXTERIOR_WALL + _MARGIN_MM
    # room for the scale bar and labels in narrow plans
    maxx = max(maxx, minx + 6000)
    width = maxx - minx
    upp = width / width_px
    c = _Canvas(minx, maxy, upp)
    c.add(_defs(c))
    _draw_rooms(c, plan)
    taken: dict[str, list[BaseGeometry]] = {}
    for f in plan.fixtures:
        taken.setdefault(f.room, []).append(fixture_polygon(f))
    missing = _draw_furniture(c, plan, rules, taken)
    _draw_fittings(c, plan)
    _draw_walls(c, plan, mass)
    _draw_openings(c, plan, rules, mass)
    _draw_paths(c, paths)
    _draw_room_labels(c, plan, taken)
    _draw_marks(c, marks)
    top = maxy - miny
    rows = _legend_lines(marks, paths, missing, width_px)
    if rows:
        c.add('<g class="legend">')
        y = top + c.px(4)
        for num, s, colour in rows:
            if num and num != "—":
                c.add(f'<circle cx="{_num(c.px(22))}" cy="{_num(y + c.px(6))}" r="{_num(c.px(7))}" '
                      f'fill="{colour}"/>')
                c.add(c.text(c.px(22), y + c.px(6), num, 9, weight="bold", fill=STYLE["paper"],
                             plan=False))
            elif num == "—":
                c.add(f'<line x1="{_num(c.px(12))}" y1="{_num(y + c.px(6))}" x2="{_num(c.px(32))}" '
                      f'y2="{_num(y + c.px(6))}" stroke="{colour}" stroke-width="{_num(c.px(3))}"/>')
            c.add(c.text(c.px(40), y + c.px(6), s, 10, anchor="start", fill=colour, plan=False))
            y += c.px(17)
        c.add("</g>")
        top = y + c.px(6)
    top += _title_block(c, plan, rules, title, top, width, width_px) + c.px(8)
    height = top
    c.parts.insert(1, f'<rect x="0" y="0" width="{_num(width)}" height="{_num(height)}" '
                      f'fill="{STYLE["paper"]}"/>')
    hpx = max(1, math.ceil(height / upp))
    head = (f'<svg xmlns="http://www.w3.org/2000/svg" width="{width_px}" height="{hpx}" '
            f'viewBox="0 0 {_num(width)} {_num(height)}" font-family="{_FONT}" '
            f'class="roomfit-plan">')
    label = escape(title or plan.name or "plan")
    return head + f"<title>{label}</title>" + "".join(c.parts) + "</svg>\n"
