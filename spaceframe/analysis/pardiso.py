"""Sparse symmetric factorisations with MKL PARDISO, the optional extra ``pardiso``.

The sparse rank engine (:mod:`spaceframe.analysis.nullspace`) needs one
thing of a factorisation of the symmetric, indefinite ``A = K - tau I``:
its inertia (how many negative pivots ``D`` has in ``A = L D L.T``), and
then solves with it.  PARDISO [1]_ computes a supernodal ``L D L.T`` with
Bunch-Kaufman pivoting inside the supernodes (matrix type -2) on every core,
and reports the inertia itself; for the soft modes it factorises the
positive definite ``K + delta I`` by Cholesky (matrix type 2).

The library comes with the ``pypardiso`` package [2]_ (and the ``mkl`` wheel
it depends on, Intel's Simplified Software Licence, x86-64 only); this module
uses only its loader of ``mkl_rt`` and calls ``pardiso`` through ``ctypes``
itself, so that the analysis, the numerical factorisation and the solves are
separate calls and no copy or hash of the matrix is kept.  The fill-reducing
ordering is the caller's (the rows and columns of ``A`` come already in
nested-dissection order; PARDISO is told to keep it, ``iparm[4] = 1``), so
that both factorisations share it and the symbolic analysis costs little.

:func:`load` returns None when the extra is not installed or the library
cannot be loaded; the engine then uses SuperLU.

References
----------
.. [1] O. Schenk and K. Gärtner, "Solving unsymmetric sparse systems of
   linear equations with PARDISO", Future Gener. Comput. Syst. 20(3),
   475-487, 2004; Intel oneAPI Math Kernel Library, "PARDISO - Parallel
   Direct Sparse Solver Interface" (iparm reference).
.. [2] A. Haas, "PyPardiso", https://github.com/haasad/PyPardisoProject
   (BSD-3-Clause).
"""

from __future__ import annotations

import ctypes
import glob
import os
import sys

import numpy as np
import scipy.sparse as sp

from .._optional import require
from ..errors import MissingExtraError

__all__ = ["BLOCK_ENTRIES", "PardisoFactor", "load"]

_LIB = []  # the loaded pardiso function, once (an empty list: not tried yet)
_INDEFINITE, _DEFINITE = -2, 2
# float64 entries of a block just under 32 MiB: larger arrays are mapped afresh at every
# allocation by the C library (its largest reuse threshold), their new pages slow to touch
BLOCK_ENTRIES = 31 * 2 ** 17


def load():
    """The ``pardiso`` function of MKL, or None when the extra ``pardiso`` is missing.

    Loaded once per process.  Missing means: ``pypardiso`` not importable, or
    its ``mkl_rt`` library not loadable (a machine MKL does not support).
    """
    if not _LIB:
        # MKL's OpenMP threads spin for 200 ms after each call by default, taking the cores
        # from the NumPy work between solves; let them sleep at once (read when MKL loads)
        os.environ.setdefault("KMP_BLOCKTIME", "0")
        # pypardiso finds mkl_rt at import by a recursive search of the environment (a second
        # or more); the mkl wheel puts it in the environment's lib/, so name it there first
        if "PYPARDISO_MKL_RT" not in os.environ:
            found = sorted(glob.glob(os.path.join(sys.prefix, "lib", "libmkl_rt.so*")))
            if found:
                os.environ["PYPARDISO_MKL_RT"] = found[0]
        try:
            fn = require("pypardiso").ps.libmkl.pardiso
        except (MissingExtraError, ImportError, OSError, AttributeError):
            fn = None
        if fn is not None:
            fn.restype = None
            fn.argtypes = [ctypes.c_void_p] * 16
        _LIB.append(fn)
    return _LIB[0]


def _ptr(a: np.ndarray):
    return a.ctypes.data_as(ctypes.c_void_p)


class PardisoError(RuntimeError):
    """PARDISO returned a non-zero error code (``code``) at some phase."""

    def __init__(self, code: int, phase: int):
        super().__init__(f"PARDISO error {code} at phase {phase}")
        self.code, self.phase = code, phase


