"""Furniture types as data, and resolving a plan's pieces against them and a rule set.

The catalogue (``roomfit/data/catalog.toml``) gives each type a default footprint (width
along the front, depth front to back, mm), a height, whether its back must stand against a
wall, the *kind* of use zone on each side that is used (``bed_side``, ``storage_front``, ...)
and relations to other pieces (a nightstand beside a bed head). The zone's depth is not in
the catalogue: it comes from the rule set (``zone.<kind>``), because a wheelchair user needs
more floor in front of a wardrobe than a walking one. Every size names its source.

>>> cat = load_catalog()
>>> cat["nightstand"].width
455
"""

from __future__ import annotations

import functools
import tomllib
from dataclasses import dataclass
from importlib import resources

from roomfit.errors import PlanError, Problem
from roomfit.plan.data import SIDES, Piece, Plan
from roomfit.rules.sets import RuleSet

__all__ = [
    "GROUPS",
    "RELATIONS",
    "SIDES",
    "TALL_HEIGHT",
    "FurnitureType",
    "ZoneReq",
    "PieceSpec",
    "load_catalog",
    "zone_kinds",
    "type_record",
    "catalog_problems",
    "resolve_piece",
    "resolve_pieces",
]

#: Pieces at least this tall (mm) block a window whatever its sill height; lower pieces block
#: it when taller than the sill. Common practice: a 1200 mm unit still blocks most windows.
TALL_HEIGHT = 1200

#: Relations a type may have to another piece:
#: ``beside_head``: stands beside the head end of the target (nightstand and bed);
#: ``in_front``: stands in front of the target's front (coffee table and sofa);
#: ``facing``: faces the target across the room (sofa and TV unit).
RELATIONS = ("beside_head", "in_front", "facing")

#: Functional groups a type may take part in (the rules of each are measured by
#: ``roomfit.audit.quality``, values in ``data/groups.toml``):
#: ``sleeping``: a bed with its nightstands (head against a wall, not under a window);
#: ``viewing``: a seat facing a screen; ``lounge``: a coffee table in front of a seat;
#: ``conversation``: seats within speaking distance, turned to each other;
#: ``dining``: a table with its chairs and their pull-out room; ``work``: a desk with its
#: chair and knee height; ``rug``: a rug under the group of its room.
GROUPS = ("sleeping", "viewing", "lounge", "conversation", "dining", "work", "rug")


@dataclass(frozen=True)
class FurnitureType:
    """A catalogue entry. ``zones`` maps a side to the zone kind used on that side."""

    id: str
    label: str
    category: str
    width: int
    depth: int
    height: int
    against_wall: bool
    zones: tuple[tuple[str, str], ...]
    relations: tuple[tuple[str, str], ...]
    source: str
    #: Gap (mm) to the target of a ``beside_head`` or ``in_front`` relation; 0, 0: none.
    gap_min: int = 0
    gap_max: int = 0
    #: Distance from this seat's front to a ``facing`` TV's front, in screen diagonals.
    view_min: float = 0.0
    view_max: float = 0.0
    #: Diagonal (mm) of the screen a TV unit carries; 0 when none.
    screen: int = 0
    #: Length (mm) at the back (head) end of the left and right sides left out of their use
    #: zones: room for a nightstand beside a bed's head. Common practice: a 455 mm nightstand
    #: [S6] plus 45 mm play.
    head_clear: int = 0
    #: Functional groups (:data:`GROUPS`) the type takes part in.
    groups: tuple[str, ...] = ()

    @property
    def touch_sides(self) -> tuple[str, ...]:
        """Sides another piece may touch: those without a use zone (a zone keeps its side's
        floor free of furniture; the back of a wall piece touches the wall)."""
        used = {side for side, _ in self.zones}
        return tuple(s for s in SIDES if s not in used)


@dataclass(frozen=True)
class ZoneReq:
    """A use zone on one ``side`` of a piece: ``depth`` mm out from that side, along its
    whole length less ``inset`` at the back end; ``rule`` is the rule id the depth comes from."""

    side: str
    kind: str
    depth: int
    rule: str
    #: For left and right zones: length (mm) at the piece's back end the zone leaves out.
    inset: int = 0


