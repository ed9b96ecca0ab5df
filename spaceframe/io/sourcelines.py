"""The one source-line finder: which line of a TOML or JSON file holds a key.

Every reader of a text file (model TOML and JSON, the extrusion spec, the
batch variants, the supports sidecar) names the line of what a message is
about through :class:`SourceLines`, and every check that knows no file
(:mod:`spaceframe.validation`) has its errors and warnings given the file and
lines here (:func:`locate`, :func:`checked`).  Lines are looked up only when a
message needs them: a valid file is never searched.

A place is a *table path* and a *key*: ``(("joints",), "A")`` is joint ``A``
under ``[joints]``, ``(("tags", "members", "role"), "chord")`` the label
``chord`` under ``[tags.members.role]``, ``((), "units")`` a top-level key;
``nth`` picks the n-th ``[[support]]`` of an array of tables.
"""

from __future__ import annotations

import json
import re
import warnings
from typing import Callable

from ..errors import ModelError, SpaceframeWarning, where
from ..model import Frame
from ..tolerances import DEFAULT, Tolerances
from ..validation import check_frame

__all__ = ["SourceLines", "MODEL_TABLES", "toml_key", "locate", "checked"]

#: The table of each kind of item of a model file (``"key"``: the top level).
MODEL_TABLES = {"joint": ("joints",), "member": ("members",), "support": ("supports",),
                "key": ()}

_PART = r"""(?:[A-Za-z0-9_-]+|"(?:[^"\\]|\\.)*"|'[^']*')"""
_HEADER = re.compile(rf"^\s*\[\[?\s*({_PART}(?:\s*\.\s*{_PART})*)\s*\]\]?\s*(?:#.*)?$")
_KEY = re.compile(rf"^\s*({_PART})\s*=")
_PARTS = re.compile(_PART)


def _unquote(token: str) -> str:
    if token.startswith('"'):
        try:
            return json.loads(token)
        except ValueError:
            return token[1:-1]
    if token.startswith("'"):
        return token[1:-1]
    return token


def toml_header(row: str) -> tuple[str, ...] | None:
    """The table path of a TOML header line ``[a.b]`` / ``[[a]]``, or None."""
    m = _HEADER.match(row)
    return tuple(_unquote(p) for p in _PARTS.findall(m.group(1))) if m else None


def toml_key(row: str) -> str | None:
    """The key of a TOML line ``key = value``, or None."""
    m = _KEY.match(row)
    return _unquote(m.group(1)) if m else None


