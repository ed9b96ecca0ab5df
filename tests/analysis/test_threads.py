"""The audit's dense steps on one OpenBLAS thread, and the thread counts given back after.

Checked with threadpoolctl's own report of the libraries loaded (a general-purpose
library from the registry, the one the engine uses to set them).
"""

from __future__ import annotations

import pytest
from threadpoolctl import threadpool_info

import spaceframe
from spaceframe.analysis import audit as audit_module
from spaceframe.families import double_layer_grid


def _openblas_threads():
    return [lib["num_threads"] for lib in threadpool_info() if lib["internal_api"] == "openblas"]


def test_one_openblas_thread_during_the_audit_and_the_counts_restored(monkeypatch):
    before = _openblas_threads()
    if not before:
        pytest.skip("no OpenBLAS loaded (NumPy built against another BLAS)")
    seen = []
    inner = audit_module.decide_rank

    def spy(*args, **kwargs):
        seen.append(_openblas_threads())
        return inner(*args, **kwargs)

    monkeypatch.setattr(audit_module, "decide_rank", spy)
    r = spaceframe.audit(double_layer_grid(6, supports="minimal"))
    assert r.mechanisms == 1
    assert seen and all(n == 1 for n in seen[0])
    assert _openblas_threads() == before


def test_counts_restored_when_the_audit_fails(monkeypatch):
    before = _openblas_threads()

    def broken(*args, **kwargs):
        raise RuntimeError("stop")

    monkeypatch.setattr(audit_module, "decide_rank", broken)
    with pytest.raises(RuntimeError):
        spaceframe.audit(double_layer_grid(3))
    assert _openblas_threads() == before
