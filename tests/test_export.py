"""Exported closed forms: the generated numpy module and C functions agree
with result.evaluate (mpmath) at random points."""

from __future__ import annotations

import importlib.util
import random
import shutil
import subprocess

import mpmath
import pytest

from criticality import Model, hopf
from models import BRUSSELATOR_TOML, LORENZ, LORENZ_EQUILIBRIUM
from criticality.cli.main import main

CASES = {
    # Brusselator (Prigogine and Lefever 1968): B_c = 1 + A^2
    "brusselator": (Model(["x", "y"], {"x": "A - (B+1)*x + x^2*y", "y": "B*x - x^2*y"},
                          {"A": "positive", "B": "positive"}, name="Brusselator"),
                    dict(parameter="B"), lambda rnd: {"A": rnd.uniform(0.3, 3)}),
    # the convection model with its radical equilibrium (sigma > b + 1 on the Hopf set)
    "convection": (LORENZ, dict(parameter="r", equilibrium=LORENZ_EQUILIBRIUM),
                   lambda rnd: (lambda b: {"b": b, "sigma": b + 1 + rnd.uniform(0.5, 10)})(
                       rnd.uniform(0.5, 4))),
}


@pytest.fixture(scope="module", params=sorted(CASES))
def case(request):
    model, options, points = CASES[request.param]
    options = dict(options)
    return hopf(model, options.pop("parameter"), **options), points


def _expected(result, point):
    num = result.evaluate(point, digits=20)
    with mpmath.workdps(20):
        out = {"critical_value": num.critical_value, "omega": num.omega, "l1": num.l1,
               "omega_squared": num.omega_squared, "period": num.period,
               "transversality": num.transversality}
        out.update({f"amplitude_squared_slope_{k}": v
                    for k, v in num.amplitude_coefficients.items()})
        return {k: float(v) for k, v in out.items()}


def _close(a, b):
    return abs(a - b) <= 1e-9 * max(1.0, abs(b))


@pytest.mark.slow
def test_numpy_module_matches_evaluate(case, tmp_path):
    """The generated module imports with numpy only and agrees with
    evaluate() at random points."""
    result, points = case
    path = tmp_path / "closed_forms.py"
    path.write_text(result.to_numpy_module())
    assert "criticality" not in "".join(l for l in path.read_text().splitlines()
                                        if l.startswith(("import", "from")))
    spec = importlib.util.spec_from_file_location("closed_forms", path)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    rnd = random.Random(7)
    for _ in range(5):
        point = points(rnd)
        args = [point[name] for name in module.PARAMETERS]
        expected = _expected(result, point)
        for key, value in expected.items():
            assert _close(float(module.QUANTITIES[key](*args)), value), key
    import numpy
    grid = numpy.linspace(1.0, 2.0, 4)
    if module.PARAMETERS == ("A",):
        assert module.critical_value(grid).shape == (4,)
        assert module.transversality(grid).shape == (4,)


@pytest.mark.slow
@pytest.mark.skipif(shutil.which("cc") is None and shutil.which("gcc") is None,
                    reason="no C compiler on this machine")
def test_c_code_compiles_and_matches_evaluate(case, tmp_path):
    """The C functions compile with the system compiler (-std=c99 -Wall
    -Werror) and print the values evaluate() gives."""
    result, points = case
    code = result.to_c(prefix="h_")
    rnd = random.Random(11)
    point = points(rnd)
    from criticality.outputs.export import export_arguments, exported_quantities
    args = export_arguments(result)
    keys = list(exported_quantities(result))
    call = ", ".join(repr(point[a]) for a in args)
    body = "\n".join(f'  printf("{k} %.17g\\n", h_{k}({call}));' for k in keys)
    (tmp_path / "forms.c").write_text(code + "\n#include <stdio.h>\nint main(void) {\n"
                                      + body + "\n  return 0;\n}\n")
    compiler = shutil.which("cc") or shutil.which("gcc")
    subprocess.run([compiler, "-std=c99", "-Wall", "-Werror", "-Wno-unused-parameter",
                    "forms.c", "-o", "forms", "-lm"], cwd=tmp_path, check=True,
                   capture_output=True)
    out = subprocess.run([str(tmp_path / "forms")], capture_output=True, text=True,
                         check=True).stdout
    printed = {k: float(v) for k, v in (line.split() for line in out.splitlines())}
    for key, value in _expected(result, point).items():
        assert _close(printed[key], value), key


def test_export_from_the_command_line(tmp_path, capsys):
    """criticality export writes the numpy module and the C code."""
    model = tmp_path / "bru.toml"
    model.write_text(BRUSSELATOR_TOML)
    assert main(["export", str(model), "--to", "numpy", "-q"]) == 0
    assert "def l1(A):" in capsys.readouterr().out
    target = tmp_path / "bru.c"
    assert main(["export", str(model), "--to", "c", "-o", str(target), "-q"]) == 0
    assert "double hopf_l1(double A)" in target.read_text()
