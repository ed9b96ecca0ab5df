"""The stability audit: counts, mechanisms and states of self-stress of a frame."""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp

from ..errors import InternalError
from ..model import Frame
from ..modeset import ModeSet
from ..naming import natural_key
from ..results import MORE_STATES, SOFT_NOT_ASKED, AuditResult, RankGap
from ..tolerances import DEFAULT, DISPLAY, Tolerances
from .blocks import project_sparse
from .equilibrium import (compatibility_matrix, free_dofs, joint_displacement_map,
                          rigid_body_motions, to_joint_displacements)
from .modes import KINDS, describe_modes, local_basis, mode_context, order_rigid
from .nullspace import (canonical_basis, canonical_split, decide_rank, stress_basis,
                        stress_seeds)
from .oneway import one_way_test
from .prestress import (declared_prestress_test, prestress_test, prestress_test_sparse,
                        product_forces, product_forces_sparse)
from .redundancy import key_members, probes, redundancy_shares
from .soft import soft_modes, typical_stiffness
from .threads import dense_steps_single_threaded

__all__ = ["audit"]


@dense_steps_single_threaded
def audit(frame: Frame, *, self_stress_cap: int = 16, method: str = "auto",
          redundancy: bool | None = None, soft: bool | None = None,
          tol: Tolerances = DEFAULT) -> AuditResult:
    """Audit the stability of a pin-jointed frame.

    The mechanisms are the joint displacements that stretch no member, the
    null space of the compatibility matrix ``C``; the states of self-stress
    are the member forces in equilibrium with no load, the null space of the
    equilibrium matrix ``C.T`` (Pellegrino & Calladine [1]_).  Their numbers
    obey the extended Maxwell rule (Calladine [2]_) exactly::

        mechanisms - self_stress_states = dimension * joints - restraints - members

    The mechanisms are split into the rigid-body motions of the whole frame
    that the supports permit and the internal mechanisms, which change its
    shape; the internal ones are given in a local basis, classified and
    described (:mod:`spaceframe.analysis.modes`) and tested for stiffening by
    prestress (:mod:`spaceframe.analysis.prestress`).  Key members and
    redundancy shares come from :mod:`spaceframe.analysis.redundancy`.  Members
    tagged ``carries = tension`` or ``compression`` act one way only; whether
    the frame is held with them so is decided by
    :mod:`spaceframe.analysis.oneway` (Roth & Whiteley [3]_); the counts stay
    those of the frame with every member two-way.

    Parameters
    ----------
    frame : Frame
    self_stress_cap : int, keyword-only
        Compute at most this many states of self-stress (default 16, one block
        solve in the sparse engine); their
        number is always exact.  Frames with more states report the first
        ``self_stress_cap`` and say so.
    method : {"auto", "dense", "sparse"}, keyword-only
        The rank engine (see :mod:`spaceframe.analysis.nullspace`).
    redundancy : bool or None, keyword-only
        Compute every member's redundancy share.  None (default): where it is
        cheap (the dense engine, or at most ``tol.limits.redundancy_auto``
        free coordinates, one solve each); True: always up to
        ``tol.limits.redundancy_max`` free coordinates; False: never.
    soft : bool or None, keyword-only
        Look for soft modes (:mod:`spaceframe.analysis.soft`).  None
        (default): for frames of at most ``tol.limits.soft_auto`` free
        coordinates (the search is a second factorisation); True: always;
        False: never.  Where they were not looked for,
        ``AuditResult.soft_skipped`` says why.
    tol : Tolerances, keyword-only
        ``tol.rank`` is the relative singular value threshold of a compact
        frame; a slender one is judged with ``tol.rank_threshold(scale)`` and
        ``tol.one_way_threshold(scale)``, ``scale`` its
        :meth:`~spaceframe.model.Frame.bending_scale` (recorded in
        ``gap.scale``); every other test and limit of the audit is a field of
        it too.

    Returns
    -------
    AuditResult

    Raises
    ------
    InternalError
        When the engine breaks down or cannot reach a consistent decision
        (not the input's fault); its ``partial`` holds the counts known by
        then (joints, members, restraints, free coordinates, the Maxwell
        number, and the rank and null-space sizes once decided).

    Examples
    --------
    Two collinear bars between two pins, in the plane: one mechanism (the
    middle joint moves sideways) and one state of self-stress.

    >>> from spaceframe import Frame, audit
    >>> f = Frame.from_arrays([[0, 0], [1, 0], [2, 0]], [[0, 1], [1, 2]],
    ...                       supports={0: "pin", 2: "pin"})
    >>> r = audit(f)
    >>> r.mechanisms, r.self_stress_states, r.maxwell
    (1, 1, 0)

    Notes
    -----
    The cost is that of :func:`spaceframe.analysis.nullspace.decide_rank`.

    References
    ----------
    .. [1] S. Pellegrino and C. R. Calladine, "Matrix analysis of statically
       and kinematically indeterminate frameworks", Int. J. Solids Struct.
       22(4), 409-428, 1986.
    .. [2] C. R. Calladine, "Buckminster Fuller's 'tensegrity' structures and
       Clerk Maxwell's rules for the construction of stiff frames", Int. J.
       Solids Struct. 14(2), 161-172, 1978.
    .. [3] B. Roth and W. Whiteley, "Tensegrity frameworks", Trans. Amer. Math.
       Soc. 265(2), 419-446, 1981.
    """
    d = frame.dimension
    dofs = free_dofs(frame, tol=tol)
    C = compatibility_matrix(frame, dofs)
    known = {"joints": frame.n_joints, "members": frame.n_members,
             "restraints": frame.n_restraints, "free_coordinates": C.shape[1],
             "maxwell": frame.n_members + frame.n_restraints - d * frame.n_joints}
    scale = frame.bending_scale()  # a slender frame is judged with lower thresholds
    try:
        decision = decide_rank(C, joint_of=dofs.joint_of(), self_stress_cap=self_stress_cap,
                               method=method, scale=scale, stress_later=True, tol=tol)
    except InternalError as exc:
        exc.partial = {**known, **exc.partial}
        raise
    k = decision.count
    known.update(rank=decision.rank, mechanisms=k,
                 self_stress_states=decision.self_stress_count, engine=decision.method)
    rigid = rigid_body_motions(frame, dofs, tol=tol)
    # many local mechanisms: their canonical basis block by block, never dense N x k
    split = decision.local and C.shape[1] * k > tol.limits.split_basis
    # many modes, or a basis made block by block: held as sparse rows, never as a dense
    # (k, n, d) array (Limits.dense_modes)
    held_sparse = split or k * frame.n_joints * d > tol.limits.dense_modes
    if split:
        E, piv = canonical_split(decision.local_modes, decision.mechanisms, dofs.joint_of(),
                                 tol=tol)
        _check_rigid_inside(decision.mechanisms, rigid, tol, known, local=decision.local_modes)
        internal, rigid = local_basis(E, rigid, dofs.joint_of(), piv=piv, tol=tol)
    else:
        whole = decision.all_mechanisms()
        _check_rigid_inside(whole, rigid, tol, known)
        internal, rigid = local_basis(whole, rigid, dofs.joint_of(), tol=tol)
    rigid = order_rigid(rigid, dofs, frame.coords, tol=tol)
    ni = internal.shape[1]
    modes = _sparse_modes(internal, rigid, dofs, frame) if held_sparse else \
        _dense_modes(internal, rigid, dofs, frame)
    hints = ("internal",) * ni + ("rigid-body",) * rigid.shape[1]
    words = mode_context(frame, tol=tol)      # shared with the soft modes' descriptions
    info = describe_modes(frame, modes, hints, tol=tol, context=words)
    # group the internal modes by kind (local kinds first), fewest joints first within a kind
    order = sorted(range(ni), key=lambda i: (KINDS.index(info[i].kind), len(info[i].joints),
                                             natural_key(info[i].joints[0]), i))
    order += list(range(ni, k))
    modes, info = modes.take(order), tuple(info[i] for i in order)
    inner = modes.take(np.arange(ni))
    # the states of self-stress, the key-member probes and the product forces projected in
    # the same solves: the probes, then the seeds of the states (sparse engine), then the rest
    seeds = 0 if decision.self_stress is not None else \
        min(self_stress_cap, decision.self_stress_count)
    extra = np.hstack([probes(frame.n_members), stress_seeds(frame.n_members, seeds)])
    if ni > tol.limits.block_prestress:
        # product forces sparse, projected block by block (a one-joint mode's reach only
        # its joint's members, and the block they lie in), not one solve each
        force = product_forces_sparse(frame, inner if inner.sparse else
                                      ModeSet(inner.matrix(), inner.item))
        projected, both = project_sparse(C, force, decision.project, decision.threshold,
                                         dense=extra, tol=tol)
        pre = prestress_test_sparse(force, projected, overwrite_P=True, tol=tol)
    else:
        dense_inner = inner.dense()
        force = product_forces(frame, dense_inner)
        both = decision.project(np.hstack([extra, force]))
        pre = prestress_test(frame, dense_inner, decision.project, projected=both[:, 2 + seeds:],
                             tol=tol, forces=force)
        pre = type(pre)(pre.orders, ModeSet(pre.prestress, (frame.n_members,)), pre.stable,
                        pre.certificate)
    decision.project.release()          # its work arrays: the projections are made
    states = decision.self_stress if decision.self_stress is not None else \
        stress_basis(both[:, 2:2 + seeds])
    declared = declared_prestress_test(frame, C, dofs, inner,
                                       rigid_body_modes=rigid.shape[1], tol=tol)
    one_way = one_way_test(frame, C, dofs, mechanisms=k, scale=scale, tol=tol,
                           prestress=declared.forces if declared and declared.holds else None)
    key = key_members(frame.n_members, decision.self_stress_count, decision.project,
                      projected=both[:, :2], tol=tol)
    stress = canonical_basis(states, tol=tol)[:, :self_stress_cap].T
    q = stress.shape[0]
    ea = frame.member_properties.get("EA")
    if soft is None:  # a second factorisation: by default for frames up to a size
        soft = C.shape[1] <= tol.limits.soft_auto
        soft_skipped = None if soft else (f"{C.shape[1]:,} free coordinates, more than the "
                                          f"{tol.limits.soft_auto:,} a default audit looks at")
    else:
        soft_skipped = None if soft else SOFT_NOT_ASKED
    if not soft:
        sm = None
    elif split:
        # the local mechanisms carry no stiffness: the same soft modes on C restricted
        # to their complement, with the whole frame's typical stiffness
        T = decision.rest
        rest_joint = dofs.joint_of()[T.indices[T.indptr[:-1]]]
        sm = soft_modes((C @ T).tocsr(), frame.lengths(), np.asarray(T.T @ decision.mechanisms),
                        rest_joint, ea=ea, perm=getattr(decision.project, "perm", None),
                        typical=typical_stiffness(C, frame.lengths(), ea), tol=tol)
        sm = type(sm)(sm.ratios, np.asarray(T @ sm.vectors), sm.checked)
    else:
        sm = soft_modes(C, frame.lengths(), decision.all_mechanisms(), dofs.joint_of(), ea=ea,
                        perm=decision.ordering, tol=tol)
    soft_u = to_joint_displacements(sm.vectors, dofs) if sm and sm.vectors.shape[1] else \
        np.zeros((0, frame.n_joints, d))
    if len(soft_u):
        soft_u /= np.linalg.norm(soft_u, axis=2).max(axis=1)[:, None, None]
    # a soft mode worth a designer's attention is a local weakness, not the frame's
    # global flexibility: keep those moving at most a quarter of the joints (the joints a
    # description names, counted before describing only those)
    size = np.linalg.norm(soft_u, axis=2)
    moving = np.sum(size > DISPLAY.moving * size.max(axis=1, initial=0.0)[:, None], axis=1)
    local = np.flatnonzero(moving <= max(3, frame.n_joints // 4))
    soft_u = soft_u[local]
    soft_info = describe_modes(frame, soft_u, ("soft",) * len(soft_u), tol=tol, context=words)
    soft_ratio = sm.ratios[local] if sm else np.zeros(0)
    if redundancy is None:
        redundancy = decision.method == "dense" or C.shape[1] <= tol.limits.redundancy_auto
    shares = redundancy_shares(decision.self_stress_count, decision.project) \
        if redundancy else None

    members, restraints, joints = frame.n_members, frame.n_restraints, frame.n_joints
    mechanisms = k
    s = decision.self_stress_count
    if mechanisms - s != d * joints - restraints - members:  # pragma: no cover - by construction
        raise InternalError("the extended Maxwell rule does not hold between the counts",
                            stage="counts", partial=known)

    gap, warnings = _gap(decision, scale, tol)
    if q < s and self_stress_cap:
        warnings.append(f"{s} states of self-stress: the first {q} are listed "
                        f"({MORE_STATES})")
    return AuditResult(
        frame=frame, dimension=d, joints=joints, members=members, restraints=restraints,
        maxwell=members + restraints - d * joints, rank=decision.rank, mechanisms=mechanisms,
        rigid_body_modes=rigid.shape[1], internal_mechanisms=ni,
        self_stress_states=s, modes=modes,
        mode_kinds=tuple(i.kind for i in info), mode_info=info,
        mode_orders=pre.orders + (None,) * rigid.shape[1], stiffening=pre.prestress,
        prestress_stable=pre.stable, prestress_certificate=pre.certificate,
        self_stress_forces=stress, self_stress_complete=(q == s), gap=gap,
        key_members=tuple(frame.member_ids[i] for i in key), redundancy=shares,
        soft_ratios=soft_ratio, soft_displacements=soft_u,
        soft_info=soft_info, soft_skipped=soft_skipped, one_way=one_way,
        declared_prestress=declared, warnings=tuple(warnings))


def _dense_modes(internal: np.ndarray, rigid: np.ndarray, dofs, frame: Frame) -> ModeSet:
    """The modes as one dense ``(k, n, d)`` array, each scaled to a largest joint movement of 1."""
    mech = np.hstack([internal, rigid])
    if not mech.shape[1]:
        return ModeSet.empty((frame.n_joints, frame.dimension))
    modes = to_joint_displacements(mech, dofs)
    modes /= np.linalg.norm(modes, axis=2).max(axis=1)[:, None, None]
    return ModeSet(modes, modes.shape[1:])


def _sparse_modes(internal, rigid: np.ndarray, dofs, frame: Frame) -> ModeSet:
    """:func:`_dense_modes` held as sparse rows: cost O(d nnz), no dense ``(k, n, d)`` array."""
    n, d = frame.n_joints, frame.dimension
    mech = sp.hstack([sp.csc_matrix(internal), sp.csc_matrix(rigid)]).tocsc()
    U = sp.csr_matrix((joint_displacement_map(dofs) @ mech).T)
    U.eliminate_zeros()
    # each mode's largest joint movement, from its squared entries summed by joint
    sq = U.multiply(U).tocsr()
    group = sp.csr_matrix((np.ones(n * d), (np.arange(n * d), np.arange(n * d) // d)),
                          shape=(n * d, n))
    top = np.sqrt(np.asarray((sq @ group).max(axis=1).toarray()).ravel())
    U = sp.csr_matrix(sp.diags(1.0 / np.where(top > 0, top, 1.0)) @ U)
    return ModeSet(U, (n, d))


def _check_rigid_inside(mech: np.ndarray, rigid: np.ndarray, tol: Tolerances,
                        known: dict, local=None) -> None:
    """The permitted rigid-body motions must lie in the mechanism space found.

    ``local`` (sparse, orthonormal and orthogonal to ``mech``), where given, is the rest
    of that space.
    """
    k, r = mech.shape[1] + (0 if local is None else local.shape[1]), rigid.shape[1]
    off = rigid - mech @ (mech.T @ rigid)
    if local is not None:
        off -= local @ (local.T @ rigid)
    if r and (r > k or np.linalg.norm(off) > tol.rigid_inside * np.sqrt(r)):
        raise InternalError("a rigid-body motion permitted by the supports was not found among "
                            "the mechanisms; the dense engine (method='dense') may do for a "
                            "small frame", stage="mechanism basis",
                            partial={**known, "rigid_body_motions": r})


def _gap(decision, scale, tol: Tolerances):
    s_max = decision.s_max
    rel = (lambda v: None if v is None or s_max == 0 else v / s_max)
    lz, sn = rel(decision.largest_zero), rel(decision.smallest_nonzero)
    used = tol.rank if decision.tolerance is None else decision.tolerance
    ratio = None
    if lz is not None and sn is not None:
        ratio = float("inf") if lz == 0 else sn / lz
    warnings = []
    narrow = False
    if ratio is not None and ratio < tol.narrow_gap:
        narrow = True
        warnings.append(f"the rank decision is not clear-cut: the smallest singular value judged "
                        f"non-zero is only {ratio:.3g} times the largest judged zero; the frame "
                        f"may be nearly a mechanism, or nearly stiff")
    for label, v in (("judged zero", lz), ("judged non-zero", sn)):
        if v is not None and used / tol.near_threshold < v < used * tol.near_threshold:
            narrow = True
            warnings.append(f"a singular value {label} ({v:.3g} of the largest) lies within a "
                            f"factor {tol.near_threshold:g} of the threshold {used:.3g}")
    notes, slender_narrow = _slender_notes(lz, sn, used, scale, tol)
    warnings += notes
    narrow |= slender_narrow
    return RankGap(tolerance=used, largest_zero=lz, smallest_nonzero=sn, ratio=ratio,
                   method=decision.method, narrow=narrow, shift=decision.shift,
                   scale=scale, factorisation=decision.factorisation), warnings


def _slender_notes(lz, sn, used, scale, tol: Tolerances):
    """What a slender frame's lower threshold (``Tolerances.rank_threshold``) means for its verdict.

    Returns the notes and whether the decision is not clear-cut: the threshold
    is at ``rank_floor`` (the frame is too slender for the margin it should
    have) and a singular value on either side lies within ``slender_margin``
    of it.
    """
    if used >= tol.rank:
        return [], False
    notes, narrow = [], False
    floor = scale / tol.slender_margin < tol.rank_floor
    near = [(label, v) for label, v in (("judged zero", lz), ("judged non-zero", sn))
            if v is not None and used / tol.slender_margin < v < used * tol.slender_margin]
    if floor and near:
        narrow = True
        label, v = near[-1]
        notes.append(f"the rank decision is not clear-cut: the frame is so slender (bending scale "
                     f"{scale:.3g}) that its genuine stiffness comes close to the lowest "
                     f"threshold the engine resolves, {tol.rank_floor:g}: a singular value "
                     f"{label} ({v:.3g} of the largest) lies within a factor "
                     f"{tol.slender_margin:g} of it")
    if sn is not None and sn <= tol.rank:
        notes.append(f"the frame is slender (bending scale {scale:.3g}): its smallest singular "
                     f"value judged non-zero ({sn:.3g} of the largest) is below the threshold "
                     f"{tol.rank:g} of a compact frame and was judged with {used:.3g}")
    return notes, narrow
