"""The Examples sections of the package's docstrings run and give what they
show (doctest on the installed package, whatever the install mode)."""

import doctest
import importlib
import pkgutil

import pytest

import criticality

MODULES = sorted(name for _, name, _ in pkgutil.walk_packages(criticality.__path__, "criticality."))


@pytest.mark.slow
@pytest.mark.parametrize("name", MODULES)
def test_docstring_examples(name):
    module = importlib.import_module(name)
    result = doctest.testmod(module, optionflags=doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE,
                             verbose=False)
    assert result.failed == 0, f"{result.failed} docstring example(s) failed in {name}"
