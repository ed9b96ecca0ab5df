"""Bracing recommendations: the fewest, shortest members and restraints that remove every mechanism.

Candidates
    By default, both diagonals of every planar four-sided panel bounded by
    existing members (a 4-cycle of the member graph whose diagonals cross
    inside it), and of every wall panel closed by the ground (three members
    from one fully held joint to another, coplanar with them: the ground is
    the fourth side).  In a frame of several frames (a ``frame`` joint tag,
    as :mod:`spaceframe.extrude` writes), also a tie between every pair of
    corresponding joints of adjacent frames that no member joins (the same
    place in each frame, one frame spacing apart), and both diagonals of
    every panel such ties close with members or other ties: a diagonal there
    needs its ties.  Optionally every pair of joints within a distance, and
    a user's list.  Restraint candidates are the axis directions not yet
    held at the supported joints (every joint of a frame with no support at
    all) and at joints marked attachable.

Selection
    A candidate member's row ``c`` of the compatibility matrix, applied to an
    orthonormal basis ``N`` of the frame's mechanisms, is its reach
    ``r = c N``: the elongation it would suffer in each mechanism.  A set of
    candidates removes every mechanism exactly when its reaches span the
    ``k``-dimensional mechanism space; in general it removes as many
    mechanisms as the rank of its reaches.  The reaches form a linear
    matroid, so going through the candidates once in order of cost and
    keeping each whose reach is independent of those kept gives a basis of
    least total cost (Rado [1]_, Edmonds [2]_).  Every basis has the same
    size, so the count is the least possible too.  Members come before
    restraints (restraints are used only for what no member can remove),
    then by cost: the length, or the user's weight.  A reach is independent
    of those kept when its residual after projection on them exceeds
    ``tol.rank * s_max``, the threshold of the rank decision
    (:class:`spaceframe.tolerances.Tolerances`), ``s_max`` the largest
    singular value of the compatibility matrix.  The braced frame is then
    audited again with the core engine.

Tension-only bracing
    Rods carry tension only; a panel braced against racking both ways needs
    both diagonals.  Each panel is then one element of the matroid, with the
    reach of the diagonal that moves more and the cost of both, and a chosen
    panel gets both.

References
----------
.. [1] R. Rado, "Note on independence functions", Proc. London Math. Soc.
   (3) 7, 300-320, 1957.
.. [2] J. Edmonds, "Matroids and the greedy algorithm", Math. Programming 1,
   127-136, 1971.
.. [3] S. Pellegrino and C. R. Calladine, "Matrix analysis of statically and
   kinematically indeterminate frameworks", Int. J. Solids Struct. 22(4),
   409-428, 1986.
"""

from __future__ import annotations

from collections import Counter, defaultdict
from dataclasses import dataclass, field

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from ..errors import SpaceframeError
from ..model import Frame
from ..results import CAUTION, AuditResult
from ..tolerances import DEFAULT, Tolerances
from .audit import audit
from .equilibrium import compatibility_matrix

__all__ = ["CandidateSet", "BracingResult", "find_candidates", "panel_diagonals",
           "tie_candidates", "planar_plane", "reach_rows", "greedy_basis", "recommend_bracing", "braced_frame", "location", "ACTS",
           "BRACING_CAUTION"]

#: A candidate "acts on" a mode when the mode stretches it by more than this fraction of
#: the mode's largest joint movement (modes are scaled so that it is 1).
ACTS = 0.01
#: The caution every bracing recommendation carries, after the audit's own.
BRACING_CAUTION = ("Bracing advice is a starting point for a competent engineer, who must check "
                   "member sizes, connections, load paths and the local codes before anything "
                   "is built.")
#: Cheapest single candidates listed per mode.
PER_MODE = 3
_AXES = "xyz"
#: Candidate origins, in the order they are preferred when costs tie.
ORIGINS = ("panel", "wall panel", "tie", "tie panel", "listed", "within", "support",
           "attachable")


@dataclass(frozen=True, eq=False)
class CandidateSet:
    """Candidate members and restraints, as arrays.

    Attributes
    ----------
    ends : (c, 2) int
        End joints of each candidate; ``[-1, -1]`` for a restraint.
    joint : (c,) int
        The joint of each restraint candidate; -1 for a member.
    direction : (c, d) float
        The unit direction a restraint candidate holds; zeros for a member.
    length : (c,) float
        Member length (0 for a restraint), in the frame's units.
    cost : (c,) float
        The cost in the selection: the length, or the user's weight.
    origin : tuple of str
        One of :data:`ORIGINS` for each candidate.
    panel : tuple of (tuple of int or None)
        The corners of the panel a diagonal belongs to, in cyclic order
        (``-1`` for the ground side of a wall panel); None otherwise.  The
        sides of a ``"tie panel"`` that no member joins are tie candidates.
    partner : (c,) int
        The other diagonal of the same panel, or -1.
    """

    ends: np.ndarray
    joint: np.ndarray
    direction: np.ndarray
    length: np.ndarray
    cost: np.ndarray
    origin: tuple[str, ...]
    panel: tuple
    partner: np.ndarray

    def __len__(self) -> int:
        return len(self.origin)

    @property
    def is_member(self) -> np.ndarray:
        return self.joint < 0

    def order(self) -> np.ndarray:
        """Indices in the order of the greedy pass: members first, then by cost, origin, ends."""
        keys = np.lexsort((self.joint, self.ends[:, 1], self.ends[:, 0],
                           np.array([ORIGINS.index(o) for o in self.origin]),
                           np.round(self.cost, 12), (~self.is_member).astype(int)))
        return keys

    def subset(self, keep: np.ndarray) -> "CandidateSet":
        keep = np.asarray(keep, dtype=np.int64)
        new_of = np.full(len(self), -1)
        new_of[keep] = np.arange(len(keep))
        partner = self.partner[keep]
        partner = np.where(partner >= 0, new_of[np.maximum(partner, 0)], -1)
        return CandidateSet(self.ends[keep], self.joint[keep], self.direction[keep],
                            self.length[keep], self.cost[keep],
                            tuple(self.origin[i] for i in keep),
                            tuple(self.panel[i] for i in keep), partner)


def _pad3(frame: Frame) -> np.ndarray:
    X = frame.coords
    return X if frame.dimension == 3 else np.c_[X, np.zeros(len(X))]


