"""Many vectors of one shape held dense or sparse: an audit's mechanisms and their prestress.

A frame with thousands of mechanisms each confined to a few joints (a roof of
plane trusses whose bottom joints are each free out of plane) would need
gigabytes to hold its modes as one dense ``(k, n, d)`` array, almost all of
it zeros.  :class:`ModeSet` holds them as the rows of a sparse matrix instead
when they are many, and as the dense array when they are few; either way a
caller reads one mode at a time (``modes[i]``), its support
(:meth:`ModeSet.support`) or the whole set as a sparse matrix
(:meth:`ModeSet.matrix`), and expands it to a dense array only where it is
small (:meth:`ModeSet.dense`).
"""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp

__all__ = ["ModeSet"]


class ModeSet:
    """``k`` vectors, each of shape ``item`` (``(n, d)`` joint movements, ``(m,)`` forces).

    Parameters
    ----------
    data : (k, *item) float ndarray, or (k, prod(item)) scipy.sparse matrix
        The vectors: dense, or as the rows of a sparse matrix (each row the
        vector flattened in C order, so joint ``j``'s movement is entries
        ``j d .. j d + d - 1``).
    item : tuple of int
        The shape of one vector.

    Notes
    -----
    Read-only: the arrays it holds are not copied and must not be changed.
    Reading mode ``i`` costs O(n d) dense (the expanded vector), its support
    O(nnz of the row) sparse.
    """

    __slots__ = ("_dense", "_rows", "item")

    def __init__(self, data, item: tuple[int, ...]):
        self.item = tuple(int(x) for x in item)
        if sp.issparse(data):
            self._dense, self._rows = None, sp.csr_matrix(data)
            self._rows.sort_indices()
        else:
            self._dense = np.asarray(data, dtype=float).reshape((-1, *self.item))
            self._rows = None

    @classmethod
    def empty(cls, item: tuple[int, ...]) -> "ModeSet":
        """No vectors."""
        return cls(np.zeros((0, *item)), item)

    @property
    def sparse(self) -> bool:
        """True when the vectors are held as the rows of a sparse matrix."""
        return self._rows is not None

    @property
    def shape(self) -> tuple[int, ...]:
        """``(k, *item)``."""
        return (len(self), *self.item)

    @property
    def size(self) -> int:
        """Entries of the dense expansion, ``k * prod(item)``."""
        return int(np.prod(self.shape))

    def __len__(self) -> int:
        return self._rows.shape[0] if self.sparse else self._dense.shape[0]

    def __getitem__(self, i: int) -> np.ndarray:
        """Vector ``i``, dense, of shape ``item``."""
        if not self.sparse:
            return self._dense[i]
        k = len(self)
        if not -k <= i < k:
            raise IndexError(f"mode {i} of {k}")
        i %= k
        out = np.zeros(int(np.prod(self.item)))
        lo, hi = self._rows.indptr[i], self._rows.indptr[i + 1]
        out[self._rows.indices[lo:hi]] = self._rows.data[lo:hi]
        return out.reshape(self.item)

    def __iter__(self):
        return (self[i] for i in range(len(self)))

    def support(self, i: int) -> tuple[np.ndarray, np.ndarray]:
        """Where vector ``i`` is non-zero: the first-axis indices and their values.

        Returns
        -------
        index : (s,) int
            Ascending indices along the first axis of ``item`` (joints of a
            ``(n, d)`` movement, members of a ``(m,)`` force vector) whose
            entries are not all zero.
        values : (s, *item[1:]) float
            The entries there.
        """
        per = int(np.prod(self.item[1:]))
        if not self.sparse:
            v = self._dense[i].reshape(self.item[0], per)
            index = np.flatnonzero(np.any(v != 0, axis=1))
            return index, v[index].reshape((-1, *self.item[1:]))
        lo, hi = self._rows.indptr[i], self._rows.indptr[i + 1]
        cols, vals = self._rows.indices[lo:hi], self._rows.data[lo:hi]
        joint = cols // per                          # ascending: the row's indices are sorted
        new = np.r_[True, joint[1:] != joint[:-1]] if len(joint) else np.zeros(0, bool)
        index = joint[new]
        out = np.zeros((len(index), per))
        out[np.cumsum(new) - 1, cols % per] = vals
        return index, out.reshape((-1, *self.item[1:]))

    def supports(self):
        """:meth:`support` of every vector in order, made in one pass (sparse: O(nnz))."""
        if not self.sparse:
            yield from (self.support(i) for i in range(len(self)))
            return
        per = int(np.prod(self.item[1:]))
        R, k = self._rows, len(self)
        first = R.indices // per
        row = np.repeat(np.arange(k), np.diff(R.indptr))
        new = np.ones(len(first), dtype=bool)
        new[1:] = (first[1:] != first[:-1]) | (row[1:] != row[:-1])
        index = first[new]
        values = np.zeros((len(index), per))
        values[np.cumsum(new) - 1, R.indices % per] = R.data
        ptr = np.concatenate([[0], np.cumsum(np.bincount(row[new], minlength=k))])
        values = values.reshape((-1, *self.item[1:]))
        for i in range(k):
            yield index[ptr[i]:ptr[i + 1]], values[ptr[i]:ptr[i + 1]]

    def any(self, i: int) -> bool:
        """Vector ``i`` has a non-zero entry."""
        if not self.sparse:
            return bool(np.any(self._dense[i]))
        lo, hi = self._rows.indptr[i], self._rows.indptr[i + 1]
        return bool(np.any(self._rows.data[lo:hi]))

    def matrix(self) -> sp.csr_matrix:
        """The vectors as the rows of a sparse ``(k, prod(item))`` matrix."""
        if self.sparse:
            return self._rows
        return sp.csr_matrix(self._dense.reshape(len(self), int(np.prod(self.item))))

    def dense(self) -> np.ndarray:
        """The vectors as one dense ``(k, *item)`` array.

        Held dense, the array itself; held sparse, expanded (``size`` entries:
        only for a set known to be small).
        """
        if not self.sparse:
            return self._dense
        return self._rows.toarray().reshape(self.shape)

    def take(self, order) -> "ModeSet":
        """The vectors in ``order`` (indices), held the same way."""
        order = np.asarray(order, dtype=int)
        if self.sparse:
            return ModeSet(self._rows[order], self.item)
        return ModeSet(self._dense[order], self.item)
