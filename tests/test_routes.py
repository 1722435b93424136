"""Route lengths and widths against hand-computed geometry and an independent grid search."""

from __future__ import annotations

import math
from pathlib import Path

import networkx as nx
import numpy as np
import pytest
import shapely
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from shapely import box

from roomfit.audit.routes import (
    NIGHT_LONG_MM,
    default_routines,
    route,
    score_routes,
)
from roomfit.plan.data import Door, Fixture, Leaf, Piece, Placement, Plan, Room, Trip
from roomfit.plan.read import read_plan
from roomfit.rules.sets import load_ruleset, rules_for, ruleset_ids

EVERYDAY = load_ruleset("everyday")
PLANS = Path(__file__).resolve().parent.parent / "plans"


def _room(rid: str, x0: int, y0: int, x1: int, y1: int, use: str = "living") -> Room:
    return Room(rid, rid, use, ((x0, y0), (x1, y0), (x1, y1), (x0, y1)))


def _block(pid: str, x: int, y: int, w: int, d: int, room: str = "r") -> Piece:
    """A custom piece (no use zones) of w x d mm with its lower-left corner at (x, y)."""
    return Piece(pid, "custom", (room,), width=w, depth=d, height=700,
                 placement=Placement(x, y, 0, room))


def _plan(rooms, furniture=(), doors=(), fixtures=(), routines=()) -> Plan:
    return Plan("test", tuple(rooms), doors=tuple(doors), fixtures=tuple(fixtures),
                furniture=tuple(furniture), routines=tuple(routines))


# --- lengths --------------------------------------------------------------------------------


def test_empty_convex_room_is_a_straight_line():
    plan = _plan([_room("r", 0, 0, 4000, 2400)])
    t = route(plan, EVERYDAY, (1000, 1000), (3000, 2000))
    # by hand: sqrt(2000^2 + 1000^2) = 2236.068 mm
    assert t.reachable
    assert t.length_mm == pytest.approx(math.sqrt(2000**2 + 1000**2), abs=1e-6)
    assert t.turns == 0 and t.doors == ()
    # the shortest chord through any point of the route is the room's 2400 mm depth (the
    # diagonals across the room's corners are corners, not passages)
    assert t.narrowest_mm == pytest.approx(2400, abs=1)


def test_a_rug_is_walked_over_but_a_box_is_walked_round():
    # a wall-to-wall strip 800 mm deep across the room between the two points: as a rug
    # (height 0) the route is the straight line, sqrt(2000^2 + 1000^2) = 2236.068 mm; the
    # same strip 700 mm high blocks the way completely
    rug = Piece("rug", "custom", ("r",), width=4000, depth=800, height=0,
                placement=Placement(0, 1100, 0, "r"))
    t = route(_plan([_room("r", 0, 0, 4000, 2400)], [rug]), EVERYDAY, (1000, 1000), (3000, 2000))
    assert t.reachable and t.length_mm == pytest.approx(math.sqrt(2000**2 + 1000**2), abs=1e-6)
    wall = _block("box", 0, 1100, 4000, 800)
    t = route(_plan([_room("r", 0, 0, 4000, 2400)], [wall]), EVERYDAY, (1000, 700), (3000, 2200))
    assert not t.reachable


def test_l_shaped_room_bends_round_the_corner_at_the_body_radius():
    # L-shaped room with 2000 mm wide arms, reflex corner C = (2000, 2000); body 800 mm wide:
    # its centre keeps 400 mm from C, so the shortest route runs tangent to the circle of
    # radius r = 400 round C, along its arc, and tangent again (a disc passes a corner at its
    # radius). By hand, A = (5000, 1000) at d = |A - C| = sqrt(3000^2 + 1000^2): tangent
    # length sqrt(d^2 - r^2); tangent points at the angle of A from C less acos(r / d), and
    # symmetrically for B = (1000, 5000); the arc between them.
    plan = _plan([Room("r", "L", "living",
                       ((0, 0), (6000, 0), (6000, 2000), (2000, 2000), (2000, 6000), (0, 6000)))])
    t = route(plan, EVERYDAY, (5000, 1000), (1000, 5000), width=800)
    r, d = 400.0, math.hypot(3000, 1000)
    arc = (math.atan2(3000, -1000) + math.acos(r / d)) - (math.atan2(-1000, 3000)
                                                        - math.acos(r / d) + 2 * math.pi)
    exact = 2 * math.sqrt(d * d - r * r) + r * abs(arc)
    # the arc is drawn with 8 chords a quarter, which shorten it by well under 2 mm here
    assert exact - 2.0 <= t.length_mm <= exact + 0.1
    assert all(math.dist(p, (2000, 2000)) >= r - 1 for p in t.points)
    # the heading changes by about 68 degrees in all, round the one corner
    assert t.turns >= 1


