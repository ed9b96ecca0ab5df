"""Mechanisms an engineer can read: a local basis, a kind, and a sentence for each mode.

The raw null space of the compatibility matrix mixes every free motion of the
frame.  Here it is rotated into modes that each involve as few joints as
possible, each mode is classified, and described in a designer's words.

The local basis is the reduced echelon form of the mechanism space with
pivots chosen by column-pivoted QR (Golub & Van Loan [1]_, section 5.4.1):
each mode moves its own pivot coordinate and none of the other modes' pivots.
Any mechanism confined to one joint (a joint with no members, a joint between
collinear members, a joint free out of the plane of its members) has a pivot
at that joint and comes out as a mode of that joint alone.  Modes are then
taken in order of the number of joints they move (local, then regional, then
global), skipping any that the rigid-body motions and the modes already taken
span, until the internal mechanisms are counted out.  Rigid-body modes are
given as translations along principal directions first, then rotations,
each described by its axis.

References
----------
.. [1] G. H. Golub and C. F. Van Loan, "Matrix Computations", 4th ed., Johns
   Hopkins University Press, 2013.
.. [2] S. Pellegrino and C. R. Calladine, "Matrix analysis of statically and
   kinematically indeterminate frameworks", Int. J. Solids Struct. 22(4),
   409-428, 1986.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

from ..model import Frame
from ..modeset import ModeSet
from ..naming import (count, direction_words, join_words, joint_label, natural_key,
                      placed_joints, xyz)
from ..tolerances import DEFAULT, DISPLAY, Tolerances
from .nullspace import canonical_basis

__all__ = ["ModeInfo", "local_basis", "order_rigid", "describe_modes", "mode_context", "KINDS"]

#: A mode moving at most this many joints is "local".
LOCAL_JOINTS = 3
#: The kinds of mode, in the order they are tested.
KINDS = ("rigid-body", "local", "out-of-plane", "tie-line", "lean", "sway", "other")

_AXES = "xyz"


@dataclass(frozen=True)
class ModeInfo:
    """What one mechanism is, in words and ids.

    Attributes
    ----------
    kind : str
        One of :data:`KINDS`.
    joints : tuple of str
        Joints that move more than ``Display.moving`` of the largest movement, in
        natural order of their ids (``F2.L5, F2.L6, F2.L10``).
    members : tuple of str
        Members with an end at a moving joint.
    direction : (d,) float
        Dominant direction of movement (unit vector; for a rotation, the axis).
    frames : tuple of str
        For models with a ``frame`` tag: the frames the moving joints belong to.
    description : str
        One sentence for a designer.
    lines : tuple of str
        For a ``tie-line`` mode: the planar ids of the lines of joints that
        slide (``("U2",)``: joint U2 of every frame involved).
    pivots : tuple of str
        For a ``sway`` mode: the supported joints the moving members turn
        about (a portal's column bases).
    """

    kind: str
    joints: tuple[str, ...]
    members: tuple[str, ...]
    direction: np.ndarray
    frames: tuple[str, ...]
    description: str
    lines: tuple[str, ...] = ()
    pivots: tuple[str, ...] = ()


def local_basis(mech, rigid: np.ndarray, joint_of: np.ndarray, *,
                piv: np.ndarray | None = None, tol: Tolerances = DEFAULT):
    """Split the mechanism space into local internal modes and rigid-body modes.

    Parameters
    ----------
    mech : (N, k) float, or (N, k) scipy.sparse matrix
        Orthonormal basis of the mechanism space, free coordinates; or, sparse,
        its canonical basis already (:func:`~spaceframe.analysis.nullspace.canonical_split`)
        with its pivots ``piv``.  The sparse form gives the same modes without
        forming any dense ``N x k`` array.
    rigid : (N, r) float
        Orthonormal basis of the permitted rigid-body motions (inside
        ``span(mech)``).
    joint_of : (N,) int
        Joint of each free coordinate.
    tol : Tolerances, keyword-only
        ``tol.independent``: how much of a mode must be new to be taken.

    Returns
    -------
    internal : (N, k - r) float (scipy.sparse.csc_matrix for a sparse ``mech``)
        Internal modes, fewest moving joints first; each scaled so that its
        largest entry is 1 in magnitude.
    rigid : (N, r) float
        The rigid-body modes in canonical form.

    Notes
    -----
    Cost O(N k^2).
    """
    k, r = mech.shape[1], rigid.shape[1]
    if k == 0:
        return mech, rigid
    if sp.issparse(mech):
        return _local_basis_sparse(mech, piv, rigid, joint_of, tol), rigid
    E = canonical_basis(mech, tol=tol)
    spread = np.array([_joint_count(E[:, i], joint_of) for i in range(k)])
    order = np.lexsort((np.arange(k), spread))
    Q = rigid.copy()
    chosen = []
    for i in order:
        if len(chosen) == k - r:
            break
        v = E[:, i]
        res = v - Q @ (Q.T @ v) if Q.shape[1] else v
        nrm = np.linalg.norm(res)
        if nrm > tol.independent * np.linalg.norm(v):
            chosen.append(i)
            Q = np.hstack([Q, (res / nrm)[:, None]])
    return E[:, chosen], rigid


def _local_basis_sparse(E, piv, rigid, joint_of, tol):
    """:func:`local_basis` for a canonical basis held sparse.

    The loop of the dense form keeps mode ``v_i`` (in order of spread) unless
    it lies in the span of the rigid-body modes ``R`` and the modes kept before
    it.  Since ``E`` is 1 at its own pivot and 0 at the others', ``R = E A``
    with ``A = R[piv]`` (``k x r``), and ``v_i`` lies in that span exactly when
    row ``A[i]`` is not in the span of the rows of ``A`` that come after it
    (then some rigid-body motion is ``v_i`` plus later modes).  One backward
    pass over the rows finds those ``r`` modes: O(k r^2) instead of O(N k^2).
    """
    E = sp.csc_matrix(E)
    k, r = E.shape[1], rigid.shape[1]
    nj = int(joint_of.max()) + 1 if len(joint_of) else 0
    J = sp.csr_matrix((np.ones(len(joint_of)), (joint_of, np.arange(len(joint_of)))),
                      shape=(nj, len(joint_of)))
    S = sp.csc_matrix(J @ E.multiply(E))                  # squared joint movements
    S.data = np.sqrt(S.data)
    top = S.max(axis=0).toarray().ravel()
    col = np.repeat(np.arange(k), np.diff(S.indptr))
    spread = np.bincount(col[S.data > DISPLAY.moving * top[col]], minlength=k)
    order = np.lexsort((np.arange(k), spread))
    skip = set()
    if r:
        A = rigid[piv][order]
        scale = np.linalg.norm(A, axis=1).max()
        Q = np.zeros((r, 0))
        for t in range(k - 1, -1, -1):
            a = A[t] - Q @ (Q.T @ A[t]) if Q.shape[1] else A[t]
            nrm = np.linalg.norm(a)
            if nrm > tol.independent * scale:
                skip.add(t)
                Q = np.hstack([Q, (a / nrm)[:, None]])
                if Q.shape[1] == r:
                    break
    chosen = [order[t] for t in range(k) if t not in skip][:k - r]
    return E[:, chosen]


def order_rigid(rigid: np.ndarray, dofs, coords: np.ndarray | None = None, *,
                tol: Tolerances = DEFAULT) -> np.ndarray:
    """Rigid-body modes as pure translations first, then the rest (rotations).

    The translations permitted are the intersection of the rigid-body space
    with the span of the axis translations (principal vectors with cosine 1,
    Björck & Golub's principal angles); they come out along principal
    directions.  Each mode gets a deterministic sign (largest entry positive).
    ``tol.translation_rank``, ``tol.principal_cosine`` and ``tol.in_span``
    decide the translations and the rotations about axes.

    Returns
    -------
    (N, r) float, orthonormal columns.
    """
    r = rigid.shape[1]
    if r == 0:
        return rigid
    joint = dofs.joint_of()
    slot = np.arange(dofs.total) - dofs.offset[joint]
    T = dofs.basis[joint, :, slot]            # (N, d): axis translations in free coordinates
    u, s, _ = np.linalg.svd(T, full_matrices=False)
    T = u[:, s > tol.translation_rank * max(s.max(initial=0.0), 1e-300)]
    if T.shape[1]:
        a, cos, _ = np.linalg.svd(rigid.T @ T, full_matrices=True)
        nt = int(np.sum(cos >= 1 - tol.principal_cosine))
        R = rigid @ a
    else:
        nt, R = 0, rigid
    # echelon form within each block: the translations come out along the axes where the
    # supports allow that, and the sign and order are deterministic
    turns = _axis_turns(R[:, nt:], dofs, coords, tol) if coords is not None else R[:, nt:]
    out = np.hstack([canonical_basis(R[:, :nt], tol=tol), turns])
    for i in range(out.shape[1]):
        v = out[:, i]
        out[:, i] = v * np.sign(v[np.argmax(np.abs(v))]) / np.linalg.norm(v)
    return out


def _axis_turns(R: np.ndarray, dofs, coords: np.ndarray, tol: Tolerances) -> np.ndarray:
    """Rotations about axes parallel to x, y, z through the centroid, where the block has them.

    Each such rotation lying in ``span(R)`` is taken (Gram-Schmidt, in axis order); the rest
    of the block follows in echelon form.
    """
    r = R.shape[1]
    d = coords.shape[1]
    if r == 0 or d != 3:
        return canonical_basis(R, tol=tol)
    joint = dofs.joint_of()
    slot = np.arange(dofs.total) - dofs.offset[joint]
    x = coords - coords.mean(axis=0)
    kept = []
    for a in range(3):
        spin = np.cross(np.eye(3)[a], x)                       # (n, 3)
        v = np.einsum("nd,nd->n", dofs.basis[joint, :, slot], spin[joint]) \
            if dofs.total else np.zeros(0)
        nv = np.linalg.norm(v)
        if nv == 0 or np.linalg.norm(v - R @ (R.T @ v)) > tol.in_span * nv:
            continue
        for q in kept:
            v = v - q * (q @ v)
        if np.linalg.norm(v) > tol.in_span * nv:
            kept.append(v / np.linalg.norm(v))
    if not kept:
        return canonical_basis(R, tol=tol)
    K = np.array(kept).T
    rest = R - K @ (K.T @ R)
    u, s, _ = np.linalg.svd(rest, full_matrices=False)
    return np.hstack([K, canonical_basis(u[:, :r - K.shape[1]], tol=tol)])


def _joint_count(v, joint_of):
    size = np.zeros(joint_of.max() + 1 if len(joint_of) else 0)
    np.add.at(size, joint_of, v * v)
    size = np.sqrt(size)
    return int(np.sum(size > DISPLAY.moving * size.max())) if size.size and size.max() > 0 else 0


def describe_modes(frame: Frame, displacements: np.ndarray, kinds_hint: tuple[str, ...], *,
                   tol: Tolerances = DEFAULT, context: "_Context | None" = None):
    """Classify and describe each mode.

    Parameters
    ----------
    frame : Frame
    displacements : (k, n, d) float, or ModeSet
        Joint movements of each mode.  A sparse ModeSet is read one mode at a
        time at the joints it moves, O(moving joints) each instead of O(n).
    kinds_hint : tuple of str
        ``"internal"`` or ``"rigid-body"`` for each mode.
    tol : Tolerances, keyword-only
        ``tol.direction_rank``, ``tol.pure_translation`` and ``tol.on_axis``
        (see :class:`~spaceframe.tolerances.Tolerances`).

    context : optional, keyword-only
        What the descriptions need of the frame (:func:`mode_context`), when the
        caller describes several sets of modes of one frame; made here otherwise.

    Returns
    -------
    tuple of ModeInfo
    """
    ctx = _Context(frame, tol) if context is None else context
    if isinstance(displacements, ModeSet) and displacements.sparse:
        return _describe_sparse(ctx, displacements, kinds_hint)
    if isinstance(displacements, ModeSet):
        displacements = displacements.dense()
    return tuple(ctx.describe(u, hint) for u, hint in zip(displacements, kinds_hint))


def mode_context(frame: Frame, *, tol: Tolerances = DEFAULT) -> "_Context":
    """What :func:`describe_modes` needs of ``frame`` (lines of joints, member planes, the
    natural order of ids), made once for several calls.  Cost O(n + m)."""
    return _Context(frame, tol)


def _describe_sparse(ctx: "_Context", modes: ModeSet, kinds_hint) -> tuple:
    """:func:`describe_modes` of modes held sparse, in batches.

    Each internal mode is read at the joints it moves only; the singular value
    decompositions of the modes' joint movements (one per mode) and of the
    member directions at the joints of one-joint modes (their plane's normal)
    are each made in one batched call per shape, so that thousands of
    one-joint modes cost little more than their sentences.
    """
    prepared, groups = {}, {}
    for i, (hint, (index, values)) in enumerate(zip(kinds_hint, modes.supports())):
        if hint == "rigid-body":
            continue
        u = _AtJoints(index, values)
        moving, peak = ctx.moving(values, index)
        U = values if len(moving) == len(index) == 1 else u[moving]
        prepared[i] = (u, index, moving, peak, U)
        groups.setdefault(U.shape, []).append(i)
    svd = {}
    for shape, idx in groups.items():
        if 0 in shape:
            continue
        _, sv, vt = np.linalg.svd(np.stack([prepared[i][4] for i in idx]), full_matrices=False)
        svd.update({i: (sv[t], vt[t]) for t, i in enumerate(idx)})
    ctx.prime_normals([int(p[2][0]) for p in prepared.values() if len(p[2]) == 1])
    out = []
    for i, hint in enumerate(kinds_hint):
        if i not in prepared:
            out.append(ctx.describe(modes[i], hint))
            continue
        u, index, moving, peak, U = prepared[i]
        info = None
        if hint == "internal" and len(moving) == 1 and i in svd:
            vt = svd[i][1]
            direction = vt[0] * np.sign(vt[0][np.argmax(np.abs(vt[0]))])
            info = ctx.describe_one(int(moving[0]), U[0], direction)
        out.append(info if info is not None else
                   ctx.describe(u, hint, index=index, pre=(moving, peak, svd.get(i))))
    return tuple(out)


class _AtJoints:
    """A mode's movement at some joints only (the others do not move): ``u[j]``, ``u[joints]``.

    Reads only the joints given (those a sparse mode moves); any other joint is
    an error, not a zero, so that a description cannot silently read one.
    """

    __slots__ = ("index", "values")

    def __init__(self, index: np.ndarray, values: np.ndarray):
        self.index, self.values = index, values

    def __getitem__(self, j):
        pos = np.searchsorted(self.index, j)
        if not np.all(self.index[np.minimum(pos, len(self.index) - 1)] == j):
            raise IndexError("joint not moved by this mode")
        return self.values[pos]


class _Context:
    """What the descriptions need of the frame, computed once."""

    def __init__(self, frame: Frame, tol: Tolerances = DEFAULT):
        self.frame, self.tol = frame, tol
        n, d = frame.n_joints, frame.dimension
        self.d = d
        X = frame.coords
        w = X[frame.ends[:, 1]] - X[frame.ends[:, 0]]
        self.w = w / np.linalg.norm(w, axis=1)[:, None]
        # members at each joint, as CSR-like lists
        ends = frame.ends
        inc_j = np.concatenate([ends[:, 0], ends[:, 1]])
        inc_m = np.concatenate([np.arange(len(ends)), np.arange(len(ends))])
        order = np.argsort(inc_j, kind="stable")
        self.inc_m = inc_m[order]
        self.inc_ptr = np.searchsorted(inc_j[order], np.arange(n + 1))
        self._rank = None
        self._normals: dict = {}
        self._words: dict = {}
        self._frame_size = None
        self.up = d - 1  # z up in space, y up in a plane frame
        self.frames = frame.tag("joint", "frame")
        self.frame_order = tuple(fr for fr in dict.fromkeys(self.frames) if fr) \
            if self.frames else ()
        self.frame_rank = {fr: i for i, fr in enumerate(self.frame_order)}
        self.extrusion = self._extrusion_direction()
        self.size = frame.size() or 1.0
        self.held = set(frame.restraint_joint.tolist())
        ids = frame.joint_ids
        self.line = self._lines()
        self.line_role = self._line_roles()
        # ids that say nothing of where a joint is (J1, J2... of an import): its
        # coordinates go beside them (the one rule and label: naming.joint_label)
        self.bare = placed_joints(frame)

    def _lines(self) -> list:
        """The line along the building of each framed joint (None for the others).

        Joints at one place in each frame make a line: same coordinates once the
        component along the building is removed.  A line is named by its
        planar id where the ids say it (``F3.U2`` is on line ``U2``), else by
        its first and last joint (``J4-J28``).
        """
        n = self.frame.n_joints
        if self.extrusion is None:
            return [None] * n
        e = self.extrusion
        X = self.frame.coords
        across = X - np.outer(X @ e, e)
        grain = self.tol.on_axis * self.size       # one place: the same within on_axis
        cells = np.round(across / grain).astype(int).tolist()
        keys = [tuple(c) if self.frames[j] else None for j, c in enumerate(cells)]
        ids = self.frame.joint_ids
        members: dict = {}
        for j, k in enumerate(keys):
            if k is not None:
                members.setdefault(k, []).append(j)
        names = {}
        for k, js in members.items():
            local = {ids[j].split(".", 1)[1] if "." in ids[j] else None for j in js}
            if len(local) == 1 and None not in local:
                names[k] = local.pop()
            else:
                js = sorted(js, key=lambda j: natural_key(ids[j]))
                names[k] = f"{ids[js[0]]}-{ids[js[-1]]}" if len(js) > 1 else ids[js[0]]
        return [names[k] if k is not None else None for k in keys]

    def _line_roles(self) -> dict:
        """Planar id -> the role of the ties along that line (``purlin``, ``ridge``...)."""
        roles = self.frame.tag("member", "role")
        groups = self.frame.tag("member", "group")
        out: dict = {}
        if not roles or not groups:
            return out
        for m, (a, b) in enumerate(self.frame.ends):
            if groups[m] == "tie" and self.line[a] is not None and self.line[a] == self.line[b]:
                out.setdefault(self.line[a], roles[m])
        return out

    def label(self, j) -> str:
        """Joint ``j``'s id, with its coordinates when the id is bare numbering."""
        jid = self.frame.joint_ids[j]
        return joint_label(self.frame, j, self.size) if self.bare else jid

    def labels(self, joints) -> list[str]:
        """Labels of ``joints`` in natural order of their ids."""
        return [self.label(j) for j in self.natural(joints)]

    def natural(self, joints) -> np.ndarray:
        """``joints`` in natural order of their ids (ties in the order given).

        The same as ``sorted(joints, key=natural_key of the id)``, by one
        ranking of all the frame's ids made on first use.
        """
        joints = np.asarray(joints, dtype=int).reshape(-1)
        if len(joints) <= 1:
            return joints
        if self._rank is None:
            ids = self.frame.joint_ids
            order = sorted(range(len(ids)), key=lambda j: natural_key(ids[j]))
            self._rank = np.empty(len(ids), dtype=int)
            self._rank[order] = np.arange(len(ids))
        return joints[np.argsort(self._rank[joints], kind="stable")]

    def moving(self, values: np.ndarray, index: np.ndarray | None = None):
        """The joints a mode moves (natural order) and the one it moves most.

        ``values`` (s, d) are its movements at joints ``index`` (all joints when
        None); a joint moves when ``|u_j| > Display.moving * max |u|``.
        """
        if index is not None and len(index) == 1:     # one joint: it moves, unless by nothing
            return (index if np.any(values) else index[:0]), int(index[0])
        size = np.linalg.norm(values, axis=1)
        top = size.max() if size.size else 0.0
        moving = np.flatnonzero(size > DISPLAY.moving * top)
        peak = int(moving[np.argmax(size[moving])]) if len(moving) else 0
        if index is not None:
            moving, peak = index[moving], int(index[peak]) if len(index) else 0
        return self.natural(moving), peak

    def prime_normals(self, joints) -> None:
        """:meth:`joint_plane_normal` of many joints at once (one batched SVD per degree)."""
        if self.d != 3:
            return
        by_degree: dict = {}
        for j in dict.fromkeys(joints):
            if j not in self._normals:
                by_degree.setdefault(self.inc_ptr[j + 1] - self.inc_ptr[j], []).append(j)
        for deg, js in by_degree.items():
            if deg < 2:
                self._normals.update({j: None for j in js})
                continue
            _, sv, vt = np.linalg.svd(np.stack([self.w[self.members_at(j)] for j in js]))
            for t, j in enumerate(js):
                self._normals[j] = self._plane_normal(sv[t], vt[t])

    def members_at(self, j):
        return self.inc_m[self.inc_ptr[j]:self.inc_ptr[j + 1]]

    def _extrusion_direction(self):
        """Unit vector from the first frame's centroid to the last's, if tagged."""
        if not self.frames:
            return None
        labels = np.array(self.frames)
        names = [f for f in dict.fromkeys(self.frames) if f]
        if len(names) < 2:
            return None
        X = self.frame.coords
        c0, c1 = X[labels == names[0]].mean(axis=0), X[labels == names[-1]].mean(axis=0)
        v = c1 - c0
        nv = np.linalg.norm(v)
        return v / nv if nv > 0 else None

    def _out_of_plane(self, j, uj) -> bool:
        nv = self.joint_plane_normal(j)
        return nv is not None and abs(nv @ uj) >= 0.95 * np.linalg.norm(uj)

    def joint_plane_normal(self, j):
        """Normal of the plane of joint j's members (None unless they span exactly a plane)."""
        if j in self._normals:
            return self._normals[j]
        ms = self.members_at(j)
        if self.d != 3 or len(ms) < 2:
            return None
        _, s, vt = np.linalg.svd(self.w[ms])
        return self._plane_normal(s, vt)

    def words(self, direction: np.ndarray) -> str:
        """:func:`~spaceframe.naming.direction_words` of ``direction``, remembered: the
        thousands of one-joint modes of a roof share a few directions."""
        key = np.asarray(direction, dtype=float).tobytes()
        if key not in self._words:
            self._words[key] = direction_words(direction)
        return self._words[key]

    def _plane_normal(self, s, vt):
        eps = self.tol.direction_rank
        if s[1] > eps and (len(s) < 3 or s[2] < eps * s[0]):
            return vt[2]
        return None

    def describe(self, u, hint, index=None, pre=None) -> ModeInfo:
        """The ModeInfo of one mode ``u`` (n, d); or, with ``index``, of a mode that
        moves joints ``index`` only, ``u`` an :class:`_AtJoints` there.

        ``pre = (moving, peak, (s, vt))``, where given, is what :meth:`moving` and the
        SVD of ``u[moving]`` give (made in a batch by the caller).
        """
        f = self.frame
        if pre is None:
            moving, peak = self.moving(u if index is None else u.values, index)
            svd = None
        else:
            moving, peak, svd = pre
        jids = tuple(f.joint_ids[j] for j in moving)
        mem = sorted({int(m) for j in moving for m in self.members_at(j)})
        mids = tuple(f.member_ids[m] for m in mem)
        frames = ()
        if self.frames:
            present = {self.frames[j] for j in moving if self.frames[j]}
            frames = tuple(sorted(present, key=self.frame_rank.__getitem__))
        if svd is None:
            _, s, vt = np.linalg.svd(u[moving], full_matrices=False)
        else:
            s, vt = svd
        direction = vt[0] * np.sign(vt[0][np.argmax(np.abs(vt[0]))])
        parallel = s[0] ** 2 / max(np.sum(s ** 2), 1e-300)

        extra: dict = {}
        if hint == "rigid-body":
            kind, text, direction = "rigid-body", *self._rigid(u)
        elif hint == "soft":
            kind, text, extra = self._internal(u, moving, direction, parallel, frames, peak)
            pattern = {"local": "local", "out-of-plane": "out-of-plane", "lean": "leaning",
                       "tie-line": "sliding", "sway": "swaying", "other": "spread-out"}[kind]
            text = (f"{count(len(jids), 'joint')} move, most at {self.label(peak)} "
                    f"({direction_words(direction)} mostly), in a {pattern} pattern held only "
                    f"weakly by member stretching")
        else:
            kind, text, extra = self._internal(u, moving, direction, parallel, frames, peak)
            text += self._plane_note(u, moving)
        return ModeInfo(kind=kind, joints=jids, members=mids, direction=direction,
                        frames=frames, description=text, **extra)

    def _plane_note(self, u, moving) -> str:
        """For extruded frames: is the mode in the trusses' own plane, or only in 3D?"""
        if self.extrusion is None or not len(moving):
            return ""
        U = u[moving]
        along = np.sum((U @ self.extrusion) ** 2) / max(np.sum(U * U), 1e-300)
        if along >= 0.9:
            return " It appears only in the 3D assembly: the planar truss cannot show it."
        if along <= 0.1:
            return " It lies in the trusses' own plane: the planar design has it too."
        return ""

    # -- rigid-body --------------------------------------------------------
    def _rigid(self, u):
        """Translation or rotation of the whole frame, fitted to the joint movements."""
        X = self.frame.coords
        d = self.d
        c = X.mean(axis=0)
        x = X - c
        if d == 3:
            # u = t + omega x (x): least squares for t, omega
            rows = np.zeros((len(X), 3, 6))
            rows[:, :, :3] = np.eye(3)
            rows[:, 0, 4], rows[:, 0, 5] = x[:, 2], -x[:, 1]
            rows[:, 1, 3], rows[:, 1, 5] = -x[:, 2], x[:, 0]
            rows[:, 2, 3], rows[:, 2, 4] = x[:, 1], -x[:, 0]
            sol, *_ = np.linalg.lstsq(rows.reshape(-1, 6), u.reshape(-1), rcond=None)
            t, om = sol[:3], sol[3:]
        else:
            rows = np.zeros((len(X), 2, 3))
            rows[:, :, :2] = np.eye(2)
            rows[:, 0, 2], rows[:, 1, 2] = -x[:, 1], x[:, 0]
            sol, *_ = np.linalg.lstsq(rows.reshape(-1, 3), u.reshape(-1), rcond=None)
            t, om = sol[:2], np.array([sol[2]])
        spin = np.linalg.norm(om) * self.size
        if spin < self.tol.pure_translation * max(np.linalg.norm(t), 1e-300):
            direction = t / np.linalg.norm(t)
            building = " (along the building)" if self.extrusion is not None and \
                abs(direction @ self.extrusion) >= DISPLAY.along_axis else ""
            return (f"The whole frame can slide {direction_words(direction)}{building}: no support "
                    f"holds it that way.", direction)
        if d == 2:
            p = c + np.array([-t[1], t[0]]) / om[0]
            near = self._joints_near_point(p)
            where = f"joint {near}" if near else f"the point ({xyz(p, self.size)})"
            return (f"The whole frame can turn in its plane about {where}: the supports do not "
                    f"stop the rotation.", np.array([0.0, 1.0]))
        axis = om / np.linalg.norm(om)
        axis *= np.sign(axis[np.argmax(np.abs(axis))])
        p = c + np.cross(om, t) / (om @ om)
        on_axis = self._joints_on_line(p, axis)
        if len(on_axis) >= 2:
            where = f"the line through joints {on_axis[0]} and {on_axis[-1]}"
        else:
            where = f"an axis {direction_words(axis, signed=False)} through ({xyz(p, self.size)})"
        return (f"The whole frame can turn about {where}: the supports do not stop the "
                f"rotation.", axis)

    def _joints_on_line(self, p, axis):
        X = self.frame.coords
        r = X - p
        dist = np.linalg.norm(r - np.outer(r @ axis, axis), axis=1)
        idx = np.flatnonzero(dist <= self.tol.on_axis * self.size)
        idx = idx[np.argsort(r[idx] @ axis)]
        return [self.label(j) for j in idx]

    def _joints_near_point(self, p):
        X = self.frame.coords
        dist = np.linalg.norm(X - p, axis=1)
        j = int(np.argmin(dist))
        return self.label(j) if dist[j] <= self.tol.on_axis * self.size else None

    # -- internal ----------------------------------------------------------
    def _one_joint(self, j, uj, direction):
        """Kind, sentence and data of an internal mode that moves joint ``j`` alone by ``uj``,
        where it is one of the one-joint kinds (no members, out of their plane, on a straight
        line of them); None otherwise."""
        first = self.label(j)
        ms = self.members_at(j)
        if len(ms) == 0:                                   # a joint with no members at all
            if j in self.held:
                return "local", (f"Joint {first} has no members and its support leaves it free "
                                 f"{self.words(direction)}."), {}
            return "local", (f"Joint {first} has no members and no support: it is free "
                             f"{self.words(direction)}."), {}
        if self._out_of_plane(j, uj):                      # out of the plane of its members
            return "out-of-plane", (f"Joint {first} is free out of the plane of its "
                                    f"members ({self.words(direction)}): no member or "
                                    f"support holds it that way."), {}
        if np.linalg.matrix_rank(self.w[ms], tol=self.tol.direction_rank) == 1:
            return "local", (f"Joint {first} lies on a straight line of members and is "
                             f"free sideways to them ({self.words(direction)})."), {}
        return None

    def describe_one(self, j: int, uj: np.ndarray, direction: np.ndarray) -> ModeInfo | None:
        """:meth:`describe` of an internal mode moving joint ``j`` alone by ``uj`` (``direction``
        its unit direction, sign as there), for the one-joint kinds; None for any other."""
        words = self._one_joint(j, uj, direction)
        if words is None:
            return None
        kind, text, extra = words
        f = self.frame
        mids = tuple(f.member_ids[m] for m in sorted(set(self.members_at(j).tolist())))
        frames = (self.frames[j],) if self.frames and self.frames[j] else ()
        text += self._plane_note(uj[None], np.zeros(1, dtype=int))
        return ModeInfo(kind=kind, joints=(f.joint_ids[j],), members=mids, direction=direction,
                        frames=frames, description=text, **extra)

    def _internal(self, u, moving, direction, parallel, frames, peak):
        """Kind, sentence and data (``lines``, ``pivots``) of one internal mode."""
        n_mov = len(moving)
        names = join_words(self.labels(moving), most=4)
        if n_mov == 1:
            words = self._one_joint(moving[0], u[moving[0]], direction)
            if words is not None:
                return words
        # out of the plane of the members at each moving joint
        elif all(self._out_of_plane(j, u[j]) for j in moving):  # stops at the first that is not
            return "out-of-plane", (f"Joints {names} can move out of the plane of their members "
                                    f"({direction_words(direction)}), with nothing to stop "
                                    f"them."), {}
        along_building = self.extrusion is not None and len(frames) >= 2 and parallel >= 0.9 \
            and abs(direction @ self.extrusion) >= 0.9
        if along_building:
            lines = self._lines_of(moving)
            along = u[moving] @ self.extrusion
            if lines is not None and not self._whole_frames(moving, frames):
                return "tie-line", self._tie_line_words(lines, moving, frames, along), \
                    {"lines": tuple(lines)}
            # a row of frames leaning together: whole frames move the same way along it
            if np.all(along > 0) or np.all(along < 0):
                return "lean", (f"Frames {_span(frames)} can lean together along the building "
                                f"({direction_words(direction)}): no bracing between those frames "
                                f"holds them."), {}
        # several joints moving together sideways
        if n_mov >= 2 and parallel >= 0.9 and abs(direction[self.up]) <= 0.5:
            return self._sway(u, moving, direction)
        if n_mov <= LOCAL_JOINTS:
            return "local", (f"Joints {names} can move together ({direction_words(direction)} "
                             f"mostly) without any member changing length."), {}
        return "other", (f"{n_mov} joints move together, most at {self.label(peak)} "
                         f"({direction_words(direction)} mostly), with no member changing "
                         f"length."), {}

    # -- lines of joints along an extruded building ----------------------------------------
    def _lines_of(self, moving):
        """The planar ids of the lines of joints ``moving`` makes up, or None.

        ``moving`` makes up lines when every moving joint belongs to a frame and
        each line it touches moves in at least two frames.
        """
        lines = [self.line[j] for j in moving]
        if any(x is None for x in lines):
            return None
        seen: dict = {}
        for x in lines:
            seen[x] = seen.get(x, 0) + 1
        if min(seen.values()) < 2:
            return None
        return sorted(seen, key=natural_key)

    def _whole_frames(self, moving, frames) -> bool:
        """Do the moving joints make up at least half of every frame they touch?"""
        labels = self.frames
        per = {fr: 0 for fr in frames}
        for j in moving:
            per[labels[j]] += 1
        if self._frame_size is None:               # joints of each frame, counted once
            self._frame_size = {}
            for fr in labels:
                self._frame_size[fr] = self._frame_size.get(fr, 0) + 1
        total = self._frame_size
        return all(per[fr] >= 0.5 * total[fr] and per[fr] >= 2 for fr in frames)

    def _tie_line_words(self, lines, moving, frames, along) -> str:
        """One or a few lines of tied joints sliding along the building, in its words."""
        roles = [self.line_role.get(x) for x in lines]
        if len(lines) == 1:
            what = f"The {roles[0]} line at {lines[0]}" if roles[0] else \
                f"The line of tied joints at {lines[0]}"
            verb = "slides"
        else:
            what, verb = "The lines of joints at " + join_words(lines), "slide"
        how = "as one" if len(lines) == 1 else "together"
        if not (np.all(along > 0) or np.all(along < 0)):
            plus = sorted({self.line[j] for j, a in zip(moving, along) if a > 0}, key=natural_key)
            minus = sorted({self.line[j] for j, a in zip(moving, along) if a < 0},
                           key=natural_key)
            how = f"({join_words(plus)} one way, {join_words(minus)} the other)"
        one = len(lines) == 1
        return (f"{what} (frames {_span(frames)}) {verb} along the building {how} while the rest "
                f"of the frame stays put: ties hold {'its' if one else 'their'} joints frame to "
                f"frame, but no brace or support holds {'the line' if one else 'them'} along the "
                f"building.")

    # -- sway --------------------------------------------------------------------------
    def _sway(self, u, moving, direction):
        """Joints moving sideways: on the supports (a portal on its pins), or against the rest."""
        f = self.frame
        side = u[moving] @ direction
        mov = set(moving.tolist())
        pivots = sorted({int(o) for j in moving for m in self.members_at(j)
                         for o in f.ends[m] if int(o) not in mov and int(o) in self.held},
                        key=lambda j: natural_key(f.joint_ids[j]))
        names = join_words(self.labels(moving), most=4)
        pivot_ids = tuple(f.joint_ids[j] for j in pivots)
        if np.all(side > 0) or np.all(side < 0):
            if pivots:
                down = join_words(self.labels(pivots), most=4)
                up = self.frame.coords[:, self.up]
                to = "down to" if up[pivots].max() < up[moving].min() else "to"
                if len(mov) + len(self.held) >= f.n_joints:   # everything not held moves
                    return "sway", (f"The frame can sway {direction_words(direction)} on its "
                                    f"supports: joints {names} move together while the "
                                    f"members {to} {down} turn about them, and nothing "
                                    f"braces it that way."), {"pivots": pivot_ids}
                return "sway", (f"Joints {names} can sway {direction_words(direction)} on the "
                                f"supports at {down} while the rest of the frame stays put: "
                                f"the members {to} the supports turn about them, and "
                                f"nothing braces them that way."), {"pivots": pivot_ids}
            return "sway", (f"Joints {names} can move together {direction_words(direction)} while "
                            f"the rest of the frame stays put: the panels between them and "
                            f"the joints that stay can rack, with nothing to stop them."), {}
        plus = self.labels([j for j, a in zip(moving, side) if a > 0])
        minus = self.labels([j for j, a in zip(moving, side) if a < 0])
        axis = direction_words(direction)
        back = direction_words(-direction)
        return "sway", (f"Joints {join_words(plus, most=4)} move {axis} while "
                        f"{join_words(minus, most=4)} move {back}, and the rest of the frame "
                        f"stays put: the panels between them can rack, with nothing to stop "
                        f"them."), {"pivots": pivot_ids}


def _span(frames) -> str:
    """``1-6`` for a run of frames, ``1 and 2`` for two."""
    return f"{frames[0]}-{frames[-1]}" if len(frames) > 2 else " and ".join(frames)


