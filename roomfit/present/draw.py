"""SVG drawings of a plan to scale: the building, furniture, what the rules ask, routes, marks.

The drawing's user units are millimetres (``viewBox`` in mm, 1 unit = 1 mm) with the plan's y
axis flipped so that north is up on screen. ``width``/``height`` attributes give the size in
pixels; text and line weights are set in pixels and converted, so labels read the same for a
studio and a large flat. The visual language (colours, line styles, symbols) and the layers
(:data:`~roomfit.present.clearances.LAYERS`) are explained in ``docs/drawing.md``; the
building is drawn by :mod:`roomfit.present.building`, the layers by
:mod:`roomfit.present.clearances`.

The output is a standalone SVG document without an XML declaration, so it can be written to a
file or embedded in an HTML page as it is.

>>> from roomfit.plan.data import Plan, Room
>>> from roomfit.rules.sets import load_ruleset
>>> plan = Plan("Box", (Room("r", "Room", "living", ((0, 0), (3000, 0), (3000, 2000), (0, 2000))),))
>>> svg = draw_svg(plan, load_ruleset("everyday"))
>>> svg.startswith("<svg") and "6.00 m²" in svg and 'id="layer-dimensions"' in svg
True
"""

from __future__ import annotations

import math
from collections.abc import Collection, Sequence
from xml.sax.saxutils import escape, quoteattr

from shapely import LineString, Polygon, box
from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from roomfit.audit.check import Finding
from roomfit.audit.geometry import (
    fixture_polygon,
    footprint_box,
    lies_flat,
    room_polygon,
    side_direction,
    use_zones,
)
from roomfit.audit.marks import Mark, Path
from roomfit.audit.routes import RouteScores, TripScore
from roomfit.caution import CAUTION
from roomfit.plan.data import Plan
from roomfit.plan.units import IMPERIAL, format_area, show_length
from roomfit.present import building, clearances
from roomfit.present.canvas import FONT, STYLE, Canvas, fit_label, middle, num, wrap
from roomfit.present.clearances import LAYERS
from roomfit.rules.catalog import resolve_pieces
from roomfit.rules.sets import RuleSet

__all__ = ["STYLE", "SCALE_BAR_MM", "EXTERIOR_WALL", "LAYERS", "draw_svg"]

#: Length of the scale bar (mm).
SCALE_BAR_MM = 1000
EXTERIOR_WALL = building.EXTERIOR_WALL

_MARGIN_MM = 500


def _draw_furniture(c: Canvas, plan: Plan, rules: RuleSet,
                    taken: dict[str, list[BaseGeometry]]) -> list[str]:
    """Draw placed pieces (their use zones are the ``zones`` layer); return the ids of pieces
    not placed. Adds each footprint to ``taken[room id]`` (keeps room labels off furniture)."""
    specs = {s.id: s for s in resolve_pieces(plan, rules)}
    missing = []
    pieces = []
    # rugs first, so the pieces standing on them are drawn on top
    for p in sorted(plan.furniture, key=lambda p: not lies_flat(specs[p.id])):
        pl = p.placement
        if pl is None:
            missing.append(p.id)
            continue
        spec = specs[p.id]
        x0, y0, x1, y1 = footprint_box(spec, pl)
        taken.setdefault(pl.room, []).append(box(x0, y0, x1, y1))
        dx, dy = side_direction("front", pl.rotation)
        # the front edge, its middle third drawn heavy
        front: list[tuple[float, float]]
        if dy:
            fy = y1 if dy > 0 else y0
            third = (x1 - x0) / 3
            front = [(x0 + third, fy), (x1 - third, fy)]
        else:
            fx = x1 if dx > 0 else x0
            third = (y1 - y0) / 3
            front = [(fx, y0 + third), (fx, y1 - third)]
        w, h = x1 - x0, y1 - y0
        label, size, vertical = fit_label(spec.label, p.id, w, h, c.upp)
        lock = " locked" if p.locked else ""
        pieces.append(
            f'<g class="piece{lock}" id={quoteattr("piece-" + p.id)}>'
            f'<rect x="{num(x0 - c.minx)}" y="{num(c.maxy - y1)}" width="{num(w)}" '
            f'height="{num(h)}" fill="{STYLE["piece"]}" stroke="{STYLE["piece.edge"]}" '
            f'stroke-width="{num(c.px(2.4 if p.locked else 1.2))}"/>'
            f'<polyline class="front" points="{c.pts(front)}" stroke="{STYLE["piece.edge"]}" '
            f'stroke-width="{num(c.px(4))}" fill="none"/>'
            + c.text((x0 + x1) / 2, (y0 + y1) / 2, label, size, rotate=vertical)
            + "</g>"
        )
    c.add('<g class="furniture">' + "".join(pieces) + "</g>")
    return missing


