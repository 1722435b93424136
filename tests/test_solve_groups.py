"""The solver meets the functional-group rules, judged by the layout-quality audit (which
does not trust the solver: it measures the returned geometry with shapely)."""

from __future__ import annotations

from roomfit.audit.check import audit
from roomfit.audit.quality import Kind, quality
from roomfit.plan.data import Door, Leaf, Piece, Plan, Room
from roomfit.rules.sets import rules_for
from roomfit.solve.search import SolveOptions, solve


def _first(width: int, height: int, pieces: list[tuple[str, str]]) -> tuple[Plan, list]:
    room = Room("r", "Room", "bedroom", ((0, 0), (width, 0), (width, height), (0, height)))
    door = Door("d", ("r", "outside"), (width // 2, 0), 900, Leaf.SLIDING)
    plan = Plan("groups", (room,), doors=(door,),
                furniture=tuple(Piece(pid, t, ("r",)) for pid, t in pieces))
    rules = rules_for(plan)
    result = solve(plan, rules, SolveOptions(candidates=1, time_limit=20.0, seed=0, workers=1))
    assert result.candidates, result.status
    done = plan.with_layout(result.candidates[0].layout)
    assert audit(done, rules).passed
    return done, [c for c in quality(done, rules) if c.kind == Kind.GROUP]


def test_single_bed_nightstand_on_the_side_it_is_used_from() -> None:
    # a single bed is used from its left side (its one bed_side zone): the nightstand must
    # touch the head half of that side, not the side turned to the wall
    _, checks = _first(3600, 4000, [("bed", "bed-single-90"), ("ns", "nightstand"),
                                    ("wardrobe", "wardrobe-hinged")])
    side = [c for c in checks if c.rule == "group.bedside"]
    assert side and all(c.ok for c in side), [c.text for c in side]
    assert "(left side)" in side[0].label
    assert all(c.ok for c in checks), [c.text for c in checks if not c.ok]


def test_sofa_and_armchair_form_a_conversation_group() -> None:
    _, checks = _first(5000, 4500, [("sofa", "sofa-3"), ("tv", "tv-unit"),
                                    ("chair", "armchair"), ("coffee", "coffee-table")])
    talk = [c for c in checks if c.rule.startswith("group.talk")]
    assert len(talk) == 4  # distance and turn, for each of the two seats
    assert all(c.ok for c in checks), [c.text for c in checks if not c.ok]
