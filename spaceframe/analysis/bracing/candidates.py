"""Bracing candidates: one generator per origin, registered in :data:`GENERATORS`.

A candidate is a member that could be added (two joints) or a restraint
(a joint and a direction).  Each origin of candidates is one function of a
:class:`Search` (the frame, the options and the searches the generators
share) that returns :class:`MemberCandidate` or :class:`RestraintCandidate`
records, and one entry of :data:`GENERATORS`.  :func:`find_candidates` runs
them in the table's order, keeps one candidate per pair of joints, applies
the exclusions and returns the columns of a :class:`CandidateSet`.

The origins, in the table's order (which is also the order of preference
when two candidates cost the same):

``panel``
    Both diagonals of every planar four-sided panel bounded by members: a
    4-cycle of the member graph whose diagonals cross inside it.
``wall panel``
    Both diagonals of every wall panel closed by the ground: three members
    from one fully held joint to another, coplanar and convex with the ground
    between them as the fourth side.
``tie``
    In a frame of several frames (a ``frame`` joint tag, as
    :mod:`spaceframe.extrude` writes), a tie between every pair of
    corresponding joints of adjacent frames that no member joins (the same
    place in each frame, one frame spacing apart).
``tie panel``
    Both diagonals of every panel such ties close with members or other
    ties: a diagonal there needs its ties.
``listed``
    A user's list of joint pairs, each with an optional weight that replaces
    the length as cost.
``within``
    Every pair of joints within a distance.
``support``, ``attachable``
    Restraint candidates: the axis directions not yet held at the supported
    joints, and at joints marked attachable (every joint of a frame with no
    support at all).

Adding an origin is one generator function and one entry in
:data:`GENERATORS` (and, where it needs one, an option of
:class:`CandidateOptions`).
"""

from __future__ import annotations

import dataclasses
from collections import defaultdict
from dataclasses import dataclass
from functools import cached_property
from typing import Callable

import numpy as np

from ...errors import SpaceframeError
from ...model import Frame
from ...suggest import did_you_mean
from ...tolerances import DEFAULT, Tolerances
from .frames import bay_key, bay_labels, frame_labels, frame_offset, panel_bay

__all__ = ["MemberCandidate", "RestraintCandidate", "CandidateOptions", "CandidateSet",
           "Search", "GENERATORS", "ORIGINS", "find_candidates", "panel_diagonals",
           "tie_candidates"]


@dataclass(frozen=True)
class MemberCandidate:
    """A member that could be added.

    Attributes
    ----------
    a, b : int
        End joints, ``a < b``.
    origin : str
        The key of the generator in :data:`GENERATORS` that found it.
    corners : tuple of int or None
        The corners of the panel it is a diagonal of, in cyclic order (``-1``
        for the ground side of a wall panel); None for no panel.
    weight : float
        The cost given by the user (NaN: the length).
    """

    a: int
    b: int
    origin: str
    corners: tuple[int, ...] | None = None
    weight: float = float("nan")

    @property
    def pair(self) -> tuple[int, int]:
        return (self.a, self.b)


@dataclass(frozen=True)
class RestraintCandidate:
    """A restraint that could be added: ``joint`` held along the unit vector ``direction``."""

    joint: int
    direction: tuple[float, ...]
    origin: str


@dataclass(frozen=True)
class CandidateOptions:
    """Which generators run, and their inputs (see :func:`find_candidates`)."""

    panels: bool = True
    ties: bool = True
    within: float | None = None
    listed: tuple | None = None
    restraints: bool = False
    attachable: tuple[int, ...] = ()
    #: Joints whose restraint candidates are limited to given directions: pairs
    #: ``(joint, unit direction)``; a joint listed here gets only its directions.
    attach_directions: tuple = ()


