"""Mechanisms held sparse (many modes) against the dense path and against dense references.

The audit holds its modes as sparse rows above ``Limits.dense_modes`` entries; lowering
that limit to 0 sends a small frame down the sparse path, so both paths can be compared
on the same frame.  References: numpy's dense arrays for the modes, and
``scipy.linalg.null_space`` of ``C.T`` for the states of self-stress (the projector onto
them is ``Q Q.T`` for its orthonormal basis ``Q``; Pellegrino & Calladine 1986, the
self-stress space as the null space of the equilibrium matrix).
"""

from __future__ import annotations

import json
from dataclasses import replace

import numpy as np
import pytest
import scipy.linalg as sla
import scipy.sparse as sp

import spaceframe
from spaceframe.analysis.blocks import member_blocks, project_sparse
from spaceframe.analysis.equilibrium import compatibility_matrix, free_dofs
from spaceframe.analysis.prestress import product_forces, product_forces_sparse
from spaceframe.families import plane_truss_roof
from spaceframe.jsonstream import Lazy, chunks, materialise
from spaceframe.modeset import ModeSet
from spaceframe.tolerances import DEFAULT
from spaceframe.views.text import render_audit

SPARSE = replace(DEFAULT, limits=replace(DEFAULT.limits, dense_modes=0, block_prestress=0))
# modes held dense, their product forces projected block by block
BLOCKS = replace(DEFAULT, limits=replace(DEFAULT.limits, block_prestress=0))


def _roof_pair(F=8, p=5, tol=SPARSE):
    f = plane_truss_roof(F, p)
    return f, spaceframe.audit(f), spaceframe.audit(f, tol=tol)


def test_modeset_sparse_reads_as_dense():
    rng = np.random.default_rng(3)
    a = rng.standard_normal((5, 7, 3))
    a[:, [1, 4, 5]] = 0.0
    a[2] = 0.0
    dense, rows = ModeSet(a, (7, 3)), ModeSet(sp.csr_matrix(a.reshape(5, -1)), (7, 3))
    assert rows.sparse and not dense.sparse and rows.shape == dense.shape == (5, 7, 3)
    assert np.array_equal(rows.dense(), a) and np.array_equal(rows.matrix().toarray(),
                                                             a.reshape(5, -1))
    for i in range(5):
        assert np.array_equal(rows[i], a[i])
        (ia, va), (ib, vb) = dense.support(i), rows.support(i)
        assert np.array_equal(ia, ib) and np.array_equal(va, vb)
        assert np.array_equal(ia, np.flatnonzero(np.any(a[i] != 0, axis=1)))
        assert rows.any(i) == bool(np.any(a[i]))
    assert np.array_equal(rows.take([3, 0]).dense(), a[[3, 0]])
    with pytest.raises(IndexError):
        rows[5]


@pytest.mark.parametrize("doc", [
    {"a": 1, "b": Lazy(0, lambda: iter(())), "c": {"d": Lazy(2, lambda: iter([{"x": [1, 2]},
                                                                              "y"]))}},
    {"modes": Lazy(3, lambda: ({"i": i, "u": {"J1": [0.5, -0.0]}} for i in range(3))),
     "é": None, "empty": {}, "list": []},
])
def test_json_chunks_are_json_dumps(doc):
    # the reference is the standard library's json.dumps of the same document made plain
    for indent in (1, 2):
        assert "".join(chunks(doc, indent=indent)) == json.dumps(materialise(doc),
                                                                  indent=indent)