def _crossing(P, a, b, c, e, tol: Tolerances) -> bool:
    """Do the diagonals ``a-c`` and ``b-e`` of the cycle ``a, b, c, e`` cross inside both?"""
    d1, d2 = P[c] - P[a], P[e] - P[b]
    L = max(np.linalg.norm(d1), np.linalg.norm(d2))
    if np.linalg.norm(np.cross(d1, d2)) <= 1e-6 * np.linalg.norm(d1) * np.linalg.norm(d2):
        return False  # parallel diagonals: three corners in a line, no panel
    A = np.c_[d1, -d2]
    st, *_ = np.linalg.lstsq(A, P[b] - P[a], rcond=None)
    gap = np.linalg.norm(P[a] + st[0] * d1 - P[b] - st[1] * d2)
    return gap <= tol.panel_plane * L and 1e-9 < st[0] < 1 - 1e-9 and 1e-9 < st[1] < 1 - 1e-9


def panel_diagonals(frame: Frame, *, also=(), tol: Tolerances = DEFAULT):
    """Both diagonals of every planar four-sided panel, and of every wall panel on the ground.

    A panel is a cycle of four members whose diagonals cross inside it (so
    the corners are coplanar within ``tol.panel_plane`` and the panel is
    convex).  A wall panel is a path of three members between two joints
    whose supports hold every direction, coplanar and convex with the ground
    between those joints as the fourth side.  Diagonals that are already
    members are left out.

    Parameters
    ----------
    frame : Frame
    also : sequence of (int, int), keyword-only
        Joint pairs counted as sides too (candidate ties): a panel with one
        of them as a side is a ``"tie panel"``.  Wall panels use members only.
    tol : Tolerances, keyword-only

    Returns
    -------
    list of (a, b, corners, origin)
        ``corners`` in cyclic order (the first and last of a wall panel are
        the supported joints); ``origin`` ``"panel"``, ``"wall panel"`` or
        ``"tie panel"``.  Each panel's two diagonals are consecutive.

    Notes
    -----
    Cost O(sum of squared joint degrees): every 4-cycle is found from the
    pairs of members at each joint.
    """
    P = _pad3(frame)
    n = frame.n_joints
    nbrs = [set() for _ in range(n)]
    for a, b in frame.ends.tolist():
        nbrs[a].add(b)
        nbrs[b].add(a)
    real = [set(s) for s in nbrs]
    extra = {frozenset(map(int, e)) for e in also} - {frozenset(e) for e in frame.ends.tolist()}
    for a, b in (tuple(e) for e in extra):
        nbrs[a].add(b)
        nbrs[b].add(a)
    wedges = defaultdict(list)
    for v in range(n):
        nv = sorted(nbrs[v])
        for i, u in enumerate(nv):
            for w in nv[i + 1:]:
                wedges[(u, w)].append(v)
    out, seen = [], set()

    def add(corners, origin):
        a, b, c, e = corners
        if any(frozenset(s) in extra for s in ((a, b), (b, c), (c, e), (e, a))):
            origin = "tie panel"
        for p, q in ((a, c), (b, e)):
            if p >= 0 and q >= 0 and q not in nbrs[p]:
                out.append((min(p, q), max(p, q), tuple(corners), origin))

    for (u, w), centres in wedges.items():
        if len(centres) < 2:
            continue
        for i, v1 in enumerate(centres):
            for v2 in centres[i + 1:]:
                key = frozenset(((u, w), (min(v1, v2), max(v1, v2))))
                if key in seen:
                    continue
                seen.add(key)
                if _crossing(P, u, v1, w, v2, tol):
                    add((u, v1, w, v2), "panel")
    held = np.bincount(frame.restraint_joint, minlength=n) >= frame.dimension
    for x, y in frame.ends.tolist():
        for A in sorted(j for j in real[x] if held[j] and j != y):
            for B in sorted(j for j in real[y] if held[j] and j not in (x, A)):
                key = frozenset(((min(A, y), max(A, y)), (min(x, B), max(x, B))))
                if key in seen or B in real[A]:
                    continue  # a member A-B makes it an ordinary panel, found above
                seen.add(key)
                if _crossing(P, A, x, y, B, tol):
                    for p, q in ((A, y), (x, B)):
                        if q not in nbrs[p]:
                            out.append((min(p, q), max(p, q), (A, x, y, B), "wall panel"))
    return out


def _frame_labels(frame: Frame):
    """The frames of a frame of frames, in order along the building, and their joints.

    Labels are the ``frame`` joint tag (empty: a joint of no frame); numeric
    labels go in numeric order, others in order of first appearance.
    """
    jf = frame.joint_tags.get("frame")
    if jf is None:
        return []
    joints = defaultdict(list)
    for j, label in enumerate(jf):
        if label:
            joints[label].append(j)
    labels = list(joints)
    if all(label.isdigit() for label in labels):
        labels.sort(key=int)
    return [(label, np.array(joints[label], dtype=np.int64)) for label in labels]


def _planar_id(frame: Frame, j: int, label: str) -> str:
    """The id of joint ``j`` in its planar frame: ``F3.U2`` of frame 3 is ``U2``."""
    jid = frame.joint_ids[j]
    prefix = f"F{label}."
    return jid[len(prefix):] if jid.startswith(prefix) else jid


def _offset(frame: Frame, A, B, la: str, lb: str) -> np.ndarray:
    """The translation from frame ``la`` (joints ``A``) to the next, ``lb`` (joints ``B``).

    The median difference of joints with the same planar id, or, when the
    frames share none, the difference of the frames' centroids.
    """
    X = frame.coords
    ib = {_planar_id(frame, j, lb): j for j in B.tolist()}
    pairs = [(a, ib[p]) for a in A.tolist() if (p := _planar_id(frame, a, la)) in ib]
    if pairs:
        a, b = np.array(pairs).T
        return np.median(X[b] - X[a], axis=0)
    return X[B].mean(axis=0) - X[A].mean(axis=0)