class SourceLines:
    """Lines of the keys of a TOML or JSON text, found on first use.

    Parameters
    ----------
    text : str or None
        The file's text; with None every look-up gives None.
    syntax : {"toml", "json"}

    Notes
    -----
    TOML: the first look-up makes one pass over the lines (a header and a
    key pattern per line, O(length of text)) into dicts, so later look-ups
    are O(1).  JSON: each look-up is a regular-expression search for
    ``"key":`` after the keys of the table path, O(length of text).
    """

    def __init__(self, text: str | None, syntax: str = "toml"):
        self.text, self.syntax = text, syntax
        self._index = None

    # -- the look-ups every reader uses

    def line(self, table=(), key: str | None = None, *, nth: int = 1) -> int | None:
        """The line of ``key`` in the ``nth`` table ``table`` (a path), or None.

        At the top level (``table == ()``) a TOML header ``[key]`` counts
        too, so a section named in a message is found.
        """
        if self.text is None or key is None:
            return None
        table = tuple(table)
        if self.syntax == "json":
            return self._json_search(table + (key,), whole=True)
        tables, keys = self._toml()
        found = keys.get((table, nth), {}).get(key)
        if found:
            return found[0]
        if not table and tables.get((key,)):
            return tables[(key,)][0]
        return None

    def near(self, table=(), key: str | None = None, *, nth: int = 1) -> int | None:
        """The line of ``key`` in the table, else of the table itself, else None."""
        return self.line(table, key, nth=nth) or self.table(table, nth=nth)

    def item(self, kind: str, item: str) -> int | None:
        """The line of a model item: ``kind`` a key of :data:`MODEL_TABLES`."""
        return self.line(MODEL_TABLES.get(kind, ()), item)

    def table(self, table, *, nth: int = 1) -> int | None:
        """The line of the ``nth`` header of ``table`` (JSON: of its deepest key found)."""
        table = tuple(table)
        if self.text is None or not table:
            return None
        if self.syntax == "json":
            return self._json_search(table, whole=False)
        found = self._toml()[0].get(table, [])
        return found[nth - 1] if len(found) >= nth else None

    def tables(self, table) -> list[int]:
        """The lines of every header of ``table`` (``[[variant]]``...), in order."""
        if self.text is None or self.syntax == "json":
            return []
        return list(self._toml()[0].get(tuple(table), []))

    def every(self, table, key: str) -> list[int]:
        """Every line of ``key`` in any table ``table`` (to say where a repeat stands)."""
        if self.text is None:
            return []
        table = tuple(table)
        if self.syntax == "json":
            start = self._json_end(table)
            if start is None:
                return []
            pattern = re.compile(re.escape(json.dumps(key, ensure_ascii=False)) + r"\s*:")
            return [self.text.count("\n", 0, m.start()) + 1
                    for m in pattern.finditer(self.text, start)]
        tables, keys = self._toml()
        found = [k for (t, _), ks in keys.items() if t == table for k in ks.get(key, ())]
        if not table:
            found += tables.get((key,), [])
        return sorted(found)

    def containing(self, piece: str, start: int = 1) -> int | None:
        """The first line from ``start`` whose text contains ``piece``, or None."""
        if self.text is None:
            return None
        for k, row in enumerate(self.text.splitlines()[start - 1:], start):
            if piece in row:
                return k
        return None

    def table_at(self, line: int) -> tuple[str, ...]:
        """The table path a TOML line stands in (``()``: the top level)."""
        rows = (self.text or "").splitlines()
        for k in range(min(line, len(rows)), 0, -1):
            header = toml_header(rows[k - 1])
            if header is not None:
                return header
        return ()

    # -- the two syntaxes

    def _toml(self):
        if self._index is None:
            tables: dict[tuple, list[int]] = {}
            keys: dict[tuple, dict[str, list[int]]] = {}
            current = ((), 1)
            for k, row in enumerate(self.text.splitlines(), 1):
                header = toml_header(row)
                if header is not None:
                    tables.setdefault(header, []).append(k)
                    current = (header, len(tables[header]))
                    continue
                key = toml_key(row)
                if key is not None:
                    keys.setdefault(current, {}).setdefault(key, []).append(k)
            self._index = (tables, keys)
        return self._index

    def _json_matches(self, path):
        start = 0
        for key in path:
            m = re.compile(re.escape(json.dumps(key, ensure_ascii=False)) + r"\s*:").search(
                self.text, start)
            if m is None:
                return
            start = m.end()
            yield m

    def _json_search(self, path, *, whole: bool) -> int | None:
        found = list(self._json_matches(path))
        if not found or (whole and len(found) < len(path)):
            return None
        return self.text.count("\n", 0, found[-1].start()) + 1

    def _json_end(self, path) -> int | None:
        found = list(self._json_matches(path))
        if len(found) < len(path):
            return None
        return found[-1].end() if found else 0


# -------------------------------------------------- file and line for errors

def _noted(message: str, marks, find) -> str:
    for offset, kind, item in sorted(marks, reverse=True):
        line = find(kind, item)
        if line is not None:
            message = f"{message[:offset]} (line {line}){message[offset:]}"
    return message


def _no_line(kind: str, item: str) -> None:
    return None


def locate(exc, path, find: Callable[[str, str], int | None] | None = None):
    """``exc`` (a ModelError or SpaceframeWarning of a check) with the file and lines added.

    Parameters
    ----------
    exc : ModelError or SpaceframeWarning
        Carrying ``item``, ``kind`` and ``marks`` (see :class:`ModelError`).
    path : str or None
        The file the checked frame was read from.
    find : callable ``(kind, id) -> int or None``, optional
        The reader's line finder (for example :meth:`SourceLines.item`).

    Returns
    -------
    ModelError or SpaceframeWarning
        A new one of the same class, naming ``path`` and the item's line
        (and the lines of the items it mentions).
    """
    find = find or _no_line
    line = find(exc.kind, exc.item) if exc.kind is not None and exc.item is not None else None
    if isinstance(exc, ModelError):
        return ModelError(_noted(exc.reason, exc.marks, find), path=path, line=line,
                          item=exc.item, kind=exc.kind)
    return type(exc)(where(path, line) + _noted(str(exc), exc.marks, find),
                     item=exc.item, kind=exc.kind)


def checked(frame: Frame, *, tol: Tolerances = DEFAULT,
            find: Callable[[str, str], int | None] | None = None) -> Frame:
    """:func:`~spaceframe.validation.check_frame`, its messages given the file and lines.

    Every reader ends with this.  ``find`` is the reader's line finder; by
    default the lines the frame carries (:meth:`Frame.line_of`, set by the CSV
    reader).  Warnings of the check are issued again with the file and line,
    under the caller's filters.
    """
    find = find or frame.line_of
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        try:
            out = check_frame(frame, tol=tol)
        except ModelError as exc:
            raise locate(exc, frame.source, find) from None
    for w in caught:
        if isinstance(w.message, SpaceframeWarning):
            warnings.warn(locate(w.message, frame.source, find), stacklevel=3)
        else:
            warnings.warn_explicit(w.message, w.category, w.filename, w.lineno)
    return out
