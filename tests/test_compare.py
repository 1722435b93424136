"""The comparison table: metrics per arrangement and the best value per metric."""

from __future__ import annotations

from dataclasses import replace

import pytest

from roomfit.audit.check import audit
from roomfit.audit.routes import route
from roomfit.plan.data import Door, Fixture, Leaf, Piece, Placement, Plan, Room, Trip
from roomfit.present.compare import METRICS, compare, render_table
from roomfit.rules.sets import load_ruleset

EVERYDAY = load_ruleset("everyday")


def _block(pid: str, x: int, w: int) -> Piece:
    return Piece(pid, "custom", ("r",), width=w, depth=1000, height=700,
                 placement=Placement(x, 1500, 0, "r"))


def _arrangement(gap: int, at: int) -> Plan:
    """A 5000 x 4000 mm room split by two 1000 mm deep pieces leaving one ``gap`` starting at
    x = ``at``; the entrance on the south wall, a WC with its use zone in the north-east."""
    room = Room("r", "Room", "living", ((0, 0), (5000, 0), (5000, 4000), (0, 4000)))
    door = Door("in", ("r", "outside"), (1000, 0), 1600, Leaf.NONE)  # wider than both gaps
    wc = Fixture("wc", "r", "wc", "WC", ((4600, 3600), (5000, 3600), (5000, 4000), (4600, 4000)),
                 400, ((4000, 3600), (4600, 3600), (4600, 4000), (4000, 4000)))
    pieces = (_block("a", 0, at), _block("b", at + gap, 5000 - at - gap))
    return Plan("gap", (room,), doors=(door,), fixtures=(wc,), furniture=pieces,
                routines=(Trip("entrance", "wc", 3, "In to WC"),))


def test_rows_and_best_values():
    near = _arrangement(900, 1500)     # a 900 mm gap near the entrance
    wide = _arrangement(1200, 3300)    # a 1200 mm gap near the WC
    cmp = compare([near, wide], ["near", "wide"], EVERYDAY)
    a, b = cmp.rows
    # walking: 3 trips a day times the route length, routed independently
    for row, plan in ((a, near), (b, wide)):
        length = route(plan, EVERYDAY, "entrance", "wc").length_mm
        assert row.walking_m_per_day == pytest.approx(3 * length / 1000)
        assert row.rules_failed == len(audit(plan, EVERYDAY).failures)
    # free floor by hand: 20 m2 room less the WC (0.16 m2) and the pieces (5000 - gap) x 1000
    assert a.free_floor_share == pytest.approx((20e6 - 0.16e6 - 4.1e6) / 20e6)
    assert b.free_floor_share == pytest.approx((20e6 - 0.16e6 - 3.8e6) / 20e6)
    # built-in gaps: 900 and 1200 mm
    assert a.narrowest_mm == pytest.approx(900, abs=10)
    assert b.narrowest_mm == pytest.approx(1200, abs=10)
    assert cmp.is_best("narrowest", 1) and not cmp.is_best("narrowest", 0)
    assert cmp.is_best("free_floor", 1) and not cmp.is_best("free_floor", 0)
    # walking is compared at the 0.1 m shown: the best rows are those at the least value
    shown = [round(r.walking_m_per_day, 1) for r in cmp.rows]
    if shown[0] != shown[1]:
        assert [cmp.is_best("walking", i) for i in (0, 1)] == [s == min(shown) for s in shown]
    far = compare([near, _arrangement(900, 100)], ["near", "far"], EVERYDAY)
    metres = [r.walking_m_per_day for r in far.rows]
    assert metres[0] < metres[1] - 1  # the gap at the far west wall makes a detour
    assert far.is_best("walking", 0) and not far.is_best("walking", 1)


def test_unreachable_trip_ranks_behind_any_metres():
    ok = _arrangement(900, 1500)
    shut = _arrangement(600, 1500)  # 600 mm < the 762 mm route width: the WC is cut off
    cmp = compare([shut, ok], ["shut", "ok"], EVERYDAY)
    assert cmp.rows[0].unreachable == 1 and cmp.rows[0].walking_m_per_day == 0
    assert cmp.is_best("walking", 1) and not cmp.is_best("walking", 0)
    assert "unreachable" in cmp.rows[0].text("walking")


def test_ties_and_single_rows_mark_nothing():
    plan = _arrangement(900, 1500)
    assert compare([plan, replace(plan, name="copy")], ["x", "y"], EVERYDAY).best == ()
    assert compare([plan], ["x"], EVERYDAY).best == ()


