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
