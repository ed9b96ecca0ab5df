"""The joint-by-joint mechanisms taken out before the rank decision.

References: the null space and rank of the compatibility matrix against
``scipy.linalg.null_space`` and ``numpy.linalg.matrix_rank`` of the dense matrix
(reference libraries), with the matrix built by the project's
``compatibility_matrix``; the roof's count derived below.
"""

from __future__ import annotations

import json

import numpy as np
import pytest
import scipy.linalg as sla

from spaceframe import Frame, audit
from spaceframe.analysis.equilibrium import compatibility_matrix, free_dofs
from spaceframe.analysis.nullspace import decide_rank, local_mechanisms
from spaceframe.families import plane_truss_roof


def _frame_with_local_freedoms(seed: int) -> Frame:
    """A random space frame with planar joints, a collinear chain and bare joints.

    Joints 0..9 are in general position in space and joined at random (with
    enough members to hold most of them); joints 10..19 lie in the plane z = 0,
    and half of them are joined only to others in that plane (free out of it);
    joints 20..23 lie on one straight line and are chained to each other and to
    joint 0 along it (each free sideways in two directions); joint 24 has no
    member at all.  Some joints are pinned or on rollers.
    """
    rng = np.random.default_rng(seed)
    space = rng.uniform(-5, 5, (10, 3))
    plane = np.c_[rng.uniform(-5, 5, (10, 2)), np.zeros(10)]
    start, step = space[0], rng.normal(size=3)
    line = start + np.outer(np.arange(1, 5), step / np.linalg.norm(step))
    coords = np.vstack([space, plane, line, rng.uniform(-5, 5, (1, 3))])
    pairs = set()
    for _ in range(28):
        a, b = rng.choice(10, 2, replace=False)
        pairs.add((min(a, b), max(a, b)))
    planar_only = list(range(10, 15))
    for j in planar_only:
        for b in rng.choice([x for x in range(10, 20) if x != j], 2, replace=False):
            pairs.add((min(j, b), max(j, b)))
    for j in range(15, 20):
        pairs.add((int(rng.integers(0, 10)), j))
        pairs.add((j, 10 + (j - 14) % 5))
    chain = [0, 20, 21, 22, 23]
    pairs.update(zip(chain[:-1], chain[1:]))
    supports = {1: "pin", 2: "pin", 3: "z", 12: "x"}
    return Frame.from_arrays(coords, np.array(sorted(pairs)), supports=supports)


def _dense_null(frame):
    dofs = free_dofs(frame)
    C = compatibility_matrix(frame, dofs).toarray()
    return C, sla.null_space(C, rcond=1e-10)


@pytest.mark.parametrize("seed", range(6))
@pytest.mark.parametrize("method", ["dense", "sparse"])
def test_split_matches_dense_null_space(seed, method):
    frame = _frame_with_local_freedoms(seed)
    dofs = free_dofs(frame)
    C = compatibility_matrix(frame, dofs)
    Cd, N = _dense_null(frame)
    split = local_mechanisms(C, dofs.joint_of())
    # the planar-only joints (out of plane), the chain's 4 joints (2 sideways directions
    # each) and the bare joint (3) at least
    assert split.count >= 5 + 8 + 3
    L = split.local.toarray()
    assert np.abs(Cd @ L).max() < 1e-12
    Q = np.hstack([L, split.rest.toarray()])
    assert np.abs(Q.T @ Q - np.eye(Q.shape[1])).max() < 1e-12
    dec = decide_rank(C, joint_of=dofs.joint_of(), method=method, self_stress_cap=1000)
    assert dec.local == split.count
    assert dec.rank == np.linalg.matrix_rank(Cd, tol=1e-10)
    assert dec.all_mechanisms().shape[1] == N.shape[1]
    # same space: largest principal angle (scipy.linalg.subspace_angles)
    assert np.max(sla.subspace_angles(dec.all_mechanisms(), N)) < 1e-8
    assert dec.self_stress_count == Cd.shape[0] - dec.rank
    if dec.self_stress.shape[1]:
        assert np.abs(Cd.T @ dec.self_stress).max() < 1e-8


def test_plane_frame_chain():
    """Two collinear bars between two pins in the plane: the middle joint is free sideways.

    Pellegrino & Calladine (1986), the two-bar example: one mechanism, one state of
    self-stress; here the mechanism is found joint by joint.
    """
    f = Frame.from_arrays([[0, 0], [1, 0], [2, 0]], [[0, 1], [1, 2]],
                          supports={0: "pin", 2: "pin"})
    dofs = free_dofs(f)
    split = local_mechanisms(compatibility_matrix(f, dofs), dofs.joint_of())
    assert split.count == 1
    assert np.allclose(np.abs(split.local.toarray().ravel()), [0, 1])
    r = audit(f)
    assert (r.mechanisms, r.self_stress_states) == (1, 1)


