"""Field-by-field comparison of two frames, for the tests of every path that edits or writes one."""

from __future__ import annotations

import numpy as np


def restraint_set(frame):
    """The restraint rows as (joint id, rounded direction) pairs, in order."""
    return [(frame.joint_ids[j], tuple(np.round(d, 12).tolist()))
            for j, d in zip(frame.restraint_joint.tolist(), frame.restraint_dir)]


def assert_same_frame(got, want, *, atol: float = 1e-12):
    """Every field a model holds: ids, coordinates, ends, restraint rows, every tag table,
    every property, dimension, units and name (source and lines are where it came from)."""
    assert got.dimension == want.dimension and got.units == want.units and got.name == want.name
    assert got.joint_ids == want.joint_ids
    np.testing.assert_allclose(got.coords, want.coords, rtol=0, atol=atol)
    assert got.member_ids == want.member_ids
    assert got.ends.tolist() == want.ends.tolist()
    assert got.restraint_joint.tolist() == want.restraint_joint.tolist()
    np.testing.assert_allclose(got.restraint_dir, want.restraint_dir, rtol=0, atol=atol)
    assert dict(got.joint_tags) == dict(want.joint_tags)
    assert dict(got.member_tags) == dict(want.member_tags)
    assert set(got.member_properties) == set(want.member_properties)
    for key, values in want.member_properties.items():
        np.testing.assert_allclose(got.member_properties[key], values, rtol=1e-12, atol=0)
    assert_same_loads(got.loads, want.loads)


def assert_same_loads(got, want):
    """Two load sets (or None) field by field: cases (names, joints, forces), combinations
    (names, cases and factors in order), self-weight, notional fraction and cases, units."""
    if want is None:
        assert got is None
        return
    assert got is not None, "the loads were lost"
    assert [c.name for c in got.cases] == [c.name for c in want.cases]
    for a, b in zip(got.cases, want.cases):
        assert a.joints == b.joints
        np.testing.assert_array_equal(a.forces, b.forces)
    assert [(c.name, c.factors) for c in got.combinations] == \
        [(c.name, c.factors) for c in want.combinations]
    assert (got.self_weight, got.notional, got.notional_cases, got.force_units) == \
        (want.self_weight, want.notional, want.notional_cases, want.force_units)
