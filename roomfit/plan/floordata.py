"""The neutral floor description an IFC reader produces: frozen dataclasses, millimetres.

:mod:`roomfit.plan.ifc_read` fills these from a model (it alone imports ifcopenshell);
:mod:`roomfit.plan.floor` turns them into a :class:`~roomfit.plan.data.Plan`. Tests build
them by hand. Coordinates are the model's world x and y in mm; heights above the storey's
floor in mm; ``gid`` is the IFC GlobalId.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = [
    "Outline",
    "Frame",
    "FloorSpace",
    "FloorWall",
    "FloorDoor",
    "FloorWindow",
    "FloorThing",
    "Skipped",
    "Floor",
    "SpaceInfo",
    "StoreyInfo",
    "ZoneInfo",
    "ModelSummary",
]

Outline = tuple[tuple[float, float], ...]


@dataclass(frozen=True)
class Frame:
    """An element's local frame in world millimetres: origin and the images of local x, y.

    ``x_range``/``y_range`` give the element body's extent along local x and y (mm), so a
    local point ``(u, v)`` sits at ``origin + u * x_axis + v * y_axis``.
    """

    origin: tuple[float, float]
    x_axis: tuple[float, float]
    y_axis: tuple[float, float]
    x_range: tuple[float, float]
    y_range: tuple[float, float]

    def point(self, u: float, v: float) -> tuple[float, float]:
        return (self.origin[0] + u * self.x_axis[0] + v * self.y_axis[0],
                self.origin[1] + u * self.x_axis[1] + v * self.y_axis[1])

    @property
    def centre(self) -> tuple[float, float]:
        """The middle of the body's extent along local x and y."""
        return self.point(sum(self.x_range) / 2, sum(self.y_range) / 2)


@dataclass(frozen=True)
class FloorSpace:
    """An IfcSpace: footprint at floor level (mm) and the floor area the model states (m2)."""

    gid: str
    name: str
    long_name: str
    outline: Outline
    stated_area: float | None = None


@dataclass(frozen=True)
class FloorWall:
    """A wall's footprint (mm) and its thickness from its material layers (mm), if given."""

    gid: str
    name: str
    outline: Outline
    layers_thickness: float | None = None


@dataclass(frozen=True)
class FloorDoor:
    """A door: its frame, overall width and lining thickness (mm), and operation type.

    ``mirrored_x``/``mirrored_y``: the door's body is drawn mirrored across its local x
    (or y) axis by the mapping of its shared type geometry, so its hinge jamb (or the side
    it opens to) is the other one.
    """

    gid: str
    name: str
    frame: Frame
    overall_width: float
    operation: str
    lining: float | None = None
    mirrored_x: bool = False
    mirrored_y: bool = False


@dataclass(frozen=True)
class FloorWindow:
    """A window: its frame, overall width and sill height above the storey's floor (mm)."""

    gid: str
    name: str
    frame: Frame
    overall_width: float
    sill: float


@dataclass(frozen=True)
class FloorThing:
    """A fitting or piece of furniture as it stands: footprint, height (mm), frame, names."""

    gid: str
    ifc_class: str
    name: str
    type_name: str
    outline: Outline
    height: float
    frame: Frame


@dataclass(frozen=True)
class Skipped:
    """An entity left out, and why (the IFC class and GlobalId make it findable)."""

    gid: str
    ifc_class: str
    reason: str


@dataclass(frozen=True)
class Floor:
    """One storey of a model, neutral: what :func:`roomfit.plan.floor.floor_to_plan` needs."""

    source: str
    schema: str
    unit: str
    storey: str
    storey_gid: str
    spaces: tuple[FloorSpace, ...] = ()
    walls: tuple[FloorWall, ...] = ()
    doors: tuple[FloorDoor, ...] = ()
    windows: tuple[FloorWindow, ...] = ()
    things: tuple[FloorThing, ...] = ()
    stairs_up_to_here: tuple[tuple[str, Outline], ...] = ()
    skipped: tuple[Skipped, ...] = ()


@dataclass(frozen=True)
class SpaceInfo:
    gid: str
    name: str
    long_name: str
    area: float | None


@dataclass(frozen=True)
class StoreyInfo:
    number: int
    gid: str
    name: str
    elevation_mm: float
    spaces: tuple[SpaceInfo, ...]
    doors: int
    walls: int


@dataclass(frozen=True)
class ZoneInfo:
    gid: str
    ifc_class: str
    name: str
    spaces: tuple[str, ...]


@dataclass(frozen=True)
class ModelSummary:
    source: str
    schema: str
    unit: str
    storeys: tuple[StoreyInfo, ...]
    zones: tuple[ZoneInfo, ...]
