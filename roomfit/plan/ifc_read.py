"""Read one storey of an IFC model (ISO 16739; IFC2x3 and IFC4) into a neutral floor description.

This is the only module that imports ifcopenshell (the optional extra ``roomfit[ifc]``). It
keeps no IFC objects: everything it returns is a frozen dataclass of plain numbers in
millimetres, in the model's world coordinates (x east, y north as the model has them; the
storey is turned to the axes later, in :mod:`roomfit.plan.floor`). The conversion to a
:class:`~roomfit.plan.data.Plan` is pure shapely and testable without the library.

Geometry comes from ifcopenshell's geometry engine with opening voids *not* cut (a wall's
footprint is then whole, doorways included). A footprint is the union of the element's mesh
triangles projected on the floor; for the upright prisms that spaces, walls and fittings
are, that equals the cut at floor level.

Doors and windows keep their local frame: per ISO 16739 (IfcDoorTypeOperationEnum, and
IfcDoorStyleOperationEnum in IFC2x3) a leaf opens towards the door's local +y, and
``SINGLE_SWING_LEFT`` has its hinges on the left *as seen looking along local +y*. The frame
is stored as the world images of the local origin and axes, so a mirrored placement simply
carries its mirror into the points that :mod:`roomfit.plan.floor` computes from it.
"""

from __future__ import annotations

import fnmatch
from pathlib import Path
from typing import Any

import numpy as np
from shapely import Polygon, union_all
from shapely.geometry.base import BaseGeometry

from roomfit.errors import Problem, RoomfitError
from roomfit.plan.floor_base import largest_polygon
from roomfit.plan.floordata import (
    Floor,
    FloorDoor,
    FloorSpace,
    FloorThing,
    FloorWall,
    FloorWindow,
    Frame,
    ModelSummary,
    Outline,
    Skipped,
    SpaceInfo,
    StoreyInfo,
    ZoneInfo,
)

try:  # the optional extra: every public function says how to install it when it is missing
    import ifcopenshell
    import ifcopenshell.geom
    import ifcopenshell.util.element
    import ifcopenshell.util.placement
    import ifcopenshell.util.unit
except ImportError:  # pragma: no cover - exercised by the CLI test without the extra
    ifcopenshell = None  # type: ignore[assignment]

__all__ = [
    "INSTALL_HINT",
    "IfcError",
    "have_ifc",
    "summarise_model",
    "read_floor",
]

INSTALL_HINT = 'install the IFC extra: pip install "roomfit[ifc]" (it brings ifcopenshell)'

class IfcError(RoomfitError):
    """An IFC model that cannot be read, or a storey or space that is not in it."""


def have_ifc() -> bool:
    """True when ifcopenshell is installed."""
    return ifcopenshell is not None


def _open(path: str | Path) -> Any:
    if ifcopenshell is None:
        raise IfcError(Problem("", "reading IFC needs ifcopenshell", INSTALL_HINT), str(path))
    p = Path(path)
    if not p.is_file():
        raise IfcError(Problem("", "no such file"), str(p))
    try:
        model = ifcopenshell.open(str(p))
    except Exception as e:  # the library raises several types for a bad STEP file
        first = str(e).strip().splitlines()[0] if str(e).strip() else type(e).__name__
        raise IfcError(Problem("", f"not a readable IFC file ({first})"), str(p)) from None
    if model.schema not in ("IFC2X3", "IFC4", "IFC4X3", "IFC4X3_ADD2"):
        raise IfcError(Problem("schema", f"{model.schema} is not supported",
                                     "export the model as IFC2x3 or IFC4"), str(p))
    return model


def _unit_name(scale: float) -> str:
    for name, s in (("metre", 1.0), ("millimetre", 0.001), ("foot", 0.3048), ("inch", 0.0254),
                    ("centimetre", 0.01)):
        if abs(scale - s) < 1e-9:
            return name
    return f"{scale} m"


def _storeys(model: Any) -> list[Any]:
    return sorted(model.by_type("IfcBuildingStorey"), key=lambda s: float(s.Elevation or 0.0))


def _contained(storey: Any, cls: str) -> list[Any]:
    """Elements of ``cls`` in the storey, in GlobalId order (the library gives a set)."""
    return sorted((e for e in ifcopenshell.util.element.get_decomposition(storey) if e.is_a(cls)),
                  key=lambda e: e.GlobalId)


def _stated_area(space: Any) -> float | None:
    for pset in ifcopenshell.util.element.get_psets(space, qtos_only=True).values():
        for key in ("NetFloorArea", "GrossFloorArea"):
            if isinstance(pset.get(key), int | float):
                return float(pset[key])
    return None


