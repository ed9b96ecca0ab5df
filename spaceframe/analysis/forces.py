"""Member forces and support reactions under the model's load cases.

Equilibrium of the free coordinates is ``C.T t = f`` for member tensions
``t`` and joint loads ``f`` (:mod:`spaceframe.analysis.equilibrium`;
Pellegrino & Calladine [1]_).  A load is carried only when it lies in the
range of ``C.T``, that is when it is orthogonal to every mechanism (the null
space of ``C``): its share on the mechanisms, ``||P f|| / ||f||``, is
measured against the audit's mechanism basis, and the mechanisms it acts on
are named in the audit's words.

- **Statically determinate** frames (no state of self-stress) have one
  solution: ``t`` from ``C.T`` alone (``C.T`` square: one LU; otherwise the
  normal equations ``C C.T t = C f``).  No stiffness enters.
- **Indeterminate** frames: the stiffness method, ``K u = f`` with
  ``K = C.T diag(EA/L) C`` and ``t = diag(EA/L) C u`` (EA from
  ``[properties.members.EA]``, uniform when absent), so the forces depend on
  the members' relative stiffness.  Where mechanisms remain, the solve is on
  their orthogonal complement: ``K + delta I`` (``tol.forces_shift``) is factorised, the mechanisms
  are projected out, and iterative refinement removes the shift's effect.

One-way members (the member tag ``carries``: ``tension`` for rods, cables
and guys, ``compression`` for props and bearings) that come out loaded the
wrong way go slack: the worst is left out and the case solved again, one
member at a time, until every one-way member is loaded its own way (the
slack members are reported per case).

One sparse factorisation serves every load case (a block solve).  Reactions
are the forces the supports exert on the frame: at every joint, load plus
reaction plus the members' pulls sum to zero.

References
----------
.. [1] S. Pellegrino and C. R. Calladine, "Matrix analysis of statically and
   kinematically indeterminate frameworks", Int. J. Solids Struct. 22(4),
   409-428, 1986.
.. [2] W. McGuire, R. H. Gallagher and R. D. Ziemian, *Matrix Structural
   Analysis*, 2nd ed., Wiley, 2000 (the direct stiffness method).
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass
from typing import Sequence

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from ..edit import remove_members
from ..errors import InternalError, ModelError
from ..force_results import ExcitedMechanism, ForcesResult
from ..loads import LoadSet
from ..model import Frame, one_way_members
from ..tolerances import DEFAULT, Tolerances
from .equilibrium import (FreeDofs, axial_stiffness, compatibility_matrix, free_dofs,
                          joint_displacement_map, stiffness_matrix)

__all__ = ["forces"]

#: At most this many steps of iterative refinement (``tol.forces_refined`` stops them sooner).
_STEPS = 12


def forces(frame: Frame, cases: Sequence[str] | None = None, *, loads: LoadSet | None = None,
           method: str = "auto", tol: Tolerances = DEFAULT) -> ForcesResult:
    """Member forces and reactions of a pin-jointed frame under its load cases.

    Parameters
    ----------
    frame : Frame
    cases : sequence of str, optional
        Names of the cases to solve (see :meth:`spaceframe.loads.LoadSet.applied`);
        default every case and combination.
    loads : LoadSet, optional
        Instead of ``frame.loads``.
    method : {"auto", "dense", "sparse"}, keyword-only
        The audit's rank engine, which finds the mechanisms.
    tol : Tolerances, keyword-only
        ``tol.mechanism_load`` decides whether a load acts on a mechanism,
        ``tol.zero_force`` what counts as no force in the output.

    Returns
    -------
    ForcesResult

    Raises
    ------
    ModelError
        When there are no load cases, a case name is unknown, or a load
        names a joint the frame does not have.
    InternalError
        When a solve does not reach equilibrium (a fault, not the input's).

    Examples
    --------
    A triangle with its apex loaded: both rafters in compression, the tie in
    tension.

    >>> from spaceframe import Frame, forces
    >>> from spaceframe.loads import LoadCase, LoadSet
    >>> f = Frame.from_arrays([[0, 0], [4, 0], [2, 3]], [[0, 1], [1, 2], [2, 0]],
    ...                       supports={0: "pin", 1: "y"})
    >>> r = forces(f, loads=LoadSet(cases=(LoadCase("apex", ("J3",), [[0, -12]]),)))
    >>> r.member_forces[0].round(3).tolist()
    [4.0, -7.211, -7.211]

    Notes
    -----
    Cost: one audit (:func:`spaceframe.analysis.audit.audit` without the
    soft-mode search), one sparse factorisation (of ``C.T``, ``C C.T`` or
    ``K``) and one block solve of all ``q`` cases, plus O(q (n + m)).  With
    one-way members, each member that goes slack costs one more audit and
    solve of the reduced frame, per case.

    References
    ----------
    See the module docstring.
    """
    loads = loads if loads is not None else frame.loads
    if loads is None or not (loads.cases or loads.self_weight):
        raise ModelError("the model has no load cases; add a table [loads.NAME] of "
                         "joint = [fx, fy, fz] ([fx, fy] in a plane frame), e.g. [loads.snow] "
                         "then U1 = [0.0, 0.0, -5.0]", path=frame.source)
    applied = loads.applied(frame, cases)
    d, q = frame.dimension, len(applied.names)
    F = applied.forces                                           # (q, n, d)
    got = _solve(frame, F, method, tol)
    carried, T, excited = got.carried.copy(), got.T.copy(), list(got.excited)
    methods = [got.how if c else "none" for c in carried]
    residual = got.residual.copy()
    slack: list[tuple[str, ...]] = [()] * q
    tension_only, compression_only = _one_way(frame)
    warnings = list(got.warnings)
    if tension_only.any() or compression_only.any():
        for i in np.flatnonzero(carried):
            t, gone, sub = _settle(frame, F[i], T[i], tension_only, compression_only, method, tol)
            slack[i] = tuple(frame.member_ids[j] for j in gone)
            if sub is not None and not sub.carried[0]:
                carried[i], T[i], methods[i], residual[i] = False, np.nan, "none", np.nan
                excited[i] = sub.excited[0]
                warnings.append(f"case {applied.names[i]!r}: with its slack one-way members "
                                f"({', '.join(slack[i])}) left out, the frame cannot carry it")
            else:
                T[i] = t
                if sub is not None:
                    methods[i], residual[i] = sub.how, sub.residual[0]
                    if sub.mechanisms:
                        warnings.append(f"case {applied.names[i]!r}: with its slack one-way "
                                        f"members ({', '.join(slack[i])}) left out the frame "
                                        f"is a mechanism; this load is orthogonal to it, but "
                                        f"any other would move it")

    support = np.unique(frame.restraint_joint)
    R = np.full((q, len(support), d), np.nan)
    use = np.flatnonzero(carried)
    if use.size:
        pulls = _member_pulls(frame, T[use])                     # (q', n, d)
        R[use] = -(F[use] + pulls)[:, support]
    k = got.mechanisms
    if k and carried.any():
        warnings.append(f"the frame is still a mechanism ({k} independent "
                        f"mechanism{'s' if k > 1 else ''}): the loads carried here are "
                        f"orthogonal to every one, but any other load would move it")
    return ForcesResult(frame=frame, force_units=loads.force_units, names=applied.names,
                        kinds=applied.kinds, loads=F, carried=carried, member_forces=T,
                        reaction_joints=support, reactions=R,
                        mechanism_fraction=got.fraction, excited=tuple(excited),
                        methods=tuple(methods), residual=residual, slack=tuple(slack),
                        mechanisms=k, self_stress_states=got.self_stress,
                        ea_given=frame.member_properties.get("EA") is not None,
                        warnings=tuple(warnings), tol=tol)


@dataclass(frozen=True, eq=False)
class _Solved:
    """What one solve of ``q`` cases on one frame gives (arrays over the cases)."""

    carried: np.ndarray
    fraction: np.ndarray
    excited: tuple
    T: np.ndarray
    residual: np.ndarray
    how: str
    mechanisms: int
    self_stress: int
    warnings: tuple


def _solve(frame: Frame, F: np.ndarray, method: str, tol: Tolerances) -> _Solved:
    """Audit ``frame``, then solve every case of ``F (q, n, d)`` that no mechanism takes."""
    from .audit import audit

    n, d, m = frame.n_joints, frame.dimension, frame.n_members
    q = len(F)
    dofs = free_dofs(frame)
    C = compatibility_matrix(frame, dofs)
    found = audit(frame, self_stress_cap=0, soft=False, redundancy=False, method=method, tol=tol)
    k, s = found.mechanisms, found.self_stress_states

    norms = np.linalg.norm(F.reshape(q, -1), axis=1)
    safe = np.where(norms > 0, norms, 1.0)
    if k and found.modes.sparse:
        # many sparse modes: the share on their span from the Gram matrix, never dense
        modes = found.modes.matrix()                              # (k, n d), zero where held
        a = np.asarray(modes @ F.reshape(q, -1).T)               # (k, q)
        gram = spla.splu((modes @ modes.T).tocsc())
        fraction = np.sqrt(np.maximum(np.sum(a * gram.solve(a), axis=0), 0.0)) / safe
        rows = np.sqrt(np.asarray(modes.multiply(modes).sum(axis=1)).ravel())
        each = np.abs(a / rows[:, None]) / safe
    elif k:
        modes = found.mode_displacements.reshape(k, n * d)       # zero where held
        basis, _ = np.linalg.qr(modes.T)
        fraction = np.linalg.norm(basis.T @ F.reshape(q, -1).T, axis=0) / safe
        each = np.abs((modes / np.linalg.norm(modes, axis=1)[:, None]) @ F.reshape(q, -1).T) / safe
    else:
        fraction, each = np.zeros(q), np.zeros((0, q))
    carried = fraction <= tol.mechanism_load
    excited = tuple(_excited(found, each[:, i], tol) if not carried[i] else ()
                    for i in range(q))

    f = _to_free(F, dofs)                                        # (N, q)
    use = np.flatnonzero(carried)
    T = np.full((q, m), np.nan)
    residual = np.full(q, np.nan)
    if use.size and m:
        rhs = f[:, use]
        if s == 0:
            t = _equilibrium_solve(C, rhs)
        else:
            if k and found.modes.sparse:
                mech = sp.csc_matrix(joint_displacement_map(dofs).T @ found.modes.matrix().T)
            else:
                mech = _to_free(found.mode_displacements, dofs) if k else \
                    np.zeros((C.shape[1], 0))
            t = _stiffness_solve(C, rhs, frame.lengths(), frame.member_properties.get("EA"),
                                 mech, dofs, tol)
        T[use] = t.T
        residual[use] = np.linalg.norm(C.T @ t - rhs, axis=0) / safe[use]
    elif use.size:
        T[use] = np.zeros((use.size, m))
        residual[use] = np.linalg.norm(f[:, use], axis=0) / safe[use]
    bad = use[residual[use] > tol.forces_fault] if use.size else use
    if bad.size:
        raise InternalError(f"the member forces of a load case do not satisfy equilibrium "
                            f"(relative residual {residual[bad[0]]:.2g}); report the model",
                            stage="forces", partial={"residual": residual})
    return _Solved(carried=carried, fraction=fraction, excited=excited, T=T, residual=residual,
                   how="equilibrium" if s == 0 else "stiffness", mechanisms=k, self_stress=s,
                   warnings=found.warnings)


def _one_way(frame: Frame) -> tuple[np.ndarray, np.ndarray]:
    """Masks ``(m,) bool`` of tension-only and compression-only members (tag ``carries``)."""
    tension, compression = one_way_members(frame)
    masks = np.zeros((2, frame.n_members), dtype=bool)
    masks[0, tension] = True
    masks[1, compression] = True
    return masks[0], masks[1]


def _settle(frame: Frame, F: np.ndarray, t: np.ndarray, tension_only: np.ndarray,
            compression_only: np.ndarray, method: str, tol: Tolerances):
    """Leave out one-way members loaded the wrong way, one at a time, until none is.

    The member loaded most the wrong way (a tension-only member in the
    largest compression, or a compression-only member in the largest
    tension) goes slack and the case is solved again without it; a member
    left out is not brought back.  When the frame without the members left
    out cannot carry the load, the search goes back and leaves out the
    next member loaded the wrong way instead (depth first, at most
    ``4 a + 8`` solves for ``a`` one-way members): two crossed rods that
    the columns' shortening compresses together, say, where the first one
    left out is the one the load needs.  Returns ``(forces (m,), slack
    indices, last solve or None)``; the forces are None when no order found
    leaves a frame that carries the load (the first failure is returned).

    Notes
    -----
    Each step is one audit and one solve of the reduced frame.
    """
    budget = [4 * int(np.sum(tension_only | compression_only)) + 8]
    failure: list = []
    last: list = []

    def search(t, active, gone, sub):
        scale = float(np.max(np.abs(t))) if t.size else 0.0
        wrong = np.where(active & tension_only, -t, 0.0)
        wrong = np.maximum(wrong, np.where(active & compression_only, t, 0.0))
        order = [int(j) for j in np.argsort(-wrong, kind="stable")
                 if wrong[j] > tol.zero_force * scale]
        if not order:
            return t, gone, sub
        for j in order:
            if budget[0] <= 0:
                break
            budget[0] -= 1
            now = gone + [j]
            got = _solve(remove_members(frame, now), F[None], method, tol)
            last[:] = [(now, got)]
            if not got.carried[0]:
                failure.append((now, got))
                continue
            rest = active.copy()
            rest[j] = False
            t2 = np.zeros(frame.n_members)
            t2[rest] = got.T[0]
            found = search(t2, rest, now, got)
            if found is not None:
                return found
        return None

    found = search(t, np.ones(frame.n_members, dtype=bool), [], None)
    if found is not None:
        return found
    gone, sub = (failure or last)[0]
    if sub.carried[0]:     # out of solves on a path still carried: not settled
        sub = dataclasses.replace(sub, carried=np.zeros(1, dtype=bool))
    return None, gone, sub


def _excited(found, each: np.ndarray, tol: Tolerances) -> tuple:
    """The mechanisms a load acts on, largest share first (at least the largest one)."""
    order = np.argsort(-each, kind="stable")
    keep = [i for i in order if each[i] > tol.mechanism_load] or [int(order[0])]
    return tuple(ExcitedMechanism(mode=int(i) + 1, kind=found.mode_info[i].kind,
                                  description=found.mode_info[i].description,
                                  fraction=float(each[i])) for i in keep)


def _to_free(V: np.ndarray, dofs: FreeDofs) -> np.ndarray:
    """Global joint vectors ``(q, n, d)`` in free coordinates, ``(N, q)``.

    The components along restrained directions are dropped (a support takes
    them directly).
    """
    local = np.einsum("nda,qnd->naq", dofs.basis, V)
    joint = dofs.joint_of()
    return local[joint, np.arange(dofs.total) - dofs.offset[joint], :]


def _member_pulls(frame: Frame, T: np.ndarray) -> np.ndarray:
    """Force the members exert on each joint, ``(q, n, d)``, for tensions ``T (q, m)``.

    A member in tension pulls each end joint toward the other.
    """
    a, b = frame.ends[:, 0], frame.ends[:, 1]
    vec = frame.coords[b] - frame.coords[a]
    w = vec / np.linalg.norm(vec, axis=1)[:, None]               # (m, d)
    n, d = frame.n_joints, frame.dimension
    out = np.zeros((len(T), n, d))
    for axis in range(d):
        pull = T * w[:, axis]                                    # (q, m)
        for end, sign in ((a, 1.0), (b, -1.0)):
            G = sp.csr_matrix((np.full(len(end), sign), (end, np.arange(len(end)))),
                              shape=(n, len(end)))
            out[:, :, axis] += (G @ pull.T).T
    return out


def _equilibrium_solve(C: sp.csr_matrix, f: np.ndarray) -> np.ndarray:
    """Tensions from ``C.T t = f`` alone, for ``C`` of full row rank (no self-stress)."""
    m, N = C.shape
    if m == N:
        lu = spla.splu(C.T.tocsc())
        apply = lu.solve
        t = apply(f)
        for _ in range(2):
            t += apply(f - C.T @ t)
        return t
    lu = spla.splu((C @ C.T).tocsc())
    t = lu.solve(C @ f)
    for _ in range(2):
        t += lu.solve(C @ (f - C.T @ t))
    return t


def _stiffness_solve(C, f, lengths, ea, mech, dofs: FreeDofs, tol: Tolerances) -> np.ndarray:
    """Tensions by the stiffness method, on the complement of the mechanisms ``mech``."""
    from .nullspace import _ordering

    N = C.shape[1]
    w = axial_stiffness(lengths, ea)
    K = stiffness_matrix(C, lengths, ea)
    diag = K.diagonal()
    typical = float(np.median(diag[diag > 0]))
    if sp.issparse(mech):       # many sparse mechanisms: the projector from their Gram matrix
        M, gram = mech, spla.splu((mech.T @ mech).tocsc())

        def project(X):
            return X - M @ gram.solve(np.asarray(M.T @ X))
    else:
        M, _ = np.linalg.qr(mech) if mech.shape[1] else (mech, None)

        def project(X):
            return X - M @ (M.T @ X) if M.shape[1] else X

    perm = _ordering(K, dofs.joint_of())
    inv = np.empty_like(perm)
    inv[perm] = np.arange(N)
    Kp = K[perm][:, perm].tocsc()
    if M.shape[1]:
        Kp = (Kp + tol.forces_shift * typical * sp.identity(N, format="csc")).tocsc()
    lu = spla.splu(Kp, permc_spec="NATURAL", diag_pivot_thresh=0.0,
                   options=dict(SymmetricMode=True))
    target = project(f)
    scale = np.maximum(np.linalg.norm(target, axis=0), np.finfo(float).tiny)
    u = np.zeros_like(target)
    r, last = target, np.inf
    for _ in range(_STEPS):
        u += project(lu.solve(np.asfortranarray(r[perm]))[inv])
        r = target - K @ u
        worst = float(np.max(np.linalg.norm(r, axis=0) / scale))
        if worst <= tol.forces_refined or worst > tol.forces_stalled * last:
            break                       # refined, or round-off reached: no step gains
        last = worst
    return w[:, None] * (C @ u)
