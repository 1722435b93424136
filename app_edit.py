"""The page as a working surface: arrange pieces and check at once, and edit the building.

Layout only: moves, turns, nudges, locks, door, window and corner edits are plain functions
of :mod:`roomfit.page_edit`; the audit and drawing are the library's. Each control's values
live in the session under keys made for the opened plan, so nothing typed is lost on a rerun
or a refused value.
"""

from __future__ import annotations

from typing import Any

import streamlit as st

from app_common import caution, edit, kept, key, messages, show_svg, state, text
from roomfit import page, page_edit
from roomfit.audit.check import audit, marks_for
from roomfit.audit.geometry import room_polygon
from roomfit.audit.routes import score_routes
from roomfit.plan.data import OUTSIDE, Plan
from roomfit.plan.units import format_area
from roomfit.present.clearances import LAYERS
from roomfit.present.draw import draw_svg
from roomfit.rules.sets import RuleSet

__all__ = ["arrange", "building", "undo_bar"]

STEPS = (10, 50, 100, 250)


# --------------------------------------------------------------------------------- callbacks


def _sync_position(pid: str) -> None:
    """Set the position inputs to where the piece now stands (after a move made by a button)."""
    s = state()
    pl = s["plan"].piece(pid).placement
    if pl is not None:
        s[key("pos_x", pid)], s[key("pos_y", pid)] = pl.x, pl.y
        s[key("pos_rot", pid)] = pl.rotation


def _place(pid: str) -> None:
    s = state()
    ok = edit(page_edit.place_piece, pid, int(s[key("pos_x", pid)]), int(s[key("pos_y", pid)]),
              int(s[key("pos_rot", pid)]), where="arrange", notice=f"{pid} moved.")
    if ok:
        _sync_position(pid)


def _nudge(pid: str, dx: int, dy: int) -> None:
    step = int(state().get("nudge_step", 50))
    if edit(page_edit.nudge_piece, pid, dx * step, dy * step, where="arrange",
            notice=f"{pid} moved {step} mm."):
        _sync_position(pid)


def _turn(pid: str) -> None:
    if edit(page_edit.turn_piece, pid, 90, where="arrange", notice=f"{pid} turned."):
        _sync_position(pid)


def _snap(pid: str) -> None:
    if edit(page_edit.snap_to_wall, pid, where="arrange", notice=f"{pid} moved back to the wall."):
        _sync_position(pid)


def _pick_on_sketch() -> None:
    """A click on the plan's sketch picks the piece under it (before the list is drawn)."""
    s = state()
    value, drawn = s.get("pick_click"), s.get("pick_sketch")
    if not value or drawn is None:
        return
    k = drawn.image.width / value.get("width", drawn.image.width)
    x, y = drawn.to_plan(value["x"] * k, value["y"] * k)
    pid = page_edit.piece_at(s["plan"], x, y)
    if pid is not None:
        s["pick"] = pid


def _lock(pid: str) -> None:
    piece = state()["plan"].piece(pid)
    edit(page.lock_piece, pid, not piece.locked, where="arrange",
         notice=f"{pid} {'unlocked' if piece.locked else 'locked where it stands'}.")


def _step(kind: str) -> None:
    s = state()
    h, plan = (page_edit.undo if kind == "undo" else page_edit.redo)(s["history"], s["plan"])
    s["history"], s["plan"] = h, plan
    s["notice"] = ("top", "Undone." if kind == "undo" else "Redone.")
    pid = s.get("pick")
    if pid and any(p.id == pid for p in plan.furniture):
        _sync_position(pid)


def undo_bar() -> None:
    """Undo and redo buttons for every edit of the plan."""
    h = state().get("history") or page_edit.History()
    c1, c2, c3 = st.columns([1, 1, 6])
    c1.button("Undo", key="undo", disabled=not h.past, on_click=_step, args=("undo",))
    c2.button("Redo", key="redo", disabled=not h.future, on_click=_step, args=("redo",))
    c3.caption(f"{len(h.past)} change(s) to undo, {len(h.future)} to redo")


# --------------------------------------------------------------------------------- arrange


