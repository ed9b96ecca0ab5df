"""Rank and null spaces of the compatibility matrix, dense or sparse.

Two engines give the same decision with one tolerance: a singular value ``s``
of the compatibility matrix ``C`` is judged zero when
``s <= tol.rank * s_max`` (see :class:`spaceframe.tolerances.Tolerances`;
a slender frame's lower threshold is ``tol.rank_threshold(scale)`` in place
of ``tol.rank``).

``dense``
    The singular value decomposition of ``C`` (LAPACK through NumPy), for
    small frames.  Exact to rounding, O(m n min(m, n)).
``sparse``
    For everything else.  The number of mechanisms is the number of
    eigenvalues of the stiffness-like matrix ``K = C.T C`` below
    ``tau = (threshold * s_max)**2``.  It is counted exactly, by Sylvester's law
    of inertia, as the number of negative pivots of an ``L D L.T``
    factorisation of ``K - tau I`` (the Sturm sequence check of structural
    eigenvalue analysis, Bathe [2]_), after a nested-dissection ordering of
    the joints by METIS [3]_.  The factorisation is MKL PARDISO's supernodal
    ``L D L.T`` on every core (:mod:`spaceframe.analysis.pardiso`, the
    optional extra ``pardiso``) from ``tol.limits.pardiso_engine`` free
    coordinates on, when installed; otherwise, and whenever PARDISO had to
    perturb a pivot (its inertia would then not be proof), SuperLU with
    diagonal pivoting.  Both give the same count; which one ran is
    :attr:`RankDecision.factorisation`.
    The same factorisation then drives a block inverse (subspace) iteration
    that gives an orthonormal basis of those mechanisms and an estimate of the
    smallest non-zero singular value.  The number of states of self-stress
    follows exactly from the rank.  States of self-stress are computed on
    request, as projections ``t = y - C K^+ C.T y`` of seeded random member
    force vectors onto the null space of ``C.T``.

Before either engine runs, the mechanisms that one joint's own members leave
(:func:`local_mechanisms`: a joint free out of the plane of its members, a
joint on a straight line of members, a joint with no member) are taken out
exactly, and the engine sees only the rest of the frame's free coordinates;
the union is the whole null space (the proof is in :func:`local_mechanisms`).

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
from . import pardiso
from .pardiso import BLOCK_ENTRIES

__all__ = ["RankDecision", "LocalSplit", "decide_rank", "local_mechanisms", "canonical_basis",
           "stress_seeds", "stress_basis",
           "canonical_pivots", "canonical_split", "factorise_definite"]

_SEED = 20261201
_BLOCK = 16  # right-hand sides per solve: SuperLU's multi-vector solve grows faster past this


def rows_of_symmetric(A) -> sp.csr_matrix:
    """The symmetric sparse ``A`` as CSR without a conversion: a CSC matrix's arrays read as rows.

    For products with dense blocks held row-major, which SciPy's CSR kernel
    takes a row at a time.
    """
    if A.format == "csc":
        return sp.csr_matrix((A.data, A.indices, A.indptr), shape=A.shape)
    return sp.csr_matrix(A)


@dataclass(frozen=True)
class RankDecision:
    """What the engine found.

    Attributes
    ----------
    rank : int
        Rank of ``C``.
    mechanisms : (dofs, k - local) float
        Orthonormal basis of the mechanisms (inextensional displacements, in
        free coordinates) that the engine found beyond the local ones; it is
        orthogonal to ``local_modes``, and with them spans the null space of
        ``C`` (:meth:`all_mechanisms`).  Without local mechanisms, the whole
        null space.
    self_stress : (m, q) float or None
        Orthonormal, independent states of self-stress (in the null space of
        ``C.T``).  The dense engine gives them all; the sparse one at most the
        cap asked for, or None where the caller asked to project them itself
        (``decide_rank(stress_later=True)``).
    self_stress_count : int
        ``m - rank``, always exact.
    s_max : float
        Largest singular value of ``C`` (in the sparse engine an estimate to
        about two digits, which moves the threshold by as little).
    threshold : float
        ``tolerance * s_max``: singular values at or below it are judged zero.
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
        ``project(Y, out=None)`` for ``Y`` of shape ``(m, q)`` (dense or
        sparse) returns the orthogonal projection of each column onto the
        space of states of self-stress, ``Y - C K^+ C.T Y``: the part of a
        member force vector that needs no load (written into ``out`` where
        given).  ``project.redundancy()`` gives the diagonal of that projector
        (or None where it would cost too much); ``project.release()`` gives
        back the work arrays it keeps between calls.
    shift : float or None
        The sparse engine's final shift ``tau`` of the inertia count, divided
        by ``s_max**2``: ``tolerance**2`` unless the factorisation had to move
        it (then ``sqrt(shift)`` is the relative singular value threshold the
        count used).  None for the dense engine and where no count was made.
    local_modes : (dofs, local) scipy.sparse.csc_matrix or None
        The mechanisms found joint by joint (:func:`local_mechanisms`),
        without the global solve; orthonormal, each confined to one joint.
    rest : (dofs, dofs - local) scipy.sparse.csc_matrix or None
        The orthonormal complement of ``local_modes`` the engine worked in
        (``C @ rest`` is the matrix it decided on); None without local modes.
    ordering : (dofs,) int or None
        The fill-reducing ordering of the free coordinates the sparse engine
        computed for ``C.T C`` (None in the dense engine); any matrix with
        the pattern of ``C.T C`` may reuse it.
    tolerance : float or None
        The relative threshold the decision used, ``threshold / s_max``:
        :meth:`spaceframe.tolerances.Tolerances.rank_threshold` of the
        frame's bending scale (``tol.rank`` when none was given).
    factorisation : str or None
        The sparse engine's factorisation: ``"PARDISO"`` or ``"SuperLU"``
        (None for the dense engine and where nothing was factorised).
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
    local_modes: sp.csc_matrix | None = None
    rest: sp.csc_matrix | None = None
    ordering: np.ndarray | None = None
    tolerance: float | None = None
    factorisation: str | None = None

    @property
    def local(self) -> int:
        """How many mechanisms were found joint by joint."""
        return 0 if self.local_modes is None else self.local_modes.shape[1]

    @property
    def count(self) -> int:
        """The number of mechanisms, ``dofs - rank``."""
        return self.local + self.mechanisms.shape[1]

    def all_mechanisms(self) -> np.ndarray:
        """Orthonormal basis ``(dofs, count)`` of the whole null space, dense: local ones first."""
        if not self.local:
            return self.mechanisms
        return np.hstack([self.local_modes.toarray(), self.mechanisms])


