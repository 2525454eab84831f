"""Geometry: scene files to meshes, targets, openings and horizons in the site frame.

This layer knows nothing of dates.  The site frame is East-North-Up, metres,
origin at the site's reference point.
"""
