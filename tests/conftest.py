"""Shared test helpers."""

import builtins

import pytest


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
