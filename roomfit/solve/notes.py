"""What a search says beside its candidates: why a group of rooms found nothing in time,
and why fewer candidates came back than were asked. Facts of the search, in plain words."""

from __future__ import annotations

from roomfit.plan.data import Plan
from roomfit.rules.catalog import PieceSpec
from roomfit.solve.group import DIFFER_PIECES, MOVE, GroupSearch

__all__ = ["held_up", "fewer", "several_rooms"]


def several_rooms(searches: list[GroupSearch]) -> list[PieceSpec]:
    """The movable pieces allowed in several rooms, in the groups without a layout yet."""
    return [sp for s in searches if not s.found for sp in s.specs
            if len(sp.rooms) > 1 and sp.id not in s.locked]


def held_up(plan: Plan, searches: list[GroupSearch]) -> tuple[str, ...]:
    """What held up each group of rooms that found no layout in time: its rooms and pieces,
    the rules its failed layouts broke and the pieces named most often next to a failure,
    and the pieces allowed in several rooms (they join rooms into one larger search)."""
    out = []
    for s in searches:
        if s.found:
            continue
        rooms = ", ".join(plan.room(r).label for r in s.rooms)
        named: dict[str, int] = {}
        for c in s.sound:
            for p in c.named:
                named[p] = named.get(p, 0) + 1
        top = sorted(named, key=lambda p: -named[p])[:3]
        line = (f"The search in the {rooms} ({len(s.specs)} pieces) found no layout that passes "
                f"in time")
        if s.sound:
            line += (f": {len(s.sound)} layouts failed the audit ({', '.join(sorted(s.failed_rules))}), "
                     f"most often next to {', '.join(top)}")
        multi = [f"{sp.label or sp.id} ({' or '.join(plan.room(r).label for r in sp.rooms)})"
                 for sp in s.specs if len(sp.rooms) > 1 and sp.id not in s.locked]
        if multi:
            line += f"; allowed in several rooms, these join the rooms into one search: {', '.join(multi)}"
        out.append(line + ".")
    return tuple(out)


def fewer(plan: Plan, searches: list[GroupSearch], wanted: int, got: int) -> tuple[str, ...]:
    """Why fewer than ``wanted`` candidates came back (empty when all did)."""
    if got >= wanted:
        return ()
    out = [f"{got} of the {wanted} arrangements asked for:"]
    for s in searches:
        if len(s.found) >= wanted:
            continue
        rooms = ", ".join(plan.room(r).label for r in s.rooms)
        if s.exhausted:
            need = min(DIFFER_PIECES, len([p for p in s.specs if p.id not in s.locked]))
            out.append(f"the {rooms} {'has' if len(s.rooms) == 1 else 'have'} no further "
                       f"arrangement that passes every rule and differs from the earlier ones in "
                       f"at least {need} piece{'s' if need != 1 else ''} (moved {MOVE} mm or "
                       f"more, turned, or in another room): proven, the search ran out of layouts")
        else:
            out.append(f"the time limit ended the search for more in the {rooms} "
                       f"({len(s.found)} found there)")
    return tuple(out)
