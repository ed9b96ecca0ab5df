"""Support selection rules: which joints a support goes on, said by position or by id.

Imported geometry (a mesh, a CSV pair, a drawing) has no supports, and a
model with hundreds of joints should not need them typed one by one.  A rule
says what is held and where, in one line::

    pin at z = min                 every translation held at the joints with the lowest z
    y at x = 0 within 10           y held at the joints within 10 (model units) of the plane x = 0
    xz at nearest 0 0 0            x and z held at the one joint nearest (0, 0, 0)
    z at J3, J4                    z held at joints J3 and J4 (by id)
    pin at id nearest              an id that reads like a keyword: say ``id`` first

The grammar, one rule a line (spaces free, case of keywords free)::

    rule      := held "at" selector
    held      := "pin" | axis letters ("x", "yz", ...) | "free"
    selector  := axis "=" value ["within" distance]   value: a number, "min" or "max"
               | "nearest" x y [z]                    commas and brackets allowed
               | "all"
               | ["id"] id ["," id ...]

``free`` removes any support at the selected joints.  A plane rule without
``within`` takes the joints with ``|coordinate - value| <= tol.select * size``
(:class:`~spaceframe.tolerances.Tolerances`).  Rules are applied in order;
a later rule replaces what an earlier one (or the model file) put on the same
joint.

The same selectors (the part after ``at``) say which planar joints an
extrusion spec means (:mod:`spaceframe.extrude`).

Rules come from the command line (``spaceframe audit MODEL --supports RULE``,
repeatable) and, for imported geometry, from a sidecar file beside the model,
``<model stem>.supports.toml``::

    supports = ["pin at z = min", "y at x = 0 within 10"]
"""

from __future__ import annotations

import os
import re
import tomllib
from dataclasses import dataclass
from pathlib import Path
from typing import Sequence

import numpy as np

from . import edit
from .errors import ModelError
from .model import Frame
from .suggest import did_you_mean
from .supports import AXES, restraint_rows
from .tolerances import DEFAULT, Tolerances

__all__ = ["Selector", "parse_selector", "select", "parse_rule", "apply_rules",
           "sidecar_path", "read_sidecar", "supports_for", "NATIVE_SUFFIXES"]

#: Suffixes of files that carry their own supports: no sidecar is read for them.
NATIVE_SUFFIXES = (".toml", ".json")

_GRAMMAR = ("a rule is 'HELD at WHERE': HELD is pin, axis letters such as yz, or free; WHERE is "
            "'z = min', 'x = 0 within 10', 'nearest 0 0 0', 'all' or joint ids 'J3, J4'")


@dataclass(frozen=True)
class Selector:
    """A parsed selector.

    Attributes
    ----------
    kind : {"plane", "nearest", "all", "ids"}
    axis : int
        For ``"plane"``: 0, 1 or 2 (x, y, z).
    value : float or {"min", "max"}
        For ``"plane"``: the coordinate of the plane.
    within : float or None
        For ``"plane"``: the distance given, else None (the default tolerance).
    point : tuple of float
        For ``"nearest"``.
    ids : tuple of str
        For ``"ids"``.
    text : str
        The selector as written, for messages.
    """

    kind: str
    text: str
    axis: int = 0
    value: object = 0.0
    within: float | None = None
    point: tuple[float, ...] = ()
    ids: tuple[str, ...] = ()


_NUM = r"[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?"
_PLANE = re.compile(rf"^([xyz])\s*=\s*(min|max|{_NUM})(?:\s+within\s+({_NUM}))?$", re.I)
_NEAREST = re.compile(r"^nearest\b(.*)$", re.I)