class Search:
    """What every generator gets: the frame, the options, the tolerances and shared searches.

    The searches two generators need (the tie pairs; the 4-cycles, with the
    tie pairs as sides) are computed at most once, on first use.
    """

    def __init__(self, frame: Frame, options: CandidateOptions, tol: Tolerances = DEFAULT):
        self.frame, self.options, self.tol = frame, options, tol

    @cached_property
    def ties(self) -> list[MemberCandidate]:
        return tie_candidates(self.frame, tol=self.tol) if self.options.ties else []

    @cached_property
    def four_cycles(self) -> list[MemberCandidate]:
        if not self.options.panels:
            return []
        return _four_cycle_diagonals(self.frame, [c.pair for c in self.ties], self.tol)


# ----------------------------------------------------------------------------- generators

def planar_panels(search: Search) -> list[MemberCandidate]:
    """Both diagonals of every planar panel whose four sides are members."""
    return [c for c in search.four_cycles if c.origin == "panel"]


def ground_wall_panels(search: Search) -> list[MemberCandidate]:
    """Both diagonals of every wall panel closed by the ground (:func:`panel_diagonals`)."""
    if not search.options.panels:
        return []
    return _wall_diagonals(search.frame, [c.pair for c in search.ties], search.tol)


def frame_ties(search: Search) -> list[MemberCandidate]:
    """Ties between corresponding joints of adjacent frames (:func:`tie_candidates`)."""
    return search.ties


def tie_panels(search: Search) -> list[MemberCandidate]:
    """Both diagonals of every panel with a tie candidate among its sides."""
    return [c for c in search.four_cycles if c.origin == "tie panel"]


def listed_pairs(search: Search) -> list[MemberCandidate]:
    """The user's list: ``options.listed = (ends (c, 2) int, weights (c,) float)``."""
    listed = search.options.listed
    if listed is None:
        return []
    return [MemberCandidate(min(a, b), max(a, b), "listed", weight=w)
            for (a, b), w in zip(np.asarray(listed[0]).tolist(), listed[1])]


def pairs_within(search: Search) -> list[MemberCandidate]:
    """Every pair of joints at most ``options.within`` apart (a k-d tree query)."""
    frame, within = search.frame, search.options.within
    if within is None or frame.n_joints < 2:
        return []
    from scipy.spatial import cKDTree

    pairs = cKDTree(frame.coords).query_pairs(float(within), output_type="ndarray")
    return [MemberCandidate(a, b, "within") for a, b in sorted(map(tuple, pairs.tolist()))]


def support_directions(search: Search) -> list[RestraintCandidate]:
    """Axis directions not yet held at the supported joints."""
    frame = search.frame
    if not search.options.restraints:
        return []
    return _free_axes(frame, sorted(set(frame.restraint_joint.tolist())), "support", search.tol)


def attachable_directions(search: Search) -> list[RestraintCandidate]:
    """Axis directions at the attachable joints (every joint when none is supported).

    A joint given with its directions (``options.attach_directions``, a tie
    that holds only along the normal of a facade) gets those directions,
    less any part its supports already hold, instead of the axes.
    """
    frame = search.frame
    if not search.options.restraints:
        return []
    supported = set(frame.restraint_joint.tolist())
    limited = {}
    for j, e in search.options.attach_directions:
        limited.setdefault(int(j), []).append(e)
    joints = set(search.options.attachable) if supported else set(range(frame.n_joints))
    joints |= set(search.options.attachable)
    out = _free_axes(frame, sorted(joints - supported - set(limited)), "attachable", search.tol)
    for j in sorted(limited):
        out += _free_directions(frame, j, limited[j], "attachable", search.tol)
    return sorted(out, key=lambda c: c.joint)


#: The candidate generators by origin, in order of preference: where two find the same
#: pair of joints the first keeps it (a listed one lends its weight), and where costs tie
#: the earlier origin comes first in the greedy pass.
GENERATORS: dict[str, Callable[[Search], list]] = {
    "panel": planar_panels,
    "wall panel": ground_wall_panels,
    "tie": frame_ties,
    "tie panel": tie_panels,
    "listed": listed_pairs,
    "within": pairs_within,
    "support": support_directions,
    "attachable": attachable_directions,
}
#: Candidate origins, in the order they are preferred when costs tie.
ORIGINS = tuple(GENERATORS)


