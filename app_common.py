"""What every part of roomfit's page shares: the session's plan, edits with undo, messages
shown at the form they belong to, panels that never show a traceback, and drawings with zoom.

Layout only; every edit calls a plain function of :mod:`roomfit.page` or
:mod:`roomfit.page_edit` that returns a new, validated plan.
"""

from __future__ import annotations

import html
import logging
from collections.abc import Iterator
from contextlib import contextmanager
from typing import Any

import streamlit as st

from roomfit import page
from roomfit.caution import CAUTION
from roomfit.errors import RoomfitError
from roomfit.page_edit import History, record
from roomfit.plan.data import Plan

__all__ = ["state", "set_plan", "key", "edit", "kept", "messages", "panel", "caution", "show_svg",
           "text"]

LOG = logging.getLogger("roomfit.app")

#: Widget keys that point into one plan (a picked piece, door, window, room) and must not
#: carry over to another plan.
_PICKS = ("pick", "edit_piece", "pick_door", "pick_window", "pick_room")


def state() -> Any:
    return st.session_state


def set_plan(plan: Plan, origin: str, *, keep_history: bool = False) -> None:
    """Open ``plan`` (from ``origin``, a sample, an upload or a trace): fresh widgets, no
    picked piece, nothing solved; undo starts afresh unless ``keep_history``."""
    s = state()
    if keep_history and s.get("plan") is not None:
        s["history"] = record(s.get("history") or History(), s["plan"])
    else:
        s["history"] = History()
    s["plan"] = plan
    s["origin"] = origin
    s["gen"] = s.get("gen", 0) + 1  # fresh form widgets for a newly opened plan
    s["solved"] = None
    s["edit_error"] = None
    for k in _PICKS:
        s.pop(k, None)
    placed = sum(p.placement is not None for p in plan.furniture)
    s["notice"] = ("top", f"Opened {origin}: {len(plan.furniture)} pieces, {placed} with a place"
                   + (" (see Arrange and check)." if placed else "."))


def key(name: str, item: str) -> str:
    """Key of a widget that belongs to one opened plan (``gen`` changes when one is opened)."""
    return f"{name}_{state().get('gen', 0)}_{item}"


def edit(func: Any, *args: Any, where: str, notice: str, **kwargs: Any) -> bool:
    """Apply an edit to the plan and remember the old one for undo; on a bad value keep the
    plan, say what is wrong beside the form (``where``) and return False."""
    s = state()
    try:
        new = func(s["plan"], *args, **kwargs)
    except RoomfitError as e:
        s["edit_error"] = (where, page.error_lines(e))
        return False
    except (ValueError, TypeError, OverflowError) as e:  # a value no plan can hold
        s["edit_error"] = (where, [f"{type(e).__name__}: {e}"])
        return False
    if new != s["plan"]:
        s["history"] = record(s.get("history") or History(), s["plan"])
        s["plan"] = new
    s["edit_error"] = None
    s["notice"] = (where, notice)
    return True


def kept(name: str, same: Any, compute: Any) -> Any:
    """``compute()`` kept in the session while ``same`` (a plan, say) stays the same, so that
    redrawing the page after a click does not audit and draw everything again."""
    s = state()
    held = s.get(f"memo_{name}")
    if held is None or held[0] != same:
        held = (same, compute())
        s[f"memo_{name}"] = held
    return held[1]


def messages(where: str) -> None:
    """The outcome of the last edit, shown once, in the part of the page it came from."""
    s = state()
    note, err = s.get("notice"), s.get("edit_error")
    if note and note[0] == where:
        st.success(text(note[1]))
        s["notice"] = None
    if err and err[0] == where:
        st.error("That change was not made; the plan stays as it was.\n\n"
                 + "\n\n".join(text(e) for e in err[1]))


def text(s: str) -> str:
    """Plan text made safe for Streamlit's Markdown (shown as typed)."""
    return page.plain(s)


@contextmanager
def panel(name: str) -> Iterator[None]:
    """Show a problem in one panel as a message; the rest of the page keeps running."""
    try:
        yield
    except RoomfitError as e:
        st.error("\n\n".join(text(x) for x in page.error_lines(e)))
    except Exception as e:  # noqa: BLE001 - never show a traceback, keep the page running
        LOG.exception("panel %s failed", name)
        st.error(f"The {name} panel ran into a problem it could not handle ({type(e).__name__}: "
                 f"{text(str(e))}). Your plan and edits are kept.")


def caution() -> None:
    st.markdown(f'<div class="rf-caution">{html.escape(CAUTION)}</div>', unsafe_allow_html=True)


def show_svg(svg: str, zoom: int = 100) -> None:
    """A drawing as wide as its column at ``zoom`` = 100 (%), larger with scroll bars to pan."""
    body = svg[svg.find("<svg"):] if "<svg" in svg else svg
    st.markdown(f'<div class="rf-drawing"><div style="width:{int(zoom)}%">'
                f'{" ".join(body.splitlines())}</div></div>', unsafe_allow_html=True)
