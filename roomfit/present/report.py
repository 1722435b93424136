"""The client report: one self-contained HTML page for one or more arrangements.

The page holds, for the client and their designer or therapist: the plan's name, client,
address, date and rule set; the caution; each arrangement drawn to scale (inline SVG from
:func:`roomfit.present.draw.draw_svg`) with its routine routes and failed rules marked; the metrics
table with the best value per metric marked; each trip's route; every rule finding with its
source. No scripts, no external files: it opens offline and prints as is.

PDF is not produced: no well-kept pure-Python library turns HTML with inline SVG into PDF
without heavy system packages. A browser's "print to PDF" gives one from this page.
"""

from __future__ import annotations

import datetime as _dt
import re
from html import escape

from roomfit.audit.check import AREA_RULES, Finding, marks_for
from roomfit.caution import CAUTION
from roomfit.plan.units import in_plan_units, show_measure
from roomfit.present.compare import METRICS, Better, Comparison, Row
from roomfit.present.draw import draw_svg

__all__ = ["PDF_NOTE", "build_report", "drawing"]

PDF_NOTE = ("This report is HTML only: no PDF is produced. Use the browser's print command "
            "to save it as PDF.")

_CSS = """
body{font-family:"DejaVu Sans",Helvetica,Arial,sans-serif;margin:24px;color:#1d2327;max-width:1400px}
h1{font-size:22px;margin:0 0 4px}h2{font-size:18px;margin:28px 0 8px;border-bottom:1px solid #c9ced3}
h3{font-size:15px;margin:18px 0 6px}.meta{color:#4a5359;margin:0 0 12px}
.caution{border:2px solid #8a5a00;background:#fff6e0;padding:8px 12px;margin:12px 0;font-weight:600}
.drawings{display:flex;flex-wrap:wrap;gap:16px}.drawings figure{flex:1 1 420px;margin:0;min-width:320px}
.drawings svg{width:100%;height:auto;border:1px solid #c9ced3}figcaption{font-weight:600;margin:4px 0}
table{border-collapse:collapse;margin:6px 0 12px;font-size:13px}
th,td{border:1px solid #c9ced3;padding:4px 8px;text-align:left;vertical-align:top}
th{background:#eef1f3}td.best{background:#e3f2e6;font-weight:700}
.fail{color:#a4161a;font-weight:700}.pass{color:#2b6a3a}.note{color:#4a5359;font-size:13px}
@media print{.drawings figure{break-inside:avoid}}
"""


def _unique_ids(svg: str, prefix: str) -> str:
    """Prefix every id in an SVG (and the references to it) so several drawings can share
    one page without clashing."""
    ids = set(re.findall(r'\bid="([^"]+)"', svg))
    for i in sorted(ids, key=len, reverse=True):
        svg = svg.replace(f'id="{i}"', f'id="{prefix}{i}"')
        svg = svg.replace(f"url(#{i})", f"url(#{prefix}{i})")
        svg = svg.replace(f'href="#{i}"', f'href="#{prefix}{i}"')
    return svg


def drawing(row: Row, index: int = 0) -> str:
    """The arrangement drawn to scale with its routes and failed rules marked (inline SVG)."""
    svg = draw_svg(row.plan, row.rules, marks=marks_for(row.audit), routes=row.routes,
                   findings=row.audit.findings, title=row.name)
    return _unique_ids(svg, f"a{index}-")


