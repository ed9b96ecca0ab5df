"""Independent blocks of the compatibility matrix, and projections onto self-stress by block.

Members and free coordinates form a bipartite graph with an edge wherever
``C`` has a non-zero entry.  Its connected components split ``C`` into
blocks, ``C = diag(C_1, C_2, ...)`` after permuting rows and columns, and
then the null space of ``C.T`` (the states of self-stress) is the direct sum
of the blocks' own: the projector onto it is block diagonal too.  A roof of
plane trusses falls apart this way: each truss's members act only in its
plane, the purlins only across it, so every truss is a block of about a
hundred members and a member force vector within one truss projects within
that truss, by a small dense SVD, instead of by a solve with the whole
frame's factorisation.

References
----------
.. [1] S. Pellegrino and C. R. Calladine, "Matrix analysis of statically and
   kinematically indeterminate frameworks", Int. J. Solids Struct. 22(4),
   409-428, 1986 (the self-stress space as the null space of ``C.T``).
.. [2] G. H. Golub and C. F. Van Loan, "Matrix Computations", 4th ed., Johns
   Hopkins University Press, 2013, section 2.4 (the SVD and the projector
   onto a null space).
"""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp
from scipy.sparse.csgraph import connected_components

from ..tolerances import DEFAULT, Tolerances

__all__ = ["member_blocks", "project_sparse"]

_BATCH = 256   # columns per call of a projector that names no block of its own
_ROOM = 2 ** 24  # entries first set aside for the projections of the whole frame's columns


def member_blocks(C: sp.spmatrix) -> tuple[np.ndarray, np.ndarray]:
    """The block of every member and every free coordinate.

    Parameters
    ----------
    C : (m, N) sparse
        Compatibility matrix; explicit zeros are ignored.

    Returns
    -------
    member : (m,) int
        Block label of each member.
    coordinate : (N,) int
        Block label of each free coordinate (a coordinate no member touches is
        a block of its own).

    Notes
    -----
    Cost O(m + N + nnz(C)), one connected-components pass (scipy.sparse.csgraph).
    """
    C = sp.csr_matrix(C, copy=True)
    C.eliminate_zeros()
    m, N = C.shape
    A = sp.bmat([[None, C], [C.T, None]], format="csr")
    _, label = connected_components(A, directed=False)
    return label[:m], label[m:]


