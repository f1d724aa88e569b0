"""Benchmark of the numeric side: numeric mode, Hopf curves, sweeps, cluster.

Run by hand from the repository root (not part of the test suite)::

    python benchmarks/numeric.py [--quick] [--no-cluster] [--skip CASE ...] [--markdown FILE]

``--skip`` leaves benchmark cases out of the first section (``--skip foodchain_K8``:
its exact analysis takes minutes); ``--markdown FILE`` also writes the printed
tables to FILE, ready to paste into docs/performance.md.

Prints, in one run, with every baseline measured in the same run:

1. numeric mode vs exact engine on every benchmark case (cases.py): the exact
   engine's time (symbolic analysis + evaluation at a sampled point) over the
   numeric mode's (from a guess 2 % away, compilation included), and the
   agreement of l1 against the digits the numeric mode states;
2. the targets: ring of 8 and of 16 tanh units, a 30-state Goodwin chain,
   each in a fresh process including compilation; a further point in float64;
3. numeric mode vs a hand-written float64 projection formula (sympy
   derivative tensors, lambdify, numpy eig and einsum) on the same point;
4. sweep vs hand-compiled numpy (``sympy.lambdify(..., cse=True)``) on the
   same l1 of about 2,900 operations over 10^6 points;
5. a Hopf curve of 200 points on a planar model;
6. serial vs a LocalCluster of two worker processes (sweep, batch analysis),
   with the results compared for identity.

Measure on a quiet machine: the load average is printed at the start and end.
"""

from __future__ import annotations

import argparse
import math
import os
import statistics
import subprocess
import sys
import time
from pathlib import Path

import mpmath
import numpy as np
import sympy

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from cases import CASE_NAMES, case_model, exact_hopf_point, get_case  # noqa: E402

from criticality import (InadmissiblePointError, Model, analyse_many, hopf,  # noqa: E402
                         hopf_all, hopf_curve, sweep)

TARGETS = []


def target(label: str, ok: bool, detail: str) -> None:
    TARGETS.append((label, ok, detail))


def tanh_ring_text(cells: int) -> str:
    """A ring of tanh units with one inhibitory link and a bias (invented)."""
    states = [f"x{i}" for i in range(cells)]
    lines = [f'states = {states!r}'.replace("'", '"'), 'bifurcation_parameter = "g"',
             "[parameters]", 'g = "positive"', 'b = { assume = "real", value = "1/10" }',
             "[equations]"]
    for i in range(cells):
        prev = states[i - 1]
        rhs = f"b - x0 - g*tanh({prev})" if i == 0 else f"-{states[i]} + g*tanh({prev})"
        lines.append(f'{states[i]} = "{rhs}"')
    return "\n".join(lines) + "\n"


def goodwin_text(stages: int, hill: int) -> str:
    states = [f"x{i}" for i in range(stages)]
    lines = [f'states = {states!r}'.replace("'", '"'), 'bifurcation_parameter = "a"',
             "[parameters]", 'a = "positive"', "[equations]",
             f'x0 = "a/(1 + x{stages - 1}^{hill}) - x0"']
    lines += [f'x{i} = "x{i - 1} - x{i}"' for i in range(1, stages)]
    return "\n".join(lines) + "\n"


def tanh_guess(cells: int) -> dict:
    g = 1 / math.cos(math.pi / cells)
    return {**{f"x{i}": 0.0 for i in range(cells)}, "g": 1.05 * g}


def goodwin_guess(stages: int, hill: int) -> dict:
    g = 1 / math.cos(math.pi / stages) ** stages
    s = g / (hill - g)
    z = s ** (1 / hill)
    return {**{f"x{i}": 1.05 * z for i in range(stages)}, "a": 1.1 * z * (1 + s)}


