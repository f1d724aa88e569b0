"""Exceptions of the criticality package.

Every error the package raises on purpose derives from :class:`CriticalityError`,
with one subclass per cause.  Messages say what was expected, what was found,
where (equation, line, column) and, where possible, how to fix it.  The command
line prints the message as one paragraph and exits with the class's
``exit_code``.
"""

from __future__ import annotations

TYPE_CHECKING = False  # typing.TYPE_CHECKING without importing typing (kept out of import time)
if TYPE_CHECKING:
    from typing import Any, Iterable

__all__ = [
    "CriticalityError",
    "ModelError",
    "ExpressionError",
    "ExpressionSyntaxError",
    "ForbiddenExpressionError",
    "ExpressionLimitError",
    "UnknownSymbolError",
    "InvalidModelError",
    "ModelFileError",
    "ModelFileSyntaxError",
    "InvalidModelFileError",
    "ModelKindError",
    "ParameterError",
    "OrderError",
    "InadmissiblePointError",
    "EquilibriumError",
    "NotAnEquilibriumError",
    "EquilibriumNotFoundError",
    "NotAnalyticError",
    "NoHopfPointError",
    "DegenerateBifurcationError",
    "DegenerateHopfError",
    "ClosedFormUnavailableError",
    "ComputationLimitError",
    "MissingExtraError",
    "OutputError",
    "OutputExistsError",
    "ValidationRunError",
]


class CriticalityError(Exception):
    """Base class of every error raised on purpose by criticality."""

    #: exit status used by the command line for this kind of error
    exit_code = 1


# --- model input ---------------------------------------------------------


class ModelError(CriticalityError):
    """The model as written cannot be used."""

    exit_code = 3


class ExpressionError(ModelError):
    """An expression in a model could not be read.

    Attributes
    ----------
    context : str or None
        What the expression belongs to, e.g. ``"equation for 'x'"``.
    line : int or None
        Line in the model file (1-based), when the expression came from a file.
    column : int or None
        Column inside the expression text (1-based).
    piece : str or None
        The offending piece of text.
    """

    def __init__(self, message: str, *, context: str | None = None, line: int | None = None,
                 column: int | None = None, piece: str | None = None) -> None:
        self.context = context
        self.line = line
        self.column = column
        self.piece = piece
        where = []
        if context:
            where.append(context)
        if line is not None:
            where.append(f"line {line}")
        if column is not None:
            where.append(f"column {column}")
        prefix = f"{', '.join(where)}: " if where else ""
        super().__init__(prefix + message)


class ExpressionSyntaxError(ExpressionError):
    """The text is not a well-formed expression."""


class ForbiddenExpressionError(ExpressionError):
    """The text uses a construct outside the whitelist (attributes, calls to
    unknown functions, keywords, strings, ...)."""


class ExpressionLimitError(ExpressionError):
    """The text exceeds a size, depth or exponent limit."""


class UnknownSymbolError(ExpressionError):
    """A name in an expression is neither a state nor a parameter of the model.

    Attributes
    ----------
    name : str
        The unknown name.
    suggestions : tuple of str
        Known names that are spelled alike (may be empty).
    """

    def __init__(self, message: str, *, name: str = "", suggestions: Iterable[str] = (),
                 **where: Any) -> None:
        self.name = name
        self.suggestions = tuple(suggestions)
        super().__init__(message, **where)


class InvalidModelError(ModelError):
    """The model has one or more problems; all of them are listed.

    Attributes
    ----------
    problems : tuple of str
        One sentence per problem.
    """

    def __init__(self, problems: Iterable[str], *, source: str | None = None) -> None:
        self.problems = tuple(problems)
        self.source = source
        head = f"the model{f' in {source}' if source else ''} has "
        head += "1 problem" if len(self.problems) == 1 else f"{len(self.problems)} problems"
        super().__init__(head + ":\n" + "\n".join(f"  - {p}" for p in self.problems))


class ModelFileError(ModelError):
    """A model file cannot be read or is not valid TOML of the expected shape."""


class ModelFileSyntaxError(ModelFileError):
    """A model file is not valid TOML.

    Attributes
    ----------
    source : str or None
        The file path (or ``"<text>"``).
    line, column : int or None
        Where the TOML reader stopped (1-based).
    """

    def __init__(self, message: str, *, source: str | None = None, line: int | None = None,
                 column: int | None = None) -> None:
        self.source = source
        self.line = line
        self.column = column
        super().__init__(message)