def parse_selector(text: str, *, path: str | None = None, line: int | None = None) -> Selector:
    """Parse the part of a rule after ``at`` (see the module docstring).

    Raises
    ------
    ModelError
        For an empty selector, a ``nearest`` without 2 or 3 numbers, or a
        negative ``within``.
    """
    raw = str(text).strip()
    at = dict(path=path, line=line)
    if not raw:
        raise ModelError(f"empty joint selection; {_GRAMMAR}", **at)
    m = _PLANE.match(raw)
    if m:
        value = m.group(2).lower()
        within = float(m.group(3)) if m.group(3) is not None else None
        if within is not None and within < 0:
            raise ModelError(f"selection {raw!r}: 'within' takes a distance >= 0", **at)
        return Selector("plane", raw, axis="xyz".index(m.group(1).lower()),
                        value=value if value in ("min", "max") else float(value), within=within)
    m = _NEAREST.match(raw)
    if m:
        numbers = re.findall(_NUM, m.group(1))
        rest = re.sub(_NUM, "", m.group(1)).strip(" ,()[]")
        if len(numbers) not in (2, 3) or rest:
            raise ModelError(f"selection {raw!r}: 'nearest' takes the 2 or 3 coordinates of a "
                             f"point, e.g. 'nearest 0 0 0'", **at)
        return Selector("nearest", raw, point=tuple(float(v) for v in numbers))
    if raw.lower() == "all":
        return Selector("all", raw)
    body = raw[3:] if raw.lower().startswith("id ") else raw
    ids = tuple(p.strip() for p in body.split(","))
    if not all(ids):
        raise ModelError(f"selection {raw!r}: an empty joint id between commas; {_GRAMMAR}", **at)
    return Selector("ids", raw, ids=ids)


def select(selector: Selector, frame: Frame, *, tol: Tolerances = DEFAULT,
           path: str | None = None, line: int | None = None) -> np.ndarray:
    """Indices of the joints of ``frame`` a selector picks, ``(k,) int`` in joint order.

    Raises
    ------
    ModelError
        For an id not in the frame (with the nearest id), an axis the frame
        does not have, a point of the wrong dimension, or a selection that
        picks no joint (with the nearest coordinate there is).

    Notes
    -----
    Cost O(n) for n joints (O(k) dict look-ups for ids).
    """
    at = dict(path=path, line=line)
    d, coords = frame.dimension, frame.coords
    if selector.kind == "ids":
        index = {j: i for i, j in enumerate(frame.joint_ids)}
        for jid in selector.ids:
            if jid not in index:
                raise ModelError(f"selection {selector.text!r} names joint {jid!r}, which is not "
                                 f"in the model{did_you_mean(jid, index)}; correct the id",
                                 item=jid, kind="joint", **at)
        return np.array(sorted({index[j] for j in selector.ids}), dtype=np.int64)
    if frame.n_joints == 0:
        raise ModelError(f"selection {selector.text!r}: the model has no joints", **at)
    if selector.kind == "all":
        return np.arange(frame.n_joints)
    if selector.kind == "nearest":
        if len(selector.point) != d:
            raise ModelError(f"selection {selector.text!r}: the model is {d}-dimensional; give "
                             f"{d} coordinates", **at)
        dist = np.linalg.norm(coords - np.array(selector.point), axis=1)
        return np.array([int(np.argmin(dist))], dtype=np.int64)
    if selector.axis >= d:
        raise ModelError(f"selection {selector.text!r}: a plane frame has axes x and y only", **at)
    values = coords[:, selector.axis]
    target = {"min": values.min(), "max": values.max()}.get(selector.value, selector.value)
    within = selector.within if selector.within is not None else tol.select * frame.size()
    picked = np.flatnonzero(np.abs(values - target) <= within)
    if picked.size == 0:
        near = values[np.argmin(np.abs(values - target))]
        axis = AXES[selector.axis]
        raise ModelError(f"selection {selector.text!r} picks no joint: the nearest has "
                         f"{axis} = {near:.6g}, {abs(near - target):.3g} {frame.units} away; "
                         f"widen it with 'within DISTANCE' or correct the value", **at)
    return picked


def parse_rule(text: str, *, path: str | None = None,
               line: int | None = None) -> tuple[str, Selector]:
    """Split ``"HELD at WHERE"`` into the support code and the :class:`Selector`.

    Examples
    --------
    >>> held, sel = parse_rule("pin at z = min")
    >>> held, sel.kind, sel.axis, sel.value
    ('pin', 'plane', 2, 'min')
    """
    head, sep, tail = str(text).partition(" at ")
    if not sep:
        raise ModelError(f"support rule {text!r} has no 'at'; {_GRAMMAR}", path=path, line=line)
    return head.strip().lower(), parse_selector(tail, path=path, line=line)


