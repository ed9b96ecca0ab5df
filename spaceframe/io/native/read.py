"""Reading the native model format (TOML or JSON) into a checked :class:`Frame`.

See :mod:`spaceframe.io.native` for the format.  Source lines come from
:mod:`spaceframe.io.sourcelines`, only when a message needs one.
"""

from __future__ import annotations

import contextlib
import gc
import json
import os
import re
import tomllib
import warnings
from itertools import chain
from pathlib import Path

import numpy as np

from ...errors import ModelError, SpaceframeWarning, where
from ...model import CARRIES, CARRIES_TAG, UNITS, Frame
from ...suggest import closest, did_you_mean
from ...supports import AXES, restraint_rows
from ...tolerances import DEFAULT, Tolerances
from .. import loads as _loads
from ..sourcelines import MODEL_TABLES, SourceLines, checked, toml_key
from .write import toml_id

__all__ = ["read_toml", "read_json", "frame_from_document", "toml_line", "json_line", "KEYS",
           "RESERVED_KEYS", "PROPERTIES"]

#: Top-level keys the format defines.
KEYS = ("name", "units", "dimension", "joints", "members", "supports", "tags",
        "properties", "prestress") + _loads.KEYS
#: Top-level keys reserved for later versions: accepted and ignored.
RESERVED_KEYS = ("groups", "notes")

#: Member properties the native format knows, with what each means.
PROPERTIES = {"EA": "axial stiffness, in any consistent unit (only ratios are used)"}

_KNOWN = frozenset(KEYS + RESERVED_KEYS)
_NUMBER = (int, float)

# --------------------------------------------------------------------- reading

def read_toml(path, *, tol: Tolerances = DEFAULT) -> Frame:
    """Read a TOML model file into a checked :class:`Frame`.

    Parameters
    ----------
    path : str or os.PathLike
        The model file.
    tol : Tolerances, optional
        Passed to the support and geometry checks.

    Returns
    -------
    frame : Frame
        Checked by :func:`~spaceframe.validation.check_frame`, its messages
        given the file and line (:func:`~spaceframe.io.sourcelines.checked`).

    Raises
    ------
    ModelError
        For a file that cannot be read, is not TOML, or does not describe a
        frame (see :func:`frame_from_document`).  A syntax error gives the
        line and column the parser reports.
    """
    source = os.fspath(path)
    text = _read_text(source)
    try:
        with _collector_paused():
            doc = _parse_toml(text)
    except tomllib.TOMLDecodeError as exc:
        raise _toml_syntax_error(str(exc), text, source) from None
    return frame_from_document(doc, path=source, text=text, tol=tol, syntax="toml")


def _parse_toml(text: str) -> dict:
    """Parse TOML with rtoml (a compiled parser, about 8 times faster) where it is installed.

    Any document rtoml refuses is parsed again by the standard library's
    ``tomllib``, whose error gives the line and column for the message; the
    two agree on every valid document.
    """
    try:
        import rtoml
    except ImportError:
        return tomllib.loads(text)
    try:
        return rtoml.loads(text)
    except (rtoml.TomlParsingError, ValueError, TypeError):
        return tomllib.loads(text)


def read_json(path, *, tol: Tolerances = DEFAULT) -> Frame:
    """Read a JSON model file (the structure of the TOML format) into a :class:`Frame`.

    Parameters and result as for :func:`read_toml`.

    Raises
    ------
    ModelError
        For a file that cannot be read, is not JSON, repeats a key in an
        object, or does not describe a frame (see :func:`frame_from_document`).
    """
    source = os.fspath(path)
    text = _read_text(source)
    repeats: list[tuple[dict, str]] = []

    def no_repeats(pairs):
        obj = dict(pairs)
        if len(obj) != len(pairs):
            seen = set()
            for key, _ in pairs:
                if key in seen:
                    repeats.append((obj, key))
                    break
                seen.add(key)
        return obj

    try:
        with _collector_paused():
            doc = json.loads(text, object_pairs_hook=no_repeats)
    except json.JSONDecodeError as exc:
        raise _json_syntax_error(exc, text, source) from None
    if repeats:
        raise _json_repeat_error(doc, repeats[0], text, source)
    return frame_from_document(doc, path=source, text=text, tol=tol, syntax="json")


