"""The data model of an apartment plan: frozen dataclasses, integer millimetres, no I/O.

Coordinates are plan coordinates in millimetres, x to the right (east), y up (north), as on
a surveyor's drawing; SVG output flips y. Outlines are simple polygons given counter-clockwise
or clockwise (we normalise nothing here; ``geometry`` orients as needed).

A *piece* of furniture has a local frame: its ``width`` runs along local x, its ``depth``
along local y, and its front (the side a person uses) faces local +y. A :class:`Placement`
turns the piece counter-clockwise by ``rotation`` degrees (0, 90, 180 or 270) and puts the
lower-left corner of the turned footprint at ``(x, y)``; the corner, not the centre, keeps
every coordinate an integer whatever the size. At rotation 0 the front faces north, at 90
west, at 180 south, at 270 east.

Nothing here knows about files, shapely or solvers.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from enum import StrEnum

__all__ = [
    "FORMAT_VERSION",
    "VERSION_KEY",
    "OUTSIDE",
    "Point",
    "Leaf",
    "Room",
    "Door",
    "Window",
    "Fixture",
    "Placement",
    "Piece",
    "RuleChoice",
    "Trip",
    "Plan",
    "Layout",
    "ROTATIONS",
    "SIDES",
]

#: Version of the plan-file format this code reads and writes.
FORMAT_VERSION = 1

#: The top-level key of a plan file that holds :data:`FORMAT_VERSION`.
VERSION_KEY = "roomfit_plan"

#: Pseudo room id for the far side of an entrance door.
OUTSIDE = "outside"

#: Allowed rotations in degrees, counter-clockwise.
ROTATIONS = (0, 90, 180, 270)

#: Sides of a piece in its local frame: front faces +y, back -y, left -x, right +x
#: (left and right as seen by a person standing in front of the piece, facing it, are
#: swapped; we name them from the piece's own point of view, like a chair's arms).
SIDES = ("front", "back", "left", "right")

Point = tuple[int, int]


class Leaf(StrEnum):
    """What closes a doorway."""

    HINGED = "hinged"
    SLIDING = "sliding"
    NONE = "none"


@dataclass(frozen=True)
class Room:
    """A room: a simple polygon with a label and a use (bedroom, living, kitchen, ...)."""

    id: str
    label: str
    use: str
    outline: tuple[Point, ...]


@dataclass(frozen=True)
class Door:
    """A doorway on a wall of ``rooms[0]``, joining it to ``rooms[1]`` (or :data:`OUTSIDE`).

    ``at`` is the centre of the clear opening, ``width`` the clear width (mm). For a hinged
    leaf, ``swings_into`` names the room the leaf opens into and ``hinge`` says on which jamb
    the hinges are, ``"left"`` or ``"right"`` as seen by a person standing in that room
    facing the door. The leaf is as wide as the clear opening (a conservative swing).
    """

    id: str
    rooms: tuple[str, str]
    at: Point
    width: int
    leaf: Leaf = Leaf.HINGED
    swings_into: str | None = None
    hinge: str | None = None

    @property
    def is_entrance(self) -> bool:
        return OUTSIDE in self.rooms


@dataclass(frozen=True)
class Window:
    """A window on a wall of ``room``: centre ``at``, ``width`` and ``sill`` height (mm)."""

    id: str
    room: str
    at: Point
    width: int
    sill: int


@dataclass(frozen=True)
class Fixture:
    """A fixed fitting: kitchen run, WC, basin, bath, radiator, column, built-in cupboard.

    ``outline`` is its footprint, ``height`` its height (mm). ``zone``, when given, is the
    floor in front of it a person needs to use it (a polygon, kept free of furniture).
    ``transfer`` (a WC): the side, ``"left"`` or ``"right"`` as seen sitting on it, the client
    transfers from a wheelchair; the set's WC clearance extends to that side.
    """

    id: str
    room: str
    kind: str
    label: str
    outline: tuple[Point, ...]
    height: int
    zone: tuple[Point, ...] | None = None
    transfer: str | None = None


@dataclass(frozen=True)
class Placement:
    """Where a piece stands: the lower-left corner ``(x, y)`` of its rotated footprint.

    Using the corner keeps everything in integers whatever the piece's size; the centre is
    ``(x + w/2, y + d/2)`` with ``w, d`` the rotated footprint size. ``room`` is the room the
    piece stands in.
    """

    x: int
    y: int
    rotation: int
    room: str


@dataclass(frozen=True)
class Piece:
    """One piece of furniture the client owns or wants.

    ``type`` names a catalogue entry; ``width``, ``depth`` and ``height`` override its
    defaults (all three are required when ``type`` is ``"custom"``). ``rooms`` lists the rooms
    it may stand in (one entry: assigned). ``placement`` is where it stands now (the as-is
    arrangement, audited by the checker); ``locked`` keeps it there when solving.
    ``access`` picks the long sides of a bed kept free: ``"both"``, ``"left"`` or ``"right"``
    (None: the catalogue's default). A ``custom`` piece may say what a catalogue type says:
    ``category`` (a catalogue category, so rules for beds or seats apply), ``zones`` (side,
    zone kind) pairs whose depths the rule set gives, and the functional ``groups`` it joins.
    ``transfer`` (beds): the long side, ``"left"`` or ``"right"``, the client transfers from
    a wheelchair; that side takes the set's transfer space (the main bed-side zone).
    """

    id: str
    type: str
    rooms: tuple[str, ...]
    label: str = ""
    width: int | None = None
    depth: int | None = None
    height: int | None = None
    placement: Placement | None = None
    locked: bool = False
    access: str | None = None
    category: str = ""
    zones: tuple[tuple[str, str], ...] = ()
    groups: tuple[str, ...] = ()
    transfer: str | None = None


@dataclass(frozen=True)
class RuleChoice:
    """The rule set that governs the client's home, and values overridden for this client.

    ``overrides`` maps rule ids to values in millimetres (or a word for text rules).
    """

    set: str = "everyday"
    overrides: tuple[tuple[str, int | str], ...] = ()

    def override_map(self) -> dict[str, int | str]:
        return dict(self.overrides)


@dataclass(frozen=True)
class Trip:
    """A trip of the daily routine between two named places, ``per_day`` times a day.

    A place is a piece id, a fixture id, a door id, a room id or ``"entrance"``.
    ``night`` marks trips made at night (checked for length and width).
    """

    origin: str
    target: str
    per_day: float
    label: str = ""
    night: bool = False


Layout = tuple[tuple[str, Placement], ...]
"""An arrangement: (piece id, placement) pairs, in the order of ``Plan.furniture``."""


@dataclass(frozen=True)
class Plan:
    """A client's apartment with the furniture they want and the rules that govern them."""

    name: str
    rooms: tuple[Room, ...]
    doors: tuple[Door, ...] = ()
    windows: tuple[Window, ...] = ()
    fixtures: tuple[Fixture, ...] = ()
    furniture: tuple[Piece, ...] = ()
    rules: RuleChoice = field(default_factory=RuleChoice)
    routines: tuple[Trip, ...] = ()
    unit: str = "mm"
    client: str = ""
    address: str = ""
    notes: str = ""

    def room(self, room_id: str) -> Room:
        for r in self.rooms:
            if r.id == room_id:
                return r
        raise KeyError(room_id)

    def piece(self, piece_id: str) -> Piece:
        for p in self.furniture:
            if p.id == piece_id:
                return p
        raise KeyError(piece_id)

    @property
    def layout(self) -> Layout:
        """The as-is arrangement: pieces that have a placement."""
        return tuple((p.id, p.placement) for p in self.furniture if p.placement is not None)

    @property
    def is_furnished(self) -> bool:
        return bool(self.furniture) and all(p.placement is not None for p in self.furniture)

    def with_layout(self, layout: Layout) -> Plan:
        """This plan with the given placements (pieces not in ``layout`` keep theirs)."""
        where = dict(layout)
        pieces = tuple(
            replace(p, placement=where[p.id]) if p.id in where else p for p in self.furniture
        )
        return replace(self, furniture=pieces)

    def with_rules(self, rules: RuleChoice) -> Plan:
        return replace(self, rules=rules)
