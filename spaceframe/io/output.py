"""The one policy for files spaceframe writes.

Nothing the user wrote is ever overwritten or lost: an output may not be one
of the command's inputs, an existing output is replaced only when the caller
allows it, and a replacement is written to a temporary file first and moved
into place, so an interrupted write leaves the old file whole.

Messages here speak of the library's arguments; the command line adds the
name of its own option (``--force``) when it reports an
:class:`~spaceframe.errors.OutputExistsError`.
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path
from typing import IO, Callable, Iterable

from ..errors import ModelError, OutputExistsError

__all__ = ["check_output", "write_text", "write_file"]


def _same_file(a: str, b: str) -> bool:
    if os.path.realpath(a) == os.path.realpath(b):
        return True
    try:
        return os.path.samefile(a, b)
    except OSError:
        return False


def check_output(path, *, inputs: Iterable = (), source=None, overwrite: bool = False,
                 suffixes: Iterable[str] | None = None, what: str = "the output",
                 option: str | None = None) -> str:
    """Check that ``path`` may be written, and return it as a string.

    Parameters
    ----------
    path : path-like
        The file to be written.
    inputs : iterable of path-like, optional
        Files the command reads; none of them is ever written over (``None``
        entries are skipped).
    source : path-like, optional
        The file the frame being written was read from; never written over
        either, and named as such in the message.
    overwrite : bool, default False
        Whether an existing file (not an input) may be replaced.
    suffixes : iterable of str, optional
        The suffixes allowed (lower case, with the dot), e.g. ``(".gif", ".png")``.
    what : str
        What the file holds, for the message ("the picture", "the results").
    option : str, optional
        The caller's argument that allows replacing a file (``"overwrite=True"``),
        named by the :class:`~spaceframe.errors.OutputExistsError`.

    Raises
    ------
    ModelError
        For a wrong suffix, a path that is an input, a directory, or a folder
        that does not exist.
    OutputExistsError
        For an existing file when ``overwrite`` is false.
    """
    target = os.fspath(path)
    if suffixes is not None:
        suffixes = tuple(suffixes)
        if Path(target).suffix.lower() not in suffixes:
            raise ModelError(f"{what} is written as {_listing(suffixes)}; give the file one of "
                             f"those suffixes", path=target)
    if source is not None and _same_file(os.fspath(source), target):
        raise ModelError("is the file this frame was read from and is never overwritten; "
                         "write to another file", path=target)
    for given in inputs:
        if given is not None and _same_file(os.fspath(given), target):
            raise ModelError("is an input of this command and is never overwritten; write to "
                             "another file", path=target)
    if os.path.isdir(target):
        raise ModelError("is a folder; give a file name to write", path=target)
    folder = os.path.dirname(os.path.abspath(target))
    if not os.path.isdir(folder):
        raise ModelError(f"the folder {folder} does not exist; create it or write elsewhere",
                         path=target)
    if os.path.exists(target) and not overwrite:
        raise OutputExistsError(target, option=option)
    return target


def write_text(path, text: str, *, overwrite: bool = False, option: str | None = None) -> None:
    """Write ``text`` (UTF-8, ``\\n`` line ends) to ``path`` safely (see :func:`write_file`)."""
    write_file(path, lambda fh: fh.write(text), overwrite=overwrite, option=option)


def write_file(path, fill: Callable[[IO], object], *, binary: bool = False,
               overwrite: bool = False, option: str | None = None) -> None:
    """Write a file safely: ``fill(fh)`` writes the content to an open file.

    Without ``overwrite`` the file is created exclusively, so a file made by
    someone else since the check is never replaced (a write that fails part
    way removes what it made).  With it, the content goes to a temporary file
    in the same folder that is then moved over the old one, so an interrupted
    write leaves the old file whole.

    Parameters
    ----------
    path : path-like
    fill : callable ``(file) -> object``
        Writes the content (``fh.write(text)``, ``numpy.savez(fh, ...)``).
    binary : bool, default False
        Open the file in binary mode; else as UTF-8 text with ``\\n`` line ends.
    overwrite : bool, default False
    option : str, optional
        As in :func:`check_output`.

    Raises
    ------
    OutputExistsError
        When the file exists and ``overwrite`` is false (naming ``option``).
    """
    target = os.fspath(path)
    kw = {} if binary else {"encoding": "utf-8", "newline": "\n"}
    suffix = "b" if binary else ""
    if not overwrite:
        try:
            fh = open(target, "x" + suffix, **kw)
        except FileExistsError:
            raise OutputExistsError(target, option=option) from None
        try:
            with fh:
                fill(fh)
        except BaseException:
            os.unlink(target)
            raise
        return
    folder = os.path.dirname(os.path.abspath(target))
    fd, tmp = tempfile.mkstemp(dir=folder, prefix=".spaceframe-", suffix=".tmp")
    try:
        with os.fdopen(fd, "w" + suffix, **kw) as fh:
            fill(fh)
        os.replace(tmp, target)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise


def _listing(suffixes) -> str:
    return suffixes[0] if len(suffixes) == 1 else ", ".join(suffixes[:-1]) + " or " + suffixes[-1]
