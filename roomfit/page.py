"""What the Streamlit page (``app.py``) needs, as plain functions a test can call.

The page holds layout only. Everything it shows or changes goes through these functions,
which call the same library functions as the ``roomfit`` command: reading a plan file,
resolving pieces against the catalogue and the rule set, auditing, solving, drawing.

Edits to the furniture list and the rule choice return a *new* :class:`~roomfit.plan.data.Plan`
and are validated by writing the plan to plan-file text and reading it back with
:func:`~roomfit.plan.read.loads_plan`, so a bad value in the page gets exactly the message
(field path and what is wrong) that the same value in a plan file would get; the old plan is
kept until an edit is valid.

>>> from roomfit.plan.data import Plan, Room
>>> p = Plan("demo", (Room("r", "Room", "living", ((0, 0), (3000, 0), (3000, 3000), (0, 3000))),))
>>> p = add_piece(p, "nightstand", ("r",))
>>> [x.id for x in p.furniture]
['nightstand-1']
"""

from __future__ import annotations

import queue
import re
import threading
from collections.abc import Callable, Sequence
from dataclasses import replace
from pathlib import Path
from typing import Any, TypeVar

from roomfit.errors import PlanError, Problem, RoomfitError, RuleError
from roomfit.plan.data import Layout, Piece, Placement, Plan, RuleChoice
from roomfit.plan.read import loads_plan
from roomfit.plan.units import IMPERIAL, in_plan_units, show_length, show_measure
from roomfit.plan.write import dumps_plan
from roomfit.rules.catalog import load_catalog, resolve_pieces
from roomfit.rules.sets import RuleSet, load_ruleset
from roomfit.solve.outcome import Outcome, describe

__all__ = [
    "EDITED_SOURCE",
    "OVERRIDABLE",
    "Outcome",
    "sample_files",
    "plan_from_upload",
    "error_lines",
    "validated",
    "type_choices",
    "new_id",
    "add_piece",
    "update_piece",
    "remove_piece",
    "lock_piece",
    "keep_layout",
    "with_rule_choice",
    "piece_rows",
    "rule_rows",
    "findings_rows",
    "route_rows",
    "comparison_rows",
    "describe_outcome",
    "run_polling",
    "file_stem",
    "plain",
    "progress_words",
]

T = TypeVar("T")

#: Name under which problems in an edited (not yet saved) plan are reported.
EDITED_SOURCE = "plan edited on the page"

#: Rule values the page offers to override directly, in the order shown. Any other rule can
#: still be overridden in the plan file's ``[rules.overrides]`` table.
OVERRIDABLE = ("route.width", "turning.size", "door.min_width")


def sample_files(folder: str | Path) -> list[Path]:
    """The bundled sample plans (``*.toml``) in ``folder``, sorted by name."""
    return sorted(Path(folder).glob("*.toml"))


def plan_from_upload(name: str, data: bytes) -> Plan:
    """Read an uploaded plan file's bytes; problems name the uploaded file's ``name``. The
    reader's limits apply (size first, before the bytes are decoded)."""
    return loads_plan(data, name)


def error_lines(err: RoomfitError) -> list[str]:
    """One line per problem: file, field path, what is wrong and the hint."""
    return [p.render(err.source) for p in err.problems]


def validated(plan: Plan) -> Plan:
    """``plan`` after a round trip through plan-file text: the plan reader's checks apply.

    Raises :class:`PlanError` naming :data:`EDITED_SOURCE` and the field path.
    """
    return loads_plan(dumps_plan(plan), EDITED_SOURCE)


def type_choices() -> list[tuple[str, str]]:
    """(type id, label) of every catalogue type, then ``custom``, for a picker."""
    cat = load_catalog()
    return [(t.id, t.label) for t in cat.values()] + [("custom", "Custom size")]


def new_id(plan: Plan, base: str) -> str:
    """An id (for a piece, door or window) not used anywhere in ``plan``: ``base-1``, ``base-2``, ..."""
    used = ({r.id for r in plan.rooms} | {d.id for d in plan.doors} | {w.id for w in plan.windows}
            | {f.id for f in plan.fixtures} | {p.id for p in plan.furniture})
    n = 1
    while f"{base}-{n}" in used:
        n += 1
    return f"{base}-{n}"


