"""The benchmark suite: models with a Hopf point whose critical value is known in closed form.

Every case is a :class:`Case`: ordered states, right-hand sides built in Python
from sympy symbols (no strings are parsed), the symbolic parameters with their
assumptions, the bifurcation parameter, an equilibrium in closed form, and the
critical value and omega^2 of the Hopf branch the benchmark follows.  The
critical values were derived by hand for this suite (the derivation is sketched
beside each builder) and are checked numerically by ``python benchmarks/run.py
--check-cases`` (see ``reference.py``): at random admissible points exactly one
pair of eigenvalues lies on the imaginary axis, with the declared omega, and
every other eigenvalue has negative real part.

The models are of our own construction, except the Lorenz system (a classic,
cited below).  Random admissible points of the remaining parameters are drawn
by :meth:`Case.sample` as exact rationals from a box, rejecting points that
violate the case's side conditions.

Public names: ``Case``, ``CASE_NAMES``, ``QUICK_CASES``, ``get_case``, and for the
numeric side ``case_model`` and ``exact_hopf_point``.
"""

from __future__ import annotations

import random
from dataclasses import dataclass, field
from typing import Callable

import sympy as sp

__all__ = ["Case", "CASE_NAMES", "QUICK_CASES", "get_case", "case_model", "exact_hopf_point"]

_ASSUMPTIONS = {"positive": {"positive": True}, "real": {"real": True}}


def _symbols(names: str, kind: str) -> tuple[sp.Symbol, ...]:
    """Symbols carrying the assumptions that the model declares for them."""
    return tuple(sp.symbols(names, seq=True, **_ASSUMPTIONS[kind]))


@dataclass(frozen=True)
class Case:
    """One benchmark model with a Hopf point known in closed form.

    Attributes
    ----------
    name : str
        Identifier used on the command line and in the table.
    description : str
        One paragraph: what the model is and where its closed forms come from.
    states : tuple of sympy.Symbol
        State variables, in order.
    equations : tuple of sympy.Expr
        Right-hand sides, in the order of ``states``.
    parameters : dict
        Every symbolic parameter (bifurcation parameter included) mapped to
        its assumption, ``"positive"`` or ``"real"``.
    bifurcation : sympy.Symbol
        The bifurcation parameter.
    equilibrium : dict
        State -> closed-form expression in the parameters.
    critical_value : sympy.Expr
        The Hopf value of ``bifurcation`` on the followed branch.
    omega_squared : sympy.Expr
        omega^2 on that branch (bifurcation parameter eliminated).
    box : dict
        Remaining parameter -> (low, high) sampling range (rationals).
    conditions : tuple of sympy.Expr
        Expressions in the remaining parameters that must be positive at an
        admissible point (e.g. positivity of the equilibrium, omega^2 > 0).
    branch : int
        The engine's index of this branch among the branches of the critical
        set (``hopf(..., branch=...)``); the benchmark worker checks that the
        branch it gets has ``critical_value``, so a changed order fails loudly.
    """

    name: str
    description: str
    states: tuple
    equations: tuple
    parameters: dict
    bifurcation: sp.Symbol
    equilibrium: dict
    critical_value: sp.Expr
    omega_squared: sp.Expr
    box: dict
    conditions: tuple = field(default=())
    branch: int = 0

    @property
    def n(self) -> int:
        """Dimension of the state space."""
        return len(self.states)

    @property
    def free_parameters(self) -> tuple:
        """The symbolic parameters other than the bifurcation parameter."""
        return tuple(p for p in self.parameters if p != self.bifurcation)

    def sample(self, rng: random.Random, tries: int = 10000) -> dict:
        """Draw one admissible point of the free parameters as exact rationals."""
        for _ in range(tries):
            point = {p: _random_rational(rng, *self.box[p]) for p in self.free_parameters}
            if all(_positive_at(c, point) for c in self.conditions):
                return point
        raise RuntimeError(f"case {self.name}: no admissible point found in {tries} tries")

    def sample_points(self, count: int, seed: int = 20240601) -> list:
        """``count`` admissible points, reproducible from the case name and ``seed``."""
        rng = random.Random(f"{seed}:{self.name}")
        return [self.sample(rng) for _ in range(count)]


