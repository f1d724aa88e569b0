"""The exact arithmetic layer: the flint field against its pure-sympy stand-in,
quadratic extensions, linear algebra and the characteristic polynomial, each
checked against sympy's own routines (a general-purpose reference library)."""

import random

import pytest
import sympy
from hypothesis import example, given, settings
from hypothesis import strategies as st

from criticality.algebra import QuadraticExtension, Tower
from criticality.algebra.flint_field import FlintRationalField, FlintRationalFunctionField
from criticality.algebra.linalg import characteristic_polynomial, determinant, kernel, matmul, solve
from criticality.algebra.sympy_field import SympyRationalFunctionField
from criticality.local.linear import hurwitz_determinants

a, b, c = sympy.symbols("a b c", real=True)
SYMS = (a, b, c)

small = st.integers(-4, 4)
monomial = st.tuples(small.filter(bool), st.integers(0, 2), st.integers(0, 2), st.integers(0, 2))


@st.composite
def rational_functions(draw):
    def poly():
        terms = draw(st.lists(monomial, min_size=1, max_size=4))
        return sum(k * a ** i * b ** j * c ** l for k, i, j, l in terms)
    num, den = poly(), poly()
    if sympy.expand(den) == 0:
        den = sympy.Integer(1)
    return num / den


@pytest.mark.slow
@settings(max_examples=60, deadline=None)
@given(x=rational_functions(), y=rational_functions())
@example(x=sympy.Integer(-1), y=1 / (b ** 2 - b * c ** 2))  # a denominator read with a negative sign
def test_flint_field_matches_sympy_stand_in(x, y):
    """+, -, *, / and derivatives agree between the two implementations."""
    F, S = FlintRationalFunctionField(SYMS), SympyRationalFunctionField(SYMS)
    fx, fy, sx, sy = F.from_sympy(x), F.from_sympy(y), S.from_sympy(x), S.from_sympy(y)
    results = [(fx + fy, sx + sy), (fx - fy, sx - sy), (fx * fy, sx * sy)]
    if fy:
        results.append((fx / fy, sx / sy))
    for f, s in results:
        assert F.from_sympy(S.to_sympy(s)) == f  # canonical form: equality of representations
        assert S.from_sympy(F.to_sympy(f)) == s
    assert F.derivative(fx, a) == F.from_sympy(sympy.diff(x, a))


@settings(max_examples=40, deadline=None)
@given(x=rational_functions(), y=rational_functions(), d=rational_functions())
def test_flint_norm_form_and_squares_match_plain_arithmetic(x, y, d):
    """The norm kernel (reduced against the lcm of the denominators step by
    step) and the gcd-free square give the same reduced fractions as the plain
    products and differences, and as the sympy stand-in."""
    F, S = FlintRationalFunctionField(SYMS), SympyRationalFunctionField(SYMS)
    fx, fy, fd = F.from_sympy(x), F.from_sympy(y), F.from_sympy(d)
    plain = fx * F.from_sympy(x) - fy * F.from_sympy(y) * fd  # distinct objects: no square path
    assert F.norm_form(fx, fy, fd) == plain
    assert fx * fx == F.from_sympy(S.to_sympy(S.from_sympy(x) * S.from_sympy(x)))
    L = QuadraticExtension(F, fd, "s")
    assert L.element(fx, fy).norm() == plain


@settings(max_examples=25, deadline=None)
@given(x=rational_functions(), y=rational_functions(), u=rational_functions(),
       v=rational_functions(), d=rational_functions())
@example(x=a, y=sympy.Integer(0), u=sympy.Integer(0), v=1 / a, d=a)  # t * t/a = 1 cancels fully
def test_common_denominator_elements_match_the_generic_pairs(x, y, u, v, d):
    """Over a python-flint field a quadratic extension keeps a + b t as
    (A + B t)/D over one reduced denominator.  Every operation gives the
    same element as the generic pair arithmetic (two reduced fractions,
    :class:`QuadraticElement`) in the same extension (common practice, no
    source: the field axioms of K(t), t^2 = d)."""
    from criticality.algebra.quadratic import QuadraticElement

    F = FlintRationalFunctionField(SYMS)
    fd = F.from_sympy(d)
    if not fd:
        fd = F.from_sympy(a)
    L = QuadraticExtension(F, fd, "s")
    assert type(L.zero).__name__ == "CommonDenominatorElement"

    def both(p, q):
        fp, fq = F.from_sympy(p), F.from_sympy(q)
        return L.element(fp, fq), QuadraticElement(fp, fq, L)

    (fx, sx), (fy, sy) = both(x, y), both(u, v)
    c = F.from_sympy(u)
    results = [(fx + fy, sx + sy), (fx - fy, sx - sy), (fx * fy, sx * sy), (-fx, -sx),
               (fx * c, sx * c), (fx + c, sx + c), (c - fx, c - sx), (fx * 3, sx * 3),
               (fx.conjugate(), sx.conjugate()), (fx * fx, sx * sx), (fx ** 3, sx ** 3)]
    for f, s in [(fx, sx), (fy, sy)]:
        if s.norm():
            results.append((1 / f, 1 / s))
            results.append((fy / f, sy / s))
    if c:
        results.append((fx / c, sx / c))
    for f, s in results:
        assert type(f).__name__ == "CommonDenominatorElement"
        assert f.a == s.a and f.b == s.b
        # the representation is the reduced one, so equality is structural
        assert f.D.gcd(f.A).gcd(f.B).is_one() and f.D.leading_coefficient() > 0
        assert f == L.element(s.a, s.b) and hash(f) == hash(L.element(s.a, s.b))
        assert bool(f) == bool(s)
    assert fx.norm() == sx.norm()