@contextlib.contextmanager
def _collector_paused():
    """Pause Python's cyclic garbage collector while a parser builds a document.

    A parsed model is a tree of dicts and lists (no reference cycles), yet the
    hundreds of thousands of lists it holds trigger repeated collections that
    walk every one of them: pausing the collector cuts the TOML parser's time
    for a 100,000-member model by about a third.  It is restored as it was.
    """
    was_enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was_enabled:
            gc.enable()


def frame_from_document(doc: dict, *, path=None, text: str | None = None,
                        tol: Tolerances = DEFAULT, syntax: str | None = None) -> Frame:
    """Check a parsed model document and build a checked :class:`Frame` from it.

    Parameters
    ----------
    doc : dict
        The parsed file: top-level keys ``name``, ``units``, ``dimension``,
        ``joints``, ``members``, ``supports`` (see the module docstring).
    path : str or os.PathLike, optional
        The file it came from, for messages and the default name.
    text : str, optional
        The file's text, searched for an item's line when a message needs it.
    tol : Tolerances, optional
        Passed to :func:`~spaceframe.supports.restraint_rows` and
        :func:`~spaceframe.validation.check_frame`.
    syntax : {"toml", "json"}, optional
        How ``text`` is written; by default ``"json"`` for a path ending in
        ``.json``, else ``"toml"``.

    Returns
    -------
    frame : Frame
        Checked by :func:`~spaceframe.validation.check_frame`; members given
        twice are counted once.

    Raises
    ------
    ModelError
        For: no joints; a top-level value of the wrong kind; a dimension
        other than 2 or 3; an unknown unit; an empty id; coordinates that are
        missing, not numbers, or of the wrong count for the dimension; a
        member that is not a list of two joint ids or names an unknown joint;
        a support on an unknown joint or with an unknown code or a zero
        direction vector; and every geometric check of ``check_frame``.

    Warns
    -----
    SpaceframeWarning
        For an unknown top-level key (with the nearest known key), and for
        what ``restraint_rows`` and ``check_frame`` warn about.

    Notes
    -----
    Cost O(n + m + k) Python-level work done at C speed (whole-list type
    checks, one dict for the ids, NumPy for the arrays), plus one call of
    ``restraint_rows`` per support, plus ``check_frame``.
    """
    source = None if path is None else os.fspath(path)
    if syntax is None:
        syntax = "json" if source is not None and source.lower().endswith(".json") else "toml"
    at = _Where(source, text, syntax)

    if not isinstance(doc, dict):
        raise at.error("the top level of a model must be an object of keys, "
                       '{"joints": {...}, "members": {...}, "supports": {...}}', line=1)
    _warn_unknown_keys(doc, at)
    name = doc.get("name", Path(source).stem if source is not None else "")
    if not isinstance(name, str):
        raise at.error(f"name must be text in quotes, e.g. {at.setting('name', 'Roof truss')}; "
                       f"got {name!r}", "key", "name")
    units = _units(doc, at)
    dimension = _dimension(doc, at)

    joints = _section(doc, "joints", at)
    if not joints:
        raise at.error(f"the model has no joints; a model needs {at.ref('joints')} "
                       f"({at.pair('id', '[x, y, z]')}), {at.ref('members')} "
                       f"({at.pair('id', '[end, end]')}) and {at.ref('supports')} "
                       f"({at.pair('joint', 'what is held')})",
                       *(("key", "joints") if "joints" in doc else ()))
    joint_ids = tuple(joints)
    coords = _coords(joints, dimension, at)
    index = dict(zip(joint_ids, range(len(joint_ids))))

    members = _section(doc, "members", at)
    member_ids = tuple(members)
    ends = _ends(members, index, at)

    restraint_joint, restraint_dir = _restraints(_section(doc, "supports", at), index,
                                                 dimension, tol, at)
    joint_tags, member_tags = _tags(doc, joint_ids, member_ids, at)
    _check_carries(doc, at)
    properties = _properties(doc, member_ids, member_tags, at)
    loads = _loads.read_loads(doc, dimension, joint_ids, path=source, locate=at.path)
    frame = Frame(joint_ids=joint_ids, coords=coords, member_ids=member_ids, ends=ends,
                  restraint_joint=restraint_joint, restraint_dir=restraint_dir,
                  dimension=dimension, name=name, units=units, source=source,
                  joint_tags=joint_tags, member_tags=member_tags,
                  member_properties=properties, loads=loads,
                  prestress=_prestress(doc, member_ids, at))
    return checked(frame, tol=tol, find=at.line)


