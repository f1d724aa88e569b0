"""Child process of the benchmark runner: one route on one case, reported as JSON lines.

Usage (the runner starts it; by hand only for debugging)::

    python benchmarks/worker.py ROUTE CASE [POINTS]

ROUTE is ``engine``, ``nosimp`` or ``simplified``.  Each report is one line on
standard output, prefixed by ``@@bench`` and followed by a JSON object with an
``event`` key:

``ready``        imports done, case built: the runner starts the clock.
``stage``        a baseline stage finished (name, seconds).
``done``         the route finished: ``seconds`` (wall time of the route only),
                 ``memory_mib`` (peak resident memory of this process).
``post``         output size (``count_ops`` of l1) and the values of l1, the
                 critical value and omega^2 at the sample points (strings,
                 30 significant digits, real and imaginary parts).
``unavailable``  the engine (``criticality.Model`` / ``criticality.hopf``) is
                 not importable yet.
``error``        the route raised; ``message`` says what.
"""

from __future__ import annotations

import json
import resource
import sys
import time
import traceback

import mpmath
import sympy as sp

from baseline import hopf_baseline
from cases import get_case
from reference import mp_eval, relative_difference

__all__ = ["MARK", "main"]

MARK = "@@bench "


def emit(event: str, **data) -> None:
    """Write one report line and flush it."""
    print(MARK + json.dumps({"event": event, **data}), flush=True)


def _peak_mib() -> float:
    """Peak resident set size of this process in MiB (Linux reports KiB)."""
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0


def _engine_call(case):
    """The timed engine call, or None (after reporting why) if the engine is missing.

    ``criticality.Model`` and ``criticality.hopf`` are looked up here, before the
    clock starts, so their (lazy) module imports are not timed, just as the
    baseline's ``import sympy`` is not.
    """
    try:
        import criticality

        model_class, hopf = criticality.Model, criticality.hopf
    except (ImportError, AttributeError) as exc:
        emit("unavailable", reason=f"{type(exc).__name__}: {exc}")
        return None
    states = [s.name for s in case.states]
    equations = {s.name: f for s, f in zip(case.states, case.equations)}
    parameters = {p.name: kind for p, kind in case.parameters.items()}
    equilibrium = {s.name: v for s, v in case.equilibrium.items()}

    def call():
        model = model_class(states=states, equations=equations, parameters=parameters)
        return hopf(model, case.bifurcation.name, equilibrium=equilibrium, branch=case.branch)

    return call


def _pick_branch(result, case, point: dict):
    """The engine may return one result per branch: keep the case's branch (a
    single result must be the case's branch, else the run is an error)."""
    values = {p.name: v for p, v in point.items()}
    with mpmath.workdps(30):
        target = mp_eval(case.critical_value, values)
        for branch in (result if isinstance(result, (list, tuple)) else [result]):
            if relative_difference(mp_eval(sp.sympify(branch.critical_value), values),
                                   target) < 1e-15:
                return branch
    raise RuntimeError(f"the branch returned by hopf (branch={case.branch}) does not have "
                       f"the case's critical value {case.critical_value}")


def _values(expr, points: list) -> list:
    """[re, im] strings of ``expr`` at each point, 30 significant digits."""
    out = []
    with mpmath.workdps(30):
        for point in points:
            value = mpmath.mpc(mp_eval(sp.sympify(expr), {p.name: v for p, v in point.items()}))
            out.append([mpmath.nstr(value.real, 30), mpmath.nstr(value.imag, 30)])
    return out


def _post(result, points: list) -> None:
    """Report the output size and the values at the sample points."""
    l1 = sp.sympify(result.l1)
    emit("post", ops=int(sp.count_ops(l1)), l1=_values(l1, points),
         critical_value=_values(result.critical_value, points),
         omega_squared=_values(result.omega_squared, points))


def main(argv: list[str]) -> int:
    """Run ROUTE on CASE and report; the exit status is 0 unless the arguments are bad."""
    route, name = argv[0], argv[1]
    count = int(argv[2]) if len(argv) > 2 else 2
    case = get_case(name)
    points = case.sample_points(count)
    if route == "engine":
        call = _engine_call(case)
        if call is None:
            return 0
    elif route in ("nosimp", "simplified"):
        def call():
            return hopf_baseline(case, simplify_result=route == "simplified",
                                 progress=lambda stage, s: emit("stage", name=stage, seconds=s))
    else:
        print(f"unknown route {route!r}; expected engine, nosimp or simplified", file=sys.stderr)
        return 2
    emit("ready")
    try:
        start = time.perf_counter()
        result = call()
        seconds = time.perf_counter() - start
        emit("done", seconds=seconds, memory_mib=_peak_mib())
        if route == "engine":
            result = _pick_branch(result, case, points[0])
        _post(result, points)
    except Exception as exc:  # report anything: the runner prints it in the notes
        emit("error", message=f"{type(exc).__name__}: {exc}"[:500],
             where=traceback.format_exc().strip().splitlines()[-3:])
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