def tie_candidates(frame: Frame, *, tol: Tolerances = DEFAULT) -> list[tuple[int, int, str]]:
    """Ties between corresponding joints of adjacent frames that no member joins.

    In a frame made of frames (the ``frame`` joint tag of
    :func:`spaceframe.extrude.extrude`), joint ``a`` of one frame and ``b``
    of the next correspond when ``|X[b] - X[a] - t| <= tol.merge * size``,
    ``t`` the translation from one frame to the next (:func:`_offset`) and
    ``size`` the largest extent of the frame.  Pairs of joints both held in
    every direction are left out (a tie there holds nothing).

    Returns
    -------
    list of (a, b, bay)
        ``a`` in the earlier frame; ``bay`` the label of the bay between
        them: the earlier frame's number when labels are numbers (bay 2 runs
        from frame 2 to frame 3, as in the extrusion), else ``"la-lb"``.

    Notes
    -----
    Cost O(n log n): one k-d tree query per pair of adjacent frames.
    """
    frames = _frame_labels(frame)
    if frame.dimension != 3 or len(frames) < 2:
        return []
    from scipy.spatial import cKDTree

    X = frame.coords
    size = float(np.max(np.ptp(X, axis=0))) or 1.0
    existing = {(min(a, b), max(a, b)) for a, b in frame.ends.tolist()}
    held = np.bincount(frame.restraint_joint, minlength=frame.n_joints) >= frame.dimension
    out = []
    for (la, A), (lb, B) in zip(frames, frames[1:]):
        t = _offset(frame, A, B, la, lb)
        if np.linalg.norm(t) <= tol.merge * size:
            continue  # frames in one place: nothing to tie
        dist, idx = cKDTree(X[B]).query(X[A] + t, distance_upper_bound=tol.merge * size)
        bay = la if la.isdigit() and lb.isdigit() else f"{la}-{lb}"
        for a, dd, ii in zip(A.tolist(), dist.tolist(), idx.tolist()):
            if not np.isfinite(dd):
                continue
            b = int(B[ii])
            if (min(a, b), max(a, b)) in existing or (held[a] and held[b]):
                continue
            out.append((a, b, bay))
    return out


def planar_plane(frame: Frame, *, tol: Tolerances = DEFAULT):
    """The plane every joint of a space frame lies in, or None.

    The joints are coplanar when each is within ``tol.panel_plane * size``
    of the least-squares plane through them (``size`` the largest extent).

    Returns
    -------
    (normal (3,) float, point (3,) float) or None
        The unit normal (its largest component positive) and the centroid.
    """
    if frame.dimension != 3 or frame.n_joints < 3:
        return None
    X = frame.coords
    c = X.mean(axis=0)
    _, s, vt = np.linalg.svd(X - c, full_matrices=False)
    size = float(np.max(np.ptp(X, axis=0)))
    normal = vt[-1] * np.sign(vt[-1][np.argmax(np.abs(vt[-1]))])
    if size == 0 or np.max(np.abs((X - c) @ normal)) > tol.panel_plane * size:
        return None
    return normal, c


def _restraint_candidates(frame: Frame, attachable, *, tol: Tolerances):
    """Axis directions not yet held at supported (or attachable) joints."""
    d = frame.dimension
    rj, rd = frame.restraint_joint, frame.restraint_dir
    joints = set(rj.tolist()) if len(rj) else set(range(frame.n_joints))
    joints |= set(attachable)
    rows = []
    for j in sorted(joints):
        held = rd[rj == j]
        for a in range(d):
            e = np.eye(d)[a]
            if len(held):
                Q, _ = np.linalg.qr(held.T)
                if np.linalg.norm(e - Q @ (Q.T @ e)) <= tol.restraint_dependence:
                    continue
            rows.append((j, e, "support" if j in set(rj.tolist()) else "attachable"))
    return rows


def _segment_hits_box(p, q, lo, hi) -> bool:
    """Does the segment ``p-q`` meet the closed box ``[lo, hi]`` (slab test)?"""
    t0, t1 = 0.0, 1.0
    for a in range(len(p)):
        dv = q[a] - p[a]
        if abs(dv) < 1e-300:
            if p[a] < lo[a] or p[a] > hi[a]:
                return False
            continue
        s0, s1 = sorted(((lo[a] - p[a]) / dv, (hi[a] - p[a]) / dv))
        t0, t1 = max(t0, s0), min(t1, s1)
        if t0 > t1:
            return False
    return True