def summarise_model(path: str | Path) -> ModelSummary:
    """Storeys (numbered from 1, lowest first), their spaces, and the zones grouping spaces."""
    model = _open(path)
    scale = ifcopenshell.util.unit.calculate_unit_scale(model)
    storeys = []
    for i, s in enumerate(_storeys(model), start=1):
        spaces = tuple(SpaceInfo(sp.GlobalId, sp.Name or "", sp.LongName or "", _stated_area(sp))
                       for sp in _contained(s, "IfcSpace"))
        storeys.append(StoreyInfo(i, s.GlobalId, s.Name or f"storey {i}",
                                  float(s.Elevation or 0.0) * scale * 1000, spaces,
                                  len(_contained(s, "IfcDoor")), len(_contained(s, "IfcWall"))))
    zones = []
    for cls in ("IfcZone", "IfcSpatialZone"):
        try:
            found = model.by_type(cls)
        except RuntimeError:  # not in this schema (IfcSpatialZone is IFC4 only)
            continue
        for z in found:
            members: list[str] = []
            for rel in getattr(z, "IsGroupedBy", None) or []:
                members += [o.Name or o.GlobalId for o in rel.RelatedObjects if o.is_a("IfcSpace")]
            zones.append(ZoneInfo(z.GlobalId, cls, z.Name or "", tuple(members)))
    return ModelSummary(str(path), model.schema, _unit_name(scale), tuple(storeys), tuple(zones))


def _pick_storey(model: Any, storey: str | None, source: str) -> tuple[Any, str]:
    """The storey named or numbered (from 1, lowest first); by default the one with most rooms."""
    all_ = _storeys(model)
    if not all_:
        raise IfcError(Problem("", "the model has no IfcBuildingStorey"), source)
    names = ", ".join(f"{i} {s.Name!r}" for i, s in enumerate(all_, start=1))
    if storey is None:
        best = max(all_, key=lambda s: (len(_contained(s, "IfcSpace")),
                                        len(_contained(s, "IfcDoor"))))
        return best, f"storey not named: took {best.Name!r}, the one with most spaces and doors"
    if storey.isdigit():
        n = int(storey)
        if 1 <= n <= len(all_):
            return all_[n - 1], ""
        raise IfcError(Problem("--storey", f"no storey number {storey}", f"storeys: {names}"), source)
    hits = [s for s in all_ if (s.Name or "").casefold() == storey.casefold() or s.GlobalId == storey]
    if not hits:
        raise IfcError(Problem("--storey", f"no storey named {storey!r}", f"storeys: {names}"),
                       source)
    return hits[0], ""


def _settings() -> Any:
    s = ifcopenshell.geom.settings()
    s.set("use-world-coords", True)
    s.set("disable-opening-subtractions", True)
    return s


def _mesh(settings: Any, el: Any) -> tuple[np.ndarray, np.ndarray] | None:
    """The element's triangle mesh in world millimetres (vertices, faces), or None."""
    if el.Representation is None:
        return None
    try:
        shape: Any = ifcopenshell.geom.create_shape(settings, el)
    except Exception:  # the engine raises plain RuntimeError for geometry it cannot build
        return None
    verts = np.asarray(shape.geometry.verts, dtype=float).reshape(-1, 3) * 1000.0
    faces = np.asarray(shape.geometry.faces, dtype=int).reshape(-1, 3)
    if not len(verts) or not len(faces):
        return None
    return verts, faces


def _footprint(verts: np.ndarray, faces: np.ndarray) -> BaseGeometry:
    """Union of the mesh's triangles projected on the floor (upright faces drop out)."""
    tris = []
    for a, b, c in faces:
        pa, pb, pc = verts[a, :2], verts[b, :2], verts[c, :2]
        if abs((pb[0] - pa[0]) * (pc[1] - pa[1]) - (pb[1] - pa[1]) * (pc[0] - pa[0])) > 1.0:
            tris.append(Polygon([tuple(pa), tuple(pb), tuple(pc)]))
    if not tris:
        return Polygon()
    return union_all(tris).buffer(0.5, join_style="mitre").buffer(-0.5, join_style="mitre")


def _outline(geom: BaseGeometry) -> Outline | None:
    """The largest polygon's exterior, as a tuple of points (mm); holes are dropped."""
    big = largest_polygon(geom)
    if big is None:
        return None
    return tuple((float(x), float(y)) for x, y in big.exterior.coords[:-1])


def _frame(el: Any, scale: float, verts: np.ndarray) -> Frame:
    """The element's local frame (world mm) and its body's extent along local x and y."""
    m = np.asarray(ifcopenshell.util.placement.get_local_placement(el.ObjectPlacement), float)
    origin = m[:3, 3] * scale * 1000.0
    xa, ya = m[:3, 0], m[:3, 1]
    local = np.linalg.solve(m[:3, :3], (verts - origin).T).T
    return Frame((float(origin[0]), float(origin[1])), (float(xa[0]), float(xa[1])),
                 (float(ya[0]), float(ya[1])),
                 (float(local[:, 0].min()), float(local[:, 0].max())),
                 (float(local[:, 1].min()), float(local[:, 1].max())))


