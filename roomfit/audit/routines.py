"""The daily routine: the trips a plan asks to be made, or the default trips where it asks
none. Both the audit (``route.trip``) and the route scorer walk these trips."""

from __future__ import annotations

from roomfit.plan.data import Plan, Trip

__all__ = ["default_routines", "routines_for"]


def default_routines(plan: Plan) -> tuple[Trip, ...]:
    """Trips assumed when a plan has no routine, where their places exist (common practice).

    Bed to WC at night once a day; kitchen to dining table 6 times; entrance to kitchen once;
    sofa to kitchen 4 times. The kitchen is the first ``kitchen_run`` fitting, else the first
    room used as a kitchen; bed, sofa and dining table the first placed piece of that
    catalogue category.
    """
    categories: dict[str, str] = {}
    try:
        from roomfit.rules.catalog import load_catalog

        catalog = load_catalog()
    except Exception:  # noqa: BLE001 - a broken catalogue only loses the defaults
        catalog = {}
    for p in plan.furniture:
        cat = catalog[p.type].category if p.type in catalog else p.type
        if p.placement is not None and cat not in categories:
            categories[cat] = p.id
    wc = next((f.id for f in plan.fixtures if f.kind == "wc"), None)
    kitchen = next((f.id for f in plan.fixtures if f.kind == "kitchen_run"), None)
    kitchen = kitchen or next((r.id for r in plan.rooms if r.use == "kitchen"), None)
    entrance = "entrance" if any(d.is_entrance for d in plan.doors) else None
    bed, sofa, table = (categories.get(c) for c in ("bed", "sofa", "dining_table"))
    wanted = [
        (bed, wc, 1.0, "Bed to WC at night", True),
        (kitchen, table, 6.0, "Kitchen to table", False),
        (entrance, kitchen, 1.0, "Entrance to kitchen", False),
        (sofa, kitchen, 4.0, "Sofa to kitchen", False),
    ]
    return tuple(Trip(a, b, n, label, night) for a, b, n, label, night in wanted if a and b)


def routines_for(plan: Plan) -> tuple[tuple[Trip, ...], bool]:
    """The plan's routine, or the defaults; the flag says whether defaults were used."""
    return (plan.routines, False) if plan.routines else (default_routines(plan), True)
