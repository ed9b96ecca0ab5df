"""Layout rules: bracing a designer would build, each rule keeping the choice within what it allows.

The exact selection (:mod:`.selection`) picks the fewest, cheapest
candidates.  A designer lays bracing out by rules as well: braced bays at the
ends or at a spacing, bracing in the roof and the walls, mirror-image pairs,
ties to a building before braces, nothing across the floor of a frame.  This
module holds those rules; :mod:`.selection` calls it twice, once to
:func:`prepare` the candidates (costs, order, filters) and, when a rule is
no matroid constraint, once to :func:`select` under it.

Rules that only remove candidates keep the choice a matroid basis, so the
greedy pass stays exact (Rado [1]_, Edmonds [2]_):

``planes``
    Which planes may hold braces: ``roof`` (pitched panels, and level ones at
    the top of the frame), ``walls`` (vertical panels: side and end walls,
    vertical bracing between trusses; a brace in no panel stands in the
    vertical plane through it unless it is level) and ``plan`` (level panels
    below the top).  Ties and restraints are no braces and stay.
``braced_bays`` (which bays may hold braces)
    ``"ends"`` (the first and last bay), a list of bays, or ``"every:N"``
    (every bay may).  A brace in no bay (in one frame's own plane) stays.
clear space (unless ``allow_rakers``)
    No member may pass through the clear space of the building at floor
    level: between a frame's outer joints, above its lowest support, below
    its lowest member, in the plane of an interior frame or in a bay between
    two frames (:func:`clear_space_hits`).
costs and order
    Each kind's factor multiplies its cost (:data:`KINDS`); a restraint costs
    its factor times the median member length.  Restraints come after members
    (only for what no member removes) unless ``restraints="always"``, when
    they compete on cost; with ``ties_first`` restraints at the joints marked
    attachable come before everything.  An order by (tier, cost) is still the
    greedy order of a matroid, so the choice stays exact.

Rules that constrain the chosen set are no matroid constraints:

``braced_bays`` (which bays must hold braces)
    ``"ends"`` and a list: each of those bays holds at least one brace;
    ``"every:N"``: every ``N`` consecutive bays hold at least one (common
    practice; the spacing is the designer's).
``symmetric``
    Mirror-image candidates about the building's centre lines (the vertical
    planes through the middle of its plan extent, where the frame maps onto
    itself) are chosen together, as one group; a candidate whose image is no
    candidate is removed.

Under those, :func:`select` searches: every subset of the groups that act
on some mechanism when there are at most :data:`EXACT_GROUPS` (exact);
otherwise the greedy pass over the groups, with, for each bay group left
without a brace, the best of its :data:`TRIALS` cheapest groups forced first,
then a reverse delete (each group taken, dearest first, dropped when the
others keep the rank and the bays); not proven least, unless it matches the
bound below.  Mechanisms removed come first: a rule never leaves a mechanism
that the candidates it allows can remove.  The choice records which search
held, and the count and cost of the plain greedy pass over the candidates
the rules allow: no set removing as many mechanisms has fewer items, nor
(with one tier) costs less, so the difference bounds what the rules cost; a
choice that matches it tier by tier is least (``method="bound"``).

References
----------
.. [1] R. Rado, "Note on independence functions", Proc. London Math. Soc.
   (3) 7, 300-320, 1957.
.. [2] J. Edmonds, "Matroids and the greedy algorithm", Math. Programming 1,
   127-136, 1971.
"""

from __future__ import annotations

import dataclasses
import itertools
from dataclasses import dataclass

import numpy as np

from ...errors import SpaceframeError
from ...model import Frame
from ...suggest import did_you_mean
from ...tolerances import DEFAULT, DISPLAY, Tolerances
from .candidates import CandidateSet
from .frames import bay_key, bay_labels, candidate_bay, frame_labels, joint_bays

__all__ = ["LayoutRules", "LayoutChoice", "LayoutPlan", "KINDS", "PLANES", "EXACT_GROUPS",
           "TRIALS", "PLANE_WORDS", "prepare", "select", "plane_kinds", "plane_kind",
           "clear_space_hits", "mirrors",
           "candidate_kind", "parse_costs"]

#: The kinds a cost factor is given for: ``tie`` (a tie between frames), ``brace`` (every
#: other member), ``restraint``.
KINDS = ("tie", "brace", "restraint")
#: The planes a brace may be in (:func:`plane_kinds`).
PLANES = ("roof", "walls", "plan")
#: Other words for the planes, as the locations in the output write them.
PLANE_WORDS = {"wall": "walls", "vertical": "walls", "horizontal": "plan", "level": "plan",
               "pitched": "roof"}
