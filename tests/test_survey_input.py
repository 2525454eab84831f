"""Survey input: elevation-model skylines, DMS angles, projected sites, IGRF declination, horizon CSV forms,
polygons in other frames, and the up-axis warnings."""

from __future__ import annotations

import datetime
import json
import shutil
import subprocess
import sys

import numpy as np
import pytest

from lightpath.errors import InputError
from lightpath.scene import demo_scene_path, load_scene
from lightpath.site.dem import dem_skyline
from lightpath.sky.angles import parse_angle_deg
from lightpath.sky.horizon import read_horizon_csv

rasterio = pytest.importorskip("rasterio")
from rasterio.transform import from_origin  # noqa: E402

LAT, LON = 41.62, -8.05
#: A Transverse Mercator grid centred on the test place: scale 1 and convergence 0 along its meridian.
LOCAL_TM = f"+proj=tmerc +lat_0={LAT} +lon_0={LON} +k=1 +x_0=0 +y_0=0 +ellps=WGS84 +units=m +no_defs"
K, R = 0.13, 6_371_008.8  # the refraction coefficient and Earth radius the skyline uses


def ridge_tif(path, *, crs=LOCAL_TM, x0=0.0, y0=0.0, D=3000.0, H=300.0, w=600.0, cell=20.0, half=6010.0, nodata=None):
    """A straight north-south ridge D m east of (x0, y0), height H, triangular section of half-width w.

    The crest runs along a column of cell centres, so bilinear interpolation reproduces the ridge exactly.
    Returns (heights, cell-centre x, cell-centre y).
    """
    n = int(round(2 * half / cell))
    xc = x0 - half + cell * (np.arange(n) + 0.5)
    yc = y0 + half - cell * (np.arange(n) + 0.5)
    X, _ = np.meshgrid(xc, yc)
    Z = H * np.clip(1.0 - np.abs(X - x0 - D) / w, 0.0, None)
    if nodata is not None:
        Z[nodata] = -9999.0
    profile = dict(driver="GTiff", height=n, width=n, count=1, dtype="float32", crs=crs, nodata=-9999.0)
    with rasterio.open(path, "w", transform=from_origin(x0 - half, y0 + half, cell, cell), **profile) as dst:
        dst.write(Z.astype("float32"), 1)
    return Z, xc, yc


def ridge_closed_form_deg(azimuth_deg, D=3000.0, H=300.0, eye=0.0):
    """Closed form: along azimuth A the crest is at d = D / sin A; a = atan2(H − e − (1 − k) d² / 2R, d)."""
    d = D / np.sin(np.radians(azimuth_deg))
    return np.degrees(np.arctan2(H - eye - (1 - K) * d * d / (2 * R), d)), d


# --- elevation-model skyline --------------------------------------------------------------------------------


def test_dem_ridge_matches_closed_form(tmp_path):
    ridge_tif(tmp_path / "ridge.tif")
    sky = dem_skyline([tmp_path / "ridge.tif"], LAT, LON, observer_height_m=0.0, step_deg=5.0, max_distance_m=5900)
    on_ridge = (sky.azimuth_deg >= 35) & (sky.azimuth_deg <= 145)  # the crest within 5900 m
    expected, distance = ridge_closed_form_deg(sky.azimuth_deg[on_ridge])
    assert sky.ground_elevation_m == pytest.approx(0.0, abs=1e-9)
    np.testing.assert_allclose(sky.altitude_deg[on_ridge], expected, atol=1e-4)
    np.testing.assert_allclose(sky.distance_m[on_ridge], distance, rtol=1e-4)
    west = (sky.azimuth_deg > 200) & (sky.azimuth_deg < 340)  # flat ground at the eye's height: just below 0
    assert np.all(sky.altitude_deg[west] < 0) and np.all(sky.altitude_deg[west] > -0.01)