def _operation(door: Any) -> str:
    op = getattr(door, "OperationType", None)  # IFC4 puts it on the door too
    if op and op != "NOTDEFINED":
        return str(op)
    t = ifcopenshell.util.element.get_type(door)
    return str(getattr(t, "OperationType", None) or op or "NOTDEFINED")


def _mirrors(el: Any) -> tuple[bool, bool]:
    """Whether the body's mapped geometry is mirrored across local x, and across local y.

    A shared door type placed mirrored carries the mirror in the IfcMappedItem's
    IfcCartesianTransformationOperator (a negative scale or a flipped axis), not in the
    door's placement, which is always right-handed.
    """
    for rep in el.Representation.Representations if el.Representation else []:
        if rep.RepresentationIdentifier != "Body":
            continue
        for item in rep.Items:
            t = getattr(item, "MappingTarget", None)
            if t is None:
                continue
            s1 = float(t.Scale if t.Scale is not None else 1.0)
            s2 = float(getattr(t, "Scale2", None) or s1)
            ax1 = t.Axis1.DirectionRatios if t.Axis1 else (1.0, 0.0, 0.0)
            ax2 = t.Axis2.DirectionRatios if t.Axis2 else (0.0, 1.0, 0.0)
            return ax1[0] * s1 < 0, ax2[1] * s2 < 0
    return False, False


def _lining(door: Any, scale: float) -> float | None:
    t = ifcopenshell.util.element.get_type(door)
    for p in list(getattr(t, "HasPropertySets", None) or []):
        if p.is_a("IfcDoorLiningProperties") and p.LiningThickness:
            return float(p.LiningThickness) * scale * 1000.0
    return None


def _layers(wall: Any, scale: float) -> float | None:
    mat = ifcopenshell.util.element.get_material(wall)
    if mat is not None and mat.is_a("IfcMaterialLayerSetUsage"):
        mat = mat.ForLayerSet
    if mat is not None and mat.is_a("IfcMaterialLayerSet"):
        total = sum(float(layer.LayerThickness or 0.0) for layer in mat.MaterialLayers)
        return total * scale * 1000.0 if total > 0 else None
    return None


_FITTING_CLASSES = ("IfcSanitaryTerminal", "IfcFlowTerminal", "IfcFurnishingElement",
                    "IfcColumn", "IfcFurniture", "IfcSystemFurnitureElement")


def read_floor(path: str | Path, storey: str | None = None,
               spaces: str | None = None) -> tuple[Floor, tuple[str, ...]]:
    """Read one storey of the model at ``path``; ``spaces`` is a glob on space names.

    Spaces and walls are those the storey holds. Doors, windows, fittings and furniture are
    taken by height instead, from the whole model: exporters often file them under another
    storey than the one they stand on (a door of a basement wall filed with the ground
    floor). The storey's floor level is the median base of its walls (else its elevation).

    Returns the floor and the notes of what was assumed while choosing (the storey taken
    when none was named). Raises :class:`IfcError` with the file named for a bad file,
    an unknown storey or a pattern that matches no space.
    """
    model = _open(path)
    scale = ifcopenshell.util.unit.calculate_unit_scale(model)
    st, note = _pick_storey(model, storey, str(path))
    settings = _settings()
    skipped: list[Skipped] = []
    floor_spaces = _read_spaces(st, settings, spaces, skipped, path)
    walls, bases = [], []
    for w in _contained(st, "IfcWall"):
        mesh = _mesh(settings, w)
        outline = _outline(_footprint(*mesh)) if mesh else None
        if mesh is None or outline is None:
            skipped.append(Skipped(w.GlobalId, w.is_a(), "wall without usable body geometry"))
            continue
        bases.append(float(mesh[0][:, 2].min()))
        walls.append(FloorWall(w.GlobalId, w.Name or "", outline, _layers(w, scale)))
    level = float(np.median(bases)) if bases else float(st.Elevation or 0.0) * scale * 1000.0
    doors, windows = [], []
    for el, mesh in _near_level(model, ("IfcDoor", "IfcWindow"), settings, level, skipped):
        fr = _frame(el, scale, mesh[0])
        width = (float(el.OverallWidth) * scale * 1000.0 if el.OverallWidth
                 else fr.x_range[1] - fr.x_range[0])
        low = float(mesh[0][:, 2].min())
        if el.is_a("IfcDoor") and abs(low - level) <= _LEVEL_MM:
            doors.append(FloorDoor(el.GlobalId, el.Name or "", fr, width, _operation(el),
                                   _lining(el, scale), *_mirrors(el)))
        elif el.is_a("IfcWindow") and level - _LEVEL_MM <= low < level + 2400:
            windows.append(FloorWindow(el.GlobalId, el.Name or "", fr, width, low - level))
    things = _read_things(model, settings, scale, level, skipped)
    stairs = _stairs_up_to(model, level, settings)
    floor = Floor(str(path), model.schema, _unit_name(scale), st.Name or "", st.GlobalId,
                  tuple(floor_spaces), tuple(walls), tuple(doors), tuple(windows), tuple(things),
                  stairs, tuple(skipped))
    return floor, ((note,) if note else ())


