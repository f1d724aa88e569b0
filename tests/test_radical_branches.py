"""Critical values on the chosen sheet of an equilibrium's radical.

When the equilibrium holds a root of the bifurcation parameter
(``sqrt(1 + 4 A c)`` below), the pair condition is solved through its norm,
which also vanishes where the condition with the other sign of the root does
(the other equilibrium).  These tests check that every branch the engine
returns belongs to the chosen equilibrium, against an independent mpmath
evaluation (the trace of a numeric Jacobian at a numerically located
equilibrium vanishes, its determinant is positive: for a planar system the
Hopf condition, common practice, no source).

The model is invented for these tests: a Brusselator with an extra quadratic
loss ``- c x^2``; its equilibria are ``y = B/x`` with ``c x^2 + x - A = 0``.
"""

import mpmath
import pytest
import sympy

from criticality import Model, hopf, hopf_all

LOSSY = {"x": "A - (B + 1)*x + x**2*y - c*x**2", "y": "B*x - x**2*y"}


def _lossy():
    return Model(states=["x", "y"], equations=LOSSY,
                 parameters={"A": "positive", "B": "positive", "c": "positive"})


def _field(A, B, c):
    return [lambda x, y: A - (B + 1) * x + x ** 2 * y - c * x ** 2,
            lambda x, y: B * x - x ** 2 * y]


def _numeric_jacobian(A, B, c, start):
    """The equilibrium near ``start`` (mpmath.findroot) and the Jacobian there
    by numeric differentiation (mpmath.diff): no closed form of the engine."""
    f = _field(A, B, c)
    x, y = mpmath.findroot(lambda x, y: [g(x, y) for g in f], start)
    J = [[mpmath.diff(g, (x, y), (1, 0)), mpmath.diff(g, (x, y), (0, 1))] for g in f]
    return (x, y), J


def _trace_det(A, B, c, start):
    (x, y), J = _numeric_jacobian(A, B, c, start)
    return (x, y), J[0][0] + J[1][1], J[0][0] * J[1][1] - J[0][1] * J[1][0]


def _positive_start(A, B, c):
    x = (-1 + mpmath.sqrt(1 + 4 * A * c)) / (2 * c)  # a start only; findroot refines it
    return (x * mpmath.mpf("1.1"), B / x * mpmath.mpf("0.9"))


def test_numeric_values_keep_only_the_root_of_the_chosen_equilibrium():
    """At B = 2, c = 3/4 equilibrium 0 (x > 0) has its Hopf point at
    A = 11/16; A = 1 zeroes the trace only at the other equilibrium
    (x = -2, a saddle) and is dropped with a note saying so."""
    with mpmath.workdps(30):
        B, c = mpmath.mpf(2), mpmath.mpf(3) / 4
        A = mpmath.mpf(11) / 16
        (x, _y), tr, det = _trace_det(A, B, c, _positive_start(A, B, c))
        assert x > 0 and abs(tr) < mpmath.mpf(10) ** -25 and det > 0
        (x, _y), tr, _det = _trace_det(mpmath.mpf(1), B, c, _positive_start(1, B, c))
        assert x > 0 and abs(tr) > mpmath.mpf("0.1")  # A = 1 is no Hopf point here
        (x, _y), tr, det = _trace_det(mpmath.mpf(1), B, c, (-2.1, -0.9))
        assert abs(x + 2) < mpmath.mpf(10) ** -25 and abs(tr) < mpmath.mpf(10) ** -25
        assert det < 0
    results = hopf_all(_lossy(), "A", equilibrium=0, values={"B": 2, "c": "3/4"})
    assert [r.critical_value for r in results] == [sympy.Rational(11, 16)]
    assert any("other sign of sqrt(3*A + 1)" in n and "(1)" in n for n in results[0].notes)
    r = hopf(_lossy(), "A", equilibrium=0, values={"B": 2, "c": "3/4"})
    assert r.critical_value == sympy.Rational(11, 16)
    assert r.omega_squared == sympy.Rational(7, 16)


@pytest.mark.slow
def test_the_sympy_field_drops_the_other_root_too():
    """The pure-sympy field gives the same single branch."""
    results = hopf_all(_lossy(), "A", equilibrium=0, values={"B": 2, "c": "3/4"},
                       backend="sympy")
    assert [r.critical_value for r in results] == [sympy.Rational(11, 16)]


