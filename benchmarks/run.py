"""Benchmark: the criticality engine against the plain-sympy route, case by case.

Run by hand from the repository root::

    python benchmarks/run.py [--cases NAME ...] [--repeat 3] [--timeout 120] [--quick]
                             [--routes engine,nosimp,simplified] [--markdown FILE]
                             [--json FILE] [--check-cases]

Every route runs on every case in a fresh child process (``worker.py``) with a
wall-time limit; the engine ``--repeat`` times (median reported), each baseline
once.  The table, the geometric means of the speed ratios and the targets of
the performance issue are printed at the end; see benchmarks/README.md for the
columns.
"""

from __future__ import annotations

import argparse
import json
import math
import os
import queue
import statistics
import subprocess
import sys
import tempfile
import threading
import time
from dataclasses import asdict, dataclass, field, replace
from pathlib import Path

import mpmath
from sympy import Rational

from cases import CASE_NAMES, QUICK_CASES, get_case
from reference import (check_point, classical_planar_l1, mp_eval, numeric_l1,
                       relative_difference)
from worker import MARK

HERE = Path(__file__).resolve().parent
ROUTES = ("engine", "nosimp", "simplified")
STARTUP_SECONDS = 120.0
AGREEMENT_TOLERANCE = 1e-20
TARGET_TIMEOUT = 120.0


@dataclass(frozen=True)
class RouteRun:
    """One route on one case (for the engine: the combination of its repeats)."""

    status: str  # ok, timeout, error, unavailable, skipped, crashed, not run
    seconds: float | None = None
    memory_mib: float | None = None
    ops: int | None = None
    l1: tuple = ()
    critical_value: tuple = ()
    omega_squared: tuple = ()
    message: str = ""
    stages: tuple = ()
    runs: tuple = ()


@dataclass
class CaseResult:
    """Everything measured on one case."""

    name: str
    n: int
    parameters: int
    routes: dict = field(default_factory=dict)
    reference: tuple = ()
    declared: dict = field(default_factory=dict)
    agreement: float | None = None
    notes: list = field(default_factory=list)


# --- child processes ---------------------------------------------------------------


def _pump(stream, events: queue.Queue) -> None:
    """Forward the child's report lines to the queue; None marks the end."""
    for line in stream:
        if line.startswith(MARK):
            events.put(json.loads(line[len(MARK):]))
    events.put(None)


def _to_mpc(pairs: list) -> tuple:
    with mpmath.workdps(30):
        return tuple(mpmath.mpc(mpmath.mpf(re), mpmath.mpf(im)) for re, im in pairs)


def _follow(events: queue.Queue, timeout: float, post_timeout: float) -> dict:
    """Read the child's events under the three deadlines (start, route, post-processing)."""
    info: dict = {"status": "crashed", "stages": []}
    deadline = time.monotonic() + STARTUP_SECONDS
    while True:
        try:
            event = events.get(timeout=max(0.0, deadline - time.monotonic()))
        except queue.Empty:
            phase = "post" if "seconds" in info else "route"
            info["status"] = "timeout" if phase == "route" else "ok"
            if phase == "post":
                info["message"] = f"post-processing (count_ops, evaluation) over {post_timeout:.0f} s"
            return info
        if event is None:
            return info
        kind = event.pop("event")
        if kind == "ready":
            deadline = time.monotonic() + timeout
        elif kind == "stage":
            info["stages"].append((event["name"], event["seconds"]))
        elif kind == "done":
            info.update(status="ok", seconds=event["seconds"], memory_mib=event["memory_mib"])
            deadline = time.monotonic() + post_timeout
        elif kind == "post":
            info.update(ops=event["ops"], l1=_to_mpc(event["l1"]),
                        critical_value=_to_mpc(event["critical_value"]),
                        omega_squared=_to_mpc(event["omega_squared"]))
            return info
        elif kind in ("error", "unavailable"):
            info.update(status=kind, message=event.get("message") or event.get("reason", ""))
            return info