@dataclass(frozen=True)
class PieceSpec:
    """A plan's piece resolved against the catalogue and the rule set: everything the
    solver, the checker and the drawings need, in millimetres."""

    id: str
    label: str
    type: str
    category: str
    width: int
    depth: int
    height: int
    against_wall: bool
    zones: tuple[ZoneReq, ...]
    relations: tuple[tuple[str, str], ...]
    rooms: tuple[str, ...]
    gap_min: int = 0
    gap_max: int = 0
    view_min: float = 0.0
    view_max: float = 0.0
    screen: int = 0
    groups: tuple[str, ...] = ()

    @property
    def tall(self) -> bool:
        return self.height >= TALL_HEIGHT


def load_catalog() -> dict[str, FurnitureType]:
    """The bundled catalogue, by type id (a fresh dict each call; the file is read once)."""
    return {t.id: t for t in _bundled_catalog()}


@functools.cache
def _bundled_catalog() -> tuple[FurnitureType, ...]:
    path = resources.files("roomfit") / "data" / "catalog.toml"
    data = tomllib.loads(path.read_text(encoding="utf-8"))
    out: dict[str, FurnitureType] = {}
    for tid, raw in data["types"].items():
        out[tid] = FurnitureType(
            id=tid,
            label=raw["label"],
            category=raw["category"],
            width=int(raw["width"]),
            depth=int(raw["depth"]),
            height=int(raw["height"]),
            against_wall=bool(raw.get("against_wall", False)),
            zones=tuple((side, kind) for side, kind in raw.get("zones", {}).items()),
            relations=tuple((r["relation"], r["target"]) for r in raw.get("relations", [])),
            source=raw["source"],
            gap_min=int(raw.get("gap_min", 0)),
            gap_max=int(raw.get("gap_max", 0)),
            view_min=float(raw.get("view_min", 0.0)),
            view_max=float(raw.get("view_max", 0.0)),
            screen=int(raw.get("screen", 0)),
            head_clear=int(raw.get("head_clear", 0)),
            groups=tuple(raw.get("groups", ())),
        )
    return tuple(out.values())


def type_record(t: FurnitureType, rules: RuleSet | None = None) -> dict[str, object]:
    """A catalogue type as plain data (for ``--json`` and tables); with ``rules``, each
    zone also carries its depth in mm under that rule set."""
    zones: list[dict[str, object]] = []
    for side, kind in t.zones:
        z: dict[str, object] = {"side": side, "kind": kind}
        if rules is not None:
            z["depth"] = rules.mm(f"zone.{kind}")
        zones.append(z)
    return {
        "id": t.id, "label": t.label, "category": t.category,
        "width": t.width, "depth": t.depth, "height": t.height,
        "against_wall": t.against_wall, "zones": zones, "touch_sides": list(t.touch_sides),
        "relations": [{"relation": r, "target": c} for r, c in t.relations],
        "gap_min": t.gap_min, "gap_max": t.gap_max,
        "view_min": t.view_min, "view_max": t.view_max, "screen": t.screen,
        "groups": list(t.groups), "source": t.source,
    }


def zone_kinds(catalog: dict[str, FurnitureType]) -> tuple[str, ...]:
    """The zone kinds ``catalog`` uses, sorted; every rule set defines ``zone.<kind>``."""
    return tuple(sorted({kind for t in catalog.values() for _, kind in t.zones}))


def catalog_problems(catalog: dict[str, FurnitureType]) -> list[Problem]:
    """Everything wrong with a catalogue, as problems (empty when it is sound).

    Sizes must be positive (height may be 0 for a rug), zone sides one of :data:`SIDES`,
    relations one of :data:`RELATIONS` pointing at a category some type has, gap and
    viewing ranges ordered, and every type must name its source.
    """
    problems: list[Problem] = []
    categories = {t.category for t in catalog.values()}
    for t in catalog.values():
        field = f"types.{t.id}"
        if min(t.width, t.depth) <= 0 or t.height < 0:
            problems.append(Problem(field, f"sizes must be positive, found {t.width} x "
                                           f"{t.depth} x {t.height} mm"))
        if not t.source.strip():
            problems.append(Problem(f"{field}.source", "empty source",
                                    "name the reference row, or say common practice"))
        for side, _kind in t.zones:
            if side not in SIDES:
                problems.append(Problem(f"{field}.zones.{side}", f"unknown side {side!r}",
                                        f"use one of {', '.join(SIDES)}"))
        for rel, target in t.relations:
            if rel not in RELATIONS:
                problems.append(Problem(f"{field}.relations", f"unknown relation {rel!r}",
                                        f"use one of {', '.join(RELATIONS)}"))
            if target not in categories:
                problems.append(Problem(f"{field}.relations", f"no type has category {target!r}"))
        for g in t.groups:
            if g not in GROUPS:
                problems.append(Problem(f"{field}.groups", f"unknown group {g!r}",
                                        f"use one of {', '.join(GROUPS)}"))
        if t.gap_min > t.gap_max or t.view_min > t.view_max or t.gap_min < 0 or t.view_min < 0:
            problems.append(Problem(field, "gap and viewing ranges must run from low to high"))
    return problems


