"""A progress display for long work (renders), on the terminal only.

It draws with ``rich`` on stderr when stderr is a terminal and the user has
not asked for quiet; otherwise it says nothing, so pipes, logs and CI stay clean.
"""

from __future__ import annotations

import sys
from contextlib import contextmanager

from .._optional import require
from ..errors import MissingExtraError

__all__ = ["progress"]


@contextmanager
def progress(total: int, label: str, *, quiet: bool = False, stream=None):
    """Yield a function to call once per finished step of ``total``.

    Parameters
    ----------
    total : int
        Number of steps.
    label : str
        What is being done, shown before the bar.
    quiet : bool
        Show nothing.
    stream : file, optional
        Where to draw (default ``sys.stderr``); nothing is drawn unless it is a
        terminal.
    """
    stream = sys.stderr if stream is None else stream
    if quiet or not getattr(stream, "isatty", lambda: False)():
        yield lambda: None
        return
    try:
        console, bars = require("rich.console"), require("rich.progress")
    except MissingExtraError:  # the display is a courtesy; the work goes on without it
        yield lambda: None
        return
    columns = (bars.TextColumn("{task.description}"), bars.BarColumn(),
               bars.MofNCompleteColumn(), bars.TimeRemainingColumn())
    with bars.Progress(*columns, console=console.Console(file=stream), transient=True) as bar:
        task = bar.add_task(label, total=total)
        yield lambda: bar.advance(task)
