"""Reading model files: one table from file suffix to reader.

Each format lives in its own module and adds its reader to :data:`READERS`
(and a line finder to :data:`LINE_FINDERS`); :func:`load` only dispatches.
Every reader returns a :class:`~spaceframe.model.Frame` that has passed
:func:`~spaceframe.validation.check_frame`.
"""

from __future__ import annotations

import inspect
import os
from pathlib import Path

from ..errors import ModelError
from ..model import Frame
from ..tolerances import DEFAULT, Tolerances
from . import native
from .binary import dump_npz, read_npz
from .csvpair import read_csv_pair
from .drawing import DRAWING_SUFFIXES, read_drawing
from .ifc import IFC_SUFFIXES, dump_ifc, read_ifc
from .mesh import MESH_SUFFIXES, read_mesh
from .output import check_output

__all__ = ["load", "load_planar", "save", "find_line", "READERS", "LINE_FINDERS", "WRITERS"]

#: File suffix (lower case) -> ``reader(path, *, tol) -> Frame``.
READERS = {".toml": native.read_toml, ".json": native.read_json, ".npz": read_npz,
           ".csv": read_csv_pair,
           **{s: read_mesh for s in MESH_SUFFIXES}, **{s: read_drawing for s in DRAWING_SUFFIXES},
           **{s: read_ifc for s in IFC_SUFFIXES}}

#: File suffix (lower case) -> ``writer(frame, path, *, overwrite)``: the native formats and IFC.
WRITERS = {".toml": native.dump_toml, ".json": native.dump_json, ".npz": dump_npz,
           **{s: dump_ifc for s in IFC_SUFFIXES}}

#: Reading options and how the command line spells them, for messages.
OPTION_NAMES = {"units": "--units", "layers": "--layers", "split": "--no-split",
                "merge": "--merge"}

#: File suffix (lower case) -> ``finder(text, kind, id) -> line or None``, used by messages.
LINE_FINDERS = {".toml": native.toml_line, ".json": native.json_line}


def _suffixes() -> str:
    names = sorted(READERS)
    return names[0] if len(names) == 1 else ", ".join(names[:-1]) + " or " + names[-1]


def load(path, *, tol: Tolerances = DEFAULT, **options) -> Frame:
    """Read a model file into a checked :class:`Frame`, choosing the reader by suffix.

    Parameters
    ----------
    path : str or os.PathLike
        The model file; its suffix (any case) picks the reader from
        :data:`READERS`.
    tol : Tolerances, optional
        Passed to the reader's checks.
    **options
        Reading options for the formats that take them, None meaning not
        given: ``units`` (files that carry no unit: STL, OBJ, PLY, OFF, and
        drawings that declare none), ``layers``, ``merge`` and ``split``
        (drawings; ``merge`` and ``split`` also IFC building models).

    Returns
    -------
    frame : Frame

    Raises
    ------
    ModelError
        For a path that does not exist or is a directory, a suffix no reader
        handles, and whatever the reader finds wrong in the file.

    Examples
    --------
    >>> import spaceframe.io
    >>> spaceframe.io.load("no/such/model.toml")
    Traceback (most recent call last):
    ...
    spaceframe.errors.ModelError: no/such/model.toml: no such file; check the path and its spelling
    """
    source = os.fspath(path)
    p = Path(source)
    if p.is_dir():
        raise ModelError(f"is a directory, not a model file; give the path of a "
                         f"{_suffixes()} model file", path=source)
    if not p.exists():
        raise ModelError("no such file; check the path and its spelling", path=source)
    reader = READERS.get(p.suffix.lower())
    if reader is None:
        kind = f"'{p.suffix}' files" if p.suffix else "files without a suffix"
        raise ModelError(f"cannot read {kind}; spaceframe reads {_suffixes()} model files: "
                         f"give the file one of those suffixes if that is what it holds",
                         path=source)
    given = {k: v for k, v in options.items() if v is not None}
    accepted = inspect.signature(reader).parameters
    wrong = [k for k in given if k not in accepted]
    if wrong:
        takers = [s for s, r in READERS.items() if wrong[0] in inspect.signature(r).parameters]
        raise ModelError(f"{OPTION_NAMES.get(wrong[0], wrong[0])} does not apply to "
                         f"'{p.suffix}' files (it applies to {', '.join(takers) or 'none'}); "
                         f"leave it out", path=source)
    return reader(source, tol=tol, **given)


def load_planar(path, options: dict | None = None, *, tol: Tolerances = DEFAULT,
                **given) -> Frame:
    """Read a plane frame: a model file, or a drawing read with ``options``.

    ``options`` are the ``[drawing]`` table of an extrusion spec (see
    :func:`spaceframe.io.drawing.read_drawing`); they are ignored for model
    files.  ``given`` are the command line's reading options (as for
    :func:`load`); they override the table's.
    """
    source = os.fspath(path)
    given = {k: v for k, v in given.items() if v is not None}
    if Path(source).suffix.lower() in DRAWING_SUFFIXES and Path(source).is_file():
        return read_drawing(source, tol=tol, **{**(options or {}), **given})
    return load(source, tol=tol, **given)


def save(frame: Frame, path, *, overwrite: bool = False, inputs=()) -> None:
    """Write a frame as a model file: ``.toml``, ``.json``, ``.npz`` or ``.ifc``, by the suffix.

    Parameters
    ----------
    frame : Frame
    path : str or os.PathLike
    overwrite : bool, optional
        Replace an existing file (never one of ``inputs`` nor the frame's source).
    inputs : sequence of path, optional
        Files the frame was made from; none of them is ever written over.

    Raises
    ------
    ModelError
        For another suffix, a path that is one of the inputs (see
        :func:`~spaceframe.io.output.check_output`).
    OutputExistsError
        For an existing file without ``overwrite``.
    """
    target = check_output(path, inputs=inputs, overwrite=overwrite, suffixes=tuple(WRITERS),
                          what="a model")
    WRITERS[Path(target).suffix.lower()](frame, target, overwrite=overwrite)


def find_line(path, kind: str, item: str) -> int | None:
    """The 1-based line of an item in a model file, or None where it cannot be found.

    Parameters
    ----------
    path : str or os.PathLike
        The model file; its suffix picks the finder from :data:`LINE_FINDERS`.
    kind : {"joint", "member", "support", "key"}
    item : str
        The id (or, for ``"key"``, the top-level key).

    Notes
    -----
    Reads the file again and searches it (:mod:`spaceframe.io.sourcelines`);
    meant for messages only.
    """
    finder = LINE_FINDERS.get(Path(os.fspath(path)).suffix.lower())
    if finder is None:
        return None
    try:
        text = Path(os.fspath(path)).read_text(encoding="utf-8-sig")
    except (OSError, UnicodeDecodeError):
        return None
    return finder(text, kind, item)
