"""Clearance rules of the audit: pieces in their rooms and inside the walls, no overlaps,
backs against walls, use zones and fitting zones free at their own size, doors wide enough
with their swing and approach floor clear, windows unblocked.

Each ``check_*`` takes the arrangement's :class:`~roomfit.audit.walkway.Floor` and returns
its findings (see ``docs/audit.md`` for each method and the published wording it follows).
"""

from __future__ import annotations

from collections.abc import Iterable

from shapely import Point, Polygon
from shapely.affinity import translate
from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from roomfit.audit import geometry as geo
from roomfit.audit.findings import Finding, cm2, outline, point, source_of
from roomfit.audit.group_measures import back_edge, wall_share
from roomfit.audit.transfer import fitting_zone
from roomfit.audit.walkway import TOUCH_MM2, Floor, standing
from roomfit.rules.groups import param

__all__ = [
    "WALL_SHARE",
    "check_rooms",
    "check_overlap",
    "check_walls",
    "check_zones",
    "check_doors",
    "check_windows",
]

#: Share of a piece's back edge that must lie on the room boundary (``wall.against``): the
#: ``wall.share`` value of ``data/groups.toml`` (its gap ``wall.gap``), measured by
#: :func:`roomfit.audit.group_measures.wall_share`, the one "against a wall" measure.
WALL_SHARE = param("wall.share").value


def check_rooms(ctx: Floor) -> list[Finding]:
    out: list[Finding] = []
    missing = [p.id for p in ctx.plan.furniture if p.placement is None]
    if missing:
        out.append(Finding("piece.room", False,
                           f"{len(missing)} piece(s) not placed: {', '.join(missing)}",
                           pieces=tuple(missing)))
    for pid, pc in ctx.placed.items():
        room = pc.placement.room
        allowed = pc.spec.rooms
        ok = room in allowed and room in ctx.rooms
        msg = (f"{pid} stands in {room}" if ok else
               f"{pid} stands in {room!r}, allowed: {', '.join(allowed)}")
        out.append(Finding("piece.room", ok, msg, pieces=(pid,), room=room,
                           where=point(pc.shape), outline=() if ok else outline(pc.shape)))
        if room not in ctx.rooms:
            continue
        outside = pc.shape.difference(ctx.rooms[room])
        ok = outside.area <= TOUCH_MM2
        msg = (f"{pid} lies inside {room}" if ok else
               f"{pid} reaches {cm2(outside.area)} beyond the walls of {room}")
        out.append(Finding("piece.inside", ok, msg, measured=round(outside.area, 1),
                           required=0.0, pieces=(pid,), room=room,
                           where=point(outside if not ok else pc.shape),
                           outline=outline(outside) if not ok else ()))
    return out


def check_overlap(ctx: Floor) -> list[Finding]:
    """Standing pieces overlap neither each other nor a fitting; a piece that lies flat (a
    rug) may lie under pieces but not under a fitting (a kitchen run or a WC stands on the
    floor itself, so a rug there is cut or rucked)."""
    out: list[Finding] = []
    items = [(pid, pc.shape, pc.placement.room) for pid, pc in standing(ctx)]
    flat = [(pid, pc.shape, pc.placement.room) for pid, pc in ctx.placed.items()
            if geo.lies_flat(pc.spec)]
    fixtures = [(f.id, ctx.fixtures[f.id], f.room) for f in ctx.plan.fixtures]
    for i, (a, sa, room) in enumerate(items + flat):
        for b, sb, _ in items[i + 1:] + fixtures:
            if not sa.intersects(sb):
                continue
            inter = sa.intersection(sb)
            if inter.area > TOUCH_MM2:
                out.append(Finding(
                    "piece.overlap", False,
                    f"{a} and {b} overlap by {cm2(inter.area)}",
                    measured=round(inter.area, 1), required=0.0, pieces=(a, b), room=room,
                    where=point(inter), outline=outline(inter)))
    if not out:
        out.append(Finding("piece.overlap", True,
                           f"no overlap among {len(items)} pieces and {len(fixtures)} fittings",
                           measured=0.0, required=0.0, pieces=tuple(ctx.placed)))
    return out


