"""The result of a stability audit, and its JSON form.

:class:`AuditResult` is frozen; views (text, JSON, pictures) only read it.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .jsonstream import Lazy, chunks, materialise
from .model import Frame
from .modeset import ModeSet
from .tolerances import DISPLAY

__all__ = ["AuditResult", "RankGap", "CAUTION", "MORE_STATES", "SOFT_NOT_ASKED"]

#: ``AuditResult.soft_skipped`` when the caller switched the soft-mode search off
SOFT_NOT_ASKED = "not asked for"
#: how a warning says more states of self-stress can be had (a view may name its option)
MORE_STATES = "a larger self_stress_cap computes more"

#: The caution every verdict carries.
CAUTION = ("This is a check of an idealised pin-jointed model only: it does not size members or "
           "connections. Results must be checked by a competent engineer against the codes in "
           "force where the frame will be built.")


@dataclass(frozen=True)
class RankGap:
    """How clear-cut the rank decision was, relative to the largest singular value.

    Attributes
    ----------
    tolerance : float
        The relative threshold used: ``s <= tolerance * s_max`` is zero.
    largest_zero : float or None
        Largest singular value judged zero, divided by ``s_max``.
    smallest_nonzero : float or None
        Smallest singular value judged non-zero, divided by ``s_max``.
    ratio : float or None
        ``smallest_nonzero / largest_zero`` (None unless both exist; infinite
        when the largest zero is exactly 0).
    method : str
        The engine: ``"dense"`` or ``"sparse"``.
    narrow : bool
        True when the decision rests on a narrow margin (see
        :class:`spaceframe.tolerances.Tolerances`).
    shift : float or None
        The sparse engine's final shift ``tau`` of the inertia count, divided
        by ``s_max**2``: ``tolerance**2`` unless the factorisation had to move
        it, and then ``sqrt(shift)`` is the relative threshold the count used.
        None for the dense engine (and where no count was needed).
    scale : float or None
        The frame's bending scale (:meth:`spaceframe.model.Frame.bending_scale`),
        from which ``tolerance`` was set
        (:meth:`spaceframe.tolerances.Tolerances.rank_threshold`); None when
        the frame has none (a line of joints).
    factorisation : str or None
        The sparse engine's factorisation, ``"PARDISO"`` or ``"SuperLU"``
        (None for the dense engine).  Not part of :meth:`AuditResult.to_dict`:
        it says how, not what, and the document stays the same with either.
    """

    tolerance: float
    largest_zero: float | None
    smallest_nonzero: float | None
    ratio: float | None
    method: str
    narrow: bool
    shift: float | None = None
    scale: float | None = None
    factorisation: str | None = None


@dataclass(frozen=True, eq=False)
class AuditResult:
    """Counts, modes and states of one frame.

    Attributes
    ----------
    frame : Frame
        The frame audited.
    dimension, joints, members, restraints : int
    maxwell : int
        ``members + restraints - dimension * joints`` (Maxwell's counting rule).
    rank : int
        Rank of the equilibrium matrix.
    mechanisms : int
        Independent inextensional modes, ``dimension * joints - restraints - rank``.
    rigid_body_modes : int
        Rigid-body motions of the whole frame that the supports permit.
    internal_mechanisms : int
        ``mechanisms - rigid_body_modes``.
    self_stress_states : int
        ``members - rank``, always counted exactly.
    modes : ModeSet of (joints, dimension) float
        A basis of the mechanisms: internal mechanisms first, then the
        rigid-body modes; each mode scaled so its largest joint movement is 1.
        Held sparse when large (``Limits.dense_modes``): read one mode with
        ``modes[i]``, its moving joints with ``modes.support(i)``, all of them
        with ``modes.matrix()``; :attr:`mode_displacements` is the dense
        ``(mechanisms, joints, dimension)`` array.
    mode_kinds : tuple of str
        The kind of each mode (:data:`spaceframe.analysis.modes.KINDS`).
    mode_info : tuple of ModeInfo
        Joints, members, direction, frames and a one-sentence description of
        each mode.
    mode_orders : tuple of str or None
        For each internal mechanism, whether prestress stiffens it
        (:mod:`spaceframe.analysis.prestress`); None for rigid-body modes.
    stiffening : ModeSet of (members,) float, or None
        A stiffening state of self-stress for each internal mechanism (zeros
        where none exists), held as the modes are; :attr:`mode_prestress` is
        the dense ``(internal_mechanisms, members)`` array.
    prestress_stable : bool or None
        One state of self-stress stiffens every internal mechanism at once
        (True), provably none can (False), or not determined (None; also with
        no internal mechanism).
    prestress_certificate : (members,) float or None
        That state, where found.
    self_stress_forces : (q, members) float
        ``q`` independent states of self-stress (tension positive), each
        scaled so its largest force is 1 in magnitude.
    self_stress_complete : bool
        True when ``q == self_stress_states``; otherwise a cap applied.
    gap : RankGap
    key_members : tuple of str
        Members that carry no force in any state of self-stress: losing any
        one of them leaves a mechanism.
    redundancy : (members,) float or None
        Redundancy share of each member (diagonal of the projector onto the
        self-stress space; sums to ``self_stress_states``); None when not
        computed.
    soft_ratios : (q,) float
        Soft modes (:mod:`spaceframe.analysis.soft`): stiffness over the
        frame's typical stiffness, ascending: local patterns below 0.1 %.
    soft_displacements : (q, joints, dimension) float
    soft_info : tuple of ModeInfo
    soft_skipped : str or None
        Why soft modes were not looked for ("not asked for", or the frame's
        size above ``Limits.soft_auto`` in a default audit); None when they were.
    one_way : OneWayResult or None
        For a frame with one-way members (member tag ``carries``): whether it
        is held with them acting one way only, the members that go slack and
        the motion (:mod:`spaceframe.analysis.oneway`); None without any.
    declared_prestress : DeclaredPrestress or None
        The prestress the model declares (``[prestress]``) tested on the
        internal mechanisms; None when it declares none.  Only then can a
        frame with mechanisms be ``stable``.
    warnings : tuple of str
    """

    frame: Frame
    dimension: int
    joints: int
    members: int
    restraints: int
    maxwell: int
    rank: int
    mechanisms: int
    rigid_body_modes: int
    internal_mechanisms: int
    self_stress_states: int
    modes: ModeSet
    mode_kinds: tuple[str, ...]
    self_stress_forces: np.ndarray
    self_stress_complete: bool
    gap: RankGap
    mode_info: tuple = ()
    mode_orders: tuple = ()
    stiffening: ModeSet | None = None
    prestress_stable: bool | None = None
    prestress_certificate: np.ndarray | None = None
    key_members: tuple[str, ...] = ()
    redundancy: np.ndarray | None = None
    soft_ratios: np.ndarray | None = None
    soft_displacements: np.ndarray | None = None
    soft_info: tuple = ()
    soft_skipped: str | None = None
    one_way: object = None
    declared_prestress: object = None
    warnings: tuple[str, ...] = field(default_factory=tuple)

    @property
    def stable(self) -> bool:
        """Held: no mechanism (or only those a declared prestress holds), one-way members held.

        A mechanism counts as held only when the model declares the prestress
        it is built and kept in and that prestress stiffens every internal
        mechanism (with no rigid-body motion); a prestress the frame merely
        could carry never does.
        """
        if self.one_way is not None and not self.one_way.held:
            return False
        if self.mechanisms == 0:
            return True
        return self.declared_prestress is not None and self.declared_prestress.holds

    @property
    def rigid(self) -> bool:
        """No internal mechanism: the frame holds its shape (it may still move as one body)."""
        return self.internal_mechanisms == 0

    @property
    def mode_displacements(self) -> np.ndarray:
        """The mechanisms as one dense ``(mechanisms, joints, dimension)`` array.

        Held dense for a small result, this is the array itself; held sparse it
        is expanded on each call (``mechanisms * joints * dimension`` floats),
        so a caller that may meet a large result reads :attr:`modes` instead.
        """
        return self.modes.dense()

    @property
    def mode_prestress(self) -> np.ndarray | None:
        """The stiffening states as one dense ``(internal_mechanisms, members)`` array."""
        return None if self.stiffening is None else self.stiffening.dense()

    def mode_joints(self, i: int, *, floor: float = DISPLAY.floor) -> list[tuple[str, np.ndarray]]:
        """Joints that move in mode ``i``, largest movement first, with their vectors."""
        index, u = self.modes.support(i)
        size = np.linalg.norm(u, axis=1)
        order = np.argsort(-size, kind="stable")
        return [(self.frame.joint_ids[index[j]], u[j]) for j in order if size[j] > floor]

    def state_members(self, i: int, *, floor: float = DISPLAY.floor) -> list[tuple[str, float]]:
        """Members that carry state ``i``, largest force first, with their forces."""
        t = self.self_stress_forces[i]
        order = np.argsort(-np.abs(t), kind="stable")
        return [(self.frame.member_ids[k], float(t[k])) for k in order if abs(t[k]) > floor]

    def to_dict(self) -> dict:
        """The JSON document of the audit (plain Python types, deterministic)."""
        return materialise(self.document())

    def json_chunks(self, *, indent: int = 1):
        """The text of ``json.dumps(self.to_dict(), indent=indent)``, a piece at a time.

        The mechanisms are written one at a time, so a frame with many of them
        is never held as a whole document (:mod:`spaceframe.jsonstream`).
        """
        return chunks(self.document(), indent=indent, allow_nan=False)

    def _mode_entry(self, i: int) -> dict:
        """Mechanism ``i`` as its ``mechanism_modes`` entry."""
        f = self.frame
        entry = _motion_entry(f, self.mode_kinds[i], self.mode_info[i] if i < len(self.mode_info)
                              else None, *self.modes.support(i))
        order = self.mode_orders[i] if i < len(self.mode_orders) else None
        entry["order"] = order
        if order is not None and self.stiffening is not None and self.stiffening.any(i):
            index, t = self.stiffening.support(i)
            entry["prestress"] = {f.member_ids[k]: _num(v)
                                  for k, v in zip(index, t) if abs(v) > DISPLAY.floor}
        entry["displacements"] = entry.pop("displacements")
        return entry

    def document(self) -> dict:
        """The JSON document with its mechanisms as a :class:`~spaceframe.jsonstream.Lazy` list.

        :meth:`to_dict` is this made plain, :meth:`json_chunks` its text.
        """
        f = self.frame
        modes = Lazy(len(self.mode_kinds),
                     lambda: (self._mode_entry(i) for i in range(len(self.mode_kinds))))
        states = []
        for t in self.self_stress_forces:
            carrying = np.flatnonzero(np.abs(t) > DISPLAY.floor)
            states.append({"forces": {f.member_ids[k]: _num(t[k]) for k in carrying}})
        g = self.gap
        return {
            "name": f.name,
            "source": f.source,
            "units": f.units,
            "dimension": self.dimension,
            "joints": self.joints,
            "members": self.members,
            "restraints": self.restraints,
            "maxwell": self.maxwell,
            "rank": self.rank,
            "mechanisms": self.mechanisms,
            "rigid_body_modes": self.rigid_body_modes,
            "internal_mechanisms": self.internal_mechanisms,
            "self_stress_states": self.self_stress_states,
            "stable": self.stable,
            "rigid": self.rigid,
            "mechanism_modes": modes,
            "self_stress_modes": states,
            "self_stress_modes_complete": self.self_stress_complete,
            "self_stress_modes_cap": None if self.self_stress_complete else len(states),
            "soft_modes": [
                {"stiffness_ratio": float(f"{ratio:.4g}"), "kind": info.kind,
                 "description": info.description, "joints": list(info.joints),
                 "displacements": {f.joint_ids[j]: [_num(x) for x in u[j]]
                                   for j in np.flatnonzero(np.linalg.norm(u, axis=1)
                                                           > DISPLAY.floor)}}
                for ratio, info, u in zip(
                    self.soft_ratios if self.soft_ratios is not None else (),
                    self.soft_info,
                    self.soft_displacements if self.soft_displacements is not None else ())],
            "soft_modes_skipped": self.soft_skipped,
            "one_way": self._one_way_dict(),
            "declared_prestress": None if self.declared_prestress is None else {
                "forces": {f.member_ids[k]: float(v) for k, v in
                           enumerate(self.declared_prestress.forces) if v},
                "holds": self.declared_prestress.holds,
                "stiffened_modes": [int(i) + 1 for i in
                                    np.flatnonzero(self.declared_prestress.stiffens)]},
            "prestress_stable": self.prestress_stable,
            "key_members": list(self.key_members),
            "redundancy": None if self.redundancy is None else
            {f.member_ids[k]: _num(v) for k, v in enumerate(self.redundancy)},
            "rank_decision": {
                "method": g.method,
                "tolerance": g.tolerance,
                "largest_zero": g.largest_zero,
                "smallest_nonzero": g.smallest_nonzero,
                "ratio": None if g.ratio is None or not np.isfinite(g.ratio) else g.ratio,
                "narrow": g.narrow,
                "shift": None if g.shift is None else float(f"{g.shift:.6g}"),
                "bending_scale": None if g.scale is None else float(f"{g.scale:.6g}"),
            },
            "warnings": list(self.warnings),
            "caution": CAUTION,
        }

    def _one_way_dict(self) -> dict | None:
        """The ``one_way`` record: None without one-way members."""
        w = self.one_way
        if w is None:
            return None
        motion = None if w.motion is None else \
            _motion_entry(self.frame, w.info.kind if w.info else "other", w.info,
                          np.arange(len(w.motion)), w.motion)
        return {"members": {"tension": list(w.tension), "compression": list(w.compression)},
                "held": w.held,
                "margin": None if w.margin is None else float(f"{w.margin:.6g}"),
                "slack": list(w.slack),
                "motion": motion}


def _motion_entry(f: Frame, kind: str, info, index: np.ndarray, u: np.ndarray) -> dict:
    """A joint movement and its ModeInfo as a ``mechanism_modes`` entry.

    ``u`` (s, d) is the movement of joints ``index`` (ascending); the others do not move.
    """
    entry = {"kind": kind}
    if info is not None:
        entry.update({
            "description": info.description,
            "joints": list(info.joints),
            "members": list(info.members),
            "direction": [_num(x) for x in info.direction],
            "frames": list(info.frames),
        })
        if info.lines:
            entry["lines"] = list(info.lines)
        if info.pivots:
            entry["pivots"] = list(info.pivots)
    moving = np.flatnonzero(np.linalg.norm(u, axis=1) > DISPLAY.floor)
    entry["displacements"] = {f.joint_ids[index[j]]: [_num(x) for x in u[j]] for j in moving}
    return entry


def _num(x: float) -> float:
    """Round for output: ``DISPLAY.decimals`` decimals on values scaled to at most 1."""
    v = round(float(x), DISPLAY.decimals)
    return 0.0 if v == 0 else v
