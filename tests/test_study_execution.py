"""Execution back ends: serial, local process pool and dask give the same results in the same order."""

from __future__ import annotations

import numpy as np
import pytest

from lightpath.errors import InputError
from lightpath.study.execution import chunk_ranges, describe_backend, run_draws


class _NoisySum:
    """A picklable callable with state (like a framing task holding a window): its own RNG stream per task."""

    def __init__(self, scale: float) -> None:
        self.scale = scale
        self.table = np.arange(1000.0)  # some bulk, sent once per worker

    def __call__(self, task: tuple[int, int]) -> float:
        seed, index = task
        rng = np.random.default_rng(np.random.SeedSequence(seed, spawn_key=(index,)))
        return float(self.scale * rng.standard_normal() + self.table[index % 1000])


TASKS = [(11, i) for i in range(37)]


@pytest.fixture(scope="module")
def dask_client():
    """A dask LocalCluster of two worker processes on loopback (as CI runs it)."""
    distributed = pytest.importorskip("distributed")
    with (
        distributed.LocalCluster(
            n_workers=2, threads_per_worker=1, processes=True, host="127.0.0.1", dashboard_address=None
        ) as cluster,
        distributed.Client(cluster) as client,
    ):
        yield client


def test_chunks_cover_every_task_once():
    for n in (0, 1, 5, 37, 100):
        for k in (1, 2, 3, 8):
            ranges = chunk_ranges(n, k)
            covered = [i for a, b in ranges for i in range(a, b)]
            assert covered == list(range(n))
            assert len(ranges) <= max(1, k)


def test_serial_equals_pool_with_progress():
    func = _NoisySum(2.5)
    serial = run_draws(func, TASKS)
    ticks = []
    pooled = run_draws(func, TASKS, workers=2, progress=ticks.append)
    assert pooled == serial  # bit-identical floats, same order
    assert sum(ticks) == len(TASKS)
    assert len(ticks) > 1  # progress arrives chunk by chunk


def test_serial_equals_dask_local_cluster(dask_client):
    func = _NoisySum(2.5)
    ticks = []
    assert run_draws(func, TASKS, client=dask_client, progress=ticks.append) == run_draws(func, TASKS)
    assert sum(ticks) == len(TASKS)
    assert "dask" in describe_backend(client=dask_client)


def test_bad_worker_count_is_input_error():
    for bad in (0, -1, 1.5, True):
        with pytest.raises(InputError, match="--workers"):
            run_draws(abs, [1, 2], workers=bad)


def test_empty_tasks():
    assert run_draws(abs, []) == []
    assert run_draws(abs, [], workers=2) == []


def test_framing_test_is_the_same_serial_pool_and_dask(dask_client):
    """A real framing test (engine + null model): serial, 2 local workers and a dask LocalCluster agree exactly."""
    from test_study_geometry import EPOCH, SITE, division_of, slit_window

    from lightpath.commands._common import to_jsonable
    from lightpath.study.framing import framing_test
    from lightpath.study.light_days import LightDays
    from lightpath.study.uncertainty import Tolerances

    div = division_of("cross_quarter_nov")
    window, axis = slit_window(round(div.sunrise_azimuth_deg, 2))
    light = LightDays(window, SITE, names=("cross_quarter_nov", "march_equinox"))
    tol = Tolerances(opening_azimuth_deg=1.5, opening_tilt_deg=0.5, target_position_m=0.03, temperature_c=5.0)
    common = dict(year=EPOCH, axis_enu=axis, tolerances=tol, within_days=2, draws=16, null_draws=16, seed=2)
    serial = to_jsonable(framing_test(light, **common))
    assert to_jsonable(framing_test(light, workers=2, **common)) == serial
    assert to_jsonable(framing_test(light, client=dask_client, **common)) == serial


def test_connect_cluster_by_address(dask_client):
    from lightpath.study.execution import connect_cluster

    client = connect_cluster(dask_client.scheduler.address)
    try:
        assert run_draws(_NoisySum(1.0), TASKS[:5], client=client) == run_draws(_NoisySum(1.0), TASKS[:5])
    finally:
        client.close()
    with pytest.raises(InputError, match="--cluster"):
        connect_cluster("tcp://127.0.0.1:9")


def test_frame_command_on_a_cluster_gives_the_serial_json(dask_client, capsys):
    """``lightpath frame --cluster ADDRESS`` returns the same JSON as a serial run."""
    from lightpath.cli import main
    from lightpath.scene import demo_scene_path

    argv = ["frame", str(demo_scene_path("sandwren")), "--epoch", "-1499±0", "--division", "cross_quarter_feb"]
    argv += ["--draws", "4", "--null-draws", "4", "--samples", "16", "--resolution", "0.1", "--json", "--quiet"]
    assert main([*argv, "--workers", "1"]) == 0
    serial = capsys.readouterr().out
    assert main([*argv, "--cluster", dask_client.scheduler.address]) == 0
    assert capsys.readouterr().out == serial
