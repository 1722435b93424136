"""The functional-group rules of the layout-quality audit, one function per rule family,
each measuring an arrangement (:class:`~roomfit.audit.group_measures.Ctx`) and returning its
:class:`~roomfit.audit.group_measures.GroupCheck` records (what each asks: ``docs/quality.md``;
the entry point is :func:`roomfit.audit.quality.quality`).
"""

from __future__ import annotations

import math
from collections.abc import Callable

from shapely import LineString, Point

from roomfit.audit.geometry import lies_flat, side_direction, window_segment
from roomfit.audit.group_measures import (
    Ctx,
    GroupCheck,
    Kind,
    Placed,
    angle,
    back_edge,
    centre,
    compass,
    free_depth,
    front_mid,
    group_check,
    metres,
    of_category,
    reach_range,
    side_segment,
    used_long_sides,
    view_range,
    wall_categories,
    wall_share,
)
from roomfit.audit.transfer import clear_width, wc_transfer
from roomfit.rules.catalog import PieceSpec
from roomfit.rules.groups import param

__all__ = ["RULES", "RUG_CENTRES"]

def _view(ctx: Ctx) -> list[GroupCheck]:
    out: list[GroupCheck] = []
    angle_max = param("view.off_axis")
    for sid, screen in ctx.placed.items():
        if "viewing" not in screen.spec.groups or not screen.spec.screen:
            continue
        seats = ctx.in_room(screen.at.room, lambda s: "viewing" in s.groups and s.view_max > 0)
        best = None
        for pid, seat in seats:
            lo, hi = view_range(seat.spec, screen.spec)
            a, b = front_mid(seat), front_mid(screen)
            dist = round(math.dist(a, b), 1)
            off = max(angle(side_direction("front", screen.at.rotation), (a[0] - b[0], a[1] - b[1])),
                      angle(side_direction("front", seat.at.rotation), (b[0] - a[0], b[1] - a[1])))
            miss = max(0.0, lo - dist, dist - hi) + 100 * max(0.0, off - angle_max.value)
            if best is None or miss < best[0]:
                best = (miss, pid, seat, lo, hi, dist, off, a)
        if best is None:
            continue
        _, pid, seat, lo, hi, dist, off, a = best
        pair = f"{ctx.name(pid)} to {ctx.name(sid)}"
        out.append(group_check("group.view", pair, lo <= dist <= hi, dist, "mm",
                          f"{metres(lo)}-{metres(hi)}", seat.spec.label + ": catalogue viewing range",
                          (pid, sid), seat.at.room, a))
        out.append(group_check("group.view_angle", pair + ", off axis", off <= angle_max.value, off,
                          "deg", f"at most {angle_max.value:.0f}°", angle_max.cited,
                          (pid, sid), seat.at.room, a))
        out.append(_view_clear(ctx, pid, sid, pair))
    return out


def _view_clear(ctx: Ctx, pid: str, sid: str, pair: str) -> GroupCheck:
    """``group.view_clear``: no standing piece taller than ``view.clear_height`` (a coffee
    table is lower) on the floor between the seat's front and the screen's (the convex hull
    of the two front edges); measured: the tallest such piece's height (0 when clear)."""
    seat, screen = ctx.placed[pid], ctx.placed[sid]
    limit = param("view.clear_height")
    sight = side_segment(seat, "front").union(side_segment(screen, "front")).convex_hull
    tall = [(q.spec.height, qid) for qid, q in ctx.in_room(seat.at.room, lambda s: not lies_flat(s))
            if qid not in (pid, sid) and q.spec.height > limit.mm
            and q.shape.intersection(sight).area >= 1.0]
    height, qid = max(tall, default=(0, ""))
    label = pair + ", line of sight" + (f" ({ctx.name(qid)} in the way)" if qid else "")
    return group_check("group.view_clear", label, not tall, height, "mm",
                       f"nothing above {metres(limit.mm)} between", limit.cited,
                       (pid, sid, *([qid] if qid else [])), seat.at.room, front_mid(seat))


