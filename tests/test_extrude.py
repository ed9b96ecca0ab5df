"""Extrusion of a plane truss into a 3D roof: counts, derived mechanism counts, ids, tags, bad specs."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner

import spaceframe
from spaceframe import ModelError, SpaceframeWarning
from spaceframe.cli import main
from spaceframe.extrude import extrude, spec_from_document

MODELS = Path(__file__).resolve().parent.parent / "models"
TRUSS = MODELS / "hall_truss.toml"
SPECS = {"unbraced": MODELS / "hall_roof_unbraced.spec.toml",
         "braced": MODELS / "hall_roof_braced.spec.toml"}


def maxwell_holds(frame, result):
    """Extended Maxwell rule (Calladine 1978): m - s = d n - k - b."""
    return (result.mechanisms - result.self_stress_states
            == frame.dimension * frame.n_joints - frame.n_restraints - frame.n_members)


@pytest.fixture(scope="module")
def planar():
    return spaceframe.load(TRUSS)


@pytest.mark.parametrize("name", sorted(SPECS))
def test_extrusion_counts_and_maxwell(planar, name):
    # derived: every frame repeats the planar joints and members; each tie runs once a bay;
    # cross bracing puts two diagonals in each panel (a pair of consecutive plane joints)
    import tomllib
    doc = tomllib.loads(SPECS[name].read_text())
    N = doc["frames"]
    ties = sum(len(v) for v in doc["ties"].values())
    braces = 0
    for entry in doc.get("bracing", []):
        bays = 2 if entry["bays"] == "ends" else len(entry["bays"])
        braces += 2 * bays * sum(len(doc["planes"][p]) - 1 for p in entry["planes"])
    frame = extrude(planar, SPECS[name])
    assert frame.n_joints == N * planar.n_joints
    assert frame.n_members == N * planar.n_members + (N - 1) * ties + braces
    result = spaceframe.audit(frame)
    assert maxwell_holds(frame, result)


def test_unbraced_roof_leans_and_its_bottom_chords_are_free(planar):
    # derived: the 5 untied bottom-chord joints of each of 6 trusses move out of plane on
    # their own (30); each of the 7 tie lines (4 purlins, ridge, 2 eaves) slides along the
    # hall as one with nothing to stop it (7); one combination is the whole roof sliding
    frame = extrude(planar, SPECS["unbraced"])
    result = spaceframe.audit(frame)
    assert (result.mechanisms, result.rigid_body_modes, result.self_stress_states) == (37, 1, 0)
    assert not result.stable
    # every mode moves joints only along the hall (y): the lean, not a change in plane
    modes = result.mode_displacements
    assert np.abs(modes[:, :, [0, 2]]).max() < 1e-9


def test_braced_roof_is_stable(planar):
    # common practice: cross bracing in the end bays of both roof slopes and of the
    # ceiling plane, with ties at every panel point and the end bearings held along the
    # building, make each end bay a rigid box that every tie line is anchored to
    frame = extrude(planar, SPECS["braced"])
    result = spaceframe.audit(frame)
    assert result.stable and result.mechanisms == 0
    assert result.self_stress_states == frame.n_members + frame.n_restraints - 3 * frame.n_joints


@pytest.mark.parametrize("frames", [2, 3, 5])
@pytest.mark.parametrize("held", [[], ["L0"], ["L0", "L6", "U3"]])
def test_untied_frames_have_one_out_of_plane_mechanism_per_free_joint(planar, frames, held):
    # derived: a planar framework in space stretches no member to first order when its
    # joints move normal to its plane, so each of the n joints of each untied frame
    # adds one mechanism, less the out-of-plane restraints:  N (n - r)
    doc = {"frames": frames, "spacing": 4.0, "out_of_plane": "free"}
    if held:
        doc["support"] = [{"at": ", ".join(held), "out_of_plane": "held"}]
    frame = extrude(planar, spec_from_document(doc))
    result = spaceframe.audit(frame)
    assert result.mechanisms == frames * (planar.n_joints - len(held))
    assert result.self_stress_states == 0
    assert maxwell_holds(frame, result)


def test_ids_coordinates_and_tags(planar):
    frame = extrude(planar, SPECS["braced"])
    ids = frame.joint_ids
    k = ids.index("F3.U2")
    assert frame.coords[k] == pytest.approx([4.0, 10.0, 4.0 / 3.0])
    role, group = frame.member_tags["role"], frame.member_tags["group"]
    mids = frame.member_ids
    assert role[mids.index("F2.TC3")] == "chord" and role[mids.index("F2.D3")] == "web"
    assert role[mids.index("B3.U3")] == "ridge" and group[mids.index("B3.U3")] == "tie"
    assert frame.member_tags["bay"][mids.index("B3.U3")] == "3"
    assert group[mids.index("B1.west_roof.2a")] == "brace"
    assert frame.joint_tags["frame"][k] == "3"
    assert set(group) == {"frame", "tie", "brace"}
    assert all(r for r in role)


def test_tags_survive_the_native_file(planar, tmp_path):
    frame = extrude(planar, SPECS["braced"])
    out = tmp_path / "roof.toml"
    spaceframe.io.save(frame, out)
    again = spaceframe.load(out)
    assert dict(again.member_tags) == dict(frame.member_tags)
    assert again.joint_ids == frame.joint_ids
    assert np.array_equal(again.coords, frame.coords)


def test_posts_and_bay_list(planar):
    doc = {"frames": 3, "bays": [4.0, 6.0], "ties": {"purlin": ["U2"]},
           "posts": {"at": ["U2", "U4"], "base": -3.0, "frames": "ends"}}
    frame = extrude(planar, spec_from_document(doc))
    # derived: 3 x 12 joints + 2 feet in each of 2 end frames; 3 x 21 + 2 ties + 4 posts
    assert frame.n_joints == 36 + 4 and frame.n_members == 63 + 2 + 4
    assert frame.coords[frame.joint_ids.index("F3.U4.foot")] == pytest.approx([8.0, 10.0, -3.0])


def test_extrusion_from_the_command_line(tmp_path):
    out = tmp_path / "roof.toml"
    res = CliRunner().invoke(main, ["extrude", str(TRUSS), str(SPECS["braced"]), "-o", str(out)])
    assert res.exit_code == 0, res.output
    assert CliRunner().invoke(main, ["audit", str(out)]).exit_code == 0
    again = CliRunner().invoke(main, ["extrude", str(TRUSS), str(SPECS["braced"]), "-o", str(out)])
    assert again.exit_code == 2 and "--force" in again.stderr
    assert CliRunner().invoke(main, ["extrude", str(TRUSS), str(SPECS["braced"]), "-o", str(out),
                                     "--force"]).exit_code == 0


def test_never_writes_over_an_input(tmp_path):
    spec = tmp_path / "s.toml"
    spec.write_text(SPECS["braced"].read_text())
    before = spec.read_text()
    res = CliRunner().invoke(main, ["extrude", str(TRUSS), str(spec), "-o", str(spec), "--force"])
    assert res.exit_code == 2 and "never overwritten" in res.stderr
    assert spec.read_text() == before


BASE_SPEC = """\
frames = 4
spacing = 5.0
[ties]
purlin = ["U1", "U2"]
"""

BAD_SPECS = [
    ("unknown joint", BASE_SPEC.replace('"U2"]', '"U9"]'), 4, ["'U9'", "not in the planar frame"]),
    ("zero spacing", BASE_SPEC.replace("5.0", "0.0"), 2, ["greater than zero"]),
    ("negative spacing", BASE_SPEC.replace("5.0", "-2.5"), 2, ["-2.5", "greater than zero"]),
    ("bays miscounted", BASE_SPEC.replace("spacing = 5.0", "bays = [5.0, 5.0]"), 2,
     ["2 widths", "3 bays"]),
    ("a bay of zero", BASE_SPEC.replace("spacing = 5.0", "bays = [5.0, 0, 5.0]"), 2,
     ["bay 2", "greater than zero"]),
    ("direction in plane", BASE_SPEC + "", None, None),
    ("unknown plane", BASE_SPEC + '[planes]\nroof = ["L0", "U1"]\n[[bracing]]\nplanes = ["rof"]\n',
     8, ["'rof'", "did you mean 'roof'"]),
    ("support on unknown joint", BASE_SPEC + '[[support]]\nat = "L66"\nout_of_plane = "held"\n', 6,
     ["'L66'", "did you mean 'L6'"]),
    ("held misspelt", BASE_SPEC + '[[support]]\nat = "L0"\nout_of_plane = "hold"\n', 7,
     ["\"held\" or \"free\""]),
    ("tied twice", BASE_SPEC + 'ridge = ["U1"]\n', 5, ["tied twice"]),
]
BAD_SPECS[5] = ("direction in plane", "direction = [1.0, 0.0, 0.0]\n" + BASE_SPEC, 1,
                ["lies in the frame's own plane"])


@pytest.mark.parametrize("case", BAD_SPECS, ids=[c[0] for c in BAD_SPECS])
def test_bad_spec_is_named(tmp_path, case):
    _, text, line, pieces = case
    spec = tmp_path / "roof.spec.toml"
    spec.write_text(text)
    out = tmp_path / "out.toml"
    res = CliRunner().invoke(main, ["extrude", str(TRUSS), str(spec), "-o", str(out)])
    assert res.exit_code == 2, res.output
    assert f"{spec}:{line}:" in res.stderr
    for piece in pieces:
        assert piece in res.stderr
    assert "Traceback" not in res.output and not out.exists()


def test_one_frame_warns(planar):
    with pytest.warns(SpaceframeWarning, match="nothing out of plane can be judged"):
        spec = spec_from_document({"frames": 1})
    assert extrude(planar, spec).n_joints == planar.n_joints


def test_a_space_frame_is_not_extruded(tmp_path):
    with pytest.raises(ModelError, match="plane frame"):
        extrude(spaceframe.load(MODELS / "hall_roof_braced.toml"), {"frames": 2, "spacing": 1.0})