def find_candidates(frame: Frame, *, panels: bool = True, ties: bool = True,
                    within: float | None = None,
                    listed=None, restraints: bool = False, attachable=(),
                    exclude_boxes=(), exclude_bays=(), exclude_panels=(),
                    tension_only: bool = False, tol: Tolerances = DEFAULT) -> CandidateSet:
    """Gather the bracing candidates of a frame.

    Parameters
    ----------
    frame : Frame
    panels : bool, keyword-only
        Diagonals of planar panels and of wall panels on the ground
        (:func:`panel_diagonals`).  Default True.
    ties : bool, keyword-only
        In a frame of frames, ties between corresponding joints of adjacent
        frames (:func:`tie_candidates`) and, with ``panels``, both diagonals
        of every panel those ties close (origin ``"tie panel"``: such a
        diagonal needs its ties).  Default True; nothing for a frame with
        no ``frame`` joint tag.
    within : float, keyword-only
        Also every pair of joints at most this far apart (in the frame's
        units) that no member joins.
    listed : tuple (ends (c, 2) int, weights (c,) float), keyword-only
        A user's candidates; a weight (NaN: none) replaces the length as cost.
    restraints : bool, keyword-only
        Add restraint candidates: the axis directions not yet held at every
        supported joint (every joint when none is supported) and at
        ``attachable`` joints (indices).
    exclude_boxes : sequence of ((d,), (d,)) float, keyword-only
        No candidate member may pass through these boxes (low, high corners).
    exclude_bays : sequence of str, keyword-only
        Bay labels (the ``bay`` tag of a panel's members; a tie's bay for a
        side that is a tie) where no brace goes.  Ties themselves are kept.
    exclude_panels : sequence of sets of int, keyword-only
        Panels, by their corner joints, where no brace goes.
    tension_only : bool, keyword-only
        Rods: keep only panel diagonals whose partner diagonal is a candidate
        too.

    Returns
    -------
    CandidateSet

    Raises
    ------
    SpaceframeError
        When the exclusions leave no candidate member of those found.
    """
    d = frame.dimension
    X = frame.coords
    items = []  # (a, b, corners, origin, cost)
    tie_pairs = [(a, b) for a, b, _ in tie_candidates(frame, tol=tol)] if ties else []
    if panels:
        found_panels = panel_diagonals(frame, also=tie_pairs, tol=tol)
        items += [(a, b, corners, origin, np.nan) for a, b, corners, origin in found_panels
                  if origin != "tie panel"]
    items += [(min(a, b), max(a, b), None, "tie", np.nan) for a, b in tie_pairs]
    if panels:
        items += [(a, b, corners, origin, np.nan) for a, b, corners, origin in found_panels
                  if origin == "tie panel"]
    existing = {(min(a, b), max(a, b)) for a, b in frame.ends.tolist()}
    if listed is not None:
        for (a, b), w in zip(np.asarray(listed[0]).tolist(), listed[1]):
            items.append((min(a, b), max(a, b), None, "listed", w))
    if within is not None and frame.n_joints > 1:
        from scipy.spatial import cKDTree

        pairs = cKDTree(X).query_pairs(float(within), output_type="ndarray")
        for a, b in sorted(map(tuple, pairs.tolist())):
            items.append((a, b, None, "within", np.nan))
    # one candidate per joint pair: the first found (a panel keeps its corners), but a
    # listed candidate keeps its weight
    chosen = {}
    for it in items:
        key = (it[0], it[1])
        if key in existing:
            continue
        if key not in chosen:
            chosen[key] = it
        elif it[3] == "listed":
            chosen[key] = (key[0], key[1], chosen[key][2], "listed", it[4])
    items = list(chosen.values())
    found = len(items)
    bay_tags = frame.member_tags.get("bay")
    member_at = {(min(a, b), max(a, b)): k for k, (a, b) in enumerate(frame.ends.tolist())}
    excluded_panels = [frozenset(p) for p in exclude_panels]

    def bay_of(corners):
        return _panel_bay(corners, bay_tags, member_at, frame.joint_tags.get("frame"))

    kept = []
    for it in items:
        a, b, corners = it[0], it[1], it[2]
        if any(_segment_hits_box(X[a], X[b], np.asarray(lo, float), np.asarray(hi, float))
               for lo, hi in exclude_boxes):
            continue
        if exclude_bays and corners is not None and bay_of(corners) in set(exclude_bays):
            continue
        if corners is not None and frozenset(c for c in corners if c >= 0) in excluded_panels:
            continue
        kept.append(it)
    if found and not kept and (exclude_boxes or exclude_bays or excluded_panels):
        raise SpaceframeError(f"the exclusion zones leave none of the {found} candidate members; "
                              f"make a zone smaller or drop one, so that some panel can be "
                              f"braced")
    # pair the two diagonals of each panel
    by_panel = defaultdict(list)
    for i, it in enumerate(kept):
        if it[2] is not None:
            by_panel[frozenset(it[2])].append(i)
    partner = np.full(len(kept), -1)
    for idx in by_panel.values():
        if len(idx) == 2:
            partner[idx[0]], partner[idx[1]] = idx[1], idx[0]
    if tension_only:
        keep = [i for i in range(len(kept)) if partner[i] >= 0]
        new_of = {old: new for new, old in enumerate(keep)}
        partner = np.array([new_of[partner[i]] for i in keep], dtype=np.int64)
        kept = [kept[i] for i in keep]
    ends = np.array([[it[0], it[1]] for it in kept], dtype=np.int64).reshape(-1, 2)
    length = np.linalg.norm(X[ends[:, 1]] - X[ends[:, 0]], axis=1) if len(kept) else np.zeros(0)
    cost = np.array([it[4] for it in kept], dtype=float)
    cost = np.where(np.isnan(cost), length, cost)
    origin = [it[3] for it in kept]
    panel_of = [it[2] for it in kept]
    rj, rdir = [-1] * len(kept), [np.zeros(d)] * len(kept)
    if restraints:
        for j, e, org in _restraint_candidates(frame, attachable, tol=tol):
            rj.append(j)
            rdir.append(e)
            origin.append(org)
            panel_of.append(None)
        extra = len(origin) - len(kept)
        ends = np.vstack([ends, -np.ones((extra, 2), dtype=np.int64)])
        length = np.r_[length, np.zeros(extra)]
        cost = np.r_[cost, np.zeros(extra)]
        partner = np.r_[partner, -np.ones(extra, dtype=np.int64)]
    return CandidateSet(ends=ends, joint=np.array(rj, dtype=np.int64),
                        direction=np.array(rdir, dtype=float).reshape(-1, d), length=length,
                        cost=cost, origin=tuple(origin), panel=tuple(panel_of),
                        partner=np.asarray(partner, dtype=np.int64))


def _bay_between(jframe, a: int, b: int) -> str:
    """The bay between the frames of joints ``a`` and ``b`` ('' in one frame or none)."""
    if jframe is None or min(a, b) < 0 or not jframe[a] or not jframe[b] or jframe[a] == jframe[b]:
        return ""
    la, lb = jframe[a], jframe[b]
    if la.isdigit() and lb.isdigit():
        lo, hi = sorted((int(la), int(lb)))
        return str(lo) if hi == lo + 1 else f"{lo}-{hi}"
    return "-".join(sorted((la, lb)))


def _panel_bay(corners, bay_tags, member_at, jframe=None) -> str:
    """The most common ``bay`` label of a panel's sides ('' when none).

    A side that is a member gives its ``bay`` tag; one that is not (a tie
    candidate) the bay between its ends' frames (``jframe``, the ``frame``
    joint tag).
    """
    if corners is None or (bay_tags is None and jframe is None):
        return ""
    labels = []
    for p, q in zip(corners, corners[1:] + corners[:1]):
        k = member_at.get((min(p, q), max(p, q)))
        if k is not None and bay_tags is not None and bay_tags[k]:
            labels.append(bay_tags[k])
        elif k is None and _bay_between(jframe, p, q):
            labels.append(_bay_between(jframe, p, q))
    return Counter(labels).most_common(1)[0][0] if labels else ""


def reach_rows(frame: Frame, cand: CandidateSet) -> sp.csr_matrix:
    """Each candidate's row in joint coordinates, ``(c, n d)`` sparse.

    A member's row holds ``-w`` at its first joint and ``+w`` at its second
    (``w`` its unit vector): the row of the compatibility matrix it would add
    [3]_.  A restraint's row holds its direction at its joint.  Applied to a
    mechanism's joint displacements it gives the member's elongation or the
    movement along the restraint.
    """
    d, n = frame.dimension, frame.n_joints
    c = len(cand)
    X = frame.coords
    mem = np.flatnonzero(cand.is_member)
    res = np.flatnonzero(~cand.is_member)
    a, b = cand.ends[mem, 0], cand.ends[mem, 1]
    w = X[b] - X[a]
    w /= np.linalg.norm(w, axis=1)[:, None]
    ax = np.arange(d)
    rows = np.r_[np.repeat(mem, d), np.repeat(mem, d), np.repeat(res, d)]
    cols = np.r_[(a[:, None] * d + ax).ravel(), (b[:, None] * d + ax).ravel(),
                 (cand.joint[res][:, None] * d + ax).ravel()]
    vals = np.r_[-w.ravel(), w.ravel(), cand.direction[res].ravel()]
    return sp.csr_matrix((vals, (rows, cols)), shape=(c, n * d))


