"""SVG drawings: well-formed, to scale, one element per thing drawn; the draw command."""

from __future__ import annotations

import re
import xml.etree.ElementTree as ET
from dataclasses import replace
from pathlib import Path

import pytest
from shapely import Polygon

from roomfit.audit.geometry import footprint_box
from roomfit.audit.marks import Mark
from roomfit.audit.marks import Path as Route
from roomfit.cli import main
from roomfit.plan.data import Piece, Placement, Plan
from roomfit.plan.read import read_plan
from roomfit.present.draw import SCALE_BAR_MM, STYLE, draw_svg
from roomfit.rules.catalog import resolve_pieces
from roomfit.rules.sets import rules_for

NS = {"s": "http://www.w3.org/2000/svg"}


def _svg(plan: Plan, **kw: object) -> ET.Element:
    return ET.fromstring(draw_svg(plan, rules_for(plan), **kw))  # type: ignore[arg-type]


def _classed(root: ET.Element, tag: str, cls: str) -> list[ET.Element]:
    return [e for e in root.iter(f"{{{NS['s']}}}{tag}") if cls in e.get("class", "").split()]


def _viewbox(root: ET.Element) -> tuple[float, float, float, float]:
    x, y, w, h = (float(v) for v in root.get("viewBox", "").split())
    return x, y, w, h


def test_sample_drawing_parses_and_is_to_scale(sample_path: Path) -> None:
    plan = read_plan(sample_path)
    text = draw_svg(plan, rules_for(plan))
    assert not text.startswith("<?xml")  # embeddable as it is
    root = ET.fromstring(text)
    assert root.tag == "{http://www.w3.org/2000/svg}svg"
    _, _, vw, vh = _viewbox(root)
    width, height = float(root.get("width", 0)), float(root.get("height", 0))
    assert width == 900
    assert height == pytest.approx(vh * width / vw, abs=1)  # no stretching
    # the scale bar is 1000 user units long, and user units are millimetres
    (bar,) = _classed(root, "line", "scale-bar-line")
    assert float(bar.get("x2", 0)) - float(bar.get("x1", 0)) == SCALE_BAR_MM == 1000
    assert "1 unit = 1 mm" in text


def test_one_element_per_piece_door_window_and_fitting(sample_path: Path) -> None:
    plan = read_plan(sample_path)
    root = _svg(plan)
    placed = [p for p in plan.furniture if p.placement is not None]
    assert len(_classed(root, "g", "piece")) == len(placed)
    assert len(_classed(root, "g", "door")) == len(plan.doors)
    assert len(_classed(root, "g", "window")) == len(plan.windows)
    assert len(_classed(root, "g", "fitting")) == len(plan.fixtures)
    assert len(_classed(root, "polygon", "room")) == len(plan.rooms)
    ids = [e.get("id") for e in root.iter() if e.get("id")]
    assert len(ids) == len(set(ids))


def test_furniture_drawn_at_true_size_with_y_up(sample_path: Path) -> None:
    plan = read_plan(sample_path)
    root = _svg(plan)
    specs = {s.id: s for s in resolve_pieces(plan, rules_for(plan))}
    rects = {}
    for g in _classed(root, "g", "piece"):
        r = g.find("s:rect", NS)
        assert r is not None
        rects[g.get("id", "")[len("piece-"):]] = r
    tops = {}
    for p in plan.furniture:
        x0, y0, x1, y1 = footprint_box(specs[p.id], p.placement)  # type: ignore[arg-type]
        r = rects[p.id]
        assert float(r.get("width", 0)) == pytest.approx(x1 - x0, abs=0.05)
        assert float(r.get("height", 0)) == pytest.approx(y1 - y0, abs=0.05)
        tops[p.id] = (y1, float(r.get("y", 0)))
    # a piece further north (larger plan y) is higher up on the sheet (smaller SVG y)
    by_plan = sorted(tops, key=lambda k: tops[k][0])
    svg_ys = [tops[k][1] for k in by_plan]
    assert svg_ys == sorted(svg_ys, reverse=True)


