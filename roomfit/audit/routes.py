"""Walking routes through an arrangement, and the daily routine's walking cost.

Whether a trip can be made at all is the walkway engine's verdict
(:mod:`roomfit.audit.walkway`, the same one the audit's ``route.trip`` gives): a person of
the rule set's ``route.width`` is a disc; its centre may go where the free floor shrunk by
the radius (round joins) reaches, and doorways join the parts of two rooms. The shortest
route inside those parts is found on a visibility graph (:mod:`roomfit.audit.visibility`;
``docs/routes.md`` says why we chose it over a grid) and measured here: its length, turns,
doorways and its narrowest width (by chords, :mod:`roomfit.audit.passage`, never more than
the width of a doorway it passes).

Places a trip can start or end at: ``"entrance"``, a door id, a room id, a fitting id (its
zone, else beside it), a piece id (each of its use zones: the trip takes the nearest one;
without zones, beside it), or a plan point; where in them a route ends is the one rule of
:mod:`roomfit.audit.places`. A use zone is served as the audit serves it (one full side
adjoins the walkway, or another clear zone that does). Where the rule set allows a short
stretch at ``route.pinch_width``, a trip with no way at the full width is routed through
the pinch walkway and flagged.

Worked example, checked by hand: in an empty 4000 x 3000 mm room, the route from
(1000, 1000) to (3000, 2000) is the straight line, sqrt(2000**2 + 1000**2) = 2236.1 mm.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

from shapely import LineString, Point

from roomfit.audit.circulation import trip_finding
from roomfit.audit.marks import Path
from roomfit.audit.passage import SAMPLE_STEP_MM, WIDTH_CAP_MM, Passages, between, doors_passed
from roomfit.audit.passage import narrowest as _narrowest
from roomfit.audit.passage import passages as _passages
from roomfit.audit.pinch import pinch_walkway
from roomfit.audit.places import Target, place_target
from roomfit.audit.routines import default_routines, routines_for
from roomfit.audit.visibility import MAX_CORNERS, Space, build_space, path_length, route_in
from roomfit.audit.walkway import Floor, floor_of, room_at, walkway
from roomfit.plan.data import Plan, Trip
from roomfit.rules.sets import RuleSet

__all__ = [
    "NIGHT_LONG_MM",
    "SAMPLE_STEP_MM",
    "WIDTH_CAP_MM",
    "TURN_DEGREES",
    "MAX_CORNERS",
    "TripScore",
    "RouteScores",
    "default_routines",
    "routines_for",
    "route",
    "score_routes",
    "scoring_detail",
]

#: A night route longer than this (mm) is flagged. Common practice: 10 m.
NIGHT_LONG_MM = 10_000

#: A change of direction by more than this many degrees counts as a turn.
TURN_DEGREES = 30


_MERGE = 5.0        # mm: path points closer than this are merged before counting turns
_BEND = 100.0       # mm: a route is simplified to within this before counting turns, so a
                    # bend round the arc of a corner counts once

XY = tuple[float, float]


@dataclass(frozen=True)
class TripScore:
    """One trip's route.

    ``length_mm``: walking length (None when unreachable); ``points``: the route from origin
    to target; ``narrowest_mm``/``narrowest_at``: least clear width (chords) along the part of
    the route that is walked or wheeled on the walkway, and where, never more than a doorway
    passed (the last step into a clear floor space is arriving, judged at the space's own
    size, so a trip the audit passes at the route width reports no narrower figure except at
    a doorway); ``narrowest_between``: ids of the blockers on either side
    (``"wall"`` for a wall); ``turns``: changes of direction over :data:`TURN_DEGREES`;
    ``doors``: doorways passed, in order; ``reason``: why it is unreachable; ``flags``:
    plain sentences for a long or narrow night route.
    """

    origin: str
    target: str
    label: str
    per_day: float
    night: bool
    reachable: bool
    length_mm: float | None = None
    points: tuple[XY, ...] = ()
    narrowest_mm: float | None = None
    narrowest_at: XY | None = None
    narrowest_between: tuple[str, ...] = ()
    turns: int = 0
    doors: tuple[str, ...] = ()
    reason: str = ""
    flags: tuple[str, ...] = ()

    @property
    def metres_per_day(self) -> float:
        """Walking metres a day on this trip: ``per_day * length`` (0 when unreachable)."""
        return self.per_day * self.length_mm / 1000 if self.length_mm is not None else 0.0

    @property
    def name(self) -> str:
        return self.label or f"{self.origin} to {self.target}"


@dataclass(frozen=True)
class RouteScores:
    """The routine's routes for one arrangement.

    ``walking_m_per_day`` sums ``per_day * length`` over the reachable trips (the single
    scalar a solver minimises; rank first by ``len(unreachable)``). ``narrowest_mm`` is the
    least width on any reachable routine route. ``defaults`` is True when the plan had no
    routine and :func:`default_routines` stood in.
    """

    trips: tuple[TripScore, ...]
    route_width: int
    walking_m_per_day: float
    narrowest_mm: float | None
    narrowest_at: XY | None
    narrowest_trip: str | None
    flags: tuple[str, ...]
    defaults: bool = False

    @property
    def unreachable(self) -> tuple[TripScore, ...]:
        return tuple(t for t in self.trips if not t.reachable)

    @property
    def rank_key(self) -> tuple[int, float]:
        """Sort key for ranking arrangements: fewer unreachable trips, then fewer metres."""
        return (len(self.unreachable), self.walking_m_per_day)

    def paths(self) -> tuple:
        """The reachable routes as ``roomfit.audit.marks.Path`` objects for drawing."""

        return tuple(Path(t.name, t.points, t.night) for t in self.trips if t.reachable)


def _turns(points: Sequence[XY]) -> int:
    """Changes of heading by more than :data:`TURN_DEGREES` along the route, simplified to
    within :data:`_BEND` first (Douglas-Peucker)."""
    if len(points) > 2:
        points = [(float(c[0]), float(c[1])) for c in LineString(points).simplify(_BEND).coords]
    pts: list[XY] = []
    for p in points:
        if not pts or math.dist(pts[-1], p) > _MERGE:
            pts.append(p)
    count = 0
    for a, b, c in zip(pts, pts[1:], pts[2:], strict=False):
        h0 = math.atan2(b[1] - a[1], b[0] - a[0])
        h1 = math.atan2(c[1] - b[1], c[0] - b[0])
        turn = abs((h1 - h0 + math.pi) % (2 * math.pi) - math.pi)
        count += math.degrees(turn) > TURN_DEGREES
    return count


def _targets_of(floor: Floor, place: str | XY) -> list[Target]:
    if isinstance(place, str):
        return place_target(floor, place)
    p = Point(float(place[0]), float(place[1]))
    room = room_at(floor, p)
    return [Target(f"point {_name(place)}", room, p, 0.0, ())] if room else []


@dataclass
class _Scorer:
    """The walkways of one arrangement, built when first asked for."""

    floor: Floor
    passages: Passages
    spaces: dict[str, Space] = field(default_factory=dict)

    def space(self, which: str) -> Space | None:
        if which not in self.spaces:
            if which == "full":
                st = walkway(self.floor, self.floor.rules.get("route.width").exact_mm)
            else:
                narrow = pinch_walkway(self.floor)
                if narrow is None:
                    return None
                st = narrow[0]
            self.spaces[which] = build_space(self.floor, st)
        return self.spaces[which]


def _trip(sc: _Scorer, trip: Trip, origin: str | XY, target: str | XY) -> TripScore:
    base: dict[str, Any] = {"origin": trip.origin, "target": trip.target, "label": trip.label,
                            "per_day": trip.per_day, "night": trip.night}
    name = trip.label or f"{trip.origin} to {trip.target}"
    a, b = _targets_of(sc.floor, origin), _targets_of(sc.floor, target)
    space = sc.space("full")
    assert space is not None
    route_width = space.width
    way = route_in(space, a, b) if a and b else None
    flags: list[str] = []
    if way is None:
        narrow = sc.space("pinch") if a and b else None
        way = route_in(narrow, a, b) if narrow is not None else None
        if way is None or narrow is None:
            why = _why(sc.floor, trip, origin, target, a, b)
            night = (f"night route {name}: unreachable ({why})",) if trip.night else ()
            return TripScore(**base, reachable=False, reason=why, flags=night)
        flags.append(f"{name}: only passable through narrow stretches of at least "
                     f"{narrow.width:.0f} mm, as long as the rule set allows")
    points = list(way.points)
    doors = doors_passed(sc.passages, points)
    door = min(((float(dw), c, did) for did, dw, c in doors), default=None)
    width, where = _narrowest(sc.passages, way.walked, door[:2] if door else None)
    length = path_length(points)
    if trip.night and length > NIGHT_LONG_MM:
        flags.append(f"night route {name}: {length / 1000:.1f} m, longer than "
                     f"{NIGHT_LONG_MM / 1000:.0f} m (common practice)")
    if trip.night and width < route_width - 1:
        at = (f" at door {door[2]} (a doorway is judged by door.width)"
              if door is not None and (width, where) == door[:2] else "")
        flags.append(f"night route {name}: narrows to {width:.0f} mm{at}, under the "
                     f"{route_width:.0f} mm route width")
    return TripScore(
        **base, reachable=True, length_mm=length, points=tuple(points),
        narrowest_mm=width, narrowest_at=where, narrowest_between=between(sc.passages, where),
        turns=_turns(points), doors=tuple(d for d, _, _ in doors), flags=tuple(flags),
    )


def _why(floor: Floor, trip: Trip, origin: str | XY, target: str | XY, a: list[Target],
         b: list[Target]) -> str:
    """Plain words for a trip that cannot be made: the audit's own ``route.trip`` wording."""
    if not a or not b:
        missing = origin if not a else target
        if isinstance(missing, str) and missing == "entrance":
            return "the plan has no entrance door"
        if isinstance(missing, str) and any(p.id == missing for p in floor.plan.furniture):
            return f"piece {missing!r} has no placement"
        return f"no place named {missing!r} in the plan"
    found = trip_finding(floor, Trip(_name(origin), _name(target), trip.per_day, trip.label,
                                     trip.night), floor.rules.get("route.width").exact_mm, a, b)
    return found.message.split(": ", 1)[-1]


