"""lightpath.threads: splitting elementwise work over threads changes no bit of the result."""

from __future__ import annotations

import warnings

import numpy as np
import pytest

from lightpath import threads
from lightpath.sky.observer import Observer
from lightpath.sky.sources import SunAccuracyWarning
from lightpath.sky.sun import sun_position


@pytest.fixture
def restore_threads():
    yield
    threads.set_thread_count(None)


def test_thread_count_from_environment(monkeypatch, restore_threads):
    monkeypatch.setenv(threads.THREAD_ENV, "3")
    assert threads.thread_count() == 3
    monkeypatch.setenv(threads.THREAD_ENV, "zero")
    assert threads.thread_count() == 1
    threads.set_thread_count(2)
    assert threads.thread_count() == 2  # the call wins over the environment


def test_split_map_joins_pieces_in_order(restore_threads):
    threads.set_thread_count(4)
    x = np.arange(100_003, dtype=float)
    out = threads.split_map(lambda a: np.stack([a, a * 2], axis=-1), x, min_chunk=1000)
    assert out.shape == (100_003, 2)
    assert np.array_equal(out[:, 0], x) and np.array_equal(out[:, 1], 2 * x)


def test_nested_calls_run_inline(restore_threads):
    threads.set_thread_count(2)
    x = np.linspace(0.0, 1.0, 40_000)

    def outer(a):
        return threads.split_map(np.sin, a, min_chunk=100)  # inside a worker thread: no second split

    assert np.array_equal(threads.split_map(outer, x, min_chunk=100), np.sin(x))


def test_errstate_reaches_the_threads(restore_threads):
    threads.set_thread_count(2)
    x = np.full(70_000, -1.0)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        with np.errstate(invalid="ignore"):
            out = threads.split_map(np.sqrt, x, min_chunk=1000)
    assert np.isnan(out).all()


def test_sun_position_identical_on_one_and_two_threads(restore_threads):
    # 120,000 daily instants from 3000 BC: long enough to be split, bit-for-bit the same result.
    jd = 625_000.5 + np.arange(120_000, dtype=float)
    obs = Observer(53.452, -7.118, 100.0)
    results = []
    for n in (1, 2):
        threads.set_thread_count(n)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", SunAccuracyWarning)
            p = sun_position(jd, obs, delta_t_s=0.0)
        results.append(np.stack([p.azimuth_deg, p.altitude_deg, p.declination_deg, p.equation_of_time_min]))
    assert np.array_equal(results[0], results[1])