@dataclass(frozen=True)
class LocalSplit:
    """The mechanisms each joint's own members leave, and the coordinates left.

    Attributes
    ----------
    local : (N, l) scipy.sparse.csc_matrix
        Orthonormal columns, each confined to the free coordinates of one
        joint and in the null space of ``C``.
    rest : (N, N - l) scipy.sparse.csc_matrix
        Orthonormal columns spanning the orthogonal complement of ``local``,
        block diagonal by joint (the unit columns of every joint with no
        local mechanism, unchanged).
    joint_of : (N - l,) int
        Joint of each column of ``rest``.
    """

    local: sp.csc_matrix
    rest: sp.csc_matrix
    joint_of: np.ndarray

    @property
    def count(self) -> int:
        return self.local.shape[1]


def decide_rank(C: sp.spmatrix, *, joint_of: np.ndarray | None = None,
                self_stress_cap: int = 16, method: str = "auto", scale: float | None = None,
                stress_later: bool = False, tol: Tolerances = DEFAULT) -> RankDecision:
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
    scale : float, optional, keyword-only
        The frame's bending scale (:meth:`spaceframe.model.Frame.bending_scale`):
        the relative threshold is ``tol.rank_threshold(scale)``, ``tol.rank``
        for a compact frame and lower for a slender one.  ``tol.rank`` when absent.
    tol : Tolerances, keyword-only
        ``tol.rank`` is the relative threshold on singular values (of a compact frame).

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
    if method not in ("dense", "sparse"):
        raise SpaceframeError(f"method must be 'auto', 'dense' or 'sparse', not {method!r}")
    rel = tol.rank if scale is None else tol.rank_threshold(scale)
    split = local_mechanisms(C, joint_of, tol=tol)
    if split.count == 0:
        if method == "dense":
            return _dense(C, self_stress_cap, tol, rel)
        return _sparse(C, joint_of, self_stress_cap, tol, rel, later=stress_later)
    # The engine sees C restricted to the complement of the local mechanisms: same rank,
    # same non-zero singular values, same null space of C.T (see local_mechanisms).
    Cr = (C @ split.rest).tocsr()
    Cr.eliminate_zeros()
    try:
        if method == "dense":
            reduced = _dense(Cr, self_stress_cap, tol, rel)
        else:
            reduced = _sparse(Cr, split.joint_of, self_stress_cap, tol, rel, full=(C, joint_of),
                              later=stress_later)
    except InternalError as exc:  # what was known is the whole frame's, not the reduced one's
        if "free_coordinates" in exc.partial:
            exc.partial["free_coordinates"] = n
        raise
    L = split.local
    mech = np.asarray(split.rest @ reduced.mechanisms)
    stretch = np.sqrt(np.asarray((C @ L).multiply(C @ L).sum(axis=0)).ravel())
    largest_zero = max([float(stretch.max())] +
                       ([reduced.largest_zero] if reduced.largest_zero is not None else []))
    return RankDecision(rank=reduced.rank, mechanisms=mech, self_stress=reduced.self_stress,
                        self_stress_count=reduced.self_stress_count, s_max=reduced.s_max,
                        threshold=reduced.threshold, largest_zero=largest_zero,
                        smallest_nonzero=reduced.smallest_nonzero, method=reduced.method,
                        project=reduced.project, local_modes=L, rest=split.rest,
                        ordering=reduced.ordering if method == "sparse" else None,
                        shift=reduced.shift, tolerance=rel,
                        factorisation=reduced.factorisation)


