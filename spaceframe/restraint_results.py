"""Chords, their restraint points and unrestrained lengths, and restraint forces: the result.

:class:`RestraintResult` is frozen; views (text, JSON, the report) only read
it.  :mod:`spaceframe.analysis.restraints` makes it.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .force_results import ForcesResult
from .model import Frame
from .tolerances import DEFAULT, DISPLAY, Tolerances

__all__ = ["Chord", "Unrestrained", "RestraintResult", "LATERAL", "RESTRAINT_CAUTION",
           "REASONS"]

#: The two lateral directions of a chord, in the order the results give them.
LATERAL = ("out_of_plane", "in_plane")

#: Why a chord joint is not a restraint point in a direction: nothing at the
#: joint reaches that way (``untied``), or its ties reach that way but lead to
#: joints that move with it (``tied``).
REASONS = ("untied", "tied")

#: The caution every restraint verdict carries.
RESTRAINT_CAUTION = (
    "Restraint points and unrestrained lengths come from an idealised pin-jointed model: a "
    "joint counts as restrained when no mechanism of that model moves it sideways, whatever "
    "the stiffness of what holds it. Buckling lengths, the restraint force fraction and the "
    "design of chords, bracing and connections are for a competent engineer under the codes "
    "in force.")


@dataclass(frozen=True)
class Unrestrained:
    """A chord joint that is not a restraint point in one lateral direction, and why.

    Attributes
    ----------
    joint : int
        The joint's index.
    reason : str
        One of :data:`REASONS`.
    members : tuple of int
        For ``tied``: the members at the joint that reach along the direction
        (their far ends move with it).  Empty for ``untied``.
    """

    joint: int
    reason: str
    members: tuple[int, ...] = ()


@dataclass(frozen=True, eq=False)
class Chord:
    """One chord: a maximal straight chain of members through joints.

    Attributes
    ----------
    joints : (p,) int
        Its joints in order along it (``p >= 3``).
    members : (p - 1,) int
        Its members in order: member ``i`` joins joints ``i`` and ``i + 1``.
    positions : (p,) float
        Distance of each joint from the first, along the chord, in the
        model's units.
    axis : (d,) float
        Unit vector from the first joint towards the last.
    directions : dict of str to (d,) float
        The unit lateral directions by name (:data:`LATERAL`); a plane frame
        analysed in its plane has ``in_plane`` only.
    plane : str
        Where the directions come from: ``"frame"`` (the plane of the frame
        of a frame of frames the chord lies in, :attr:`frame_label`),
        ``"principal"`` (the principal axes of the whole frame's joints) or
        ``"plane frame"`` (a model with dimension 2).
    frame_label : str
        The ``frame`` joint tag of its joints (``""`` when not one frame).
    restrained : dict of str to (p,) bool
        By direction: whether each joint is a restraint point.
    lengths : dict of str to (s,) float
        By direction: the unrestrained lengths in order along the chord (the
        distances between consecutive restraint points; a free end adds the
        length from it to the nearest restraint point; no restraint point:
        the whole chord).
    ends_held : dict of str to (bool, bool)
        By direction: whether the first and the last joint are restraint points.
    unrestrained : dict of str to tuple of Unrestrained
        By direction: the joints that are not restraint points, and why.
    compression : (q,) float
        The largest compression in the chord's members (a positive number; 0
        when none is compressed) in each load case of the result; NaN for a
        case not carried.
    """

    joints: np.ndarray
    members: np.ndarray
    positions: np.ndarray
    axis: np.ndarray
    directions: dict
    plane: str
    frame_label: str
    restrained: dict
    lengths: dict
    ends_held: dict
    unrestrained: dict
    compression: np.ndarray

    @property
    def length(self) -> float:
        """The chord's whole length, in the model's units."""
        return float(self.positions[-1])

    def longest(self, direction: str) -> float | None:
        """The longest unrestrained length in ``direction``; None where it has none."""
        got = self.lengths.get(direction)
        return None if got is None else float(np.max(got))

    def member_lengths(self, direction: str) -> np.ndarray:
        """``(p - 1,) float``: for each of its members, the unrestrained length it lies in."""
        pos, ok = self.positions, self.restrained[direction]
        cuts = np.unique(np.concatenate([[pos[0]], pos[ok], [pos[-1]]]))
        mid = (pos[1:] + pos[:-1]) / 2
        at = np.clip(np.searchsorted(cuts, mid) - 1, 0, max(len(cuts) - 2, 0))
        seg = np.diff(cuts) if len(cuts) > 1 else np.array([pos[-1]])
        return seg[at]

    def points(self, direction: str) -> np.ndarray:
        """Joint indices of its restraint points in ``direction``, in order along it."""
        return self.joints[self.restrained[direction]]


@dataclass(frozen=True, eq=False)
class RestraintResult:
    """Chords, restraint points, unrestrained lengths and restraint forces of one frame.

    Attributes
    ----------
    frame : Frame
    rule : str or None
        The chord rule given (``"role=chord"``), None when chords were found
        among every member.
    chords : tuple of Chord
        In order of their first member.
    mechanisms : int
        The pin-jointed frame's independent mechanisms (rigid-body ones included).
    held_pin_jointed : bool
        No mechanism at all.
    held_with_continuous_chords : bool
        Every mechanism is a lateral motion of chord joints that lie between
        restraint points of their chord in that direction: a chord continuous
        through its joints holds them by its bending.
    not_held : tuple of (int, tuple of int)
        The mechanisms (0-based, as the audit lists them) that are not such a
        motion, each with the joints that move outside it.
    case_names : tuple of str
        The load cases whose chord compressions are given (empty without loads).
    forces : ForcesResult or None
        The member forces of those cases.
    force_units : str
    fraction : float or None
        The restraint force fraction asked for.
    restraint_loads : (n, d) float or None
        The restraint-force case: at each restraint point (out of plane; in
        plane for a plane frame) of a compressed chord, ``fraction`` times the
        chord's largest compression there over the cases, along the lateral
        direction.
    restraint_forces : ForcesResult or None
        That case solved (one case, :data:`RESTRAINT_CASE`).
    tol : Tolerances
    """

    frame: Frame
    rule: str | None
    chords: tuple
    mechanisms: int
    held_pin_jointed: bool
    held_with_continuous_chords: bool
    not_held: tuple
    case_names: tuple = ()
    forces: ForcesResult | None = None
    force_units: str = ""
    fraction: float | None = None
    restraint_loads: np.ndarray | None = None
    restraint_forces: ForcesResult | None = None
    tol: Tolerances = DEFAULT

    def chord_id(self, i: int) -> str:
        """The chord's label in the results: ``C1``, ``C2``, ... in the order of :attr:`chords`."""
        return f"C{i + 1}"

    def order_longest(self) -> list[int]:
        """Chord indices, longest unrestrained length first (out of plane, then in plane)."""
        def key(i):
            c = self.chords[i]
            return tuple(-(c.longest(d) or 0.0) for d in LATERAL) + (i,)
        return sorted(range(len(self.chords)), key=key)

    def longest(self, direction: str) -> tuple[float, int] | None:
        """The longest unrestrained length in ``direction`` and its chord; None without one."""
        best = None
        for i, c in enumerate(self.chords):
            v = c.longest(direction)
            if v is not None and (best is None or v > best[0]):
                best = (v, i)
        return best

    def summary(self) -> dict:
        """The verdict as data (``audit --continuous-chords --json``): held pin-jointed, held
        with continuous chords, the mechanisms that are not, the longest lengths."""
        ids = self.frame.joint_ids
        longest = {}
        for d in LATERAL:
            got = self.longest(d)
            longest[d] = None if got is None else {
                "length": round(got[0], DISPLAY.decimals), "chord": self.chord_id(got[1]),
                "joints": [ids[self.chords[got[1]].joints[0]], ids[self.chords[got[1]].joints[-1]]]}
        return {"chord_rule": self.rule, "chords": len(self.chords),
                "held_pin_jointed": self.held_pin_jointed,
                "held_with_continuous_chords": self.held_with_continuous_chords,
                "not_held_by_chords": [{"mode": i + 1, "joints": [ids[j] for j in js]}
                                       for i, js in self.not_held],
                "longest": longest}

    def to_dict(self) -> dict:
        """The JSON document of ``spaceframe restraints --json``."""
        f = self.frame
        ids, mids = f.joint_ids, f.member_ids
        r = DISPLAY.decimals
        chords = []
        for i, c in enumerate(self.chords):
            entry = {
                "id": self.chord_id(i),
                "joints": [ids[j] for j in c.joints.tolist()],
                "members": [mids[k] for k in c.members.tolist()],
                "length": round(c.length, r),
                "plane": c.plane,
                "frame": c.frame_label,
                "directions": {d: [round(float(v), r) + 0.0 for v in c.directions[d]]
                               for d in LATERAL if d in c.directions},
                "restrained": {d: ([ids[j] for j in c.points(d).tolist()]
                                   if d in c.directions else None) for d in LATERAL},
                "lengths": {d: ([round(float(v), r) for v in c.lengths[d]]
                                if d in c.directions else None) for d in LATERAL},
                "longest": {d: (round(c.longest(d), r) if d in c.directions else None)
                            for d in LATERAL},
                "ends_held": {d: (list(c.ends_held[d]) if d in c.directions else None)
                              for d in LATERAL},
                "unrestrained": {d: ([{"joint": ids[u.joint], "reason": u.reason,
                                       "members": [mids[k] for k in u.members]}
                                      for u in c.unrestrained[d]]
                                     if d in c.directions else None) for d in LATERAL},
                "compression": {name: (None if not np.isfinite(v) else round(float(v), r))
                                for name, v in zip(self.case_names, c.compression.tolist())},
            }
            chords.append(entry)
        return {
            "model": f.name, "source": f.source, "units": f.units,
            "force_units": self.force_units or None,
            "chord_rule": self.rule,
            "mechanisms": self.mechanisms,
            "held_pin_jointed": self.held_pin_jointed,
            "held_with_continuous_chords": self.held_with_continuous_chords,
            "not_held_by_chords": [{"mode": i + 1, "joints": [ids[j] for j in js]}
                                   for i, js in self.not_held],
            "cases": list(self.case_names),
            "chords": chords,
            "restraint_forces": self._forces_dict(),
            "caution": RESTRAINT_CAUTION,
        }

    def _forces_dict(self) -> dict | None:
        if self.fraction is None:
            return None
        f, r = self.frame, DISPLAY.decimals
        F = self.restraint_loads
        applied = {f.joint_ids[j]: [round(float(v), r) for v in F[j]]
                   for j in np.flatnonzero(np.any(F != 0, axis=1)).tolist()}
        out = {"fraction": self.fraction, "cases": list(self.case_names), "applied": applied,
               "carried": None, "members": None, "reactions": None}
        s = self.restraint_forces
        if s is not None:
            out["carried"] = bool(s.carried[0])
            if s.carried[0]:
                t = s.shown_forces(0)
                out["members"] = {f.member_ids[k]: round(float(t[k]), r)
                                  for k in np.flatnonzero(t).tolist()}
                R = s.shown_reactions(0)
                out["reactions"] = {f.joint_ids[j]: [round(float(v), r) for v in row]
                                    for j, row in zip(s.reaction_joints.tolist(), R)
                                    if np.any(row != 0)}
        return out
