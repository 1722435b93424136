"""The page's IFC import functions, on a real model's bytes as an upload would bring them."""

from __future__ import annotations

import os
from pathlib import Path

import pytest

from roomfit.audit.geometry import door_leaf
from roomfit.errors import RoomfitError
from roomfit.plan.data import Leaf
from roomfit.plan.ifc_import import doors_to_review, fix_door, plan_text
from roomfit.plan.read import loads_plan
from roomfit.present.draw import draw_svg
from roomfit.rules.sets import rules_for

pytest.importorskip("ifcopenshell", reason="the ifc extra (ifcopenshell) is not installed")

from roomfit import page_ifc  # noqa: E402

REAL = Path(os.environ.get("ROOMFIT_REALPLANS")
            or Path(__file__).resolve().parent.parent.parent / "shared" / "realplans")
HOUSE = REAL / "detached-house-ifc4.ifc"


@pytest.fixture(scope="module")
def upload() -> bytes:
    if not HOUSE.is_file():
        pytest.skip(f"real model {HOUSE} is missing (shared/realplans is not beside the repository)")
    return HOUSE.read_bytes()


def test_upload_lists_storeys_and_imports_one(upload: bytes) -> None:
    summary = page_ifc.summary_from_upload("house.ifc", upload)
    assert [c[0] for c in page_ifc.storey_choices(summary)] == ["1", "2"]
    imported = page_ifc.import_from_upload("house.ifc", upload, "1", "")
    assert len(imported.plan.rooms) == 6
    marks = page_ifc.review_marks(imported)
    # the front door (guessed, and the assumed entrance), the terrace door (guessed, an
    # assumed entrance too) and the three open links: one mark per door concerned
    assert len(marks) == len({d for d, _ in doors_to_review(imported)}) == 5
    front = next(m for m in marks if "d-haustuer" in m.label)
    assert "guessed" in front.label and "entrance" in front.label
    svg = draw_svg(imported.plan, rules_for(imported.plan), marks=marks)
    assert svg.count("guessed:") >= 2
    text = plan_text(imported, "caution words")
    assert text.startswith("# Imported plan:") and "caution words" in text
    assert loads_plan(text) == imported.plan


def test_a_person_sets_the_front_door(upload: bytes) -> None:
    plan = page_ifc.import_from_upload("house.ifc", upload, "1", "").plan
    leaf, swing, hinge = page_ifc.door_state(plan, "d-haustuer")
    assert (leaf, swing) == ("hinged", "flur")
    other = "right" if hinge == "left" else "left"
    fixed = fix_door(plan, "d-haustuer", "hinged", "flur", other)
    before, _ = door_leaf(plan, plan.doors[1])
    after, _ = door_leaf(fixed, fixed.doors[1])
    assert plan.doors[1].id == "d-haustuer" and before != after  # the hinge moved jambs
    assert fix_door(plan, "d-haustuer", "sliding").doors[1].leaf == Leaf.SLIDING
    with pytest.raises(RoomfitError, match="swings into one of its rooms"):
        fix_door(plan, "d-haustuer", "hinged", "bad", "left")


def test_a_bad_upload_names_the_uploaded_file() -> None:
    with pytest.raises(RoomfitError) as e:
        page_ifc.summary_from_upload("broken.ifc", b"not a model")
    assert e.value.source == "broken.ifc" and "not a readable IFC file" in e.value.render()
