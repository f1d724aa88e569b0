"""The words results use for verdicts, classifications and statuses.

Pipeline place: shared by every stage (signs, analyses, results, outputs);
imports nothing of the package.

Each is a string-valued enum: a member *is* its word, so
``result.classification == "supercritical"`` holds, ``json.dumps`` writes the
plain word, and ``str``, ``format`` and ``repr`` show the word as a plain
string did before the enums (outputs and doctests stay byte-for-byte the
same).  Compare with the members (``Classification.SUPERCRITICAL``) in new
code; both spellings keep working.

Examples
--------
>>> from criticality.kinds import Classification, Sign
>>> Classification("supercritical") is Classification.SUPERCRITICAL
True
>>> Sign.UNDECIDED == "undecided", f"{Sign.POSITIVE}", repr(Sign.ZERO)
(True, 'positive', "'zero'")
"""

from __future__ import annotations

from enum import Enum

__all__ = ["coerce", "Word", "Classification", "Sign", "Side", "ConditionStatus", "FoldKind",
           "HopfHopfCase", "PointStatus", "RunStatus"]


class Word(str, Enum):
    """A string-valued enum that prints, formats and reprs as its plain word."""

    def __str__(self) -> str:
        return str.__str__(self)

    def __format__(self, format_spec: str) -> str:
        return str.__format__(self, format_spec)

    def __repr__(self) -> str:
        return str.__repr__(self)


class Classification(Word):
    """The criticality of a Hopf point (or of a point on a curve): the sign of
    the deciding Lyapunov coefficient."""

    SUPERCRITICAL = "supercritical"   # l1 < 0: a stable cycle is born
    SUBCRITICAL = "subcritical"       # l1 > 0: an unstable cycle, abrupt onset
    DEPENDS = "depends"               # the sign changes inside the family: see the condition
    DEGENERATE = "degenerate"         # l1 = 0: the next coefficient decides
    NONTRANSVERSAL = "nontransversal"  # the pair does not cross with nonzero speed: no verdict
    INADMISSIBLE = "inadmissible"     # the critical value breaks the declared range: no verdict


class Sign(Word):
    """The proven sign of an expression under the declared assumptions.

    ``UNDECIDED`` is the one word for "not proved either way" (the sign
    proofs and the result fields used to say "unknown" and "undecided" for the
    same state); ``UNDEFINED`` marks a quantity that does not exist at the
    point (a ratio whose denominator vanishes)."""

    POSITIVE = "positive"
    NEGATIVE = "negative"
    NONNEGATIVE = "nonnegative"
    NONPOSITIVE = "nonpositive"
    ZERO = "zero"
    UNDECIDED = "undecided"
    UNDEFINED = "undefined"


class Side(Word):
    """On which side of the critical value the cycle (or the equilibria) exist."""

    ABOVE = "above"          # mu > mu_c
    BELOW = "below"          # mu < mu_c
    UNDECIDED = "undecided"  # depends on the parameters: see the side condition


class ConditionStatus(Word):
    """Whether a side condition of a result is proved."""

    HOLDS = "holds"
    FAILS = "fails"
    OPEN = "open"


class FoldKind(Word):
    """The kind of a zero-eigenvalue point."""

    FOLD = "fold"
    TRANSCRITICAL = "transcritical"
    PITCHFORK = "pitchfork"
    DEGENERATE = "degenerate"


class HopfHopfCase(Word):
    """The case of a Hopf-Hopf point: the sign of ``Re p11 Re p22``."""

    SIMPLE = "simple"          # positive
    DIFFICULT = "difficult"    # negative
    DEGENERATE = "degenerate"  # zero
    UNDECIDED = "undecided"


class PointStatus(Word):
    """The status of a point of a map analysis or of a codimension-two point:
    ``NONDEGENERATE``, or the named degeneracy or strong resonance."""

    NONDEGENERATE = "nondegenerate"
    DEGENERATE_COEFFICIENT = "degenerate_coefficient"
    DEGENERATE_LYAPUNOV = "degenerate_lyapunov"
    TRANSVERSALITY_FAILS = "transversality_fails"
    G200_VANISHES = "G200_vanishes"
    G011_VANISHES = "G011_vanishes"
    THETA_VANISHES = "theta_vanishes"
    RE_P11_OR_RE_P22_VANISHES = "Re_p11_or_Re_p22_vanishes"
    RESONANCE_1_1 = "resonance_1_1"
    RESONANCE_1_2 = "resonance_1_2"
    RESONANCE_1_3 = "resonance_1_3"
    RESONANCE_1_4 = "resonance_1_4"


class RunStatus(Word):
    """The outcome of one simulation run near onset."""

    MEASURED = "measured"    # a steady oscillation was measured
    DECAYED = "decayed"      # the orbit returned to the equilibrium
    ESCAPED = "escaped"      # the orbit left the neighbourhood
    UNDECIDED = "undecided"  # neither within the time limit


def coerce(obj: object, **kinds: type[Word]) -> None:
    """In a frozen dataclass's ``__post_init__``: turn the named fields (plain
    words from older code or from a file) into their enums; None stays None.
    An unknown word raises ValueError naming the field and the words allowed."""
    for name, kind in kinds.items():
        value = getattr(obj, name)
        if value is None or isinstance(value, kind):
            continue
        try:
            member = kind(value)
        except ValueError:
            allowed = ", ".join(repr(m.value) for m in kind)
            raise ValueError(f"{type(obj).__name__}.{name} must be one of {allowed}, "
                             f"not {value!r}") from None
        object.__setattr__(obj, name, member)