def _sizes(type_id: str, width: int | None, depth: int | None,
           height: int | None) -> tuple[int | None, int | None, int | None]:
    """Sizes to store for a piece: for a catalogue type, None (or the catalogue's own value)
    means "the catalogue's size" and is stored as None; a custom piece keeps what is given
    (the plan reader then says which size is missing or not positive)."""
    given = (width, depth, height)
    if type_id == "custom":
        return tuple(None if v is None else int(v) for v in given)  # type: ignore[return-value]
    t = load_catalog().get(type_id)
    defaults = (t.width, t.depth, t.height) if t is not None else (None, None, None)
    return tuple(None if v is None or int(v) == d else int(v)  # type: ignore[return-value]
                 for v, d in zip(given, defaults, strict=True))


def add_piece(plan: Plan, type_id: str, rooms: Sequence[str], label: str = "",
              width: int | None = None, depth: int | None = None, height: int | None = None,
              access: str | None = None) -> Plan:
    """``plan`` with one more piece (not placed). Sizes left None take the catalogue's.

    Raises :class:`PlanError` (field path ``furniture[i]...``) for an unknown type, no
    room, an unknown room, a size that is not positive or a custom piece without all three.
    """
    if not rooms:
        raise PlanError(Problem(f"furniture[{len(plan.furniture)}].rooms",
                                "pick at least one room the piece may stand in"), EDITED_SOURCE)
    base = "piece" if type_id == "custom" else type_id
    w, d, h = _sizes(type_id, width, depth, height)
    piece = Piece(new_id(plan, base), type_id, tuple(rooms), label.strip(), w, d, h,
                  access=access or None)
    return validated(replace(plan, furniture=(*plan.furniture, piece)))


def _index(plan: Plan, piece_id: str) -> int:
    for i, p in enumerate(plan.furniture):
        if p.id == piece_id:
            return i
    raise PlanError(Problem("furniture", f"no piece with id {piece_id!r}"), EDITED_SOURCE)


def _with_piece(plan: Plan, i: int, piece: Piece) -> Plan:
    pieces = list(plan.furniture)
    pieces[i] = piece
    return validated(replace(plan, furniture=tuple(pieces)))


def update_piece(plan: Plan, piece_id: str, *, label: str, rooms: Sequence[str],
                 width: int | None, depth: int | None, height: int | None,
                 access: str | None = None) -> Plan:
    """``plan`` with one piece's name, rooms, sizes and bed access changed (sizes as in
    :func:`add_piece`). If the piece stands in a room it may no longer use, its placement
    and lock are dropped."""
    i = _index(plan, piece_id)
    p = plan.furniture[i]
    if not rooms:
        raise PlanError(Problem(f"furniture[{i}].rooms",
                                "pick at least one room the piece may stand in"), EDITED_SOURCE)
    placement, locked = p.placement, p.locked
    if placement is not None and placement.room not in rooms:
        placement, locked = None, False
    w, d, h = _sizes(p.type, width, depth, height)
    new = replace(p, label=label.strip(), rooms=tuple(rooms), width=w, depth=d, height=h,
                  access=access or None, placement=placement, locked=locked)
    return _with_piece(plan, i, new)


def remove_piece(plan: Plan, piece_id: str) -> Plan:
    """``plan`` without the piece. Routine trips to or from it are dropped too (a trip to a
    piece that no longer exists would make the plan invalid)."""
    _index(plan, piece_id)
    pieces = tuple(p for p in plan.furniture if p.id != piece_id)
    trips = tuple(t for t in plan.routines if piece_id not in (t.origin, t.target))
    return validated(replace(plan, furniture=pieces, routines=trips))


def lock_piece(plan: Plan, piece_id: str, locked: bool, placement: Placement | None = None) -> Plan:
    """Lock a piece where it stands (or at ``placement``), or unlock it.

    Locking a piece that has no placement and gets none raises :class:`PlanError`.
    """
    i = _index(plan, piece_id)
    p = plan.furniture[i]
    where = placement or p.placement
    if locked and where is None:
        raise PlanError(Problem(f"furniture[{i}].locked",
                                f"{p.label or p.id} has no place yet, so it cannot be locked",
                                "keep an arrangement first, then lock pieces in it"),
                        EDITED_SOURCE)
    return _with_piece(plan, i, replace(p, placement=where, locked=locked))