def test_room_labels_give_shapely_areas() -> None:
    plan = read_plan(Path(__file__).parent.parent / "plans" / "one-bed.toml")
    text = draw_svg(plan, rules_for(plan))
    for r in plan.rooms:
        assert f"{Polygon(r.outline).area / 1e6:.2f} m²" in text
    assert "27.04 m²" in text  # the L-shaped living room, 2.6 x 2.8 + 5.2 x 3.8 m by hand


def test_hinged_doors_have_leaf_and_dashed_swing_sliding_doors_a_leaf() -> None:
    plan = read_plan(Path(__file__).parent.parent / "plans" / "one-bed.toml")
    root = _svg(plan)
    for g in _classed(root, "g", "door"):
        door = plan.doors[[d.id for d in plan.doors].index(g.get("id", "")[len("door-"):])]
        leaves = [e for e in g if "leaf" in e.get("class", "")]
        swings = [e for e in g if "swing" in e.get("class", "")]
        assert len(leaves) == 1
        assert len(swings) == (1 if door.leaf.value == "hinged" else 0)
        for s in swings:
            assert s.get("stroke-dasharray")


def test_marks_paths_and_unplaced_pieces() -> None:
    plan = read_plan(Path(__file__).parent.parent / "plans" / "studio.toml")
    bare = replace(plan, furniture=(plan.furniture[0], replace(plan.furniture[1], placement=None)))
    marks = [Mark("fail", "Bed side zone blocked", (1000, 4000), ((0, 4000), (500, 4000),
                                                                  (500, 4500), (0, 4500))),
             Mark("note", "Narrow passage", (3000, 3000), ()),
             Mark("fail", "No turning space anywhere", None, ())]
    routes = [Route("Bed to WC", ((1000, 4500), (2900, 2000), (600, 1000)), night=True),
              Route("Meals", ((4500, 4000), (3500, 5000)))]
    root = _svg(bare, marks=marks, paths=routes, title="As found")
    text = ET.tostring(root, encoding="unicode")
    drawn = _classed(root, "g", "mark")
    assert len(drawn) == 3
    assert len(_classed(root, "g", "mark-fail")) == 2
    fail_outline = drawn[0].find("s:polygon", NS)
    assert fail_outline is not None and fail_outline.get("stroke") == STYLE["fail"]
    for label in ("Bed side zone blocked", "Narrow passage", "No turning space anywhere"):
        assert label in text
    day, night = _classed(root, "g", "path")  # night routes drawn last, on top
    assert _classed(root, "g", "night") == [night]
    assert night.find("s:polyline", NS).get("stroke-dasharray")  # type: ignore[union-attr]
    assert day.find("s:polyline", NS).get("stroke-dasharray") is None  # type: ignore[union-attr]
    assert re.search(r"Not placed: .*" + re.escape(plan.furniture[1].id), text)
    assert len(_classed(root, "g", "piece")) == 1
    assert "As found" in text


def test_cli_draw_writes_each_sample(sample_path: Path, tmp_path: Path,
                                     capsys: pytest.CaptureFixture[str]) -> None:
    out = tmp_path / "plan.svg"
    assert main(["draw", str(sample_path), "-o", str(out)]) == 0
    ET.parse(out)
    assert "Caution" in capsys.readouterr().out


def test_cli_draw_with_another_rule_set(tmp_path: Path) -> None:
    sample = Path(__file__).parent.parent / "plans" / "studio.toml"
    out = tmp_path / "plan.svg"
    assert main(["draw", str(sample), "-o", str(out), "--rules", "ada-2010"]) == 0
    assert "Rule set: ada-2010" in out.read_text(encoding="utf-8")


def test_cli_draw_bad_plan_exits_2_naming_the_field(tmp_path: Path,
                                                    capsys: pytest.CaptureFixture[str]) -> None:
    sample = Path(__file__).parent.parent / "plans" / "studio.toml"
    broken = tmp_path / "broken.toml"
    broken.write_text(sample.read_text(encoding="utf-8").replace("width = 900", "width = -900", 1),
                      encoding="utf-8")
    out = tmp_path / "plan.svg"
    assert main(["draw", str(broken), "-o", str(out)]) == 2
    err = capsys.readouterr().err
    assert "doors[0].width" in err and "Traceback" not in err
    assert not out.exists()


