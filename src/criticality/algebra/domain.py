"""The boundary between sympy expressions and the engine's tower of fields.

A :class:`Tower` is the parameter field K = QQ(p1, ..., pk, g1, ..., gm)
(parameters and transcendental atoms such as ``exp(E/T0)`` or ``x0**n``, each
an independent generator) followed by quadratic extensions for the radicals
met on the way (``sqrt(b*(r - 1))``).  Sympy expressions enter through
:meth:`Tower.convert` and leave through :meth:`Tower.to_sympy`; everything in
between is field arithmetic.

The tower also carries the two maps the Hopf computation needs across the
critical value: differentiation with respect to a generator
(:meth:`Tower.derivative`, radicals included) and substitution of a generator
by an element of another tower (:meth:`Tower.substitute`).
"""

from __future__ import annotations

from fractions import Fraction

from dataclasses import dataclass
from typing import Any, Callable, Iterable, Sequence, Union

import sympy

from ..errors import ClosedFormUnavailableError, CriticalityError
from .flint_field import FlintRationalField, FlintRationalFunctionField
from .algebraic import AlgebraicElement, AlgebraicExtension
from .quadratic import QuadraticElement, QuadraticExtension, lower
from .sympy_field import SympyRationalFunctionField
from .field import Element

__all__ = ["Tower", "Atom", "make_base_field", "collect_atoms", "algebraic_atom_rules"]

_ANALYTIC = (sympy.exp, sympy.log, sympy.sin, sympy.cos, sympy.tan, sympy.sinh, sympy.cosh,
             sympy.tanh, sympy.asin, sympy.acos, sympy.atan, sympy.asinh, sympy.acosh,
             sympy.atanh, sympy.erf)


#: the parameter field of a tower, on either backend
BaseField = Union[FlintRationalFunctionField, FlintRationalField, SympyRationalFunctionField]


def make_base_field(symbols: Sequence[sympy.Symbol], backend: str = "flint") -> BaseField:
    """The parameter field QQ(symbols) on the chosen backend."""
    symbols = tuple(symbols)
    if backend == "flint":
        return FlintRationalFunctionField(symbols) if symbols else FlintRationalField()
    if backend == "sympy":
        return SympyRationalFunctionField(symbols)
    raise ValueError(f"unknown arithmetic backend {backend!r}; use 'flint' or 'sympy'")


@dataclass(frozen=True)
class Atom:
    """A transcendental generator: ``symbol`` stands for ``expr`` in the field."""

    symbol: sympy.Symbol
    expr: sympy.Expr
    positive: bool


def _split_exponent(expr):
    """``x**(n - 1)`` -> ``x**n * x**-1``; ``exp(a + b)`` -> ``exp(a)*exp(b)``."""
    if expr.is_Pow and expr.exp.is_Add:
        const, rest = expr.exp.as_coeff_Add()
        if const.is_Rational and const != 0:
            return sympy.Mul(sympy.Pow(expr.base, rest, evaluate=False),
                             sympy.Pow(expr.base, const), evaluate=False)
    if isinstance(expr, sympy.exp) and expr.args[0].is_Add:
        return sympy.Mul(*[sympy.exp(t) for t in expr.args[0].args], evaluate=False)
    return None


def _atom_key(expr):
    """Canonical atom and integer power: ``exp(-2*a) -> (exp(a), -2)``."""
    if isinstance(expr, sympy.exp):
        coeff, rest = expr.args[0].as_coeff_Mul()
        if coeff.is_Integer and rest != 1:
            return sympy.exp(rest), int(coeff)
        if coeff.is_Rational and coeff < 0:
            return sympy.exp(-expr.args[0]), -1
    return expr, 1


def _is_radical_power(expr) -> bool:
    return expr.is_Pow and expr.exp.is_Rational and expr.exp.q == 2


