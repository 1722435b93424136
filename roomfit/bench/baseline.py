"""The baseline: a simulated-annealing furniture placer in the manner of Yu et al. (2011).

Yu et al. optimise a cost over object positions and orientations with a Markov chain Monte
Carlo search (Metropolis acceptance under a falling temperature): moves translate or rotate
one object or swap two; the cost adds up *accessibility* (the floor an object is used from
stays free), *visibility* (what must be seen is not blocked), *pathway* (doors stay joined by
walkable floor) and *pairwise* relations (a nightstand beside the bed, a sofa facing the TV),
plus prior terms such as standing against a wall. Each term adapted to our rule sets lives
in :mod:`roomfit.bench.baseline_cost`; this module is the search.

Moves: translate, rotate, swap two pieces of a room, snap to a wall (back flush with a random
axis-aligned wall), and change room for pieces allowed in several. The search knows nothing
of the checker; a caller may pass a ``judge`` (the checker) that is asked about states whose
hard cost is zero, to learn when the first valid arrangement appeared.

References: Lap-Fai Yu, Sai-Kit Yeung, Chi-Keung Tang, Demetri Terzopoulos, Tony F. Chan and
Stanley J. Osher, "Make it Home: Automatic Optimization of Furniture Arrangement", ACM
Transactions on Graphics 30(4), article 86, 2011. Metropolis et al., "Equation of State
Calculations by Fast Computing Machines", J. Chem. Phys. 21, 1953.
"""

from __future__ import annotations

import math
import random
import time
from collections.abc import Callable
from dataclasses import dataclass, field

from roomfit.audit.geometry import turned_size
from roomfit.bench.baseline_cost import WEIGHTS, RoomFrame, State, layout_cost
from roomfit.plan.data import Layout, Placement, Plan
from roomfit.rules.catalog import PieceSpec, resolve_pieces
from roomfit.rules.sets import RuleSet

__all__ = ["AnnealOptions", "AnnealResult", "anneal", "layout_cost", "WEIGHTS"]

_CYCLE_MOVES = 4000  # moves per cooling cycle when the search is bounded by moves


@dataclass(frozen=True)
class AnnealOptions:
    """Time budget (s), seed, and the temperature schedule (cost units): each cycle cools
    geometrically from ``t_start`` to ``t_end`` over ``cycle`` seconds, then restarts from
    the best state found. ``max_iterations`` stops the search after that many moves and
    makes the schedule count moves instead of seconds, so a seed gives the same result on any
    machine (the time limit still applies). ``stop_when_valid`` ends the search at the first
    state the judge accepts (for a time-to-first-valid race)."""

    time_limit: float = 10.0
    seed: int = 0
    t_start: float = 2.0
    t_end: float = 0.002
    cycle: float = 3.0
    judge_interval: float = 0.05
    max_iterations: int | None = None
    stop_when_valid: bool = False


@dataclass(frozen=True)
class AnnealResult:
    """What the search returns.

    ``layout``: the best arrangement the judge accepted, if it accepted any, else the state of
    lowest cost. ``judged_valid``: what the judge said of ``layout`` (None without a judge;
    callers should judge it again themselves). ``time_to_valid``: seconds to the first state
    the judge accepted. ``trace``: (seconds, best cost) each time the best cost fell.
    """

    layout: Layout
    cost: float
    hard: float
    soft: float
    judged_valid: bool | None
    time_to_valid: float | None
    iterations: int
    accepted: int
    judged: int
    elapsed: float
    trace: tuple[tuple[float, float], ...]



# -- moves ---------------------------------------------------------------------------------

def _random_placement(room: RoomFrame, spec: PieceSpec, rng: random.Random) -> Placement:
    rot = rng.choice((0, 90, 180, 270))
    w, d = turned_size(spec.width, spec.depth, rot)
    x0, y0, x1, y1 = room.bounds
    x = rng.randint(int(x0), max(int(x0), int(x1 - w)))
    y = rng.randint(int(y0), max(int(y0), int(y1 - d)))
    return Placement(x, y, rot, room.id)


def _snap(room: RoomFrame, spec: PieceSpec, rng: random.Random) -> Placement | None:
    """Back flush against a random axis-aligned wall, at a random spot along it."""
    if not room.walls:
        return None
    a, b, (nx, ny) = rng.choice(room.walls)
    rot = {(0, -1): 0, (1, 0): 90, (0, 1): 180, (-1, 0): 270}[(nx, ny)]
    w, d = turned_size(spec.width, spec.depth, rot)
    if ny != 0:
        lo, hi = min(a[0], b[0]), max(a[0], b[0]) - w
        if hi < lo:
            return None
        x = rng.randint(int(lo), int(hi))
        y = int(a[1]) if ny < 0 else int(a[1] - d)
    else:
        lo, hi = min(a[1], b[1]), max(a[1], b[1]) - d
        if hi < lo:
            return None
        y = rng.randint(int(lo), int(hi))
        x = int(a[0]) if nx < 0 else int(a[0] - w)
    return Placement(x, y, rot, room.id)