def run_child(route: str, case_name: str, timeout: float, points: int,
              source: Path | None = None) -> RouteRun:
    """Run one route on one case in a fresh process and collect its reports;
    with ``source`` (a ``src`` directory) the engine is imported from there."""
    command = [sys.executable, str(HERE / "worker.py"), route, case_name, str(points)]
    env = None
    if source is not None:
        env = dict(os.environ, PYTHONPATH=os.pathsep.join(
            [str(source), *filter(None, [os.environ.get("PYTHONPATH")])]))
    with tempfile.TemporaryFile(mode="w+") as errors:
        process = subprocess.Popen(command, stdout=subprocess.PIPE, stderr=errors,
                                   text=True, cwd=HERE, env=env)
        events: queue.Queue = queue.Queue()
        threading.Thread(target=_pump, args=(process.stdout, events), daemon=True).start()
        try:
            info = _follow(events, timeout, post_timeout=max(2 * timeout, 60.0))
        finally:
            if process.poll() is None:
                process.kill()
            process.wait()
        if info["status"] == "crashed":
            errors.seek(0)
            tail = errors.read().strip().splitlines()[-3:]
            info["message"] = f"exit status {process.returncode}: " + " | ".join(tail)
    info["stages"] = tuple(info["stages"])
    return RouteRun(**info)


def _combine_repeats(runs: list[RouteRun]) -> RouteRun:
    """Median time and maximal memory over the successful repeats; first run's outputs."""
    good = [r for r in runs if r.status == "ok"]
    if not good:
        return replace(runs[0], runs=tuple(r.status for r in runs))
    return replace(good[0], seconds=statistics.median(r.seconds for r in good),
                   memory_mib=max(r.memory_mib for r in good),
                   runs=tuple(r.seconds for r in good))


# --- one case ---------------------------------------------------------------------------


def _reference(case, points: list) -> tuple[tuple, dict]:
    """Numeric l1 (projection formula in mpmath) and the declared closed forms at the points."""
    with mpmath.workdps(30):
        l1 = tuple(numeric_l1(case, point)[0] for point in points)
        declared = {
            "critical_value": tuple(mp_eval(case.critical_value, _named(p)) for p in points),
            "omega_squared": tuple(mp_eval(case.omega_squared, _named(p)) for p in points),
        }
    return l1, declared


def _named(point: dict) -> dict:
    return {p.name: v for p, v in point.items()}


def _max_difference(a: tuple, b: tuple) -> float:
    with mpmath.workdps(30):
        return max(float(relative_difference(x, y)) for x, y in zip(a, b))


def _agreement(result: CaseResult) -> None:
    """Max relative difference of l1 between finished routes and the numeric reference."""
    finished = {k: r for k, r in result.routes.items() if r.status == "ok" and r.l1}
    worst = 0.0
    for name, run in finished.items():
        diff = _max_difference(run.l1, result.reference)
        worst = max(worst, diff)
        if diff > AGREEMENT_TOLERANCE:
            result.notes.append(f"{name} l1 differs from the numeric reference by {diff:.2e}")
        for key in ("critical_value", "omega_squared"):
            d = _max_difference(getattr(run, key), result.declared[key])
            if d > AGREEMENT_TOLERANCE:
                result.notes.append(f"{name} {key} differs from the closed form by {d:.2e}")
    engine = finished.get("engine")
    for name in ("nosimp", "simplified"):
        if engine is not None and name in finished:
            worst = max(worst, _max_difference(engine.l1, finished[name].l1))
    result.agreement = worst if finished else None


def _log(message: str) -> None:
    print(message, file=sys.stderr, flush=True)


def _describe(run: RouteRun) -> str:
    if run.status == "ok":
        return f"{run.seconds:.3f} s, {run.memory_mib:.0f} MiB, ops {run.ops}"
    where = f" (last stage finished: {run.stages[-1][0]})" if run.stages else ""
    return f"{run.status}{where} {run.message}".strip()


def run_case(name: str, routes: tuple, repeat: int, timeout: float, points: int,
             earlier: Path | None = None) -> CaseResult:
    """All requested routes on one case, the reference values and the agreement.

    With ``earlier`` (the ``src`` directory of another checkout) the engine of
    that checkout runs too, alternating with this one run by run (A B A B:
    a drift in the machine's speed then moves both alike)."""
    case = get_case(name)
    sample = case.sample_points(points)
    result = CaseResult(name, case.n, len(case.parameters))
    result.reference, result.declared = _reference(case, sample)
    for route in ROUTES:
        if route not in routes:
            result.routes[route] = RouteRun("not run")
            continue
        previous = result.routes.get("nosimp")
        if route == "simplified" and previous is not None and previous.status not in (
                "ok", "not run"):
            result.routes[route] = RouteRun("skipped", message=f"no-simplify {previous.status}")
            _log(f"[{name}] simplified: skipped (the no-simplify route {previous.status})")
            continue
        if route == "engine" and earlier is not None:
            _engine_pair(result, repeat, timeout, points, earlier)
            continue
        count = repeat if route == "engine" else 1
        runs = []
        for _ in range(count):
            runs.append(run_child(route, name, timeout, points))
            if runs[-1].status != "ok":
                break
        _record(result, route, runs)
    result.routes.setdefault("earlier", RouteRun("not run"))
    _agreement(result)
    return result


