"""Geometric checks on a built frame, in one place.

Readers check the document (ids, types, counts) and build a :class:`Frame`;
:func:`check_frame` then checks what only the numbers can show: coordinates
that are not finite, members that join a joint to itself or have no length,
separate joints at one point, and members given twice.  Every reader calls it
last, so every model, whatever its file format, passes the same checks with
the same messages.  The errors name the items and their kind, never a file:
the reader adds the file and line (:func:`spaceframe.io.sourcelines.checked`),
so this module imports nothing from :mod:`spaceframe.io`.
"""

from __future__ import annotations

import dataclasses
import warnings

import numpy as np

from .edit import remove_members
from .errors import ModelError, SpaceframeWarning
from .model import Frame
from .tolerances import DEFAULT, Tolerances

__all__ = ["check_frame"]

#: Duplicate members listed by name in one warning; the rest are counted.
_LISTED = 5


def check_frame(frame: Frame, *, tol: Tolerances = DEFAULT) -> Frame:
    """Check a frame's geometry; return it, with repeated members counted once.

    The checks, in order (the first failure is raised):

    1. every coordinate is finite;
    2. no member has both ends at one joint;
    3. no member is of zero length: ``length <= tol.short_member * size``
       is an error, ``size`` being :meth:`Frame.size`, the diagonal of the
       joints' bounding box;
    4. no two joints coincide: ``distance <= tol.coincident * size`` is an
       error, because two separate joints at one point, each held only by its
       own members, make a mechanism that the real frame does not have;
    5. a member between the same two joints as an earlier member (ends in
       either order) is reported with a :class:`SpaceframeWarning` and
       dropped; the first one listed is kept.

    Why a repeated member is dropped and not rejected: in a pin-jointed model
    two bars between the same pins are two equal columns of the equilibrium
    matrix, so they act as one bar and add one state of self-stress (equal
    and opposite forces in the pair) that says nothing about the frame [1]_.
    Keeping both would report that spurious state; refusing the model would
    stop an audit over what is most often a copy-and-paste slip.

    Parameters
    ----------
    frame : Frame
        The frame to check.
    tol : Tolerances, optional
        ``tol.short_member`` and ``tol.coincident`` are used, both relative to
        the model's size.

    Returns
    -------
    frame : Frame
        ``frame`` itself when no member is repeated, else a copy without the
        repeats.

    Raises
    ------
    ModelError
        For the first failed check among 1-4, naming the joint or member ids,
        what is wrong and what to do.  It carries the ``item`` and its
        ``kind`` (``"joint"`` or ``"member"``) and no file: this module knows
        no files.  Readers add the file and line
        (:func:`spaceframe.io.sourcelines.checked`).

    Warns
    -----
    SpaceframeWarning
        For repeated members, naming each repeat and the member it repeats;
        it carries the first repeat as ``item`` (``kind`` ``"member"``).

    Notes
    -----
    Cost O(n log n + m log m) for n joints and m members: the coincidence test
    builds a k-d tree of the joints [2]_ and asks it for the pairs within the
    tolerance; repeated members are found by sorting a key made from the two
    end indices.

    References
    ----------
    .. [1] S. Pellegrino and C. R. Calladine, "Matrix analysis of statically
       and kinematically indeterminate frameworks", International Journal of
       Solids and Structures 22(4), 409-428, 1986.
    .. [2] S. Maneewongvatana and D. M. Mount, "Analysis of approximate nearest
       neighbor searching with clustered point sets", arXiv:cs/9901013, 1999.

    Examples
    --------
    >>> f = Frame.from_arrays([[0, 0], [1, 0], [0, 1]], [[0, 1], [1, 2], [2, 0]])
    >>> check_frame(f) is f
    True
    """
    _check_finite(frame)
    size = frame.size()
    _check_members(frame, tol, size)
    _check_coincident(frame, tol, size)
    return _drop_repeated_members(frame)


def _message(*parts) -> tuple[str, tuple]:
    """Join message parts; a part ``(kind, id)`` is the id, quoted, marked for its line note.

    Returns the text and the marks ``(offset, kind, id)`` of
    :class:`~spaceframe.errors.ModelError`, where a reader that knows the file
    notes ``" (line N)"``.
    """
    text, marks = "", []
    for part in parts:
        if isinstance(part, tuple):
            text += repr(part[1])
            marks.append((len(text), part[0], part[1]))
        else:
            text += part
    return text, tuple(marks)


def _check_finite(frame: Frame) -> None:
    bad = np.flatnonzero(~np.isfinite(frame.coords).all(axis=1))
    if bad.size == 0:
        return
    jid = frame.joint_ids[bad[0]]
    more = f" ({bad.size - 1} more joints also)" if bad.size > 1 else ""
    raise ModelError(f"joint {jid!r} has a coordinate that is not a finite number "
                     f"({frame.coords[bad[0]].tolist()}){more}; give every coordinate as a "
                     f"finite number", item=jid, kind="joint")