def test_dem_agrees_with_the_mesh_terrain_path(tmp_path):
    import trimesh

    from lightpath.site.terrain import skyline_from_terrain

    Z, xc, yc = ridge_tif(tmp_path / "ridge.tif", cell=40.0, half=6020.0)
    X, Y = np.meshgrid(xc, yc)
    n = len(xc)
    idx = np.arange(n * n).reshape(n, n)
    quads = np.stack([idx[:-1, :-1], idx[:-1, 1:], idx[1:, 1:], idx[1:, :-1]], axis=-1).reshape(-1, 4)
    faces = np.vstack([quads[:, [0, 2, 1]], quads[:, [0, 3, 2]]])
    eye = 2.0
    mesh = trimesh.Trimesh(np.column_stack([X.ravel(), Y.ravel(), Z.ravel() - eye]), faces, process=False)
    mesh_sky = skyline_from_terrain(mesh, (0.0, 0.0, 0.0), step_deg=10.0, max_altitude_deg=30.0)
    dem_sky = dem_skyline([tmp_path / "ridge.tif"], LAT, LON, observer_height_m=eye, step_deg=10.0, max_distance_m=5900)
    on_ridge = (dem_sky.azimuth_deg >= 40) & (dem_sky.azimuth_deg <= 140)
    # the mesh path bisects to 1/256 deg and corrects curvature as (1 - k) d / 2R on the flat altitude
    np.testing.assert_allclose(dem_sky.altitude_deg[on_ridge], mesh_sky.altitude_deg[on_ridge], atol=0.01)


def test_dem_in_a_geographic_crs_gives_the_same_skyline(tmp_path):
    from rasterio.warp import Resampling, calculate_default_transform, reproject

    ridge_tif(tmp_path / "ridge.tif")
    with rasterio.open(tmp_path / "ridge.tif") as src:
        transform, width, height = calculate_default_transform(src.crs, "EPSG:4326", src.width, src.height, *src.bounds)
        out = np.zeros((height, width), np.float32)
        reproject(rasterio.band(src, 1), out, dst_transform=transform, dst_crs="EPSG:4326",
                  resampling=Resampling.bilinear)  # fmt: skip
    with rasterio.open(tmp_path / "geo.tif", "w", driver="GTiff", height=height, width=width, count=1,
                       dtype="float32", crs="EPSG:4326", transform=transform) as dst:  # fmt: skip
        dst.write(out, 1)
    a = dem_skyline([tmp_path / "ridge.tif"], LAT, LON, observer_height_m=0.0, step_deg=10.0, max_distance_m=5900)
    b = dem_skyline([tmp_path / "geo.tif"], LAT, LON, observer_height_m=0.0, step_deg=10.0, max_distance_m=5900)
    on_ridge = (a.azimuth_deg >= 40) & (a.azimuth_deg <= 140)
    # resampling onto another ~20 m grid cuts the crest by at most slope x half a cell = 0.5 x 10 m = 5 m,
    # 0.1 deg at 3 km, and never raises it
    np.testing.assert_allclose(b.altitude_deg[on_ridge], a.altitude_deg[on_ridge], atol=0.1)
    assert np.all(b.altitude_deg[on_ridge] <= a.altitude_deg[on_ridge] + 1e-6)


def test_dem_nodata_cells_are_named_and_the_result_is_cached(tmp_path):
    hole = (slice(290, 300), slice(445, 455))  # ten rows of the crest north-east of the site
    ridge_tif(tmp_path / "ridge.tif", nodata=hole)
    cache = tmp_path / "cache"
    sky = dem_skyline([tmp_path / "ridge.tif"], LAT, LON, step_deg=1.0, max_distance_m=5900, cache_dir=cache)
    assert any("nodata cells" in note and "ridge.tif" in note and "row" in note for note in sky.notes), sky.notes
    assert len(list(cache.glob("dem-skyline-*.npz"))) == 1
    again = dem_skyline([tmp_path / "ridge.tif"], LAT, LON, step_deg=1.0, max_distance_m=5900, cache_dir=cache)
    np.testing.assert_array_equal(again.altitude_deg, sky.altitude_deg)
    assert again.notes == sky.notes


