"""The package's public names are pinned: a change to them is deliberate."""

import subprocess
import sys

import criticality

EXPECTED = {
    "__version__",
    # model input
    "Model", "Parameter", "parse_expression", "format_expression",
    # analyses
    "hopf", "hopf_all", "HopfResult", "fold", "bautin_points", "bogdanov_takens", "analyses",
    "time_limit", "hopf_delay", "DelayHopfResult",
    "time_limit", "flip", "neimark_sacker", "validate_map",
    "fold_hopf", "hopf_hopf", "spectrum_check",
    # the words of verdicts, classifications and statuses
    "Classification", "Sign", "Side", "ConditionStatus", "FoldKind", "HopfHopfCase",
    "PointStatus", "RunStatus",
    # outputs, checks and pictures
    "latex_report", "validate", "ValidationReport", "sweep", "plot_parameter_plane",
    "plot_amplitude", "save_figure", "curve_data", "write_curve_csv",
    # numeric continuation and batch analyses
    "hopf_curve", "HopfCurve", "analyse_many",
    # errors
    "CriticalityError", "ModelError", "ExpressionError", "ExpressionSyntaxError",
    "ForbiddenExpressionError", "ExpressionLimitError", "UnknownSymbolError",
    "InvalidModelError", "ModelFileError", "ModelFileSyntaxError", "InvalidModelFileError",
    "ParameterError", "OrderError", "InadmissiblePointError", "EquilibriumError", "NotAnEquilibriumError",
    "EquilibriumNotFoundError",
    "NotAnalyticError", "NoHopfPointError", "DegenerateBifurcationError", "DegenerateHopfError",
    "ClosedFormUnavailableError", "ComputationLimitError", "MissingExtraError", "OutputError",
    "OutputExistsError", "ValidationRunError", "ModelKindError",
}


def test_public_names_are_pinned():
    assert set(criticality.__all__) == EXPECTED


def test_every_public_name_resolves():
    for name in criticality.__all__:
        assert getattr(criticality, name) is not None


def test_every_error_derives_from_the_base():
    for name in criticality.__all__:
        obj = getattr(criticality, name)
        if isinstance(obj, type) and issubclass(obj, Exception):
            assert issubclass(obj, criticality.CriticalityError)


def test_import_is_light():
    """Importing the package loads neither sympy nor the optional extras."""
    code = ("import sys, criticality; "
            "print(sorted(m for m in ('sympy', 'scipy', 'matplotlib', 'numpy') if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"