_GRID_PIECES = [(1000, 1200, 1200, 1000), (3200, 2000, 1200, 800), (4600, 600, 400, 400)]
_GRID_H = 25  # mm


@pytest.fixture(scope="module")
def grid_graph() -> tuple[nx.Graph, np.ndarray, np.ndarray]:
    """An 8-connected grid graph (Euclidean edge weights) on the walkway's grid points.

    Independent walkway: the free floor less the pieces, shrunk by half the 800 mm body with
    shapely (round joins, 64 segments a quarter: the body is a disc). Grid edges join grid
    points inside it; a chord of an arc can cut it by a hair, well under a millimetre.
    """
    h = _GRID_H
    free = box(0, 0, 6000, 4000).difference(
        shapely.union_all([box(x, y, x + w, y + d) for x, y, w, d in _GRID_PIECES]))
    walk = free.buffer(-400, quad_segs=64)
    xs, ys = np.arange(0, 6001, h), np.arange(0, 4001, h)
    gx, gy = np.meshgrid(xs, ys)
    inside = shapely.covers(walk, shapely.points(gx, gy))
    g = nx.Graph()
    rows, cols = inside.shape
    for di, dj, w in [(0, 1, 1.0), (1, 0, 1.0), (1, 1, math.sqrt(2)), (1, -1, math.sqrt(2))]:
        a = np.zeros_like(inside)
        i0, i1 = 0, rows - di
        j0, j1 = max(0, -dj), cols - max(0, dj)
        a[i0:i1, j0:j1] = inside[i0:i1, j0:j1] & inside[i0 + di:i1 + di, j0 + dj:j1 + dj]
        for i, j in zip(*np.nonzero(a), strict=True):
            g.add_edge((i, j), (i + di, j + dj), weight=w * h)
    return g, xs, ys


@pytest.mark.parametrize("a,b", [((450, 450), (5550, 3550)), ((5550, 450), (450, 3550)),
                                 ((2700, 450), (2700, 3550)), ((450, 1700), (5550, 2400))])
