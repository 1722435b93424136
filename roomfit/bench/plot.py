"""Charts of benchmark results, drawn to scale as SVG by our own code.

Two charts: time against the number of pieces (:func:`scaling_svg`) and, for the
certified-feasible corpus, the share of instances with a valid layout against time
(:func:`found_svg`). Times are on a logarithmic axis with a grid line at each power of ten;
shares on a linear axis from 0 to 100 %.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

__all__ = ["scaling_svg", "found_svg"]

_W, _H, _LEFT, _RIGHT, _TOP, _BOTTOM = 640, 400, 70, 170, 40, 50


def _esc(s: str) -> str:
    return s.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")


@dataclass
class _Frame:
    """The plot area of a chart and the SVG elements drawn so far."""

    title: str
    el: list[str] = field(default_factory=list)

    pw: float = _W - _LEFT - _RIGHT
    ph: float = _H - _TOP - _BOTTOM

    def __post_init__(self) -> None:
        self.el += [f'<svg xmlns="http://www.w3.org/2000/svg" width="{_W}" height="{_H}" '
                    f'viewBox="0 0 {_W} {_H}" font-family="sans-serif" font-size="11">',
                    f'<rect width="{_W}" height="{_H}" fill="white"/>',
                    f'<text x="{_LEFT}" y="22" font-size="14">{_esc(self.title)}</text>']

    def labels(self, x_label: str, y_label: str) -> None:
        """The plot area's border and the two axis labels."""
        mid = _TOP + self.ph / 2
        self.el += [f'<rect x="{_LEFT}" y="{_TOP}" width="{self.pw}" height="{self.ph}" '
                    f'fill="none" stroke="#333"/>',
                    f'<text x="{_LEFT + self.pw / 2}" y="{_H - 12}" text-anchor="middle">'
                    f'{_esc(x_label)}</text>',
                    f'<text x="16" y="{mid}" transform="rotate(-90 16 {mid})" '
                    f'text-anchor="middle">{_esc(y_label)}</text>']

    def legend(self, k: int, label: str, colour: str, dash: str) -> None:
        ly = _TOP + 16 + 20 * k
        x0 = _LEFT + self.pw + 14
        self.el += [f'<line x1="{x0}" y1="{ly}" x2="{x0 + 26}" y2="{ly}" stroke="{colour}" '
                    f'stroke-width="2" stroke-dasharray="{dash}"/>',
                    f'<text x="{x0 + 32}" y="{ly + 4}">{_esc(label)}</text>']

    def note(self, k: int, text: str) -> None:
        self.el.append(f'<text x="{_LEFT + self.pw + 14}" y="{_TOP + 90 + 14 * k}" '
                       f'fill="#555">{_esc(text)}</text>')

    def line(self, pts: list[tuple[float, float]], colour: str, dash: str) -> None:
        if len(pts) > 1:
            path = " ".join(f"{x:.1f},{y:.1f}" for x, y in pts)
            self.el.append(f'<polyline points="{path}" fill="none" stroke="{colour}" '
                           f'stroke-width="2" stroke-dasharray="{dash}"/>')

    def svg(self) -> str:
        return "\n".join([*self.el, "</svg>"]) + "\n"


@dataclass(frozen=True)
class _Log:
    """A logarithmic scale from ``lo`` to ``hi`` (powers of ten) onto ``a`` .. ``b`` px."""

    lo: float
    hi: float
    a: float
    b: float

    @staticmethod
    def around(values: list[float], a: float, b: float) -> _Log:
        lo = 10 ** math.floor(math.log10(max(min(values, default=0.01), 1e-3)))
        hi = 10 ** math.ceil(math.log10(max(max(values, default=1.0), lo * 10)))
        return _Log(lo, hi, a, b)

    def __call__(self, t: float) -> float:
        share = (math.log10(t) - math.log10(self.lo)) / (math.log10(self.hi) - math.log10(self.lo))
        return self.a + (self.b - self.a) * share

    def powers(self) -> list[float]:
        e, out = int(round(math.log10(self.lo))), []
        while 10 ** e <= self.hi * 1.0001:
            out.append(10.0 ** e)
            e += 1
        return out