_FRESH = """
import sys, time, json
from criticality import Model, hopf
import numpy, mpmath, sympy
model = Model.from_text(sys.argv[1])
guess = json.loads(sys.argv[2])
t, c = time.perf_counter(), time.process_time()
r = hopf(model, guess=guess, digits=int(sys.argv[3]))
print(time.perf_counter() - t, time.process_time() - c, r.status)
"""


def fresh(text: str, guess: dict, digits: int) -> tuple:
    """(wall, CPU) seconds for one numeric analysis in a fresh process
    (compilation included)."""
    import json

    out = subprocess.run([sys.executable, "-c", _FRESH, text, json.dumps(guess), str(digits)],
                         capture_output=True, text=True, check=True)
    wall, cpu = out.stdout.split()[:2]
    return float(wall), float(cpu)


class Clock:
    """Wall and CPU time of a block (CPU time is what the targets are judged on
    when the machine is shared: it does not count time spent waiting for a core)."""

    def __enter__(self):
        self.w, self.c = time.perf_counter(), time.process_time()
        return self

    def __exit__(self, *exc):
        self.wall = time.perf_counter() - self.w
        self.cpu = time.process_time() - self.c


def section_targets(quick: bool) -> None:
    print("\n## targets (fresh process each, compilation included; default digits = 30)\n")
    print("| model | n | digits | wall [s] | CPU [s] | limit [s] |\n|---|---|---|---|---|---|")
    runs = [("ring of 8 tanh units", tanh_ring_text(8), tanh_guess(8), 8, 0.5),
            ("ring of 16 tanh units", tanh_ring_text(16), tanh_guess(16), 16, 2.0),
            ("Goodwin chain, 30 states", goodwin_text(30, 2), goodwin_guess(30, 2), 30, 5.0)]
    for label, text, guess, n, limit in runs:
        for digits in (30, 10):
            runs_ = sorted(fresh(text, guess, digits) for _ in range(1 if quick else 3))
            wall, cpu = runs_[len(runs_) // 2]
            print(f"| {label} | {n} | {digits} | {wall:.3f} | {cpu:.3f} | {limit} |")
            target(f"{label} ({digits} digits) < {limit} s (CPU)", cpu < limit,
                   f"{cpu:.3f} s CPU, {wall:.3f} s wall")
    model = Model.from_text(tanh_ring_text(8))
    guess = tanh_guess(8)
    hopf(model, "g", guess=guess, digits=10)
    walls, cpus = [], []
    for k in range(30):
        with Clock() as clock:
            hopf(model, "g", guess=guess, values={"b": (k + 1) / 97}, digits=10)
        walls.append(clock.wall)
        cpus.append(clock.cpu)
    ms, cms = 1000 * statistics.median(walls), 1000 * statistics.median(cpus)
    print(f"\nfurther point, ring of 8 (n = 8), float64: median {ms:.2f} ms wall, {cms:.2f} ms "
          "CPU over 30 points")
    target("further point (n <= 10, float64) < 5 ms (CPU)", cms < 5,
           f"{cms:.2f} ms CPU, {ms:.2f} ms wall")


def section_cases(quick: bool, skip: tuple = ()) -> None:
    print("\n## numeric mode vs exact engine (benchmark cases; CPU seconds)\n")
    print("| case | n | exact [s] | numeric 30 d [s] | exact/numeric | numeric 10 d [s] | "
          "exact/numeric | stated digits | l1 agreement (digits) |")
    print("|---|---|---|---|---|---|---|---|---|")
    names = CASE_NAMES if not quick else ("planar", "lorenz", "ring_3", "rational_10")
    names = tuple(n for n in names if n not in skip)
    ratios, agree_ok, never_slower = [], True, True
    for name in names:
        case = get_case(name)
        point = case.sample_points(1, seed=11)[0] if case.free_parameters else {}
        values = {p.name: v for p, v in point.items()}
        mu = case.bifurcation
        with Clock() as clock:
            e = exact_hopf_point(case, values, 30)
        t_exact = clock.cpu
        with mpmath.workdps(30):
            mu_c = float(e.critical_value)
            x0 = {s.name: float(sympy.N(v.xreplace(point).xreplace({mu: e.critical_value}), 20))
                  for s, v in case.equilibrium.items()}
        guess = {**x0, mu.name: mu_c + 0.02 * max(1.0, abs(mu_c))}
        row = []
        for digits in (30, 10):
            fresh_model = case_model(case)  # a new model: compilation is timed
            with Clock() as clock:
                num = hopf(fresh_model, mu.name, guess=guess, values=values or None,
                           digits=digits)
            row.append((clock.cpu, num))
        (t30, n30), (t10, _) = row
        claimed = int(n30.status.split("(")[1].split()[0])
        with mpmath.workdps(40):
            diff = abs(mpmath.mpf(str(n30.l1)) - e.l1) / max(1, abs(e.l1))
            got = 40 if diff == 0 else int(-mpmath.log10(diff))
        agree_ok &= got >= claimed - 1
        never_slower &= t30 <= t_exact and t10 <= t_exact
        ratios.append(t_exact / t10)
        print(f"| {name} | {case.n} | {t_exact:.3f} | {t30:.3f} | {t_exact / t30:.1f} | "
              f"{t10:.3f} | {t_exact / t10:.1f} | {claimed} | {got} |")
    gm = math.exp(statistics.mean(math.log(r) for r in ratios))
    print(f"\ngeometric mean exact/numeric (10 digits): {gm:.1f} over {len(ratios)} cases")
    target("numeric mode never slower than the exact engine (10 and 30 digits)", never_slower,
           f"geometric mean speed-up {gm:.1f}")
    target("numeric mode agrees with the exact engine to its stated digits", agree_ok,
           f"{len(ratios)} cases")


def _hand_projection(equations, states, mu, others):
    """What a careful user writes by hand: dense derivative tensors by sympy,
    lambdify, eigenvectors by numpy, the projection formula by einsum."""
    X = sympy.Matrix(equations)
    J = X.jacobian(states)
    H = sympy.derive_by_array(J, states)          # H[k, i, j] = d J_ij / d x_k
    T = sympy.derive_by_array(H, states)
    args = list(states) + [mu] + list(others)
    fJ = sympy.lambdify(args, J, "numpy", cse=True)
    fH = sympy.lambdify(args, H, "numpy", cse=True)
    fT = sympy.lambdify(args, T, "numpy", cse=True)

    def c1(point):
        A = np.array(fJ(*point), dtype=float)
        B = np.array(fH(*point), dtype=float)    # B[k, i, j]
        C = np.array(fT(*point), dtype=float)    # C[l, k, i, j]
        lam, V = np.linalg.eig(A)
        k = int(np.argmin(np.abs(lam.real) - 1e3 * (lam.imag > 0)))
        om, q = lam[k].imag, V[:, k]
        lamT, W = np.linalg.eig(A.T)
        p = W[:, int(np.argmin(np.abs(lamT + 1j * om)))]
        q = q / np.linalg.norm(q)
        p = p / np.conj(np.vdot(p, q))          # <p, q> = conj(p)^T q = 1

        def b(u, v):
            return np.einsum("kij,j,k->i", B, u, v)

        def cc(u, v, w):
            return np.einsum("lkij,j,k,l->i", C, u, v, w)

        h11 = np.linalg.solve(A, b(q, q.conj()))
        h20 = np.linalg.solve(2j * om * np.eye(len(q)) - A, b(q, q))
        val = 0.5 * np.vdot(p, cc(q, q, q.conj())) - np.vdot(p, b(q, h11)) \
            + 0.5 * np.vdot(p, b(q.conj(), h20))
        return val.real / om

    return c1


def section_hand(quick: bool) -> None:
    print("\n## numeric mode vs a hand-written float64 projection formula\n")
    from criticality.hopf_analysis.numeric_mode import guess_vector, numeric_setup, run_float

    model = Model.from_text(tanh_ring_text(8))
    guess = tanh_guess(8)
    r = hopf(model, "g", guess=guess, digits=10)
    clock = Clock().__enter__()
    states = model.state_symbols
    g, b = model.symbols["g"], model.symbols["b"]
    eqs = [e.xreplace({b: sympy.Rational(1, 10)}) for e in model.equations]
    hand = _hand_projection(eqs, states, g, [])
    clock.__exit__()
    t_hand_compile = clock.cpu
    point = [float(r.equilibrium[s]) for s in model.states] + [float(r.critical_value)]
    l1_hand = hand(point)
    reps = 20 if quick else 100
    with Clock() as clock:
        for _ in range(reps):
            hand(point)
    t_hand = clock.cpu / reps
    setup = numeric_setup(model, "g")
    system = setup.system()
    start = guess_vector(model, "g", guess)
    pt = system.solve(start[:-1], start[-1])
    with Clock() as clock:
        for _ in range(reps):
            d = run_float(setup, pt, 3)
    t_num = clock.cpu / reps
    l1 = float(mpmath.re(d["c"][0]) / d["omega"])
    print(f"ring of 8 tanh units: hand-written l1 {l1_hand:.12g} (compile {t_hand_compile:.2f} s,"
          f" {1000 * t_hand:.2f} ms per point); numeric mode l1 {l1:.12g} "
          f"({1000 * t_num:.2f} ms per point at the located point, second route and error "
          f"estimate included); ratio numeric/hand {t_num / t_hand:.2f}")
    target("numeric mode agrees with the hand-written formula", abs(l1 - l1_hand) < 1e-9 *
           abs(l1_hand), f"{abs(l1 - l1_hand):.1e}")


def _foodchain():
    case = get_case("foodchain")
    model = case_model(case)
    r = hopf(model, case.bifurcation.name,
             equilibrium={s.name: v for s, v in case.equilibrium.items()})
    return model, r


def _has_hopf_point(result, values) -> bool:
    try:
        result.evaluate(values, digits=15)
    except InadmissiblePointError:
        return False
    return True


def section_sweep(quick: bool) -> None:
    print("\n## sweep vs hand-compiled numpy (foodchain l1)\n")
    model, r = _foodchain()
    d = sympy.Rational(3, 4)
    expr = r.l1.xreplace({model.symbols["d"]: d})
    side = 300 if quick else 1000
    K, m = np.meshgrid(np.linspace(3.4, 4.1, side), np.linspace(0.86, 1.05, side))
    args = [model.symbols["K"], model.symbols["m"]]
    with Clock() as clock:
        fn = sympy.lambdify(args, expr, modules="numpy", cse=True)
        with np.errstate(all="ignore"):
            ref = fn(K, m)
    t_hand = clock.cpu
    sweep(r, "l1", {"K": K[:2, :2], "m": m[:2, :2]}, values={"d": d}, progress=False)
    with Clock() as clock:
        s = sweep(r, "l1", {"K": K, "m": m}, values={"d": d}, progress=False)
    t_sweep = clock.cpu
    ok = np.allclose(s.values, ref, rtol=1e-12, equal_nan=True)
    ops = int(sympy.count_ops(expr))
    print(f"l1 of {ops} operations on {side * side} points: sweep {t_sweep:.3f} s CPU (compile, "
          f"admissibility and evaluation), hand-compiled {t_hand:.3f} s CPU; ratio "
          f"{t_sweep / t_hand:.2f}; values equal: {ok}")
    target("sweep within 1.5x of hand-compiled numpy", t_sweep <= 1.5 * t_hand,
           f"{t_sweep / t_hand:.2f}")
    print(f"sampled error against 30 digits: {s.sampled_error:.1e} at {s.sampled_points} points")
    if quick:
        return
    # a larger closed form: the food chain with the carrying capacity K as the
    # bifurcation parameter, whose critical value holds a square root
    fc = Model(["R", "C", "P"], {"R": "R*(1 - R/K) - R*C", "C": "C*(R - mm) - 2*C*P/(1 + C)",
                                 "P": "eps*P*(2*C/(1 + C) - d)"},
               {"K": "positive", "mm": "positive", "d": "positive", "eps": "positive"})
    # of the two branches (the two signs of the root), the one with K_c > 0 on
    # this grid: the default branch's critical value is negative there
    branches = hopf_all(fc, "K", equilibrium={"R": "K*(1 - d/(2 - d))", "C": "d/(2 - d)",
                                              "P": "(K*(1 - d/(2 - d)) - mm)*(1 + d/(2 - d))/2"})
    rk = next(r for r in branches if _has_hopf_point(r, {"mm": "7/40", "eps": "7/4",
                                                         "d": "3/4"}))
    M, E = np.meshgrid(np.linspace(0.05, 0.3, side), np.linspace(0.5, 3, side))
    D = 0.5 + 0.4 * (M - 0.05) / 0.25 * (E - 0.5) / 2.5
    cases = [("d = 3/4 fixed", {"mm": M, "eps": E}, {"d": sympy.Rational(3, 4)}),
             ("d on the grid", {"mm": M, "eps": E, "d": D}, {})]
    import warnings
    measured = []
    for label, grid, fixed in cases:
        expr = rk.l1.xreplace({fc.symbols[k]: v for k, v in fixed.items()})
        args = [fc.symbols[k] for k in grid]
        with Clock() as clock:
            fn = sympy.lambdify(args, expr, modules="numpy", cse=True)
            with np.errstate(all="ignore"):
                ref = fn(*grid.values())
        t_hand = clock.cpu
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            with Clock() as clock:
                sk = sweep(rk, "l1", grid, values=fixed or None, progress=False)
        ops = int(sympy.count_ops(expr))
        measured.append((ops, clock.cpu))
        lost = " (float64 cancels in this closed form)" if sk.sampled_error > 1e-6 else ""
        print(f"food chain in K, {label}: l1 of {ops} operations on {side * side} points: "
              f"sweep {clock.cpu:.3f} s CPU, hand-compiled {t_hand:.3f} s CPU, ratio "
              f"{clock.cpu / t_hand:.2f}; sampled error against 30 digits "
              f"{sk.sampled_error:.1e}{lost}")
    (o1, t1), (o2, t2) = measured
    at = t1 + (t2 - t1) * (2700 - o1) / (o2 - o1)
    print(f"interpolated at 2,700 operations: {at:.2f} s CPU for 10^6 points")
    target("sweep of 10^6 points of a 2,700-operation l1 < 2 s (interpolated between "
           f"{o1} and {o2} operations)", at < 2, f"{at:.2f} s")


def section_curve() -> None:
    print("\n## Hopf curve, 200 points on a planar model (FitzHugh-Nagumo)\n")
    m = Model(["v", "w"], {"v": "v - v^3/3 - w + I", "w": "eps*(v + 6/10 - w/2)"},
              {"I": "real", "eps": "positive"})
    eps = np.linspace(0.05, 0.5, 200)
    v0 = -math.sqrt(1 - eps[0] / 2)
    guess = {"v": v0, "w": (v0 + 0.6) * 2, "I": (v0 + 0.6) * 2 - v0 + v0 ** 3 / 3 + 0.01}
    with Clock() as clock:
        c = hopf_curve(m, "I", {"eps": eps}, guess)
    secs = clock.cpu
    print(f"{len(c)} rows, statuses {sorted(set(c.status))}, {secs:.3f} s CPU, "
          f"{clock.wall:.3f} s wall")
    target("Hopf curve, 200 points, planar < 5 s (CPU)", secs < 5, f"{secs:.3f} s")


def section_cluster(quick: bool) -> None:
    print("\n## serial vs LocalCluster (2 worker processes)\n")
    try:
        from distributed import Client, LocalCluster
    except ImportError:
        print("distributed is not installed: skipped")
        return
    model, r = _foodchain()
    side = 300 if quick else 1000
    K, m = np.meshgrid(np.linspace(3.4, 4.1, side), np.linspace(0.86, 1.05, side))
    examples = sorted((HERE.parent / "examples").glob("*.toml"))
    paths = [str(p) for p in examples] * (1 if quick else 2)
    with LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                      dashboard_address=None) as lc, Client(lc) as client:
        sweep(r, "l1", {"K": K[:4, :4], "m": m[:4, :4]}, values={"d": "3/4"}, progress=False,
              scheduler=client)
        t = time.perf_counter()
        a = sweep(r, "l1", {"K": K, "m": m}, values={"d": "3/4"}, progress=False)
        t_serial = time.perf_counter() - t
        t = time.perf_counter()
        b = sweep(r, "l1", {"K": K, "m": m}, values={"d": "3/4"}, progress=False,
                  scheduler=client)
        t_cluster = time.perf_counter() - t
        same = np.array_equal(a.values, b.values, equal_nan=True)
        print(f"sweep of {side * side} points: serial {t_serial:.3f} s, cluster "
              f"{t_cluster:.3f} s, serial/cluster {t_serial / t_cluster:.2f}; identical: {same}")
        t = time.perf_counter()
        s1 = analyse_many(paths)
        t_serial = time.perf_counter() - t
        t = time.perf_counter()
        s2 = analyse_many(paths, scheduler=client)
        t_cluster = time.perf_counter() - t
        print(f"batch of {len(paths)} model files: serial {t_serial:.3f} s, cluster "
              f"{t_cluster:.3f} s, serial/cluster {t_serial / t_cluster:.2f}; identical: "
              f"{s1 == s2}")
        target("cluster results identical to serial", same and s1 == s2, "sweep and batch")


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="fewer cases and smaller grids")
    parser.add_argument("--no-cluster", action="store_true", help="skip the LocalCluster part")
    parser.add_argument("--skip", nargs="+", default=[], metavar="CASE",
                        help="benchmark cases to leave out of the numeric-vs-exact table")
    parser.add_argument("--markdown", metavar="FILE", help="also write the output to FILE")
    args = parser.parse_args(argv)
    unknown = sorted(set(args.skip) - set(CASE_NAMES))
    if unknown:
        parser.error(f"unknown case(s) {', '.join(unknown)}; known: {', '.join(CASE_NAMES)}")
    if args.markdown:
        terminal = sys.stdout
        with open(args.markdown, "w", encoding="utf-8") as out:
            sys.stdout = _Tee(terminal, out)
            try:
                return _run(args)
            finally:
                sys.stdout = terminal
    return _run(args)


class _Tee:
    """Writes to several streams (the terminal and the --markdown file)."""

    def __init__(self, *streams):
        self.streams = streams

    def write(self, text: str) -> int:
        for stream in self.streams:
            stream.write(text)
        return len(text)

    def flush(self) -> None:
        for stream in self.streams:
            stream.flush()


def _run(args) -> int:
    print(f"load average (1 min) at start: {os.getloadavg()[0]:.2f} on {os.cpu_count()} cores")
    section_targets(args.quick)
    section_cases(args.quick, tuple(args.skip))
    section_hand(args.quick)
    section_sweep(args.quick)
    section_curve()
    if not args.no_cluster:
        section_cluster(args.quick)
    print(f"\nload average (1 min) at end: {os.getloadavg()[0]:.2f}")
    print("\ntargets:")
    for label, ok, detail in TARGETS:
        print(f"  {'PASS' if ok else 'FAIL'}  {label}: {detail}")
    return 0 if all(ok for _, ok, _ in TARGETS) else 1


if __name__ == "__main__":
    sys.exit(main())