@pytest.mark.parametrize(
    "make, words",
    [
        (lambda p: p.write_text("not a raster"), ["dem.tif", "not a raster", "GeoTIFF"]),
        (lambda p: ridge_tif(p, x0=50_000.0), ["dem.tif", "does not cover the site"]),
        (lambda p: ridge_tif(p, crs=None), ["dem.tif", "no coordinate reference system"]),
    ],
)
def test_dem_bad_files(tmp_path, make, words):
    make(tmp_path / "dem.tif")
    with pytest.raises(InputError) as info:
        dem_skyline([tmp_path / "dem.tif"], LAT, LON, max_distance_m=2000)
    message = str(info.value)
    assert "\n" not in message
    for word in words:
        assert word in message, message


# --- DMS angles ---------------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    "text, kind, expected",
    [
        ("41°37'12\"N", "latitude", 41.62),
        ("41°37′12″ N", "latitude", 41.62),
        ("N 41 37 12", "latitude", 41.62),
        ("41:37:12", "latitude", 41.62),
        ("41 37.2 n", "latitude", 41.62),
        ("41°37'12''S", "latitude", -41.62),
        ("8 03 00 W", "longitude", -8.05),
        ("8°3'E", "longitude", 8.05),
        ("-8.05", "longitude", -8.05),
        (" 120°30' ", "angle", 120.5),
        (41.62, "latitude", 41.62),
    ],
)
def test_dms_forms(text, kind, expected):
    assert parse_angle_deg(text, kind=kind) == pytest.approx(expected, abs=1e-9)


@pytest.mark.parametrize(
    "text, kind, words",
    [
        ("91 00 00 N", "latitude", ["outside -90..90"]),
        ("181 W", "longitude", ["outside -180..180"]),
        ("41 60 00 N", "latitude", ["minutes 60"]),
        ("41 37 60 N", "latitude", ["seconds 60"]),
        ("41.5 30 N", "latitude", ["decimals"]),
        ("-41 37 N", "latitude", ["sign or a hemisphere letter"]),
        ("41 37 E", "latitude", ["letter E", "N/S"]),
        ("8 03 N", "longitude", ["letter N", "E/W"]),
        ("forty", "latitude", ["not an angle", "41°37'12\"N"]),
        ("", "latitude", ["not an angle"]),
        ("1 2 3 4", "latitude", ["not an angle"]),
    ],
)
def test_dms_bad_forms(text, kind, words):
    with pytest.raises(InputError) as info:
        parse_angle_deg(text, kind=kind, name="site.latitude_deg")
    message = str(info.value)
    assert message.startswith("site.latitude_deg:") and "\n" not in message
    for word in words:
        assert word in message, message


# --- projected site, grid convergence, IGRF declination -------------------------------------------------------

EASTING, NORTHING = 574_000.0, 4_608_000.0  # a point of UTM zone 29N (ETRS89) in north-west Iberia


def test_projected_site_and_convergence_match_pyproj():
    from pyproj import Proj, Transformer

    from lightpath.scene.survey import site_from_table

    survey = site_from_table({"crs": "EPSG:25829", "easting_m": EASTING, "northing_m": NORTHING}, "a.toml")
    lon, lat = Transformer.from_crs("EPSG:25829", "EPSG:4326", always_xy=True).transform(EASTING, NORTHING)
    assert (survey.latitude_deg, survey.longitude_deg) == pytest.approx((lat, lon), abs=1e-9)
    # reference: pyproj's own Proj(...).get_factors(...).meridian_convergence, on ETRS89 (= WGS 84 here)
    gamma = Proj("EPSG:25829").get_factors(lon, lat).meridian_convergence
    assert survey.convergence_deg == pytest.approx(gamma, abs=1e-6)
    # Snyder (1987) eq. 8-15 to first order, (λ − λ0) sin φ with λ0 = 9° W: sign and size agree
    assert survey.convergence_deg == pytest.approx((lon + 9.0) * np.sin(np.radians(lat)), abs=0.01)


