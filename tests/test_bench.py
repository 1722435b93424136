"""Tests for the benchmark: the instance generator, the annealing baseline and the harness.

No timings are asserted here; speed is what the benchmark itself reports.
"""

from __future__ import annotations

import json
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest
from shapely.geometry import Polygon

from roomfit.audit.check import audit
from roomfit.bench.baseline import AnnealOptions, anneal, layout_cost
from roomfit.bench.instances import SHAPES, InstanceSpec, floor_demand, generate, wheelchair_set
from roomfit.bench.run import run
from roomfit.bench.suite import BenchConfig
from roomfit.bench.summary import summarize
from roomfit.bench.tables import markdown
from roomfit.plan.data import Layout, Piece, Placement, Plan, Room, RuleChoice
from roomfit.plan.read import loads_plan
from roomfit.plan.write import dumps_plan
from roomfit.rules.sets import load_ruleset, rules_for

SIZES = [(1, 4), (1, 10), (3, 25), (5, 33), (8, 60)]


@pytest.mark.parametrize(("rooms", "pieces"), SIZES)
@pytest.mark.parametrize("shape", [*SHAPES, "mixed"])
def test_generator_sizes_and_valid_plan(rooms: int, pieces: int, shape: str) -> None:
    spec = InstanceSpec(rooms=rooms, pieces=pieces, shape=shape, rules="wheelchair", seed=4)
    plan = generate(spec)
    assert len(plan.rooms) == rooms
    assert len(plan.furniture) == pieces
    # the plan reader validates doors on walls, rooms not overlapping, ids, types ...
    assert loads_plan(dumps_plan(plan)) == plan
    assert plan.rules.set == wheelchair_set()
    assert sum(d.is_entrance for d in plan.doors) == 1
    assert len(plan.doors) == rooms  # the entrance plus one door between neighbours
    for room in plan.rooms:
        poly = Polygon(room.outline)
        assert poly.is_valid, room.id  # shapely as the independent judge of a simple polygon


def test_generator_is_deterministic_per_seed() -> None:
    a = InstanceSpec(rooms=3, pieces=20, shape="mixed", tightness="tight", seed=7)
    assert generate(a) == generate(a)
    assert generate(a) != generate(InstanceSpec(rooms=3, pieces=20, shape="mixed",
                                                tightness="tight", seed=8))


def test_generator_shapes() -> None:
    # an L has six corners, one angled wall gives five, with one edge off the axes
    for shape, corners, angled in (("rect", 4, 0), ("L", 6, 0), ("angled", 5, 1)):
        room = generate(InstanceSpec(rooms=1, pieces=6, shape=shape)).rooms[0]
        pts = room.outline
        edges = list(zip(pts, pts[1:] + pts[:1], strict=True))
        assert len(pts) == corners
        assert sum(a[0] != b[0] and a[1] != b[1] for a, b in edges) == angled


def test_tight_rooms_are_smaller_than_loose_ones() -> None:
    loose = generate(InstanceSpec(rooms=1, pieces=10, tightness="loose", seed=2))
    tight = generate(InstanceSpec(rooms=1, pieces=10, tightness="tight", seed=2))
    assert loose.furniture == tight.furniture
    area = {n: Polygon(p.rooms[0].outline).area for n, p in (("loose", loose), ("tight", tight))}
    share = {n: floor_demand(p, p.rooms[0].id) / area[n] for n, p in (("loose", loose), ("tight", tight))}
    assert share["tight"] > share["loose"]


def _box_plan(b_at: tuple[int, int]) -> tuple[Plan, Layout]:
    room = Room("r", "Room", "living", ((0, 0), (4000, 0), (4000, 3000), (0, 3000)))
    pieces = (Piece("a", "custom", ("r",), "A", 1000, 1000, 450),
              Piece("b", "custom", ("r",), "B", 1000, 1000, 450))
    plan = Plan("boxes", (room,), furniture=pieces, rules=RuleChoice("everyday"))
    return plan, (("a", Placement(500, 500, 0, "r")), ("b", Placement(*b_at, 0, "r")))


