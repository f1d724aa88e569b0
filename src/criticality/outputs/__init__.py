"""Outputs: terminal text, LaTeX, JSON and plots.

Pipeline place: **last**.  Renderers take finished results and return strings
(or figures); writing a file is a thin wrapper in :mod:`criticality.files`.
"""
