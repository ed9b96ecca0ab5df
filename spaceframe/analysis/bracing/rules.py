"""Member rules of a bracing proposal: needed ties, rods that act one way, single losses.

The greedy pass (:mod:`.selection`) sees a linear matroid: rows, an order and
a threshold.  Three rules of real members do not fit in it and are applied to
its choice here, each by adding candidates, never by taking any away:

Needed ties
    A diagonal of a ``"tie panel"`` is a brace only with the ties that close
    its panel (:func:`~.frames.missing_ties`).  :func:`with_needed_ties` adds
    those tie candidates that were not chosen already.
One-way members (rods)
    With ``tension_only`` the added braces are rods (tag ``carries =
    tension``; ties between frames and restraints stay two-way); a model may
    have one-way members of its own.  Roth & Whiteley [1]_ (Theorem 5.2): a
    frame with one-way members is held exactly when the same frame with
    every member two-way is held and some state of self-stress is strictly
    positive in every rod and negative in every prop.  The greedy basis
    gives the first; :func:`hold_one_way` repairs the second, by the test of
    :mod:`spaceframe.analysis.oneway`: while that test finds a motion that
    only slackens one-way members, add the cheapest candidate that the motion
    would stretch (a rod) or stretch or shorten (a two-way member or a
    restraint), which rules that motion out.
Single losses
    :func:`key_items` says which added items are key (losing one brings a
    mechanism back, or a motion that slackens rods), and
    :func:`hold_single_losses` repairs a robust proposal with one-way
    members the same way, one lost item at a time.

The repair is exact in what it claims and greedy in what it costs: when the
candidates together hold the frame, it ends held (each step rules out the
motion found, and a motion no candidate resists would remain with all of them
added), within one step per candidate; the set is not proven the cheapest.

References
----------
.. [1] B. Roth and W. Whiteley, "Tensegrity frameworks", Trans. Amer. Math.
   Soc. 265(2), 419-446, 1981.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from ... import edit
from ...model import Frame, one_way_members
from ...tolerances import DEFAULT, Tolerances
from ..equilibrium import compatibility_matrix, free_dofs
from ..oneway import one_way_test
from .candidates import CandidateSet
from .result import braced_frame

__all__ = ["with_needed_ties", "rods_of", "hold_one_way", "one_way_motion", "key_items",
           "hold_single_losses", "coloops"]


def with_needed_ties(cand: CandidateSet, chosen) -> list[int]:
    """``chosen`` with, after each tie-panel diagonal, the tie candidates its panel needs.

    A needed tie that is no candidate (it was excluded) is not added; the
    panel's diagonal is then not a brace, and the re-audit says what is left.
    """
    at = {(int(a), int(b)): i for i, (a, b) in enumerate(cand.ends.tolist())
          if cand.origin[i] == "tie"}
    out, have = [], set()
    for i in chosen:
        if i in have:
            continue
        out.append(i)
        have.add(i)
        if cand.origin[i] == "tie panel":
            for p, q in _panel_ties(cand.panel[i]):
                t = at.get((min(p, q), max(p, q)))
                if t is not None and t not in have:
                    out.append(t)
                    have.add(t)
    return out


def _panel_ties(corners):
    """The sides of a tie panel (the frame's members among them are skipped by the caller)."""
    return [(p, q) for p, q in zip(corners, corners[1:] + corners[:1]) if p >= 0 and q >= 0]


def rods_of(cand: CandidateSet, chosen, tension_only: bool) -> list[int]:
    """The chosen candidates that are rods: with ``tension_only``, every member but a tie."""
    if not tension_only:
        return []
    return [i for i in chosen if cand.joint[i] < 0 and cand.origin[i] != "tie"]


def one_way_motion(frame: Frame, *, tol: Tolerances = DEFAULT):
    """The one-way test of a frame with no two-way mechanism: ``OneWayResult`` or None.

    None when the frame has no one-way member.  The caller knows the
    two-way frame is held (the re-audit found no mechanism), so this is the
    test's linear programmes alone (:func:`spaceframe.analysis.oneway.one_way_test`).
    """
    dofs = free_dofs(frame)
    return one_way_test(frame, compatibility_matrix(frame, dofs), dofs, mechanisms=0, tol=tol)


def _resisting(A, cand: CandidateSet, motion: np.ndarray, exclude, tension_only: bool,
               tol: Tolerances) -> int | None:
    """The first candidate in greedy order, not in ``exclude``, that resists ``motion``.

    ``A @ u`` is each candidate's lengthening (a restraint's: the movement
    along it) for the joint movement ``u`` (largest movement 1).  A rod
    resists a motion that lengthens it by more than ``tol.acts``; a two-way
    member or a restraint one that lengthens or shortens it by that much.
    """
    stretch = np.asarray(A @ motion.ravel()).ravel()
    rod = np.array([tension_only and cand.joint[i] < 0 and cand.origin[i] != "tie"
                    for i in range(len(cand))], dtype=bool)
    resists = np.where(rod, stretch > tol.acts, np.abs(stretch) > tol.acts)
    exclude = set(exclude)
    for i in cand.order().tolist():
        if resists[i] and i not in exclude:
            return int(i)
    return None


def hold_one_way(frame: Frame, cand: CandidateSet, chosen, A, *, tension_only: bool,
                 tol: Tolerances = DEFAULT):
    """Add candidates until the braced frame is held with its one-way members (greedy + repair).

    Parameters
    ----------
    frame : Frame
        The frame as given; its two-way form braced with ``chosen`` has no
        mechanism.
    cand : CandidateSet
    chosen : sequence of int
    A : (c, n d) sparse
        Each candidate's row (:func:`~.selection.reach_rows`).
    tension_only : bool
        The added braces are rods.

    Returns
    -------
    chosen : list of int
        ``chosen`` and the candidates added, in that order.
    added : list of int
        The candidates the repair added (their needed ties included).
    held : bool
        Whether the last braced frame is held under the one-way test (True
        when it has no one-way member).

    Notes
    -----
    Each step is one braced frame and the one-way test's linear programmes
    (:func:`one_way_motion`); at most one step per candidate.
    """
    chosen = list(chosen)
    added: list[int] = []
    for _ in range(len(cand) + 1):
        braced = braced_frame(frame, cand, chosen, rods=rods_of(cand, chosen, tension_only))
        test = one_way_motion(braced, tol=tol)
        if test is None or test.held:
            return chosen, added, True
        if test.motion is None:       # held only just: no motion to rule out
            return chosen, added, False
        i = _resisting(A, cand, test.motion, chosen, tension_only, tol)
        if i is None:
            return chosen, added, False
        more = [j for j in with_needed_ties(cand, [i]) if j not in chosen]
        chosen += more
        added += more
    return chosen, added, False


def coloops(rows: np.ndarray, threshold: float) -> tuple[int, np.ndarray]:
    """The rank of ``rows`` and which rows are coloops (each one's loss lowers the rank).

    A row ``e`` of a greedy basis ``B`` of the rows (in their own order) is a
    coloop exactly when no other row ``f`` has a component beyond
    ``threshold`` orthogonal to the span of ``B - e``; with ``G`` the
    pseudo-inverse of ``B``'s rows (``r_i . g_e = delta_ie``) that component
    is ``|r_f . g_e| / ||g_e||``.  Rows outside ``B`` are never coloops.

    Parameters
    ----------
    rows : (s, k) float
    threshold : float
        As in :func:`~.selection.greedy_basis`.

    Returns
    -------
    rank : int
    mask : (s,) bool

    Notes
    -----
    Cost O(s k r) for rank ``r``.
    """
    from .selection import greedy_basis

    s = len(rows)
    mask = np.zeros(s, dtype=bool)
    if s == 0 or rows.shape[1] == 0:
        return 0, mask
    B = greedy_basis(rows, range(s), threshold)
    if not B:
        return 0, mask
    G = np.linalg.pinv(rows[B])                          # (k, r)
    G /= np.linalg.norm(G, axis=0)
    others = np.setdiff1d(np.arange(s), B)
    covered = (np.abs(rows[others] @ G) > threshold).any(axis=0) if len(others) else \
        np.zeros(len(B), dtype=bool)
    mask[B] = ~covered
    return len(B), mask


def _without(braced: Frame, n_members: int, n_restraints: int, k: int, is_member: bool):
    """``braced`` without its ``k``-th added member or restraint row."""
    if is_member:
        return edit.remove_members(braced, [n_members + k])
    keep = np.ones(braced.n_restraints, dtype=bool)
    keep[n_restraints + k] = False
    return dataclasses.replace(braced, restraint_joint=braced.restraint_joint[keep],
                               restraint_dir=braced.restraint_dir[keep])


def key_items(frame: Frame, cand: CandidateSet, chosen, reach: np.ndarray, threshold: float,
              braced: Frame, *, tol: Tolerances = DEFAULT) -> tuple[bool, ...]:
    """For each chosen item (in ``chosen``'s order): is it key?

    Key: losing it brings a mechanism back (it is a coloop of the chosen
    items' reaches, :func:`coloops`) or, in a frame with one-way members, a
    motion that slackens them (the one-way test of the frame without it).

    Notes
    -----
    One call of :func:`coloops`; with one-way members, one one-way test per
    chosen item that is not a coloop.
    """
    chosen = list(chosen)
    if not chosen:
        return ()
    _, mask = coloops(reach[chosen], threshold)
    ten, com = one_way_members(braced)
    if not (len(ten) + len(com)) or (reach.shape[1] and mask.all()):
        return tuple(bool(x) for x in mask)
    mem = [i for i in chosen if cand.joint[i] < 0]
    res = [i for i in chosen if cand.joint[i] >= 0]
    out = []
    for i, key in zip(chosen, mask):
        if not key:
            gone = _without(braced, frame.n_members, frame.n_restraints,
                            mem.index(i) if cand.joint[i] < 0 else res.index(i),
                            cand.joint[i] < 0)
            test = one_way_motion(gone, tol=tol)
            key = test is not None and not test.held
        out.append(bool(key))
    return tuple(out)


def hold_single_losses(frame: Frame, cand: CandidateSet, chosen, A, *, tension_only: bool,
                       tol: Tolerances = DEFAULT):
    """Add candidates until the braced frame stays held after the loss of any one added member.

    For a frame with one-way members (the two-way form already has no
    coloop among the added items): each added member in turn is left out
    and the one-way test run; when it finds a motion, the cheapest candidate
    that resists it (:func:`_resisting`) is added and the round starts again.
    A loss that no candidate left can make good is passed over (that member
    stays key) and the others are still repaired.

    Returns
    -------
    chosen : list of int
    added : list of int
        The candidates added here.
    held : bool
        Whether every single loss now leaves the frame held.

    Notes
    -----
    At most one round per candidate, each of at most one one-way test per
    added member.
    """
    chosen = list(chosen)
    added: list[int] = []
    stuck: set[int] = set()       # losses no candidate left can make good
    for _ in range(len(cand) + 1):
        braced = braced_frame(frame, cand, chosen, rods=rods_of(cand, chosen, tension_only))
        mem = [i for i in chosen if cand.joint[i] < 0]
        fix = None
        for k, i in enumerate(mem):
            if i in stuck:
                continue
            test = one_way_motion(_without(braced, frame.n_members, 0, k, True), tol=tol)
            if test is None or test.held:
                continue
            j = None if test.motion is None else _resisting(A, cand, test.motion, chosen,
                                                            tension_only, tol)
            if j is None:
                stuck.add(i)
                continue
            fix = j
            break
        if fix is None:
            return chosen, added, not stuck
        more = [j for j in with_needed_ties(cand, [fix]) if j not in chosen]
        chosen += more
        added += more
    return chosen, added, False
