"""The layers import only downwards: the import-linter contracts in pyproject.toml hold.

``lint-imports`` (import-linter) reads ``[tool.importlinter]`` from pyproject.toml: commands/cli → present →
study → light → scene → sky | site → errors | files | threads, and sky and site independent of each other.
"""

import shutil
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent


def test_import_contracts_hold():
    exe = shutil.which("lint-imports") or shutil.which("lint-imports", path=str(Path(sys.executable).parent))
    if exe is None:
        pytest.skip("import-linter is not installed (pip install -e '.[test]')")
    run = subprocess.run([exe], cwd=ROOT, capture_output=True, text=True, timeout=120)
    assert run.returncode == 0, run.stdout[-4000:] + run.stderr[-2000:]
    assert "0 broken" in run.stdout


def test_earth_radius_agrees_between_sky_and_site():
    # sky/horizon (sea-horizon dip) and site/terrain (skyline curvature) each keep the IUGG mean radius R1
    # (Moritz 2000, Geodetic Reference System 1980); neither may import the other, so this keeps them equal.
    from lightpath.site.terrain import EARTH_RADIUS_M as site_radius
    from lightpath.sky.horizon import EARTH_RADIUS_M as sky_radius

    assert site_radius == sky_radius == 6_371_008.8
