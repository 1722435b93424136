"""The building on a drawing: floors, walls, fittings, windows and doors.

Plans give rooms, not walls: the flat's outer walls are drawn as a band
:data:`EXTERIOR_WALL` thick and gaps between neighbouring rooms (up to the plan format's
thickest wall) are filled solid. Each part is one SVG group with a class and an id made from
the plan's id (see ``docs/drawing.md``).
"""

from __future__ import annotations

from xml.sax.saxutils import quoteattr

from shapely import LineString, Point
from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from roomfit.audit.geometry import (
    door_leaf,
    door_shape,
    fixture_polygon,
    fixture_zone,
    room_polygon,
    window_segment,
)
from roomfit.plan.data import Leaf, Plan
from roomfit.plan.openings import MAX_WALL_THICKNESS
from roomfit.present.canvas import STYLE, Canvas, band, fit_label, inward, middle, num
from roomfit.rules.sets import RuleSet

__all__ = ["EXTERIOR_WALL", "wall_mass", "defs", "draw_rooms", "draw_walls", "draw_fittings",
           "draw_openings"]

#: Thickness (mm) drawn for outer walls; plans give rooms, not walls, so this is a drawing
#: convention. Gaps between rooms up to twice this are drawn as solid wall.
EXTERIOR_WALL = 250


def _floor_colour(use: str) -> str:
    key = {"wc": "bath", "shower": "bath", "bathroom": "bath", "corridor": "hall",
           "entrance": "hall"}.get(use, use)
    return STYLE.get(f"floor.{key}", STYLE["floor"])


def wall_mass(plan: Plan) -> BaseGeometry:
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


def defs(c: Canvas) -> str:
    h = c.px(7)
    return (
        "<defs>"
        f'<pattern id="rf-hatch" patternUnits="userSpaceOnUse" width="{num(h)}" '
        f'height="{num(h)}" patternTransform="rotate(45)">'
        f'<rect width="{num(h)}" height="{num(h)}" fill="#dfe9eb"/>'
        f'<line x1="0" y1="0" x2="0" y2="{num(h)}" stroke="{STYLE["fitting"]}" '
        f'stroke-width="{num(c.px(1))}"/></pattern>'
        "</defs>"
    )


def draw_rooms(c: Canvas, plan: Plan) -> None:
    c.add('<g class="floors">')
    for r in plan.rooms:
        c.add(f'<polygon class="room" id={quoteattr("room-" + r.id)} points="{c.pts(r.outline)}" '
              f'fill="{_floor_colour(r.use)}"/>')
    c.add("</g>")


def draw_walls(c: Canvas, plan: Plan, mass: BaseGeometry) -> None:
    c.add('<g class="walls">')
    c.add(f'<path d="{c.path_d(mass)}" fill="{STYLE["wall"]}" fill-rule="evenodd"/>')
    for r in plan.rooms:
        c.add(f'<polygon points="{c.pts(r.outline)}" fill="none" stroke="{STYLE["wall"]}" '
              f'stroke-width="{num(c.px(4))}" stroke-linejoin="miter"/>')
    c.add("</g>")


def draw_fittings(c: Canvas, plan: Plan) -> None:
    c.add('<g class="fittings">')
    for f in plan.fixtures:
        c.add(f'<g class="fitting" id={quoteattr("fitting-" + f.id)}>')
        z = fixture_zone(f)
        if z is not None:
            c.add(f'<polygon class="zone" points="{c.pts(list(z.exterior.coords)[:-1])}" '
                  f'fill="{STYLE["zone.fitting"]}" fill-opacity="0.07" stroke="{STYLE["zone.fitting"]}" '
                  f'stroke-width="{num(c.px(1))}" stroke-dasharray="{num(c.px(5))} {num(c.px(3))}"/>')
        c.add(f'<polygon points="{c.pts(f.outline)}" fill="url(#rf-hatch)" '
              f'stroke="{STYLE["fitting"]}" stroke-width="{num(c.px(1.5))}"/>')
        poly = fixture_polygon(f)
        lp = middle(poly)
        minx, miny, maxx, maxy = poly.bounds
        label, size, vertical = fit_label(f.label, f.id, maxx - minx, maxy - miny, c.upp)
        c.add(c.text(lp.x, lp.y, label, size, fill=STYLE["fitting"], halo=True, rotate=vertical))
        c.add("</g>")
    c.add("</g>")


