"""Eigenvectors of the critical pair without eigenvalues of the full matrix.

Pipeline place: critical set -> **eigenbasis** -> center manifold, normal form.

With ``W = omega^2`` in the field and ``nu = i omega`` (``nu^2 = -W``):

* ``v`` spans (with ``A v``) the real kernel of ``A^2 + W I``, and
  ``q = A v + nu v`` satisfies ``A q = nu q``;
* ``w`` in the left kernel of ``A^2 + W I`` gives ``conj(p) = A^T w + nu w``,
  the left eigenvector for ``+nu`` (``A^T p = -i omega p``), scaled so that
  ``<p, q> = conj(p)^T q = 1``;
* the center plane has the real basis ``e1 = A v = Re q``,
  ``e2 = -v = -Im q / omega``, in which ``A`` acts as ``[[0, -1], [W, 0]]``;
  the complementary invariant subspace is the range of ``A^2 + W I``, i.e. the
  vectors annihilated by ``w`` and ``A^T w``;
* ``<q, q> = |A v|^2 + W |v|^2`` lies in the field: q is never normalised by a
  square root; quantities that depend on the normalisation are divided by
  ``<q, q>`` at the end.

So the other eigenvalues, which usually have no closed form, are never needed.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Sequence

from dataclasses import dataclass

from ..algebra.linalg import dot, kernel, matmul, matvec, transpose
from ..errors import DegenerateHopfError

if TYPE_CHECKING:
    from ..algebra.field import Element

__all__ = ["Eigenbasis", "critical_eigenbasis"]


@dataclass(frozen=True)
class Eigenbasis:
    """Eigen-data of the critical pair (elements of the branch's fields).

    Attributes
    ----------
    A : list of lists
        The Jacobian at the critical point.
    A2 : list of lists
        ``A @ A``.
    W : element
        ``omega^2``.
    v, Av : lists
        Real vectors with ``q = Av + nu v``.
    q : list
        Right eigenvector for ``nu`` (elements of the nu-extension).
    pbar : list
        ``conj(p)``, the left eigenvector for ``nu`` with ``conj(p)^T q = 1``.
    w, wA : lists
        Real left vectors ``w`` and ``A^T w`` spanning the left center space.
    qq : element
        ``<q, q> = conj(q)^T q``.
    dual : pair of lists
        The rows ``(c1, c2)`` of the dual basis of ``(e1, e2)`` on the left
        center space: ``c_i . e_j = delta_ij`` and ``c_i`` annihilates the
        complementary subspace (combinations of ``w`` and ``A^T w``).
    """

    A: list
    A2: list
    W: Any
    v: list
    Av: list
    q: list
    pbar: list
    w: list
    wA: list
    qq: Any  # an element of ``field``
    field: Any
    nu_field: Any  # the extension K(nu), nu^2 = -W
    dual: tuple

    def center_coordinates(self, y: Sequence[Element]) -> tuple[Element, Element]:
        """Coordinates ``(xi1, xi2)`` of the center part of a real vector ``y``
        in the basis ``(e1, e2) = (A v, -v)``: ``(c1 . y, c2 . y)``."""
        K = self.field
        c1, c2 = self.dual
        return dot(K, c1, y), dot(K, c2, y)


def _smallest(K, vectors):
    return min(vectors, key=lambda vec: sum(K.size(x) for x in vec if x))


def critical_eigenbasis(K: Any, A: list[list[Element]], W: Element,
                        nu_field: Any) -> Eigenbasis:
    """Compute the eigen-data at the critical point.

    Parameters
    ----------
    K : field
        Field of the entries of ``A`` and of ``W``.
    A : list of lists
    W : element of K
    nu_field : QuadraticExtension
        ``K(nu)`` with ``nu^2 = -W``.
    """
    n = len(A)
    A2 = matmul(K, A, A)
    M = [[A2[i][j] + (W if i == j else K.zero) for j in range(n)] for i in range(n)]
    right = kernel(K, M)
    left = kernel(K, transpose(M))
    if len(right) != 2 or len(left) != 2:
        raise DegenerateHopfError(
            f"the kernel of A^2 + omega^2 I has dimension {len(right)}, not 2: the eigenvalue "
            "pair +-i omega is not simple at this point", reason="two_critical_pairs")
    v = _smallest(K, right)
    w = _smallest(K, left)
    Av = matvec(K, A, v)
    wA = matvec(K, transpose(A), w)
    q = [nu_field.element(a, b) for a, b in zip(Av, v)]
    pbar = [nu_field.element(a, b) for a, b in zip(wA, w)]
    norm = nu_field.zero
    for x, y in zip(pbar, q):
        norm = norm + x * y
    if not norm:
        raise DegenerateHopfError("the left and right eigenvectors are orthogonal: the pair "
                                  "+-i omega is not simple", reason="two_critical_pairs")
    inv = 1 / norm
    pbar = [x * inv for x in pbar]
    qq = dot(K, Av, Av) + W * dot(K, v, v)
    e2 = [-x for x in v]
    a11, a12 = dot(K, w, Av), dot(K, w, e2)
    a21, a22 = dot(K, wA, Av), dot(K, wA, e2)
    # The dual rows are the inverse of ((w.e1, w.e2), (wA.e1, wA.e2)) applied
    # to (w, wA), formed once here: center_coordinates runs once per monomial,
    # and two dots with them cost less than two dots with w and A^T w followed
    # by a combination with the inverse's entries, whose large common
    # denominator meets a gcd in every product (2.3x on the food chain in K).
    inv_det = 1 / (a11 * a22 - a12 * a21)
    b11, b12, b21, b22 = a22 * inv_det, -a12 * inv_det, -a21 * inv_det, a11 * inv_det
    c1 = [b11 * x + b12 * y if x or y else K.zero for x, y in zip(w, wA)]
    c2 = [b21 * x + b22 * y if x or y else K.zero for x, y in zip(w, wA)]
    return Eigenbasis(A, A2, W, v, Av, q, pbar, w, wA, qq, K, nu_field, (c1, c2))
