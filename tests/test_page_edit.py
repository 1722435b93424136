"""Editing on the page: pieces moved, turned, nudged and put back to the wall, undo and redo,
doors, windows and room corners, and plans traced over a scan."""

from __future__ import annotations

import io
from pathlib import Path

import pytest
from PIL import Image, ImageDraw
from shapely import Polygon

from roomfit import page_edit as pe
from roomfit.audit.check import audit
from roomfit.audit.geometry import footprint_box
from roomfit.errors import PlanError
from roomfit.page_trace import TracedRoom, load_scan, mm_per_pixel, plan_from_trace
from roomfit.plan.read import read_plan
from roomfit.rules.catalog import resolve_pieces
from roomfit.rules.sets import rules_for

ROOT = Path(__file__).resolve().parent.parent
STUDIO = ROOT / "plans" / "studio.toml"


def _box(plan, pid):  # noqa: ANN001, ANN202
    spec = next(s for s in resolve_pieces(plan, rules_for(plan)) if s.id == pid)
    return footprint_box(spec, plan.piece(pid).placement)


def test_nudge_turn_and_snap_keep_the_piece_where_expected() -> None:
    plan = read_plan(STUDIO)
    pid = next(p.id for p in plan.furniture if p.placement is not None)
    x0, y0, x1, y1 = _box(plan, pid)
    moved = pe.nudge_piece(plan, pid, 50, -20)
    assert _box(moved, pid) == (x0 + 50, y0 - 20, x1 + 50, y1 - 20)
    turned = pe.turn_piece(plan, pid)
    a0, b0, a1, b1 = _box(turned, pid)
    # a quarter turn about the centre swaps the sides and keeps the centre (to 1 mm)
    assert (a1 - a0, b1 - b0) == (y1 - y0, x1 - x0)
    assert abs((a0 + a1) - (x0 + x1)) <= 1 and abs((b0 + b1) - (y0 + y1)) <= 1
    assert turned.piece(pid).placement.rotation == (plan.piece(pid).placement.rotation + 90) % 360
    # four quarter turns come back to the start
    again = turned
    for _ in range(3):
        again = pe.turn_piece(again, pid)
    assert again.piece(pid).placement == plan.piece(pid).placement


def test_snap_to_wall_moves_the_back_onto_the_room_outline() -> None:
    plan = read_plan(STUDIO)
    bed = plan.piece("bed").placement
    away = pe.place_piece(plan, "bed", bed.x + 300, bed.y + 300, bed.rotation)
    back = pe.snap_to_wall(away, "bed")
    room = Polygon(back.room(back.piece("bed").placement.room).outline)
    x0, y0, x1, y1 = _box(back, "bed")
    # the back edge lies on the outline (within 1 mm), checked with shapely
    from roomfit.audit.geometry import side_direction

    bx, by = side_direction("back", back.piece("bed").placement.rotation)
    edge = ((x0, y0), (x1, y0)) if by < 0 else ((x0, y1), (x1, y1)) if by > 0 else \
        ((x0, y0), (x0, y1)) if bx < 0 else ((x1, y0), (x1, y1))
    from shapely import LineString

    assert room.exterior.distance(LineString(edge).centroid) < 1


def test_a_finding_appears_when_a_piece_blocks_a_door_and_undo_clears_it() -> None:
    plan = read_plan(ROOT / "plans" / "ground-floor-wheelchair.toml")
    rules = rules_for(plan)
    blocked = "the swing or approach of door d-bedroom is blocked by chest"
    assert blocked not in [f.message for f in audit(plan, rules).failures]
    # the chest (450 x 800 mm at a quarter turn) set just inside the bedroom door at
    # (3900, 3000), which swings into the bedroom: its leaf sweeps a 1000 mm quarter disc
    moved = pe.place_piece(plan, "chest", 3700, 3100, 0)
    hist = pe.record(pe.History(), plan)
    assert blocked in [f.message for f in audit(moved, rules).failures]
    hist, back = pe.undo(hist, moved)
    assert back == plan and hist.future == (moved,)
    assert blocked not in [f.message for f in audit(back, rules).failures]
    hist, fwd = pe.redo(hist, back)
    assert fwd == moved and hist.past == (plan,)


