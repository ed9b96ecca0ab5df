"""Editing a frame: the one place where joints, members and supports are added or taken away.

A :class:`~spaceframe.model.Frame` never changes; each function here returns a
new frame with one kind of change and carries everything else across: ids,
coordinates, restraint rows, every joint and member tag, every member
property, the source and its known lines.  Bracing
(:func:`spaceframe.analysis.bracing.braced_frame`), batch variants
(:func:`spaceframe.batch.apply_variant`) and the extrusion
(:func:`spaceframe.extrude.extrude`) all edit frames through it, so what
survives an edit is decided once.

What new items get
------------------
- Tags: the labels given for them; ``""`` for every tag the frame has and
  the caller does not give.  A tag given that the frame lacks is added, with
  ``""`` for the items already there.
- Member properties (``EA``): the values given for the new members; for a
  property the frame has and the caller does not give, the median of the
  frame's values (a new member is taken to be a typical one).  A property the
  frame lacks cannot be given for new members only: the frame would have it
  for some members and not others.

Joints and members are addressed by index (the callers turn the user's ids
into indices with their own messages); ids of new items must be new.
The functions do not run :func:`~spaceframe.validation.check_frame`: callers
that change geometry check the result once, after all their edits.

Cost: each edit is O(n + m + k) array and tuple work (a new frame is built).
"""

from __future__ import annotations

import dataclasses
from typing import Mapping, Sequence

import numpy as np

from .errors import ModelError
from .model import Frame

__all__ = ["add_joints", "add_members", "remove_members", "move_joints", "free_supports",
           "add_restraints", "set_supports"]


def _extended(old: Mapping[str, tuple], n_old: int, new: Mapping[str, Sequence] | None,
              count: int, kind: str, source) -> dict[str, tuple]:
    """Tag tables of ``n_old`` items followed by ``count`` new ones (see the module docstring)."""
    new = dict(new or {})
    out = {}
    for key in list(old) + [k for k in new if k not in old]:
        labels = new.get(key)
        labels = ("",) * count if labels is None else tuple(str(v) for v in labels)
        if len(labels) != count:
            raise ModelError(f"{len(labels)} {key!r} tag labels for {count} new {kind}s",
                             path=source)
        out[key] = tuple(old.get(key, ("",) * n_old)) + labels
    return out


def _fresh(ids: Sequence[str], taken: Sequence[str], kind: str, source) -> tuple[str, ...]:
    ids = tuple(str(i) for i in ids)
    used = set(taken)
    for i in ids:
        if i in used:
            raise ModelError(f"{kind} id {i!r} is already in the frame; give the new {kind} "
                             f"another id", path=source, item=i)
        used.add(i)
    return ids


def add_joints(frame: Frame, ids: Sequence[str], coords, *,
               tags: Mapping[str, Sequence[str]] | None = None) -> Frame:
    """The frame with new joints, unconnected and unsupported.

    Parameters
    ----------
    frame : Frame
    ids : sequence of str, length k
        New, distinct joint ids.
    coords : (k, dimension) array_like of float
    tags : mapping of str to sequence of str, optional
        Joint tag labels of the new joints, one per joint.

    Returns
    -------
    Frame
        The new joints after the old, so every index into the old frame
        still holds.

    Raises
    ------
    ModelError
        For an id already in use, or tag labels of the wrong count.
    """
    ids = _fresh(ids, frame.joint_ids, "joint", frame.source)
    xyz = np.asarray(coords, dtype=float).reshape(len(ids), frame.dimension)
    return dataclasses.replace(
        frame, joint_ids=frame.joint_ids + ids, coords=np.vstack([frame.coords, xyz]),
        joint_tags=_extended(frame.joint_tags, frame.n_joints, tags, len(ids), "joint",
                             frame.source))


def add_members(frame: Frame, ids: Sequence[str], ends, *,
                tags: Mapping[str, Sequence[str]] | None = None,
                properties: Mapping[str, Sequence[float]] | None = None) -> Frame:
    """The frame with new members.

    Parameters
    ----------
    frame : Frame
    ids : sequence of str, length k
        New, distinct member ids.
    ends : (k, 2) array_like of int
        Joint indices of each new member's ends.
    tags : mapping of str to sequence of str, optional
        Member tag labels of the new members (others: ``""``).
    properties : mapping of str to sequence of float, optional
        Property values of the new members (others: the median of the
        frame's values).

    Returns
    -------
    Frame
        The new members after the old ones.

    Raises
    ------
    ModelError
        For an id in use, labels or values of the wrong count, or a property
        the frame does not have.

    Examples
    --------
    >>> f = Frame.from_arrays([[0, 0], [1, 0], [1, 1]], [[0, 1], [1, 2]],
    ...                       member_properties={"EA": [1.0, 3.0]})
    >>> g = add_members(f, ["D"], [[0, 2]], tags={"role": ["brace"]})
    >>> g.member_ids, g.member_tags["role"], g.member_properties["EA"].tolist()
    (('M1', 'M2', 'D'), ('', '', 'brace'), [1.0, 3.0, 2.0])
    """
    ids = _fresh(ids, frame.member_ids, "member", frame.source)
    k = len(ids)
    new_ends = np.asarray(ends, dtype=np.int64).reshape(k, 2)
    given = {str(key): np.asarray(v, dtype=float).reshape(-1)
             for key, v in (properties or {}).items()}
    for key, values in given.items():
        if key not in frame.member_properties:
            raise ModelError(f"member property {key!r} is given for the new members only; "
                             f"the frame has no {key!r} for its own members", path=frame.source)
        if len(values) != k:
            raise ModelError(f"{len(values)} values of {key!r} for {k} new members",
                             path=frame.source)
    props = {}
    for key, values in frame.member_properties.items():
        extra = given.get(key)
        if extra is None:
            # a frame of no members: any positive value (only ratios of EA are used)
            extra = np.full(k, float(np.median(values)) if len(values) else 1.0)
        props[key] = np.concatenate([values, extra])
    return dataclasses.replace(
        frame, member_ids=frame.member_ids + ids, ends=np.vstack([frame.ends, new_ends]),
        member_tags=_extended(frame.member_tags, frame.n_members, tags, k, "member",
                              frame.source),
        member_properties=props,
        prestress=None if frame.prestress is None else np.concatenate([frame.prestress,
                                                                       np.zeros(k)]))