def _reach(ctx: Ctx) -> list[GroupCheck]:
    out: list[GroupCheck] = []
    tol = param("reach.off_axis")
    for tid, table in ctx.placed.items():
        for relation, cat in table.spec.relations:
            if relation != "in_front":
                continue
            seats = ctx.in_room(table.at.room, of_category(cat))
            best = None
            for pid, seat in seats:
                lo, hi = reach_range(table.spec, seat.spec)
                u = side_direction("front", seat.at.rotation)
                fx, fy = front_mid(seat)
                gap = min((cx - fx) * u[0] + (cy - fy) * u[1] for cx, cy in table.shape.exterior.coords)
                (sx, sy), (tx, ty) = centre(seat), centre(table)
                lateral = abs((tx - sx) * u[1] - (ty - sy) * u[0])
                miss = max(0.0, lo - gap, gap - hi) + max(0.0, lateral - tol.mm)
                if best is None or miss < best[0]:
                    best = (miss, pid, seat, lo, hi, gap, lateral)
            if best is None:
                continue
            _, pid, seat, lo, hi, gap, lateral = best
            pair = f"{ctx.name(tid)} to {ctx.name(pid)} front"
            out.append(group_check("group.reach", pair, lo <= gap <= hi, gap, "mm",
                              f"{metres(lo)}-{metres(hi)}", table.spec.label + ": catalogue gap range",
                              (tid, pid), table.at.room, centre(table)))
            out.append(group_check("group.reach_axis", f"{ctx.name(tid)} off the {ctx.name(pid)}'s "
                              "centre line", lateral <= tol.mm, lateral, "mm",
                              f"at most {metres(tol.mm)}", tol.cited, (tid, pid), table.at.room,
                              centre(table)))
    return out


def _head_half(bed: Placed, side: str) -> LineString:
    """The half of a long side of a bed next to its head."""
    seg = side_segment(bed, side)
    head = back_edge(bed.shape.bounds, bed.at.rotation)
    (ax, ay), (bx, by) = seg.coords
    mx, my = (ax + bx) / 2, (ay + by) / 2
    end = (ax, ay) if head.distance(Point(ax, ay)) < head.distance(Point(bx, by)) else (bx, by)
    return LineString([end, (mx, my)])


def _bedside(ctx: Ctx) -> list[GroupCheck]:
    out: list[GroupCheck] = []
    stands = [(pid, p, cat) for pid, p in ctx.placed.items()
              for rel, cat in p.spec.relations if rel == "beside_head"]
    options = []  # (distance, stand, bed, side)
    for pid, p, cat in stands:
        for bid, bed in ctx.in_room(p.at.room, of_category(cat)):
            for side in used_long_sides(bed.spec):
                options.append((p.shape.distance(_head_half(bed, side)), pid, bid, side))
    options.sort()
    taken: set[tuple[str, str]] = set()
    chosen: dict[str, tuple[float, str, str]] = {}
    for free_only in (True, False):  # first one nightstand per free side, then any side
        for d, pid, bid, side in options:
            if pid in chosen or (free_only and (bid, side) in taken):
                continue
            chosen[pid] = (d, bid, side)
            taken.add((bid, side))
    for pid, p, _ in stands:
        if pid not in chosen:
            continue
        d, bid, side = chosen[pid]
        gap = p.spec.gap_max
        out.append(group_check("group.bedside", f"{ctx.name(pid)} to {ctx.name(bid)} head ({side} side)",
                          d <= gap, d, "mm", f"touching (within {metres(gap)})",
                          p.spec.label + ": catalogue gap range", (pid, bid), p.at.room,
                          centre(p)))
    return out


