"""A CSV pair: ``<name>joints.csv`` and ``<name>members.csv``, each with a header row.

``joints.csv``: columns ``id, x, y`` and optionally ``z`` (without ``z`` the
frame is a plane frame) and ``support`` (a support code: ``pin``, axis
letters, or empty)::

    id,x,y,z,support
    A,0,0,0,pin
    B,4,0,0,yz
    C,2,0,3,

``members.csv``: columns ``id, start, end`` (joint ids)::

    id,start,end
    AB,A,B

Either file may be given; the other is found beside it by swapping
``joints`` and ``members`` in the name (``hall_joints.csv`` and
``hall_members.csv``).  Columns may stand in any order; other columns are
ignored.  Every message names the file and the row (the line in the file).
"""

from __future__ import annotations

import csv
import os
from pathlib import Path

import numpy as np

from ..errors import ModelError
from ..model import Frame
from ..supports import restraint_rows
from ..tolerances import DEFAULT, Tolerances
from .sourcelines import checked

__all__ = ["read_csv_pair", "partner"]


def partner(path) -> tuple[Path, Path]:
    """``(joints file, members file)`` for either one of a pair."""
    p = Path(os.fspath(path))
    name = p.name
    for mine, other in (("joints", "members"), ("members", "joints")):
        k = name.lower().rfind(mine)
        if k >= 0:
            twin = p.with_name(name[:k] + other + name[k + len(mine):])
            return (p, twin) if mine == "joints" else (twin, p)
    raise ModelError("a CSV model is a pair of files named ...joints.csv and ...members.csv; "
                     "rename this one so its name says which it is", path=str(p))


def _rows(path: Path, required: tuple[str, ...], optional: tuple[str, ...] = ()):
    """Yield ``(line, {column: text})``; check the header first."""
    source = str(path)
    if not path.is_file():
        raise ModelError(f"the other file of the CSV pair is missing; put {path.name} beside it "
                         f"(header: {', '.join(required)})", path=source)
    try:
        text = path.read_text(encoding="utf-8-sig")
    except (OSError, UnicodeDecodeError) as exc:
        raise ModelError(f"cannot be read ({exc}); save it as UTF-8 CSV", path=source) from None
    reader = csv.reader(text.splitlines())
    header = next(reader, None)
    if header is None:
        raise ModelError(f"is empty; the first row is the header {', '.join(required)}",
                         path=source, line=1)
    names = [h.strip().lower() for h in header]
    missing = [c for c in required if c not in names]
    if missing:
        raise ModelError(f"the header row lacks the column(s) {', '.join(missing)}; it reads "
                         f"{', '.join(header)!s} and must name {', '.join(required)}"
                         + (f" (and optionally {', '.join(optional)})" if optional else ""),
                         path=source, line=1)
    for line, row in enumerate(reader, 2):
        if not any(cell.strip() for cell in row):
            continue
        if len(row) < len(names):
            row = row + [""] * (len(names) - len(row))
        yield line, {n: v.strip() for n, v in zip(names, row)}


def read_csv_pair(path, *, tol: Tolerances = DEFAULT, units: str | None = None) -> Frame:
    """Read a CSV pair into a checked :class:`Frame`.

    ``units`` names the unit of length of the coordinates, which a CSV pair
    does not carry (default ``"m"``).

    Raises
    ------
    ModelError
        For a missing partner file, a header without the required columns,
        a coordinate that is not a number, an empty or repeated id, a member
        naming an unknown joint, or a bad support code; each with its file
        and row.
    """
    from .mesh import file_units

    jfile, mfile = partner(path)
    units = file_units(None, units, str(jfile))
    ids, coords, lines, supports = [], [], {}, []
    dimension = None
    for line, row in _rows(jfile, ("id", "x", "y"), ("z", "support")):
        if dimension is None:
            dimension = 3 if "z" in row else 2
        jid = row["id"]
        where = dict(path=str(jfile), line=line, item=jid or None)
        if not jid:
            raise ModelError("a joint without an id; give it one", **where)
        if ("joint", jid) in lines:
            raise ModelError(f"joint id {jid!r} is given twice (first in row "
                             f"{lines[('joint', jid)]}); rename one or delete the repeat", **where)
        values = []
        for axis in "xyz"[:dimension]:
            try:
                values.append(float(row[axis]))
            except ValueError:
                raise ModelError(f"joint {jid!r}: {axis} is {row[axis]!r}, not a number; write a "
                                 f"number such as 2.5", **where) from None
        ids.append(jid)
        coords.append(values)
        lines[("joint", jid)] = line
        if row.get("support"):
            supports.append((len(ids) - 1, row["support"], line))
    if not ids:
        raise ModelError("holds no joints; give one row a joint under the header id,x,y,z",
                         path=str(jfile))
    index = {j: i for i, j in enumerate(ids)}
    mids, ends, mlines = [], [], {}
    for line, row in _rows(mfile, ("id", "start", "end")):
        mid = row["id"]
        where = dict(path=str(mfile), line=line, item=mid or None)
        if not mid:
            raise ModelError("a member without an id; give it one", **where)
        if mid in mlines:
            raise ModelError(f"member id {mid!r} is given twice (first in row {mlines[mid]}); "
                             f"rename one or delete the repeat", **where)
        pair = []
        for column in ("start", "end"):
            if row[column] not in index:
                raise ModelError(f"member {mid!r}: {column} joint {row[column]!r} is not in "
                                 f"{jfile.name}; add the joint or correct the id", **where)
            pair.append(index[row[column]])
        mids.append(mid)
        ends.append(pair)
        mlines[mid] = line
    rj, rd = [], []
    for j, code, line in supports:
        rows = restraint_rows(code, dimension, joint=ids[j], path=str(jfile), line=line, tol=tol)
        rj.extend([j] * len(rows))
        rd.extend(rows)
    frame = Frame(joint_ids=tuple(ids), coords=np.array(coords), member_ids=tuple(mids),
                  ends=np.array(ends, dtype=np.int64).reshape(-1, 2),
                  restraint_joint=np.array(rj, dtype=np.int64),
                  restraint_dir=np.array(rd, dtype=float).reshape(-1, dimension),
                  dimension=dimension, name=jfile.stem, units=units, source=str(jfile),
                  lines=lines)
    return checked(frame, tol=tol)
