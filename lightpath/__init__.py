"""lightpath: when sunlight enters an opening and reaches a chosen surface inside.

The public API is gathered here as the layers land; see ``docs/index.md``.
"""

from __future__ import annotations

__version__ = "0.1.0"

__all__ = ["__version__"]
