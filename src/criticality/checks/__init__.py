"""Checks: numeric evaluation at a point, simulation, sweeps, the parameter plane.

Pipeline place: after the result; each check recomputes from the model or the
result's closed forms with mpmath or scipy and never changes the result.
"""
