"""A JSON document written piece by piece, the same bytes as ``json.dumps``.

A document may hold :class:`Lazy` lists: their items are made one at a time
as the text is written (an audit's thousands of mechanisms), so a large
document is never held whole.  :func:`materialise` turns the same document
into plain Python types, so that ``json.dumps(materialise(doc), indent=i)``
and ``"".join(chunks(doc, indent=i))`` are the same text.
"""

from __future__ import annotations

import json
from collections.abc import Callable, Iterator

__all__ = ["Lazy", "chunks", "materialise"]


class Lazy:
    """A list whose items are made on demand.

    Parameters
    ----------
    length : int
        Number of items.
    make : callable
        ``make()`` returns an iterator over the ``length`` items (each a
        plain JSON value, or a dict or list that may hold more ``Lazy``).
    """

    __slots__ = ("length", "make")

    def __init__(self, length: int, make: Callable[[], Iterator]):
        self.length, self.make = int(length), make

    def __len__(self) -> int:
        return self.length

    def __iter__(self):
        return iter(self.make())


def materialise(value):
    """``value`` with every :class:`Lazy` list made into a list, recursively."""
    if isinstance(value, Lazy):
        return [materialise(v) for v in value]
    if isinstance(value, dict) and any(_holds_lazy(v) for v in value.values()):
        return {k: materialise(v) for k, v in value.items()}
    return value


def _holds_lazy(value) -> bool:
    return isinstance(value, Lazy) or (isinstance(value, dict) and
                                       any(_holds_lazy(v) for v in value.values()))


def chunks(value, *, indent: int = 1, allow_nan: bool = False, _depth: int = 0) -> Iterator[str]:
    """The text of ``json.dumps(materialise(value), indent=indent)``, a piece at a time.

    Only dicts that hold a :class:`Lazy` list, and the lazy lists, are walked
    here; every other value is written by :func:`json.dumps` and indented to
    its depth (a JSON string holds no raw newline, so indenting its lines is
    safe).

    Notes
    -----
    Memory: one item of a lazy list at a time, besides the non-lazy values.
    """
    pad = " " * indent
    inner = pad * (_depth + 1)
    if isinstance(value, Lazy) or (isinstance(value, dict) and _holds_lazy(value)):
        items = value.items() if isinstance(value, dict) else ((None, v) for v in value)
        opening, closing = ("{", "}") if isinstance(value, dict) else ("[", "]")
        first = True
        for key, v in items:
            yield (opening + "\n" if first else ",\n") + inner
            first = False
            if key is not None:
                yield json.dumps(key) + ": "
            yield from chunks(v, indent=indent, allow_nan=allow_nan, _depth=_depth + 1)
        yield opening + closing if first else "\n" + pad * _depth + closing
        return
    text = json.dumps(value, indent=indent, allow_nan=allow_nan)
    if _depth and "\n" in text:
        text = text.replace("\n", "\n" + pad * _depth)
    yield text
