"""Benchmark instances: seeded, deterministic flats of 1 to 8 rooms and 4 to 60 pieces.

A generated flat is a row of rooms standing on the line y = 0, each joined to the next by a
900 mm hinged door near the floor line and the first one to the outside by the entrance in
its south wall. A room is a rectangle, an L (its north-east corner cut out) or has one angled
wall (its north-east corner cut off on the diagonal). Each room gets a window in its north
wall and furniture chosen by its use (living, bedroom, kitchen, study). The daily routine
walks from the entrance to the first piece of each room and between neighbouring rooms.

Room sizes follow from the floor the furniture needs: the footprints plus their use zones
(depths from the rule set), the door approach floor and, where the rule set asks for one, a
turning space. The room's floor is that demand divided by the *target share*: 0.45 for a
*loose* flat, 0.65 for a *tight* one (common practice for "roomy" and "cramped" as we use
them here; the checker, not this share, decides what fits). An *impossible* instance is a
single room at a share well over 1, which no arrangement can satisfy.

The same :class:`InstanceSpec` always gives the same :class:`~roomfit.plan.data.Plan`:

>>> a = generate(InstanceSpec(rooms=2, pieces=8, seed=3))
>>> a == generate(InstanceSpec(rooms=2, pieces=8, seed=3))
True
>>> len(a.rooms), len(a.furniture)
(2, 8)
"""

from __future__ import annotations

import math
import random
from dataclasses import dataclass
from pathlib import Path

from roomfit.plan.data import OUTSIDE, Door, Leaf, Piece, Plan, Room, RuleChoice, Trip, Window
from roomfit.plan.read import read_plan
from roomfit.rules.catalog import load_catalog, resolve_pieces
from roomfit.rules.sets import RuleSet, load_ruleset, ruleset_ids

__all__ = [
    "SHAPES",
    "TIGHTNESS",
    "DOOR_WIDTH",
    "InstanceSpec",
    "Instance",
    "generate",
    "floor_demand",
    "sample_instances",
    "wheelchair_set",
]

#: Room shapes the generator draws.
SHAPES = ("rect", "L", "angled")

#: Target share of the floor taken by footprints and use zones (see module docstring).
TIGHTNESS = {"loose": 0.45, "tight": 0.65, "impossible": 1.6}

#: Clear width of every generated door (mm): wider than the least door width of every bundled
#: rule set (2010 ADA §404.2.3: 32 in = 813 mm).
DOOR_WIDTH = 900

#: Share of a room's width and depth cut away by an L corner or an angled wall.
_CUT = 0.35

#: Furniture by room use, in the order pieces are added; catalogue types, or ``("custom", w,
#: d, h, label)`` for plain boxes with no use zone (sizes common practice). Types missing from
#: the catalogue are skipped.
_CORE = {
    "studio": ["bed-double-160", "nightstand", "wardrobe-hinged", "sofa-3", "tv-unit",
               "dining-table-4", "desk"],
    "living": ["sofa-3", "tv-unit", "dining-table-4"],
    "bedroom": ["bed-double-160", "nightstand", "wardrobe-hinged", "nightstand"],
    "kitchen": ["dining-table-4"],
    "study": ["desk", "bed-single-90", "wardrobe-hinged"],
}
_FILLERS: list[str | tuple[str, int, int, int, str]] = [
    ("custom", 800, 450, 900, "Chest of drawers"),
    ("custom", 500, 500, 450, "Side table"),
    ("custom", 900, 350, 1800, "Bookcase"),
    ("custom", 450, 450, 450, "Stool"),
    ("custom", 1000, 500, 400, "Low bench"),
    ("custom", 400, 400, 1100, "Plant stand"),
]
_USES = ("living", "bedroom", "kitchen", "study", "bedroom", "living", "bedroom", "study")


def wheelchair_set() -> str:
    """The bundled wheelchair rule set the benchmark uses (ADA 2010 when present)."""
    known = ruleset_ids()
    for name in ("ada-2010", "icc-a117-2017", "iso-21542"):
        if name in known:
            return name
    raise LookupError(f"no wheelchair rule set among {known}")


@dataclass(frozen=True)
class InstanceSpec:
    """What to generate: sizes, room shape, rule set and how tight, and the seed.

    ``shape`` is one of :data:`SHAPES` or ``"mixed"`` (drawn per room); ``rules`` is
    ``"everyday"`` or ``"wheelchair"`` (see :func:`wheelchair_set`) or a rule set id;
    ``tightness`` a key of :data:`TIGHTNESS`.
    """

    rooms: int = 1
    pieces: int = 10
    shape: str = "rect"
    rules: str = "everyday"
    tightness: str = "loose"
    seed: int = 0

    @property
    def name(self) -> str:
        return (f"r{self.rooms}-p{self.pieces}-{self.shape}-{self.rules}-{self.tightness}"
                f"-s{self.seed}")