def test_the_other_equilibrium_has_no_hopf_point_at_these_values():
    """Equilibrium 1 (x < 0) reaches a zero trace only at A = 1, where it is
    a saddle (determinant < 0, checked above): no branch."""
    from criticality import NoHopfPointError
    with pytest.raises(NoHopfPointError):
        hopf(_lossy(), "A", equilibrium=1, values={"B": 2, "c": "3/4"})


def _sheet(result):
    return result.condition("on_chosen_sheet")


def _at(expr, **values):
    """``expr`` at ``values``, matching symbols by name (whatever their
    declared sign)."""
    return sympy.N(expr.xreplace({s: sympy.Rational(values[s.name]) for s in expr.free_symbols
                                  if s.name in values}), 30)


@pytest.mark.slow
def test_symbolic_branches_state_their_sheet_and_follow_one_equilibrium():
    """With B, c symbolic both roots of the norm are listed, each with the
    condition that puts it on the chosen sheet of sqrt(4 A c + 1).  At
    points on both sides of 2 c^2 = 1 (where |2 c^2 - 1| would swap the two
    roots) the same branch is the one whose condition holds, and its critical
    value zeroes the trace at the numerically located positive equilibrium,
    with a positive determinant."""
    results = hopf_all(_lossy(), "A", equilibrium=0)
    assert len(results) == 2
    for r in results:
        assert not r.critical_value.has(sympy.Abs)
    points = [{"B": "2", "c": "3/4"}, {"B": "3", "c": "1/2"}, {"B": "5/4", "c": "2"}]
    for point in points:
        on = [r for r in results if _at(_sheet(r).expr, **point) > 0]
        assert [r.branch_index for r in on] == [results[1].branch_index]
        (r,) = on
        with mpmath.workdps(30):
            A = mpmath.mpf(_at(r.critical_value, **point))
            B, c = (mpmath.mpf(sympy.Rational(point[k])) for k in ("B", "c"))
            (x, _y), tr, det = _trace_det(A, B, c, _positive_start(A, B, c))
            assert x > 0 and abs(tr) < mpmath.mpf(10) ** -20 and det > 0
            assert abs(det - mpmath.mpf(_at(r.omega_squared, **point))) < mpmath.mpf(10) ** -20
    values = [sympy.nsimplify(_at(r.critical_value, B=2, c="3/4")) for r in results]
    assert values == [1, sympy.Rational(11, 16)]  # 1: the other equilibrium's value


@pytest.mark.slow
def test_a_sweep_marks_the_points_of_the_other_equilibrium():
    """Over a grid of c (B = 2) the other branch is marked inadmissible
    everywhere, with a warning that says so (every value is NaN): for 4 B c^2 > 1 its sheet condition 1 - 2 c^2 - 2 c sqrt(c^2 + 1)
    fails (the other equilibrium), below it is the chosen equilibrium's
    trace zero at x = -c - sqrt(c^2 + 1) < 0, where A = x (1 + c x) < 0."""
    numpy = pytest.importorskip("numpy")
    from criticality import sweep
    results = hopf_all(_lossy(), "A", equilibrium=0)
    grid = {"B": 2, "c": numpy.linspace(0.2, 2.0, 7)}
    import warnings

    from criticality.errors import NoAdmissiblePointWarning
    with pytest.warns(NoAdmissiblePointWarning, match="branch 1 of 2"):
        wrong = sweep(results[0], "critical_value", grid)
    with warnings.catch_warnings():
        warnings.simplefilter("error", NoAdmissiblePointWarning)
        right = sweep(results[1], "critical_value", grid)
    assert not numpy.any(wrong.admissible) and numpy.all(right.admissible)
    sheet = sweep(results[0], results[0].condition("on_chosen_sheet").expr, grid)
    assert list(numpy.asarray(sheet.values) > 0) == [True] + [False] * 6


