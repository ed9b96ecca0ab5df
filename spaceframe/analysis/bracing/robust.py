"""A robust proposal: the braced frame stays held after the loss of any one added item.

In the matroid of the reaches (:mod:`.selection`), the loss of an added item
``e`` brings a mechanism back exactly when ``e`` is a coloop of the added set
``S``: ``rank(S - e) < rank(S)``.  A robust set spans the reaches of every
candidate and has no coloop: every item lies in a circuit of ``S``.  The
least-cost such set is a minimum-weight "coloop-free spanning set", hard in
general (it contains the minimum 2-edge-connected spanning subgraph problem
of graphic matroids, NP-hard), so two methods:

Exact search
    The matroid splits into its connected components (:func:`_parts`), and
    the cheapest robust set is the union of each one's cheapest.  In each,
    subsets of the useful elements (those with a reach) in order of
    nondecreasing total cost (a heap: from the subset whose dearest element
    is ``i``, the next are it with ``i + 1`` added and with ``i`` replaced
    by ``i + 1``; every subset comes once, none cheaper after a dearer one),
    the first spanning set without coloop being the cheapest.  It stops after
    ``Limits.robust_search`` subsets in all, or as soon as the subsets cost
    more than the greedy set below (which is then the cheapest); a component
    the search does not finish keeps the greedy set's part.
Greedy augmentation
    Above that: the least-cost basis ``B`` and, as in the greedy rule for
    weighted set cover (Chvatal [1]_), the element that stands in for the most
    uncovered elements of ``B`` per unit of cost, until every one is covered.
    ``f`` stands in for ``e`` in ``B`` when ``e`` is in the fundamental
    circuit of ``f``: ``f``'s coefficient on ``e`` in the basis is non-zero
    (:func:`spaceframe.analysis.bracing.rules.coloops`).  Then the added
    elements are dropped again, dearest first, where the rest still cover.
    Within a factor ``H(r)`` (the harmonic number of the basis size) of the
    cheapest cover of ``B``; not proven the cheapest robust set.

Restraints come after members in cost as in the greedy pass: a restraint
costs more than every member together.

References
----------
.. [1] V. Chvatal, "A greedy heuristic for the set-covering problem", Math.
   Oper. Res. 4(3), 233-235, 1979.
.. [2] J. Oxley, *Matroid Theory*, 2nd ed., Oxford University Press, 2011
   (coloops, fundamental circuits, connected components).
.. [3] S. Krogdahl, "The dependence graph for bases in matroids", Discrete
   Math. 19(1), 47-59, 1977 (a matroid is connected exactly when the
   fundamental-circuit graph of a basis is).
"""

from __future__ import annotations

import heapq
from dataclasses import dataclass

import numpy as np

from ...tolerances import DEFAULT, Tolerances
from .rules import coloops

__all__ = ["RobustChoice", "robust_elements"]


@dataclass(frozen=True)
class RobustChoice:
    """The robust elements and how they were found.

    Attributes
    ----------
    elements : tuple of int
        Matroid elements (rows of the reaches), cheapest first.
    method : str
        ``"exact"`` (the search found the cheapest) or ``"greedy"``.
    searched : int
        Subsets the exact search looked at.
    uncoverable : tuple of int
        Elements of the least-cost basis that no other candidate can stand
        in for: every set that removes as much contains them, as coloops.
    parts : int
        Connected components of the matroid of the useful elements (each
        searched on its own).
    exact_parts : int
        Those whose cheapest robust set the exact search proved.
    """

    elements: tuple[int, ...]
    method: str
    searched: int
    uncoverable: tuple[int, ...] = ()
    parts: int = 1
    exact_parts: int = 0


def _effective_cost(cost, is_member):
    """Costs in which a restraint comes after every member together (>= 0)."""
    cost = np.asarray(cost, dtype=float)
    big = float(cost[is_member].sum()) + 1.0
    return np.where(is_member, cost, cost + big)


def _cover(rows, basis, others, threshold):
    """``(o, r) bool``: which of ``others`` stand in for which element of ``basis``."""
    G = np.linalg.pinv(rows[basis])
    G /= np.linalg.norm(G, axis=0)
    return np.abs(rows[others] @ G) > threshold


def _exact(rows, items, cost, rank, threshold, budget, bound):
    """The cheapest coloop-free spanning subset of ``items`` costing at most ``bound``.

    Returns ``(subset, seen)``: ``subset`` is None when the search stopped
    after ``budget`` subsets, and ``()`` when every subset up to ``bound`` was
    seen and none is cheaper (the set that costs ``bound`` is the cheapest).
    """
    u = len(items)
    c = cost[items]
    heap = [(float(c[0]), (0,))] if u else []
    seen = 0
    slack = 1e-12 * max(bound, 1.0)
    while heap and seen < budget:
        total, S = heapq.heappop(heap)
        if total > bound + slack:
            return (), seen
        seen += 1
        if len(S) > rank:
            r, mask = coloops(rows[[items[i] for i in S]], threshold)
            if r == rank and not mask.any():
                return tuple(items[i] for i in S), seen
        i = S[-1]
        if i + 1 < u:
            heapq.heappush(heap, (float(sum(c[j] for j in S) + c[i + 1]), S + (i + 1,)))
            heapq.heappush(heap, (float(sum(c[j] for j in S[:-1]) + c[i + 1]),
                                  S[:-1] + (i + 1,)))
    return None, seen


