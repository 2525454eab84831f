"""Where the Sun is seen from: a point on the Earth and its air.

>>> obs = Observer(latitude_deg=53.452, longitude_deg=104.637, elevation_m=548.0)
>>> obs.refraction
'bennett1982'
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from lightpath.errors import InputError

__all__ = ["Observer", "REFRACTION_MODELS"]

#: Accepted refraction models (``None`` turns refraction off).
REFRACTION_MODELS = ("bennett1982", "saemundsson1986")


@dataclass(frozen=True)
class Observer:
    """A site on the Earth's surface and the state of its air.

    Parameters
    ----------
    latitude_deg : geodetic latitude, degrees north (-90..90).
    longitude_deg : longitude, degrees east (-180..180).
    elevation_m : height above the WGS84 ellipsoid (≈ sea level), metres.
    temperature_c : air temperature for refraction, degrees Celsius.
    pressure_mbar : air pressure for refraction, millibars (hPa).
    refraction : ``"bennett1982"``, ``"saemundsson1986"`` or ``None`` (geometric only).
    timezone : IANA time zone name for civil times (e.g. ``"Asia/Irkutsk"``), or ``None``.
    """

    latitude_deg: float
    longitude_deg: float
    elevation_m: float = 0.0
    temperature_c: float = 10.0
    pressure_mbar: float = 1010.0
    refraction: str | None = "bennett1982"
    timezone: str | None = None

    def __post_init__(self) -> None:
        checks = (
            ("latitude", self.latitude_deg, -90.0, 90.0, "degrees"),
            ("longitude", self.longitude_deg, -180.0, 180.0, "degrees east"),
            ("elevation", self.elevation_m, -500.0, 9000.0, "metres"),
            ("temperature", self.temperature_c, -90.0, 60.0, "degrees Celsius"),
            ("pressure", self.pressure_mbar, 0.0, 1100.0, "mbar"),
        )
        for name, value, low, high, unit in checks:
            if not (isinstance(value, (int, float)) and math.isfinite(value) and low <= value <= high):
                raise InputError(f"{name} {value!r} is outside {low:g}..{high:g} {unit}")
        if self.refraction is not None and self.refraction not in REFRACTION_MODELS:
            raise InputError(f"refraction {self.refraction!r} is not one of {', '.join(REFRACTION_MODELS)} or none")
