"""Rooms with one opening in a thick front wall: a rock-cut slit shrine and a window room with a niche.

Local frame as in :mod:`lightpath.site.solids`: +x inward from the opening, +y left, +z up, metres; the site
origin is the floor under the opening at the front wall's outer face.

>>> m = window_room(90.0)
>>> m.opening_parts, m.target_part
(('window',), 'target')
"""

from __future__ import annotations

from dataclasses import dataclass

from lightpath.site.parts import TARGET_GAP_M, ChamberModel, Parts, Slot, check_positive, front_wall
from lightpath.site.solids import box, local_to_site, quad

__all__ = ["Niche", "ROOM_WINDOW", "SHRINE_SLIT", "slit_shrine", "window_room"]

#: Default slit of :func:`slit_shrine`: 0.12 m wide, 1.4 m high, sill 0.4 m.
SHRINE_SLIT = Slot(width_m=0.12, height_m=1.4, sill_m=0.4)
#: Default window of :func:`window_room`: 0.35 m wide, 0.6 m high, sill 1.6 m.
ROOM_WINDOW = Slot(width_m=0.35, height_m=0.6, sill_m=1.6)


@dataclass(frozen=True)
class Niche:
    """A recess in the back wall: width, height, depth and sill height above the floor, metres."""

    width_m: float = 0.6
    height_m: float = 0.8
    depth_m: float = 0.4
    sill_m: float = 0.8


def _room(
    kind: str,
    azimuth_deg: float,
    depth_m: float,
    width_m: float,
    height_m: float,
    front_wall_m: float,
    wall_m: float,
    opening: Slot,
    opening_name: str,
    wall_name: str,
    niche: Niche | None,
    target: tuple[float, float, float, float] | None,
    survey: dict,
) -> ChamberModel:
    d, w, h, t, tf = float(depth_m), float(width_m), float(height_m), float(wall_m), float(front_wall_m)
    check_positive(depth_m=d, width_m=w, height_m=h, wall_m=t, front_wall_m=tf)
    check_positive(opening_width_m=opening.width_m, opening_height_m=opening.height_m)
    sill = 0.0 if opening.sill_m is None else float(opening.sill_m)
    if opening.width_m >= w or sill + opening.height_m > h:
        raise ValueError(f"the {opening_name} does not fit in the front wall")
    parts = Parts()
    W = w / 2 + t
    parts.add("floor", box((-tf, -W, -t), (d + t, W, 0.0)))
    parts.add("roof", box((-tf, -W, h), (d + t, W, h + t)))
    parts.add(wall_name, box((-tf, w / 2, -t), (d + t, W, h + t)))
    parts.add(wall_name, box((-tf, -W, -t), (d + t, -w / 2, h + t)))
    y = opening.width_m / 2
    pane = front_wall(parts, w, h, t, tf, (-y, y, sill, sill + opening.height_m), (wall_name, wall_name, wall_name))
    parts.add(opening_name, pane)
    if niche is None:
        parts.add(wall_name, box((d, -W, -t), (d + t, W, h + t)))
        y0, y1, z0, z1 = target
        x = d - TARGET_GAP_M
    else:
        check_positive(niche_width_m=niche.width_m, niche_height_m=niche.height_m, niche_depth_m=niche.depth_m)
        if niche.width_m >= w or niche.sill_m + niche.height_m > h or niche.depth_m >= t:
            raise ValueError("the niche does not fit in the back wall (it must be shallower than wall_m)")
        ny, z0, z1, nd = niche.width_m / 2, niche.sill_m, niche.sill_m + niche.height_m, niche.depth_m
        parts.add(wall_name, box((d + nd, -W, -t), (d + t, W, h + t)))  # behind the niche
        parts.add(wall_name, box((d, -W, -t), (d + nd + 1e-3, -ny, h + t)))
        parts.add(wall_name, box((d, ny, -t), (d + nd + 1e-3, W, h + t)))
        parts.add(wall_name, box((d, -ny - 1e-3, -t), (d + nd + 1e-3, ny + 1e-3, z0)))
        parts.add(wall_name, box((d, -ny - 1e-3, z1), (d + nd + 1e-3, ny + 1e-3, h + t)))
        y0, y1, x = -ny, ny, d + nd - TARGET_GAP_M
    parts.add("target", quad([(x, y0, z0), (x, y0, z1), (x, y1, z1), (x, y1, z0)]))  # normal -x, into the room
    to_site = local_to_site(azimuth_deg)
    return ChamberModel(kind, parts.build(to_site), (opening_name,), "target", azimuth_deg, to_site, survey)