def greedy_basis(reach: np.ndarray, order, threshold: float, *, skip=()) -> list[int]:
    """The greedy pass of a linear matroid: keep each row independent of those kept.

    Parameters
    ----------
    reach : (c, k) float
        One row per element.
    order : sequence of int
        The elements in order of cost, cheapest first.
    threshold : float
        A row is independent of those kept when the norm of its residual
        after orthogonal projection on them exceeds ``threshold``.
    skip : collection of int, optional
        Elements left out.

    Returns
    -------
    list of int
        The kept elements, in the order taken: a basis of the row space of
        ``reach`` of least total cost when the order is by cost (Rado [1]_,
        Edmonds [2]_).

    Examples
    --------
    >>> import numpy as np
    >>> greedy_basis(np.array([[1.0, 0], [2.0, 0], [1.0, 1]]), [1, 0, 2], 1e-9)
    [1, 2]

    Notes
    -----
    Cost O(c k r) for ``r`` kept; stops when ``r = k``.  Each residual is
    orthogonalised twice (classical Gram-Schmidt with one reorthogonalisation).
    """
    c, k = reach.shape
    Q = np.zeros((k, 0))
    kept = []
    skip = set(skip)
    for i in order:
        if len(kept) == k:
            break
        if i in skip:
            continue
        r = reach[i]
        res = r - Q @ (Q.T @ r)
        res -= Q @ (Q.T @ res)
        size = np.linalg.norm(res)
        if size > threshold:
            Q = np.c_[Q, res / size]
            kept.append(int(i))
    return kept


def _s_max(frame: Frame) -> float:
    """Largest singular value of the compatibility matrix (about two digits for big frames)."""
    C = compatibility_matrix(frame)
    if min(C.shape) == 0 or C.nnz == 0:
        return 1.0
    if C.shape[0] * C.shape[1] <= 100_000:
        return float(np.linalg.norm(C.toarray(), 2))
    K = (C.T @ C).tocsc()
    v0 = np.random.default_rng(20261201).standard_normal(K.shape[0])
    lam = spla.eigsh(K, k=1, which="LA", tol=1e-2, ncv=min(K.shape[0], 10), v0=v0,
                     return_eigenvectors=False)[0]
    return float(np.sqrt(lam))


def braced_frame(frame: Frame, cand: CandidateSet, chosen) -> Frame:
    """The frame with the chosen candidate members and restraints.

    New braces are named ``BR1``, ``BR2``... (skipping ids in use), and
    tagged ``role`` and ``group`` ``"brace"``; a tie is named as the
    extrusion names one, ``B<bay>.<planar joint>`` (``BR<n>`` when that id
    is in use), and tagged ``"tie"``.  Member tags the frame has are
    extended: ``frame`` where both ends are in one frame, ``bay`` from the
    panel's sides or the tie's frames.
    """
    chosen = list(chosen)
    mem = [i for i in chosen if cand.joint[i] < 0]
    res = [i for i in chosen if cand.joint[i] >= 0]
    used = set(frame.member_ids)
    jframe = frame.joint_tags.get("frame")
    ids, k = [], 1
    for i in mem:
        a, b = cand.ends[i]
        if cand.origin[i] == "tie":
            name = f"B{_bay_between(jframe, a, b)}.{_planar_id(frame, a, jframe[a])}"
            if name not in used:
                ids.append(name)
                used.add(name)
                continue
        while f"BR{k}" in used:
            k += 1
        ids.append(f"BR{k}")
        used.add(f"BR{k}")
    tags = {key: list(v) for key, v in frame.member_tags.items()}
    tags.setdefault("role", [""] * frame.n_members)
    bay_tags = frame.member_tags.get("bay")
    member_at = {(min(a, b), max(a, b)): k for k, (a, b) in enumerate(frame.ends.tolist())}
    for i in mem:
        a, b = cand.ends[i]
        for key, labels in tags.items():
            if key in ("role", "group"):
                labels.append("tie" if cand.origin[i] == "tie" else "brace")
            elif key == "frame":
                labels.append(jframe[a] if jframe is not None and jframe[a] == jframe[b] else "")
            elif key == "bay":
                labels.append(_bay_between(jframe, a, b) if cand.origin[i] == "tie" else
                              _panel_bay(cand.panel[i], bay_tags, member_at, jframe))
            else:
                labels.append("")
    return Frame(joint_ids=frame.joint_ids, coords=frame.coords,
                 member_ids=frame.member_ids + tuple(ids),
                 ends=np.vstack([frame.ends, cand.ends[mem].reshape(-1, 2)]),
                 restraint_joint=np.r_[frame.restraint_joint, cand.joint[res]].astype(np.int64),
                 restraint_dir=np.vstack([frame.restraint_dir,
                                          cand.direction[res].reshape(-1, frame.dimension)]),
                 dimension=frame.dimension, name=frame.name, units=frame.units,
                 source=frame.source, lines=frame.lines, joint_tags=frame.joint_tags,
                 member_tags=tags)