# --------------------------------------------------------------------------- the search

def _pad3(frame: Frame) -> np.ndarray:
    X = frame.coords
    return X if frame.dimension == 3 else np.c_[X, np.zeros(len(X))]


def _crossing(P, a, b, c, e, tol: Tolerances) -> bool:
    """Do the diagonals ``a-c`` and ``b-e`` of the cycle ``a, b, c, e`` cross inside both?

    Not when they are parallel (``tol.parallel_diagonals``: three corners in
    a line, no panel); yes when they pass within ``tol.panel_plane * L`` of
    each other (``L`` the longer) at parameters strictly inside both
    (``tol.crossing_margin``).
    """
    d1, d2 = P[c] - P[a], P[e] - P[b]
    L = max(np.linalg.norm(d1), np.linalg.norm(d2))
    if (np.linalg.norm(np.cross(d1, d2))
            <= tol.parallel_diagonals * np.linalg.norm(d1) * np.linalg.norm(d2)):
        return False
    A = np.c_[d1, -d2]
    st, *_ = np.linalg.lstsq(A, P[b] - P[a], rcond=None)
    gap = np.linalg.norm(P[a] + st[0] * d1 - P[b] - st[1] * d2)
    t = tol.crossing_margin
    return gap <= tol.panel_plane * L and t < st[0] < 1 - t and t < st[1] < 1 - t


def _neighbours(frame: Frame) -> list[set]:
    nbrs = [set() for _ in range(frame.n_joints)]
    for a, b in frame.ends.tolist():
        nbrs[a].add(b)
        nbrs[b].add(a)
    return nbrs


def _four_cycle_diagonals(frame: Frame, also, tol: Tolerances) -> list[MemberCandidate]:
    """Diagonals of the planar convex 4-cycles of members and of the pairs ``also``.

    Origin ``"panel"``, or ``"tie panel"`` when a side is one of ``also``.
    A diagonal that is a member or one of ``also`` is left out.  Each
    panel's diagonals are consecutive.  Cost O(sum of squared joint
    degrees): every 4-cycle is found from the pairs of sides at each joint.
    """
    P = _pad3(frame)
    nbrs = _neighbours(frame)
    extra = {frozenset(map(int, e)) for e in also} - {frozenset(e) for e in frame.ends.tolist()}
    for a, b in (tuple(e) for e in extra):
        nbrs[a].add(b)
        nbrs[b].add(a)
    wedges = defaultdict(list)
    for v in range(frame.n_joints):
        nv = sorted(nbrs[v])
        for i, u in enumerate(nv):
            for w in nv[i + 1:]:
                wedges[(u, w)].append(v)
    out, seen = [], set()
    for (u, w), centres in wedges.items():
        for i, v1 in enumerate(centres):
            for v2 in centres[i + 1:]:
                key = frozenset(((u, w), (min(v1, v2), max(v1, v2))))
                if key in seen:
                    continue
                seen.add(key)
                if not _crossing(P, u, v1, w, v2, tol):
                    continue
                corners = (u, v1, w, v2)
                sides = zip(corners, corners[1:] + corners[:1])
                origin = ("tie panel" if any(frozenset(s) in extra for s in sides) else "panel")
                for p, q in ((u, w), (v1, v2)):
                    if q not in nbrs[p]:
                        out.append(MemberCandidate(min(p, q), max(p, q), origin, corners))
    return out


