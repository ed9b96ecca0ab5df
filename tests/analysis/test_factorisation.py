"""The sparse engine's two factorisations: MKL PARDISO (the extra ``pardiso``) and SuperLU.

Both must give the same audit: counts, mode spaces, states, soft modes.  The
inertia PARDISO reports is checked against numpy's eigenvalues (Sylvester's
law of inertia: the signs of ``D`` in ``A = L D L.T`` are those of the
eigenvalues of ``A``), and the fallback to SuperLU is taken when the extra is
missing or PARDISO had to perturb a pivot.  Under CI the extra must be there
(``make test`` installs it).
"""

from __future__ import annotations

import dataclasses
import os
import sys

import numpy as np
import pytest
import scipy.linalg as sla
import scipy.sparse as sp

import spaceframe
from spaceframe.analysis import nullspace, pardiso
from spaceframe.analysis.equilibrium import compatibility_matrix, free_dofs
from spaceframe.families import double_layer_grid, plane_truss_roof
from spaceframe.model import Frame
from spaceframe.tolerances import Limits, Tolerances

HAVE = pardiso.load() is not None
needs_pardiso = pytest.mark.skipif(not HAVE and not os.environ.get("CI"),
                                   reason="the extra 'pardiso' is not installed")

# the sparse engine and the iterative soft modes on every frame (no redundancy shares, one
# solve per coordinate); PARDISO from the first coordinate, or never
FAST = Tolerances(limits=Limits(dense_engine=0, pardiso_engine=0, dense_soft=0,
                                redundancy_auto=0))
SLOW = dataclasses.replace(FAST, limits=dataclasses.replace(FAST.limits, pardiso_engine=10 ** 9))


def _holed_grid(nx=10, step=3):
    """A double-layer grid with some bottom joints left on their four coplanar chords."""
    grid = double_layer_grid(nx, supports="minimal")
    hung = {f"B{i}_{j}" for i in range(2, nx, step) for j in range(2, nx, step)}
    ids = grid.joint_ids
    keep = [k for k, (mid, (a, b)) in enumerate(zip(grid.member_ids, grid.ends.tolist()))
            if not (mid.startswith("D") and (ids[a] in hung or ids[b] in hung))]
    return Frame(joint_ids=grid.joint_ids, coords=grid.coords,
                 member_ids=tuple(grid.member_ids[k] for k in keep), ends=grid.ends[keep],
                 restraint_joint=grid.restraint_joint, restraint_dir=grid.restraint_dir), len(hung)


def _angle(A, B):
    """Largest principal angle between the column spaces of A and B (radians)."""
    if A.shape[1] == 0 and B.shape[1] == 0:
        return 0.0
    return float(np.max(sla.subspace_angles(A, B)))


def _flat(modes):
    return np.asarray(modes).reshape(len(modes), -1).T


@needs_pardiso
def test_pardiso_inertia_is_numpy_eigenvalue_count():
    # a random symmetric indefinite matrix with a known spectrum: Q diag(lam) Q.T
    rng = np.random.default_rng(7)
    lam = np.concatenate([-np.geomspace(1e-6, 3, 5), np.geomspace(1e-3, 10, 25)])
    Q, _ = np.linalg.qr(rng.standard_normal((30, 30)))
    A = sp.csr_matrix(Q @ np.diag(lam) @ Q.T)
    f = pardiso.PardisoFactor(A, definite=False, fn=pardiso.load())
    assert (f.negative, f.positive, f.perturbed) == (5, 25, 0)
    assert int(np.sum(np.linalg.eigvalsh(A.toarray()) < 0)) == 5       # numpy's count
    B = rng.standard_normal((30, 3))
    assert np.allclose(A @ f.solve(B), B, atol=1e-9)


