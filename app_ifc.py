"""Importing an architect's IFC model on the page: upload, storey and spaces, then a review of
the imported plan with every guessed door and the assumed entrance marked, where each door's
leaf, swing room and hinge side can be set.

Layout only; the logic is in :mod:`roomfit.page_ifc` and :mod:`roomfit.plan.ifc_import`.
"""

from __future__ import annotations

from dataclasses import replace

import streamlit as st

from app_common import edit, key, set_plan, show_svg, state
from roomfit import page, page_ifc
from roomfit.caution import CAUTION
from roomfit.errors import RoomfitError
from roomfit.plan.data import Plan
from roomfit.plan.ifc_import import fix_door, plan_text
from roomfit.present import draw
from roomfit.rules.sets import RuleSet

__all__ = ["ifc_sidebar", "ifc_review"]


def ifc_sidebar() -> None:
    s = state()
    with st.sidebar.expander("Import an architect's IFC model"):
        if not page_ifc.ifc_available():
            st.info('Reading IFC needs the extra: pip install "roomfit[ifc]"')
            return
        up = st.file_uploader("IFC model (.ifc)", type=["ifc"], key="ifc_upload")
        if up is None:
            return
        try:
            if s.get("ifc_summary_id") != up.file_id:
                s["ifc_summary"] = page_ifc.summary_from_upload(up.name, up.getvalue())
                s["ifc_summary_id"] = up.file_id
            choices = page_ifc.storey_choices(s["ifc_summary"])
            names = dict(choices)
            storey = st.selectbox("Storey", list(names), key="ifc_storey",
                                  format_func=lambda c: names[c])
            spaces = st.text_input("Only spaces matching (e.g. 2.*; empty: all)", key="ifc_spaces")
            if st.button("Import this storey", key="ifc_go"):
                imported = page_ifc.import_from_upload(up.name, up.getvalue(), storey, spaces)
                set_plan(imported.plan, f"IFC {up.name}, storey {storey}")
                s["ifc_review"] = imported
                st.rerun()
        except RoomfitError as e:
            st.error("\n\n".join(page.error_lines(e)))


def ifc_review(plan: Plan, rules: RuleSet) -> None:
    """The imported plan with every guess marked; each door's leaf, swing and hinge set here."""
    s = state()
    imported = s["ifc_review"]
    if not str(s.get("origin", "")).startswith("IFC "):  # another plan was opened since
        s["ifc_review"] = None
        return
    with st.expander("Review the IFC import: guessed doors and the assumed entrance", expanded=True):
        show_svg(draw.draw_svg(plan, rules, marks=page_ifc.review_marks(imported)))
        st.dataframe(page_ifc.review_rows(imported), hide_index=True)
        doors = [d.id for d in plan.doors]
        door = st.selectbox("Door to set", doors, key=key("ifc_door", "pick"))
        leaf, swing, hinge = page_ifc.door_state(plan, door)
        opts = page_ifc.door_options(plan, door)
        cols = st.columns(3)
        new_leaf = cols[0].selectbox("Leaf", opts["leaf"], index=opts["leaf"].index(leaf),
                                     key=key("ifc_leaf", door))
        new_swing = cols[1].selectbox("Swings into", opts["swings_into"],
                                      index=opts["swings_into"].index(swing), key=key("ifc_sw", door))
        new_hinge = cols[2].selectbox("Hinge (seen from that room, facing the door)", opts["hinge"],
                                      index=opts["hinge"].index(hinge), key=key("ifc_hinge", door))
        if st.button("Set this door", key=key("ifc_set", door)):
            edit(fix_door, door, new_leaf, new_swing, new_hinge, where="top",
                  notice=f"Door {door} set; save the plan from the sidebar.")
            st.rerun()
        st.download_button("Save with the import report on top (.toml)",
                           plan_text(replace(imported, plan=plan), CAUTION),
                           file_name=f"{page.file_stem(plan)}.toml", mime="application/toml",
                           key=key("ifc_save", "plan"))
        if st.button("Done reviewing", key="ifc_done"):
            s["ifc_review"] = None
            st.rerun()
