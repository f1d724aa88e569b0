"""A cold store whose compressor reacts to a lagging sensor (invented, scaled).

Run:  python examples/cold_store_lag.py [--simulate]
The sensor line delays the temperature the controller sees by tau.  The
analysis takes the lag as the bifurcation parameter: the critical lags
tau_j = (theta + 2 pi j)/omega, the direction in which the roots cross, and
whether the hunting of the set point starts gently (supercritical) or with a
jump.  On the command line:

    criticality analyse examples/cold_store_lag.toml --set g=2 --set a=1 --set c=1/2
    criticality delay-confirm examples/cold_store_lag.toml --set g=2 --set a=1 --set c=1/2
"""

import sys
from pathlib import Path

from criticality import Model, hopf

MODEL = Path(__file__).resolve().with_suffix(".toml")


def analyse():
    """The Hopf result in the lag tau, with the file's values of g, a and c."""
    model = Model.from_file(MODEL)
    return hopf(model, "tau", values=model.defaults())


def main():
    result = analyse()
    numbers = result.evaluate({}, digits=12)
    print(f"crossing frequency omega = {result.omega} = {numbers.omega}")
    print("first critical lags: " + ", ".join(
        f"{float(v.evalf(12)):.6f}" for v in result.critical_values(3)))
    print(f"crossing direction: {result.crossing_direction:+d} (roots move right as tau grows)")
    print(f"l1 = {numbers.l1}: {result.classification}")
    print(f"check: |chi(i omega)| = {float(numbers.residual):.1e}, "
          f"c1 (mpmath route) = {complex(numbers.numeric_c1):.6f}")
    for state, k in numbers.amplitude_coefficients.items():
        print(f"amplitude of {state} ~ sqrt({float(k):.4f} (tau - tau_0))")
    if "--simulate" in sys.argv:
        print(result.validate({}))


if __name__ == "__main__":
    main()