#: Exact search over every subset of the groups when at most this many act on a mechanism.
EXACT_GROUPS = 12
#: Groups tried as the first brace of a bay group the greedy pass leaves without one.
TRIALS = 24


@dataclass(frozen=True)
class LayoutRules:
    """The layout rules of a bracing recommendation (all off by default but the clear space).

    Attributes
    ----------
    braced_bays : str or sequence of str or None
        ``"ends"``, ``"every:N"``, or bays (``"B1"``, ``"1"``).
    symmetric : bool
        Mirror-image pairs about the building's centre lines chosen together.
    planes : sequence of str or None
        Of :data:`PLANES`: the planes that may hold braces (None: all).
    allow_rakers : bool
        Let members pass through the clear space at floor level.
    ties_first : bool
        Restraints at the attachable joints come before every member.
    costs : dict of str to float
        A factor per kind of :data:`KINDS` (default 1 each).
    """

    braced_bays: object = None
    symmetric: bool = False
    planes: tuple | None = None
    allow_rakers: bool = False
    ties_first: bool = False
    costs: dict = dataclasses.field(default_factory=dict)


@dataclass(frozen=True, eq=False)
class LayoutPlan:
    """What :func:`prepare` found for :func:`select`: the groups chosen together and the
    bay groups that must each hold a brace."""

    groups: tuple           # tuples of candidate indices, in greedy order
    group_bays: tuple       # the bays of each group's braces (frozensets)
    required: tuple         # frozensets of bays, each to hold at least one brace
    mirrors: tuple          # (axis, centre) of each mirror plane used
    search: bool            # a rule that is no matroid constraint is in force
    tension_only: bool


@dataclass(frozen=True)
class LayoutChoice:
    """How the choice under the layout rules was made, and which rules held.

    Attributes
    ----------
    method : str
        ``"matroid"`` (the greedy pass met every rule: exact), ``"exhaustive"``
        (every subset of the groups that act: exact), ``"bound"`` (the greedy
        search found a choice as few and as cheap as the one without the
        rules, tier by tier: exact) or ``"greedy"`` (the greedy pass with bay
        groups seeded: not proven least).
    exact : bool
    tried : int
        Sets evaluated.
    count, cost : int, float
        Members and restraints chosen, their total cost.
    least_count : int
        Items the greedy pass over the same candidates takes without these
        rules: no set removing as many mechanisms has fewer.
    least_cost : float
        Their cost: with members and restraints in one tier (or only members),
        no set removing as many mechanisms costs less.
    required : tuple of tuple of str
        The bay groups that must each hold a brace.
    unmet : tuple of tuple of str
        Those left without one (no brace there removes anything more).
    mirrors : tuple of (str, float)
        The mirror planes used: axis letter and coordinate.
    """

    method: str
    exact: bool
    tried: int
    count: int
    cost: float
    least_count: int
    least_cost: float
    required: tuple = ()
    unmet: tuple = ()
    mirrors: tuple = ()


# ------------------------------------------------------------------------------ parsing

def parse_costs(text) -> dict:
    """``"tie=1,brace=1.5,restraint=0.5"`` (or a dict) to factors by kind."""
    if isinstance(text, dict):
        pairs = list(text.items())
    else:
        pairs = []
        for part in (p.strip() for p in str(text or "").split(",") if p.strip()):
            key, sep, value = part.partition("=")
            if not sep:
                raise SpaceframeError(f"a cost is KIND=FACTOR, e.g. 'brace=1.5'; not {part!r}")
            pairs.append((key.strip(), value.strip()))
    out = {}
    for key, value in pairs:
        if key not in KINDS:
            raise SpaceframeError(f"cost kind {key!r} is not one of {', '.join(KINDS)}"
                                  f"{did_you_mean(key, KINDS)}")
        try:
            f = float(value)
        except (TypeError, ValueError):
            f = -1.0
        if not (np.isfinite(f) and f > 0):
            raise SpaceframeError(f"the cost factor of {key} must be a positive number, "
                                  f"not {value!r}")
        out[key] = f
    return out