def check_walls(ctx: Floor) -> list[Finding]:
    out: list[Finding] = []
    for pid, pc in ctx.placed.items():
        if not pc.spec.against_wall or pc.placement.room not in ctx.rooms:
            continue
        edge = back_edge(pc.shape.bounds, pc.placement.rotation)
        share = wall_share(edge, ctx.rooms[pc.placement.room].boundary)
        on = share * edge.length
        ok = share >= WALL_SHARE - 1e-9
        msg = (f"{pid} has {share:.0%} of its back against a wall"
               + ("" if ok else f" (needs {WALL_SHARE:.0%})"))
        out.append(Finding("wall.against", ok, msg, measured=round(on, 1),
                           required=round(WALL_SHARE * edge.length, 1), pieces=(pid,),
                           room=pc.placement.room, where=point(edge),
                           outline=() if ok else outline(pc.shape)))
    return out


def _blockers(zone: BaseGeometry, shapes: Iterable[tuple[str, BaseGeometry]],
              skip: str = "") -> tuple[list[str], BaseGeometry]:
    ids: list[str] = []
    parts: list[BaseGeometry] = []
    for sid, s in shapes:
        if sid == skip or not zone.intersects(s):
            continue
        inter = zone.intersection(s)
        if inter.area > TOUCH_MM2:
            ids.append(sid)
            parts.append(inter)
    return ids, unary_union(parts) if parts else Polygon()


def check_zones(ctx: Floor) -> list[Finding]:
    out: list[Finding] = []
    pieces = [(pid, pc.shape) for pid, pc in standing(ctx)]
    solid = pieces + list(ctx.fixtures.items())
    for pid, pc in ctx.placed.items():
        room = ctx.rooms.get(pc.placement.room)
        for z, zp in geo.use_zones(pc.spec, pc.placement):
            source = source_of(ctx.rules.get(z.rule)) if ctx.rules.has(z.rule) else ""
            ids, blocked = _blockers(zp, solid, skip=pid)
            through = zp.difference(room).area if room is not None else 0.0
            ok = not ids and through <= TOUCH_MM2
            what = f"{z.side} zone of {pid} ({z.depth} mm, {z.kind})"
            if ok:
                msg = f"the {what} is clear"
            elif ids:
                msg = f"the {what} is blocked by {', '.join(ids)}"
            else:
                msg = f"the {what} reaches through a wall ({cm2(through)} outside)"
            out.append(Finding("zone.clear", ok, msg, measured=round(blocked.area + through, 1),
                               required=0.0, source=source, pieces=(pid, *ids),
                               room=pc.placement.room,
                               where=point(blocked if ids else zp), outline=outline(zp)))
    for f in ctx.plan.fixtures:
        fz = fitting_zone(ctx.plan, ctx.rules, f)  # with a WC's transfer clearance
        if fz is None:
            continue
        ids, blocked = _blockers(fz, pieces)
        ok = not ids
        msg = (f"the zone of fitting {f.id} is clear" if ok else
               f"the zone of fitting {f.id} is blocked by {', '.join(ids)}")
        out.append(Finding("zone.clear", ok, msg, measured=round(blocked.area, 1),
                           required=0.0, pieces=(f.id, *ids), room=f.room,
                           where=point(blocked if ids else fz), outline=outline(fz)))
    return out


def check_doors(ctx: Floor) -> list[Finding]:
    out: list[Finding] = []
    need = ctx.rules.get("door.min_width")
    pieces = [(pid, pc.shape) for pid, pc in standing(ctx)]
    for ds in ctx.doors:
        d = ds.door
        ok = d.width + 1e-9 >= need.exact_mm
        msg = (f"door {d.id} is {d.width} mm wide"
               + ("" if ok else f", narrower than {need.exact_mm:.0f} mm"))
        out.append(Finding("door.width", ok, msg, measured=float(d.width),
                           required=need.exact_mm, source=source_of(need), pieces=(d.id,),
                           room=d.rooms[0], where=point(ds.opening)))
        floor = [g for g in [ds.swing, *ds.approach.values()] if g is not None]
        if not floor:
            continue
        clear = unary_union(floor)
        ids, blocked = _blockers(clear, pieces)
        ok = not ids
        msg = (f"the swing and approach of door {d.id} are clear" if ok else
               f"the swing or approach of door {d.id} is blocked by {', '.join(ids)}")
        src = source_of(ctx.rules.get("door.approach_swing"))
        out.append(Finding("door.swing_clear", ok, msg, measured=round(blocked.area, 1),
                           required=0.0, source=src, pieces=(d.id, *ids), room=d.rooms[0],
                           where=point(blocked if ids else ds.opening),
                           outline=outline(clear)))
        out += _leaf_through_wall(ctx, ds)
        out += _approach_through_wall(ctx, ds)
    return out


