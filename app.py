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

import time
from pathlib import Path
from typing import Any

import streamlit as st

from app_common import caution, edit, kept, key, messages, panel, set_plan, show_svg, state, text
from app_edit import arrange, building, undo_bar
from app_ifc import ifc_review, ifc_sidebar
from app_trace import trace
from roomfit import page
from roomfit.audit.geometry import room_polygon
from roomfit.audit.ideas import moves
from roomfit.audit.quality import quality_record
from roomfit.errors import RoomfitError
from roomfit.plan.data import Plan
from roomfit.plan.read import read_plan
from roomfit.plan.units import format_area
from roomfit.plan.write import dumps_plan
from roomfit.present import compare, draw, report
from roomfit.rules.catalog import load_catalog, resolve_pieces
from roomfit.rules.sets import RuleSet, load_ruleset, rules_for, ruleset_ids
from roomfit.solve import search as solver

ROOT = Path(__file__).resolve().parent
PLANS = ROOT / "plans"
DEFAULT_SAMPLE = "studio.toml"  # the smallest sample opens first


_CSS = """
<style>
.rf-drawing { overflow: auto; max-height: 85vh; border: 1px solid #e2e0da; }
.rf-drawing svg { width: 100%; height: auto; display: block; }
.rf-caution { border-left: 4px solid #b5651d; background: #fbf4ec; padding: 0.5rem 0.8rem;
              font-size: 0.9rem; color: #4a3520; margin: 0.5rem 0 1rem 0; }
[data-testid="stTable"] td, [data-testid="stTable"] th { white-space: normal; word-break: normal; }
</style>
"""


def _init() -> None:
    s = state()
    for k, value in (("plan", None), ("origin", ""), ("solved", None), ("upload_id", None),
                     ("upload_error", []), ("edit_error", None), ("notice", None)):
        s.setdefault(k, value)
    if s["plan"] is None:
        samples = page.sample_files(PLANS)
        first = PLANS / DEFAULT_SAMPLE if (PLANS / DEFAULT_SAMPLE).exists() else None
        if samples:
            first = first or samples[0]
            try:
                set_plan(read_plan(first), f"sample {first.name}")
            except RoomfitError as e:
                s["upload_error"] = page.error_lines(e)


# ---------------------------------------------------------------------------------------------
# callbacks (run before the page is drawn again)


def _open_sample() -> None:
    s = state()
    path = PLANS / s["sample_choice"]
    try:
        set_plan(read_plan(path), f"sample {path.name}")
        s["upload_error"] = []
    except RoomfitError as e:
        s["upload_error"] = page.error_lines(e)


def _take_upload() -> None:
    """Open an uploaded plan file; any problem is shown at the upload field and the plan that
    was open stays open."""
    s = state()
    up = s.get("upload")
    if up is None:
        return
    s["upload_id"] = up.file_id
    try:
        set_plan(page.plan_from_upload(up.name, up.getvalue()), f"upload {up.name}")
        s["upload_error"] = []
    except RoomfitError as e:
        s["upload_error"] = page.error_lines(e)
    except Exception as e:  # noqa: BLE001 - whatever the file does, no traceback
        s["upload_error"] = [f"{up.name}: could not be read ({type(e).__name__}); check that it "
                             "is a roomfit plan file"]


def _add_piece() -> None:
    s = state()
    t = s["add_type"]
    edit(page.add_piece, t, s[key("add_rooms", t)], s[key("add_label", t)], s[key("add_w", t)],
          s[key("add_d", t)], s[key("add_h", t)], _access(s.get(key("add_access", t))),
          where="furniture", notice="Piece added.")


def _access(choice: str | None) -> str | None:
    return None if choice in (None, "as the catalogue says") else choice


def _change_piece() -> None:
    s = state()
    pid = s["edit_piece"]
    edit(page.update_piece, pid, label=s[key("ed_label", pid)], rooms=s[key("ed_rooms", pid)],
          width=s[key("ed_w", pid)], depth=s[key("ed_d", pid)], height=s[key("ed_h", pid)],
          access=_access(s.get(key("ed_access", pid))), where="furniture",
          notice=f"{pid} changed.")