@dataclass(frozen=True, eq=False)
class BracingResult:
    """A bracing recommendation and the audit of the braced frame.

    Attributes
    ----------
    frame : Frame
        The frame as given.
    before : AuditResult
        Its audit; modes are numbered 1, 2... in its order.
    candidates : CandidateSet
    chosen : tuple of int
        Indices into ``candidates`` of the members and restraints to add, in
        the order of the greedy pass (tension-only: both diagonals of each
        chosen panel).
    acts_on : tuple of tuple of int
        For each chosen item, the 1-based numbers of the modes of ``before``
        it acts on (see :data:`ACTS`).
    braced : Frame
        The frame with them; new members tagged ``role = "brace"``.
    after : AuditResult
        The audit of ``braced`` by the core engine.
    alternatives : tuple of (tuple of int, float)
        Other sets of the same size that remove as much, with their total
        cost, cheapest first.
    mode_options : tuple of tuple of int
        For each mode of ``before``, the cheapest single candidates that act
        on it.
    remaining : tuple of str
        For each mode of ``after``: what kind of candidate would remove it.
    tension_only : bool
    notes : tuple of str
    """

    frame: Frame
    before: AuditResult
    candidates: CandidateSet
    chosen: tuple[int, ...]
    acts_on: tuple
    braced: Frame
    after: AuditResult
    alternatives: tuple = ()
    mode_options: tuple = ()
    remaining: tuple[str, ...] = ()
    tension_only: bool = False
    notes: tuple[str, ...] = field(default_factory=tuple)

    @property
    def members_added(self) -> list[int]:
        return [i for i in self.chosen if self.candidates.joint[i] < 0]

    @property
    def restraints_added(self) -> list[int]:
        return [i for i in self.chosen if self.candidates.joint[i] >= 0]

    @property
    def total_length(self) -> float:
        return float(sum(self.candidates.length[i] for i in self.members_added))

    def item(self, i: int, modes=None) -> dict:
        """The JSON entry of candidate ``i``."""
        f, c = self.frame, self.candidates
        if c.joint[i] >= 0:
            e = c.direction[i]
            axis = _AXES[int(np.argmax(np.abs(e)))] if np.count_nonzero(e) == 1 else None
            entry = {"joint": f.joint_ids[c.joint[i]], "direction": [float(x) for x in e],
                     "axis": axis, "origin": c.origin[i]}
        else:
            a, b = c.ends[i]
            entry = {"ends": [f.joint_ids[a], f.joint_ids[b]],
                     "length": round(float(c.length[i]), 6),
                     "cost": round(float(c.cost[i]), 6), "origin": c.origin[i],
                     "location": location(f, c, i)}
            if c.panel[i] is not None:
                entry["panel"] = [f.joint_ids[j] if j >= 0 else "ground" for j in c.panel[i]]
            if c.origin[i] == "tie panel":
                entry["needs_ties"] = [[f.joint_ids[p], f.joint_ids[q]]
                                       for p, q in _missing_ties(f, c.panel[i])]
        if modes is not None:
            entry["modes"] = list(modes)
        return entry

    def to_dict(self) -> dict:
        """The JSON document of ``spaceframe brace --json`` (plain Python types)."""
        acts = dict(zip(self.chosen, self.acts_on))
        ids = iter(self.braced.member_ids[self.frame.n_members:])
        added = []
        for i in self.members_added:
            entry = {"id": next(ids)}
            entry.update(self.item(i, acts[i]))
            added.append(entry)
        b = self.before
        return {
            "name": self.frame.name, "source": self.frame.source, "units": self.frame.units,
            "before": {"mechanisms": b.mechanisms, "internal_mechanisms": b.internal_mechanisms,
                       "rigid_body_modes": b.rigid_body_modes,
                       "modes": [{"mode": n + 1, "kind": info.kind,
                                  "description": info.description}
                                 for n, info in enumerate(b.mode_info)]},
            "candidates": {"members": int(np.sum(self.candidates.is_member)),
                           "restraints": int(np.sum(~self.candidates.is_member))},
            "tension_only": self.tension_only,
            "added": added,
            "restraints_added": [self.item(i, acts[i]) for i in self.restraints_added],
            "members_added": len(added),
            "total_length": round(self.total_length, 6),
            "stable_after": self.after.stable,
            "remaining": list(self.remaining),
            "alternatives": [{"added": [self.item(i) for i in alt], "total_cost": round(cost, 6),
                              "instead_of": [self.item(i) for i in self.chosen if i not in alt],
                              "take": [self.item(i) for i in alt if i not in self.chosen]}
                             for alt, cost in self.alternatives],
            "mode_options": [{"mode": n + 1, "candidates": [self.item(i) for i in opts]}
                             for n, opts in enumerate(self.mode_options)],
            "notes": list(self.notes),
            "after": self.after.to_dict(),
            "caution": CAUTION + " " + BRACING_CAUTION,
        }


def _tie_name(frame: Frame, a: int, b: int) -> str:
    """A tie in the trade's words: ``"bottom-chord tie at L2, bay 3"``.

    A tie is a bottom-chord tie when its first joint is at the lowest level
    of its frame (within ``DEFAULT.select`` of the frame's size; feet of
    posts left out), a longitudinal tie otherwise.
    """
    jf = frame.joint_tags["frame"]
    role = frame.joint_tags.get("role") or ("",) * frame.n_joints
    own = [j for j in range(frame.n_joints) if jf[j] == jf[a] and role[j] != "foot"]
    z = frame.coords[own, 2]
    size = float(np.max(np.ptp(frame.coords, axis=0))) or 1.0
    kind = ("bottom-chord tie" if frame.coords[a, 2] - z.min() <= DEFAULT.select * size
            else "longitudinal tie")
    return f"{kind} at {_planar_id(frame, a, jf[a])}, bay {_bay_between(jf, a, b)}"


def _missing_ties(frame: Frame, corners) -> list[tuple[int, int]]:
    """The sides of a panel that no member joins (the ties a tie-panel diagonal needs)."""
    existing = {frozenset(e) for e in frame.ends.tolist()}
    sides = zip(corners, corners[1:] + corners[:1])
    return [(p, q) for p, q in sides if p >= 0 and q >= 0 and frozenset((p, q)) not in existing]