def _bed(ctx: Ctx) -> list[GroupCheck]:
    out: list[GroupCheck] = []
    share, gap = param("wall.share"), param("wall.gap")
    for bid, bed in ctx.in_room_all(lambda s: "sleeping" in s.groups and s.category == "bed"):
        edge = back_edge(bed.shape.bounds, bed.at.rotation)
        room = ctx.rooms.get(bed.at.room)
        on = wall_share(edge, room.exterior) if room is not None else 0.0
        mid = edge.interpolate(0.5, normalized=True)
        out.append(group_check("group.bed_wall", f"{ctx.name(bid)} head against a wall",
                          on >= share.value - 1e-9, 100 * on, "%",
                          f"at least {100 * share.value:.0f} %", share.cited, (bid,),
                          bed.at.room, (mid.x, mid.y)))
        wins = [window_segment(ctx.plan, w) for w in ctx.plan.windows if w.room == bed.at.room]
        under = sum(edge.intersection(w.buffer(gap.mm, cap_style="flat")).length for w in wins)
        out.append(group_check("group.bed_window", f"{ctx.name(bid)} head under a window",
                          under <= 0, under, "mm", "none",
                          "draughts and cold glass at the pillow, the window hard to reach "
                          "(common-practice)", (bid,), bed.at.room, (mid.x, mid.y)))
    return out


def _dining(ctx: Ctx) -> list[GroupCheck]:
    out: list[GroupCheck] = []
    need = param("dining.pull_out")
    for tid, t in ctx.in_room_all(lambda s: "dining" in s.groups):
        for z in t.spec.zones:
            if z.kind != "dining_seat":
                continue
            depth = free_depth(ctx, tid, z.side)
            way = compass(side_direction(z.side, t.at.rotation))
            out.append(group_check("group.dining", f"chairs at {ctx.name(tid)} ({way} side), free depth",
                              depth >= need.mm, depth, "mm", f"at least {metres(need.mm)}",
                              need.cited, (tid,), t.at.room, centre(t)))
    return out


def _desk(ctx: Ctx) -> list[GroupCheck]:
    out: list[GroupCheck] = []
    need, lo, hi = param("desk.chair"), param("desk.height_min"), param("desk.height_max")
    for did, d in ctx.in_room_all(lambda s: "work" in s.groups):
        depth = free_depth(ctx, did, "front")
        out.append(group_check("group.desk_chair", f"chair room at {ctx.name(did)}", depth >= need.mm,
                          depth, "mm", f"at least {metres(need.mm)}", need.cited, (did,), d.at.room,
                          front_mid(d)))
        h = d.spec.height
        out.append(group_check("group.desk_height", f"{ctx.name(did)} top height (knee space)",
                          lo.mm <= h <= hi.mm, h, "mm", f"{metres(lo.mm)}-{metres(hi.mm)}", lo.cited,
                          (did,), d.at.room, centre(d)))
    return out


def _talk(ctx: Ctx) -> list[GroupCheck]:
    out: list[GroupCheck] = []
    far, turn = param("talk.distance"), param("talk.turn")
    rooms = {p.at.room for p in ctx.placed.values()}
    for room in sorted(rooms):
        seats = ctx.in_room(room, lambda s: "conversation" in s.groups)
        if len(seats) < 2:
            continue
        for pid, seat in seats:
            a = front_mid(seat)
            u = side_direction("front", seat.at.rotation)
            qid, other = min(((q, o) for q, o in seats if q != pid),
                             key=lambda qo: math.dist(a, front_mid(qo[1])))
            b = front_mid(other)
            d = round(math.dist(a, b), 1)
            back = a[0] - u[0] * seat.spec.depth, a[1] - u[1] * seat.spec.depth
            ang = angle(u, (b[0] - back[0], b[1] - back[1]))
            pair = f"{ctx.name(pid)} to {ctx.name(qid)}"
            out.append(group_check("group.talk", pair, d <= far.mm, d, "mm", f"at most {metres(far.mm)}",
                              far.cited, (pid, qid), room, a))
            out.append(group_check("group.talk_turn", pair + ", turned away by", ang <= turn.value,
                              ang, "deg", f"at most {turn.value:.0f}°", turn.cited, (pid, qid),
                              room, a))
    return out