def _greedy(rows, basis, items, cost, threshold):
    """Greedy set cover of the basis by the other useful items, then pruned.

    Returns ``(chosen, blocked, others, cover)``: the elements chosen, the
    basis elements no other item covers, the other items and the ``(o, r)``
    cover matrix (:func:`_cover`).
    """
    others = [i for i in items if i not in set(basis)]
    if not others:
        return tuple(basis), tuple(basis), others, np.zeros((0, len(basis)), dtype=bool)
    cover = _cover(rows, basis, others, threshold)       # (o, r)
    can = cover.any(axis=0)
    uncovered = can.copy()
    picked = []
    rank_of = {i: k for k, i in enumerate(items)}
    while uncovered.any():
        gain = (cover & uncovered).sum(axis=1)
        ratio = np.where(gain > 0, cost[others] / np.maximum(gain, 1), np.inf)
        best = min(range(len(others)), key=lambda k: (ratio[k], rank_of[others[k]]))
        picked.append(best)
        uncovered &= ~cover[best]
    for k in sorted(picked, key=lambda k: (-cost[others[k]], -rank_of[others[k]])):
        rest = [p for p in picked if p != k]
        if rest and not (can & ~cover[rest].any(axis=0)).any():
            picked = rest
    chosen = list(basis) + sorted((others[k] for k in picked), key=rank_of.get)
    return tuple(chosen), tuple(b for b, ok in zip(basis, can) if not ok), others, cover


def _parts(basis, others, cover) -> list[tuple[list[int], list[int]]]:
    """The connected components of the matroid: ``(basis elements, other elements)`` each.

    Two elements lie in one component exactly when the bipartite graph of
    fundamental circuits (an other element joined to each basis element of
    its circuit, the rows of ``cover``) joins them (Krogdahl [3]_); the
    cheapest robust set is the union of the cheapest of each component.
    """
    r = len(basis)
    parent = list(range(r + len(others)))

    def find(x):
        while parent[x] != x:
            parent[x] = parent[parent[x]]
            x = parent[x]
        return x

    for f, e in zip(*np.nonzero(cover)):
        a, b = find(r + int(f)), find(int(e))
        if a != b:
            parent[max(a, b)] = min(a, b)
    groups: dict[int, tuple[list[int], list[int]]] = {}
    for e in range(r):
        groups.setdefault(find(e), ([], []))[0].append(basis[e])
    for f in range(len(others)):
        if cover[f].any():
            groups[find(r + f)][1].append(others[f])
    return [groups[k] for k in sorted(groups)]


def robust_elements(rows: np.ndarray, order, cost, is_member, basis, threshold: float, *,
                    tol: Tolerances = DEFAULT) -> RobustChoice:
    """The elements of a robust proposal: spanning, no coloop, least cost where proven.

    Parameters
    ----------
    rows : (c, k) float
        Each element's reach.
    order : sequence of int
        The elements in greedy order (cheapest first).
    cost : (c,) float
        Each element's cost.
    is_member : (c,) bool
        False for restraints.
    basis : sequence of int
        The least-cost basis (:func:`~.selection.greedy_basis`).
    threshold : float
        As in :func:`~.selection.greedy_basis`.
    tol : Tolerances, keyword-only
        ``tol.limits.robust_search`` bounds the exact search.

    Returns
    -------
    RobustChoice

    Notes
    -----
    Exact search: at most ``robust_search`` subsets, each one call of
    :func:`~.rules.coloops` (O(s k r)).  Greedy: O(u k r) for the cover of
    ``u`` useful elements, then O(r) per element picked.
    """
    basis = list(basis)
    rank = len(basis)
    if rank == 0:
        return RobustChoice((), "exact", 0)
    norms = np.linalg.norm(rows, axis=1)
    items = [int(i) for i in order if norms[i] > threshold]
    eff = _effective_cost(cost, np.asarray(is_member, dtype=bool))
    chosen, blocked, others, cover = _greedy(rows, basis, items, eff, threshold)
    if blocked:     # some element of the basis is a coloop of every spanning set
        return RobustChoice(chosen, "greedy", 0, blocked)
    position = {i: k for k, i in enumerate(items)}
    parts = sorted(_parts(basis, others, cover), key=lambda g: (len(g[0]) + len(g[1]),
                                                                 position[g[0][0]]))
    found, seen, exact = [], 0, 0
    greedy_set = set(chosen)
    for part_basis, part_others in parts:
        members = sorted(part_basis + part_others, key=position.get)
        mine = [i for i in members if i in greedy_set]
        got, looked = _exact(rows, members, eff, len(part_basis), threshold,
                             max(0, tol.limits.robust_search - seen), float(eff[mine].sum()))
        seen += looked
        if got is None:
            found += mine
        else:
            exact += 1
            found += mine if got == () else list(got)
    elements = tuple(sorted(found, key=position.get))
    return RobustChoice(elements, "exact" if exact == len(parts) else "greedy", seen,
                        parts=len(parts), exact_parts=exact)