def _remove_piece() -> None:
    pid = state()["edit_piece"]
    edit(page.remove_piece, pid, where="furniture", notice=f"{pid} removed.")


def _pick_ruleset() -> None:
    s = state()
    plan: Plan = s["plan"]
    edit(page.with_rule_choice, s["rule_set"], plan.rules.override_map(), where="rules",
          notice=f"Rule set {s['rule_set']} chosen.")
    if s["edit_error"]:
        # the plan's overrides do not fit the new set: pick it without them
        edit(page.with_rule_choice, s["rule_set"], {}, where="rules",
              notice=f"Rule set {s['rule_set']} chosen; the earlier overrides did not apply.")


def _apply_overrides() -> None:
    s = state()
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
    edit(page.with_rule_choice, plan.rules.set, overrides, where="rules",
          notice="Rule values applied.")


def _clear_overrides() -> None:
    plan: Plan = state()["plan"]
    edit(page.with_rule_choice, plan.rules.set, {}, where="rules", notice="Overrides cleared.")


def _keep(index: int) -> None:
    s = state()
    result = s["solved"]["result"]
    cand = result.candidates[index]
    edit(page.keep_layout, cand.layout, where="arrangements",
          notice=f"Arrangement {index + 1} kept: every piece now has a place; lock the ones "
          "that should stay on the Arrange and check tab.")


# ---------------------------------------------------------------------------------------------
# panels


def _sidebar() -> None:
    s = state()
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
        sb.markdown(f"**Open:** {text(plan.name or '(no name)')}  \n"
                    f"from {text(s['origin'])}")
        sb.download_button("Save the plan as edited (.toml)", dumps_plan(plan),
                           file_name=f"{page.file_stem(plan)}.toml", mime="application/toml",
                           key="save_plan")


def _overview(plan: Plan, rules: RuleSet) -> None:
    st.subheader(text(plan.name or "Plan"))
    who = " · ".join(x for x in (plan.client, plan.address) if x)
    if who:
        st.caption(text(who))
    cols = st.columns(5)
    cols[0].metric("Rooms", len(plan.rooms))
    cols[1].metric("Doors", len(plan.doors))
    cols[2].metric("Windows", len(plan.windows))
    cols[3].metric("Pieces", len(plan.furniture))
    cols[4].metric("Placed", sum(p.placement is not None for p in plan.furniture))
    left, right = st.columns([3, 2])
    with right:
        st.table([{"room": r.id, "name": r.label, "use": r.use,
                   "area": format_area(room_polygon(r).area, plan.unit)} for r in plan.rooms])
        st.caption("Furniture is drawn where the plan puts it; the Furniture tab lists it.")
    with left:
        show_svg(kept("overview", plan, lambda: draw.draw_svg(plan, rules, title=plan.name,
                                                                show=("dimensions",))))


