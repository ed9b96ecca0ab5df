"""The member forces and reactions of a frame under its load cases, and their JSON form.

:class:`ForcesResult` is frozen; views (text, CSV, JSON, pictures) only read it.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .model import Frame
from .tolerances import DEFAULT, Tolerances

__all__ = ["ForcesResult", "ExcitedMechanism", "Envelope", "FORCES_CAUTION", "STIFFNESS_NOTE"]

#: The caution every forces verdict carries.
FORCES_CAUTION = ("Forces come from an idealised pin-jointed, first-order model. Member and "
                  "connection design, buckling and the load values are for a competent engineer "
                  "under the codes in force.")

#: Said wherever a case was solved by the stiffness method.
STIFFNESS_NOTE = ("The frame is statically indeterminate: its forces depend on the members' "
                  "relative axial stiffness (EA), {ea}.")


@dataclass(frozen=True)
class ExcitedMechanism:
    """A mechanism a load acts on.

    Attributes
    ----------
    mode : int
        Its number in the audit's list (from 1).
    kind, description : str
        As the audit words it.
    fraction : float
        ``|m . f| / ||f||`` for the mode ``m`` (unit length) and the load
        ``f``: the share of the load acting on this mechanism.
    """

    mode: int
    kind: str
    description: str
    fraction: float


@dataclass(frozen=True, eq=False)
class Envelope:
    """The largest tension and compression of each member over the carried cases.

    Attributes
    ----------
    tension : (m,) float
        Largest force >= 0 (0 where never in tension).
    tension_case : (m,) int
        Index into the result's cases of the governing case, -1 where none.
    compression : (m,) float
        Most negative force <= 0 (0 where never in compression).
    compression_case : (m,) int
    """

    tension: np.ndarray
    tension_case: np.ndarray
    compression: np.ndarray
    compression_case: np.ndarray


@dataclass(frozen=True, eq=False)
class ForcesResult:
    """Member forces and support reactions of each load case.

    Attributes
    ----------
    frame : Frame
    force_units : str
    names, kinds : tuple of str, length q
        Each case's name and kind (``"case"``, ``"self-weight"``,
        ``"combination"``, ``"notional"``).
    loads : (q, n, d) float
        The joint loads applied.
    carried : (q,) bool
        False where the load acts on a mechanism.
    member_forces : (q, m) float
        Axial force of every member, tension positive; NaN in cases not
        carried (there are no such forces).
    reaction_joints : (r,) int
        The supported joints, ascending.
    reactions : (q, r, d) float
        Force each support exerts on the frame, global axes (NaN where not
        carried); with the loads they sum to zero.
    mechanism_fraction : (q,) float
        ``||P f|| / ||f||``: the share of each load on the mechanisms.
    excited : tuple of tuple of ExcitedMechanism
        For each case, the mechanisms it acts on, largest share first.
    methods : tuple of str
        ``"equilibrium"`` (statically determinate: equilibrium alone) or
        ``"stiffness"`` (indeterminate: stiffness method with EA/L), or
        ``"none"`` for a case not carried.
    residual : (q,) float
        ``||C.T t - f|| / ||f||`` of each carried case.
    slack : tuple of tuple of str
        For each case, tension-only members that went slack (empty without
        one-way members).
    mechanisms, self_stress_states : int
        The audit's counts.
    ea_given : bool
        Whether the model gave ``[properties.members.EA]``.
    warnings : tuple of str
    tol : Tolerances
    """

    frame: Frame
    force_units: str
    names: tuple[str, ...]
    kinds: tuple[str, ...]
    loads: np.ndarray
    carried: np.ndarray
    member_forces: np.ndarray
    reaction_joints: np.ndarray
    reactions: np.ndarray
    mechanism_fraction: np.ndarray
    excited: tuple
    methods: tuple[str, ...]
    residual: np.ndarray
    slack: tuple
    mechanisms: int
    self_stress_states: int
    ea_given: bool
    warnings: tuple[str, ...] = ()
    tol: Tolerances = DEFAULT

    @property
    def all_carried(self) -> bool:
        return bool(np.all(self.carried))

    @property
    def statically_determinate(self) -> bool:
        """No state of self-stress: forces follow from equilibrium alone."""
        return self.self_stress_states == 0

    def shown_forces(self, case: int) -> np.ndarray:
        """Case ``case``'s member forces with round-off (see ``tol.zero_force``) set to 0."""
        t = self.member_forces[case].copy()
        if self.carried[case] and t.size:
            t[np.abs(t) <= self.tol.zero_force * np.max(np.abs(t))] = 0.0
        return t

    def shown_reactions(self, case: int) -> np.ndarray:
        """Case ``case``'s reactions ``(r, d)`` with round-off set to 0."""
        r = self.reactions[case].copy()
        if self.carried[case] and r.size:
            r[np.abs(r) <= self.tol.zero_force * np.max(np.abs(r))] = 0.0
        return r

    def envelope(self) -> Envelope:
        """Largest tension and compression of each member over the carried cases.

        Notes
        -----
        Cost O(q m).
        """
        m = self.frame.n_members
        keep = np.flatnonzero(self.carried)
        if not keep.size or not m:
            zeros, none = np.zeros(m), np.full(m, -1)
            return Envelope(zeros, none, zeros.copy(), none.copy())
        T = np.stack([self.shown_forces(i) for i in keep])       # (q', m)
        hi, lo = T.argmax(axis=0), T.argmin(axis=0)
        cols = np.arange(m)
        tension, compression = np.maximum(T[hi, cols], 0), np.minimum(T[lo, cols], 0)
        return Envelope(tension, np.where(tension > 0, keep[hi], -1),
                        compression, np.where(compression < 0, keep[lo], -1))

    def to_dict(self) -> dict:
        """The JSON document of ``spaceframe forces --json``."""
        f = self.frame
        cases = []
        for i, name in enumerate(self.names):
            entry = {"name": name, "kind": self.kinds[i], "carried": bool(self.carried[i]),
                     "method": self.methods[i],
                     "total_load": [float(v) for v in self.loads[i].sum(axis=0)],
                     "load_on_mechanisms": float(self.mechanism_fraction[i]),
                     "excited_mechanisms": [
                         {"mode": e.mode, "kind": e.kind, "description": e.description,
                          "fraction": e.fraction} for e in self.excited[i]],
                     "member_forces": None, "reactions": None,
                     "slack_members": list(self.slack[i])}
            if self.carried[i]:
                entry["member_forces"] = dict(zip(f.member_ids, self.shown_forces(i).tolist()))
                entry["reactions"] = {f.joint_ids[j]: row for j, row in
                                      zip(self.reaction_joints.tolist(),
                                          self.shown_reactions(i).tolist())}
                entry["residual"] = float(self.residual[i])
            cases.append(entry)
        env = self.envelope()
        names = self.names
        envelope = {mid: {"tension": float(env.tension[k]),
                          "tension_case": names[env.tension_case[k]]
                          if env.tension_case[k] >= 0 else None,
                          "compression": float(env.compression[k]),
                          "compression_case": names[env.compression_case[k]]
                          if env.compression_case[k] >= 0 else None}
                    for k, mid in enumerate(f.member_ids)}
        return {"model": f.name, "force_units": self.force_units, "units": f.units,
                "all_carried": self.all_carried,
                "statically_determinate": self.statically_determinate,
                "mechanisms": self.mechanisms, "self_stress_states": self.self_stress_states,
                "cases": cases, "envelope": envelope, "warnings": list(self.warnings),
                "caution": FORCES_CAUTION}