def _bay_rule(frame: Frame, rule) -> tuple[set, list]:
    """The bays braces may go in, and the groups of bays that must each hold one."""
    labels = bay_labels(frame)
    if not labels:
        raise SpaceframeError(f"{frame.source or 'the model'} has no bays (no 'frame' joint tag "
                              f"or 'bay' member tag, as an extruded model has); braced bays "
                              f"need them")
    named = ", ".join(f"B{b}" if b[:1].isdigit() else b for b in labels)
    if isinstance(rule, str) and rule.strip() == "ends":
        ends = [labels[0], labels[-1]]
        return set(ends), [frozenset([b]) for b in dict.fromkeys(ends)]
    if isinstance(rule, str) and rule.strip().startswith("every"):
        _, _, n = rule.partition(":")
        try:
            N = int(n)
        except ValueError:
            N = 0
        if N < 1:
            raise SpaceframeError(f"braced bays 'every:N' needs a whole number N of at least 1, "
                                  f"not {rule!r}")
        N = min(N, len(labels))
        return set(labels), [frozenset(labels[i:i + N]) for i in range(len(labels) - N + 1)]
    items = rule.split(",") if isinstance(rule, str) else list(rule)
    keys = []
    for item in (str(i).strip() for i in items if str(i).strip()):
        key = bay_key(item)
        if key not in labels:
            raise SpaceframeError(f"bay {item!r} (braced) is not a bay of "
                                  f"{frame.source or 'the model'}{did_you_mean(key, labels)}; "
                                  f"its bays are {named} (or give 'ends' or 'every:N')")
        keys.append(key)
    if not keys:
        raise SpaceframeError("braced bays: give 'ends', 'every:N' or a list of bays")
    return set(keys), [frozenset([k]) for k in dict.fromkeys(keys)]


# ----------------------------------------------------------------------- classification

def candidate_kind(cand: CandidateSet, i: int) -> str:
    """``"tie"``, ``"brace"`` or ``"restraint"`` (:data:`KINDS`)."""
    if cand.joint[i] >= 0:
        return "restraint"
    return "tie" if cand.origin[i] == "tie" else "brace"


def plane_kinds(frame: Frame, cand: CandidateSet, *, tol: Tolerances = DEFAULT) -> list:
    """The plane of each candidate brace: ``"roof"``, ``"walls"`` or ``"plan"``; None for
    ties and restraints.

    A panel's diagonal takes its panel's plane: vertical (``|n_z| <
    1 - axis_plane``, :class:`~spaceframe.tolerances.Display`) is ``walls``,
    level (``|n_z| > axis_plane``) is ``plan``, or ``roof`` at the top of the
    frame (within ``tol.select * size`` of its highest joint); pitched is
    ``roof``.  A brace in no panel: level is ``plan`` (or ``roof`` at the
    top), otherwise ``walls`` (the vertical plane through it).  In a plane
    frame every brace is in the frame's own plane, counted as ``walls``.
    """
    four = [i for i in range(len(cand)) if candidate_kind(cand, i) == "brace"
            and frame.dimension == 3 and cand.panel[i] is not None
            and len(cand.panel[i]) == 4 and min(cand.panel[i]) >= 0]
    nz = {}
    if four:   # one batched SVD for the panels (the usual case), as plane_kind does each
        P = frame.coords[np.array([cand.panel[i] for i in four])]          # (p, 4, 3)
        normals = np.linalg.svd(P - P.mean(axis=1, keepdims=True))[2][:, -1]
        nz = dict(zip(four, np.abs(normals[:, 2]).tolist()))
    top = _top_level(frame, tol)
    return [plane_kind(frame, cand, i, tol=tol, nz=nz.get(i), top=top) for i in range(len(cand))]


def _top_level(frame: Frame, tol: Tolerances) -> float:
    """A joint at or above this height is at the top of the frame (``tol.select * size``)."""
    return float(frame.coords[:, -1].max()) - tol.select * frame.size() if frame.n_joints else 0.0


def plane_kind(frame: Frame, cand: CandidateSet, i: int, *, tol: Tolerances = DEFAULT,
               nz: float | None = None, top: float | None = None):
    """The plane of candidate ``i`` (:func:`plane_kinds`); ``nz``, the vertical component
    of its panel's unit normal, and ``top``, the top level, when already known."""
    if candidate_kind(cand, i) != "brace":
        return None
    if frame.dimension != 3:
        return "walls"
    X = frame.coords
    level, plumb = DISPLAY.axis_plane, 1 - DISPLAY.axis_plane
    a, b = cand.ends[i]
    top = _top_level(frame, tol) if top is None else top
    at_top = min(X[a, 2], X[b, 2]) >= top
    corners = cand.panel[i]
    if corners is not None:
        if nz is None:
            P = X[[c for c in corners if c >= 0]]
            nz = abs(np.linalg.svd(P - P.mean(axis=0))[2][-1][2])
        return ("plan" if nz > level and not at_top else
                "roof" if nz > level or nz >= plumb else "walls")
    w = X[b] - X[a]
    horizontal = abs(w[2]) <= plumb * np.linalg.norm(w)
    return ("roof" if at_top else "plan") if horizontal else "walls"


