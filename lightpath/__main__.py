"""``python -m lightpath`` runs the command line."""

from lightpath.cli import main

raise SystemExit(main())
