"""Symmetry breaking among equal pieces: of two interchangeable pieces, the first stands first.

Two movable pieces with equal resolved specs (same type, sizes, use zones, rooms and
relations; only the id and label differ) are interchangeable for the audit: swapping them
changes no finding but the names in it. A model that tells them apart searches every
permutation of their spots (five equal stools: 120 copies of each arrangement). Ordering them
lexicographically by their lower-left corner, ``(x, y)``, keeps exactly the sorted copy of
every arrangement, so no arrangement is lost: the constraint is non-strict, and sorting the
pieces' placements of any arrangement satisfies it.

The objective must not tell them apart either, or the sorted copy might score worse than
another one. A class is ordered only when none of its pieces is named by a daily trip, none
is the target of a relation (a relation targets the first piece of a category), and none is
a free-standing piece the alignment term may pick (it picks the largest few, by order).
Locked pieces stay out. ``canonical`` sorts a layout the same way, so that a hint (a layout
given to CP-SAT to start from) satisfies the ordering.
"""

from __future__ import annotations

from dataclasses import replace

from ortools.sat.python import cp_model

from roomfit.plan.data import Placement, Trip
from roomfit.rules.catalog import PieceSpec
from roomfit.solve.vars import PieceVars, wall_lovers

__all__ = ["equal_classes", "order_equal", "canonical", "interchangeable"]


def interchangeable(spec: PieceSpec) -> PieceSpec:
    """``spec`` without its name: pieces with equal results are interchangeable."""
    return replace(spec, id="", label="")


def equal_classes(pieces: list[PieceVars], routines: tuple[Trip, ...]) -> list[list[PieceVars]]:
    """Classes of two or more movable, interchangeable pieces whose order the objective does
    not see (module docstring), each in model order."""
    named = {t.origin for t in routines} | {t.target for t in routines}
    targets = {target for pv in pieces for _, target in pv.spec.relations}
    lovers = wall_lovers()
    classes: dict[PieceSpec, list[PieceVars]] = {}
    for pv in pieces:
        s = pv.spec
        free_standing = (not s.against_wall and s.category not in lovers and len(s.rooms) == 1)
        if pv.locked or s.id in named or s.category in targets or free_standing:
            continue
        classes.setdefault(interchangeable(s), []).append(pv)
    return [c for c in classes.values() if len(c) > 1]


def order_equal(m: cp_model.CpModel, classes: list[list[PieceVars]], span: int) -> None:
    """Each piece of a class stands at or after the one before it in (x, y) order; ``span``
    (mm) is more than the range of every y (so x decides first)."""
    for c in classes:
        for a, b in zip(c, c[1:], strict=False):
            m.add(span * a.x + a.y <= span * b.x + b.y)


def canonical(where: dict[str, Placement], classes: list[list[PieceVars]]) -> dict[str, Placement]:
    """``where`` with each class's placements sorted by (x, y) over its pieces (model order),
    the same arrangement named so that :func:`order_equal` holds."""
    out = dict(where)
    for c in classes:
        ids = [pv.spec.id for pv in c if pv.spec.id in where]
        spots = sorted((where[i] for i in ids), key=lambda p: (p.x, p.y))
        out.update(zip(ids, spots, strict=True))
    return out
