"""Meshes as modellers make them: non-manifold webs, duplicate faces, OFF polygons, units.

References: the native double-layer grid (spaceframe.families) for the grid
mesh, and numpy's dense SVD of a compatibility matrix built from scratch
(tests/common/matrices.py) for pyvista's bundled example meshes.
"""

from __future__ import annotations

import os

import numpy as np
import pytest
from click.testing import CliRunner

import spaceframe
import spaceframe.io
from spaceframe import ModelError, SpaceframeWarning
from spaceframe.cli import main
from spaceframe.families import double_layer_grid
from spaceframe.selection import apply_rules

from common.matrices import dense_compatibility

pytest.importorskip("trimesh")


def grid_faces(grid):
    """Triangles whose sides are exactly the grid's members, three or more on each web.

    Each bottom joint's four webs make a pyramid of four triangles (two on each web); each
    bottom chord b-b' with a top joint t that both ends reach makes the triangle (b, b', t),
    a third (and fourth) face on the webs b-t and b'-t.
    """
    X, low = grid.coords, grid.coords[:, 2] < 1e-9
    up = {b: [] for b in np.flatnonzero(low)}
    for a, b in grid.ends.tolist():
        if low[a] != low[b]:
            bottom, top = (a, b) if low[a] else (b, a)
            up[bottom].append(top)
    faces = []
    for b, tops in up.items():
        angle = [np.arctan2(*(X[t, :2] - X[b, :2])[::-1]) for t in tops]
        ring = [tops[i] for i in np.argsort(angle)]
        faces += [(b, ring[i], ring[(i + 1) % 4]) for i in range(4)]
    for a, b in grid.ends.tolist():
        if low[a] and low[b]:
            faces += [(a, b, t) for t in sorted(set(up[a]) & set(up[b]))]
    return faces


def test_grid_mesh_with_three_faces_on_each_web_has_the_native_counts(tmp_path):
    grid = double_layer_grid(3, supports="corners")
    faces = grid_faces(grid)
    sides = np.sort(np.array([(f[i], f[(i + 1) % 3]) for f in faces for i in range(3)]), axis=1)
    pairs, per_edge = np.unique(sides, axis=0, return_counts=True)
    low = grid.coords[:, 2] < 1e-9
    web = low[pairs[:, 0]] != low[pairs[:, 1]]
    # non-manifold: three faces or more on every web but the four at the corners, which
    # no third triangle of members can reach
    assert (per_edge[web] >= 3).sum() == web.sum() - 4
    obj = tmp_path / "grid.obj"
    obj.write_text("".join(f"v {x!r} {y!r} {z!r}\n" for x, y, z in grid.coords.tolist())
                   + "".join(f"f {a + 1} {b + 1} {c + 1}\n" for a, b, c in faces))
    mesh = spaceframe.load(obj)
    assert (mesh.n_joints, mesh.n_members) == (grid.n_joints, grid.n_members)
    corners = [f"pin at nearest {x!r} {y!r} {z!r}" for x, y, z in
               grid.coords[np.unique(grid.restraint_joint)].tolist()]
    a, b = spaceframe.audit(apply_rules(mesh, corners)), spaceframe.audit(grid)
    assert (a.mechanisms, a.internal_mechanisms, a.self_stress_states) == \
        (b.mechanisms, b.internal_mechanisms, b.self_stress_states)


def _bundled_ply():
    import pyvista
    folder = os.path.join(os.path.dirname(pyvista.__file__), "examples")
    return sorted(os.path.join(folder, f) for f in os.listdir(folder) if f.endswith(".ply"))


@pytest.mark.parametrize("path", _bundled_ply(), ids=os.path.basename)
def test_pyvista_bundled_ply_meshes_load(path):
    frame = spaceframe.load(path)
    assert frame.n_members > frame.n_joints > 100


# the SVD reference for the mesh with a non-manifold edge (airplane, 3,789 x 4,005: tens of
# seconds, hence slow) and for a small manifold one
@pytest.mark.parametrize("path", [pytest.param(p, marks=pytest.mark.slow)
                                  if p.endswith("airplane.ply") else p for p in _bundled_ply()
                                  if p.endswith(("airplane.ply", "sphere.ply"))],
                         ids=os.path.basename)