def project_sparse(C: sp.spmatrix, Y: sp.spmatrix, project, threshold: float, *,
                   dense: np.ndarray | None = None, tol: Tolerances = DEFAULT):
    """Orthogonal projection of sparse member force vectors onto the states of self-stress.

    Parameters
    ----------
    C : (m, N) sparse
        Compatibility matrix.
    Y : (m, k) sparse
        Member force vectors (columns).
    project : callable
        The whole frame's projector, ``(m, q) -> (m, q)`` dense
        (:attr:`spaceframe.analysis.nullspace.RankDecision.project`), used for
        the columns that reach a large block.
    threshold : float
        Singular values of ``C`` at or below it are zero (the engine's
        decision, ``tol.rank * s_max``).
    dense : (m, e) float, optional, keyword-only
        Further member force vectors, projected by ``project`` in the same
        calls as the columns that need it (the solves gain from more columns).
    tol : Tolerances, keyword-only
        A column whose members lie in one block with ``members x coordinates
        <= tol.limits.dense_engine`` is projected by that block's SVD (blocks of
        one shape in one batched call); the others by ``project``, its ``block``
        (else ``_BATCH``) columns at a time, keeping entries ``|t_e| > tol.sparse_drop *
        max |t|``.

    Returns
    -------
    (m, k) scipy.sparse.csc_matrix
        ``P y`` for each column, ``P`` the projector onto ``null(C.T)``.
    (m, e) float
        ``P`` of ``dense``, only when it was given (then a pair is returned).

    Notes
    -----
    Exact: ``P`` is block diagonal over :func:`member_blocks`, so the part of
    ``y`` in one block projects within it.  Cost: one SVD per block reached
    (O(b^3) for a block of ``b`` members; identical blocks, as the repeated
    frames of a roof give, share one) and ``ceil(k_large / block)`` calls
    of ``project`` for the ``k_large`` columns that reach a large block.
    """
    C = sp.csr_matrix(C, copy=True)
    C.eliminate_zeros()
    Y = sp.csc_matrix(Y, copy=True)
    Y.eliminate_zeros()
    m, k = Y.shape
    member, coordinate = member_blocks(C)
    # the block of each column (-1: several, or none)
    col = np.repeat(np.arange(k), np.diff(Y.indptr))
    lab = member[Y.indices]
    lo = np.full(k, np.iinfo(np.int64).max)
    hi = np.full(k, -1)
    np.minimum.at(lo, col, lab)
    np.maximum.at(hi, col, lab)
    block = np.where(lo == hi, hi, -1)
    nb = int(max(member.max(initial=-1), coordinate.max(initial=-1))) + 1
    row_pos, n_rows = _positions(member, nb)
    col_pos, n_cols = _positions(coordinate, nb)
    small = (block >= 0) & (n_rows[np.maximum(block, 0)] * n_cols[np.maximum(block, 0)]
                            <= tol.limits.dense_engine)
    pieces = []                     # (columns, their CSC block): each column's entries in row order
    # small blocks: a dense SVD each, batched over blocks of one shape, once per distinct block
    reached = np.unique(block[small])
    Cc = C.tocoo()
    Yc = Y.tocoo()
    take = small[Yc.col]
    y_row, y_col, y_val = Yc.row[take], Yc.col[take], Yc.data[take]
    y_block = block[y_col]
    order = np.lexsort((y_col, y_block))
    y_row, y_col, y_val, y_block = y_row[order], y_col[order], y_val[order], y_block[order]
    y_start = np.searchsorted(y_block, np.arange(nb + 1))
    members_of = _members_by_block(member, nb)
    shapes: dict = {}
    for b in reached.tolist():
        shapes.setdefault((int(n_rows[b]), int(n_cols[b])), []).append(b)
    for (mb, nc), group in shapes.items():
        slot = np.full(nb, -1)
        slot[group] = np.arange(len(group))
        here = slot[member[Cc.row]] >= 0
        stack = np.zeros((len(group), mb, nc))
        stack[slot[member[Cc.row[here]]], row_pos[Cc.row[here]], col_pos[Cc.col[here]]] = \
            Cc.data[here]
        # repeated frames give identical blocks: one SVD serves them all
        seen, leads, which = {}, [], []
        for g in range(len(group)):
            key = stack[g].tobytes()
            if key not in seen:
                seen[key] = len(leads)
                leads.append(g)
            which.append(seen[key])
        bases = _null_left(stack[leads], threshold)
        for g, b in enumerate(group):
            Q = bases[which[g]]                                # (mb, s_b)
            lo, hi = y_start[b], y_start[b + 1]
            cols, local = np.unique(y_col[lo:hi], return_inverse=True)
            Yb = np.zeros((mb, len(cols)))
            Yb[row_pos[y_row[lo:hi]], np.ravel(local)] = y_val[lo:hi]
            Pb = Q @ (Q.T @ Yb) if Q.shape[1] else np.zeros_like(Yb)
            pieces.append((cols, _columns(Pb, Pb != 0, rows=members_of[b], m=m)))
    # the rest: the whole frame's projector, a batch of columns at a time, the dense ones first
    rest = np.flatnonzero(~small)
    extra = np.zeros((m, 0)) if dense is None else np.asarray(dense, dtype=float)
    e = extra.shape[1]
    done = np.empty_like(extra)
    batch = getattr(project, "block", _BATCH)   # the projector's own block: no larger arrays
    # one array for every batch's projections (fresh memory is slow to touch), and the kept
    # entries written straight into arrays for all of them, grown by doubling (at most m
    # per column), so that they are not copied again when the batches are joined
    work = np.empty((m, min(batch, e + len(rest))), order="F")
    room = min(m * len(rest), _ROOM)
    data = np.empty(room)
    index = np.empty(room, dtype=np.int32 if m < 2 ** 31 else np.int64)
    counts = np.zeros(len(rest), dtype=np.int64)
    filled = 0
    for start in range(0, e + len(rest), batch):
        stop = min(start + batch, e + len(rest))
        ex = np.arange(start, min(stop, e))
        at = np.arange(max(start - e, 0), max(stop - e, 0))
        block = Y[:, rest[at]]          # sparse: the projector takes it so (C.T y sparse too)
        P = project(np.hstack([extra[:, ex], block.toarray()]) if len(ex) else block,
                    out=work[:, :stop - start])
        done[:, ex] = P[:, :len(ex)]
        for j, c in zip(range(len(ex), P.shape[1]), at):
            size = np.abs(P[:, j])
            kept = np.flatnonzero(size > tol.sparse_drop * size.max(initial=0.0))
            n = len(kept)
            if filled + n > len(data):
                room = max(2 * len(data), filled + n)
                data, index = _grown(data, room), _grown(index, room)
            data[filled:filled + n] = P[kept, j]
            index[filled:filled + n] = kept
            counts[c] = n
            filled += n
    if len(rest):
        indptr = np.zeros(len(rest) + 1, dtype=np.int64)
        np.cumsum(counts, out=indptr[1:])
        pieces.append((rest, sp.csc_matrix((data[:filled], index[:filled], indptr),
                                           shape=(m, len(rest)))))
    out = _gather(pieces, m, k)
    return out if dense is None else (out, done)


