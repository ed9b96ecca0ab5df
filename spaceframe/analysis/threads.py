"""The cores during an audit: the sparse factorisation's threads, one thread for dense steps.

NumPy and SciPy each carry their own OpenBLAS, and the engine's PARDISO
(:mod:`spaceframe.analysis.pardiso`) brings MKL: three thread pools on the
same cores.  OpenBLAS's idle threads keep spinning for a while after each
call, so on a machine of two cores every factorisation or solve that follows
a small dense step ran with a core taken from it.  The dense steps of an
audit are small (blocks of a few hundred columns at most), so they lose little
with one thread; the factorisation gains its cores back.  Measured on a
2-core machine (``benchmarks/bench_engine.py``'s 5,000-member grid, median of
eight audits in one process): 0.10 s with OpenBLAS on one thread against
0.25-0.32 s with its default two.

``threadpoolctl`` (the scikit-learn project's) sets the OpenBLAS libraries
loaded in the process to one thread for the duration and restores them after;
MKL keeps its threads.
"""

from __future__ import annotations

import contextlib
import functools

__all__ = ["dense_steps_single_threaded"]

_CONTROLLER = []   # the process's threadpoolctl controller, made on first use


def _openblas():
    if not _CONTROLLER:
        from threadpoolctl import ThreadpoolController

        _CONTROLLER.append(ThreadpoolController().select(internal_api="openblas"))
    return _CONTROLLER[0]


def dense_steps_single_threaded(fn):
    """Decorate ``fn`` to run with the process's OpenBLAS libraries on one thread each."""

    @functools.wraps(fn)
    def wrapper(*args, **kwargs):
        pools = _openblas()
        with pools.limit(limits=1) if pools.lib_controllers else contextlib.nullcontext():
            return fn(*args, **kwargs)

    return wrapper