def test_cli_draw_refuses_to_overwrite_its_input(tmp_path: Path,
                                                 capsys: pytest.CaptureFixture[str]) -> None:
    plan = tmp_path / "plan.toml"
    original = (Path(__file__).parent.parent / "plans" / "studio.toml").read_text(encoding="utf-8")
    plan.write_text(original, encoding="utf-8")
    assert main(["draw", str(plan), "-o", str(plan)]) == 2
    assert "never overwrites its inputs" in capsys.readouterr().err
    assert plan.read_text(encoding="utf-8") == original


def test_marks_at_one_point_are_set_side_by_side() -> None:
    plan = read_plan(Path(__file__).parent.parent / "plans" / "studio.toml")
    marks = [Mark("fail", f"problem {i}", (2000, 3000), ()) for i in range(3)]
    root = _svg(plan, marks=marks)
    centres = [(float(c.get("cx", 0)), float(c.get("cy", 0)))
               for g in _classed(root, "g", "mark") for c in g.iter(f"{{{NS['s']}}}circle")]
    assert len(centres) == 3 and len({cy for _, cy in centres}) == 1
    xs = sorted(cx for cx, _ in centres)
    assert all(b - a > 0 for a, b in zip(xs, xs[1:], strict=False))


def test_text_is_escaped_and_width_is_honoured() -> None:
    plan = read_plan(Path(__file__).parent.parent / "plans" / "studio.toml")
    odd = replace(plan, name='Flat <3> & "garden"', client="A & B")
    small = ET.fromstring(draw_svg(odd, rules_for(plan), marks=[Mark("note", "x < y & z", None, ())],
                                   width_px=450))
    big = _svg(odd)
    text = ET.tostring(small, encoding="unicode")
    assert 'Flat &lt;3&gt; &amp; "garden"' in text and "x &lt; y &amp; z" in text
    assert small.get("width") == "450" and big.get("width") == "900"
    # the same drawing in user units (mm); only the pixel size changes
    assert _viewbox(small)[2] == _viewbox(big)[2]


def _drawn_points(root: ET.Element) -> list[tuple[float, float]]:
    """Every polygon vertex and circle centre of the drawing, in SVG user units."""
    pts: list[tuple[float, float]] = []
    for e in root.iter(f"{{{NS['s']}}}polygon"):
        nums = [float(v) for v in re.split(r"[ ,]+", e.get("points", "").strip())]
        pts += list(zip(nums[::2], nums[1::2], strict=True))
    for e in root.iter(f"{{{NS['s']}}}circle"):
        pts.append((float(e.get("cx", "0")), float(e.get("cy", "0"))))
    return pts


def test_pieces_zones_and_marks_past_the_walls_stay_on_the_drawing() -> None:
    # thick-walls: a single bed placed 100 mm through the bedroom's east wall, its 1500 mm
    # side zone (DIN 18040-2 level R) running 1500 mm north through the outer wall, and a mark
    # 3 m beyond the flat: all of it lies inside the viewBox, none is cut off
    plan = read_plan(Path(__file__).parent / "plans_unseen" / "thick-walls.toml")
    root = _svg(plan, marks=[Mark("fail", "far away", (9000.0, 12000.0), ())])
    _, _, w, h = _viewbox(root)
    pts = _drawn_points(root)
    assert pts and all(0 <= x <= w and 0 <= y <= h for x, y in pts)
    # the zone is drawn whole: 1500 mm tall in user units (1 unit = 1 mm)
    zones = [e for e in root.iter(f"{{{NS['s']}}}polygon") if "use-zone" in e.get("class", "")]
    ys = [float(v) for z in zones for v in z.get("points", "").replace(",", " ").split()[1::2]]
    assert max(ys) - min(ys) >= 1500