def _long_side_zones(zones: list[tuple[str, str]], access: str | None) -> list[tuple[str, str]]:
    """Apply a bed's ``access``: which long sides (left, right or both) need a zone.

    The main side's zone kind (the catalogue's left one) goes to the only side kept; with
    ``both``, the right side gets the catalogue's right kind or, if it has none, the main one.
    """
    if access is None:
        return zones
    by_side = dict(zones)
    main = by_side.get("left") or by_side.get("right")
    if main is None:
        return zones
    other = by_side.get("right", main)
    keep = [(s, k) for s, k in zones if s not in ("left", "right")]
    if access == "both":
        return [("left", main), ("right", other), *keep]
    return [(access, main), *keep]


def _transfer_zones(zones: list[tuple[str, str]], transfer: str | None,
                    main: str | None) -> list[tuple[str, str]]:
    """Put the bed's ``main`` long-side zone kind (the set's transfer space) on the
    ``transfer`` side; the other long side takes the kind that side had, if any."""
    if transfer is None or main is None:
        return zones
    sides = {s: k for s, k in zones if s in ("left", "right")}
    if sides.get(transfer) == main:
        return zones
    other = "right" if transfer == "left" else "left"
    swapped = [(transfer, main)] + ([(other, sides[transfer])] if transfer in sides else [])
    return swapped + [(s, k) for s, k in zones if s not in ("left", "right")]


def resolve_piece(
    piece: Piece, rules: RuleSet, catalog: dict[str, FurnitureType], field: str = ""
) -> PieceSpec:
    """Combine a piece with its catalogue type and the rule set's zone depths.

    A ``custom`` piece has the use zones, category and groups its plan entry declares (none
    by default); its sizes must all be given (the plan reader checks that). ``access``
    (beds) picks which long sides keep a zone, see ``_long_side_zones``; ``transfer`` which
    long side takes the main one (the set's transfer space), see ``_transfer_zones``.
    """
    if piece.type == "custom":
        assert piece.width and piece.depth and piece.height is not None
        main = dict(piece.zones).get("left") or dict(piece.zones).get("right")
        own = tuple(ZoneReq(side, kind, rules.mm(f"zone.{kind}"), f"zone.{kind}")
                    for side, kind in _transfer_zones(list(piece.zones), piece.transfer, main))
        return PieceSpec(piece.id, piece.label or piece.id, "custom", piece.category or "custom",
                         piece.width, piece.depth, piece.height, False, own, (), piece.rooms,
                         groups=piece.groups)
    if piece.type not in catalog:
        raise PlanError(Problem(field + ".type", f"unknown furniture type {piece.type!r}",
                                "run `roomfit catalog` to list the types, or use type = \"custom\""))
    t = catalog[piece.type]
    main = dict(t.zones).get("left") or dict(t.zones).get("right")
    zones = _transfer_zones(_long_side_zones(list(t.zones), piece.access), piece.transfer, main)
    reqs = tuple(
        ZoneReq(side, kind, rules.mm(f"zone.{kind}"), f"zone.{kind}",
                t.head_clear if side in ("left", "right") else 0)
        for side, kind in zones
    )
    return PieceSpec(
        id=piece.id,
        label=piece.label or t.label,
        type=t.id,
        category=t.category,
        width=piece.width or t.width,
        depth=piece.depth or t.depth,
        height=piece.height if piece.height is not None else t.height,
        against_wall=t.against_wall,
        zones=reqs,
        relations=t.relations,
        rooms=piece.rooms,
        gap_min=t.gap_min,
        gap_max=t.gap_max,
        view_min=t.view_min,
        view_max=t.view_max,
        screen=t.screen,
        groups=t.groups,
    )


def resolve_pieces(plan: Plan, rules: RuleSet) -> tuple[PieceSpec, ...]:
    """Every piece of ``plan`` resolved, in plan order."""
    catalog = load_catalog()
    return tuple(
        resolve_piece(p, rules, catalog, f"furniture[{i}]") for i, p in enumerate(plan.furniture)
    )

