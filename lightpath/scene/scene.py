"""Scene files: a TOML description of a site, its mesh, target, opening, horizon and air → :class:`Scene`.

The format is documented key by key in ``docs/scene-format.md``.  A minimal file::

    [site]
    latitude_deg = 53.45
    longitude_deg = 104.64

    [model]
    file = "chamber.obj"     # relative to this file
    unit = "m"
    up_axis = "z"
    north = "true"

    [target]
    groups = ["slab"]

Everything comes out in the site frame (East-North-Up metres).  ``Scene.mesh`` holds all geometry that
blocks light (the target included); the opening — the surface light passes through, e.g. a pane across a
slot — never blocks light: faces selected as the opening by name are taken out of ``Scene.mesh``.

>>> scene = load_scene(demo_scene_path("larchfold"))
>>> scene.observer.latitude_deg > 50 and scene.opening is not None and scene.report.target_area_m2 > 0
True
"""

from __future__ import annotations

import hashlib
import os
import tomllib
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from lightpath.errors import InputError
from lightpath.scene.keys import TOLERANCE_KEYS, boolean, check_keys, choice, names, number, text, vector3
from lightpath.scene.survey import POLYGON_FRAMES, SiteSurvey, polygon_in_site, site_from_table
from lightpath.scene.terrain import horizon_from_dem, horizon_from_terrain
from lightpath.site import checks
from lightpath.site.frames import AXES, NORTH_REFERENCES, UNIT_TO_M, apply_transform, model_to_site_matrix
from lightpath.site.meshes import LabeledMesh, read_mesh
from lightpath.site.report import LoadReport, load_report
from lightpath.site.targets import box_mesh, faces_in_box, polygon_mesh, select_by_name, submesh
from lightpath.sky.horizon import HorizonProfile, flat_horizon, horizon_dip_deg, read_horizon_csv
from lightpath.sky.observer import REFRACTION_MODELS, Observer

__all__ = ["Scene", "load_scene", "demo_scene_path", "DEMO_SITES", "standard_pressure_mbar", "hash_geometry"]

#: Invented demo sites in the repository's ``demo_models/`` (installed as ``lightpath/demo_models/``):
#: folder name → scene file.
DEMO_SITES = {
    "sandwren": "sandwren/scene.toml",
    "larchfold": "larchfold/scene.toml",
    "quillfield": "quillfield/scene.toml",
}

_HASH_VERSION = b"lightpath-scene-geometry-1"


@dataclass(frozen=True, eq=False)
class Scene:
    """A loaded scene, everything in the site frame (ENU metres). See the module docstring."""

    path: Path
    label: str
    observer: Observer
    mesh: object  # trimesh.Trimesh: all blocking geometry, target included, opening not
    target: object  # trimesh.Trimesh
    opening: object | None  # trimesh.Trimesh or None
    horizon: HorizonProfile
    tolerances: dict[str, float]
    report: LoadReport
    warnings: list[str] = field(default_factory=list)
    content_hash: str = ""
    survey: dict = field(default_factory=dict)  # what was computed from the survey (convergence, declination)
    parts: dict = field(default_factory=dict)  # part name (the model's groups, else objects) → faces of ``mesh``


def demo_scene_path(name: str) -> Path:
    """Path of a bundled demo scene: ``"sandwren"``, ``"larchfold"`` or ``"quillfield"``.

    An installed package holds them in ``lightpath/demo_models/``; a source checkout (editable install) in the
    repository's top-level ``demo_models/``.
    """
    if name not in DEMO_SITES:
        raise InputError(f"demo site {name!r} is not one of {', '.join(DEMO_SITES)}")
    package = Path(__file__).resolve().parent.parent
    for folder in (package / "demo_models", package.parent / "demo_models"):
        if (folder / DEMO_SITES[name]).is_file():
            return folder / DEMO_SITES[name]
    raise InputError(f"demo site {name!r}: no demo_models/ folder beside the lightpath package (reinstall it)")


def standard_pressure_mbar(elevation_m: float) -> float:
    """Air pressure of the ICAO standard atmosphere at ``elevation_m`` metres, mbar.

    p = 1013.25 (1 − 2.25577e-5 h)^5.25588 (ICAO 1993, Manual of the ICAO Standard Atmosphere, Doc 7488/3,
    troposphere; constants from memory).

    >>> round(standard_pressure_mbar(1000.0), 1)
    898.7
    """
    return 1013.25 * (1.0 - 2.25577e-5 * float(elevation_m)) ** 5.25588  # ICAO (1993) troposphere


