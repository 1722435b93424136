"""roomfit's page for planning with the client at the table.

Run from the repository root::

    streamlit run app.py

The page holds layout only: reading plans, editing the furniture list, auditing, solving,
drawing and reports all call the library functions the ``roomfit`` command uses (through
:mod:`roomfit.page` where the page needs a small function of its own). The plan being edited
lives in ``st.session_state["plan"]``; a bad upload or a bad value shows a message and leaves
it as it was.
"""

from __future__ import annotations

import logging
import time
from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import replace
from pathlib import Path
from typing import Any

import streamlit as st

from roomfit import page, page_ifc
from roomfit.audit.geometry import room_polygon
from roomfit.audit.quality import quality_record
from roomfit.caution import CAUTION
from roomfit.errors import RoomfitError
from roomfit.plan.data import Plan
from roomfit.plan.ifc_import import fix_door, plan_text
from roomfit.plan.read import read_plan
from roomfit.plan.write import dumps_plan
from roomfit.present import compare, draw, report
from roomfit.rules.catalog import load_catalog, resolve_pieces
from roomfit.rules.sets import RuleSet, load_ruleset, rules_for, ruleset_ids
from roomfit.solve import search as solver

ROOT = Path(__file__).resolve().parent
PLANS = ROOT / "plans"
DEFAULT_SAMPLE = "studio.toml"  # the smallest sample opens first
LOG = logging.getLogger("roomfit.app")


_CSS = """
<style>
.rf-drawing svg { max-width: 100%; height: auto; }
.rf-caution { border-left: 4px solid #b5651d; background: #fbf4ec; padding: 0.5rem 0.8rem;
              font-size: 0.9rem; color: #4a3520; margin: 0.5rem 0 1rem 0; }
</style>
"""


# ---------------------------------------------------------------------------------------------
# state


def _state() -> Any:
    return st.session_state


def _set_plan(plan: Plan, origin: str) -> None:
    s = _state()
    s["plan"] = plan
    s["origin"] = origin
    s["gen"] = s.get("gen", 0) + 1  # fresh form widgets for a newly opened plan
    s["solved"] = None
    s["edit_error"] = None
    placed = sum(p.placement is not None for p in plan.furniture)
    s["notice"] = ("top", f"Opened {origin}: {len(plan.furniture)} pieces, {placed} with a place"
                   + (" (see Check as it stands)." if placed else "."))


def _init() -> None:
    s = _state()
    for key, value in (("plan", None), ("origin", ""), ("solved", None), ("upload_id", None),
                       ("upload_error", []), ("edit_error", None), ("notice", None)):
        s.setdefault(key, value)
    if s["plan"] is None:
        samples = page.sample_files(PLANS)
        first = PLANS / DEFAULT_SAMPLE if (PLANS / DEFAULT_SAMPLE).exists() else None
        if samples:
            first = first or samples[0]
            try:
                _set_plan(read_plan(first), f"sample {first.name}")
            except RoomfitError as e:
                s["upload_error"] = page.error_lines(e)


def _k(name: str, item: str) -> str:
    """Key of a widget that belongs to one opened plan (``gen`` changes when one is opened)."""
    return f"{name}_{_state().get('gen', 0)}_{item}"


def _edit(func: Any, *args: Any, where: str, notice: str, **kwargs: Any) -> None:
    """Apply an edit to the plan; on a bad value keep the plan and say what is wrong.

    ``where`` names the tab that shows the outcome, so the message appears beside the form
    the user just used.
    """
    s = _state()
    try:
        new = func(s["plan"], *args, **kwargs)
    except RoomfitError as e:
        s["edit_error"] = (where, page.error_lines(e))
        return
    s["plan"] = new
    s["edit_error"] = None
    s["notice"] = (where, notice)


def _messages(where: str) -> None:
    """The outcome of the last edit, shown once, in the part of the page it came from."""
    s = _state()
    note, err = s.get("notice"), s.get("edit_error")
    if note and note[0] == where:
        st.success(note[1])
        s["notice"] = None
    if err and err[0] == where:
        st.error("That change was not made; the plan stays as it was.\n\n" + "\n\n".join(err[1]))


