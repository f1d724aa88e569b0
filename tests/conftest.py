"""Shared test helpers."""

import builtins

import pytest

from criticality import hopf
from models import LORENZ, LORENZ_EQUILIBRIUM


@pytest.fixture
def hide_package(monkeypatch):
    """``hide_package("scipy")`` makes importing that package (and its
    submodules) fail, as on a machine without the optional extra."""
    real = builtins.__import__

    def hide(prefix):
        def fake(name, *args, **kwargs):
            if name.startswith(prefix):
                raise ImportError(f"no {prefix}", name=prefix)
            return real(name, *args, **kwargs)
        monkeypatch.setattr(builtins, "__import__", fake)

    return hide


@pytest.fixture(params=["flint", "sympy"])
def backend(request):
    """The exact arithmetic of the parameter field: python-flint and the
    pure-sympy stand-in run the same engine tests and must give the same
    results."""
    return request.param


@pytest.fixture(scope="session")
def lorenz():
    """The Hopf analysis of the Lorenz system in r at its positive equilibrium
    (a frozen result, computed once and shared)."""
    return hopf(LORENZ, "r", equilibrium=LORENZ_EQUILIBRIUM)
