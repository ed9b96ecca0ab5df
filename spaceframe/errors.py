"""The one root exception of spaceframe, and the warning class.

Every error a user can cause derives from :class:`SpaceframeError`, which is
also a :class:`ValueError`.  Its message is written for the person who made
the model: it names the file, the line where known, the joint or member id,
what is wrong and what to do.  The command line turns it into exit status 2
without a traceback.
"""

from __future__ import annotations

__all__ = ["SpaceframeError", "ModelError", "OutputExistsError", "MissingExtraError",
           "InternalError", "SpaceframeWarning", "where"]


def where(path: str | None = None, line: int | None = None) -> str:
    """Return ``"file:line: "`` (or the parts known) to prefix a message."""
    if path is None:
        return ""
    return f"{path}:{line}: " if line is not None else f"{path}: "


class SpaceframeError(ValueError):
    """Root of every error a user can cause (bad model, bad option)."""


class ModelError(SpaceframeError):
    """A model file or array set that cannot describe a frame.

    Parameters
    ----------
    message : str
        What is wrong and what to do about it.
    path : str, optional
        The file the model came from.
    line : int, optional
        1-based line of the file where the problem stands, where known.
    item : str, optional
        The joint, member or support id concerned.
    kind : str, optional
        What ``item`` is: ``"joint"``, ``"member"``, ``"support"``, ``"key"``...
        Checks that know no file (:mod:`spaceframe.validation`) give the item
        and its kind; the reader adds the file and line
        (:func:`spaceframe.io.sourcelines.locate`).
    marks : sequence of (int, str, str), optional
        ``(offset, kind, id)``: places in ``message``, just after another
        item's id, where the reader may note that item's line.
    """

    def __init__(self, message: str, *, path: str | None = None,
                 line: int | None = None, item: str | None = None,
                 kind: str | None = None, marks=()):
        self.path, self.line, self.item, self.reason = path, line, item, message
        self.kind, self.marks = kind, tuple(marks)
        super().__init__(where(path, line) + message)


class OutputExistsError(ModelError):
    """An output file exists and the caller did not allow replacing it.

    The message names the file and says how to go on in the library's terms;
    the command line adds its own option for replacing the file.  ``option``
    names the argument that allows it where the caller has one
    (``"overwrite=True"``).
    """

    def __init__(self, path: str, *, option: str | None = None):
        self.option = option
        how = f"pass {option}" if option else "allow replacing it"
        super().__init__(f"already exists and is not overwritten; choose another name, or {how}",
                         path=path)


class MissingExtraError(SpaceframeError):
    """An optional part of spaceframe is used but its libraries are not installed.

    Raised on first use by :func:`spaceframe._optional.require`; the message
    names the extra to install (``pip install 'spaceframe[pictures]'``).

    Parameters
    ----------
    module : str
        The module that could not be imported (the optional library, or one
        it needs).
    extra : str
        The extra of the ``spaceframe`` package that installs it.
    purpose : str
        What needs it, as the start of a sentence ("pictures and animations").
    """

    def __init__(self, module: str, extra: str, purpose: str):
        self.module, self.extra = module, extra
        super().__init__(f"{purpose} need the optional package {module.split('.')[0]!r}, "
                         f"which is not installed; install it with: "
                         f"pip install 'spaceframe[{extra}]'")


class InternalError(RuntimeError):
    """A failure inside spaceframe that the input did not cause.

    A factorisation that breaks down, a check inside the engine that does not
    hold: the model was read and is valid, and the fault is in the method or
    its numerical limits.  It is deliberately not a :class:`SpaceframeError`
    (the command line exits 3 for it, not 2) and carries what was computed
    before the failure, as scipy's ``ArpackNoConvergence`` carries its partial
    eigenvectors.

    Parameters
    ----------
    message : str
        What failed, in the engine's terms.
    stage : str
        The step that failed (``"factorisation"``, ``"mechanism basis"``...).
    partial : dict, optional
        What had been computed before it (counts, arrays, the gap), by name.
    """

    def __init__(self, message: str, *, stage: str, partial: dict | None = None):
        self.stage = stage
        self.partial = dict(partial or {})
        super().__init__(message)


class SpaceframeWarning(UserWarning):
    """Something the user should know that does not stop the audit.

    Like :class:`ModelError` it may carry the ``item``, its ``kind`` and
    ``marks`` for the reader to add the file and lines.
    """

    def __init__(self, message: str = "", *, item: str | None = None,
                 kind: str | None = None, marks=()):
        self.item, self.kind, self.marks = item, kind, tuple(marks)
        super().__init__(message)
