"""Imported geometry: meshes, OBJ lines, CSV pairs, drawings, support rules and convert."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner

import spaceframe
from spaceframe import ModelError, SpaceframeWarning
from spaceframe.cli import main
from spaceframe.selection import apply_rules

trimesh = pytest.importorskip("trimesh")
MODELS = Path(__file__).resolve().parents[2] / "models"


def counts(frame):
    r = spaceframe.audit(frame)
    return r.rigid_body_modes, r.internal_mechanisms, r.self_stress_states


def edge_set(frame):
    """Members as unordered pairs of rounded coordinates: ids and order do not matter."""
    key = [tuple(np.round(x, 9)) for x in frame.coords]
    return {frozenset((key[a], key[b])) for a, b in frame.ends.tolist()}


@pytest.mark.parametrize("suffix", [".stl", ".obj", ".ply", ".off", ".glb"])
def test_convex_triangulated_polyhedron_is_rigid_from_every_format(tmp_path, suffix):
    # Cauchy (1813) and Dehn (1916): a convex polyhedron with triangular faces, taken as a
    # pin-jointed frame, is infinitesimally rigid: 6 rigid-body modes, no internal
    # mechanism, no self-stress (E = 3V - 6, so it is also just rigid)
    sphere = trimesh.creation.icosphere(subdivisions=1)
    path = tmp_path / f"ball{suffix}"
    sphere.export(path)
    frame = spaceframe.load(path)
    assert (frame.n_joints, frame.n_members) == (len(sphere.vertices), len(sphere.edges_unique))
    assert counts(frame) == (6, 0, 0)


def test_obj_line_elements(tmp_path):
    # a tetrahedron drawn as lines only (one polyline and loose lines): Cauchy/Dehn again
    path = tmp_path / "tet.obj"
    path.write_text("v 0 0 0\nv 1 0 0\nv 0 1 0\nv 0 0 1\nl 1 2 3 1\nl 1 4\nl 2 4\nl -2 -1\n")
    frame = spaceframe.load(path)
    assert (frame.n_joints, frame.n_members) == (4, 6)
    assert counts(frame) == (6, 0, 0)


def test_quadrilateral_faces_add_no_diagonal(tmp_path):
    # the pin-jointed cube (Pellegrino & Calladine 1986): 8 joints, 12 bars,
    # 3 x 8 - 12 = 12 mechanisms, 6 of them internal, no self-stress
    cube = trimesh.creation.box()
    quads = ["v %g %g %g" % tuple(v) for v in [(0, 0, 0), (1, 0, 0), (1, 1, 0), (0, 1, 0),
                                               (0, 0, 1), (1, 0, 1), (1, 1, 1), (0, 1, 1)]]
    quads += ["f 1 4 3 2", "f 5 6 7 8", "f 1 2 6 5", "f 2 3 7 6", "f 3 4 8 7", "f 4 1 5 8"]
    path = tmp_path / "cube.obj"
    path.write_text("\n".join(quads) + "\n")
    frame = spaceframe.load(path)
    assert frame.n_members == 12 and len(cube.edges_unique) == 18   # trimesh would add 6
    assert counts(frame) == (6, 6, 0)


def test_coincident_vertices_merge_and_degenerate_edges_drop(tmp_path):
    path = tmp_path / "tri.obj"
    path.write_text("v 0 0 0\nv 1 0 0\nv 0 1 0\nv 1 0 1e-9\nl 1 2\nl 2 3\nl 3 1\nl 2 4\n")
    with pytest.warns(SpaceframeWarning, match="1 edge.*no length dropped.*\\(1, 0, 0\\)"):
        frame = spaceframe.load(path)
    assert (frame.n_joints, frame.n_members) == (3, 3)


@pytest.mark.parametrize("text, pieces", [
    ("# nothing here\n", ["no faces and no lines"]),
    ("v 0 0 0\nv 1 0 0\nl 1 3\n", [":3:", "names vertex 3"]),
])
def test_bad_mesh_exits_2(tmp_path, text, pieces):
    path = tmp_path / "bad.obj"
    path.write_text(text)
    res = CliRunner().invoke(main, ["audit", str(path)])
    assert res.exit_code == 2 and "Traceback" not in res.output
    assert str(path) in res.stderr
    for piece in pieces:
        assert piece in res.stderr


def test_support_rules_and_sidecar(tmp_path):
    import shutil
    obj = tmp_path / "dome.obj"
    shutil.copy(MODELS / "dome_canopy.obj", obj)
    free = CliRunner().invoke(main, ["audit", str(obj), "--json"])
    assert free.exit_code == 1            # free-standing: its six rigid-body motions
    (tmp_path / "dome.supports.toml").write_text('supports = ["pin at z = min"]\n')
    held = CliRunner().invoke(main, ["audit", str(obj)])
    assert held.exit_code == 0
    # a command-line rule has the last word: freeing the base ring again
    freed = CliRunner().invoke(main, ["audit", str(obj), "--supports", "free at z = min"])
    assert freed.exit_code == 1


def test_selection_grammar():
    f = spaceframe.Frame.from_arrays([[0, 0, 0], [10, 0, 0], [0, 0.004, 5], [20, 1, 0]],
                                     [[0, 1], [1, 2], [2, 3]])
    g = apply_rules(f, ["pin at z = min", "y at x = 0 within 0.01", "xz at nearest 19 1 0.5",
                        "free at J2"])
    held = {f.joint_ids[j]: d.tolist() for j, d in zip(g.restraint_joint, g.restraint_dir)}
    assert set(held) == {"J1", "J3", "J4"}
    assert g.restraint_dir[g.restraint_joint == 2].tolist() == [[0, 1, 0]]   # replaced by 'y'
    assert g.restraint_dir[g.restraint_joint == 3].tolist() == [[1, 0, 0], [0, 0, 1]]
    with pytest.raises(ModelError, match="picks no joint.*x = 0"):
        apply_rules(f, ["pin at x = 3"])
    with pytest.raises(ModelError, match="did you mean 'J3'"):
        apply_rules(f, ["pin at J33"])


JOINTS = "id,x,y,z,support\nA,0,0,0,pin\nB,4,0,0,yz\nC,2,0,3,\n"
MEMBERS = "id,start,end\nAB,A,B\nBC,B,C\nCA,C,A\n"


def test_csv_pair_reads_like_the_native_file(tmp_path):
    (tmp_path / "p_joints.csv").write_text(JOINTS)
    (tmp_path / "p_members.csv").write_text(MEMBERS)
    frame = spaceframe.load(tmp_path / "p_members.csv")
    assert frame.joint_ids == ("A", "B", "C") and frame.n_restraints == 5
    r = spaceframe.audit(frame)
    # derived: the triangle of the native format's sample, A pinned and B held in y and z,
    # has one mechanism (the triangle turning about the line AB) and no self-stress
    assert (r.mechanisms, r.self_stress_states) == (1, 0)


@pytest.mark.parametrize("joints, members, pieces", [
    ("id,x,z\nA,0,0\n", MEMBERS, ["p_joints.csv:1:", "lacks the column(s) y"]),
    ("id,x,y,z\nA,0,0,0\nB,4,zero,0\nC,2,0,3\n", MEMBERS, ["p_joints.csv:3:", "'zero'"]),
    (JOINTS, "id,start,finish\nAB,A,B\n", ["p_members.csv:1:", "end"]),
    (JOINTS, "id,start,end\nAB,A,B\nBD,B,D\n", ["p_members.csv:3:", "'D'"]),
])
def test_bad_csv_exits_2_with_the_row(tmp_path, joints, members, pieces):
    (tmp_path / "p_joints.csv").write_text(joints)
    (tmp_path / "p_members.csv").write_text(members)
    res = CliRunner().invoke(main, ["audit", str(tmp_path / "p_joints.csv")])
    assert res.exit_code == 2 and "Traceback" not in res.output
    for piece in pieces:
        assert piece in res.stderr


def test_convert_writes_an_editable_model(tmp_path):
    import shutil
    obj = tmp_path / "dome.obj"
    shutil.copy(MODELS / "dome_canopy.obj", obj)
    shutil.copy(MODELS / "dome_canopy.supports.toml", tmp_path / "dome.supports.toml")
    out = tmp_path / "dome.toml"
    assert CliRunner().invoke(main, ["convert", str(obj), "-o", str(out)]).exit_code == 0
    a, b = spaceframe.load(out), spaceframe.load(obj)
    assert edge_set(a) == edge_set(b) and a.n_restraints == 36
    assert spaceframe.audit(a).stable
    again = CliRunner().invoke(main, ["convert", str(obj), "-o", str(out)])
    assert again.exit_code == 2 and "--force" in again.stderr


# ------------------------------------------------------------------ drawings

def truss_segments():
    truss = spaceframe.load(MODELS / "hall_truss.toml")
    return truss, truss.coords[truss.ends]


def write_dxf(path, segments, layer="TRUSS"):
    lines = [trimesh.path.entities.Line([2 * k, 2 * k + 1], layer=layer)
             for k in range(len(segments))]
    drawing = trimesh.path.Path2D(entities=lines, vertices=segments.reshape(-1, 2),
                                  process=False)
    path.write_text(trimesh.path.exchange.dxf.export_dxf(drawing))


def write_svg(path, segments, extra=""):
    body = "".join(f'<line x1="{float(a[0])!r}" y1="{-float(a[1])!r}" x2="{float(b[0])!r}" '
                   f'y2="{-float(b[1])!r}" stroke="black"/>' for a, b in segments)
    path.write_text(f'<svg xmlns="http://www.w3.org/2000/svg"><g id="truss">{body}</g>{extra}'
                    f'</svg>')


@pytest.mark.parametrize("writer", [write_dxf, write_svg], ids=["dxf", "svg"])
def test_drawing_gives_the_native_truss(tmp_path, writer):
    truss, segments = truss_segments()
    path = tmp_path / ("truss.dxf" if writer is write_dxf else "truss.svg")
    writer(path, segments)
    drawn = spaceframe.load(path)
    assert drawn.dimension == 2 and drawn.n_joints == truss.n_joints
    assert edge_set(drawn) == edge_set(truss)
    drawn = apply_rules(drawn, ["pin at nearest 0 0", "y at nearest 12 0"])
    r, s = spaceframe.audit(drawn), spaceframe.audit(truss)
    assert (r.mechanisms, r.self_stress_states) == (s.mechanisms, s.self_stress_states) == (0, 0)


def test_drawing_layers_select_members(tmp_path):
    truss, segments = truss_segments()
    path = tmp_path / "truss.svg"
    write_svg(path, segments, extra='<g id="grid"><line x1="-5" y1="0" x2="-5" y2="-9"/></g>')
    assert spaceframe.load(path).n_members == truss.n_members + 1
    from spaceframe.io.drawing import read_drawing
    assert read_drawing(path, layers=["truss"]).n_members == truss.n_members


def test_drawing_to_roof_with_supports_by_position(tmp_path):
    truss, segments = truss_segments()
    dxf = tmp_path / "truss.dxf"
    write_dxf(dxf, segments)
    spec = {"frames": 3, "spacing": 5.0,
            "support": [{"at": "nearest 0 0", "plane": "pin"}, {"at": "nearest 12 0", "plane": "y"}]}
    from spaceframe.extrude import extrude
    roof = extrude(dxf, spec)
    # derived, as for the native truss: 3 untied frames, each free out of plane at 12 joints
    assert spaceframe.audit(roof).mechanisms == 3 * 12


def test_crossing_lines_are_reported_not_joined(tmp_path):
    path = tmp_path / "x.svg"
    write_svg(path, np.array([[[0, 0], [4, 3]], [[0, 3], [4, 0]], [[0, 0], [0, 3]],
                              [[4, 0], [4, 3]]], float))
    with pytest.warns(SpaceframeWarning, match=r"cross without a joint.*\(2, 1\.5\)"):
        frame = spaceframe.load(path)
    assert frame.n_joints == 4


def test_duplicate_lines_merge_with_a_warning(tmp_path):
    truss, segments = truss_segments()
    path = tmp_path / "twice.dxf"
    write_dxf(path, np.concatenate([segments, segments[:1, ::-1]]))
    with pytest.warns(SpaceframeWarning, match=r"1 line\(s\) drawn twice.*\(0, 0\)"):
        frame = spaceframe.load(path)
    assert frame.n_members == truss.n_members


def test_lines_that_nearly_meet_exit_2(tmp_path):
    truss, segments = truss_segments()
    segments = segments.copy()
    segments[0, 1] = [1.95, 0.0]       # BC1 stops 5 cm short of L1
    path = tmp_path / "gap.dxf"
    write_dxf(path, segments)
    res = CliRunner().invoke(main, ["audit", str(path)])
    assert res.exit_code == 2 and "nearly but do not meet" in res.stderr
    assert "(1.95, 0)" in res.stderr and "0.05" in res.stderr


def test_drawing_with_no_lines_exits_2(tmp_path):
    path = tmp_path / "empty.svg"
    path.write_text('<svg xmlns="http://www.w3.org/2000/svg"><circle cx="1" cy="1" r="1"/></svg>')
    res = CliRunner().invoke(main, ["audit", str(path)])
    assert res.exit_code == 2 and "no straight lines" in res.stderr and "Traceback" not in res.output
