"""Verdicts, classifications and statuses are str-valued enums that compare,
print and serialise as their words; every kind of result pickles and comes
back equal (common practice, no source)."""

import json
import pickle

import pytest
import sympy

import criticality
from criticality import (Classification, ConditionStatus, FoldKind, HopfHopfCase, PointStatus,
                         RunStatus, Side, Sign)
from criticality.kinds import Word, coerce
from models import (BAUTIN_FORM, BOGDANOV_TAKENS_FORM, BRUSSELATOR, DELAYED_LOGISTIC_MAP,
                    FOLD_HOPF_FORM, HOPF_HOPF_FORM, LOGISTIC_MAP, LORENZ, LORENZ_EQUILIBRIUM,
                    LORENZ_VALUES, ORIGIN_2D, VAN_DER_POL, WRIGHT)

ENUMS = (Classification, Sign, Side, ConditionStatus, FoldKind, HopfHopfCase, PointStatus,
         RunStatus)


@pytest.mark.parametrize("kind", ENUMS, ids=lambda k: k.__name__)
def test_every_member_is_its_word(kind):
    """A member equals, hashes, prints, formats, reprs and dumps as its plain word."""
    for member in kind:
        word = member.value
        assert isinstance(member, str) and isinstance(member, Word)
        assert member == word and hash(member) == hash(word) and {word: 1}[member] == 1
        assert str(member) == word and f"{member}" == word and f"{member:>20}" == f"{word:>20}"
        assert repr(member) == repr(word)
        assert json.dumps({"k": member}) == json.dumps({"k": word})
        assert json.dumps([member], indent=1) == json.dumps([word], indent=1)
        assert kind(word) is member
        assert pickle.loads(pickle.dumps(member)) is member


def test_one_word_for_an_undecided_sign():
    """The sign proofs, the sign words and the cycle's side all say "undecided"."""
    from criticality.algebra import signs

    assert signs.UNDECIDED is Sign.UNDECIDED and Sign.UNDECIDED == "undecided"
    assert "unknown" not in {m.value for m in Sign}
    assert signs.mul_sign(Sign.POSITIVE, Sign.UNDECIDED) is Sign.UNDECIDED
    assert signs.mul_sign(Sign.NEGATIVE, Sign.NEGATIVE) is Sign.POSITIVE


def test_coerce_turns_words_into_members_and_names_bad_ones():
    """A result built from plain words holds members; an unknown word is refused."""
    from criticality.local.critical import Condition

    c = Condition("k", "words", sympy.Integer(1), ">", "holds")
    assert c.status is ConditionStatus.HOLDS
    with pytest.raises(ValueError, match="Condition.status must be one of 'holds', 'fails', "
                                         "'open', not 'maybe'"):
        Condition("k", "words", sympy.Integer(1), ">", "maybe")
    with pytest.raises(ValueError, match="not 'sideways'"):
        coerce(type("Box", (), {"side": "sideways"})(), side=Side)


def test_hopf_result_fields_are_members(lorenz):
    """The closed-form result carries enums, and they still equal the words."""
    assert lorenz.classification is Classification.SUBCRITICAL
    assert lorenz.classification == "subcritical"
    assert isinstance(lorenz.cycle.side, Side)
    assert all(isinstance(c.status, ConditionStatus) for c in lorenz.conditions)
    body = json.loads(lorenz.to_json())
    assert "subcritical" in json.dumps(body)
    assert "classification='subcritical'" in repr(lorenz)


def _same(a, b) -> bool:
    return pickle.loads(pickle.dumps(a)) == b


