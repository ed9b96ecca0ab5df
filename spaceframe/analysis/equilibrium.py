"""The compatibility (equilibrium) matrix of a pin-jointed frame.

For a frame of ``m`` members and ``n`` joints in ``d`` dimensions, the
compatibility matrix ``C`` maps joint displacements to member elongations,
``e = C u``; its transpose is the equilibrium matrix, ``C.T t = f`` for member
tensions ``t`` and joint loads ``f`` (Pellegrino & Calladine, 1986 [1]_).  The
row of member ``k`` from joint ``a`` to joint ``b`` holds ``-w`` at ``a`` and
``+w`` at ``b``, ``w`` the unit vector from ``a`` to ``b``.  Rows are direction
cosines, so the matrix is dimensionless and its rank does not depend on units.

Restraints are eliminated exactly: each joint's displacement is written in an
orthonormal basis of the directions its support leaves free, so an inclined
roller removes exactly its own direction.  The columns of ``C`` are these free
coordinates ("degrees of freedom").

References
----------
.. [1] S. Pellegrino and C. R. Calladine, "Matrix analysis of statically and
   kinematically indeterminate frameworks", Int. J. Solids Struct. 22(4),
   409-428, 1986.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

from ..model import Frame
from ..tolerances import DEFAULT, Tolerances

__all__ = ["FreeDofs", "free_dofs", "compatibility_matrix", "axial_stiffness", "stiffness_matrix",
           "rigid_body_motions",
           "to_joint_displacements"]


@dataclass(frozen=True)
class FreeDofs:
    """The degrees of freedom left by the supports.

    Attributes
    ----------
    basis : (n, d, d) float
        ``basis[j, :, a]`` is the ``a``-th free direction of joint ``j`` (unit
        vector); columns ``a >= count[j]`` are zero.
    count : (n,) int
        Number of free directions of each joint (``d`` minus its restraints).
    offset : (n + 1,) int
        Index of each joint's first free coordinate; joint ``j`` owns
        coordinates ``offset[j]:offset[j + 1]``.
    """

    basis: np.ndarray
    count: np.ndarray
    offset: np.ndarray

    @property
    def total(self) -> int:
        return int(self.offset[-1])

    def joint_of(self) -> np.ndarray:
        """Joint index of every free coordinate, ``(total,) int``."""
        return np.repeat(np.arange(len(self.count)), self.count)


def free_dofs(frame: Frame, *, tol: Tolerances = DEFAULT) -> FreeDofs:
    """Orthonormal bases of the directions each joint is free to move in.

    An unsupported joint keeps the global axes.  A joint held along axes keeps
    the remaining axes exactly.  A joint held along other directions gets the
    orthogonal complement of them, from an SVD, with each vector's largest
    component made positive so that the result is deterministic.
    ``tol.axis_restraint`` decides which restraint directions are axes.

    Notes
    -----
    Cost O(n d^2 + k d^3) for ``n`` joints and ``k`` supported joints.
    """
    n, d = frame.n_joints, frame.dimension
    basis = np.broadcast_to(np.eye(d), (n, d, d)).copy()
    count = np.full(n, d, dtype=np.int64)
    rj, rd = frame.restraint_joint, frame.restraint_dir
    if len(rj):
        order = np.argsort(rj, kind="stable")
        rj, rd = rj[order], rd[order]
        starts = np.flatnonzero(np.r_[True, rj[1:] != rj[:-1]])
        for s, e in zip(starts, np.r_[starts[1:], len(rj)]):
            j, held = int(rj[s]), rd[s:e]
            basis[j] = 0.0
            free = _complement(held, d, tol)
            basis[j, :, :free.shape[1]] = free
            count[j] = free.shape[1]
    offset = np.zeros(n + 1, dtype=np.int64)
    np.cumsum(count, out=offset[1:])
    return FreeDofs(basis=basis, count=count, offset=offset)


def _complement(held: np.ndarray, d: int, tol: Tolerances) -> np.ndarray:
    """Orthonormal basis ``(d, d - k)`` of the directions orthogonal to ``held``."""
    axis_rows = np.isclose(np.abs(held), 1.0, rtol=0, atol=tol.axis_restraint).any(axis=1) & \
        (np.count_nonzero(held, axis=1) == 1)
    if axis_rows.all():
        held_axes = set(np.argmax(np.abs(held), axis=1).tolist())
        return np.eye(d)[:, [a for a in range(d) if a not in held_axes]]
    _, _, vt = np.linalg.svd(held, full_matrices=True)
    free = vt[len(held):].T.copy()
    for a in range(free.shape[1]):
        v = free[:, a]
        if v[np.argmax(np.abs(v))] < 0:
            free[:, a] = -v
    return free


def compatibility_matrix(frame: Frame, dofs: FreeDofs | None = None) -> sp.csr_matrix:
    """The compatibility matrix ``C``, members × free coordinates, sparse.

    Parameters
    ----------
    frame : Frame
    dofs : FreeDofs, optional
        From :func:`free_dofs`; computed when not given.

    Returns
    -------
    C : (m, dofs.total) scipy.sparse.csr_matrix of float
        Row ``k`` is ``-w_k`` at the start joint's free coordinates and
        ``+w_k`` at the end joint's, ``w_k`` the member's unit vector, each
        expressed in the joint's free basis.  Entries that a support removes
        are absent; exact zeros are dropped.

    Notes
    -----
    Cost O(m d^2) time and O(m d) memory.
    """
    dofs = dofs or free_dofs(frame)
    d = frame.dimension
    a, b = frame.ends[:, 0], frame.ends[:, 1]
    vec = frame.coords[b] - frame.coords[a]
    w = vec / np.linalg.norm(vec, axis=1)[:, None]
    m = len(w)
    rows, cols, vals = [], [], []
    for joint, sign in ((a, -1.0), (b, 1.0)):
        local = sign * np.einsum("md,mda->ma", w, dofs.basis[joint])  # (m, d)
        col = dofs.offset[joint][:, None] + np.arange(d)[None, :]
        keep = np.arange(d)[None, :] < dofs.count[joint][:, None]
        rows.append(np.broadcast_to(np.arange(m)[:, None], (m, d))[keep])
        cols.append(col[keep])
        vals.append(local[keep])
    C = sp.csr_matrix((np.concatenate(vals), (np.concatenate(rows), np.concatenate(cols))),
                      shape=(m, dofs.total))
    C.eliminate_zeros()
    return C


def axial_stiffness(lengths, ea=None) -> np.ndarray:
    """Each member's axial stiffness ``EA / L``, ``(m,) float``; ``EA`` uniform (1) when None.

    Parameters
    ----------
    lengths : (m,) float
        Member lengths.
    ea : (m,) float, optional
        Axial stiffnesses (the model's ``[properties.members.EA]``; only ratios matter).
    """
    lengths = np.asarray(lengths, float)
    return (np.ones(len(lengths)) if ea is None else np.asarray(ea, float)) / lengths


def stiffness_matrix(C: sp.spmatrix, lengths, ea=None) -> sp.csc_matrix:
    """The stiffness matrix ``K = C.T diag(EA / L) C`` on the free coordinates, CSC.

    Cost O(nnz(C) * (joint degree)).
    """
    return (C.T @ sp.diags(axial_stiffness(lengths, ea)) @ C).tocsc()


def to_joint_displacements(vectors: np.ndarray, dofs: FreeDofs) -> np.ndarray:
    """Map free-coordinate vectors to joint displacement vectors.

    Parameters
    ----------
    vectors : (total, k) float
        Columns in free coordinates.

    Returns
    -------
    (k, n, d) float
        Displacement of every joint in every column, global axes.
    """
    n, d = len(dofs.count), dofs.basis.shape[1]
    k = vectors.shape[1]
    padded = np.zeros((n, d, k))
    joint = dofs.joint_of()
    slot = np.arange(dofs.total) - dofs.offset[joint]
    padded[joint, slot, :] = vectors
    return np.einsum("nda,nak->knd", dofs.basis, padded)


def joint_displacement_map(dofs: FreeDofs) -> sp.csr_matrix:
    """The sparse matrix taking free-coordinate vectors to joint displacements.

    Returns
    -------
    (n d, total) scipy.sparse.csr_matrix
        ``M @ v`` is :func:`to_joint_displacements` of one column ``v``,
        flattened joint by joint (joint ``j``'s movement is rows ``j d ..
        j d + d - 1``).  Cost O(total d); applying it to ``k`` sparse columns
        costs O(d nnz).
    """
    n, d = len(dofs.count), dofs.basis.shape[1]
    joint = dofs.joint_of()
    slot = np.arange(dofs.total) - dofs.offset[joint]
    rows = (joint[:, None] * d + np.arange(d)[None, :]).ravel()
    cols = np.repeat(np.arange(dofs.total), d)
    vals = dofs.basis[joint, :, slot].ravel()        # (total, d): each coordinate's direction
    return sp.csr_matrix((vals, (rows, cols)), shape=(n * d, dofs.total))


def rigid_body_motions(frame: Frame, dofs: FreeDofs, *, tol: Tolerances = DEFAULT) -> np.ndarray:
    """Rigid-body motions of the whole frame that its supports permit.

    The motions of the frame as one rigid body (``d`` translations and, in
    space, three rotations; in the plane, one) are formed about the centroid
    with lever arms divided by the frame's size, so translations and
    rotations are of the same scale.  Those the joints' positions make
    dependent (all joints on one line: the spin about that line moves
    nothing) are dropped; of the rest, only combinations that move no joint
    along a restrained direction are kept.

    Returns
    -------
    (dofs.total, r) float
        Orthonormal columns in free coordinates; ``r`` is the number of
        rigid-body modes.  Each column lies exactly in the null space of the
        compatibility matrix.

    Notes
    -----
    Cost O(n d r^2) with ``r <= 6``.
    """
    n, d = frame.n_joints, frame.dimension
    x = frame.coords - frame.coords.mean(axis=0)
    scale = frame.size() or 1.0
    x = x / scale
    motions = [np.tile(np.eye(d)[a], (n, 1)) for a in range(d)]
    if d == 3:
        for a in range(3):
            motions.append(np.cross(np.eye(3)[a], x))
    else:
        motions.append(np.c_[-x[:, 1], x[:, 0]])
    G = np.stack([mo.ravel() for mo in motions], axis=1)  # (n d, r0)
    u, s, _ = np.linalg.svd(G, full_matrices=False)
    G = u[:, s > tol.rank * s[0]] if s.size and s[0] > 0 else G[:, :0]
    if len(frame.restraint_joint):
        Gj = G.reshape(n, d, -1)
        held = np.einsum("kd,kdr->kr", frame.restraint_dir, Gj[frame.restraint_joint])
        # only V is needed: the full U of thousands of restraints would cost O(k^2)
        _, s, vt = np.linalg.svd(held, full_matrices=held.shape[0] < held.shape[1])
        rank = int(np.sum(s > tol.rank * max(s[0], 1.0))) if s.size else 0
        G = G @ vt[rank:].T
    # Express in free coordinates: restrained components are zero, so projecting
    # onto each joint's free basis loses nothing.
    Gj = G.reshape(n, d, -1)
    local = np.einsum("nda,ndr->nar", dofs.basis, Gj)
    joint = dofs.joint_of()
    slot = np.arange(dofs.total) - dofs.offset[joint]
    R = local[joint, slot, :]
    if R.shape[1]:
        R, _ = np.linalg.qr(R)
    return R
