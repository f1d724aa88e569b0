"""The Hopf analysis: :func:`hopf`, :func:`hopf_all` and :class:`HopfResult`.

Pipeline place: a prepared problem (``local``) -> engine -> assembled result.
"""

from .analysis import hopf, hopf_all
from .results import HopfResult

__all__ = ["hopf", "hopf_all", "HopfResult"]
