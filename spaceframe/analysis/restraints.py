"""Chords, restraint points, unrestrained lengths and restraint forces.

A designer treats a chord as continuous: a joint between two restraint points
is held sideways by the chord's bending, and what matters for the chord's
buckling is the unrestrained length between the points the bracing holds.
This module reads that off the pin-jointed frame:

- **Chords** are the maximal straight chains of two or more members through
  joints: at a joint two members continue one line when they point away
  from it in opposite directions (``Tolerances.chord_straight``).  A rule
  ``TAG=VALUE`` (member tags, e.g. ``role=chord``) limits the members chains
  are made of.
- **Lateral directions**: a chord whose joints all belong to one plane frame
  of a frame of frames (the ``frame`` joint tag, :mod:`spaceframe.analysis.bracing.frames`)
  has ``out_of_plane`` along that frame's normal and ``in_plane`` across the
  chord in the frame's plane; any other chord takes the principal axes of
  the whole frame's joints, the least spread one not within 45 degrees of the
  chord as ``out_of_plane`` and the third direction as ``in_plane``.  A plane
  frame (dimension 2) has ``in_plane`` only.
- **Restraint points**: a chord joint is restrained in a lateral direction
  when no mechanism of the pin-jointed frame moves it that way (the audit's
  mechanism basis, rigid-body motions included, so supports count and a
  chord end counts when it is held), ``Tolerances.restraint_motion``.
- **Unrestrained lengths**: the distances along the chord between
  consecutive restraint points (a free end adds its overhang).
- **Held with continuous chords**: every mechanism is a lateral motion of
  chord joints that lie between restraint points of their chord in that
  direction; the chords' bending then holds what the pins cannot.
- **Restraint forces**: with load cases, each chord's compression per case;
  a fraction ``F`` puts at each restraint point of a compressed chord a
  lateral force ``F`` times the chord's compression there (out of plane; in
  plane for a plane frame), and that case is solved like any other
  (:func:`spaceframe.analysis.forces.forces`): the force each tie, brace and
  support carries.

References
----------
.. [1] S. Pellegrino and C. R. Calladine, "Matrix analysis of statically and
   kinematically indeterminate frameworks", Int. J. Solids Struct. 22(4),
   409-428, 1986 (the mechanism basis, null space of the compatibility matrix).
.. [2] S. P. Timoshenko and J. M. Gere, *Theory of Elastic Stability*, 2nd ed.,
   McGraw-Hill, 1961, ch. 2 (a strut braced at points buckles between them:
   the unrestrained length is the distance between lateral supports).
"""

from __future__ import annotations

from typing import Sequence

import numpy as np

from ..errors import SpaceframeError
from ..loads import LoadCase, LoadSet
from ..model import Frame
from ..restraint_results import LATERAL, Chord, RestraintResult, Unrestrained
from ..suggest import did_you_mean
from ..tolerances import DEFAULT, Tolerances

__all__ = ["restraints", "find_chords", "chord_members", "RESTRAINT_CASE"]

#: The name of the restraint-force load case.
RESTRAINT_CASE = "restraint"


def chord_members(frame: Frame, rule: str | None) -> np.ndarray:
    """The members chords may be made of under ``rule`` (``TAG=VALUE[,VALUE...]``), ``(m,) bool``.

    Raises
    ------
    SpaceframeError
        For a rule not of that form, a tag the frame's members do not carry,
        or a value no member has (each with the nearest name).

    Examples
    --------
    >>> f = Frame.from_arrays([[0, 0], [1, 0], [2, 0]], [[0, 1], [1, 2]],
    ...                       member_tags={"role": ["chord", "web"]})
    >>> chord_members(f, "role=chord").tolist()
    [True, False]
    """
    m = frame.n_members
    if rule is None:
        return np.ones(m, dtype=bool)
    tag, sep, value = str(rule).partition("=")
    tag, values = tag.strip(), [v.strip() for v in value.split(",") if v.strip()]
    if not sep or not tag or not values:
        raise SpaceframeError(f"a chord rule is TAG=VALUE, a member tag and one of its labels "
                              f"(e.g. role=chord); got {rule!r}")
    labels = frame.member_tags.get(tag)
    if labels is None:
        known = sorted(frame.member_tags)
        raise SpaceframeError(
            f"chord rule {rule!r}: the members carry no tag {tag!r}{did_you_mean(tag, known)}; "
            + (f"their tags are {', '.join(known)}" if known else
               "this model has no member tags, so leave the rule out to use every member"))
    present = sorted({lab for lab in labels if lab})
    for v in values:
        if v not in present:
            raise SpaceframeError(f"chord rule {rule!r}: no member has {tag} = {v!r}"
                                  f"{did_you_mean(v, present)}; the labels of {tag!r} are "
                                  f"{', '.join(present)}")
    return np.isin(np.array(labels, dtype=object), values)