def test_declination_agrees_with_the_igrf_package():
    import ppigrf

    from lightpath.scene.magnetic import magnetic_declination_deg

    day = datetime.date(2020, 1, 1)
    got = magnetic_declination_deg(LAT, LON, 100.0, day)
    # reference: ppigrf (IGRF-14 coefficients), D = atan2(B_east, B_north), 100 m = 0.1 km above the ellipsoid
    east, north, _ = ppigrf.igrf(LON, LAT, 0.1, datetime.datetime(2020, 1, 1, 12))
    assert got == pytest.approx(np.degrees(np.arctan2(east.item(), north.item())), abs=1e-9)
    assert -3.0 < got < 0.0  # about 1-2 deg W in north-west Iberia around 2020 (from memory)


@pytest.mark.parametrize("day", [datetime.date(1899, 12, 31), datetime.date(2031, 6, 1)])
def test_declination_outside_the_model_is_refused(day):
    from lightpath.scene.magnetic import magnetic_declination_deg

    with pytest.raises(InputError, match=r"site.survey_date: .* outside the geomagnetic model IGRF-14 \(1900-01-01"):
        magnetic_declination_deg(LAT, LON, 0.0, day)


# --- horizon CSV forms ---------------------------------------------------------------------------------------


def test_horizon_csv_aliases_semicolons_dms_and_north(tmp_path):
    rows = [(a, 1.0 + a / 360.0) for a in range(0, 360, 15)]
    plain = tmp_path / "plain.csv"
    plain.write_text("azimuth_deg,altitude_deg\n" + "".join(f"{a},{h}\n" for a, h in rows))
    reference = read_horizon_csv(plain)
    forms = {
        "alias.csv": "Alt,Az\n" + "".join(f"{h},{a}\n" for a, h in rows),
        "semi.csv": "azimuth;altitude;distance\n" + "".join(f"{a};{str(h).replace('.', ',')};9\n" for a, h in rows),
        "dms.csv": "az,alt\n" + "".join(f"{a}°00'00\",{int(h)}°{(h % 1) * 60:.10f}'\n" for a, h in rows),
    }
    for name, body in forms.items():
        (tmp_path / name).write_text(body)
        got = read_horizon_csv(tmp_path / name)
        np.testing.assert_allclose(got.altitude_deg, reference.altitude_deg, atol=1e-9, err_msg=name)
    compass = tmp_path / "compass.csv"  # bearings read 2.5 deg west of true: true = magnetic + (-2.5)
    compass.write_text(
        "# north: magnetic, declination 2°30' W\naz,alt\n" + "".join(f"{a + 2.5},{h}\n" for a, h in rows)
    )
    np.testing.assert_allclose(read_horizon_csv(compass).altitude_deg, reference.altitude_deg, atol=1e-9)
    bare = tmp_path / "bare.csv"  # magnetic bearings, the declination from outside (a scene's survey date)
    bare.write_text("az,alt\n" + "".join(f"{a + 2.5},{h}\n" for a, h in rows))
    turned = read_horizon_csv(bare, north="magnetic", declination_deg=-2.5)
    np.testing.assert_allclose(turned.altitude_deg, reference.altitude_deg, atol=1e-9)
    with pytest.raises(InputError, match="says magnetic north but the scene says true"):
        read_horizon_csv(compass, north="true")


# --- scenes: polygons in other frames, the up axis, the whole survey scene --------------------------------------

DEMO = demo_scene_path("larchfold")


def _scene(tmp_path, site: str, model: str, extra: str = "", target: str = 'groups = ["target"]') -> str:
    shutil.copy(DEMO.parent / "larchfold.obj", tmp_path / "larchfold.obj")
    body = f'[site]\n{site}\n\n[model]\nfile = "larchfold.obj"\nunit = "m"\n{model}\n\n[target]\n{target}\n\n'
    body += '[opening]\ngroups = ["slot"]\n\n' + extra
    (tmp_path / "scene.toml").write_text(body)
    return tmp_path / "scene.toml"