@pytest.mark.slow
@settings(max_examples=80, deadline=None)
@given(x=rational_functions())
def test_flint_to_sympy_builds_sympys_own_canonical_form(x):
    """The conversion assembles sympy's Add and Mul from pre-sorted arguments
    without flattening; the result must be structurally identical (same
    args, hash and printed form) to what sympy's constructors build from the
    same terms."""
    F = FlintRationalFunctionField(SYMS)
    f = F.from_sympy(x)
    for poly in (f.num, f.den):
        mine = F.ring.to_sympy(poly)
        terms = [sympy.Integer(int(c)) * sympy.Mul(*(s ** e for s, e in zip(SYMS, m)))
                 for m, c in poly.to_dict().items()]
        ref = sympy.Add(*terms)
        assert mine == ref and hash(mine) == hash(ref) and str(mine) == str(ref)
        assert mine.args == ref.args



def test_flint_to_sympy_order_on_mixed_symbols_and_large_polynomials():
    """The precomputed sort keys order the terms exactly as sympy's own
    comparisons do, also for symbols of different assumptions, a Dummy
    generator, exponents above 9 and polynomials with hundreds of terms."""
    from criticality.algebra.flint_field import FlintPolynomialRing
    syms = (sympy.Symbol("mm", positive=True), sympy.Symbol("d", real=True),
            sympy.Symbol("b1"), sympy.Dummy("g0", real=True), sympy.Symbol("B", real=True))
    R = FlintPolynomialRing(syms)
    rng = random.Random(12)
    for _ in range(40):
        data = {tuple(rng.choice((0, 0, 1, 2, 3, 11)) for _ in syms):
                rng.choice((1, -1, 2, -3, 10**20)) for _ in range(rng.randint(0, 300))}
        poly = R.from_dict(data)
        mine = R.to_sympy(poly)
        ref = sympy.Add(*[sympy.Integer(int(c)) * sympy.Mul(*(s ** e for s, e in zip(syms, m)))
                          for m, c in poly.to_dict().items()])
        assert mine == ref and mine.args == ref.args and sympy.srepr(mine) == sympy.srepr(ref)

def test_quadratic_extension_arithmetic():
    """(1 + s)(1 - s) = 1 - G and inverses in Q(a)(sqrt(G)) and its nu-extension."""
    K = FlintRationalFunctionField((a,))
    G = K.from_sympy(a ** 2 + 1)
    L = QuadraticExtension(K, G, "s")
    s = L.gen
    assert (1 + s) * (1 - s) == L(1 - G)
    x = L.element(K.from_sympy(a), K.from_sympy(1 / (a - 1)))
    assert x * x.inverse() == L.one
    N = QuadraticExtension(L, L(-2), "nu")
    z = N.element(x, s)
    assert z * (1 / z) == N.one
    assert (z.conjugate() * z).b == 0  # the norm is real


@pytest.mark.slow
@pytest.mark.parametrize("backend", ["flint", "sympy"])
def test_linear_solve_and_kernel_against_sympy(backend):
    rng = random.Random(3)
    T = Tower(SYMS, backend=backend)
    M = sympy.Matrix(4, 4, lambda i, j: rng.choice([0, 1, -2, a, b, a * b - c, 3]))
    rhs = sympy.Matrix(4, 1, lambda i, j: rng.choice([1, a, b + c]))
    A = [[T.convert(M[i, j]) for j in range(4)] for i in range(4)]
    B = [[T.convert(rhs[i, 0])] for i in range(4)]
    X = solve(T.top, A, B)
    ref = M.LUsolve(rhs)
    for i in range(4):  # compare in the field: sympy's cancel is slow on LUsolve output
        assert T.convert(ref[i]) == X[i][0]
    assert T.convert(M.det()) == determinant(T.top, A)
    singular = [row[:] for row in A]
    singular[3] = [x + y for x, y in zip(A[0], A[1])]
    ker = kernel(T.top, singular)
    assert len(ker) == 1
    product = matmul(T.top, singular, [[x] for x in ker[0]])
    assert all(not row[0] for row in product)