@contextmanager
def _panel(name: str) -> Iterator[None]:
    """Show a problem in one panel as a message; the rest of the page keeps running."""
    try:
        yield
    except RoomfitError as e:
        st.error("\n\n".join(page.error_lines(e)))
    except Exception as e:  # noqa: BLE001 - never show a traceback, keep the page running
        LOG.exception("panel %s failed", name)
        st.error(f"The {name} panel ran into a problem it could not handle ({type(e).__name__}: "
                 f"{e}). Your plan and edits are kept.")


def _caution() -> None:
    st.markdown(f'<div class="rf-caution">{CAUTION}</div>', unsafe_allow_html=True)


def _show_svg(svg: str) -> None:
    body = svg[svg.find("<svg"):] if "<svg" in svg else svg
    st.markdown(f'<div class="rf-drawing">{" ".join(body.splitlines())}</div>',
                unsafe_allow_html=True)


# ---------------------------------------------------------------------------------------------
# callbacks (run before the page is drawn again)


def _open_sample() -> None:
    s = _state()
    path = PLANS / s["sample_choice"]
    try:
        _set_plan(read_plan(path), f"sample {path.name}")
        s["upload_error"] = []
    except RoomfitError as e:
        s["upload_error"] = page.error_lines(e)


def _take_upload() -> None:
    s = _state()
    up = s.get("upload")
    if up is None:
        return
    s["upload_id"] = up.file_id
    try:
        _set_plan(page.plan_from_upload(up.name, up.getvalue()), f"upload {up.name}")
        s["upload_error"] = []
    except RoomfitError as e:
        s["upload_error"] = page.error_lines(e)


def _add_piece() -> None:
    s = _state()
    t = s["add_type"]
    _edit(page.add_piece, t, s[_k("add_rooms", t)], s[_k("add_label", t)], s[_k("add_w", t)],
          s[_k("add_d", t)], s[_k("add_h", t)], _access(s.get(_k("add_access", t))),
          where="furniture", notice="Piece added.")


def _access(choice: str | None) -> str | None:
    return None if choice in (None, "as the catalogue says") else choice


def _change_piece() -> None:
    s = _state()
    pid = s["edit_piece"]
    _edit(page.update_piece, pid, label=s[_k("ed_label", pid)], rooms=s[_k("ed_rooms", pid)],
          width=s[_k("ed_w", pid)], depth=s[_k("ed_d", pid)], height=s[_k("ed_h", pid)],
          access=_access(s.get(_k("ed_access", pid))), where="furniture",
          notice=f"{pid} changed.")


def _remove_piece() -> None:
    pid = _state()["edit_piece"]
    _edit(page.remove_piece, pid, where="furniture", notice=f"{pid} removed.")


def _toggle_lock() -> None:
    s = _state()
    pid = s["edit_piece"]
    piece = s["plan"].piece(pid)
    _edit(page.lock_piece, pid, not piece.locked, where="furniture",
          notice=f"{pid} {'unlocked' if piece.locked else 'locked where it stands'}.")


def _pick_ruleset() -> None:
    s = _state()
    plan: Plan = s["plan"]
    _edit(page.with_rule_choice, s["rule_set"], plan.rules.override_map(), where="rules",
          notice=f"Rule set {s['rule_set']} chosen.")
    if s["edit_error"]:
        # the plan's overrides do not fit the new set: pick it without them
        _edit(page.with_rule_choice, s["rule_set"], {}, where="rules",
              notice=f"Rule set {s['rule_set']} chosen; the earlier overrides did not apply.")


def _apply_overrides() -> None:
    s = _state()
    plan: Plan = s["plan"]
    base = load_ruleset(plan.rules.set)
    overrides = dict(plan.rules.override_map())
    for rid in page.OVERRIDABLE:
        value = s.get(f"ov_{plan.rules.set}_{rid}")
        if value is None or not base.has(rid):
            continue
        if int(value) == base.mm(rid):
            overrides.pop(rid, None)
        else:
            overrides[rid] = int(value)
    shape = s.get(f"ov_{plan.rules.set}_turning.shape")
    if shape is not None:
        if shape == base.text("turning.shape"):
            overrides.pop("turning.shape", None)
        else:
            overrides["turning.shape"] = shape
    _edit(page.with_rule_choice, plan.rules.set, overrides, where="rules",
          notice="Rule values applied.")