def _positive_at(expr, point) -> bool:
    """``expr > 0`` at ``point``; False where it is not real there."""
    try:
        return float(expr.xreplace(point)) > 0
    except TypeError:  # a complex value (a negative radicand)
        return False


def _random_rational(rng: random.Random, low, high, denominator: int = 24) -> sp.Rational:
    """A rational in [low, high] on a grid of step 1/denominator (never an endpoint)."""
    low, high = sp.Rational(low), sp.Rational(high)
    lo, hi = int(sp.ceiling(low * denominator)) + 1, int(sp.floor(high * denominator)) - 1
    return sp.Rational(rng.randint(lo, hi), denominator)


# --- planar field with every quadratic and cubic coefficient symbolic ------


def planar() -> Case:
    """x' = mu x - y + f2 + f3, y' = x + mu y + g2 + g3 (14 symbolic coefficients).

    Jacobian [[mu, -1], [1, mu]]: trace 2 mu, determinant mu^2 + 1, so the Hopf
    point is mu = 0 with omega = 1.  At mu = 0 the field is in the normal form
    of the classical planar formula, which gives an independent check.
    """
    x, y = sp.symbols("x y", real=True)
    mu = _symbols("mu", "real")[0]
    a = _symbols("a20 a11 a02 a30 a21 a12 a03", "real")
    b = _symbols("b20 b11 b02 b30 b21 b12 b03", "real")
    monomials = (x**2, x * y, y**2, x**3, x**2 * y, x * y**2, y**3)
    f = mu * x - y + sum(c * m for c, m in zip(a, monomials))
    g = x + mu * y + sum(c * m for c, m in zip(b, monomials))
    params = {mu: "real", **{c: "real" for c in a + b}}
    return Case(
        name="planar",
        description="Planar field at a Hopf point, all 14 quadratic and cubic coefficients "
        "symbolic; mu_c = 0 and omega = 1 by construction.",
        states=(x, y), equations=(f, g), parameters=params, bifurcation=mu,
        equilibrium={x: sp.S.Zero, y: sp.S.Zero},
        critical_value=sp.S.Zero, omega_squared=sp.S.One,
        box={c: (-3, 3) for c in a + b},
    )


# --- Lorenz system ------------------------------------------------------------


def lorenz() -> Case:
    """Lorenz system x' = sigma (y - x), y' = r x - y - x z, z' = x y - b z.

    At the equilibrium (sqrt(b (r-1)), sqrt(b (r-1)), r - 1) the characteristic
    polynomial is lambda^3 + (sigma + b + 1) lambda^2 + b (sigma + r) lambda
    + 2 b sigma (r - 1); a1 a2 - a3 = b [sigma (sigma + b + 3) - r (sigma - b - 1)]
    vanishes at r_H = sigma (sigma + b + 3)/(sigma - b - 1), with
    omega^2 = a2 = 2 b sigma (sigma + 1)/(sigma - b - 1).  The formula for r_H
    is the classical one (from memory; it is the Hopf value discussed in
    C. Sparrow, The Lorenz Equations, 1982); the derivation above reproduces it.
    """
    x, y, z = sp.symbols("x y z", real=True)
    sigma, b, r = _symbols("sigma b r", "positive")
    s = sp.sqrt(b * (r - 1))
    return Case(
        name="lorenz",
        description="Lorenz system, sigma, b, r symbolic, bifurcation parameter r, "
        "equilibrium with a radical; r_H = sigma (sigma+b+3)/(sigma-b-1).",
        states=(x, y, z),
        equations=(sigma * (y - x), r * x - y - x * z, x * y - b * z),
        parameters={sigma: "positive", b: "positive", r: "positive"}, bifurcation=r,
        equilibrium={x: s, y: s, z: r - 1},
        critical_value=sigma * (sigma + b + 3) / (sigma - b - 1),
        omega_squared=2 * b * sigma * (sigma + 1) / (sigma - b - 1),
        box={sigma: (2, 20), b: (sp.Rational(1, 2), 4)},
        conditions=(sigma - b - 1,),
    )


# --- three-species food chain ---------------------------------------------------