def slit_shrine(
    azimuth_deg: float,
    *,
    depth_m: float = 4.0,
    width_m: float = 2.5,
    height_m: float = 2.2,
    rock_m: float = 1.5,
    slit: Slot = SHRINE_SLIT,
    image: tuple[float, float, float, float] = (-0.4, 0.4, 0.2, 1.2),
) -> ChamberModel:
    """A rock-cut room whose front (``rock_m`` thick) has a narrow vertical slit looking out to ``azimuth_deg``.

    ``image`` = (y0, y1, z0, z1), metres: the patch of the back wall that is the target (y to the left looking
    in, z above the floor).  Part names: rock, floor, roof, slit, target.  The site origin is the floor under
    the slit at the outer face.

    >>> m = slit_shrine(290.0)
    >>> sorted(m.parts), round(float(m.target().area), 3)
    (['floor', 'rock', 'roof', 'slit', 'target'], 0.8)
    """
    size = (azimuth_deg, depth_m, width_m, height_m)
    return _opening_room("slit_shrine", size, ("rock_m", rock_m), ("slit", slit), "rock", image=image)


def window_room(
    azimuth_deg: float,
    *,
    depth_m: float = 6.0,
    width_m: float = 4.0,
    height_m: float = 3.0,
    wall_m: float = 1.2,
    window: Slot = ROOM_WINDOW,
    niche: Niche = Niche(),
) -> ChamberModel:
    """A room whose ``wall_m``-thick front wall has a ``window`` looking out to ``azimuth_deg`` and whose back
    wall has a ``niche`` (its back face is the target).  Part names: walls, floor, roof, window, target.

    >>> m = window_room(95.0)
    >>> sorted(m.parts), round(float(m.target().area), 3)
    (['floor', 'roof', 'target', 'walls', 'window'], 0.48)
    """
    size = (azimuth_deg, depth_m, width_m, height_m)
    return _opening_room("window_room", size, ("wall_m", wall_m), ("window", window), "walls", niche=niche)


def _opening_room(
    kind: str,
    size: tuple[float, float, float, float],
    front: tuple[str, float],
    opening: tuple[str, Slot],
    wall_name: str,
    *,
    niche: Niche | None = None,
    image: tuple[float, float, float, float] | None = None,
) -> ChamberModel:
    """The body of :func:`slit_shrine` and :func:`window_room`: the survey record, the room, the origin moved.

    ``size`` = (azimuth_deg, depth_m, width_m, height_m), degrees and metres; ``front`` = (its keyword, its
    thickness in metres) for the front wall; ``opening`` = (its part name, its :class:`Slot`); the target is
    either the back face of ``niche`` or the back-wall patch ``image`` = (y0, y1, z0, z1), metres.
    """
    azimuth_deg, depth_m, width_m, height_m = size
    front_key, front_m = front
    opening_name, slot = opening
    survey = dict(azimuth_deg=azimuth_deg, depth_m=depth_m, width_m=width_m, height_m=height_m)
    survey[front_key] = front_m
    survey[opening_name] = vars(slot)
    if niche is None:
        survey["image"] = list(image)
    else:
        survey["niche"] = vars(niche)
    model = _room(
        kind,
        azimuth_deg,
        depth_m,
        width_m,
        height_m,
        front_m,
        front_m,
        slot,
        opening_name,
        wall_name,
        niche,
        image,
        survey,
    )
    return _shift_origin(model, front_m)


def _shift_origin(model: ChamberModel, front_m: float) -> ChamberModel:
    """Move the site origin from the inner face of the front wall to its outer face (at the opening)."""
    shift = model.local_to_site[:3, :3] @ [front_m, 0.0, 0.0]
    for mesh in model.parts.values():
        mesh.apply_translation(shift)
    T = model.local_to_site.copy()
    T[:3, 3] += shift
    return ChamberModel(
        model.kind, model.parts, model.opening_parts, model.target_part, model.axis_azimuth_deg, T, model.survey
    )