def test_bad_moves_are_refused_at_their_field() -> None:
    plan = read_plan(STUDIO)
    with pytest.raises(PlanError, match=r"furniture\[\d+\]\.placement\.rotation"):
        pe.place_piece(plan, "bed", 0, 0, 45)
    with pytest.raises(PlanError, match="no piece with id 'nope'"):
        pe.nudge_piece(plan, "nope", 10, 0)


def test_door_hinge_side_and_leaf_edits() -> None:
    plan = read_plan(STUDIO)
    d = next(x for x in plan.doors if x.hinge)
    other = "left" if d.hinge == "right" else "right"
    flipped = pe.edit_door(plan, d.id, hinge=other)
    assert next(x for x in flipped.doors if x.id == d.id).hinge == other
    sliding = pe.edit_door(plan, d.id, leaf="sliding")
    nd = next(x for x in sliding.doors if x.id == d.id)
    assert nd.swings_into is None and nd.hinge is None
    with pytest.raises(PlanError, match=r"doors\[\d+\]\.width"):
        pe.edit_door(plan, d.id, width=0)


def test_windows_and_corners() -> None:
    plan = read_plan(STUDIO)
    if plan.windows:
        w = plan.windows[0]
        assert pe.edit_window(plan, w.id, sill=600).windows[0].sill == 600
        assert w.id not in [x.id for x in pe.edit_window(plan, w.id, remove=True).windows]
    room = plan.rooms[0]
    pts = list(room.outline)
    with pytest.raises(PlanError, match=r"rooms\[0\]\.outline"):
        pe.set_outline(plan, room.id, pts[:2])
    # a corner added in the middle of a wall keeps the area (shapely)
    a, b = pts[0], pts[1]
    more = pe.set_outline(plan, room.id, [a, ((a[0] + b[0]) // 2, (a[1] + b[1]) // 2), *pts[1:]])
    assert Polygon(more.rooms[0].outline).area == pytest.approx(Polygon(pts).area)


def test_add_and_remove_doors_and_windows_on_a_wall() -> None:
    from roomfit.plan.data import Door, Leaf, Plan, Room

    hall = Room("hall", "Hall", "hall", ((0, 0), (2000, 0), (2000, 3000), (0, 3000)))
    bed = Room("bed", "Bedroom", "bedroom", ((2000, 0), (5000, 0), (5000, 3000), (2000, 3000)))
    entrance = Door("d-in", ("hall", "outside"), (1000, 0), 900, Leaf.SLIDING)
    plan = Plan("two rooms (invented)", (hall, bed), (entrance,))
    assert pe.wall_choices(hall)[1] == "wall 2: (2000, 0) to (2000, 3000), 3000 mm"
    at = pe.on_wall(hall, 1, 1500)  # the middle of the shared wall
    assert at == (2000, 1500)
    joined = pe.add_door(plan, ("hall", "bed"), at, 900)
    door = joined.doors[1]
    assert (door.rooms, door.leaf.value, door.swings_into, door.hinge) == (
        ("hall", "bed"), "hinged", "hall", "left")
    # the audit judges the new door at once: its swing and approach findings exist
    rules = rules_for(joined)
    assert any(door.id in f.pieces or door.id in f.message for f in audit(joined, rules).findings
               if f.rule.startswith("door.")), "the new door is audited"
    with pytest.raises(PlanError, match=r"doors\[1\]"):  # an outer wall does not reach the bedroom
        pe.add_door(plan, ("hall", "bed"), pe.on_wall(hall, 3, 1500), 900)
    assert pe.remove_door(joined, door.id) == plan
    with pytest.raises(PlanError, match="no entrance"):  # the flat keeps a way in
        pe.remove_door(joined, "d-in")
    lit = pe.add_window(plan, "bed", pe.on_wall(bed, 1, 1500), 1200, 900)
    assert (lit.windows[0].room, lit.windows[0].at, lit.windows[0].width) == ("bed", (5000, 1500), 1200)
    with pytest.raises(PlanError, match=r"windows\[0\]"):  # wider than its wall
        pe.add_window(plan, "bed", pe.on_wall(bed, 1, 1500), 4000, 900)


def _scan(width: int, height: int, rooms: list[list[tuple[int, int]]]) -> bytes:
    img = Image.new("RGB", (width, height), "white")
    draw = ImageDraw.Draw(img)
    for r in rooms:
        draw.polygon(r, outline="black", width=4)
    buf = io.BytesIO()
    img.save(buf, format="PNG")
    return buf.getvalue()


def test_trace_two_rooms_over_a_scan_gives_their_areas() -> None:
    # a generated scan at 20 mm per pixel: a 4.0 x 3.0 m room beside a 2.0 x 3.0 m room
    living = [(50, 50), (250, 50), (250, 200), (50, 200)]
    bed = [(250, 50), (350, 50), (350, 200), (250, 200)]
    data = _scan(400, 260, [living, bed])
    scan = load_scan("scan.png", data)
    scale = mm_per_pixel((50, 200), (250, 200), 4000)
    assert scale == pytest.approx(20.0)
    plan = plan_from_trace("Traced", [TracedRoom("Living", "living", tuple(living)),
                                      TracedRoom("Bedroom", "bedroom", tuple(bed))],
                           scale, scan.height)
    areas = {r.label: Polygon(r.outline).area / 1e6 for r in plan.rooms}
    assert areas == pytest.approx({"Living": 12.0, "Bedroom": 6.0}, rel=0.01)  # 4 x 3, 2 x 3
    with pytest.raises(PlanError, match="scan.txt: not a PNG, JPEG or PDF"):
        load_scan("scan.txt", b"hello")
    with pytest.raises(PlanError, match=r"rooms\[0\]\.outline"):
        plan_from_trace("x", [TracedRoom("A", "living", ((0, 0), (1, 1)))], 10, 100)


def test_a_click_on_the_sketch_picks_the_piece_under_it() -> None:
    plan = read_plan(STUDIO)
    drawn = pe.sketch(plan, 540)
    # the bed's footprint (610..2310, 2000..4100 mm): its middle, as a pixel, maps back to it
    x0, y0, x1, y1 = _box(plan, "bed")
    cx, cy = (x0 + x1) / 2, (y0 + y1) / 2
    px, py = (cx - drawn.minx) / drawn.scale, (drawn.maxy - cy) / drawn.scale
    back = drawn.to_plan(px, py)
    assert back == pytest.approx((cx, cy))
    assert pe.piece_at(plan, *back) == "bed"
    assert drawn.image.getpixel((round(px), round(py))) == (234, 216, 186)  # drawn as a piece
    assert pe.piece_at(plan, -5000, -5000) is None


def test_sliding_a_door_as_its_building_finding_proposes_clears_the_approach() -> None:
    """A door whose pull-side approach floor the corner cuts (2010 ADA Table 404.2.4.1:
    18 in = 457 mm beyond the latch) gets a proposed move; the page's slide by that much
    makes the audit pass the approach, and the door stays on its wall."""
    import re

    from roomfit.plan.read import loads_plan
    from roomfit.solve.building import building_findings

    plan = loads_plan("""
roomfit_plan = 1
name = "A hall whose entrance door stands near a corner (invented)"
[rules]
set = "ada-2010"
[[rooms]]
id = "hall"
use = "hall"
outline = [[0, 0], [4000, 0], [4000, 3600], [0, 3600]]
[[doors]]
id = "d-in"
rooms = ["hall", "outside"]
at = [600, 0]
width = 915
leaf = "hinged"
swings_into = "hall"
hinge = "left"
""", "door.toml")
    rules = rules_for(plan)
    found = building_findings(plan, rules, audit(plan, rules))
    change = next(b.change for b in found or () if b.finding.rule == "door.approach")
    got = re.search(r"move door d-in (\d+) mm (east|west)", change)
    assert got, change
    assert pe.door_slide_way(plan, "d-in") == "east"  # the south wall runs east-west
    by = int(got.group(1)) * (1 if got.group(2) == "east" else -1)
    moved = pe.slide_door(plan, "d-in", by)
    assert moved.doors[0].at == (plan.doors[0].at[0] + by, 0)
    assert all(f.ok for f in audit(moved, rules).findings if f.rule == "door.approach")
    with pytest.raises(PlanError, match="doors"):  # off the end of its wall
        pe.slide_door(plan, "d-in", 10_000)
