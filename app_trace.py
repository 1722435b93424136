"""Trace a plan over a scan: load an image, set the scale from one known length, click each
room's corners, and open the traced rooms as the plan (the scan stays as a faint underlay).

Layout only; reading the image, the scale and turning clicks into a plan are plain functions
of :mod:`roomfit.page_trace`. Clicks come from ``streamlit-image-coordinates``: Streamlit's
own widgets cannot report where on an image a person clicked.
"""

from __future__ import annotations

from typing import Any

import streamlit as st

from app_common import messages, set_plan, state, text
from roomfit import page
from roomfit.audit.geometry import room_polygon
from roomfit.errors import RoomfitError
from roomfit.page_trace import TracedRoom, load_scan, mm_per_pixel, plan_from_trace, underlay
from roomfit.plan.units import format_area
from roomfit.rules.sets import ruleset_ids

__all__ = ["trace"]

USES = ("living", "bedroom", "kitchen", "bathroom", "wc", "hall", "corridor", "other")
#: Width (px) the scan is shown at; clicks are scaled back to the image's own pixels.
SHOWN_PX = 1000


def _t() -> dict[str, Any]:
    """The tracing session: scan, scale points, known length, rooms done, corners so far."""
    s = state()
    if "trace" not in s:
        s["trace"] = {"scan": None, "name": "", "scale_pts": [], "scale": None, "rooms": [],
                      "corners": [], "last_click": None, "error": None}
    return s["trace"]


def _take_scan() -> None:
    t = _t()
    up = state().get("scan_upload")
    if up is None:
        return
    try:
        t.update(scan=load_scan(up.name, up.getvalue()), name=up.name, scale_pts=[], scale=None,
                 rooms=[], corners=[], last_click=None, error=None)
    except RoomfitError as e:
        t["error"] = page.error_lines(e)
    except Exception as e:  # noqa: BLE001 - any unreadable image: say so at the field
        t["error"] = [f"{up.name}: cannot be read as an image ({type(e).__name__})"]


def _click(value: dict[str, Any] | None, mode: str) -> None:
    """Take one click (in shown pixels) as a scale point or a room corner."""
    t = _t()
    if not value or (value.get("x"), value.get("y"), value.get("unix_time")) == t["last_click"]:
        return
    t["last_click"] = (value.get("x"), value.get("y"), value.get("unix_time"))
    k = t["scan"].width / value.get("width", t["scan"].width)
    p = (value["x"] * k, value["y"] * k)
    if mode == "scale":
        t["scale_pts"] = (t["scale_pts"] + [p])[-2:]
    else:
        t["corners"].append(p)


def _set_scale() -> None:
    t = _t()
    try:
        t["scale"] = mm_per_pixel(t["scale_pts"][0], t["scale_pts"][1], float(state()["known_mm"]))
        t["error"] = None
    except (RoomfitError, IndexError) as e:
        t["error"] = (page.error_lines(e) if isinstance(e, RoomfitError)
                      else ["click the two ends of the known length first"])


def _close_room() -> None:
    t, s = _t(), state()
    if len(t["corners"]) < 3:
        t["error"] = ["click at least three corners before closing the room"]
        return
    t["rooms"].append(TracedRoom(s.get("trace_label") or f"Room {len(t['rooms']) + 1}",
                                 s.get("trace_use", "living"), tuple(t["corners"])))
    t["corners"], t["error"] = [], None


def _make_plan() -> None:
    t, s = _t(), state()
    try:
        plan = plan_from_trace(s.get("trace_name") or "Traced plan", t["rooms"], t["scale"],
                               t["scan"].height, s.get("trace_rules", "everyday"))
    except RoomfitError as e:
        t["error"] = page.error_lines(e)
        return
    set_plan(plan, f"trace over {t['name']}", keep_history=True)


def trace() -> None:
    t = _t()
    messages("trace")
    st.file_uploader("Scan or photo of the plan (PNG, JPEG, or PDF: its first page)",
                     type=["png", "jpg", "jpeg", "pdf"], key="scan_upload", on_change=_take_scan)
    if t["error"]:
        st.error("\n\n".join(text(e) for e in t["error"]))
    if t["scan"] is None:
        st.caption("Load a scan to trace the rooms over it.")
        return
    mode = st.radio("Clicks on the scan set", ["scale", "corners"], horizontal=True, key="trace_mode",
                    format_func=lambda m: {"scale": "the two ends of a known length",
                                           "corners": "the corners of the room being traced"}[m])
    left, right = st.columns([3, 1])
    with left:
        from streamlit_image_coordinates import streamlit_image_coordinates

        shown = underlay(t["scan"], t["rooms"], t["corners"], t["scale_pts"])
        value = streamlit_image_coordinates(shown, key="trace_click", width=SHOWN_PX,
                                            cursor="crosshair")
        if value is not None and (value.get("x"), value.get("y"), value.get("unix_time")) != t["last_click"]:
            _click(value, mode)
            st.rerun()
    with right:
        st.caption(f"Ends of the known length clicked: {len(t['scale_pts'])} of 2")
        st.number_input("Known length (mm)", min_value=1, value=3000, step=10, key="known_mm")
        st.button("Use this scale", key="set_scale", on_click=_set_scale)
        if t["scale"]:
            st.caption(f"Scale: {t['scale']:.2f} mm per pixel of the scan")
        st.text_input("Room name", key="trace_label")
        st.selectbox("Use", USES, key="trace_use")
        st.caption(f"{len(t['corners'])} corners clicked")
        st.button("Close this room", key="close_room", on_click=_close_room)
        st.button("Drop the last corner", key="drop_corner",
                  on_click=lambda: t["corners"] and t["corners"].pop())
        for r in t["rooms"]:
            if t["scale"]:
                poly = plan_from_trace("x", [r], t["scale"], t["scan"].height).rooms[0]
                st.caption(f"{text(r.label)}: {format_area(room_polygon(poly).area, 'mm')}")
        st.text_input("Plan name", key="trace_name")
        ids = ruleset_ids()
        st.selectbox("Rule set", ids, index=ids.index("everyday") if "everyday" in ids else 0,
                     key="trace_rules")
        st.button("Open the traced rooms as the plan", key="make_plan", on_click=_make_plan,
                  disabled=not (t["rooms"] and t["scale"]), type="primary")
