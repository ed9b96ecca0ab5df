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
  their orthogonal complement: ``K + delta I`` is factorised, the mechanisms
  are projected out, and iterative refinement removes the shift's effect.

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

from typing import Sequence

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from ..errors import InternalError, ModelError
from ..force_results import ExcitedMechanism, ForcesResult
from ..loads import LoadSet
from ..model import Frame
from ..tolerances import DEFAULT, Tolerances
from .equilibrium import FreeDofs, compatibility_matrix, free_dofs

__all__ = ["forces"]

#: Relative shift ``delta / typical stiffness`` of ``K + delta I`` when mechanisms remain.
#: Not a tolerance: it decides nothing, and iterative refinement removes its effect.
_SHIFT = 1e-8
#: Iterative refinement stops once ``||f - C.T t|| <= _REFINED * ||f||``, or after _STEPS.
_REFINED = 1e-13
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
    ``K``) and one block solve of all ``q`` cases, plus O(q (n + m)).

    References
    ----------
    See the module docstring.
    """
    from .audit import audit

    loads = loads if loads is not None else frame.loads
    if loads is None or not (loads.cases or loads.self_weight):
        raise ModelError("the model has no load cases; add a table [loads.NAME] of "
                         "joint = [fx, fy, fz] ([fx, fy] in a plane frame), e.g. [loads.snow] "
                         "then U1 = [0.0, 0.0, -5.0]", path=frame.source)
    applied = loads.applied(frame, cases)
    n, d, m = frame.n_joints, frame.dimension, frame.n_members
    q = len(applied.names)
    F = applied.forces                                           # (q, n, d)
    dofs = free_dofs(frame)
    C = compatibility_matrix(frame, dofs)
    found = audit(frame, self_stress_cap=0, soft=False, redundancy=False, method=method, tol=tol)
    k, s = found.mechanisms, found.self_stress_states

    norms = np.linalg.norm(F.reshape(q, -1), axis=1)
    safe = np.where(norms > 0, norms, 1.0)
    modes = found.mode_displacements.reshape(k, n * d)           # zero where held
    if k:
        basis, _ = np.linalg.qr(modes.T)
        fraction = np.linalg.norm(basis.T @ F.reshape(q, -1).T, axis=0) / safe
        each = np.abs((modes / np.linalg.norm(modes, axis=1)[:, None]) @ F.reshape(q, -1).T) / safe
    else:
        fraction, each = np.zeros(q), np.zeros((0, q))
    carried = fraction <= tol.mechanism_load
    excited = tuple(_excited(found, each[:, i], fraction[i], tol) if not carried[i] else ()
                    for i in range(q))

    f = _to_free(F, dofs)                                        # (N, q)
    use = np.flatnonzero(carried)
    T = np.full((q, m), np.nan)
    residual = np.full(q, np.nan)
    ea = frame.member_properties.get("EA")
    how = "equilibrium" if s == 0 else "stiffness"
    if use.size and m:
        rhs = f[:, use]
        if s == 0:
            t = _equilibrium_solve(C, rhs)
        else:
            mech = _to_free(found.mode_displacements, dofs) if k else np.zeros((C.shape[1], 0))
            t = _stiffness_solve(C, rhs, frame.lengths(), ea, mech, dofs)
        T[use] = t.T
        residual[use] = np.linalg.norm(C.T @ t - rhs, axis=0) / safe[use]
    elif use.size:
        T[use] = np.zeros((use.size, m))
        residual[use] = np.linalg.norm(f[:, use], axis=0) / safe[use]
    bad = use[residual[use] > max(10 * tol.mechanism_load, 1e-9)] if use.size else use
    if bad.size:
        raise InternalError(f"the forces of case {applied.names[bad[0]]!r} do not satisfy "
                            f"equilibrium (relative residual {residual[bad[0]]:.2g}); report the "
                            f"model", stage="forces",
                            partial={"cases": applied.names, "residual": residual})

    support = np.unique(frame.restraint_joint)
    R = np.full((q, len(support), d), np.nan)
    if use.size:
        pulls = _member_pulls(frame, np.nan_to_num(T[use]))      # (q', n, d)
        R[use] = -(F[use] + pulls)[:, support]
    warnings = list(found.warnings)
    if k and carried.any():
        warnings.append(f"the frame is still a mechanism ({k} independent "
                        f"mechanism{'s' if k > 1 else ''}): the loads carried here are "
                        f"orthogonal to every one, but any other load would move it")
    return ForcesResult(frame=frame, force_units=loads.force_units, names=applied.names,
                        kinds=applied.kinds, loads=F, carried=carried, member_forces=T,
                        reaction_joints=support, reactions=R, mechanism_fraction=fraction,
                        excited=excited,
                        methods=tuple(how if c else "none" for c in carried),
                        residual=residual, slack=((),) * q, mechanisms=k,
                        self_stress_states=s, ea_given=ea is not None,
                        warnings=tuple(warnings), tol=tol)


def _excited(found, each: np.ndarray, total: float, tol: Tolerances) -> tuple:
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


def _stiffness_solve(C, f, lengths, ea, mech, dofs: FreeDofs) -> np.ndarray:
    """Tensions by the stiffness method, on the complement of the mechanisms ``mech``."""
    from .nullspace import _ordering

    N = C.shape[1]
    w = (np.ones(C.shape[0]) if ea is None else np.asarray(ea, float)) / lengths
    K = (C.T @ sp.diags(w) @ C).tocsc()
    diag = K.diagonal()
    typical = float(np.median(diag[diag > 0]))
    M, _ = np.linalg.qr(mech) if mech.shape[1] else (mech, None)

    def project(X):
        return X - M @ (M.T @ X) if M.shape[1] else X

    perm = _ordering(K, dofs.joint_of())
    inv = np.empty_like(perm)
    inv[perm] = np.arange(N)
    Kp = K[perm][:, perm].tocsc()
    if M.shape[1]:
        Kp = (Kp + _SHIFT * typical * sp.identity(N, format="csc")).tocsc()
    lu = spla.splu(Kp, permc_spec="NATURAL", diag_pivot_thresh=0.0,
                   options=dict(SymmetricMode=True))
    target = project(f)
    scale = np.maximum(np.linalg.norm(target, axis=0), np.finfo(float).tiny)
    u = np.zeros_like(target)
    r = target
    for _ in range(_STEPS):
        u += project(lu.solve(np.asfortranarray(r[perm]))[inv])
        r = target - K @ u
        if np.all(np.linalg.norm(r, axis=0) <= _REFINED * scale):
            break
    return w[:, None] * (C @ u)