def test_rational_fast_path_matches_generic():
    """Over QQ the solver uses flint's fmpq_mat; it agrees with sympy."""
    Q = FlintRationalField()
    M = sympy.Matrix([[2, 1, 0], [1, 3, 1], [0, 1, 4]])
    X = solve(Q, [[Q(int(x)) for x in M.row(i)] for i in range(3)], [[Q(1)], [Q(2)], [Q(3)]])
    ref = M.LUsolve(sympy.Matrix([1, 2, 3]))
    assert [Q.to_sympy(r[0]) for r in X] == list(ref)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_characteristic_polynomial_against_sympy(seed, backend):
    rng = random.Random(seed)
    n = 5
    M = sympy.Matrix(n, n, lambda i, j: rng.choice([0, 0, 1, -2, a, b, a * b - 1, 3]))
    T = Tower(SYMS, backend=backend)
    chi = characteristic_polynomial(T.top, [[T.convert(M[i, j]) for j in range(n)] for i in range(n)])
    lam = sympy.Symbol("lambda")
    mine = sum(T.to_sympy(x) * lam ** k for k, x in enumerate(chi))
    assert sympy.expand(mine - M.charpoly(lam).as_expr()) == 0


def test_hurwitz_determinants_of_a_cubic():
    """For l^3 + a1 l^2 + a2 l + a3: Delta_1 = a1, Delta_2 = a1 a2 - a3,
    Delta_3 = a3 Delta_2 (common practice, no source)."""
    a1, a2, a3 = sympy.symbols("a1 a2 a3", real=True)
    T = Tower((a1, a2, a3))
    coeffs = [T.convert(a3), T.convert(a2), T.convert(a1), T.base.one]
    d = [T.to_sympy(x) for x in hurwitz_determinants(T.top, coeffs)]
    assert d[0] == a1
    assert sympy.expand(d[1] - (a1 * a2 - a3)) == 0
    assert sympy.expand(d[2] - a3 * (a1 * a2 - a3)) == 0


@pytest.mark.slow
def test_tower_substitution_and_derivative_with_radicals():
    """d sqrt(b(r-1))/dr and the substitution r -> r_c carry the radical along."""
    r = sympy.Symbol("r", real=True)
    T = Tower((b, r))
    s = T.convert(sympy.sqrt(b * (r - 1)))
    ds = T.derivative(s, r)
    assert sympy.simplify(T.to_sympy(ds) - sympy.diff(sympy.sqrt(b * (r - 1)), r)) == 0
    target = T.fresh()
    value = T.convert(b + 2)
    images = T.radical_images(r, value, target)
    img = T.substitute(s * s + s, r, value, target, images)
    expected = b * (b + 1) + sympy.sqrt(b * (b + 1))
    assert sympy.simplify(target.to_sympy(img) - expected) == 0


def test_perfect_square_radicand_becomes_rational():
    """sqrt(4 a^2) with a > 0 is 2a, not a new generator."""
    T = Tower((a,), positivity=lambda e: True if e.could_extract_minus_sign() is False else None)
    x = T.convert(sympy.sqrt(sympy.Mul(4, a ** 2, evaluate=False), evaluate=False))
    assert not T.levels
    assert T.to_sympy(x) == 2 * a


@pytest.mark.slow
@settings(max_examples=40, deadline=None)
@given(x=rational_functions())
def test_ring_view_agrees_on_both_fields_and_with_sympy(x):
    """numerator / denominator recover the element, and the factorisation in
    the ring multiplies back to the numerator, with the same irreducible
    factors as sympy's factor_list (a general-purpose reference) on flint and
    on the stand-in."""
    ref_factors = None
    for K in (FlintRationalFunctionField(SYMS), SympyRationalFunctionField(SYMS)):
        R = K.ring
        e = K.from_sympy(x)
        n, d = K.numerator(e), K.denominator(e)
        assert K.from_ring(n, d) == e
        assert sympy.cancel(R.to_sympy(n) / R.to_sympy(d) - x) == 0
        content, factors = R.factor(n)
        product = sympy.Integer(content) * sympy.Mul(*(R.to_sympy(f) ** m for f, m in factors))
        assert sympy.expand(product - R.to_sympy(n)) == 0
        mine = sorted(sympy.srepr(sympy.factor_list(R.to_sympy(f))[1][0][0]) for f, _ in factors)
        if ref_factors is None:
            ref_factors = sorted(sympy.srepr(g) for g, _ in sympy.factor_list(R.to_sympy(n))[1])
        assert mine == ref_factors