def keep_layout(plan: Plan, layout: Layout) -> Plan:
    """``plan`` with every piece placed as in ``layout`` (locks are kept)."""
    return validated(plan.with_layout(layout))


def with_rule_choice(plan: Plan, set_id: str, overrides: dict[str, int | str]) -> Plan:
    """``plan`` governed by rule set ``set_id`` with ``overrides`` (rule id -> mm or word).

    Raises :class:`~roomfit.errors.RuleError` for an unknown set, rule or bad value.
    """
    try:
        load_ruleset(set_id, overrides)
    except RuleError as e:
        raise RuleError(e.problems, EDITED_SOURCE) from None
    choice = RuleChoice(set_id, tuple(sorted(overrides.items())))
    return validated(plan.with_rules(choice))


def piece_rows(plan: Plan, rules: RuleSet) -> list[dict[str, Any]]:
    """One row per piece for the furniture table: sizes as resolved (catalogue or custom);
    plans measured in feet or inches get the size and place in feet and inches too."""
    specs = {s.id: s for s in resolve_pieces(plan, rules)}
    imperial = plan.unit in IMPERIAL
    rows = []
    for p in plan.furniture:
        s = specs[p.id]
        pl = p.placement
        row: dict[str, Any] = {
            "id": p.id,
            "name": s.label,
            "type": p.type,
            "size (w x d x h, mm)": f"{s.width} x {s.depth} x {s.height}",
        }
        if imperial:
            row["size"] = " x ".join(show_length(v, plan.unit) for v in (s.width, s.depth, s.height))
        where = "" if pl is None else (
            f"({show_length(pl.x, plan.unit)}, {show_length(pl.y, plan.unit)})" if imperial
            else f"({pl.x}, {pl.y})")
        row.update({
            "own size": any(v is not None for v in (p.width, p.depth, p.height)),
            "may stand in": ", ".join(p.rooms),
            "placed": "" if pl is None else f"{pl.room} at {where}, {pl.rotation} deg",
            "locked": p.locked,
        })
        rows.append(row)
    return rows


def rule_rows(rules: RuleSet) -> list[dict[str, Any]]:
    """One row per rule: value as the source states it, in mm, the source and its status."""
    rows = []
    for r in rules.rules:
        value = r.value if r.unit == "text" else f"{r.value:g} {r.unit}"
        rows.append({
            "rule": r.id,
            "what": r.description,
            "value": str(value),
            "mm": "" if r.unit == "text" else str(r.mm),
            "source": r.source,
            "status": "overridden for this client" if r.overridden else r.status,
        })
    return rows


def findings_rows(findings: Sequence[Any], unit: str = "mm") -> list[dict[str, Any]]:
    """One row per audit finding (``check.Finding``), failures first, in the plan's ``unit``
    (feet and inches, square feet for plans in ``in`` or ``ft``)."""
    from roomfit.audit.check import AREA_RULES

    ordered = sorted(findings, key=lambda f: f.ok)
    return [{
        "result": "pass" if f.ok else "FAIL",
        "rule": f.rule,
        "finding": in_plan_units(f.message, unit),
        "measured": show_measure(f.measured, unit, area=f.rule in AREA_RULES),
        "required": show_measure(f.required, unit, area=f.rule in AREA_RULES),
        "pieces": ", ".join(f.pieces),
        "room": f.room or "",
        "source": f.source,
    } for f in ordered]


def route_rows(routes: Any) -> list[dict[str, Any]]:
    """One row per routine trip of ``routes.RouteScores``: length, narrowest point, doors."""
    rows = []
    for t in routes.trips:
        rows.append({
            "trip": t.name + (" (night)" if t.night else ""),
            "per day": t.per_day,
            "length (m)": None if t.length_mm is None else round(t.length_mm / 1000, 1),
            "metres a day": round(t.metres_per_day, 1),
            "narrowest (mm)": None if t.narrowest_mm is None else round(t.narrowest_mm),
            "turns": t.turns,
            "doorways": ", ".join(t.doors),
            "note": t.reason if not t.reachable else "; ".join(t.flags),
        })
    return rows