@dataclass(frozen=True)
class Instance:
    """A benchmark instance: a name, the plan, tags (``generated``/``sample``, tightness...)
    and the spec it came from (None for a sample plan)."""

    name: str
    plan: Plan
    tags: tuple[str, ...]
    spec: InstanceSpec | None = None


def _rule_set_id(rules: str) -> str:
    return wheelchair_set() if rules == "wheelchair" else rules


def _pick_pieces(uses: list[str], total: int, rng: random.Random) -> list[list[object]]:
    """Piece kinds per room: each room's core list first (round robin), then fillers."""
    catalog = load_catalog()
    queues = [[t for t in _CORE[u] if t in catalog] for u in uses]
    out: list[list[object]] = [[] for _ in uses]
    count = 0
    while count < total:
        progressed = False
        for i, q in enumerate(queues):
            if count >= total:
                break
            if q:
                out[i].append(q.pop(0))
                count += 1
                progressed = True
        if not progressed:
            i = min(range(len(uses)), key=lambda k: (len(out[k]), k))
            out[i].append(_FILLERS[rng.randrange(len(_FILLERS))])
            count += 1
    return out


def floor_demand(plan: Plan, room_id: str) -> float:
    """Floor (mm2) the furniture of ``room_id`` needs: footprints plus use zones, plus the
    room's door approach floor (door width x approach depth) and a turning space's area.

    Zones may overlap one another when placed, so this is a planning figure, not a bound.
    """
    rules = load_ruleset(plan.rules.set, plan.rules.override_map())
    specs = [s for s in resolve_pieces(plan, rules) if room_id in s.rooms]
    area = 0.0
    for s in specs:
        area += s.width * s.depth
        for z in s.zones:
            side = s.width if z.side in ("front", "back") else s.depth
            area += side * z.depth
    doors = [d for d in plan.doors if room_id in d.rooms]
    area += len(doors) * DOOR_WIDTH * _door_depth(rules)
    turn = rules.mm("turning.size")
    area += math.pi * turn * turn / 4
    return area


def _door_depth(rules: RuleSet) -> int:
    return max(rules.mm("door.approach_swing"), rules.mm("door.approach_other"), DOOR_WIDTH)


def _min_side(plan: Plan, room_id: str) -> int:
    """Least room side (mm): the longest piece side plus its zone, or the turning space."""
    rules = load_ruleset(plan.rules.set, plan.rules.override_map())
    need = rules.mm("turning.size") + 200
    for s in resolve_pieces(plan, rules):
        if room_id in s.rooms:
            zone = max((z.depth for z in s.zones), default=0)
            need = max(need, max(s.width, s.depth) + 100, min(s.width, s.depth) + zone + 100)
    return max(need, 2 * DOOR_WIDTH + 400)


def _round50(v: float) -> int:
    return int(round(v / 50.0)) * 50


def _outline(shape: str, x: int, w: int, h: int) -> tuple[tuple[int, int], ...]:
    """Counter-clockwise outline of a room standing on y = 0 from x to x + w."""
    cw, ch = _round50(w * _CUT), _round50(h * _CUT)
    if shape == "L":
        return ((x, 0), (x + w, 0), (x + w, h - ch), (x + w - cw, h - ch), (x + w - cw, h), (x, h))
    if shape == "angled":
        return ((x, 0), (x + w, 0), (x + w, h - ch), (x + w - cw, h), (x, h))
    return ((x, 0), (x + w, 0), (x + w, h), (x, h))


def _cut_area_share(shape: str) -> float:
    return {"rect": 0.0, "L": _CUT * _CUT, "angled": _CUT * _CUT / 2}[shape]


def _pieces_for(kinds: list[list[object]], room_ids: list[str]) -> list[Piece]:
    pieces: list[Piece] = []
    counters: dict[str, int] = {}
    for kinds_in_room, rid in zip(kinds, room_ids, strict=True):
        for k in kinds_in_room:
            if isinstance(k, tuple):
                _, w, d, h, label = k
                base = label.lower().replace(" ", "-")
                counters[base] = counters.get(base, 0) + 1
                pieces.append(Piece(f"{base}-{counters[base]}", "custom", (rid,), label, w, d, h))
            else:
                base = str(k)
                counters[base] = counters.get(base, 0) + 1
                pieces.append(Piece(f"{base}-{counters[base]}", base, (rid,)))
    return pieces


def _routines(pieces: list[Piece], room_ids: list[str]) -> tuple[Trip, ...]:
    """Daily trips (invented, common-practice counts): from the entrance to the first piece of
    each room twice a day, and between the first pieces of neighbouring rooms once a day."""
    anchors = [next(p.id for p in pieces if p.rooms[0] == rid) for rid in room_ids
               if any(p.rooms[0] == rid for p in pieces)]
    trips = [Trip("entrance", a, 2.0, f"Entrance to {a}") for a in anchors]
    trips += [Trip(a, b, 1.0, f"{a} to {b}") for a, b in zip(anchors, anchors[1:], strict=False)]
    return tuple(trips)