def local_mechanisms(C: sp.spmatrix, joint_of: np.ndarray | None = None, *,
                     tol: Tolerances = DEFAULT) -> LocalSplit:
    """The mechanisms of each joint that its own members leave, found joint by joint.

    Let ``C_j`` be the columns of ``C`` at the free coordinates of joint
    ``j`` (one row per member at ``j``: the member's direction cosines in the
    joint's free basis, ``deg_j x c_j`` with ``c_j <= 3``).  A direction
    ``d`` with ``C_j d = 0`` (here: ``||C_j d|| <= tol.local_mechanism``, a
    right singular vector of ``C_j``) moves joint ``j`` alone and stretches
    no member: ``C E_j d = C_j d = 0`` with ``E_j`` the embedding of joint
    ``j``'s coordinates, so ``E_j d`` is a mechanism of the whole frame.
    These are the modes of a joint whose members span fewer directions than
    it is free to move in: every joint of a plane truss standing in space
    (out of its plane), a joint between two collinear members (sideways), a
    joint with no member.

    Why the split is exact.  Collect the local directions of every joint in
    the orthonormal, block-diagonal ``L`` (``N x l``) and an orthonormal
    complement of each joint's directions in ``T`` (``N x (N - l)``), so that
    ``[L T]`` is orthogonal.  Every ``x`` is ``L a + T b``, and ``C L = 0``, so
    ``C x = C T b``: ``x`` is a mechanism iff ``b`` is in the null space of
    ``C T``.  Hence::

        null(C) = span(L)  (+)  T null(C T)        (orthogonal direct sum)

    and, since ``C [L T] = [0  C T]`` with ``[L T]`` orthogonal, the non-zero
    singular values of ``C`` and ``C T`` are the same, ``rank C = rank C T``,
    ``range C = range C T`` and ``null(C.T) = null((C T).T)``: the states of
    self-stress, the projector onto them and every quantity built from the
    rank decision are those of ``C T``.  When ``C_j d`` is not exactly 0 but
    at most ``delta = tol.local_mechanism``, ``C`` differs by at most
    ``sqrt(2) delta`` in norm from a matrix for which the split is exact (a
    member meets at most two joints), and by Weyl's inequality no singular
    value moves farther than that: the rank decision is the same unless a
    singular value lies within ``sqrt(2) delta`` of the threshold
    ``tol.rank * s_max`` (which the rank decision's report then flags).

    Parameters
    ----------
    C : (m, N) sparse matrix
    joint_of : (N,) int, optional
        Joint of each column; each column its own joint when absent.
    tol : Tolerances, keyword-only
        ``tol.local_mechanism`` bounds ``||C_j d||`` for a local direction.

    Returns
    -------
    LocalSplit

    Notes
    -----
    One batched SVD of the ``deg_j x c_j`` blocks, grouped by shape: O(nnz(C))
    time and memory.
    """
    C = sp.coo_matrix(C)
    m, N = C.shape
    joint_of = np.arange(N) if joint_of is None else np.asarray(joint_of)
    if N == 0:
        empty = sp.csc_matrix((0, 0))
        return LocalSplit(empty, empty, np.zeros(0, dtype=np.int64))
    joints, jidx = np.unique(joint_of, return_inverse=True)
    nj = len(joints)
    count = np.bincount(jidx, minlength=nj)
    width = int(count.max())
    # the columns of each joint, in column order: colmat[j, a] is joint j's a-th coordinate
    by_joint = np.argsort(jidx, kind="stable")
    first = np.zeros(nj + 1, dtype=np.int64)
    np.cumsum(count, out=first[1:])
    slot = np.empty(N, dtype=np.int64)
    slot[by_joint] = np.arange(N) - first[jidx[by_joint]]
    colmat = np.full((nj, width), -1, dtype=np.int64)
    colmat[jidx, slot] = np.arange(N)
    # one row per (member, joint) end: the member's cosines in the joint's coordinates
    keep = C.data != 0
    rows, cols, vals = C.row[keep], C.col[keep], C.data[keep]
    ends, end_of = np.unique(rows.astype(np.int64) * nj + jidx[cols], return_inverse=True)
    end_joint = ends % nj
    vec = np.zeros((len(ends), width))
    vec[end_of, slot[cols]] = vals
    deg = np.bincount(end_joint, minlength=nj)
    efirst = np.zeros(nj + 1, dtype=np.int64)
    np.cumsum(deg, out=efirst[1:])
    order = np.argsort(end_joint, kind="stable")
    pos = np.empty(len(ends), dtype=np.int64)
    pos[order] = np.arange(len(ends)) - efirst[end_joint[order]]

    null_count = np.zeros(nj, dtype=np.int64)
    vt_all = {}
    for dg, c in sorted(set(zip(deg.tolist(), count.tolist()))):
        if c == 0:
            continue
        group = np.flatnonzero((deg == dg) & (count == c))
        if dg == 0:
            null_count[group] = c
            vt_all[(dg, c)] = (group, np.broadcast_to(np.eye(c), (len(group), c, c)))
            continue
        where = np.full(nj, -1, dtype=np.int64)
        where[group] = np.arange(len(group))
        sel = np.flatnonzero(where[end_joint] >= 0)
        A = np.zeros((len(group), dg, c))
        A[where[end_joint[sel]], pos[sel], :] = vec[sel, :c]
        if dg >= c:
            # screen with the c x c Gram matrices, whose eigenvalues s**2 come out to about
            # 1e-15 absolute (rows of norm <= 1): a joint whose smallest s**2 exceeds
            # (1e4 tol.local_mechanism)**2 = 1e-10 has no s <= tol.local_mechanism and
            # needs no SVD
            lam = np.linalg.eigvalsh(np.einsum("gra,grb->gab", A, A))[:, 0]
            pick = np.flatnonzero(lam <= (1e4 * tol.local_mechanism) ** 2)
            group, A = group[pick], A[pick]
            if not len(group):
                continue
        _, s, vt = np.linalg.svd(A, full_matrices=True)
        s_pad = np.zeros((len(group), c))
        s_pad[:, :s.shape[1]] = s
        nulls = np.sum(s_pad <= tol.local_mechanism, axis=1)
        null_count[group] = nulls
        vt_all[(dg, c)] = (group, vt)

    rest_count = count - null_count
    rfirst = np.zeros(nj + 1, dtype=np.int64)
    np.cumsum(rest_count, out=rfirst[1:])
    lfirst = np.zeros(nj + 1, dtype=np.int64)
    np.cumsum(null_count, out=lfirst[1:])
    # joints with no local direction keep their own unit coordinates
    plain = np.flatnonzero(null_count == 0)
    pc = colmat[plain]
    mask = pc >= 0
    t_rows = [pc[mask]]
    t_cols = [(rfirst[plain][:, None] + np.arange(width)[None, :])[mask]]
    t_vals = [np.ones(int(mask.sum()))]
    l_rows, l_cols, l_vals = [], [], []
    for (dg, c), (group, vt) in vt_all.items():
        nulls = null_count[group]
        for nl in np.unique(nulls[nulls > 0]).tolist():
            g = group[nulls == nl]
            V = np.asarray(vt)[nulls == nl]                  # (G, c, c): rows are directions
            loc = V[:, c - nl:, :].copy()                   # (G, nl, c)
            big = np.argmax(np.abs(loc), axis=2)
            sign = np.sign(np.take_along_axis(loc, big[:, :, None], axis=2))
            loc *= np.where(sign == 0, 1.0, sign)
            W = V[:, :c - nl, :]                            # (G, c - nl, c)
            cm = colmat[g, :c]                              # (G, c)
            l_rows.append(np.broadcast_to(cm[:, None, :], loc.shape).ravel())
            l_cols.append(np.broadcast_to((lfirst[g][:, None] + np.arange(nl))[:, :, None],
                                          loc.shape).ravel())
            l_vals.append(loc.ravel())
            if c - nl:
                t_rows.append(np.broadcast_to(cm[:, None, :], W.shape).ravel())
                t_cols.append(np.broadcast_to(
                    (rfirst[g][:, None] + np.arange(c - nl))[:, :, None], W.shape).ravel())
                t_vals.append(W.ravel())
    l_tot, r_tot = int(lfirst[-1]), int(rfirst[-1])
    cat = (lambda parts: np.concatenate(parts) if parts else np.zeros(0))
    local = sp.csc_matrix((cat(l_vals), (cat(l_rows).astype(np.int64),
                                         cat(l_cols).astype(np.int64))), shape=(N, l_tot))
    rest = sp.csc_matrix((cat(t_vals), (cat(t_rows).astype(np.int64),
                                        cat(t_cols).astype(np.int64))), shape=(N, r_tot))
    local.eliminate_zeros()
    rest.eliminate_zeros()
    return LocalSplit(local=local, rest=rest, joint_of=np.repeat(joints, rest_count))


