"""Parametric chambers from survey numbers (tape, compass, clinometer), for users with no scan.

Each builder returns a :class:`ChamberModel`: named parts in the site frame (ENU metres), built from closed
boxes that overlap where they meet so that no ray slips through a crack; only the opening's pane (a quad
across the slot, slit or window, normal pointing out to the sky) lets light in, and it is not a solid.  The
target is a quad 1 mm in front of the surface it stands for, normal pointing into the room.

- :func:`passage_chamber`: a straight or bent passage (outward azimuth, floor slope, length, width, height)
  with a chamber at its end and a slot over the entrance lintel (the doorway closed by a stone);
- :func:`slit_shrine`: a thick-walled rock-cut room with a narrow slit in its front wall;
- :func:`window_room`: a room whose thick wall has a window and whose opposite wall has a niche;
- :func:`demo_chamber`: the chamber of one of the shipped demo sites (``tools/make_demo_models.py`` and
  ``benchmarks/bench_scan.py`` build them from here).

>>> m = passage_chamber(azimuth_deg=135.0, floor_slope_deg=2.0, length_m=12.0, width_m=1.0, height_m=1.5)
>>> sorted(m.parts)
['door_stone', 'floor', 'lintel', 'roof', 'slot', 'target', 'walls']
>>> m.opening_parts, m.target_part
(('slot',), 'target')
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from lightpath.site.parts import TARGET_GAP_M, ChamberModel, Parts, Slot, check_positive, front_wall
from lightpath.site.rooms import Niche, slit_shrine, window_room
from lightpath.site.solids import box, local_to_site, pitch_matrix, quad, yaw_matrix

#: The slot :func:`passage_chamber` builds when none is given: 0.6 m wide, 0.25 m high, under the roof.
DEFAULT_SLOT = Slot()

__all__ = [
    "Bend",
    "Chamber",
    "ChamberModel",
    "Niche",
    "Slot",
    "demo_chamber",
    "passage_chamber",
    "slit_shrine",
    "window_room",
]


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


def _tube(parts: Parts, x0: float, x1: float, w: float, h: float, t: float, T: np.ndarray, *, extend=(0, 0, 0, 0)):
    """Floor, roof and side walls of a passage segment x∈[x0, x1] (local), moved by T.

    ``extend`` = (floor/roof, left wall, right wall, back) extra length past x1, for covering a bend's joint.
    """
    e_fr, e_left, e_right, e_back = extend
    parts.add("floor", box((x0 - e_back, -w / 2 - t, -t), (x1 + e_fr, w / 2 + t, 0.0)), T)
    parts.add("roof", box((x0 - e_back, -w / 2 - t, h), (x1 + e_fr, w / 2 + t, h + t)), T)
    parts.add("walls", box((x0 - e_back * (e_left > 0), w / 2, -t), (x1 + e_left, w / 2 + t, h + t)), T)
    parts.add("walls", box((x0 - e_back * (e_right > 0), -w / 2 - t, -t), (x1 + e_right, -w / 2, h + t)), T)


def passage_chamber(
    azimuth_deg: float,
    floor_slope_deg: float,
    length_m: float,
    width_m: float,
    height_m: float,
    *,
    chamber: Chamber | None = Chamber(),
    slot: Slot | None = DEFAULT_SLOT,
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
    check_positive(length_m=length_m, width_m=width_m, height_m=height_m, wall_m=wall_m)
    if not -30.0 < floor_slope_deg < 30.0:
        raise ValueError(f"floor_slope_deg must be within ±30 degrees, got {floor_slope_deg!r}")
    w, h, t = float(width_m), float(height_m), float(wall_m)
    parts = Parts()
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
        check_positive(slot_width_m=slot.width_m, slot_height_m=slot.height_m)
        z1 = h if slot.sill_m is None else slot.sill_m + slot.height_m
        z0 = z1 - slot.height_m
        door_top = z0 - lintel_m
        if door_top <= 0.2:
            raise ValueError("the slot leaves no room for a lintel and doorway; lower slot.height_m")
        sw = min(slot.width_m, w)
        pane = front_wall(parts, w, h, t, t, (-sw / 2, sw / 2, z0, z1), ("lintel", "walls", "walls"), pitch)
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
        check_positive(chamber_depth_m=d)
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
        x = d - TARGET_GAP_M
        y0, y1, z0, z1 = chamber.backstone or (-cw / 2, cw / 2, 0.0, ch)
        target = quad([(x, y0, z0), (x, y0, z1), (x, y1, z1), (x, y1, z0)], room)  # normal -x
    else:
        d = -0.5 * t  # the end wall straddles the tube's (tilted) end
        parts.add("walls", box((d, -w / 2 - t, -t), (d + t, w / 2 + t, h + t)), room)
        x = d - TARGET_GAP_M
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


# The demo sites' chambers: builder and its keywords (sizes in metres), by site name.
_DEMO_CHAMBERS = {
    "sandwren": (
        slit_shrine,
        dict(
            depth_m=3.6,
            width_m=2.8,
            height_m=2.2,
            rock_m=1.5,
            slit=Slot(width_m=0.1, height_m=0.35, sill_m=1.15),
            image=(-0.2, 0.2, 0.7, 1.3),
        ),
    ),
    "larchfold": (
        passage_chamber,
        dict(
            floor_slope_deg=-2.5,
            length_m=14.0,
            width_m=0.9,
            height_m=1.4,
            chamber=Chamber(depth_m=2.4, width_m=2.4, height_m=1.8, backstone=(-0.2, 0.7, 0.0, 0.9)),
            slot=Slot(width_m=0.6, height_m=0.3),
            bend=Bend(at_m=7.0, angle_deg=4.0),
            wall_m=0.6,
            lintel_m=0.3,
        ),
    ),
    "quillfield": (
        window_room,
        dict(
            depth_m=7.0,
            width_m=5.0,
            height_m=3.6,
            wall_m=0.9,
            window=Slot(width_m=0.4, height_m=0.7, sill_m=2.0),
            niche=Niche(width_m=0.5, height_m=0.7, depth_m=0.35, sill_m=1.1),
        ),
    ),
}


def demo_chamber(site: str, azimuth_deg: float) -> ChamberModel:
    """The chamber of the demo site ``site`` (``"sandwren"``, ``"larchfold"`` or ``"quillfield"``), its opening's
    axis looking out to ``azimuth_deg`` (degrees from true north, clockwise); every size in metres.

    The invented sites in ``demo_models/`` are these models exported by ``tools/make_demo_models.py``
    (which aims them); ``benchmarks/bench_scan.py`` roughens the bent passage.

    >>> m = demo_chamber("larchfold", 115.19)
    >>> m.kind, m.opening_parts, round(float(m.target().area), 2)
    ('passage_chamber', ('slot',), 0.81)
    """
    if site not in _DEMO_CHAMBERS:
        raise ValueError(f"demo site {site!r} is not one of {', '.join(_DEMO_CHAMBERS)}")
    builder, keywords = _DEMO_CHAMBERS[site]
    return builder(azimuth_deg, **keywords)
