"""Readable mechanisms, prestress stiffening and key members, against outside sources."""

from __future__ import annotations

import json

import numpy as np
import pytest

from spaceframe import Frame, audit
from spaceframe.analysis.prestress import NOT_STIFFENED, STIFFENED

from common.reference_cases import (CASES, braced_square, collinear_pair, dangling_joint,
                                    flat_truss, four_bar_square, tetrahedron)
from common.transforms import rotation, transformed

METHODS = ["dense", "sparse"]


@pytest.mark.parametrize("method", METHODS)
@pytest.mark.parametrize("dimension", [2, 3])
def test_collinear_bars_are_stiffened_by_tension(method, dimension):
    """Pellegrino & Calladine (1986): two collinear bars between pins have a first-order
    mechanism that the self-stress (both bars in tension) stiffens."""
    r = audit(collinear_pair(dimension), method=method)
    assert r.internal_mechanisms == dimension - 1
    assert all(o == STIFFENED for o in r.mode_orders[:r.internal_mechanisms])
    for t in r.mode_prestress:
        assert t == pytest.approx([1.0, 1.0])          # tension in both bars
    assert r.prestress_stable is True
    assert r.prestress_certificate == pytest.approx([1.0, 1.0])


@pytest.mark.parametrize("method", METHODS)
def test_four_bar_linkage_is_not_stiffened(method):
    """A plane four-bar linkage (square, two adjacent joints pinned) is a finite mechanism:
    its one self-stress lives in the bar between the pins and cannot stiffen the racking
    (common practice; Pellegrino & Calladine 1986 on finite mechanisms)."""
    r = audit(four_bar_square(), method=method)
    assert r.mode_orders[0] == NOT_STIFFENED
    assert r.prestress_stable is False


@pytest.mark.parametrize("method", METHODS)
@pytest.mark.parametrize("turned", [False, True])
def test_flat_truss_modes_are_single_joints(method, turned):
    """Derived: in-plane bars have no out-of-plane component, so every out-of-plane
    mechanism of a flat truss can be given as a single joint; the basis must find that
    even when the truss is turned out of the coordinate planes."""
    f = flat_truss(6)
    if turned:
        f = transformed(f, rotation=rotation(3, 7), seed=3)
    r = audit(f, method=method)
    internal = [i for i, k in enumerate(r.mode_kinds) if k != "rigid-body"]
    assert len(internal) == r.internal_mechanisms == 9
    for i in internal:
        info = r.mode_info[i]
        assert info.kind == "out-of-plane"
        assert len(info.joints) == 1
        assert info.joints[0] in info.description


def extruded_frames(n_frames=5, spacing=4.0):
    """Identical triangulated trusses in planes y = const, pinned at both bearings, tied
    frame to frame at the top-chord joints only; tagged by frame."""
    X2 = np.array([[0, 0], [4, 0], [8, 0], [2, 1.5], [6, 1.5], [4, 2.5]], float)
    E2 = [[0, 1], [1, 2], [0, 3], [3, 1], [1, 4], [4, 2], [3, 5], [5, 4], [1, 5]]
    ties = [3, 4, 5]
    X, E, frames, sup = [], [], [], {}
    for f in range(n_frames):
        off = len(X)
        X += [[x, f * spacing, z] for x, z in X2]
        E += [[off + a, off + b] for a, b in E2]
        frames += [f"{f + 1}"] * len(X2)
        sup[off + 0] = "pin"
        sup[off + 2] = "pin"
        if f:
            E += [[off - len(X2) + t, off + t] for t in ties]
    return Frame.from_arrays(X, E, supports=sup, joint_tags={"frame": frames})


@pytest.mark.parametrize("method", METHODS)
def test_row_of_unbraced_frames_slides_line_by_line(method):
    """Derived: every member of a plane truss lies in its plane, so each joint is free out
    of that plane to first order; a line of joints tied frame to frame along the building
    then slides as one, and nothing else holds it.  Frames pinned at their bearings and
    tied only at the three top joints: three tie lines, each its own mode (not a lean of
    whole frames), and the five bottom-chord mid joints each free on their own."""
    r = audit(extruded_frames(), method=method)
    kinds = list(r.mode_kinds)
    assert "lean" not in kinds
    lines = [i for i in r.mode_info if i.kind == "tie-line"]
    assert len(lines) == 3
    for info in lines:
        assert len(info.lines) == 1 and len(info.joints) == 5     # one joint in each frame
        assert abs(info.direction[1]) > 0.9                      # along the building (y)
        assert set(info.frames) == {"1", "2", "3", "4", "5"}
        assert "slides along the building as one" in info.description
    assert kinds.count("out-of-plane") == 5                  # the five bottom-chord mid joints


@pytest.mark.parametrize("method", METHODS)
def test_key_members_of_a_determinate_truss_are_all_members(method):
    """Derived: with no state of self-stress, every member is key."""
    for f in (flat_truss(6, out_of_plane_held=range(12)), tetrahedron()):
        r = audit(f, method=method)
        assert r.self_stress_states == 0
        assert set(r.key_members) == set(f.member_ids)