def _engine_pair(result: CaseResult, repeat: int, timeout: float, points: int,
                 earlier: Path) -> None:
    """This engine and the earlier checkout's, alternately, ``repeat`` times each."""
    runs: dict = {"engine": [], "earlier": []}
    for _ in range(repeat):
        for key, source in (("engine", None), ("earlier", earlier)):
            if runs[key] and runs[key][-1].status != "ok":
                continue
            runs[key].append(run_child("engine", result.name, timeout, points, source))
    for key in ("engine", "earlier"):
        _record(result, key, runs[key])


def _record(result: CaseResult, key: str, runs: list) -> None:
    result.routes[key] = _combine_repeats(runs)
    _log(f"[{result.name}] {key}: {_describe(result.routes[key])}")
    for run in runs:
        if run.message:
            result.notes.append(f"{key}: {run.status}: {run.message}")
            break


# --- import time ---------------------------------------------------------------------------


def import_seconds(repeat: int = 3) -> float | None:
    """Median wall time of ``import criticality`` in a fresh interpreter, or None on failure."""
    code = ("import time; t = time.perf_counter(); import criticality; "
            "print(time.perf_counter() - t)")
    times = []
    for _ in range(repeat):
        done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                              timeout=120)
        if done.returncode != 0:
            return None
        times.append(float(done.stdout.strip().splitlines()[-1]))
    return statistics.median(times)


# --- table and targets -----------------------------------------------------------------------


def _time_cell(run: RouteRun) -> str:
    if run.status == "ok":
        return f"{run.seconds:.3f}" if run.seconds < 10 else f"{run.seconds:.1f}"
    return {"unavailable": "n/a", "skipped": "timeout*" if "timeout" in run.message else "skip",
            "not run": "-"}.get(run.status, run.status)


def _ratio(result: CaseResult, baseline: str) -> float | None:
    base, engine = result.routes[baseline], result.routes["engine"]
    if base.status == "ok" and engine.status == "ok" and engine.seconds > 0:
        return base.seconds / engine.seconds
    return None


def _fmt(value, pattern: str) -> str:
    return "-" if value is None else format(value, pattern)


HEADER = ("case", "n", "params", "simplified [s]", "no-simplify [s]", "engine [s]",
          "no-simp/eng", "simp/eng", "ops simp", "ops no-simp", "ops eng", "eng MiB",
          "agreement")


EARLIER_HEADER = ("earlier [s]", "eng/earlier")


def _with_earlier(results: list[CaseResult]) -> bool:
    return any(r.routes["earlier"].status != "not run" for r in results)


def header(results: list[CaseResult]) -> tuple:
    return HEADER + (EARLIER_HEADER if _with_earlier(results) else ())


def _earlier_ratio(result: CaseResult) -> float | None:
    """This engine's time over the earlier checkout's (above 1: slower now)."""
    now, before = result.routes["engine"], result.routes["earlier"]
    if now.status == "ok" and before.status == "ok" and before.seconds > 0:
        return now.seconds / before.seconds
    return None


def table_rows(results: list[CaseResult]) -> list[tuple]:
    """One row of strings per case, in ``header(results)`` order."""
    rows = []
    extra = _with_earlier(results)
    for r in results:
        simp, nosimp, eng = (r.routes[k] for k in ("simplified", "nosimp", "engine"))
        agree = "-" if r.agreement is None else f"{r.agreement:.0e}"
        if r.agreement is not None and r.agreement > AGREEMENT_TOLERANCE:
            agree += " !"
        rows.append((r.name, str(r.n), str(r.parameters), _time_cell(simp), _time_cell(nosimp),
                     _time_cell(eng), _fmt(_ratio(r, "nosimp"), ".1f"),
                     _fmt(_ratio(r, "simplified"), ".1f"), _fmt(simp.ops, "d"),
                     _fmt(nosimp.ops, "d"), _fmt(eng.ops, "d"), _fmt(eng.memory_mib, ".0f"),
                     agree) + ((_time_cell(r.routes["earlier"]),
                                _fmt(_earlier_ratio(r), ".2f")) if extra else ()))
    return rows


