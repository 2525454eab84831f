"""A span of years of one scene on many workers: the engine's ``scan_window`` over chunks of years.

The sky window is made once (here) and sent once per worker; each chunk of consecutive years is one
call of :func:`lightpath.light.scan.scan_window` on a worker, and the years come back in order.  The
first year runs here: it gives the result's settings and notes and the measured cost of a year, from
which the chunks are sized (:func:`lightpath.study.execution.chunk_size`).  Serially this is exactly
``scan_window(window, observer, years, …)``; on every back end the result is the same, byte for byte.

References
----------
Rocklin, M. (2015). Dask: parallel computation with blocked algorithms and task scheduling.
*Proceedings of the 14th Python in Science Conference*, 130-136.
"""

from __future__ import annotations

import time
from collections.abc import Callable, Sequence
from dataclasses import replace

from lightpath.light.options import ScanOptions
from lightpath.light.results import ScanResult, YearScan
from lightpath.light.scan import check_years, scan_window
from lightpath.light.window import SkyWindow
from lightpath.sky.observer import Observer
from lightpath.study.execution import Chunk, Execution, chunk_size, run_chunks

__all__ = ["ScanYears", "scan_span", "year_chunks"]


class ScanYears:
    """Picklable: a chunk of years → its :class:`~lightpath.light.results.YearScan` list (one window, one site)."""

    def __init__(self, window: SkyWindow, observer: Observer, options: ScanOptions, with_light_map: bool = False):
        self.window = window
        self.observer = observer
        self.options = options
        self.with_light_map = with_light_map

    def run_chunk(self, years: Sequence[int]) -> list[YearScan]:
        return scan_window(self.window, self.observer, list(years), self.options,
                           with_light_map=self.with_light_map).years  # fmt: skip

    def __call__(self, year: int) -> YearScan:
        return self.run_chunk([year])[0]


def year_chunks(years: Sequence[int], size: int, shared: str, label: str = "years") -> list[Chunk]:
    """Consecutive years, ``size`` a chunk, named by their first and last year.

    >>> [c.tasks for c in year_chunks([1, 2, 3, 4, 5], 2, "w")]
    [(1, 2), (3, 4), (5,)]
    """
    size = max(1, int(size))
    out = []
    for a in range(0, len(years), size):
        part = tuple(int(y) for y in years[a : a + size])
        out.append(Chunk(f"{label}{part[0]}..{part[-1]}", shared, part))
    return out


def scan_span(
    window: SkyWindow,
    observer: Observer,
    years: Sequence[int],
    options: ScanOptions | None = None,
    *,
    execution: Execution | None = None,
    with_light_map: bool = False,
    progress: Callable[[int, int], None] | None = None,
    scene_label: str = "",
    seed: int = 0,
    scene_notes: Sequence[str] = (),
) -> ScanResult:
    """:func:`lightpath.light.scan.scan_window` over ``years``, its years spread over ``execution``.

    Parameters are those of ``scan_window``; ``execution`` is where the chunks run
    (:func:`lightpath.study.execution.open_execution`; None: this process).
    ``progress(done, total)`` after each chunk of years.
    """
    years = check_years(list(years))
    o = (options if options is not None else ScanOptions()).check()
    ex = execution if execution is not None else Execution()
    common = dict(scene_label=scene_label, seed=seed, scene_notes=list(scene_notes), with_light_map=with_light_map)
    if ex.serial or len(years) == 1:
        return scan_window(window, observer, years, o, progress=progress, **common)
    t0 = time.perf_counter()
    first = scan_window(window, observer, years[:1], o, **common)  # the result's frame; the cost of a year
    cost = time.perf_counter() - t0
    done = [1]
    if progress is not None:
        progress(1, len(years))
    rest = years[1:]
    chunks = year_chunks(rest, chunk_size(cost, len(rest), ex.threads), "scan")
    parts: list[list[YearScan] | None] = [None] * len(chunks)

    def on_done(i: int, values: list[YearScan]) -> None:
        parts[i] = values
        done[0] += len(values)
        if progress is not None:
            progress(done[0], len(years))

    run_chunks({"scan": ScanYears(window, observer, o, with_light_map)}, chunks, on_done, ex, "scan")
    return replace(first, years=[*first.years, *(y for part in parts for y in part)])