def _frame_openings(frame: Frame, tol: Tolerances):
    """Each frame's plane and clear opening, in order along the building; None when the
    frame is no row of vertical planar frames."""
    frames = frame_labels(frame)
    if frame.dimension != 3 or len(frames) < 2:
        return None
    X = frame.coords
    size = frame.size()
    held = set(frame.restraint_joint.tolist())
    member_of = np.full(frame.n_joints, -1)
    for f, (_, J) in enumerate(frames):
        member_of[J] = f
    out = []
    for f, (_, J) in enumerate(frames):
        P = X[J]
        o = P.mean(axis=0)
        n = np.linalg.svd(P - o)[2][-1]
        if (abs(n[2]) > 1 - DISPLAY.axis_plane
                or np.max(np.abs((P - o) @ n)) > tol.panel_plane * size):
            return None
        out.append([o, n / np.linalg.norm(n), J])
    for f in range(len(out)):
        g = f + 1 if f + 1 < len(out) else f - 1
        step = (out[g][0] - out[f][0]) * (1 if g > f else -1)
        if out[f][1] @ step < 0:
            out[f][1] = -out[f][1]
    ends = frame.ends
    openings = []
    for f, (o, n, J) in enumerate(out):
        s_axis = np.cross([0.0, 0.0, 1.0], n)
        s_axis /= np.linalg.norm(s_axis)
        s = (X[J] - o) @ s_axis
        feet = [j for j in J.tolist() if j in held]
        z0 = float(X[feet, 2].min()) if feet else float(X[J, 2].min())
        own = ends[(member_of[ends[:, 0]] == f) & (member_of[ends[:, 1]] == f)]
        sa, sb = (X[own[:, 0]] - o) @ s_axis, (X[own[:, 1]] - o) @ s_axis
        keep = np.abs(sb - sa) > tol.clear_space * size
        openings.append(dict(o=o, n=n, s=s_axis, smin=float(s.min()), smax=float(s.max()), z0=z0,
                             sa=sa[keep], sb=sb[keep], za=X[own[keep, 0], 2],
                             zb=X[own[keep, 1], 2]))
    return openings


def _inside(op: dict, P: np.ndarray, m: float) -> np.ndarray:
    """Which points ``P (p, 3)`` are inside the clear opening ``op`` of a frame."""
    s = (P - op["o"]) @ op["s"]
    z = P[:, 2]
    lo, hi = np.minimum(op["sa"], op["sb"]), np.maximum(op["sa"], op["sb"])
    covers = (s[:, None] >= lo - m) & (s[:, None] <= hi + m)
    with np.errstate(divide="ignore", invalid="ignore"):
        line = op["za"] + (s[:, None] - op["sa"]) / (op["sb"] - op["sa"]) * (op["zb"] - op["za"])
    env = np.where(covers, line, np.inf).min(axis=1, initial=np.inf)
    env[~covers.any(axis=1)] = -np.inf
    return (s > op["smin"] + m) & (s < op["smax"] - m) & (z > op["z0"] + m) & (z < env - m)


