"""The shared table of test models: each named once, with its source.

Tests import these instead of writing the same system again; a model is a
frozen value, so sharing one instance between tests is safe.  Where a test
needs a variant (other assumptions, another parametrisation), it builds it
beside the test and says why.
"""

from criticality import Model

#: Lorenz's convection model (E. N. Lorenz, Deterministic nonperiodic flow, J. Atmos.
#: Sci. 20, 1963); its Hopf point at the positive equilibrium is subcritical with
#: r_H = sigma (sigma + b + 3)/(sigma - b - 1) (Strogatz, Nonlinear Dynamics and Chaos,
#: 1994, Section 9.2).
LORENZ = Model(states=["x", "y", "z"],
               equations={"x": "sigma*(y - x)", "y": "r*x - y - x*z", "z": "x*y - b*z"},
               parameters={"sigma": "positive", "b": "positive", "r": "positive"})
#: the positive (C+) equilibrium of LORENZ, in r
LORENZ_EQUILIBRIUM = {"x": "sqrt(b*(r - 1))", "y": "sqrt(b*(r - 1))", "z": "r - 1"}
#: the classical parameter values sigma = 10, b = 8/3 (Lorenz 1963)
LORENZ_VALUES = {"sigma": 10, "b": "8/3"}

#: The Brusselator (Prigogine and Lefever, Symmetry breaking instabilities in dissipative
#: systems II, J. Chem. Phys. 48, 1968): Hopf at B = 1 + A^2 with omega = A (Strogatz,
#: Nonlinear Dynamics and Chaos, 1994, Exercise 8.3.1, from memory).
BRUSSELATOR = Model(states=["x", "y"],
                    equations={"x": "A - (B + 1)*x + x^2*y", "y": "B*x - x^2*y"},
                    parameters={"A": "positive", "B": "positive"})
BRUSSELATOR_EQUILIBRIUM = {"x": "A", "y": "B/A"}
#: the same model as a model file, for the command-line tests
BRUSSELATOR_TOML = ('name = "brusselator"\nstates = ["x", "y"]\nbifurcation_parameter = "B"\n'
                    '[parameters]\nA = { assume = "positive" }\nB = { assume = "positive" }\n'
                    '[equations]\nx = "A - (B + 1)*x + x^2*y"\ny = "B*x - x^2*y"\n')

#: A van der Pol type oscillator x' = y, y' = -x + mu y - x^2 y: supercritical at
#: mu = 0 with the cycle amplitude 2 sqrt(mu) in x (common practice, no source).
VAN_DER_POL = Model(states=["x", "y"], equations={"x": "y", "y": "-x + mu*y - x^2*y"},
                    parameters={"mu": "real"})
ORIGIN_2D = {"x": 0, "y": 0}

#: Wright's delay equation y' = -alpha y(t - 1) (1 + y) (E. M. Wright, A non-linear
#: difference-differential equation, J. reine angew. Math. 194, 1955): Hopf at
#: alpha = pi/2 with omega = pi/2.
WRIGHT = Model(["y"], {"y": "-alpha*y(t - 1)*(1 + y)"}, {"alpha": "positive"})

#: The logistic map x -> r x (1 - x) (R. May, Simple mathematical models with very
#: complicated dynamics, Nature 261, 1976): flip at r = 3 at the fixed point 1 - 1/r.
LOGISTIC_MAP = Model(["x"], {"x": "r*x*(1 - x)"}, {"r": "positive"}, kind="map")
#: The delayed logistic map (x, y) -> (r x (1 - y), x) (J. Maynard Smith, Mathematical
#: Ideas in Biology, 1968, from memory): Neimark-Sacker at r = 2.
DELAYED_LOGISTIC_MAP = Model(["x", "y"], {"x": "r*x*(1 - y)", "y": "x"}, kind="map")
#: The Henon map (M. Henon, A two-dimensional mapping with a strange attractor, Commun.
#: Math. Phys. 50, 1976).
HENON_MAP = Model(["x", "y"], {"x": "1 - a*x^2 + y", "y": "b*x"}, kind="map")

#: The truncated Bautin normal form in polar form r' = r (mu + k r^2 - r^4) written in
#: Cartesian coordinates (common practice, no source): l1 changes sign at k = 0.
BAUTIN_FORM = Model(["x", "y"],
                    {"x": "mu*x - y + k*x*(x^2 + y^2) - x*(x^2 + y^2)^2",
                     "y": "x + mu*y + k*y*(x^2 + y^2) - y*(x^2 + y^2)^2"},
                    {"mu": "real", "k": "real"})

#: The Bogdanov-Takens normal form x' = y, y' = b1 + b2 x + x^2 - x y (Kuznetsov,
#: Elements of Applied Bifurcation Theory, 3rd ed., 2004, Section 8.4, from memory).
BOGDANOV_TAKENS_FORM = Model(["x", "y"], {"x": "y", "y": "b1 + b2*x + x^2 - x*y"},
                             parameters={"b1": "real", "b2": "real"})

#: A truncated fold-Hopf normal form u' = u^2 + 2 (x^2 + y^2), w' = (3 i + (1 + i) u) w
#: with w = x + i y, at the point p1 = p2 = 0 (common practice, no source).
FOLD_HOPF_FORM = Model(["u", "x", "y"],
                       {"u": "u^2 + 2*(x^2 + y^2)", "x": "-3*y + u*x - u*y",
                        "y": "3*x + u*x + u*y"}, {"p1": "real", "p2": "real"})

#: A truncated Hopf-Hopf normal form with frequencies 5 and 2 (common practice, no source).
HOPF_HOPF_FORM = Model(["x1", "y1", "x2", "y2"],
                       {"x1": "m1*x1 - 5*y1 - (x1^2 + y1^2)*x1",
                        "y1": "5*x1 + m1*y1 - (x1^2 + y1^2)*y1",
                        "x2": "m2*x2 - 2*y2 - (x2^2 + y2^2 + x1^2)*x2",
                        "y2": "2*x2 + m2*y2 - (x2^2 + y2^2 + x1^2)*y2"})
