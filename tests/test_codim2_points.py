"""Fold-Hopf and Hopf-Hopf points: truncated normal forms with chosen
coefficients, invariance under coordinate changes, a published model, and the
command line."""

import pickle

import mpmath
import pytest
import sympy

from criticality import Model, fold_hopf, hopf_hopf
from criticality.bifurcations.fold_hopf import fold_hopf_all
from criticality.bifurcations.hopf_hopf import principal_subresultant
from criticality.cli.main import main
from criticality.errors import ModelKindError, NoHopfPointError


def _eq(a, b):
    return sympy.simplify(sympy.sympify(a) - sympy.sympify(b)) == 0


def _changed(field, variables, T, Q):
    """The field in coordinates y with x = T (y + Q(y)), truncated at degree 3."""
    eps = sympy.Symbol("eps")
    y = sympy.Matrix(variables)
    Qv = sympy.Matrix([q for q in Q])
    x = T * (y + Qv)
    subs = dict(zip(variables, list(x)))
    f = sympy.Matrix([e.xreplace(subs) for e in field])
    DQ = Qv.jacobian(y)
    inv = sympy.eye(len(variables)) - DQ + DQ * DQ
    g = inv * (T.inv() * f)
    scale = {v: eps * v for v in variables}
    out = []
    for e in g:
        s = sympy.expand(e.xreplace(scale))
        s = sum(s.coeff(eps, k) for k in range(4))
        out.append(sympy.expand(s))
    return out


# -- fold-Hopf --------------------------------------------------------------------------


def _fold_hopf_form(A, B, C, D, omega=3):
    """u' = b1 + A u^2 + B (x^2 + y^2), w' = (b2 + i omega) w + (C + i D) u w, w = x + i y."""
    u, x, y, b1, b2 = sympy.symbols("u x y b1 b2", real=True)
    return {"u": b1 + A * u ** 2 + B * (x ** 2 + y ** 2),
            "x": b2 * x - omega * y + C * u * x - D * u * y,
            "y": omega * x + b2 * y + D * u * x + C * u * y}


def test_fold_hopf_coefficients_of_the_truncated_normal_form():
    """With <q1, q1> = 1 one has w = sqrt(2) z, so G200 = 2A, G011 = 2B, G110 = C + i D,
    s = sign(A B) and theta = C/(2A) (common practice, no source)."""
    A, B, C, D = sympy.symbols("A B C D", positive=True)
    m = Model(["u", "x", "y"], _fold_hopf_form(A, B, C, D),
              {"A": "positive", "B": "positive", "C": "positive", "D": "positive"})
    (r,) = fold_hopf_all(m, ("b2", "u_eq"), eliminate=["b1", "x", "y"])
    assert r.values == {"b1": 0, "b2": 0, "u_eq": 0} or r.values["b2"] == 0
    a, b, c, d = A, B, C, D  # the model's own symbols: the declared positive ones
    assert _eq(r.G200, 2 * a) and _eq(r.G011, 2 * b)
    assert _eq(r.G110, c + sympy.I * d)
    assert r.s == 1 and _eq(r.theta, c / (2 * a)) and r.theta_sign == "positive"
    assert r.omega == 3 and r.status == "nondegenerate"
    assert "no invariant torus" in r.scenario


@pytest.mark.slow
@pytest.mark.parametrize("coeffs, s, theta", [((1, -2, 3, 1), -1, sympy.Rational(3, 2)),
                                              ((-1, -1, 1, 2), 1, sympy.Rational(-1, 2))])