class _Where:
    """Where an item stands in the source text, found only when a message needs it."""

    def __init__(self, source: str | None, text: str | None, syntax: str):
        self.source, self.text, self.syntax = source, text, syntax
        self.lines = SourceLines(text, syntax)

    def line(self, kind: str, item: str) -> int | None:
        return self.lines.item(kind, item)

    def path(self, *keys: str) -> int | None:
        """The line of the key path ``keys`` (``("loads", "snow", "U1")``), else of the
        deepest table of it found."""
        return (self.lines.line(keys[:-1], keys[-1]) or self.lines.table(keys)
                or self.lines.table(keys[:-1]))

    def error(self, message: str, kind: str | None = None, item: str | None = None, *,
              line: int | None = None) -> ModelError:
        if line is None and kind is not None:
            line = self.line(kind, item)
        return ModelError(message, path=self.source, line=line,
                          item=None if kind == "key" else item,
                          kind=None if kind == "key" else kind)

    def warn(self, message: str, kind: str | None = None, item: str | None = None) -> None:
        line = self.line(kind, item) if kind is not None else None
        warnings.warn(where(self.source, line) + message, SpaceframeWarning, stacklevel=4)

    def ref(self, section: str) -> str:
        """How a section is named in this syntax: ``[joints]`` or ``"joints"``."""
        return f'"{section}"' if self.syntax == "json" else f"[{section}]"

    def pair(self, key: str, value: str) -> str:
        """How an entry is written in this syntax: ``id = [x, y, z]`` or ``id: [x, y, z]``."""
        return f"{key}: {value}" if self.syntax == "json" else f"{key} = {value}"

    def setting(self, key: str, value) -> str:
        """How a top-level setting is written: ``dimension = 2`` or ``"dimension": 2``."""
        value = json.dumps(value)
        return f'"{key}": {value}' if self.syntax == "json" else f"{key} = {value}"


def _warn_unknown_keys(doc: dict, at: _Where) -> None:
    for key in doc:
        if key not in _KNOWN:
            close = closest(key, KEYS + RESERVED_KEYS)
            if close is not None:
                at.warn(f"unknown key {key!r}; did you mean {close!r}? It is ignored.", "key", key)
            else:
                at.warn(f"unknown key {key!r} is ignored; the keys of a model are "
                        f"{', '.join(KEYS)}", "key", key)


def _units(doc: dict, at: _Where) -> str:
    units = doc.get("units", "m")
    if isinstance(units, str) and units in UNITS:
        return units
    hint = ""
    if isinstance(units, str):
        lower = {u.lower(): u for u in UNITS}
        hint = did_you_mean(lower.get(units.lower(), units), UNITS)
    raise at.error(f"unknown unit {units!r}{hint}; write units as one of "
                   f"{', '.join(UNITS)} (results do not depend on it), e.g. "
                   f"{at.setting('units', 'm')}", "key", "units")


def _dimension(doc: dict, at: _Where) -> int:
    dimension = doc.get("dimension", 3)
    if type(dimension) is int and dimension in (2, 3):
        return dimension
    raise at.error(f"dimension must be 2 (a plane frame analysed in its plane, coordinates "
                   f"[x, y]) or 3 (a space frame, coordinates [x, y, z]), not {dimension!r}; "
                   f"write {at.setting('dimension', 3)} or {at.setting('dimension', 2)}",
                   "key", "dimension")