def find_chords(frame: Frame, members: np.ndarray | None = None, *,
                tol: Tolerances = DEFAULT) -> list[tuple[np.ndarray, np.ndarray]]:
    """The maximal straight chains of two or more members through joints.

    Parameters
    ----------
    frame : Frame
    members : (m,) bool, optional
        The members chains may use (default all).
    tol : Tolerances
        ``tol.chord_straight``: two members at a joint continue one line when
        their unit directions away from it have ``a . b <= -(1 - chord_straight)``.

    Returns
    -------
    list of ((p,) int, (p - 1,) int)
        Each chain's joints and members in order, first joint towards the
        last along the chain's largest coordinate's increasing sense; chains
        in order of their lowest member index.

    Notes
    -----
    At a joint where several pairs qualify, the most nearly opposite pairs are
    matched first, each member at most once.  Cost O(sum of deg^2) over the
    joints (vectorised over the joints of one degree), plus O(m) to walk the chains.

    Examples
    --------
    >>> f = Frame.from_arrays([[0, 0], [1, 0], [2, 0], [1, 1]], [[0, 1], [1, 2], [1, 3]])
    >>> [(j.tolist(), k.tolist()) for j, k in find_chords(f)]
    [([0, 1, 2], [0, 1])]
    """
    X, ends, m = frame.coords, frame.ends, frame.n_members
    use = np.ones(m, dtype=bool) if members is None else np.asarray(members, dtype=bool)
    vec = X[ends[:, 1]] - X[ends[:, 0]]
    unit = vec / np.linalg.norm(vec, axis=1)[:, None]
    partner = np.full((m, 2), -1, dtype=np.int64)       # the member continuing at each end
    k = np.flatnonzero(use)
    joint = np.concatenate([ends[k, 0], ends[k, 1]])
    member = np.concatenate([k, k])
    slot = np.concatenate([np.zeros(len(k), np.int64), np.ones(len(k), np.int64)])
    order = np.lexsort((member, joint))
    joint, member, slot = joint[order], member[order], slot[order]
    starts = np.flatnonzero(np.r_[True, joint[1:] != joint[:-1]]) if joint.size else \
        np.zeros(0, np.int64)
    degree = np.diff(np.r_[starts, len(joint)])
    limit = -(1.0 - tol.chord_straight)
    for g in np.unique(degree[degree >= 2]).tolist():      # the joints of one degree at once
        at = starts[degree == g][:, None] + np.arange(g)    # (c, g) rows of the sorted lists
        ms, ss = member[at], slot[at]
        away = unit[ms] * np.where(ss == 0, 1.0, -1.0)[..., None]
        i, j = np.triu_indices(g, 1)
        v = np.einsum("cpk,cpk->cp", away[:, i], away[:, j])  # (c, pairs) cosines
        ok = v <= limit
        uses = np.zeros((len(at), g), dtype=np.int64)
        np.add.at(uses, (np.nonzero(ok)[0], i[np.nonzero(ok)[1]]), 1)
        np.add.at(uses, (np.nonzero(ok)[0], j[np.nonzero(ok)[1]]), 1)
        clash = (uses > 1).any(axis=1)                      # a member in two straight pairs
        c, p = np.nonzero(ok & ~clash[:, None])
        partner[ms[c, i[p]], ss[c, i[p]]] = ms[c, j[p]]
        partner[ms[c, j[p]], ss[c, j[p]]] = ms[c, i[p]]
        for c in np.flatnonzero(clash).tolist():            # the straightest pairs first
            taken = np.zeros(g, dtype=bool)
            for p in np.lexsort((j, i, v[c])).tolist():
                if ok[c, p] and not taken[i[p]] and not taken[j[p]]:
                    taken[i[p]] = taken[j[p]] = True
                    partner[ms[c, i[p]], ss[c, i[p]]] = ms[c, j[p]]
                    partner[ms[c, j[p]], ss[c, j[p]]] = ms[c, i[p]]
    seen = np.zeros(m, dtype=bool)
    chains = []
    for first in k.tolist():
        if seen[first] or (partner[first] >= 0).all():
            continue                                     # not a chain end (or a loop)
        start_slot = 0 if partner[first, 0] < 0 else 1
        joints, mems = [int(ends[first, start_slot])], []
        cur, entry = first, start_slot
        while cur >= 0 and not seen[cur]:
            seen[cur] = True
            mems.append(cur)
            out = 1 - entry
            nxt = int(ends[cur, out])
            joints.append(nxt)
            follow = int(partner[cur, out])
            if follow >= 0:
                entry = 0 if ends[follow, 0] == nxt else 1
            cur = follow
        if len(mems) >= 2:
            J, K = np.array(joints, dtype=np.int64), np.array(mems, dtype=np.int64)
            span = X[J[-1]] - X[J[0]]
            if span[int(np.argmax(np.abs(span)))] < 0:
                J, K = J[::-1].copy(), K[::-1].copy()
            chains.append((J, K))
    chains.sort(key=lambda c: int(c[1].min()))
    return chains