def _clear_overrides() -> None:
    plan: Plan = _state()["plan"]
    _edit(page.with_rule_choice, plan.rules.set, {}, where="rules", notice="Overrides cleared.")


def _keep(index: int) -> None:
    s = _state()
    result = s["solved"]["result"]
    cand = result.candidates[index]
    _edit(page.keep_layout, cand.layout, where="arrangements",
          notice=f"Arrangement {index + 1} kept: every piece now has a place; lock the ones "
          "that should stay, or check it as it stands.")


# ---------------------------------------------------------------------------------------------
# panels


def _sidebar() -> None:
    s = _state()
    sb = st.sidebar
    sb.header("Apartment")
    names = [p.name for p in page.sample_files(PLANS)]
    if names:
        if s.get("sample_choice") not in names:
            s["sample_choice"] = DEFAULT_SAMPLE if DEFAULT_SAMPLE in names else names[0]
        sb.selectbox("Bundled sample", names, key="sample_choice")
        sb.button("Open this sample", key="open_sample", on_click=_open_sample)
    up = sb.file_uploader("Or bring a plan file (.toml)", type=["toml"], key="upload")
    if up is not None and up.file_id != s["upload_id"]:
        _take_upload()
    if s["upload_error"]:
        sb.error("That file could not be opened; the plan you had stays open.\n\n"
                 + "\n\n".join(s["upload_error"]))
    plan: Plan | None = s["plan"]
    if plan is not None:
        sb.caption(f"Open: {plan.name or '(no name)'} — from {s['origin']}")
        sb.download_button("Save the plan as edited (.toml)", dumps_plan(plan),
                           file_name=f"{page.file_stem(plan)}.toml", mime="application/toml",
                           key="save_plan")


def _overview(plan: Plan, rules: RuleSet) -> None:
    st.subheader(plan.name or "Plan")
    who = " · ".join(x for x in (plan.client, plan.address) if x)
    if who:
        st.caption(who)
    cols = st.columns(5)
    cols[0].metric("Rooms", len(plan.rooms))
    cols[1].metric("Doors", len(plan.doors))
    cols[2].metric("Windows", len(plan.windows))
    cols[3].metric("Pieces", len(plan.furniture))
    cols[4].metric("Placed", sum(p.placement is not None for p in plan.furniture))
    left, right = st.columns([3, 2])
    with right:
        st.dataframe([{"room": r.id, "name": r.label, "use": r.use,
                       "area (m²)": round(room_polygon(r).area / 1e6, 2)} for r in plan.rooms],
                     hide_index=True)
        st.caption("Furniture is drawn where the plan puts it; the Furniture tab lists it.")
    with left:
        _show_svg(_memo("overview", plan, lambda: draw.draw_svg(plan, rules, title=plan.name)))