def collect_atoms(exprs: Iterable[sympy.Expr], parameter_symbols: Iterable[sympy.Symbol],
                  state_symbols: Iterable[sympy.Symbol] = ()) -> list:
    """Transcendental atoms of ``exprs`` (in a deterministic order).

    Raises
    ------
    ClosedFormUnavailableError
        For algebraic powers other than square roots (cube roots, ...).
    """
    params = set(parameter_symbols)
    states = set(state_symbols)
    found: dict = {}
    seen = set()

    def walk(e):
        if e in seen:
            return
        seen.add(e)
        split = _split_exponent(e)
        if split is not None:
            walk(split)
            return
        if e.is_Symbol:
            if e not in params and e not in states:
                raise CriticalityError(f"internal: symbol {e} is not a generator")
            return
        if e.is_Number or e.is_Add or e.is_Mul:
            for a in e.args:
                walk(a)
            return
        if e.is_Pow and e.exp.is_Integer:
            walk(e.base)
            return
        if _is_radical_power(e):
            walk(e.base)
            return
        if e.is_Pow and e.exp.is_Rational:
            raise ClosedFormUnavailableError(
                f"the expression contains {e}, a root of order {e.exp.q}; only square roots are "
                "handled exactly. Parametrise the equilibrium so that the root disappears.")
        if isinstance(e, _ANALYTIC) or e.is_Pow:
            atom, _ = _atom_key(e)
            found.setdefault(atom, None)
            return
        if e is sympy.pi or e is sympy.E:
            found.setdefault(e, None)
            return
        raise ClosedFormUnavailableError(f"cannot represent {e} in the parameter field")

    for ex in exprs:
        walk(sympy.sympify(ex, strict=True))
    return sorted(found, key=sympy.default_sort_key)


def algebraic_atom_rules(exprs: Iterable[sympy.Expr]) -> dict:
    """Rewrite rules for transcendental atoms that are algebraic in disguise.

    A solved equilibrium can put a function of a logarithm into the field, e.g.
    ``tanh(log(z)/2)``, which equals ``(z - 1)/(z + 1)``; taken as an
    independent generator it would hide zeros (the residual at the equilibrium
    would not vanish).  Atoms whose arguments contain other transcendental
    functions are rewritten through ``exp`` and simplified; where that leaves
    no transcendental function the atom is replaced.
    """
    rules = {}
    seen = set()

    def walk(e) -> None:
        if not isinstance(e, sympy.Basic) or e.is_Atom or e in seen:
            return
        seen.add(e)
        if isinstance(e, _ANALYTIC) and any(a.has(*_ANALYTIC) for a in e.args):
            candidate = sympy.simplify(e.rewrite(sympy.exp))
            if not candidate.has(*_ANALYTIC) and not any(
                    p.exp.is_Rational and p.exp.q > 2 for p in candidate.atoms(sympy.Pow)):
                rules[e] = candidate
                return
        for a in e.args:
            walk(a)

    for ex in exprs:
        walk(ex)
    return rules