def location(frame: Frame, cand: CandidateSet, i: int) -> str:
    """Where candidate member ``i`` is, in words: frames, bay and plane, from tags and geometry."""
    a, b = cand.ends[i]
    jf = frame.joint_tags.get("frame")
    if cand.origin[i] == "tie":
        return _tie_name(frame, a, b)
    words = []
    if jf is not None and jf[a] and jf[b]:
        words.append(f"frame {jf[a]}" if jf[a] == jf[b] else f"between frames {jf[a]} and {jf[b]}")
    member_at = {(min(p, q), max(p, q)): k for k, (p, q) in enumerate(frame.ends.tolist())}
    bay = _panel_bay(cand.panel[i], frame.member_tags.get("bay"), member_at, jf)
    if bay:
        words.append(f"bay {bay}")
    corners = cand.panel[i]
    if corners is not None and frame.dimension == 3:
        P = frame.coords[[c for c in corners if c >= 0]]
        normal = np.cross(P[1] - P[0], P[2] - P[0])
        normal /= np.linalg.norm(normal)
        centre = P.mean(axis=0)
        if abs(normal[2]) > 0.999:
            words.append(f"horizontal plane z = {centre[2]:.3g}")
        elif abs(normal[2]) < 0.001:
            axis = int(np.argmax(np.abs(normal[:2])))
            along = f" {_AXES[axis]} = {centre[axis]:.3g}" if abs(normal[axis]) > 0.999 else ""
            words.append(f"vertical plane{along}")
        else:
            pitch = np.degrees(np.arccos(min(1.0, abs(normal[2]))))
            words.append(f"plane pitched {pitch:.0f} deg")
    if cand.origin[i] == "wall panel":
        words.append("wall panel closed by the ground")
    elif cand.origin[i] == "tie panel":
        at = " and ".join(_planar_id(frame, p, jf[p]) for p, _ in _missing_ties(frame, corners))
        kind = ("plan bracing" if words and words[-1].startswith("horizontal") else
                "vertical bracing" if words and words[-1].startswith("vertical") else "bracing")
        words.append(f"{kind} in the panel closed by the ties at {at} (needs its ties)")
    elif cand.origin[i] in ("within", "listed"):
        words.append("no panel" if cand.origin[i] == "within" else "from the candidate list")
    return ", ".join(words) or "-"


def recommend_bracing(frame: Frame, *, panels: bool = True, ties: bool = True,
                      within: float | None = None,
                      listed=None, restraints: str = "auto", attachable=(),
                      exclude_boxes=(), exclude_bays=(), exclude_panels=(),
                      tension_only: bool = False, alternatives: int = 3,
                      audit_options: dict | None = None,
                      tol: Tolerances = DEFAULT) -> BracingResult:
    """The fewest, cheapest candidate members and restraints that remove every mechanism.

    The frame is audited; candidates are gathered (:func:`find_candidates`);
    each one's reach onto an orthonormal basis of the mechanisms is formed
    (:func:`reach_rows`) and the greedy pass of the linear matroid
    (:func:`greedy_basis`) picks a basis of least cost; the braced frame
    (:func:`braced_frame`) is audited again.  When the candidates cannot
    remove every mechanism, the largest set they can remove is still added
    at least cost, and each mode left is given a hint.

    Parameters
    ----------
    frame : Frame
    panels, ties, within, listed, attachable, exclude_boxes, exclude_bays, exclude_panels, \
tension_only : keyword-only
        As in :func:`find_candidates`.
    restraints : {"auto", "always", "never"}, keyword-only
        Restraint candidates: "auto" (default) only when the frame has
        rigid-body modes or ``attachable`` joints are given.
    alternatives : int, keyword-only
        At most this many alternative sets of the same size (default 3).
    audit_options : dict, keyword-only
        Passed to :func:`spaceframe.analysis.audit.audit` for both audits.
    tol : Tolerances, keyword-only

    Returns
    -------
    BracingResult

    Raises
    ------
    SpaceframeError
        For a bad option, or exclusions that leave no candidate.

    Examples
    --------
    A square panel pinned at its feet sways; one diagonal holds it.

    >>> from spaceframe import Frame
    >>> f = Frame.from_arrays([[0, 0], [1, 0], [1, 1], [0, 1]], [[0, 3], [1, 2], [2, 3]],
    ...                       supports={0: "pin", 1: "pin"})
    >>> r = recommend_bracing(f)
    >>> [r.item(i)["ends"] for i in r.members_added], r.after.stable
    ([['J1', 'J3']], True)

    Notes
    -----
    Cost: two audits, O(c k) to form the reaches of ``c`` candidates against
    ``k`` mechanisms, and O(c k r) for the greedy pass that keeps ``r``.

    References
    ----------
    See the module's references.
    """
    if restraints not in ("auto", "always", "never"):
        raise SpaceframeError(f"restraints must be 'auto', 'always' or 'never', not "
                              f"{restraints!r}")
    if within is not None and not (np.isfinite(within) and within > 0):
        raise SpaceframeError(f"the distance for pairs of joints must be a positive number, "
                              f"not {within!r}")
    opts = dict(audit_options or {})
    before = audit(frame, tol=tol, **opts)
    use_restraints = restraints == "always" or (
        restraints == "auto" and (before.rigid_body_modes > 0 or len(attachable) > 0))
    cand = find_candidates(frame, panels=panels, ties=ties, within=within, listed=listed,
                           restraints=use_restraints, attachable=attachable,
                           exclude_boxes=exclude_boxes, exclude_bays=exclude_bays,
                           exclude_panels=exclude_panels, tension_only=tension_only, tol=tol)
    notes = []
    if use_restraints and not len(frame.restraint_joint):
        notes.append("the frame has no support: restraint candidates stand at every joint")
    k = before.mechanisms
    n, d = frame.n_joints, frame.dimension
    U = before.mode_displacements.reshape(k, n * d).T if k else np.zeros((n * d, 0))
    A = reach_rows(frame, cand)
    acts_all = np.abs(A @ U) if k else np.zeros((len(cand), 0))   # (c, k), readable modes
    chosen, alts, basis = [], [], []
    if k and len(cand):
        Q, _ = np.linalg.qr(U)
        reach = np.asarray(A @ Q)
        threshold = tol.rank * _s_max(frame)
        order, elements, cost = _elements(cand, reach, tension_only)
        basis = greedy_basis(elements, order, threshold)
        chosen = _expand(basis, cand, tension_only)
        alts = _alternatives(elements, order, cost, basis, threshold, alternatives, cand,
                             tension_only)
    braced = braced_frame(frame, cand, chosen)
    after = audit(braced, tol=tol, **opts)
    removed = k - after.mechanisms
    acts_on = tuple(tuple(int(m) + 1 for m in np.flatnonzero(acts_all[i] > ACTS)) for i in chosen)
    opts_per_mode = []
    rank_order = np.argsort(np.argsort(cand.order())) if len(cand) else np.zeros(0, int)
    for m in range(k):
        touching = np.flatnonzero(acts_all[:, m] > ACTS)
        opts_per_mode.append(tuple(int(i) for i in touching[np.argsort(rank_order[touching])]
                                   [:PER_MODE]))
    if tension_only:
        notes.append("tension-only bracing: each chosen panel gets both diagonals, one for each "
                     "racking direction; a rod carries no compression")
    expected = k - len(basis)
    if after.mechanisms > expected:
        notes.append(f"the re-audit finds {after.mechanisms} mechanisms where the selection "
                     f"expected {expected}: the rank decision is close; check the braced frame")
    remaining = _hints(braced, after, restraints_tried=use_restraints)
    lateral = _lateral_note(braced, after, tol=tol)
    if lateral:
        notes.append(lateral)
    if removed <= 0 and k:
        notes.append("no candidate removes any mechanism")
    return BracingResult(frame=frame, before=before, candidates=cand, chosen=tuple(chosen),
                         acts_on=acts_on, braced=braced, after=after, alternatives=tuple(alts),
                         mode_options=tuple(opts_per_mode), remaining=remaining,
                         tension_only=tension_only, notes=tuple(notes))


