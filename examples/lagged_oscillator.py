"""A spring-mass stage driven through a lagging actuator (invented).

Run:  python examples/lagged_oscillator.py
The verdict is a condition on the sign of the cubic stiffness k3:
hardening springs (k3 > 0) give a gentle onset, softening ones an abrupt one.
"""

from pathlib import Path

from criticality import Model, hopf

MODEL = Path(__file__).resolve().with_suffix(".toml")


def analyse():
    """The Hopf result in the feedback gain g (equilibrium at rest)."""
    return hopf(Model.from_file(MODEL))


def main():
    result = analyse()
    print(f"critical gain g_c = {result.critical_value}")
    print(f"l1 = {result.l1}")
    print(f"verdict: {result.verdict}")
    for k3 in ("1/4", "-1/4"):
        numbers = result.evaluate({"k3": k3}, digits=12)
        print(f"k3 = {k3}: l1 = {numbers.l1} ({numbers.classification})")


if __name__ == "__main__":
    main()