def _dense(C, cap, tol, rel) -> RankDecision:
    m, n = C.shape
    A = C.toarray()
    if A.size == 0:
        u, s, vt = np.eye(m), np.zeros(0), np.eye(n)
    else:
        u, s, vt = np.linalg.svd(A, full_matrices=True)
    s_max = float(s[0]) if s.size else 0.0
    threshold = rel * s_max
    rank = int(np.sum(s > threshold)) if s_max > 0 else 0
    mech = vt[rank:].T
    null_t = u[:, rank:]
    stress = null_t if cap else u[:, :0]
    largest_zero = float(np.max(np.linalg.norm(A @ mech, axis=0))) if mech.shape[1] else None
    smallest = float(s[rank - 1]) if rank else None
    return RankDecision(rank=rank, mechanisms=mech, self_stress=stress,
                        self_stress_count=m - rank, s_max=s_max, threshold=threshold,
                        largest_zero=largest_zero, smallest_nonzero=smallest, method="dense",
                        project=_DenseProjector(null_t), tolerance=rel)


def _sparse(C, joint_of, cap, tol, rel, full=None, later=False) -> RankDecision:
    """The sparse engine on ``C``.

    ``full = (C0, joint_of0)``, when given, is the whole frame's matrix of
    which ``C`` is the restriction to the complement of the local
    mechanisms: the largest eigenvalue (the same) and the joint ordering are
    then taken from it, so that they do not depend on the split, and the
    ordering returned is that of ``C0``'s coordinates.
    """
    m, n = C.shape
    K = (C.T @ C).tocsc()
    K0 = K if full is None else (full[0].T @ full[0]).tocsc()
    if n == 0:
        return RankDecision(0, np.zeros((0, 0)), np.zeros((m, 0)), m, 0.0, 0.0, None, None,
                            "sparse", project=_EveryMember(m), tolerance=rel)
    if K.nnz == 0:  # no member touches a free coordinate
        stress = np.eye(m, min(cap, m))
        return RankDecision(0, np.eye(n), stress, m, 0.0, 0.0, 0.0, None, "sparse",
                            project=_EveryMember(m), tolerance=rel)
    lam_max = _largest_eigenvalue(K0, tol)
    s_max = float(np.sqrt(lam_max))
    threshold = rel * s_max
    tau = threshold ** 2
    if full is None:
        perm = ordering = _ordering(K, joint_of)
    else:
        joint_order = _joint_order(K0, full[1])
        ordering = _expand(joint_order, full[1], K0.shape[0])
        perm = _expand(joint_order, joint_of, n, like=full[1])
    Kp = K[perm][:, perm].tocsc()
    lu, tau = _shifted_ldl(Kp, tau, tol)
    k = lu.negative
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
        stress = None if later else stress_basis(project(stress_seeds(m, q)))
    else:
        stress = np.zeros((m, 0))
    return RankDecision(rank=rank, mechanisms=mech, self_stress=stress,
                        self_stress_count=m - rank,
                        s_max=s_max, threshold=threshold, largest_zero=largest_zero,
                        smallest_nonzero=smallest, method="sparse", project=project,
                        ordering=ordering, shift=tau / lam_max, tolerance=rel,
                        factorisation=lu.path)