def _signed(v: np.ndarray) -> np.ndarray:
    """``v`` with its largest component positive (a fixed sign for every direction)."""
    return v if v[int(np.argmax(np.abs(v)))] >= 0 else -v


def _unit(v: np.ndarray) -> np.ndarray:
    return v / np.linalg.norm(v)


def _frame_normals(frame: Frame, tol: Tolerances) -> dict[str, np.ndarray]:
    """The normal of each planar frame of a frame of frames (frames that are not plane left out)."""
    from .bracing.frames import frame_labels

    normals = {}
    for label, joints in frame_labels(frame):
        P = frame.coords[joints]
        if len(P) < 3:
            continue
        c = P - P.mean(axis=0)
        _, _, vt = np.linalg.svd(c, full_matrices=False)
        if vt.shape[0] < 3:
            continue
        n = vt[-1]
        extent = float(np.max(np.ptp(P, axis=0)))
        if extent > 0 and np.max(np.abs(c @ n)) <= tol.panel_plane * extent:
            normals[label] = _unit(n)
    return normals


def _directions(frame: Frame, J: np.ndarray, axis: np.ndarray, normals: dict,
                principal: np.ndarray | None) -> tuple[dict, str, str]:
    """Lateral unit directions of a chord, where they come from, and its frame label."""
    if frame.dimension == 2:
        return {"in_plane": _signed(np.array([-axis[1], axis[0]]))}, "plane frame", ""
    jf = frame.joint_tags.get("frame")
    label = ""
    if jf is not None:
        labels = {jf[j] for j in J.tolist()}
        if len(labels) == 1:
            label = labels.pop()
    out = None
    if label and label in normals:
        n = normals[label]
        w = n - (n @ axis) * axis
        if np.linalg.norm(w) > 0.5:
            out, plane = _unit(w), "frame"
    if out is None:
        plane = "principal"
        for p in principal:                              # least spread first
            w = p - (p @ axis) * axis
            if np.linalg.norm(w) > np.sqrt(0.5):
                out = _unit(w)
                break
    out = _signed(out)
    return {"out_of_plane": out, "in_plane": _signed(_unit(np.cross(out, axis)))}, plane, label


def _incidence(frame: Frame):
    """For each joint, the members at it: CSR ``(ptr (n + 1,), members)``."""
    ends = frame.ends
    joint = np.concatenate([ends[:, 0], ends[:, 1]])
    member = np.concatenate([np.arange(len(ends))] * 2)
    order = np.lexsort((member, joint))
    ptr = np.searchsorted(joint[order], np.arange(frame.n_joints + 1))
    return ptr, member[order]