def _read_toml(path: Path) -> dict:
    try:
        with path.open("rb") as handle:
            return tomllib.load(handle)
    except FileNotFoundError:
        raise InputError(f"{path}: scene file not found") from None
    except tomllib.TOMLDecodeError as exc:
        raise InputError(f"{path}: not valid TOML ({exc})") from None
    except OSError as exc:
        raise InputError(f"{path}: scene file cannot be read ({exc.strerror or type(exc).__name__})") from None


def _selection_form(table: dict, name: str, where: str) -> str:
    forms = [
        f
        for f, keys in (("names", ("groups", "objects", "materials")), ("file", ("file",)))
        if any(k in table for k in keys)
    ]
    if "box_min_m" in table or "box_max_m" in table:
        forms.append("box")
    if "polygon_m" in table:
        forms.append("polygon")
    if len(forms) != 1:
        raise InputError(
            f"{where}: [{name}] needs exactly one of: groups/objects/materials, file, box_min_m + box_max_m, "
            "or polygon_m" + (f" (found {' and '.join(forms)})" if forms else "")
        )
    return forms[0]


def _wanted_names(table: dict, name: str, where: str) -> dict[str, list[str]]:
    wanted = {}
    for key, kind in (("groups", "group"), ("objects", "object"), ("materials", "material")):
        got = names(table, f"{name}.{key}", where)
        if got:
            wanted[kind] = got
    return wanted


def _box(table: dict, name: str, where: str):
    lo = vector3(table, f"{name}.box_min_m", where)
    hi = vector3(table, f"{name}.box_max_m", where)
    if lo is None or hi is None:
        raise InputError(f"{where}: [{name}] a box needs both box_min_m and box_max_m")
    if not all(a < b for a, b in zip(lo, hi, strict=True)):
        raise InputError(f"{where}: [{name}] box_min_m must be below box_max_m in every coordinate")
    return lo, hi


def hash_geometry(*meshes) -> str:
    """SHA-256 (hex) of the meshes' vertices (float64) and faces (int64); ``None`` hashes as a fixed token."""
    digest = hashlib.sha256(_HASH_VERSION)
    for m in meshes:
        if m is None:
            digest.update(b"none")
            continue
        digest.update(np.ascontiguousarray(m.vertices, dtype=np.float64).tobytes())
        digest.update(np.ascontiguousarray(m.faces, dtype=np.int64).tobytes())
    return digest.hexdigest()


def _model_transform(model_t: dict, where: str, warnings: list[str], survey: SiteSurvey) -> tuple[str, np.ndarray]:
    """The [model] table's unit and file-to-site matrix (appends the no-north warning).

    Magnetic north without ``declination_deg`` takes the IGRF declination for ``site.survey_date``; grid north
    without ``convergence_deg`` takes the convergence of ``site.crs`` at the site (pyproj).
    """
    unit = choice(model_t, "model.unit", where, tuple(UNIT_TO_M))
    up_axis = choice(model_t, "model.up_axis", where, AXES)
    north_axis = choice(model_t, "model.north_axis", where, AXES)
    east_axis = choice(model_t, "model.east_axis", where, AXES)
    north = choice(model_t, "model.north", where, NORTH_REFERENCES)
    warnings += checks.north_warnings(north is not None)
    north = north or "true"
    declination = number(model_t, "model.declination_deg", where, 0.0, -90.0, 90.0)
    convergence = number(model_t, "model.convergence_deg", where, 0.0, -90.0, 90.0)
    if north != "magnetic" and "declination_deg" in model_t:
        raise InputError(f"{where}: 'model.declination_deg' is given but model.north is {north!r}, not 'magnetic'")
    if north != "grid" and "convergence_deg" in model_t:
        raise InputError(f"{where}: 'model.convergence_deg' is given but model.north is {north!r}, not 'grid'")
    if north == "magnetic" and "declination_deg" not in model_t:
        if survey.date is None:
            raise InputError(
                f"{where}: missing key 'model.declination_deg' or 'site.survey_date' (model.north is 'magnetic'; "
                "declination east positive, or a survey date for the geomagnetic model)"
            )
        declination = survey.declination_deg()
    if north == "grid" and "convergence_deg" not in model_t:
        if survey.crs is None:
            raise InputError(
                f"{where}: missing key 'model.convergence_deg' or 'site.crs' (model.north is 'grid'; "
                "the convergence is computed for a site given by crs, easting_m and northing_m)"
            )
        convergence = survey.convergence_deg
    transform = model_to_site_matrix(
        unit,
        up_axis=up_axis,
        north_axis=north_axis,
        east_axis=east_axis,
        north=north,
        declination_deg=declination,
        convergence_deg=convergence,
        rotation_deg=number(model_t, "model.rotation_deg", where, 0.0, -360.0, 360.0),
        offset_m=vector3(model_t, "model.offset_m", where, [0.0, 0.0, 0.0]),
    )
    return unit, transform


