"""A pure-sympy stand-in for the parameter field QQ(p1, ..., pk).

It wraps sympy's own fraction field (``sympy.polys.fields``), whose elements
already support the arithmetic protocol.  It is slower than the python-flint
field but has no compiled dependency; the test suite runs both on the same
computations and compares the results.
"""

from __future__ import annotations

from fractions import Fraction

import sympy
from sympy.polys.domains import QQ
from sympy.polys.fields import FracElement, field

from .field import Field

__all__ = ["SympyRationalFunctionField"]


class SympyRationalFunctionField(Field):
    """QQ(p1, ..., pk) on sympy's ``FracField`` (k >= 0).

    Examples
    --------
    >>> import sympy
    >>> a = sympy.Symbol("a")
    >>> K = SympyRationalFunctionField([a])
    >>> K.to_sympy(K.from_sympy((a**2 - 1) / (a - 1)))
    a + 1
    """

    backend = "sympy"

    def __init__(self, symbols):
        self.symbols = tuple(symbols)
        if self.symbols:
            self._field, *gens = field(list(self.symbols), QQ)
            self.gens = tuple(gens)
        else:
            self._field = QQ
            self.gens = ()
        self.zero = self(0)
        self.one = self(1)

    def __call__(self, value):
        if self.symbols and isinstance(value, FracElement):
            return value
        if isinstance(value, (Fraction, sympy.Rational)):
            value = QQ(int(value.numerator), int(value.denominator))
        elif isinstance(value, int):
            value = QQ(value)
        if not self.symbols:
            if isinstance(value, type(QQ(1))):
                return value
            raise TypeError(f"cannot convert {value!r} into QQ")
        return self._field.field_new(value) if hasattr(self._field, "field_new") else self._field(value)

    def from_sympy(self, expr):
        expr = sympy.sympify(expr)
        if not self.symbols:
            if not expr.is_Rational:
                raise ValueError(f"{expr} is not a rational number")
            return QQ(int(expr.p), int(expr.q))
        return self._field.from_expr(expr)

    def to_sympy(self, x):
        if not self.symbols:
            return QQ.to_sympy(x)
        return x.as_expr()

    def size(self, x) -> int:
        if not self.symbols:
            return int(x.numerator).bit_length() + int(x.denominator).bit_length()
        return len(x.numer) + len(x.denom)

    def derivative(self, x, symbol):
        if not self.symbols:
            raise ValueError(f"{symbol} is not a generator of QQ")
        i = self.symbols.index(symbol)
        return x.diff(self.gens[i])

    def __repr__(self):
        return f"QQ({', '.join(map(str, self.symbols))})[sympy]"