def _furniture(plan: Plan, rules: RuleSet) -> None:
    s = state()
    st.dataframe(page.piece_rows(plan, rules), hide_index=True, width="stretch")
    rooms = [r.id for r in plan.rooms]
    labels = {r.id: f"{r.label} ({r.id})" for r in plan.rooms}
    left, right = st.columns(2)
    with left:
        st.markdown("**Add a piece**")
        choices = dict(page.type_choices())
        t = st.selectbox("Kind", list(choices), format_func=lambda k: choices[k], key="add_type")
        cat = load_catalog()
        d = cat.get(t)
        with st.form(key("add_form", t), border=True):
            st.text_input("Name (optional)", key=key("add_label", t))
            st.multiselect("May stand in", rooms, default=rooms[:1], format_func=lambda r: labels[r],
                           key=key("add_rooms", t))
            c1, c2, c3 = st.columns(3)
            c1.number_input("Width mm", 0, None, d.width if d else 0, step=10, key=key("add_w", t))
            c2.number_input("Depth mm", 0, None, d.depth if d else 0, step=10, key=key("add_d", t))
            c3.number_input("Height mm", 0, None, d.height if d else 0, step=10, key=key("add_h", t))
            if d is not None and d.category == "bed":
                st.selectbox("Free long sides", ["as the catalogue says", "both", "left", "right"],
                             key=key("add_access", t))
            if d is not None:
                st.caption(f"Catalogue size: {d.width} x {d.depth} x {d.height} mm — {text(d.source)}")
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
            with st.form(key("edit_form", pid), border=True):
                st.text_input("Name", value=p.label, placeholder=spec.label,
                              key=key("ed_label", pid))
                st.multiselect("May stand in", rooms, default=list(p.rooms),
                               format_func=lambda r: labels[r], key=key("ed_rooms", pid))
                c1, c2, c3 = st.columns(3)
                c1.number_input("Width mm", 0, None, spec.width, step=10, key=key("ed_w", pid))
                c2.number_input("Depth mm", 0, None, spec.depth, step=10, key=key("ed_d", pid))
                c3.number_input("Height mm", 0, None, spec.height, step=10, key=key("ed_h", pid))
                if spec.category == "bed":
                    opts = ["as the catalogue says", "both", "left", "right"]
                    st.selectbox("Free long sides", opts, index=opts.index(p.access or opts[0]),
                                 key=key("ed_access", pid))
                st.form_submit_button("Apply changes", on_click=_change_piece)
            st.button("Remove from the list", key="remove_piece", on_click=_remove_piece)
            st.caption("Move, turn and lock pieces on the Arrange and check tab.")


