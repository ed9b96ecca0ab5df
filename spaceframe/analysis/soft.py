"""Soft modes: the least stiff non-zero modes of the frame's axial stiffness.

A frame can be free of mechanisms and still be only just stiff in some way:
a nearly collinear brace, a bay held by a very long member.  With member
axial stiffnesses ``EA / L`` the stiffness matrix is ``K = C.T diag(EA / L) C``;
its smallest eigenvalues above the mechanisms, divided by the frame's typical
stiffness (the median diagonal entry of ``K``, the stiffness of a joint held
by its own members), measure how soft those modes are.  The ratio has no
unit and does not change with the unit of length or of force.  ``EA`` comes
from the model's ``[properties.members.EA]`` table, and is uniform when the
model gives none (then only ``1 / L`` weights the members).

The eigenvalues come from a block inverse iteration with the factorisation of
``K + delta I`` (``delta``: ``Tolerances.soft_shift`` of the typical stiffness), the mechanisms
projected out at every step, followed by Rayleigh-Ritz; small frames use a
dense symmetric eigensolver.  ``K`` has the pattern of the rank decision's
``C.T C`` but other numbers (``EA / L`` weights each member), so it is a
second numerical factorisation; it reuses the rank decision's fill-reducing
ordering, and with PARDISO (:func:`spaceframe.analysis.nullspace.factorise_definite`)
it is a Cholesky factorisation on every core whose symbolic analysis in that
order costs little.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

from .equilibrium import axial_stiffness, stiffness_matrix
from ..tolerances import DEFAULT, Tolerances

__all__ = ["SoftModes", "soft_modes", "typical_stiffness"]

_SEED = 20261203


@dataclass(frozen=True)
class SoftModes:
    """The softest non-zero modes.

    Attributes
    ----------
    ratios : (q,) float
        Stiffness of each mode over the typical stiffness, ascending.
    vectors : (N, q) float
        The modes in free coordinates (unit length).
    checked : int
        How many of the softest modes were computed (those below
        ``Tolerances.soft`` are kept).
    """

    ratios: np.ndarray
    vectors: np.ndarray
    checked: int


def soft_modes(C, lengths, mech, joint_of, *, count: int = 3, ea=None, perm=None,
               typical: float | None = None, tol: Tolerances = DEFAULT) -> SoftModes:
    """The ``count`` softest modes above the mechanisms, kept where softer than ``tol.soft``.

    Parameters
    ----------
    C : (m, N) sparse
        Compatibility matrix.
    lengths : (m,) float
    mech : (N, k) float
        Orthonormal mechanism basis, projected out.
    joint_of : (N,) int
    ea : (m,) float, optional
        Axial stiffness of each member; uniform when absent.
    perm : (N,) int, optional
        A fill-reducing ordering already computed for ``C.T C`` (it has the
        same pattern); computed when absent.
    typical : float, optional
        The frame's typical stiffness, when ``C`` is only part of the frame's
        coordinates (the complement of its local mechanisms, which carry no
        stiffness); the median diagonal entry of ``K`` when absent.
    tol : Tolerances, keyword-only
        ``tol.soft``: the stiffness ratio below which a mode is soft;
        ``tol.soft_shift``; ``tol.limits.dense_soft``: the largest problem
        solved densely.

    Notes
    -----
    Cost: one sparse factorisation and a few block solves of ``count + 4``
    vectors, as in :mod:`spaceframe.analysis.nullspace`.
    """
    m, N = C.shape
    k = mech.shape[1]
    width = min(count, N - k)
    empty = SoftModes(np.zeros(0), np.zeros((N, 0)), 0)
    if width <= 0 or m == 0:
        return empty
    K = stiffness_matrix(C, lengths, ea)
    if typical is None:
        diag = K.diagonal()
        typical = float(np.median(diag[diag > 0])) if np.any(diag > 0) else 0.0
    if typical == 0:
        return empty
    if N <= tol.limits.dense_soft:
        vals, vecs = np.linalg.eigh(K.toarray())
        if k:  # drop the mechanism directions
            keep = np.argsort(np.linalg.norm(mech.T @ vecs, axis=0))[:N - k]
            keep.sort()
            vals, vecs = vals[keep], vecs[:, keep]
        vals, vecs = vals[:width], vecs[:, :width]
    else:
        vals, vecs = _iterate(K, tol.soft_shift * typical, mech, joint_of, width, perm, tol)
    ratios = vals / typical
    soft = ratios < tol.soft
    return SoftModes(ratios[soft], vecs[:, soft], width)


def typical_stiffness(C, lengths, ea=None) -> float:
    """The frame's typical stiffness: the median positive diagonal entry of ``C.T diag(EA/L) C``.

    The diagonal is ``sum_e w_e C[e, i]**2``, formed without the matrix: O(nnz(C)).
    """
    diag = np.asarray(sp.csr_matrix(C).multiply(C).T @ axial_stiffness(lengths, ea)).ravel()
    return float(np.median(diag[diag > 0])) if np.any(diag > 0) else 0.0


def _iterate(K, delta, mech, joint_of, width, perm, tol, iterations: int = 4):
    from .nullspace import _ordering, factorise_definite, rows_of_symmetric

    N = K.shape[0]
    if perm is None:
        perm = _ordering(K, joint_of)
    inv = np.empty_like(perm)
    inv[perm] = np.arange(N)
    Kp = K[perm][:, perm].tocsc()
    lu = factorise_definite(Kp + delta * sp.identity(N, format="csc"), tol=tol)
    M = mech[perm]
    Kr = rows_of_symmetric(Kp)
    block = width + 4
    X = np.random.default_rng(_SEED).standard_normal((N, min(block, N - M.shape[1])))
    for _ in range(iterations):
        if M.shape[1]:
            X -= M @ (M.T @ X)
        X = lu.solve(X)
        if M.shape[1]:
            X -= M @ (M.T @ X)
        X = np.ascontiguousarray(np.linalg.qr(X)[0])
        H = X.T @ (Kr @ X)
        vals, V = np.linalg.eigh((H + H.T) / 2)
        X = X @ V
    return vals[:width], X[:, :width][inv]