def _wall_diagonals(frame: Frame, also, tol: Tolerances) -> list[MemberCandidate]:
    """Diagonals of the wall panels closed by the ground (see :func:`panel_diagonals`).

    A wall panel ``A, x, y, B``: members ``A-x``, ``x-y``, ``y-B`` with ``A``
    and ``B`` held in every direction and no member ``A-B`` (that would make
    it an ordinary panel).  A diagonal that is one of the pairs ``also``
    (a tie candidate) is left to that candidate.  No 4-cycle has the same diagonals, since such a
    cycle would need the side ``A-B``.  Cost O(sum over members of the
    product of their ends' degrees).
    """
    P = _pad3(frame)
    nbrs = _neighbours(frame)
    also = {frozenset(map(int, e)) for e in also}
    held = np.bincount(frame.restraint_joint, minlength=frame.n_joints) >= frame.dimension
    out, seen = [], set()
    for x, y in frame.ends.tolist():
        for A in sorted(j for j in nbrs[x] if held[j] and j != y):
            for B in sorted(j for j in nbrs[y] if held[j] and j not in (x, A)):
                key = frozenset(((min(A, y), max(A, y)), (min(x, B), max(x, B))))
                if key in seen or B in nbrs[A]:
                    continue
                seen.add(key)
                if _crossing(P, A, x, y, B, tol):
                    for p, q in ((A, y), (x, B)):
                        if q not in nbrs[p] and frozenset((p, q)) not in also:
                            out.append(MemberCandidate(min(p, q), max(p, q), "wall panel",
                                                       (A, x, y, B)))
    return out


