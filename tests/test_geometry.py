"""Geometry against worked examples computed by hand and against shapely as a reference."""

from __future__ import annotations

import math

import pytest
from shapely import Point, box
from shapely.geometry import Polygon

from roomfit.audit.geometry import (
    ARC_SEGMENTS,
    door_leaf,
    door_shape,
    footprint,
    free_floor,
    lies_flat,
    room_polygon,
    side_direction,
    turned_size,
    use_zones,
    wall_direction,
    window_band,
)
from roomfit.plan.data import OUTSIDE, Door, Fixture, Leaf, Placement, Plan, Room, Window
from roomfit.rules.catalog import PieceSpec, ZoneReq
from roomfit.rules.sets import load_ruleset

EVERYDAY = load_ruleset("everyday")
SQUARE = Room("r", "Room", "living", ((0, 0), (4000, 0), (4000, 3000), (0, 3000)))


def _plan(door: Door, rooms: tuple[Room, ...] = (SQUARE,), **kw: object) -> Plan:
    return Plan("t", rooms, (door,), **kw)  # type: ignore[arg-type]


def test_l_shaped_room_area_by_hand() -> None:
    # the one-bedroom sample's living room: a 2.6 x 2.8 m leg plus a 5.2 x 3.8 m body
    living = Room("l", "L", "living", ((3800, 0), (6400, 0), (6400, 2800), (9000, 2800),
                                       (9000, 6600), (3800, 6600)))
    by_hand = 2600 * 2800 + 5200 * 3800  # = 27 040 000 mm2
    assert room_polygon(living).area == by_hand


def test_angled_room_area_by_hand() -> None:
    # 4.0 x 3.4 m less a right triangle with 1.2 m legs cut off one corner
    room = Room("a", "A", "bedroom", ((0, 0), (2800, 0), (4000, 1200), (4000, 3400), (0, 3400)))
    assert room_polygon(room).area == 4000 * 3400 - 1200 * 1200 / 2


def _swing_error_bound(radius: float) -> float:
    """Area the 64-chord polygon misses of a quarter disc: r^2/2 * (theta - N sin(theta/N))."""
    theta = math.pi / 2
    return radius ** 2 / 2 * (theta - ARC_SEGMENTS * math.sin(theta / ARC_SEGMENTS))


def test_door_swing_area_is_a_quarter_disc() -> None:
    door = Door("d", ("r", OUTSIDE), (2000, 0), 900, Leaf.HINGED, "r", "left")
    swing = door_shape(_plan(door), door, EVERYDAY).swing
    assert swing is not None
    exact = math.pi * 900 ** 2 / 4  # 636 172.5 mm2, pi r^2 / 4
    bound = _swing_error_bound(900)  # about 64 mm2 for 64 chords
    assert exact - bound - 1e-6 <= swing.area <= exact
    # shapely as an independent reference: a disc round the hinge, cut to the quadrant
    hinge = (2450, 0)  # facing south from inside the room, the left jamb is the east one
    ref = Point(hinge).buffer(900, quad_segs=ARC_SEGMENTS).intersection(box(1550, 0, 2450, 900))
    assert abs(ref.area - swing.area) <= bound
    assert swing.symmetric_difference(ref).area <= 2 * bound


@pytest.mark.parametrize("hinge,expected_hinge,open_tip", [
    # door in the south wall swinging north into the room; standing in the room facing the
    # door (facing south), left is east and right is west
    ("left", (2450, 0), (2450, 900)),
    ("right", (1550, 0), (1550, 900)),
])
def test_hinge_side_convention(hinge: str, expected_hinge: tuple[int, int],
                               open_tip: tuple[int, int]) -> None:
    door = Door("d", ("r", OUTSIDE), (2000, 0), 900, Leaf.HINGED, "r", hinge)
    got_hinge, arc = door_leaf(_plan(door), door)  # type: ignore[misc]
    assert got_hinge == pytest.approx(expected_hinge)
    assert arc[-1] == pytest.approx(open_tip, abs=1e-6)
    assert len(arc) == ARC_SEGMENTS + 1