@pytest.mark.parametrize("tol", [SPARSE, BLOCKS], ids=["sparse", "blocks"])
def test_roof_sparse_path_gives_the_dense_result(tol):
    f, a, b = _roof_pair(tol=tol)
    assert not a.modes.sparse and b.modes.sparse == (tol is SPARSE) and b.stiffening.sparse
    assert (a.mechanisms, a.internal_mechanisms, a.self_stress_states) == \
        (b.mechanisms, b.internal_mechanisms, b.self_stress_states) == (38, 38, 8)  # (p-1)F+p+1; F
    assert a.mode_kinds == b.mode_kinds and a.mode_orders == b.mode_orders
    assert [i.description for i in a.mode_info] == [i.description for i in b.mode_info]
    assert [i.joints for i in a.mode_info] == [i.joints for i in b.mode_info]
    assert np.max(np.abs(a.mode_displacements - b.mode_displacements)) < 1e-12
    # the dense path projects with the shifted factorisation (refined to ~1e-9), the
    # sparse one by each truss's SVD
    assert np.max(np.abs(a.mode_prestress - b.mode_prestress)) < 1e-7
    da, db = a.to_dict(), b.to_dict()
    assert {k: v for k, v in da.items() if k != "mechanism_modes"} == \
        {k: v for k, v in db.items() if k != "mechanism_modes"}
    for x, y in zip(da["mechanism_modes"], db["mechanism_modes"]):
        assert {k: v for k, v in x.items() if k != "prestress"} == \
            {k: v for k, v in y.items() if k != "prestress"}
        assert x.get("prestress", {}).keys() == y.get("prestress", {}).keys()
        assert all(abs(x["prestress"][k] - y["prestress"][k]) <= 2e-6
                   for k in x.get("prestress", {}))
    # the text groups the one-joint modes the same way in both
    line = ("Joints L1, L2, L3, L4 of frames F1-F8 (32 joints) are each free out of the plane "
            "of their members (along y)")
    assert line in render_audit(a) and line in render_audit(b)
    assert "".join(b.json_chunks()) == json.dumps(db, indent=1)


def test_one_joint_stiffening_state_against_null_space():
    """A one-joint mode's stiffening state is P p, p = 1 / L on that joint's members only."""
    f, _, b = _roof_pair(5, 4)
    dofs = free_dofs(f)
    C = compatibility_matrix(f, dofs).toarray()
    Q = sla.null_space(C.T)                      # reference: the self-stress space
    assert Q.shape[1] == b.self_stress_states == 5
    L = f.lengths()
    for i in range(b.internal_mechanisms):
        joints, u = b.modes.support(i)
        if len(joints) != 1:
            continue
        j = joints[0]
        at = np.flatnonzero((f.ends == j).any(axis=1))
        p = np.zeros(f.n_members)
        p[at] = np.sum(u[0] ** 2) / L[at]         # the other end stays: du = u_j
        t = Q @ (Q.T @ p)
        t /= np.max(np.abs(t))
        assert np.max(np.abs(b.stiffening[i] - t)) < 1e-9
        assert b.mode_orders[i].startswith("first-order")


def test_blocks_of_a_roof_and_projection_against_null_space():
    """Roof, derived by hand from the members' directions: in each truss's plane the truss
    is one block, except its end post V0 (L0 pinned; the only member on U0's vertical
    coordinate), a block of its own; each line of purlins (along y only) with its joints'
    y coordinates is a block; each interior bottom joint's y coordinate (no member) is one
    alone: F + F + (p + 1) + (p - 1) F blocks."""
    F, p = 4, 3
    f = plane_truss_roof(F, p)
    dofs = free_dofs(f)
    C = compatibility_matrix(f, dofs)
    member, coordinate = member_blocks(C)
    assert len(set(member) | set(coordinate)) == F + F + (p + 1) + (p - 1) * F
    Q = sla.null_space(C.toarray().T)
    rng = np.random.default_rng(7)
    Y = np.zeros((f.n_members, 3))
    truss = np.flatnonzero(member == member[0])
    Y[truss[:5], 0] = rng.standard_normal(5)               # inside one truss block
    Y[:, 1] = rng.standard_normal(f.n_members)             # across blocks: the global path
    decision = spaceframe.analysis.nullspace.decide_rank(C, joint_of=dofs.joint_of())
    P = project_sparse(C, sp.csc_matrix(Y), decision.project, decision.threshold).toarray()
    assert np.max(np.abs(P - Q @ (Q.T @ Y))) < 1e-8
    assert np.all(P[member != member[0], 0] == 0)          # stays inside its block
    # the columns in another order (global first, an empty one between): the same columns
    order = [1, 2, 0]
    P2 = project_sparse(C, sp.csc_matrix(Y[:, order]), decision.project,
                        decision.threshold).toarray()
    assert np.array_equal(P2, P[:, order])


def test_projections_the_same_when_their_arrays_grow(monkeypatch):
    """The whole frame's projections are written into arrays grown by doubling: with room
    for ten entries at first, the same matrix as with room for all."""
    import spaceframe.analysis.blocks as blocks

    f = plane_truss_roof(4, 3)
    dofs = free_dofs(f)
    C = compatibility_matrix(f, dofs)
    Y = np.random.default_rng(11).standard_normal((f.n_members, 5))
    decision = spaceframe.analysis.nullspace.decide_rank(C, joint_of=dofs.joint_of())
    whole = project_sparse(C, sp.csc_matrix(Y), decision.project, decision.threshold)
    monkeypatch.setattr(blocks, "_ROOM", 10)
    grown = project_sparse(C, sp.csc_matrix(Y), decision.project, decision.threshold)
    assert (whole != grown).nnz == 0 and whole.nnz > 10
    Q = sla.null_space(C.toarray().T)                      # scipy's null space as reference
    assert np.max(np.abs(grown.toarray() - Q @ (Q.T @ Y))) < 1e-8