def test_fold_hopf_invariants_survive_coordinate_changes(coeffs, s, theta):
    """Under x = T (y + Q(y)) with a linear T and a quadratic Q the invariants s and theta
    are unchanged (common practice, no source)."""
    form = _fold_hopf_form(*coeffs)
    u, x, y, b1, b2 = sympy.symbols("u x y b1 b2", real=True)
    field = [form[k].subs({b1: 0, b2: 0}) for k in ("u", "x", "y")]
    T = sympy.Matrix([[1, 1, 0], [0, 2, 1], [1, 0, 1]])
    Q = [x * y - u ** 2, u * x + y ** 2, 2 * u * y]
    g = _changed(field, [u, x, y], T, Q)
    m = Model(["u", "x", "y"], dict(zip(("u", "x", "y"), g)), {"p1": "real", "p2": "real"})
    r = fold_hopf(m, ("p1", "p2"), point={"p1": 0, "p2": 0},
                  equilibrium={"u": 0, "x": 0, "y": 0})
    assert r.s == s and r.theta == theta


def test_rossler_system_fold_hopf_family():
    """The Roessler system x' = -y - z, y' = x + a y, z' = b + z (x - c) (Roessler, An
    equation for continuous chaos, Phys. Lett. A 57, 1976) has a fold-Hopf (zero-Hopf)
    equilibrium (a, -1, 1) at b = a, c = 2 a with omega^2 = 2 - a^2 (from memory); the
    eigenvalues at a = 1/2 are checked with mpmath (general-purpose reference library)."""
    m = Model(["x", "y", "z"], {"x": "-y - z", "y": "x + a*y", "z": "b + z*(x - c)"})
    (r,) = fold_hopf_all(m, ("c", "x_eq"), eliminate=["b", "y", "z"])
    a = sympy.Symbol("a", real=True)
    assert _eq(r.values["c"], 2 * a) and _eq(r.values["b"], a)
    assert r.equilibrium == {"x": a, "y": -1, "z": 1}
    assert _eq(r.omega ** 2, 2 - a ** 2)
    assert any(c.startswith("unfolding") and "a != 0" in c for c in r.conditions)
    J = sympy.Matrix([[0, -1, -1], [1, a, 0], [1, 0, a - 2 * a]]).subs(a, sympy.Rational(1, 2))
    with mpmath.workdps(30):
        ev = mpmath.eig(mpmath.matrix(J.tolist()))[0]
        assert min(abs(e) for e in ev) < mpmath.mpf(10) ** -25
        assert any(abs(e - 1j * mpmath.sqrt(2 - mpmath.mpf(1) / 4)) < 1e-25 for e in ev)
    # at a = 1/2: s = 1, theta = -1/16 < 0: the case with a torus
    (h,) = fold_hopf_all(m, ("c", "x_eq"), eliminate=["b", "y", "z"], values={"a": "1/2"})
    assert h.s == 1 and h.theta == sympy.Rational(-1, 16) and "s = 1, theta < 0" in h.scenario


def test_fold_hopf_refuses_maps_and_points_off_the_set():
    """A map is refused; a point that is not fold-Hopf names what fails."""
    with pytest.raises(ModelKindError):
        fold_hopf(Model(["x"], {"x": "a*x"}, kind="map"), ("a", "b"))
    m = Model(["u", "x", "y"], _fold_hopf_form(1, 1, 1, 1))
    with pytest.raises(Exception, match="no zero eigenvalue"):
        fold_hopf(m, ("b1", "b2"), point={"b1": -1, "b2": 0}, equilibrium=0)


# -- Hopf-Hopf ---------------------------------------------------------------------------


def _hopf_hopf_form(P, w1=5, w2=2):
    """w_k' = (m_k + i omega_k) w_k + w_k (P[k][0] |w1|^2 + P[k][1] |w2|^2) with real P."""
    x1, y1, x2, y2, m1, m2 = sympy.symbols("x1 y1 x2 y2 m1 m2", real=True)
    r1, r2 = x1 ** 2 + y1 ** 2, x2 ** 2 + y2 ** 2
    g1 = P[0][0] * r1 + P[0][1] * r2
    g2 = P[1][0] * r1 + P[1][1] * r2
    return {"x1": m1 * x1 - w1 * y1 + g1 * x1, "y1": w1 * x1 + m1 * y1 + g1 * y1,
            "x2": m2 * x2 - w2 * y2 + g2 * x2, "y2": w2 * x2 + m2 * y2 + g2 * y2}