def test_pyvista_bundled_ply_meshes_match_numpy_svd(path):
    import trimesh
    raw = trimesh.load(path, process=False)
    sides = np.sort(raw.edges, axis=1)
    _, per_edge = np.unique(sides, axis=0, return_counts=True)
    if os.path.basename(path) == "airplane.ply":
        assert per_edge.max() >= 3                   # the one with a non-manifold edge
    frame = spaceframe.load(path)
    r = spaceframe.audit(frame, self_stress_cap=0, soft=False, redundancy=False)
    # reference: numpy's SVD of the compatibility matrix of the same joints and edges, free
    # standing; rank by the same relative threshold (1e-6 of the largest singular value)
    C = dense_compatibility(frame.coords, frame.ends.tolist())
    s = np.linalg.svd(C, compute_uv=False)
    rank = int((s > 1e-6 * s[0]).sum())
    assert r.rank == rank
    assert r.mechanisms == C.shape[1] - rank and r.self_stress_states == C.shape[0] - rank


def test_duplicate_faces_are_dropped_with_a_warning(tmp_path):
    obj = tmp_path / "twice.obj"
    obj.write_text("v 0 0 0\nv 1 0 0\nv 0 1 0\nv 0 0 1\nv 0 0 -1\n"
                   "f 1 2 3\nf 1 2 4\nf 1 2 5\nf 3 2 1\n")
    with pytest.warns(SpaceframeWarning, match=r"1 face\(s\) given twice.*\(0, 0, 0\)"):
        frame = spaceframe.load(obj)
    # three faces on the edge 1-2 are read as drawn: 7 distinct sides
    assert (frame.n_joints, frame.n_members) == (5, 7)


def test_off_polygons_keep_their_sides(tmp_path):
    # a cube as six quadrilaterals: 12 members, no diagonals.  Derived: 8 joints x 3 - 12 =
    # 12 free motions, of which 6 are rigid-body, so 6 internal mechanisms and no self-stress
    off = tmp_path / "cube.off"
    v = [(x, y, z) for x in (0, 1) for y in (0, 1) for z in (0, 1)]
    quads = [(0, 1, 3, 2), (4, 6, 7, 5), (0, 4, 5, 1), (2, 3, 7, 6), (0, 2, 6, 4), (1, 5, 7, 3)]
    off.write_text("OFF\n# a cube\n8 6 12\n" + "".join(f"{x} {y} {z}\n" for x, y, z in v)
                   + "".join("4 " + " ".join(map(str, q)) + " 255 0 0\n" for q in quads))
    frame = spaceframe.load(off)
    assert (frame.n_joints, frame.n_members) == (8, 12)
    r = spaceframe.audit(frame)
    assert (r.rigid_body_modes, r.internal_mechanisms, r.self_stress_states) == (6, 6, 0)
    bad = tmp_path / "bad.off"
    bad.write_text("OFF\n3 1 0\n0 0 0\n1 0 0\n0 1 0\n3 0 1 7\n")
    res = CliRunner().invoke(main, ["audit", str(bad)])
    assert res.exit_code == 2 and ":6:" in res.stderr and "0 to 2" in res.stderr


def test_units_option_for_files_without_units(tmp_path):
    stl = tmp_path / "tet.stl"
    import trimesh
    trimesh.Trimesh([[0, 0, 0], [1000, 0, 0], [0, 1000, 0], [0, 0, 1000]],
                    [[0, 2, 1], [0, 1, 3], [0, 3, 2], [1, 2, 3]]).export(stl)
    assert spaceframe.load(stl).units == "m"
    assert spaceframe.load(stl, units="mm").units == "mm"
    res = CliRunner().invoke(main, ["audit", str(stl), "--units", "mm"])
    assert "lengths in mm" in res.stdout
    res = CliRunner().invoke(main, ["audit", str(stl), "--units", "furlong"])
    assert res.exit_code == 2
    glb = tmp_path / "tet.glb"
    trimesh.load(stl).export(glb)
    assert spaceframe.load(glb).units == "m"
    with pytest.raises(ModelError, match="in metres by its specification"):
        spaceframe.load(glb, units="mm")
    toml = tmp_path / "t.toml"
    spaceframe.io.save(spaceframe.load(stl), toml)
    with pytest.raises(ModelError, match="--units does not apply to '.toml'"):
        spaceframe.load(toml, units="mm")
