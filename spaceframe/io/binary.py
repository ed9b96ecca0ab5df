"""The compact binary model format: one NumPy ``.npz`` archive per frame.

For frames of hundreds of thousands to millions of members, where text
parsing would dominate the audit.  The archive holds the frame's arrays as
they are (``coords``, ``ends``, ``restraint_joint``, ``restraint_dir``), the
ids as Unicode string arrays, ``dimension``, ``name`` and ``units``, and one
array per tag (``joint_tag:<name>``, ``member_tag:<name>``) and member
property (``member_property:<name>``).  It is read with
``numpy.load(..., allow_pickle=False)``: nothing in it can run code.  A
``format`` entry names the layout so later versions can read older files.

The same checks as for text models run on reading
(:func:`~spaceframe.validation.check_frame`), so a hand-made archive with a
member to a missing joint is refused with a message, not a traceback.
"""

from __future__ import annotations

import os
import warnings
import zipfile

import numpy as np

from ..errors import ModelError, SpaceframeWarning
from ..model import UNITS, Frame
from ..tolerances import DEFAULT, Tolerances
from .output import write_file
from .sourcelines import checked

__all__ = ["read_npz", "dump_npz", "FORMAT"]

#: Layout name stored in every archive.
FORMAT = "spaceframe-frame-1"

_ARRAYS = ("joint_ids", "coords", "member_ids", "ends", "restraint_joint", "restraint_dir")


def read_npz(path, *, tol: Tolerances = DEFAULT) -> Frame:
    """Read a ``.npz`` model archive written by :func:`dump_npz`.

    Raises
    ------
    ModelError
        For a file that is not such an archive, misses an entry, or does not
        describe a frame.

    Notes
    -----
    Cost O(n + m), at the speed of reading the arrays from disk, plus the
    checks of :func:`~spaceframe.validation.check_frame`.
    """
    source = os.fspath(path)
    try:
        with np.load(source, allow_pickle=False) as z:
            data = {k: z[k] for k in z.files}
    except (OSError, ValueError, zipfile.BadZipFile) as exc:
        raise ModelError(f"is not a spaceframe .npz model archive ({exc}); write one with "
                         f"`spaceframe convert MODEL -o OUT.npz`", path=source) from None
    if str(data.get("format", "")) != FORMAT:
        raise ModelError(f"is a .npz archive but not a spaceframe model (no format entry "
                         f"{FORMAT!r}); write one with `spaceframe convert MODEL -o OUT.npz`",
                         path=source)
    missing = [k for k in _ARRAYS + ("dimension",) if k not in data]
    if missing:
        raise ModelError(f"the archive lacks {', '.join(missing)}; write it again with "
                         f"`spaceframe convert`", path=source)
    units = str(data.get("units", "m"))
    if units not in UNITS:
        raise ModelError(f"unknown units {units!r}; use one of {', '.join(UNITS)}", path=source)
    n, m = len(data["joint_ids"]), len(data["member_ids"])
    ends = np.asarray(data["ends"])
    if ends.size and (ends.min() < 0 or ends.max() >= n):
        raise ModelError("a member end points outside the joint list; the archive is damaged: "
                         "write it again from the model", path=source)
    tags = {"joint": {}, "member": {}}
    props = {}
    for key, value in data.items():
        kind, _, name = key.partition(":")
        if kind in ("joint_tag", "member_tag"):
            tags[kind.split("_")[0]][name] = tuple(str(v) for v in value)
        elif kind == "member_property":
            props[name] = np.asarray(value, float)
    frame = Frame(joint_ids=tuple(data["joint_ids"].tolist()), coords=data["coords"],
                  member_ids=tuple(data["member_ids"].tolist()), ends=ends,
                  restraint_joint=data["restraint_joint"], restraint_dir=data["restraint_dir"],
                  dimension=int(data["dimension"]), name=str(data.get("name", "")),
                  units=units, source=source, joint_tags=tags["joint"],
                  member_tags=tags["member"], member_properties=props,
                  prestress=np.asarray(data["prestress"], float) if "prestress" in data else None)
    if len(frame.member_ids) != m:  # pragma: no cover - Frame checks the lengths
        raise ModelError("the archive's member arrays differ in length", path=source)
    return checked(frame, tol=tol)


def dump_npz(frame: Frame, path, *, overwrite: bool = False) -> None:
    """Write ``frame`` as a ``.npz`` model archive (uncompressed: fastest to read).

    Never writes over the file the frame came from, nor over an existing file
    unless ``overwrite``.
    """
    from .native.write import check_model_output

    target = check_model_output(frame, path, overwrite)
    arrays = {
        "format": np.array(FORMAT), "dimension": np.array(frame.dimension),
        "name": np.array(frame.name), "units": np.array(frame.units),
        "joint_ids": np.array(frame.joint_ids, dtype=str),
        "member_ids": np.array(frame.member_ids, dtype=str),
        "coords": frame.coords, "ends": frame.ends,
        "restraint_joint": frame.restraint_joint, "restraint_dir": frame.restraint_dir,
    }
    for name, labels in frame.joint_tags.items():
        arrays[f"joint_tag:{name}"] = np.array(labels, dtype=str)
    for name, labels in frame.member_tags.items():
        arrays[f"member_tag:{name}"] = np.array(labels, dtype=str)
    for name, values in frame.member_properties.items():
        arrays[f"member_property:{name}"] = np.asarray(values, float)
    if frame.prestress is not None:
        arrays["prestress"] = np.asarray(frame.prestress, float)
    write_file(target, lambda fh: np.savez(fh, **arrays), binary=True, overwrite=overwrite,
               option="overwrite=True")
    if frame.loads is not None:
        warnings.warn(f"{target}: the .npz form holds no load cases; the model's loads are "
                      f"not in it (keep them in the TOML or JSON file)", SpaceframeWarning,
                      stacklevel=2)
