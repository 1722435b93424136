"""Tests of the exact-geometry audit against outside facts (sources named beside each).

Hand-made layouts: a rectangular room with a doorway in the south wall (the entrance) and a
cupboard fitting against the north wall whose zone is the target; two custom pieces build a
wall across the room with a gap of known width and length.
"""

from __future__ import annotations

import json
import math
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
import shapely
from shapely import Polygon, box

from roomfit.audit.check import Audit, Finding, audit, marks_for, summary_text, turning_space
from roomfit.cli import main
from roomfit.plan.data import (
    OUTSIDE,
    Door,
    Fixture,
    Leaf,
    Piece,
    Placement,
    Plan,
    Room,
    RuleChoice,
    Window,
)
from roomfit.plan.read import read_plan
from roomfit.plan.units import inches
from roomfit.rules.sets import load_ruleset, ruleset_ids

ROOM_W, ROOM_D = 4000, 5000
WALL_Y = 1500  # south face of the wall of pieces


def _room_plan(pieces: tuple[Piece, ...] = (), doors: tuple[Door, ...] | None = None,
               windows: tuple[Window, ...] = (), rules: str = "everyday",
               overrides: tuple[tuple[str, int | str], ...] = (),
               size: tuple[int, int] = (ROOM_W, ROOM_D), fixtures: bool = True) -> Plan:
    w, d = size
    room = Room("r", "Room", "living", ((0, 0), (w, 0), (w, d), (0, d)))
    if doors is None:
        doors = (Door("entry", ("r", OUTSIDE), (w // 2, 0), 1000, Leaf.NONE),)
    fx = (Fixture("cupboard", "r", "cupboard", "Cupboard",
                  ((1500, d - 300), (2500, d - 300), (2500, d), (1500, d)), 2000,
                  ((1500, d - 1300), (2500, d - 1300), (2500, d - 300), (1500, d - 300))),)
    return Plan("test", (room,), doors, windows, fx if fixtures else (), pieces,
                RuleChoice(rules, overrides))


def _custom(pid: str, x0: int, y0: int, x1: int, y1: int, height: int = 800) -> Piece:
    return Piece(pid, "custom", ("r",), width=x1 - x0, depth=y1 - y0, height=height,
                 placement=Placement(x0, y0, 0, "r"))


def _gap(gap: int, length: int, left: int = 1500) -> tuple[Piece, ...]:
    """Two pieces from wall to wall across the room leaving a ``gap`` mm passage, ``length``
    mm long, from x = ``left``."""
    return (_custom("a", 0, WALL_Y, left, WALL_Y + length),
            _custom("b", left + gap, WALL_Y, ROOM_W, WALL_Y + length))


def _one(result: Audit, rule: str, text: str) -> Finding:
    found = [f for f in result.findings if f.rule == rule and text in f.message]
    assert len(found) == 1, [f.message for f in result.by_rule(rule)]
    return found[0]


def _cupboard(result: Audit) -> Finding:
    return _one(result, "route.reach", "fitting cupboard")


# --------------------------------------------------------------------------- turning space


def test_circle_fits_square_room_worked_example() -> None:
    # worked example by hand: a 1500 mm circle fits a free 1500 x 1500 mm square, not 1490
    assert turning_space(box(0, 0, 1500, 1500), 1500, "circle").fits
    assert not turning_space(box(0, 0, 1490, 1500), 1500, "circle").fits


def test_turning_space_in_audited_room() -> None:
    # the same worked example through the whole audit, ISO 21542 / UK M4(3) size 1500 mm
    for side, fits in ((1500, True), (1490, False)):
        plan = _room_plan(rules="ada-2010", size=(side, side), fixtures=False,
                          overrides=(("turning.size", 1500), ("turning.shape", "circle")),
                          doors=(Door("entry", ("r", OUTSIDE), (side // 2, 0), 900, Leaf.NONE),))
        f = audit(plan, load_ruleset("ada-2010", plan.rules.override_map())).by_rule(
            "turning.space")[0]
        assert f.ok is fits
        assert f.required == 1500


def test_inscribed_circle_of_rectangle() -> None:
    # by hand: the largest circle in a 2000 x 1000 rectangle has the short side as diameter
    res = turning_space(box(0, 0, 2000, 1000), 3000, "circle")
    assert res.measured == pytest.approx(1000, abs=2)
    assert 500 - 2 <= res.centre[1] <= 500 + 2


def test_inscribed_circle_of_l_shape() -> None:
    # by hand: in the L [0,3000]x[0,1000] + [0,1000]x[0,3000] the largest circle touches both
    # outer walls and the inner corner (1000, 1000): r = sqrt(2) (1000 - r), r = 1000 (2 - sqrt 2)
    ell = box(0, 0, 3000, 1000).union(box(0, 0, 1000, 3000))
    radius = 1000 * (2 - math.sqrt(2))
    res = turning_space(ell, 3000, "circle")
    assert res.measured == pytest.approx(2 * radius, abs=2)
    # shapely's own maximum inscribed circle as an independent reference
    assert shapely.maximum_inscribed_circle(ell, 0.01).length == pytest.approx(radius, abs=1)


def test_t_shaped_space_fits_where_circle_does_not() -> None:
    # 2010 ADA §304.3.2: the T fits in a 60 x 60 in square; arms 36 in wide, 12 in beyond the
    # stem, stem 24 in long. A 60 in room with its corner blocked by a 300 x 600 mm box (inside
    # the 12 x 24 in notch beside the stem) holds the T but not the 60 in circle (§304.3.1).
    side = inches(60)
    room = box(0, 0, side, side)
    free = room.difference(box(0, 0, 300, 600))
    assert not turning_space(free, side, "circle").fits
    res = turning_space(free, side, "circle-or-t")
    assert res.fits and res.shape == "t"
    # a 400 x 700 mm box reaches into the stem or the bar in every orientation: no T
    worse = room.difference(box(0, 0, 400, 700))
    assert not turning_space(worse, side, "circle-or-t").fits


def test_t_shaped_space_in_audit_is_reachable() -> None:
    # the same 60 in room under the ADA 2010 set, entered through a doorway in the south wall:
    # the turning space passes as a T (§304.3.2) and is reachable at 36 in (§403.5.1)
    side = round(inches(60))
    rules = load_ruleset("ada-2010")
    plan = _room_plan((_custom("box", 0, 0, 300, 600),), size=(side, side), fixtures=False,
                      rules="ada-2010",
                      doors=(Door("entry", ("r", OUTSIDE), (side // 2, 0), 915, Leaf.NONE),))
    result = audit(plan, rules)
    turning = result.by_rule("turning.space")[0]
    assert turning.ok and "T-shaped" in turning.message
    assert _one(result, "route.reach", "turning space").ok


def test_square_movement_area() -> None:
    # DIN 18040-2: 1500 x 1500 mm movement area; a free 1500 mm square room holds it exactly
    assert turning_space(box(0, 0, 1500, 1500), 1500, "square").fits
    assert not turning_space(box(0, 0, 1500, 1490), 1500, "square").fits
    # a 1500 mm wide room with a box on one side at y 1400..1600: by hand the square fits
    # above the box when the room is 1600 + 1500 = 3100 mm long, not when it is 3090
    free = box(0, 0, 1500, 3100).difference(box(0, 1400, 200, 1600))
    assert turning_space(free, 1500, "square").fits
    free = box(0, 0, 1500, 3090).difference(box(0, 1400, 200, 1600))
    assert not turning_space(free, 1500, "square").fits


def test_square_too_big_for_the_room_names_the_circle_that_fits() -> None:
    # DIN 18040-2 level R asks a 1500 mm movement square; a 4000 x 1200 mm room holds a
    # circle 1200 mm across at most (its short side, by hand), so no square: the message
    # says which shape it measured
    room = Room("r", "R", "hall", ((0, 0), (4000, 0), (4000, 1200), (0, 1200)))
    plan = Plan("narrow", (room,), (Door("in", ("r", OUTSIDE), (2000, 0), 1000, Leaf.NONE),))
    f = audit(plan, load_ruleset("din-18040-r")).by_rule("turning.space")[0]
    assert not f.ok and f.measured == pytest.approx(1200, abs=1)
    assert ("the largest circle that fits is 1200 mm across, too small to hold the square"
            in f.message)


# --------------------------------------------------------------------------- routes


@pytest.mark.parametrize("set_id", ruleset_ids())
def test_passage_one_mm_either_side_of_route_width(set_id: str) -> None:
    # each set's own route.width (its source is in the rule file): a passage 1 mm narrower
    # fails and 1 mm wider passes; the passage is longer than any pinch allowance (2010 ADA
    # §403.5.1 Exception allows 32 in over 24 in; the everyday set allows none)
    rules = load_ruleset(set_id)
    width = rules.get("route.width").exact_mm
    length = max(1000, rules.mm("route.pinch_length") + 300)
    narrow, wide = math.floor(width - 1), math.ceil(width + 1)  # whole mm, >= 1 mm off
    assert narrow <= width - 1 and wide >= width + 1
    bad = audit(_room_plan(_gap(narrow, length), rules=set_id), rules)
    good = audit(_room_plan(_gap(wide, length), rules=set_id), rules)
    assert not _cupboard(bad).ok
    assert _cupboard(good).ok
    assert set(_cupboard(bad).pieces) >= {"a", "b"}
    if width == int(width):  # a passage exactly as wide as the route is wide enough
        assert _cupboard(audit(_room_plan(_gap(int(width), length), rules=set_id), rules)).ok


def test_everyday_has_no_pinch_and_ada_has_one() -> None:
    # 2010 ADA §403.5.1 Exception: 32 in for at most 24 in; the everyday set: none
    ada = load_ruleset("ada-2010")
    assert ada.get("route.pinch_width").exact_mm == pytest.approx(inches(32))
    assert ada.get("route.pinch_length").exact_mm == pytest.approx(inches(24))
    assert load_ruleset("everyday").mm("route.pinch_length") == 0


@pytest.mark.parametrize(("length", "ok"), [(600, True), (607, True), (612, False), (700, False)])
def test_ada_pinch_allowance(length: int, ok: bool) -> None:
    # 2010 ADA §403.5.1 Exception: a route may narrow to 32 in (812.8 mm) for at most 24 in
    # (609.6 mm): an 850 mm gap 600 mm long passes, 700 mm long fails; the measure is exact
    # to a few mm (607 passes, 612 fails)
    rules = load_ruleset("ada-2010")
    result = audit(_room_plan(_gap(850, length), rules="ada-2010"), rules)
    f = _cupboard(result)
    assert f.ok is ok
    if ok:
        assert "narrow stretch" in f.message
    # below the pinch width no length is allowed: 800 mm, 300 mm long, fails
    short = audit(_room_plan(_gap(800, 300), rules="ada-2010"), rules)
    assert not _cupboard(short).ok


def test_bottleneck_width_and_place() -> None:
    # hand-made layout: a 600 mm gap, 800 mm long, at x 1500..2100, y 1500..2300 (everyday
    # route 30 in): the widest route is the gap itself (within the 5 mm search step) and the
    # bottleneck lies in the gap, between the two pieces that make it
    rules = load_ruleset("everyday")
    result = audit(_room_plan(_gap(600, 800)), rules)
    f = _cupboard(result)
    assert not f.ok
    assert abs(f.measured - 600) <= 5
    assert f.where is not None
    assert box(1500, WALL_Y, 2100, WALL_Y + 800).buffer(1).contains(shapely.Point(f.where))
    assert set(f.pieces) == {"a", "b"}
    w = result.by_rule("route.width")[0]
    assert not w.ok and w.measured == f.measured


def test_bottleneck_off_centre_gap() -> None:
    # the same with a 500 mm gap near the east wall, x 3000..3500
    rules = load_ruleset("everyday")
    result = audit(_room_plan(_gap(500, 400, left=3000)), rules)
    f = _cupboard(result)
    assert abs(f.measured - 500) <= 5
    assert box(3000, WALL_Y, 3500, WALL_Y + 400).buffer(1).contains(shapely.Point(f.where))


def test_reach_passes_in_empty_room_and_reports_width() -> None:
    # an empty 4000 mm wide room: everything reachable; the narrowest passage on the way to
    # the cupboard zone is bounded by the room, wider than the route
    rules = load_ruleset("everyday")
    result = audit(_room_plan(), rules)
    assert result.passed, [f.message for f in result.failures]
    assert result.by_rule("route.width")[0].measured >= rules.get("route.width").exact_mm


def test_door_blocked_by_piece_cuts_off_the_room() -> None:
    # a piece standing across the entrance: nothing inside is reachable, and the piece is
    # named next to the bottleneck
    rules = load_ruleset("everyday")
    result = audit(_room_plan((_custom("chest", 1400, 0, 2600, 500),)), rules)
    assert not _one(result, "route.reach", "side of door entry").ok
    assert not _cupboard(result).ok
    assert "chest" in _cupboard(result).pieces


def _grid_reach(gap: int, length: int, left: int, width: float, cell: float = 5.0) -> bool:
    """Independent reference with scipy: the free floor on a 5 mm raster, its Euclidean
    distance transform, cells at least half the route width from any obstacle, and their
    4-connected components; is the cupboard zone in the entrance's component?"""
    from scipy import ndimage

    nx, ny = int(ROOM_W / cell), int(ROOM_D / cell)
    xs = (np.arange(nx) + 0.5) * cell
    ys = (np.arange(ny) + 0.5) * cell
    gx, gy = np.meshgrid(xs, ys)
    wall = (gy >= WALL_Y) & (gy <= WALL_Y + length) & ((gx <= left) | (gx >= left + gap))
    cupboard = (gx >= 1500) & (gx <= 2500) & (gy >= ROOM_D - 300)
    free = np.pad(~(wall | cupboard), 1, constant_values=False)  # the room's walls
    dist = ndimage.distance_transform_edt(free)[1:-1, 1:-1] * cell
    ok = dist >= width / 2
    labels, _ = ndimage.label(ok)
    start = labels[int((width / 2 + 20) / cell), int(2000 / cell)]
    zone = (gx >= 1500) & (gx <= 2500) & (gy >= ROOM_D - 1300) & (gy <= ROOM_D - 300)
    return bool(start) and bool((labels[zone] == start).any())


def test_reach_agrees_with_scipy_grid_reference() -> None:
    # random gaps (away from the route width by more than the raster's error) give the same
    # verdict as an independent raster computation with scipy.ndimage
    rng = np.random.default_rng(7)
    rules = load_ruleset("everyday")
    width = rules.get("route.width").exact_mm
    done = 0
    while done < 12:
        gap = int(rng.integers(400, 1200))
        if abs(gap - width) < 20:
            continue
        length, left = int(rng.integers(50, 1500)), int(rng.integers(300, 3900 - gap))
        ours = _cupboard(audit(_room_plan(_gap(gap, length, left)), rules)).ok
        assert ours == _grid_reach(gap, length, left, width), (gap, length, left)
        assert ours == (gap > width)  # and by hand: the gap decides
        done += 1


def test_door_through_thick_wall() -> None:
    # two rooms 100 mm apart (a wall drawn with its thickness), joined by a 900 mm doorway on
    # the south room's wall: the north room's cupboard zone is reachable through it
    rules = load_ruleset("everyday")
    south = Room("s", "South", "hall", ((0, 0), (4000, 0), (4000, 1500), (0, 1500)))
    north = Room("r", "Room", "living", ((0, 1600), (4000, 1600), (4000, 5000), (0, 5000)))
    base = _room_plan()
    doors = (Door("entry", ("s", OUTSIDE), (2000, 0), 1000, Leaf.NONE),
             Door("inner", ("s", "r"), (2000, 1500), 900, Leaf.NONE))
    plan = Plan("thick", (south, north), doors, (), base.fixtures, (), RuleChoice("everyday"))
    result = audit(plan, rules)
    assert _cupboard(result).ok
    assert _one(result, "route.reach", "r side of door inner").ok


# --------------------------------------------------------------------------- simple rules


def test_overlap_names_both_pieces() -> None:
    rules = load_ruleset("everyday")
    pieces = (_custom("p", 500, 2500, 1500, 3000), _custom("q", 1400, 2900, 2000, 3400))
    result = audit(_room_plan(pieces), rules)
    f = result.by_rule("piece.overlap")
    assert len(f) == 1 and not f[0].ok and set(f[0].pieces) == {"p", "q"}
    # by hand: the overlap is 100 x 100 mm
    assert f[0].measured == pytest.approx(100 * 100)


def test_piece_overlapping_fitting_and_wall() -> None:
    rules = load_ruleset("everyday")
    pieces = (_custom("p", 2400, ROOM_D - 600, 2900, ROOM_D - 100),
              _custom("q", -100, 3000, 400, 3500))
    result = audit(_room_plan(pieces), rules)
    assert {f.pieces for f in result.by_rule("piece.overlap") if not f.ok} == {("p", "cupboard")}
    inside = _one(result, "piece.inside", "q ")
    assert not inside.ok and inside.measured == pytest.approx(100 * 500)


def test_areas_are_shown_in_square_centimetres() -> None:
    # 1 cm2 = 100 mm2 (SI): a 100 x 500 mm piece beyond the wall is 500 cm2, a 100 x 100 mm
    # overlap is 100 cm2, in the message and in the summary's measured value
    rules = load_ruleset("everyday")
    pieces = (_custom("q", -100, 3000, 400, 3500), _custom("p", 500, 2500, 1500, 3000),
              _custom("s", 1400, 2900, 2000, 3400))
    result = audit(_room_plan(pieces), rules)
    assert "reaches 500 cm2 beyond" in _one(result, "piece.inside", "q ").message
    assert "overlap by 100 cm2" in result.by_rule("piece.overlap")[0].message
    text = summary_text(result, rules)
    assert "measured 500 cm2" in text and "measured 100 cm2" in text


def test_zone_violation_names_blocker() -> None:
    # a wardrobe's front zone (everyday 36 in, HUD MAP in front of dresser or closet) with a
    # custom stool standing in it
    rules = load_ruleset("everyday")
    wardrobe = Piece("wardrobe", "wardrobe-hinged", ("r",), placement=Placement(0, 3000, 270, "r"))
    stool = _custom("stool", 700, 3300, 1000, 3600)
    result = audit(_room_plan((wardrobe, stool)), rules)
    f = _one(result, "zone.clear", "zone of wardrobe")
    assert not f.ok and f.pieces == ("wardrobe", "stool")
    # the cupboard's fitting zone with a piece in it
    result = audit(_room_plan((_custom("box", 1800, 4000, 2200, 4300),)), rules)
    f = _one(result, "zone.clear", "fitting cupboard")
    assert not f.ok and f.pieces == ("cupboard", "box")


def test_zone_through_wall_fails() -> None:
    # a wardrobe facing the wall 300 mm away: its front zone runs through the wall
    rules = load_ruleset("everyday")
    wardrobe = Piece("wardrobe", "wardrobe-hinged", ("r",), placement=Placement(300, 3000, 90, "r"))
    f = _one(audit(_room_plan((wardrobe,)), rules), "zone.clear", "zone of wardrobe")
    assert not f.ok and "wall" in f.message
    # everyday storage front 36 in = 914 mm (whole mm), 914 - 300 = 614 mm of it past the
    # wall along the 1000 mm front: 614 000 mm2 = 6140 cm2
    assert "(6140 cm2 outside)" in f.message


def test_door_swing_blocked() -> None:
    # a 900 mm door swinging into the room, hinge on the left: its quarter disc of radius 900
    # covers x 1550..2450 (door at 2000), y 0..900; a chest at y 400 stands in it
    rules = load_ruleset("everyday")
    door = Door("entry", ("r", OUTSIDE), (2000, 0), 900, Leaf.HINGED, "r", "left")
    result = audit(_room_plan((_custom("chest", 2500, 0, 3000, 400),), doors=(door,)), rules)
    assert _one(result, "door.swing_clear", "entry").ok
    result = audit(_room_plan((_custom("chest", 1400, 600, 1900, 1000),), doors=(door,)), rules)
    f = _one(result, "door.swing_clear", "entry")
    assert not f.ok and f.pieces == ("entry", "chest")


def test_door_width_against_rule() -> None:
    # 2010 ADA §404.2.3: 32 in clear; an 800 mm door fails, 815 mm passes
    rules = load_ruleset("ada-2010")
    for width, ok in ((800, False), (815, True)):
        door = Door("entry", ("r", OUTSIDE), (2000, 0), width, Leaf.NONE)
        f = audit(_room_plan(doors=(door,), rules="ada-2010"), rules).by_rule("door.width")[0]
        assert f.ok is ok and f.required == pytest.approx(inches(32))


def test_window_blocked_by_wardrobe_not_by_low_bed() -> None:
    # a window with a 900 mm sill on the west wall; a 2000 mm wardrobe against it blocks it,
    # a 450 mm bed does not (common practice: nothing taller than the sill before a window)
    rules = load_ruleset("everyday")
    window = Window("w", "r", (0, 3000), 1200, 900)
    wardrobe = Piece("wardrobe", "wardrobe-hinged", ("r",), placement=Placement(0, 2500, 270, "r"))
    f = _one(audit(_room_plan((wardrobe,), windows=(window,)), rules), "window.clear", "w ")
    assert not f.ok and f.pieces == ("w", "wardrobe")
    bed = Piece("bed", "bed-double-160", ("r",), placement=Placement(0, 2200, 270, "r"))
    f = _one(audit(_room_plan((bed,), windows=(window,)), rules), "window.clear", "w ")
    assert f.ok


def test_against_wall_detection() -> None:
    rules = load_ruleset("everyday")
    flush = Piece("ns", "nightstand", ("r",), placement=Placement(0, 3000, 270, "r"))
    off = Piece("ns", "nightstand", ("r",), placement=Placement(100, 3000, 270, "r"))
    assert _one(audit(_room_plan((flush,)), rules), "wall.against", "ns").ok
    f = _one(audit(_room_plan((off,)), rules), "wall.against", "ns")
    assert not f.ok and f.measured == 0


@pytest.mark.parametrize(("gap", "ok"), [(2, True), (10, True), (11, False)])
def test_against_wall_allows_a_few_millimetres(gap: int, ok: bool) -> None:
    # a queen bed placed at y = 90 in = 2286 mm with its 2132 mm depth ends at 4418 mm, 2 mm
    # short of a wall at 14 ft 6 in = 4419.6 -> 4420 mm (1 in = 25.4 mm): still against it;
    # up to 10 mm (common practice, a skirting board) passes, 11 mm does not
    rules = load_ruleset("everyday")
    bed = Piece("bed", "bed-us-queen", ("r",),
                placement=Placement(1000, ROOM_D - gap - 2132, 180, "r"))
    assert _one(audit(_room_plan((bed,), fixtures=False), rules), "wall.against", "bed").ok is ok


def test_piece_room_and_unplaced() -> None:
    rules = load_ruleset("everyday")
    loose = Piece("loose", "custom", ("r",), width=500, depth=500, height=500)
    result = audit(_room_plan((loose,)), rules)
    f = result.by_rule("piece.room")
    assert len(f) == 1 and not f[0].ok and f[0].pieces == ("loose",)


# --------------------------------------------------------------------------- samples and CLI

SAMPLES = sorted((Path(__file__).resolve().parent.parent / "plans").glob("*.toml"))


@pytest.mark.parametrize("path", SAMPLES, ids=[p.stem for p in SAMPLES])
def test_check_every_sample(path: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    out = tmp_path / "marked.svg"
    code = main(["check", str(path), "--draw", str(out)])
    text = capsys.readouterr().out
    assert code in (0, 1)
    assert "Caution" in text and out.read_text().startswith("<svg")
    plan = read_plan(path)
    result = audit(plan, load_ruleset("ada-2010"))
    assert (code == 0) == audit(plan, load_ruleset(plan.rules.set, plan.rules.override_map())).passed
    assert summary_text(result, load_ruleset("ada-2010")).count("\n") > 5
    # one mark per blocked place: failures of the circulation rules at one place (within a
    # route width) share a mark, every other failure has its own
    marks = marks_for(result)
    assert len(marks) <= len(result.failures)
    for f in result.failures:
        if f.where is not None:
            assert any(m.where is not None and math.dist(m.where, f.where) <= (f.required or 0)
                       or m.where == f.where for m in marks), f.message


def test_random_layouts_give_consistent_findings() -> None:
    # pieces thrown anywhere (even through walls) in the samples: the audit never raises, and
    # every route failure names a bottleneck with a widest route below the one required
    from dataclasses import replace

    from roomfit.audit.check import RULE_IDS

    rng = np.random.default_rng(3)
    plans = [read_plan(p) for p in SAMPLES]
    for _ in range(8):
        plan = plans[int(rng.integers(len(plans)))]
        rules = load_ruleset(ruleset_ids()[int(rng.integers(len(ruleset_ids())))])
        xs = [x for r in plan.rooms for x, _ in r.outline]
        ys = [y for r in plan.rooms for _, y in r.outline]
        pieces = tuple(
            replace(p, placement=Placement(int(rng.integers(min(xs) - 200, max(xs))),
                                           int(rng.integers(min(ys) - 200, max(ys))),
                                           int(rng.choice([0, 90, 180, 270])), p.rooms[0]))
            for p in plan.furniture)
        result = audit(replace(plan, furniture=pieces), rules)
        assert {f.rule for f in result.findings} <= set(RULE_IDS)
        for f in result.failures:
            if f.rule == "route.reach" and f.measured is not None:
                assert f.where is not None and f.measured < f.required


@pytest.mark.parametrize("path", SAMPLES, ids=[p.stem for p in SAMPLES])
def test_widths_false_keeps_every_verdict(path: Path) -> None:
    plan = read_plan(path)
    rules = load_ruleset("ada-2010")
    full, quick = audit(plan, rules), audit(plan, rules, widths=False)
    assert [(f.rule, f.ok) for f in full.findings] == [(f.rule, f.ok) for f in quick.findings]
    assert full.failures == quick.failures


def test_cli_json_and_exit_codes(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    sample = SAMPLES[0]
    code = main(["check", str(sample), "--json", "--rules", "ada-2010"])
    data = json.loads(capsys.readouterr().out)
    assert data["rules"] == "ada-2010" and data["passed"] == (code == 0)
    assert all({"rule", "ok", "measured", "required", "where", "pieces"} <= set(f)
               for f in data["findings"])
    assert main(["check", str(tmp_path / "missing.toml")]) == 2
    assert main(["check", str(sample), "--draw", str(sample)]) == 2  # never over the input
    assert main(["check", str(sample), "--rules", "no-such-set"]) == 2


def test_outline_is_valid_polygon() -> None:
    rules = load_ruleset("everyday")
    pieces = (_custom("p", 500, 2500, 1500, 3000), _custom("q", 1400, 2900, 2000, 3400))
    f = audit(_room_plan(pieces), rules).by_rule("piece.overlap")[0]
    assert Polygon(f.outline).area == pytest.approx(100 * 100)


def test_overridden_rule_says_so_in_the_source() -> None:
    # the everyday route width 30 in (762 mm) comes from a handbook; a client's 900 mm is the
    # plan's own value, so the finding must not attribute 900 mm to the handbook alone
    pieces = _gap(800, 300)
    plain = load_ruleset("everyday")
    own = load_ruleset("everyday", {"route.width": 900})
    f_plain = audit(_room_plan(pieces), plain).by_rule("route.width")[0]
    f_own = audit(_room_plan(pieces), own).by_rule("route.width")[0]
    assert f_plain.source == plain.get("route.width").source
    assert f_own.required == 900 and not f_own.ok
    assert f_own.source.startswith("value set by the plan for this client")
    assert plain.get("route.width").source in f_own.source


def test_room_without_a_door_cannot_be_reached() -> None:
    # a closet 2 m east of the room with no door: nothing in it is a target, yet nobody can
    # get in; a doorway across the 100 mm wall lets everything in it be reached
    rules = load_ruleset("everyday")
    base = _room_plan()
    closet = Room("closet", "Closet", "storage", ((4100, 0), (6000, 0), (6000, 2000), (4100, 2000)))
    shut = replace(base, rooms=(*base.rooms, closet))
    f = _one(audit(shut, rules), "route.reach", "closet")
    assert not f.ok and f.room == "closet" and "no door" in f.message
    door = Door("d-closet", ("r", "closet"), (ROOM_W, 1000), 800, Leaf.NONE)
    open_ = replace(shut, doors=(*shut.doors, door))
    assert all(f.ok for f in audit(open_, rules).by_rule("route.reach"))


def test_rug_lies_under_pieces_and_is_walked_over() -> None:
    # a rug (height 0, plan-format: "0 allowed: a rug") across the whole room under the wall
    # of pieces' gap and under a stool: no overlap, no blocked passage; it must still lie
    # inside the room
    rules = load_ruleset("everyday")
    rug = Piece("rug", "custom", ("r",), width=ROOM_W, depth=1000, height=0,
                placement=Placement(0, WALL_Y - 500, 0, "r"))
    stool = _custom("stool", 600, WALL_Y - 400, 900, WALL_Y - 100)
    result = audit(_room_plan((*_gap(900, 300), rug, stool)), rules)
    assert result.passed, [f.message for f in result.failures]
    # by hand: the passage is the 900 mm gap, not the rug's edge
    assert abs(result.by_rule("route.width")[0].measured - 900) <= 5
    outside = replace(rug, placement=Placement(-200, WALL_Y - 500, 0, "r"))
    f = _one(audit(_room_plan((outside,)), rules), "piece.inside", "rug")
    assert not f.ok and f.measured == pytest.approx(200 * 1000)


@pytest.mark.parametrize("wall", [0, 200])
def test_leaf_into_a_shallow_closet_cannot_open(wall: int) -> None:
    # a 900 mm leaf hinged at x 1200 opening north into a closet 600 mm deep: the quarter
    # disc of radius 900 pokes past the back wall by the half circular segment at h = 600,
    # (r^2 acos(h/r) - h sqrt(r^2 - h^2)) / 2 = 139 388 mm2 (by hand); the same across a
    # 200 mm wall, the leaf hung at the closet's face; swinging into the big room it opens
    rules = load_ruleset("everyday")
    base = _room_plan()
    y0 = ROOM_D + wall
    closet = Room("closet", "Closet", "storage", ((0, y0), (1500, y0), (1500, y0 + 600),
                                                  (0, y0 + 600)))
    door = Door("dc", ("r", "closet"), (750, ROOM_D), 900, Leaf.HINGED, "closet", "left")
    plan = replace(base, rooms=(*base.rooms, closet), doors=(*base.doors, door))
    f = _one(audit(plan, rules), "door.swing_clear", "cannot open")
    r, h = 900, 600
    by_hand = (r * r * math.acos(h / r) - h * math.sqrt(r * r - h * h)) / 2
    assert not f.ok and f.room == "closet" and f.measured == pytest.approx(by_hand, rel=0.01)
    into_room = replace(door, swings_into="r")
    plan = replace(plan, doors=(*base.doors, into_room))
    assert all(f.ok for f in audit(plan, rules).by_rule("door.swing_clear"))


# --------------------------------------------------------------------------- door approach


@pytest.mark.parametrize("jamb_gap, ok", [(430, False), (470, True)])
def test_pull_side_latch_clearance_in_a_corner(jamb_gap: int, ok: bool) -> None:
    # 2010 ADA Table 404.2.4.1, front approach, pull side: 18 in (457.2 mm) of clear floor
    # beyond the latch. A 900 mm door swinging in, hinge on the east jamb, latch jamb
    # `jamb_gap` mm from the west wall: 430 mm leaves too little, 470 mm enough.
    x = jamb_gap + 450  # door centre
    door = Door("entry", ("r", OUTSIDE), (x, 0), 900, Leaf.HINGED, "r", "left")
    result = audit(_room_plan(doors=(door,), rules="ada-2010"), load_ruleset("ada-2010"))
    findings = result.by_rule("door.approach")
    assert len(findings) == 1 and findings[0].ok is ok, [f.message for f in findings]
    if not ok:
        # the part cut off: (457.2 - 430) mm wide by 60 in (1524 mm) deep, worked by hand
        assert findings[0].measured == pytest.approx((inches(18) - 430) * inches(60), rel=0.01)


def test_door_approach_is_met_by_everyday_doors_in_the_room_middle() -> None:
    door = Door("entry", ("r", OUTSIDE), (2000, 0), 800, Leaf.HINGED, "r", "right")
    result = audit(_room_plan(doors=(door,)), load_ruleset("everyday"))
    assert [f.ok for f in result.by_rule("door.approach")] == [True]


def test_rules_option_judges_by_the_named_set_as_published(tmp_path: Path,
                                                           capsys: pytest.CaptureFixture[str]) -> None:
    # A plan under the everyday set that overrides its route width to 500 mm: an 800 mm
    # passage passes its own rules, but `--rules ada-2010` judges by the standard as published
    # (2010 ADA §403.5.1: 36 in, 32 in for at most 24 in), where 800 mm fails.
    from roomfit.plan.write import write_plan

    plan = _room_plan(_gap(800, 1000), overrides=(("route.width", 500), ("route.pinch_width", 500)))
    path = write_plan(plan, tmp_path / "p.toml")
    assert main(["check", str(path)]) == 0
    assert main(["check", str(path), "--rules", "ada-2010"]) == 1
    assert main(["check", str(path), "--rules", "everyday"]) == 0  # its own set: overrides kept
    capsys.readouterr()
