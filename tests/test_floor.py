"""The IFC import's conversion rules on small hand-made floors (no ifcopenshell needed).

Door conventions checked against ISO 16739 (IFC4 IfcDoorTypeOperationEnum; IFC2x3
IfcDoorStyleOperationEnum): the leaf opens towards the door's local +y; SINGLE_SWING_LEFT
has its hinges on the left as seen looking along local +y (the local -x jamb). The hinge
point of the written plan is read back through the project's own drawing geometry
(``audit.geometry.door_leaf``), so these tests check what a person sees, not a flag.
Areas are checked against shapely's polygon area.
"""

from __future__ import annotations

import math

import pytest
from shapely import Polygon, affinity

from roomfit.audit.geometry import door_leaf
from roomfit.plan.data import Leaf
from roomfit.plan.floor import floor_to_plan
from roomfit.plan.floor_base import clean_outline, main_angle, room_use, rooms_from_walls, slug
from roomfit.plan.floor_doors import hinge_side
from roomfit.plan.floor_items import catalogue_type, fitting_kind
from roomfit.plan.floordata import (
    Floor,
    FloorDoor,
    FloorSpace,
    FloorThing,
    FloorWall,
    FloorWindow,
    Frame,
    Skipped,
)
from roomfit.plan.read import loads_plan
from roomfit.plan.write import dumps_plan

# Two 3 x 4 m rooms west and east of a 100 mm wall at x = 3000..3100.
WEST = ((0.0, 0.0), (3000.0, 0.0), (3000.0, 4000.0), (0.0, 4000.0))
EAST = ((3100.0, 0.0), (6100.0, 0.0), (6100.0, 4000.0), (3100.0, 4000.0))
WALL = ((3000.0, 0.0), (3100.0, 0.0), (3100.0, 4000.0), (3000.0, 4000.0))
OUTER = ((-100.0, -100.0), (6200.0, -100.0), (6200.0, 0.0), (-100.0, 0.0))


def _floor(doors=(), windows=(), things=(), spaces=None, walls=None, skipped=()) -> Floor:
    spaces = spaces if spaces is not None else (
        FloorSpace("gW", "1", "Living", WEST), FloorSpace("gE", "2", "Bedroom", EAST))
    walls = walls if walls is not None else (FloorWall("gw1", "inner", WALL, 100.0),
                                             FloorWall("gw2", "outer", OUTER, 100.0))
    return Floor("test.ifc", "IFC4", "metre", "Ground", "gS", tuple(spaces), tuple(walls),
                 tuple(doors), tuple(windows), tuple(things), (), tuple(skipped))


def _door_frame(turn: int, mirrored: bool, width: float = 900.0) -> Frame:
    """A door in the wall x = 3000..3100 centred at y = 2000, its local +y turned by ``turn``.

    turn 0: local +y points east (into the east room); 180: west. ``mirrored`` flips the
    local x axis (a mirrored placement: the frame is left-handed).
    """
    y = (1.0, 0.0) if turn == 0 else (-1.0, 0.0)
    x = (-y[1], y[0])  # right-handed: x = y turned clockwise
    if mirrored:
        x = (-x[0], -x[1])
    # origin so that local x 0..width, y -50..50 covers the opening centred at (3050, 2000)
    origin = (3050 - x[0] * width / 2, 2000 - x[1] * width / 2)
    return Frame(origin, x, y, (0.0, width), (-50.0, 50.0))


@pytest.mark.parametrize("turn", [0, 180])
@pytest.mark.parametrize("mirrored", [False, True])
@pytest.mark.parametrize("op", ["SINGLE_SWING_LEFT", "SINGLE_SWING_RIGHT"])
def test_hinge_side_follows_the_frame_under_every_placement(turn: int, mirrored: bool, op: str) -> None:
    frame = _door_frame(turn, mirrored)
    imp = floor_to_plan(_floor(doors=[FloorDoor("gD", "Door", frame, 900.0, op, None)]),
                        entrance=None)
    door = next(d for d in imp.plan.doors if d.leaf == Leaf.HINGED)
    # the leaf opens towards local +y: the east room when turn is 0, the west one at 180
    assert door.swings_into == ("bedroom" if turn == 0 else "living")
    # ISO 16739: LEFT has its hinge on the local -x jamb (u = 0), RIGHT on the +x jamb
    u = 0.0 if op == "SINGLE_SWING_LEFT" else 900.0
    expected = imp.placed.pt(frame.point(u, 0.0))
    hinge, _ = door_leaf(imp.plan, door)
    # the plan's opening is the clear width at the wall face: within half the wall of the jamb
    assert math.dist(hinge, expected) <= 60, (hinge, expected)