def _metrics_table(cmp: Comparison) -> str:
    head = "".join(f"<th>{escape(r.name)}</th>" for r in cmp.rows)
    out = [f"<table class='metrics'><tr><th>Metric</th>{head}</tr>",
           "<tr><td>Rule set</td>" + "".join(f"<td>{escape(r.rules.id)} ({escape(r.rules.label)})"
                                             "</td>" for r in cmp.rows) + "</tr>",
           "<tr><td>The idea</td>" + "".join(f"<td>{escape(r.idea)}</td>" for r in cmp.rows)
           + "</tr>"]
    for m in METRICS:
        cells = []
        for i, r in enumerate(cmp.rows):
            best = cmp.is_best(m.id, i)
            text = escape(r.text(m.id)) + (" &#9733; best" if best else "")
            cells.append(f"<td class='best'>{text}</td>" if best else f"<td>{text}</td>")
        better = "lower is better" if m.better == Better.LOWER else "higher is better"
        out.append(f"<tr><td>{escape(m.label)} <span class='note'>({better})</span></td>"
                   + "".join(cells) + "</tr>")
    out.append("</table>")
    return "\n".join(out)


def _routes_table(row: Row) -> str:
    rs, unit = row.routes, row.plan.unit
    out = ["<table class='routes'><tr><th>Trip</th><th>Per day</th><th>Length</th>"
           "<th>Metres a day</th><th>Narrowest</th><th>Where</th><th>Turns</th>"
           "<th>Doorways</th><th>Notes</th></tr>"]
    for t in rs.trips:
        name = escape(t.name) + (" (night)" if t.night else "")
        if not t.reachable or t.length_mm is None:
            out.append(f"<tr><td>{name}</td><td>{t.per_day:g}</td><td colspan='6' class='fail'>"
                       f"unreachable</td><td>{escape(t.reason)}</td></tr>")
            continue
        where = "-" if t.narrowest_at is None else (
            in_plan_units(f"({t.narrowest_at[0]:.0f}, {t.narrowest_at[1]:.0f})", unit)
            + " between " + " and ".join(t.narrowest_between))
        out.append(
            f"<tr><td>{name}</td><td>{t.per_day:g}</td><td>{t.length_mm / 1000:.2f} m</td>"
            f"<td>{t.metres_per_day:.1f} m</td><td>{show_measure(t.narrowest_mm, unit)}</td>"
            f"<td>{escape(where)}</td>"
            f"<td>{t.turns}</td><td>{escape(', '.join(t.doors)) or '-'}</td>"
            f"<td>{escape('; '.join(t.flags))}</td></tr>")
    out.append("</table>")
    notes = [f"Route width {rs.route_width} mm (rule set {escape(row.rules.id)}); walking "
             f"{rs.walking_m_per_day:.1f} m a day over the reachable trips."]
    if rs.defaults:
        notes.append("The plan lists no daily routine: default trips are assumed."
                     if rs.trips else "The plan lists no daily routine and no default trip "
                     "applies (they join a placed bed to a WC, or a kitchen to the entrance, a "
                     "placed table or sofa).")
    return "\n".join(out) + "".join(f"<p class='note'>{n}</p>" for n in notes)


def _finding_row(f: Finding, unit: str) -> str:
    """One finding as a table row, in the plan's own units (feet and inches for in/ft)."""
    state = "<span class='pass'>pass</span>" if f.ok else "<span class='fail'>FAIL</span>"
    area = f.rule in AREA_RULES
    required = "none" if area and f.required == 0 else show_measure(f.required, unit, area=area)
    return (f"<tr><td>{escape(f.rule)}</td><td>{state}</td>"
            f"<td>{escape(in_plan_units(f.message, unit))}</td>"
            f"<td>{escape(show_measure(f.measured, unit, area=area))}</td>"
            f"<td>{escape(required)}</td><td>{escape(f.source) or 'geometry'}</td></tr>")


def _findings(row: Row) -> str:
    head = ("<tr><th>Rule</th><th>Result</th><th>Finding</th><th>Measured</th>"
            "<th>Required</th><th>Source</th></tr>")
    fails = [f for f in row.audit.findings if not f.ok]
    passes = [f for f in row.audit.findings if f.ok]
    unit = row.plan.unit
    out = [f"<p>{len(fails)} of {len(row.audit.findings)} checks fail.</p>"]
    if fails:
        out.append("<table class='findings'>" + head + "".join(_finding_row(f, unit) for f in fails)
                   + "</table>")
    if passes:
        out.append(f"<details><summary>{len(passes)} checks pass</summary>"
                   "<table class='findings'>" + head + "".join(_finding_row(f, unit) for f in passes)
                   + "</table></details>")
    return "\n".join(out)