def format_text(rows: list[tuple], head: tuple = HEADER) -> str:
    widths = [max(len(str(row[i])) for row in [head, *rows]) for i in range(len(head))]
    lines = ["  ".join(str(c).rjust(w) for c, w in zip(row, widths)) for row in [head, *rows]]
    lines.insert(1, "  ".join("-" * w for w in widths))
    return "\n".join(lines)


def format_markdown(rows: list[tuple], head: tuple = HEADER) -> str:
    lines = ["| " + " | ".join(head) + " |", "|" + "---|" * len(head)]
    lines += ["| " + " | ".join(row) + " |" for row in rows]
    return "\n".join(lines)


def geometric_mean(values: list[float]) -> float | None:
    return math.exp(sum(map(math.log, values)) / len(values)) if values else None


def _engine_time(results: list[CaseResult], name: str) -> float | None:
    for r in results:
        if r.name == name and r.routes["engine"].status == "ok":
            return r.routes["engine"].seconds
    return None


def _verdict(ok: bool | None, detail: str) -> tuple[str, str]:
    return ("n/a" if ok is None else "PASS" if ok else "FAIL"), detail


def targets(results: list[CaseResult], import_time: float | None) -> list[tuple[str, str, str]]:
    """(target, PASS/FAIL/n/a, detail) for each target of the performance issue."""
    out = []
    ratios = [x for x in (_ratio(r, "nosimp") for r in results) if x is not None]
    gm = geometric_mean(ratios)
    out.append(("geometric mean no-simplify/engine >= 20",
                *_verdict(None if gm is None else gm >= 20,
                          f"{_fmt(gm, '.1f')} over {len(ratios)} cases")))
    hard = [r for r in results if any(r.routes[k].status == "timeout" or (
        r.routes[k].status == "skipped" and "timeout" in r.routes[k].message)
        for k in ("nosimp", "simplified"))]
    slow = [r.name for r in hard if (_engine_time(results, r.name) or math.inf) >= 5]
    out.append(("cases a baseline cannot finish: engine < 5 s",
                *_verdict(None if not hard else not slow,
                          f"{len(hard)} such cases" + (f"; over 5 s or failed: {', '.join(slow)}"
                                                       if slow else ""))))
    for name, limit in (("ring_10", 2.0), ("rational_30", 5.0)):
        ran = any(r.name == name for r in results)
        t = _engine_time(results, name)
        out.append((f"{name} engine < {limit:g} s",
                    *_verdict(None if not ran else (t is not None and t < limit),
                              "not run" if not ran else f"{_fmt(t, '.3f')} s")))
    out.extend(_foodchain_targets(results))
    out.append(("import criticality < 1 s",
                *_verdict(import_time is not None and import_time < 1,
                          "import failed" if import_time is None else f"{import_time:.3f} s")))
    out.append(_memory_target(results))
    out.append(_size_target(results))
    if _with_earlier(results):
        out.append(_earlier_target(results))
    return out


#: allowance for the noise of one-process timings: relative, and absolute for
#: the cases that take a few tens of milliseconds
EARLIER_SLACK = (0.10, 0.010)


def _earlier_target(results: list[CaseResult]) -> tuple[str, str, str]:
    """No case slower than in the earlier checkout (issue 12), beyond the
    timing noise; cases the earlier checkout could not finish count as
    faster now."""
    rel, absolute = EARLIER_SLACK
    slower, compared = [], 0
    for r in results:
        now, before = r.routes["engine"], r.routes["earlier"]
        if before.status != "ok":
            continue
        compared += 1
        if now.status != "ok" or now.seconds > before.seconds * (1 + rel) + absolute:
            slower.append(f"{r.name} ({_fmt(_earlier_ratio(r), '.2f')}x)")
    ratios = [x for x in (_earlier_ratio(r) for r in results) if x is not None]
    detail = (f"{compared} cases compared, geometric mean eng/earlier "
              f"{_fmt(geometric_mean(ratios), '.2f')}"
              + (f"; slower: {', '.join(slower)}" if slower else ""))
    return (f"no case slower than the earlier checkout (beyond {rel:.0%} + {absolute * 1000:g} ms)",
            *_verdict(None if not compared else not slower, detail))