def test_turning_spaces_counted_from_the_audit():
    plan = _arrangement(1200, 3300)
    ada = load_ruleset("ada-2010")
    row = compare([plan], ["x"], ada).rows[0]
    turning = audit(plan, ada).by_rule("turning.space")
    # 2010 ADA §809.2.2: every room on the route needs a §304 turning space
    assert row.turning_need == len(turning) >= 1
    assert row.turning_have == sum(f.ok for f in turning)
    assert compare([plan], ["x"], EVERYDAY).rows[0].text("turning") == "not asked"


def test_text_table_marks_best_values_and_lists_unreachable_trips():
    cmp = compare([_arrangement(900, 1500), _arrangement(600, 1500)], ["one", "two"], EVERYDAY)
    lines = render_table(cmp).splitlines()
    assert lines[0].split() == ["one", "two"]
    for m in METRICS:
        assert any(line.startswith(m.label) for line in lines)
    # "two" leaves the WC unreachable: "one" has the wider passage and the better walking
    narrow = next(line for line in lines if line.startswith("Narrowest"))
    assert narrow.index("*") < narrow.index("unreachable")
    assert "* best value" in lines
    assert any(line.startswith("two: In to WC unreachable: no way 762 mm wide") for line in lines)


def test_names_must_match_plans():
    with pytest.raises(ValueError, match="one name per plan"):
        compare([_arrangement(900, 1500)], ["a", "b"], EVERYDAY)


def test_plan_without_trips_is_not_best_at_walking():
    # no routine and nothing a default trip joins (no WC, no kitchen): there is no walking to
    # compare, so 0 m must not beat the arrangement whose occupant walks to the WC
    walks = _arrangement(900, 1500)
    still = replace(walks, fixtures=(), routines=())
    cmp = compare([walks, still], ["walks", "still"], EVERYDAY)
    assert not cmp.rows[1].routes.trips
    assert cmp.rows[1].value("walking") is None and cmp.rows[1].text("walking") == "- (no trips)"
    assert not cmp.is_best("walking", 1)
    assert "still: no routine in the plan; no default trip applies" in render_table(cmp)


def test_unplaced_pieces_and_cut_off_turning_spaces_are_not_best():
    # an as-is plan that leaves a piece unplaced has more free floor only because the piece
    # is missing: it ranks behind the arrangement that places everything
    placed = _arrangement(900, 1500)
    loose = replace(placed, furniture=(placed.furniture[0],
                                       replace(placed.furniture[1], placement=None)))
    cmp = compare([loose, placed], ["loose", "placed"], EVERYDAY)
    assert loose.furniture[1].placement is None and cmp.rows[0].free_floor_share > \
        cmp.rows[1].free_floor_share
    assert cmp.is_best("free_floor", 1) and not cmp.is_best("free_floor", 0)
    assert "1 not placed" in cmp.rows[0].text("free_floor")
    # ISO 21542 asks a 1500 mm turning circle in each room: here it fits only north of a
    # 600 mm gap that no route passes (its route width is wider), so the audit finds it cut
    # off and the comparison counts it as missing, not as had
    iso = load_ruleset("iso-21542")
    assert iso.get("route.width").exact_mm > 600
    low = replace(_arrangement(600, 1500), furniture=tuple(
        replace(p, placement=replace(p.placement, y=800)) for p in placed.furniture))
    row = compare([low], ["low"], iso).rows[0]
    assert [f.ok for f in row.audit.by_rule("turning.space")] == [True]
    assert row.turning_have == 0 and row.turning_need == 1


def test_results_already_known_are_read_not_recomputed(monkeypatch: pytest.MonkeyPatch) -> None:
    """A solver candidate carries its audit and route scores: the comparison reads them and
    gives the same row as judging the arrangement afresh."""
    import roomfit.present.compare as cmp_module
    from roomfit.audit.routes import score_routes

    plans = [_arrangement(900, 1500), _arrangement(1200, 3300)]
    fresh = compare(plans, ["near", "wide"], EVERYDAY)
    known = [(audit(p, EVERYDAY), score_routes(p, EVERYDAY)) for p in plans]

    def judged_again(*_: object, **__: object) -> None:
        raise AssertionError("an arrangement with known results was judged again")

    monkeypatch.setattr(cmp_module, "audit", judged_again)
    monkeypatch.setattr(cmp_module, "score_routes", judged_again)
    carried = compare(plans, ["near", "wide"], EVERYDAY, known)
    for a, b in zip(fresh.rows, carried.rows, strict=True):
        assert (a.rules_failed, a.walking_m_per_day, a.narrowest_mm, a.turning_have) == (
            b.rules_failed, b.walking_m_per_day, b.narrowest_mm, b.turning_have)
    assert fresh.best == carried.best
    with pytest.raises(ValueError, match="one \\(audit, routes\\) per plan"):
        compare(plans, ["near", "wide"], EVERYDAY, known[:1])
