"""What the rules ask, drawn: the layers a reader switches on and off.

A therapist explains a layout with its drawing, so the floor the rules demand must be visible
on it. Each layer is one SVG group ``<g class="layer layer-NAME" id="layer-NAME">``:

- ``zones``: every placed piece's use zones (dashed) and each door's approach floor (the
  clear floor the rule set asks in front of it, swing included, clipped to the room);
- ``routes``: each routine trip's route, drawn side by side where routes share a corridor
  (each offset by a few pixels in turn, so a night route is never hidden under a day route),
  with the narrowest place of each drawn to scale across the route and its width written;
- ``turning``: the turning space the audit found in each room, where the rule set asks for
  one (a circle or square of the set's size at the place found; a T-shaped space as a marked
  point), and the largest circle where none fits;
- ``dimensions``: the depth of each use zone and each room's longest wall in each direction.

Everything is read from results (the audit's findings, the route scorer's trips, the plan's
derived door geometry); nothing is judged again here. Figures follow the reader's units:
feet and inches for plans measured in ``in`` or ``ft``; a rule figure of a set stated in
inches in inches (``30 in``); millimetres otherwise (room sides in metres).
"""

from __future__ import annotations

import math
from collections.abc import Sequence

from shapely import LineString, Point, Polygon
from shapely.geometry.base import BaseGeometry

from roomfit.audit.check import Finding
from roomfit.audit.geometry import door_shape, side_direction, use_zones
from roomfit.audit.routes import TripScore
from roomfit.plan.data import Plan
from roomfit.plan.units import IMPERIAL, format_inches, show_length
from roomfit.present.canvas import STYLE, Canvas, num
from roomfit.rules.catalog import resolve_pieces
from roomfit.rules.sets import RuleSet

__all__ = ["LAYERS", "parse_layers", "rule_figure", "room_side", "open_layer", "draw_zones",
           "draw_routes", "draw_turning", "draw_dimensions", "route_colour"]

#: The layers a drawing may show, in drawing order.
LAYERS = ("zones", "routes", "turning", "dimensions")

XY = tuple[float, float]


def parse_layers(text: str) -> tuple[str, ...]:
    """Layer names from a comma-separated list (``"zones,routes"``); ``"all"`` or ``""`` give
    every layer, ``"none"`` none. Raises ValueError naming the unknown name and the choices.

    >>> parse_layers("routes, turning")
    ('routes', 'turning')
    """
    words = [w.strip().lower() for w in text.split(",") if w.strip()]
    if not words or words == ["all"]:
        return LAYERS
    if words == ["none"]:
        return ()
    bad = [w for w in words if w not in LAYERS]
    if bad:
        raise ValueError(f"unknown layer {bad[0]!r}: choose from {', '.join(LAYERS)}, all or none")
    return tuple(name for name in LAYERS if name in words)


def rule_figure(mm: float, rule_unit: str, plan_unit: str) -> str:
    """A clearance figure as its reader expects it: in inches when the rule set states it in
    inches, in feet and inches for a plan in feet or inches, else in millimetres.

    >>> rule_figure(762, "in", "mm"), rule_figure(900, "mm", "ft"), rule_figure(900, "mm", "mm")
    ('30 in', '2\\' 11 1/2"', '900 mm')
    """
    if rule_unit == "in":
        return format_inches(mm)
    return show_length(mm, plan_unit)


def room_side(mm: float, plan_unit: str) -> str:
    """A room's side: feet and inches, or metres with two decimals (``3.45 m``)."""
    return show_length(mm, plan_unit) if plan_unit in IMPERIAL else f"{mm / 1000:.2f} m"


def open_layer(c: Canvas, name: str) -> None:
    c.add(f'<g class="layer layer-{name}" id="layer-{name}">')


def _dim(c: Canvas, a: XY, b: XY, label: str, colour: str, cls: str) -> str:
    """A dimension line from ``a`` to ``b`` (plan mm) with end ticks and its label beside it."""
    length = math.dist(a, b)
    if length < 1:
        return ""
    ux, uy = (b[0] - a[0]) / length, (b[1] - a[1]) / length
    t = c.px(4)
    ticks = "".join(c.line((p[0] - uy * t, p[1] + ux * t), (p[0] + uy * t, p[1] - ux * t), colour, 1)
                    for p in (a, b))
    mx, my = (a[0] + b[0]) / 2, (a[1] + b[1]) / 2
    off = c.px(8)
    return (f'<g class="{cls}">' + c.line(a, b, colour, 1) + ticks
            + c.text(mx - uy * off, my + ux * off, label, 8, fill=colour, halo=True) + "</g>")