def route(plan: Plan, rules: RuleSet, origin: str | XY, target: str | XY,
          width: float | None = None) -> TripScore:
    """The shortest route between two places (names or plan points) of the as-is layout.

    ``width`` is the body width (mm), by default the rule set's ``route.width``.

    >>> from roomfit.plan.data import Room, Plan
    >>> from roomfit.rules.sets import load_ruleset
    >>> plan = Plan("empty", (Room("r", "R", "living", ((0, 0), (4000, 0), (4000, 3000), (0, 3000))),))
    >>> round(route(plan, load_ruleset("everyday"), (1000, 1000), (3000, 2000)).length_mm, 1)
    2236.1
    """
    floor = floor_of(plan, rules)
    sc = _Scorer(floor, _passages(floor))
    if width is not None and not math.isclose(width, rules.get("route.width").exact_mm):
        st = walkway(floor, float(width))
        sc.spaces["full"] = build_space(floor, st)
    return _trip(sc, Trip(_name(origin), _name(target), 1.0), origin, target)


def _name(place: str | XY) -> str:
    return place if isinstance(place, str) else f"({place[0]:.0f}, {place[1]:.0f})"


def scoring_detail(plan: Plan, rules: RuleSet) -> dict[str, float]:
    """What route scoring builds for ``plan`` (for the benchmark): walkway parts, graph
    nodes and edges, the most reflex corners in one part and the simplification tolerance
    used (mm, 0 when none)."""
    floor = floor_of(plan, rules)
    sc = _Scorer(floor, _passages(floor))
    space = sc.space("full")
    assert space is not None
    return {"parts": float(len(space.st.comps)), "nodes": float(space.graph.number_of_nodes()),
            "edges": float(space.graph.number_of_edges()),
            "simplified_mm": max(space.simplified, floor.simplified_mm)}


def score_routes(plan: Plan, rules: RuleSet) -> RouteScores:
    """Route every routine trip of ``plan``'s as-is layout and total the walking.

    Pieces without a placement are not on the floor; a trip to one is unreachable.
    """
    floor = floor_of(plan, rules)
    sc = _Scorer(floor, _passages(floor))
    trips, defaults = routines_for(plan)
    scored = tuple(_trip(sc, t, t.origin, t.target) for t in trips)
    reach = [t for t in scored if t.reachable]
    narrow = min(reach, key=lambda t: t.narrowest_mm or 0.0, default=None)
    flags = tuple(f for t in scored for f in t.flags)
    return RouteScores(
        trips=scored,
        route_width=rules.mm("route.width"),
        walking_m_per_day=sum(t.metres_per_day for t in reach),
        narrowest_mm=narrow.narrowest_mm if narrow else None,
        narrowest_at=narrow.narrowest_at if narrow else None,
        narrowest_trip=narrow.name if narrow else None,
        flags=flags,
        defaults=defaults,
    )
