"""The model: the frozen value object, the whitelisted expression parser, model files.

Pipeline place: **first**.  Everything downstream receives a :class:`Model`;
no user text reaches ``eval``, ``exec``, ``sympify`` or ``parse_expr``: strings
go through :func:`parse_expression` (Python's ``ast`` walked by hand).
"""

from .core import Model, Parameter
from .expressions import format_expression, parse_expression

__all__ = ["Model", "Parameter", "parse_expression", "format_expression"]