def test_polygon_in_model_frame_equals_site_frame(tmp_path):
    model = 'up_axis = "y"\nnorth_axis = "-z"\nnorth = "true"\nrotation_deg = 30.0\noffset_m = [1.0, 2.0, 0.5]'
    site = "latitude_deg = 53.452\nlongitude_deg = 104.637"
    corners_site = np.array([[0.0, 0.0, 0.2], [0.3, 0.0, 0.2], [0.3, 0.0, 0.5], [0.0, 0.0, 0.5]])
    ref = load_scene(_scene(tmp_path, site, model, target=f"polygon_m = {corners_site.tolist()}"))
    from lightpath.site.frames import model_to_site_matrix

    T = model_to_site_matrix("m", up_axis="y", north_axis="-z", rotation_deg=30.0, offset_m=(1.0, 2.0, 0.5))
    corners_model = (np.linalg.inv(T) @ np.column_stack([corners_site, np.ones(4)]).T).T[:, :3]
    got = load_scene(_scene(tmp_path, site, model, target=f'frame = "model"\npolygon_m = {corners_model.tolist()}'))
    np.testing.assert_allclose(np.asarray(got.target.vertices), np.asarray(ref.target.vertices), atol=1e-9)


def test_polygon_in_grid_frame(tmp_path):
    site = f'crs = "EPSG:25829"\neasting_m = {EASTING}\nnorthing_m = {NORTHING}\nelevation_m = 100.0'
    model = 'up_axis = "z"\nnorth = "grid"'
    grid = [[EASTING + 1.0, NORTHING, 100.5], [EASTING + 1.0, NORTHING + 1.0, 100.5], [EASTING + 1.0, NORTHING, 101.5]]
    scene = load_scene(_scene(tmp_path, site, model, target=f'frame = "crs"\npolygon_m = {grid}'))
    gamma, k = scene.survey["convergence_deg"], scene.survey["scale_factor"]
    v = np.asarray(scene.target.vertices)
    # 1 grid metre east is 1/k ground metres at true azimuth 90 + gamma
    east, north = np.sin(np.radians(90 + gamma)) / k, np.cos(np.radians(90 + gamma)) / k
    np.testing.assert_allclose(v[0], [east, north, 0.5], atol=1e-9)


@pytest.mark.parametrize(
    "site, model, extra, words",
    [
        ('crs = "EPSG:999999"\neasting_m = 1.0\nnorthing_m = 2.0', 'up_axis = "z"\nnorth = "true"', "",
         ["site.crs", "not a coordinate reference system pyproj knows", "EPSG:25829"]),
        ("latitude_deg = \"41 37 99 N\"\nlongitude_deg = 1.0", 'up_axis = "z"\nnorth = "true"', "",
         ["site.latitude_deg", "seconds 99"]),
        ("latitude_deg = 41.0\nlongitude_deg = 1.0\nsurvey_date = 1850-06-01", 'up_axis = "z"\nnorth = "magnetic"', "",
         ["site.survey_date", "IGRF-14", "1900-01-01"]),
        ("latitude_deg = 41.0\nlongitude_deg = 1.0", 'up_axis = "z"\nnorth = "magnetic"', "",
         ["model.declination_deg", "site.survey_date"]),
        ("latitude_deg = 41.0\nlongitude_deg = 1.0", 'up_axis = "z"\nnorth = "grid"', "", ["site.crs"]),
        ("latitude_deg = 41.0\nlongitude_deg = 1.0\ncrs = \"EPSG:25829\"", 'up_axis = "z"', "", ["not both"]),
        ("latitude_deg = 41.0\nlongitude_deg = 1.0", 'up_axis = "z"\nnorth = "true"',
         '[horizon]\nkind = "dem"\nfiles = ["absent.tif"]\n', ["absent.tif"]),
    ],
)  # fmt: skip
def test_bad_survey_scenes(tmp_path, site, model, extra, words):
    with pytest.raises(InputError) as info:
        load_scene(_scene(tmp_path, site, model, extra))
    message = str(info.value)
    assert "scene.toml" in message and "\n" not in message
    for word in words:
        assert word in message, message


