"""Frames of a frame of frames: their order, the planar ids of their joints, the bays between.

An extruded model (:func:`spaceframe.extrude.extrude`) tags every joint with
the planar ``frame`` it belongs to and every tie or brace with its ``bay``.
These helpers read those tags for the candidate search, the braced frame's
new tags and the views' wording.  All return data (labels, indices), no
sentences.
"""

from __future__ import annotations

from collections import Counter, defaultdict

import numpy as np

from ...model import Frame
from ...tolerances import DEFAULT

__all__ = ["frame_labels", "planar_id", "frame_offset", "bay_between", "panel_bay",
           "missing_ties", "tie_level", "bay_labels", "bay_key", "candidate_bay", "joint_bays"]


def frame_labels(frame: Frame) -> list[tuple[str, np.ndarray]]:
    """The frames of a frame of frames, in order along the building, and their joints.

    Labels are the ``frame`` joint tag (empty: a joint of no frame); numeric
    labels go in numeric order, others in order of first appearance.

    Returns
    -------
    list of (label, (j,) int)
        Empty for a frame without a ``frame`` joint tag.
    """
    jf = frame.joint_tags.get("frame")
    if jf is None:
        return []
    joints = defaultdict(list)
    for j, label in enumerate(jf):
        if label:
            joints[label].append(j)
    labels = list(joints)
    if all(label.isdigit() for label in labels):
        labels.sort(key=int)
    return [(label, np.array(joints[label], dtype=np.int64)) for label in labels]


def planar_id(frame: Frame, j: int, label: str | None = None) -> str:
    """The id of joint ``j`` in its planar frame: ``F3.U2`` of frame 3 is ``U2``.

    ``label`` is the joint's frame label (default: its ``frame`` tag).
    """
    jid = frame.joint_ids[j]
    if label is None:
        jf = frame.joint_tags.get("frame")
        label = jf[j] if jf is not None else ""
    prefix = f"F{label}."
    return jid[len(prefix):] if jid.startswith(prefix) else jid


def frame_offset(frame: Frame, A, B, la: str, lb: str) -> np.ndarray:
    """The translation from frame ``la`` (joints ``A``) to the next, ``lb`` (joints ``B``).

    The median difference of joints with the same planar id, or, when the
    frames share none, the difference of the frames' centroids.
    """
    X = frame.coords
    ib = {planar_id(frame, j, lb): j for j in B.tolist()}
    pairs = [(a, ib[p]) for a in A.tolist() if (p := planar_id(frame, a, la)) in ib]
    if pairs:
        a, b = np.array(pairs).T
        return np.median(X[b] - X[a], axis=0)
    return X[B].mean(axis=0) - X[A].mean(axis=0)


def bay_between(jframe, a: int, b: int) -> str:
    """The bay between the frames of joints ``a`` and ``b`` ('' in one frame or none).

    ``jframe`` is the ``frame`` joint tag (or None).  Numeric labels: bay 2
    runs from frame 2 to frame 3, as in the extrusion; frames further apart
    give ``"2-4"``; other labels ``"la-lb"`` in sorted order.
    """
    if jframe is None or min(a, b) < 0 or not jframe[a] or not jframe[b] or jframe[a] == jframe[b]:
        return ""
    la, lb = jframe[a], jframe[b]
    if la.isdigit() and lb.isdigit():
        lo, hi = sorted((int(la), int(lb)))
        return str(lo) if hi == lo + 1 else f"{lo}-{hi}"
    return "-".join(sorted((la, lb)))


def _member_index(frame: Frame) -> dict[tuple[int, int], int]:
    return {(min(a, b), max(a, b)): k for k, (a, b) in enumerate(frame.ends.tolist())}


def panel_bay(frame: Frame, corners, member_at=None) -> str:
    """The most common ``bay`` label of a panel's sides ('' when none).

    A side that is a member gives its ``bay`` tag; one that is not (a tie
    candidate) the bay between its ends' frames (:func:`bay_between`).
    ``member_at`` (joint pair -> member index) may be passed to save
    rebuilding it for many panels.
    """
    bay_tags, jframe = frame.member_tags.get("bay"), frame.joint_tags.get("frame")
    if corners is None or (bay_tags is None and jframe is None):
        return ""
    member_at = _member_index(frame) if member_at is None else member_at
    labels = []
    for p, q in zip(corners, corners[1:] + corners[:1]):
        k = member_at.get((min(p, q), max(p, q)))
        if k is not None and bay_tags is not None and bay_tags[k]:
            labels.append(bay_tags[k])
        elif k is None and bay_between(jframe, p, q):
            labels.append(bay_between(jframe, p, q))
    return Counter(labels).most_common(1)[0][0] if labels else ""