def stress_seeds(m: int, q: int) -> np.ndarray:
    """The sparse engine's ``(m, q)`` seeded random member forces whose projections span states."""
    return np.random.default_rng(_SEED + 1).standard_normal((m, q))


def stress_basis(projected: np.ndarray) -> np.ndarray:
    """Orthonormal states of self-stress from the projections of :func:`stress_seeds`."""
    return np.linalg.qr(projected)[0]


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
    return _expand(_joint_order(K, joint_of), joint_of, K.shape[0])


def _joint_order(K, joint_of):
    """Nested-dissection order of the joints (METIS), or None for small matrices."""
    n = K.shape[0]
    if n < 64:
        return None
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
    return np.asarray(result[0] if isinstance(result, tuple) else result, dtype=np.int64)


def _expand(joint_perm, joint_of, n, like=None):
    """Coordinates in the order of their joints, each joint's coordinates kept together.

    ``joint_perm`` orders the joints of ``like`` (default ``joint_of``);
    ``joint_of`` may hold a subset of them (the coordinates left by the
    local split).
    """
    if joint_perm is None:
        return np.arange(n)
    if joint_of is None:
        joint_of = np.arange(n)
    joints = np.unique(joint_of if like is None else like)
    dof_joint = np.searchsorted(joints, joint_of)
    return np.argsort(np.argsort(joint_perm, kind="stable")[dof_joint], kind="stable")


class _SuperLU:
    """SuperLU's factorisation with the interface of :class:`pardiso.PardisoFactor`.

    With the diagonal as pivot throughout, ``U = D L.T`` and the signs of
    ``diag(U)`` are the inertia (``negative``, read on first use: it converts
    the factor).
    """

    path = "SuperLU"

    def __init__(self, lu):
        self.lu = lu

    @property
    def negative(self) -> int:
        return int(np.count_nonzero(self.lu.U.diagonal() < 0))

    def solve(self, B, out=None):
        X = self.lu.solve(np.asfortranarray(B))
        if out is None:
            return X
        out[...] = X
        return out


def _superlu(A):
    """SuperLU of ``A`` with diagonal pivots in the given order, or None where it pivoted."""
    n = A.shape[0]
    try:
        lu = spla.splu(A.tocsc(), permc_spec="NATURAL", diag_pivot_thresh=0.0,
                       options=dict(SymmetricMode=True))
    except RuntimeError:
        return None
    if np.array_equal(lu.perm_r, np.arange(n)) and np.array_equal(lu.perm_c, np.arange(n)):
        return _SuperLU(lu)
    return None


def _pardiso(A, definite: bool, tol: Tolerances):
    """PARDISO's factorisation of ``A`` when installed and worth it, else None.

    None too when it perturbed a pivot or the inertia it reports does not add
    up to the order (then the count would not be proof), or when it failed.
    """
    fn = pardiso.load() if A.shape[0] >= tol.limits.pardiso_engine else None
    if fn is None:
        return None
    try:
        f = pardiso.PardisoFactor(A, definite=definite, fn=fn)
    except pardiso.PardisoError:
        return None
    if f.perturbed or (not definite and f.negative + f.positive != A.shape[0]):
        f.free()
        return None
    return f


def _shifted_ldl(Kp, tau, tol: Tolerances = DEFAULT):
    """Factorisation of ``Kp - tau I`` whose negative pivots count the eigenvalues below ``tau``.

    PARDISO's ``L D L.T`` (:func:`_pardiso`) where it applies; otherwise
    SuperLU with diagonal pivots only.  SuperLU may still swap rows where a
    pivot is exactly zero; then the shift is moved a little and the
    factorisation repeated; the shift used is returned with it (and
    recorded in :attr:`RankDecision.shift`).
    """
    n = Kp.shape[0]
    eye = sp.identity(n, format="csc")
    fast = _pardiso(Kp - tau * eye, False, tol)
    if fast is not None:
        return fast, tau
    for attempt in range(4):
        lu = _superlu(Kp - tau * eye)
        if lu is not None:
            return lu, tau
        tau *= 1.37
    raise InternalError(f"the sparse engine could not factorise the shifted stiffness matrix "
                        f"K - tau I ({n} free coordinates) with diagonal pivots, after "
                        f"{attempt + 1} shifts; the dense engine (method='dense') may do for "
                        f"a small frame", stage="factorisation",
                        partial={"free_coordinates": n, "shifts_tried": attempt + 1})


def factorise_definite(A, *, tol: Tolerances = DEFAULT):
    """A factorisation of the positive definite ``A`` (rows in the order wanted), with ``solve``.

    PARDISO's Cholesky where it applies (as for :func:`_shifted_ldl`),
    SuperLU with diagonal pivots otherwise; ``.path`` says which.
    """
    fast = _pardiso(A, True, tol)
    if fast is not None:
        return fast
    return _SuperLU(spla.splu(A.tocsc(), permc_spec="NATURAL", diag_pivot_thresh=0.0,
                              options=dict(SymmetricMode=True)))


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
    Kr = rows_of_symmetric(Kp)
    for _ in range(iterations):
        X = lu.solve(X)
        X = np.ascontiguousarray(np.linalg.qr(X)[0])
        H = X.T @ (Kr @ X)
        theta, V = np.linalg.eigh((H + H.T) / 2)
        X = X @ V
    return X, theta