def test_inspect_warns_on_a_wrong_up_axis(tmp_path):
    site = "latitude_deg = 53.452\nlongitude_deg = 104.637"
    right = load_scene(_scene(tmp_path, site, 'up_axis = "z"\nnorth_axis = "y"\nnorth = "true"'))
    assert not any("up_axis" in w for w in right.warnings), right.warnings
    # the file is z-up; declaring y up lays the chamber on its side (target facing up or down)
    wrong = load_scene(_scene(tmp_path, site, 'up_axis = "y"\nnorth_axis = "z"\nnorth = "true"'))
    assert any("is model.up_axis right?" in w for w in wrong.warnings), wrong.warnings
    # upside down: most of the chamber ends up below the target
    flipped = load_scene(_scene(tmp_path, site, 'up_axis = "-z"\nnorth_axis = "y"\neast_axis = "x"\nnorth = "true"'))
    assert any("below the target" in w for w in flipped.warnings), flipped.warnings


def _survey_scene(tmp_path, site: str):
    """The issue's scene: an elevation-model horizon, magnetic north from the survey date, the site as given."""
    ridge_tif(tmp_path / "hills.tif", crs="EPSG:25829", x0=EASTING, y0=NORTHING, H=150.0, cell=30.0, half=4515.0)
    model = 'up_axis = "z"\nnorth_axis = "y"\nnorth = "magnetic"'
    extra = '[horizon]\nkind = "dem"\nfiles = ["hills.tif"]\nmax_distance_m = 4000.0\nstep_deg = 1.0\n'
    return _scene(tmp_path, site + "\nsurvey_date = 2024-05-03", model, extra)


@pytest.mark.parametrize("projected", [False, True])
def test_survey_scene_runs_inspect_and_scan(tmp_path, projected):
    from pyproj import Transformer

    lon, lat = Transformer.from_crs("EPSG:25829", "EPSG:4326", always_xy=True).transform(EASTING, NORTHING)
    if projected:
        site = f'crs = "EPSG:25829"\neasting_m = {EASTING}\nnorthing_m = {NORTHING}'
    else:

        def dms(value, letters):
            a = abs(value)
            d, m = int(a), int((a % 1) * 60)
            return f"{d}°{m:02d}'{((a * 60) % 1) * 60:.6f}\\\"{letters[value < 0]}"  # TOML: \" inside quotes

        site = f'latitude_deg = "{dms(lat, "NS")}"\nlongitude_deg = "{dms(lon, "EW")}"'
    path = _survey_scene(tmp_path, site)
    scene = load_scene(path)
    assert scene.observer.latitude_deg == pytest.approx(lat, abs=1e-7)
    assert "hills.tif" in scene.horizon.source
    assert float(scene.horizon.altitude_at(90.0)) > 2.0  # the ridge 3 km east, 150 m high
    inspect = subprocess.run([sys.executable, "-m", "lightpath", "inspect", str(path), "--samples", "50"],
                             capture_output=True, text=True, timeout=300)  # fmt: skip
    assert inspect.returncode == 0, inspect.stderr
    assert "declination" in inspect.stdout and "IGRF-14" in inspect.stdout and "2024-05-03" in inspect.stdout
    assert ("grid convergence" in inspect.stdout) == projected
    scan = subprocess.run([sys.executable, "-m", "lightpath", "scan", str(path), "--year", "2027", "--samples", "20",
                           "--resolution", "0.5", "--no-cache", "--json", "--quiet"],
                          capture_output=True, text=True, timeout=600)  # fmt: skip
    assert scan.returncode == 0, scan.stderr
    json.loads(scan.stdout)


def test_survey_scene_bad_date_exits_2(tmp_path):
    path = _survey_scene(tmp_path, "latitude_deg = 41.62\nlongitude_deg = -8.05").read_text()
    (tmp_path / "scene.toml").write_text(path.replace("survey_date = 2024-05-03", "survey_date = 2035-01-01"))
    run = subprocess.run([sys.executable, "-m", "lightpath", "inspect", str(tmp_path / "scene.toml")],
                         capture_output=True, text=True, timeout=300)  # fmt: skip
    assert run.returncode == 2
    assert "site.survey_date" in run.stderr and "IGRF-14" in run.stderr and "Traceback" not in run.stderr