@pytest.mark.slow
def test_closed_form_hopf_result_round_trips(lorenz):
    """The Lorenz result (field elements and unevaluated roots inside) pickles,
    compares equal, keeps the shape of its expressions and its lazy parts."""
    copy = pickle.loads(pickle.dumps(lorenz))
    assert copy == lorenz
    assert sympy.srepr(copy.omega) == sympy.srepr(lorenz.omega)
    assert sympy.srepr(copy.l1) == sympy.srepr(lorenz.l1)
    assert copy.jacobian == lorenz.jacobian
    assert copy.eigenvector_q == lorenz.eigenvector_q
    assert copy.eigenvector_p == lorenz.eigenvector_p
    assert copy.characteristic_polynomial == lorenz.characteristic_polynomial
    assert str(copy.reduced_system) == str(lorenz.reduced_system)
    assert copy.to_json() == lorenz.to_json()
    assert copy.summary() == lorenz.summary()
    again = pickle.loads(pickle.dumps(copy))
    assert again == lorenz and again.to_latex() == lorenz.to_latex()


def test_hopf_results_of_other_shapes_round_trip():
    """Brusselator (solved equilibrium), van der Pol type, declared symbols."""
    b = criticality.hopf(BRUSSELATOR, "B")
    assert _same(b, b) and _same(b.with_declared_symbols(), b.with_declared_symbols())
    v = criticality.hopf(VAN_DER_POL, "mu", equilibrium=ORIGIN_2D)
    assert _same(v, v)
    assert _same(b.evaluate(A=2), b.evaluate(A=2))


def test_numeric_mode_result_round_trips():
    """hopf(..., guess=...) on the Lorenz system at sigma = 10, b = 8/3."""
    r = criticality.hopf(LORENZ, "r", guess={"x": 7, "y": 7, "z": 20, "r": 24},
                         values=LORENZ_VALUES, digits=20)
    copy = pickle.loads(pickle.dumps(r))
    assert copy == r and copy.jacobian == r.jacobian
    assert copy.classification is Classification.SUBCRITICAL


def test_other_result_kinds_round_trip():
    """Fold, Bautin, Bogdanov-Takens, delay, flip, Neimark-Sacker, fold-Hopf and
    Hopf-Hopf results pickle and come back equal, enums included."""
    fold = criticality.fold(criticality.Model(["x"], {"x": "mu - x^2"}, {"mu": "real"}), "mu",
                            eliminate=["mu"])
    assert fold.kind is FoldKind.FOLD and _same(fold, fold)
    bautin = criticality.bautin_points(BAUTIN_FORM, "mu", "k", equilibrium=ORIGIN_2D)[0]
    assert isinstance(bautin.l2_sign, Sign) and _same(bautin, bautin)
    bt = criticality.bogdanov_takens(BOGDANOV_TAKENS_FORM, "b2", "x_eq", eliminate=["b1", "y"])
    assert bt.ab_sign is Sign.NEGATIVE and _same(bt, bt)
    delay = criticality.hopf(WRIGHT, "alpha", equilibrium={"y": 0})
    assert delay.classification is Classification.SUPERCRITICAL and _same(delay, delay)
    flip = criticality.flip(LOGISTIC_MAP, "r", equilibrium=1)
    assert flip.status is PointStatus.NONDEGENERATE and flip.coefficient_sign is Sign.POSITIVE
    assert _same(flip, flip)
    ns = criticality.neimark_sacker(DELAYED_LOGISTIC_MAP, "r", equilibrium=1)
    assert isinstance(ns.lyapunov_sign, Sign) and _same(ns, ns)
    fh = criticality.fold_hopf(FOLD_HOPF_FORM, ("p1", "p2"), point={"p1": 0, "p2": 0},
                               equilibrium={"u": 0, "x": 0, "y": 0})
    assert fh.status is PointStatus.NONDEGENERATE and isinstance(fh.theta_sign, Sign)
    assert _same(fh, fh)
    hh = criticality.hopf_hopf(HOPF_HOPF_FORM, ("m1", "m2"), equilibrium=0)
    assert isinstance(hh.case, HopfHopfCase) and _same(hh, hh)


def test_shared_lorenz_model_is_the_fixture_model(lorenz):
    """The session fixture analyses the shared table's Lorenz model."""
    assert lorenz.model == LORENZ
    assert set(lorenz.equilibrium) == set(LORENZ_EQUILIBRIUM)