def test_baseline_cost_terms_worked_examples() -> None:
    rules = load_ruleset("everyday")
    # by hand: two 1000 x 1000 boxes offset by 500 mm both ways overlap 500 x 500 = 0.25 m2,
    # at 20 per m2 that is 5.0; apart, nothing is wrong (no doors, zones or turning space)
    plan, lay = _box_plan((1000, 1000))
    assert layout_cost(plan, rules, lay)[0] == pytest.approx(5.0)
    plan, lay = _box_plan((2500, 1000))
    assert layout_cost(plan, rules, lay)[0] == pytest.approx(0.0)
    # by hand: at x = 3500 half of B (500 x 1000 = 0.5 m2) is outside the 4000 mm room: 10.0
    plan, lay = _box_plan((3500, 1000))
    assert layout_cost(plan, rules, lay)[0] == pytest.approx(10.0)


def test_baseline_reduces_cost_and_is_reproducible() -> None:
    plan = generate(InstanceSpec(rooms=1, pieces=6, seed=1))
    rules = rules_for(plan)
    opts = AnnealOptions(time_limit=60, seed=3, max_iterations=1000, judge_interval=0)
    res = anneal(plan, rules, opts)
    assert res.iterations == 1000
    assert res.cost < res.trace[0][1] / 5
    assert (res.hard, res.soft) == pytest.approx(layout_cost(plan, rules, res.layout))
    again = anneal(plan, rules, opts)
    assert again.layout == res.layout


def test_baseline_is_judged_by_the_checker() -> None:
    plan = generate(InstanceSpec(rooms=1, pieces=5, seed=2))
    rules = rules_for(plan)
    opts = AnnealOptions(time_limit=60, seed=1, max_iterations=1200, judge_interval=0)
    # a judge that accepts nothing: the search cannot call anything valid by itself
    asked: list[Layout] = []
    res = anneal(plan, rules, opts, judge=lambda lay: asked.append(lay) is not None)
    assert res.judged_valid is False and res.time_to_valid is None
    assert asked, "a state with no hard cost should have been put to the judge"
    # the checker as judge: a loose room of five pieces is solved, and the returned
    # arrangement passes the checker when we audit it ourselves
    res = anneal(plan, rules, opts, judge=lambda lay: audit(plan.with_layout(lay), rules).passed)
    assert res.judged_valid is True and res.time_to_valid is not None
    result = audit(plan.with_layout(res.layout), rules)
    assert result.passed, [f.message for f in result.failures]
    assert {pid for pid, _ in res.layout} == {p.id for p in plan.furniture}


def test_harness_writes_well_formed_results(tmp_path: Path) -> None:
    config = BenchConfig(quick=True, seed=0, time_budget=0.5, samples=False,
                         instances=(InstanceSpec(rooms=1, pieces=4, seed=0),))
    out = tmp_path / "results.json"
    said: list[str] = []
    run(config, out, said.append)

    def strict(name: str) -> None:
        raise ValueError(f"not JSON: {name}")

    data = json.loads(out.read_text(), parse_constant=strict)
    assert data["machine"]["cpu_count"] and data["machine"]["python"]
    assert data["machine"]["ortools"] and data["machine"]["shapely"]
    assert set(data["code"]) == {"commit", "dirty"}
    (row,) = data["instances"]
    assert (row["rooms"], row["pieces"]) == (1, 4)
    assert "status" in row["solver"] or "error" in row["solver"]
    assert isinstance(row["baseline"]["success"], bool)
    assert row["baseline"]["arrangement"]["passed"] is row["baseline"]["success"]
    assert set(data["summary"]["targets"]) >= {"first_valid_1room_10", "impossible_explained"}
    assert [p["pieces"] for p in data["scaling"]] == [4]
    svg = ET.fromstring(out.with_suffix(".svg").read_text())  # well-formed XML
    assert svg.tag.endswith("svg")
    assert said and all(m.startswith("[1/1]") for m in said)
    assert "| one room, 10 pieces: first valid (median) |" in markdown(data)
    # group rules measured on both sides (roomfit.audit.quality), side by side
    assert {"group_met", "group_total", "group_failed"} <= set(row["baseline"]["arrangement"])
    assert set(data["summary"]["group_rules"]) == {"solver", "baseline"}
    assert "Functional-group rules met" in markdown(data)