def foodchain() -> Case:
    """Resource R, consumer C, predator P with a saturating predator response.

    R' = R (1 - R/K) - R C
    C' = C (R - m) - 2 C P/(1 + C)
    P' = epsilon P (2 C/(1 + C) - d)

    Interior equilibrium (rational): C* = d/(2 - d), R* = K (1 - C*),
    P* = (R* - m)(1 + C*)/2.  The predator's time scale epsilon does not move
    the equilibrium and enters the Jacobian only in the entry dP'/dC (since
    dP'/dP = 0 there), so a1 a2 - a3 is linear in epsilon; solving it gives
    epsilon_c = 2 (1 - d) u (4 (1 - d) + d m (2 - d) - 2 K d (1 - d)) / (d (2 - d)^2 s^2)
    and omega^2 = 4 (1 - d)^2 u / ((2 - d)^2 s), with s = 2 K (1 - d) - m (2 - d)
    and u = 2 K d + m (2 - d).  For epsilon below the critical value the equilibrium is
    stable, above it a pair crosses (a fast predator destabilises the chain).
    omega^2 = a2 at the critical value (n = 3).
    """
    R, C, P = sp.symbols("R C P", real=True)
    K, m, d, eps = _symbols("K m d epsilon", "positive")
    c_star = d / (2 - d)
    r_star = K * (1 - c_star)
    p_star = (r_star - m) * (1 + c_star) / 2
    # s = (2 - d)(R* - m) > 0 at an admissible point; u > 0 always
    s = 2 * K * (1 - d) - m * (2 - d)
    u = 2 * K * d + m * (2 - d)
    critical = (2 * (1 - d) * u * (4 * (1 - d) + d * m * (2 - d) - 2 * K * d * (1 - d))
                / (d * (2 - d) ** 2 * s**2))
    omega2 = 4 * (1 - d) ** 2 * u / ((2 - d) ** 2 * s)
    return Case(
        name="foodchain",
        description="Three-species food chain (resource, consumer, predator with a "
        "saturating response), K, m, d, epsilon symbolic; bifurcation parameter "
        "epsilon (predator time scale), which enters a1 a2 - a3 linearly.",
        states=(R, C, P),
        equations=(R * (1 - R / K) - R * C,
                   C * (R - m) - 2 * C * P / (1 + C),
                   eps * P * (2 * C / (1 + C) - d)),
        parameters={K: "positive", m: "positive", d: "positive", eps: "positive"},
        bifurcation=eps,
        equilibrium={R: r_star, C: c_star, P: p_star},
        critical_value=critical, omega_squared=omega2,
        box={K: (sp.Rational(1, 2), 10), m: (0, 5), d: (0, 1)},
        conditions=(1 - d, r_star - m, critical, omega2, _minus_trace(
            (R, C, P), (R * (1 - R / K) - R * C, C * (R - m) - 2 * C * P / (1 + C)),
            {R: r_star, C: c_star, P: p_star})),
    )



