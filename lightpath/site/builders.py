"""Parametric chambers from survey numbers (tape, compass, clinometer), for users with no scan.

Each builder returns a :class:`ChamberModel`: named parts in the site frame (ENU metres), built from closed
boxes that overlap where they meet so that no ray slips through a crack; only the opening's pane (a quad
across the slot, slit or window, normal pointing out to the sky) lets light in, and it is not a solid.  The
target is a quad 1 mm in front of the surface it stands for, normal pointing into the room.

- :func:`passage_chamber`: a straight or bent passage (outward azimuth, floor slope, length, width, height)
  with a chamber at its end and a slot over the entrance lintel (the doorway closed by a stone);
- :func:`slit_shrine`: a thick-walled rock-cut room with a narrow slit in its front wall;
- :func:`window_room`: a room whose thick wall has a window and whose opposite wall has a niche.

>>> m = passage_chamber(azimuth_deg=135.0, floor_slope_deg=2.0, length_m=12.0, width_m=1.0, height_m=1.5)
>>> sorted(m.parts)
['door_stone', 'floor', 'lintel', 'roof', 'slot', 'target', 'walls']
>>> m.opening_parts, m.target_part
(('slot',), 'target')
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from lightpath.site.solids import box, local_to_site, pitch_matrix, quad, yaw_matrix

__all__ = ["Bend", "Chamber", "ChamberModel", "Niche", "Slot", "passage_chamber", "slit_shrine", "window_room"]

_TARGET_GAP_M = 0.001  # the target quad stands 1 mm in front of its wall (no coplanar faces)


@dataclass(frozen=True)
class Slot:
    """An opening in a front wall, metres: width, height, and the height of its sill above the floor.

    For :func:`passage_chamber` ``sill_m=None`` puts the slot's top at the passage roof, over a lintel.
    """

    width_m: float = 0.6
    height_m: float = 0.25
    sill_m: float | None = None


@dataclass(frozen=True)
class Chamber:
    """A box room at the end of a passage: depth (along the axis), width and height, metres.

    ``backstone`` = (y0, y1, z0, z1), metres on the back wall (y to the left looking in, z above the chamber
    floor): the target patch; None makes the whole back wall the target.
    """

    depth_m: float = 3.0
    width_m: float = 3.0
    height_m: float = 2.5
    backstone: tuple[float, float, float, float] | None = None  # target patch (y0, y1, z0, z1); None: whole wall


@dataclass(frozen=True)
class Bend:
    """A turn of the passage ``at_m`` metres in from the entrance, ``angle_deg`` to the left (negative: right)."""

    at_m: float
    angle_deg: float


@dataclass(frozen=True)
class Niche:
    """A recess in the back wall: width, height, depth and sill height above the floor, metres."""

    width_m: float = 0.6
    height_m: float = 0.8
    depth_m: float = 0.4
    sill_m: float = 0.8


@dataclass(frozen=True, eq=False)
class ChamberModel:
    """A built chamber: named parts (trimesh meshes, ENU metres) and the numbers it was built from.

    parts : name → mesh.  opening_parts : the names light passes through (not solid).  target_part : the
    name of the target.  axis_azimuth_deg : outward azimuth of the opening's axis, degrees from true north.
    local_to_site : 4×4 transform from the builder's local frame (+x inward, +z up) to ENU.
    survey : the builder's arguments.
    """

    kind: str
    parts: dict
    opening_parts: tuple[str, ...]
    target_part: str
    axis_azimuth_deg: float
    local_to_site: np.ndarray
    survey: dict = field(default_factory=dict)

    def blocking_mesh(self):
        """All solid parts (target included, panes not) as one trimesh."""
        import trimesh

        solid = [m for name, m in self.parts.items() if name not in self.opening_parts]
        return trimesh.util.concatenate(solid)

    def target(self):
        """The target quad(s)."""
        return self.parts[self.target_part]

    def opening(self):
        """The opening pane(s) as one trimesh."""
        import trimesh

        return trimesh.util.concatenate([self.parts[n] for n in self.opening_parts])


class _Parts:
    """Collects meshes by part name, each moved by a 4×4 local transform."""

    def __init__(self) -> None:
        self.meshes: dict[str, list] = {}

    def add(self, name: str, mesh, transform: np.ndarray | None = None) -> None:
        if transform is not None:
            mesh.apply_transform(transform)
        self.meshes.setdefault(name, []).append(mesh)

    def build(self, to_site: np.ndarray) -> dict:
        import trimesh

        out = {}
        for name, meshes in self.meshes.items():
            m = trimesh.util.concatenate(meshes)
            m.apply_transform(to_site)
            out[name] = m
        return out


def _positive(**values: float) -> None:
    for name, value in values.items():
        if not (isinstance(value, (int, float)) and math.isfinite(value) and value > 0):
            raise ValueError(f"{name} must be a positive number of metres, got {value!r}")


def _tube(parts: _Parts, x0: float, x1: float, w: float, h: float, t: float, T: np.ndarray, *, extend=(0, 0, 0, 0)):
    """Floor, roof and side walls of a passage segment x∈[x0, x1] (local), moved by T.

    ``extend`` = (floor/roof, left wall, right wall, back) extra length past x1, for covering a bend's joint.
    """
    e_fr, e_left, e_right, e_back = extend
    parts.add("floor", box((x0 - e_back, -w / 2 - t, -t), (x1 + e_fr, w / 2 + t, 0.0)), T)
    parts.add("roof", box((x0 - e_back, -w / 2 - t, h), (x1 + e_fr, w / 2 + t, h + t)), T)
    parts.add("walls", box((x0 - e_back * (e_left > 0), w / 2, -t), (x1 + e_left, w / 2 + t, h + t)), T)
    parts.add("walls", box((x0 - e_back * (e_right > 0), -w / 2 - t, -t), (x1 + e_right, -w / 2, h + t)), T)


def _front_wall(parts: _Parts, w: float, h: float, t: float, t_front: float, opening, names, T=None):
    """A front wall x∈[−t_front, 0] across a w×h cross-section with a rectangular hole.

    ``opening`` = (y0, y1, z0, z1) of the hole; ``names`` = (below, above, sides) part names.  The pane goes
    on the outer face x = −t_front, normal −x (out to the sky).
    """
    y0, y1, z0, z1 = opening
    below, above, sides = names
    W = w / 2 + t
    if z0 > -t:
        parts.add(below, box((-t_front, -W, -t), (0.0, W, z0)), T)
    if z1 < h + t:
        parts.add(above, box((-t_front, -W, z1), (0.0, W, h + t)), T)
    parts.add(sides, box((-t_front, y1, z0 - 1e-3), (0.0, W, z1 + 1e-3)), T)
    parts.add(sides, box((-t_front, -W, z0 - 1e-3), (0.0, y0, z1 + 1e-3)), T)
    x = -t_front
    return quad([(x, y0, z0), (x, y0, z1), (x, y1, z1), (x, y1, z0)], T)  # normal -x


def passage_chamber(
    azimuth_deg: float,
    floor_slope_deg: float,
    length_m: float,
    width_m: float,
    height_m: float,
    *,
    chamber: Chamber | None = Chamber(),
    slot: Slot | None = Slot(),
    bend: Bend | None = None,
    wall_m: float = 0.5,
    lintel_m: float = 0.3,
    door_closed: bool = True,
) -> ChamberModel:
    """A passage whose entrance looks out to ``azimuth_deg`` (degrees from true north, clockwise).

    The floor rises inward at ``floor_slope_deg`` (negative: falls); the passage is ``length_m`` long (along
    its axis, from the entrance), ``width_m`` wide and ``height_m`` high inside, walls ``wall_m`` thick.
    Over the entrance a lintel carries the ``slot`` (its top at the passage roof); below the lintel the
    doorway is closed by a stone (``door_closed``) or open (then it is part of the opening too).  An optional
    ``bend`` turns the passage.  The ``chamber`` (or, with ``chamber=None``, an end wall) closes the far end;
    its back wall's inner face is the target.  The site origin is the entrance floor at the front face.
    """
    _positive(length_m=length_m, width_m=width_m, height_m=height_m, wall_m=wall_m)
    if not -30.0 < floor_slope_deg < 30.0:
        raise ValueError(f"floor_slope_deg must be within ±30 degrees, got {floor_slope_deg!r}")
    w, h, t = float(width_m), float(height_m), float(wall_m)
    parts = _Parts()
    pitch = pitch_matrix(floor_slope_deg)
    # --- passage segments ---
    if bend is None:
        _tube(parts, -t, length_m, w, h, t, pitch)
        end = pitch @ [length_m, 0.0, 0.0, 1.0]
        heading = 0.0
    else:
        if not 0 < bend.at_m < length_m or not -80 < bend.angle_deg < 80:
            raise ValueError("bend.at_m must lie inside the passage and |bend.angle_deg| < 80")
        e = (w / 2 + t) * math.tan(math.radians(abs(bend.angle_deg)) / 2) + 0.05
        left_outer = bend.angle_deg < 0  # turning right: the left wall is outside the bend
        ext = (e, e if left_outer else 0.0, 0.0 if left_outer else e, 0.0)
        _tube(parts, -t, bend.at_m, w, h, t, pitch, extend=ext)
        joint = pitch @ [bend.at_m, 0.0, 0.0, 1.0]
        second = yaw_matrix(bend.angle_deg, joint[:3]) @ pitch
        back = (e, e if left_outer else 0.0, 0.0 if left_outer else e, e)
        _tube(parts, bend.at_m, length_m, w, h, t, second)
        _tube(parts, bend.at_m, bend.at_m + 1e-3, w, h, t, second, extend=back)
        end = second @ [length_m, 0.0, 0.0, 1.0]
        heading = float(bend.angle_deg)
    # --- entrance: door stone, lintel, slot ---
    openings = []
    if slot is not None:
        _positive(slot_width_m=slot.width_m, slot_height_m=slot.height_m)
        z1 = h if slot.sill_m is None else slot.sill_m + slot.height_m
        z0 = z1 - slot.height_m
        door_top = z0 - lintel_m
        if door_top <= 0.2:
            raise ValueError("the slot leaves no room for a lintel and doorway; lower slot.height_m")
        sw = min(slot.width_m, w)
        pane = _front_wall(parts, w, h, t, t, (-sw / 2, sw / 2, z0, z1), ("lintel", "walls", "walls"), pitch)
        parts.add("slot", pane)
        openings.append("slot")
        if door_closed:
            stone = box((-t - 0.1, -w / 2 - 1e-3, -1e-3), (-t + 0.1, w / 2 + 1e-3, door_top + 1e-3), pitch)
            parts.add("door_stone", stone)
            parts.meshes["lintel"] = [box((-t, -w / 2 - t, door_top), (0.0, w / 2 + t, z0), pitch)]
        else:
            parts.meshes["lintel"] = [box((-t, -w / 2 - t, door_top), (0.0, w / 2 + t, z0), pitch)]
            x = -t
            door = quad([(x, -w / 2, 0.0), (x, -w / 2, door_top), (x, w / 2, door_top), (x, w / 2, 0.0)], pitch)
            parts.add("doorway", door)
            openings.append("doorway")
    else:
        x = -t
        parts.add("doorway", quad([(x, -w / 2, 0.0), (x, -w / 2, h), (x, w / 2, h), (x, w / 2, 0.0)], pitch))
        openings.append("doorway")
    # --- chamber or end wall (level floor, aligned with the last segment) ---
    room = yaw_matrix(heading, end[:3])
    room[:3, 3] = end[:3]
    if chamber is not None:
        d, cw, ch = (
            chamber.depth_m,
            max(chamber.width_m, w),
            max(chamber.height_m, h / math.cos(math.radians(floor_slope_deg))),
        )
        _positive(chamber_depth_m=d)
        W = cw / 2 + t
        parts.add("floor", box((-t, -W, -t), (d + t, W, 0.0)), room)
        parts.add("roof", box((-t, -W, ch), (d + t, W, ch + t)), room)
        parts.add("walls", box((d, -W, -t), (d + t, W, ch + t)), room)
        parts.add("walls", box((-t, cw / 2, -t), (d + t, W, ch + t)), room)
        parts.add("walls", box((-t, -W, -t), (d + t, -cw / 2, ch + t)), room)
        hole_top = h / math.cos(math.radians(floor_slope_deg)) + t * abs(math.tan(math.radians(floor_slope_deg)))
        parts.add("walls", box((-t, w / 2, -t), (0.0, W, ch + t)), room)
        parts.add("walls", box((-t, -W, -t), (0.0, -w / 2, ch + t)), room)
        if hole_top < ch:
            parts.add("walls", box((-t, -w / 2 - 1e-3, hole_top), (0.0, w / 2 + 1e-3, ch + t)), room)
        x = d - _TARGET_GAP_M
        y0, y1, z0, z1 = chamber.backstone or (-cw / 2, cw / 2, 0.0, ch)
        target = quad([(x, y0, z0), (x, y0, z1), (x, y1, z1), (x, y1, z0)], room)  # normal -x
    else:
        d = -0.5 * t  # the end wall straddles the tube's (tilted) end
        parts.add("walls", box((d, -w / 2 - t, -t), (d + t, w / 2 + t, h + t)), room)
        x = d - _TARGET_GAP_M
        target = quad([(x, -w / 2, 0.0), (x, -w / 2, h), (x, w / 2, h), (x, w / 2, 0.0)], room)  # normal -x
    parts.add("target", target)
    to_site = local_to_site(azimuth_deg)
    survey = dict(
        azimuth_deg=azimuth_deg,
        floor_slope_deg=floor_slope_deg,
        length_m=length_m,
        width_m=width_m,
        height_m=height_m,
        wall_m=wall_m,
        lintel_m=lintel_m,
        chamber=None if chamber is None else vars(chamber),
        slot=None if slot is None else vars(slot),
        bend=None if bend is None else vars(bend),
        door_closed=door_closed,
    )
    return ChamberModel(
        "passage_chamber", parts.build(to_site), tuple(openings), "target", azimuth_deg, to_site, survey
    )


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
    _positive(depth_m=d, width_m=w, height_m=h, wall_m=t, front_wall_m=tf)
    _positive(opening_width_m=opening.width_m, opening_height_m=opening.height_m)
    sill = 0.0 if opening.sill_m is None else float(opening.sill_m)
    if opening.width_m >= w or sill + opening.height_m > h:
        raise ValueError(f"the {opening_name} does not fit in the front wall")
    parts = _Parts()
    W = w / 2 + t
    parts.add("floor", box((-tf, -W, -t), (d + t, W, 0.0)))
    parts.add("roof", box((-tf, -W, h), (d + t, W, h + t)))
    parts.add(wall_name, box((-tf, w / 2, -t), (d + t, W, h + t)))
    parts.add(wall_name, box((-tf, -W, -t), (d + t, -w / 2, h + t)))
    y = opening.width_m / 2
    pane = _front_wall(parts, w, h, t, tf, (-y, y, sill, sill + opening.height_m), (wall_name, wall_name, wall_name))
    parts.add(opening_name, pane)
    if niche is None:
        parts.add(wall_name, box((d, -W, -t), (d + t, W, h + t)))
        y0, y1, z0, z1 = target
        x = d - _TARGET_GAP_M
    else:
        _positive(niche_width_m=niche.width_m, niche_height_m=niche.height_m, niche_depth_m=niche.depth_m)
        if niche.width_m >= w or niche.sill_m + niche.height_m > h or niche.depth_m >= t:
            raise ValueError("the niche does not fit in the back wall (it must be shallower than wall_m)")
        ny, z0, z1, nd = niche.width_m / 2, niche.sill_m, niche.sill_m + niche.height_m, niche.depth_m
        parts.add(wall_name, box((d + nd, -W, -t), (d + t, W, h + t)))  # behind the niche
        parts.add(wall_name, box((d, -W, -t), (d + nd + 1e-3, -ny, h + t)))
        parts.add(wall_name, box((d, ny, -t), (d + nd + 1e-3, W, h + t)))
        parts.add(wall_name, box((d, -ny - 1e-3, -t), (d + nd + 1e-3, ny + 1e-3, z0)))
        parts.add(wall_name, box((d, -ny - 1e-3, z1), (d + nd + 1e-3, ny + 1e-3, h + t)))
        y0, y1, x = -ny, ny, d + nd - _TARGET_GAP_M
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
    slit: Slot = Slot(width_m=0.12, height_m=1.4, sill_m=0.4),
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
    survey = dict(
        azimuth_deg=azimuth_deg,
        depth_m=depth_m,
        width_m=width_m,
        height_m=height_m,
        rock_m=rock_m,
        slit=vars(slit),
        image=list(image),
    )
    model = _room(
        "slit_shrine",
        azimuth_deg,
        depth_m,
        width_m,
        height_m,
        rock_m,
        rock_m,
        slit,
        "slit",
        "rock",
        None,
        image,
        survey,
    )
    return _shift_origin(model, rock_m)


def window_room(
    azimuth_deg: float,
    *,
    depth_m: float = 6.0,
    width_m: float = 4.0,
    height_m: float = 3.0,
    wall_m: float = 1.2,
    window: Slot = Slot(width_m=0.35, height_m=0.6, sill_m=1.6),
    niche: Niche = Niche(),
) -> ChamberModel:
    """A room whose ``wall_m``-thick front wall has a ``window`` looking out to ``azimuth_deg`` and whose back
    wall has a ``niche`` (its back face is the target).  Part names: walls, floor, roof, window, target.

    >>> m = window_room(95.0)
    >>> sorted(m.parts), round(float(m.target().area), 3)
    (['floor', 'roof', 'target', 'walls', 'window'], 0.48)
    """
    survey = dict(
        azimuth_deg=azimuth_deg,
        depth_m=depth_m,
        width_m=width_m,
        height_m=height_m,
        wall_m=wall_m,
        window=vars(window),
        niche=vars(niche),
    )
    model = _room(
        "window_room",
        azimuth_deg,
        depth_m,
        width_m,
        height_m,
        wall_m,
        wall_m,
        window,
        "window",
        "walls",
        niche,
        None,
        survey,
    )
    return _shift_origin(model, wall_m)


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
