"""Reading model files: one table from file suffix to reader.

Each format lives in its own module and adds its reader to :data:`READERS`
(and a line finder to :data:`LINE_FINDERS`); :func:`load` only dispatches.
Every reader returns a :class:`~spaceframe.model.Frame` that has passed
:func:`~spaceframe.validation.check_frame`.
"""

from __future__ import annotations

import os
from pathlib import Path

from ..errors import ModelError
from ..model import Frame
from ..tolerances import DEFAULT, Tolerances
from . import native

__all__ = ["load", "find_line", "READERS", "LINE_FINDERS"]

#: File suffix (lower case) -> ``reader(path, *, tol) -> Frame``.
READERS = {".toml": native.read_toml, ".json": native.read_json}

#: File suffix (lower case) -> ``finder(text, kind, id) -> line or None``, used by messages.
LINE_FINDERS = {".toml": native.toml_line, ".json": native.json_line}


def _suffixes() -> str:
    names = sorted(READERS)
    return names[0] if len(names) == 1 else ", ".join(names[:-1]) + " or " + names[-1]


def load(path, *, tol: Tolerances = DEFAULT) -> Frame:
    """Read a model file into a checked :class:`Frame`, choosing the reader by suffix.

    Parameters
    ----------
    path : str or os.PathLike
        The model file; its suffix (any case) picks the reader from
        :data:`READERS`.
    tol : Tolerances, optional
        Passed to the reader's checks.

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
    return reader(source, tol=tol)


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
    Reads the file again and searches it; meant for messages only.
    """
    finder = LINE_FINDERS.get(Path(os.fspath(path)).suffix.lower())
    if finder is None:
        return None
    try:
        text = Path(os.fspath(path)).read_text(encoding="utf-8-sig")
    except (OSError, UnicodeDecodeError):
        return None
    return finder(text, kind, item)