def _foodchain_in_k(name: str, general: bool) -> Case:
    """The food chain with the carrying capacity K as bifurcation parameter.

    R' = r R (1 - R/K) - a R C
    C' = C (c a R - m) - b C P/(1 + C)
    P' = epsilon P (b C/(1 + C) - d)

    (``general``: all eight coefficients symbolic; otherwise r = a = c = 1,
    b = 2, the four-parameter model of ``foodchain``.)  The interior
    equilibrium is rational: C* = d/(b - d), R* = K (1 - a C*/r),
    P* = (c a R* - m)(1 + C*)/b.  The equilibrium is linear in K, and
    a1 a2 - a3 (n = 3) is quadratic in K after clearing denominators, so the
    Hopf value needs a square root: K_c = (-k1 + sqrt(k1^2 - 4 k2 k0))/(2 k2)
    for the coefficients k_j of K^j, computed here by plain sympy
    (``together`` and ``Poly``), independently of the engine (in the general
    case sympy's numerator comes out with the opposite overall sign, and the
    same root has the minus sign).  omega^2 = a2 at K_c.  This root is the
    one whose other eigenvalue is negative at the sampled points
    (``--check-cases`` confirms it).
    """
    R, C, P = sp.symbols("R C P", real=True)
    K, m, d, eps = _symbols("K m d epsilon", "positive")
    if general:
        r, a, b, c = _symbols("r a b c", "positive")
    else:
        r, a, b, c = sp.Integer(1), sp.Integer(1), sp.Integer(2), sp.Integer(1)
    equations = (r * R * (1 - R / K) - a * R * C,
                 C * (c * a * R - m) - b * C * P / (1 + C),
                 eps * P * (b * C / (1 + C) - d))
    c_star = d / (b - d)
    r_star = K * (1 - a * c_star / r)
    p_star = (c * a * r_star - m) * (1 + c_star) / b
    point = {R: r_star, C: c_star, P: p_star}
    J = sp.Matrix(equations).jacobian([R, C, P]).xreplace(point)
    a1 = sp.together(-J.trace())
    a2 = sp.together(sum(J[i, i] * J[j, j] - J[i, j] * J[j, i]
                         for i in range(3) for j in range(i + 1, 3)))
    a3 = sp.together(-J.det(method="berkowitz"))
    hurwitz = sp.numer(sp.together(a1 * a2 - a3))
    k2, k1, k0 = (sp.factor(hurwitz.expand().coeff(K, j)) for j in (2, 1, 0))
    if sp.Poly(hurwitz, K).degree() != 2:
        raise RuntimeError("the Hopf condition is expected to be quadratic in K")
    discriminant = sp.factor(k1**2 - 4 * k2 * k0)
    # the root that continues the four-parameter one (sympy's numerator has
    # the opposite overall sign in the general case)
    sign = -1 if general else 1
    critical = (-k1 + sign * sp.sqrt(discriminant)) / (2 * k2)
    omega2 = a2.xreplace({K: critical})
    params = {K: "positive", m: "positive", d: "positive", eps: "positive"}
    box = {m: (0, 2), d: (0, 1), eps: (sp.Rational(1, 10), 4)}
    # the discriminant first: the later conditions are complex where it is negative
    conditions = [discriminant, 1 - d, critical, omega2, a1.xreplace({K: critical}),
                  (c * a * r_star - m).xreplace({K: critical})]
    if general:
        params.update({s: "positive" for s in (r, a, b, c)})
        box.update({r: (sp.Rational(3, 4), sp.Rational(3, 2)),
                    a: (sp.Rational(3, 4), sp.Rational(3, 2)),
                    b: (sp.Rational(3, 2), 3), c: (sp.Rational(3, 4), sp.Rational(3, 2))})
        conditions[1] = b - d
        conditions.append(r - a * c_star)
    return Case(
        name=name,
        description="Three-species food chain with the carrying capacity K as the "
        "bifurcation parameter: the Hopf value needs a square root; "
        + ("r, K, a, b, m, c, epsilon, d symbolic." if general else
           "K, m, d, epsilon symbolic."),
        states=(R, C, P), equations=equations, parameters=params, bifurcation=K,
        equilibrium=point, critical_value=critical, omega_squared=omega2, box=box,
        conditions=tuple(conditions),
        # the engine orders the two roots +sqrt, -sqrt of its own quadratic; this
        # root is its second (the first is a neutral saddle at the sample points)
        branch=1,
    )


def foodchain_k4() -> Case:
    """Food chain in K, four symbolic parameters (see :func:`_foodchain_in_k`)."""
    return _foodchain_in_k("foodchain_K4", general=False)


def foodchain_k8() -> Case:
    """Food chain in K, eight symbolic parameters (see :func:`_foodchain_in_k`)."""
    return _foodchain_in_k("foodchain_K8", general=True)

def _minus_trace(states, equations, point) -> sp.Expr:
    """-trace of the Jacobian at ``point`` (the leading Hurwitz coefficient a1)."""
    return sp.cancel(-sum(sp.diff(f, s) for f, s in zip(equations, states)).xreplace(point))


# --- two coupled oscillators -------------------------------------------------------


