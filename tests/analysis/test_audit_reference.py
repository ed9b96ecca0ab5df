"""The audit engine against sources outside the project.

Every case of ``reference_cases.CASES`` is crossed with both engines (dense
SVD and sparse inertia count).  Each check names its source.
"""

from __future__ import annotations

import numpy as np
import pytest
import sympy

from spaceframe import Frame, audit

from common.matrices import dense_compatibility
from common.reference_cases import CASES, flat_truss
from common.transforms import rotation, transformed

METHODS = ["dense", "sparse"]


def counts(r):
    return (r.mechanisms, r.rigid_body_modes, r.internal_mechanisms, r.self_stress_states)


def assert_maxwell(r):
    """Maxwell (1864) with Calladine's extension (1978): m - s = d j - c - b, exactly."""
    assert r.mechanisms - r.self_stress_states == \
        r.dimension * r.joints - r.restraints - r.members
    assert r.mechanisms == r.rigid_body_modes + r.internal_mechanisms
    assert r.maxwell == r.members + r.restraints - r.dimension * r.joints


@pytest.mark.parametrize("method", METHODS)
@pytest.mark.parametrize("case", CASES, ids=[c.name for c in CASES])
def test_reference_counts(case, method):
    r = audit(case.frame, method=method, self_stress_cap=1000)
    assert counts(r) == case.expected, case.source
    assert_maxwell(r)
    assert r.stable == (case.expected[0] == 0)
    assert r.rigid == (case.expected[2] == 0)


@pytest.mark.parametrize("method", METHODS)
@pytest.mark.parametrize("case", CASES, ids=[c.name for c in CASES])
def test_modes_are_null_vectors(case, method):
    """Mechanisms stretch no member; self-stress is in equilibrium with no load.

    Checked against the compatibility matrix built independently in the test
    (rows of direction cosines), bounded relative to the vectors' size.
    """
    f = case.frame
    r = audit(f, method=method, self_stress_cap=1000)
    X = f.coords
    w = X[f.ends[:, 1]] - X[f.ends[:, 0]]
    w /= np.linalg.norm(w, axis=1)[:, None]
    for u in r.mode_displacements:
        elong = np.einsum("md,md->m", w, u[f.ends[:, 1]] - u[f.ends[:, 0]])
        assert np.abs(elong).max(initial=0) < 1e-9
        # no joint moves along a restrained direction
        assert np.abs(np.einsum("kd,kd->k", f.restraint_dir, u[f.restraint_joint])).max(
            initial=0) < 1e-9
    for t in r.self_stress_forces:
        load = np.zeros_like(X)
        np.add.at(load, f.ends[:, 0], -t[:, None] * w)
        np.add.at(load, f.ends[:, 1], t[:, None] * w)
        # remove the components the supports carry
        for j, v in zip(f.restraint_joint, f.restraint_dir):
            load[j] -= (load[j] @ v) * v
        assert np.abs(load).max() < 1e-9
    assert r.self_stress_forces.shape[0] == r.self_stress_states


def sympy_counts(frame):
    """Exact rank with sympy: rows ``x_b - x_a`` (each row scaled by its length,
    which does not change the rank), rational coordinates, axis supports only."""
    X = [[sympy.Rational(str(v)) for v in row] for row in frame.coords]
    n, d = frame.n_joints, frame.dimension
    held = set()
    for j, v in zip(frame.restraint_joint, frame.restraint_dir):
        a = int(np.argmax(np.abs(v)))
        assert abs(abs(v[a]) - 1) < 1e-15, "sympy check takes axis supports only"
        held.add(int(j) * d + a)
    keep = [i for i in range(n * d) if i not in held]
    rows = []
    for a, b in frame.ends:
        row = [0] * (n * d)
        for k in range(d):
            row[a * d + k] = X[a][k] - X[b][k]
            row[b * d + k] = X[b][k] - X[a][k]
        rows.append([row[i] for i in keep])
    M = sympy.Matrix(rows) if rows else sympy.zeros(0, len(keep))
    rank = M.rank() if rows else 0
    return len(keep) - rank, frame.n_members - rank


@pytest.mark.parametrize("method", METHODS)
@pytest.mark.parametrize("case", [c for c in CASES if c.rational], ids=lambda c: c.name)
def test_against_sympy_exact_rank(case, method):
    """sympy's exact rational rank gives the same mechanisms and self-stress."""
    r = audit(case.frame, method=method)
    assert (r.mechanisms, r.self_stress_states) == sympy_counts(case.frame)