def draw_openings(c: Canvas, plan: Plan, rules: RuleSet, mass: BaseGeometry) -> None:
    wall_px = c.px(4)
    c.add('<g class="windows">')
    for w in plan.windows:
        seg = window_segment(plan, w)
        (ax, ay), (bx, by) = seg.coords
        u = ((bx - ax) / w.width, (by - ay) / w.width)
        at = ((ax + bx) / 2, (ay + by) / 2)
        into = inward(room_polygon(plan.room(w.room)), at, u)
        out = (-into[0], -into[1])
        t = max(_through_wall(mass, at, out), c.px(6))
        sheet = band(at, u, out, w.width / 2, wall_px / 2, t + wall_px / 2)
        c.add(f'<g class="window" id={quoteattr("window-" + w.id)}>')
        c.add(f'<polygon points="{c.pts(sheet)}" fill="{STYLE["paper"]}" stroke="{STYLE["window"]}" '
              f'stroke-width="{num(c.px(0.8))}"/>')
        for frac in (0.3, 0.7):
            k = -wall_px / 2 + frac * (t + wall_px)
            p0 = (at[0] - u[0] * w.width / 2 + out[0] * k, at[1] - u[1] * w.width / 2 + out[1] * k)
            p1 = (at[0] + u[0] * w.width / 2 + out[0] * k, at[1] + u[1] * w.width / 2 + out[1] * k)
            c.add(f'<polyline points="{c.pts([p0, p1])}" stroke="{STYLE["window"]}" '
                  f'stroke-width="{num(c.px(1.2))}" fill="none"/>')
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
        gap = band(at, u, out, d.width / 2, wall_px, t + wall_px)
        c.add(f'<polygon points="{c.pts(gap)}" fill="{STYLE["paper"]}"/>')
        for s in (-1, 1):
            j0 = (at[0] + u[0] * s * d.width / 2 - out[0] * wall_px / 2,
                  at[1] + u[1] * s * d.width / 2 - out[1] * wall_px / 2)
            j1 = (j0[0] + out[0] * (t + wall_px), j0[1] + out[1] * (t + wall_px))
            c.add(f'<polyline points="{c.pts([j0, j1])}" stroke="{STYLE["wall"]}" '
                  f'stroke-width="{num(c.px(2))}" fill="none"/>')
        leaf = door_leaf(plan, d)
        if leaf is not None:
            hinge, arc = leaf
            c.add(f'<polyline class="leaf" points="{c.pts([hinge, arc[-1]])}" stroke="{STYLE["door"]}" '
                  f'stroke-width="{num(c.px(2.5))}" fill="none"/>')
            c.add(f'<polyline class="swing" points="{c.pts(arc)}" stroke="{STYLE["door"]}" '
                  f'stroke-width="{num(c.px(0.9))}" stroke-dasharray="{num(c.px(4))} {num(c.px(3))}" '
                  'fill="none"/>')
        elif d.leaf == Leaf.SLIDING:
            k = -wall_px * 1.5  # just inside rooms[0], running half past the opening
            p0 = (at[0] + out[0] * k, at[1] + out[1] * k)
            p1 = (at[0] + u[0] * d.width + out[0] * k, at[1] + u[1] * d.width + out[1] * k)
            c.add(f'<polyline class="leaf" points="{c.pts([p0, p1])}" stroke="{STYLE["door"]}" '
                  f'stroke-width="{num(c.px(2.5))}" fill="none"/>')
        c.add("</g>")
    c.add("</g>")