def load_scene(path: str | os.PathLike, *, cache_dir: str | os.PathLike | None = None) -> Scene:
    """Read a scene file and everything it names; return a :class:`Scene` in the site frame.

    ``cache_dir`` (or the scene's ``horizon.cache_dir``, relative to the scene file) keeps an elevation model's
    skyline between runs, keyed by the files' bytes and settings.  Raises :class:`~lightpath.errors.InputError`
    (one line naming file and key) for any bad input.
    """
    import trimesh

    path = Path(path)
    where = str(path)
    data = _read_toml(path)
    check_keys(data, where)
    base = path.parent
    site, model_t = data["site"], data.get("model", {})
    target_t, opening_t = data.get("target"), data.get("opening")
    horizon_t, air_t = data.get("horizon", {}), data.get("atmosphere", {})
    warnings: list[str] = []

    # --- site and air -------------------------------------------------------------------------------------
    survey = site_from_table(site, where)
    lat, lon, elevation = survey.latitude_deg, survey.longitude_deg, survey.elevation_m
    timezone = text(site, "site.timezone", where)
    if timezone is not None:
        import zoneinfo

        try:
            zoneinfo.ZoneInfo(timezone)
        except (zoneinfo.ZoneInfoNotFoundError, ValueError):
            raise InputError(f"{where}: 'site.timezone' = {timezone!r} is not an IANA time zone name") from None
    label = text(site, "site.label", where, path.stem)
    temperature = number(air_t, "atmosphere.temperature_c", where, 10.0, -90.0, 60.0)
    pressure = number(air_t, "atmosphere.pressure_mbar", where, None, 0.0, 1100.0)
    if pressure is None:
        pressure = round(standard_pressure_mbar(elevation), 2)
    refraction = choice(air_t, "atmosphere.refraction", where, (*REFRACTION_MODELS, "none"), "bennett1982")
    observer = Observer(
        lat, lon, elevation, temperature, pressure, None if refraction == "none" else refraction, timezone
    )

    # --- model: a mesh file, or a chamber built from survey numbers ---------------------------------------
    if "build" in data:
        from lightpath.site.survey import labeled_from_model, model_from_build

        built = model_from_build(data["build"], where)
        unit, transform = "m", np.eye(4)  # built models are already in the site frame
        target_t = target_t if target_t is not None else {"groups": [built.target_part]}
        if opening_t is None and built.opening_parts:
            opening_t = {"groups": list(built.opening_parts)}
    else:
        unit, transform = _model_transform(model_t, where, warnings, survey)

    def surveyed_polygon(table: dict, name: str):
        frame = choice(table, f"{name}.frame", where, POLYGON_FRAMES, "site")
        if "polygon_m" not in table:
            if "frame" in table:
                raise InputError(f"{where}: '{name}.frame' applies to polygon_m only")
            return None
        key = f"{where}: {name}.polygon_m"
        points = polygon_in_site(table["polygon_m"], frame, survey=survey, transform=transform, key=key)
        return polygon_mesh(points, key=key)

    def read_site_mesh(file_value, key: str) -> LabeledMesh:
        if not isinstance(file_value, str) or not file_value:
            raise InputError(f"{where}: '{key}' must be a file name in quotes")
        try:
            raw = read_mesh(base / file_value)
        except InputError as exc:
            raise InputError(f"{where}: '{key}': {exc}") from None
        v, f = apply_transform(raw.vertices, raw.faces, transform)
        return LabeledMesh(v, f, raw.names, raw.path)

    if "build" in data:
        model = labeled_from_model(built, f"{where} [build]")
        files = [f"(built from [build]: {built.kind})"]
    else:
        model = read_site_mesh(model_t["file"], "model.file")
        files = [model.path]
    keep = np.ones(len(model.faces), dtype=bool)  # model faces that block light

    # --- opening ------------------------------------------------------------------------------------------
    opening = None
    opening_faces = np.empty(0, dtype=np.int64)
    if opening_t is not None:
        form = _selection_form(opening_t, "opening", where)
        polygon = surveyed_polygon(opening_t, "opening")
        if form == "names":
            opening_faces = select_by_name(model, _wanted_names(opening_t, "opening", where), f"{where}: opening")
            opening = submesh(model.vertices, model.faces, opening_faces)
            keep[opening_faces] = False
        elif form == "file":
            extra = read_site_mesh(opening_t["file"], "opening.file")
            files.append(extra.path)
            opening = trimesh.Trimesh(extra.vertices, extra.faces, process=False)
        elif form == "polygon":
            opening = polygon
        else:
            opening = box_mesh(*_box(opening_t, "opening", where))
        if boolean(opening_t, "opening.flip_normals", where, False):
            opening.invert()

    # --- target -------------------------------------------------------------------------------------------
    form = _selection_form(target_t, "target", where)
    polygon = surveyed_polygon(target_t, "target")
    blocking_v, blocking_f = model.vertices, model.faces[keep]
    if form == "names":
        target_faces = select_by_name(model, _wanted_names(target_t, "target", where), f"{where}: target")
        if np.intersect1d(target_faces, opening_faces).size:
            raise InputError(f"{where}: [target] and [opening] select some of the same faces")
        target = submesh(model.vertices, model.faces, target_faces)
    elif form == "box":
        chosen = faces_in_box(blocking_v, blocking_f, *_box(target_t, "target", where))
        target = submesh(blocking_v, blocking_f, chosen)
    else:
        if form == "polygon":
            target = polygon
            extra = LabeledMesh(np.asarray(target.vertices), np.asarray(target.faces))
        else:
            extra = read_site_mesh(target_t["file"], "target.file")
            files.append(extra.path)
            target = trimesh.Trimesh(extra.vertices, extra.faces, process=False)
        blocking_f = np.vstack([blocking_f, extra.faces + len(blocking_v)])
        blocking_v = np.vstack([blocking_v, extra.vertices])
    if len(target.faces) == 0:
        raise InputError(f"{where}: [target] selects no faces (empty target)")
    if boolean(target_t, "target.flip_normals", where, False):
        target.invert()
    mesh = trimesh.Trimesh(blocking_v, blocking_f, process=False)
    if len(mesh.faces) == 0:
        raise InputError(f"{where}: nothing blocks light (the model has only the opening)")

    # --- horizon ------------------------------------------------------------------------------------------
    kind = choice(horizon_t, "horizon.kind", where, ("flat", "csv", "terrain", "dem"), "flat")
    terrain_faces = np.empty(0, dtype=np.int64)
    if kind == "flat":
        dip = number(horizon_t, "horizon.dip_deg", where, None, -10.0, 10.0)
        eye = number(horizon_t, "horizon.eye_height_m", where, None, 0.0, 9000.0)
        if dip is not None and eye is not None:
            raise InputError(f"{where}: [horizon] give dip_deg or eye_height_m, not both")
        horizon = flat_horizon(float(horizon_dip_deg(eye)) if eye is not None else (dip or 0.0))
    elif kind == "csv":
        file_value = text(horizon_t, "horizon.file", where)
        if not file_value:
            raise InputError(f"{where}: missing key 'horizon.file' (horizon.kind is 'csv')")
        horizon_north = choice(horizon_t, "horizon.north", where, ("true", "magnetic"))
        declination = number(horizon_t, "horizon.declination_deg", where, None, -90.0, 90.0)
        if declination is None and model_t.get("north") == "magnetic" and "declination_deg" in model_t:
            declination = float(model_t["declination_deg"])
        if declination is None and survey.date is not None:
            declination = survey.declination_deg()
        try:
            horizon = read_horizon_csv(base / file_value, north=horizon_north, declination_deg=declination)
        except InputError as exc:
            raise InputError(f"{where}: 'horizon.file': {exc}") from None
    elif kind == "dem":
        horizon, notes = _dem_horizon(horizon_t, where, base, survey, opening, cache_dir)
        warnings += notes
    else:
        wanted = _wanted_names(horizon_t, "horizon", where)
        if not wanted:
            raise InputError(f"{where}: [horizon] kind 'terrain' needs groups, objects or materials naming the terrain")
        terrain_faces = select_by_name(model, wanted, f"{where}: horizon")
        if opening is not None:
            default_from = np.asarray(opening.vertices).mean(axis=0)
        else:
            default_from = np.zeros(3)
        horizon, notes = horizon_from_terrain(
            submesh(model.vertices, model.faces, terrain_faces),
            vector3(horizon_t, "horizon.from_m", where, default_from),
            step_deg=number(horizon_t, "horizon.step_deg", where, 1.0, 0.01, 30.0),
            curvature=boolean(horizon_t, "horizon.curvature", where, True),
        )
        warnings += notes

    # --- tolerances ---------------------------------------------------------------------------------------
    tol_t = data.get("tolerances", {})
    tolerances = {key: number(tol_t, f"tolerances.{key}", where, low=0.0) for key in TOLERANCE_KEYS if key in tol_t}

    # --- checks and report --------------------------------------------------------------------------------
    structure = np.setdiff1d(np.arange(len(model.faces)), terrain_faces)
    extents_src = model.vertices[np.unique(model.faces[structure])] if structure.size else mesh.vertices
    scale = checks.extent_warnings(np.ptp(extents_src, axis=0), unit)
    warnings += scale
    warnings += checks.target_area_warnings(float(target.area))
    warnings += checks.facing_warnings(target, opening)
    if "build" not in data:
        warnings += checks.frame_warnings(model.vertices, model.faces[structure], target, opening)
    if opening is None:
        warnings.append("no [opening] given: the whole sky is searched for light (slower, may miss small windows)")
    report = load_report(
        mesh, target, opening, files=files, transform=transform, names=model.available_names(), scale_warnings=scale
    )
    return Scene(
        path=path,
        label=label,
        observer=observer,
        mesh=mesh,
        target=target,
        opening=opening,
        horizon=horizon,
        tolerances=tolerances,
        report=report,
        warnings=warnings,
        content_hash=hash_geometry(mesh, target, opening),
        survey=survey.info(),
        parts=_mesh_parts(model, keep),
    )