@pytest.mark.slow
def test_hopf_hopf_coefficients_of_the_truncated_normal_form():
    """With <q_k, q_k> = 1, |w_k|^2 = 2 |z_k|^2: p_jk = 2 P_jk, theta = P12/P22, delta =
    P21/P11 (common practice, no source)."""
    a, b, c, d = sympy.symbols("a b c d", real=True)
    m = Model(["x1", "y1", "x2", "y2"], _hopf_hopf_form([[a, b], [c, d]]))
    r = hopf_hopf(m, ("m1", "m2"), equilibrium=0)
    assert r.values == {"m1": 0, "m2": 0} and (r.omega1, r.omega2) == (5, 2)
    assert [_eq(x, 2 * y) for x, y in zip((r.p11, r.p12, r.p21, r.p22), (a, b, c, d))] == [True] * 4
    assert _eq(r.theta, b / d) and _eq(r.delta, c / a)
    assert r.resonance == "none"


@pytest.mark.slow
def test_hopf_hopf_cases_and_sub_cases():
    """Chosen coefficients give the simple case with theta delta > 1 (bistability) and the
    difficult case."""
    simple = hopf_hopf(Model(["x1", "y1", "x2", "y2"], _hopf_hopf_form([[-1, 3], [5, -7]])),
                       ("m1", "m2"), equilibrium=0)
    assert simple.case == "simple" and "bistability" in simple.scenario
    assert simple.theta == sympy.Rational(-3, 7) and simple.delta == -5
    mixed = hopf_hopf(Model(["x1", "y1", "x2", "y2"], _hopf_hopf_form([[-1, -1], [-1, -2]])),
                      ("m1", "m2"), equilibrium=0)
    assert mixed.case == "simple" and "invariant two-torus" in mixed.scenario
    hard = hopf_hopf(Model(["x1", "y1", "x2", "y2"], _hopf_hopf_form([[-1, 1], [1, 2]])),
                     ("m1", "m2"), equilibrium=0)
    assert hard.case == "difficult" and "difficult" in hard.scenario


@pytest.mark.slow
def test_hopf_hopf_invariants_survive_coordinate_changes():
    """Under x = T (y + Q(y)) the invariants theta and delta and the signs of Re p11 and Re
    p22 are unchanged (common practice, no source)."""
    form = _hopf_hopf_form([[-1, 3], [5, -7]])
    x1, y1, x2, y2, m1, m2 = sympy.symbols("x1 y1 x2 y2 m1 m2", real=True)
    vs = [x1, y1, x2, y2]
    field = [form[k].subs({m1: 0, m2: 0}) for k in ("x1", "y1", "x2", "y2")]
    T = sympy.Matrix([[1, 0, 1, 0], [0, 1, 0, 1], [1, 0, 2, 0], [0, 1, 1, 2]])
    Q = [x1 * x2, y1 ** 2 - x2 * y2, x1 * y1, x2 ** 2]
    g = _changed(field, vs, T, Q)
    m = Model(["x1", "y1", "x2", "y2"], dict(zip(("x1", "y1", "x2", "y2"), g)),
              {"p1": "real", "p2": "real"})
    r = hopf_hopf(m, ("p1", "p2"), point={"p1": 0, "p2": 0},
                  equilibrium={"x1": 0, "y1": 0, "x2": 0, "y2": 0})
    assert r.theta == sympy.Rational(-3, 7) and r.delta == -5
    assert r.signs["p11"] == "negative" and r.signs["p22"] == "negative"