@needs_pardiso
def test_a_perturbed_pivot_falls_back_to_superlu():
    # diag(1, 0, 1) has an exactly zero pivot: PARDISO perturbs it, so its inertia is no proof
    A = sp.diags([1.0, 0.0, 1.0]).tocsr()
    assert nullspace._pardiso(A, False, FAST) is None
    f = pardiso.PardisoFactor(A, definite=False, fn=pardiso.load())
    assert f.perturbed == 1


@needs_pardiso
@pytest.mark.parametrize("make", ["holed grid", "roof"])
def test_pardiso_and_superlu_give_the_same_audit(make):
    if make == "holed grid":
        frame, hung = _holed_grid()
        expected = 1 + hung           # the free grid's twist and one per hanging joint
    else:
        # (p - 1) F + p + 1 mechanisms for F trusses of p panels with untied bottom chords,
        # derived in tests/analysis/test_local_mechanisms.py
        F, p = 4, 6
        frame, expected = plane_truss_roof(F, p), (p - 1) * F + p + 1
    a, b = spaceframe.audit(frame, tol=FAST), spaceframe.audit(frame, tol=SLOW)
    ref = spaceframe.audit(frame)
    assert (a.gap.factorisation, b.gap.factorisation) == ("PARDISO", "SuperLU")
    for r in (a, b, ref):
        assert r.mechanisms == expected
        assert (r.rank, r.self_stress_states, r.internal_mechanisms) == \
            (ref.rank, ref.self_stress_states, ref.internal_mechanisms)
    assert _angle(_flat(a.mode_displacements), _flat(b.mode_displacements)) < 1e-8
    assert _angle(_flat(a.mode_displacements), _flat(ref.mode_displacements)) < 1e-8
    assert a.key_members == b.key_members
    assert a.mode_orders == b.mode_orders
    assert np.allclose(a.soft_ratios, b.soft_ratios, rtol=1e-6)
    # the states of self-stress computed lie in one space (the same seeded projections)
    assert _angle(a.self_stress_forces.T, b.self_stress_forces.T) < 1e-6
    # the document, but for the rounding of the last digit, is the same
    da, db = a.to_dict(), b.to_dict()
    assert [m["kind"] for m in da["mechanism_modes"]] == [m["kind"] for m in db["mechanism_modes"]]
    assert [m["description"] for m in da["mechanism_modes"]] == \
        [m["description"] for m in db["mechanism_modes"]]


def test_without_the_extra_the_engine_takes_superlu(monkeypatch):
    # the extra missing: pypardiso cannot be imported (blocked as test_optional does)
    monkeypatch.setattr(pardiso, "_LIB", [])
    monkeypatch.setitem(sys.modules, "pypardiso", None)
    assert pardiso.load() is None
    frame, hung = _holed_grid(8, 3)
    r = spaceframe.audit(frame, tol=FAST, soft=False)
    assert r.gap.factorisation == "SuperLU" and r.mechanisms == 1 + hung
    monkeypatch.setattr(pardiso, "_LIB", [])     # the next call loads it again


def test_small_frames_keep_superlu_and_the_dense_engine_none():
    frame, _ = _holed_grid(6, 3)
    sparse = spaceframe.audit(frame, method="sparse", soft=False)
    assert sparse.gap.factorisation == "SuperLU"          # below Limits.pardiso_engine
    assert spaceframe.audit(frame, method="dense", soft=False).gap.factorisation is None
    assert "factorisation" not in sparse.to_dict()["rank_decision"]   # how, not what



@needs_pardiso
def test_pardiso_solve_into_a_given_array():
    rng = np.random.default_rng(3)
    Q, _ = np.linalg.qr(rng.standard_normal((20, 20)))
    A = sp.csr_matrix(Q @ np.diag(np.geomspace(0.1, 10, 20)) @ Q.T)
    f = pardiso.PardisoFactor(A, definite=True, fn=pardiso.load())
    B = np.asfortranarray(rng.standard_normal((20, 4)))
    out = np.empty((20, 4), order="F")
    assert f.solve(B, out=out) is out
    assert np.allclose(out, np.linalg.solve(A.toarray(), B), atol=1e-10)   # numpy's solve
    for wrong in (np.empty((20, 4)), np.empty((20, 3), order="F"), B):
        with pytest.raises(ValueError, match="column-major"):
            f.solve(B, out=wrong)