@pytest.mark.parametrize("mx, my", [(True, False), (False, True), (True, True)])
def test_mirrored_body_flips_hinge_or_swing(mx: bool, my: bool) -> None:
    # a shared door type placed mirrored: the placement stays right-handed, the body mirrored
    frame = _door_frame(0, False)
    plain = floor_to_plan(_floor(doors=[FloorDoor("gD", "Door", frame, 900.0,
                                                  "SINGLE_SWING_LEFT", None)]))
    mirrored = floor_to_plan(_floor(doors=[FloorDoor("gD", "Door", frame, 900.0,
                                                     "SINGLE_SWING_LEFT", None, mx, my)]))
    a, b = plain.plan.doors[0], mirrored.plan.doors[0]
    assert (b.swings_into != a.swings_into) == my  # mirrored across local x: opens to -y
    ha, _ = door_leaf(plain.plan, a)
    hb, _ = door_leaf(mirrored.plan, b)
    # the hinge jamb moves (about 900 mm, the opening less the lining) when x is mirrored
    assert (math.dist(ha, hb) > 700) == mx


def test_hinge_side_by_hand() -> None:
    # plan-format docs' example: south wall of a bedroom, swinging north into it; hinges on
    # the east jamb read 'left' from inside facing south
    assert hinge_side((450, 0), (0, 0), (0, 1)) == "left"
    assert hinge_side((-450, 0), (0, 0), (0, 1)) == "right"
    assert hinge_side((0, 450), (0, 0), (1, 0)) == "right"  # facing west, north is on the right


@pytest.mark.parametrize("op, leaf, reason", [
    ("DOUBLE_DOOR_SINGLE_SWING", Leaf.HINGED, "one leaf as wide as the opening"),
    ("DOUBLE_DOOR_SLIDING", Leaf.SLIDING, "sliding leaf"),
    ("SLIDING_TO_LEFT", Leaf.SLIDING, "sliding leaf"),
    ("NOTDEFINED", Leaf.HINGED, "single hinged leaf guessed"),
    ("USERDEFINED", Leaf.HINGED, "single hinged leaf guessed"),
    ("REVOLVING", Leaf.NONE, "open doorway"),
])
def test_unclear_operations_are_flagged_never_silent(op: str, leaf: Leaf, reason: str) -> None:
    imp = floor_to_plan(_floor(doors=[FloorDoor("gD", "Door", _door_frame(0, False), 900.0, op,
                                                None)]))
    door = imp.plan.doors[0]
    assert door.leaf == leaf
    guessed = [n for n in imp.notes if n.kind == "guessed" and n.gid == "gD"]
    assert guessed and reason in guessed[0].text and op in guessed[0].text


def test_single_swing_is_not_flagged_as_a_guess_but_its_width_is_to_be_confirmed() -> None:
    imp = floor_to_plan(_floor(doors=[FloorDoor("gD", "Door", _door_frame(0, False), 900.0,
                                                "SINGLE_SWING_LEFT", 50.0)]))
    kinds = {n.kind for n in imp.notes if n.gid == "gD"}
    assert "guessed" not in kinds and "confirm" in kinds
    door = next(d for d in imp.plan.doors if d.leaf == Leaf.HINGED)
    assert door.width == 800  # 900 overall less 2 x 50 lining


def test_door_to_no_space_is_the_assumed_entrance_and_a_named_one_wins() -> None:
    # a door in the outer south wall of the west room: nothing on its far side
    frame = Frame((1000.0, -50.0), (1.0, 0.0), (0.0, 1.0), (0.0, 1000.0), (-50.0, 50.0))
    inner = FloorDoor("gI", "Inner", _door_frame(0, False), 900.0, "SINGLE_SWING_LEFT", None)
    front = FloorDoor("gF", "Front", frame, 1000.0, "SINGLE_SWING_LEFT", None)
    imp = floor_to_plan(_floor(doors=[inner, front]))
    entrances = [d for d in imp.plan.doors if d.is_entrance]
    assert [d.id for d in entrances] == ["d-front"]
    assert entrances[0].swings_into == "living"  # local +y is north, into the room
    assert any(n.kind == "assumed" and n.gid == "gF" and "entrance" in n.text for n in imp.notes)
    named = floor_to_plan(_floor(doors=[inner, front]), entrance="gF")
    assert named.plan.doors[0].id == "d-front"
    with pytest.raises(Exception, match="not a door of the plan"):
        floor_to_plan(_floor(doors=[inner, front]), entrance="nope")
    assert floor_to_plan(_floor(doors=[inner]), entrance="gI").plan.doors[0].is_entrance


