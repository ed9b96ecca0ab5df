"""Load cases of a frame: joint loads, combinations, self-weight and notional loads.

A :class:`LoadSet` holds what the model file says, as written: named load
cases of joint forces, combinations of them with factors, a self-weight rule
and a notional horizontal load.  :meth:`LoadSet.applied` turns it into one
array of joint loads per case for a given frame: the cases as written, the
self-weight case, the combinations, then the notional variants.  Joints are
named by id, so a load set stays valid when a frame is copied or renumbered.

Forces are in ``force_units`` (a label: results scale with the loads and do
not depend on the unit of length).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

import numpy as np

from .errors import ModelError
from .suggest import did_you_mean

__all__ = ["LoadCase", "Combination", "LoadSet", "AppliedLoads", "FORCE_UNITS", "SELF_WEIGHT",
           "NOTIONAL_FRACTION"]

#: Units of force a model may declare (a label only: results scale with the loads).
FORCE_UNITS = ("N", "kN", "MN", "lbf", "kip")

#: The notional fraction used where the model gives none (a bracing proposal's forces):
#: 1/200 of the vertical load at each joint, the order of the initial sway imperfection
#: common practice uses for frames (recalled, not taken from any one code).  An
#: assumption: the local code sets the value.
NOTIONAL_FRACTION = 1 / 200

#: The name of the self-weight case.
SELF_WEIGHT = "self_weight"


@dataclass(frozen=True, eq=False)
class LoadCase:
    """One load case: forces at named joints.

    Attributes
    ----------
    name : str
    joints : tuple of str, length p
        The loaded joints' ids.
    forces : (p, dimension) float
        The force at each, global axes, in the load set's ``force_units``.
    """

    name: str
    joints: tuple[str, ...]
    forces: np.ndarray

    def __post_init__(self):
        forces = np.array(self.forces, dtype=float).reshape(len(self.joints), -1)
        forces.setflags(write=False)
        object.__setattr__(self, "joints", tuple(self.joints))
        object.__setattr__(self, "forces", forces)


@dataclass(frozen=True)
class Combination:
    """A combination of load cases: ``sum(factor * case)``.

    Attributes
    ----------
    name : str
    factors : tuple of (str, float)
        Case name and factor, in the order written.
    """

    name: str
    factors: tuple[tuple[str, float], ...]


@dataclass(frozen=True, eq=False)
class AppliedLoads:
    """The joint loads of every case, ready for analysis.

    Attributes
    ----------
    names : tuple of str, length q
    kinds : tuple of str, length q
        ``"case"``, ``"self-weight"``, ``"combination"`` or ``"notional"``.
    forces : (q, n, dimension) float
        The load at every joint of the frame in every case.
    """

    names: tuple[str, ...]
    kinds: tuple[str, ...]
    forces: np.ndarray


@dataclass(frozen=True, eq=False)
class LoadSet:
    """The loads of a model, as written in its file.

    Attributes
    ----------
    cases : tuple of LoadCase
    combinations : tuple of Combination
        Each names cases of ``cases`` (or :data:`SELF_WEIGHT`).
    self_weight : float or None
        Weight per unit length of every member (force units per length unit),
        shared half to each end joint, acting in -z (-y in a plane frame).
        It makes the case :data:`SELF_WEIGHT`.
    notional : float or None
        A horizontal load at each joint equal to this fraction of the vertical
        load there, in each of +x, -x, +y and -y (+x and -x in a plane frame),
        added to each case named in ``notional_cases`` as extra cases named
        ``"<case> notional +x"`` and so on.  The value is the user's (local
        codes set it).
    notional_cases : tuple of str or None
        The cases and combinations that get notional variants; None: all.
    force_units : str
        One of :data:`FORCE_UNITS`.
    """

    cases: tuple[LoadCase, ...] = ()
    combinations: tuple[Combination, ...] = ()
    self_weight: float | None = None
    notional: float | None = None
    notional_cases: tuple[str, ...] | None = None
    force_units: str = "kN"

    def __post_init__(self):
        object.__setattr__(self, "cases", tuple(self.cases))
        object.__setattr__(self, "combinations", tuple(self.combinations))
        if self.notional_cases is not None:
            object.__setattr__(self, "notional_cases", tuple(self.notional_cases))

    def primary_names(self) -> tuple[str, ...]:
        """Cases a combination may name: the cases written, then the self-weight case."""
        return tuple(c.name for c in self.cases) + ((SELF_WEIGHT,) if self.self_weight else ())

    def applied(self, frame, cases: Sequence[str] | None = None) -> AppliedLoads:
        """Joint loads of every case on ``frame`` (or of the named ``cases``).

        Parameters
        ----------
        frame : Frame
        cases : sequence of str, optional
            Case names; default every case, in the order: the cases as
            written, the self-weight case, the combinations, the notional
            variants (of cases with some vertical load).

        Returns
        -------
        AppliedLoads

        Raises
        ------
        ModelError
            For a load on a joint the frame does not have, forces of the wrong
            dimension, a combination naming an unknown case, or an unknown
            name in ``cases``.

        Notes
        -----
        Cost O(q n d) for ``q`` cases; the self-weight adds O(m).
        """
        n, d = frame.n_joints, frame.dimension
        index = dict(zip(frame.joint_ids, range(n)))
        primary: dict[str, np.ndarray] = {}
        for case in self.cases:
            F = np.zeros((n, d))
            if case.forces.shape[1:] != (d,) and len(case.joints):
                raise ModelError(f"load case {case.name!r} gives {case.forces.shape[1]} force "
                                 f"components but the frame is {d}-dimensional; give {d}")
            for jid, f in zip(case.joints, case.forces):
                j = index.get(jid)
                if j is None:
                    raise ModelError(f"load case {case.name!r} loads joint {jid!r}, which the "
                                     f"frame does not have; correct the id"
                                     f"{did_you_mean(jid, index)}", item=jid)
                F[j] += f
            primary[case.name] = F
        if self.self_weight:
            F = np.zeros((n, d))
            half = 0.5 * self.self_weight * frame.lengths()
            for end in (0, 1):
                np.add.at(F[:, d - 1], frame.ends[:, end], -half)
            primary[SELF_WEIGHT] = F
        table = {name: ("self-weight" if name == SELF_WEIGHT else "case", F)
                 for name, F in primary.items()}
        for combo in self.combinations:
            F = np.zeros((n, d))
            for name, factor in combo.factors:
                if name not in primary:
                    raise ModelError(f"combination {combo.name!r} names case {name!r}, which is "
                                     f"not a load case; correct the name"
                                     f"{did_you_mean(name, primary)}", item=name)
                F += factor * primary[name]
            table[combo.name] = ("combination", F)
        if self.notional:
            chosen = list(table) if self.notional_cases is None else self.notional_cases
            for name in chosen:
                if name not in table:
                    raise ModelError(f"[notional] names case {name!r}, which is not a load case "
                                     f"or combination{did_you_mean(name, table)}", item=name)
                F = table[name][1]
                if not np.any(F[:, d - 1]):
                    continue
                push = self.notional * np.abs(F[:, d - 1])
                for axis, sign in _notional_directions(d):
                    G = F.copy()
                    G[:, axis] += sign * push
                    table[_notional_name(name, sign, axis)] = ("notional", G)
        names = tuple(table) if cases is None else tuple(cases)
        for name in names:
            if name not in table:
                raise ModelError(f"no load case {name!r}; the cases are "
                                 f"{', '.join(map(repr, table)) or 'none'}"
                                 f"{did_you_mean(name, table)}", item=name)
        forces = np.stack([table[k][1] for k in names]) if names else np.zeros((0, n, d))
        return AppliedLoads(names=names, kinds=tuple(table[k][0] for k in names), forces=forces)


def _notional_directions(d: int) -> list[tuple[int, float]]:
    """(axis, sign) of each notional direction: +x, -x (and +y, -y in space)."""
    axes = (0, 1) if d == 3 else (0,)
    return [(axis, sign) for axis in axes for sign in (1.0, -1.0)]


def _notional_name(case: str, sign: float, axis: int) -> str:
    return f"{case} notional {'+' if sign > 0 else '-'}{'xy'[axis]}"