def _check_members(frame: Frame, tol: Tolerances, size: float) -> None:
    if frame.n_members == 0:
        return
    a, b = frame.ends[:, 0], frame.ends[:, 1]
    loops = np.flatnonzero(a == b)
    if loops.size:
        k = loops[0]
        mid, jid = frame.member_ids[k], frame.joint_ids[a[k]]
        raise ModelError(f"member {mid!r} has both ends at joint {jid!r}; a member joins two "
                         f"different joints: correct one end or delete the member",
                         item=mid, kind="member")
    limit = tol.short_member * size
    lengths = frame.lengths()
    short = np.flatnonzero(lengths <= limit)
    if short.size:
        k = short[0]
        mid = frame.member_ids[k]
        ja, jb = frame.joint_ids[a[k]], frame.joint_ids[b[k]]
        u = frame.units
        raise ModelError(f"member {mid!r} from joint {ja!r} to joint {jb!r} has length "
                         f"{lengths[k]:.3g} {u}, at or below the zero-length tolerance "
                         f"of {limit:.3g} {u} ({tol.short_member:g} x the model size, "
                         f"{size:.6g} {u}); joints {ja!r} and {jb!r} are at one point: move one "
                         f"of them, or merge them and delete the member",
                         item=mid, kind="member")


def _check_coincident(frame: Frame, tol: Tolerances, size: float) -> None:
    if frame.n_joints < 2:
        return
    from scipy.spatial import cKDTree

    limit = tol.coincident * size
    pairs = cKDTree(frame.coords).query_pairs(limit, output_type="ndarray")
    if len(pairs) == 0:
        return
    i, j = pairs[np.lexsort((pairs[:, 1], pairs[:, 0]))[0]]
    ja, jb = frame.joint_ids[i], frame.joint_ids[j]
    dist = float(np.linalg.norm(frame.coords[j] - frame.coords[i]))
    more = f" ({len(pairs) - 1} more such pairs)" if len(pairs) > 1 else ""
    u = frame.units
    text, marks = _message(
        "joints ", ("joint", ja),
        f" and {jb!r} are {dist:.3g} {u} apart, within the coincident-joint tolerance of "
        f"{limit:.3g} {u} ({tol.coincident:g} x the model size, {size:.6g} {u}){more}; two "
        f"separate joints at one point make a false mechanism: merge them into one joint (and "
        f"point their members at it) or move one of them")
    raise ModelError(text, item=jb, kind="joint", marks=marks)


def _drop_repeated_members(frame: Frame) -> Frame:
    m, n = frame.n_members, frame.n_joints
    if m < 2:
        return frame
    lo, hi = frame.ends.min(axis=1), frame.ends.max(axis=1)
    key = lo * n + hi
    order = np.argsort(key, kind="stable")
    repeat = np.zeros(m, dtype=bool)
    repeat[1:] = key[order[1:]] == key[order[:-1]]
    if not repeat.any():
        return frame
    # the first member of each run of equal keys is the one kept (stable sort: lowest index)
    run_start = np.maximum.accumulate(np.where(repeat, 0, np.arange(m)))
    dropped, kept_as = order[repeat], order[run_start[repeat]]
    by_index = np.argsort(dropped)
    dropped, kept_as = dropped[by_index], kept_as[by_index]

    ids, jids = frame.member_ids, frame.joint_ids
    parts = []
    for d, k in zip(dropped[:_LISTED], kept_as[:_LISTED]):
        parts += ["; " if parts else "", "member ", ("member", ids[d]), " repeats member ",
                  ("member", ids[k]), f" between joints {jids[lo[k]]!r} and {jids[hi[k]]!r}"]
    if len(dropped) > _LISTED:
        parts.append(f"; and {len(dropped) - _LISTED} more")
    text, marks = _message(*parts, "; two bars between the same pins act as one bar, so each "
                                   "repeat is counted once: delete the repeats")
    warnings.warn(SpaceframeWarning(text, item=ids[dropped[0]], kind="member", marks=marks),
                  stacklevel=3)
    out = remove_members(frame, dropped)
    if frame.prestress is not None:
        # two bars between the same pins act as one: the one kept carries both forces,
        # so the declared state stays in equilibrium
        t = np.array(frame.prestress)
        np.add.at(t, kept_as, t[dropped])
        keep = np.ones(m, dtype=bool)
        keep[dropped] = False
        out = dataclasses.replace(out, prestress=t[keep])
    return out
