"""The forces the proposed braces, ties and restraints carry.

The braced frame is solved by :func:`spaceframe.analysis.forces.forces`
(one-way members go slack there) under:

- the model's load cases (and its own notional variants), and a notional
  horizontal load in each of +x, -x, +y, -y (+x, -x in a plane frame) of
  every case with vertical load, :data:`spaceframe.loads.NOTIONAL_FRACTION`
  of it at each joint, when the model declares no ``[notional]`` rule
  (:meth:`spaceframe.loads.LoadSet.applied`);
- with no load case in the model, a vertical load of 1 force unit at every
  joint that is not held in every direction, with those notional variants
  only: forces per unit of vertical load, to scale.

The fraction is an assumption: the local code sets it.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np

from ...loads import NOTIONAL_FRACTION, LoadCase, LoadSet
from ...model import Frame
from ...tolerances import DEFAULT, Tolerances

__all__ = ["ProposalForces", "proposal_forces", "UNIT_CASE"]

#: The vertical case used when the model has no load case (1 force unit per joint).
UNIT_CASE = "unit vertical"


@dataclass(frozen=True, eq=False)
class ProposalForces:
    """Forces in the added members and restraints, case by case.

    Attributes
    ----------
    names : tuple of str, length q
        The cases solved.
    kinds : tuple of str, length q
        As in :class:`spaceframe.loads.AppliedLoads`.
    carried : (q,) bool
        Whether the braced frame carries each case.
    force_units : str
    source : str
        ``"model"`` (the model's cases) or ``"unit"`` (no case in the model:
        :data:`UNIT_CASE` and its notional variants).
    notional : float or None
        The notional fraction added here (None: the model's own rule, or no
        case has vertical load).
    members : (q, a) float
        Force in each added member (tension positive; NaN where not carried).
    slack : (q, a) bool
        The added member goes slack in that case (a rod that would be
        compressed, left out of the solve).
    restraints : (q, r) float
        Each added restraint's reaction along its direction (NaN where not
        carried).
    """

    names: tuple[str, ...]
    kinds: tuple[str, ...]
    carried: np.ndarray
    force_units: str
    source: str
    notional: float | None
    members: np.ndarray
    slack: np.ndarray
    restraints: np.ndarray


def _load_set(frame: Frame):
    """The load set to solve and ``(source, notional fraction added, case names)``."""
    loads = frame.loads
    if loads is not None and (loads.cases or loads.self_weight):
        if loads.notional is not None:
            return loads, "model", None, None
        return dataclasses.replace(loads, notional=NOTIONAL_FRACTION), "model", \
            NOTIONAL_FRACTION, None
    d = frame.dimension
    held = np.bincount(frame.restraint_joint, minlength=frame.n_joints) >= d
    free = [frame.joint_ids[j] for j in np.flatnonzero(~held)]
    down = np.zeros((len(free), d))
    down[:, d - 1] = -1.0
    units = loads.force_units if loads is not None else "kN"
    unit = LoadSet(cases=(LoadCase(UNIT_CASE, tuple(free), down),), notional=NOTIONAL_FRACTION,
                   force_units=units)
    names = tuple(n for n in unit.applied(frame).names if n != UNIT_CASE)
    return unit, "unit", NOTIONAL_FRACTION, names


def proposal_forces(braced: Frame, frame: Frame, *,
                    tol: Tolerances = DEFAULT) -> ProposalForces | None:
    """Forces in the members and restraints ``braced`` adds to ``frame``.

    Parameters
    ----------
    braced : Frame
        ``frame`` with the added members after its own and the added
        restraint rows after its own (:func:`~.result.braced_frame`).
    frame : Frame
        The frame as given (its loads are used).
    tol : Tolerances, keyword-only

    Returns
    -------
    ProposalForces or None
        None when nothing was added or the frame has no joint to load.

    Notes
    -----
    One call of :func:`spaceframe.analysis.forces.forces` on the braced
    frame: an audit without soft modes and one factorisation for every case;
    with one-way members one more of each per member that goes slack.
    """
    from ..forces import forces

    a = braced.n_members - frame.n_members
    r = braced.n_restraints - frame.n_restraints
    if a + r == 0:
        return None
    loads, source, fraction, names = _load_set(frame)
    if names == ():
        return None
    if source == "model" and fraction is not None and not any(
            k == "notional" for k in loads.applied(braced).kinds):
        fraction = None                    # no case has vertical load to take a share of
    got = forces(braced, names, loads=loads, tol=tol)
    q = len(got.names)
    ids = braced.member_ids[frame.n_members:]
    slack = np.array([[mid in set(got.slack[i]) for mid in ids] for i in range(q)],
                     dtype=bool).reshape(q, a)
    members = got.member_forces[:, frame.n_members:]
    support = {int(j): k for k, j in enumerate(got.reaction_joints)}
    rows = range(frame.n_restraints, braced.n_restraints)
    R = np.array([[float(got.reactions[i, support[int(braced.restraint_joint[k])]]
                         @ braced.restraint_dir[k]) for k in rows] for i in range(q)]
                 ).reshape(q, r)
    return ProposalForces(names=got.names, kinds=got.kinds, carried=got.carried.copy(),
                          force_units=got.force_units, source=source, notional=fraction,
                          members=members.copy(), slack=slack, restraints=R)