def _rules(plan: Plan, rules: RuleSet) -> None:
    ids = ruleset_ids()
    sets = {i: load_ruleset(i).label for i in ids}
    if state().get("rule_set") != plan.rules.set:
        state()["rule_set"] = plan.rules.set
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
            col.number_input(r.description, 0, None, r.mm, step=10,
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


def _present(row: Any, index: int, before: Plan) -> dict[str, Any]:
    """One arrangement, audited, routed and measured (a ``compare.Row``), with its drawing
    (routes drawn, failures marked; ids prefixed by ``index``), its client report and, when
    ``before`` has furniture placed, the moving list from there."""
    single = compare.Comparison((row,), ())
    title = f"{row.plan.name}: {row.name}"
    return {"row": row, "svg": report.drawing(row, index),
            "report": report.build_report(single, title=title),
            "moves": moves(before, row.plan, row.rules) if before.layout else None}


def _solve(plan: Plan, rules: RuleSet) -> None:
    s = state()
    c1, c2, c3 = st.columns(3)
    n = c1.slider("How many arrangements", 2, 4, 3, key="n_candidates")
    limit = c2.slider("Time limit (s)", 5, 120, 20, step=5, key="time_limit")
    seed = c3.number_input("Seed", 0, 10_000, 0, key="seed",
                           help="The same seed and time limit give the same arrangements.")
    locked = [p.id for p in plan.furniture if p.locked]
    st.caption(text(f"{len(plan.furniture)} pieces under {rules.label}"
                    + (f"; locked where they stand (the search keeps them): {', '.join(locked)}"
                       if locked else "; lock pieces on the Arrange and check tab to keep them")))
    if st.button("Find arrangements", key="solve", type="primary"):
        bar = st.progress(0.0, text="Starting…")
        t0 = time.monotonic()

        seen: dict[str, int] = {}

        def tick(msg: str) -> None:
            spent = time.monotonic() - t0
            bar.progress(min(0.99, spent / limit),
                         text=page.progress_words(msg, int(n), limit - spent, seen))

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
    caution()
    if not result.candidates:
        return
    if done["shown"] is None:
        with st.spinner("Checking and drawing each arrangement…"):
            table = compare.compare([plan.with_layout(c.layout) for c in result.candidates],
                                    [f"Arrangement {i + 1}" for i in range(len(result.candidates))],
                                    rules, [(c.audit, c.routes) for c in result.candidates])
            shown = [_present(row, i, plan) for i, row in enumerate(table.rows)]
            done["shown"] = (shown, table, report.build_report(table))
    shown, table, both = done["shown"]
    per_row = 2 if len(shown) in (2, 4) else min(3, len(shown))  # readable: two a row when four
    for start in range(0, len(shown), per_row):
        cols = st.columns(per_row)
        for i in range(start, min(start + per_row, len(shown))):
            with cols[i - start], panel(f"arrangement {i + 1}"):
                _candidate(i, shown[i], result.possible if i == 0 else ())
    st.markdown("**Side by side** (★ best value)")
    st.table(page.comparison_rows(table))
    st.download_button("Client report with every arrangement (.html)", both,
                       file_name=f"{page.file_stem(plan)}-arrangements.html", mime="text/html",
                       key="dl_report_all")
    caution()


def _candidate(i: int, a: dict[str, Any], possible: Any = ()) -> None:
    row = a["row"]
    st.markdown(f"#### Arrangement {i + 1}")
    st.caption(text(row.idea))
    show_svg(a["svg"])
    m1, m2 = st.columns(2)
    m1.metric("Rules failed", row.text("rules_failed"))
    m2.metric("Walking a day", row.text("walking"))
    m1.metric("Narrowest route", row.text("narrowest"))
    m2.metric("Turning spaces", row.text("turning"))
    st.caption(f"Free floor {row.text('free_floor')} · group rules met {row.text('groups')}"
               f" · preferences met {row.text('preferences')}")
    with st.expander("Rule findings"):
        st.dataframe(page.findings_rows(row.audit.findings, row.plan.unit), hide_index=True, width="stretch")
    with st.expander("Layout quality (advisory)"):
        st.dataframe([{k: q[k] for k in ("text", "kind", "source")}
                      for q in quality_record(row.quality)], hide_index=True)
    with st.expander("Daily routes"):
        st.table(page.route_rows(row.routes))
    if possible:  # the first arrangement's missed group rules, checked by the solver
        with st.expander("Missed group rules, checked"):
            st.markdown("\n".join(f"- {text(p.text)}" for p in possible))
    if a["moves"] is not None:
        with st.expander("Moving list from today's arrangement"):
            st.markdown("\n".join(f"- {text(m)}" for m in a["moves"]) or "Nothing moves.")
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


# ---------------------------------------------------------------------------------------------
# the page


def main() -> None:
    st.set_page_config(page_title="roomfit · furnish with the client", layout="wide")
    st.markdown(_CSS, unsafe_allow_html=True)
    _init()
    st.title("roomfit · furnish with the client")
    _sidebar()
    ifc_sidebar()
    s = state()
    plan: Plan | None = s["plan"]
    if plan is None:
        st.info("Open a bundled sample or bring a plan file to start.")
        return
    rules = rules_for(plan)
    st.caption(text(f"Rule set: {rules.label}" + (f" · {len(rules.overridden)} values overridden"
                                                  if rules.overridden else "")))
    with st.container():  # one element whatever it holds, so the tabs below keep their place
        messages("top")
    undo_bar()
    if s.get("ifc_review") is not None:
        with panel("IFC review"):
            ifc_review(plan, rules)
    tabs = st.tabs(["The apartment", "Arrange and check", "Furniture", "Building", "Rules",
                    "Arrangements", "Trace a scan"], key="section")
    with tabs[0], panel("apartment"):
        _overview(plan, rules)
    with tabs[1], panel("arrange"):
        arrange(plan, rules)
    with tabs[2], panel("furniture"):
        messages("furniture")
        _furniture(plan, rules)
    with tabs[3], panel("building"):
        building(plan, rules)
    with tabs[4], panel("rules"):
        messages("rules")
        _rules(plan, rules)
    with tabs[5], panel("arrangements"):
        messages("arrangements")
        _solve(plan, rules)
    with tabs[6], panel("trace"):
        trace()


main()