def missing_ties(frame: Frame, corners) -> list[tuple[int, int]]:
    """The sides of a panel that no member joins (the ties a tie-panel diagonal needs)."""
    existing = {frozenset(e) for e in frame.ends.tolist()}
    sides = zip(corners, corners[1:] + corners[:1])
    return [(p, q) for p, q in sides if p >= 0 and q >= 0 and frozenset((p, q)) not in existing]


def tie_level(frame: Frame, a: int) -> str:
    """``"bottom chord"`` when joint ``a`` is at the lowest level of its frame, else ``"upper"``.

    The lowest level: within ``DEFAULT.select`` of the frame's size (its
    largest extent) of the lowest joint of the same frame, feet of posts
    (joint role ``foot``) left out.  Needs the ``frame`` joint tag.
    """
    jf = frame.joint_tags["frame"]
    role = frame.joint_tags.get("role") or ("",) * frame.n_joints
    own = [j for j in range(frame.n_joints) if jf[j] == jf[a] and role[j] != "foot"]
    z = frame.coords[own, 2]
    size = float(np.max(np.ptp(frame.coords, axis=0))) or 1.0
    return "bottom chord" if frame.coords[a, 2] - z.min() <= DEFAULT.select * size else "upper"


def bay_labels(frame: Frame) -> list[str]:
    """Every bay of a frame of frames, in order along the building.

    The bays between consecutive frames (:func:`frame_labels`,
    :func:`bay_between`), then any other ``bay`` member tag (numeric labels in
    numeric order, others in order of first appearance).  Empty for a frame
    with neither.
    """
    frames = frame_labels(frame)
    jf = frame.joint_tags.get("frame")
    out = [bay_between(jf, int(A[0]), int(B[0])) for (_, A), (_, B) in zip(frames, frames[1:])]
    tags = list(dict.fromkeys(b for b in frame.member_tags.get("bay") or () if b and b not in out))
    if all(b.isdigit() for b in tags):
        tags.sort(key=int)
    return [b for b in dict.fromkeys(out) if b] + tags


def bay_key(text: str) -> str:
    """A bay as the user may write it, as its label: ``"B3"``, ``"bay 3"`` and ``"3"`` give ``"3"``.

    Only a prefix followed by a digit is taken off, so a label such as
    ``"Bx"`` stays as written.
    """
    t = str(text).strip()
    for prefix in ("bay ", "bay", "b", "B"):
        rest = t[len(prefix):].strip() if t.lower().startswith(prefix.lower()) else ""
        if rest[:1].isdigit():
            return rest
    return t


def candidate_bay(frame: Frame, cand, i: int, member_at=None, around=None) -> str:
    """The bay of candidate ``i`` of a :class:`~.candidates.CandidateSet` ('' for none).

    A panel's diagonal: the panel's bay (:func:`panel_bay`); any other member
    (a tie, a listed pair, a pair within a distance): the bay between its
    ends' frames (:func:`bay_between`), or, in a frame with ``bay`` member
    tags but no frames, the most common bay of the members at its ends; a
    restraint: none.  ``member_at`` (:func:`panel_bay`) and ``around``
    (:func:`joint_bays`) may be passed to save rebuilding them.
    """
    if cand.joint[i] >= 0:
        return ""
    if cand.panel[i] is not None:
        return panel_bay(frame, cand.panel[i], member_at)
    a, b = (int(j) for j in cand.ends[i])
    jframe, tags = frame.joint_tags.get("frame"), frame.member_tags.get("bay")
    if jframe is not None or tags is None:
        return bay_between(jframe, a, b)
    around = joint_bays(frame) if around is None else around
    labels = around[a] + around[b]
    return Counter(labels).most_common(1)[0][0] if labels else ""


def joint_bays(frame: Frame) -> list[list[str]]:
    """The non-empty ``bay`` tags of the members at each joint (for :func:`candidate_bay`)."""
    tags = frame.member_tags.get("bay") or ("",) * frame.n_members
    out = [[] for _ in range(frame.n_joints)]
    for (a, b), t in zip(frame.ends.tolist(), tags):
        if t:
            out[a].append(t)
            out[b].append(t)
    return out