def clear_space_hits(frame: Frame, cand: CandidateSet, *, samples: int = 64,
                     tol: Tolerances = DEFAULT):
    """Which candidate members pass through the building's clear space at floor level.

    The building is a row of vertical planar frames (the ``frame`` joint tag).
    A frame's clear opening is the part of its plane between its outer
    joints, above its lowest support (its lowest joint when it has none) and
    below its lowest member at that place; the clear space is the opening of
    every interior frame and, in each bay, the points inside the openings of
    both frames beside it.  The end frames' own planes are the building's
    ends, so gable bracing in them is not inside.  Each candidate is tested
    at ``samples`` points along it and where it crosses a frame's plane, each
    point with the margin ``tol.clear_space * size``.

    Returns
    -------
    (c,) bool or None
        True for a member that passes through; None when the frame is no row
        of vertical planar frames (nothing to test).

    Notes
    -----
    Cost O(c (samples + F) M_f) for ``F`` frames of ``M_f`` members each.  A
    candidate that clips the clear space over less than ``1/samples`` of its
    length between two samples can be missed.
    """
    ops = _frame_openings(frame, tol)
    hits = np.zeros(len(cand), dtype=bool)
    if ops is None:
        return None
    X = frame.coords
    m = tol.clear_space * frame.size()
    mem = np.flatnonzero(cand.is_member)
    if not len(mem):
        return hits
    A, B = X[cand.ends[mem, 0]], X[cand.ends[mem, 1]]
    t = (np.arange(samples) + 0.5) / samples
    O = np.array([op["o"] for op in ops])
    N = np.array([op["n"] for op in ops])
    da = np.einsum("cd,fd->cf", A, N) - np.sum(O * N, axis=1)
    db = np.einsum("cd,fd->cf", B, N) - np.sum(O * N, axis=1)
    with np.errstate(divide="ignore", invalid="ignore"):
        tc = np.where((da > m) & (db < -m) | (da < -m) & (db > m), da / (da - db), np.nan)
    T = np.c_[np.tile(t, (len(mem), 1)), tc]                      # (c, samples + F)
    which = np.repeat(np.arange(len(mem)), T.shape[1])
    T = T.ravel()
    ok = np.isfinite(T)
    which, T = which[ok], T[ok]
    P = A[which] + T[:, None] * (B[which] - A[which])
    D = P @ N.T - np.sum(O * N, axis=1)                            # (p, F) signed distances
    on = np.abs(D) <= m
    beyond = np.sum(D > m, axis=1)                                 # planes strictly behind
    inside = np.zeros(len(P), dtype=bool)
    F = len(ops)
    for f in range(F):
        at = on[:, f] & (0 < f < F - 1)
        if at.any():
            inside[at] |= _inside(ops[f], P[at], m)
        if f + 1 < F:
            between = (beyond == f + 1) & ~on.any(axis=1)
            if between.any():
                idx = np.flatnonzero(between)
                both = _inside(ops[f], P[idx], m) & _inside(ops[f + 1], P[idx], m)
                inside[idx[both]] = True
    hits[mem[np.unique(which[inside])]] = True
    return hits


def mirrors(frame: Frame, *, tol: Tolerances = DEFAULT) -> list:
    """The mirror planes of a frame about its centre lines, with the joint permutations.

    For each horizontal axis (x and y of a space frame, x of a plane frame),
    the plane through the middle of the joints' extent along it; kept when
    every joint has an image joint within ``tol.merge * size`` and every
    member an image member.

    Returns
    -------
    list of (axis int, centre float, perm (n,) int)
    """
    from scipy.spatial import cKDTree

    X = frame.coords
    if frame.n_joints == 0:
        return []
    tree = cKDTree(X)
    edges = {frozenset(e) for e in frame.ends.tolist()}
    out = []
    for ax in range(frame.dimension - 1):
        c = 0.5 * (X[:, ax].min() + X[:, ax].max())
        Y = X.copy()
        Y[:, ax] = 2 * c - Y[:, ax]
        dist, perm = tree.query(Y)
        if np.any(dist > tol.merge * frame.size()) or len(set(perm.tolist())) != frame.n_joints:
            continue
        if all(frozenset((int(perm[a]), int(perm[b]))) in edges for a, b in frame.ends.tolist()):
            out.append((ax, float(c), perm))
    return out


# ------------------------------------------------------------------------------ prepare

def _union_find(n: int):
    parent = list(range(n))

    def find(i):
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    def union(i, j):
        a, b = find(i), find(j)
        if a != b:
            parent[max(a, b)] = min(a, b)
    return find, union


def _images(frame: Frame, cand: CandidateSet, mirror) -> np.ndarray:
    """The index of each candidate's image under one mirror (-1: its image is none)."""
    ax, _, perm = mirror
    perm = perm.tolist()
    ends = cand.ends.tolist()
    pair = {(a, b): i for i, (a, b) in enumerate(ends) if a >= 0}
    at = {}
    for i in np.flatnonzero(~cand.is_member).tolist():
        at.setdefault(int(cand.joint[i]), []).append(i)
    out = np.full(len(cand), -1)
    for i, (a, b) in enumerate(ends):
        if a >= 0:
            a, b = perm[a], perm[b]
            out[i] = pair.get((min(a, b), max(a, b)), -1)
    for j, rows in at.items():
        for i in rows:
            e = cand.direction[i].copy()
            e[ax] = -e[ax]
            for q in at.get(perm[j], []):
                if abs(float(cand.direction[q] @ e)) > 1 - 1e-9:
                    out[i] = q
    return out