def _drawing(plan: Plan, rules: RuleSet, show: tuple[str, ...], result: Any) -> str:
    """The arranged plan with the failures numbered and the chosen layers."""
    routes = score_routes(plan, rules) if "routes" in show and plan.layout else None
    return draw_svg(plan, rules, marks=marks_for(result), findings=result.findings, routes=routes,
                    show=show, title=plan.name, width_px=1100)


def _piece_controls(plan: Plan, pid: str) -> None:
    p = plan.piece(pid)
    pl = p.placement
    s = state()
    if key("pos_x", pid) not in s:
        s[key("pos_x", pid)] = None if pl is None else pl.x
        s[key("pos_y", pid)] = None if pl is None else pl.y
        s[key("pos_rot", pid)] = 0 if pl is None else pl.rotation
    st.markdown(f"**{text(p.label or pid)}** ({text(pid)})"
                + (" — locked" if p.locked else "") + ("" if pl else " — no place yet"))
    with st.form(key("pos_form", pid), border=True):
        c1, c2, c3 = st.columns(3)
        c1.number_input("x (mm, lower-left corner)", step=10, key=key("pos_x", pid))
        c2.number_input("y (mm)", step=10, key=key("pos_y", pid))
        c3.selectbox("Turned (degrees)", [0, 90, 180, 270], key=key("pos_rot", pid))
        st.form_submit_button("Put it here", on_click=_place, args=(pid,))
    st.radio("Step", STEPS, index=1, horizontal=True, key="nudge_step",
             format_func=lambda v: f"{v} mm")
    left, up, down, right = st.columns(4)
    off = pl is None
    left.button("◀", help="west", key="nudge_w", on_click=_nudge, args=(pid, -1, 0), disabled=off)
    up.button("▲", help="north", key="nudge_n", on_click=_nudge, args=(pid, 0, 1), disabled=off)
    down.button("▼", help="south", key="nudge_s", on_click=_nudge, args=(pid, 0, -1), disabled=off)
    right.button("▶", help="east", key="nudge_e", on_click=_nudge, args=(pid, 1, 0), disabled=off)
    b1, b2, b3 = st.columns(3)
    b1.button("Turn 90°", key="turn", on_click=_turn, args=(pid,), disabled=off)
    b2.button("To the wall", key="snap", on_click=_snap, args=(pid,), disabled=off)
    b3.button("Unlock" if p.locked else "Lock", key="lock", on_click=_lock, args=(pid,), disabled=off)


def arrange(plan: Plan, rules: RuleSet) -> None:
    """Pick a piece, move, turn, nudge or lock it, and see the audit of the plan at once."""
    messages("arrange")
    c1, c2 = st.columns([3, 1])
    show = tuple(c1.pills("Show on the drawing", LAYERS, selection_mode="multi",
                          default=list(LAYERS), key="layers") or ())
    zoom = c2.slider("Zoom (%)", 100, 400, 100, step=25, key="zoom")
    ids = [p.id for p in plan.furniture]
    if state().get("pick") not in ids:
        state()["pick"] = ids[0] if ids else None
    # the quick audit first (a tenth of a second or so), shown before the drawing is made
    result = kept("arrange_audit", (plan, rules), lambda: audit(plan, rules, widths=False))
    fails = result.failures
    if fails:
        st.warning(f"{len(fails)} of {len(result.findings)} rule checks fail under "
                   f"{text(rules.label)}. Each is numbered on the drawing.\n\n"
                   + "\n".join(f"{i}. {text(f.rule)}: {text(f.message)}"
                               for i, f in enumerate(fails, start=1)))
    else:
        st.success(f"All {len(result.findings)} rule checks pass under {text(rules.label)}.")
    caution()
    left, right = st.columns([5, 2])
    with right:
        if ids:
            labels = {p.id: f"{p.label or p.id} ({p.id})" for p in plan.furniture}
            pid = st.selectbox("Piece", ids, key="pick", format_func=lambda i: labels[i])
            with st.expander("…or click it on a sketch of the plan"):
                from streamlit_image_coordinates import streamlit_image_coordinates

                drawn = page_edit.sketch(plan, 640, pid)
                state()["pick_sketch"] = drawn
                streamlit_image_coordinates(drawn.image, key="pick_click", width="stretch",
                                            on_click=_pick_on_sketch, cursor="pointer")
            if pid is not None:
                _piece_controls(plan, pid)
        else:
            st.caption("The furniture list is empty.")
    with left:
        show_svg(kept("arrange", (plan, rules, show),
                       lambda: _drawing(plan, rules, show, result)), zoom)
    with st.expander("Every rule finding"):
        st.dataframe(page.findings_rows(result.findings, plan.unit), hide_index=True, width="stretch")


