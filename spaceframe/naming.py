"""Ids and counts in words: natural order of ids, and "1 mechanism" / "2 mechanisms".

One home for the small rules every sentence of the output follows, so the
audit's descriptions, the text report, the pictures, the HTML report and the
desktop window read the same.
"""

from __future__ import annotations

import re
from pathlib import Path
from typing import Iterable

import numpy as np

from .tolerances import DISPLAY

__all__ = ["natural_key", "natural_sorted", "count", "join_words", "numbered_only", "is_imported",
           "placed_joints", "joint_label", "xyz", "measure", "direction_words", "fixed_decimals"]

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


#: Model files written by hand or by spaceframe: their joint ids are the user's own.
_NATIVE = (".toml", ".json", ".npz")
#: Joint tags that say where an imported joint is in its source, and their words.
_ORIGIN_TAGS = (("ifc_name", "IFC name"), ("layer", "layer"))


def is_imported(frame) -> bool:
    """Whether the frame was read from geometry (a mesh, drawing, CSV or IFC file)."""
    return frame.source is not None and Path(frame.source).suffix.lower() not in _NATIVE


def placed_joints(frame) -> bool:
    """The one rule of when joints are named with where they are (:func:`joint_label`).

    True when the ids say nothing of where a joint is: ids that only number the
    joints (:func:`numbered_only`: ``J1, J2, ...`` with no tags), or any frame
    imported from geometry (:func:`is_imported`), whose ids were generated.
    """
    return is_imported(frame) or numbered_only(frame.joint_ids, tagged=bool(frame.joint_tags))


def joint_label(frame, j: int, size: float | None = None) -> str:
    """Joint ``j``'s id with its coordinates, and its IFC name or drawing layer if it has one.

    ``J59 (2.5, 0, 1.5)``, ``J3 (3000, 0; layer WEB)``: coordinates by :func:`xyz`
    (``size``: the frame's size, :meth:`Frame.size`, computed when not given).
    The one home of a joint's label: the mode descriptions, the text, the
    bracing list and the report all write it so, where :func:`placed_joints`.

    Examples
    --------
    >>> from spaceframe import Frame
    >>> f = Frame.from_arrays([[0, 0], [2.5, 1.5]], [[0, 1]], joint_ids=["J1", "J2"])
    >>> joint_label(f, 1)
    'J2 (2.5, 1.5)'
    """
    size = frame.size() if size is None else size
    parts = [xyz(frame.coords[j], size)]
    for tag, words in _ORIGIN_TAGS:
        labels = frame.joint_tags.get(tag)
        if labels and labels[j]:
            parts.append(f"{words} {labels[j]}")
    return f"{frame.joint_ids[j]} ({'; '.join(parts)})"


def xyz(point, size: float = 1.0) -> str:
    """Coordinates as ``2.5, 0, 1.5``, each by :func:`measure`.

    Examples
    --------
    >>> xyz([2.5, 0.0, 1.5], 12.0), xyz([3000.0, -1e-12], 30000.0), xyz([0.12345], 1.0)
    ('2.5, 0, 1.5', '3000, 0', '0.123')
    """
    return ", ".join(measure(c, size) for c in point)


def measure(value: float, size: float = 1.0, *, up: bool = False) -> str:
    """A coordinate or length of a frame of size ``size`` in figures: to four
    significant figures of ``size`` (:func:`fixed_decimals`: one fixed point for a
    frame, trailing zeros dropped, never an exponent; ``|x| <= Display.zero_coordinate * size``
    written as 0).  With ``up`` the value is rounded up at that resolution, for a
    threshold the value must pass (``--within 1921`` for a member 1920.9 long).

    Examples
    --------
    >>> measure(1920.94, 10800.0), measure(1920.94, 10800.0, up=True), measure(2.4, 9.0)
    ('1921', '1921', '2.4')
    >>> measure(1920.04, 10800.0, up=True), measure(-0.001, 12.0)
    ('1921', '0')
    """
    size = abs(float(size)) or 1.0
    k = fixed_decimals([size])
    c = float(value)
    if abs(c) <= DISPLAY.zero_coordinate * size:
        c = 0.0
    c = np.ceil(c * 10 ** k) / 10 ** k if up else round(c, k)
    text = f"{c:.{k}f}".rstrip("0").rstrip(".") if k else f"{c:.0f}"
    return "0" if text in ("-0", "") else text


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