@pytest.mark.parametrize("backend", ["flint", "sympy"])
def test_projection_drops_a_generator_and_refuses_one_still_present(backend):
    """Tower.project moves an element free of the dropped parameter down, to
    QQ as to a smaller field of rational functions, and refuses an element
    that still holds it (common practice, no source)."""
    from criticality.errors import CriticalityError
    mu = sympy.Symbol("mu", real=True)
    for params, value in (((mu,), sympy.Rational(-5, 7)), ((mu, a), (a + 1) / (a ** 2 + 2))):
        T = Tower(params, backend=backend)
        down = T.fresh(drop=mu)
        assert mu not in down.base.symbols
        x = down.project(T.convert(value))
        assert sympy.cancel(down.to_sympy(x) - value) == 0
        with pytest.raises(CriticalityError, match="dropped generator"):
            down.project(T.convert(value + mu))


@settings(max_examples=40, deadline=None)
@given(x=rational_functions(), point=st.tuples(*[st.fractions(-5, 5, max_denominator=7)] * 3))
def test_rational_evaluator_agrees_with_sympy_substitution(x, point):
    """The evaluator of the critical set's root counting gives the value of
    sympy's own substitution at rational points, and raises at a pole
    (sympy as the general-purpose reference)."""
    from fractions import Fraction

    from criticality.algebra.polyops import rational_evaluator
    K = FlintRationalFunctionField(SYMS)
    at = rational_evaluator(K, [K.from_sympy(x)])
    subs = {s: sympy.Rational(v.numerator, v.denominator) for s, v in zip(K.symbols, point)}
    num, den = sympy.fraction(sympy.cancel(x))
    if den.xreplace(subs) == 0:
        with pytest.raises(ZeroDivisionError):
            at(point)
        return
    (value,) = at(point)
    expected = sympy.Rational(num.xreplace(subs), den.xreplace(subs))
    assert isinstance(value, Fraction) and value == Fraction(int(expected.p), int(expected.q))
    assert rational_evaluator(SympyRationalFunctionField(SYMS), [x]) is None


@pytest.mark.parametrize("backend", ["flint", "sympy"])
def test_ring_view_resultant_and_coefficients_against_sympy(backend):
    """The resultant in an added variable equals sympy's resultant, and
    coefficients in one generator split the polynomial (sympy's Poly is the
    reference)."""
    K = Tower(SYMS, backend=backend).base
    R = K.ring
    s = sympy.Symbol("s_")
    E = [R.from_sympy(b), R.from_sympy(a * b - 1), R.from_sympy(c)]
    O = [R.from_sympy(a + 2), R.from_sympy(b ** 2)]
    Rs = R.extend("s_")
    res = R.to_sympy(Rs.resultant(Rs.from_coefficients(E), Rs.from_coefficients(O)))
    pe = sum(R.to_sympy(x) * s ** k for k, x in enumerate(E))
    po = sum(R.to_sympy(x) * s ** k for k, x in enumerate(O))
    assert sympy.expand(res - sympy.resultant(pe, po, s)) == 0
    p = R.from_sympy(a ** 2 * b + 3 * a * c - b + 7)
    parts = {k: R.to_sympy(v) for k, v in R.coefficients_in(p, a).items()}
    ref = sympy.Poly(a ** 2 * b + 3 * a * c - b + 7, a)
    assert parts == {m[0]: coeff for m, coeff in ref.terms()}
    assert R.evaluate(p, [2, 3, 5]) == 2 ** 2 * 3 + 3 * 2 * 5 - 3 + 7


@pytest.mark.slow
@pytest.mark.parametrize("backend", ["flint", "sympy"])
def test_closed_form_solver_finds_linear_quadratic_and_biquadratic_roots(backend):
    """solve_for on (a - 2b)(a^2 - b)(a^4 - 5a^2 + 4) finds every root that
    sympy.solve (the reference) finds, on both fields alike: a = 2b,
    a = +-sqrt(b) and a = +-1, +-2 from the biquadratic factor."""
    from criticality.local.solve import solve_for

    T = Tower((a, b), backend=backend)
    x = T.convert((a - 2 * b) * (a ** 2 - b) * (a ** 4 - 5 * a ** 2 + 4))
    points, unsolved = solve_for(T, x, a)
    assert not unsolved
    found = {sympy.simplify(p.target.to_sympy(p.value)) for p in points}
    ref = {sympy.simplify(r) for r in sympy.solve((a - 2 * b) * (a ** 2 - b)
                                                   * (a ** 4 - 5 * a ** 2 + 4), a)}
    assert found == ref

