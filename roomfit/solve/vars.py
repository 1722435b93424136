"""The variables of the placement model, and the index that maps them back to pieces.

``PieceVars`` holds one piece's position and its (room, rotation) literals; ``Built`` is a
built model with that index, the room geometry and the assumption literals of the rule
groups. Decoding a solution uses only this index.
"""

from __future__ import annotations

import functools
import tomllib
from dataclasses import dataclass, field
from importlib import resources

from ortools.sat.python import cp_model

from roomfit.rules.catalog import PieceSpec
from roomfit.solve.rooms import RoomGeo

__all__ = ["PieceVars", "Built", "load_preferences", "wall_lovers", "symmetric"]


@functools.cache
def load_preferences() -> dict:
    """The objective's weights from ``roomfit/data/preferences.toml`` (read once: one dict
    shared by every caller, read only)."""
    path = resources.files("roomfit") / "data" / "preferences.toml"
    return tomllib.loads(path.read_text(encoding="utf-8"))


@dataclass
class PieceVars:
    """Variables of one piece: position, one literal per (room, rotation), sizes per rotation."""

    spec: PieceSpec
    x: cp_model.IntVar
    y: cp_model.IntVar
    alts: dict[tuple[str, int], cp_model.IntVar]
    locked: bool
    walls: dict[tuple[str, int], list[cp_model.IntVar]] = field(default_factory=dict)
    _ends: tuple[cp_model.IntVar, cp_model.IntVar] | None = None

    def size(self, rot: int) -> tuple[int, int]:
        return (self.spec.width, self.spec.depth) if rot in (0, 180) else (self.spec.depth, self.spec.width)

    def width_expr(self) -> cp_model.LinearExpr:
        return cp_model.LinearExpr.weighted_sum(list(self.alts.values()),
                                                [self.size(rot)[0] for _, rot in self.alts])

    def depth_expr(self) -> cp_model.LinearExpr:
        return cp_model.LinearExpr.weighted_sum(list(self.alts.values()),
                                                [self.size(rot)[1] for _, rot in self.alts])

    def ends(self, m: cp_model.CpModel) -> tuple[cp_model.IntVar, cp_model.IntVar]:
        """Variables for the footprint's right and top edges (made once, then reused)."""
        if self._ends is None:
            xe = m.new_int_var(-10_000_000, 10_000_000, f"xe_{self.spec.id}")
            ye = m.new_int_var(-10_000_000, 10_000_000, f"ye_{self.spec.id}")
            m.add(xe == self.x + self.width_expr())
            m.add(ye == self.y + self.depth_expr())
            self._ends = (xe, ye)
        return self._ends

    def in_room(self, room: str) -> cp_model.LinearExpr:
        return cp_model.LinearExpr.sum([lit for (r, _), lit in self.alts.items() if r == room])


@dataclass
class Built:
    """A built model with the index that maps variables back to pieces.

    ``groups`` maps a rule-group id (``piece.<id>``, ``zone.<id>``, ``wall.<id>``,
    ``turning.<room>``, ``door.<id>``, ``window.<id>``, ``fixture.<id>``) to its assumption
    literal; empty unless built with ``assume=True``.
    """

    model: cp_model.CpModel
    pieces: list[PieceVars]
    rooms: dict[str, RoomGeo]
    groups: dict[str, cp_model.IntVar]
    has_objective: bool
    route: int
    #: classes of interchangeable pieces kept in (x, y) order (``roomfit.solve.symmetry``)
    classes: list[list[PieceVars]] = field(default_factory=list)


def wall_lovers() -> set[str]:
    return set(load_preferences()["wall"]["categories"])


def symmetric(spec: PieceSpec) -> bool:
    """True when turning the piece by 180 degrees leaves its footprint and zones the same."""
    flip = {"front": "back", "back": "front", "left": "right", "right": "left"}
    zs = {(z.side, z.depth) for z in spec.zones}
    return zs == {(flip[s], d) for s, d in zs} and not spec.against_wall