def test_agrees_with_networkx_on_an_independent_grid(grid_graph, a, b):
    pieces = [_block(f"p{k}", *box_) for k, box_ in enumerate(_GRID_PIECES)]
    plan = _plan([_room("r", 0, 0, 6000, 4000)], pieces)
    t = route(plan, EVERYDAY, a, b, width=800)
    assert t.reachable
    g, xs, ys = grid_graph
    h = _GRID_H
    node = lambda p: (int(p[1] // h), int(p[0] // h))  # noqa: E731 - a and b lie on the grid
    grid = nx.shortest_path_length(g, node(a), node(b), weight="weight")
    # the grid path lies in the walkway, so the exact shortest path is no longer; an
    # 8-connected grid overestimates a straight run by at most sqrt(4 - 2 sqrt 2) = 1.0824
    # (octile against Euclidean distance) plus about a cell at each bend
    assert t.length_mm <= grid + 1.0
    assert grid <= math.sqrt(4 - 2 * math.sqrt(2)) * t.length_mm + 4 * h


# --- widths and doors -----------------------------------------------------------------------


def _gap_plan(gap: int, depth: int = 1000) -> Plan:
    """Two custom pieces ``depth`` deep across a 5000 x 4000 room, leaving one gap of ``gap``
    mm between them."""
    left = (5000 - gap) // 2
    return _plan([_room("r", 0, 0, 5000, 4000)],
                 [_block("a", 0, 1500, left, depth),
                  _block("b", left + gap, 1500, 5000 - left - gap, depth)])


@pytest.mark.parametrize("a,b", [((2500, 500), (2500, 3500)), ((800, 600), (4300, 3400))])
def test_narrowest_width_is_the_built_in_gap(a, b):
    t = route(_gap_plan(900), EVERYDAY, a, b)  # hand-made gap: 900 mm
    assert t.reachable
    assert t.narrowest_mm == pytest.approx(900, abs=10)
    assert 1500 <= t.narrowest_at[1] <= 2500
    assert set(t.narrowest_between) == {"a", "b"}


def test_gap_under_route_width_is_unreachable_with_the_widest_way_named():
    # everyday route width 30 in = 762 mm; the only gap is 700 mm
    t = route(_gap_plan(700), EVERYDAY, (2500, 500), (2500, 3500))
    assert not t.reachable and t.length_mm is None and t.points == ()
    assert "762 mm" in t.reason
    widest = float(t.reason.split("widest way is about ")[1].split(" mm")[0])
    assert widest == pytest.approx(700, abs=10)
    assert "a and b" in t.reason or "b and a" in t.reason


@pytest.mark.parametrize("rule_set", ["everyday", "uk-m4-3", "din-18040-r"])
def test_gap_of_exactly_the_route_width_passes_and_one_mm_less_does_not(rule_set):
    # sets without a pinch allowance (ADA's is tested below)
    rules = load_ruleset(rule_set)
    width = rules.mm("route.width")  # everyday 30 in = 762; M4(3) 900 mm; DIN level R 1200 mm
    assert rules.mm("route.pinch_width") == width
    assert route(_gap_plan(width), rules, (2500, 500), (2500, 3500), width=width).reachable
    assert not route(_gap_plan(width - 1), rules, (2500, 500), (2500, 3500), width=width).reachable


def test_pinch_allowance_lets_a_short_narrow_gap_through():
    ada = load_ruleset("ada-2010")
    # 2010 ADA §403.5.1: routes 36 in (914.4 mm), 32 in (812.8 mm) allowed for at most 24 in
    assert abs(ada.get("route.width").exact_mm - 36 * 25.4) < 1e-9
    assert abs(ada.get("route.pinch_width").exact_mm - 32 * 25.4) < 1e-9
    # 850 mm (between 32 and 36 in) for 500 mm (under 24 in = 609.6 mm)
    ok = route(_gap_plan(850, 500), ada, (2500, 500), (2500, 3500))
    assert ok.reachable and ok.narrowest_mm == pytest.approx(850, abs=10)
    assert any("narrow stretches" in f for f in ok.flags)
    # the same gap 1000 mm long exceeds the 24 in allowed: the audit's verdict, the scorer's too
    long = route(_gap_plan(850), ada, (2500, 500), (2500, 3500))
    assert not long.reachable and "914 mm" in long.reason
    shut = route(_gap_plan(800, 500), ada, (2500, 500), (2500, 3500))  # under 32 in
    assert not shut.reachable and "914 mm" in shut.reason
    # the everyday set has no pinch allowance: 850 mm passes at its 30 in width, no flag
    assert route(_gap_plan(850), EVERYDAY, (2500, 500), (2500, 3500)).flags == ()


def _two_rooms(door_width: int, wall: int = 0, pieces=()) -> Plan:
    rooms = [_room("r", 0, 0, 3000, 3000), _room("s", 3000 + wall, 0, 6000 + wall, 3000)]
    door = Door("d1", ("r", "s"), (3000, 1500), door_width, Leaf.NONE)
    return _plan(rooms, pieces, [door])


@pytest.mark.parametrize("wall", [0, 200])
def test_doorway_narrower_than_the_body_is_passed_and_recorded(wall):
    plan = _two_rooms(700, wall)
    t = route(plan, EVERYDAY, (1500, 1500), (4500 + wall, 1500))
    assert t.reachable and t.doors == ("d1",)
    assert t.length_mm == pytest.approx(3000 + wall, abs=1e-6)  # straight through, by hand
    assert t.narrowest_mm == pytest.approx(700)
    assert 3000 <= t.narrowest_at[0] <= 3000 + wall and t.narrowest_at[1] == pytest.approx(1500)


def test_rooms_without_a_door_are_walled_apart():
    rooms = [_room("r", 0, 0, 3000, 3000), _room("s", 3000, 0, 6000, 3000)]
    t = route(_plan(rooms), EVERYDAY, (1500, 1500), (4500, 1500))
    assert not t.reachable and "walled apart" in t.reason


def test_furniture_in_a_doorway_blocks_it_and_is_named():
    plan = _two_rooms(900, pieces=[_block("chest", 2600, 1000, 400, 1000)])
    t = route(plan, EVERYDAY, (1000, 1500), (4500, 1500))
    assert not t.reachable and "door 'd1' is blocked by chest" in t.reason


def test_bend_around_a_wide_doorway():
    # a 1200 mm door (y 900..2100) between two 3000 x 3000 rooms, body 800 mm: the centre
    # passes the doorway at y 1300..1700, and each room's walkway ends at x = 3000 -+ 400.
    # By hand: (500, 500) -> (2600, 1300) -> (3400, 1300) -> (5500, 500),
    # 2 * sqrt(2100^2 + 800^2) + 800 = 5294.4 mm.
    plan = _two_rooms(1200)
    t = route(plan, EVERYDAY, (500, 500), (5500, 500), width=800)
    assert t.reachable and t.doors == ("d1",)
    # (the walkway keeps 0.25 mm of slack each side, so a route may be 0.5 mm shorter)
    assert t.length_mm == pytest.approx(2 * math.hypot(2100, 800) + 800, abs=0.6)
    assert t.narrowest_mm == pytest.approx(1200, abs=1)


def test_unknown_place_and_unplaced_piece_are_reported():
    plan = _plan([_room("r", 0, 0, 3000, 3000)],
                 [Piece("loose", "custom", ("r",), width=500, depth=500, height=500)])
    assert "no place named 'nowhere'" in route(plan, EVERYDAY, "nowhere", "r").reason
    assert "has no placement" in route(plan, EVERYDAY, "loose", "r").reason


# --- routines -------------------------------------------------------------------------------


def _flat() -> Plan:
    """A 12 m long room with the entrance at the west end and a WC at the east end."""
    rooms = [_room("r", 0, 0, 12000, 2000)]
    doors = [Door("in", ("r", "outside"), (0, 1000), 900, Leaf.NONE)]
    wc = Fixture("wc", "r", "wc", "WC", ((11600, 800), (12000, 800), (12000, 1200), (11600, 1200)),
                 400, ((11000, 700), (11600, 700), (11600, 1300), (11000, 1300)))
    trips = [Trip("entrance", "wc", 2, "In to WC", night=True), Trip("r", "wc", 3.5, "Sit")]
    return _plan(rooms, doors=doors, fixtures=[wc], routines=trips)


def test_weighted_metres_are_per_day_times_length():
    plan = _flat()
    s = score_routes(plan, EVERYDAY)
    lengths = [route(plan, EVERYDAY, t.origin, t.target).length_mm for t in plan.routines]
    # entrance (door centre, 0, 1000) to the WC zone centre (11300, 1000): 11300 mm, by hand
    assert lengths[0] == pytest.approx(11300, abs=1e-6)
    expected = sum(t.per_day * n / 1000 for t, n in zip(plan.routines, lengths, strict=True))
    assert s.walking_m_per_day == pytest.approx(expected)
    assert s.rank_key == (0, pytest.approx(expected))


def test_long_night_route_is_flagged():
    s = score_routes(_flat(), EVERYDAY)
    night = s.trips[0]
    assert night.length_mm > NIGHT_LONG_MM
    assert any("longer than 10 m" in f for f in s.flags)
    assert not any("narrows" in f for f in s.flags)


def test_narrow_night_route_is_flagged():
    plan = _two_rooms(700)
    plan = Plan("t", plan.rooms, doors=plan.doors,
                fixtures=(Fixture("wc", "s", "wc", "WC", ((5600, 1300), (6000, 1300), (6000, 1700),
                                                           (5600, 1700)), 400),),
                furniture=(_block("bed", 200, 200, 1000, 2000),),
                routines=(Trip("bed", "wc", 1, "Night", night=True),))
    s = score_routes(plan, EVERYDAY)
    assert s.trips[0].reachable
    assert any("narrows to 700 mm" in f for f in s.flags)
    assert s.narrowest_mm == pytest.approx(700)


def test_default_routines_only_where_places_exist():
    plan = read_plan(PLANS / "studio.toml")
    bare = Plan(plan.name, plan.rooms, plan.doors, plan.windows, plan.fixtures, plan.furniture)
    trips = default_routines(bare)
    pairs = {(t.origin, t.target) for t in trips}
    # studio: a double bed, a WC, a kitchen run, a dining table, a sofa and an entrance door
    assert pairs == {("bed", "wc"), ("kitchen", "table"), ("entrance", "kitchen"),
                     ("sofa", "kitchen")}
    assert [t.night for t in trips if t.origin == "bed"] == [True]
    s = score_routes(bare, rules_for(bare))
    assert s.defaults and len(s.trips) == 4
    no_wc = Plan("x", plan.rooms, plan.doors, fixtures=tuple(f for f in plan.fixtures if f.kind != "wc"),
                 furniture=plan.furniture)
    assert ("bed", "wc") not in {(t.origin, t.target) for t in default_routines(no_wc)}


# --- sample plans ---------------------------------------------------------------------------


@pytest.mark.parametrize("rule_set", ["everyday", "ada-2010"])
def test_samples_score_without_crashing(sample_path, rule_set):
    plan = read_plan(sample_path)
    if rule_set not in ruleset_ids():
        pytest.skip(f"no rule set {rule_set}")
    s = score_routes(plan, load_ruleset(rule_set))
    assert s.trips
    for t in s.trips:
        if t.reachable:
            assert t.length_mm >= 0 and len(t.points) >= 2
            assert t.narrowest_mm is not None and t.narrowest_mm > 0
        else:
            assert t.reason and t.length_mm is None
    assert s.walking_m_per_day == pytest.approx(sum(t.metres_per_day for t in s.trips))


def test_studio_as_is_reports_each_trip_reachable_or_why():
    plan = read_plan(PLANS / "studio.toml")
    s = score_routes(plan, rules_for(plan))
    assert [t.label for t in s.trips] == [t.label for t in plan.routines]
    for t in s.trips:
        assert t.reachable or ("762 mm" in t.reason and len(t.reason) > 30)


# --- properties on random layouts ----------------------------------------------------------

_xy = st.tuples(st.integers(100, 5900), st.integers(100, 3900))
_piece = st.tuples(st.integers(0, 5500), st.integers(0, 3500), st.integers(200, 1500),
                   st.integers(200, 1500))


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(_piece, max_size=6), _xy, _xy)
def test_random_layouts_never_crash_and_respect_distance_bounds(pieces, a, b):
    blocks = [_block(f"p{k}", x, y, min(w, 6000 - x), min(d, 4000 - y))
              for k, (x, y, w, d) in enumerate(pieces)]
    plan = _plan([_room("r", 0, 0, 6000, 4000)], blocks)
    there = route(plan, EVERYDAY, a, b)
    back = route(plan, EVERYDAY, b, a)
    assert there.reachable == back.reachable
    if there.reachable:
        # no route is shorter than the straight line; the shortest is the same both ways
        assert there.length_mm >= math.dist(a, b) - 1e-6
        assert there.length_mm == pytest.approx(back.length_mm, abs=1e-6)
        assert there.points[0] == pytest.approx(a) and there.points[-1] == pytest.approx(b)
        assert there.narrowest_mm > 0
    else:
        assert there.reason and there.length_mm is None


def test_paths_for_drawing_keep_labels_and_night():
    s = score_routes(_flat(), EVERYDAY)
    paths = s.paths()
    assert [p.label for p in paths] == ["In to WC", "Sit"]
    assert [p.night for p in paths] == [True, False]
    assert paths[0].points == s.trips[0].points


# --- where a trip ends: one rule for the scorer and the solver's model ---------------------


def test_a_trip_to_a_room_ends_at_the_centre_of_its_largest_circle():
    # An L-shaped room (two 1200 mm wide arms, 5000 mm long) with a 1000 x 1000 mm fitting
    # in the corner: its centroid lies in no arm. The trip end is the centre of the largest
    # circle in the floor less the fitting; a brute-force search on a 20 mm grid (shapely
    # distances, the independent judge) finds no point farther from the floor's edge.
    from roomfit.audit.places import end_point
    from roomfit.solve.terms import _fixed_place

    ell = Room("r", "r", "living", ((0, 0), (5000, 0), (5000, 1200), (1200, 1200),
                                    (1200, 5000), (0, 5000)))
    post = Fixture("post", "r", "cupboard", "Post", ((0, 0), (1000, 0), (1000, 1000), (0, 1000)),
                   2000)
    doors = [Door("in", ("r", "outside"), (5000, 600), 900, Leaf.NONE)]
    plan = _plan([ell], doors=doors, fixtures=[post])
    floor = shapely.Polygon(ell.outline).difference(shapely.Polygon(post.outline))
    assert not floor.covers(floor.centroid)
    (x, y), rooms = end_point(plan, "r")
    assert rooms == ("r",) and floor.covers(shapely.Point(x, y))
    gx, gy = np.meshgrid(np.arange(0, 5001, 20.0), np.arange(0, 5001, 20.0))
    grid = shapely.points(gx.ravel(), gy.ravel())
    inside = grid[shapely.covers(floor, grid)]
    best = shapely.distance(floor.exterior, inside).max()
    assert floor.exterior.distance(shapely.Point(x, y)) >= best - 1   # largest circle, 1 mm
    # the scorer's route to the room ends there, and the solver's routine term aims there
    t = route(plan, EVERYDAY, "entrance", "r")
    assert t.reachable and math.dist(t.points[-1], (x, y)) < 1e-6
    assert _fixed_place(plan, "r") == ((round(x), round(y)), ("r",))
    # a door ends at its centre, a fitting's zone at its middle, for both
    assert end_point(plan, "entrance") == ((5000.0, 600.0), ("r", "outside"))
    assert _fixed_place(plan, "post") == ((500, 500), ("r",))