def test_product_forces_sparse_equal_dense():
    f, a, b = _roof_pair(4, 4)
    inner = b.modes.take(np.arange(b.internal_mechanisms))
    assert np.allclose(product_forces_sparse(f, inner).toarray(),
                       product_forces(f, inner.dense()), rtol=0, atol=1e-14)


def test_declared_prestress_on_sparse_modes():
    f = plane_truss_roof(4, 3)
    dofs = free_dofs(f)
    t = sla.null_space(compatibility_matrix(f, dofs).toarray().T)[:, 0]
    t = t / np.max(np.abs(t)) * np.sign(t[np.argmax(np.abs(t))])
    g = replace(f, prestress=t)
    a, b = spaceframe.audit(g), spaceframe.audit(g, tol=SPARSE)
    assert np.array_equal(a.declared_prestress.stiffens, b.declared_prestress.stiffens)
    assert a.declared_prestress.holds == b.declared_prestress.holds is False
    assert 0 < int(b.declared_prestress.stiffens.sum()) < b.internal_mechanisms


def test_forces_with_sparse_modes_equal_dense():
    from spaceframe.loads import LoadCase, LoadSet

    f = plane_truss_roof(4, 3)
    down = {f"F{i}.U{j}": [0.0, 0.0, -10.0] for i in range(1, 5) for j in range(4)}
    side = {"F2.L1": [0.0, 5.0, 0.0]}
    loads = LoadSet(cases=(LoadCase("down", tuple(down), list(down.values())),
                           LoadCase("side", tuple(side), list(side.values()))))
    a = spaceframe.forces(f, loads=loads)
    b = spaceframe.forces(f, loads=loads, tol=SPARSE)
    assert np.array_equal(a.carried, b.carried) and list(a.carried) == [True, False]
    assert np.allclose(a.mechanism_fraction, b.mechanism_fraction, atol=1e-12)
    assert np.allclose(a.member_forces[0], b.member_forces[0], atol=1e-8 * 40)


def test_cli_json_is_the_document_written_whole(tmp_path):
    """``audit --json`` writes the document a piece at a time: the same bytes as json.dumps."""
    from click.testing import CliRunner

    from spaceframe.cli import main
    from spaceframe.io import save

    f = plane_truss_roof(6, 4)
    path = tmp_path / "roof.json"
    save(f, path)
    out = CliRunner().invoke(main, ["audit", "--json", str(path)])
    assert out.exit_code == 1                                  # mechanisms: exit status 1
    whole = spaceframe.audit(spaceframe.load(path)).to_dict()
    assert out.output == json.dumps(whole, indent=1, allow_nan=False) + "\n"
    assert json.loads(out.output)["mechanisms"] == 3 * 6 + 4 + 1   # (p - 1) F + p + 1, p = 4, F = 6


def test_views_and_bracing_read_sparse_modes_as_dense():
    """The scene, the report's geometry and the bracing proposal of a result held sparse
    are those of the same result held dense (the modes agree exactly, above)."""
    from spaceframe.analysis.bracing.selection import recommend_bracing
    from spaceframe.views.report import report_document
    from spaceframe.views.scene import scene_of

    f, a, b = _roof_pair(4, 3)
    sa, sb = scene_of(a), scene_of(b)
    assert len(sa.modes) == len(sb.modes) == a.mechanisms == 2 * 4 + 3 + 1   # (p-1)F+p+1, F=4, p=3
    assert all(np.array_equal(x, y) for x, y in zip(sa.modes, sb.modes))
    ga, gb = report_document(a)["geometry"], report_document(b)["geometry"]
    assert ga["modes"] == gb["modes"] and ga["moving"] == gb["moving"]
    ba, bb = recommend_bracing(f), recommend_bracing(f, tol=SPARSE)
    assert ba.chosen == bb.chosen and ba.remaining == bb.remaining and ba.lateral == bb.lateral
    assert bb.after.mechanisms == 0
