"""Geometric checks on a built frame, in one place.

Readers check the document (ids, types, counts) and build a :class:`Frame`;
:func:`check_frame` then checks what only the numbers can show: coordinates
that are not finite, members that join a joint to itself or have no length,
separate joints at one point, and members given twice.  Every reader calls it
last, so every model, whatever its file format, passes the same checks with
the same messages.
"""

from __future__ import annotations

import dataclasses
import warnings
from itertools import compress
from typing import Callable

import numpy as np

from .errors import ModelError, SpaceframeError, SpaceframeWarning, where
from .model import Frame
from .tolerances import DEFAULT, Tolerances

__all__ = ["check_frame"]

#: Duplicate members listed by name in one warning; the rest are counted.
_LISTED = 5


def check_frame(frame: Frame, *, tol: Tolerances = DEFAULT,
                locate: Callable[[str, str], int | None] | None = None) -> Frame:
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
    locate : callable ``(kind, id) -> int or None``, optional
        Finds the source line of ``("joint" | "member", id)`` when a message
        needs it.  Readers pass one that searches the text they have already
        read.  Without it the line comes from ``frame.lines`` or, failing
        that, from searching ``frame.source`` again (see
        :func:`spaceframe.io.find_line`).

    Returns
    -------
    frame : Frame
        ``frame`` itself when no member is repeated, else a copy without the
        repeats.

    Raises
    ------
    ModelError
        For the first failed check among 1-4, naming the file, the line where
        known, the joint or member ids, what is wrong and what to do.

    Warns
    -----
    SpaceframeWarning
        For repeated members, naming each repeat and the member it repeats.

    Notes
    -----
    Cost O(n log n + m log m) for n joints and m members: the coincidence test
    builds a k-d tree of the joints [2]_ and asks it for the pairs within the
    tolerance; repeated members are found by sorting a key made from the two
    end indices.  Lines are looked up only for the items named in a message,
    so a valid model costs no text search at all.

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
    line = _line_finder(frame, locate)
    _check_finite(frame, line)
    size = frame.size()
    _check_members(frame, tol, size, line)
    _check_coincident(frame, tol, size, line)
    return _drop_repeated_members(frame, line)


def _line_finder(frame: Frame, locate) -> Callable[[str, str], int | None]:
    """Return ``line(kind, id)``: from ``frame.lines``, ``locate``, or the source file."""
    def line(kind: str, item: str) -> int | None:
        known = frame.line_of(kind, item)
        if known is not None:
            return known
        if locate is not None:
            return locate(kind, item)
        if frame.source is None:
            return None
        from .io import find_line     # the error path only; io imports this module
        try:
            return find_line(frame.source, kind, item)
        except (SpaceframeError, OSError):
            return None
    return line


def _line_note(line: int | None) -> str:
    return f" (line {line})" if line is not None else ""


def _error(frame: Frame, message: str, *, line: int | None, item: str) -> ModelError:
    return ModelError(message, path=frame.source, line=line, item=item)


def _check_finite(frame: Frame, line) -> None:
    bad = np.flatnonzero(~np.isfinite(frame.coords).all(axis=1))
    if bad.size == 0:
        return
    jid = frame.joint_ids[bad[0]]
    more = f" ({bad.size - 1} more joints also)" if bad.size > 1 else ""
    raise _error(frame, f"joint {jid!r} has a coordinate that is not a finite number "
                        f"({frame.coords[bad[0]].tolist()}){more}; give every coordinate as a "
                        f"finite number", line=line("joint", jid), item=jid)


def _check_members(frame: Frame, tol: Tolerances, size: float, line) -> None:
    if frame.n_members == 0:
        return
    a, b = frame.ends[:, 0], frame.ends[:, 1]
    loops = np.flatnonzero(a == b)
    if loops.size:
        k = loops[0]
        mid, jid = frame.member_ids[k], frame.joint_ids[a[k]]
        raise _error(frame, f"member {mid!r} has both ends at joint {jid!r}; a member joins two "
                            f"different joints: correct one end or delete the member",
                     line=line("member", mid), item=mid)
    limit = tol.short_member * size
    lengths = frame.lengths()
    short = np.flatnonzero(lengths <= limit)
    if short.size:
        k = short[0]
        mid = frame.member_ids[k]
        ja, jb = frame.joint_ids[a[k]], frame.joint_ids[b[k]]
        u = frame.units
        raise _error(frame, f"member {mid!r} from joint {ja!r} to joint {jb!r} has length "
                            f"{lengths[k]:.3g} {u}, at or below the zero-length tolerance "
                            f"of {limit:.3g} {u} ({tol.short_member:g} x the model size, "
                            f"{size:.6g} {u}); joints {ja!r} and {jb!r} are at one point: move one "
                            f"of them, or merge them and delete the member",
                     line=line("member", mid), item=mid)


def _check_coincident(frame: Frame, tol: Tolerances, size: float, line) -> None:
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
    raise _error(frame, f"joints {ja!r}{_line_note(line('joint', ja))} and {jb!r} are "
                        f"{dist:.3g} {u} apart, within the coincident-joint tolerance of "
                        f"{limit:.3g} {u} ({tol.coincident:g} x the model size, {size:.6g} {u})"
                        f"{more}; two separate joints at one point make a false "
                        f"mechanism: merge them into one joint (and point their members at it) "
                        f"or move one of them", line=line("joint", jb), item=jb)


def _drop_repeated_members(frame: Frame, line) -> Frame:
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
    first_line = line("member", ids[dropped[0]])
    notes = []
    for d, k in zip(dropped[:_LISTED], kept_as[:_LISTED]):
        dl = first_line if d == dropped[0] else line("member", ids[d])
        notes.append(f"member {ids[d]!r}{_line_note(dl)} repeats member {ids[k]!r}"
                     f"{_line_note(line('member', ids[k]))} between joints "
                     f"{jids[lo[k]]!r} and {jids[hi[k]]!r}")
    if len(dropped) > _LISTED:
        notes.append(f"and {len(dropped) - _LISTED} more")
    warnings.warn(f"{where(frame.source, first_line)}{'; '.join(notes)}; two bars between the same "
                  f"pins act as one bar, so each repeat is counted once: delete the repeats",
                  SpaceframeWarning, stacklevel=3)
    keep = np.ones(m, dtype=bool)
    keep[dropped] = False
    return dataclasses.replace(frame, member_ids=tuple(compress(ids, keep)),
                               ends=frame.ends[keep],
                               member_tags={k: tuple(compress(v, keep))
                                            for k, v in frame.member_tags.items()},
                               member_properties={k: v[keep] for k, v in
                                                  frame.member_properties.items()},
                               prestress=None if frame.prestress is None else
                               _merged_prestress(frame, keep))


def _merged_prestress(frame: Frame, keep: np.ndarray) -> np.ndarray:
    """The declared prestress with each repeated member's force added to the one kept.

    Two bars between the same pins act as one, so the one kept carries both
    forces; the state stays in equilibrium.
    """
    lo = np.minimum(frame.ends[:, 0], frame.ends[:, 1])
    hi = np.maximum(frame.ends[:, 0], frame.ends[:, 1])
    kept = {(a, b): k for k, (a, b) in enumerate(zip(lo, hi)) if keep[k]}
    t = np.zeros(frame.n_members)
    for k, (a, b) in enumerate(zip(lo, hi)):
        t[kept[(a, b)]] += frame.prestress[k]
    return t[keep]