def _furniture(plan: Plan, rules: RuleSet) -> None:
    s = _state()
    st.dataframe(page.piece_rows(plan, rules), hide_index=True)
    rooms = [r.id for r in plan.rooms]
    labels = {r.id: f"{r.label} ({r.id})" for r in plan.rooms}
    left, right = st.columns(2)
    with left:
        st.markdown("**Add a piece**")
        choices = dict(page.type_choices())
        t = st.selectbox("Kind", list(choices), format_func=lambda k: choices[k], key="add_type")
        cat = load_catalog()
        d = cat.get(t)
        with st.form(_k("add_form", t), border=True):
            st.text_input("Name (optional)", key=_k("add_label", t))
            st.multiselect("May stand in", rooms, default=rooms[:1], format_func=labels.get,
                           key=_k("add_rooms", t))
            c1, c2, c3 = st.columns(3)
            c1.number_input("Width mm", 0, 20000, d.width if d else 0, step=10, key=_k("add_w", t))
            c2.number_input("Depth mm", 0, 20000, d.depth if d else 0, step=10, key=_k("add_d", t))
            c3.number_input("Height mm", 0, 5000, d.height if d else 0, step=10, key=_k("add_h", t))
            if d is not None and d.category == "bed":
                st.selectbox("Free long sides", ["as the catalogue says", "both", "left", "right"],
                             key=_k("add_access", t))
            if d is not None:
                st.caption(f"Catalogue size: {d.width} x {d.depth} x {d.height} mm — {d.source}")
            else:
                st.caption("A custom piece: enter its sizes from a tape measure. It keeps no use "
                           "zone free and may stand anywhere in its rooms.")
            st.form_submit_button("Add to the list", on_click=_add_piece)
    with right:
        st.markdown("**Change a piece**")
        if not plan.furniture:
            st.caption("The list is empty.")
        else:
            ids = [p.id for p in plan.furniture]
            if s.get("edit_piece") not in ids:
                s["edit_piece"] = ids[0]
            pid = st.selectbox("Piece", ids, key="edit_piece")
            p = plan.piece(pid)
            spec = {x.id: x for x in resolve_pieces(plan, rules)}[pid]
            with st.form(_k("edit_form", pid), border=True):
                st.text_input("Name", value=p.label, placeholder=spec.label,
                              key=_k("ed_label", pid))
                st.multiselect("May stand in", rooms, default=list(p.rooms),
                               format_func=labels.get, key=_k("ed_rooms", pid))
                c1, c2, c3 = st.columns(3)
                c1.number_input("Width mm", 0, 20000, spec.width, step=10, key=_k("ed_w", pid))
                c2.number_input("Depth mm", 0, 20000, spec.depth, step=10, key=_k("ed_d", pid))
                c3.number_input("Height mm", 0, 5000, spec.height, step=10, key=_k("ed_h", pid))
                if spec.category == "bed":
                    opts = ["as the catalogue says", "both", "left", "right"]
                    st.selectbox("Free long sides", opts, index=opts.index(p.access or opts[0]),
                                 key=_k("ed_access", pid))
                st.form_submit_button("Apply changes", on_click=_change_piece)
            b1, b2 = st.columns(2)
            if p.placement is None:
                b1.caption("No place yet: keep an arrangement to lock it.")
            else:
                b1.button("Unlock" if p.locked else "Lock where it stands", key="lock_piece",
                          on_click=_toggle_lock)
            b2.button("Remove from the list", key="remove_piece", on_click=_remove_piece)


def _rules(plan: Plan, rules: RuleSet) -> None:
    ids = ruleset_ids()
    sets = {i: load_ruleset(i).label for i in ids}
    if _state().get("rule_set") != plan.rules.set:
        _state()["rule_set"] = plan.rules.set
    st.selectbox("Rule set that governs the client's home", ids, format_func=lambda i: sets[i],
                 key="rule_set", on_change=_pick_ruleset)
    st.caption(rules.description)
    with st.form(f"override_form_{plan.rules.set}", border=True):
        st.markdown("**Values for this client** (mm; a value equal to the set's own is not an "
                    "override)")
        cols = st.columns(len(page.OVERRIDABLE) + 1)
        for col, rid in zip(cols, page.OVERRIDABLE, strict=False):
            if not rules.has(rid):
                continue
            r = rules.get(rid)
            col.number_input(r.description, 0, 5000, r.mm, step=10,
                             key=f"ov_{plan.rules.set}_{rid}")
            col.caption(("Overridden for this client. Set's value from: " if r.overridden
                         else "Source: ") + r.source)
        shape = rules.get("turning.shape")
        shapes = ["circle", "square", "circle-or-t"]
        cols[-1].selectbox("Turning space shape", shapes,
                           index=shapes.index(str(shape.value)) if shape.value in shapes else 0,
                           key=f"ov_{plan.rules.set}_turning.shape")
        cols[-1].caption(("Overridden. " if shape.overridden else "Source: ") + shape.source)
        st.form_submit_button("Apply values", on_click=_apply_overrides)
    if rules.overridden:
        st.warning("Overridden for this client: " + ", ".join(
            f"{r.id} = {r.value} {r.unit if r.unit != 'text' else ''}".strip()
            for r in rules.overridden))
        st.button("Back to the set's own values", key="clear_overrides", on_click=_clear_overrides)
    st.dataframe(page.rule_rows(rules), hide_index=True)


