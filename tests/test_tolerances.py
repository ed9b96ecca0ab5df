"""The tolerances and limits: documented where they are defined, honoured where they are used."""

from __future__ import annotations

import dataclasses
import json
import re

import pytest
import scipy.sparse.linalg as spla

from spaceframe import audit
from spaceframe.tolerances import DEFAULT, Display, Limits, Tolerances

from common.reference_cases import CASES

CUBE = next(c for c in CASES if c.name.startswith("cube")).frame


@pytest.mark.parametrize("cls", [Tolerances, Limits, Display])
def test_every_field_is_documented(cls):
    """Each field has an entry in the class's Attributes section, with its default."""
    doc = cls.__doc__
    entries = {part.split(" : ", 1)[0]: part for part in re.split(r"\n    (?=\w+ : )", doc)[1:]}
    for f in dataclasses.fields(cls):
        assert f.name in entries, f"{cls.__name__}.{f.name} is not documented"
        if f.name == "limits":
            continue
        stated = re.findall(r"Default\s+``([^`]+)``", entries[f.name])
        assert stated and float(stated[0]) == f.default, f"{cls.__name__}.{f.name}"
        assert re.search(r"[<>]=?", entries[f.name]), f"{f.name}: no inequality"


def test_shift_recorded_dense_none_sparse_tolerance_squared():
    """The dense engine makes no inertia count; the sparse one counts below tau = (rank s_max)^2
    (nullspace module docstring), so the recorded relative shift is rank^2 when nothing moved."""
    dense, sparse = audit(CUBE, method="dense"), audit(CUBE, method="sparse")
    assert dense.gap.shift is None and dense.to_dict()["rank_decision"]["shift"] is None
    assert sparse.gap.shift == pytest.approx(DEFAULT.rank ** 2, rel=1e-9)
    assert json.loads(json.dumps(sparse.to_dict()))["rank_decision"]["shift"] == 1e-12


def test_a_moved_shift_is_recorded(monkeypatch):
    """When SuperLU fails at the first shift the engine moves it once by 1.37 and says so."""
    real, calls = spla.splu, []

    def failing_once(*args, **kw):
        calls.append(1)
        if len(calls) == 1:
            raise RuntimeError("Factor is exactly singular")
        return real(*args, **kw)

    monkeypatch.setattr(spla, "splu", failing_once)
    r = audit(CUBE, method="sparse", soft=False)
    assert r.gap.shift == pytest.approx(1.37 * DEFAULT.rank ** 2, rel=1e-9)
    ref = audit(CUBE, method="dense")
    assert (r.mechanisms, r.self_stress_states) == (ref.mechanisms, ref.self_stress_states)


def test_limits_choose_the_engine_and_the_redundancy_shares():
    """Limits change how results are computed, not the counts."""
    small = Tolerances(limits=Limits(dense_engine=0, redundancy_auto=0))
    r, ref = audit(CUBE, tol=small), audit(CUBE)
    assert (r.gap.method, ref.gap.method) == ("sparse", "dense")
    assert r.redundancy is None and ref.redundancy is not None
    assert (r.mechanisms, r.rigid_body_modes, r.self_stress_states) == \
        (ref.mechanisms, ref.rigid_body_modes, ref.self_stress_states)