def _row(name: str, tags: tuple[str, ...], solver: dict, baseline: dict | None = None) -> dict:
    row = {"name": name, "tags": list(tags), "rooms": 1, "pieces": 10, "floor_share": 0.5,
           "solver": solver}
    if baseline is not None:
        row["baseline"] = baseline
    return row


def test_group_rules_summed_by_hand() -> None:
    from roomfit.bench.summary import group_rules_summary

    good = {"passed": True, "group_met": 4, "group_total": 4}
    half = {"passed": True, "group_met": 2, "group_total": 4}
    traded = [{"label": "bed", "rules": ["group.bed_window"], "reach": "possible"},
              {"label": "sofa", "rules": ["group.view"], "reach": "impossible"}]
    rows = [_row("a", ("generated",), {"arrangements": [good, half]}, {"arrangement": half}),
            _row("b", ("generated",), {"arrangements": [half], "possible": traded},
                 {"arrangement": {**good, "passed": False}})]  # an invalid one does not count
    g = group_rules_summary(rows)
    # solver first candidates: 4 + 2 of 8 checks; baseline: only a's valid 2 of 4
    assert g["solver"] == {"arrangements": 2, "checks_met": 6, "checks": 8, "share": 0.75,
                           "all_met": 1, "misses": {"impossible": 1, "possible": 1}}
    assert g["baseline"] == {"arrangements": 1, "checks_met": 2, "checks": 4, "share": 0.5,
                             "all_met": 0}


def test_summary_targets_by_hand() -> None:
    ok = {"status": "found", "candidates": 3, "pass_rate": 1.0}
    rows = [
        _row("a", ("first-valid", "generated", "loose"), {**ok, "time_first_valid_s": 0.2},
             {"success": True}),
        _row("b", ("first-valid", "generated", "loose"), {**ok, "time_first_valid_s": 0.9},
             {"success": True}),
        _row("c", ("first-valid", "generated", "loose"), {**ok, "time_first_valid_s": 0.4},
             {"success": False}),
        _row("d", ("three-rooms",), {**ok, "time_all_s": 8.0}),
        _row("e", ("impossible",), {"status": "impossible", "elapsed_s": 3.5, "explanation": "x"}),
        _row("f", ("generated", "tight"), {**ok, "pass_rate": 0.5}, {"success": False}),
        _row("g", ("generated", "tight"), {"status": "timeout", "candidates": 0}, {"success": False}),
    ]
    t = summarize(rows)["targets"]
    assert t["first_valid_1room_10"]["median_s"] == 0.4  # median of 0.2, 0.4, 0.9
    assert t["first_valid_1room_10"]["met"] is True
    assert t["three_rooms_25_3cand"]["met"] is True
    assert t["impossible_explained"]["met"] is False  # 3.5 s > 3 s
    assert t["all_candidates_valid"]["met"] is False  # instance f: half its candidates failed
    # tight: solver found something on 1 of 2, the baseline on 0 of 2
    tight = t["baseline_worse_on_tight"]
    assert (tight["solver_success"], tight["baseline_success"]) == (0.5, 0.0)
    assert tight["met"] is True
    # a run that found nothing counts as the slowest: median of 0.4, 0.9 and nothing is 0.9
    rows[0]["solver"]["time_first_valid_s"] = None
    t = summarize(rows)["targets"]
    assert t["first_valid_1room_10"]["median_s"] == 0.9
    assert (t["first_valid_1room_10"]["found"], t["first_valid_1room_10"]["runs"]) == (2, 3)
    assert t["first_valid_1room_10"]["met"] is False


