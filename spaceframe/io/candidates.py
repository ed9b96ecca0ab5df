"""A user's list of candidate bracing members: a CSV file ``start,end[,weight]``.

The column ``cost`` may stand for ``weight`` (the same meaning: the
candidate's own cost, which replaces its length).

::

    start,end,weight
    F1.L1,F2.L1,5.0
    F2.L1,F3.L1,

Each row names two joints of the model; ``weight`` (optional, a positive
number) replaces the member's length as its cost in the selection.  Blank
lines and lines starting with ``#`` are skipped.  Every message names the
file, the line and the joint, and says what to do.
"""

from __future__ import annotations

import csv
import os

import numpy as np

from ..errors import ModelError
from ..model import Frame
from ..suggest import did_you_mean
from ..tolerances import DEFAULT, Tolerances

__all__ = ["read_candidate_list"]


def read_candidate_list(path, frame: Frame, *, tol: Tolerances = DEFAULT):
    """Read candidate members for ``frame`` from a CSV file.

    Parameters
    ----------
    path : str or os.PathLike
    frame : Frame
        The model the joints belong to.

    Returns
    -------
    ends : (c, 2) int
        Joint indices of each candidate.
    weights : (c,) float
        The cost of each candidate: its weight where given, else NaN (the
        selection then uses its length).
    lines : (c,) int
        The 1-based line of each candidate in the file.

    Raises
    ------
    ModelError
        For a missing file, a missing ``start``/``end`` column, a joint that
        is not in the model, a candidate of zero length (one joint twice, or
        two coincident joints) and a weight that is not a positive number.
    """
    source = os.fspath(path)
    if not os.path.isfile(source):
        raise ModelError("no such file; give the path of a CSV file with columns start,end "
                         "and optionally weight", path=source)
    index = {j: i for i, j in enumerate(frame.joint_ids)}
    model = frame.source or "the model"
    ends, weights, lines = [], [], []
    with open(source, newline="", encoding="utf-8-sig") as fh:
        rows = [(n, row) for n, row in enumerate(csv.reader(fh), start=1)
                if row and any(c.strip() for c in row) and not row[0].lstrip().startswith("#")]
    if not rows:
        raise ModelError("holds no candidate; write a header 'start,end' and one row per "
                         "candidate member", path=source)
    head_line, header = rows[0]
    names = [h.strip().lower() for h in header]
    if "start" not in names or "end" not in names:
        raise ModelError(f"the header {','.join(header)!r} lacks the columns 'start' and 'end'; "
                         f"write 'start,end' (and optionally ',weight') as the first row",
                         path=source, line=head_line)
    cs, ce = names.index("start"), names.index("end")
    cw = (names.index("weight") if "weight" in names else
          names.index("cost") if "cost" in names else None)
    size = frame.size()
    for line, row in rows[1:]:
        cells = [c.strip() for c in row] + [""] * len(names)
        pair = []
        for col in (cs, ce):
            jid = cells[col]
            if jid not in index:
                raise ModelError(f"joint {jid!r} is not in {model}"
                                 f"{did_you_mean(jid, frame.joint_ids)}; use the id of a "
                                 f"joint of the model", path=source, line=line, item=jid)
            pair.append(index[jid])
        a, b = pair
        if a == b or np.linalg.norm(frame.coords[a] - frame.coords[b]) <= tol.short_member * size:
            raise ModelError(f"the candidate {cells[cs]!r}-{cells[ce]!r} has zero length (its "
                             f"ends are one point); give two joints at different places",
                             path=source, line=line, item=cells[cs])
        weight = np.nan
        if cw is not None and cells[cw]:
            try:
                weight = float(cells[cw])
            except ValueError:
                weight = -1.0
            if not (np.isfinite(weight) and weight > 0):
                raise ModelError(f"the weight {cells[cw]!r} of candidate {cells[cs]!r}-"
                                 f"{cells[ce]!r} is not a positive number; give one, or leave "
                                 f"it empty to use the length", path=source, line=line,
                                 item=cells[cs])
        ends.append(pair)
        weights.append(weight)
        lines.append(line)
    return (np.array(ends, dtype=np.int64).reshape(-1, 2), np.array(weights, dtype=float),
            np.array(lines, dtype=np.int64))