def panel_diagonals(frame: Frame, *, also=(), tol: Tolerances = DEFAULT) -> list[MemberCandidate]:
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
    list of MemberCandidate
        Origin ``"panel"``, ``"tie panel"`` or ``"wall panel"``, with the
        panel's ``corners`` in cyclic order (the first and last of a wall
        panel are the supported joints).  Each panel's two diagonals are
        consecutive; the 4-cycles come first.

    Notes
    -----
    Cost O(sum of squared joint degrees): every 4-cycle is found from the
    pairs of members at each joint.
    """
    return _four_cycle_diagonals(frame, also, tol) + _wall_diagonals(frame, also, tol)


def tie_candidates(frame: Frame, *, tol: Tolerances = DEFAULT) -> list[MemberCandidate]:
    """Ties between corresponding joints of adjacent frames that no member joins.

    In a frame made of frames (the ``frame`` joint tag of
    :func:`spaceframe.extrude.extrude`), joint ``a`` of one frame and ``b``
    of the next correspond when ``|X[b] - X[a] - t| <= tol.merge * size``,
    ``t`` the translation from one frame to the next
    (:func:`~.frames.frame_offset`) and ``size`` the largest extent of the
    frame.  Pairs of joints both held in every direction are left out (a tie
    there holds nothing).

    Returns
    -------
    list of MemberCandidate
        Origin ``"tie"``, ends in joint order; the bay is
        :func:`~.frames.bay_between` of the ends.

    Notes
    -----
    Cost O(n log n): one k-d tree query per pair of adjacent frames.
    """
    frames = frame_labels(frame)
    if frame.dimension != 3 or len(frames) < 2:
        return []
    from scipy.spatial import cKDTree

    X = frame.coords
    size = float(np.max(np.ptp(X, axis=0))) or 1.0
    existing = {(min(a, b), max(a, b)) for a, b in frame.ends.tolist()}
    held = np.bincount(frame.restraint_joint, minlength=frame.n_joints) >= frame.dimension
    out = []
    for (la, A), (lb, B) in zip(frames, frames[1:]):
        t = frame_offset(frame, A, B, la, lb)
        if np.linalg.norm(t) <= tol.merge * size:
            continue  # frames in one place: nothing to tie
        dist, idx = cKDTree(X[B]).query(X[A] + t, distance_upper_bound=tol.merge * size)
        for a, dd, ii in zip(A.tolist(), dist.tolist(), idx.tolist()):
            if not np.isfinite(dd):
                continue
            b = int(B[ii])
            if (min(a, b), max(a, b)) in existing or (held[a] and held[b]):
                continue
            out.append(MemberCandidate(min(a, b), max(a, b), "tie"))
    return out


def _free_axes(frame: Frame, joints, origin: str, tol: Tolerances) -> list[RestraintCandidate]:
    """The axis directions at ``joints`` that their restraints do not already hold."""
    out = []
    for j in joints:
        out += _free_directions(frame, j, np.eye(frame.dimension), origin, tol)
    return out


def _free_directions(frame: Frame, j: int, directions, origin: str,
                     tol: Tolerances) -> list[RestraintCandidate]:
    """Restraint candidates at joint ``j`` along ``directions`` (unit rows) that its
    restraints do not already hold (``tol.restraint_dependence``)."""
    held = frame.restraint_dir[frame.restraint_joint == j]
    Q = np.linalg.qr(held.T)[0] if len(held) else None
    out = []
    for e in np.asarray(directions, dtype=float):
        if Q is not None and np.linalg.norm(e - Q @ (Q.T @ e)) <= tol.restraint_dependence:
            continue
        out.append(RestraintCandidate(int(j), tuple(e.tolist()), origin))
    return out


def free_directions(frame: Frame, j: int, directions, *, tol: Tolerances = DEFAULT):
    """Which of ``directions`` (unit rows, ``(q, d)``) joint ``j``'s supports leave free.

    Returns
    -------
    list of bool
        True where a restraint along that direction would hold something new.
    """
    free = {tuple(c.direction) for c in _free_directions(frame, j, directions, "", tol)}
    return [tuple(np.asarray(e, float).tolist()) in free for e in directions]


# ----------------------------------------------------------------------- the candidate set

@dataclass(frozen=True, eq=False)
class CandidateSet:
    """Candidate members and restraints, as named columns.

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
    tier : (c,) int
        The first key of the greedy order, before the cost: by default 0 for
        members and 1 for restraints (restraints only for what no member
        removes); :mod:`.layout` sets it for restraints that compete on cost
        and for ties to a building that come first.
    filters : tuple of (str, str, int)
        What each filter matched: ``(filter, value, candidates removed)``, in
        the order applied (exclusions here, layout rules in :mod:`.layout`);
        for ``"attach"`` the value is the number of joints given and the count
        the restraint candidates made there.
    """

    ends: np.ndarray
    joint: np.ndarray
    direction: np.ndarray
    length: np.ndarray
    cost: np.ndarray
    origin: tuple[str, ...]
    panel: tuple
    partner: np.ndarray
    tier: np.ndarray | None = None
    filters: tuple = ()

    def __post_init__(self):
        if self.tier is None:
            object.__setattr__(self, "tier", (self.joint >= 0).astype(np.int64))

    def __len__(self) -> int:
        return len(self.origin)

    @property
    def is_member(self) -> np.ndarray:
        return self.joint < 0

    def order(self) -> np.ndarray:
        """Indices in the order of the greedy pass: by tier (members before restraints
        unless :mod:`.layout` says otherwise), then cost, origin, ends."""
        keys = np.lexsort((self.joint, self.ends[:, 1], self.ends[:, 0],
                           np.array([ORIGINS.index(o) for o in self.origin]),
                           np.round(self.cost, 12), self.tier))
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
                            tuple(self.panel[i] for i in keep), partner, self.tier[keep],
                            self.filters)

    @classmethod
    def from_records(cls, frame: Frame, members, restraints) -> "CandidateSet":
        """The columns of member records (diagonals paired by panel), then restraint records."""
        d, X = frame.dimension, frame.coords
        by_panel = defaultdict(list)
        for i, c in enumerate(members):
            if c.corners is not None:
                by_panel[frozenset(c.corners)].append(i)
        partner = np.full(len(members) + len(restraints), -1, dtype=np.int64)
        for idx in by_panel.values():
            if len(idx) == 2:
                partner[idx[0]], partner[idx[1]] = idx[1], idx[0]
        ends = np.array([c.pair for c in members] + [(-1, -1)] * len(restraints),
                        dtype=np.int64).reshape(-1, 2)
        m = len(members)
        length = np.zeros(len(ends))
        if m:
            length[:m] = np.linalg.norm(X[ends[:m, 1]] - X[ends[:m, 0]], axis=1)
        weight = np.array([c.weight for c in members] + [0.0] * len(restraints), dtype=float)
        return cls(ends=ends,
                   joint=np.array([-1] * m + [r.joint for r in restraints], dtype=np.int64),
                   direction=np.array([(0.0,) * d] * m + [r.direction for r in restraints],
                                      dtype=float).reshape(-1, d),
                   length=length, cost=np.where(np.isnan(weight), length, weight),
                   origin=tuple(c.origin for c in list(members) + list(restraints)),
                   panel=tuple([c.corners for c in members] + [None] * len(restraints)),
                   partner=partner)


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


def _one_per_pair(frame: Frame, found) -> list[MemberCandidate]:
    """One candidate per joint pair no member joins: the first found (a panel keeps its
    corners), but a listed candidate keeps its weight."""
    existing = {(min(a, b), max(a, b)) for a, b in frame.ends.tolist()}
    chosen: dict[tuple[int, int], MemberCandidate] = {}
    for c in found:
        if c.pair in existing:
            continue
        if c.pair not in chosen:
            chosen[c.pair] = c
        elif c.origin == "listed":
            first = chosen[c.pair]
            chosen[c.pair] = MemberCandidate(c.a, c.b, "listed", first.corners, c.weight)
    return list(chosen.values())


def _bay_filter(frame: Frame, values, bays_of) -> list[tuple[str, set]]:
    """Each excluded bay as its label, with the candidates in it; unknown ones refused."""
    labels = bay_labels(frame)
    out = []
    for v in values:
        key = bay_key(v)
        if key not in labels:
            valid = ", ".join(f"B{b}" if b[:1].isdigit() else b for b in labels) or "none"
            raise SpaceframeError(f"bay {v!r} (excluded) is not a bay of "
                                  f"{frame.source or 'the model'}"
                                  f"{did_you_mean(key, labels)}; its bays are {valid} "
                                  f"(write 'B1' or '1')")
        out.append((f"B{key}" if key[:1].isdigit() else key,
                    {i for i, b in enumerate(bays_of) if b == key}))
    return out


def _panel_filter(frame: Frame, panels, members) -> list[tuple[str, set]]:
    """Each excluded panel (a set of corner joints) with the candidates in it."""
    out = []
    for p in panels:
        p = frozenset(int(j) for j in p)
        hit = {i for i, c in enumerate(members)
               if c.corners is not None and frozenset(j for j in c.corners if j >= 0) == p}
        name = ",".join(frame.joint_ids[j] for j in sorted(p))
        if not hit:
            near = sorted({",".join(frame.joint_ids[j] for j in sorted(q))
                           for q in (frozenset(j for j in c.corners if j >= 0)
                                     for c in members if c.corners is not None)
                           if len(q & p) >= min(len(p), 3) - 1})[:6]
            raise SpaceframeError(f"no candidate panel has the corners {name} (excluded panel)"
                                  f"; panels sharing its corners: "
                                  f"{'; '.join(near) if near else 'none'}")
        out.append((name, hit))
    return out


def _box_filter(frame: Frame, boxes, members) -> list[tuple[str, set]]:
    """Each excluded box with the candidates passing through it."""
    X = frame.coords
    out = []
    for lo, hi in boxes:
        hit = {i for i, c in enumerate(members) if _segment_hits_box(X[c.a], X[c.b], lo, hi)}
        name = ",".join(f"{v:g}" for v in list(lo) + list(hi))
        if not hit:
            extent = ",".join(f"{v:g}" for v in list(X.min(axis=0)) + list(X.max(axis=0)))
            raise SpaceframeError(f"no candidate member passes through the excluded box {name}; "
                                  f"the frame spans the box {extent} ({frame.units})")
        out.append((name, hit))
    return out


def find_candidates(frame: Frame, *, panels: bool = True, ties: bool = True,
                    within: float | None = None,
                    listed=None, restraints: bool = False, attachable=(), attach_directions=(),
                    exclude_boxes=(), exclude_bays=(), exclude_panels=(),
                    tension_only: bool = False, tol: Tolerances = DEFAULT) -> CandidateSet:
    """Gather the bracing candidates of a frame: every generator of :data:`GENERATORS`.

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
    attach_directions : sequence of (int, (d,) float), keyword-only
        Attachable joints limited to these unit directions (a tie to a
        facade that holds only along its normal).
    exclude_boxes : sequence of ((d,), (d,)) float, keyword-only
        No candidate member may pass through these boxes (low, high corners).
    exclude_bays : sequence of str, keyword-only
        Bays (the ``bay`` tag of a panel's members; a tie's bay for a
        side that is a tie) where no brace goes, as the output writes them
        (``"B1"``) or as labels (``"1"``).  Ties themselves are kept.
    exclude_panels : sequence of sets of int, keyword-only
        Panels, by their corner joints, where no brace goes.
    tension_only : bool, keyword-only
        Rods: keep only panel diagonals whose partner diagonal is a candidate
        too (candidates of no panel, such as a listed guy, are all kept).

    Returns
    -------
    CandidateSet
        Members in the order found (generators in table order), then
        restraints.

    Raises
    ------
    SpaceframeError
        When the exclusions leave no candidate member of those found, or one
        of them matches none (a bay that does not exist, a panel no candidate
        lies in, a box no candidate passes through): the message lists the
        valid values.
    """
    search = Search(frame, CandidateOptions(panels=panels, ties=ties, within=within,
                                            listed=listed, restraints=restraints,
                                            attachable=tuple(attachable),
                                            attach_directions=tuple(attach_directions)), tol)
    found = [c for generate in GENERATORS.values() for c in generate(search)]
    members = _one_per_pair(frame, [c for c in found if isinstance(c, MemberCandidate)])
    restraint_rows = [c for c in found if isinstance(c, RestraintCandidate)]
    boxes = [(np.asarray(lo, float), np.asarray(hi, float)) for lo, hi in exclude_boxes]
    member_at = {(min(a, b), max(a, b)): k for k, (a, b) in enumerate(frame.ends.tolist())}
    bays_of = [panel_bay(frame, c.corners, member_at) if c.corners is not None else ""
               for c in members] if exclude_bays else []
    zones = ([("exclude box", *z) for z in _box_filter(frame, boxes, members)]
             + [("exclude bay", *z) for z in _bay_filter(frame, exclude_bays, bays_of)]
             + [("exclude panel", *z) for z in _panel_filter(frame, exclude_panels, members)])
    out = set().union(*(hit for _, _, hit in zones)) if zones else set()
    kept = [c for i, c in enumerate(members) if i not in out]
    if members and not kept and zones:
        raise SpaceframeError(f"the exclusion zones leave none of the {len(members)} candidate "
                              f"members; make a zone smaller or drop one, so that some panel "
                              f"can be braced")
    filters = tuple((kind, name, len(hit)) for kind, name, hit in zones)
    given = set(int(j) for j in attachable) | {int(j) for j, _ in attach_directions}
    if given and restraints:
        filters += (("attach", str(len(given)),
                     sum(c.joint in given for c in restraint_rows if c.origin == "attachable")),)
    if tension_only:
        pairs = CandidateSet.from_records(frame, kept, [])
        single = [c for c, p in zip(kept, pairs.partner.tolist())
                  if p < 0 and c.corners is not None]
        kept = [c for c, p in zip(kept, pairs.partner.tolist()) if p >= 0 or c.corners is None]
        filters += (("tension only", "one diagonal", len(single)),)
    cand = CandidateSet.from_records(frame, kept, restraint_rows)
    return dataclasses.replace(cand, filters=filters)
