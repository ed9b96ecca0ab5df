"""The outcome of a bracing recommendation, as data: the choice, the braced frame, what is left.

Wording (where a brace is, what would remove a mode that is left, the notes)
is the views' job: :mod:`spaceframe.views.bracing_document` turns a
:class:`BracingResult` into the JSON document and the sentences of the text.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ... import edit
from ...model import CARRIES_TAG, Frame
from ...results import AuditResult
from ...tolerances import DEFAULT
from .candidates import CandidateSet
from .frames import bay_between, panel_bay, planar_id

__all__ = ["BracingResult", "Remedy", "LateralRestraint", "MemberRules", "RobustInfo",
           "braced_frame", "ACTS", "BRACING_CAUTION"]

#: A candidate "acts on" a mode when the mode stretches it by more than this fraction of
#: the mode's largest joint movement (modes are scaled so that it is 1): ``Tolerances.acts``.
ACTS = DEFAULT.acts
#: The caution every bracing recommendation carries, after the audit's own.
BRACING_CAUTION = ("Bracing advice is a starting point for a competent engineer, who must check "
                   "member sizes, connections, load paths and the local codes before anything "
                   "is built.")


@dataclass(frozen=True)
class Remedy:
    """What kind of candidate would remove a mode the chosen set leaves.

    Attributes
    ----------
    mode : int
        0-based index of the mode in the re-audit (``BracingResult.after``).
    kind : str
        ``"restraint"``: a rigid-body mode, which only a restraint removes;
        ``"member"``: a member from ``joint`` to ``other`` (of ``length``)
        would act on it, though no panel bounds that pair;
        ``"direction"``: no nearby joint will do; ``joint`` needs a member or
        restraint along ``direction``, to something that does not move with it.
    joint : int
        The joint that moves most in the mode (-1 for ``"restraint"``).
    other : int
        The far end of the member (``"member"`` only; else -1).
    length : float
        That member's length, in the frame's units (0 otherwise).
    direction : tuple of float
        The unit movement of ``joint`` (``"direction"`` only; else empty).
    """

    mode: int
    kind: str
    joint: int = -1
    other: int = -1
    length: float = 0.0
    direction: tuple[float, ...] = ()


@dataclass(frozen=True, eq=False)
class LateralRestraint:
    """A lone planar frame in space: the joints that need restraint out of its plane.

    Every member of such a frame lies in one plane and nothing ties it to
    another frame, so no candidate member can hold a joint out of that
    plane: only something stiff beside it can (a deck, plan bracing, a
    braced structure), given as restraints at attachable joints.

    Attributes
    ----------
    joints : tuple of int
        Joints that move out of the plane in some mode left.
    normal : (3,) float
        Unit normal of the plane (largest component positive).
    centre : (3,) float
        The joints' centroid.
    """

    joints: tuple[int, ...]
    normal: np.ndarray
    centre: np.ndarray


@dataclass(frozen=True)
class MemberRules:
    """What the member rules (:mod:`.rules`) did to the greedy choice.

    Attributes
    ----------
    one_way : bool
        The one-way test chose and re-audited the proposal (``tension_only``,
        or the frame has one-way members of its own).
    ties : tuple of int
        Tie candidates added because a chosen tie-panel diagonal needs them.
    repaired : tuple of int
        Candidates the one-way repair added (a motion that slackens one-way
        members was found without them), in the order added.
    held : bool
        The repair ended with the frame held under the one-way test (True
        when it did not run).
    key : tuple of bool
        For each chosen item (``BracingResult.chosen`` order): losing it
        brings a mechanism back, or a motion that slackens one-way members.
    """

    one_way: bool = False
    ties: tuple[int, ...] = ()
    repaired: tuple[int, ...] = ()
    held: bool = True
    key: tuple[bool, ...] = ()


@dataclass(frozen=True)
class RobustInfo:
    """How a robust proposal was found (:mod:`.robust`).

    Attributes
    ----------
    method : str
        ``"exact"`` (proven the cheapest such set), ``"greedy"``
        (augmentation of the least-cost basis) or ``"repair"`` (with one-way
        members: either of those, then candidates added by the one-way
        repair, :mod:`.rules`).
    searched : int
        Subsets the exact search looked at.
    least_cost : float
        The members' cost of the least-cost basis (the default proposal
        before its member rules), for the ratio.
    uncoverable : tuple of int
        Candidates of that basis no other candidate can stand in for: key in
        every proposal.
    parts : int
        Independent parts (connected components of the matroid) searched.
    exact_parts : int
        Those the exact search solved.
    """

    method: str
    searched: int
    least_cost: float
    uncoverable: tuple[int, ...] = ()
    parts: int = 1
    exact_parts: int = 0


@dataclass(frozen=True, eq=False)
class BracingResult:
    """A bracing recommendation and the audit of the braced frame.

    Attributes
    ----------
    frame : Frame
        The frame as given.
    before : AuditResult
        Its audit; modes are numbered 1, 2... in its order.
    candidates : CandidateSet
    chosen : tuple of int
        Indices into ``candidates`` of the members and restraints to add, in
        the order of the greedy pass (tension-only: both diagonals of each
        chosen panel).
    acts_on : tuple of tuple of int
        For each chosen item, the 1-based numbers of the modes of ``before``
        it acts on (``tol.acts``, :data:`ACTS` by default).
    braced : Frame
        The frame with them (:func:`braced_frame`).
    after : AuditResult
        The audit of ``braced`` by the core engine.
    alternatives : tuple of (tuple of int, float)
        Other sets of the same size that remove as much, with their total
        cost, cheapest first.
    mode_options : tuple of tuple of int
        For each mode of ``before``, the cheapest single candidates that act
        on it.
    remaining : tuple of Remedy
        For each mode of ``after``: what kind of candidate would remove it.
    tension_only : bool
    restraints_used : bool
        Whether restraint candidates were gathered.
    expected_after : int
        The mechanisms the selection leaves by its own count (the re-audit
        should find as many).
    lateral : LateralRestraint or None
        For a lone planar frame with modes out of its plane left.
    layout : LayoutChoice or None
        How the choice was made under layout rules that are no matroid
        constraint (:func:`spaceframe.analysis.bracing.layout.select`); None
        when the greedy pass alone made it.  What each filter removed is in
        ``candidates.filters``.
    rules : MemberRules
        Needed ties, the one-way repair, which added items are key.
    robust : RobustInfo or None
        For a robust proposal: how it was found.
    proposal_forces : ProposalForces or None
        The forces in the added members and restraints (:mod:`.forces`).
    """

    frame: Frame
    before: AuditResult
    candidates: CandidateSet
    chosen: tuple[int, ...]
    acts_on: tuple
    braced: Frame
    after: AuditResult
    alternatives: tuple = ()
    mode_options: tuple = ()
    remaining: tuple[Remedy, ...] = ()
    tension_only: bool = False
    restraints_used: bool = False
    expected_after: int = 0
    lateral: LateralRestraint | None = None
    rules: MemberRules = MemberRules()
    robust: RobustInfo | None = None
    proposal_forces: object = None
    layout: object = None

    @property
    def cost(self) -> float:
        """The added members' total cost (length, or the user's weights)."""
        return float(sum(self.candidates.cost[i] for i in self.members_added))

    @property
    def members_added(self) -> list[int]:
        return [i for i in self.chosen if self.candidates.joint[i] < 0]

    @property
    def restraints_added(self) -> list[int]:
        return [i for i in self.chosen if self.candidates.joint[i] >= 0]

    @property
    def added_ids(self) -> tuple[str, ...]:
        """Ids of the added members in ``braced``, in the order of :attr:`members_added`."""
        return self.braced.member_ids[self.frame.n_members:]

    @property
    def total_length(self) -> float:
        return float(sum(self.candidates.length[i] for i in self.members_added))


def braced_frame(frame: Frame, cand: CandidateSet, chosen, *, rods=()) -> Frame:
    """The frame with the chosen candidate members and restraints (through :mod:`spaceframe.edit`).

    New braces are named ``BR1``, ``BR2``... (skipping ids in use), and
    tagged ``role`` and ``group`` ``"brace"``; a tie is named as the
    extrusion names one, ``B<bay>.<planar joint>`` (``BR<n>`` when that id
    is in use), and tagged ``"tie"``.  Member tags the frame has are
    extended: ``frame`` where both ends are in one frame, ``bay`` from the
    panel's sides or the tie's frames, ``""`` for any other.  Every member
    property (EA) is kept; the new members get the median of the frame's
    values (:func:`spaceframe.edit.add_members`).  Joint tags, supports and
    source lines are kept; restraint candidates become restraint rows after
    the frame's own.  The candidates in ``rods`` are tagged ``carries =
    tension`` (:data:`spaceframe.model.CARRIES_TAG`): rods, cables or guys
    that act one way only; the frame's own ``carries`` labels are kept.
    """
    chosen = list(chosen)
    rods = set(rods)
    mem = [i for i in chosen if cand.joint[i] < 0]
    res = [i for i in chosen if cand.joint[i] >= 0]
    used = set(frame.member_ids)
    jframe = frame.joint_tags.get("frame")
    ids, k = [], 1
    for i in mem:
        a, b = cand.ends[i]
        if cand.origin[i] == "tie":
            name = f"B{bay_between(jframe, a, b)}.{planar_id(frame, a, jframe[a])}"
            if name not in used:
                ids.append(name)
                used.add(name)
                continue
        while f"BR{k}" in used:
            k += 1
        ids.append(f"BR{k}")
        used.add(f"BR{k}")
    member_at = {(min(a, b), max(a, b)): k for k, (a, b) in enumerate(frame.ends.tolist())}
    tags = {}
    keys = [*frame.member_tags, "role"] + ([CARRIES_TAG] if rods else [])
    for key in dict.fromkeys(keys):
        labels = []
        for i in mem:
            a, b = cand.ends[i]
            if key == CARRIES_TAG:
                labels.append("tension" if i in rods else "")
            elif key in ("role", "group"):
                labels.append("tie" if cand.origin[i] == "tie" else "brace")
            elif key == "frame":
                labels.append(jframe[a] if jframe is not None and jframe[a] == jframe[b] else "")
            elif key == "bay":
                labels.append(bay_between(jframe, a, b) if cand.origin[i] == "tie" else
                              panel_bay(frame, cand.panel[i], member_at))
            else:
                labels.append("")
        tags[key] = labels
    braced = edit.add_members(frame, ids, cand.ends[mem].reshape(-1, 2), tags=tags)
    return edit.add_restraints(braced, cand.joint[res], cand.direction[res])
