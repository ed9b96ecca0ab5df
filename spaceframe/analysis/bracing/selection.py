"""The exact selection: each candidate's reach onto the mechanisms, one greedy matroid pass.

A candidate member's row ``c`` of the compatibility matrix, applied to an
orthonormal basis ``N`` of the frame's mechanisms, is its reach ``r = c N``:
the elongation it would suffer in each mechanism (a restraint's row is its
direction at its joint).  A set of candidates removes every mechanism exactly
when its reaches span the ``k``-dimensional mechanism space; in general it
removes as many mechanisms as the rank of its reaches.  The reaches form a
linear matroid, so going through the candidates once in order of cost and
keeping each whose reach is independent of those kept gives a basis of least
total cost (Rado [1]_, Edmonds [2]_).  Every basis has the same size, so the
count is the least possible too.

The pieces, in the order :func:`recommend_bracing` uses them:

1. :func:`reach_rows`: every candidate's row in joint coordinates.
2. :func:`matroid_elements`: the elements of the matroid and their greedy
   order.  Members come before restraints (restraints are used only for what
   no member can remove), then by cost (the length, or the user's weight),
   then by origin (:data:`~.candidates.ORIGINS`) and ends.  With
   ``tension_only`` a panel is one element (below).
3. :func:`greedy_basis`: the greedy pass.  A reach is independent of those
   kept when its residual after projection on them exceeds
   ``tol.rank * s_max``, the threshold of the rank decision
   (:class:`spaceframe.tolerances.Tolerances`), ``s_max`` the largest
   singular value of the compatibility matrix.
4. :func:`expand_elements`: elements back to candidates; with ``robust``,
   the robust elements first (:mod:`.robust`).
5. The member rules (:mod:`.rules`): needed ties and, with one-way members,
   the repair under Roth & Whiteley's test; which items are key.
6. :func:`braced_frame` and the re-audit with the core engine; for what is
   left, :func:`remedies` and :func:`lateral_restraint` (data the views word);
   the forces in what is added (:mod:`.forces`).

Tension-only bracing
    Rods carry tension only; a panel braced against racking both ways needs
    both diagonals.  Each panel is then one element of the matroid, with the
    reach of the diagonal that moves more and the cost of both, and a chosen
    panel gets both.  That the rods then hold the frame acting one way is
    checked, and repaired where they do not, by :mod:`.rules`: the greedy
    pass itself only sees rows, an order and a threshold.

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

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from ...errors import SpaceframeError
from ...model import Frame
from ...results import AuditResult
from ...tolerances import DEFAULT, Tolerances
from ..audit import audit
from ..equilibrium import compatibility_matrix
from . import layout as layout_rules
from .candidates import CandidateSet, find_candidates
from .forces import proposal_forces
from .result import (BracingResult, LateralRestraint, MemberRules, Remedy, RobustInfo,
                     braced_frame)
from .robust import robust_elements
from .rules import (hold_one_way, hold_single_losses, key_items, one_way_motion, rods_of,
                    with_needed_ties)

__all__ = ["recommend_bracing", "reach_rows", "greedy_basis", "matroid_elements",
           "expand_elements", "remedies", "lateral_restraint", "planar_plane", "PER_MODE"]

#: Cheapest single candidates listed per mode.
PER_MODE = 3


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


def matroid_elements(cand: CandidateSet, reach: np.ndarray, tension_only: bool):
    """Matroid elements: candidates, or (tension-only) panels as one element each.

    Parameters
    ----------
    cand : CandidateSet
    reach : (c, k) float
        Each candidate's reach onto an orthonormal mechanism basis.
    tension_only : bool

    Returns
    -------
    order : list of int
        The elements in greedy order (:meth:`CandidateSet.order`; tension-only:
        one element per panel, by the panel's cost).
    elements : (c, k) float
        The reach of every element, rows indexed like the candidates (a panel
        by its first diagonal, with the reach of the diagonal that moves more).
    cost : (c,) float
        Each element's cost (a panel: both diagonals).
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


def expand_elements(basis, cand: CandidateSet, tension_only: bool) -> list[int]:
    """The candidates of chosen elements: a tension-only panel gives both its diagonals."""
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
            found.append((tuple(expand_elements(other, cand, tension_only)),
                          float(sum(cost[i] for i in other))))
    return sorted(found, key=lambda t: t[1])


def _s_max(frame: Frame, tol: Tolerances = DEFAULT) -> float:
    """Largest singular value of the compatibility matrix.

    Dense 2-norm up to ``tol.limits.dense_engine`` entries, else a Lanczos
    estimate of ``lambda_max(C.T C)`` to ``tol.s_max_estimate``.
    """
    C = compatibility_matrix(frame)
    if min(C.shape) == 0 or C.nnz == 0:
        return 1.0
    if C.shape[0] * C.shape[1] <= tol.limits.dense_engine:
        return float(np.linalg.norm(C.toarray(), 2))
    K = (C.T @ C).tocsc()
    v0 = np.random.default_rng(20261201).standard_normal(K.shape[0])
    lam = spla.eigsh(K, k=1, which="LA", tol=tol.s_max_estimate, ncv=min(K.shape[0], 10),
                     v0=v0, return_eigenvectors=False)[0]
    return float(np.sqrt(lam))


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


def lateral_restraint(frame: Frame, after: AuditResult, *,
                      tol: Tolerances = DEFAULT) -> LateralRestraint | None:
    """For a lone planar frame in space: the joints that move out of its plane in ``after``.

    None when the frame is not planar, nothing is left, or no mode left
    moves a joint out of the plane by more than ``tol.acts``.
    """
    plane = planar_plane(frame, tol=tol)
    if plane is None or not after.mechanisms:
        return None
    normal, centre = plane
    if after.modes.sparse:                  # (k, n 3) sparse rows: each joint's movement along normal
        n = frame.n_joints
        along = sp.csr_matrix((np.tile(normal, n), (np.arange(3 * n), np.repeat(np.arange(n), 3))),
                              shape=(3 * n, n))
        out = abs(after.modes.matrix() @ along).max(axis=0).toarray().ravel() > tol.acts
    else:
        u = after.mode_displacements        # (k, n, 3), each mode's largest movement 1
        out = np.abs(u @ normal).max(axis=0) > tol.acts
    if not out.any():
        return None
    return LateralRestraint(tuple(int(j) for j in np.flatnonzero(out)), normal, centre)


def remedies(frame: Frame, after: AuditResult, *,
             tol: Tolerances = DEFAULT) -> tuple[Remedy, ...]:
    """For each mode of ``after`` (the braced frame's audit): a kind of candidate that would act.

    A rigid-body mode needs a restraint.  Otherwise, take the joint ``j``
    that moves most; among its 40 nearest joints not joined to it, the first
    ``q`` whose member ``j-q`` would stretch in the mode (the relative
    movement along ``j-q`` above ``tol.hint_stretch`` of the largest) gives a
    ``"member"`` remedy; failing that, ``j`` needs holding along its own
    movement (``"direction"``).

    Notes
    -----
    Cost O(k (log n + 40)) after one k-d tree of the joints.
    """
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
        if after.mode_kinds[m] == "rigid-body":
            out.append(Remedy(m, "restraint"))
            continue
        u = after.modes[m]
        j = int(np.argmax(np.linalg.norm(u, axis=1)))
        _, near = tree.query(X[j], k=near_count)
        remedy = Remedy(m, "direction", joint=j,
                        direction=tuple((u[j] / np.linalg.norm(u[j])).tolist()))
        for q in np.atleast_1d(near).tolist():
            if q == j or q in linked[j]:
                continue
            w = X[q] - X[j]
            L = float(np.linalg.norm(w))
            if L > 0 and abs(np.dot(w / L, u[q] - u[j])) > tol.hint_stretch:
                remedy = Remedy(m, "member", joint=j, other=int(q), length=L)
                break
        out.append(remedy)
    return tuple(out)


def recommend_bracing(frame: Frame, *, panels: bool = True, ties: bool = True,
                      within: float | None = None,
                      listed=None, restraints: str = "auto", attachable=(), attach_directions=(),
                      exclude_boxes=(), exclude_bays=(), exclude_panels=(),
                      tension_only: bool = False, robust: bool = False,
                      forces: bool = True, alternatives: int = 3,
                      layout: "layout_rules.LayoutRules | None" = None,
                      audit_options: dict | None = None,
                      tol: Tolerances = DEFAULT) -> BracingResult:
    """The fewest, cheapest candidate members and restraints that remove every mechanism.

    The frame is audited; candidates are gathered (:func:`find_candidates`);
    each one's reach onto an orthonormal basis of the mechanisms is formed
    (:func:`reach_rows`) and the greedy pass of the linear matroid
    (:func:`greedy_basis`) picks a basis of least cost; the braced frame
    (:func:`braced_frame`) is audited again.  When the candidates cannot
    remove every mechanism, the largest set they can remove is still added
    at least cost, and each mode left gets a :class:`Remedy`.

    Parameters
    ----------
    frame : Frame
    panels, ties, within, listed, attachable, attach_directions, exclude_boxes, exclude_bays, \
exclude_panels : keyword-only
        As in :func:`find_candidates`.
    tension_only : bool, keyword-only
        The added braces are rods (tag ``carries = tension``): chosen and
        re-audited by the one-way test (:mod:`.rules`), as are the added
        members of a frame that has one-way members of its own.
    robust : bool, keyword-only
        No added item whose loss brings a mechanism back (:mod:`.robust`):
        exact search part by part while it stays small, greedy augmentation of the
        least-cost basis above (``BracingResult.robust`` says which).
    forces : bool, keyword-only
        The forces in the added members and restraints under the model's
        load cases and notional horizontal loads (:mod:`.forces`; default
        True).
    restraints : {"auto", "always", "never"}, keyword-only
        Restraint candidates: "auto" (default) only when the frame has
        rigid-body modes or ``attachable`` joints are given, and then only
        for what no member removes; "always": always, competing with the
        members on cost (:mod:`.layout`).
    layout : LayoutRules, keyword-only
        Layout rules (:mod:`.layout`); None: the defaults (no member through
        the clear space at floor level, unit costs).
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
    >>> [r.candidates.ends[i].tolist() for i in r.members_added], r.after.stable
    ([[0, 2]], True)

    Notes
    -----
    Cost: two audits, O(c k) to form the reaches of ``c`` candidates against
    ``k`` mechanisms, and O(c k r) for the greedy pass that keeps ``r``.
    With one-way members, one one-way test (two sparse LPs) per repair step
    and per added item that is not a coloop (key items); ``robust`` adds the
    exact search (at most ``tol.limits.robust_search`` subsets) or the greedy
    cover, O(u k r) for ``u`` useful candidates (measured in
    ``benchmarks/bench_brace.py``: 1.6 x the default's selection, key check
    and re-audit on 19,600 members and 100 mechanisms); ``forces``, one call
    of :func:`spaceframe.analysis.forces.forces` on the braced frame.

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
    attach_joints = list(dict.fromkeys([*attachable, *(j for j, _ in attach_directions)]))
    use_restraints = restraints == "always" or (
        restraints == "auto" and (before.rigid_body_modes > 0 or len(attach_joints) > 0))
    cand = find_candidates(frame, panels=panels, ties=ties, within=within, listed=listed,
                           restraints=use_restraints, attachable=attach_joints,
                           attach_directions=attach_directions,
                           exclude_boxes=exclude_boxes, exclude_bays=exclude_bays,
                           exclude_panels=exclude_panels, tension_only=tension_only, tol=tol)
    cand, plan = layout_rules.prepare(frame, cand, layout, restraints=restraints,
                                      attachable=attach_joints, tension_only=tension_only,
                                      tol=tol)
    choice = None
    k = before.mechanisms
    n, d = frame.n_joints, frame.dimension
    # the readable modes, (n d, k); held sparse for many modes, dense only for the basis below
    U = (before.modes.matrix().T.tocsc() if before.modes.sparse else
         before.mode_displacements.reshape(k, n * d).T) if k else np.zeros((n * d, 0))
    A = reach_rows(frame, cand)
    acts_all = np.abs(A @ U) if k else np.zeros((len(cand), 0))   # (c, k), readable modes
    if sp.issparse(acts_all):
        acts_all = acts_all.toarray()
        U = U.toarray()
    chosen, alts, basis, least = [], [], [], 0.0
    reach, threshold, rc = np.zeros((len(cand), 0)), 0.0, None
    if k and len(cand):
        threshold = tol.rank * _s_max(frame, tol)
        Q, _ = np.linalg.qr(U)
        reach = np.asarray(A @ Q)
        if plan.search:   # a layout rule that is no matroid constraint
            if robust:
                raise SpaceframeError("a robust proposal is searched on the matroid's elements; "
                                      "it does not combine yet with symmetric groups or bays "
                                      "that must hold a brace")
            chosen, removed, choice = layout_rules.select(plan, cand, reach, threshold)
            basis = list(range(removed))
            least = float(sum(cand.cost[i] for i in chosen if cand.is_member[i]))
        else:
            order, elements, cost = matroid_elements(cand, reach, tension_only)
            basis = greedy_basis(elements, order, threshold)
            picked = basis
            if robust:
                rc = robust_elements(elements, order, cost, cand.is_member, basis, threshold,
                                     tol=tol)
                picked = list(rc.elements)
            chosen = expand_elements(picked, cand, tension_only)
            least = float(sum(cand.cost[i] for i in expand_elements(basis, cand, tension_only)
                              if cand.is_member[i]))
            if not robust:
                alts = _alternatives(elements, order, cost, basis, threshold, alternatives, cand,
                                     tension_only)
    rule = _member_rules(frame, cand, chosen, A, k - len(basis), tension_only, robust, tol)
    chosen = rule["chosen"]
    if rule["ties"] or rule["repaired"]:
        alts = []           # the rules changed the choice: a same-size swap no longer says it
    elif rule["one_way"]:
        alts = [(alt, c) for alt, c in alts if _one_way_held(frame, cand, alt, tension_only, tol)]
    braced = braced_frame(frame, cand, chosen, rods=rods_of(cand, chosen, tension_only))
    after = audit(braced, tol=tol, **opts)
    acts_on = tuple(tuple(int(m) + 1 for m in np.flatnonzero(acts_all[i] > tol.acts))
                    for i in chosen)
    opts_per_mode = []
    rank_order = np.argsort(np.argsort(cand.order())) if len(cand) else np.zeros(0, int)
    for m in range(k):
        touching = np.flatnonzero(acts_all[:, m] > tol.acts)
        opts_per_mode.append(tuple(int(i) for i in touching[np.argsort(rank_order[touching])]
                                   [:PER_MODE]))
    return BracingResult(frame=frame, before=before, candidates=cand, chosen=tuple(chosen),
                         acts_on=acts_on, braced=braced, after=after, alternatives=tuple(alts),
                         mode_options=tuple(opts_per_mode),
                         remaining=remedies(braced, after, tol=tol),
                         tension_only=tension_only, restraints_used=use_restraints,
                         expected_after=k - len(basis),
                         lateral=lateral_restraint(braced, after, tol=tol), layout=choice,
                         rules=MemberRules(
                             one_way=rule["one_way"], ties=tuple(rule["ties"]),
                             repaired=tuple(rule["repaired"]), held=rule["held"],
                             key=key_items(frame, cand, chosen, reach, threshold, braced,
                                           tol=tol)),
                         robust=None if not robust else RobustInfo(
                             method="repair" if rule["repaired"] else
                             rc.method if rc else "exact",
                             searched=rc.searched if rc else 0, least_cost=least,
                             uncoverable=tuple(expand_elements(rc.uncoverable, cand,
                                                               tension_only)) if rc else (),
                             parts=rc.parts if rc else 0,
                             exact_parts=rc.exact_parts if rc else 0),
                         proposal_forces=proposal_forces(braced, frame, tol=tol) if forces
                         else None)


def _one_way_held(frame, cand, chosen, tension_only, tol) -> bool:
    """Is ``frame`` braced with ``chosen`` held under the one-way test?"""
    test = one_way_motion(braced_frame(frame, cand, with_needed_ties(cand, chosen),
                                       rods=rods_of(cand, chosen, tension_only)), tol=tol)
    return test is None or test.held


def _member_rules(frame, cand, chosen, A, left, tension_only, robust, tol):
    """The member rules on the greedy choice (:mod:`.rules`): needed ties, then, with
    one-way members and no two-way mechanism left, the one-way repair and (robust) the
    repair of single losses."""
    from ...model import one_way_members

    with_ties = with_needed_ties(cand, chosen)
    ties = [i for i in with_ties if i not in set(chosen)]
    chosen = with_ties
    ten, com = one_way_members(frame)
    one_way = tension_only or bool(len(ten) + len(com))
    repaired, held = [], True
    if one_way and left == 0:
        chosen, repaired, held = hold_one_way(frame, cand, chosen, A, tension_only=tension_only,
                                              tol=tol)
        if robust and held:
            chosen, more, held = hold_single_losses(frame, cand, chosen, A,
                                                    tension_only=tension_only, tol=tol)
            repaired += more
    return {"chosen": chosen, "ties": ties, "repaired": repaired, "held": held,
            "one_way": one_way}