def test_hopf_hopf_strong_resonances_are_named():
    """omega1 : omega2 = 2 : 1 is the 1:2 resonance (no coefficients); 3 : 1 is flagged 1:3."""
    r2 = hopf_hopf(Model(["x1", "y1", "x2", "y2"], _hopf_hopf_form([[-1, 1], [1, -1]], 2, 1)),
                   ("m1", "m2"), equilibrium=0)
    assert r2.resonance == "1:2" and r2.status == "resonance_1_2" and r2.p11 is None
    r3 = hopf_hopf(Model(["x1", "y1", "x2", "y2"], _hopf_hopf_form([[-1, 1], [1, -1]], 3, 1)),
                   ("m1", "m2"), equilibrium=0)
    assert r3.resonance == "1:3" and r3.status == "resonance_1_3" and r3.p11 == -2


def test_principal_subresultants():
    """psc_0 is the resultant and psc_1 vanishes exactly when the gcd has degree >= 2
    (common practice, no source), checked against sympy's resultant."""
    from criticality.algebra.flint_field import FlintRationalField
    Q = FlintRationalField()
    f = [Q(c) for c in (6, -5, 1)]          # (s - 2)(s - 3)
    g = [Q(c) for c in (-3, 1)]             # s - 3
    assert principal_subresultant(Q, f, g, 0) == 0
    h = [Q(c) for c in (-4, 1)]
    s = sympy.Symbol("s")
    assert principal_subresultant(Q, f, h, 0) == sympy.resultant(s ** 2 - 5 * s + 6, s - 4)
    k = [Q(c) for c in (-12, 7, -1)]         # -(s - 3)(s - 4)
    assert principal_subresultant(Q, f, k, 1) != 0
    assert principal_subresultant(Q, f, [Q(-2) * c for c in f], 1) == 0


def test_no_hopf_hopf_in_three_dimensions_with_one_pair():
    """A system with a single pair has no Hopf-Hopf point: a clear NoHopfPointError."""
    m = Model(["x", "y", "z"], {"x": "a*x - y", "y": "x + a*y", "z": "-z + b*x^2"})
    with pytest.raises(NoHopfPointError):
        hopf_hopf(m, ("a", "b"), equilibrium=0)


def test_results_pickle_and_render_and_cli(tmp_path, capsys):
    """Results pickle and render; the fold-hopf and hopf-hopf subcommands run."""
    m = Model(["x1", "y1", "x2", "y2"], _hopf_hopf_form([[-1, 3], [5, -7]]))
    r = hopf_hopf(m, ("m1", "m2"), equilibrium=0)
    assert pickle.loads(pickle.dumps(r)) == r
    assert "Hopf-Hopf" in r.summary() and '"theta": "-3/7"' in r.to_json()
    assert "\\begin{align*}" in r.to_latex()
    path = tmp_path / "hh.toml"
    path.write_text(m.to_toml())
    assert main(["hopf-hopf", str(path), "-p", "m1", "--second", "m2", "-e", "0", "-q",
                 "--format", "json"]) == 0
    assert '"delta": "-5"' in capsys.readouterr().out
    fpath = tmp_path / "fh.toml"
    fpath.write_text('states = ["x", "y", "z"]\n[equations]\nx = "-y - z"\ny = "x + a*y"\n'
                     'z = "b + z*(x - c)"\n')
    assert main(["fold-hopf", str(fpath), "-p", "c", "--second", "x_eq", "--eliminate",
                 "b,y,z", "-q"]) == 0
    assert "theta = Re G110 / G200  -a**2/4" in capsys.readouterr().out


def test_spectrum_check_confirms_the_located_points():
    """mpmath's eigenvalues (general-purpose reference library) of the original Jacobian at
    the reported points contain 0, +-i omega (Roessler, a = 1/2) and +-i omega1, +-i omega2."""
    from criticality import spectrum_check
    m = Model(["x", "y", "z"], {"x": "-y - z", "y": "x + a*y", "z": "b + z*(x - c)"})
    (r,) = fold_hopf_all(m, ("c", "x_eq"), eliminate=["b", "y", "z"])
    assert spectrum_check(r, m, {"a": "1/2"}).agrees
    off = Model(["x", "y", "z"], {"x": "-y - z", "y": "x + a*y", "z": "b + z*(x - c) + 1/10"})
    assert not spectrum_check(r, off, {"a": "1/2"}).agrees
    h = Model(["x1", "y1", "x2", "y2"], _hopf_hopf_form([[-1, 3], [5, -7]], 7, 3))
    assert spectrum_check(hopf_hopf(h, ("m1", "m2"), equilibrium=0), h).agrees