class InvalidModelFileError(InvalidModelError, ModelFileError):
    """A model file is valid TOML but its content has problems (unknown keys,
    wrong types, invalid equations); all of them are listed in ``problems``."""


class ModelKindError(ModelError):
    """The analysis needs the other kind of model: a map (``kind="map"``,
    the equations give the next state) or a flow (the equations give x')."""


# --- analysis ------------------------------------------------------------


class ParameterError(CriticalityError):
    """A parameter named in a call is unknown, not usable, or lacks a value."""

    exit_code = 4


class OrderError(ParameterError, ValueError):
    """The order of a normal form is not an odd integer >= 3 (the one check
    is :func:`criticality.local.prepare.check_order`)."""


class InadmissiblePointError(ParameterError):
    """A result was evaluated at parameter values where its branch has no
    Hopf point (``omega^2 <= 0``, a critical value that is not real, or the
    critical value of another equilibrium).

    Attributes
    ----------
    quantity : str
        What fails at the point: ``"omega_squared"``, ``"critical_value"``,
        ``"on_chosen_sheet"``, ...
    value : object
        Its value there (an mpmath number), or None.
    branch : str
        Which branch, in words (``"branch 1 of 2, A_c = ..."``).
    """

    def __init__(self, message: str, *, quantity: str = "", value: object = None,
                 branch: str = "") -> None:
        self.quantity = quantity
        self.value = value
        self.branch = branch
        super().__init__(message)


class EquilibriumError(CriticalityError):
    """Base class of problems with the equilibrium."""

    exit_code = 5


class NotAnEquilibriumError(EquilibriumError):
    """The given point does not make every right-hand side vanish."""


class EquilibriumNotFoundError(EquilibriumError):
    """No equilibrium could be found or selected as asked."""


class NotAnalyticError(CriticalityError):
    """The vector field is not analytic (or not defined) at the point."""

    exit_code = 5


class NoHopfPointError(CriticalityError):
    """No pair of eigenvalues can cross the imaginary axis as the parameter varies.

    Attributes
    ----------
    reason : str
        A short machine-readable cause: ``"empty_critical_set"``,
        ``"omega_squared_nonpositive"``, ``"parameter_absent"``, ...
    """

    exit_code = 6

    def __init__(self, message: str, *, reason: str = "no_hopf_point") -> None:
        self.reason = reason
        super().__init__(message)


class DegenerateBifurcationError(CriticalityError):
    """The critical point is more degenerate than the analysis asked for
    (e.g. a double zero eigenvalue where a fold was expected).

    Attributes
    ----------
    reason : str
        A short machine-readable cause.
    """

    exit_code = 6

    def __init__(self, message: str, *, reason: str = "degenerate") -> None:
        self.reason = reason
        super().__init__(message)


class DegenerateHopfError(DegenerateBifurcationError):
    """The critical point is not a simple Hopf point (zero eigenvalue, two
    critical pairs, ...).

    Attributes
    ----------
    reason : str
        ``"zero_eigenvalue"``, ``"two_critical_pairs"``, ...
    """



class ClosedFormUnavailableError(CriticalityError):
    """A quantity has no closed form by the methods available (e.g. the
    critical value is a root of a polynomial of high degree)."""

    exit_code = 7


class ComputationLimitError(CriticalityError):
    """A computation would exceed a configured size limit."""

    exit_code = 7


# --- environment and outputs ----------------------------------------------


class MissingExtraError(CriticalityError):
    """An optional dependency is needed; the message names the install command."""

    exit_code = 8


class OutputError(CriticalityError):
    """An output file cannot be written (missing folder, permissions, ...)."""

    exit_code = 9


class OutputExistsError(OutputError):
    """An output file exists and overwriting was not asked for."""


class ValidationRunError(CriticalityError):
    """A numerical validation could not be carried out."""

    exit_code = 10


class NameTypoWarning(UserWarning):
    """A name used in the model is not declared but looks like a declared one
    (a probable typo); the model takes it as a new real parameter.  The
    command line prints it on standard error."""


class NoAdmissiblePointWarning(UserWarning):
    """A sweep found no admissible point on its grid: at every point the
    branch has no Hopf point (omega^2 <= 0, a critical value outside the
    declared range, or the other equilibrium's), so ``admissible`` is False
    everywhere and ``masked()`` all NaN.  Another branch (``hopf_all``) or another grid usually has them."""


class PrecisionWarning(UserWarning):
    """A floating-point evaluation of a closed form lost digits: checked
    against the same expression at 30 digits (mpmath), some sampled values
    are off by more than the stated tolerance."""