# --------------------------------------------------------------------------------- building


def _door(did: str) -> None:
    s = state()
    edit(page_edit.edit_door, did, width=int(s[key("door_w", did)]), leaf=s[key("door_leaf", did)],
         swings_into=s.get(key("door_into", did)), hinge=s.get(key("door_hinge", did)),
         where="building", notice=f"Door {did} changed.")


def _slide(did: str, way: str) -> None:
    by = int(state()[key("door_slide", did)])
    edit(page_edit.slide_door, did, by, where="building",
         notice=f"Door {did} moved {abs(by)} mm {way if by >= 0 else _OPPOSITE[way]} along its wall.")


_OPPOSITE = {"east": "west", "north": "south"}


def _new_opening(kind: str) -> None:
    """Add the door or window the *Add a …* form describes (its wall, the distance along
    it to the opening's centre, and its sizes)."""
    s = state()
    room = s[f"new_{kind}_room"]
    wall = int(s[f"new_{kind}_wall_{room}"].split(":")[0].removeprefix("wall ")) - 1
    at = page_edit.on_wall(s["plan"].room(room), wall, int(s[f"new_{kind}_along"]))
    width = int(s[f"new_{kind}_w"])
    if kind == "door":
        edit(page_edit.add_door, (room, s[f"new_door_to_{room}"]), at, width, s["new_door_leaf"],
             where="building", notice=f"Door added on {room}'s wall at {at}.")
    else:
        edit(page_edit.add_window, room, at, width, int(s["new_window_sill"]), where="building",
             notice=f"Window added on {room}'s wall at {at}.")


def _opening_form(plan: Plan, kind: str) -> None:
    """The form that adds a door (to another room or outside) or a window on a room's wall."""
    rooms = [r.id for r in plan.rooms]
    with st.expander(f"Add a {kind}"):
        room = st.selectbox("On a wall of", rooms, key=f"new_{kind}_room")
        st.selectbox("Wall", page_edit.wall_choices(plan.room(room)), key=f"new_{kind}_wall_{room}")
        with st.form(f"new_{kind}_form", border=False):
            st.number_input("Centre, mm from the wall's first corner", min_value=0, value=500,
                            step=50, key=f"new_{kind}_along")
            st.number_input("Width (mm)" if kind == "window" else "Clear width (mm)",
                            min_value=1, value=900, step=10, key=f"new_{kind}_w")
            if kind == "door":
                st.selectbox("To", [r for r in rooms if r != room] + [OUTSIDE],
                             key=f"new_door_to_{room}")
                st.selectbox("Leaf (a hinged leaf swings into the first room, hinges left)",
                             ["hinged", "sliding", "none"], key="new_door_leaf")
            else:
                st.number_input("Sill height (mm)", min_value=0, value=900, step=10,
                                key="new_window_sill")
            st.form_submit_button(f"Add the {kind}", on_click=_new_opening, args=(kind,))


def _remove_door(did: str) -> None:
    edit(page_edit.remove_door, did, where="building", notice=f"Door {did} removed.")


def _window(wid: str, remove: bool = False) -> None:
    s = state()
    edit(page_edit.edit_window, wid, width=int(s[key("win_w", wid)]), sill=int(s[key("win_s", wid)]),
         remove=remove, where="building",
         notice=f"Window {wid} {'removed' if remove else 'changed'}.")


def _corners(rid: str) -> None:
    s = state()
    rows = s[key("corner_table", rid)]
    table = s[key("corner_rows", rid)]
    pts = _edited_rows(table, rows)
    edit(page_edit.set_outline, rid, pts, where="building", notice=f"Corners of {rid} changed.")


