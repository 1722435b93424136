"""Drawings that show what the rules ask: the zones, routes, turning and dimensions layers.

Each sample is drawn under a wheelchair rule set the way the report and ``solve`` draw it
(with the audit's findings and the route scorer's trips), the SVG is read back, and each
layer's elements are found and measured against the rule figures they show.
"""

from __future__ import annotations

import xml.etree.ElementTree as ET
from pathlib import Path

import pytest
from shapely import Polygon

from roomfit.audit.check import audit
from roomfit.audit.geometry import door_shape
from roomfit.audit.routes import score_routes
from roomfit.cli import main
from roomfit.plan.read import read_plan
from roomfit.present.clearances import LAYERS, parse_layers, rule_figure
from roomfit.present.draw import draw_svg
from roomfit.rules.sets import load_ruleset

NS = {"s": "http://www.w3.org/2000/svg"}
SVG = f"{{{NS['s']}}}"
ROOT = Path(__file__).resolve().parent.parent


def _layer(root: ET.Element, name: str) -> ET.Element | None:
    return next((g for g in root.iter(f"{SVG}g") if g.get("id") == f"layer-{name}"), None)


def _classed(root: ET.Element, cls: str) -> list[ET.Element]:
    return [e for e in root.iter() if cls in e.get("class", "").split()]


def _points(text: str) -> list[tuple[float, float]]:
    return [(float(a), float(b)) for a, b in (p.split(",") for p in text.split())]


def _path_polygon(d: str) -> Polygon:
    ring = d.split("Z")[0].lstrip("M")
    return Polygon(_points(ring))


@pytest.mark.parametrize("set_id", ["iso-21542", "ada-2010"])
def test_each_sample_shows_every_layer_under_a_wheelchair_set(sample_path: Path, set_id: str) -> None:
    plan = read_plan(sample_path)
    rules = load_ruleset(set_id)
    result = audit(plan, rules)
    routes = score_routes(plan, rules)
    root = ET.fromstring(draw_svg(plan, rules, findings=result.findings, routes=routes))
    for name in LAYERS:
        assert _layer(root, name) is not None, name

    # turning: one drawn space per room where the audit found one; the circle is the set's
    # size (ISO 21542:2021: 1500 mm; 2010 ADA §304.3.1: 60 in = 1524 mm), to 3 mm
    turning = _layer(root, "turning")
    found = [f for f in result.by_rule("turning.space") if f.ok]
    spaces = [g for g in _classed(turning, "turning-space") if "turning-missing" not in g.get("class", "")]
    assert len(spaces) == len(found) and found, sample_path.name
    size = 1500 if set_id == "iso-21542" else 1524
    for g in spaces:
        minx, miny, maxx, maxy = _path_polygon(g.find(f"{SVG}path").get("d")).bounds
        assert abs((maxx - minx) - size) <= 3 and abs((maxy - miny) - size) <= 3

    # zones: an approach floor for each door side the set asks one for, with the door's id
    zones = _layer(root, "zones")
    approach = _classed(zones, "approach")
    expected = {(d.id, rid) for d in plan.doors for rid in door_shape(plan, d, rules).approach}
    assert {(e.get("data-door"), e.get("data-room")) for e in approach} == expected
    assert expected
    placed_zones = _classed(zones, "use-zone")
    assert placed_zones  # every sample is furnished

    # routes: one route per reachable trip, each with its narrowest place drawn across it
    # as long as the width it states (to 0.5 mm, the drawing's precision)
    layer = _layer(root, "routes")
    reach = [t for t in routes.trips if t.reachable and len(t.points) >= 2]
    drawn = _classed(layer, "route")
    assert len(drawn) == len(reach) > 0
    narrow = _classed(layer, "narrowest")
    widths = sorted(t.narrowest_mm for t in reach if t.narrowest_mm is not None)
    lengths = []
    for g in narrow:
        bar = g.find(f"{SVG}line")
        x1, y1, x2, y2 = (float(bar.get(k)) for k in ("x1", "y1", "x2", "y2"))
        lengths.append(((x2 - x1) ** 2 + (y2 - y1) ** 2) ** 0.5)
    assert sorted(lengths) == pytest.approx(widths, abs=0.5)
    # night routes drawn last so no day route hides them
    classes = [g.get("class", "") for g in drawn]
    assert classes == sorted(classes, key=lambda c: "night" in c)

    # dimensions: each use zone's depth and two sides of each rectangular room
    dims = _layer(root, "dimensions")
    assert len(_classed(dims, "dim-zone")) == len(placed_zones)
    assert len(_classed(dims, "dim-room")) >= len(plan.rooms)


def test_layers_can_be_switched_off() -> None:
    plan = read_plan(ROOT / "plans" / "studio.toml")
    rules = load_ruleset("iso-21542")
    root = ET.fromstring(draw_svg(plan, rules, show=("zones",)))
    assert _layer(root, "zones") is not None
    assert all(_layer(root, n) is None for n in ("routes", "turning", "dimensions"))
    with pytest.raises(ValueError, match="unknown layer 'doors'"):
        draw_svg(plan, rules, show=("doors",))
    assert parse_layers("none") == ()
    assert parse_layers("all") == LAYERS
    with pytest.raises(ValueError, match="choose from zones"):
        parse_layers("zones,walls")


def test_rule_figures_follow_the_set_and_the_plan() -> None:
    # 2010 ADA §305.3: clear floor space 30 x 48 in, stated in inches: shown in inches
    assert rule_figure(762, "in", "mm") == "30 in"
    # a millimetre figure in a plan measured in feet: feet and inches to 1/4 in
    # (900 mm = 35.43 in = 2 ft 11 1/2 in to the nearest quarter; 1 in = 25.4 mm exactly)
    assert rule_figure(900, "mm", "ft") == "2' 11 1/2\""
    assert rule_figure(900, "mm", "mm") == "900 mm"


def test_draw_command_switches_layers(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    plan = ROOT / "plans" / "ground-floor-wheelchair.toml"
    out = tmp_path / "p.svg"
    assert main(["draw", str(plan), "-o", str(out), "--show", "turning,routes"]) == 0
    root = ET.parse(out).getroot()
    assert _layer(root, "turning") is not None and _layer(root, "routes") is not None
    assert _layer(root, "zones") is None and _layer(root, "dimensions") is None
    assert "layers: routes, turning" in capsys.readouterr().out
    assert main(["draw", str(plan), "-o", str(tmp_path / "q.svg"), "--show", "floor"]) == 2
    assert "--show: unknown layer 'floor'" in capsys.readouterr().err
    assert not (tmp_path / "q.svg").exists()


def test_solve_writes_drawings_with_routes(tmp_path: Path) -> None:
    plan = ROOT / "plans" / "ground-floor-wheelchair.toml"
    out = tmp_path / "found"
    code = main(["solve", str(plan), "-o", str(out), "--candidates", "1", "--time-limit", "60"])
    assert code == 0
    svgs = sorted(out.glob("*.svg"))
    assert svgs
    for svg in svgs:
        root = ET.parse(svg).getroot()
        assert _classed(_layer(root, "routes"), "route")
        assert _classed(_layer(root, "turning"), "turning-space")