def test_certified_corpus_has_witnesses_the_audit_passes_and_the_solver_finds() -> None:
    # the witness is judged by the audit, independently of the solver; solving from scratch
    # must find an arrangement (a certified instance is never "impossible")
    from roomfit.audit.check import audit as judge
    from roomfit.bench.certified import corpus, run

    items, _ = corpus(2, seed=1, pieces=2)
    assert items
    for c in items:
        assert all(p.placement is None for p in c.plan.furniture)
        assert judge(c.plan.with_layout(c.witness), c.rules).passed
    results = run(items, time_limit=20)
    assert results["summary"]["found_share"] == 1.0
    assert results["summary"]["wrong_impossible"] == 0 and results["summary"]["early_give_ups"] == 0


def test_certified_corpus_written_as_plan_files_reads_back_and_the_witness_passes(tmp_path: Path) -> None:
    # what another checkout's solver reads: the instance unplaced, the witness placed; the
    # plan reader and the audit judge them, not the code that wrote them
    from roomfit.bench.certified import corpus, write_corpus
    from roomfit.plan.read import read_plan

    items, _ = corpus(2, seed=3, pieces=3)
    paths = write_corpus(items, tmp_path)
    assert [p.name for p in paths] == [f"{c.name}.toml" for c in items]
    for c, path in zip(items, paths, strict=True):
        plan = read_plan(path)
        assert plan.rules.set == c.rules.id
        assert all(p.placement is None for p in plan.furniture)
        witness = read_plan(path.with_name(f"{c.name}.witness.toml"))
        assert audit(witness, rules_for(witness)).passed


def test_the_baseline_on_the_certified_corpus_is_judged_by_the_audit() -> None:
    from roomfit.bench.certified import baseline_rows, corpus, summarize

    items, _ = corpus(2, seed=1, pieces=2)
    rows = baseline_rows(items, time_limit=20)
    assert [r["name"] for r in rows] == [c.name for c in items]
    for r in rows:
        # the baseline proves nothing: it never answers "impossible" nor gives up early
        assert not r["wrong_impossible"] and not r["early_give_up"]
        assert (r["first"] is not None) == r["found"]
    s = summarize(rows, 20)
    assert s["instances"] == 2 and s["found"] == sum(r["found"] for r in rows)


def test_another_checkout_solves_the_same_corpus() -> None:
    # this tree stands in for the other checkout: a child process with its own PYTHONPATH
    # reads the written plans and solves them; a certified instance is found
    from roomfit.bench.certified import corpus
    from roomfit.bench.checkout import solve_in_tree

    items, _ = corpus(1, seed=1, pieces=2)
    root = Path(__file__).resolve().parent.parent
    rows, commit = solve_in_tree(root, items, time_limit=20)
    assert [r["name"] for r in rows] == [items[0].name]
    # found means the layout passes this tree's audit as well as the other checkout's
    assert rows[0]["found"] and rows[0]["found_by_own_audit"]
    assert rows[0]["first"] is not None and not rows[0]["wrong_impossible"]
    assert commit is None or len(commit) == 40
    with pytest.raises(FileNotFoundError, match="no roomfit checkout"):
        solve_in_tree(root / "docs", items, time_limit=1)


def test_carried_results_equal_the_recomputed_ones() -> None:
    # what the summary table shows must not change when it reads the solver's results
    # instead of judging each candidate again
    from roomfit.bench.carried import cells, measure
    from roomfit.solve.search import SolveOptions, solve

    plan = generate(InstanceSpec(rooms=1, pieces=4, seed=0))
    rules = rules_for(plan)
    result = solve(plan, rules, SolveOptions(candidates=2, time_limit=20, seed=0))
    assert result.candidates
    for c in result.candidates:
        assert c.audit is not None and c.routes is not None
        assert cells(plan, rules, c, recompute=False) == cells(plan, rules, c, recompute=True)
    row = measure("four pieces", plan, rules, time_limit=20)
    assert row["candidates"] >= 1 and row["same_cells"] is True
    assert {"before_s", "after_s", "draw_s"} <= set(row)


