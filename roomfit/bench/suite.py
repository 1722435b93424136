"""What the main benchmark runs: its configuration, targets and suite of instances."""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from roomfit.bench.instances import Instance, InstanceSpec, generate, sample_instances

__all__ = ["BenchConfig", "TARGETS", "PLANS", "DOCS", "suite"]

#: Speed and quality targets (seconds) from the solver and benchmark issues.
TARGETS = {
    "first_valid_1room_10": 0.5,   # median time to the first valid arrangement
    "three_rooms_25_3cand": 10.0,  # time to three candidates
    "impossible_explained": 3.0,   # time to a proven-impossible answer with its explanation
}

PLANS = Path(__file__).resolve().parent.parent.parent / "plans"
DOCS = Path(__file__).resolve().parent.parent.parent / "docs"


@dataclass(frozen=True)
class BenchConfig:
    """What to run: ``quick`` suite or the full one, master ``seed`` (added to every
    instance seed and to the solver's and baseline's seeds), ``time_budget`` in seconds per
    instance for the solver and for the baseline alike (the three-room target instances give
    the solver at least 12 s so the 10 s target can be met), ``only`` one part, and the
    number of ``candidates``. ``instances``, when given, replaces the generated suite (each
    is tagged ``scaling``, and the sections after the suite are skipped); ``samples`` adds the
    sample plans; ``previous_tree`` is another roomfit checkout whose solver also runs the
    certified corpus."""

    quick: bool = True
    seed: int = 0
    time_budget: float = 4.0
    only: str | None = None
    candidates: int = 3
    samples: bool = True
    instances: tuple[InstanceSpec, ...] | None = None
    previous_tree: Path | None = None


def _gen(spec: InstanceSpec, *tags: str) -> Instance:
    return Instance(spec.name, generate(spec), ("generated", spec.tightness, spec.rules, *tags), spec)


def suite(config: BenchConfig) -> list[Instance]:
    """The instances to run, each tagged with what it measures:

    ``first-valid`` (one room, 10 pieces), ``three-rooms`` (25 pieces, 3 candidates),
    ``impossible``, ``tight``/``loose`` (the baseline comparison), ``scaling``, ``sample``.
    The quick suite runs no baseline on the sample plans (time), the full one does.
    """
    s = config.seed
    if config.instances is not None:
        own = [_gen(spec, "scaling") for spec in config.instances]
        return own + (sample_instances(PLANS) if config.samples else [])
    out: dict[str, Instance] = {}

    def add(inst: Instance) -> None:
        if inst.name in out:  # merge tags of an instance asked for twice
            old = out[inst.name]
            inst = Instance(old.name, old.plan, tuple(dict.fromkeys(old.tags + inst.tags)), old.spec)
        out[inst.name] = inst

    n_first = 3 if config.quick else 5
    for k in range(n_first):
        add(_gen(InstanceSpec(1, 10, "rect", "everyday", "loose", s + k), "first-valid"))
    n_three = 1 if config.quick else 3
    for k in range(n_three):
        add(_gen(InstanceSpec(3, 25, "mixed", "everyday", "loose", s + k), "three-rooms"))
    add(_gen(InstanceSpec(1, 5, "rect", "everyday", "impossible", s), "impossible"))
    if config.quick:
        add(_gen(InstanceSpec(1, 10, "rect", "everyday", "tight", s), "compare"))
        add(_gen(InstanceSpec(2, 12, "L", "wheelchair", "tight", s), "compare"))
        scaling = [(1, 4), (1, 10), (3, 25)]
    else:
        add(_gen(InstanceSpec(1, 6, "angled", "wheelchair", "impossible", s), "impossible"))
        for k in range(3):
            add(_gen(InstanceSpec(1, 10, "rect", "wheelchair", "loose", s + k), "first-valid"))
        for k in range(5):
            add(_gen(InstanceSpec(1, 10, "rect", "everyday", "tight", s + k), "compare"))
            add(_gen(InstanceSpec(2, 12, "mixed", "wheelchair", "tight", s + k), "compare"))
            add(_gen(InstanceSpec(2, 12, "mixed", "wheelchair", "loose", s + k), "compare"))
        add(_gen(InstanceSpec(3, 25, "mixed", "everyday", "tight", s), "compare"))
        add(_gen(InstanceSpec(3, 25, "mixed", "wheelchair", "loose", s), "three-rooms"))
        scaling = [(1, 4), (1, 10), (2, 16), (3, 25), (4, 32), (5, 40), (6, 48), (8, 60)]
    for rooms, pieces in scaling:
        add(_gen(InstanceSpec(rooms, pieces, "mixed" if rooms > 1 else "rect", "everyday", "loose", s),
                 "scaling"))
    insts = list(out.values())
    if config.samples:
        insts += sample_instances(PLANS)
    return insts