def _foodchain_targets(results: list[CaseResult]) -> list[tuple[str, str, str]]:
    """The food chain in K (issue 12): four parameters under 2 s, eight under
    30 s and 500 MiB."""
    out = []
    for name, limit, mib in (("foodchain_K4", 2.0, None), ("foodchain_K8", 30.0, 500.0)):
        run = next((r for r in results if r.name == name), None)
        eng = run.routes["engine"] if run is not None else None
        label = f"{name} engine < {limit:g} s" + (f" and < {mib:g} MiB" if mib else "")
        if eng is None or eng.status == "not run":
            out.append((label, "n/a", "not run"))
            continue
        ok = eng.status == "ok" and eng.seconds < limit and (mib is None or eng.memory_mib < mib)
        detail = (f"{_fmt(eng.seconds, '.3f')} s, {_fmt(eng.memory_mib, '.0f')} MiB"
                  if eng.status == "ok" else eng.status)
        out.append((label, *_verdict(ok, detail)))
    return out


def _memory_target(results: list[CaseResult]) -> tuple[str, str, str]:
    largest = max(results, key=lambda r: r.n)
    eng = largest.routes["engine"]
    ok = None if eng.status == "not run" else (eng.status == "ok" and eng.memory_mib < 1024)
    return ("peak memory of the largest case < 1 GiB",
            *_verdict(ok, f"{largest.name}: {_fmt(eng.memory_mib, '.0f')} MiB"))


def _size_target(results: list[CaseResult]) -> tuple[str, str, str]:
    compared = [r for r in results if r.routes["simplified"].status == "ok"]
    larger = [r.name for r in compared
              if r.routes["engine"].ops is None or r.routes["engine"].ops > r.routes["simplified"].ops]
    return ("engine output never larger than the simplified baseline's",
            *_verdict(None if not compared else not larger,
                      f"{len(compared)} cases compared"
                      + (f"; larger or missing: {', '.join(larger)}" if larger else "")))


def report(results: list[CaseResult], import_time: float | None, timeout: float,
           load: tuple = ()) -> str:
    rows = table_rows(results)
    lines = [format_text(rows, header(results)), ""]
    if load:
        lines.append("load average (1 min) at start / end: "
                     + " / ".join(f"{x:.2f}" for x in load) + f" on {os.cpu_count()} cores")
    for key, label in (("nosimp", "no-simplify"), ("simplified", "simplified")):
        ratios = [x for x in (_ratio(r, key) for r in results) if x is not None]
        lines.append(f"geometric mean {label}/engine: {_fmt(geometric_mean(ratios), '.1f')} "
                     f"over {len(ratios)} cases")
    lines += ["", "targets:"]
    if timeout != TARGET_TIMEOUT:
        lines.append(f"  (note: run with a {timeout:g} s limit; the targets assume "
                     f"{TARGET_TIMEOUT:g} s)")
    lines += [f"  {status:4}  {name}: {detail}" for name, status, detail in
              targets(results, import_time)]
    notes = [f"  {r.name}: {note}" for r in results for note in r.notes]
    if notes:
        lines += ["", "notes:", *notes]
    return "\n".join(lines)


# --- case checks -------------------------------------------------------------------------------


def check_cases(names: list[str], points: int = 3) -> int:
    """Numerically check every case; print one line per point; return the number of failures."""
    failures = 0
    for name in names:
        case = get_case(name)
        for point in case.sample_points(points):
            check = check_point(case, point)
            l1, residual = numeric_l1(case, point)
            failures += not check.ok
            print(f"{name:12} {'ok  ' if check.ok else 'FAIL'} omega={check.omega:.6g} "
                  f"next Re={check.next_real_part:.3g} l1={mpmath.nstr(l1, 12)} "
                  f"eigvec residual={mpmath.nstr(residual, 2)} {'' if check.ok else check.message}")
    return failures + _planar_check(names) + _ring_check(names)


def _planar_check(names: list[str]) -> int:
    """Numeric reference against the classical planar formula (published source)."""
    if "planar" not in names:
        return 0
    case = get_case("planar")
    worst = 0.0
    for point in case.sample_points(3):
        with mpmath.workdps(30):
            classical = mp_eval(classical_planar_l1(case, point), {})
            worst = max(worst, float(relative_difference(numeric_l1(case, point)[0], classical)))
    ok = worst < AGREEMENT_TOLERANCE
    print(f"planar: numeric reference vs 2a/omega of the classical planar formula "
          f"(Guckenheimer and Holmes 1983, section 3.4; omega = 1 here): "
          f"max rel. difference {worst:.1e} {'ok' if ok else 'FAIL'}")
    return 0 if ok else 1