def random_frame(seed, joints=150, degree=6, dimension=3, pins=3):
    """Random joints joined to near neighbours: frames with and without mechanisms."""
    rng = np.random.default_rng(seed)
    X = rng.uniform(0, 10, size=(joints, dimension))
    ends = set()
    for i in range(joints):
        dist = np.linalg.norm(X - X[i], axis=1)
        for j in np.argsort(dist)[1:1 + rng.integers(2, degree + 1)]:
            ends.add((min(i, j), max(i, j)))
    E = sorted(ends)
    sup = {int(j): "pin" for j in rng.choice(joints, size=pins, replace=False)}
    return Frame.from_arrays(X, E, supports=sup)


@pytest.mark.parametrize("method", METHODS)
@pytest.mark.parametrize("seed", range(6))
def test_against_numpy_dense_svd(seed, method):
    """numpy's dense SVD rank on random frames of a few hundred joints: same counts."""
    f = random_frame(seed, joints=120 + 40 * seed, dimension=3 if seed % 3 else 2)
    held = [(int(j), int(np.argmax(np.abs(v)))) for j, v in zip(f.restraint_joint,
                                                                 f.restraint_dir)]
    C = dense_compatibility(f.coords, f.ends, held)
    s = np.linalg.svd(C, compute_uv=False)
    rank = int(np.sum(s > 1e-6 * s[0]))
    # the reference decision must itself be clear-cut for the comparison to mean anything
    assert s[rank - 1] > 1e-4 * s[0] and (rank == len(s) or s[rank] < 1e-10 * s[0])
    r = audit(f, method=method)
    assert r.rank == rank
    assert r.mechanisms == C.shape[1] - rank
    assert r.self_stress_states == C.shape[0] - rank
    assert_maxwell(r)


@pytest.mark.parametrize("method", METHODS)
@pytest.mark.parametrize("case", CASES, ids=[c.name for c in CASES])
def test_invariance(case, method):
    """Same counts in mm as in m, after a rigid motion, and after reordering (derived:
    the rank of the equilibrium matrix is a property of the geometry, not the description)."""
    f = case.frame
    d = f.dimension
    for variant in (transformed(f, scale=1000.0),
                    transformed(f, rotation=rotation(d, 3), shift=np.full(d, 123.4), seed=1),
                    transformed(f, scale=0.001, rotation=rotation(d, 5), seed=2)):
        assert counts(audit(variant, method=method)) == case.expected


def test_flat_truss_out_of_plane_count_by_formula():
    """Derived fact: a flat truss restrained only in its plane has, out of plane,
    joints - (out-of-plane restraints) mechanisms, for any choice of held joints."""
    for held in [(), (0,), (0, 6), (0, 3, 6), (2, 4, 7, 9)]:
        f = flat_truss(6, out_of_plane_held=held)
        r = audit(f)
        assert r.mechanisms == f.n_joints - len(held)
        # the in-plane truss is determinate: no mechanism moves a joint in its plane
        assert np.abs(r.mode_displacements[:, :, :2]).max(initial=0) < 1e-9


def test_sparse_and_dense_bases_span_the_same_space():
    """The two engines' mechanism bases span one space: the principal angles between
    them are zero (subspace comparison, as scipy.linalg.subspace_angles computes)."""
    from scipy.linalg import subspace_angles
    f = random_frame(11, joints=200, pins=2)
    a = audit(f, method="dense")
    b = audit(f, method="sparse")
    assert a.mechanisms == b.mechanisms > 0
    A = a.mode_displacements.reshape(a.mechanisms, -1).T
    B = b.mode_displacements.reshape(b.mechanisms, -1).T
    assert np.max(subspace_angles(A, B)) < 1e-8


def test_inclined_roller_is_exact():
    """A roller held along an inclined direction removes exactly that direction: the
    frame turned so the direction becomes an axis gives the same counts (derived)."""
    X = np.array([[0, 0], [4, 0], [2, 3]], float)
    E = [[0, 1], [1, 2], [2, 0]]
    c, s = 0.6, 0.8
    f = Frame.from_arrays(X, E, supports={0: "pin", 1: [[c, s]]})
    assert counts(audit(f)) == (0, 0, 0, 0)
    # held only along the member 0-1 direction at joint 1: the triangle can spin about 0,
    # and member 0-1 now only repeats what the supports hold: one self-stress (derived)
    f2 = Frame.from_arrays(X, E, supports={0: "pin", 1: [[1.0, 0.0]]})
    assert counts(audit(f2)) == (1, 1, 0, 1)


def test_engines_agree_on_larger_grid():
    """Dense and sparse engines agree on a double-layer grid of about 2,000 members."""
    from spaceframe.families import double_layer_grid
    f = double_layer_grid(8, 8)
    a, b = audit(f, method="dense"), audit(f, method="sparse")
    assert counts(a) == counts(b)
    assert a.gap.smallest_nonzero == pytest.approx(b.gap.smallest_nonzero, rel=1e-2)