def _section(doc: dict, name: str, at: _Where) -> dict:
    value = doc.get(name, {})
    if not isinstance(value, dict):
        shape = {"joints": ("id", "[x, y, z]"), "members": ("id", "[end, end]"),
                 "supports": ("joint", "what is held")}[name]
        kind = "an object" if at.syntax == "json" else "a table"
        raise at.error(f"{name} must be {kind} of {at.pair(*shape)}, written {at.ref(name)}; "
                       f"got {type(value).__name__}", "key", name)
    if "" in value:
        raise at.error(f"an empty id in {at.ref(name)}; every id must have at least one "
                       f"character: give it one or delete the entry", _SECTION_KIND[name], "")
    return value


_SECTION_KIND = {v[0]: k for k, v in MODEL_TABLES.items() if v}


def _coord_example(dimension: int) -> str:
    return "[x, y, z]" if dimension == 3 else "[x, y]"


def _misplaced(key: str, at: _Where) -> str:
    """A hint for a top-level key written below a section header in TOML, or ``""``."""
    if key not in _KNOWN or at.syntax != "toml":
        return ""
    return (f"; if {key!r} is meant as the model's {key}, move it above the first [section] "
            f"header, where top-level keys belong")


def _coords(joints: dict, dimension: int, at: _Where) -> np.ndarray:
    """``(n, dimension) float`` from ``{id: [x, y(, z)]}``, or the first bad joint's error."""
    rows = list(joints.values())
    if (set(map(type, rows)) <= {list} and set(map(len, rows)) <= {dimension}
            and set(map(type, chain.from_iterable(rows))) <= set(_NUMBER)):
        try:
            return np.array(rows, dtype=float).reshape(len(rows), dimension)
        except OverflowError:
            pass
    raise _bad_joint(joints, dimension, at)


def _bad_joint(joints: dict, dimension: int, at: _Where) -> ModelError:
    example = _coord_example(dimension)
    for jid, row in joints.items():
        if not isinstance(row, list):
            return at.error(f"joint {jid!r}: coordinates must be a list of {dimension} numbers "
                            f"{example}; got {row!r}{_misplaced(jid, at)}", "joint", jid)
        if len(row) != dimension:
            other = 2 if dimension == 3 else 3
            switch = ""
            if len(row) == other:
                kind = "a plane frame" if other == 2 else "a space frame"
                switch = (f", or for {kind} set {at.setting('dimension', other)} at the top of "
                          f"the file")
            got = f"{len(row)} coordinates" if row else "no coordinates"
            return at.error(f"joint {jid!r} has {got} but the model is {dimension}-dimensional "
                            f"(dimension = {dimension}); give {dimension} numbers {example}"
                            f"{switch}", "joint", jid)
        for axis, value in zip(AXES, row):
            if type(value) not in _NUMBER:
                return at.error(f"joint {jid!r}: coordinate {axis} is {value!r}, not a number; "
                                f"write numbers without quotes, e.g. {jid} = "
                                f"{[0.0] * dimension}", "joint", jid)
            try:
                float(value)
            except OverflowError:
                return at.error(f"joint {jid!r}: coordinate {axis} is too large to hold; "
                                f"check the number", "joint", jid)
    return at.error("a joint's coordinates could not be read; check [joints]")


def _ends(members: dict, index: dict, at: _Where) -> np.ndarray:
    """``(m, 2) int`` joint indices from ``{id: [end, end]}``, or the first bad member's error."""
    pairs = list(members.values())
    m = len(pairs)
    if (set(map(type, pairs)) <= {list} and set(map(len, pairs)) <= {2}
            and set(map(type, chain.from_iterable(pairs))) <= {str}):
        try:
            return np.fromiter(map(index.__getitem__, chain.from_iterable(pairs)),
                               dtype=np.int64, count=2 * m).reshape(m, 2)
        except KeyError:
            pass
    raise _bad_member(members, index, at)


