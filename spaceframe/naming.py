"""Ids and counts in words: natural order of ids, and "1 mechanism" / "2 mechanisms".

One home for the small rules every sentence of the output follows, so the
audit's descriptions, the text report, the pictures, the HTML report and the
desktop window read the same.
"""

from __future__ import annotations

import re
from typing import Iterable

import numpy as np

from .tolerances import DISPLAY

__all__ = ["natural_key", "natural_sorted", "count", "join_words", "numbered_only", "placed", "xyz",
           "direction_words", "fixed_decimals"]

_DIGITS = re.compile(r"(\d+)")


def natural_key(text: str) -> tuple:
    """Sort key that orders the digit runs of ``text`` by value: ``L2 < L10``.

    Examples
    --------
    >>> sorted(["F2.L10", "F2.L5", "F10.L1", "F2.L6"], key=natural_key)
    ['F2.L5', 'F2.L6', 'F2.L10', 'F10.L1']
    """
    parts = _DIGITS.split(str(text))
    # (0, number) for digit runs, (1, text) for the rest: never compares an int with a str
    return tuple((0, int(p), "") if i % 2 else (1, 0, p) for i, p in enumerate(parts))


def natural_sorted(items: Iterable[str]) -> list[str]:
    """``items`` in natural order (:func:`natural_key`); ties keep their order."""
    return sorted(items, key=natural_key)


def count(n: int, word: str, plural: str | None = None) -> str:
    """``n`` and ``word`` in agreement: ``count(1, "mechanism") == "1 mechanism"``.

    Parameters
    ----------
    n : int
    word : str
        The singular.
    plural : str, optional
        The plural when it is not ``word + "s"`` (``count(2, "state of self-stress",
        "states of self-stress")``).

    Examples
    --------
    >>> count(1, "mechanism"), count(2, "mechanism"), count(0, "joint")
    ('1 mechanism', '2 mechanisms', '0 joints')
    """
    return f"{n} {word if n == 1 else (plural or word + 's')}"


def join_words(items: list[str], most: int | None = None) -> str:
    """``a, b and c``; with ``most``, at most that many and then ``and k more``.

    Examples
    --------
    >>> join_words(["L1", "L2", "L3"]), join_words(["a", "b", "c", "d"], most=2)
    ('L1, L2 and L3', 'a, b and 2 more')
    """
    items = list(items)
    if not items:
        return ""
    if most is not None and len(items) > most:
        return ", ".join(items[:most]) + f" and {len(items) - most} more"
    return ", ".join(items[:-1]) + (" and " if len(items) > 1 else "") + items[-1]


def numbered_only(ids, tagged: bool = False) -> bool:
    """Do ``ids`` only number the items (``J1, J2, ...`` as a mesh import names joints)?

    True when every id is one common prefix followed by digits and the items
    carry no tags (``tagged`` False): such ids say nothing of where an item is.

    Examples
    --------
    >>> numbered_only(["J1", "J2", "J59"]), numbered_only(["L0", "U1"]), numbered_only(["A"])
    (True, False, False)
    """
    ids = [str(i) for i in ids]
    if tagged or not ids:
        return False
    prefixes = {i.rstrip("0123456789") for i in ids}
    return len(prefixes) == 1 and all(i[len(next(iter(prefixes))):].isdigit() for i in ids)


def placed(ident: str, point, size: float = 1.0) -> str:
    """``ident`` with its coordinates: ``J59 (2.5, 0, 1.5)`` (3 significant figures; values
    with ``|x| <= Display.zero_coordinate * size`` written as 0)."""
    return f"{ident} ({xyz(point, size)})"


def xyz(point, size: float = 1.0) -> str:
    """Coordinates as ``2.5, 0, 1.5`` (3 significant figures; tiny values as 0)."""
    return ", ".join(f"{0.0 if abs(c) <= DISPLAY.zero_coordinate * size else c:.3g}"
                     for c in point)


def direction_words(v, *, signed: bool = True) -> str:
    """A direction in words: ``along +x`` when nearly along an axis (``along x`` with
    ``signed`` false), else ``along (+0.50, +0.87, +0.00)``.

    "Nearly" is ``|v_a| >= Display.along_axis * ||v||`` for the largest component.

    Examples
    --------
    >>> direction_words([0.0, -1.0, 0.01]), direction_words([0.0, -1.0, 0.0], signed=False)
    ('along -y', 'along y')
    >>> direction_words([0.6, 0.8, -0.001])
    'along (+0.60, +0.80, +0.00)'
    """
    v = np.asarray(v, dtype=float)
    a = int(np.argmax(np.abs(v)))
    if abs(v[a]) >= DISPLAY.along_axis * np.linalg.norm(v):
        return f"along {('+' if v[a] > 0 else '-') if signed else ''}{'xyz'[a]}"
    # a component that rounds to zero is written +0.00, never -0.00
    return "along (" + ", ".join(f"{0.0 if abs(c) < 0.005 else c:+.2f}" for c in v) + ")"


def fixed_decimals(values) -> int:
    """Decimals that show four significant figures of the largest value in ``values``:
    a table's numbers then share one fixed point (``27.00`` beside ``33.75``).

    Examples
    --------
    >>> fixed_decimals([27.0, 33.75]), fixed_decimals([4000.0]), fixed_decimals([])
    (2, 0, 0)
    """
    top = float(np.max(np.abs(values))) if np.size(values) else 0.0
    return int(min(6, max(0, 3 - np.floor(np.log10(top))))) if top > 0 else 0