def test_spectrum_check_refuses_an_imaginary_frequency():
    """On the Roessler fold-Hopf point omega^2 = 2 - a^2: at a = 2 the pair is
    real (+-sqrt(2)), which the spectrum would also contain; the check says
    there is no pair instead of agreeing."""
    from criticality import InadmissiblePointError, spectrum_check
    m = Model(["x", "y", "z"], {"x": "-y - z", "y": "x + a*y", "z": "b + z*(x - c)"})
    (r,) = fold_hopf_all(m, ("c", "x_eq"), eliminate=["b", "y", "z"])
    with pytest.raises(InadmissiblePointError, match="a = 2: omega = .* not a positive real"):
        spectrum_check(r, m, {"a": 2})


@pytest.mark.slow
def test_latex_of_the_new_results_compiles(tmp_path):
    """The align* blocks of flip, Neimark-Sacker, fold-Hopf and Hopf-Hopf results compile
    with pdflatex (skipped without pdflatex unless CRITICALITY_REQUIRE_LATEX=1)."""
    import os
    import shutil
    import subprocess
    from criticality import flip, neimark_sacker
    pdflatex = shutil.which("pdflatex")
    if not pdflatex:
        if os.environ.get("CRITICALITY_REQUIRE_LATEX") == "1":
            pytest.fail("pdflatex is required (CRITICALITY_REQUIRE_LATEX=1) but not installed")
        pytest.skip("pdflatex is not installed")
    ross = Model(["x", "y", "z"], {"x": "-y - z", "y": "x + a*y", "z": "b + z*(x - c)"})
    parts = [fold_hopf_all(ross, ("c", "x_eq"), eliminate=["b", "y", "z"])[0].to_latex(),
             flip(Model(["x"], {"x": "r*x*(1 - x)"}, kind="map"), "r", equilibrium=1).to_latex(),
             neimark_sacker(Model(["x", "y"], {"x": "r*x*(1 - y)", "y": "x"}, kind="map"), "r",
                            equilibrium=1).to_latex(),
             hopf_hopf(Model(["x1", "y1", "x2", "y2"], _hopf_hopf_form([[-1, 3], [5, -7]])),
                       ("m1", "m2"), equilibrium=0).to_latex()]
    tex = ("\\documentclass{article}\n\\usepackage{amsmath}\n\\begin{document}\n"
           + "\n".join(parts) + "\\end{document}\n")
    (tmp_path / "r.tex").write_text(tex)
    done = subprocess.run([pdflatex, "-interaction=nonstopmode", "-halt-on-error", "r.tex"],
                          cwd=tmp_path, capture_output=True, text=True, timeout=120)
    errors = [line for line in done.stdout.splitlines() if line.startswith("!")]
    assert (tmp_path / "r.pdf").exists(), errors


def test_fold_hopf_with_a_second_zero_eigenvalue_is_named():
    """Two zero eigenvalues beside the pair is named (codimension three)."""
    from criticality.errors import DegenerateBifurcationError
    m = Model(["u", "v", "x", "y"], {"u": "p1*u + v + u^2", "v": "p2*v + u*v", "x": "-y + u*x",
                                     "y": "x + u*y"}, {"p1": "real", "p2": "real"})
    with pytest.raises(DegenerateBifurcationError, match="further eigenvalue is zero"):
        fold_hopf(m, ("p1", "p2"), point={"p1": 0, "p2": 0},
                  equilibrium={"u": 0, "v": 0, "x": 0, "y": 0})
