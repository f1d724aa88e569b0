"""The ``criticality`` command: a shell over the library (parse, call, render).

No mathematics here; see :mod:`.main` for the subcommands.
"""

from .main import main

__all__ = ["main"]