def coupled() -> Case:
    """Two damped nonlinear oscillators in a one-way feedback loop.

    x1'' + c x1' + x1 = -x2 + x1^2 - x1^2 x1'      (oscillator 1, damping c)
    x2'' + x2' + w x2 = k x1 + x1 x2 - x2^3        (oscillator 2, stiffness w)

    The coupling gain k closes a loop of length four in the Jacobian only, so
    it enters the characteristic polynomial in a4 = w + k alone and
    Delta_3 = a1 a2 a3 - a1^2 a4 - a3^2 is linear in k:
    k_c = c (c^2 w + c w + c + w^2 - 2 w + 2)/(c + 1)^2, omega^2 = a3/a1
    = (c w + 1)/(c + 1); the other pair is stable.
    """
    x1, y1, x2, y2 = sp.symbols("x1 y1 x2 y2", real=True)
    k, c, w = _symbols("k c w", "positive")
    return Case(
        name="coupled",
        description="Two damped oscillators coupled in a one-way feedback loop "
        "(4 states), k, c, w symbolic; bifurcation parameter the loop gain k.",
        states=(x1, y1, x2, y2),
        equations=(y1,
                   -x1 - c * y1 - x2 + x1**2 - x1**2 * y1,
                   y2,
                   -w * x2 - y2 + k * x1 + x1 * x2 - x2**3),
        parameters={k: "positive", c: "positive", w: "positive"}, bifurcation=k,
        equilibrium={x1: sp.S.Zero, y1: sp.S.Zero, x2: sp.S.Zero, y2: sp.S.Zero},
        critical_value=c * (c**2 * w + c * w + c + w**2 - 2 * w + 2) / (c + 1) ** 2,
        omega_squared=(c * w + 1) / (c + 1),
        box={c: (sp.Rational(1, 10), 3), w: (sp.Rational(1, 10), 4)},
    )


# --- ring of n identical two-dimensional cells ----------------------------------------


def ring(cells: int) -> Case:
    """A ring of identical planar cells, each driven by its predecessor.

    u_i' = mu u_i - v_i + u_i^2 - u_i v_i - u_i^3 + k (u_{i-1} - u_{i-1} v_i)
    v_i' = (1 + a) u_i - a v_i + u_i v_i - v_i^3 + k (v_{i-1} + u_{i-1}^2)

    The Jacobian at the origin is block circulant, I (x) A + P (x) k I with the
    cyclic shift P, so its eigenvalues are those of A + k zeta I over the
    cells-th roots of unity zeta.  The synchronous mode zeta = 1 carries the
    pair: trace(A + k I) = mu - a + 2 k = 0 gives mu_c = a - 2 k (linear) and
    omega^2 = det(A + k I) = 1 + a - (a - k)^2.  Every other mode has real part
    k (cos(2 pi j/cells) - 1) < 0, so the Hopf point is simple (one pair) for
    every ring size.  The synchronous subspace is invariant and q is the same
    cell vector repeated; with <q, q> = 1 each cell carries 1/cells of the norm,
    so cells * l1 does not depend on the ring size (checked numerically: a
    consistency check across ring_n).
    """
    mu = _symbols("mu", "real")[0]
    a, k = _symbols("a k", "positive")
    u = sp.symbols(f"u0:{cells}", real=True)
    v = sp.symbols(f"v0:{cells}", real=True)
    states, equations = [], []
    for i in range(cells):
        j = (i - 1) % cells
        states += [u[i], v[i]]
        equations.append(mu * u[i] - v[i] + u[i]**2 - u[i] * v[i] - u[i]**3
                         + k * (u[j] - u[j] * v[i]))
        equations.append((1 + a) * u[i] - a * v[i] + u[i] * v[i] - v[i]**3
                         + k * (v[j] + u[j]**2))
    omega2 = 1 + a - (a - k) ** 2
    return Case(
        name=f"ring_{cells}",
        description=f"Ring of {cells} planar cells with one-way polynomial coupling "
        f"({2 * cells} states), a, k symbolic; mu_c = a - 2k.",
        states=tuple(states), equations=tuple(equations),
        parameters={mu: "real", a: "positive", k: "positive"}, bifurcation=mu,
        equilibrium={s: sp.S.Zero for s in states},
        critical_value=a - 2 * k, omega_squared=omega2,
        box={a: (sp.Rational(1, 5), 2), k: (sp.Rational(1, 10), 2)},
        conditions=(omega2,),
    )


# --- exact-rational models of growing dimension ------------------------------------------


def _unimodular(rng: random.Random, n: int) -> tuple[sp.Matrix, sp.Matrix]:
    """A random integer matrix of determinant 1 and its (integer) inverse."""
    T, T_inv = sp.eye(n), sp.eye(n)
    for _ in range(2 * n):
        i, j = rng.sample(range(n), 2)
        s = rng.choice((-1, 1))
        E, E_inv = sp.eye(n), sp.eye(n)
        E[i, j], E_inv[i, j] = s, -s
        T, T_inv = T * E, E_inv * T_inv
    return T, T_inv