def test_sawtooth_plan_has_the_corners_asked_and_routes_reach_every_box() -> None:
    from roomfit.bench.vertices import measure, sawtooth_plan

    plan = sawtooth_plan(1000)
    assert len(plan.rooms[0].outline) == 1000
    assert Polygon(plan.rooms[0].outline).is_valid  # shapely as the judge of a simple polygon
    assert loads_plan(dumps_plan(plan)) == plan  # within the plan file's corner limit
    row = measure(300)
    assert row["vertices"] == 300
    assert (row["trips"], row["reachable"]) == (5, 5) and row["audit_passed"]
    assert row["detail"]["nodes"] > 0 and row["detail"]["parts"] == 1
    with pytest.raises(ValueError, match="does not fit"):
        sawtooth_plan(50_000)


def test_one_room_series_reports_a_first_valid_layout() -> None:
    from roomfit.bench.one_room import series, words

    (row,) = series([4], time_limit=20, seed=0, say=lambda _: None)
    assert row["pieces"] == 4 and row["first_valid_s"] is not None
    assert words(row).startswith("first valid")
    assert words({**row, "first_valid_s": None, "status": "timeout"}) == "none in 20 s (timeout)"


def test_section_tables_have_the_rows_they_claim(tmp_path: Path) -> None:
    from roomfit.bench.tables import section_tables, sections_text

    out = tmp_path / "v.json"
    data = run(BenchConfig(quick=True, only="vertices"), out, lambda _: None)
    assert data["instances"] == [] and set(data["sections"]) == {"vertices"}
    ((title, head, rows),) = section_tables(data["sections"])
    assert [r[0] for r in rows] == ["1000", "10000"] and len(head) == len(rows[0])
    assert all(r[6] == "5 of 5" for r in rows)
    assert title in sections_text(data["sections"]) and title in markdown(data)
    cert = {"time_limit_s": 10.0, "previous_commit": "a" * 40, "groups": [{
        "pieces": 5, "tightness": "tight", "count": 2, "skipped": 0, "methods": {
            m: {"rows": [], "summary": {"instances": 2, "found": k, "first_median": 0.5,
                                        "first_p95": 0.9, "first_max": 0.9, "early_give_ups": 0,
                                        "wrong_impossible": 0}}
            for k, m in enumerate(("solver", "baseline", "previous"))}}]}
    ((title, _, rows),) = section_tables({"certified": cert})
    assert [r[:2] for r in rows] == [["solver (this tree)", "0 of 2"],
                                     ["annealing baseline", "1 of 2"],
                                     ["previous solver (aaaaaaa)", "2 of 2"]]


def test_found_plot_steps_up_once_per_instance_found() -> None:
    from roomfit.bench.plot import found_svg

    svg = ET.fromstring(found_svg([("solver", [0.1, 1.0, None]), ("baseline", [None, None, 5.0])],
                                  10.0, "t"))
    ns = "{http://www.w3.org/2000/svg}"
    lines = [p.get("points", "").split() for p in svg.iter(f"{ns}polyline")]
    assert len(lines) == 2
    ys = [[float(pt.split(",")[1]) for pt in pts] for pts in lines]
    # start at 0 %, end at 2 of 3 and 1 of 3 of the plot's height (40 px top, 310 px tall)
    assert ys[0][0] == pytest.approx(350) and ys[0][-1] == pytest.approx(350 - 310 * 2 / 3, abs=0.1)
    assert ys[1][-1] == pytest.approx(350 - 310 / 3, abs=0.1)


def test_a_building_finding_does_not_count_against_a_candidate() -> None:
    # a generated two-room wheelchair flat whose bare floor fails a door's approach (a
    # building finding the solve furnishes around and reports): its candidate counts as
    # valid in the benchmark, with the finding counted apart, not as a checker failure
    from roomfit.bench.instances import InstanceSpec, generate
    from roomfit.bench.measure import time_arrangement
    from roomfit.rules.sets import rules_for
    from roomfit.solve.search import SolveOptions, solve

    plan = generate(InstanceSpec(2, 12, "mixed", "wheelchair", "tight", 1))
    rules = rules_for(plan)
    res = solve(plan, rules, SolveOptions(candidates=1, time_limit=30, seed=0))
    assert res.building and res.candidates
    layout = res.candidates[0].layout
    row = time_arrangement(plan, rules, layout, res.building)
    assert row["passed"] and row["building_failures"] >= 1
    assert not time_arrangement(plan, rules, layout)["passed"]