def test_spaces_meeting_with_no_wall_get_an_open_link() -> None:
    touching = (FloorSpace("gA", "1", "Kitchen", WEST),
                FloorSpace("gB", "2", "Living", ((3000.0, 0.0), (6000.0, 0.0), (6000.0, 4000.0),
                                                 (3000.0, 4000.0))))
    imp = floor_to_plan(_floor(spaces=touching, walls=[FloorWall("gw2", "outer", OUTER, 100.0)]))
    links = [d for d in imp.plan.doors if d.leaf == Leaf.NONE]
    assert len(links) == 1 and set(links[0].rooms) == {"kitchen", "living"}
    assert links[0].width >= 3900  # the whole 4000 mm they share, less a little at the ends
    assert any(n.kind == "assumed" and "no wall" in n.text for n in imp.notes)
    # with the wall between them: no link
    walled = floor_to_plan(_floor())
    assert not [d for d in walled.plan.doors if d.leaf == Leaf.NONE]


def _window(gid: str, y0: float, width: float, sill: float = 900.0) -> FloorWindow:
    # in the outer west wall (x = -100..0) of the west room, local +y pointing east
    return FloorWindow(gid, gid, Frame((-50.0, y0 + width), (0.0, -1.0), (1.0, 0.0), (0.0, width),
                                       (-50.0, 50.0)), width, sill)


def test_windows_side_by_side_are_merged_and_apart_ones_kept() -> None:
    west = (FloorWall("gw3", "west", ((-100.0, 0.0), (0.0, 0.0), (0.0, 4000.0), (-100.0, 4000.0)),
                      None),)
    walls = (FloorWall("gw1", "inner", WALL, 100.0), *west)
    merged = floor_to_plan(_floor(windows=[_window("a", 500, 800), _window("b", 1340, 800, 950)],
                                  walls=walls))
    assert len(merged.plan.windows) == 1
    w = merged.plan.windows[0]
    assert w.width == 1640 and w.sill == 900  # 500..2140, lowest sill
    assert any("merged" in n.text for n in merged.notes)
    apart = floor_to_plan(_floor(windows=[_window("a", 500, 800), _window("b", 2000, 800)],
                                 walls=walls))
    assert sorted(x.width for x in apart.plan.windows) == [800, 800]


def test_each_skip_reason_is_reported_with_its_global_id() -> None:
    far = Frame((20000.0, 20000.0), (1.0, 0.0), (0.0, 1.0), (0.0, 900.0), (-50.0, 50.0))
    lamp = FloorThing("gL", "IfcFlowTerminal", "Ceiling light", "light", ((500.0, 500.0),
                      (800.0, 500.0), (800.0, 800.0), (500.0, 800.0)), 300.0, far)
    out = FloorThing("gO", "IfcSanitaryTerminal", "WC", "WC", ((9000.0, 9000.0), (9400.0, 9000.0),
                     (9400.0, 9700.0), (9000.0, 9700.0)), 400.0, far)
    imp = floor_to_plan(_floor(
        doors=[FloorDoor("gFar", "Far", far, 900.0, "SINGLE_SWING_LEFT", None)],
        windows=[FloorWindow("gWf", "Far window", far, 900.0, 900.0)],
        things=[lamp, out], skipped=[Skipped("gX", "IfcWall", "wall without usable body geometry")]))
    skipped = {n.gid: n.text for n in imp.notes if n.kind == "skipped"}
    assert "no imported room on either side" in skipped["gFar"]
    assert "no imported room beside it" in skipped["gWf"]
    assert "not a fitting of a known kind" in skipped["gL"]
    assert "not inside an imported room" in skipped["gO"]
    assert "without usable body geometry" in skipped["gX"]


