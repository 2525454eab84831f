"""Shared pieces of the parametric builders: openings, the model container, part collection, front walls.

>>> Slot().width_m, Slot().height_m
(0.6, 0.25)
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from lightpath.site.solids import box, quad

__all__ = ["TARGET_GAP_M", "ChamberModel", "Slot", "Parts", "check_positive", "front_wall"]

TARGET_GAP_M = 0.001  # the target quad stands 1 mm in front of its wall (no coplanar faces)


@dataclass(frozen=True)
class Slot:
    """An opening in a front wall, metres: width, height, and the height of its sill above the floor.

    For :func:`passage_chamber` ``sill_m=None`` puts the slot's top at the passage roof, over a lintel.
    """

    width_m: float = 0.6
    height_m: float = 0.25
    sill_m: float | None = None


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


class Parts:
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


def check_positive(**values: float) -> None:
    for name, value in values.items():
        if not (isinstance(value, (int, float)) and math.isfinite(value) and value > 0):
            raise ValueError(f"{name} must be a positive number of metres, got {value!r}")


def front_wall(parts: Parts, w: float, h: float, t: float, t_front: float, opening, names, T=None):
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