def test_swing_into_the_other_room() -> None:
    east = Room("e", "E", "bedroom", ((4000, 0), (7000, 0), (7000, 3000), (4000, 3000)))
    entry = Door("x", ("r", OUTSIDE), (2000, 0), 900, Leaf.HINGED, "r", "left")
    door = Door("d", ("r", "e"), (4000, 1500), 800, Leaf.HINGED, "e", "left")
    plan = Plan("t", (SQUARE, east), (entry, door))
    shape = door_shape(plan, door, EVERYDAY)
    assert shape.swing is not None
    assert room_polygon(east).contains(shape.swing.buffer(-1))
    # standing in the east room facing west, left is south: hinge at (4000, 1100)
    hinge, _ = door_leaf(plan, door)  # type: ignore[misc]
    assert hinge == pytest.approx((4000, 1100))


def test_outward_swing_is_drawn_outside() -> None:
    door = Door("d", ("r", OUTSIDE), (2000, 0), 900, Leaf.HINGED, OUTSIDE, "left")
    plan = _plan(door)
    assert door_shape(plan, door, EVERYDAY).swing is None  # nothing swept inside the room
    hinge, arc = door_leaf(plan, door)  # type: ignore[misc]
    sector = Polygon([hinge, *arc])
    assert sector.bounds[3] <= 1e-6 and sector.bounds[1] == pytest.approx(-900)
    # facing north from outside, left is west
    assert hinge == pytest.approx((1550, 0))


def test_sliding_door_has_no_leaf_sweep() -> None:
    door = Door("d", ("r", OUTSIDE), (2000, 0), 900, Leaf.SLIDING)
    plan = _plan(door)
    assert door_leaf(plan, door) is None
    assert door_shape(plan, door, EVERYDAY).swing is None


def test_free_floor_less_a_fitting_by_hand() -> None:
    radiator = Fixture("rad", "r", "radiator", "Radiator", ((0, 1000), (100, 1000), (100, 2000),
                                                           (0, 2000)), 600)
    kitchen = Fixture("k", "r", "kitchen_run", "Kitchen", ((3400, 0), (4000, 0), (4000, 3000),
                                                          (3400, 3000)), 900)
    door = Door("d", ("r", OUTSIDE), (2000, 0), 900, Leaf.SLIDING)
    plan = _plan(door, fixtures=(radiator, kitchen))
    # 4000 x 3000 less 100 x 1000 less 600 x 3000 = 12.0 - 0.1 - 1.8 = 10.1 m2
    assert free_floor(SQUARE, plan).area == 10_100_000
    table = box(1000, 1000, 2000, 1800)  # 1.0 x 0.8 m
    assert free_floor(SQUARE, plan, [table]).area == 10_100_000 - 800_000


# side_direction, by hand: turning a vector (x, y) by 90 degrees CCW gives (-y, x)
_SIDES = {
    0: {"front": (0, 1), "back": (0, -1), "left": (-1, 0), "right": (1, 0)},
    90: {"front": (-1, 0), "back": (1, 0), "left": (0, -1), "right": (0, 1)},
    180: {"front": (0, -1), "back": (0, 1), "left": (1, 0), "right": (-1, 0)},
    270: {"front": (1, 0), "back": (-1, 0), "left": (0, 1), "right": (0, -1)},
}


@pytest.mark.parametrize("rotation", [0, 90, 180, 270])
@pytest.mark.parametrize("side", ["front", "back", "left", "right"])
def test_side_direction_for_every_rotation(rotation: int, side: str) -> None:
    assert side_direction(side, rotation) == _SIDES[rotation][side]


def test_turned_size() -> None:
    assert turned_size(1700, 2100, 0) == turned_size(1700, 2100, 180) == (1700, 2100)
    assert turned_size(1700, 2100, 90) == turned_size(1700, 2100, 270) == (2100, 1700)


def _wardrobe() -> PieceSpec:
    return PieceSpec("w", "Wardrobe", "wardrobe-hinged", "wardrobe", 1000, 600, 2000, True,
                     (ZoneReq("front", "storage_front", 915, "zone.storage_front"),), (), ("r",))


