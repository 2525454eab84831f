"""The uncertainty model: survey tolerances and sky spreads → seeded Monte Carlo draws.

Each tolerance is a **one-sigma Gaussian** spread (a survey's "±0.5°" is read
as σ = 0.5°; give half the bound if yours is a hard bound).  A draw turns them
into

- a rigid rotation of the structure about the target (3×3, ENU), composed of
  the opening's azimuth error (about the vertical), its tilt (a horizontal
  rotation vector whose east and north components are each N(0, σ_tilt)) and the
  angular shift caused by moving the opening or the target by a few centimetres,
  ``Δ⊥ / distance`` (small-angle approximation of a translation, see
  :func:`shift_rotation_vector`);
- offsets of the sky: the horizon's altitude, the air's temperature and
  pressure (which scale Bennett/Sæmundsson refraction), an anomalous refraction
  near the horizon of σ ≈ 0.18° (Sampson et al. 2003), a ΔT error as a standard
  normal ``delta_t_z`` (times ΔT's σ at the drawn year) and the epoch's spread.

Draw *i* is generated from child *i* of ``numpy.random.SeedSequence(seed)`` (one
stream for the survey draws, another for the null model), and always takes the
same standard normals in the same order, so it is the same whatever the number
of draws, however they are split across workers, and whichever tolerances are
turned on.

>>> tol = Tolerances(opening_azimuth_deg=0.5)
>>> draws = make_draws(tol, 3, seed=7, year=-3199)
>>> [d.index for d in draws]
[0, 1, 2]
>>> make_draws(tol, 5, seed=7, year=-3199)[2] == draws[2]
True
>>> parse_epoch("3200 BC ± 50")
(-3199, 50.0)

References
----------
Sampson, R. D., Lozowski, E. P., Peterson, A. E. & Hube, D. P. (2003). Variability
in the astronomical refraction of the rising and setting Sun. *PASP* 115, 1256-1261.
Bennett, G. G. (1982). The calculation of astronomical refraction in marine
navigation. *Journal of Navigation* 35, 255-259.
Rodrigues, O. (1840). Des lois géométriques qui régissent les déplacements d'un
système solide dans l'espace. *J. Math. Pures Appl.* 5, 380-440 (rotation formula).
O'Neill, M. E. (2014). PCG: a family of simple fast space-efficient statistically
good algorithms for random number generation (numpy's default generator).
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, fields

import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.errors import InputError

__all__ = [
    "REFRACTION_SIGMA_HORIZON_DEG",
    "Draw",
    "Tolerances",
    "make_draws",
    "nominal_draw",
    "parse_epoch",
    "rotation_about_up",
    "rotation_from_vector",
    "shift_rotation_vector",
    "tolerances_from_table",
]

#: σ of the refraction of the rising/setting Sun about its model value, degrees (Sampson et al. 2003).
REFRACTION_SIGMA_HORIZON_DEG = 0.18

#: Standard normals taken per draw, in this order (fixed so draws never shift).
_NORMALS = (
    "azimuth",
    "tilt_east",
    "tilt_north",
    "opening_e",
    "opening_n",
    "opening_u",
    "target_e",
    "target_n",
    "target_u",
    "horizon",
    "temperature",
    "pressure",
    "refraction",
    "delta_t",
    "epoch",
)

#: Stream numbers under the root SeedSequence.
SURVEY_STREAM, NULL_STREAM = 0, 1


@dataclass(frozen=True)
class Tolerances:
    """One-sigma uncertainties of a survey and its sky (all ≥ 0; zero turns a term off).

    Parameters
    ----------
    opening_azimuth_deg : azimuth of the opening's axis, degrees.
    opening_tilt_deg : tilt of the structure, degrees (per horizontal axis).
    opening_position_m, target_position_m : position of the opening / target, metres (per axis).
    horizon_altitude_deg : altitude of the horizon profile, degrees.
    temperature_c, pressure_mbar : air state, °C and mbar.
    refraction_deg : anomalous refraction at the horizon, degrees (0.18 after Sampson et al. 2003),
        tapering with altitude like the refraction itself.
    delta_t : whether ΔT's own σ (Morrison & Stephenson 2004, from :mod:`lightpath.sky.deltat`) is drawn.
    epoch_years : spread of the epoch, years.
    """

    opening_azimuth_deg: float = 0.0
    opening_tilt_deg: float = 0.0
    opening_position_m: float = 0.0
    target_position_m: float = 0.0
    horizon_altitude_deg: float = 0.0
    temperature_c: float = 0.0
    pressure_mbar: float = 0.0
    refraction_deg: float = REFRACTION_SIGMA_HORIZON_DEG
    delta_t: bool = True
    epoch_years: float = 0.0

    def __post_init__(self) -> None:
        for f in fields(self):
            value = getattr(self, f.name)
            if f.name == "delta_t":
                if not isinstance(value, bool):
                    raise InputError(f"tolerances: delta_t {value!r} is not true or false")
                continue
            if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value) or value < 0:
                raise InputError(f"tolerances: {f.name} {value!r} is not a finite number ≥ 0")

    @classmethod
    def zero(cls) -> Tolerances:
        """No uncertainty at all: every draw is the nominal geometry and sky."""
        return cls(refraction_deg=0.0, delta_t=False)

    def scaled(self, factor: float) -> Tolerances:
        """The survey tolerances (azimuth, tilt, positions) multiplied by ``factor``; the sky terms kept."""
        return Tolerances(
            opening_azimuth_deg=self.opening_azimuth_deg * factor,
            opening_tilt_deg=self.opening_tilt_deg * factor,
            opening_position_m=self.opening_position_m * factor,
            target_position_m=self.target_position_m * factor,
            horizon_altitude_deg=self.horizon_altitude_deg,
            temperature_c=self.temperature_c,
            pressure_mbar=self.pressure_mbar,
            refraction_deg=self.refraction_deg,
            delta_t=self.delta_t,
            epoch_years=self.epoch_years,
        )


#: Keys accepted in a scene's [tolerances] table (and aliases) → Tolerances field.
_TABLE_KEYS = {
    "opening_azimuth_deg": "opening_azimuth_deg",
    "azimuth_deg": "opening_azimuth_deg",
    "opening_tilt_deg": "opening_tilt_deg",
    "tilt_deg": "opening_tilt_deg",
    "opening_position_m": "opening_position_m",
    "aperture_position_m": "opening_position_m",
    "target_position_m": "target_position_m",
    "horizon_altitude_deg": "horizon_altitude_deg",
    "horizon_deg": "horizon_altitude_deg",
    "temperature_c": "temperature_c",
    "pressure_mbar": "pressure_mbar",
    "refraction_deg": "refraction_deg",
    "delta_t": "delta_t",
    "epoch_years": "epoch_years",
}


def tolerances_from_table(table: dict | None, *, source: str = "[tolerances]", **overrides) -> Tolerances:
    """Build :class:`Tolerances` from a scene's ``[tolerances]`` table (a dict), then apply ``overrides``.

    Unknown keys raise :class:`InputError` naming the key and the accepted ones.

    >>> tolerances_from_table({"opening_azimuth_deg": 0.3, "tilt_deg": 0.1}).opening_tilt_deg
    0.1
    """
    values: dict = {}
    for key, value in (table or {}).items():
        if key not in _TABLE_KEYS:
            accepted = ", ".join(sorted(_TABLE_KEYS))
            raise InputError(f"{source}: unknown key {key!r}; accepted: {accepted}")
        values[_TABLE_KEYS[key]] = float(value) if key != "delta_t" else value
    values.update({k: v for k, v in overrides.items() if v is not None})
    return Tolerances(**values)


_SPREAD_RE = re.compile(r"±|\+/-|\+-")


def parse_epoch(text: str, option: str = "--epoch") -> tuple[int, float]:
    """``"Y[±S]"`` → (astronomical year, σ in years).

    ``Y`` is any year :func:`lightpath.sky.calendar.year_from_label` reads (``-3199``, ``3200 BC``,
    ``AD 33``); ``±`` may also be written ``+/-`` or ``+-``; ``S`` is a one-sigma spread in years.

    >>> parse_epoch("-3199+/-100")
    (-3199, 100.0)
    >>> parse_epoch("2024")
    (2024, 0.0)
    """
    from lightpath.sky.calendar import year_from_label

    usage = f"{option}: {text!r} is not YEAR[±YEARS] (e.g. -3199, '3200 BC', '3200 BC±50', '-3199+/-50')"
    pieces = _SPREAD_RE.split(str(text))
    if len(pieces) > 2 or not pieces[0].strip():
        raise InputError(usage)
    year_text = re.sub(r"(\d)([A-Za-z])", r"\1 \2", pieces[0].strip())
    try:
        year = year_from_label(year_text, option)
    except InputError:
        raise InputError(usage) from None
    sigma = 0.0
    if len(pieces) == 2:
        try:
            sigma = float(pieces[1])
        except ValueError:
            raise InputError(usage) from None
        if not (math.isfinite(sigma) and sigma >= 0):
            raise InputError(f"{option}: spread {pieces[1].strip()!r} must be a number of years ≥ 0")
    if not -9999 <= year <= 3000:
        raise InputError(f"{option}: year {year} is outside -9999..3000 (10,000 BC to AD 3000)")
    return year, sigma


@dataclass(frozen=True)
class Draw:
    """One Monte Carlo realisation of the structure and its sky.

    ``rotation`` is the 3×3 rotation (ENU) of the structure about the target;
    the window is looked up at ``rotation.T @ sun``.  Angles in degrees.
    """

    index: int
    year: int
    rotation: tuple[tuple[float, float, float], ...]
    azimuth_offset_deg: float
    tilt_east_deg: float
    tilt_north_deg: float
    shift_deg: float
    horizon_offset_deg: float
    temperature_c: float
    pressure_mbar: float
    refraction_offset_deg: float
    delta_t_z: float

    @property
    def rotation_matrix(self) -> NDArray:
        """``rotation`` as a (3, 3) float64 array."""
        return np.array(self.rotation, dtype=float)


def rotation_from_vector(rotvec_rad: ArrayLike) -> NDArray:
    """3×3 rotation matrix of a rotation vector (axis × angle, radians), by Rodrigues' formula.

    >>> r = rotation_from_vector([0.0, 0.0, np.pi / 2])  # +90° about Up: east → north
    >>> np.round(r @ [1.0, 0.0, 0.0], 12).tolist()
    [0.0, 1.0, 0.0]
    """
    w = np.asarray(rotvec_rad, dtype=float)
    theta = float(np.linalg.norm(w))
    if theta < 1e-300:
        return np.eye(3)
    k = w / theta
    kx = np.array([[0.0, -k[2], k[1]], [k[2], 0.0, -k[0]], [-k[1], k[0], 0.0]])
    # Rodrigues (1840): R = I + sin θ K + (1 − cos θ) K²
    return np.eye(3) + math.sin(theta) * kx + (1.0 - math.cos(theta)) * (kx @ kx)


def rotation_about_up(azimuth_offset_deg: float) -> NDArray:
    """Rotation that turns a structure clockwise (seen from above) by ``azimuth_offset_deg``.

    A direction at azimuth A goes to azimuth A + offset (azimuth clockwise from north).

    >>> r = rotation_about_up(90.0)
    >>> np.round(r @ [0.0, 1.0, 0.0], 12).tolist()  # north → east
    [1.0, 0.0, 0.0]
    """
    # azimuth grows clockwise, i.e. a negative (right-handed) rotation about Up
    return rotation_from_vector([0.0, 0.0, -math.radians(azimuth_offset_deg)])


def shift_rotation_vector(axis_enu: ArrayLike, distance_m: float, shift_enu_m: ArrayLike) -> NDArray:
    """Rotation vector (radians) that moves the line target→opening as a shift of the opening does.

    The opening, at ``distance_m`` from the target along the unit ``axis_enu``, moves by
    ``shift_enu_m`` relative to the target; its direction turns by ``|Δ⊥| / distance``
    about ``axis × Δ``.  This is the small-angle approximation of a translation: exact
    for the line through the opening's centre, approximate (error ∝ the spread of
    target-opening distances) for the rest of the window.

    >>> w = shift_rotation_vector([0.0, 1.0, 0.0], 10.0, [0.1, 0.0, 0.0])
    >>> np.round(np.degrees(w), 4).tolist()  # 0.1 m east at 10 m: 0.573° about -Up
    [0.0, 0.0, -0.573]
    """
    u = np.asarray(axis_enu, dtype=float)
    u = u / np.linalg.norm(u)
    if not (distance_m > 0 and math.isfinite(distance_m)):
        raise InputError(f"opening distance {distance_m!r} m must be a positive finite number")
    return np.cross(u, np.asarray(shift_enu_m, dtype=float)) / distance_m


def _draw_from_normals(
    index: int,
    z: NDArray,
    tol: Tolerances,
    year: int,
    axis_enu: ArrayLike | None,
    distance_m: float | None,
    temperature_c: float,
    pressure_mbar: float,
) -> Draw:
    n = dict(zip(_NORMALS, z, strict=True))
    az = tol.opening_azimuth_deg * n["azimuth"]
    te = tol.opening_tilt_deg * n["tilt_east"]
    tn = tol.opening_tilt_deg * n["tilt_north"]
    rot = rotation_about_up(az)
    if te or tn:
        rot = rotation_from_vector(np.radians([te, tn, 0.0])) @ rot
    shift_deg = 0.0
    if (tol.opening_position_m or tol.target_position_m) and axis_enu is not None and distance_m:
        shift = tol.opening_position_m * np.array([n["opening_e"], n["opening_n"], n["opening_u"]]) - (
            tol.target_position_m * np.array([n["target_e"], n["target_n"], n["target_u"]])
        )
        w = shift_rotation_vector(axis_enu, distance_m, shift)
        shift_deg = math.degrees(float(np.linalg.norm(w)))
        rot = rotation_from_vector(w) @ rot
    return Draw(
        index=index,
        year=int(round(year + tol.epoch_years * n["epoch"])),
        rotation=tuple(tuple(float(v) for v in row) for row in rot),
        azimuth_offset_deg=float(az),
        tilt_east_deg=float(te),
        tilt_north_deg=float(tn),
        shift_deg=float(shift_deg),
        horizon_offset_deg=float(tol.horizon_altitude_deg * n["horizon"]),
        temperature_c=float(temperature_c + tol.temperature_c * n["temperature"]),
        pressure_mbar=float(max(0.0, pressure_mbar + tol.pressure_mbar * n["pressure"])),
        refraction_offset_deg=float(tol.refraction_deg * n["refraction"]),
        delta_t_z=float(n["delta_t"]) if tol.delta_t else 0.0,
    )


def make_draws(
    tolerances: Tolerances,
    n: int,
    *,
    seed: int,
    year: int,
    axis_enu: ArrayLike | None = None,
    distance_m: float | None = None,
    temperature_c: float = 10.0,
    pressure_mbar: float = 1010.0,
    stream: int = SURVEY_STREAM,
    start: int = 0,
) -> list[Draw]:
    """Draws ``start … start+n−1`` of the Monte Carlo, each from its own child SeedSequence.

    Parameters
    ----------
    tolerances : the one-sigma spreads.
    n : number of draws.
    seed : the study's seed (an integer ≥ 0).
    year : nominal epoch, astronomical numbering; each draw adds ``epoch_years × z``, rounded.
    axis_enu, distance_m : unit vector target→opening and its length in metres (needed for
        position tolerances; without them those terms are left out).
    temperature_c, pressure_mbar : the nominal air state (the site's).
    stream : :data:`SURVEY_STREAM` or :data:`NULL_STREAM` (independent streams of one seed).
    start : index of the first draw (draw *i* is the same in every call).
    """
    if isinstance(n, bool) or not isinstance(n, int) or n < 0:
        raise InputError(f"--draws: {n!r} is not a whole number ≥ 0")
    if isinstance(seed, bool) or not isinstance(seed, int) or seed < 0:
        raise InputError(f"--seed: {seed!r} is not a whole number ≥ 0")
    root = np.random.SeedSequence(seed, spawn_key=(stream,))
    draws = []
    for i in range(start, start + n):
        child = np.random.SeedSequence(root.entropy, spawn_key=(*root.spawn_key, i))
        z = np.random.default_rng(child).standard_normal(len(_NORMALS))
        draws.append(_draw_from_normals(i, z, tolerances, year, axis_enu, distance_m, temperature_c, pressure_mbar))
    return draws


def nominal_draw(year: int, temperature_c: float = 10.0, pressure_mbar: float = 1010.0, index: int = -1) -> Draw:
    """The draw with no perturbation at all (the surveyed geometry, the model sky).

    >>> nominal_draw(2024).rotation_matrix.tolist() == np.eye(3).tolist()
    True
    """
    z = np.zeros(len(_NORMALS))
    return _draw_from_normals(index, z, Tolerances.zero(), year, None, None, temperature_c, pressure_mbar)