def test_fittings_and_furniture_keep_kind_and_place() -> None:
    frame = Frame((200.0, 3000.0), (1.0, 0.0), (0.0, 1.0), (0.0, 1600.0), (0.0, 2000.0))
    bed = FloorThing("gB", "IfcFurniture", "Double bed", "", ((200.0, 3000.0), (1800.0, 3000.0),
                     (1800.0, 5000.0), (200.0, 5000.0)), 450.0, frame)
    wc = FloorThing("gC", "IfcSanitaryTerminal", "WC-1", "Toilet", ((100.0, 100.0), (500.0, 100.0),
                    (500.0, 800.0), (100.0, 800.0)), 400.0, frame)
    bigger = ((0.0, 0.0), (3000.0, 0.0), (3000.0, 6000.0), (0.0, 6000.0))
    imp = floor_to_plan(_floor(things=[bed, wc], spaces=[FloorSpace("gR", "1", "Bedroom", bigger)],
                               walls=[]))
    (piece,) = imp.plan.furniture
    assert piece.type == "bed-double-160" and piece.placement is not None
    assert (piece.placement.x, piece.placement.y, piece.placement.rotation) == (200, 3000, 0)
    (fx,) = imp.plan.fixtures
    assert fx.kind == "wc" and Polygon(fx.outline).area == pytest.approx(400 * 700)
    loads_plan(dumps_plan(imp.plan))  # the plan reader accepts it


def test_rooms_from_walls_when_the_model_has_no_space() -> None:
    # four 100 mm walls round a 3 x 4 m room (worked example: 12 m2)
    ring = Polygon([(-100, -100), (3100, -100), (3100, 4100), (-100, 4100)]).difference(
        Polygon([(0, 0), (3000, 0), (3000, 4000), (0, 4000)]))
    (room,) = rooms_from_walls([ring])
    assert room.area == pytest.approx(12e6)
    four = [FloorWall(f"g{i}", "w", tuple(p.exterior.coords)[:-1]) for i, p in enumerate([
        Polygon([(-100, -100), (3100, -100), (3100, 0), (-100, 0)]),
        Polygon([(-100, 4000), (3100, 4000), (3100, 4100), (-100, 4100)]),
        Polygon([(-100, 0), (0, 0), (0, 4000), (-100, 4000)]),
        Polygon([(3000, 0), (3100, 0), (3100, 4000), (3000, 4000)])])]
    imp = floor_to_plan(_floor(spaces=(), walls=four))
    assert len(imp.plan.rooms) == 1
    assert Polygon(imp.plan.rooms[0].outline).area == pytest.approx(12e6)
    assert any("no IfcSpace" in n.text for n in imp.notes)


def test_storey_turned_to_the_axes() -> None:
    square = [(0, 0), (4000, 0), (4000, 3000), (0, 3000)]
    turned = affinity.rotate(Polygon(square), 10, origin=(0, 0))
    assert main_angle([tuple(turned.exterior.coords)[:-1]]) == pytest.approx(10.0, abs=0.01)
    space = FloorSpace("gR", "1", "Room", tuple(turned.exterior.coords)[:-1])
    imp = floor_to_plan(_floor(spaces=[space], walls=[FloorWall("gw", "w", space.outline)]))
    assert imp.angle == pytest.approx(10.0, abs=0.01)
    xs = sorted({x for x, _ in imp.plan.rooms[0].outline})
    assert len(xs) == 2 and xs[1] - xs[0] == pytest.approx(4000, abs=2)  # straight and square


def test_outline_snapped_and_straightened() -> None:
    off = Polygon([(0, 0), (4000, 2), (4001, 3000), (0.4, 2999)])
    out = clean_outline(off)
    assert out is not None and len(out) == 4
    assert {x for x, _ in out} == {0, 4000} or {x for x, _ in out} == {0, 4001}
    assert Polygon(out).area == pytest.approx(off.area, rel=0.002)


def test_names() -> None:
    assert slug("Küche 1") == "kuche-1"
    assert room_use("Schlafzimmer") == "bedroom" and room_use("Bad") == "bath"
    assert room_use("Wohnen") == "living" and room_use("Flur") == "hall"
    assert fitting_kind("IfcFlowTerminal", "Water Closet - Flush Tank") == "wc"
    assert fitting_kind("IfcFlowTerminal", "Ceiling light") is None
    assert catalogue_type(900, "Single bed") == "bed-single-90"
    assert catalogue_type(2100, "Sofa") == "sofa-3"
    assert catalogue_type(500, "Plant") is None


def test_only_the_reader_imports_ifcopenshell() -> None:
    import ast
    from pathlib import Path

    root = Path(__file__).resolve().parent.parent
    users = set()
    for path in [*(root / "roomfit").rglob("*.py"), root / "app.py"]:
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            names = ([a.name for a in node.names] if isinstance(node, ast.Import)
                     else [node.module or ""] if isinstance(node, ast.ImportFrom) else [])
            if any(n.split(".")[0] == "ifcopenshell" for n in names):
                users.add(path.relative_to(root).as_posix())
    assert users == {"roomfit/plan/ifc_read.py"}