def comparison_rows(comparison: Any, best_mark: str = " ★") -> list[dict[str, str]]:
    """The metrics of ``compare.Comparison`` as table rows: one row per metric, one column per
    arrangement, the best value(s) marked with ``best_mark``."""
    from roomfit.present.compare import METRICS

    rows = []
    for m in METRICS:
        row = {"metric": m.label}
        for i, r in enumerate(comparison.rows):
            row[r.name] = r.text(m.id) + (best_mark if comparison.is_best(m.id, i) else "")
        rows.append(row)
    return rows


def describe_outcome(result: Any, time_limit: float) -> Outcome:
    """Plain words for a solve result: the one wording the CLI uses too
    (``roomfit.solve.outcome.describe``)."""
    return describe(result, time_limit)


def run_polling(work: Callable[[Callable[[str], None]], T], tick: Callable[[str], None],
                every: float = 0.25) -> T:
    """Run ``work(progress)`` in a worker thread and return its result (or raise its error).

    ``progress`` may be called from any thread (the solver reports from its own worker
    threads); the messages are queued and ``tick(latest message)`` is called from *this*
    thread every ``every`` seconds until ``work`` ends, so a page can redraw its progress bar
    where its drawing functions work.
    """
    messages: queue.SimpleQueue[str] = queue.SimpleQueue()
    box: dict[str, Any] = {}

    def run() -> None:
        try:
            box["result"] = work(messages.put)
        except BaseException as e:  # noqa: BLE001 - handed to the calling thread below
            box["error"] = e

    worker = threading.Thread(target=run, name="roomfit-page-work", daemon=True)
    worker.start()
    latest = ""
    while True:
        worker.join(every)
        while not messages.empty():
            latest = messages.get_nowait()
        if not worker.is_alive():
            break
        tick(latest)
    if "error" in box:
        raise box["error"]
    return box["result"]


def file_stem(plan: Plan) -> str:
    """A safe file name stem from the plan's name (letters, digits and dashes)."""
    stem = "".join(c.lower() if c.isalnum() else "-" for c in plan.name).strip("-")
    while "--" in stem:
        stem = stem.replace("--", "-")
    return stem[:60] or "plan"


_MARKDOWN = re.compile(r"([\\`*_\[\]()#!|<>~$:])")


def plain(text: str) -> str:
    """``text`` escaped so that Streamlit's Markdown shows it as typed: no links, images,
    emphasis, colour or HTML from a plan's name, client, address or labels.

    >>> print(plain("**Flat** [x](http://a.b) <b>, Ground-floor 2.5"))
    \\*\\*Flat\\*\\* \\[x\\]\\(http\\://a.b\\) \\<b\\>, Ground-floor 2.5
    """
    return _MARKDOWN.sub(r"\\\1", " ".join(text.split()))


_FOUND = re.compile(r"rooms? ([^:]+): candidate (\d+)")
_FAILED = re.compile(r"rooms? ([^:]+): layout failed")


def progress_words(line: str, wanted: int, left_s: float | None, found: dict[str, int]) -> str:
    """A solver progress line in the user's words, e.g. ``"bedroom: 2 of 3 arrangements
    found, 6 s left"``. ``found`` (room group -> arrangements so far) is updated in place so
    later lines can say how far each group is; ``left_s`` None leaves out the time left.

    >>> seen = {}
    >>> progress_words("[ 1.2 s] round 4: rooms bedroom: candidate 2 (objective 7)", 3, 6.2, seen)
    'bedroom: 2 of 3 arrangements found, 6 s left'
    >>> progress_words("[ 1.5 s] round 5: rooms bedroom: layout failed route.reach; ...", 3, 5.9, seen)
    'bedroom: 2 of 3 arrangements found; one that broke a rule was set aside, 6 s left'
    """
    left = "" if left_s is None else f", {max(0.0, left_s):.0f} s left"
    m = _FOUND.search(line)
    if m:
        found[m.group(1)] = int(m.group(2))
        return f"{m.group(1)}: {m.group(2)} of {wanted} arrangements found{left}"
    m = _FAILED.search(line)
    if m:
        n = found.get(m.group(1), 0)
        return (f"{m.group(1)}: {n} of {wanted} arrangements found; one that broke a rule "
                f"was set aside{left}")
    return f"Searching: {sum(found.values())} arrangements found so far{left}"