def _label_point(room: Polygon, taken: list[BaseGeometry]) -> tuple[float, float]:
    """Where a room's label goes: the middle of its largest free patch of floor."""
    free = room.difference(unary_union(taken)) if taken else room
    parts = [free] if isinstance(free, Polygon) else [
        g for g in getattr(free, "geoms", []) if isinstance(g, Polygon)]
    parts = [p for p in parts if p.area > 0]
    best = max(parts, key=lambda p: p.area) if parts else room
    lp = middle(best)
    return lp.x, lp.y


def _draw_room_labels(c: Canvas, plan: Plan, taken: dict[str, list[BaseGeometry]]) -> None:
    c.add('<g class="room-labels">')
    for r in plan.rooms:
        poly = room_polygon(r)
        x, y = _label_point(poly, taken.get(r.id, []))
        c.add(c.text(x, y + c.px(7), r.label, 11, weight="bold", halo=True, cls="room-label"))
        c.add(c.text(x, y - c.px(7), format_area(poly.area, plan.unit), 10, halo=True,
                     cls="room-area"))
    c.add("</g>")


def _as_trips(paths: Sequence[Path]) -> tuple[TripScore, ...]:
    """Bare drawn paths as trips (no narrowest place known), so one function draws routes."""
    return tuple(TripScore("", "", p.label, 0.0, p.night, True, points=p.points) for p in paths)


def _draw_marks(c: Canvas, marks: Sequence[Mark]) -> None:
    c.add('<g class="marks">')
    placed: list[tuple[float, float]] = []
    for i, m in enumerate(marks, start=1):
        colour = STYLE["fail"] if m.kind == "fail" else STYLE["note"]
        c.add(f'<g class="mark mark-{escape(m.kind)}">')
        where = m.where
        if len(m.outline) >= 3:
            poly = Polygon(m.outline)
            c.add(f'<polygon points="{c.pts(m.outline)}" fill="{colour}" fill-opacity="0.14" '
                  f'stroke="{colour}" stroke-width="{num(c.px(2.5))}"/>')
            if where is None and poly.is_valid and not poly.is_empty:
                rp = poly.representative_point()
                where = (rp.x, rp.y)
        if where is not None:
            sx, sy = c.pt(*where)
            r = c.px(8)
            while any(math.hypot(sx - ox, sy - oy) < 2 * r for ox, oy in placed):
                sx += 2.2 * r  # several marks at one point: set the discs side by side
            placed.append((sx, sy))
            c.add(f'<circle cx="{num(sx)}" cy="{num(sy)}" r="{num(r)}" fill="{colour}" '
                  f'stroke="{STYLE["paper"]}" stroke-width="{num(c.px(1.5))}"/>')
            c.add(c.text(sx, sy, str(i), 9, weight="bold", fill=STYLE["paper"], plan=False))
        c.add("</g>")
    c.add("</g>")


def _legend_lines(plan: Plan, marks: Sequence[Mark], trips: Sequence[TripScore],
                  missing: list[str], width_px: float) -> list[tuple[str, str, str]]:
    """(number, text, colour) rows for the legend under the plan."""
    rows: list[tuple[str, str, str]] = []
    for i, m in enumerate(marks, start=1):
        colour = STYLE["fail"] if m.kind == "fail" else STYLE["note"]
        for k, line in enumerate(wrap(m.label, width_px - 60, 10)):
            rows.append((str(i) if k == 0 else "", line, colour))
    for t in trips:
        if not t.reachable or len(t.points) < 2:
            continue
        length = LineString(t.points).length
        far = show_length(length, plan.unit) if plan.unit in IMPERIAL else f"{length / 1000:.1f} m"
        narrow = ("" if t.narrowest_mm is None else
                  f", narrowest {show_length(t.narrowest_mm, plan.unit)}")
        rows.append(("—", f"{t.name} ({'night, ' if t.night else ''}{far}{narrow})",
                     clearances.route_colour(t)))
    if missing:
        for line in wrap("Not placed: " + ", ".join(missing), width_px - 60, 10):
            rows.append(("", line, STYLE["faint"]))
    return rows


def _draw_legend(c: Canvas, rows: list[tuple[str, str, str]], top: float) -> float:
    """The legend rows from ``top`` (user units); returns where the next part starts."""
    c.add('<g class="legend">')
    y = top + c.px(4)
    for mark, s, colour in rows:
        if mark and mark != "—":
            c.add(f'<circle cx="{num(c.px(22))}" cy="{num(y + c.px(6))}" r="{num(c.px(7))}" '
                  f'fill="{colour}"/>')
            c.add(c.text(c.px(22), y + c.px(6), mark, 9, weight="bold", fill=STYLE["paper"],
                         plan=False))
        elif mark == "—":
            c.add(f'<line x1="{num(c.px(12))}" y1="{num(y + c.px(6))}" x2="{num(c.px(32))}" '
                  f'y2="{num(y + c.px(6))}" stroke="{colour}" stroke-width="{num(c.px(3))}"/>')
        c.add(c.text(c.px(40), y + c.px(6), s, 10, anchor="start", fill=colour, plan=False))
        y += c.px(17)
    c.add("</g>")
    return y + c.px(6)