@pytest.mark.parametrize("rotation,zone_box", [
    # footprint at (100, 200); turned size 1000 x 600 (0, 180) or 600 x 1000 (90, 270);
    # the 915 mm front zone lies on the side the front faces
    (0, (100, 800, 1100, 1715)),
    (90, (-815, 200, 100, 1200)),
    (180, (100, -715, 1100, 200)),
    (270, (700, 200, 1615, 1200)),
])
def test_use_zone_follows_the_front(rotation: int, zone_box: tuple[int, int, int, int]) -> None:
    spec = _wardrobe()
    pl = Placement(100, 200, rotation, "r")
    (req, zone), = use_zones(spec, pl)
    assert req.side == "front"
    assert zone.equals(box(*zone_box))
    assert zone.area == 1000 * 915
    assert zone.touches(footprint(spec, pl))


def test_wall_direction_of_an_angled_wall() -> None:
    outline = ((0, 0), (2800, 0), (4000, 1200), (4000, 3400), (0, 3400))
    ux, uy = wall_direction(outline, (3400, 600))
    assert (ux, uy) == pytest.approx((math.sqrt(0.5), math.sqrt(0.5)))


def test_window_band_on_an_angled_wall() -> None:
    room = Room("a", "A", "bedroom", ((0, 0), (2800, 0), (4000, 1200), (4000, 3400), (0, 3400)))
    window = Window("w", "a", (3400, 600), 1000, 900)
    door = Door("d", ("a", OUTSIDE), (1000, 3400), 800, Leaf.SLIDING)
    plan = Plan("t", (room,), (door,), (window,))
    band = window_band(plan, window, 300)
    # a 1000 x 300 rectangle square to the wall, wholly inside the room
    assert band.area == pytest.approx(1000 * 300, rel=1e-9)
    assert room_polygon(room).buffer(1e-6).contains(band)


def test_bed_side_zones_leave_the_head_end_free_in_every_rotation():
    # Worked example: a 1700 x 2100 bed frame with 610 mm side zones that leave out the
    # 500 mm at the head (head_clear, common practice) -> each side zone is 610 x 1600 and
    # never touches the 500 mm strip along the head end, whatever the rotation.
    from roomfit.audit.geometry import footprint, side_direction, use_zones
    from roomfit.plan.data import Piece, Placement
    from roomfit.rules.catalog import load_catalog, resolve_piece
    from roomfit.rules.sets import load_ruleset

    spec = resolve_piece(Piece("b", "bed-double-160", ("r",)), load_ruleset("everyday"),
                         load_catalog())
    for rot in (0, 90, 180, 270):
        pl = Placement(1000, 1000, rot, "r")
        fp = footprint(spec, pl)
        bx, by = side_direction("back", rot)
        x0, y0, x1, y1 = fp.bounds
        # the head strip: 500 mm deep at the back end, widened sideways past both zones
        hx0 = x0 - 1000 if bx == 0 else (x0 if bx == -1 else x1 - 500)
        hx1 = x1 + 1000 if bx == 0 else (x0 + 500 if bx == -1 else x1)
        hy0 = y0 - 1000 if by == 0 else (y0 if by == -1 else y1 - 500)
        hy1 = y1 + 1000 if by == 0 else (y0 + 500 if by == -1 else y1)
        strip = box(hx0, hy0, hx1, hy1)
        sides = [(z, poly) for z, poly in use_zones(spec, pl) if z.side in ("left", "right")]
        assert len(sides) == 2
        for z, poly in sides:
            assert z.inset == 500
            assert poly.area == pytest.approx(z.depth * (2100 - 500))
            assert poly.intersection(strip).area == pytest.approx(0)


def test_only_a_piece_of_height_zero_lies_flat() -> None:
    # plan format: height 0 is a rug, which pieces stand on and people walk over
    def spec(height: int) -> PieceSpec:
        return PieceSpec("p", "P", "custom", "custom", 2000, 1400, height, False, (), (), ("r",))

    assert lies_flat(spec(0))
    assert not lies_flat(spec(1)) and not lies_flat(spec(450))
