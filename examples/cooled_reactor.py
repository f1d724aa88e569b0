"""A cooled stirred reactor with Arrhenius kinetics (invented, scaled).

Run:  python examples/cooled_reactor.py
The steady state of an Arrhenius model has no closed form in the model's own
parameters, so the family is parametrised by the steady state itself: the
rate factor k and the feed temperature T0 are eliminated, the steady-state
conversion c_eq and temperature T_eq become the family parameters.  On the
command line:

    criticality analyse examples/cooled_reactor.toml --eliminate k,T0 \\
        --assume c_eq=positive --assume T_eq=positive
"""

from pathlib import Path

from criticality import Model, hopf

MODEL = Path(__file__).resolve().with_suffix(".toml")
OPTIONS = {"eliminate": ["k", "T0"], "assume": {"c_eq": "positive", "T_eq": "positive"}}
#: two steady states of the family (conversion, temperature), for the numbers
POINTS = ({"c_eq": "1/4", "T_eq": "1"}, {"c_eq": "1/2", "T_eq": "1"})


def analyse():
    """The Hopf result in the cooling capacity U, family parametrised by (c_eq, T_eq)."""
    return hopf(Model.from_file(MODEL), **OPTIONS)


def main():
    result = analyse()
    print(f"critical cooling U_c = {result.critical_value}")
    print(f"omega^2 = {result.omega_squared}")
    print(f"classification: {result.classification}")
    print(f"supercritical exactly where {result.supercritical_where}")
    for point in POINTS:
        numbers = result.evaluate(point, digits=12)
        print(f"at {point}: U_c = {numbers.critical_value}, l1 = {numbers.l1} "
              f"({numbers.classification})")


if __name__ == "__main__":
    main()