def _title_block(c: Canvas, plan: Plan, rules: RuleSet, title: str | None, top: float,
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
            for part in wrap(s, column_px, size * (1.1 if weight == "bold" else 1.0))]
    caution = wrap(CAUTION, width_px - 2 * 14, 9)
    feet = plan.unit in IMPERIAL  # a plan measured in feet and inches gets a feet bar too
    rows = max(sum(1.25 if size > 12 else 1 for _, size, _ in left),
               len(right) + 2.2 + (1.8 if feet else 0))
    height = pad * 2 + rows * line + len(caution) * c.px(12) + c.px(6)
    c.add(f'<g class="title-block"><rect x="{num(c.px(6))}" y="{num(top)}" '
          f'width="{num(width - c.px(12))}" height="{num(height)}" fill="#ffffff" '
          f'stroke="{STYLE["ink"]}" stroke-width="{num(c.px(1.2))}"/>')
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
    c.add(f'<line x1="{num(c.px(6))}" y1="{num(y - c.px(8))}" x2="{num(width - c.px(6))}" '
          f'y2="{num(y - c.px(8))}" stroke="{STYLE["ink"]}" stroke-width="{num(c.px(0.6))}"/>')
    for s in caution:
        c.add(c.text(pad, y + c.px(4), s, 9, anchor="start", fill=STYLE["faint"], plan=False,
                     cls="caution"))
        y += c.px(12)
    c.add("</g>")
    return height


def _scale_bar_feet(c: Canvas, x: float, y: float) -> None:
    """A 3 ft bar (914.4 user units, 1 ft = 304.8 mm) with a tick every foot."""
    ft = 304.8
    parts = ['<g class="scale-bar-ft">',
             f'<line class="scale-bar-ft-line" x1="{num(x)}" y1="{num(y)}" '
             f'x2="{num(x + 3 * ft)}" y2="{num(y)}" stroke="{STYLE["ink"]}" '
             f'stroke-width="{num(c.px(2))}"/>']
    for k in range(4):
        parts.append(f'<line x1="{num(x + k * ft)}" y1="{num(y - c.px(5))}" '
                     f'x2="{num(x + k * ft)}" y2="{num(y)}" stroke="{STYLE["ink"]}" '
                     f'stroke-width="{num(c.px(1.2))}"/>')
        parts.append(c.text(x + k * ft, y + c.px(10), "3 ft" if k == 3 else str(k), 9,
                            plan=False))
    parts.append("</g>")
    c.add("".join(parts))


def _scale_bar(c: Canvas, x: float, y: float) -> None:
    """A bar of :data:`SCALE_BAR_MM` user units with ticks every 250 mm."""
    tick = c.px(5)
    sw = num(c.px(1.2))
    parts = ['<g class="scale-bar" id="scale-bar">',
             f'<line class="scale-bar-line" x1="{num(x)}" y1="{num(y)}" '
             f'x2="{num(x + SCALE_BAR_MM)}" y2="{num(y)}" stroke="{STYLE["ink"]}" '
             f'stroke-width="{num(c.px(2))}"/>']
    for k in range(5):
        tx = x + k * SCALE_BAR_MM / 4
        h = tick if k in (0, 2, 4) else tick * 0.6
        parts.append(f'<line x1="{num(tx)}" y1="{num(y - h)}" x2="{num(tx)}" y2="{num(y)}" '
                     f'stroke="{STYLE["ink"]}" stroke-width="{sw}"/>')
    for k, s in ((0, "0"), (2, "0.5"), (4, "1 m")):
        parts.append(c.text(x + k * SCALE_BAR_MM / 4, y + c.px(10), s, 9, plan=False))
    parts.append("</g>")
    c.add("".join(parts))


def _extent(plan: Plan, rules: RuleSet, marks: Sequence[Mark],
            trips: Sequence[TripScore]) -> tuple[float, float, float, float]:
    """Bounds (mm) of everything drawn on the plan: the rooms, and also placed pieces, their
    use zones, marks and routes that reach past the walls (a piece placed partly outside the
    flat, a zone through a wall), so that nothing is cut off at the drawing's edge."""
    shapes: list[BaseGeometry] = [room_polygon(r) for r in plan.rooms]
    specs = {s.id: s for s in resolve_pieces(plan, rules)}
    for p in plan.furniture:
        if p.placement is not None and p.id in specs:
            shapes.append(box(*footprint_box(specs[p.id], p.placement)))
            shapes += [z for _, z in use_zones(specs[p.id], p.placement)]
    points = [pt for m in marks for pt in m.outline] + [m.where for m in marks if m.where]
    points += [pt for t in trips for pt in t.points]
    minx, miny, maxx, maxy = unary_union(shapes).bounds
    for x, y in points:
        minx, miny, maxx, maxy = min(minx, x), min(miny, y), max(maxx, x), max(maxy, y)
    return minx, miny, maxx, maxy