def _mesh_parts(model: LabeledMesh, keep: np.ndarray) -> dict[str, np.ndarray]:
    """Part name → indices of ``Scene.mesh`` faces: the model's groups (else objects), blocking faces only."""
    kind = next((k for k in ("group", "object") if model.names.get(k)), None)
    if kind is None:
        return {}
    where = np.full(len(model.faces), -1, dtype=np.int64)
    where[keep] = np.arange(int(keep.sum()))
    out = {name: where[faces][where[faces] >= 0] for name, faces in sorted(model.names[kind].items())}
    return {name: faces for name, faces in out.items() if faces.size}


def _dem_horizon(horizon_t: dict, where: str, base: Path, survey: SiteSurvey, opening, cache_dir):
    """``[horizon] kind = "dem"``: the elevation model's skyline from the opening (or ``from_m``)."""
    from lightpath.site.dem import offset_geographic

    files = horizon_t.get("files")
    if isinstance(files, str):
        files = [files]
    if not (isinstance(files, list) and files and all(isinstance(f, str) and f for f in files)):
        raise InputError(f"{where}: 'horizon.files' must name one or more GeoTIFF files, e.g. [\"dem.tif\"]")
    default_from = np.asarray(opening.vertices).mean(axis=0) if opening is not None else np.zeros(3)
    from_m = vector3(horizon_t, "horizon.from_m", where, default_from)
    lat, lon = offset_geographic(survey.latitude_deg, survey.longitude_deg, from_m[0], from_m[1])
    height = number(horizon_t, "horizon.observer_height_m", where, None, -100.0, 1000.0)
    eye = None
    if height is None:
        if survey.elevation_given:
            eye = survey.elevation_m + float(from_m[2])  # the viewpoint's own elevation
        else:
            height = 1.6  # eye height of a standing adult, metres (common practice, no published source)
    folder = text(horizon_t, "horizon.cache_dir", where)
    cache = cache_dir if cache_dir is not None else (base / folder if folder else None)
    try:
        return horizon_from_dem(
            [base / f for f in files],
            lat,
            lon,
            observer_height_m=1.6 if height is None else height,
            eye_elevation_m=eye,
            step_deg=number(horizon_t, "horizon.step_deg", where, 0.5, 0.01, 30.0),
            max_distance_m=number(horizon_t, "horizon.max_distance_m", where, 30_000.0, 1.0, 500_000.0),
            min_distance_m=number(horizon_t, "horizon.min_distance_m", where, None, 0.0, 100_000.0),
            cache_dir=cache,
        )
    except InputError as exc:
        raise InputError(f"{where}: [horizon]: {exc}") from None