def _memo(name: str, key: Any, compute: Any) -> Any:
    """``compute()`` kept in the session while ``key`` (a plan, say) stays the same, so that
    redrawing the page after a click does not audit and draw everything again."""
    s = _state()
    held = s.get(f"memo_{name}")
    if held is None or held[0] != key:
        held = (key, compute())
        s[f"memo_{name}"] = held
    return held[1]


def _present(row: Any, index: int) -> dict[str, Any]:
    """One arrangement, audited, routed and measured (a ``compare.Row``), with its drawing
    (routes drawn, failures marked; ids prefixed by ``index``) and its client report."""
    single = compare.Comparison((row,), ())
    title = f"{row.plan.name}: {row.name}"
    return {"row": row, "svg": report.drawing(row, index),
            "report": report.build_report(single, title=title)}


def _solve(plan: Plan, rules: RuleSet) -> None:
    s = _state()
    c1, c2, c3 = st.columns(3)
    n = c1.slider("How many arrangements", 2, 4, 3, key="n_candidates")
    limit = c2.slider("Time limit (s)", 5, 120, 20, step=5, key="time_limit")
    seed = c3.number_input("Seed", 0, 10_000, 0, key="seed",
                           help="The same seed and time limit give the same arrangements.")
    locked = [p.id for p in plan.furniture if p.locked]
    st.caption(f"{len(plan.furniture)} pieces under {rules.label}"
               + (f"; locked where they stand: {', '.join(locked)}" if locked else ""))
    if st.button("Find arrangements", key="solve", type="primary"):
        bar = st.progress(0.0, text="Starting…")
        t0 = time.monotonic()

        def tick(msg: str) -> None:
            bar.progress(min(0.99, (time.monotonic() - t0) / limit), text=(msg or "Searching…")[:200])

        options = solver.SolveOptions(candidates=int(n), time_limit=float(limit), seed=int(seed))
        result = page.run_polling(lambda say: solver.solve(plan, rules, options, progress=say), tick)
        bar.progress(1.0, text=f"Searched for {time.monotonic() - t0:.1f} s.")
        s["solved"] = {"result": result, "plan": plan, "rules": rules, "time_limit": float(limit),
                       "shown": None}
    done = s.get("solved")
    if not done:
        st.caption("Nothing searched yet for this plan.")
        return
    if done["plan"] != plan:
        st.info("The plan has changed since these arrangements were found; search again to "
                "include the changes.")
    _results(done)


def _results(done: dict[str, Any]) -> None:
    plan, rules, result = done["plan"], done["rules"], done["result"]
    outcome = page.describe_outcome(result, done["time_limit"])
    show = {"success": st.success, "warning": st.warning, "error": st.error}[outcome.level]
    show(outcome.headline + ("\n\n" + "\n".join(f"- {d}" for d in outcome.details)
                             if outcome.details else ""))
    _caution()
    if not result.candidates:
        return
    if done["shown"] is None:
        with st.spinner("Checking and drawing each arrangement…"):
            table = compare.compare([plan.with_layout(c.layout) for c in result.candidates],
                                    [f"Arrangement {i + 1}" for i in range(len(result.candidates))],
                                    rules)
            shown = [_present(row, i) for i, row in enumerate(table.rows)]
            done["shown"] = (shown, table, report.build_report(table))
    shown, table, both = done["shown"]
    cols = st.columns(len(shown))
    for i, (col, cand, a) in enumerate(zip(cols, result.candidates, shown, strict=True)):
        with col, _panel(f"arrangement {i + 1}"):
            _candidate(i, cand, a)
    st.markdown("**Side by side** (★ best value)")
    st.dataframe(page.comparison_rows(table), hide_index=True)
    st.download_button("Client report with every arrangement (.html)", both,
                       file_name=f"{page.file_stem(plan)}-arrangements.html", mime="text/html",
                       key="dl_report_all")
    _caution()