class Tower:
    """The parameter field and its quadratic extensions.

    Parameters
    ----------
    parameters : sequence of sympy.Symbol
        The symbolic parameters (generators of K, in this order).
    atoms : sequence of sympy.Expr
        Transcendental atoms that become further generators.
    backend : {"flint", "sympy"}
    positivity : callable, optional
        ``positivity(expr) -> True | False | None`` deciding the sign of a
        sympy expression under the model's assumptions; used to take the root
        of a radicand that turns out to be a perfect square.
    """

    def __init__(self, parameters: Sequence[sympy.Symbol], atoms: Sequence[Atom] = (),
                 backend: str = "flint",
                 positivity: Callable[[sympy.Expr], bool | None] | None = None) -> None:
        self.parameters = tuple(parameters)
        self.atoms = tuple(Atom(sympy.Dummy(f"g{k}", real=True), a, _atom_positive(a, positivity))
                           for k, a in enumerate(atoms))
        self.backend = backend
        self.positivity = positivity
        self.base = make_base_field(self.parameters + tuple(a.symbol for a in self.atoms), backend)
        self.levels: list[Any] = []  # QuadraticExtension and AlgebraicExtension levels
        self._radicals: list[tuple[object, object]] = []  # (radicand, element)
        self._atom_index = {a.expr: a for a in self.atoms}
        self._gen_index = {s: g for s, g in zip(self.base.symbols, getattr(self.base, "gens", ()))}
        self._memo: dict = {}
        self._parent: Tower | None = None

    def fresh(self, drop: sympy.Symbol | None = None) -> "Tower":
        """A tower over the same atoms, without extensions.  With ``drop`` (a
        parameter about to be substituted) the new base field has one
        generator fewer, so that, e.g., a numeric model becomes QQ itself and
        its linear algebra runs in flint's ``fmpq_mat``; elements move down
        with :meth:`project`."""
        other = object.__new__(Tower)
        other.atoms, other.backend, other.positivity = self.atoms, self.backend, self.positivity
        other.levels, other._radicals, other._memo = [], [], {}
        other._atom_index = self._atom_index
        other._parent = self
        if drop is None or drop not in self.parameters or any(
                a.expr.has(drop) for a in self.atoms):
            other.parameters, other.base = self.parameters, self.base
            other._gen_index = self._gen_index
            return other
        other.parameters = tuple(p for p in self.parameters if p != drop)
        other.base = make_base_field(other.parameters + tuple(a.symbol for a in self.atoms),
                                     self.backend)
        other._gen_index = dict(zip(other.base.symbols, getattr(other.base, "gens", ())))
        return other

    def project(self, x: Element) -> Element:
        """An element of the parent tower's base field that does not involve
        the dropped generator, as an element of this tower's base field."""
        parent = getattr(self, "_parent", None)
        if parent is None or parent.base is self.base:
            return x
        K, target = parent.base, self.base
        R, T = K.ring, target.ring
        x = K(x)
        num, den = K.numerator(x), K.denominator(x)
        if not target.symbols:  # down to QQ: the fraction of two constants
            try:
                return target(Fraction(R.constant(num), R.constant(den)))
            except ValueError:
                raise CriticalityError("internal: a dropped generator is still present") from None
        dropped = [s for s in K.symbols if s not in target.symbols]
        for p in (num, den):
            degrees = R.degrees(p)  # one C call, not a walk over the monomials
            if any(degrees.get(s, 0) > 0 for s in dropped):
                raise CriticalityError("internal: a dropped generator is still present")
        return target.from_ring(R.project(num, T), R.project(den, T))

        # -- structure ---------------------------------------------------------------------
    @property
    def top(self) -> Any:  # the top field: a base field or an extension
        return self.levels[-1] if self.levels else self.base

    def gen(self, symbol: sympy.Symbol) -> Element:
        return self._gen_index[symbol]

    def atom_substitution(self) -> dict:
        return {a.symbol: a.expr for a in self.atoms}

    def sqrt(self, radicand: Element, root_expr: sympy.Expr | None = None) -> Element:
        """The element ``sqrt(radicand)``: an existing radical, the root of a
        perfect square, or the generator of a new quadratic extension."""
        radicand = self.top(radicand)
        for r, element in self._radicals:
            if r == radicand:
                return element
        root = self.square_root(radicand)
        if root is None:
            root = self._known_multiple(radicand)
        if root is None:
            # the printed root is formed on first use (sympy's factor of the
            # radicand is most of the cost of a new level)
            sym_root = root_expr if root_expr is not None else \
                (lambda radicand=radicand: self._root_expr(radicand))
            ext = QuadraticExtension(self.top, radicand, f"s{len(self.levels)}", root=sym_root)
            self.levels.append(ext)
            root = ext.gen
        self._radicals.append((radicand, root))
        return root

    def _root_expr(self, radicand):
        """``sqrt(radicand)`` as a sympy expression, with the squares of
        factors of known positive sign taken outside the root."""
        expr = sympy.factor(self.to_sympy(radicand))
        if self.positivity is None or not expr.is_Mul and not expr.is_Pow:
            return sympy.sqrt(expr)
        outside, inside = [], []
        for f in sympy.Mul.make_args(expr):
            base, k = f.as_base_exp()
            if f.is_Rational and f > 0 and sympy.sqrt(f).is_Rational:
                outside.append(sympy.sqrt(f))  # 4 (B + c - 1) -> 2 sqrt(B + c - 1)
            elif k.is_Integer and k >= 2 and not base.is_number and _positive(base, self.positivity):
                outside.append(base ** (int(k) // 2))
                if int(k) % 2:
                    inside.append(base)
            else:
                inside.append(f)
        return sympy.Mul(*outside) * sympy.sqrt(sympy.Mul(*inside))

    def _known_multiple(self, radicand):
        """``sqrt(R) = sqrt(R G) / sqrt(G)`` when ``R G`` is a square for a
        radicand ``G`` already adjoined (both in the base field), so that
        ``sqrt(b)`` and ``sqrt(4 a^2 b^3)`` do not become two generators of a
        ring with zero divisors; None otherwise."""
        R = lower(radicand)
        if isinstance(R, (QuadraticElement, AlgebraicElement)):
            return None
        for G, element in self._radicals:
            G = lower(G)
            if isinstance(G, (QuadraticElement, AlgebraicElement)) or not isinstance(
                    lower(element), QuadraticElement):
                continue
            try:
                q = self.square_root(R * G)
            except ClosedFormUnavailableError:
                continue  # the sign of the root is not known
            if q is not None:
                return q / element
        return None

    def adjoin_root(self, modulus: Sequence[Element], root_expr: sympy.Expr | None,
                    interval: tuple | None = None) -> Element:
        """Adjoin a root of the irreducible polynomial ``modulus`` (coefficients
        in the top field, lowest first) as a new level and return it (the
        generator of ``top[t]/(modulus)``; see :mod:`criticality.algebra.algebraic`)."""
        ext = AlgebraicExtension(self.top, modulus, f"t{len(self.levels)}", root=root_expr,
                                 interval=interval)
        self.levels.append(ext)
        return ext.gen

    def square_root(self, x: Element) -> Element | None:
        """The principal root of ``x`` when ``x`` is a square in K, else None."""
        x = lower(x)
        if isinstance(x, AlgebraicElement):
            return None  # squares in an algebraic extension are not detected
        if isinstance(x, QuadraticElement):
            if x.b:
                return None
            x = lower(x.a)
            if isinstance(x, (QuadraticElement, AlgebraicElement)):
                return None
        if not x:
            return self.base.zero
        K = self.base
        if isinstance(K, FlintRationalFunctionField):
            try:
                r = (x.num * x.den).sqrt()
            except Exception:  # not a perfect square
                return None
            root = K.from_polynomials(r, x.den)
        else:
            num, den = sympy.fraction(sympy.together(K.to_sympy(x)))
            c, factors = sympy.factor_list(sympy.expand(num * den))
            if not (c > 0 and sympy.sqrt(c).is_Rational and all(m % 2 == 0 for _, m in factors)):
                return None
            r = sympy.sqrt(c) * sympy.Mul(*[f ** (m // 2) for f, m in factors])
            root = K.from_sympy(r / den)
        expr = K.to_sympy(root)
        sign = _sign_of(expr, self.positivity)
        if sign is True:
            return root
        if sign is False:
            return -root
        raise ClosedFormUnavailableError(
            f"sqrt(({expr})**2) = |{expr}| is not analytic in the parameters; state the "
            "equilibrium without the absolute value (choose the branch explicitly).")

    # -- conversion ------------------------------------------------------------------------
    def convert(self, expr: sympy.Expr) -> Element:
        """A sympy expression in the parameters and atoms as a tower element."""
        expr = sympy.sympify(expr, strict=True)
        try:
            return self._convert(expr)
        except ZeroDivisionError as exc:
            raise CriticalityError(f"division by zero while converting {expr}") from exc

    def _convert(self, e):
        hit = self._memo.get(e)
        if hit is not None:
            return hit
        out = self._convert_uncached(e)
        self._memo[e] = out
        return out

    def _convert_uncached(self, e):
        K = self.base
        if e.is_Integer:
            return K(int(e))
        if e.is_Rational:
            return K(e)
        if e.is_Float:
            return K(sympy.Rational(str(e)))
        if e.is_Symbol:
            if e in self._gen_index:
                return self._gen_index[e]
            raise CriticalityError(f"internal: {e} is not a generator of {self.base}")
        split = _split_exponent(e)
        if split is not None:
            return self._convert(split)
        if e.is_Add:
            acc = K.zero
            for a in e.args:
                acc = acc + self._convert(a)
            return acc
        if e.is_Mul:
            merged = self._merged_radicals(e)
            if merged is not None:
                return merged
            acc = K.one
            for a in e.args:
                acc = acc * self._convert(a)
            return acc
        if e.is_Pow and e.exp.is_Integer:
            return self._convert(e.base) ** int(e.exp)
        if _is_radical_power(e):
            root = self.sqrt(self._convert(e.base), sympy.sqrt(e.base))
            return root ** int(e.exp.p)
        atom, power = _atom_key(e)
        if atom in self._atom_index:
            return self._gen_index[self._atom_index[atom].symbol] ** power
        raise CriticalityError(f"internal: {e} was not registered as an atom")

    def _merged_radicals(self, e):
        """A product with several square roots, ``sqrt(b)*sqrt(r - 1)``, as one
        radical ``sqrt(b*(r - 1))`` times the rest, or None.

        Sympy splits ``sqrt(b*(r - 1))`` so when ``b`` is declared positive;
        taking each root as a generator of its own would double the
        extensions.  ``sqrt(B) sqrt(C) = sqrt(B C)`` holds where at most one
        radicand can be negative, so the roots merge only then (a root whose
        radicand's sign is unknown stays apart when there are two such)."""
        roots = [a for a in e.args if _is_radical_power(a)]
        if len(roots) < 2:
            return None
        unsigned = [r for r in roots if not _nonnegative(r.base, self.positivity)]
        if len(unsigned) > 1:
            roots = [r for r in roots if r not in unsigned] + unsigned[:1]
            if len(roots) < 2:
                return None
        acc = self.base.one
        for a in e.args:
            if a not in roots:
                acc = acc * self._convert(a)
        radicand = self.base.one
        for r in roots:
            base = self._convert(r.base)
            radicand = radicand * base
            acc = acc * base ** ((int(r.exp.p) - 1) // 2)
        root_expr = sympy.Mul(*[sympy.sqrt(r.base) for r in roots])
        return acc * self.sqrt(radicand, root_expr)

    def to_sympy(self, x: Element) -> sympy.Expr:
        """A tower element as a sympy expression (atoms restored)."""
        out = self._to_sympy(x)
        return out.xreplace(self.atom_substitution()) if self.atoms else out

    def _to_sympy(self, x):
        if isinstance(x, QuadraticElement):
            return self._to_sympy(x.a) + self._to_sympy(x.b) * x.ext.root
        if isinstance(x, AlgebraicElement):
            return sympy.Add(*[self._to_sympy(a) * x.ext.root ** k
                               for k, a in enumerate(x.c) if a])
        return self.base.to_sympy(self.base(x))

    # -- maps ---------------------------------------------------------------------------------
    def derivative(self, x: Element, symbol: sympy.Symbol) -> Element:
        """``dx/d symbol`` with ``d sqrt(G) = G' / (2 sqrt(G))``."""
        if isinstance(x, QuadraticElement):
            ext = x.ext
            da = self.derivative(x.a, symbol)
            db = self.derivative(x.b, symbol)
            dG = self.derivative(ext.radicand, symbol)
            coeff = db + x.b * dG / (2 * ext.radicand) if dG else db
            return ext.element(da, coeff)
        return self.base.derivative(self.base(x), symbol)

    def substitute(self, x: Element, symbol: sympy.Symbol, value: Element, target: "Tower",
                   level_map: dict) -> Element:
        """Image of ``x`` under ``symbol -> value`` in ``target``.

        ``level_map`` maps each of this tower's extensions to the image of its
        generator in ``target`` (see :meth:`radical_images`).
        """
        if isinstance(x, QuadraticElement):
            a = self.substitute(x.a, symbol, value, target, level_map)
            if not x.b:
                return a
            b = self.substitute(x.b, symbol, value, target, level_map)
            return a + b * level_map[x.ext]
        return _substitute_base(self.base, self.base(x), symbol, value, target)

    def radical_images(self, symbol: sympy.Symbol, value: Element, target: "Tower",
                       value_expr: sympy.Expr | None = None,
                       zeros: Iterable[Element] = ()) -> dict:
        """Adjoin to ``target`` the images of this tower's radicals under
        ``symbol -> value`` and return the map extension -> image (see
        :meth:`sheet_images`, which also says where the choice of sheet is
        not proved)."""
        return self.sheet_images(symbol, value, target, value_expr, zeros)[0]

    def sheet_images(self, symbol: sympy.Symbol, value: Element, target: "Tower",
                     value_expr: sympy.Expr | None = None,
                     zeros: Iterable[Element] = ()) -> tuple[dict, tuple]:
        """``(images, open_sheets)``: the images of this tower's radicals
        under ``symbol -> value``, adjoined to ``target``.

        Every image is the principal root of the substituted radicand, the
        sheet the tower's elements were written on.  ``zeros`` are elements
        ``a + b s`` (``s`` the generator of one of this tower's levels) known
        to vanish at ``value`` or at a conjugate of it: there ``G(value)`` is
        the square of ``r = -a/b``, and the image of ``s`` is ``r`` where
        ``r`` is proved non-negative, ``-r`` where it is proved negative
        (exactly at numeric values, by the sign rules otherwise), instead of
        a new (zero-divisor) extension.  Where the sign of ``r`` is not
        decided the image is ``r`` and ``(ext, r)`` is listed in
        ``open_sheets``: the result holds on the principal sheet only where
        ``r > 0``, a condition the caller must state."""
        images: dict = {}
        open_sheets: list = []
        hints = {z.ext: z for z in zeros if isinstance(z, QuadraticElement)}
        for ext in self.levels:
            radicand = self.substitute(ext.radicand, symbol, value, target, images)
            root_expr = ext.root.subs(symbol, value_expr) if value_expr is not None else None
            root = None
            z = hints.get(ext)
            if z is not None and target.square_root(radicand) is None:
                b = self.substitute(z.b, symbol, value, target, images)
                if b:
                    r = -self.substitute(z.a, symbol, value, target, images) / b
                    if r * r == radicand:
                        sign = target.root_sign(r)
                        root = -r if sign == -1 else r
                        if sign is None:
                            open_sheets.append((ext, r))
            images[ext] = root if root is not None else target.sqrt(radicand, root_expr)
        return images, tuple(open_sheets)

    def root_sign(self, r: Element) -> int | None:
        """``1`` (``r >= 0`` proved), ``-1`` (``r < 0`` proved) or None: certified
        enclosures at numeric values, the sign rules otherwise."""
        from .certified import certified_sign, is_numeric
        if not r:
            return 1
        if is_numeric(self):
            sign = certified_sign(r)
            return None if sign is None else (-1 if sign == -1 else 1)
        decided = self._sign(r)
        if decided is None:
            decided = self.to_sympy(r).is_positive
        return None if decided is None else (1 if decided else -1)

    def _sign(self, x):
        """True (positive), False (negative) or None for an element, from the
        sign rules on the base field: ``a + b s`` with ``s`` a principal root
        of a positive radicand has the sign of ``a`` and ``b`` when they agree."""
        x = lower(x)
        if isinstance(x, AlgebraicElement):
            return None
        if not isinstance(x, QuadraticElement):
            try:
                return _sign_of(self.to_sympy(x), self.positivity) if x else None
            except (sympy.PolynomialError, ValueError, TypeError):
                return None
        if self._sign(x.ext.radicand) is not True:
            return None
        sa = self._sign(x.a) if x.a else None
        sb = self._sign(x.b)
        if not x.a:
            return sb
        return sa if sa == sb else None


def _substitute_base(K, x, symbol, value, target: Tower):
    if symbol not in K.symbols:
        return _reembed(K, x, target)
    R = K.ring
    num = _horner(K, R.coefficients_in(K.numerator(x), symbol), value, target)
    den = _horner(K, R.coefficients_in(K.denominator(x), symbol), value, target)
    return num / den


def _reembed(K, x, target):
    if target.base is K:
        return x
    if getattr(target, "_parent", None) is not None and target._parent.base is K:
        return target.project(x)
    return target.convert(K.to_sympy(x))


def _horner(K, coeffs: dict, value, target: Tower):
    acc = target.base.zero
    if not coeffs:
        return acc
    for k in range(max(coeffs), -1, -1):
        acc = acc * value
        c = coeffs.get(k)
        if c is not None:
            acc = acc + _reembed(K, K.from_ring(c), target)
    return acc


def _sign_of(expr, positivity):
    if expr.is_Number:
        return bool(expr > 0)
    if positivity is None:
        return None
    return positivity(expr)


def _nonnegative(expr, positivity) -> bool:
    """Whether ``expr`` is known to be >= 0 (its symbols' assumptions, or the
    tower's sign oracle)."""
    if expr.is_nonnegative:
        return True
    return positivity is not None and _positive(expr, positivity)


def _positive(expr, positivity) -> bool:
    try:
        return positivity(expr) is True
    except (sympy.PolynomialError, ValueError, TypeError):
        return False


def _atom_positive(atom, positivity) -> bool:
    if isinstance(atom, sympy.exp):
        return True
    if atom is sympy.pi or atom is sympy.E:
        return True
    if atom.is_Pow and positivity is not None:
        return positivity(atom.base) is True
    return False