def test_evaluate_names_the_branch_where_omega_squared_is_negative():
    """evaluate() on the branch of the other equilibrium at B = 2, c = 3/4
    raises the project's error (not mpmath's TypeError): omega^2 = -8 there
    (the saddle x = -2: det = x^2 (1 + 2 c x) = -8 by hand), and the other
    sign of the root is named; the branch of the chosen equilibrium
    evaluates to A_c = 11/16, omega^2 = 7/16 (by hand: x = 1/2)."""
    from criticality import InadmissiblePointError, ParameterError
    wrong, right = hopf_all(_lossy(), "A", equilibrium=0, values={"c": "3/4"})
    with pytest.raises(InadmissiblePointError) as info:
        wrong.evaluate(B=2)
    err = info.value
    assert isinstance(err, ParameterError) and err.quantity == "omega_squared"
    assert abs(err.value + 8) < 1e-20
    text = str(err)
    assert "omega^2 = -8.0 < 0" in text and "branch 1 of 2" in text and "B = 2" in text
    assert "other sign of a root" in text and "on_chosen_sheet" in text
    at = right.evaluate(B=2)
    assert abs(at.critical_value - mpmath.mpf(11) / 16) < 1e-25
    assert abs(at.omega_squared - mpmath.mpf(7) / 16) < 1e-25


def test_evaluate_refuses_a_critical_value_that_is_not_real():
    """For B + c^2 < 1 the critical values are complex (the root of
    B + c^2 - 1): an InadmissiblePointError naming the critical value."""
    from criticality import InadmissiblePointError
    results = hopf_all(_lossy(), "A", equilibrium=0, values={"c": "1/10"})
    for r in results:
        with pytest.raises(InadmissiblePointError, match="not a real number") as info:
            r.evaluate(B="1/10")
        assert info.value.quantity == "critical_value"


def test_evaluate_refuses_a_critical_value_outside_the_declared_range():
    """x' = (mu - c) x - y - x r^2, y' = x + (mu - c) y - y r^2 (the Hopf
    normal form, common practice, no source) has mu_c = c; with mu declared
    positive the family's condition c > 0 is open, and at c = -3 evaluate
    refuses mu_c = -3 instead of returning it; at c = 2 it returns 2."""
    from criticality import InadmissiblePointError
    m = Model(["x", "y"], {"x": "(mu - c)*x - y - x*(x^2 + y^2)",
                           "y": "x + (mu - c)*y - y*(x^2 + y^2)"},
              parameters={"mu": "positive", "c": "real"})
    r = hopf(m, "mu", equilibrium={"x": 0, "y": 0})
    assert r.condition("critical_value_admissible").status.value == "open"
    assert r.evaluate(c=2).critical_value == 2
    with pytest.raises(InadmissiblePointError, match="outside the declared range") as info:
        r.evaluate(c=-3)
    assert info.value.quantity == "critical_value" and info.value.value == -3


@pytest.mark.slow
def test_validate_reports_the_inadmissible_point_instead_of_a_wrong_cause():
    """validate() used to turn the TypeError into 'l1 = 0'; it now passes the
    error that says what is wrong."""
    pytest.importorskip("scipy")
    from criticality import InadmissiblePointError, validate
    wrong, _right = hopf_all(_lossy(), "A", equilibrium=0, values={"c": "3/4"})
    with pytest.raises(InadmissiblePointError, match="omega\\^2 = -8"):
        validate(wrong, {"B": 2})


@pytest.mark.slow
def test_a_root_of_the_parameter_through_a_cubic_norm():
    """With c the bifurcation parameter (A = 1/2, B = 3) the norm is the
    cubic 8 c^3 - 32 c^2 + 4 c + 7; of its three real roots only
    c = 3.8083... zeroes the trace at the positive equilibrium (mpmath:
    findroot on the trace there), the others are dropped as another
    equilibrium's, and the determinant there equals omega^2 > 0."""
    results = hopf_all(_lossy(), "c", equilibrium=0, values={"A": "1/2", "B": 3})
    assert len(results) == 1
    (r,) = results
    assert all(c.status == "holds" for c in r.conditions[:2])
    assert any("other sign of sqrt(2*c + 1)" in n for n in r.notes)
    with mpmath.workdps(30):
        A, B = mpmath.mpf(1) / 2, mpmath.mpf(3)

        def trace(c):
            x = (-1 + mpmath.sqrt(1 + 4 * A * c)) / (2 * c)  # the positive root, by hand
            return B - 1 - 2 * c * x - x ** 2

        c_ref = mpmath.findroot(trace, 2)
        at = r.evaluate({}, digits=25)
        assert abs(at.critical_value - c_ref) < mpmath.mpf(10) ** -20
        (x, _y), tr, det = _trace_det(A, B, c_ref, _positive_start(A, B, c_ref))
        assert abs(tr) < mpmath.mpf(10) ** -20 and abs(det - at.omega_squared) < 1e-20