def _bad_member(members: dict, index: dict, at: _Where) -> ModelError:
    for mid, pair in members.items():
        if not (isinstance(pair, list) and len(pair) == 2
                and all(isinstance(end, str) for end in pair)):
            example = json.dumps(list(index)[:2] if len(index) >= 2 else ["A", "B"])
            hint = ""
            if isinstance(pair, list) and any(isinstance(e, _NUMBER) for e in pair):
                hint = "; joint ids are text: put them in quotes, e.g. [\"1\", \"2\"]"
            return at.error(f"member {mid!r} must be a list of two joint ids, e.g. "
                            f"{mid} = {example}; got {pair!r}{hint}{_misplaced(mid, at)}",
                            "member", mid)
        for end in pair:
            if end not in index:
                return at.error(f"member {mid!r} names joint {end!r}, which is not in "
                                f"{at.ref('joints')}; add the joint or correct the id"
                                f"{did_you_mean(end, index)}", "member", mid)
    return at.error("a member's ends could not be read; check [members]")


def _restraints(supports: dict, index: dict, dimension: int, tol: Tolerances,
                at: _Where) -> tuple[np.ndarray, np.ndarray]:
    """Restraint joint indices ``(k,) int`` and unit directions ``(k, dimension) float``."""
    joints, blocks, later = [], [], []
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        for jid, spec in supports.items():
            j = index.get(jid)
            if j is None:
                raise at.error(f"support on joint {jid!r}, which is not in {at.ref('joints')}; "
                               f"add the joint or correct the id{did_you_mean(jid, index)}",
                               "support", jid)
            before = len(caught)
            try:
                rows = restraint_rows(spec, dimension, joint=jid, tol=tol)
            except ModelError as exc:
                raise at.error(exc.reason, "support", jid) from None
            later.extend((jid, w) for w in caught[before:])
            joints.append(j)
            blocks.append(rows)
    for jid, w in later:     # re-issued with the file and line, under the caller's filters
        at.warn(str(w.message), "support", jid)
    if not blocks:
        return np.zeros(0, dtype=np.int64), np.zeros((0, dimension))
    counts = [len(b) for b in blocks]
    return (np.repeat(np.array(joints, dtype=np.int64), counts),
            np.concatenate(blocks).reshape(-1, dimension))


def _tags(doc: dict, joint_ids: tuple, member_ids: tuple,
          at: _Where) -> tuple[dict, dict]:
    """``(joint_tags, member_tags)`` from ``[tags.joints.<attr>]`` / ``[tags.members.<attr>]``."""
    tags = doc.get("tags", {})
    example = at.pair("chord", '["AB", "BC"]')
    if not isinstance(tags, dict):
        raise at.error(f"tags must be tables [tags.members.<attribute>] (or [tags.joints."
                       f"<attribute>]) of label = [ids], e.g. [tags.members.role] then {example}; "
                       f"got {type(tags).__name__}", "key", "tags")
    out = {}
    for kind, ids in (("joints", joint_ids), ("members", member_ids)):
        attrs = tags.get(kind, {})
        if not isinstance(attrs, dict) or not all(isinstance(v, dict) for v in attrs.values()):
            raise at.error(f"[tags.{kind}] must hold tables [tags.{kind}.<attribute>] of "
                           f"label = [ids], e.g. [tags.{kind}.role] then {example}",
                           line=_tags_line(at, kind))
        index = dict(zip(ids, range(len(ids))))
        out[kind] = {attr: _tag_labels(kind, attr, table, index, at)
                     for attr, table in attrs.items()}
    for key in tags:
        if key not in ("joints", "members"):
            raise at.error(f"unknown tag section [tags.{key}]{did_you_mean(key, _SECTION_KIND)}; "
                           f"tags are [tags.joints.<attribute>] or [tags.members.<attribute>]",
                           line=_tags_line(at, key))
    return out["joints"], out["members"]


def _check_carries(doc: dict, at: _Where) -> None:
    """The labels of ``[tags.members.carries]`` must be ``tension`` or ``compression``.

    Its ids were checked with every tag; a wrong label is named with its line.
    """
    table = doc.get("tags", {}).get("members", {}).get(CARRIES_TAG, {})
    for label in table:
        if label not in CARRIES:
            raise ModelError(f"[tags.members.{CARRIES_TAG}] label {label!r} is not known; the "
                             f"labels are {' and '.join(CARRIES)} (members not listed carry "
                             f"both){did_you_mean(label, CARRIES)}", path=at.source,
                             line=_tags_line(at, "members", CARRIES_TAG, label), item=label)