class PardisoFactor:
    """``A = L D L.T`` (or ``L L.T``) of a symmetric sparse matrix, kept in PARDISO.

    Parameters
    ----------
    A : (n, n) sparse, symmetric
        Rows and columns already in the fill-reducing order wanted.
    definite : bool
        True for a positive definite ``A`` (Cholesky, matrix type 2), False
        for an indefinite one (Bunch-Kaufman ``L D L.T``, matrix type -2).
    fn : the ``pardiso`` function from :func:`load`

    Attributes
    ----------
    negative, positive : int
        The inertia of ``A`` as PARDISO reports it (``iparm[22]``,
        ``iparm[21]``): the number of negative and positive eigenvalues of the
        matrix it factorised.
    perturbed : int
        Pivots PARDISO had to perturb (``iparm[13]``): when not 0, it
        factorised a slightly different matrix and the inertia is not proof.
    path : str
        ``"PARDISO"``.
    block : int
        Right-hand sides worth giving one solve: its cost per column falls
        with more (the factor is read once per call), little past a few dozen
        columns, while a block of more than about 32 MiB costs fresh pages of
        memory at every step (the C library returns such arrays to the system
        when freed, and touching new pages is slow on a virtual machine): so
        ``8 n block`` bytes up to 32 MiB, between 32 and 256 columns (a
        block of 32 holds an audit's states and probes, 18 columns, at once).

    Raises
    ------
    PardisoError
        When a phase fails (for instance out of memory).

    Notes
    -----
    Cost: the symbolic analysis with the given order (near-linear), the
    numerical factorisation (as SuperLU's in flops, on every core, in
    BLAS-3 supernodes), and per solve two triangular sweeps over the factor.
    """

    path = "PARDISO"

    def __init__(self, A, *, definite: bool, fn):
        n = A.shape[0]
        U = sp.triu(A, format="csr")
        U.sort_indices()
        U.sum_duplicates()
        self.n = n
        self._fn = fn
        self._mtype = _DEFINITE if definite else _INDEFINITE
        self._data = np.ascontiguousarray(U.data, dtype=np.float64)
        self._ia = U.indptr.astype(np.int32)
        self._ja = U.indices.astype(np.int32)
        self._pt = np.zeros(64, dtype=np.int64)
        self._perm = np.arange(n, dtype=np.int32)
        self._iparm = iparm = np.zeros(64, dtype=np.int32)
        iparm[0] = 1            # these settings, not the defaults
        iparm[1] = 2            # (no ordering is computed: the user's is kept, iparm[4])
        iparm[4] = 1            # keep the order of the rows given (perm = identity)
        iparm[7] = 0            # no iterative refinement inside the solve
        iparm[9] = 13           # pivots below 1e-13 of the norm are perturbed (and counted)
        iparm[10] = 0           # no scaling,
        iparm[12] = 0           # no weighted matching: the inertia is that of A itself
        iparm[20] = 1           # Bunch-Kaufman 1x1 and 2x2 pivots within supernodes
        iparm[34] = 1           # zero-based indices
        self._alive = False
        self._call(11)
        self._alive = True
        self._call(22)
        self.block = int(max(32, min(256, BLOCK_ENTRIES // max(n, 1))))
        self.negative = int(iparm[22])
        self.positive = int(iparm[21])
        self.perturbed = int(iparm[13])

    def _call(self, phase: int, b: np.ndarray | None = None,
              x: np.ndarray | None = None) -> np.ndarray | None:
        nrhs = 1 if b is None else b.shape[1]
        b = np.zeros((self.n, 1)) if b is None else b
        if x is None:                      # written by the solve (phase 33), unread otherwise
            x = np.empty_like(b, order="F")
        err = ctypes.c_int32(0)
        i32 = (lambda v: ctypes.byref(ctypes.c_int32(v)))
        self._fn(_ptr(self._pt), i32(1), i32(1), i32(self._mtype), i32(phase), i32(self.n),
                 _ptr(self._data), _ptr(self._ia), _ptr(self._ja), _ptr(self._perm), i32(nrhs),
                 _ptr(self._iparm), i32(0), _ptr(b), _ptr(x), ctypes.byref(err))
        if err.value != 0:
            if phase in (11, 22):
                self.free()
            raise PardisoError(err.value, phase)
        return x

    def solve(self, B: np.ndarray, out: np.ndarray | None = None) -> np.ndarray:
        """``A^{-1} B`` for ``B`` of shape ``(n,)`` or ``(n, r)``: one call for every column.

        ``out``, a column-major ``(n, r)`` float array other than ``B``, receives the
        solution (no new array: fresh memory is slow to touch on a virtual machine).
        """
        B = np.asarray(B, dtype=np.float64)
        flat = B.ndim == 1
        B = np.asfortranarray(B[:, None] if flat else B)
        if B.shape[1] == 0:
            return np.zeros(B.shape)[:, 0] if flat else np.zeros(B.shape)
        if out is not None and (out.shape != B.shape or out.dtype != np.float64
                                or not out.flags.f_contiguous or np.shares_memory(out, B)):
            raise ValueError("out must be a column-major float array of B's shape, apart from B")
        X = self._call(33, B, out)
        return X[:, 0] if flat else X

    def free(self) -> None:
        """Release PARDISO's memory for this factorisation (also done when collected)."""
        if self._alive:
            self._alive = False
            self._call(-1)

    def __del__(self):
        try:
            self.free()
        except Exception:  # pragma: no cover - interpreter shutdown
            pass