def _candidate(i: int, cand: Any, a: dict[str, Any]) -> None:
    row = a["row"]
    st.markdown(f"#### Arrangement {i + 1}")
    st.caption(row.idea)
    _show_svg(a["svg"])
    m1, m2 = st.columns(2)
    m1.metric("Rules failed", row.text("rules_failed"))
    m2.metric("Walking a day", row.text("walking"))
    m1.metric("Narrowest route", row.text("narrowest"))
    m2.metric("Turning spaces", row.text("turning"))
    st.caption(f"Free floor {row.text('free_floor')} · group rules met {row.text('groups')}"
               f" · preferences met {row.text('preferences')}"
               f" · solver score {cand.objective:g}" + (" (best possible)" if cand.optimal else ""))
    with st.expander("Rule findings"):
        st.dataframe(page.findings_rows(row.audit.findings), hide_index=True)
    with st.expander("Layout quality (advisory)"):
        st.dataframe([{k: q[k] for k in ("text", "kind", "source")}
                      for q in quality_record(row.quality)], hide_index=True)
    with st.expander("Daily routes"):
        st.dataframe(page.route_rows(row.routes), hide_index=True)
    st.button("Keep this arrangement", key=f"keep_{i}", on_click=_keep, args=(i,))
    _downloads(row.plan, a, f"cand{i + 1}", f"-arrangement-{i + 1}")


def _downloads(plan: Plan, a: dict[str, Any], key: str, suffix: str) -> None:
    stem = page.file_stem(plan) + suffix
    st.download_button("Furnished plan (.toml)", dumps_plan(plan), file_name=f"{stem}.toml",
                       mime="application/toml", key=f"dl_plan_{key}")
    st.download_button("Drawing (.svg)", a["svg"], file_name=f"{stem}.svg", mime="image/svg+xml",
                       key=f"dl_svg_{key}")
    st.download_button("Client report (.html)", a["report"], file_name=f"{stem}.html",
                       mime="text/html", key=f"dl_report_{key}")


def _audit(plan: Plan, rules: RuleSet) -> None:
    if not plan.layout:
        st.info("No piece has a place yet. Bring a furnished plan file, or keep one of the "
                "arrangements found, then check it here.")
        return
    unplaced = [p.id for p in plan.furniture if p.placement is None]
    if unplaced:
        st.caption("Not placed, so not checked: " + ", ".join(unplaced))
    a = _memo("asis", plan, lambda: _present(compare.compare_row(plan, "As it stands", rules), 9))
    row = a["row"]
    fails = row.audit.failures
    if fails:
        st.warning(f"{len(fails)} of {len(row.audit.findings)} rule checks fail under "
                   f"{rules.label}. Failures are marked on the drawing.")
    else:
        st.success(f"All {len(row.audit.findings)} rule checks pass under {rules.label}.")
    _caution()
    left, right = st.columns([3, 2])
    with left:
        _show_svg(a["svg"])
    with right:
        for m in compare.METRICS:
            st.markdown(f"**{m.label}:** {row.text(m.id)}")
        _downloads(plan, a, "asis", "-as-is")
    st.markdown("**Rule findings** (failures first)")
    st.dataframe(page.findings_rows(row.audit.findings), hide_index=True)
    st.markdown("**Daily routes**")
    st.dataframe(page.route_rows(row.routes), hide_index=True)


# ---------------------------------------------------------------------------------------------
# IFC import (roomfit.page_ifc holds the logic; this section only lays it out)