def _prestress(doc: dict, member_ids: tuple, at: _Where) -> np.ndarray | None:
    """The declared prestress ``[prestress]``: member id = force (+ tension); others 0.

    Whether it is a state of self-stress is checked by the audit, which has the
    equilibrium matrix.
    """
    table = doc.get("prestress")
    if table is None:
        return None
    if not isinstance(table, dict) or not table:
        raise at.error(f"prestress must be a table {at.ref('prestress')} of member = force "
                       f"(+ tension), e.g. {at.pair('R1', '12.5')}, listing every member that "
                       f"carries the prestress the frame is built and kept in", "key",
                       "prestress")
    index = dict(zip(member_ids, range(len(member_ids))))
    t = np.zeros(len(member_ids))
    for key, value in table.items():
        line = at.lines.line(("prestress",), key)
        k = index.get(key)
        if k is None:
            raise ModelError(f"{at.ref('prestress')} names member {key!r}, which is not in "
                             f"{at.ref('members')}; correct the id or remove the line"
                             f"{did_you_mean(key, index)}", path=at.source, line=line, item=key)
        if isinstance(value, bool) or not isinstance(value, _NUMBER) or not np.isfinite(value):
            raise ModelError(f"{at.ref('prestress')} {key!r}: give the member's force as a "
                             f"number (+ tension, - compression), not {value!r}",
                             path=at.source, line=line, item=key)
        t[k] = value
    if not np.any(t):
        raise at.error(f"{at.ref('prestress')} gives every member zero force; remove it, or "
                       f"give the forces the frame is prestressed with", "key", "prestress")
    return t


def _properties(doc: dict, member_ids: tuple, member_tags: dict, at: _Where) -> dict:
    """Member properties from ``[properties.members.<name>]`` tables.

    A table holds ``default = value``, selectors ``"<tag attribute>=<label>" = value``
    (every member with that tag) and member ids; they apply in that order, so a
    member id wins over a selector and a selector over the default.  Values are
    positive numbers.  A member left without a value (no default) is an error.
    """
    props = doc.get("properties", {})
    example = at.pair("default", "2.0e5")
    if not isinstance(props, dict) or not isinstance(props.get("members", {}), dict) or \
            any(k != "members" for k in props):
        raise at.error(f"properties must be tables [properties.members.<name>], e.g. "
                       f"[properties.members.EA] then {example}", "key", "properties")
    index = dict(zip(member_ids, range(len(member_ids))))
    out = {}
    for name, table in props.get("members", {}).items():
        here = _tags_line(at, "members", name, root="properties")
        if name not in PROPERTIES:
            warnings.warn(f"{where(at.source, here)}unknown member property {name!r} is "
                          f"ignored; known: "
                          + ", ".join(f"{k} ({v})" for k, v in PROPERTIES.items()),
                          SpaceframeWarning, stacklevel=4)
            continue
        if not isinstance(table, dict):
            raise ModelError(f"[properties.members.{name}] must be a table of default = value, "
                             f'"<tag>=<label>" = value and member id = value', path=at.source,
                             line=here)
        values = np.full(len(member_ids), np.nan)
        ranked = sorted(table.items(), key=lambda kv: (0 if kv[0] == "default" else
                                                       1 if "=" in kv[0] else 2))
        for key, value in ranked:
            line = _tags_line(at, "members", name, key, root="properties")
            if isinstance(value, bool) or not isinstance(value, _NUMBER) or \
                    not np.isfinite(value) or value <= 0:
                raise ModelError(f"[properties.members.{name}] {key!r}: give a positive number, "
                                 f"not {value!r}", path=at.source, line=line, item=key)
            if key == "default":
                values[:] = value
            elif "=" in key:
                attr, _, label = key.partition("=")
                labels = member_tags.get(attr.strip())
                if labels is None or label.strip() not in labels:
                    known = sorted({f"{a}={lab}" for a, labs in member_tags.items()
                                    for lab in labs if lab})
                    raise ModelError(f"[properties.members.{name}] selector {key!r} matches no "
                                     f"member: no member has tag {attr.strip()!r} = "
                                     f"{label.strip()!r}; correct the selector or remove "
                                     f"the line{did_you_mean(key, known)}",
                                     path=at.source, line=line, item=key)
                values[np.array(labels) == label.strip()] = value
            else:
                k = index.get(key)
                if k is None:
                    raise ModelError(f"[properties.members.{name}] names member {key!r}, which "
                                     f"is not in {at.ref('members')}; correct the id or remove "
                                     f"the line{did_you_mean(key, index)}", path=at.source,
                                     line=line, item=key)
                values[k] = value
        if np.isnan(values).any():
            first = member_ids[int(np.flatnonzero(np.isnan(values))[0])]
            raise ModelError(f"[properties.members.{name}] gives no value for member {first!r} "
                             f"(and {int(np.isnan(values).sum()) - 1} others); add {example} "
                             f"or a value for each member", path=at.source, line=here,
                             item=first)
        out[name] = values
    return out


