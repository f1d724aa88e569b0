"""Diatoms and copepods: does the bloom cycle start gently? (invented scenario)

Run:  python examples/plankton_grazer.py
The model file names the bifurcation parameter (the sinking rate v) and the
coexistence steady state, so the analysis needs no options.
"""

from pathlib import Path

from criticality import Model, hopf

MODEL = Path(__file__).resolve().with_suffix(".toml")


def analyse():
    """The Hopf result of the model file."""
    return hopf(Model.from_file(MODEL))


def main():
    result = analyse()
    print(f"critical sinking rate v_c = {result.critical_value}")
    print(f"omega^2 = {result.omega_squared}")
    print(f"verdict: {result.verdict}")
    numbers = result.evaluate({}, digits=12)  # the file's parameter values
    print(f"at the file's values: v_c = {numbers.critical_value}, l1 = {numbers.l1} "
          f"({numbers.classification})")


if __name__ == "__main__":
    main()
