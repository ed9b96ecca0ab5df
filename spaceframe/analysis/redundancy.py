"""Key members and redundancy shares: which members the frame cannot lose.

A member whose loss leaves a new mechanism is exactly one that carries no
force in every state of self-stress (Pellegrino & Calladine [1]_: removing a
bar lowers the rank of the equilibrium matrix unless a self-stress runs
through it).  A seeded random combination of the states of self-stress is
non-zero on every member that some state loads (with probability one), so
two such probes find the key members for the cost of two solves.

The redundancy share of a member is the diagonal entry of the orthogonal
projector onto the self-stress space.  It does not depend on the basis
chosen, is 0 for a key member and near 1 for a member the frame hardly
needs, and the shares sum to the number of states of self-stress.  With unit
member weights it is the redundancy matrix's diagonal of the literature on
structural redundancy (Bahndorf [2]_; von Scheven et al. [3]_) for a frame
whose members all have the same EA/L.

References
----------
.. [1] S. Pellegrino and C. R. Calladine, "Matrix analysis of statically and
   kinematically indeterminate frameworks", Int. J. Solids Struct. 22(4),
   409-428, 1986.
.. [2] J. Bahndorf, "Zur Systematisierung der Seilnetzberechnung und zur
   Optimierung von Seilnetzen", Deutsche Geodätische Kommission, Reihe C,
   Nr. 373, 1991.
.. [3] M. von Scheven, E. Ramm and M. Bischoff, "Quantification of the
   redundancy distribution in truss and beam structures", Int. J. Solids
   Struct. 213, 41-49, 2021.
"""

from __future__ import annotations

import numpy as np

from ..tolerances import DEFAULT, Tolerances

__all__ = ["key_members", "probes", "redundancy_shares"]

_SEED = 20261202


def probes(m: int) -> np.ndarray:
    """The two seeded random member force vectors whose projections find key members."""
    return np.random.default_rng(_SEED).standard_normal((m, 2))


def key_members(m: int, self_stress_count: int, project, *,
                projected: np.ndarray | None = None, tol: Tolerances = DEFAULT) -> np.ndarray:
    """Indices of the members that carry no force in any state of self-stress.

    Parameters
    ----------
    m : int
        Number of members.
    self_stress_count : int
    project : callable
        Projection onto the self-stress space.
    projected : (m, 2) float, optional
        ``project(probes(m))``, where the caller computed it already.
    tol : Tolerances, keyword-only
        A member is key when both probes have ``|t_e| <= tol.key * max |t|``.

    Returns
    -------
    (j,) int
        Ascending member indices.

    Notes
    -----
    Cost: two projections (two block solves in the sparse engine).
    """
    if self_stress_count == 0:
        return np.arange(m)
    t = project(probes(m)) if projected is None else projected
    scale = np.abs(t).max(axis=0)
    return np.flatnonzero(np.all(np.abs(t) <= tol.key * scale, axis=1))


def redundancy_shares(self_stress_count: int, project, *, max_solves: int | None = None):
    """Redundancy share of every member, ``(m,) float``, or None when too costly.

    Notes
    -----
    Dense engine: from the orthonormal self-stress basis, O(m s).  Sparse
    engine: one solve per free coordinate (see the projector's
    ``redundancy``), skipped beyond ``max_solves`` coordinates (default: the
    engine's ``tol.limits.redundancy_max``).
    """
    r = project.redundancy(max_solves=max_solves)
    if r is not None and self_stress_count == 0:
        r = np.zeros_like(r)
    return r