def draw_zones(c: Canvas, plan: Plan, rules: RuleSet) -> None:
    """Use zones of placed pieces and door approach floors (layer ``zones``)."""
    specs = {s.id: s for s in resolve_pieces(plan, rules)}
    dash = f'stroke-dasharray="{num(c.px(5))} {num(c.px(3))}"'
    for p in plan.furniture:
        if p.placement is None or p.id not in specs:
            continue
        for z, poly in use_zones(specs[p.id], p.placement):
            c.add(f'<polygon class="use-zone" data-piece="{p.id}" data-side="{z.side}" '
                  f'points="{c.pts(list(poly.exterior.coords)[:-1])}" fill="{STYLE["zone.piece"]}" '
                  f'fill-opacity="0.06" stroke="{STYLE["zone.piece"]}" '
                  f'stroke-width="{num(c.px(1))}" {dash}/>')
    for d in plan.doors:
        shape = door_shape(plan, d, rules)
        for rid, floor in shape.approach.items():
            c.add(f'<path class="approach" data-door="{d.id}" data-room="{rid}" '
                  f'd="{c.path_d(floor)}" fill="{STYLE["approach"]}" fill-opacity="0.10" '
                  f'fill-rule="evenodd" stroke="{STYLE["approach"]}" '
                  f'stroke-width="{num(c.px(1))}" stroke-dasharray="{num(c.px(2))} {num(c.px(2))}"/>')


def route_colour(trip: TripScore) -> str:
    return STYLE["path.night"] if trip.night else STYLE["path"]


def _shifted(points: Sequence[XY], by: float) -> tuple[XY, ...]:
    """The polyline moved ``by`` mm to its left (right when negative), or as it is when the
    offset does not give one clean line (a very tight turn)."""
    if not by or len(points) < 2:
        return tuple(points)
    line = LineString(points).offset_curve(by, join_style="mitre", mitre_limit=3)
    if isinstance(line, LineString) and not line.is_empty:
        return tuple((float(x), float(y)) for x, y in line.coords)
    return tuple(points)


def _across(points: Sequence[XY], at: XY) -> XY:
    """Unit vector across the route at the point nearest ``at``."""
    best, u = math.inf, (0.0, 1.0)
    for a, b in zip(points, points[1:], strict=False):
        seg = LineString([a, b])
        if seg.length and (d := seg.distance(Point(at))) < best:
            best = d
            u = (-(b[1] - a[1]) / seg.length, (b[0] - a[0]) / seg.length)
    return u


def draw_routes(c: Canvas, plan: Plan, trips: Sequence[TripScore]) -> None:
    """Each reachable trip's route, offset in turn so shared stretches show every route, and
    its narrowest place drawn to scale across it with the width (layer ``routes``)."""
    shown = [t for t in trips if t.reachable and len(t.points) >= 2]
    # night routes on top, each route 5 px to one side of the last: 0, +1, -1, +2, ...
    shown.sort(key=lambda t: t.night)
    for k, t in enumerate(shown):
        step = (k + 1) // 2 * (1 if k % 2 else -1)
        pts = _shifted(t.points, step * c.px(5))
        colour = route_colour(t)
        dash = f' stroke-dasharray="{num(c.px(7))} {num(c.px(4))}"' if t.night else ""
        mid = LineString(pts).interpolate(0.3, normalized=True)
        sx, sy = c.pt(*pts[0])
        parts = [f'<g class="path route{" night" if t.night else ""}" data-trip="{k}">',
                 f'<polyline points="{c.pts(pts)}" stroke="{colour}" stroke-width="{num(c.px(3))}" '
                 f'stroke-opacity="0.85" fill="none" stroke-linejoin="round" '
                 f'stroke-linecap="round"{dash}/>',
                 f'<circle cx="{num(sx)}" cy="{num(sy)}" r="{num(c.px(3.5))}" fill="{colour}"/>',
                 c.text(mid.x, mid.y + c.px(9), t.name, 9, fill=colour, halo=True)]
        if t.narrowest_at is not None and t.narrowest_mm is not None:
            ux, uy = _across(t.points, t.narrowest_at)
            half = t.narrowest_mm / 2
            x, y = t.narrowest_at
            a, b = (x - ux * half, y - uy * half), (x + ux * half, y + uy * half)
            parts.append(_dim(c, a, b, f"narrowest {show_length(t.narrowest_mm, plan.unit)}",
                              colour, "narrowest"))
        parts.append("</g>")
        c.add("".join(parts))