@pytest.mark.parametrize("method", METHODS)
def test_braced_panel_diagonals_are_not_key(method):
    """Derived: a square panel with both diagonals carries one self-stress through all six
    members, so no member is key and every share is positive."""
    f = braced_square()
    r = audit(f, method=method)
    assert r.key_members == ()
    assert np.all(r.redundancy > 0.05)
    assert r.redundancy.sum() == pytest.approx(r.self_stress_states)


@pytest.mark.parametrize("case", CASES, ids=[c.name for c in CASES])
def test_redundancy_is_a_projector_diagonal(case):
    """The shares are the diagonal of an orthogonal projector of rank s: each in [0, 1],
    summing to s (trace of a projector, a fact of linear algebra); both engines agree; a
    member is key exactly when its share is 0."""
    a = audit(case.frame, method="dense")
    b = audit(case.frame, method="sparse", redundancy=True)
    for r in (a, b):
        assert np.all(r.redundancy >= -1e-12) and np.all(r.redundancy <= 1 + 1e-12)
        assert r.redundancy.sum() == pytest.approx(r.self_stress_states, abs=1e-8)
        key = {case.frame.member_ids[i] for i in np.flatnonzero(r.redundancy < 1e-9)}
        assert key == set(r.key_members)
    assert a.redundancy == pytest.approx(b.redundancy, abs=1e-8)


def test_free_standing_rigid_body_modes_are_three_slides_and_three_turns():
    """Derived: a free rigid body in space has three translations and three rotations."""
    r = audit(tetrahedron())
    texts = [i.description for i in r.mode_info]
    assert sum("slide" in t for t in texts) == 3
    assert sum("turn" in t for t in texts) == 3


def test_dangling_joint_is_described_alone():
    r = audit(dangling_joint())
    assert r.internal_mechanisms == 3
    for info in r.mode_info:
        assert info.joints == ("J5",)
        assert "has no members and no support" in info.description


def test_rotation_axis_is_named_by_its_joints():
    """The flat truss held out of plane at both bearings can spin about the line through
    them (derived); the description names the two joints."""
    r = audit(flat_truss(6, out_of_plane_held=(0, 6)))
    (rigid,) = [i for i in r.mode_info if i.kind == "rigid-body"]
    assert "J1" in rigid.description and "J7" in rigid.description


def test_json_carries_kind_joints_description_order(tmp_path):
    from click.testing import CliRunner
    from spaceframe.cli import main
    from spaceframe.io.native import dump_toml
    path = tmp_path / "frames.toml"
    dump_toml(extruded_frames(), path)
    doc = json.loads(CliRunner().invoke(main, ["audit", str(path), "--json"]).stdout)
    assert doc["mechanisms"] == len(doc["mechanism_modes"]) > 0
    for mode in doc["mechanism_modes"]:
        assert {"kind", "joints", "description", "order", "displacements"} <= set(mode)
        assert mode["joints"] and mode["description"]
        assert (mode["order"] is None) == (mode["kind"] == "rigid-body")
    assert isinstance(doc["key_members"], list)


def test_extruded_roof_is_worded_in_the_trade_s_terms():
    """The unbraced demo roof (six trusses, purlins only): each tied line slides along the
    building on its own, named by its ties' role, the bottom-chord joints free out of
    plane, the roof slides along the building; the modes that only the 3D assembly has are
    said to be so (derived from the extrusion: nothing ties the bottom chords and nothing
    holds the row along the hall)."""
    from pathlib import Path
    from spaceframe import load
    from spaceframe.views.text import render_audit
    path = Path(__file__).resolve().parents[2] / "models" / "hall_roof_unbraced.toml"
    r = audit(load(path))
    kinds = list(r.mode_kinds)
    assert "lean" not in kinds and "sway" not in kinds
    lines = [i for i in r.mode_info if i.kind == "tie-line"]
    # seven tied lines slide; with the whole roof's slide, six of them are internal modes
    assert len(lines) == 6
    for info in lines:
        assert info.frames == ("1", "2", "3", "4", "5", "6")
        (line,) = info.lines
        role = {"U1": "purlin", "U2": "purlin", "U4": "purlin", "U5": "purlin", "U3": "ridge",
                "L0": "eaves", "L6": "eaves"}[line]
        assert f"The {role} line at {line} (frames 1-6) slides along the building" \
            in info.description
        assert "only in the 3D assembly" in info.description
        assert "against each other" not in info.description
    (slide,) = [i for i in r.mode_info if i.kind == "rigid-body"]
    assert "along the building" in slide.description
    text = render_audit(r)
    assert "of frames 1-6 (30 joints) are each free out of the plane" in text
    braced = audit(load(path.with_name("hall_roof_braced.toml")))
    assert braced.stable
