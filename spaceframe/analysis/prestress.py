"""First-order mechanisms stiffened by prestress: the product-force test.

A state of self-stress ``t`` (tension positive) gives a mechanism ``u`` the
second-order stiffness

    u.T G(t) u = sum_e t_e * |du_e|^2 / L_e,

``du_e`` the relative movement of member ``e``'s ends (for an inextensional
``u`` it is all transverse).  The vector ``p_e = |du_e|^2 / L_e`` is the
"product force" of Pellegrino & Calladine [1]_.  Some combination of the
states of self-stress stiffens ``u`` exactly when ``p`` has a non-zero
component in the self-stress space; that component, ``t* = P p``, is itself a
state of self-stress and gives ``u.T G(t*) u = |P p|^2 > 0``, so its sign
pattern says which members must be in tension.  A mode with ``P p = 0`` is
stiffened by no prestress: it is likely a finite mechanism.

The frame as a whole is prestress stable (Connelly & Whiteley [2]_) when one
state of self-stress stiffens every internal mechanism at once:
``U.T G(t) U`` positive definite over the internal mechanism space ``U``.
That is searched for, not proven impossible: candidates are the sum of the
per-mode stiffening states and each of them alone.

References
----------
.. [1] S. Pellegrino and C. R. Calladine, "Matrix analysis of statically and
   kinematically indeterminate frameworks", Int. J. Solids Struct. 22(4),
   409-428, 1986.
.. [2] R. Connelly and W. Whiteley, "Second-order rigidity and prestress
   stability for tensegrity frameworks", SIAM J. Discrete Math. 9(3),
   453-491, 1996.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

from ..errors import ModelError
from ..model import Frame
from ..modeset import ModeSet
from ..tolerances import DEFAULT, Tolerances

__all__ = ["PrestressResult", "DeclaredPrestress", "prestress_test", "declared_prestress_test",
           "product_forces", "product_forces_sparse", "prestress_test_sparse", "STIFFENED",
           "NOT_STIFFENED"]

STIFFENED = "first-order: stiffened only if built and kept prestressed"
NOT_STIFFENED = "not stiffened by any prestress"


@dataclass(frozen=True)
class PrestressResult:
    """Per-mode orders and the whole-frame verdict.

    Attributes
    ----------
    orders : tuple of str
        :data:`STIFFENED` or :data:`NOT_STIFFENED` for each internal mode.
    prestress : (k, m) float, or ModeSet
        For each internal mode, a stiffening state of self-stress (largest
        force 1, tension positive), or zeros; a sparse :class:`ModeSet` from
        :func:`prestress_test_sparse`.
    stable : bool or None
        True when one state stiffens every internal mechanism (the certificate
        is ``certificate``); False when some mode is stiffened by none (then no
        prestress can); None when every mode is stiffened on its own but the
        search found no single state for all; also None with no internal
        mechanism.
    certificate : (m,) float or None
    """

    orders: tuple[str, ...]
    prestress: np.ndarray
    stable: bool | None
    certificate: np.ndarray | None


@dataclass(frozen=True, eq=False)
class DeclaredPrestress:
    """What the prestress a model declares does to its internal mechanisms.

    Attributes
    ----------
    forces : (m,) float
        The declared member forces (+ tension), as given.
    stiffens : (k,) bool
        For each internal mechanism, ``u.T G(t) u > 0``: the declared state
        stiffens it.
    holds : bool
        It stiffens every internal mechanism at once (``U.T G(t) U`` positive
        definite) and the supports permit no rigid-body motion: the frame is
        held while that prestress is kept.
    """

    forces: np.ndarray
    stiffens: np.ndarray
    holds: bool


def declared_prestress_test(frame: Frame, C, dofs, modes: np.ndarray, *, rigid_body_modes: int,
                            tol: Tolerances = DEFAULT) -> DeclaredPrestress | None:
    """Check the model's declared prestress and test it on the internal mechanisms.

    Parameters
    ----------
    frame : Frame
        ``frame.prestress`` is the declared state (None: nothing to test).
    C : (m, dofs) sparse
        The compatibility matrix; ``C.T t`` is the force the prestress ``t``
        leaves unbalanced at the free coordinates.
    dofs : FreeDofs
    modes : (k, n, d) float, or ModeSet
        Internal mechanisms (a sparse ModeSet: the stress form is built sparse).
    rigid_body_modes : int
        Rigid-body motions the supports permit (no prestress holds them).
    tol : Tolerances, keyword-only
        ``tol.prestress_balance`` bounds the unbalanced force.

    Returns
    -------
    DeclaredPrestress or None

    Raises
    ------
    ModelError
        When the declared forces are not in equilibrium at some joint: the
        model then declares a prestress the frame cannot carry.

    Notes
    -----
    Cost O(m k^2 + k^3).  A finite mechanism is never stiffened: its product
    forces have no component in the self-stress space (Pellegrino & Calladine
    [1]_), so ``u.T G(t) u = t . p = 0`` for every state of self-stress ``t``.
    """
    t = frame.prestress
    if t is None:
        return None
    top = float(np.abs(t).max())
    r = np.asarray(C.T @ t).reshape(-1)
    per_joint = np.zeros(frame.n_joints)
    np.add.at(per_joint, dofs.joint_of(), r * r)
    per_joint = np.sqrt(per_joint)
    worst = int(np.argmax(per_joint)) if per_joint.size else 0
    if per_joint.size and per_joint[worst] > tol.prestress_balance * top:
        raise ModelError(f"the declared [prestress] is not a state of self-stress: at joint "
                         f"{frame.joint_ids[worst]!r} its member forces leave "
                         f"{per_joint[worst]:.4g} unbalanced (largest force {top:.4g}); list "
                         f"the force of every member that carries the prestress, in "
                         f"equilibrium at every joint with no load",
                         path=frame.source, item=frame.joint_ids[worst])
    k = len(modes)
    if k == 0:
        return DeclaredPrestress(t, np.zeros(0, dtype=bool), rigid_body_modes == 0)
    L = frame.lengths()
    if isinstance(modes, ModeSet) and modes.sparse:
        du = _relative_sparse(frame, modes)
        M, M_abs = _stress_form_sparse(du, L, t), _stress_form_sparse(du, L, np.abs(t))
        scale = tol.stiffening * max(float(abs(M_abs).max()), 1e-300)
        stiffens = M.diagonal() > scale
        # positive definite: every diagonal entry positive, then the smallest eigenvalue
        holds = bool(rigid_body_modes == 0 and stiffens.all() and
                     _smallest_eigenvalue(M, tol) > scale)
        return DeclaredPrestress(t, stiffens, holds)
    modes = modes.dense() if isinstance(modes, ModeSet) else modes
    du = _relative(frame, modes)
    M = _stress_form(du, L, t)
    M_abs = _stress_form(du, L, np.abs(t))
    scale = tol.stiffening * max(float(np.abs(M_abs).max()), 1e-300)
    stiffens = np.diag(M) > scale
    holds = bool(rigid_body_modes == 0 and np.linalg.eigvalsh(M)[0] > scale)
    return DeclaredPrestress(t, stiffens, holds)


def _smallest_eigenvalue(M: sp.spmatrix, tol: Tolerances) -> float:
    """Smallest eigenvalue of a sparse symmetric ``M``: dense up to ``tol.limits.dense_soft``."""
    if M.shape[0] <= tol.limits.dense_soft:
        return float(np.linalg.eigvalsh(M.toarray())[0])
    from scipy.sparse.linalg import eigsh

    return float(eigsh(M.tocsc(), k=1, which="SA", return_eigenvectors=False)[0])


def _relative_sparse(frame: Frame, modes: ModeSet) -> list[sp.csr_matrix]:
    """Relative end movements of every member in every mode: ``d`` sparse ``(k, m)`` matrices.

    Cost O(d nnz) of the modes' rows.
    """
    m, n, d = frame.n_members, frame.n_joints, frame.dimension
    B = sp.csr_matrix((np.r_[np.ones(m), -np.ones(m)],
                       (np.r_[frame.ends[:, 1], frame.ends[:, 0]], np.r_[np.arange(m),
                                                                       np.arange(m)])),
                      shape=(n, m))
    U = modes.matrix()
    return [sp.csr_matrix(U[:, a::d] @ B) for a in range(d)]


def _stress_form_sparse(du: list, L: np.ndarray, t: np.ndarray) -> sp.csr_matrix:
    """``U.T G(t) U`` over sparse modes, ``(k, k)`` sparse symmetric."""
    w = sp.diags(t / L)
    M = sum(x @ w @ x.T for x in du)
    return sp.csr_matrix((M + M.T) / 2)


def _stress_form(du: np.ndarray, L: np.ndarray, t: np.ndarray) -> np.ndarray:
    """``U.T G(t) U``: the prestress stiffness of ``t`` over the modes, ``(k, k)`` symmetric."""
    M = np.einsum("amd,bmd,m->ab", du, du, t / L)
    return (M + M.T) / 2


def _relative(frame: Frame, modes: np.ndarray) -> np.ndarray:
    """Relative end movements ``(k, m, d)`` of every member in every mode."""
    return modes[:, frame.ends[:, 1], :] - modes[:, frame.ends[:, 0], :]


def product_forces(frame: Frame, modes: np.ndarray) -> np.ndarray:
    """Product forces ``p_e = |du_e|^2 / L_e`` of each mode, ``(m, k) float``."""
    du = _relative(frame, modes)
    return np.einsum("kmd,kmd->mk", du, du) / frame.lengths()[:, None]


def product_forces_sparse(frame: Frame, modes: ModeSet) -> sp.csc_matrix:
    """:func:`product_forces` of modes held sparse: ``(m, k)`` sparse.

    Only members with an end at a moving joint have one; a one-joint mode's
    are those of that joint's members, ``|u_j|^2 / L_e`` (the other end stays).
    Cost O(d nnz) of the modes' rows.
    """
    du = _relative_sparse(frame, modes)
    p = sum(x.multiply(x) for x in du)
    return sp.csc_matrix(sp.csr_matrix(p).multiply(1.0 / frame.lengths()[None, :]).T)


def prestress_test_sparse(p: sp.spmatrix, P: sp.spmatrix, *, overwrite_P: bool = False,
                          tol: Tolerances = DEFAULT) -> PrestressResult:
    """:func:`prestress_test` on product forces and their projections held sparse.

    Parameters
    ----------
    p : (m, k) sparse
        Product forces of the internal modes (:func:`product_forces_sparse`).
    P : (m, k) sparse
        Their projections onto the states of self-stress
        (:func:`spaceframe.analysis.blocks.project_sparse`).
    overwrite_P : bool, keyword-only
        ``P`` (CSC) may be scaled in place and its arrays become those of the
        states returned: no second copy of millions of entries.  Default False.
    tol : Tolerances, keyword-only
        ``tol.stiffening`` as in :func:`prestress_test`.  The search for one
        state for all modes is not made here (``prestress_stable`` is False
        when some mode is stiffened by none, else None): it is for at most
        ``tol.limits.common_prestress`` modes, and the audit takes this path
        only for more than ``tol.limits.block_prestress``, which is larger.

    Returns
    -------
    PrestressResult
        With ``prestress`` a sparse :class:`ModeSet` of ``(m,)`` states.

    Notes
    -----
    Cost O(nnz(p) + nnz(P)); no dense ``(m, k)`` array.
    """
    p = sp.csc_matrix(p)
    P = P if overwrite_P and sp.issparse(P) and P.format == "csc" else sp.csc_matrix(P, copy=True)
    m, k = P.shape
    norm_p = np.sqrt(_column_reduce(np.add, p.data, p.indptr, square=True))
    norm_P = np.sqrt(_column_reduce(np.add, P.data, P.indptr, square=True))
    top = _column_reduce(np.maximum, P.data, P.indptr, absolute=True)
    stiff = norm_P > tol.stiffening * np.maximum(norm_p, 1e-300)
    orders = tuple(STIFFENED if s else NOT_STIFFENED for s in stiff)
    scale = np.where(stiff & (top > 0), 1.0 / np.where(top > 0, top, 1.0), 0.0)
    for lo, hi in _column_chunks(P.indptr):       # each column scaled, a chunk at a time
        P.data[P.indptr[lo]:P.indptr[hi]] *= np.repeat(scale[lo:hi], np.diff(P.indptr[lo:hi + 1]))
    # P's columns read as the rows of P.T (CSC as CSR, no conversion)
    rows = sp.csr_matrix((P.data, P.indices, P.indptr), shape=(k, m))
    if not stiff.all():
        rows.eliminate_zeros()
    stable = False if not stiff.all() else None
    return PrestressResult(orders, ModeSet(rows, (m,)), stable if k else None, None)


def _column_chunks(indptr: np.ndarray, entries: int = 2 ** 20):
    """Ranges ``(lo, hi)`` of CSC columns holding about ``entries`` stored values each."""
    k = len(indptr) - 1
    lo = 0
    while lo < k:
        hi = int(np.searchsorted(indptr, indptr[lo] + entries, side="right")) - 1
        hi = min(max(hi, lo + 1), k)
        yield lo, hi
        lo = hi


def _column_reduce(ufunc, values: np.ndarray, indptr: np.ndarray, *, square: bool = False,
                   absolute: bool = False) -> np.ndarray:
    """``ufunc`` over each CSC column's stored values (squared, or their sizes), 0 for an
    empty column: O(nnz), a chunk of columns at a time (no temporary the size of ``values``)."""
    out = np.zeros(len(indptr) - 1)
    for lo, hi in _column_chunks(indptr):
        seg = values[indptr[lo]:indptr[hi]]
        seg = seg * seg if square else np.abs(seg) if absolute else seg
        start = indptr[lo:hi] - indptr[lo]
        full = np.flatnonzero(np.diff(indptr[lo:hi + 1]) > 0)
        if len(full):
            out[lo + full] = ufunc.reduceat(seg, start[full])
    return out


def prestress_test(frame: Frame, modes: np.ndarray, project, *,
                   projected: np.ndarray | None = None,
                   tol: Tolerances = DEFAULT,
                   forces: np.ndarray | None = None) -> PrestressResult:
    """Apply the product-force test to internal mechanisms.

    Parameters
    ----------
    frame : Frame
    modes : (k, n, d) float
        Internal mechanisms (joint movements).
    project : callable
        Projection onto the self-stress space, ``(m, q) -> (m, q)``.
    projected : (m, k) float, optional
        ``project(product_forces(frame, modes))`` when the caller has already
        computed it (with other columns in the same solves).
    tol : Tolerances, keyword-only
        ``tol.stiffening`` decides a stiffening component;
        ``tol.limits.common_prestress`` caps the search for one state for all.
    forces : (m, k) float, optional
        ``product_forces(frame, modes)``, where the caller computed it.

    Returns
    -------
    PrestressResult

    Notes
    -----
    Cost: one projection of ``k`` vectors (``k / 16`` block solves in the
    sparse engine); the whole-frame check reuses it.
    """
    k, m = modes.shape[0], frame.n_members
    if k == 0:
        return PrestressResult((), np.zeros((0, m)), None, None)
    L = frame.lengths()
    p = product_forces(frame, modes) if forces is None else forces
    P = project(p) if projected is None else projected
    orders, stress = [], np.zeros((k, m))
    for i in range(k):
        if np.linalg.norm(P[:, i]) > tol.stiffening * max(np.linalg.norm(p[:, i]), 1e-300):
            orders.append(STIFFENED)
            stress[i] = P[:, i] / np.max(np.abs(P[:, i]))
        else:
            orders.append(NOT_STIFFENED)
    if NOT_STIFFENED in orders:
        return PrestressResult(tuple(orders), stress, False, None)
    certificate = _common_prestress(_relative(frame, modes), L, P, tol.stiffening) \
        if k <= tol.limits.common_prestress else None
    return PrestressResult(tuple(orders), stress, True if certificate is not None else None,
                           certificate)


def _common_prestress(du, L, P, stiffening):
    """A state of self-stress stiffening every mode at once, or None."""
    k = du.shape[0]
    candidates = [P.sum(axis=1)] + [P[:, i] for i in range(k)]
    for t in candidates:
        M = _stress_form(du, L, t)
        if np.linalg.eigvalsh(M)[0] > stiffening * np.abs(M).max():
            return t / np.max(np.abs(t))
    return None