def _layers(c: Canvas, plan: Plan, rules: RuleSet, show: Collection[str], where: str,
            findings: Sequence[Finding], trips: Sequence[TripScore]) -> None:
    """The rule layers that belong at this point of the drawing order (``below`` the
    furniture: zones; ``above`` the walls: the rest), each in its own group."""
    order = {"below": ("zones",), "above": ("turning", "routes", "dimensions")}[where]
    for name in order:
        if name not in show:
            continue
        clearances.open_layer(c, name)
        if name == "zones":
            clearances.draw_zones(c, plan, rules)
        elif name == "turning":
            clearances.draw_turning(c, plan, rules, findings)
        elif name == "routes":
            clearances.draw_routes(c, plan, trips)
        else:
            clearances.draw_dimensions(c, plan, rules)
        c.add("</g>")


def draw_svg(plan: Plan, rules: RuleSet, marks: Sequence[Mark] = (), paths: Sequence[Path] = (),
             title: str | None = None, width_px: int = 900, *, findings: Sequence[Finding] = (),
             routes: RouteScores | None = None, show: Collection[str] = LAYERS) -> str:
    """The plan drawn to scale as a standalone SVG document (no XML declaration).

    ``marks`` are numbered on the plan and listed in a legend below it. ``routes`` (the route
    scorer's result) draws each trip with its narrowest place; bare ``paths`` are drawn as
    routes when no ``routes`` are given. ``findings`` (the audit's) give the turning spaces
    found. ``show`` names the layers drawn (:data:`LAYERS`: zones, routes, turning,
    dimensions; all by default). ``title`` replaces the plan's name as the headline;
    ``width_px`` is the width in pixels, the height follows from the plan. Pieces without a
    placement are listed as not placed.
    """
    if not plan.rooms:
        raise ValueError("a plan needs at least one room to draw")
    unknown = set(show) - set(LAYERS)
    if unknown:
        raise ValueError(f"unknown layer {sorted(unknown)[0]!r}: choose from {', '.join(LAYERS)}")
    trips = routes.trips if routes is not None else _as_trips(paths)
    mass = building.wall_mass(plan)
    minx, miny, maxx, maxy = _extent(plan, rules, marks, trips)
    minx, miny = minx - EXTERIOR_WALL - _MARGIN_MM, miny - EXTERIOR_WALL - _MARGIN_MM
    maxx, maxy = maxx + EXTERIOR_WALL + _MARGIN_MM, maxy + EXTERIOR_WALL + _MARGIN_MM
    # room for the scale bar and labels in narrow plans
    maxx = max(maxx, minx + 6000)
    width = maxx - minx
    upp = width / width_px
    c = Canvas(minx, maxy, upp)
    c.add(building.defs(c))
    building.draw_rooms(c, plan)
    _layers(c, plan, rules, show, "below", findings, trips)
    taken: dict[str, list[BaseGeometry]] = {}
    for f in plan.fixtures:
        taken.setdefault(f.room, []).append(fixture_polygon(f))
    missing = _draw_furniture(c, plan, rules, taken)
    building.draw_fittings(c, plan)
    building.draw_walls(c, plan, mass)
    building.draw_openings(c, plan, rules, mass)
    _layers(c, plan, rules, show, "above", findings, trips)
    _draw_room_labels(c, plan, taken)
    _draw_marks(c, marks)
    top = maxy - miny
    rows = _legend_lines(plan, marks, trips if "routes" in show else (), missing, width_px)
    if rows:
        top = _draw_legend(c, rows, top)
    top += _title_block(c, plan, rules, title, top, width, width_px) + c.px(8)
    height = top
    c.parts.insert(1, f'<rect x="0" y="0" width="{num(width)}" height="{num(height)}" '
                      f'fill="{STYLE["paper"]}"/>')
    hpx = max(1, math.ceil(height / upp))
    head = (f'<svg xmlns="http://www.w3.org/2000/svg" width="{width_px}" height="{hpx}" '
            f'viewBox="0 0 {num(width)} {num(height)}" font-family="{FONT}" '
            f'class="roomfit-plan">')
    label = escape(title or plan.name or "plan")
    return head + f"<title>{label}</title>" + "".join(c.parts) + "</svg>\n"