def _elements(cand: CandidateSet, reach: np.ndarray, tension_only: bool):
    """Matroid elements: candidates, or (tension-only) panels as one element each.

    Returns the greedy order, the reach of every element (rows indexed like
    the candidates; a panel by its first diagonal) and each element's cost.
    """
    cost = cand.cost.copy()
    order = cand.order()
    if not tension_only:
        return order, reach, cost
    elements = reach.copy()
    p = cand.partner
    pair = np.flatnonzero(p >= 0)
    cost[pair] = cand.cost[pair] + cand.cost[p[pair]]
    stronger = np.linalg.norm(reach[p[pair]], axis=1) > np.linalg.norm(reach[pair], axis=1)
    elements[pair[stronger]] = reach[p[pair[stronger]]]
    first = np.array([p[i] < 0 or i < p[i] for i in range(len(cand))], dtype=bool)
    keys = np.lexsort((order.argsort(), np.round(cost, 12), (~cand.is_member).astype(int)))
    return [int(i) for i in keys if first[i]], elements, cost


def _expand(basis, cand: CandidateSet, tension_only: bool) -> list[int]:
    if not tension_only:
        return list(basis)
    out = []
    for i in basis:
        out.append(i)
        if cand.partner[i] >= 0:
            out.append(int(cand.partner[i]))
    return out


def _alternatives(elements, order, cost, basis, threshold, most, cand, tension_only):
    """Other bases of the same size: the greedy pass again without one chosen element."""
    found, seen = [], {frozenset(basis)}
    for e in sorted(basis, key=lambda i: -cost[i]):
        if len(found) >= most:
            break
        other = greedy_basis(elements, order, threshold, skip={e})
        if len(other) == len(basis) and frozenset(other) not in seen:
            seen.add(frozenset(other))
            found.append((tuple(_expand(other, cand, tension_only)),
                          float(sum(cost[i] for i in other))))
    return sorted(found, key=lambda t: t[1])


def _lateral_note(frame: Frame, after: AuditResult, *, tol: Tolerances) -> str:
    """For a lone planar frame in space: which joints need lateral restraint, and how to give it.

    Every member of such a frame lies in one plane and nothing ties it to
    another frame, so no candidate member can hold a joint out of that
    plane: only something stiff beside it can (a deck, plan bracing, a
    braced structure), given as restraints at ``--attach`` joints.
    """
    plane = planar_plane(frame, tol=tol)
    if plane is None or not after.mechanisms:
        return ""
    normal, centre = plane
    u = after.mode_displacements            # (k, n, 3), each mode's largest movement 1
    out = np.abs(u @ normal).max(axis=0) > ACTS
    if not out.any():
        return ""
    ids = [frame.joint_ids[j] for j in np.flatnonzero(out)]
    axis = int(np.argmax(np.abs(normal)))
    where = (f"the plane {_AXES[axis]} = {centre[axis]:.3g}" if abs(normal[axis]) > 0.999 else
             "one plane")
    direction = _AXES[axis] if abs(normal[axis]) > 0.999 else "out of that plane"
    return (f"every member lies in {where} and nothing ties the frame to another: no member "
            f"in that plane can hold a joint out of it.  Joints {', '.join(ids)} "
            f"({len(ids)}) need lateral restraint along {direction}, from something stiff "
            f"beside the frame (a deck, plan bracing, a second braced truss).  Mark the joints "
            f"that can be tied to it: --attach {','.join(ids)}")


def _hints(frame: Frame, after: AuditResult, *, restraints_tried: bool) -> tuple[str, ...]:
    """For each mode left in ``after``: what kind of candidate would remove it."""
    if not after.mechanisms:
        return ()
    from scipy.spatial import cKDTree

    X = frame.coords
    linked = [set() for _ in range(frame.n_joints)]
    for a, b in frame.ends.tolist():
        linked[a].add(b)
        linked[b].add(a)
    tree = cKDTree(X)
    near_count = min(frame.n_joints, 40)
    out = []
    for m in range(after.mechanisms):
        info = after.mode_info[m] if m < len(after.mode_info) else None
        what = f"mode {m + 1} ({info.kind}: {info.description})" if info else f"mode {m + 1}"
        if after.mode_kinds[m] == "rigid-body":
            first = ("no restraint candidate holds it" if restraints_tried else
                     "only a restraint removes it: allow restraint candidates "
                     "(--restraints always)")
            out.append(f"{what}: {first}; mark joints that can be tied to the ground or to a "
                       f"braced structure (--attach JOINT)")
            continue
        u = after.mode_displacements[m]
        j = int(np.argmax(np.linalg.norm(u, axis=1)))
        _, near = tree.query(X[j], k=near_count)
        along = ", ".join(f"{v:+.2f}" for v in u[j] / np.linalg.norm(u[j]))
        hint = (f"{what}: no candidate acts on it; joint {frame.joint_ids[j]} needs a member or "
                f"restraint along its movement ({along}), to a joint or structure that does not "
                f"move with it (list one with --candidates FILE, or --attach "
                f"{frame.joint_ids[j]})")
        for q in np.atleast_1d(near).tolist():
            if q == j or q in linked[j]:
                continue
            w = X[q] - X[j]
            L = float(np.linalg.norm(w))
            if L > 0 and abs(np.dot(w / L, u[q] - u[j])) > 0.1:
                hint = (f"{what}: no candidate acts on it; a member such as "
                        f"{frame.joint_ids[j]}-{frame.joint_ids[q]} ({L:.3g} {frame.units}, "
                        f"bounded by no panel) would: allow such members with --within "
                        f"{L:.3g}, or list them with --candidates FILE")
                break
        out.append(hint)
    return tuple(out)