def prepare(frame: Frame, cand: CandidateSet, rules: LayoutRules | None, *,
            restraints: str = "auto", attachable=(), tension_only: bool = False,
            tol: Tolerances = DEFAULT) -> tuple[CandidateSet, LayoutPlan]:
    """Costs, greedy order and the filtering rules; the groups for :func:`select`.

    Parameters
    ----------
    frame : Frame
    cand : CandidateSet
    rules : LayoutRules or None
        None: the defaults (the clear-space rule, unit costs).
    restraints : {"auto", "always", "never"}
        ``"always"``: restraints compete with members on cost.
    attachable : sequence of int
        The joints marked attachable (``ties_first`` puts their restraints first).
    tension_only : bool
        A panel's two diagonals form one group.

    Returns
    -------
    (CandidateSet, LayoutPlan)
        The candidates the rules allow (with their costs, tiers and what each
        filter removed, appended to ``cand.filters``) and the plan.

    Raises
    ------
    SpaceframeError
        For a bad rule, a plane that holds no candidate brace, a bay that is
        not in the model, or a frame with no mirror symmetry.
    """
    rules = rules or LayoutRules()
    cand = _costed(frame, cand, rules, restraints, attachable)
    filters = list(cand.filters)
    keep = np.ones(len(cand), dtype=bool)
    required, bays = [], None
    if rules.planes is not None:
        out = _outside_planes(frame, cand, rules.planes, tol)
        filters.append(("planes", ",".join(_plane_names(rules.planes)), int(out.sum())))
        keep &= ~out
    if rules.braced_bays is not None:
        out, required, bays = _outside_bays(frame, cand, rules.braced_bays)
        label = (rules.braced_bays if isinstance(rules.braced_bays, str)
                 else ",".join(map(str, rules.braced_bays)))
        filters.append(("braced bays", label, int(out.sum())))
        keep &= ~out
    if not rules.allow_rakers:
        hits = clear_space_hits(frame, cand, tol=tol)
        if hits is not None:
            filters.append(("clear space", "floor level", int(hits.sum())))
            keep &= ~hits
    find, used, lone = _together(frame, cand, keep, rules.symmetric, tension_only, tol)
    if rules.symmetric:
        filters.append(("symmetric", "no mirror image", int(lone.sum())))
        keep &= ~lone
    sub = np.flatnonzero(keep)
    new = dataclasses.replace(cand.subset(sub), filters=tuple(filters))
    members = {}
    for i_new, i_old in enumerate(sub.tolist()):
        members.setdefault(find(i_old), []).append(i_new)
    rank_of = new.order().argsort() if len(new) else np.zeros(0, int)
    groups = sorted((tuple(sorted(idx)) for idx in members.values()),
                    key=lambda g: (int(new.tier[list(g)].min()),
                                   round(float(new.cost[list(g)].sum()), 12),
                                   int(min(rank_of[list(g)]))))
    group_bays = (frozenset(),) * len(groups)
    if required:
        group_bays = tuple(frozenset(bays[sub[i]] for i in g) - {""} for g in groups)
    plan = LayoutPlan(groups=tuple(groups), group_bays=group_bays, required=tuple(required),
                      mirrors=tuple(used), search=bool(rules.symmetric or required),
                      tension_only=tension_only)
    return new, plan


def _costed(frame: Frame, cand: CandidateSet, rules: LayoutRules, restraints: str,
            attachable) -> CandidateSet:
    """The candidates with each kind's cost factor applied and their tiers set."""
    factors = {k: 1.0 for k in KINDS} | dict(rules.costs or {})
    kinds = [candidate_kind(cand, i) for i in range(len(cand))]
    typical = float(np.median(frame.lengths())) if frame.n_members else 1.0
    cost = np.array([factors[k] * (typical if k == "restraint" else c)
                     for k, c in zip(kinds, cand.cost.tolist())], dtype=float)
    tier = np.where(cand.is_member, 1, 1 if restraints == "always" else 2)
    if rules.ties_first:
        at = (~cand.is_member) & np.isin(cand.joint, [int(j) for j in attachable])
        tier = np.where(at, 0, tier)
    return dataclasses.replace(cand, cost=cost, tier=tier.astype(np.int64))


def _plane_names(planes) -> list[str]:
    return [PLANE_WORDS.get(p.strip().lower(), p.strip().lower()) for p in planes if p.strip()]