def restraints(frame: Frame, *, chords: str | None = None, cases: Sequence[str] | None = None,
               fraction: float | None = None, compression: bool = True, audit=None,
               forces=None, tol: Tolerances = DEFAULT) -> RestraintResult:
    """Chords, their restraint points and unrestrained lengths, and restraint forces.

    Parameters
    ----------
    frame : Frame
    chords : str, optional
        A rule ``TAG=VALUE[,VALUE...]`` on member tags limiting the members
        chords are made of (e.g. ``"role=chord"``); default every member.
    cases : sequence of str, optional
        The load cases and combinations whose chord compressions are given
        (default all the model has; none without ``frame.loads``).
    fraction : float, optional
        The restraint force fraction, ``0 < fraction < 1``: needs load cases.
    compression : bool
        Solve the load cases for the chords' compression (default); False
        leaves the forces out (no fraction then).
    audit : AuditResult, optional
        The frame's audit, when already computed (its mechanism basis is used).
    forces : ForcesResult, optional
        The cases' member forces, when already computed.
    tol : Tolerances
        ``chord_straight``, ``restraint_motion``, ``panel_plane`` (a frame is
        plane) and what the audit and the forces use.

    Returns
    -------
    RestraintResult

    Raises
    ------
    SpaceframeError
        For a bad chord rule (with the nearest tag or label), a fraction
        outside (0, 1), or a fraction without load cases; a
        :class:`~spaceframe.errors.ModelError` for an unknown case name.

    Examples
    --------
    Two collinear bars pinned at their far ends (Pellegrino & Calladine's
    example): the pin-jointed frame has a mechanism at the middle joint, a
    continuous chord holds it.

    >>> from spaceframe import Frame
    >>> f = Frame.from_arrays([[0, 0], [1, 0], [2, 0]], [[0, 1], [1, 2]],
    ...                       supports={0: "pin", 2: "pin"})
    >>> r = restraints(f)
    >>> r.held_pin_jointed, r.held_with_continuous_chords, r.chords[0].lengths["in_plane"].tolist()
    (False, True, [2.0])

    Notes
    -----
    Cost: the audit (when not given), O(sum deg^2) to find the chords, O(k p)
    per chord of ``p`` joints for ``k`` mechanisms, and with load cases the
    forces solve and, with a fraction, one more.

    References
    ----------
    See the module docstring.
    """
    if fraction is not None:
        try:
            fraction = float(fraction)
        except (TypeError, ValueError):
            fraction = float("nan")
        if not (0.0 < fraction < 1.0):
            raise SpaceframeError(f"the restraint force fraction must lie strictly between 0 "
                                  f"and 1 (a share of the chord force, e.g. 0.025 for 2.5 %); "
                                  f"got {fraction!r}")
        if frame.loads is None or not compression:
            raise SpaceframeError("a restraint force fraction needs the chords' compression, "
                                  "so load cases: add [loads.NAME] tables to the model")
    use = chord_members(frame, chords)
    if audit is None:
        from .audit import audit as run_audit
        audit = run_audit(frame, self_stress_cap=0, soft=False, redundancy=False, tol=tol)
    M = audit.modes.matrix().tocsc()              # (k, n d), sparse: never the dense basis
    k, d = M.shape[0], frame.dimension
    X = frame.coords
    normals = _frame_normals(frame, tol) if frame.dimension == 3 else {}
    principal = None
    if frame.dimension == 3:
        _, _, vt = np.linalg.svd(X - X.mean(axis=0), full_matrices=False)
        principal = vt[::-1]                           # (3, 3): least spread first
    ptr, at = _incidence(frame)
    unit = X[frame.ends[:, 1]] - X[frame.ends[:, 0]]
    unit = unit / np.linalg.norm(unit, axis=1)[:, None]

    # load cases: the chords' compression
    names: tuple[str, ...] = ()
    shown = np.zeros((0, frame.n_members))         # (q, m) forces, round-off as 0; NaN: not carried
    force_units = ""
    if compression and frame.loads is not None and (frame.loads.cases
                                                     or frame.loads.self_weight):
        if forces is None:
            from .forces import forces as solve
            forces = solve(frame, cases, tol=tol)
        names, force_units = forces.names, forces.force_units
        shown = np.stack([forces.shown_forces(c) for c in range(len(names))])
    else:
        forces = None

    made, allowed = [], {}
    for J, K in find_chords(frame, use, tol=tol):
        seg = np.linalg.norm(X[J[1:]] - X[J[:-1]], axis=1)
        pos = np.concatenate([[0.0], np.cumsum(seg)])
        axis = _unit(X[J[-1]] - X[J[0]])
        dirs, plane, label = _directions(frame, J, axis, normals, principal)
        restrained, lengths, held, loose = {}, {}, {}, {}
        own = set(K.tolist())
        for name in LATERAL:
            if name not in dirs:
                continue
            e = dirs[name]
            moved = (_sideways(M, J, e, d) > tol.restraint_motion if k
                     else np.zeros(len(J), dtype=bool))
            ok = ~moved
            restrained[name] = ok
            held[name] = (bool(ok[0]), bool(ok[-1]))
            where = np.flatnonzero(ok)
            cuts = pos[where] if where.size else np.zeros(0)
            edges = np.unique(np.concatenate([[pos[0]], cuts, [pos[-1]]]))
            lengths[name] = np.diff(edges) if len(edges) > 1 else np.array([pos[-1]])
            reasons = []
            for i in np.flatnonzero(moved).tolist():
                j = int(J[i])
                others = [int(q) for q in at[ptr[j]:ptr[j + 1]] if int(q) not in own]
                reach = tuple(q for q in others if abs(unit[q] @ e) > tol.restraint_motion)
                reasons.append(Unrestrained(j, "tied" if reach else "untied", reach))
                if where.size and where[0] < i < where[-1]:
                    allowed.setdefault(j, []).append(e)   # between restraint points
            loose[name] = tuple(reasons)
        comp = np.maximum(0.0, -shown[:, K].min(axis=1)) if K.size else np.zeros(len(names))
        made.append(Chord(joints=J, members=K, positions=pos, axis=axis, directions=dirs,
                          plane=plane, frame_label=label, restrained=restrained,
                          lengths=lengths, ends_held=held, unrestrained=loose,
                          compression=comp))

    not_held = _outside(audit.modes, allowed, tol) if k else ()
    result = dict(frame=frame, rule=chords, chords=tuple(made), mechanisms=k,
                  held_pin_jointed=k == 0, held_with_continuous_chords=not not_held,
                  not_held=not_held, case_names=tuple(names), forces=forces,
                  force_units=force_units, tol=tol)
    if fraction is not None:
        F = _restraint_loads(frame, made, shown, fraction)
        solved = None
        if np.any(F):
            from .forces import forces as solve
            hit = np.flatnonzero(np.any(F != 0, axis=1))
            case = LoadCase(RESTRAINT_CASE, tuple(frame.joint_ids[j] for j in hit), F[hit])
            solved = solve(frame, loads=LoadSet(cases=(case,), force_units=force_units), tol=tol)
        result.update(fraction=fraction, restraint_loads=F, restraint_forces=solved)
    return RestraintResult(**result)


