"""Rank and null spaces of the compatibility matrix, dense or sparse.

Two engines give the same decision with one tolerance: a singular value ``s``
of the compatibility matrix ``C`` is judged zero when
``s <= tol.rank * s_max`` (see :class:`spaceframe.tolerances.Tolerances`).

``dense``
    The singular value decomposition of ``C`` (LAPACK through NumPy), for
    small frames.  Exact to rounding, O(m n min(m, n)).
``sparse``
    For everything else.  The number of mechanisms is the number of
    eigenvalues of the stiffness-like matrix ``K = C.T C`` below
    ``tau = (tol.rank * s_max)**2``.  It is counted exactly, by Sylvester's law
    of inertia, as the number of negative pivots of an ``L D L.T``
    factorisation of ``K - tau I`` (the Sturm sequence check of structural
    eigenvalue analysis, Bathe [2]_), computed by SuperLU with diagonal
    pivoting after a nested-dissection ordering of the joints by METIS [3]_.
    The same factorisation then drives a block inverse (subspace) iteration
    that gives an orthonormal basis of those mechanisms and an estimate of the
    smallest non-zero singular value.  The number of states of self-stress
    follows exactly from the rank.  States of self-stress are computed on
    request, as projections ``t = y - C K^+ C.T y`` of seeded random member
    force vectors onto the null space of ``C.T``.

Bases come out orthonormal; :func:`canonical_basis` makes any of them deterministic.

References
----------
.. [1] S. Pellegrino and C. R. Calladine, "Matrix analysis of statically and
   kinematically indeterminate frameworks", Int. J. Solids Struct. 22(4),
   409-428, 1986.
.. [2] K.-J. Bathe, "Finite Element Procedures", Prentice Hall, 1996,
   section 11.4.3 (the Sturm sequence property).
.. [3] G. Karypis and V. Kumar, "A fast and high quality multilevel scheme for
   partitioning irregular graphs", SIAM J. Sci. Comput. 20(1), 359-392, 1998.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.linalg as sla
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from ..errors import InternalError, SpaceframeError
from ..tolerances import DEFAULT, Tolerances

__all__ = ["RankDecision", "decide_rank", "canonical_basis"]

_SEED = 20261201
_BLOCK = 16  # right-hand sides per solve: SuperLU's multi-vector solve grows faster past this


@dataclass(frozen=True)
class RankDecision:
    """What the engine found.

    Attributes
    ----------
    rank : int
        Rank of ``C``.
    mechanisms : (dofs, k) float
        Orthonormal basis of the null space of ``C`` (inextensional
        displacements), in free coordinates.
    self_stress : (m, q) float
        Orthonormal, independent states of self-stress (in the null space of
        ``C.T``).  The dense engine gives them all; the sparse one at most the
        cap asked for.
    self_stress_count : int
        ``m - rank``, always exact.
    s_max : float
        Largest singular value of ``C`` (in the sparse engine an estimate to
        about two digits, which moves the threshold by as little).
    threshold : float
        ``tol.rank * s_max``: singular values at or below it are judged zero.
    largest_zero : float or None
        The largest singular value judged zero: ``max ||C x||`` over the unit
        mechanism vectors ``x`` (None when there is no mechanism).
    smallest_nonzero : float or None
        The smallest singular value judged non-zero (in the sparse engine a
        Ritz estimate, an upper bound on it; the inertia count proves it is
        above ``threshold``).  None when the rank is 0.
    method : str
        ``"dense"`` or ``"sparse"``.
    project : callable
        ``project(Y)`` for ``Y`` of shape ``(m, q)`` returns the orthogonal
        projection of each column onto the space of states of self-stress,
        ``Y - C K^+ C.T Y``: the part of a member force vector that needs no
        load.  ``project.redundancy()`` gives the diagonal of that projector
        (or None where it would cost too much).
    shift : float or None
        The sparse engine's final shift ``tau`` of the inertia count, divided
        by ``s_max**2``: ``tol.rank**2`` unless the factorisation had to move
        it (then ``sqrt(shift)`` is the relative singular value threshold the
        count used).  None for the dense engine and where no count was made.
    """

    rank: int
    mechanisms: np.ndarray
    self_stress: np.ndarray
    self_stress_count: int
    s_max: float
    threshold: float
    largest_zero: float | None
    smallest_nonzero: float | None
    method: str
    project: object = None
    shift: float | None = None


def decide_rank(C: sp.spmatrix, *, joint_of: np.ndarray | None = None,
                self_stress_cap: int = 16, method: str = "auto",
                tol: Tolerances = DEFAULT) -> RankDecision:
    """Rank of the compatibility matrix and bases of its null spaces.

    Parameters
    ----------
    C : (m, n) sparse matrix
        Compatibility matrix (rows: members; columns: free coordinates).
    joint_of : (n,) int, optional
        Joint of each free coordinate; lets the sparse engine order whole
        joints.  Each coordinate is its own joint when absent.
    self_stress_cap : int, keyword-only
        Compute at most this many states of self-stress (their number is
        always exact).  Default 16.
    method : {"auto", "dense", "sparse"}, keyword-only
        ``"auto"`` takes the dense engine when ``m * n <= tol.limits.dense_engine``.
    tol : Tolerances, keyword-only
        ``tol.rank`` is the relative threshold on singular values.

    Returns
    -------
    RankDecision

    Raises
    ------
    SpaceframeError
        For an unknown ``method``.
    InternalError
        When the sparse factorisation breaks down (stage ``"factorisation"``;
        ``partial`` holds the number of free coordinates and of shifts tried).

    Notes
    -----
    Dense: O(m n min(m, n)).  Sparse: one nested-dissection ordering
    (near-linear), one sparse factorisation (for frames whose joint graph is
    like a plane or shell, O(n^1.5) time and O(n log n) memory), and a few
    block solves with ``k + 4`` right-hand sides for ``k`` mechanisms.
    """
    C = sp.csr_matrix(C)
    m, n = C.shape
    if method == "auto":
        method = "dense" if m * n <= tol.limits.dense_engine else "sparse"
    if method == "dense":
        return _dense(C, self_stress_cap, tol)
    if method == "sparse":
        return _sparse(C, joint_of, self_stress_cap, tol)
    raise SpaceframeError(f"method must be 'auto', 'dense' or 'sparse', not {method!r}")


def _dense(C, cap, tol) -> RankDecision:
    m, n = C.shape
    A = C.toarray()
    if A.size == 0:
        u, s, vt = np.eye(m), np.zeros(0), np.eye(n)
    else:
        u, s, vt = np.linalg.svd(A, full_matrices=True)
    s_max = float(s[0]) if s.size else 0.0
    threshold = tol.rank * s_max
    rank = int(np.sum(s > threshold)) if s_max > 0 else 0
    mech = vt[rank:].T
    null_t = u[:, rank:]
    stress = null_t if cap else u[:, :0]
    largest_zero = float(np.max(np.linalg.norm(A @ mech, axis=0))) if mech.shape[1] else None
    smallest = float(s[rank - 1]) if rank else None
    return RankDecision(rank=rank, mechanisms=mech, self_stress=stress,
                        self_stress_count=m - rank, s_max=s_max, threshold=threshold,
                        largest_zero=largest_zero, smallest_nonzero=smallest, method="dense",
                        project=_DenseProjector(null_t))


def _sparse(C, joint_of, cap, tol) -> RankDecision:
    m, n = C.shape
    K = (C.T @ C).tocsc()
    if n == 0:
        return RankDecision(0, np.zeros((0, 0)), np.zeros((m, 0)), m, 0.0, 0.0, None, None,
                            "sparse", project=_EveryMember(m))
    if K.nnz == 0:  # no member touches a free coordinate
        stress = np.eye(m, min(cap, m))
        return RankDecision(0, np.eye(n), stress, m, 0.0, 0.0, 0.0, None, "sparse",
                            project=_EveryMember(m))
    lam_max = _largest_eigenvalue(K, tol)
    s_max = float(np.sqrt(lam_max))
    threshold = tol.rank * s_max
    tau = threshold ** 2
    perm = _ordering(K, joint_of)
    Kp = K[perm][:, perm].tocsc()
    lu, tau = _shifted_ldl(Kp, tau)
    k = int(np.count_nonzero(lu.U.diagonal() < 0))
    rank = n - k
    basis, ritz = _subspace(Kp, lu, k, n)
    inv = np.empty_like(perm)
    inv[perm] = np.arange(n)
    mech = basis[:, :k][inv]
    largest_zero = float(np.max(np.linalg.norm(C @ mech, axis=0))) if k else None
    smallest = float(np.sqrt(max(ritz[k], 0.0))) if rank and len(ritz) > k else None
    project = _Projector(C, Kp, lu, perm, mech, tol)
    q = min(cap, m - rank)
    if q > 0:
        stress, _ = np.linalg.qr(project(np.random.default_rng(_SEED + 1).standard_normal((m, q))))
    else:
        stress = np.zeros((m, 0))
    return RankDecision(rank=rank, mechanisms=mech, self_stress=stress,
                        self_stress_count=m - rank,
                        s_max=s_max, threshold=threshold, largest_zero=largest_zero,
                        smallest_nonzero=smallest, method="sparse", project=project,
                        shift=tau / lam_max)


def _largest_eigenvalue(K, tol: Tolerances = DEFAULT) -> float:
    """Largest eigenvalue of the semi-definite ``K``, to ``tol.s_max_estimate`` (Lanczos)."""
    n = K.shape[0]
    if n <= 3:
        return float(np.linalg.eigvalsh(K.toarray())[-1])
    v0 = np.random.default_rng(_SEED).standard_normal(n)
    return float(spla.eigsh(K, k=1, which="LA", tol=tol.s_max_estimate, ncv=min(n, 10), v0=v0,
                            return_eigenvectors=False)[0])


def _ordering(K, joint_of) -> np.ndarray:
    """Fill-reducing symmetric ordering: nested dissection of the joint graph."""
    n = K.shape[0]
    if n < 64:
        return np.arange(n)
    import pymetis

    if joint_of is None:
        joint_of = np.arange(n)
    joints, dof_joint = np.unique(joint_of, return_inverse=True)
    P = sp.csr_matrix((np.ones(n), (dof_joint, np.arange(n))), shape=(len(joints), n))
    G = (P @ abs(K) @ P.T).tocsr()
    G.setdiag(0)
    G.eliminate_zeros()
    G.sort_indices()
    weights = np.bincount(dof_joint).astype(np.int64)
    result = pymetis.nested_dissection(
        adjacency=pymetis.CSRAdjacency(adj_starts=G.indptr.astype(np.int64),
                                       adjacent=G.indices.astype(np.int64)),
        vweights=weights)
    joint_perm = np.asarray(result[0] if isinstance(result, tuple) else result, dtype=np.int64)
    # Expand joints to their coordinates, keeping each joint's coordinates together.
    order = np.argsort(np.argsort(joint_perm, kind="stable")[dof_joint], kind="stable")
    return order


def _shifted_ldl(Kp, tau):
    """SuperLU factorisation of ``Kp - tau I`` with diagonal pivots only.

    With the diagonal as pivot throughout, ``U = D L.T`` and the signs of
    ``diag(U)`` are the inertia of ``Kp - tau I``.  SuperLU may still swap
    rows where a pivot is exactly zero; then the shift is moved a little and
    the factorisation repeated; the shift used is returned with it (and
    recorded in :attr:`RankDecision.shift`).
    """
    n = Kp.shape[0]
    eye = sp.identity(n, format="csc")
    for attempt in range(4):
        try:
            lu = spla.splu((Kp - tau * eye).tocsc(), permc_spec="NATURAL",
                           diag_pivot_thresh=0.0,
                           options=dict(SymmetricMode=True))
        except RuntimeError:
            lu = None
        if lu is not None and np.array_equal(lu.perm_r, np.arange(n)) \
                and np.array_equal(lu.perm_c, np.arange(n)):
            return lu, tau
        tau *= 1.37
    raise InternalError(f"the sparse engine could not factorise the shifted stiffness matrix "
                        f"K - tau I ({n} free coordinates) with diagonal pivots, after "
                        f"{attempt + 1} shifts; the dense engine (method='dense') may do for "
                        f"a small frame", stage="factorisation",
                        partial={"free_coordinates": n, "shifts_tried": attempt + 1})


def _subspace(Kp, lu, k, n, iterations: int = 3):
    """Block inverse iteration with the factorisation of ``Kp - tau I``.

    Returns an orthonormal block whose first ``k`` columns span the ``k``
    eigenvectors below ``tau`` (their shifted inverse eigenvalues exceed all
    others by the factor ``lambda_{k+1} / tau``, so two iterations already
    resolve them to rounding), and the Ritz values, ascending.
    """
    extra = min(4, n - k)
    width = k + extra
    if width == 0:
        return np.zeros((n, 0)), np.zeros(0)
    X = np.random.default_rng(_SEED).standard_normal((n, width))
    theta = np.zeros(width)
    for _ in range(iterations):
        X = lu.solve(np.asfortranarray(X))
        X, _ = np.linalg.qr(X)
        H = X.T @ (Kp @ X)
        theta, V = np.linalg.eigh((H + H.T) / 2)
        X = X @ V
    return X, theta


class _EveryMember:
    """The projector when no member touches a free coordinate: every force is self-stress."""

    def __init__(self, m):
        self.m = m

    def __call__(self, Y):
        return np.array(Y, dtype=float)

    def redundancy(self, **_):
        return np.ones(self.m)


class _DenseProjector:
    """Projection onto the self-stress space from its orthonormal basis."""

    def __init__(self, basis):
        self.basis = basis

    def __call__(self, Y):
        return self.basis @ (self.basis.T @ Y)

    def redundancy(self, **_):
        """Diagonal of the projector, ``(m,) float``: row norms of the basis, squared."""
        return np.sum(self.basis ** 2, axis=1)


class _Projector:
    """Projection of member force vectors onto null(C.T), the states of self-stress.

    ``t = y - C x`` with ``K x = C.T y``: the residual of the least-squares fit
    of ``y`` by member elongations is orthogonal to every column of ``C``.
    ``C.T y`` lies in the range of ``K``; the solve with the factorisation of
    ``K - tau I`` is followed by a step of iterative refinement where the
    residual exceeds ``tol.refine`` of the right-hand side, and by the removal of any
    mechanism component (``C`` maps it to zero anyway).  Columns are taken
    ``_BLOCK`` at a time.
    """

    def __init__(self, C, Kp, lu, perm, mech, tol: Tolerances = DEFAULT):
        self.C, self.Kp, self.lu, self.perm, self.mech = C, Kp, lu, perm, mech
        self.refine, self.max_solves = tol.refine, tol.limits.redundancy_max
        self.inv = np.empty_like(perm)
        self.inv[perm] = np.arange(len(perm))

    def __call__(self, Y):
        Y = np.asarray(Y, dtype=float)
        flat = Y.ndim == 1
        Y = Y[:, None] if flat else Y
        C, Kp, lu, mech = self.C, self.Kp, self.lu, self.mech
        T = np.empty_like(Y)
        for lo in range(0, Y.shape[1], _BLOCK):
            y = Y[:, lo:lo + _BLOCK]
            rhs = (C.T @ y)[self.perm]
            x = lu.solve(np.asfortranarray(rhs))
            if np.linalg.norm(rhs - Kp @ x) > self.refine * np.linalg.norm(rhs):
                x += lu.solve(np.asfortranarray(rhs - Kp @ x))
            x = x[self.inv]
            if mech.shape[1]:
                x -= mech @ (mech.T @ x)
            T[:, lo:lo + _BLOCK] = y - C @ x
        return T[:, 0] if flat else T

    def redundancy(self, *, max_solves: int | None = None):
        """Diagonal of the projector onto the self-stress space, ``(m,) float``.

        ``r_e = 1 - c_e K^+ c_e.T`` for each member row ``c_e`` of ``C``.  The
        columns of ``K^+`` are formed a batch of coordinates at a time (one
        block solve each, with mechanism components removed before and after)
        and folded into ``h = diag(C K^+ C.T)`` at once, so memory stays
        O(n x batch).  Returns None when that needs more than ``max_solves``
        right-hand sides (default ``tol.limits.redundancy_max``).  Cost: ``n``
        solves and O(nnz(C) n).
        """
        C, lu, mech = self.C, self.lu, self.mech
        m, n = C.shape
        max_solves = self.max_solves if max_solves is None else max_solves
        if n > max_solves:
            return None
        Cc = C.tocsc()
        h = np.zeros(m)
        batch = 64
        for lo in range(0, n, batch):
            idx = np.arange(lo, min(lo + batch, n))
            E = np.zeros((n, len(idx)))
            E[idx, np.arange(len(idx))] = 1.0
            if mech.shape[1]:
                E -= mech @ mech[idx].T
            Z = lu.solve(np.asfortranarray(E[self.perm]))[self.inv]
            if mech.shape[1]:
                Z -= mech @ (mech.T @ Z)
            W = C @ Z                                   # (m, batch)
            h += np.asarray(Cc[:, idx].multiply(W).sum(axis=1)).ravel()
        return np.clip(1.0 - h, 0.0, 1.0)


def canonical_basis(B: np.ndarray, *, tol: Tolerances = DEFAULT) -> np.ndarray:
    """A deterministic basis of the column space of ``B``.

    The reduced echelon form: a column-pivoted QR of ``B.T`` picks one pivot
    row per column (the entry that moves most, then the most independent of
    it, and so on); the basis is then transformed so that each vector is 1 at
    its own pivot and 0 at the others', and scaled so that its largest entry
    is +1 or -1 with the pivot positive.  Any basis of the same space gives
    the same result, to rounding.

    Parameters
    ----------
    B : (N, k) float, full column rank
    tol : Tolerances, keyword-only
        Entries below ``tol.echelon_zero`` (of the column's largest) become 0.

    Returns
    -------
    (N, k) float
        Columns in pivot order; each column's largest absolute entry is 1.

    Notes
    -----
    Cost O(N k^2).
    """
    N, k = B.shape
    if k == 0:
        return B.copy()
    Q, _ = np.linalg.qr(B)
    _, _, piv = sla.qr(Q.T, mode="economic", pivoting=True)
    piv = piv[:k]
    E = np.linalg.solve(Q[piv, :].T, Q.T).T  # E[piv] = I
    E /= np.max(np.abs(E), axis=0)[None, :]
    E[np.abs(E) < tol.echelon_zero] = 0.0
    return E