def _outside_planes(frame: Frame, cand: CandidateSet, planes, tol: Tolerances) -> np.ndarray:
    """The braces in none of ``planes``; a plane no candidate lies in is refused."""
    planes = _plane_names(planes)
    if not planes:
        raise SpaceframeError(f"planes: give at least one of {', '.join(PLANES)}")
    for p in planes:
        if p not in PLANES:
            raise SpaceframeError(f"plane {p!r} is not one of {', '.join(PLANES)}"
                                  f"{did_you_mean(p, PLANES)}")
    where = plane_kinds(frame, cand, tol=tol)
    held = {p: sum(w == p for w in where) for p in PLANES}
    for p in planes:
        if not held[p]:
            have = ", ".join(f"{q} ({held[q]})" for q in PLANES if held[q]) or "none"
            raise SpaceframeError(f"no candidate brace lies in the {p} plane; the planes "
                                  f"holding candidates: {have}")
    return np.array([w is not None and w not in planes for w in where], dtype=bool)


def _outside_bays(frame: Frame, cand: CandidateSet, rule) -> tuple[np.ndarray, list, list]:
    """The braces in a bay the rule does not allow, the bay groups it requires, and each
    candidate's bay ('' for ties, restraints and braces in no bay)."""
    allowed, required = _bay_rule(frame, rule)
    member_at = {(min(a, b), max(a, b)): k for k, (a, b) in enumerate(frame.ends.tolist())}
    around = joint_bays(frame)
    bays = [candidate_bay(frame, cand, i, member_at, around)
            if candidate_kind(cand, i) == "brace" else "" for i in range(len(cand))]
    return np.array([bool(b) and b not in allowed for b in bays], dtype=bool), required, bays


def _together(frame: Frame, cand: CandidateSet, keep, symmetric: bool, tension_only: bool,
              tol: Tolerances):
    """The groups chosen together: mirror images (their closure) and tension-only panel pairs.

    Returns the group finder (candidate index to its group's root), the mirror planes used
    and, with ``symmetric``, the kept candidates of groups with a member whose image is not
    kept (those are no longer symmetric).
    """
    find, union = _union_find(len(cand))
    used, images = [], []
    if symmetric:
        found = mirrors(frame, tol=tol)
        if not found:
            axes = "x" if frame.dimension == 2 else "x or y"
            raise SpaceframeError(f"{frame.source or 'the model'} is not a mirror image of "
                                  f"itself about the centre line of its extent along {axes}: "
                                  f"symmetric bracing needs a symmetric frame")
        images = [_images(frame, cand, mi) for mi in found]
        used = [(ax, c) for ax, c, _ in found]
        for im in images:
            for i in np.flatnonzero(keep & (im >= 0)).tolist():
                if keep[im[i]]:
                    union(i, int(im[i]))
    if tension_only:
        for i, p in enumerate(cand.partner.tolist()):
            if p >= 0 and keep[i] and keep[p]:
                union(i, p)
    lone = np.zeros(len(cand), dtype=bool)
    if symmetric:
        bad = {find(i) for im in images for i in np.flatnonzero(keep).tolist()
               if im[i] < 0 or not keep[im[i]]}
        lone = keep & np.array([find(i) in bad for i in range(len(cand))], dtype=bool)
    return find, used, lone


# ------------------------------------------------------------------------------- select

def _run(reach, groups, order, threshold, k):
    """The greedy pass over groups in ``order``: take a group when some row of it adds rank."""
    Q = np.zeros((reach.shape[1], 0))
    taken = []
    for g in order:
        if Q.shape[1] == k:
            break
        gained = False
        for i in groups[g]:
            r = reach[i]
            res = r - Q @ (Q.T @ r)
            res -= Q @ (Q.T @ res)
            size = np.linalg.norm(res)
            if size > threshold:
                Q = np.c_[Q, res / size]
                gained = True
        if gained:
            taken.append(g)
    return taken, Q.shape[1]


def _rank(rows, threshold) -> int:
    if not len(rows):
        return 0
    s = np.linalg.svd(rows, compute_uv=False)
    return int(np.sum(s > threshold))


def _reaches_bound(cand: CandidateSet, chosen, singles) -> bool:
    """Is the choice as good as the greedy pass without the rules (same count, the same
    items per tier, the same cost to 1e-9)?  With the same rank, the greedy pass's value
    bounds every choice under the rules from below, so no choice under them is better."""
    tiers = lambda idx: sorted(cand.tier[list(idx)].tolist())   # noqa: E731
    c1 = float(cand.cost[list(chosen)].sum()) if len(chosen) else 0.0
    c0 = float(cand.cost[list(singles)].sum()) if len(singles) else 0.0
    return (len(chosen) == len(singles) and tiers(chosen) == tiers(singles)
            and c1 <= c0 + 1e-9 * max(1.0, abs(c0)))