def _swap(st: State, movable: list[int], i: int, rng: random.Random) -> list[int] | None:
    """Piece ``i`` and a random other piece of its room change places (centre for centre)."""
    pl, spec = st.place[i], st.specs[i]
    mates = [j for j in movable if j != i and st.place[j].room == pl.room]
    if not mates:
        return None
    j = rng.choice(mates)
    (ax, ay), (bx, by) = st.centre(i), st.centre(j)
    pj = st.place[j]
    wi, di = turned_size(spec.width, spec.depth, pl.rotation)
    wj, dj = turned_size(st.specs[j].width, st.specs[j].depth, pj.rotation)
    st.place[i] = Placement(int(bx - wi / 2), int(by - di / 2), pl.rotation, pl.room)
    st.place[j] = Placement(int(ax - wj / 2), int(ay - dj / 2), pj.rotation, pj.room)
    return [i, j]


def _propose(st: State, plan: Plan, movable: list[int], heat: float,
             rng: random.Random) -> list[int] | None:
    """Move one random piece in place (translate 50 %, rotate 15 %, swap 10 %, snap to a wall
    20 %, change room 5 %); ``heat`` is the temperature over the starting one. The pieces
    moved, or None when the move drawn does not apply."""
    i = rng.choice(movable)
    spec, pl = st.specs[i], st.place[i]
    kind = rng.random()
    if kind < 0.5:
        step = max(20.0, 1500.0 * math.sqrt(heat))
        st.place[i] = Placement(int(pl.x + rng.gauss(0, step)), int(pl.y + rng.gauss(0, step)),
                                pl.rotation, pl.room)
    elif kind < 0.65:
        rot = rng.choice((0, 90, 180, 270))
        w0, d0 = turned_size(spec.width, spec.depth, pl.rotation)
        w1, d1 = turned_size(spec.width, spec.depth, rot)
        st.place[i] = Placement(int(pl.x + (w0 - w1) / 2), int(pl.y + (d0 - d1) / 2), rot, pl.room)
    elif kind < 0.75:
        return _swap(st, movable, i, rng)
    elif kind < 0.95:
        snapped = _snap(st.rooms[pl.room], spec, rng)
        if snapped is None:
            return None
        st.place[i] = snapped
    else:
        rid = rng.choice(plan.furniture[i].rooms)
        st.place[i] = _random_placement(st.rooms[rid], spec, rng)
    return [i]


def _metropolis(st: State, saved: list[Placement], touched: list[int], temp: float,
                rng: random.Random) -> bool:
    """Cost the move just made and accept it by the Metropolis rule (delta <= -T ln u), or
    put everything back. The pathway term can fall at most to zero, so a move whose other
    terms already exceed the threshold is rejected before its pathway grid is computed."""
    old_cost = st.cost
    rooms_touched = {saved[k].room for k in touched} | {st.place[k].room for k in touched}
    old_unary = [st.unary[k] for k in touched]
    old_rows = st.pair[touched].copy()
    old_path = {r: st.path[r] for r in rooms_touched}
    old_soft = st.soft
    for k in touched:
        st.unary[k] = st.unary_cost(k)
        for m in range(st.n):
            if m != k:
                st.pair[k, m] = st.pair[m, k] = st.pair_cost(k, m)
    st.soft = st.relation_cost()
    threshold = -temp * math.log(1.0 - rng.random())
    accept = st.cost - old_cost - sum(old_path.values()) <= threshold
    if accept:
        for r in rooms_touched:
            st.path[r] = st.room_path(r)
        accept = st.cost - old_cost <= threshold
    if not accept:
        st.place = saved
        for k, u in zip(touched, old_unary, strict=True):
            st.unary[k] = u
        for row, k in enumerate(touched):
            st.pair[k, :] = old_rows[row]
            st.pair[:, k] = old_rows[row]
        st.path.update(old_path)
        st.soft = old_soft
    return accept


# -- the search ----------------------------------------------------------------------------