@pytest.mark.parametrize("trusses,panels", [(4, 5), (7, 3)])
@pytest.mark.parametrize("method", ["dense", "sparse"])
def test_roof_of_plane_trusses(trusses, panels, method):
    """Out-of-plane mechanisms of a roof of plane trusses with untied bottom chords.

    Derivation (the count the issue asks for).  F trusses of p panels, each in its own
    vertical plane y = const, pinned at both bottom ends, purlins joining top-chord joint
    U_i of each truss to U_i of the next.  In its plane each truss is a simple truss
    (2(p+1) joints, 4p+1 = 2*2(p+1) - 3 members) on two pins: rigid, with one state of
    self-stress.  Every in-plane member has no y component, and the purlins are along y,
    so the y motions decouple from the in-plane ones.  Along y: the bottom joints L_1..L_{p-1}
    of every truss touch no member with a y component and are held by nothing:
    (p - 1) F mechanisms, each one joint alone.  The top joints of one line i are joined
    by F - 1 purlins along y, which leave their common motion: p + 1 mechanisms.  L_0
    and L_p are pinned.  Total (p - 1) F + p + 1 mechanisms and F states of self-stress;
    Maxwell's rule checks it: 3n - r - m = 6F(p+1) - 6F - F(4p+1) - (F-1)(p+1)
    = (p - 1) F + p + 1 - F.
    """
    f = plane_truss_roof(trusses, panels)
    F, p = trusses, panels
    r = audit(f, method=method)
    assert r.mechanisms == (p - 1) * F + p + 1
    assert r.self_stress_states == F
    assert r.maxwell == -((p - 1) * F + p + 1 - F)
    out = [i for i, k in enumerate(r.mode_kinds) if k == "out-of-plane"]
    assert len(out) == (p - 1) * F
    # each local mode moves one bottom joint along y, and the first ones go in joint order
    for i in out:
        assert len(r.mode_info[i].joints) == 1 and ".L" in r.mode_info[i].joints[0]
        assert abs(abs(r.mode_info[i].direction[1]) - 1) < 1e-9
    assert [r.mode_info[i].joints[0] for i in out[:p - 1]] == \
        [f"F1.L{k}" for k in range(1, p)]
    Cd, N = _dense_null(f)
    assert N.shape[1] == r.mechanisms
    dofs = free_dofs(f)
    dec = decide_rank(compatibility_matrix(f, dofs), joint_of=dofs.joint_of(), method=method)
    assert dec.local == (p - 1) * F
    assert np.max(sla.subspace_angles(dec.all_mechanisms(), N)) < 1e-8


def test_roof_dense_and_sparse_agree_on_local_modes():
    """The local modes are exact, so both engines give them identically, in joint order."""
    f = plane_truss_roof(3, 4)
    a, b = audit(f, method="dense").to_dict(), audit(f, method="sparse").to_dict()
    loc = [i for i, m in enumerate(a["mechanism_modes"]) if m["kind"] == "out-of-plane"]
    assert loc
    for i in loc:
        assert a["mechanism_modes"][i]["displacements"] == b["mechanism_modes"][i]["displacements"]
        assert a["mechanism_modes"][i]["description"] == b["mechanism_modes"][i]["description"]


@pytest.mark.parametrize("build", [lambda: plane_truss_roof(5, 4),
                                   lambda: _frame_with_local_freedoms(2),
                                   lambda: _frame_with_local_freedoms(4)])
@pytest.mark.parametrize("method", ["dense", "sparse"])
def test_blockwise_canonical_basis_matches_dense(build, method):
    """The canonical basis made block by block gives the audit of the one dense array.

    Same counts, kinds and soft modes, the same mechanism space (principal angles,
    scipy.linalg.subspace_angles), and the same modes wherever the pivots do not tie
    exactly (the local modes always).
    """
    from dataclasses import replace

    from spaceframe.tolerances import DEFAULT

    f = build()
    a = audit(f, method=method, tol=replace(DEFAULT, limits=replace(DEFAULT.limits,
                                                                     split_basis=10 ** 12)))
    b = audit(f, method=method, tol=replace(DEFAULT, limits=replace(DEFAULT.limits,
                                                                     split_basis=0)))
    assert (a.mechanisms, a.internal_mechanisms, a.self_stress_states) == \
        (b.mechanisms, b.internal_mechanisms, b.self_stress_states)
    assert a.mode_kinds == b.mode_kinds
    Ua = np.asarray(a.mode_displacements).reshape(a.mechanisms, -1).T
    Ub = np.asarray(b.mode_displacements).reshape(b.mechanisms, -1).T
    assert np.max(sla.subspace_angles(Ua, Ub)) < 1e-10
    da, db = a.to_dict(), b.to_dict()
    assert da["soft_modes"] == db["soft_modes"]
    # one-joint modes: the same modes; where their pivots tie to rounding (a straight
    # chain of joints) the order among them may differ, as it may between the engines
    one = [sorted(json.dumps(x, sort_keys=True) for x in d["mechanism_modes"]
                  if len(x["joints"]) == 1) for d in (da, db)]
    assert one[0] == one[1]
    assert {k: v for k, v in da.items() if k != "mechanism_modes"} == \
        {k: v for k, v in db.items() if k != "mechanism_modes"}
