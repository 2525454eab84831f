"""``--workers N`` and ``--cluster ADDRESS``: where a command's heavy study runs, the same in every command."""

from __future__ import annotations

import argparse
import contextlib
import os
from collections.abc import Iterator

__all__ = ["add_execution_options", "execution_from_options"]


def add_execution_options(parser: argparse.ArgumentParser, *, workers: int | None = None) -> None:
    """``--workers`` (default ``workers``, else one per CPU) and ``--cluster``."""
    default = workers if workers is not None else os.cpu_count() or 1
    what = "one per CPU" if workers is None else str(default)
    parser.add_argument("--workers", type=int, default=default, metavar="N",
                        help=f"local worker processes (default {what})")  # fmt: skip
    parser.add_argument("--cluster", metavar="ADDRESS", default=None,
                        help="run on the dask scheduler at ADDRESS (tcp://host:8786); see docs/cluster.md")  # fmt: skip


@contextlib.contextmanager
def execution_from_options(args: argparse.Namespace) -> Iterator:
    """The :class:`~lightpath.study.execution.Execution` of ``--workers``/``--cluster``, closed at the end."""
    from lightpath.study.execution import open_execution

    execution = open_execution(args.workers, args.cluster)
    try:
        yield execution
    finally:
        execution.close()