def _outside(modes, allowed: dict, tol: Tolerances) -> tuple:
    """The mechanisms that are not lateral motions of chord joints between restraint points.

    ``modes`` is the audit's :class:`~spaceframe.modeset.ModeSet` of ``(n, d)``
    movements, read at the joints each mode moves; ``allowed`` maps a joint to
    the lateral directions it may move in.  Each mode's movement at every
    joint, less its projection onto those, must be within
    ``tol.restraint_motion``.  Returns ``((mode, joints outside), ...)``.
    O(nnz of the modes) besides one small SVD per allowed joint.
    """
    bases = {}
    for j, dirs in allowed.items():
        D = np.array(dirs).T                                   # (d, r)
        q, s, _ = np.linalg.svd(D, full_matrices=False)
        bases[j] = q[:, s > 1e-12 * s[0]]
    out = []
    for i, (index, u) in enumerate(modes.supports()):
        size = np.linalg.norm(u, axis=1)                       # (s,) at the joints it moves
        for pos, j in enumerate(index.tolist()):
            B = bases.get(j)
            if B is not None:
                w = u[pos]
                size[pos] = np.linalg.norm(w - (w @ B) @ B.T)
        bad = index[size > tol.restraint_motion]
        if bad.size:
            out.append((i, tuple(int(j) for j in bad)))
    return tuple(out)


def _restraint_loads(frame: Frame, chords, shown: np.ndarray, fraction: float) -> np.ndarray:
    """The restraint-force case ``(n, d)``: ``fraction`` x the chord's compression at each of
    its restraint points (largest over the carried cases, rows of ``shown (q, m)``, of the
    two members there), along its out-of-plane direction (in plane for a plane frame)."""
    F = np.zeros((frame.n_joints, frame.dimension))
    carried = shown[np.all(np.isfinite(shown), axis=1)]
    if not len(carried):
        return F
    squeeze = np.maximum(0.0, -carried.min(axis=0))                      # (m,) compression
    for c in chords:
        name = "out_of_plane" if "out_of_plane" in c.directions else "in_plane"
        e = c.directions[name]
        N = squeeze[c.members]
        if not np.any(N > 0):
            continue
        for i in np.flatnonzero(c.restrained[name]).tolist():
            here = max(N[i - 1] if i > 0 else 0.0, N[i] if i < len(N) else 0.0)
            if here > 0:
                F[c.joints[i]] += fraction * here * e
    return F


def _sideways(M, J, e, d: int) -> np.ndarray:
    """The largest movement along ``e`` of each joint in ``J`` over every mode.

    Parameters
    ----------
    M : (k, n d) scipy.sparse CSC matrix
        The modes as rows (joint ``j``'s movement in columns ``j d .. j d + d - 1``).
    J : (s,) int
        Joints.
    e : (d,) float
        A unit direction.

    Returns
    -------
    (s,) float
        ``max_i |u_i(J) . e|``; O(nnz of the columns read).
    """
    J = np.asarray(J, dtype=int)
    along = sum(M[:, J * d + a] * float(e[a]) for a in range(d) if e[a] != 0.0)
    if isinstance(along, int):                     # e is zero: nothing moves along it
        return np.zeros(len(J))
    return np.asarray(abs(along).max(axis=0).todense()).ravel()