def _grown(a: np.ndarray, size: int) -> np.ndarray:
    """``a`` in a larger array of ``size`` entries (the rest unset)."""
    out = np.empty(size, dtype=a.dtype)
    out[:len(a)] = a
    return out


def _columns(P: np.ndarray, keep: np.ndarray, *, m: int, rows=None) -> sp.csc_matrix:
    """The entries of the dense ``P`` where ``keep``, as CSC columns (``rows``: its rows' indices)."""
    r, c = np.nonzero(keep.T)[::-1]          # column by column, rows ascending in each
    r = r if rows is None else rows[r]
    indptr = np.zeros(P.shape[1] + 1, dtype=np.int64)
    np.cumsum(np.bincount(c, minlength=P.shape[1]), out=indptr[1:])
    return sp.csc_matrix((P.T[keep.T], r, indptr), shape=(m, P.shape[1]))


def _gather(pieces, m: int, k: int) -> sp.csc_matrix:
    """The ``(m, k)`` CSC matrix whose columns ``cols`` are each piece's: one copy, no sort."""
    if not pieces:
        return sp.csc_matrix((m, k))
    cols = np.concatenate([c for c, _ in pieces])
    whole = pieces[0][1] if len(pieces) == 1 else sp.hstack([b for _, b in pieces], format="csc")
    if len(cols) == k and np.array_equal(cols, np.arange(k)):
        return whole
    place = np.full(k, len(cols))                 # a column no piece has: the empty one added
    place[cols] = np.arange(len(cols))
    whole = sp.hstack([whole, sp.csc_matrix((m, 1))], format="csc")
    return whole[:, place]


def _positions(label: np.ndarray, nb: int) -> tuple[np.ndarray, np.ndarray]:
    """Each item's position among those of its block (ascending), and each block's size."""
    size = np.bincount(label, minlength=nb)
    order = np.argsort(label, kind="stable")
    start = np.concatenate([[0], np.cumsum(size)[:-1]])
    pos = np.empty(len(label), dtype=int)
    pos[order] = np.arange(len(label)) - start[label[order]]
    return pos, size


def _members_by_block(label: np.ndarray, nb: int) -> list[np.ndarray]:
    """The (ascending) indices carrying each block label."""
    order = np.argsort(label, kind="stable")
    bounds = np.searchsorted(label[order], np.arange(nb + 1))
    return [order[bounds[b]:bounds[b + 1]] for b in range(nb)]


def _null_left(stack: np.ndarray, threshold: float) -> list[np.ndarray]:
    """Orthonormal bases of ``null(B.T)`` for each ``B`` of a ``(g, mb, nb)`` stack."""
    g, mb, nb = stack.shape
    if nb == 0:
        return [np.eye(mb) for _ in range(g)]
    U, s, _ = np.linalg.svd(stack, full_matrices=True)
    rank = np.sum(s > threshold, axis=1)
    return [U[i][:, rank[i]:] for i in range(g)]
