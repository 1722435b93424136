"""The drawing sheet every SVG part is drawn on: plan-to-sheet coordinates, our colours, text
that fits, and the few shape helpers the parts share.

The sheet's user units are millimetres with the plan's y axis flipped (north up). Text sizes
and line weights are given in output pixels and converted with :meth:`Canvas.px`, so labels
read the same for a studio and a large flat.

>>> c = Canvas(minx=-500, maxy=3000, upp=10)
>>> c.pt(0, 0)
(500, 3000)
>>> c.px(2)
20
>>> num(12.04), num(-0.01)
('12', '0')
"""

from __future__ import annotations

import textwrap
from collections.abc import Sequence
from xml.sax.saxutils import escape

from shapely import Point, Polygon
from shapely.geometry.base import BaseGeometry
from shapely.ops import polylabel

__all__ = ["STYLE", "FONT", "Canvas", "num", "fit_label", "middle", "wrap", "inward", "band"]

#: Our colours (see docs/drawing.md).
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
    "approach": "#3f8f6b",
    "turning": "#1f7a8c",
    "dimension": "#55585f",
    "window": "#5a8fb8",
    "fail": "#cf3a2c",
    "note": "#c98700",
    "path": "#2b63a6",
    "path.night": "#5a3f9c",
    "faint": "#77787c",
}

FONT = "DejaVu Sans, Helvetica, Arial, sans-serif"

XY = tuple[float, float]


def num(v: float) -> str:
    """Compact number for SVG attributes: 0.1 mm precision."""
    s = f"{v:.1f}"
    s = s.rstrip("0").rstrip(".") if "." in s else s
    return "0" if s in ("-0", "") else s


class Canvas:
    """Maps plan coordinates (mm, y up) to SVG user units (mm, y down) and collects elements.

    ``upp`` is user units (mm) per output pixel.
    """

    def __init__(self, minx: float, maxy: float, upp: float) -> None:
        self.minx, self.maxy, self.upp = minx, maxy, upp
        self.parts: list[str] = []

    def px(self, pixels: float) -> float:
        """A length given in output pixels, in user units."""
        return pixels * self.upp

    def pt(self, x: float, y: float) -> XY:
        return x - self.minx, self.maxy - y

    def pts(self, coords: Sequence[Sequence[float]]) -> str:
        return " ".join(f"{num(a)},{num(b)}" for a, b in (self.pt(c[0], c[1]) for c in coords))

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

    def line(self, a: XY, b: XY, colour: str, width_px: float, cls: str = "", dash: str = "") -> str:
        """A straight line between two plan points."""
        (x1, y1), (x2, y2) = self.pt(*a), self.pt(*b)
        extra = f' class="{cls}"' if cls else ""
        extra += f' stroke-dasharray="{dash}"' if dash else ""
        return (f'<line x1="{num(x1)}" y1="{num(y1)}" x2="{num(x2)}" y2="{num(y2)}" '
                f'stroke="{colour}" stroke-width="{num(self.px(width_px))}"{extra}/>')

    def text(self, x: float, y: float, s: str, size_px: float, *, anchor: str = "middle",
             weight: str = "normal", fill: str = STYLE["ink"], halo: bool = False,
             rotate: bool = False, plan: bool = True, cls: str = "") -> str:
        """A text element; (x, y) in plan coordinates when ``plan`` else in user units."""
        sx, sy = self.pt(x, y) if plan else (x, y)
        size = self.px(size_px)
        attrs = [f'x="{num(sx)}"', f'y="{num(sy + size * 0.35)}"', f'font-size="{num(size)}"',
                 f'text-anchor="{anchor}"', f'fill="{fill}"']
        if weight != "normal":
            attrs.append(f'font-weight="{weight}"')
        if halo:
            attrs.append(f'stroke="{STYLE["paper"]}" stroke-width="{num(self.px(3))}" '
                         'stroke-linejoin="round" paint-order="stroke"')
        if rotate:
            attrs.append(f'transform="rotate(-90 {num(sx)} {num(sy)})"')
        if cls:
            attrs.append(f'class="{cls}"')
        return f"<text {' '.join(attrs)}>{escape(s)}</text>"


def fit_label(label: str, short: str, w: float, h: float, upp: float) -> tuple[str, float, bool]:
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


def middle(poly: Polygon) -> Point:
    """A label point: the point farthest from the edges (``polylabel``), or the centroid when
    that is as far (a long strip has a whole line of farthest points, and ``polylabel`` may
    pick one near an end, pushing a centred label past the shape)."""
    lp = polylabel(poly, tolerance=10)
    cen = poly.centroid
    edge = poly.exterior
    if poly.contains(cen) and edge.distance(cen) >= edge.distance(lp) - 10:
        return cen
    return lp


def wrap(s: str, width_px: float, size_px: float) -> list[str]:
    """``s`` in lines that fit ``width_px`` at ``size_px`` (an average glyph is 0.56 em)."""
    return textwrap.wrap(s, max(20, int(width_px / (size_px * 0.56)))) or [""]


def inward(poly: Polygon, at: XY, u: XY) -> XY:
    """Unit normal to the wall direction ``u`` at ``at`` pointing into ``poly``."""
    n = (-u[1], u[0])
    return n if poly.contains(Point(at[0] + n[0] * 5, at[1] + n[1] * 5)) else (-n[0], -n[1])


def band(at: XY, u: XY, out: XY, half: float, inner: float, outer: float) -> list[XY]:
    """Corners of the rectangle along a wall: ``-half..half`` along u, ``-inner..outer`` along out."""
    def p(s: float, t: float) -> XY:
        return (at[0] + u[0] * s + out[0] * t, at[1] + u[1] * s + out[1] * t)
    return [p(-half, -inner), p(half, -inner), p(half, outer), p(-half, outer)]