def _far_face(ctx: Floor, ds: geo.DoorShape, rid: str, shape: BaseGeometry) -> BaseGeometry:
    """``shape`` drawn from the host room's wall line, moved across a thick wall to the face
    of room ``rid`` (a no-op for the host room and for walls drawn at zero thickness)."""
    if rid == ds.door.rooms[0]:
        return shape
    t = ctx.rooms[rid].exterior.distance(Point(ds.door.at))
    n = ds.inward[rid]
    return translate(shape, n[0] * t, n[1] * t)


def _approach_through_wall(ctx: Floor, ds: geo.DoorShape) -> list[Finding]:
    """``door.approach``: fails when walls cut short the clear floor the rule set asks in
    front of a door (a door in a corner with no room beyond its latch: 2010 ADA Table
    404.2.4.1 asks 18 in there on the pull side)."""
    out: list[Finding] = []
    d = ds.door
    for rid, want in ds.asked.items():
        room = ctx.rooms.get(rid)
        if room is None:
            continue
        through = _far_face(ctx, ds, rid, want).difference(room)
        if ds.swing is not None and rid == d.swings_into:
            through = through.difference(_far_face(ctx, ds, rid, ds.swing))  # reported above
        if through.area <= TOUCH_MM2 * 100:
            continue
        rule = ctx.rules.get("door.approach_swing" if rid == d.swings_into
                             else "door.approach_other")
        out.append(Finding(
            "door.approach", False,
            f"walls cut {cm2(through.area)} off the clear floor asked in front of door {d.id} "
            f"in {rid} ({rule.exact_mm:.0f} mm deep"
            + (f", {ctx.rules.get('door.approach_latch').exact_mm:.0f} mm beyond the latch"
               if rid == d.swings_into and ctx.rules.mm("door.approach_latch") else "")
            + ")", measured=round(through.area, 1), required=0.0, source=source_of(rule),
            pieces=(d.id,), room=rid, where=point(through), outline=outline(want)))
    if ds.asked and not out:
        out.append(Finding("door.approach", True,
                           f"the clear floor asked in front of door {d.id} fits between the walls",
                           measured=0.0, required=0.0, pieces=(d.id,), room=d.rooms[0],
                           where=point(ds.opening)))
    return out


def _leaf_through_wall(ctx: Floor, ds: geo.DoorShape) -> list[Finding]:
    """A failing ``door.swing_clear`` when the leaf's sweep runs through the walls of the room
    it opens into (a 900 mm leaf into a 600 mm deep cupboard): it cannot open fully. Across
    a thick wall the leaf is taken as hung at the far face, so the wall itself does not count."""
    d = ds.door
    into = d.swings_into
    room = ctx.rooms.get(into) if into is not None else None
    if ds.swing is None or into is None or room is None:
        return []
    swing = _far_face(ctx, ds, into, ds.swing)
    through = swing.difference(room)
    if through.area <= TOUCH_MM2:
        return []
    return [Finding("door.swing_clear", False,
                    f"the leaf of door {d.id} cannot open fully: its swing runs "
                    f"{cm2(through.area)} through the walls of {d.swings_into}",
                    measured=round(through.area, 1), required=0.0, pieces=(d.id,),
                    room=d.swings_into, where=point(through), outline=outline(swing))]


def check_windows(ctx: Floor) -> list[Finding]:
    out: list[Finding] = []
    rule = ctx.rules.get("window.band")
    for w in ctx.plan.windows:
        band = geo.window_band(ctx.plan, w, rule.mm)
        tall = [(pid, pc.shape) for pid, pc in ctx.placed.items()
                if pc.spec.height > w.sill or pc.spec.tall]
        ids, blocked = _blockers(band, tall)
        ok = not ids
        msg = (f"window {w.id} is clear of pieces taller than its {w.sill} mm sill" if ok else
               f"window {w.id} is blocked by {', '.join(ids)} (taller than its {w.sill} mm sill,"
               f" within {rule.mm} mm)")
        out.append(Finding("window.clear", ok, msg, measured=round(blocked.area, 1),
                           required=0.0, source=source_of(rule), pieces=(w.id, *ids), room=w.room,
                           where=point(blocked if ids else band), outline=outline(band)))
    return out