#: The centre of each group a rug may lie under, in the order a rug is given to a group (the
#: placement model aims at the same piece: ``roomfit.solve.groups.rug_terms``).
RUG_CENTRES: tuple[Callable[[PieceSpec], bool], ...] = (
    lambda s: any(r == "in_front" for r, _ in s.relations),  # coffee table
    lambda s: "dining" in s.groups,
    lambda s: "sleeping" in s.groups and s.category == "bed",
    lambda s: "conversation" in s.groups,
)


def _rug(ctx: Ctx) -> list[GroupCheck]:
    out: list[GroupCheck] = []
    need = param("rug.under")
    for rid, rug in ctx.in_room_all(lambda s: "rug" in s.groups):
        centres = next((c for pred in RUG_CENTRES if (c := ctx.in_room(rug.at.room, pred))), [])
        if not centres:
            continue
        qid, p = max(centres, key=lambda qp: qp[1].shape.intersection(rug.shape).area)
        share = p.shape.intersection(rug.shape).area / p.shape.area
        out.append(group_check("group.rug", f"{ctx.name(qid)} on {ctx.name(rid)}",
                          share >= need.value - 1e-9, 100 * share, "%",
                          f"at least {100 * need.value:.0f} %", need.cited, (rid, qid),
                          rug.at.room, centre(rug)))
    return out


def _transfer(ctx: Ctx) -> list[GroupCheck]:
    """The transfer space beside a WC (:mod:`roomfit.audit.transfer`: clear width from the
    side wall across the WC) and beside a bed, on the side the plan says the client transfers
    from (``transfer``): for a bed, the free depth over that long side less the head end its
    zone leaves out, against the rule set's depth for that zone. Each against the set's
    published figure, with its source."""
    out: list[GroupCheck] = []
    for f in ctx.plan.fixtures:
        t = wc_transfer(ctx.plan, ctx.rules, f)
        if t is None:
            continue
        standing = [p.shape for p in ctx.placed.values() if p.at.room == f.room
                    and not lies_flat(p.spec)]
        width = clear_width(ctx.plan, t, standing)
        c = t.area.centroid
        out.append(group_check("access.transfer", f"transfer space beside {f.label.lower()} "
                               f"({f.transfer} side), from the side wall", width >= t.width,
                               width, "mm", f"at least {metres(t.width)}", t.source, (f.id,),
                               f.room, (c.x, c.y)))
    for pid, p in ctx.placed.items():
        side = ctx.plan.piece(pid).transfer
        zone = next((z for z in p.spec.zones if z.side == side), None)
        if zone is None:
            continue
        depth = free_depth(ctx, pid, zone.side, zone.inset)
        rule = ctx.rules.get(zone.rule) if ctx.rules.has(zone.rule) else None
        out.append(group_check("access.transfer", f"transfer space beside {ctx.name(pid)} "
                               f"({side} side)", depth >= zone.depth, depth, "mm",
                               f"at least {metres(zone.depth)}",
                               rule.source if rule is not None else zone.rule, (pid,),
                               p.at.room, centre(p)))
    return out


def _wall_pref(ctx: Ctx) -> list[GroupCheck]:
    out: list[GroupCheck] = []
    share = param("wall.share")
    cats = set(wall_categories())
    for pid, p in ctx.in_room_all(lambda s: s.category in cats and not s.against_wall):
        room = ctx.rooms.get(p.at.room)
        edge = back_edge(p.shape.bounds, p.at.rotation)
        on = wall_share(edge, room.exterior) if room is not None else 0.0
        out.append(group_check("pref.wall", f"{ctx.name(pid)} back to a wall",
                          on >= share.value - 1e-9, 100 * on, "%",
                          f"at least {100 * share.value:.0f} %",
                          "storage and seating backed by a wall leave the room open "
                          "(common-practice)", (pid,), p.at.room, centre(p), Kind.PREFERENCE))
    return out


RULES: tuple[Callable[[Ctx], list[GroupCheck]], ...] = (
    _view, _reach, _bedside, _bed, _dining, _desk, _talk, _rug, _transfer, _wall_pref)

