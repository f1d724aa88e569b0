"""The two routes to c1 (center-manifold series + planar normal form, and the
projection formula) agree exactly, and both agree with an independent numeric
evaluation of the projection formula (Kuznetsov, Elements of Applied
Bifurcation Theory, 3rd ed., 2004, Section 3.5) with mpmath at 30 digits."""

import random

import mpmath
import pytest
import sympy
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from criticality import Model, hopf

from reference_numeric import numeric_first_lyapunov


def random_hopf_model(n, seed, symbolic=False):
    """A model with a Hopf point at mu = 0 at the origin: Jacobian
    T blockdiag([[mu, -w], [w, mu]], S) T^-1, random quadratic and cubic terms."""
    rng = random.Random(seed)
    mu = sympy.Symbol("mu", real=True)
    k = sympy.Symbol("k", real=True)
    w = sympy.Rational(rng.randint(1, 5), rng.randint(1, 3))
    while True:
        T = sympy.Matrix(n, n, lambda i, j: rng.randint(-2, 2) + (3 if i == j else 0))
        if T.det() != 0:
            break
    S = sympy.zeros(n - 2, n - 2)
    for i in range(n - 2):
        S[i, i] = -rng.randint(1, 4)
        for j in range(i + 1, n - 2):
            S[i, j] = rng.randint(-2, 2)
    D = sympy.diag(sympy.Matrix([[mu, -w], [w, mu]]), S) if n > 2 else sympy.Matrix([[mu, -w], [w, mu]])
    A = T * D * T.inv()
    xs = sympy.symbols(f"x1:{n + 1}", real=True)
    eqs = {}
    for i in range(n):
        f = sum(A[i, j] * xs[j] for j in range(n))
        for _ in range(rng.randint(1, 3)):
            a, b = rng.randrange(n), rng.randrange(n)
            coeff = sympy.Rational(rng.randint(-3, 3), rng.randint(1, 3))
            f += (coeff + (k if symbolic and rng.random() < 0.5 else 0)) * xs[a] * xs[b]
        for _ in range(rng.randint(1, 3)):
            a, b, c = rng.randrange(n), rng.randrange(n), rng.randrange(n)
            f += sympy.Rational(rng.randint(-3, 3), rng.randint(1, 3)) * xs[a] * xs[b] * xs[c]
        eqs[str(xs[i])] = f
    params = {"mu": "real"}
    if symbolic:
        params["k"] = "real"
    model = Model(states=[str(x) for x in xs], equations=eqs, parameters=params)
    return model, {str(x): 0 for x in xs}


@pytest.mark.slow
@pytest.mark.parametrize("n,seed", [(2, 1), (3, 2), (3, 7), (4, 3), (5, 4), (5, 11)])
def test_routes_agree_and_match_mpmath(n, seed):
    """Exact agreement of the two routes, and agreement with mpmath at 30 digits."""
    model, origin = random_hopf_model(n, seed)
    r = hopf(model, "mu", equilibrium=origin)
    assert r.routes_agree
    assert r.critical_value == 0
    at = {s: 0 for s in model.state_symbols}
    at[model.symbols["mu"]] = 0
    omega, l1, c1 = numeric_first_lyapunov(model.equations, model.state_symbols, at, digits=30)
    n_res = r.evaluate(digits=30)
    with mpmath.workdps(40):
        assert abs(omega - n_res.omega) < 1e-25
        assert abs(l1 - n_res.l1) < 1e-24 * max(1, abs(l1))
        assert abs(mpmath.im(c1) - mpmath.im(n_res.c1)) < 1e-24 * max(1, abs(c1))


@pytest.mark.slow
@settings(max_examples=12, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(n=st.integers(2, 5), seed=st.integers(0, 10 ** 6))
def test_routes_agree_on_random_models(n, seed):
    """Exact agreement of the two routes on random rational models."""
    model, origin = random_hopf_model(n, seed)
    assert hopf(model, "mu", equilibrium=origin).routes_agree


@pytest.mark.slow
@pytest.mark.parametrize("n,seed", [(2, 5), (3, 6), (4, 8)])
def test_routes_agree_on_symbolic_models(n, seed):
    """Exact agreement with a symbolic parameter in the nonlinear terms, and the
    flint field and its pure-sympy stand-in give the same l1."""
    model, origin = random_hopf_model(n, seed, symbolic=True)
    r = hopf(model, "mu", equilibrium=origin)
    r2 = hopf(model, "mu", equilibrium=origin, backend="sympy")
    assert r.routes_agree and r2.routes_agree
    assert sympy.cancel(r.l1 - r2.l1) == 0
    k = model.symbols["k"]
    if k in r.l1.free_symbols:
        at = {s: 0 for s in model.state_symbols}
        at[model.symbols["mu"]] = 0
        at[k] = sympy.Rational(3, 7)
        _, l1, _ = numeric_first_lyapunov(model.equations, model.state_symbols, at, digits=30)
        with mpmath.workdps(40):
            assert abs(l1 - r.evaluate(k="3/7").l1) < 1e-24 * max(1, abs(l1))
