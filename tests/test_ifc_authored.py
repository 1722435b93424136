"""The IFC import on a model nobody designed it for: a small IFC4 flat in millimetres,
authored here with ifcopenshell's own authoring API (a different writer from the two real
models' tools), with a shared door type placed once plain and once mirrored.

Expected values are worked out by hand from how the model is built: two 4.0 x 3.0 m spaces
(12 m2 each) either side of a 100 mm wall; a SINGLE_SWING_LEFT door whose local +y points
west into the kitchen and whose local x runs north, so per ISO 16739 its hinges sit on the
local -x (south) jamb; placed mirrored across its local y axis, on the north jamb.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from shapely import Polygon

from roomfit.audit.geometry import door_leaf
from roomfit.plan.data import OUTSIDE, Leaf

pytest.importorskip("ifcopenshell", reason="the ifc extra (ifcopenshell) is not installed")
import ifcopenshell  # noqa: E402
import ifcopenshell.api as api  # noqa: E402

from roomfit.plan.ifc_import import import_ifc  # noqa: E402


def build(path: Path, mirror_door: bool = False, front_door: bool = True) -> None:
    """Write the test flat to ``path`` (walls, two spaces, a typed door, a front door)."""
    f = ifcopenshell.file(schema="IFC4")
    proj = api.run("root.create_entity", f, ifc_class="IfcProject", name="Authored test flat")
    api.run("unit.assign_unit", f)  # millimetres
    ctx = api.run("context.add_context", f, context_type="Model")
    body = api.run("context.add_context", f, context_type="Model", context_identifier="Body",
                   target_view="MODEL_VIEW", parent=ctx)
    site = api.run("root.create_entity", f, ifc_class="IfcSite", name="Site")
    bld = api.run("root.create_entity", f, ifc_class="IfcBuilding", name="B")
    st = api.run("root.create_entity", f, ifc_class="IfcBuildingStorey", name="Level 0")
    api.run("aggregate.assign_object", f, relating_object=proj, products=[site])
    api.run("aggregate.assign_object", f, relating_object=site, products=[bld])
    api.run("aggregate.assign_object", f, relating_object=bld, products=[st])

    def place(el, x, y, ang, rep, container=True):
        mat = np.eye(4)
        mat[:2, :2] = [[np.cos(ang), -np.sin(ang)], [np.sin(ang), np.cos(ang)]]
        mat[0, 3], mat[1, 3] = x, y
        api.run("geometry.edit_object_placement", f, product=el, matrix=mat, is_si=True)
        if rep is not None:
            api.run("geometry.assign_representation", f, product=el, representation=rep)
        if container:
            api.run("spatial.assign_container", f, relating_structure=st, products=[el])

    def wall(name, x0, y0, x1, y1):
        w = api.run("root.create_entity", f, ifc_class="IfcWall", name=name)
        rep = api.run("geometry.add_wall_representation", f, context=body,
                      length=float(np.hypot(x1 - x0, y1 - y0)), height=2.5, thickness=0.1)
        place(w, x0, y0, float(np.arctan2(y1 - y0, x1 - x0)), rep)
        return w

    # outer walls (their inner faces at 0 and 8.1 x 3.0 m), inner wall x = 4.0..4.1
    for name, a, b in (("S", (-0.1, -0.1), (8.2, -0.1)), ("N", (-0.1, 3.0), (8.2, 3.0)),
                       ("W", (0.0, -0.1), (0.0, 3.1)), ("E", (8.2, -0.1), (8.2, 3.1)),
                       ("Inner", (4.1, 0.0), (4.1, 3.0))):
        wall(name, *a, *b)
    for name, long, x0 in (("1", "Kitchen", 0.0), ("2", "Bedroom", 4.1)):
        sp = api.run("root.create_entity", f, ifc_class="IfcSpace", name=name)
        sp.LongName = long
        rep = api.run("geometry.add_slab_representation", f, context=body, depth=2.5,
                      polyline=[(0.0, 0.0), (4.0, 0.0), (4.0, 3.0), (0.0, 3.0)])
        place(sp, x0, 0.0, 0.0, rep, container=False)
        api.run("aggregate.assign_object", f, relating_object=st, products=[sp])
    # a door type with shared geometry, one door placed in the inner wall: local x runs
    # north along the wall, local y points west (into the kitchen) at angle +90 deg
    dtype = api.run("root.create_entity", f, ifc_class="IfcDoorType", name="Flush 900")
    dtype.OperationType = "SINGLE_SWING_LEFT"
    rep = api.run("geometry.add_door_representation", f, context=body, overall_height=2100.0,
                  overall_width=900.0, operation_type="SINGLE_SWING_LEFT")
    api.run("geometry.assign_representation", f, product=dtype, representation=rep)
    door = api.run("root.create_entity", f, ifc_class="IfcDoor", name="Door 1")
    door.OverallWidth, door.OverallHeight = 900.0, 2100.0
    api.run("type.assign_type", f, related_objects=[door], relating_type=dtype)
    place(door, 4.1, 1.05, np.pi / 2, None)
    if mirror_door:  # the type's geometry placed mirrored across the door's local y axis
        item = door.Representation.Representations[0].Items[0]
        item.MappingTarget = f.createIfcCartesianTransformationOperator3D(
            f.createIfcDirection((-1.0, 0.0, 0.0)), None,
            f.createIfcCartesianPoint((900.0, 0.0, 0.0)), 1.0, None)
    # the front door: in the south wall of the kitchen, no type, operation not defined
    if not front_door:
        f.write(str(path))
        return
    front = api.run("root.create_entity", f, ifc_class="IfcDoor", name="Front")
    front.OverallWidth, front.OverallHeight = 1000.0, 2100.0
    rep = api.run("geometry.add_door_representation", f, context=body, overall_height=2100.0,
                  overall_width=1000.0, operation_type="SINGLE_SWING_LEFT")
    place(front, 1.5, -0.1, 0.0, rep)
    f.write(str(path))


@pytest.mark.parametrize("mirrored", [False, True])
def test_authored_flat(tmp_path: Path, mirrored: bool) -> None:
    path = tmp_path / "flat.ifc"
    build(path, mirror_door=mirrored)
    imp = import_ifc(path)
    plan = imp.plan
    assert plan.unit == "mm"
    assert sorted(r.label for r in plan.rooms) == ["Bedroom", "Kitchen"]
    for room in plan.rooms:
        assert Polygon(room.outline).area == pytest.approx(12e6, rel=0.001)  # 4.0 x 3.0 m
    inner = next(d for d in plan.doors if d.id == "d-door-1")
    assert set(inner.rooms) == {"kitchen", "bedroom"} and inner.swings_into == "kitchen"
    hinge, _ = door_leaf(plan, inner)
    # world y of the hinge jamb: 1050 - 25 (south, plain) or 1050 + 925 (north, mirrored)
    jamb = imp.placed.pt((4100.0, 1975.0 if mirrored else 1025.0))
    assert abs(hinge[1] - jamb[1]) <= 60, (hinge, jamb)
    assert any("mirrored" in n.text for n in imp.notes if n.about == "d-door-1") == mirrored
    front = next(d for d in plan.doors if d.id == "d-front")
    assert front.rooms == ("kitchen", OUTSIDE) and front.leaf == Leaf.HINGED
    assert any(n.kind == "guessed" and n.about == "d-front" for n in imp.notes)


def test_without_a_door_to_no_space_the_entrance_must_be_named(tmp_path: Path) -> None:
    from roomfit.errors import PlanError

    path = tmp_path / "flat.ifc"
    build(path, front_door=False)
    with pytest.raises(PlanError, match="entrance is unknown"):
        import_ifc(path)
    plan = import_ifc(path, entrance="Door 1").plan
    assert plan.doors[0].is_entrance and plan.doors[0].id == "d-door-1"