def scaling_svg(points: list[dict[str, Any]], title: str = "Time against number of pieces") -> str:
    """Solver first valid, solver all candidates and baseline first valid against pieces (log
    time axis); points that found nothing are crosses at the top. Each solver point is
    labelled with its number of rooms."""
    f = _Frame(title)
    series = [("solver_first_s", "solver: first valid", "#1f6f8b", "none"),
              ("solver_all_s", "solver: all candidates", "#1f6f8b", "6 4"),
              ("baseline_first_s", "baseline: first valid", "#c0522b", "none")]
    y = _Log.around([p[k] for p in points for k, *_ in series if p.get(k)], _TOP + f.ph, _TOP)
    xmax = max((p["pieces"] for p in points), default=10)
    step = 10 if xmax > 20 else 2
    xs = (xmax // step + 1) * step  # room to the right of the last point

    def px(n: float) -> float:
        return _LEFT + f.pw * n / xs

    for t in y.powers():
        f.el += [f'<line x1="{_LEFT}" y1="{y(t):.1f}" x2="{_LEFT + f.pw}" y2="{y(t):.1f}" stroke="#ddd"/>',
                 f'<text x="{_LEFT - 6}" y="{y(t) + 4:.1f}" text-anchor="end">{t:g} s</text>']
    for n in range(0, xs + 1, step):
        f.el += [f'<line x1="{px(n):.1f}" y1="{_TOP + f.ph}" x2="{px(n):.1f}" y2="{_TOP + f.ph + 4}" '
                 f'stroke="#333"/>',
                 f'<text x="{px(n):.1f}" y="{_TOP + f.ph + 16}" text-anchor="middle">{n}</text>']
    f.labels("pieces (label: rooms)", "seconds (log)")
    for k, (key, label, colour, dash) in enumerate(series):
        pts = [(px(p["pieces"]), y(p[key]), p["rooms"]) for p in points if p.get(key)]
        f.line([(a, b) for a, b, _ in pts], colour, dash)
        for a, b, rooms in pts:
            f.el.append(f'<circle cx="{a:.1f}" cy="{b:.1f}" r="3.5" fill="{colour}"/>')
            if key == "solver_first_s":
                f.el.append(f'<text x="{a + 5:.1f}" y="{b - 5:.1f}" fill="#555">{rooms}</text>')
        for p in points:
            if not p.get(key):
                a, b = px(p["pieces"]), _TOP + 8 + 8 * k
                f.el.append(f'<path d="M{a - 4:.1f},{b - 4:.1f} l8,8 m0,-8 l-8,8" stroke="{colour}"/>')
        f.legend(k, label, colour, dash)
    f.note(0, "x at top: nothing")
    f.note(1, "valid in the budget")
    return f.svg()


def found_svg(series: list[tuple[str, list[float | None]]], limit: float, title: str) -> str:
    """Share of instances with a valid layout (y, 0 to 100 %) against seconds (x, log) for
    each method: a step up at each instance's first valid time, flat to ``limit`` after the
    last. ``series`` holds (label, first valid times, None where nothing was found)."""
    f = _Frame(title)
    colours = ["#1f6f8b", "#7a7a7a", "#c0522b", "#5b8c2a"]
    found = [t for _, ts in series for t in ts if t is not None]
    x = _Log.around([max(t, 1e-3) for t in found] + [limit], _LEFT, _LEFT + f.pw)

    def py(share: float) -> float:
        return _TOP + f.ph * (1 - share)

    for t in x.powers():
        f.el += [f'<line x1="{x(t):.1f}" y1="{_TOP}" x2="{x(t):.1f}" y2="{_TOP + f.ph}" stroke="#ddd"/>',
                 f'<text x="{x(t):.1f}" y="{_TOP + f.ph + 16}" text-anchor="middle">{t:g}</text>']
    for pct in range(0, 101, 20):
        f.el += [f'<line x1="{_LEFT}" y1="{py(pct / 100):.1f}" x2="{_LEFT + f.pw}" '
                 f'y2="{py(pct / 100):.1f}" stroke="#eee"/>',
                 f'<text x="{_LEFT - 6}" y="{py(pct / 100) + 4:.1f}" text-anchor="end">{pct} %</text>']
    xl = x(limit)
    f.el.append(f'<line x1="{xl:.1f}" y1="{_TOP}" x2="{xl:.1f}" y2="{_TOP + f.ph}" '
                f'stroke="#999" stroke-dasharray="2 3"/>')
    f.labels("seconds to the first valid layout (log)", "instances with a valid layout")
    for k, (label, times) in enumerate(series):
        colour, dash = colours[k % len(colours)], "none" if k == 0 else f"{2 + 2 * k} 3"
        ts = sorted(max(t, x.lo) for t in times if t is not None)
        n = max(len(times), 1)
        pts = [(x(x.lo), py(0.0))]
        for i, t in enumerate(ts):
            pts += [(x(t), py(i / n)), (x(t), py((i + 1) / n))]
        pts.append((xl, py(len(ts) / n)))
        f.line(pts, colour, dash)
        f.legend(k, f"{label}: {len(ts)} of {len(times)}", colour, dash)
    f.note(0, f"dotted line: the limit, {limit:g} s")
    return f.svg()
