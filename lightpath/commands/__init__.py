"""One module per ``lightpath`` subcommand.

Each module defines ``NAME``, ``HELP``, ``add_arguments(parser)`` and
``run(args) -> int``; :mod:`lightpath.cli` lists them in :data:`lightpath.cli.COMMANDS`.
Commands only parse, call the public API and present; they compute nothing new.
"""