#: Doors, fittings and furniture whose base lies this close (mm) to the floor level belong to it.
_LEVEL_MM = 450


def _near_level(model: Any, classes: tuple[str, ...], settings: Any, level: float,
                skipped: list[Skipped]) -> list[tuple[Any, tuple[np.ndarray, np.ndarray]]]:
    """Elements of ``classes`` with their meshes whose body reaches into the storey's height."""
    out = []
    for cls in classes:
        for el in sorted(model.by_type(cls), key=lambda e: e.GlobalId):
            mesh = _mesh(settings, el)
            if mesh is None:
                skipped.append(Skipped(el.GlobalId, el.is_a(), "no body geometry"))
                continue
            z = mesh[0][:, 2]
            if float(z.min()) < level + 2400 and float(z.max()) > level + 100:
                out.append((el, mesh))
    return out


def _read_spaces(st: Any, settings: Any, pattern: str | None, skipped: list[Skipped],
                 path: str | Path) -> list[FloorSpace]:
    out = []
    all_spaces = _contained(st, "IfcSpace")
    for sp in all_spaces:
        names = [sp.Name or "", sp.LongName or "", sp.GlobalId]
        if pattern and not any(fnmatch.fnmatchcase(n.casefold(), pattern.casefold()) for n in names):
            continue
        mesh = _mesh(settings, sp)
        outline = _outline(_footprint(*mesh)) if mesh else None
        if outline is None:
            skipped.append(Skipped(sp.GlobalId, "IfcSpace", "space without usable body geometry"))
            continue
        out.append(FloorSpace(sp.GlobalId, sp.Name or "", sp.LongName or "", outline,
                              _stated_area(sp)))
    if pattern and not out:
        known = ", ".join(f"{s.Name} ({s.LongName})" for s in all_spaces) or "none on this storey"
        raise IfcError(Problem("--spaces", f"{pattern!r} matches no space of storey {st.Name!r}",
                               f"spaces: {known}"), str(path))
    return out


def _read_things(model: Any, settings: Any, scale: float, level: float,
                 skipped: list[Skipped]) -> list[FloorThing]:
    out = []
    classes = tuple(c for c in _FITTING_CLASSES if _in_schema(model, c))
    for el, mesh in _near_level(model, classes, settings, level, skipped):
        if abs(float(mesh[0][:, 2].min()) - level) > _LEVEL_MM:
            continue
        outline = _outline(_footprint(*mesh))
        if outline is None:
            skipped.append(Skipped(el.GlobalId, el.is_a(), "no footprint"))
            continue
        t = ifcopenshell.util.element.get_type(el)
        type_name = " ".join(x for x in (getattr(t, "Name", None), el.ObjectType,
                                         getattr(el, "PredefinedType", None)) if x)
        out.append(FloorThing(el.GlobalId, el.is_a(), el.Name or "", type_name, outline,
                              float(np.ptp(mesh[0][:, 2])), _frame(el, scale, mesh[0])))
    return out


def _in_schema(model: Any, cls: str) -> bool:
    try:
        model.by_type(cls)
    except RuntimeError:
        return False
    return True


def _stairs_up_to(model: Any, level: float, settings: Any) -> tuple[tuple[str, Outline], ...]:
    """Stairs that climb from at least 1 m below the floor level to within 400 mm of it."""
    out = []
    for stair in sorted(model.by_type("IfcStair"), key=lambda e: e.GlobalId):
        parts = [stair, *sorted(ifcopenshell.util.element.get_decomposition(stair),
                                key=lambda e: e.GlobalId)]
        meshes = [m for m in (_mesh(settings, p) for p in parts) if m is not None]
        if not meshes:
            continue
        low = min(float(m[0][:, 2].min()) for m in meshes)
        high = max(float(m[0][:, 2].max()) for m in meshes)
        if low < level - 1000 and high >= level - 400:
            outline = _outline(union_all([_footprint(*m) for m in meshes]))
            if outline:
                out.append((stair.GlobalId, outline))
    return tuple(out)