def generate(spec: InstanceSpec) -> Plan:
    """The plan for ``spec``; deterministic for a given spec (and bundled catalogue)."""
    if not 1 <= spec.rooms <= 8:
        raise ValueError(f"rooms must be 1 to 8, found {spec.rooms}")
    if not spec.rooms <= spec.pieces <= 60:
        raise ValueError(f"pieces must be {spec.rooms} to 60, found {spec.pieces}")
    if spec.tightness not in TIGHTNESS:
        raise ValueError(f"tightness must be one of {', '.join(TIGHTNESS)}")
    # tight and loose variants of one seed share their furniture, shapes and doors
    rng = random.Random(f"roomfit-bench/{spec.rooms}/{spec.pieces}/{spec.shape}/{spec.rules}"
                        f"/{spec.seed}")
    uses = ["studio"] if spec.rooms == 1 else list(_USES[: spec.rooms])
    shapes = [spec.shape if spec.shape != "mixed" else rng.choice(SHAPES) for _ in uses]
    room_ids = [f"{u}-{i + 1}" for i, u in enumerate(uses)]
    rule_id = _rule_set_id(spec.rules)
    pieces = _pieces_for(_pick_pieces(uses, spec.pieces, rng), room_ids)

    # First pass: rooms of unit size, to measure what each room's furniture needs.
    unit = tuple(Room(rid, rid, "living", ((0, 0), (1, 0), (1, 1), (0, 1))) for rid in room_ids)
    probe = Plan("probe", unit, furniture=tuple(pieces), rules=RuleChoice(rule_id))
    share = TIGHTNESS[spec.tightness]
    door_depth = _door_depth(load_ruleset(rule_id))
    rooms: list[Room] = []
    x = 0
    for rid, use, shape in zip(room_ids, uses, shapes, strict=True):
        n_doors = (rid == room_ids[0]) + (rid != room_ids[0]) + (rid != room_ids[-1])
        area = (floor_demand(probe, rid) + n_doors * DOOR_WIDTH * door_depth) / share
        area /= 1.0 - _cut_area_share(shape)
        aspect = rng.uniform(1.0, 1.5)
        lo = _min_side(probe, rid) / (1.0 - _CUT if shape != "rect" else 1.0)
        if spec.tightness == "impossible":
            lo = _min_side(probe, rid)
        w = max(_round50(math.sqrt(area * aspect)), _round50(lo))
        h = max(_round50(area / w), _round50(lo))
        if spec.tightness == "impossible":
            w = h = _round50(max(lo, math.sqrt(area)))
        label = {"studio": "Living and sleeping", "living": "Living room", "bedroom": "Bedroom",
                 "kitchen": "Kitchen and dining", "study": "Study"}[use]
        rooms.append(Room(rid, label, "living" if use == "studio" else use, _outline(shape, x, w, h)))
        x += w

    doors: list[Door] = []
    first = rooms[0]
    fx0, fx1 = first.outline[0][0], first.outline[1][0]
    doors.append(Door("d-entrance", (first.id, OUTSIDE), (fx0 + (fx1 - fx0) // 2, 0), DOOR_WIDTH,
                      Leaf.HINGED, first.id, rng.choice(("left", "right"))))
    for a, b in zip(rooms, rooms[1:], strict=False):
        wall_x = a.outline[1][0]
        doors.append(Door(f"d-{a.id}-{b.id}", (a.id, b.id), (wall_x, 150 + DOOR_WIDTH // 2),
                          DOOR_WIDTH, Leaf.HINGED, b.id, rng.choice(("left", "right"))))
    windows: list[Window] = []
    for r in rooms:
        # the north wall runs from the last vertex back along y = h
        (nx1, ny), (nx0, _) = r.outline[-2], r.outline[-1]
        span = nx1 - nx0
        width = min(1200, _round50(span * 0.5))
        windows.append(Window(f"w-{r.id}", r.id, (nx0 + span // 2, ny), width, 900))
    return Plan(
        name=f"Benchmark flat {spec.name}",
        routines=_routines(pieces, room_ids),
        rooms=tuple(rooms),
        doors=tuple(doors),
        windows=tuple(windows),
        furniture=tuple(pieces),
        rules=RuleChoice(rule_id),
        notes="Generated benchmark instance (invented).",
    )


def sample_instances(folder: str | Path) -> list[Instance]:
    """The bundled sample plans as instances, as read (the solver moves unlocked pieces; the
    as-is placements serve the audit timing)."""
    out = []
    for path in sorted(Path(folder).glob("*.toml")):
        plan = read_plan(path)
        out.append(Instance(f"sample:{path.stem}", plan, ("sample", plan.rules.set)))
    return out