def _ifc_sidebar() -> None:
    s = _state()
    with st.sidebar.expander("Import an architect's IFC model"):
        if not page_ifc.ifc_available():
            st.info('Reading IFC needs the extra: pip install "roomfit[ifc]"')
            return
        up = st.file_uploader("IFC model (.ifc)", type=["ifc"], key="ifc_upload")
        if up is None:
            return
        try:
            if s.get("ifc_summary_id") != up.file_id:
                s["ifc_summary"] = page_ifc.summary_from_upload(up.name, up.getvalue())
                s["ifc_summary_id"] = up.file_id
            choices = page_ifc.storey_choices(s["ifc_summary"])
            storey = st.selectbox("Storey", [c[0] for c in choices], key="ifc_storey",
                                  format_func=dict(choices).get)
            spaces = st.text_input("Only spaces matching (e.g. 2.*; empty: all)", key="ifc_spaces")
            if st.button("Import this storey", key="ifc_go"):
                imported = page_ifc.import_from_upload(up.name, up.getvalue(), storey, spaces)
                _set_plan(imported.plan, f"IFC {up.name}, storey {storey}")
                s["ifc_review"] = imported
                st.rerun()
        except RoomfitError as e:
            st.error("\n\n".join(page.error_lines(e)))


def _ifc_review(plan: Plan, rules: RuleSet) -> None:
    """The imported plan with every guess marked; each door's leaf, swing and hinge set here."""
    s = _state()
    imported = s["ifc_review"]
    if not str(s.get("origin", "")).startswith("IFC "):  # another plan was opened since
        s["ifc_review"] = None
        return
    with st.expander("Review the IFC import: guessed doors and the assumed entrance", expanded=True):
        _show_svg(draw.draw_svg(plan, rules, marks=page_ifc.review_marks(imported)))
        st.dataframe(page_ifc.review_rows(imported), hide_index=True)
        doors = [d.id for d in plan.doors]
        door = st.selectbox("Door to set", doors, key=_k("ifc_door", "pick"))
        leaf, swing, hinge = page_ifc.door_state(plan, door)
        opts = page_ifc.door_options(plan, door)
        cols = st.columns(3)
        new_leaf = cols[0].selectbox("Leaf", opts["leaf"], index=opts["leaf"].index(leaf),
                                     key=_k("ifc_leaf", door))
        new_swing = cols[1].selectbox("Swings into", opts["swings_into"],
                                      index=opts["swings_into"].index(swing), key=_k("ifc_sw", door))
        new_hinge = cols[2].selectbox("Hinge (seen from that room, facing the door)", opts["hinge"],
                                      index=opts["hinge"].index(hinge), key=_k("ifc_hinge", door))
        if st.button("Set this door", key=_k("ifc_set", door)):
            _edit(fix_door, door, new_leaf, new_swing, new_hinge, where="top",
                  notice=f"Door {door} set; save the plan from the sidebar.")
            st.rerun()
        st.download_button("Save with the import report on top (.toml)",
                           plan_text(replace(imported, plan=plan), CAUTION),
                           file_name=f"{page.file_stem(plan)}.toml", mime="application/toml",
                           key=_k("ifc_save", "plan"))
        if st.button("Done reviewing", key="ifc_done"):
            s["ifc_review"] = None
            st.rerun()


# ---------------------------------------------------------------------------------------------
# the page


def main() -> None:
    st.set_page_config(page_title="roomfit · furnish with the client", layout="wide")
    st.markdown(_CSS, unsafe_allow_html=True)
    _init()
    st.title("roomfit · furnish with the client")
    _sidebar()
    _ifc_sidebar()
    s = _state()
    plan: Plan | None = s["plan"]
    if plan is None:
        st.info("Open a bundled sample or bring a plan file to start.")
        return
    rules = rules_for(plan)
    st.caption(f"Rule set: {rules.label}" + (f" · {len(rules.overridden)} values overridden"
                                             if rules.overridden else ""))
    with st.container():  # one element whatever it holds, so the tabs below keep their place
        _messages("top")
    if s.get("ifc_review") is not None:
        with _panel("IFC review"):
            _ifc_review(plan, rules)
    tabs = st.tabs(["The apartment", "Furniture", "Rules", "Arrangements", "Check as it stands"],
                   key="section")
    with tabs[0], _panel("apartment"):
        _overview(plan, rules)
    with tabs[1], _panel("furniture"):
        _messages("furniture")
        _furniture(plan, rules)
    with tabs[2], _panel("rules"):
        _messages("rules")
        _rules(plan, rules)
    with tabs[3], _panel("arrangements"):
        _messages("arrangements")
        _solve(plan, rules)
    with tabs[4], _panel("check"):
        _audit(plan, rules)


main()