def _quality(row: Row) -> str:
    """Each group rule and preference of the layout-quality audit: measured value, target,
    result and source (advisory; failures first)."""
    if not row.quality:
        return "<p>No functional group to measure (no bed, seat, table or desk placed).</p>"
    out = ["<table class='findings'><tr><th>Check</th><th>Kind</th><th>Measured</th>"
           "<th>Target</th><th>Result</th><th>Source</th></tr>"]
    for c in sorted(row.quality, key=lambda c: (c.ok, str(c.kind))):
        state = "<span class='pass'>met</span>" if c.ok else "<span class='fail'>not met</span>"
        out.append(f"<tr><td>{escape(c.label)}</td><td>{escape(str(c.kind))}</td>"
                   f"<td>{escape(c.shown)}</td><td>{escape(c.target)}</td><td>{state}</td>"
                   f"<td>{escape(c.source)}</td></tr>")
    out.append("</table>")
    return "\n".join(out)


def build_report(comparison: Comparison, *, title: str | None = None,
                 date: _dt.date | None = None) -> str:
    """The client report for the arrangements of ``comparison`` as one HTML page.

    The caution (``roomfit.caution.CAUTION``) is printed at the top and the bottom and in
    each drawing's title block; ``date`` defaults to today. Areas in findings are shown in cm2.
    """
    rows = comparison.rows
    first = rows[0].plan
    heading = title or (f"Furniture arrangements for {first.name}" if len(rows) > 1
                        else f"Furniture arrangement for {first.name}")
    day = (date or _dt.date.today()).isoformat()
    meta = [f"Plan: {escape(first.name)}"]
    if first.client:
        meta.append(f"Client: {escape(first.client)}")
    if first.address:
        meta.append(f"Address: {escape(first.address)}")
    meta.append(f"Date: {day}")
    meta.append("Rule set: " + escape(", ".join(sorted({f"{r.rules.id} ({r.rules.label})"
                                                         for r in rows}))))
    figures = "\n".join(f"<figure><figcaption>{escape(r.name)}</figcaption>{drawing(r, i)}"
                        "</figure>" for i, r in enumerate(rows))
    parts = [
        "<!DOCTYPE html>",
        "<html lang='en'><head><meta charset='utf-8'>",
        f"<title>{escape(heading)}</title><style>{_CSS}</style></head><body>",
        f"<h1>{escape(heading)}</h1>",
        f"<p class='meta'>{' &middot; '.join(meta)}</p>",
        f"<p class='caution'>{escape(CAUTION)}</p>",
        "<h2>Drawings</h2>",
        "<p class='note'>Drawn to scale (see each drawing's scale bar); routine routes drawn as "
        "lines, failed rules marked.</p>",
        f"<div class='drawings'>{figures}</div>",
        "<h2>Metrics</h2>",
        _metrics_table(comparison),
    ]
    for r in rows:
        parts.append(f"<h2>{escape(r.name)}</h2>")
        if r.plan.name != first.name:
            parts.append(f"<p class='meta'>Plan: {escape(r.plan.name)}</p>")
        parts.append("<h3>Daily routes</h3>")
        parts.append(_routes_table(r))
        parts.append("<h3>Rule findings</h3>")
        parts.append(_findings(r))
        parts.append("<h3>Layout quality (advisory)</h3>")
        parts.append(_quality(r))
    parts += [f"<p class='caution'>{escape(CAUTION)}</p>",
              f"<p class='note'>{escape(PDF_NOTE)}</p>", "</body></html>"]
    return "\n".join(parts) + "\n"