def _ring_check(names: list[str]) -> int:
    """cells * l1 must not depend on the ring size (synchronous critical mode)."""
    rings = [n for n in names if n.startswith("ring_")]
    if len(rings) < 2:
        return 0
    values = []
    for name in rings:
        case = get_case(name)
        point = {p: {"a": Rational(3, 2), "k": Rational(1, 2)}[p.name]
                 for p in case.free_parameters}
        values.append(int(name.split("_")[1]) * numeric_l1(case, point)[0])
    with mpmath.workdps(30):
        worst = max(float(relative_difference(v, values[0])) for v in values)
    ok = worst < AGREEMENT_TOLERANCE
    print(f"rings: cells * l1 at a = 3/2, k = 1/2 is {mpmath.nstr(values[0], 15)} for "
          f"{', '.join(rings)}; max rel. difference {worst:.1e} {'ok' if ok else 'FAIL'}")
    return 0 if ok else 1


# --- command line ------------------------------------------------------------------------------


def _expand(names: list[str]) -> list[str]:
    out = []
    for name in names:
        group = [c for c in CASE_NAMES if c.startswith(name + "_")]
        if name in CASE_NAMES:
            out.append(name)
        elif group:
            out += group
        else:
            raise SystemExit(f"unknown case {name!r}; known: {', '.join(CASE_NAMES)} "
                             f"(or a group: ring, rational)")
    return out


def parse_args(argv=None) -> argparse.Namespace:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--cases", nargs="+", help="case names or groups (ring, rational)")
    parser.add_argument("--repeat", type=int, help="engine runs per case (default 3)")
    parser.add_argument("--timeout", type=float, help="seconds per route and case (default 120)")
    parser.add_argument("--points", type=int, default=2, help="sample points for agreement")
    parser.add_argument("--routes", default=",".join(ROUTES),
                        help="comma-separated subset of engine,nosimp,simplified")
    parser.add_argument("--quick", action="store_true",
                        help="smoke run: a few small cases, 20 s limit, 1 engine run")
    parser.add_argument("--markdown", type=Path, help="also write the table as Markdown here")
    parser.add_argument("--json", type=Path, help="also write the raw measurements as JSON here")
    parser.add_argument("--check-cases", action="store_true",
                        help="only check the cases numerically (no timing)")
    parser.add_argument("--earlier", type=Path, metavar="CHECKOUT",
                        help="also time the engine of another checkout of this project "
                             "(e.g. a git worktree of an older commit), alternating run by run")
    args = parser.parse_args(argv)
    args.cases = _expand(args.cases) if args.cases else list(
        QUICK_CASES if args.quick else CASE_NAMES)
    args.repeat = args.repeat or (1 if args.quick else 3)
    args.timeout = args.timeout or (20.0 if args.quick else TARGET_TIMEOUT)
    args.routes = tuple(r.strip() for r in args.routes.split(","))
    unknown = set(args.routes) - set(ROUTES)
    if unknown:
        parser.error(f"unknown route(s) {', '.join(sorted(unknown))}; choose from {ROUTES}")
    if args.earlier is not None:
        source = args.earlier / "src" if (args.earlier / "src" / "criticality").is_dir() \
            else args.earlier
        if not (source / "criticality" / "__init__.py").is_file():
            parser.error(f"--earlier {args.earlier}: no criticality package under it "
                         f"(expected {args.earlier}/src/criticality)")
        args.earlier = source.resolve()
    return args


def _json_ready(results: list[CaseResult], import_time, timeout) -> dict:
    def clean(value):
        if isinstance(value, (mpmath.mpf, mpmath.mpc)):
            return mpmath.nstr(value, 30)
        if isinstance(value, (list, tuple)):
            return [clean(v) for v in value]
        if isinstance(value, dict):
            return {k: clean(v) for k, v in value.items()}
        return value

    return {"timeout": timeout, "import_seconds": import_time,
            "cases": [clean(asdict(r)) for r in results],
            "targets": targets(results, import_time)}


def main(argv=None) -> int:
    args = parse_args(argv)
    if args.check_cases:
        return 1 if check_cases(args.cases) else 0
    load_start = os.getloadavg()[0]
    results = [run_case(name, args.routes, args.repeat, args.timeout, args.points,
                        args.earlier) for name in args.cases]
    import_time = import_seconds()
    print(report(results, import_time, args.timeout, (load_start, os.getloadavg()[0])))
    if args.markdown:
        args.markdown.write_text(format_markdown(table_rows(results), header(results)) + "\n")
    if args.json:
        args.json.write_text(json.dumps(_json_ready(results, import_time, args.timeout),
                                        indent=1))
    return 0


if __name__ == "__main__":
    sys.exit(main())