def test_rugs_are_drawn_under_the_pieces_standing_on_them() -> None:
    # a rug (height 0) listed after the table still lies beneath it in the drawing
    plan = read_plan(Path(__file__).parent / "plans_unseen" / "column-room.toml")
    table = replace(plan.furniture[1], placement=Placement(1000, 1000, 0, "loft"))
    rug = Piece("rug", "custom", ("loft",), width=2000, depth=2000, height=0,
                placement=Placement(500, 500, 0, "loft"))
    root = _svg(replace(plan, furniture=(plan.furniture[0], table, rug)))
    order = [e.get("id") for e in root.iter(f"{{{NS['s']}}}g") if "piece" in e.get("class", "")]
    assert order.index("piece-rug") < order.index("piece-table")


def test_long_headline_wraps_inside_the_title_block() -> None:
    # a long headline used to run on under the rule-set column; wrapped, all of it is kept
    # and every line of the left column stays above the rule under the block's top part
    plan = read_plan(Path(__file__).parent / "plans_unseen" / "seven-rooms.toml")
    title = "Seven rooms, 101 Orchard Terrace (invented): candidate 1 of 3, the quiet one"
    root = _svg(plan, title=title)
    block = next(e for e in root.iter(f"{{{NS['s']}}}g") if e.get("class") == "title-block")
    bold = [t for t in block.iter(f"{{{NS['s']}}}text") if t.get("font-weight") == "bold"]
    assert len(bold) >= 2 and " ".join(t.text or "" for t in bold) == title
    _, _, w, _ = _viewbox(root)
    rule = max(block.iter(f"{{{NS['s']}}}line"),
               key=lambda e: float(e.get("x2", "0")) - float(e.get("x1", "0")))
    rule_y = float(rule.get("y1", "0"))
    left = [t for t in block.iter(f"{{{NS['s']}}}text")
            if "caution" not in t.get("class", "") and float(t.get("x", "0")) < w / 2]
    assert left and all(float(t.get("y", "0")) < rule_y for t in left)


def test_label_of_a_long_fitting_sits_in_its_middle() -> None:
    # a 4000 x 600 mm kitchen run: every point of its centre line is 300 mm from the edges;
    # the label goes to the middle of that line, not near an end where it would run past
    plan = read_plan(Path(__file__).parent / "plans_unseen" / "seven-rooms.toml")
    root = _svg(plan)
    run = next(e for e in root.iter(f"{{{NS['s']}}}g") if e.get("id") == "fitting-run")
    outline = [e for e in run.iter(f"{{{NS['s']}}}polygon") if "zone" not in e.get("class", "")][0]
    xs = [float(v) for v in re.split(r"[ ,]+", outline.get("points", "").strip())[::2]]
    label = next(run.iter(f"{{{NS['s']}}}text"))
    assert float(label.get("x", "0")) == pytest.approx((min(xs) + max(xs)) / 2, abs=1)


def test_plans_in_feet_and_inches_get_a_feet_scale_bar_too() -> None:
    # 3 ft = 3 x 304.8 = 914.4 mm (1959 international foot); a plan in mm gets none
    unseen = Path(__file__).parent / "plans_unseen"
    for name, expected in (("inches-cottage", 1), ("feet-l-shape", 1), ("cm-flat", 0)):
        bars = _classed(_svg(read_plan(unseen / f"{name}.toml")), "line", "scale-bar-ft-line")
        assert len(bars) == expected, name
        for bar in bars:
            length = float(bar.get("x2", "0")) - float(bar.get("x1", "0"))
            assert length == pytest.approx(914.4, abs=0.1)


def test_walls_up_to_600_mm_thick_are_drawn_solid() -> None:
    # plan format: rooms up to 600 mm apart are joined by a wall; the drawing fills such a gap
    # (also where it meets the outer wall band), while rooms 1000 mm apart keep the gap open
    from shapely import Point as P

    from roomfit.plan.data import Room
    from roomfit.present.building import wall_mass as _wall_mass

    def two(gap: int) -> Plan:
        a = Room("a", "A", "hall", ((0, 0), (2000, 0), (2000, 3000), (0, 3000)))
        b = Room("b", "B", "living", ((2000 + gap, 0), (6000, 0), (6000, 4000), (2000 + gap, 4000)))
        return Plan("walls", (a, b))

    mass = _wall_mass(two(600))
    assert all(mass.contains(P(2300, y)) for y in (-100, 10, 1500, 2990))
    assert not _wall_mass(two(1000)).contains(P(2500, 1500))