def _t_marker(c: Canvas, at: XY, label: str) -> str:
    x, y = at
    r = c.px(7)
    colour = STYLE["turning"]
    return ('<g class="turning-space turning-t">'
            + c.line((x - r, y), (x + r, y), colour, 3) + c.line((x, y), (x, y - 1.6 * r), colour, 3)
            + c.text(x, y + c.px(12), label, 8, fill=colour, halo=True) + "</g>")


def draw_turning(c: Canvas, plan: Plan, rules: RuleSet, findings: Sequence[Finding]) -> None:
    """The turning spaces found (layer ``turning``): a circle (or square) of the set's size
    where the audit found one; the largest circle, dashed red, where none fits."""
    size_rule = rules.get("turning.size")
    size = size_rule.exact_mm
    figure = rule_figure(size, size_rule.unit, plan.unit)
    shape = rules.text("turning.shape")
    for f in findings:
        if f.rule != "turning.space" or f.where is None:
            continue
        x, y = f.where
        if not f.ok:
            if len(f.outline) >= 3:
                c.add(f'<g class="turning-space turning-missing"><polygon points="{c.pts(f.outline)}" '
                      f'fill="none" stroke="{STYLE["fail"]}" stroke-width="{num(c.px(1.5))}" '
                      f'stroke-dasharray="{num(c.px(4))} {num(c.px(3))}"/>'
                      + c.text(x, y, f"largest ⌀ {show_length(f.measured or 0, plan.unit)}", 8,
                               fill=STYLE["fail"], halo=True) + "</g>")
            continue
        if f.outline:
            ring: BaseGeometry = Polygon(f.outline)
            label = f"⌀ {figure} turning"
        elif shape == "square":
            ring = Point(x, y).buffer(size / 2, cap_style="square")
            label = f"{figure} turning square"
        else:
            c.add(_t_marker(c, (x, y), f"T-shaped turning space, {figure}"))
            continue
        c.add(f'<g class="turning-space"><path d="{c.path_d(ring)}" fill="{STYLE["turning"]}" '
              f'fill-opacity="0.08" stroke="{STYLE["turning"]}" stroke-width="{num(c.px(1.8))}"/>'
              + c.text(x, y - size / 2 + c.px(9), label, 8, fill=STYLE["turning"], halo=True)
              + "</g>")


def _longest_sides(outline: Sequence[tuple[int, int]]) -> list[tuple[XY, XY]]:
    """The longest horizontal and the longest vertical wall of an outline."""
    best: dict[str, tuple[float, tuple[XY, XY]]] = {}
    for a, b in zip(outline, (*outline[1:], outline[0]), strict=True):
        key = "h" if a[1] == b[1] else "v" if a[0] == b[0] else ""
        length = math.dist(a, b)
        if key and length > best.get(key, (0.0, ((0, 0), (0, 0))))[0]:
            best[key] = (length, ((float(a[0]), float(a[1])), (float(b[0]), float(b[1]))))
    return [v[1] for v in best.values()]


def draw_dimensions(c: Canvas, plan: Plan, rules: RuleSet) -> None:
    """Use-zone depths and the longest wall of each room each way (layer ``dimensions``)."""
    specs = {s.id: s for s in resolve_pieces(plan, rules)}
    colour = STYLE["dimension"]
    for p in plan.furniture:
        if p.placement is None or p.id not in specs:
            continue
        for z, poly in use_zones(specs[p.id], p.placement):
            x0, y0, x1, y1 = poly.bounds
            dx, _ = side_direction(z.side, p.placement.rotation)
            a, b = (((x0, (y0 + y1) / 2), (x1, (y0 + y1) / 2)) if dx else
                    (((x0 + x1) / 2, y0), ((x0 + x1) / 2, y1)))
            unit = rules.get(z.rule).unit if rules.has(z.rule) else "mm"
            c.add(_dim(c, a, b, rule_figure(z.depth, unit, plan.unit), STYLE["zone.piece"],
                       "dim dim-zone"))
    for r in plan.rooms:
        poly = Polygon(r.outline)
        for a, b in _longest_sides(r.outline):
            # inside the room, 14 px off the wall
            ux, uy = (b[0] - a[0]) / math.dist(a, b), (b[1] - a[1]) / math.dist(a, b)
            n = (-uy, ux)
            mid = ((a[0] + b[0]) / 2 + n[0] * 5, (a[1] + b[1]) / 2 + n[1] * 5)
            if not poly.contains(Point(mid)):
                n = (uy, -ux)
            off = c.px(14)
            a2 = (a[0] + n[0] * off, a[1] + n[1] * off)
            b2 = (b[0] + n[0] * off, b[1] + n[1] * off)
            c.add(_dim(c, a2, b2, room_side(math.dist(a, b), plan.unit), colour, "dim dim-room"))
