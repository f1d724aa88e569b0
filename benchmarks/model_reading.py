"""Benchmark: reading a model file is linear in its size.

Run by hand from the repository root (not part of the test suite)::

    python benchmarks/model_reading.py [--sizes 1000 2000 4000 8000 20000] [--repeat 3]

Builds TOML model files with N declared parameters (two states; each
equation uses 800 of them, the rest are declared and unused), reads each
with ``Model.from_text`` and prints, per size, the best time of ``--repeat``
runs, the file size, and the ratio of that time to the linear extrapolation
of the smallest size measured in the same run.  A ratio near 1 means linear
reading; a ratio growing with N means a quadratic step.  Target (issue 13):
the ratio at 20,000 parameters stays below 3.

Measured on the 2-core development machine (best of 1, load about 3):
before the fix (duplicate declarations found by a scan of the list read so
far) 8,000 parameters took 2.2 s and 20,000 took 12.5 s (ratio 4.5 against
1,000); after it 0.42 s and 0.80 s (ratio 0.23; the fixed cost of the two
equations dominates the small sizes).

Measure on a quiet machine: the load average is printed at the start and end.
"""

from __future__ import annotations

import argparse
import os
import time

from criticality import Model


def model_text(n: int, used: int = 800) -> str:
    """A valid model file with ``n`` parameters (invented; demo data)."""
    lines = ['states = ["x", "y"]', "[parameters]"]
    lines += [f'p{i} = "real"' for i in range(n)]
    half = n // 2

    def equation(lo: int, state: str) -> str:
        terms = [f"p{i}*{state}" for i in range(lo, min(lo + used, n))]
        return " + ".join(terms) or "0"

    lines += ["[equations]", f'x = "-y + {equation(0, "x")}"',
              f'y = "x + {equation(half, "y")}"']
    return "\n".join(lines) + "\n"


def best_time(text: str, repeat: int) -> float:
    best = float("inf")
    for _ in range(repeat):
        start = time.perf_counter()
        Model.from_text(text)
        best = min(best, time.perf_counter() - start)
    return best


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--sizes", type=int, nargs="+", default=[1000, 2000, 4000, 8000, 20000])
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args(argv)
    sizes = sorted(args.sizes)
    print(f"load average at start: {os.getloadavg()[0]:.2f}")
    print(f"{'parameters':>10} {'file KB':>8} {'seconds':>8} {'ratio to linear':>16}")
    Model.from_text(model_text(100))  # warm up: imports and sympy's caches
    base = None
    for n in sizes:
        text = model_text(n)
        seconds = best_time(text, args.repeat)
        if base is None:
            base = (n, seconds)
        ratio = seconds / (base[1] * n / base[0])
        print(f"{n:>10} {len(text) / 1024:>8.0f} {seconds:>8.2f} {ratio:>16.2f}")
    print(f"load average at end: {os.getloadavg()[0]:.2f}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
