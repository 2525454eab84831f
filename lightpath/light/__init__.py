"""The engine: sky windows by ray casting, Sun-disc sampling, sweeps and light events.

It joins :mod:`lightpath.sky` (Sun directions) and :mod:`lightpath.scene` (the site geometry of :mod:`lightpath.site`
with its observer, horizon and air).

Modules, from the top down:

* :mod:`~lightpath.light.scan` — ``scan_scene``, ``prepare_window``, ``scan_window``, ``scan_year``;
* :mod:`~lightpath.light.sweep` — ``find_light`` (intervals of light between two instants), ``union_map``;
* :mod:`~lightpath.light.events` — light events and per-division runs of days;
* :mod:`~lightpath.light.search` — generic threshold search (runs and bisection);
* :mod:`~lightpath.light.disc` — disc fractions, ``lit_area`` (with rotation and horizon offset), criteria;
* :mod:`~lightpath.light.window` — ``compute_window`` and the ``SkyWindow`` cache;
* :mod:`~lightpath.light.grid` — the site-fixed (hour angle, declination) grid;
* :mod:`~lightpath.light.rays` — the ray backend (Embree, numpy fallback);
* :mod:`~lightpath.light.bruteforce` — the reference path, a ray per sample per disc point per instant;
* :mod:`~lightpath.light.results` — the result dataclasses.

See docs/engine.md.
"""