def _edited_rows(base: list[dict[str, Any]], change: dict[str, Any]) -> list[tuple[int, int]]:
    """The corner rows after a ``st.data_editor`` change (edits, added and deleted rows)."""
    rows = [dict(r) for r in base]
    for i, cols in change.get("edited_rows", {}).items():
        rows[int(i)].update(cols)
    for i in sorted(change.get("deleted_rows", []), reverse=True):
        del rows[int(i)]
    rows += [dict(r) for r in change.get("added_rows", [])]
    out = []
    for n, r in enumerate(rows, start=1):
        if r.get("x (mm)") is None or r.get("y (mm)") is None:
            raise ValueError(f"corner {n} needs both x and y")
        out.append((int(r["x (mm)"]), int(r["y (mm)"])))
    return out


def building(plan: Plan, rules: RuleSet) -> None:
    """Doors (width, leaf, swing room, hinge side), windows and room corners."""
    messages("building")
    c_door, c_win, c_room = st.columns(3)
    with c_door:
        st.markdown("**Doors**")
        if plan.doors:
            did = st.selectbox("Door", [d.id for d in plan.doors], key="pick_door")
            d = next(x for x in plan.doors if x.id == did)
            with st.form(key("door_form", did), border=True):
                st.number_input("Clear width (mm)", min_value=1, value=d.width, step=10,
                                key=key("door_w", did))
                st.selectbox("Leaf", ["hinged", "sliding", "none"], index=["hinged", "sliding",
                             "none"].index(d.leaf.value), key=key("door_leaf", did))
                into = [r for r in d.rooms]
                st.selectbox("Swings into", into, index=into.index(d.swings_into)
                             if d.swings_into in into else 0, key=key("door_into", did))
                st.radio("Hinge side (seen from that room, facing the door)", ["left", "right"],
                         index=0 if d.hinge != "right" else 1, horizontal=True,
                         key=key("door_hinge", did))
                st.form_submit_button("Apply to the door", on_click=_door, args=(did,))
            way = page_edit.door_slide_way(plan, did)
            with st.form(key("door_slide_form", did), border=True):
                st.number_input(f"Move along its wall (mm; + {way}, − {_OPPOSITE[way]})",
                                value=0, step=50, key=key("door_slide", did))
                st.form_submit_button("Move the door", on_click=_slide, args=(did, way))
            st.button("Remove this door", key="door_remove", on_click=_remove_door, args=(did,))
        else:
            st.caption("No doors.")
        _opening_form(plan, "door")
    with c_win:
        st.markdown("**Windows**")
        if plan.windows:
            wid = st.selectbox("Window", [w.id for w in plan.windows], key="pick_window")
            w = next(x for x in plan.windows if x.id == wid)
            with st.form(key("win_form", wid), border=True):
                st.number_input("Width (mm)", min_value=1, value=w.width, step=10, key=key("win_w", wid))
                st.number_input("Sill height (mm)", min_value=0, value=w.sill, step=10,
                                key=key("win_s", wid))
                st.form_submit_button("Apply to the window", on_click=_window, args=(wid,))
            st.button("Remove this window", key="win_remove", on_click=_window, args=(wid, True))
        else:
            st.caption("No windows.")
        _opening_form(plan, "window")
    with c_room:
        st.markdown("**Room corners** (add, change or delete rows)")
        rid = st.selectbox("Room", [r.id for r in plan.rooms], key="pick_room")
        room = plan.room(rid)
        rows = [{"x (mm)": x, "y (mm)": y} for x, y in room.outline]
        state()[key("corner_rows", rid)] = rows
        st.data_editor(rows, num_rows="dynamic", key=key("corner_table", rid), hide_index=False)
        st.button("Apply the corners", key="apply_corners", on_click=_corners, args=(rid,))
        st.caption(f"Floor area {format_area(room_polygon(room).area, plan.unit)}, "
                   f"{len(room.outline)} corners.")
    show_svg(kept("building", (plan, rules), lambda: draw_svg(
        plan, rules, show=("zones", "dimensions"), title=plan.name, width_px=1100)))
