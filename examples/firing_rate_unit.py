"""A firing-rate unit with slow adaptation (invented caricature).

Run:  python examples/firing_rate_unit.py
The tanh response is not polynomial; the quiet state u = w = 0 is the
equilibrium, so everything stays in closed form.
"""

from pathlib import Path

from criticality import Model, hopf

MODEL = Path(__file__).resolve().with_suffix(".toml")


def analyse():
    """The Hopf result of the model file (parameter a, equilibrium u = w = 0)."""
    return hopf(Model.from_file(MODEL))


def main():
    result = analyse()
    print(f"critical recurrent gain a_c = {result.critical_value}")
    print(f"omega^2 = {result.omega_squared}")
    print(f"l1 = {result.l1}")
    print(f"verdict: {result.verdict}")
    numbers = result.evaluate({}, digits=12)
    print(f"at the file's values: a_c = {numbers.critical_value}, period = {numbers.period}")


if __name__ == "__main__":
    main()
