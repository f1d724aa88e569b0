"""A kiln held at its set point by a sampled integral controller (invented, scaled).

Run:  python examples/sampled_heater.py [--iterate]
The controller samples the error every h time units, so the closed loop is a
map (discrete time).  Raising the integral gain k makes the fixed point lose
stability through a pair of multipliers exp(+-i theta) on the unit circle
(a Neimark-Sacker point); the first Lyapunov coefficient of the map says
whether the hunting starts on a small stable invariant curve (supercritical)
or with a jump.  On the command line:

    criticality neimark-sacker examples/sampled_heater.toml --set h=1/2 --set a=1 --set q=1
"""

import sys
from pathlib import Path

from criticality import Model, neimark_sacker, validate_map

MODEL = Path(__file__).resolve().with_suffix(".toml")


def analyse(values=None):
    """The Neimark-Sacker result in the gain k (symbolic unless values are given)."""
    model = Model.from_file(MODEL)
    return neimark_sacker(model, "k", values=values)


def main():
    symbolic = analyse()
    print(f"critical gain: k = {symbolic.critical_values['k']}")
    print(f"l1 = {symbolic.lyapunov} ({symbolic.lyapunov_sign})")
    model = Model.from_file(MODEL)
    result = analyse(model.defaults())
    print(f"with the file's values: k = {result.critical_values['k']}, "
          f"theta = {result.angle} = {float(result.angle):.6f} rad")
    print(f"verdict: {result.verdict}")
    if "--iterate" in sys.argv:
        print(validate_map(result, model, model.defaults()))


if __name__ == "__main__":
    main()
