"""GeoJSON export of a plan (RFC 7946 FeatureCollection) in local plan coordinates.

Coordinates are the plan's own: **metres**, x east and y north from the plan's origin, not
longitude and latitude. RFC 7946 §4 allows another coordinate reference system only "by prior
arrangement"; the collection says so in its ``roomfit`` member (``units``, ``crs``), and GIS
tools should treat the file as a local engineering drawing. Polygon exterior rings run
counter-clockwise and holes clockwise (RFC 7946 §3.1.6); coordinates are rounded to 0.1 mm.

Every feature has ``properties.kind`` (``room``, ``door``, ``door_swing``, ``window``,
``fitting``, ``fitting_zone``, ``piece``, ``use_zone``), ``properties.id`` (the plan's id of
the room, door, window, fitting or piece it belongs to) and ``properties.label``; the feature's
own ``id`` is ``"<kind>:<id>"`` (use zones add the side), unique in the collection. Lengths in
properties end in ``_mm``, areas in ``_m2``.

>>> from roomfit.plan.data import Plan, Room
>>> from roomfit.rules.sets import load_ruleset
>>> fc = to_geojson(Plan("Box", (Room("r", "Room", "living", ((0, 0), (3000, 0), (3000, 2000), (0, 2000))),)),
...                 load_ruleset("everyday"))
>>> fc["features"][0]["geometry"]["coordinates"][0][:3]
[[0.0, 0.0], [3.0, 0.0], [3.0, 2.0]]
>>> fc["features"][0]["properties"]["area_m2"]
6.0
"""

from __future__ import annotations

from typing import Any

import shapely
from shapely import Polygon
from shapely.geometry import mapping
from shapely.geometry.base import BaseGeometry
from shapely.geometry.polygon import orient

from roomfit.audit.geometry import (
    door_leaf,
    door_shape,
    fixture_polygon,
    fixture_zone,
    footprint,
    room_polygon,
    side_direction,
    use_zones,
    window_segment,
)
from roomfit.plan.data import Plan
from roomfit.rules.catalog import resolve_pieces
from roomfit.rules.sets import RuleSet

__all__ = ["CRS_NOTE", "to_geojson"]

#: How the collection describes its coordinates.
CRS_NOTE = ("local plan coordinates in metres: x east, y north from the plan's origin; "
            "not longitude/latitude (RFC 7946 section 4, by prior arrangement)")

_COMPASS = {(0, 1): "north", (-1, 0): "west", (0, -1): "south", (1, 0): "east"}


def _geometry(geom: BaseGeometry) -> dict[str, Any]:
    """GeoJSON geometry in metres, polygons oriented as RFC 7946 asks."""
    if isinstance(geom, Polygon):
        geom = orient(geom, sign=1.0)
    elif isinstance(geom, shapely.MultiPolygon):
        geom = shapely.MultiPolygon([orient(p, sign=1.0) for p in geom.geoms])
    return _rounded(mapping(shapely.transform(geom, lambda xy: xy / 1000.0)))


def _rounded(obj: Any) -> Any:
    """Lists of floats rounded to 0.1 mm (4 decimals in metres); tuples become lists."""
    if isinstance(obj, dict):
        return {k: _rounded(v) for k, v in obj.items()}
    if isinstance(obj, list | tuple):
        return [_rounded(v) for v in obj]
    if isinstance(obj, float):
        return round(obj, 4) + 0.0
    return obj


def _feature(kind: str, fid: str, label: str, geom: BaseGeometry, **props: Any) -> dict[str, Any]:
    return {"type": "Feature", "id": f"{kind}:{fid}", "geometry": _geometry(geom),
            "properties": {"kind": kind, "id": fid, "label": label, **props}}


def to_geojson(plan: Plan, rules: RuleSet) -> dict[str, Any]:
    """The plan as a GeoJSON FeatureCollection (a dict ready for ``json.dumps``).

    Rooms, doors (the opening as a line, the leaf's swing as a polygon), windows, fittings
    and their use zones, placed furniture footprints and their use zones under ``rules``.
    Pieces without a placement are listed in ``roomfit.unplaced``.
    """
    features: list[dict[str, Any]] = []
    for r in plan.rooms:
        poly = room_polygon(r)
        features.append(_feature("room", r.id, r.label, poly, use=r.use,
                                 area_m2=round(poly.area / 1e6, 4)))
    for d in plan.doors:
        shape = door_shape(plan, d, rules)
        features.append(_feature("door", d.id, d.id, shape.opening, rooms=list(d.rooms),
                                 width_mm=d.width, leaf=d.leaf.value, swings_into=d.swings_into,
                                 hinge=d.hinge, entrance=d.is_entrance))
        leaf = door_leaf(plan, d)
        if leaf is not None:
            hinge, arc = leaf
            swing = Polygon([hinge, *arc])
            features.append(_feature("door_swing", d.id, d.id, swing, swings_into=d.swings_into,
                                     area_m2=round(swing.area / 1e6, 4)))
    for w in plan.windows:
        features.append(_feature("window", w.id, w.id, window_segment(plan, w), room=w.room,
                                 width_mm=w.width, sill_mm=w.sill))
    for f in plan.fixtures:
        features.append(_feature("fitting", f.id, f.label, fixture_polygon(f), room=f.room,
                                 fitting_kind=f.kind, height_mm=f.height))
        zone = fixture_zone(f)
        if zone is not None:
            features.append(_feature("fitting_zone", f.id, f.label, zone, room=f.room))
    specs = {s.id: s for s in resolve_pieces(plan, rules)}
    unplaced = []
    for p in plan.furniture:
        pl = p.placement
        if pl is None:
            unplaced.append(p.id)
            continue
        spec = specs[p.id]
        features.append(_feature(
            "piece", p.id, spec.label, footprint(spec, pl), type=spec.type, room=pl.room,
            rotation=pl.rotation, front=_COMPASS[side_direction("front", pl.rotation)],
            width_mm=spec.width, depth_mm=spec.depth, height_mm=spec.height, locked=p.locked))
        for z, poly in use_zones(spec, pl):
            zone_feature = _feature("use_zone", p.id, spec.label, poly, side=z.side, zone_kind=z.kind,
                         depth_mm=z.depth, rule=z.rule, room=pl.room)
            zone_feature["id"] = f"use_zone:{p.id}:{z.side}"
            features.append(zone_feature)
    return {
        "type": "FeatureCollection",
        "roomfit": {"plan": plan.name, "client": plan.client, "address": plan.address,
                    "rule_set": rules.id, "units": "m", "crs": CRS_NOTE, "unplaced": unplaced},
        "features": features,
    }
