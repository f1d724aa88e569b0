"""Exact arithmetic for the engine: the parameter field (python-flint, with a
pure-sympy stand-in), quadratic extensions for radicals and for ``i*omega``,
exact linear algebra, univariate polynomials, and the sympy boundary."""

from .domain import Tower, collect_atoms, make_base_field
from .quadratic import QuadraticElement, QuadraticExtension

__all__ = ["Tower", "collect_atoms", "make_base_field", "QuadraticElement", "QuadraticExtension"]
