"""Astronomy: instants to Sun directions, and the year into its divisions.

This layer knows nothing of meshes.  Angles are degrees at its public
boundary, instants are Julian dates (TT unless a name says ``_ut``).
"""
