"""The words of each kind of mechanism match the motion (issue 11, section 3).

Each case is a small frame whose motion is known from the geometry (derived in the
test's docstring); the test checks the counts, what moves, and the sentence.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from spaceframe import Frame, audit, load
from spaceframe.extrude import extrude, spec_from_document
from spaceframe.naming import natural_sorted

from common.reference_cases import flat_truss

MODELS = Path(__file__).resolve().parents[2] / "models"


def hall(**spec):
    """The demo Pratt truss (models/hall_truss.toml) extruded with ``spec``."""
    doc = {"frames": 8, "spacing": 5.0, "out_of_plane": "free"}
    doc.update(spec)
    return extrude(load(MODELS / "hall_truss.toml"), spec_from_document(doc))


def test_bottom_chord_tie_line_slides_and_is_no_lean():
    """Derived: eight plane trusses tied at every top-chord joint, at both bearings and at
    mid-span of the bottom chord (L3), the bearings of the two end frames held along the
    hall.  Every member of a truss lies in its plane, so each joint is free out of it to
    first order: the 32 untied bottom-chord joints (L1, L2, L4, L5 of 8 frames) each move
    alone, and each tied line not held slides as one (U1..U5 and L3: 6 lines; L0 and L6
    are held by the end bearings).  38 mechanisms, none a rigid-body mode, and the L3 line
    is a line of ties sliding, not whole frames leaning."""
    f = hall(ties={"purlin": ["U1", "U2", "U4", "U5"], "ridge": ["U3"], "eaves": ["L0", "L6"],
                   "tie": ["L3"]},
             support=[{"at": "L0, L6", "frames": "ends", "out_of_plane": "held"}])
    r = audit(f)
    assert (r.mechanisms, r.rigid_body_modes) == (38, 0)
    kinds = list(r.mode_kinds)
    assert kinds.count("out-of-plane") == 32 and kinds.count("tie-line") == 6
    assert "lean" not in kinds
    (tie,) = [i for i in r.mode_info if i.lines == ("L3",)]
    assert tie.kind == "tie-line"
    assert tie.joints == tuple(f"F{k}.L3" for k in range(1, 9))
    assert tie.description.startswith("The tie line at L3 (frames 1-8) slides along the "
                                      "building as one while the rest of the frame stays put")
    assert "lean" not in tie.description
    assert sorted(i.lines[0] for i in r.mode_info if i.kind == "tie-line") == \
        ["L3", "U1", "U2", "U3", "U4", "U5"]


def test_tie_lines_are_not_paired_against_each_other():
    """Derived: with nothing held along the hall (every bearing free that way) the seven
    tied lines of the demo roof each slide; the whole roof sliding is the one rigid-body
    mode, so six line slides are internal.  Each internal mode moves one line (the fewest
    possible): none pairs two lines moving against each other."""
    r = audit(load(MODELS / "hall_roof_unbraced.toml"))
    assert (r.mechanisms, r.rigid_body_modes) == (37, 1)
    for info in r.mode_info:
        assert "against each other" not in info.description
        assert "rack" not in info.description
        if info.kind == "tie-line":
            assert len(info.lines) == 1 and len(info.joints) == 6


@pytest.mark.parametrize("dimension", [2, 3])
def test_portal_on_pins_sways_on_its_supports(dimension):
    """Common practice (and derived: 4 joints x 2 = 8 freedoms, 3 members and 4 held
    directions, rank 7): a plane portal, two columns on pins and a beam, has one mechanism,
    the sway of the beam sideways while the columns turn about their pins.  In 3D the
    same portal with its column bases pinned in every direction also sways across its
    plane; both sways are on the supports, not panels racking."""
    X = [[0, 0], [0, 3], [4, 3], [4, 0]] if dimension == 2 else \
        [[0, 0, 0], [0, 0, 3], [4, 0, 3], [4, 0, 0]]
    f = Frame.from_arrays(X, [[0, 1], [1, 2], [2, 3]], supports={0: "pin", 3: "pin"},
                          joint_ids=["A", "B", "C", "D"])
    r = audit(f)
    sways = [i for i in r.mode_info if i.kind == "sway"]
    assert len(sways) >= 1
    inplane = [i for i in sways if abs(i.direction[0]) > 0.98]
    assert len(inplane) == 1
    info = inplane[0]
    assert info.joints == ("B", "C") and info.pivots == ("A", "D")
    assert info.description.startswith("The frame can sway along +x on its supports: joints B "
                                       "and C move together while the members down to A and "
                                       "D turn about them")
    assert "rack" not in info.description
    if dimension == 2:
        assert r.mechanisms == 1


def test_joint_lists_are_in_natural_order():
    """Ids with numbers are listed by value (T2, T9, T10), not as text (T10, T2, T9); the
    same order holds in the data (``joints``, ``pivots``) and in the sentence.  The frame: a
    three-bay portal (four columns on pins, derived as above: one sway mechanism)."""
    ids = ["B1", "T10", "T2", "B3", "T9", "B12", "T11", "B4"]
    X = [[0, 0], [0, 3], [4, 3], [4, 0], [8, 3], [8, 0], [12, 3], [12, 0]]
    E = [[0, 1], [1, 2], [2, 3], [2, 4], [4, 5], [4, 6], [6, 7]]
    f = Frame.from_arrays(X, E, supports={0: "pin", 3: "pin", 5: "pin", 7: "pin"},
                          joint_ids=ids)
    r = audit(f)
    assert r.mechanisms == 1
    info = r.mode_info[0]
    assert info.joints == ("T2", "T9", "T10", "T11")
    assert info.pivots == ("B1", "B3", "B4", "B12")
    assert "joints T2, T9, T10 and T11 move together" in info.description
    assert "down to B1, B3, B4 and B12 turn" in info.description
    assert natural_sorted(["F2.L10", "F2.L5", "F2.L6"]) == ["F2.L5", "F2.L6", "F2.L10"]


def test_numbered_ids_carry_coordinates():
    """Ids that only number the joints (J1, J2, ... as a mesh import names them) come with
    the joint's coordinates; meaningful ids (A, B) do not.  Derived: a joint with no members
    and no support is free in every direction (three modes of that joint alone)."""
    X = np.array([[0, 0, 0], [1, 0, 0], [0, 1, 0], [0, 0, 1], [2.5, 0, 1.5]])
    E = [[0, 1], [0, 2], [0, 3], [1, 2], [1, 3], [2, 3]]
    sup = {0: "pin", 1: "yz", 2: "z"}
    r = audit(Frame.from_arrays(X, E, supports=sup))
    assert r.internal_mechanisms == 3
    for info in r.mode_info:
        assert info.joints == ("J5",)
        assert info.description.startswith("Joint J5 (2.5, 0, 1.5) has no members")
    named = audit(Frame.from_arrays(X, E, supports=sup, joint_ids=list("ABCDE")))
    assert named.mode_info[0].description.startswith("Joint E has no members")


def test_text_runs_give_numbered_joints_their_place():
    """The text report's one line for many single-joint modes gives numbered joints their
    coordinates too.  Derived: a flat truss in z = 0 (6 panels, pinned in-plane) has 9
    joints free out of its plane (common practice; see tests/common/reference_cases)."""
    from spaceframe.views.text import render_audit

    text = render_audit(audit(flat_truss(6)))
    assert "Joints J1 (0, 0, 0), J2 (2, 0, 0), J3 (4, 0, 0)" in text
    assert "J8 (2, 1.5, 0), J9 (4, 1.5, 0) and 1 more are each free out of the plane" in text


def test_one_rule_for_joint_labels():
    """One label for a joint wherever it is written: coordinates to four significant figures
    of the frame's size at one fixed point (naming.fixed_decimals of the size), never in
    exponent form.  Python's format mini-language writes ``f"{3000.0:.3g}"`` as ``3e+03``
    (a fact of Python's ``g`` format), which is why a fixed point is used; 0.001 of a
    12 m frame rounds to 0 at 0.01 m (arithmetic by hand)."""
    from spaceframe.naming import joint_label, placed_joints, xyz

    assert f"{3000.0:.3g}" == "3e+03"
    assert xyz([3000.0, 1234.5678, 0.0], 30000.0) == "3000, 1235, 0"
    assert xyz([2.5, 0.001, -0.004], 12.0) == "2.5, 0, 0"
    assert xyz([0.0125, 0.5], 1.0) == "0.013, 0.5"   # the double nearest 0.0125 lies above it
    X = [[0.0, 0.0], [3000.0, 0.0], [1500.0, 900.0]]
    f = Frame.from_arrays(X, [[0, 1], [1, 2], [2, 0]], joint_ids=["J1", "J2", "J3"],
                          joint_tags={"layer": ["CHORD", "CHORD", ""]})
    assert joint_label(f, 1) == "J2 (3000, 0; layer CHORD)" and joint_label(f, 2) == \
        "J3 (1500, 900)"
    # the rule of when: bare numbering without tags, or any frame imported from geometry
    assert placed_joints(Frame.from_arrays(X, [[0, 1]]))              # J1, J2, J3, no tags
    assert not placed_joints(f)                                       # tagged, native
    assert not placed_joints(Frame.from_arrays(X, [[0, 1]], joint_ids=list("ABC")))


@pytest.mark.filterwarnings("ignore:.*T-junctions", "ignore:.*drawn twice")
def test_imported_joints_read_the_same_in_json_and_text(tmp_path):
    """A drawing's joints: the audit's own mode descriptions (the JSON) carry the same label
    as the text, ``J19 (0, -1500; layer GRID)`` for the demo canopy drawing's loose
    gridline joint (the drawing is in mm, 9.6 m long: to 1 mm)."""
    from spaceframe.views.text import render_audit

    r = audit(load(MODELS / "canopy_truss.dxf"))
    first = r.mode_info[0].description
    assert "J19 (0, -1500; layer GRID)" in first
    assert "J19 (0, -1500; layer GRID)" in render_audit(r)
    assert "e+0" not in render_audit(r).split("Mechanisms")[1].split("Key members")[0]