def remove_members(frame: Frame, members) -> Frame:
    """The frame without the members at indices ``members`` (tags, properties, lines with them).

    Parameters
    ----------
    frame : Frame
    members : sequence of int
        Indices of the members to take out (repeats allowed).

    Returns
    -------
    Frame
        The other members in their order; the joints are unchanged.
    """
    keep = np.ones(frame.n_members, dtype=bool)
    keep[np.asarray(list(members), dtype=np.int64)] = False
    if keep.all():
        return frame
    gone = {("member", frame.member_ids[i]) for i in np.flatnonzero(~keep)}
    return dataclasses.replace(
        frame, member_ids=tuple(m for m, k in zip(frame.member_ids, keep) if k),
        ends=frame.ends[keep],
        member_tags={key: tuple(v for v, k in zip(labels, keep) if k)
                     for key, labels in frame.member_tags.items()},
        member_properties={key: v[keep] for key, v in frame.member_properties.items()},
        prestress=_kept_prestress(frame, keep),
        lines={key: line for key, line in frame.lines.items() if key not in gone})


def _kept_prestress(frame: Frame, keep: np.ndarray):
    """The declared prestress of the members kept (None when none of them carried any).

    What is left may no longer be in equilibrium: the audit checks it.
    """
    if frame.prestress is None or not np.any(frame.prestress[keep]):
        return None
    return frame.prestress[keep]


def move_joints(frame: Frame, joints: Sequence[int], coords) -> Frame:
    """The frame with joints ``joints`` at new coordinates ``coords`` ``(k, dimension)``."""
    xyz = np.array(frame.coords)
    xyz[np.asarray(joints, dtype=np.int64)] = np.asarray(coords, dtype=float).reshape(
        -1, frame.dimension)
    return dataclasses.replace(frame, coords=xyz)


def free_supports(frame: Frame, joints: Sequence[int]) -> Frame:
    """The frame with every restrained direction at ``joints`` taken away; other rows in order."""
    drop = np.isin(frame.restraint_joint, np.asarray(list(joints), dtype=np.int64))
    if not drop.any():
        return frame
    return dataclasses.replace(frame, restraint_joint=frame.restraint_joint[~drop],
                               restraint_dir=frame.restraint_dir[~drop])


def add_restraints(frame: Frame, joints: Sequence[int], directions) -> Frame:
    """The frame with restraint rows appended: joint ``joints[i]`` held along ``directions[i]``.

    Parameters
    ----------
    frame : Frame
    joints : (k,) sequence of int
    directions : (k, dimension) array_like of float
        Unit vectors (as :func:`~spaceframe.supports.restraint_rows` gives),
        independent of the rows the joint has already.
    """
    rj = np.asarray(joints, dtype=np.int64).reshape(-1)
    rd = np.asarray(directions, dtype=float).reshape(len(rj), frame.dimension)
    if not len(rj):
        return frame
    return dataclasses.replace(frame,
                               restraint_joint=np.concatenate([frame.restraint_joint, rj]),
                               restraint_dir=np.vstack([frame.restraint_dir, rd]))


def set_supports(frame: Frame, supports: Mapping[int, np.ndarray]) -> Frame:
    """The frame with the support of each joint in ``supports`` replaced.

    Parameters
    ----------
    frame : Frame
    supports : mapping of int to (k, dimension) float
        Joint index -> the unit rows it now holds (from
        :func:`~spaceframe.supports.restraint_rows`; zero rows frees it).
        The joints' old rows go; the new rows follow the other joints' rows,
        in the mapping's order.
    """
    freed = free_supports(frame, list(supports))
    rows = [np.asarray(r, dtype=float).reshape(-1, frame.dimension) for r in supports.values()]
    joints = [j for j, r in zip(supports, rows) for _ in range(len(r))]
    return add_restraints(freed, joints,
                          np.vstack(rows) if rows else np.zeros((0, frame.dimension)))
