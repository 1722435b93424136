"""GeoJSON export: RFC 7946 structure, ring orientation, areas against shapely; the command."""

from __future__ import annotations

import json
import math
from dataclasses import replace
from pathlib import Path

import pytest
from shapely import LineString, Polygon

from roomfit.cli import main
from roomfit.plan.read import read_plan
from roomfit.present.export import to_geojson
from roomfit.rules.catalog import resolve_pieces
from roomfit.rules.sets import rules_for

_KINDS = {"room", "door", "door_swing", "window", "fitting", "fitting_zone", "piece", "use_zone"}


def _export(path: Path) -> tuple:
    plan = read_plan(path)
    return plan, to_geojson(plan, rules_for(plan))


def test_structure_is_rfc_7946(sample_path: Path) -> None:
    plan, fc = _export(sample_path)
    json.dumps(fc, allow_nan=False)  # RFC 7946 §1: JSON text, no NaN
    assert fc["type"] == "FeatureCollection"  # RFC 7946 §3.3
    assert fc["roomfit"]["units"] == "m"
    ids = []
    for f in fc["features"]:
        assert f["type"] == "Feature"  # RFC 7946 §3.2: type, geometry, properties
        assert set(f) == {"type", "id", "geometry", "properties"}
        g = f["geometry"]
        assert g["type"] in {"Polygon", "LineString"}
        coords = g["coordinates"] if g["type"] == "LineString" else [
            p for ring in g["coordinates"] for p in ring]
        assert all(len(p) == 2 and all(isinstance(c, float) for c in p) for p in coords)
        if g["type"] == "Polygon":
            for ring in g["coordinates"]:
                assert len(ring) >= 4 and ring[0] == ring[-1]  # RFC 7946 §3.1.6: closed rings
        props = f["properties"]
        assert props["kind"] in _KINDS and props["id"] and "label" in props
        ids.append(f["id"])
    assert len(ids) == len(set(ids))
    kinds = [f["properties"]["kind"] for f in fc["features"]]
    assert kinds.count("room") == len(plan.rooms)
    assert kinds.count("door") == len(plan.doors)
    assert kinds.count("window") == len(plan.windows)
    assert kinds.count("fitting") == len(plan.fixtures)
    assert kinds.count("piece") == sum(p.placement is not None for p in plan.furniture)
    assert kinds.count("door_swing") == sum(d.leaf.value == "hinged" for d in plan.doors)


def test_polygons_run_counter_clockwise(sample_path: Path) -> None:
    _, fc = _export(sample_path)
    for f in fc["features"]:
        if f["geometry"]["type"] == "Polygon":
            exterior, *holes = f["geometry"]["coordinates"]
            # RFC 7946 §3.1.6: exterior rings counter-clockwise, holes clockwise
            assert Polygon(exterior).exterior.is_ccw
            assert all(not Polygon(h).exterior.is_ccw for h in holes)


def test_clockwise_outlines_are_turned_round() -> None:
    plan = read_plan(Path(__file__).parent.parent / "plans" / "studio.toml")
    cw = tuple(replace(r, outline=tuple(reversed(r.outline))) for r in plan.rooms)
    assert not Polygon(cw[0].outline).exterior.is_ccw
    fc = to_geojson(replace(plan, rooms=cw), rules_for(plan))
    rooms = [f for f in fc["features"] if f["properties"]["kind"] == "room"]
    assert all(Polygon(f["geometry"]["coordinates"][0]).exterior.is_ccw for f in rooms)


def test_room_areas_equal_shapely_areas(sample_path: Path) -> None:
    plan, fc = _export(sample_path)
    by_id = {f["properties"]["id"]: f for f in fc["features"] if f["properties"]["kind"] == "room"}
    for r in plan.rooms:
        exported = Polygon(by_id[r.id]["geometry"]["coordinates"][0]).area  # m2
        reference = Polygon(r.outline).area / 1e6
        assert exported == pytest.approx(reference, abs=1e-9)
        assert by_id[r.id]["properties"]["area_m2"] == pytest.approx(reference, abs=1e-4)


def test_lengths_come_out_in_metres(sample_path: Path) -> None:
    plan, fc = _export(sample_path)
    specs = {s.id: s for s in resolve_pieces(plan, rules_for(plan))}
    for f in fc["features"]:
        p, kind = f["properties"], f["properties"]["kind"]
        if kind in ("door", "window"):
            assert LineString(f["geometry"]["coordinates"]).length == pytest.approx(
                p["width_mm"] / 1000, abs=2e-4)
        if kind == "piece":
            s = specs[p["id"]]
            assert Polygon(f["geometry"]["coordinates"][0]).area == pytest.approx(
                s.width * s.depth / 1e6, abs=1e-9)
        if kind == "door_swing":
            door = next(d for d in plan.doors if d.id == p["id"])
            quarter = math.pi * (door.width / 1000) ** 2 / 4  # pi r^2 / 4
            assert Polygon(f["geometry"]["coordinates"][0]).area == pytest.approx(quarter, rel=2e-4)


def test_cli_export(sample_path: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    out = tmp_path / "plan.geojson"
    assert main(["export", str(sample_path), "-o", str(out)]) == 0
    assert json.loads(out.read_text(encoding="utf-8"))["type"] == "FeatureCollection"
    assert "metres" in capsys.readouterr().out


def test_cli_export_refuses_its_input_and_bad_plans(tmp_path: Path,
                                                   capsys: pytest.CaptureFixture[str]) -> None:
    plan = tmp_path / "plan.toml"
    plan.write_text('roomfit_plan = 1\nname = "x"\nunits = "yards"\n', encoding="utf-8")
    assert main(["export", str(plan), "-o", str(plan)]) == 2
    assert "never overwrites its inputs" in capsys.readouterr().err
    assert main(["export", str(plan), "-o", str(tmp_path / "x.geojson")]) == 2
    assert "units: unknown unit 'yards'" in capsys.readouterr().err
    assert not (tmp_path / "x.geojson").exists()
