"""The Streamlit page (app.py) driven by streamlit's AppTest, and roomfit.page's functions.

The page must keep running whatever the user does: a bad upload or a bad value gives a
message that names the file and the field, and the plan and what was typed stay.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from streamlit.testing.v1 import AppTest

from roomfit import page, page_edit
from roomfit.errors import PlanError, RuleError
from roomfit.plan.data import Placement
from roomfit.plan.read import loads_plan, read_plan
from roomfit.plan.write import dumps_plan
from roomfit.rules.sets import load_ruleset, rules_for

ROOT = Path(__file__).resolve().parent.parent
APP = str(ROOT / "app.py")
STUDIO = ROOT / "plans" / "studio.toml"
CAUTION_TEXT = "Local building codes, the accessibility standards in force"


def _app() -> AppTest:
    at = AppTest.from_file(APP, default_timeout=60)
    at.run()
    assert not at.exception, at.exception
    return at


def _click(at: AppTest, label: str) -> None:
    """Click the (form submit) button with this label and run the page again."""
    matches = [b for b in at.button if b.label == label]
    assert matches, f"no button {label!r}: {[b.label for b in at.button]}"
    matches[0].click()
    at.run()
    assert not at.exception, at.exception


def _furniture_table(at: AppTest):  # noqa: ANN202 - a pandas DataFrame
    return next(d.value for d in at.dataframe if "may stand in" in d.value.columns)


def _shown(markdown: str) -> str:
    """Markdown as the reader sees it: plan text reaches the page with Markdown's characters
    escaped (``roomfit.page.plain``)."""
    return re.sub(r"\\(.)", r"\1", markdown)


def _errors(at: AppTest) -> str:
    return "\n".join(_shown(e.value) for e in at.error)  # the sidebar's included


def _warnings(at: AppTest) -> str:
    return "\n".join(_shown(w.value) for w in at.warning)


# --- roomfit.page -----------------------------------------------------------------------------


def test_upload_of_non_utf8_bytes_names_the_file() -> None:
    with pytest.raises(PlanError, match=r"bad\.toml: not UTF-8 text \(byte 0\)"):
        page.plan_from_upload("bad.toml", b"\xff\xfe roomfit")


def test_upload_round_trips_a_sample() -> None:
    plan = read_plan(STUDIO)
    assert page.plan_from_upload("studio.toml", STUDIO.read_bytes()) == plan


def test_add_piece_takes_catalogue_size_and_custom_needs_all_sizes() -> None:
    plan = read_plan(STUDIO)
    rules = rules_for(plan)
    more = page.add_piece(plan, "nightstand", ("main",))
    assert more.furniture[-1].id == "nightstand-1"
    assert more.furniture[-1].width is None  # the catalogue's size, not copied
    row = page.piece_rows(more, rules)[-1]
    assert row["size (w x d x h, mm)"] == "455 x 455 x 600"  # US planning list 18 x 18 in [S6]
    n = len(plan.furniture)
    with pytest.raises(PlanError, match=rf"furniture\[{n}\]\.width: must be greater than 0"):
        page.add_piece(plan, "custom", ("main",), "Shoe rack", 0, 300, 900)
    ok = page.add_piece(plan, "custom", ("main", "hall"), "Shoe rack", 800, 300, 900)
    assert ok.furniture[-1].rooms == ("main", "hall")
    assert (ok.furniture[-1].width, ok.furniture[-1].depth) == (800, 300)


def test_update_piece_drops_a_place_in_a_room_no_longer_allowed() -> None:
    plan = page.add_piece(read_plan(STUDIO), "custom", ("main", "hall"), "Rack", 800, 300, 900)
    pid = plan.furniture[-1].id
    layout = ((pid, Placement(3000, 2100, 0, "main")),)
    placed = page.lock_piece(page.keep_layout(plan, layout), pid, True)
    assert placed.piece(pid).locked
    moved = page.update_piece(placed, pid, label="Rack", rooms=("hall",), width=800, depth=300,
                              height=900)
    assert moved.piece(pid).placement is None and not moved.piece(pid).locked


def test_lock_needs_a_place_and_remove_drops_routine_trips() -> None:
    plan = page.add_piece(read_plan(STUDIO), "desk", ("main",))
    with pytest.raises(PlanError, match="has no place yet"):
        page.lock_piece(plan, "desk-1", True)
    studio = read_plan(STUDIO)
    assert any("bed" in (t.origin, t.target) for t in studio.routines)
    without = page.remove_piece(studio, "bed")
    assert "bed" not in [p.id for p in without.furniture]
    assert all("bed" not in (t.origin, t.target) for t in without.routines)


def test_rule_choice_with_override_is_reported_as_overridden() -> None:
    plan = page.with_rule_choice(read_plan(STUDIO), "ada-2010", {"route.width": 1000})
    rows = {r["rule"]: r for r in page.rule_rows(rules_for(plan))}
    assert rows["route.width"]["mm"] == "1000"
    assert rows["route.width"]["status"] == "overridden for this client"
    assert rows["turning.size"]["mm"] == "1524"  # 2010 ADA §304.3.1: 60 in
    with pytest.raises(RuleError, match=r"plan edited on the page: rules\.overrides\.route\.nope: "
                       "rule set 'ada-2010' has no rule 'route.nope'"):
        page.with_rule_choice(plan, "ada-2010", {"route.nope": 5})


def test_run_polling_reports_progress_from_worker_threads_on_the_calling_thread() -> None:
    import threading
    from concurrent.futures import ThreadPoolExecutor

    caller = threading.get_ident()
    seen: list[tuple[int, str]] = []

    def work(say):  # noqa: ANN001, ANN202 - reports from two pool threads, like the solver
        with ThreadPoolExecutor(2) as pool:
            list(pool.map(lambda i: [say(f"step {i}"), threading.Event().wait(0.3)], range(4)))
        return 42

    assert page.run_polling(work, lambda m: seen.append((threading.get_ident(), m)), 0.05) == 42
    assert seen and {t for t, _ in seen} == {caller}
    assert any(m.startswith("step ") for _, m in seen)

    def broken(say):  # noqa: ANN001, ANN202
        raise KeyError("boom")

    with pytest.raises(KeyError, match="boom"):  # the worker's error reaches the caller
        page.run_polling(broken, lambda m: None, 0.01)


def test_new_piece_id_avoids_every_id_in_the_plan() -> None:
    plan = read_plan(STUDIO)
    used = {p.id for p in plan.furniture} | {f.id for f in plan.fixtures}
    assert page.new_id(plan, "wc") not in used
    assert page.file_stem(plan) == "studio-14-larchmere-row-flat-3"


# --- the page ---------------------------------------------------------------------------------


def test_page_opens_the_studio_sample_with_room_areas() -> None:
    at = _app()
    assert at.subheader[0].value == read_plan(STUDIO).name
    rooms = at.table[0].value
    areas = dict(zip(rooms["room"], rooms["area"], strict=True))
    # by hand: main room 5.4 m x 4.6 m = 24.84 m2; hall 1.4 x 2.0 = 2.8 m2
    assert areas["main"] == "24.84 m²"
    assert areas["hall"] == "2.80 m²"
    furniture = _furniture_table(at)
    assert list(furniture["id"]) == [p.id for p in read_plan(STUDIO).furniture]


def test_page_opens_another_sample() -> None:
    at = _app()
    others = [p for p in page.sample_files(ROOT / "plans") if p.name != "studio.toml"]
    if not others:
        pytest.skip("only one sample plan")
    at.sidebar.selectbox(key="sample_choice").set_value(others[0].name)
    _click(at, "Open this sample")
    assert at.subheader[0].value == read_plan(others[0]).name


@pytest.mark.parametrize(("name", "data", "expect"), [
    ("broken.toml", b"roomfit_plan = 1\nname = = 'x'\nunits = 'mm'\n",
     r"broken\.toml:2:\d+: not a valid TOML file"),
    ("flat.toml", b"roomfit_plan = 1\nname='x'\n[[rooms]]\nid='a'\nuse='living'\n"
     b"outline=[[0,0],[10,0]]\n", r"flat\.toml: rooms\[0\]\.outline: expected a list of at least 3"),
    ("binary.toml", b"\x89PNG\r\n\x1a\n", r"binary\.toml: not UTF-8 text"),
])
def test_bad_upload_gives_a_message_and_keeps_the_plan(name: str, data: bytes, expect: str) -> None:
    at = _app()
    before = at.session_state["plan"]
    at.sidebar.file_uploader[0].set_value((name, data, "application/toml"))
    at.run()
    assert not at.exception
    assert re.search(expect, _errors(at)), _errors(at)
    assert at.session_state["plan"] == before
    assert at.subheader[0].value == before.name  # the page still shows the plan


def test_good_upload_replaces_the_plan() -> None:
    at = _app()
    text = STUDIO.read_text().replace('name = "Studio, 14 Larchmere Row, flat 3"',
                                      'name = "Uploaded studio"')
    at.sidebar.file_uploader[0].set_value(("mine.toml", text.encode(), "application/toml"))
    at.run()
    assert not at.exception and not _errors(at)
    assert at.subheader[0].value == "Uploaded studio"


def test_bad_custom_size_names_the_field_and_keeps_what_was_typed() -> None:
    at = _app()
    at.selectbox(key="add_type").set_value("custom")
    at.run()
    gen = at.session_state["gen"]
    at.text_input(key=f"add_label_{gen}_custom").input("Shoe rack")
    at.number_input(key=f"add_d_{gen}_custom").set_value(300)
    at.number_input(key=f"add_h_{gen}_custom").set_value(900)
    n = len(at.session_state["plan"].furniture)
    _click(at, "Add to the list")  # width left at 0
    assert f"furniture[{n}].width: must be greater than 0" in _errors(at)
    assert len(at.session_state["plan"].furniture) == n
    assert at.text_input(key=f"add_label_{gen}_custom").value == "Shoe rack"
    assert at.number_input(key=f"add_d_{gen}_custom").value == 300
    at.number_input(key=f"add_w_{gen}_custom").set_value(800)
    _click(at, "Add to the list")
    plan = at.session_state["plan"]
    assert len(plan.furniture) == n + 1 and plan.furniture[-1].label == "Shoe rack"
    assert not _errors(at)
    assert "Shoe rack" in list(_furniture_table(at)["name"])


def test_change_and_remove_a_piece() -> None:
    at = _app()
    gen = at.session_state["gen"]
    at.selectbox(key="edit_piece").set_value("sofa")
    at.run()
    at.number_input(key=f"ed_w_{gen}_sofa").set_value(2400)
    _click(at, "Apply changes")
    assert at.session_state["plan"].piece("sofa").width == 2400
    _click(at, "Remove from the list")
    assert "sofa" not in [p.id for p in at.session_state["plan"].furniture]
    assert "sofa" not in list(_furniture_table(at)["id"])


def test_lock_a_placed_piece() -> None:
    at = _app()
    at.selectbox(key="pick").set_value("bed")
    at.run()
    _click(at, "Lock")
    bed = at.session_state["plan"].piece("bed")
    assert bed.locked and bed.placement == read_plan(STUDIO).piece("bed").placement
    _click(at, "Unlock")
    assert not at.session_state["plan"].piece("bed").locked


def test_rule_set_and_override_with_sources() -> None:
    at = _app()
    at.selectbox(key="rule_set").set_value("ada-2010")
    at.run()
    assert not at.exception
    assert at.session_state["plan"].rules.set == "ada-2010"
    ada = load_ruleset("ada-2010")
    turning = at.number_input(key="ov_ada-2010_turning.size")
    assert turning.value == 1524  # 2010 ADA §304.3.1: 60 in
    captions = " ".join(c.value for c in at.caption)
    assert ada.get("turning.size").source in captions
    at.number_input(key="ov_ada-2010_route.width").set_value(1000)
    _click(at, "Apply values")
    plan = at.session_state["plan"]
    assert plan.rules.override_map() == {"route.width": 1000}
    table = next(d.value for d in at.dataframe if "mm" in d.value.columns)
    row = table[table["rule"] == "route.width"].iloc[0]
    assert row["mm"] == "1000" and row["status"] == "overridden for this client"
    _click(at, "Back to the set's own values")
    assert at.session_state["plan"].rules.overrides == ()


def test_saved_plan_reads_back_equal() -> None:
    at = _app()
    at.selectbox(key="pick").set_value("bed")
    at.run()
    _click(at, "Lock")
    plan = at.session_state["plan"]
    assert loads_plan(dumps_plan(plan)) == plan
    assert at.sidebar.get("download_button")


# --- solving, comparing and auditing on the page ------------------------------------------------

WHEELCHAIR = "ground-floor-wheelchair.toml"

# One 2.0 x 2.0 m room with an entrance door and a double bed: the bed's frame, 1700 x 2100 mm,
# is longer than the room in either turn, so no arrangement exists (worked out by hand).
TOO_SMALL = b"""roomfit_plan = 1
name = "Box room"
[rules]
set = "everyday"
[[rooms]]
id = "box"
use = "bedroom"
outline = [[0, 0], [2000, 0], [2000, 2000], [0, 2000]]
[[doors]]
id = "d-in"
rooms = ["box", "outside"]
at = [1000, 0]
width = 800
leaf = "sliding"
[[furniture]]
id = "bed"
type = "bed-double-160"
room = "box"
"""


def _open_sample(at: AppTest, name: str) -> None:
    at.sidebar.selectbox(key="sample_choice").set_value(name)
    _click(at, "Open this sample")
    assert at.session_state["plan"] == read_plan(ROOT / "plans" / name)


def _markdown(at: AppTest) -> str:
    return "\n".join(m.value for m in at.markdown)


def test_solve_compare_keep_and_check_on_the_page() -> None:
    from roomfit.audit.check import audit

    at = _app()
    _open_sample(at, WHEELCHAIR)
    at.slider(key="n_candidates").set_value(2)
    at.slider(key="time_limit").set_value(30)
    at.button(key="solve").click()
    at.run(timeout=240)
    assert not at.exception, at.exception
    solved = at.session_state["solved"]
    result = solved["result"]
    assert result.status in ("found", "optimal") and len(result.candidates) >= 2
    assert any("arrangements found" in s.value for s in at.success)
    md = _markdown(at)
    n = len(result.candidates)
    for i in range(n):
        assert f"#### Arrangement {i + 1}" in md
    assert md.count('<div class="rf-drawing"><div style="width:100%"><svg') >= n  # each drawn inline
    assert "Caution: these results are advisory" in md
    # the checker judges every candidate the page shows: all pass, and the page says so
    plan = solved["plan"]
    rules = rules_for(plan)
    for cand in result.candidates:
        verdict = audit(plan.with_layout(cand.layout), rules)
        assert verdict.passed, [f.message for f in verdict.failures]
    shown = [m.value for m in at.metric if m.label == "Rules failed"][-n:]
    assert all(v.startswith("0 of ") for v in shown), shown
    table = next(d.value for d in at.table if "metric" in d.value.columns)
    assert [c for c in table.columns if c != "metric"] == [f"Arrangement {i + 1}" for i in range(n)]
    # the star for walking goes to the least walking, routed again here with score_routes
    from roomfit.audit.routes import score_routes

    walks = [score_routes(plan.with_layout(c.layout), rules) for c in result.candidates]
    keys = [(len(w.unreachable), round(w.walking_m_per_day, 1)) for w in walks]
    walking = table[table["metric"] == "Walking per day"].iloc[0]
    starred = [i for i in range(n) if walking[f"Arrangement {i + 1}"].endswith("★")]
    assert starred == ([i for i, k in enumerate(keys) if k == min(keys)] if len(set(keys)) > 1
                       else [])
    # the furnished plan offered for download reads back as the candidate's layout
    first = solved["shown"][0][0]
    assert loads_plan(dumps_plan(first["row"].plan)).layout == plan.with_layout(
        result.candidates[0].layout).layout
    assert first["svg"].lstrip().startswith("<svg") and "<html" in first["report"].lower()
    assert CAUTION_TEXT in first["report"]
    # the sample stands furnished: each arrangement lists what moves from there
    from roomfit.audit.ideas import moves

    assert plan.layout and first["moves"] == moves(plan, first["row"].plan, rules)
    assert any(e.label == "Moving list from today's arrangement" for e in at.expander)
    # the first arrangement's missed group rules, as the solver checked them, when it has any
    assert any(e.label == "Missed group rules, checked" for e in at.expander) == bool(
        result.possible)
    # keep the second arrangement: every piece gets its place, and the check tab agrees
    at.button(key="keep_1").click()
    at.run(timeout=120)
    kept = at.session_state["plan"]
    assert kept.layout == plan.with_layout(result.candidates[1].layout).layout
    assert any(s.value.startswith("All ") and "rule checks pass" in s.value for s in at.success)


def test_impossible_plan_shows_the_reason_and_keeps_running() -> None:
    at = _app()
    at.sidebar.file_uploader[0].set_value(("box.toml", TOO_SMALL, "application/toml"))
    at.run()
    assert at.session_state["plan"].name == "Box room"
    at.button(key="solve").click()
    at.run(timeout=120)
    assert not at.exception
    assert at.session_state["solved"]["result"].status == "impossible"
    text = _errors(at)
    assert "No arrangement exists:" in text
    assert at.session_state["solved"]["result"].explanation.summary in text
    assert "Caution: these results are advisory" in _markdown(at)
    assert at.subheader[0].value == "Box room"  # the rest of the page is still there


def test_check_tab_gives_the_cli_findings(capsys: pytest.CaptureFixture[str]) -> None:
    import json

    from roomfit.cli import main

    assert main(["check", str(STUDIO), "--json"]) in (0, 1)
    record = json.loads(capsys.readouterr().out)
    at = _app()
    findings = next(d.value for d in at.dataframe
                    if "result" in d.value.columns and "finding" in d.value.columns)
    assert len(findings) == record["checked"]
    assert int((findings["result"] == "FAIL").sum()) == record["failed"]
    cli_fails = sorted(f["message"] for f in record["findings"] if not f["ok"])
    assert sorted(findings[findings["result"] == "FAIL"]["finding"]) == cli_fails
    if record["failed"]:
        assert any(f"{record['failed']} of {record['checked']} rule checks fail" in w.value
                   for w in at.warning)
    # failures are marked on the drawing: one mark per blocked place in the as-is drawing
    # (circulation failures at one place share a mark), as the CLI's marks say
    from roomfit.audit.check import audit, marks_for

    plan = read_plan(STUDIO)
    asis = at.session_state["memo_arrange"][1]
    assert asis.count('class="mark mark-fail"') == len(marks_for(audit(plan, rules_for(plan))))


def test_outcome_words_for_timeout_and_impossible() -> None:
    from roomfit.solve.search import Explanation, SolveResult, SolveStats, Status

    none = SolveResult(Status.TIMEOUT, (), None, SolveStats())
    words = page.describe_outcome(none, 20)
    assert words.level == "warning" and "NOT proven impossible" in words.headline
    ex = Explanation("the bed is longer than the room", ("bed",), ("piece.inside",),
                     ("without the bed it fits",))
    no = page.describe_outcome(SolveResult(Status.IMPOSSIBLE, (), ex, SolveStats()), 20)
    assert no.level == "error" and "the bed is longer than the room" in no.headline
    assert no.details == ("Try: without the bed it fits",)


# --- the page as a working surface ------------------------------------------------------------


def test_move_nudge_turn_undo_and_redo_a_piece_on_the_page() -> None:
    at = _app()
    _open_sample(at, WHEELCHAIR)
    gen = at.session_state["gen"]
    at.selectbox(key="pick").set_value("chest")
    at.run()
    blocked = "the swing or approach of door d-bedroom is blocked by chest"
    assert blocked not in _warnings(at)
    at.number_input(key=f"pos_x_{gen}_chest").set_value(3700)
    at.number_input(key=f"pos_y_{gen}_chest").set_value(3100)
    at.selectbox(key=f"pos_rot_{gen}_chest").set_value(0)
    _click(at, "Put it here")
    assert at.session_state["plan"].piece("chest").placement.x == 3700
    assert blocked in _warnings(at)  # the audit, at once
    _click(at, "▶")  # 50 mm steps by default
    assert at.session_state["plan"].piece("chest").placement.x == 3750
    assert at.number_input(key=f"pos_x_{gen}_chest").value == 3750  # the inputs follow
    _click(at, "Undo")
    _click(at, "Undo")
    assert at.session_state["plan"] == read_plan(ROOT / "plans" / WHEELCHAIR)
    assert blocked not in _warnings(at)
    _click(at, "Redo")
    assert at.session_state["plan"].piece("chest").placement.x == 3700


def test_a_refused_move_keeps_the_plan_and_what_was_typed() -> None:
    at = _app()
    gen = at.session_state["gen"]
    at.selectbox(key="pick").set_value("bed")
    at.run()
    before = at.session_state["plan"]
    at.number_input(key=f"pos_x_{gen}_bed").set_value(20000)  # far outside every room
    _click(at, "Put it here")
    # the piece may stand only in its own room, so the move is refused at its field
    assert "placement" in _errors(at) or at.session_state["plan"] != before
    assert at.number_input(key=f"pos_x_{gen}_bed").value == 20000


def test_edit_a_door_hinge_side_on_the_page() -> None:
    at = _app()
    _open_sample(at, WHEELCHAIR)
    gen = at.session_state["gen"]
    at.selectbox(key="pick_door").set_value("d-bedroom")
    at.run()
    at.radio(key=f"door_hinge_{gen}_d-bedroom").set_value("right")
    _click(at, "Apply to the door")
    door = next(d for d in at.session_state["plan"].doors if d.id == "d-bedroom")
    assert door.hinge == "right"
    at.number_input(key=f"door_w_{gen}_d-bedroom").set_value(50000)  # wider than its wall
    _click(at, "Apply to the door")
    assert re.search(r"doors\[\d\]\.width: 50000 mm is wider than its wall", _errors(at)), _errors(at)
    assert next(d for d in at.session_state["plan"].doors if d.id == "d-bedroom").width == 1000
    old = next(d for d in at.session_state["plan"].doors if d.id == "d-bedroom").at
    at.number_input(key=f"door_slide_{gen}_d-bedroom").set_value(-100)
    _click(at, "Move the door")
    new = next(d for d in at.session_state["plan"].doors if d.id == "d-bedroom").at
    assert abs(new[0] - old[0]) + abs(new[1] - old[1]) == 100  # along its wall, 100 mm
    assert any("moved 100 mm" in s.value for s in at.success), [s.value for s in at.success]


def test_add_a_window_and_a_door_on_the_page() -> None:
    at = _app()
    _open_sample(at, WHEELCHAIR)
    plan = at.session_state["plan"]
    room = plan.rooms[0]
    at.selectbox(key="new_window_room").set_value(room.id)
    at.run()
    at.selectbox(key=f"new_window_wall_{room.id}").set_value(page_edit.wall_choices(room)[0])
    at.number_input(key="new_window_along").set_value(300)
    at.number_input(key="new_window_w").set_value(400)
    _click(at, "Add the window")
    new = at.session_state["plan"].windows
    assert len(new) == len(plan.windows) + 1 and new[-1].room == room.id
    assert new[-1].at == page_edit.on_wall(room, 0, 300)
    # a door to nowhere it can reach is refused at its field, and the plan stays
    before = at.session_state["plan"]
    at.number_input(key="new_door_along").set_value(10)
    at.number_input(key="new_door_w").set_value(5000)
    _click(at, "Add the door")
    assert at.session_state["plan"] == before
    assert re.search(r"doors\[\d+\]", _errors(at)), _errors(at)


def test_plan_text_is_shown_as_typed_and_wide_pieces_keep_the_panel() -> None:
    at = _app()
    text = STUDIO.read_text().replace('name = "Studio, 14 Larchmere Row, flat 3"',
                                      'name = "[click](http://example.invalid) **bold**"')
    text += ('\n[[furniture]]\nid = "long-bench"\ntype = "custom"\nroom = "main"\n'
             'width = 25000\ndepth = 400\nheight = 450\n')
    at.sidebar.file_uploader[0].set_value(("odd.toml", text.encode(), "application/toml"))
    at.run()
    assert not at.exception
    assert at.subheader[0].value == r"\[click\]\(http\://example.invalid\) \*\*bold\*\*"
    at.selectbox(key="edit_piece").set_value("long-bench")
    at.run()
    gen = at.session_state["gen"]
    assert at.number_input(key=f"ed_w_{gen}_long-bench").value == 25000
    assert not at.exception and "furniture panel ran into a problem" not in _errors(at)
