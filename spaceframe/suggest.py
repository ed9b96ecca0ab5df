"""The one "did you mean" helper: the nearest of a set of valid words.

Every reader and option check that meets an unknown id, key or word offers
the closest valid one through this module, so the hint reads the same
everywhere.
"""

from __future__ import annotations

import difflib
from typing import Iterable

__all__ = ["closest", "did_you_mean"]


def closest(word: str, choices: Iterable[str]) -> str | None:
    """The valid choice nearest to ``word``, or None when none is near.

    Uses :func:`difflib.get_close_matches` (Ratcliff/Obershelp similarity at
    least 0.6), so the answer is deterministic for a given order of choices.
    """
    close = difflib.get_close_matches(str(word), [str(c) for c in choices], n=1)
    return close[0] if close else None


def did_you_mean(word: str, choices: Iterable[str]) -> str:
    """``" (did you mean 'x'?)"`` for the nearest choice, or ``""`` when none is near.

    Examples
    --------
    >>> did_you_mean("U2", ["U1", "U3", "L2"])
    " (did you mean 'U1'?)"
    >>> did_you_mean("Q", ["U1"])
    ''
    """
    near = closest(word, choices)
    return f" (did you mean {near!r}?)" if near is not None else ""
