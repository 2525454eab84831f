"""The engine: sky windows by ray casting, Sun-disc sampling, sweeps and light events.

It joins :mod:`lightpath.sky` (Sun directions) and :mod:`lightpath.site` (geometry).
"""