def _tag_labels(kind: str, attr: str, table: dict, index: dict, at: _Where) -> tuple[str, ...]:
    """One label per item (``""`` where none) from ``{label: [ids]}``."""
    labels = [""] * len(index)
    given: dict[str, str] = {}
    for label, items in table.items():
        here = _tags_line(at, kind, attr, label)
        if not (isinstance(items, list) and all(isinstance(i, str) for i in items)):
            shown = at.pair(toml_id(str(label)), '["A", "B"]')
            raise at.error(f"[tags.{kind}.{attr}] label {label!r}: give a list of {kind[:-1]} "
                           f"ids in quotes, e.g. {shown}", line=here)
        for item in items:
            k = index.get(item)
            if k is None:
                raise ModelError(f"[tags.{kind}.{attr}] label {label!r} lists {kind[:-1]} "
                                 f"{item!r}, which is not in {at.ref(kind)}; correct the id or "
                                 f"remove it from the list{did_you_mean(item, index)}",
                                 path=at.source, line=here, item=item)
            if item in given and given[item] != label:
                raise ModelError(f"[tags.{kind}.{attr}] lists {kind[:-1]} {item!r} under both "
                                 f"{given[item]!r} and {label!r}; an item has one label per "
                                 f"attribute: keep one", path=at.source, line=here, item=item)
            given[item] = label
            labels[k] = str(label)
    return tuple(labels)


def _tags_line(at: _Where, kind: str, attr: str | None = None,
               label: str | None = None, *, root: str = "tags") -> int | None:
    """The line of ``label`` under ``[<root>.<kind>.<attr>]`` (or of the header), where found."""
    table = (root, kind) + ((attr,) if attr is not None else ())
    return at.lines.near(table, label)


# ------------------------------------------------------------ reading errors

def _read_text(source: str) -> str:
    try:
        data = Path(source).read_bytes()
    except FileNotFoundError:
        raise ModelError("no such file; check the path and its spelling", path=source) from None
    except IsADirectoryError:
        raise ModelError("is a directory, not a model file; give the path of a model file",
                         path=source) from None
    except PermissionError:
        raise ModelError("cannot be read: permission denied; check the file's permissions",
                         path=source) from None
    except OSError as exc:
        raise ModelError(f"cannot be read ({exc.strerror}); check the file", path=source) from None
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = data.count(b"\n", 0, exc.start) + 1
        raise ModelError(f"is not UTF-8 text (byte {exc.start + 1} cannot be read); a model file "
                         f"is text: save it as UTF-8", path=source, line=line) from None


_TOML_AT = re.compile(r"\s*\((?:at line (\d+), column (\d+)|at end of document)\)\s*$")
_TOML_TWICE = re.compile(r"Cannot declare \((.*)\) twice")