class _EveryMember:
    """The projector when no member touches a free coordinate: every force is self-stress."""

    def __init__(self, m):
        self.m = m

    def __call__(self, Y, out=None):
        Y = Y.toarray() if sp.issparse(Y) else np.array(Y, dtype=float)
        if out is None:
            return Y
        out[...] = Y
        return out

    def release(self) -> None:
        """Nothing kept between calls."""

    def redundancy(self, **_):
        return np.ones(self.m)


class _DenseProjector:
    """Projection onto the self-stress space from its orthonormal basis."""

    def __init__(self, basis):
        self.basis = basis

    def __call__(self, Y, out=None):
        return np.matmul(self.basis, np.asarray(self.basis.T @ Y), out=out)

    def release(self) -> None:
        """Nothing kept between calls."""

    def redundancy(self, **_):
        """Diagonal of the projector, ``(m,) float``: row norms of the basis, squared."""
        return np.sum(self.basis ** 2, axis=1)


class _RowBlocks:
    """A CSR matrix in blocks of rows, multiplied block by block into an array given.

    SciPy's sparse-times-dense returns a new array, zeroed by ``calloc``; one
    of tens of MiB is fresh pages of memory each time, slow to touch on a
    virtual machine.  The result of a block of ``rows`` rows is small enough
    for the C library to reuse memory it already has.  The blocks are views
    of the whole matrix's arrays (``A``), not copies.
    """

    def __init__(self, A, rows: int = 4096):
        A = self.A = sp.csr_matrix(A)
        self.shape = A.shape
        ptr = A.indptr
        self.parts = [(lo, hi, sp.csr_matrix((A.data[ptr[lo]:ptr[hi]], A.indices[ptr[lo]:ptr[hi]],
                                              ptr[lo:hi + 1] - ptr[lo]), shape=(hi - lo, A.shape[1])))
                      for lo, hi in ((lo, min(lo + rows, A.shape[0]))
                                     for lo in range(0, A.shape[0], rows))]

    def into(self, X: np.ndarray, out: np.ndarray, *, minus: np.ndarray | None = None,
             negate: bool = False) -> np.ndarray:
        """``out = A @ X``, ``minus - A @ X`` or (``negate``) ``-A @ X``; ``X`` row-major."""
        for lo, hi, A in self.parts:
            if minus is not None:
                np.subtract(minus[lo:hi], A @ X, out=out[lo:hi])
            elif negate:
                np.negative(A @ X, out=out[lo:hi])
            else:
                out[lo:hi] = A @ X
        return out


