"""Furniture catalogue: complete, sourced, consistent with the rule sets, and sized as the
handbooks say.

Expected sizes carry their source beside the check (the row id of
docs/references.md); only verified rows serve as oracles
(``reference_rows.oracle``). Inch sizes are compared within 3 mm of the exact conversion.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest
from reference_rows import STATUS, cited_rows, oracle

from roomfit.caution import CAUTION
from roomfit.cli import main
from roomfit.errors import PlanError
from roomfit.plan.data import Piece
from roomfit.rules.catalog import (
    RELATIONS,
    SIDES,
    TALL_HEIGHT,
    FurnitureType,
    catalog_problems,
    load_catalog,
    resolve_piece,
    type_record,
    zone_kinds,
)
from roomfit.rules.sets import load_ruleset, ruleset_ids

CAT = load_catalog()
IN = 25.4  # mm per inch, exact

#: Ids other modules and the sample plans rely on.
STABLE_IDS = ("bed-double-160", "bed-single-90", "nightstand", "wardrobe-hinged", "sofa-3",
              "dining-table-4", "desk", "tv-unit")


def test_size_and_stable_ids() -> None:
    assert len(CAT) >= 30
    assert set(STABLE_IDS) <= set(CAT)
    assert catalog_problems(CAT) == []


def test_required_kinds_of_furniture_present() -> None:
    cats = {t.category for t in CAT.values()}
    assert {"bed", "nightstand", "wardrobe", "dresser", "sofa", "armchair", "coffee_table", "tv",
            "dining_table", "desk", "bookcase"} <= cats
    sliding = [t for t in CAT.values() if t.category == "wardrobe"
               and dict(t.zones).get("front") == "storage_front_sliding"]
    hinged = [t for t in CAT.values() if t.category == "wardrobe"
              and dict(t.zones).get("front") == "storage_front"]
    assert sliding and hinged
    seats = {t.id for t in CAT.values() if t.category == "dining_table"}
    assert {"dining-table-2", "dining-table-4", "dining-table-6"} <= seats
    assert {t.id for t in CAT.values() if t.category == "sofa"} >= {"sofa-2", "sofa-3"}


def test_every_source_cites_rows_with_their_status() -> None:
    # A row cited in brackets exists in the reference; one marked M there says "from memory"
    # and one marked CP says "common practice"; a source citing no row says one of them.
    words = {"V": "", "M": "from memory", "CP": "common practice"}
    for t in CAT.values():
        rows = cited_rows(t.source)
        for row, qualifier in rows:
            assert qualifier == words[STATUS[row]], (t.id, row, qualifier)
        if not rows:
            assert "common practice" in t.source or "from memory" in t.source, t.id


@pytest.mark.parametrize("name", ruleset_ids())
def test_every_type_resolves_under_every_set(name: str) -> None:
    rules = load_ruleset(name)
    for t in CAT.values():
        spec = resolve_piece(Piece("p", t.id, ("r",)), rules, CAT)
        assert (spec.width, spec.depth, spec.height) == (t.width, t.depth, t.height)
        assert [(z.side, z.kind) for z in spec.zones] == list(t.zones)
        for z in spec.zones:
            assert z.depth == rules.mm(z.rule) > 0
        assert (spec.gap_min, spec.gap_max, spec.screen) == (t.gap_min, t.gap_max, t.screen)


def test_zone_kinds_and_relations_are_consistent() -> None:
    kinds = zone_kinds(CAT)
    assert "storage_front_sliding" in kinds and "dining_seat" in kinds
    cats = {t.category for t in CAT.values()}
    for t in CAT.values():
        assert all(side in SIDES for side, _ in t.zones)
        for rel, target in t.relations:
            assert rel in RELATIONS and target in cats
    rel = {t.id: dict(t.relations) for t in CAT.values()}
    assert rel["nightstand"] == {"beside_head": "bed"}
    assert rel["coffee-table"] == {"in_front": "sofa"}
    assert rel["sofa-3"] == {"facing": "tv"} and rel["sofa-2"] == {"facing": "tv"}
    # a sofa faces a TV: every TV type says how large its screen is
    assert all(t.screen > 0 for t in CAT.values() if t.category == "tv")


def test_dining_tables_seat_on_their_zoned_sides() -> None:
    for t in CAT.values():
        if t.category == "dining_table":
            assert {k for _, k in t.zones} == {"dining_seat"}
            assert {"front", "back"} <= {s for s, _ in t.zones}


def test_unknown_type_rejected() -> None:
    with pytest.raises(PlanError, match=r"furniture\[0\]\.type: unknown furniture type 'sofa-9'"):
        resolve_piece(Piece("p", "sofa-9", ("r",)), load_ruleset("everyday"), CAT,
                      "furniture[0]")


def test_catalog_problems_found() -> None:
    bad = FurnitureType("x", "X", "thing", 0, 500, 100, False, (("top", "shelf_front"),),
                        (("under", "bed"), ("facing", "hammock")), "", gap_min=5, gap_max=1)
    fields = [p.field for p in catalog_problems({"x": bad})]
    # zero width; empty source; unknown side; unknown relation 'under', and no type of
    # category 'bed' or 'hammock' in this one-type catalogue; gap range reversed
    assert fields == ["types.x", "types.x.source", "types.x.zones.top", *["types.x.relations"] * 3,
                      "types.x"]


# --- sizes against the reference rows


def _near(mm: int, inches: float) -> bool:
    return abs(mm - inches * IN) <= 3


def test_nightstand_and_dresser() -> None:
    n = CAT["nightstand"]  # US bedroom planning list: night stand 18 x 18 in (row S6)
    assert _near(n.width, oracle("S6", 18)) and _near(n.depth, 18)
    d = CAT["dresser"]  # same list: dresser 18 in deep x 42 in wide (row S7)
    assert _near(d.depth, oracle("S7", 18)) and _near(d.width, 42)


@pytest.mark.parametrize(("tid", "w_in", "l_in"), [
    ("bed-us-twin", 38, 75),        # US twin 38 x 75 in (row S3)
    ("bed-us-full", 54, 75),        # US full 54 x 75 in
    ("bed-us-queen", 60, 80),       # US queen 60 x 80 in
    ("bed-us-king", 76, 80),        # US king 76 x 80 in
    ("bed-us-cal-king", 72, 84),    # US California king 72 x 84 in
])
def test_us_frames_hold_their_mattress(tid: str, w_in: int, l_in: int) -> None:
    t = CAT[tid]
    mattress_w, mattress_l = oracle("S3", w_in) * IN, l_in * IN
    assert mattress_w <= t.width and mattress_l <= t.depth
    # the frame allowance itself (row S5) is from memory: checked only for being modest
    assert t.width - mattress_w <= 250 and t.depth - mattress_l <= 250


@pytest.mark.parametrize(("tid", "w", "length", "row"), [
    ("bed-single-90", 900, 2000, "S1"),    # EU single 900 x 2000
    ("bed-double-140", 1400, 2000, "S1"),  # EU double 1400 x 2000
    ("bed-double-160", 1600, 2000, "S1"),  # EU 1600 x 2000
    ("bed-double-180", 1800, 2000, "S1"),  # EU 1800 x 2000
    ("bed-uk-single", 900, 1900, "S2"),    # UK single 900 x 1900
    ("bed-uk-double", 1350, 1900, "S2"),   # UK double 1350 x 1900
    ("bed-uk-king", 1500, 2000, "S2"),     # UK king 1500 x 2000
])
def test_metric_frames_hold_their_mattress(tid: str, w: int, length: int, row: str) -> None:
    t = CAT[tid]
    assert oracle(row, w) <= t.width <= w + 250 and length <= t.depth <= length + 250


def test_bookcase_depth() -> None:
    # US living-room furniture data: bookcase 10-12 in deep (row S10)
    for t in CAT.values():
        if t.category == "bookcase":
            assert oracle("S10", 10) * IN - 3 <= t.depth <= 12 * IN + 3, t.id


def test_table_heights() -> None:
    # 2010 ADA §902.3: dining and work surfaces 28-34 in above the floor (row H5)
    for t in CAT.values():
        if t.category in ("dining_table", "desk"):
            assert oracle("H5", 28) * IN - 3 <= t.height <= 34 * IN + 3, t.id


def test_dining_table_sizes() -> None:
    # Panero & Zelnik: at least 24 in of table edge per diner (row E10)
    per_side = {"dining-table-2": 1, "dining-table-4": 2, "dining-table-6": 3}
    for tid, diners in per_side.items():
        assert CAT[tid].width / diners >= oracle("E10", 24) * IN - 3, tid
    # Panero & Zelnik: optimum table for two 30 x 40 in (row E11)
    two = CAT["dining-table-2"]
    assert _near(two.width, oracle("E11", 30)) and _near(two.depth, 40)
    # Neufert: 400 mm per diner each side plus a 200 mm shared strip (row E12)
    assert CAT["dining-table-6"].depth >= 2 * oracle("E12", 400) + 200


def test_large_desk_legroom() -> None:
    # EN 527-1:2011: seated legroom depth at least 800 mm (row S13)
    assert CAT["desk-large"].depth >= oracle("S13", 800)


def test_viewing_distance_range() -> None:
    # nearest seat: the screen fills about 40° of the horizontal field (row E26, common
    # practice); for a 16:9 screen distance = (width / 2) / tan(20°) = 1.197 D
    near = (16 / math.hypot(16, 9) / 2) / math.tan(math.radians(20))
    # SMPTE: the screen fills a 30° horizontal field (row E25); for a 16:9 screen the width is
    # 16/sqrt(16^2 + 9^2) of the diagonal, so distance = (width / 2) / tan(15°) = 1.626 D
    smpte = (16 / math.hypot(16, 9) / 2) / math.tan(math.radians(oracle("E25", 15)))
    assert smpte == pytest.approx(1.63, abs=0.005)
    for t in CAT.values():
        if ("facing", "tv") in t.relations:
            assert t.view_min == pytest.approx(near, abs=0.01)
            assert t.view_min <= smpte <= t.view_max


def test_coffee_table_gap_is_the_handbook_range() -> None:
    # design guidance 14-18 in sofa to coffee table (row E14) is common practice: the catalogue
    # cites it as such and keeps its range, nothing more is claimed
    t = CAT["coffee-table"]
    assert STATUS["E14"] == "CP" and "[E14, common practice]" in t.source
    assert (t.gap_min, t.gap_max) == (355, 455)


def test_tall_pieces() -> None:
    assert CAT["wardrobe-hinged"].height >= TALL_HEIGHT and CAT["bookcase"].height >= TALL_HEIGHT
    assert CAT["sideboard"].height < TALL_HEIGHT


# --- the `roomfit catalog` command


def test_cli_table(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["catalog"]) == 0
    out = capsys.readouterr().out
    lines = out.splitlines()
    assert all(any(line.startswith(tid + " ") for line in lines) for tid in CAT)
    header = lines[0]
    # aligned: every row's size column starts where the header's does
    col = header.index("size mm")
    row = next(x for x in lines if x.startswith("nightstand "))
    assert row[col:].startswith("455 x 455")
    assert out.rstrip().endswith(CAUTION)


def test_cli_json_with_rule_depths(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["catalog", "--json", "--rules", "din-18040-r", "--category", "bed"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["rules"] == "din-18040-r" and data["caution"] == CAUTION
    beds = {t["id"]: t for t in data["types"]}
    assert all(t["category"] == "bed" for t in beds.values())
    # DIN 18040-2 R, bedrooms: 1500 along one long side, 1200 along the other (row B4)
    depths = {z["side"]: z["depth"] for z in beds["bed-double-160"]["zones"]}
    assert depths["left"] == oracle("B4", 1500) and depths["right"] == 1200
    assert beds["bed-double-160"] == type_record(CAT["bed-double-160"], load_ruleset("din-18040-r"))


def test_cli_errors(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["catalog", "--category", "hammock"]) == 2
    assert "--category: no type has category 'hammock'" in capsys.readouterr().err
    assert main(["catalog", "--rules", "nope"]) == 2
    assert "unknown rule set 'nope'" in capsys.readouterr().err


def test_docs_list_every_type_with_its_size() -> None:
    doc = (Path(__file__).resolve().parents[1] / "docs" / "catalog.md").read_text()
    for t in CAT.values():
        row = next(line for line in doc.splitlines() if line.startswith(f"| `{t.id}` |"))
        assert f"| {t.width} x {t.depth} x {t.height} |" in row, t.id
    for kind in zone_kinds(CAT):
        assert f"`{kind}`" in doc


def test_sides_that_may_touch_are_those_without_a_use_zone():
    # A use zone keeps its side's floor free of furniture, so only zone-free sides may touch
    # another piece: a double bed only at its head (back); a dining table for 4 with chairs on
    # its two long sides (front, back) only at its ends (left, right).
    cat = load_catalog()
    assert cat["bed-double-160"].touch_sides == ("back",)
    assert cat["dining-table-4"].touch_sides == ("left", "right")
    for t in cat.values():
        assert set(t.touch_sides).isdisjoint(side for side, _ in t.zones)
