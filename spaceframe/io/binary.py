"""The compact binary model format: one NumPy ``.npz`` archive per frame.

For frames of hundreds of thousands to millions of members, where text
parsing would dominate the audit.  The archive holds the frame's arrays as
they are (``coords``, ``ends``, ``restraint_joint``, ``restraint_dir``), the
ids as Unicode string arrays, ``dimension``, ``name`` and ``units``, and one
array per tag (``joint_tag:<name>``, ``member_tag:<name>``) and member
property (``member_property:<name>``), and the load set when the model has
one (``loads:...`` entries: :func:`_load_arrays`).  It is read with
``numpy.load(..., allow_pickle=False)``: nothing in it can run code.  A
``format`` entry names the layout so later versions can read older files.

The same checks as for text models run on reading
(:func:`~spaceframe.validation.check_frame`), so a hand-made archive with a
member to a missing joint is refused with a message, not a traceback.
"""

from __future__ import annotations

import os
import zipfile

import numpy as np

from ..errors import ModelError
from ..loads import FORCE_UNITS, Combination, LoadCase, LoadSet
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
                  prestress=np.asarray(data["prestress"], float) if "prestress" in data else None,
                  loads=_read_loads(data, int(data["dimension"]), source))
    if len(frame.member_ids) != m:  # pragma: no cover - Frame checks the lengths
        raise ModelError("the archive's member arrays differ in length", path=source)
    if frame.loads is not None:
        try:        # every loaded joint and combined case named, as in a model file
            frame.loads.applied(frame)
        except ModelError as exc:
            raise ModelError(f"its loads do not fit its frame: {exc}; the archive is damaged: "
                             f"write it again from the model", path=source,
                             item=exc.item) from None
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
    arrays.update(_load_arrays(frame.loads, frame.dimension))
    write_file(target, lambda fh: np.savez(fh, **arrays), binary=True, overwrite=overwrite,
               option="overwrite=True")


def _load_arrays(loads: LoadSet | None, dimension: int) -> dict:
    """The archive's entries for a load set (none without one).

    ``loads:force_units``; ``loads:cases`` (names, in order) and for the i-th
    case ``loads:case:<i>:joints`` (ids) and ``loads:case:<i>:forces``
    ``(p, dimension)``; ``loads:combinations`` and for the i-th
    ``loads:combination:<i>:cases`` and ``loads:combination:<i>:factors``;
    ``loads:self_weight`` and ``loads:notional`` when set, and
    ``loads:notional_cases`` when the notional load is limited to some cases.
    Entries are numbered, not named, so that any case name is safe.
    """
    if loads is None:
        return {}
    out = {"loads:force_units": np.array(loads.force_units),
           "loads:cases": np.array([c.name for c in loads.cases], dtype=str),
           "loads:combinations": np.array([c.name for c in loads.combinations], dtype=str)}
    for i, case in enumerate(loads.cases):
        out[f"loads:case:{i}:joints"] = np.array(case.joints, dtype=str)
        out[f"loads:case:{i}:forces"] = np.asarray(case.forces, float).reshape(-1, dimension)
    for i, combo in enumerate(loads.combinations):
        out[f"loads:combination:{i}:cases"] = np.array([k for k, _ in combo.factors], dtype=str)
        out[f"loads:combination:{i}:factors"] = np.array([v for _, v in combo.factors], float)
    for key in ("self_weight", "notional"):
        if getattr(loads, key) is not None:
            out[f"loads:{key}"] = np.array(float(getattr(loads, key)))
    if loads.notional_cases is not None:
        out["loads:notional_cases"] = np.array(loads.notional_cases, dtype=str)
    return out


def _read_loads(data: dict, dimension: int, source) -> LoadSet | None:
    """The load set of :func:`_load_arrays` back, or None when the archive has none."""
    if "loads:force_units" not in data:
        return None
    units = str(data["loads:force_units"])
    if units not in FORCE_UNITS:
        raise ModelError(f"unknown force units {units!r} in its loads; use one of "
                         f"{', '.join(FORCE_UNITS)}", path=source)

    def entry(key):
        if key not in data:
            raise ModelError(f"the archive's loads lack {key}; write it again with "
                             f"`spaceframe convert`", path=source)
        return data[key]

    names = lambda key: [str(v) for v in np.atleast_1d(entry(key))]  # noqa: E731
    cases = []
    for i, name in enumerate(names("loads:cases")):
        joints = names(f"loads:case:{i}:joints")
        forces = np.asarray(entry(f"loads:case:{i}:forces"), float)
        if forces.shape != (len(joints), dimension):
            raise ModelError(f"load case {name!r} has {len(joints)} joints but forces of "
                             f"shape {forces.shape}; write the archive again", path=source,
                             item=name)
        cases.append(LoadCase(name, tuple(joints), forces))
    combos = []
    for i, name in enumerate(names("loads:combinations")):
        parts = names(f"loads:combination:{i}:cases")
        factors = np.atleast_1d(np.asarray(entry(f"loads:combination:{i}:factors"), float))
        if len(factors) != len(parts):
            raise ModelError(f"combination {name!r} has {len(parts)} cases and "
                             f"{len(factors)} factors; write the archive again",
                             path=source, item=name)
        combos.append(Combination(name, tuple(zip(parts, factors.tolist()))))
    scalar = lambda key: float(data[key]) if key in data else None  # noqa: E731
    return LoadSet(cases=tuple(cases), combinations=tuple(combos),
                   self_weight=scalar("loads:self_weight"), notional=scalar("loads:notional"),
                   notional_cases=(tuple(names("loads:notional_cases"))
                                   if "loads:notional_cases" in data else None),
                   force_units=units)