def select(plan: LayoutPlan, cand: CandidateSet, reach: np.ndarray,
           threshold: float) -> tuple[list[int], int, LayoutChoice]:
    """The choice under rules that are no matroid constraint (symmetry, bays to brace).

    Parameters
    ----------
    plan : LayoutPlan
        From :func:`prepare`.
    cand : CandidateSet
        The candidates :func:`prepare` returned.
    reach : (c, k) float
        Each candidate's reach onto an orthonormal mechanism basis.
    threshold : float
        The independence threshold of the greedy pass.

    Returns
    -------
    chosen : list of int
        Candidate indices, group by group in the order taken.
    removed : int
        Mechanisms the choice removes (the rank of its reaches).
    choice : LayoutChoice

    Notes
    -----
    Exact search costs ``2**g`` small SVDs for ``g <= EXACT_GROUPS`` groups
    that act; the greedy search one pass per trial, at most
    ``TRIALS * len(plan.required)`` passes of O(c k r).
    """
    from .selection import greedy_basis

    groups, gbays, required = plan.groups, plan.group_bays, plan.required
    k = reach.shape[1]
    cost = np.array([float(cand.cost[list(g)].sum()) for g in groups])
    size = np.array([len(g) for g in groups])
    norms = np.linalg.norm(reach, axis=1) if len(reach) else np.zeros(0)
    # only a group with some row above the threshold can add rank: the passes skip the rest
    order = [g for g in range(len(groups)) if np.any(norms[list(groups[g])] > threshold)]

    def met(taken):
        have = set().union(*(gbays[g] for g in taken)) if taken else set()
        return [r for r in required if not (r & have)]

    def key(taken, rank):
        return (-rank, len(met(taken)), int(size[taken].sum()), float(cost[taken].sum()))

    singles = greedy_basis(reach, cand.order(), threshold)
    least_cost = float(cand.cost[singles].sum())
    taken, rank = _run(reach, groups, order, threshold, k)
    tried, method, exact = 1, "greedy", False
    if not plan.mirrors and not plan.tension_only and not met(taken):
        method, exact = "matroid", True
    else:
        useful = order
        if len(useful) <= EXACT_GROUPS:
            best = (taken, rank)
            for n in range(len(useful) + 1):
                for sub in itertools.combinations(useful, n):
                    rows = reach[[i for g in sub for i in groups[g]]]
                    r = _rank(rows, threshold)
                    tried += 1
                    if key(list(sub), r) < key(*best):
                        best = (list(sub), r)
            taken, rank = best
            method, exact = "exhaustive", True
        else:
            forced = []
            dead = set()
            while True:
                left = [r for r in met(taken) if r not in dead]
                if not left:
                    break
                want = left[0]
                trials = [g for g in order if gbays[g] & want and g not in forced][:TRIALS]
                best = None
                for g in trials:
                    t, r = _run(reach, groups, forced + [g] +
                                [h for h in order if h not in forced and h != g], threshold, k)
                    tried += 1
                    if r < rank or g not in t:
                        continue
                    if best is None or key(t, r) < key(*best[1:]):
                        best = (g, t, r)
                if best is None:
                    dead.add(want)
                    continue
                forced.append(best[0])
                taken, rank = best[1], best[2]
    if not exact:   # reverse delete: drop a group the others make redundant, dearest first
        for g in sorted(taken, key=lambda h: (-cost[h], -h)):
            rest = [h for h in taken if h != g]
            if (len(met(rest)) <= len(met(taken))
                    and _rank(reach[[i for h in rest for i in groups[h]]], threshold) == rank):
                taken = rest
                tried += 1
    chosen = [i for g in taken for i in groups[g]]
    if not exact and rank == len(singles) and _reaches_bound(cand, chosen, singles):
        method, exact = "bound", True
    name = lambda bays: tuple(sorted(bays, key=lambda b: (len(b), b)))  # noqa: E731
    choice = LayoutChoice(method=method, exact=exact, tried=tried, count=len(chosen),
                          cost=float(cand.cost[chosen].sum()) if chosen else 0.0,
                          least_count=len(singles), least_cost=least_cost,
                          required=tuple(name(r) for r in required),
                          unmet=tuple(name(r) for r in met(taken)),
                          mirrors=tuple((("x", "y", "z")[ax], c) for ax, c in plan.mirrors))
    return chosen, rank, choice