class _Projector:
    """Projection of member force vectors onto null(C.T), the states of self-stress.

    ``t = y - C x`` with ``K x = C.T y``: the residual of the least-squares fit
    of ``y`` by member elongations is orthogonal to every column of ``C``.
    ``C.T y`` lies in the range of ``K``; the solve with the factorisation of
    ``K - tau I`` is followed by a step of iterative refinement for each column
    whose residual exceeds ``tol.refine`` of its right-hand side, and by the removal of any
    mechanism component (``C`` maps it to zero anyway).

    Everything is held in the factorisation's order of coordinates (``C``'s
    columns and the mechanisms' rows permuted once), and a block of columns
    is worked in three arrays of ``n x block`` kept from block to block, the
    sparse products written into them a block of rows at a time
    (:class:`_RowBlocks`): a new array of tens of MiB at every step costs
    fresh pages of memory.  ``Y`` may be sparse (a product force reaches a
    few members): ``C.T y`` is then a sparse product.  Columns are taken
    ``_BLOCK`` at a time with SuperLU, and ``PardisoFactor.block`` at a time
    (a few dozen for 10^5 coordinates) with PARDISO, whose solve gains from
    more (:attr:`block`).
    """

    def __init__(self, C, Kp, lu, perm, mech, tol: Tolerances = DEFAULT):
        self.lu, self.perm = lu, perm
        self.m = C.shape[0]
        self.refine, self.max_solves = tol.refine, tol.limits.redundancy_max
        Cp = sp.csr_matrix(C)[:, perm]               # C with its columns in the factor's order
        self._C, self._CT = _RowBlocks(Cp), _RowBlocks(Cp.T)
        self._K = _RowBlocks(rows_of_symmetric(Kp))
        self._mech = np.ascontiguousarray(mech[perm])
        self._work = np.zeros((3, 0))

    def __call__(self, Y, out: np.ndarray | None = None):
        """``P Y`` for ``Y`` of shape ``(m,)`` or ``(m, q)``, dense or sparse; ``out``, an
        ``(m, q)`` float array, receives it where given."""
        sparse = sp.issparse(Y)
        Y = sp.csc_matrix(Y, dtype=float) if sparse else np.asarray(Y, dtype=float)
        flat = Y.ndim == 1
        Y = Y[:, None] if flat else Y
        T = np.empty(Y.shape) if out is None else out
        if T.shape != Y.shape:
            raise ValueError(f"out has shape {T.shape}, not {Y.shape}")
        block = self.block
        for lo in range(0, Y.shape[1], block):
            hi = min(lo + block, Y.shape[1])
            self._block(Y[:, lo:hi], T[:, lo:hi], sparse)
        return T[:, 0] if flat else T

    def release(self) -> None:
        """Give back the work arrays kept between calls (taken again on the next)."""
        self._work = np.zeros((3, 0))

    def _views(self, b: int):
        """Three ``(n, b)`` arrays of the kept work space: the right-hand sides and the
        solve's output column-major, the solution row-major (for the sparse products)."""
        n = self._CT.shape[0]
        if self._work.shape[1] < n * b:
            self._work = np.empty((3, n * b))
        rhs, x, xc = (self._work[i, :n * b] for i in range(3))
        return rhs.reshape((n, b), order="F"), x.reshape((n, b), order="F"), xc.reshape(n, b)

    def _block(self, y, t: np.ndarray, sparse: bool) -> None:
        lu, mech = self.lu, self._mech
        rhs, x, xc = self._views(y.shape[1])
        if sparse:
            rhs[...] = 0.0
            part = (self._CT.A @ y).tocoo()
            rhs[part.row, part.col] = part.data
        else:
            y = np.ascontiguousarray(y)
            self._CT.into(y, rhs)
        lu.solve(rhs, out=x)
        xc[...] = x
        r = self._K.into(xc, x, minus=rhs)           # the residual, in the solve's array
        # a step of refinement for each column whose residual asks for one
        size = (lambda a: np.sqrt(np.einsum("ij,ij->j", a, a)))
        bad = size(r) > self.refine * size(rhs)
        if bad.all():
            xc += lu.solve(r, out=rhs)
        elif bad.any():
            xc[:, bad] += lu.solve(np.asfortranarray(r[:, bad]))
        if mech.shape[1]:
            xc -= np.matmul(mech, mech.T @ xc, out=rhs)
        if sparse:                                    # a CSC block: no repeated entries
            self._C.into(xc, t, negate=True)
            y = y.tocoo()
            t[y.row, y.col] += y.data
        else:
            self._C.into(xc, t, minus=y)

    @property
    def block(self) -> int:
        """Columns per solve: ``_BLOCK`` with SuperLU; with PARDISO its preference
        (``PardisoFactor.block``), kept to 32 MiB of member forces per block but at
        least 32 columns (see there)."""
        fast = getattr(self.lu, "block", None)
        return _BLOCK if fast is None else int(min(fast, max(32, BLOCK_ENTRIES // self.m)))

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
        C, lu, mech = self._C.A, self.lu, self._mech
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
            Z = lu.solve(np.asfortranarray(E))
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
    return canonical_pivots(B, tol=tol)[0]


def canonical_pivots(B: np.ndarray, *, tol: Tolerances = DEFAULT):
    """:func:`canonical_basis` with its pivots and the pivoted QR's ``|R_ii|``.

    Returns
    -------
    E : (N, k) float
    piv : (k,) int
        Pivot row of each column (``E[piv] = I`` before the scaling).
    weight : (k,) float
        ``|R_ii|`` of the column-pivoted QR, non-increasing: the order in which
        the pivots were taken.
    """
    N, k = B.shape
    if k == 0:
        return B.copy(), np.zeros(0, dtype=np.int64), np.zeros(0)
    Q = _orthonormal(B)
    R, piv = _pivoted_rows(Q)
    E = np.linalg.solve(Q[piv, :].T, Q.T).T  # E[piv] = I
    E /= np.max(np.abs(E), axis=0)[None, :]
    E[np.abs(E) < tol.echelon_zero] = 0.0
    return E, piv, np.abs(np.diag(R))[:k]


def _orthonormal(B: np.ndarray) -> np.ndarray:
    """An orthonormal basis of the columns of the full-rank ``B`` (``N x k``).

    A tall, thin, well-conditioned ``B`` (the engine's bases are orthonormal
    already) by Cholesky QR twice (Fukaya et al. [4]_: orthogonal to rounding
    when ``cond(B) < 1e8``; here at most ``1e6`` is let through): two passes
    of BLAS-3 over ``B`` where Householder QR makes ``2 k`` passes.
    Householder QR otherwise.

    .. [4] T. Fukaya, Y. Nakatsukasa, Y. Yanagisawa and Y. Yamamoto,
       "CholeskyQR2: a simple and communication-avoiding algorithm for
       computing a tall-skinny QR factorization on a large-scale parallel
       system", ScalA 2014, 31-38.
    """
    N, k = B.shape
    if N >= 64 * k:
        G = B.T @ B
        w = np.linalg.eigvalsh(G)
        if w[0] > 1e-12 * w[-1]:
            Q = sla.solve_triangular(np.linalg.cholesky(G), B.T, lower=True).T
            Q = sla.solve_triangular(np.linalg.cholesky(Q.T @ Q), Q.T, lower=True).T
            return np.ascontiguousarray(Q)
    return np.linalg.qr(B)[0]


def _pivoted_rows(Q: np.ndarray):
    """The column-pivoted QR of ``Q.T`` (LAPACK's ``geqp3``): its ``R`` and ``k`` pivots.

    The pivot of each step is the row of ``Q`` whose part orthogonal to the
    rows already taken is longest, and that length is ``|R_ii|``, which does
    not increase from step to step.  A row of norm ``t`` can never beat a
    length above ``t``, so the decomposition is run on the longest rows only
    (in their order in ``Q``, so that ties go to the same row): when ``|R_kk|``
    exceeds every norm left out, each step's choice among all rows was
    among them, and the pivots and ``R`` are those of the whole; otherwise
    more rows are taken.  Each column's arithmetic in ``geqp3`` is its own, so
    the result is that of the whole decomposition (to the BLAS's rounding).
    """
    N, k = Q.shape
    norms = np.einsum("ij,ij->i", Q, Q)
    take = 64 * k
    while True:
        if take >= N:
            rows = np.arange(N)
            cut = -np.inf
        else:
            part = np.argpartition(-norms, take)
            rows = np.sort(part[:take])
            cut = float(np.sqrt(norms[part[take:]].max()))
        _, R, piv = sla.qr(Q[rows].T, mode="economic", pivoting=True)
        if len(rows) == N or abs(R[k - 1, k - 1]) > cut:
            return R, rows[piv[:k]]
        take *= 4


def canonical_split(local: sp.csc_matrix, rest: np.ndarray, joint_of: np.ndarray, *,
                    tol: Tolerances = DEFAULT):
    """:func:`canonical_basis` of ``span(local) (+) span(rest)``, block by block.

    The column-pivoted QR behind the canonical basis acts on the rows of an
    orthonormal basis ``Q``; two coordinates ``a`` and ``b`` interact only
    through ``(Q Q.T)[a, b]``.  Split the space into blocks with disjoint
    coordinate supports (each local mode's joint, unless ``rest`` moves that
    joint, and ``rest`` with the local modes of the joints it moves); then
    ``Q Q.T`` is block diagonal, each block's pivots and echelon vectors are
    those of the block alone, and the greedy pivot order of the whole is the
    merge of the blocks' orders by ``|R_ii|`` (ties to the lower coordinate,
    as LAPACK takes the first of equal columns).  So the result is that of
    ``canonical_pivots(hstack([local, rest]))``, to rounding, at the cost of
    the coupled block only.

    Parameters
    ----------
    local : (N, l) sparse
        Orthonormal local mechanisms, each confined to one joint.
    rest : (N, g) float
        Orthonormal, orthogonal to ``local``.
    joint_of : (N,) int
    tol : Tolerances, keyword-only
        ``tol.echelon_zero``: entries of ``rest`` below it move no coordinate,
        and entries of the result below it become 0, as in :func:`canonical_basis`.

    Returns
    -------
    E : (N, l + g) scipy.sparse.csc_matrix
        The canonical basis, columns in pivot order.
    piv : (l + g,) int

    Notes
    -----
    Cost O(nnz(local)) plus O(N_c g_c^2) for the coupled block of ``N_c``
    coordinates and ``g_c`` vectors.
    """
    import heapq

    local = sp.csc_matrix(local)
    N, l = local.shape
    g = rest.shape[1]
    lrow = local.indices[local.indptr[:-1]] if l else np.zeros(0, dtype=np.int64)
    ljoint = joint_of[lrow]
    moved = np.abs(rest).max(axis=1) > tol.echelon_zero if g else np.zeros(N, dtype=bool)
    touch = np.zeros(l, dtype=bool)
    if l:
        touch = np.maximum.reduceat(moved[local.indices].astype(np.int8),
                                    local.indptr[:-1]).astype(bool) \
            if local.nnz else touch
    coupled_joints = np.unique(ljoint[touch])
    coupled = np.isin(ljoint, coupled_joints)
    rows = np.flatnonzero(moved | np.isin(joint_of, coupled_joints))
    blocks = []                                   # (weights, pivots, (rows, values) per column)
    if g or coupled.any():
        B = np.hstack([rest[rows], local[rows][:, np.flatnonzero(coupled)].toarray()])
        E, piv, w = canonical_pivots(B, tol=tol)
        cols = [(rows[np.flatnonzero(E[:, i])], E[np.flatnonzero(E[:, i]), i])
                for i in range(E.shape[1])]
        blocks.append(list(zip(w.tolist(), rows[piv].tolist(), cols)))
    free = np.flatnonzero(~coupled)
    by_joint = {}
    for i in free.tolist():
        by_joint.setdefault(int(ljoint[i]), []).append(i)
    single = [c[0] for c in by_joint.values() if len(c) == 1]
    if single:
        sub = local[:, single]
        for i in range(sub.shape[1]):
            r = sub.indices[sub.indptr[i]:sub.indptr[i + 1]]
            v = sub.data[sub.indptr[i]:sub.indptr[i + 1]]
            top = int(np.argmax(np.abs(v)))
            e = v / v[top]
            e[np.abs(e) < tol.echelon_zero] = 0.0
            keep = e != 0
            blocks.append([(abs(v[top]) / np.linalg.norm(v), int(r[top]), (r[keep], e[keep]))])
    for cols in (c for c in by_joint.values() if len(c) > 1):
        sub = local[:, cols]
        r = np.unique(sub.indices)
        E, piv, w = canonical_pivots(sub[r].toarray(), tol=tol)
        blocks.append([(wi, int(r[p]), (r[np.flatnonzero(E[:, i])], E[np.flatnonzero(E[:, i]), i]))
                       for i, (wi, p) in enumerate(zip(w.tolist(), piv.tolist()))])
    merged = list(heapq.merge(*blocks, key=lambda item: (-item[0], item[1])))
    k = len(merged)
    piv = np.array([item[1] for item in merged], dtype=np.int64)
    indptr = np.zeros(k + 1, dtype=np.int64)
    np.cumsum([len(item[2][0]) for item in merged], out=indptr[1:])
    indices = np.concatenate([item[2][0] for item in merged]) if k else np.zeros(0, np.int64)
    data = np.concatenate([item[2][1] for item in merged]) if k else np.zeros(0)
    E = sp.csc_matrix((data, indices, indptr), shape=(N, k))
    E.sort_indices()
    return E, piv