def apply_rules(frame: Frame, rules: Sequence[str], *, tol: Tolerances = DEFAULT,
                path: str | None = None, lines: Sequence[int | None] | None = None) -> Frame:
    """A copy of ``frame`` with the supports the rules say, applied in order.

    Parameters
    ----------
    frame : Frame
    rules : sequence of str
        Rules ``"HELD at WHERE"`` (see the module docstring).
    path, lines : optional
        Where the rules were written (a sidecar file and the line of each),
        for messages; without them a message names the rule.

    Returns
    -------
    frame : Frame
        The same joints and members; at every selected joint the support of
        the last rule that selects it replaces the one before.

    Raises
    ------
    ModelError
        For a rule that cannot be parsed, a bad support code, or a selection
        that picks nothing.
    """
    if not rules:
        return frame
    d = frame.dimension
    held: dict[int, np.ndarray] = {}
    for j in range(frame.n_joints):
        rows = frame.restraint_dir[frame.restraint_joint == j]
        if len(rows):
            held[j] = rows
    for k, rule in enumerate(rules):
        line = lines[k] if lines is not None else None
        code, selector = parse_rule(rule, path=path, line=line)
        picked = select(selector, frame, tol=tol, path=path, line=line)
        if code == "free":
            for j in picked:
                held.pop(int(j), None)
            continue
        try:
            rows = restraint_rows(code, d, joint=selector.text, tol=tol)
        except ModelError as exc:
            raise ModelError(f"support rule {rule!r}: {exc.reason}", path=path, line=line) from None
        for j in picked:
            held[int(j)] = rows
    unheld = edit.free_supports(frame, range(frame.n_joints))
    return edit.set_supports(unheld, {j: held[j] for j in sorted(held)})


def sidecar_path(model) -> Path:
    """``<folder>/<stem>.supports.toml`` beside a model file."""
    p = Path(os.fspath(model))
    return p.with_name(p.stem + ".supports.toml")


def read_sidecar(path) -> tuple[list[str], list[int | None]]:
    """The rules of a sidecar file and the line of each.

    Raises
    ------
    ModelError
        For a file that is not TOML or has no list ``supports`` of rules.
    """
    source = os.fspath(path)
    try:
        text = Path(source).read_text(encoding="utf-8-sig")
        doc = tomllib.loads(text)
    except (OSError, UnicodeDecodeError) as exc:
        raise ModelError(f"cannot be read ({exc}); check the file", path=source) from None
    except tomllib.TOMLDecodeError as exc:
        raise ModelError(f"not valid TOML ({exc}); fix the syntax", path=source) from None
    rules = doc.get("supports")
    if not (isinstance(rules, list) and all(isinstance(r, str) for r in rules)):
        raise ModelError('a supports file holds one list of rules, e.g. supports = '
                         '["pin at z = min"]; ' + _GRAMMAR, path=source)
    from .io.sourcelines import SourceLines

    where = SourceLines(text)
    start = where.line((), "supports") or 1
    return rules, [where.containing(rule, start) for rule in rules]


def supports_for(frame: Frame, model, rules: Sequence[str] = (), *,
                 tol: Tolerances = DEFAULT) -> Frame:
    """Apply a sidecar's rules (imported geometry only), then the given rules.

    This is what ``spaceframe audit MODEL --supports RULE`` does.  For a model
    whose suffix is not in :data:`NATIVE_SUFFIXES` the file
    :func:`sidecar_path` is read when it exists; its rules come first, so a
    rule on the command line has the last word.
    """
    model = os.fspath(model)
    if Path(model).suffix.lower() not in NATIVE_SUFFIXES:
        side = sidecar_path(model)
        if side.is_file():
            side_rules, side_lines = read_sidecar(side)
            frame = apply_rules(frame, side_rules, tol=tol, path=str(side), lines=side_lines)
    return apply_rules(frame, list(rules), tol=tol, path=None)