def _small_rational(rng: random.Random) -> sp.Rational:
    """A nonzero rational p/q with |p| <= 9, 1 <= q <= 7."""
    return sp.Rational(rng.choice([-1, 1]) * rng.randint(1, 9), rng.randint(1, 7))


def rational(n: int, seed: int = 7) -> Case:
    """x' = A(mu) x + quadratic + cubic terms with random rational coefficients.

    A(mu) = T blockdiag([[mu, -w], [w, mu]], S) T^{-1} with T random unimodular,
    S lower triangular with negative diagonal and w > 0 rational, so the
    characteristic polynomial is (lambda^2 - 2 mu lambda + mu^2 + w^2) det(lambda I - S)
    and the Hopf point is mu = 0 with omega = w.  Each component gets two
    random quadratic and two random cubic monomials.  Fixed seed per dimension.
    """
    rng = random.Random(f"rational:{n}:{seed}")
    mu = _symbols("mu", "real")[0]
    xs = sp.symbols(f"x0:{n}", real=True)
    w = sp.Rational(rng.randint(2, 9), rng.randint(1, 4))
    block = sp.zeros(n, n)
    block[0, 0], block[0, 1], block[1, 0], block[1, 1] = mu, -w, w, mu
    for i in range(2, n):
        block[i, i] = -sp.Rational(rng.randint(1, 30), rng.randint(1, 6))
        for j in range(2, i):
            if rng.random() < 0.2:
                block[i, j] = _small_rational(rng)
    T, T_inv = _unimodular(rng, n)
    A = T * block * T_inv
    X = sp.Matrix(xs)
    linear = A * X
    equations = []
    for i in range(n):
        terms = [_small_rational(rng) * xs[rng.randrange(n)] * xs[rng.randrange(n)]
                 for _ in range(2)]
        terms += [_small_rational(rng) * xs[rng.randrange(n)] * xs[rng.randrange(n)]
                  * xs[rng.randrange(n)] for _ in range(2)]
        equations.append(sp.expand(linear[i]) + sp.Add(*terms))
    return Case(
        name=f"rational_{n}",
        description=f"Exact-rational model of dimension {n} (fixed seed), only mu "
        f"symbolic; mu_c = 0, omega = {w}.",
        states=xs, equations=tuple(equations), parameters={mu: "real"},
        bifurcation=mu, equilibrium={s: sp.S.Zero for s in xs},
        critical_value=sp.S.Zero, omega_squared=w**2, box={},
    )


# --- critical sets of degree 3 and 4 ---------------------------------------------


def reactor_cubic() -> Case:
    """Autocatalytic reactor x' = a - x y^2/(1 + y/10), y' = x y^2/(1 + y/10) - b y
    (an invented model).

    The equilibrium is y0 = a/b, x0 = b (a + 10 b)/(10 a).  The trace of the
    Jacobian vanishes where b^3 = a^2 (irreducible of degree 3 in b over
    Q(a)), so b_c = a^(2/3), and there omega^2 = det =
    10 (a^2 + 100 a^(4/3) - 10 a^(5/3))/(a + 1000); the engine works in
    Q(a)[b]/(b^3 - a^2).  Checked numerically by ``--check-cases``.
    """
    x, y = sp.symbols("x y", real=True)
    a, b = _symbols("a b", "positive")
    q = sp.Rational(1, 10)
    rate = x * y**2 / (1 + q * y)
    third = sp.Rational(1, 3)
    return Case(
        name="reactor_cubic",
        description="Autocatalytic reactor (invented), a symbolic, bifurcation parameter b; "
        "the critical set b^3 = a^2 is irreducible of degree 3.",
        states=(x, y), equations=(a - rate, rate - b * y),
        parameters={a: "positive", b: "positive"}, bifurcation=b,
        equilibrium={x: b * (a + 10 * b) / (10 * a), y: a / b},
        critical_value=a ** (2 * third),
        omega_squared=10 * (a**2 + 100 * a ** (4 * third) - 10 * a ** (5 * third)) / (a + 1000),
        box={a: (sp.Rational(1, 2), 20)},
    )