def _toml_syntax_error(message: str, text: str, source: str) -> ModelError:
    """Turn a tomllib message into ours, with the line and column it gives."""
    at = _TOML_AT.search(message)
    reason = message[:at.start()] if at else message
    if at and at.group(1):
        line, column = int(at.group(1)), int(at.group(2))
        place = f"at column {column}"
    else:
        line, column = max(1, len(text.splitlines())), None
        place = "at the end of the file"
    lines = text.splitlines()
    found = SourceLines(text, "toml")

    if reason == "Cannot overwrite a value":
        key_line = next((k for k in range(min(line, len(lines)), 0, -1)
                         if toml_key(lines[k - 1]) is not None), None)
        if key_line is not None:
            key, table = toml_key(lines[key_line - 1]), found.table_at(key_line)
            first = next((k for k in found.every(table, key) if k != key_line), None)
            section = ".".join(table) or None
            shown = f"[{section}]" if section is not None else None
            return ModelError(_given_twice(section, shown, key, first), path=source,
                              line=key_line, item=key)
    twice = _TOML_TWICE.match(reason)
    if twice:
        name = ".".join(p.strip().strip("'\"") for p in twice.group(1).split(",") if p.strip())
        first = next((k for k in found.tables(name.split(".")) if k != line), None)
        also = f" (first at line {first})" if first else ""
        return ModelError(f"section [{name}] appears twice{also}; put all its entries under one "
                          f"[{name}] header", path=source, line=line, item=name)
    hint = ""
    if text.lstrip().startswith("{"):
        hint = "; this looks like JSON: name the file .json"
    return ModelError(f"not valid TOML: {reason[:1].lower() + reason[1:]} {place}; fix the syntax "
                      f"there (ids and text in quotes, coordinates as [x, y, z], one "
                      f"'key = value' per line){hint}", path=source, line=line)


def _json_syntax_error(exc: json.JSONDecodeError, text: str, source: str) -> ModelError:
    hint = ""
    try:
        tomllib.loads(text)
        hint = "; this looks like TOML: name the file .toml"
    except tomllib.TOMLDecodeError:
        pass
    return ModelError(f"not valid JSON: {exc.msg[:1].lower() + exc.msg[1:]} at column "
                      f"{exc.colno}; fix the syntax there (keys and text in double quotes, commas "
                      f"between items, none after the last){hint}", path=source, line=exc.lineno)


def _json_repeat_error(doc, repeat: tuple[dict, str], text: str, source: str) -> ModelError:
    """A key given twice in one JSON object: say which, and where both stand."""
    obj, key = repeat
    section = None
    if obj is not doc and isinstance(doc, dict):
        section = next((name for name, value in doc.items() if value is obj), "")
    found = (SourceLines(text, "json").every((section,) if section else (), key)
             if section != "" else [])
    first, second = (found + [None, None])[:2]
    shown = f'"{section}"' if section else ("one object" if section == "" else None)
    return ModelError(_given_twice(section, shown, key, first), path=source, line=second,
                      item=key)


def _given_twice(section: str | None, shown: str | None, key: str, first: int | None) -> str:
    """The message for a key given twice in ``section`` (None: the top level)."""
    also = f" (first at line {first})" if first else ""
    if section == "supports":
        return (f"joint {key!r} has two supports in {shown}{also}; give each joint one support "
                f"that holds all its directions, e.g. \"pin\" or \"yz\"")
    if section in ("joints", "members"):
        return (f"{section[:-1]} id {key!r} is given twice in {shown}{also}; each id may appear "
                f"once: rename one or delete the repeat")
    return f"key {key!r} is given twice" + (f" in {shown}" if shown else "") + f"{also}; keep one"


def toml_line(text: str, kind: str, item: str) -> int | None:
    """The 1-based line of an item in TOML model text, or None if it cannot be found.

    Parameters
    ----------
    text : str
        The model file's text.
    kind : {"joint", "member", "support", "key"}
        ``"key"`` is a top-level key such as ``dimension``.
    item : str
        The id or key.

    Notes
    -----
    :meth:`SourceLines.item <spaceframe.io.sourcelines.SourceLines.item>`:
    a line scan, O(length of text); used only when a message is raised.
    """
    return SourceLines(text, "toml").item(kind, item)


def json_line(text: str, kind: str, item: str) -> int | None:
    """The 1-based line of an item in JSON model text, or None if it cannot be found.

    Parameters and cost as :func:`toml_line`: a search for ``"item":`` after
    the section's key.
    """
    return SourceLines(text, "json").item(kind, item)
