"""What a client notices: main-piece spots, the one-line idea, visible changes and the
moving list (worked examples computed by hand)."""

from __future__ import annotations

from dataclasses import replace

from roomfit.audit.ideas import compass_part, describe, moves, spots, visible_changes
from roomfit.plan.data import Piece, Placement, Plan, Room, Window
from roomfit.rules.sets import rules_for

ROOM = Room("r", "Bedroom", "bedroom", ((0, 0), (6000, 0), (6000, 4500), (0, 4500)))
STUDY = Room("s", "Study", "study", ((6100, 0), (9100, 0), (9100, 4500), (6100, 4500)))


def _plan(*pieces: Piece) -> Plan:
    return Plan("ideas", (ROOM, STUDY), windows=(Window("w", "s", (9100, 2000), 1200, 900),),
                furniture=pieces)


BED = Piece("bed", "bed-double-160", ("r",), placement=Placement(0, 1000, 270, "r"))  # head west
SOFA = Piece("sofa", "sofa-3", ("r",), placement=Placement(3000, 3600, 180, "r"))
DESK = Piece("desk", "desk", ("r", "s"), placement=Placement(8500, 1400, 90, "s"))


def test_compass_thirds() -> None:
    # a 6000 x 4500 box: thirds at x 2000 / 4000 and y 1500 / 3000
    b = (0, 0, 6000, 4500)
    assert compass_part((1000, 4000), b) == "north-west"
    assert compass_part((3000, 2000), b) == "middle"
    assert compass_part((5000, 2000), b) == "east"


def test_one_line_idea() -> None:
    plan = _plan(BED, SOFA, DESK)
    # rotation 270 turns the front east, so the head (back) is on the west wall; the sofa's
    # centre (4067, 4045) is in the north-east third, its front south (rotation 180); the desk
    # (600 deep, turned 90) stands 0 mm from the study's east window, and could be in either room
    assert describe(plan, rules_for(plan)) == (
        "bed head on the west wall; sofa in the north-east, facing south; "
        "desk by the window in the study")


def test_visible_changes_name_the_main_pieces_that_moved() -> None:
    plan = _plan(BED, SOFA, DESK)
    rules = rules_for(plan)
    a = spots(plan, rules)
    nudged = plan.with_layout((("sofa", Placement(3100, 3600, 180, "r")),))  # 100 mm: same spot
    assert visible_changes(a, spots(nudged, rules)) == ()
    turned = plan.with_layout((("bed", Placement(2000, 0, 0, "r")),))       # head south
    assert visible_changes(a, spots(turned, rules)) == ("bed",)


def test_moving_list_from_the_arrangement_as_it_stands() -> None:
    before = _plan(BED, SOFA, replace(DESK, placement=None))
    after = before.with_layout((("bed", Placement(2000, 0, 0, "r")),
                                ("sofa", Placement(3050, 3600, 180, "r")),
                                ("desk", Placement(8500, 1400, 90, "s"))))
    # the bed's centre moves from (1050, 1850) to (2850, 1050): hypot(1800, 800) = 1969.8 mm;
    # the sofa moves 50 mm (under the 100 mm a client would not count); the desk is new, its
    # centre (8800, 2000) in the middle third of the study's y (0..4500) and its east third
    assert moves(before, after, rules_for(after)) == (
        "bed: head to the south wall (2.0 m, turned)",
        "desk (new): to the east of the study, facing west",
    )