def selkov_quartic() -> Case:
    """Sel'kov's glycolysis model x' = -x + a y + x^2 y, y' = b - a y - x^2 y
    (Sel'kov, Eur. J. Biochem. 4 (1968) 79-86, in the dimensionless form of
    Strogatz, Nonlinear Dynamics and Chaos, 1994, Example 7.3.2; from memory).

    At (b, b/(a + b^2)) the trace is -(b^4 + (2a - 1) b^2 + a + a^2)/(a + b^2):
    an irreducible quartic in b over Q(a); its smallest positive root is
    b_c^2 = (1 - 2a - sqrt(1 - 8a))/2 (real for a < 1/8), and omega^2 = det =
    a + b_c^2.
    """
    x, y = sp.symbols("x y", real=True)
    a, b = _symbols("a b", "positive")
    b_c = sp.sqrt((1 - 2 * a - sp.sqrt(1 - 8 * a)) / 2)
    return Case(
        name="selkov_quartic",
        description="Sel'kov glycolysis model, a symbolic, bifurcation parameter b; the "
        "critical set is an irreducible quartic in b.",
        states=(x, y), equations=(-x + a * y + x**2 * y, b - a * y - x**2 * y),
        parameters={a: "positive", b: "positive"}, bifurcation=b,
        equilibrium={x: b, y: b / (a + b**2)},
        critical_value=b_c, omega_squared=a + b_c**2,
        box={a: (0, sp.Rational(1, 8))},
        conditions=(1 - 8 * a,),
    )


_BUILDERS: dict[str, Callable[[], Case]] = {
    "planar": planar,
    "lorenz": lorenz,
    "foodchain": foodchain,
    "foodchain_K4": foodchain_k4,
    "foodchain_K8": foodchain_k8,
    "coupled": coupled,
    **{f"ring_{c}": (lambda c=c: ring(c)) for c in (3, 4, 5, 6, 8, 10)},
    **{f"rational_{n}": (lambda n=n: rational(n)) for n in (5, 10, 20, 30)},
    "reactor_cubic": reactor_cubic,
    "selkov_quartic": selkov_quartic,
}

#: every case, in table order
CASE_NAMES: tuple[str, ...] = tuple(_BUILDERS)

#: a small subset for a smoke run (``run.py --quick``)
QUICK_CASES: tuple[str, ...] = ("planar", "lorenz", "coupled", "ring_3", "rational_5")


def get_case(name: str) -> Case:
    """Build the case called ``name`` (see ``CASE_NAMES``)."""
    try:
        builder = _BUILDERS[name]
    except KeyError:
        raise KeyError(f"unknown case {name!r}; known cases: {', '.join(CASE_NAMES)}") from None
    return builder()


def case_model(case: Case):
    """The case as a :class:`criticality.Model` (expressions, not text)."""
    from criticality import Model

    return Model(states=[s.name for s in case.states],
                 equations={s.name: f for s, f in zip(case.states, case.equations)},
                 parameters={p.name: kind for p, kind in case.parameters.items()})


def exact_hopf_point(case: Case, values: dict, digits: int):
    """The exact engine's Hopf point of ``case`` at ``values`` (names to
    numbers), evaluated to ``digits``: the case's branch, or where it has no
    Hopf point there (a family's branches are ordered without knowing the
    point, and at a given point some are neutral saddles, omega^2 < 0) the
    first branch of ``hopf_all`` that has one.  The case's branch comes
    first because ``hopf_all`` can cost far more (ring_5's second branch,
    with its nested radicals, takes about 20 s)."""
    from criticality import InadmissiblePointError, hopf, hopf_all

    model, mu = case_model(case), case.bifurcation.name
    equilibrium = {s.name: v for s, v in case.equilibrium.items()}
    try:
        return hopf(model, mu, equilibrium=equilibrium,
                    branch=case.branch).evaluate(values, digits=digits)
    except InadmissiblePointError:
        pass
    for r in hopf_all(model, mu, equilibrium=equilibrium):
        try:
            return r.evaluate(values, digits=digits)
        except InadmissiblePointError:
            continue
    raise ValueError(f"no branch of {case.name} has a Hopf point at {values}")
