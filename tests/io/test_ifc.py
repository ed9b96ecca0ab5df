"""IFC models in and out: files written here with ifcopenshell's own API.

The reference for every count is the same frame as a native model (or a
count derived in the comment); the IFC files are built with ifcopenshell's
``api`` (``root.create_entity``, ``structural.*``, ``geometry.*``,
``unit.*``), not with spaceframe's writer, except in the round trips.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner

import spaceframe
import spaceframe.io
from spaceframe import ModelError
from spaceframe.cli import main
from spaceframe.families import double_layer_grid
from spaceframe.selection import apply_rules

ifcopenshell = pytest.importorskip("ifcopenshell")
import ifcopenshell.api.context  # noqa: E402
import ifcopenshell.api.geometry  # noqa: E402
import ifcopenshell.api.project  # noqa: E402
import ifcopenshell.api.root  # noqa: E402
import ifcopenshell.api.structural  # noqa: E402
import ifcopenshell.api.unit  # noqa: E402

MODELS = Path(__file__).resolve().parents[2] / "models"


def _new_file(prefix):
    """An IFC4 file with a project, its length unit (metre with ``prefix``) and contexts."""
    f = ifcopenshell.api.project.create_file(version="IFC4")
    ifcopenshell.api.root.create_entity(f, ifc_class="IfcProject", name="test project")
    unit = ifcopenshell.api.unit.add_si_unit(f, unit_type="LENGTHUNIT", prefix=prefix)
    ifcopenshell.api.unit.assign_unit(f, units=[unit])
    model = ifcopenshell.api.context.add_context(f, context_type="Model")
    ref = ifcopenshell.api.context.add_context(f, context_type="Model",
                                               context_identifier="Reference",
                                               target_view="GRAPH_VIEW", parent=model)
    body = ifcopenshell.api.context.add_context(f, context_type="Model", context_identifier="Body",
                                                target_view="MODEL_VIEW", parent=model)
    return f, ref, body


def structural_ifc(path, frame, *, prefix=None, scale=1.0, springs=None):
    """Write ``frame`` as an IfcStructuralAnalysisModel through ifcopenshell.api.

    Axis-aligned supports become fixed translations (IfcBoolean); ``springs``
    maps a joint index to a translational stiffness given instead of fixity.
    """
    f, ref, _ = _new_file(prefix)
    api = ifcopenshell.api
    sam = api.structural.add_structural_analysis_model(f)
    vertices, products = [], []
    for j, jid in enumerate(frame.joint_ids):
        conn = api.root.create_entity(f, ifc_class="IfcStructuralPointConnection", name=jid)
        vp = f.createIfcVertexPoint(f.createIfcCartesianPoint(
            [float(c) * scale for c in frame.coords[j]]))
        rep = api.geometry.add_topology_representation(f, context=ref, item=vp)
        api.geometry.assign_representation(f, product=conn, representation=rep)
        rows = frame.restraint_dir[frame.restraint_joint == j]
        if len(rows):
            held = {int(np.argmax(np.abs(r))) for r in rows}
            bc = api.structural.add_structural_boundary_condition(f, connection=conn)
            attrs = {}
            for a, axis in enumerate("XYZ"):
                if springs and j in springs:
                    attrs[f"TranslationalStiffness{axis}"] = {
                        "type": "IfcLinearStiffnessMeasure", "value": float(springs[j])}
                else:
                    attrs[f"TranslationalStiffness{axis}"] = {"type": "IfcBoolean",
                                                              "value": a in held}
                attrs[f"RotationalStiffness{axis}"] = {"type": "IfcBoolean", "value": False}
            api.structural.edit_structural_boundary_condition(f, condition=bc, attributes=attrs)
        vertices.append(vp)
        products.append(conn)
    for k, mid in enumerate(frame.member_ids):
        a, b = (int(i) for i in frame.ends[k])
        member = api.root.create_entity(f, ifc_class="IfcStructuralCurveMember",
                                        predefined_type="PIN_JOINED_MEMBER", name=mid)
        edge = f.createIfcEdge(vertices[a], vertices[b])
        rep = api.geometry.add_topology_representation(f, context=ref, item=edge)
        api.geometry.assign_representation(f, product=member, representation=rep)
        for j in (a, b):
            api.structural.add_structural_member_connection(
                f, relating_structural_member=member, related_structural_connection=products[j])
        products.append(member)
    api.structural.assign_structural_analysis_model(f, products=products,
                                                    structural_analysis_model=sam)
    f.write(str(path))
    return path


def counts(frame):
    r = spaceframe.audit(frame)
    return r.mechanisms, r.internal_mechanisms, r.self_stress_states


def support_rows(frame):
    """Joint id -> projector onto its held directions (independent of the rows' order)."""
    out = {}
    for j in np.unique(frame.restraint_joint):
        R = frame.restraint_dir[frame.restraint_joint == j]
        out[frame.joint_ids[j]] = R.T @ np.linalg.pinv(R.T)
    return out


@pytest.mark.parametrize("prefix, scale, units", [(None, 1.0, "m"), ("MILLI", 1000.0, "mm")])
def test_structural_model_counts_equal_the_native_frame(tmp_path, prefix, scale, units):
    grid = double_layer_grid(3, supports="corners")
    path = structural_ifc(tmp_path / "grid.ifc", grid, prefix=prefix, scale=scale)
    frame = spaceframe.load(path)
    assert frame.units == units
    assert (frame.n_joints, frame.n_members, frame.n_restraints) == \
        (grid.n_joints, grid.n_members, grid.n_restraints)
    # the same frame as the native model: ids are the IFC names, coordinates in the file's unit
    assert frame.joint_ids == grid.joint_ids and frame.member_ids == grid.member_ids
    assert np.allclose(frame.coords, grid.coords * scale)
    assert counts(frame) == counts(grid)
    assert frame.joint_tags["ifc_guid"][0] and len(set(frame.joint_tags["ifc_guid"])) == \
        frame.n_joints


def test_translational_stiffness_large_is_held_small_is_free(tmp_path):
    grid = double_layer_grid(2, supports="corners")
    corners = sorted(set(grid.restraint_joint.tolist()))
    stiff = structural_ifc(tmp_path / "stiff.ifc", grid, springs={corners[0]: 1e13})
    soft = structural_ifc(tmp_path / "soft.ifc", grid, springs={corners[0]: 1e3})
    assert spaceframe.load(stiff).n_restraints == grid.n_restraints
    # a 1 kN/m spring is no support for a pin-jointed audit: that corner's three rows go
    assert spaceframe.load(soft).n_restraints == grid.n_restraints - 3


def test_member_through_a_connection_is_split(tmp_path):
    # a plane truss in the x-z plane whose bottom chord is one curve member from end to end,
    # with connections part-way along it: the chord stands for the chain of members
    truss = spaceframe.load(MODELS / "hall_truss.toml")
    X = np.column_stack([truss.coords[:, 0], np.zeros(truss.n_joints), truss.coords[:, 1]])
    bottom = [j for j in range(truss.n_joints) if abs(X[j, 2]) < 1e-12]
    left, right = min(bottom, key=lambda j: X[j, 0]), max(bottom, key=lambda j: X[j, 0])
    chord = [k for k in range(truss.n_members) if set(truss.ends[k]) <= set(bottom)]
    ends = [truss.ends[k] for k in range(truss.n_members) if k not in chord] + [[left, right]]
    ids = [truss.member_ids[k] for k in range(truss.n_members) if k not in chord] + ["BC"]
    one_line = spaceframe.Frame.from_arrays(X, ends, joint_ids=truss.joint_ids, member_ids=ids,
                                            supports={left: "pin", right: "yz"})
    path = structural_ifc(tmp_path / "chord.ifc", one_line)
    with pytest.warns(spaceframe.SpaceframeWarning, match="1 member.*split.*BC"):
        frame = spaceframe.load(path)
    assert frame.n_members == truss.n_members
    assert sum(m.startswith("BC.") for m in frame.member_ids) == len(chord)
    with pytest.warns(spaceframe.SpaceframeWarning, match="1 member.*split"):
        rejoined = spaceframe.load(path, split=True)
    assert rejoined.n_members == frame.n_members
    assert spaceframe.load(path, split=False).n_members == len(ids)


def _element(f, body, ifc_class, name, start, end, *, extruded):
    """An IfcColumn/IfcBeam/IfcMember from ``start`` to ``end``: an Axis polyline, or an
    extruded rectangle placed at ``start`` and swept along its placement's z axis."""
    api = ifcopenshell.api
    e = api.root.create_entity(f, ifc_class=ifc_class, name=name)
    start, end = np.asarray(start, float), np.asarray(end, float)
    axis = end - start
    length = float(np.linalg.norm(axis))
    z = axis / length
    x = np.cross([0.0, 1.0, 0.0] if abs(z[1]) < 0.9 else [1.0, 0.0, 0.0], z)
    x /= np.linalg.norm(x)
    matrix = np.eye(4)
    matrix[:3, 0], matrix[:3, 1], matrix[:3, 2], matrix[:3, 3] = x, np.cross(z, x), z, start
    api.geometry.edit_object_placement(f, product=e, matrix=matrix, is_si=False)
    if extruded:
        profile = f.createIfcRectangleProfileDef("AREA", None, None, 0.02 * length,
                                                 0.02 * length)
        solid = f.createIfcExtrudedAreaSolid(profile, None, f.createIfcDirection((0., 0., 1.)),
                                             length)
        rep = f.createIfcShapeRepresentation(body, "Body", "SweptSolid", [solid])
    else:
        line = f.createIfcPolyline([f.createIfcCartesianPoint((0., 0., 0.)),
                                    f.createIfcCartesianPoint((0., 0., length))])
        rep = f.createIfcShapeRepresentation(body, "Axis", "Curve3D", [line])
    api.geometry.assign_representation(f, product=e, representation=rep)
    return e


@pytest.mark.parametrize("prefix, scale", [(None, 1.0), ("MILLI", 1000.0)])
def test_architectural_model_axes_meet_and_split(tmp_path, prefix, scale):
    # a two-bay braced frame: three columns (extruded bodies), one beam running over all
    # three (an Axis line: the middle column meets it part-way, a T-junction) and a brace
    # in each bay, as IfcMember axes.  Native: the same lines as members, bases pinned.
    f, _, body = _new_file(prefix)
    s, h = 6.0 * scale, 4.0 * scale
    for i in range(3):
        _element(f, body, "IfcColumn", f"C{i + 1}", (i * s, 0, 0), (i * s, 0, h), extruded=True)
    _element(f, body, "IfcBeam", "B1", (0, 0, h), (2 * s, 0, h), extruded=False)
    _element(f, body, "IfcMember", "X1", (0, 0, 0), (s, 0, h), extruded=False)
    _element(f, body, "IfcMember", "X2", (2 * s, 0, 0), (s, 0, h), extruded=False)
    path = tmp_path / "frame.ifc"
    f.write(str(path))
    with pytest.warns(spaceframe.SpaceframeWarning, match="1 axis.*split.*B1"):
        frame = spaceframe.load(path)
    native = spaceframe.Frame.from_arrays(
        np.array([[0, 0, 0], [6, 0, 0], [12, 0, 0], [0, 0, 4], [6, 0, 4], [12, 0, 4]]) * scale,
        [[0, 3], [1, 4], [2, 5], [3, 4], [4, 5], [0, 4], [2, 4]])
    assert (frame.n_joints, frame.n_members) == (6, 7)
    assert sorted(frame.member_ids) == ["B1.1", "B1.2", "C1", "C2", "C3", "X1", "X2"]
    assert frame.units == ("mm" if prefix else "m")
    held = apply_rules(frame, ["pin at z = min"])
    ref = apply_rules(native, ["pin at z = min"])
    # derived: the three top joints have 6 freedoms in the x-z plane and 7 members on them
    # (3 columns, 2 beam pieces, 2 braces): held in plane with 1 state of self-stress.  Each
    # is free along y (3 mechanisms); all three together turn the frame about the line of
    # its pinned bases, a rigid-body motion, so 2 are internal
    assert counts(held) == counts(ref) == (3, 2, 1)


def test_round_trip_toml_ifc_toml_keeps_joints_members_supports_tags(tmp_path):
    hall = spaceframe.load(MODELS / "hall_roof_braced.toml")
    ifc, back = tmp_path / "hall.ifc", tmp_path / "hall.toml"
    res = CliRunner().invoke(main, ["convert", str(MODELS / "hall_roof_braced.toml"), "-o",
                                    str(ifc)])
    assert res.exit_code == 0, res.output
    assert "not its load cases" in res.output     # the model's loads: said, not dropped silently
    res = CliRunner().invoke(main, ["convert", str(ifc), "-o", str(back)])
    assert res.exit_code == 0, res.output
    again = spaceframe.load(back)
    assert again.joint_ids == hall.joint_ids and again.member_ids == hall.member_ids
    assert np.array_equal(again.ends, hall.ends) and np.allclose(again.coords, hall.coords)
    assert again.units == hall.units
    a, b = support_rows(again), support_rows(hall)
    assert a.keys() == b.keys() and all(np.allclose(a[k], b[k]) for k in a)
    for kind in ("joint_tags", "member_tags"):          # a tag with no label comes back empty
        for k, labels in getattr(hall, kind).items():
            assert getattr(again, kind).get(k, ("",) * len(labels)) == labels


def test_round_trip_keeps_an_inclined_roller_and_a_plane_frame(tmp_path):
    # an inclined restraint [0, 0.6, 0.8] goes out as a ConditionCoordinateSystem
    frame = spaceframe.Frame.from_arrays(
        [[0, 0, 0], [4, 0, 0], [2, 3, 0], [2, 1, 3]],
        [[0, 1], [1, 2], [2, 0], [0, 3], [1, 3], [2, 3]],
        supports={0: "pin", 1: [[0, 0.6, 0.8], [1, 0, 0]], 2: "z"}, units="mm")
    spaceframe.io.save(frame, tmp_path / "f.ifc")
    back = spaceframe.load(tmp_path / "f.ifc")
    a, b = support_rows(back), support_rows(frame)
    assert a.keys() == b.keys() and all(np.allclose(a[k], b[k]) for k in a)
    assert back.units == "mm" and counts(back) == counts(frame)
    truss = spaceframe.load(MODELS / "hall_truss.toml")              # dimension = 2
    with pytest.warns(spaceframe.SpaceframeWarning, match="not its load cases"):
        spaceframe.io.save(truss, tmp_path / "t.ifc")              # the truss has loads
    plane = spaceframe.load(tmp_path / "t.ifc")
    assert plane.dimension == 2 and np.allclose(plane.coords, truss.coords)
    assert counts(plane) == counts(truss)


def test_brace_writes_bracing_members_into_ifc(tmp_path):
    out = tmp_path / "braced.ifc"
    res = CliRunner().invoke(main, ["brace", str(MODELS / "canopy_sway.toml"), "--write",
                                    str(out), "--json"])
    assert res.exit_code == 0, res.output
    import json
    added = json.loads(res.stdout)["added"]
    f = ifcopenshell.open(str(out))
    braces = [m for m in f.by_type("IfcStructuralCurveMember") if m.Description == "bracing"]
    assert sorted(m.Name for m in braces) == sorted(a["id"] for a in added) and added
    assert spaceframe.audit(spaceframe.load(out)).stable


def test_missing_ifcopenshell_names_the_extra(tmp_path, monkeypatch):
    import sys
    path = structural_ifc(tmp_path / "g.ifc", double_layer_grid(1))
    for name in [n for n in sys.modules if n == "ifcopenshell" or n.startswith("ifcopenshell.")]:
        monkeypatch.setitem(sys.modules, name, None)      # import now raises ImportError
    res = CliRunner().invoke(main, ["audit", str(path)])
    assert res.exit_code == 2 and "pip install 'spaceframe[ifc]'" in res.stderr
    res = CliRunner().invoke(main, ["convert", str(MODELS / "canopy_sway.toml"), "-o",
                                    str(tmp_path / "out.ifc")])
    assert res.exit_code == 2 and "spaceframe[ifc]" in res.stderr
    assert not (tmp_path / "out.ifc").exists()


def test_member_end_at_no_connection_exits_2(tmp_path):
    grid = double_layer_grid(1)
    path = structural_ifc(tmp_path / "g.ifc", grid)
    f = ifcopenshell.open(str(path))
    conn = next(c for c in f.by_type("IfcStructuralPointConnection") if c.Name == grid.joint_ids[0])
    f.remove(conn)
    f.write(str(path))
    res = CliRunner().invoke(main, ["audit", str(path)])
    assert res.exit_code == 2 and "at no IfcStructuralPointConnection" in res.stderr
    with pytest.raises(ModelError, match="--layers does not apply"):
        spaceframe.load(path, layers=["A"])


def test_beam_stopping_short_of_a_column_is_named_and_merge_joins_it(tmp_path):
    # a portal: two columns 4 m high, 6 m apart, and a beam modelled to the columns' faces,
    # 0.05 m short of each column's axis (within the near-miss distance, 1 % of the 7.2 m
    # diagonal).  As drawn the beam joins nothing; a merge distance of 0.06 joins it
    f, _, body = _new_file(None)
    _element(f, body, "IfcColumn", "C1", (0, 0, 0), (0, 0, 4), extruded=True)
    _element(f, body, "IfcColumn", "C2", (6, 0, 0), (6, 0, 4), extruded=True)
    _element(f, body, "IfcBeam", "B1", (0.05, 0, 4), (5.95, 0, 4), extruded=False)
    path = tmp_path / "portal.ifc"
    f.write(str(path))
    # the beam's two ends and the two column tops: four loose ends, each 0.05 from a joint
    with pytest.warns(spaceframe.SpaceframeWarning,
                      match=r"4 axis end\(s\) nearly.*at least 0\.05"):
        loose = spaceframe.load(path)
    assert loose.n_joints == 6
    joined = spaceframe.load(path, merge=0.06)
    assert (joined.n_joints, joined.n_members) == (4, 3)