def test_row_blocks_are_the_whole_product():
    rng = np.random.default_rng(5)
    A = sp.random(1000, 300, density=0.02, format="csr", random_state=5)
    X = rng.standard_normal((300, 7))
    want = A @ X
    rows = nullspace._RowBlocks(A, rows=64)
    assert len(rows.parts) == 16
    out = np.empty((1000, 7), order="F")
    assert np.array_equal(rows.into(X, out), want)
    M = rng.standard_normal((1000, 7))
    assert np.array_equal(rows.into(X, out, minus=M), M - want)
    assert np.array_equal(rows.into(X, out, negate=True), -want)


@pytest.mark.parametrize("tol", [FAST, SLOW], ids=["PARDISO", "SuperLU"])
def test_projector_sparse_and_dense_input_against_null_space(tol):
    """The projector onto the states of self-stress, of a holed grid (a mechanism of the
    whole frame and several of single joints): dense or sparse member forces, into a given
    array or not, more columns than a block; reference ``Q Q.T`` with ``Q`` scipy's null
    space of ``C.T`` (Pellegrino & Calladine 1986)."""
    if tol is FAST and not HAVE:
        pytest.skip("the extra 'pardiso' is not installed")
    frame, _ = _holed_grid(8, 3)
    dofs = free_dofs(frame)
    C = compatibility_matrix(frame, dofs)
    decision = nullspace.decide_rank(C, joint_of=dofs.joint_of(), method="sparse", tol=tol)
    project = decision.project
    m = frame.n_members
    Q = sla.null_space(C.toarray().T)
    rng = np.random.default_rng(2)
    Y = rng.standard_normal((m, project.block + 5))
    want = Q @ (Q.T @ Y)
    assert np.max(np.abs(project(Y) - want)) < 1e-8
    out = np.empty(Y.shape, order="F")
    assert project(Y, out=out) is out and np.max(np.abs(out - want)) < 1e-8
    S = sp.random(m, 9, density=0.01, format="csc", random_state=4)
    assert np.max(np.abs(project(S) - Q @ (Q.T @ S.toarray()))) < 1e-8
    assert np.allclose(project(Y[:, 0]), want[:, 0], atol=1e-8)
    with pytest.raises(ValueError, match="shape"):
        project(Y, out=np.empty((m, 2)))


@pytest.mark.parametrize("tol", [FAST, SLOW], ids=["PARDISO", "SuperLU"])
def test_projector_refines_a_soft_direction(tol):
    """A joint held across by four nearly straight bars (rise 1e-3 of their span): its
    stiffness across is about 1e-6 of the largest, judged non-zero, and a solve with
    ``K - tau I`` alone is off by about ``tau / lambda`` there (1e-6 of the force); the step of
    refinement brings the projection to scipy's null space (Pellegrino & Calladine 1986)."""
    if tol is FAST and not HAVE:
        pytest.skip("the extra 'pardiso' is not installed")
    e = 1e-3
    frame = Frame.from_arrays([[0, 0], [1, e], [2, 0], [0, 2 * e], [2, 2 * e]],
                              [[0, 1], [1, 2], [3, 1], [1, 4]],
                              supports={0: "pin", 2: "pin", 3: "pin", 4: "pin"})
    dofs = free_dofs(frame)
    C = compatibility_matrix(frame, dofs)
    decision = nullspace.decide_rank(C, joint_of=dofs.joint_of(), method="sparse", tol=tol)
    assert decision.count == 0 and decision.self_stress_count == 2
    Q = sla.null_space(C.toarray().T)
    Y = np.random.default_rng(8).standard_normal((4, 3))
    assert np.max(np.abs(decision.project(Y) - Q @ (Q.T @ Y))) < 1e-10