@dataclass
class _Search:
    """The bookkeeping of one run: best state, best judged-valid state, counters, clock."""

    st: State
    opt: AnnealOptions
    judge: Callable[[Layout], bool] | None
    progress: Callable[[str], None] | None
    start: float = field(default_factory=time.perf_counter)
    best: tuple[float, list[Placement]] = (math.inf, [])
    valid_best: tuple[float, list[Placement]] | None = None
    time_to_valid: float | None = None
    trace: list[tuple[float, float]] = field(default_factory=list)
    seen: set[tuple[Placement, ...]] = field(default_factory=set)
    judged: int = 0
    last_judge: float = -1.0
    it: int = 0
    acc: int = 0
    cycle_start: float = 0.0

    def temperature(self, now: float) -> float:
        """The temperature of this move; at the end of a cycle, reheat from the best state."""
        opt, by_moves = self.opt, self.opt.max_iterations is not None
        if by_moves:  # a schedule by moves, reproducible
            frac = min(1.0, (self.it - self.cycle_start) / _CYCLE_MOVES)
        else:
            frac = min(1.0, (now - self.cycle_start) / max(opt.cycle, 1e-6))
        if frac >= 1.0:
            self.cycle_start = self.it if by_moves else now
            self.st.place = list(self.best[1])
            self.st.full()
            frac = 0.0
        return opt.t_start * (opt.t_end / opt.t_start) ** frac

    def ask_judge(self, now: float) -> bool:
        """Put a state with no hard cost to the judge (at most every ``judge_interval``
        seconds, each state once, only when its soft cost beats the best valid one); True
        when the search may stop (a valid state with nothing left to improve)."""
        st, opt = self.st, self.opt
        if self.judge is None or st.hard >= 1e-9 or now - self.last_judge < opt.judge_interval:
            return False
        key = tuple(st.place)
        if key in self.seen or (self.valid_best is not None and st.soft >= self.valid_best[0] - 1e-9):
            return False
        self.seen.add(key)
        self.judged += 1
        self.last_judge = now
        if not self.judge(st.layout()):
            return False
        if self.time_to_valid is None:
            self.time_to_valid = time.perf_counter() - self.start
            if self.progress:
                self.progress(f"baseline: first valid arrangement after {self.time_to_valid:.2f} s")
        self.valid_best = (st.soft, list(st.place))
        return st.soft < 1e-9 or opt.stop_when_valid

    def result(self) -> AnnealResult:
        """Settle on the best valid state (else the cheapest) and report."""
        elapsed = time.perf_counter() - self.start
        st = self.st
        st.place = self.valid_best[1] if self.valid_best is not None else self.best[1]
        st.full()
        return AnnealResult(
            layout=st.layout(), cost=st.cost, hard=st.hard, soft=st.soft,
            judged_valid=(self.valid_best is not None) if self.judge is not None else None,
            time_to_valid=self.time_to_valid, iterations=self.it, accepted=self.acc,
            judged=self.judged, elapsed=elapsed, trace=tuple(self.trace))


def anneal(
    plan: Plan,
    rules: RuleSet,
    options: AnnealOptions | None = None,
    judge: Callable[[Layout], bool] | None = None,
    progress: Callable[[str], None] | None = None,
) -> AnnealResult:
    """Search an arrangement of ``plan``'s unlocked pieces by simulated annealing.

    Locked pieces stay where the plan puts them. Runs for ``options.time_limit`` seconds;
    the search stops early only once the judge has accepted a state with no soft cost left
    (or any state, with ``stop_when_valid``).
    """
    opt = options or AnnealOptions()
    rng = random.Random(opt.seed)
    specs = resolve_pieces(plan, rules)
    st = State(plan, rules, specs)
    movable = []
    for i, p in enumerate(plan.furniture):
        if p.locked and p.placement is not None:
            st.place[i] = p.placement
        else:
            st.place[i] = _random_placement(st.rooms[p.rooms[0]], specs[i], rng)
            movable.append(i)
    st.full()
    if not movable:
        opt = AnnealOptions(time_limit=0.0, max_iterations=0)
    run = _Search(st, opt, judge, progress)
    run.best = (st.cost, list(st.place))
    run.trace.append((0.0, st.cost))
    while True:
        now = time.perf_counter() - run.start
        if now >= opt.time_limit or (opt.max_iterations is not None and run.it >= opt.max_iterations):
            break
        temp = run.temperature(now)
        run.it += 1
        saved = list(st.place)
        touched = _propose(st, plan, movable, temp / opt.t_start, rng)
        if touched is None or not _metropolis(st, saved, touched, temp, rng):
            continue
        run.acc += 1
        if st.cost < run.best[0] - 1e-12:
            run.best = (st.cost, list(st.place))
            run.trace.append((now, st.cost))
        if run.ask_judge(now):
            break
    return run.result()
