"""Chords, restraint points, unrestrained lengths and restraint forces.

Sources: the expected restraint points follow from the audit's definition (a
joint no mechanism moves sideways) and facts derived by hand in each test; the
restraint forces of the braced bay are solved by the method of joints in the
comment beside the check (Hibbeler, *Structural Analysis*, ch. 3, the method
of joints); that a bar pinned at both ends with a joint in its middle is a
mechanism in the pin-jointed model but held by a continuous bar is
Pellegrino & Calladine's example (Int. J. Solids Struct. 22(4), 1986, fig. 2).
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

import spaceframe
from spaceframe import Frame
from spaceframe.analysis.restraints import chord_members, find_chords, restraints
from spaceframe.errors import SpaceframeError
from spaceframe.loads import LoadCase, LoadSet

from common.roofs import PANEL, roof

MODELS = Path(__file__).resolve().parents[2] / "models"
def _chord(r, first, last):
    ids = r.frame.joint_ids
    found = [c for c in r.chords if (ids[c.joints[0]], ids[c.joints[-1]]) == (first, last)]
    assert len(found) == 1, (first, last)
    return found[0]


def _ids(r, joints):
    return [r.frame.joint_ids[j] for j in joints]


def test_bottom_chords_restrained_at_tied_joints_and_bearings():
    """Ties at L2 and L4 run into braced end bays; L1, L3 and L5 meet only members in the
    truss's own plane, so each is free along the building alone (3 x 5 = 15 mechanisms,
    derived).  Out of plane the bottom chord is held at L0, L2, L4, L6: lengths 2 x 2000 mm
    each (derived); the top chord at every joint (a purlin at each, roof bracing): panel
    lengths; in plane the truss is rigid: every joint, panel lengths."""
    r = restraints(roof(["L2", "L4"]), chords="role=chord")
    assert r.mechanisms == 15 and not r.held_pin_jointed and r.held_with_continuous_chords
    assert len(r.chords) == 10
    for k in range(1, 6):
        bottom = _chord(r, f"F{k}.L0", f"F{k}.L6")
        assert _ids(r, bottom.points("out_of_plane")) == [f"F{k}.L{i}" for i in (0, 2, 4, 6)]
        np.testing.assert_allclose(bottom.lengths["out_of_plane"], [4000.0] * 3, rtol=1e-12)
        np.testing.assert_allclose(bottom.lengths["in_plane"], [PANEL] * 6, rtol=1e-12)
        assert {r.frame.joint_ids[u.joint]: u.reason for u in bottom.unrestrained["out_of_plane"]} \
            == {f"F{k}.L{i}": "untied" for i in (1, 3, 5)}
        top = _chord(r, f"F{k}.U0", f"F{k}.U6")
        assert bottom.restrained["in_plane"].all() and top.restrained["out_of_plane"].all()
        np.testing.assert_allclose(top.lengths["out_of_plane"], [PANEL] * 6, rtol=1e-12)
        # the frame's normal is the extrusion direction +y; in plane is vertical for a chord along x
        np.testing.assert_allclose(bottom.directions["out_of_plane"], [0, 1, 0], atol=1e-12)
        np.testing.assert_allclose(bottom.directions["in_plane"], [0, 0, 1], atol=1e-12)
        assert bottom.plane == "frame"
    from spaceframe.views.restraints_text import render_restraints
    text = render_restraints(r)
    assert "HELD WITH CONTINUOUS CHORDS" in text and "longest: 4000 mm out of plane" in text
    assert "out of plane: F1.L0, F1.L2, F1.L4 and F1.L6; lengths 4000 x 3" in text
    doc = r.to_dict()
    assert doc["held_with_continuous_chords"] is True and doc["held_pin_jointed"] is False
    assert doc["chords"][0]["lengths"]["out_of_plane"] == [4000.0, 4000.0, 4000.0]


def test_every_bottom_joint_tied_gives_panel_lengths():
    """Ties at L1..L5 into the braced ceiling plane: no mechanism is left (every joint of the
    truss is tied along the building into a braced bay), every restraint length is a panel."""
    r = restraints(roof([f"L{i}" for i in range(1, 6)]), chords="role=chord")
    assert r.held_pin_jointed and r.held_with_continuous_chords and r.mechanisms == 0
    for c in r.chords:
        for d in ("out_of_plane", "in_plane"):
            np.testing.assert_allclose(c.lengths[d], [PANEL] * 6, rtol=1e-12)


def test_found_automatically_the_same_bottom_chords():
    """Without a rule the tie and purlin lines are chords too (straight chains along the
    building); the bottom chords' restraint points do not change."""
    auto = restraints(roof(["L2", "L4"]))
    ruled = restraints(roof(["L2", "L4"]), chords="role=chord")
    assert len(auto.chords) > len(ruled.chords)
    for k in range(1, 6):
        a, b = _chord(auto, f"F{k}.L0", f"F{k}.L6"), _chord(ruled, f"F{k}.L0", f"F{k}.L6")
        assert _ids(auto, a.points("out_of_plane")) == _ids(ruled, b.points("out_of_plane"))
    tie_line = _chord(auto, "F1.L2", "F5.L2")
    assert tie_line.plane == "principal" and len(tie_line.joints) == 5


def test_unbraced_roof_tie_lines_move_no_interior_restraint_point():
    """Ties at L2 and L4, purlins, bearings held along the building in every frame, no braced
    bay: each tie line and each purlin line slides along the building as one (derived: only
    the bearings hold anything that way).  The bottom chord keeps its bearings as restraint
    points, nothing between (one length of 12000 mm); L2 and L4 are tied, but to joints that
    move with them.  The top chords have no restraint point at all, ends included, so the
    frame is not held even with continuous chords."""
    r = restraints(roof(["L2", "L4"], braced=False, bearings="all"), chords="role=chord")
    assert not r.held_with_continuous_chords
    for k in range(1, 6):
        bottom = _chord(r, f"F{k}.L0", f"F{k}.L6")
        assert _ids(r, bottom.points("out_of_plane")) == [f"F{k}.L0", f"F{k}.L6"]
        np.testing.assert_allclose(bottom.lengths["out_of_plane"], [12000.0], rtol=1e-12)
        why = {r.frame.joint_ids[u.joint]: (u.reason, _ids_m(r, u.members))
               for u in bottom.unrestrained["out_of_plane"]}
        assert why[f"F{k}.L2"][0] == "tied" and why[f"F{k}.L1"] == ("untied", [])
        assert set(why[f"F{k}.L2"][1]) <= {f"B{b}.L2" for b in range(1, 5)}
        top = _chord(r, f"F{k}.U0", f"F{k}.U6")
        assert not top.restrained["out_of_plane"].any()
    moved = {j for _, js in r.not_held for j in _ids(r, js)}
    assert "F3.U3" in moved and "F3.L2" not in moved     # the top chords are what is not held
    from spaceframe.views.restraints_text import render_restraints
    text = render_restraints(r)
    assert "NOT HELD, EVEN WITH CONTINUOUS CHORDS" in text
    assert "no interior restraint point" in text and "held by no braced bay or support" in text


def _ids_m(r, members):
    return [r.frame.member_ids[k] for k in members]


def test_collinear_bars_held_only_as_continuous():
    """Pellegrino & Calladine's two collinear bars pinned at the far ends: one infinitesimal
    mechanism (the middle joint sideways); read as one continuous bar it is held, with one
    unrestrained length, the whole bar."""
    f = Frame.from_arrays([[0, 0, 0], [1, 0, 0], [2, 0, 0]], [[0, 1], [1, 2]],
                          supports={0: "pin", 2: "pin"})
    r = restraints(f)
    assert r.mechanisms == 2 and r.held_with_continuous_chords and not r.held_pin_jointed
    c = r.chords[0]
    assert c.lengths["out_of_plane"].tolist() == [2.0] and c.lengths["in_plane"].tolist() == [2.0]
    # a third bar off the line holds the middle joint in the plane it spans, not across it
    g = Frame.from_arrays([[0, 0, 0], [1, 0, 0], [2, 0, 0], [1, 0, -1]],
                          [[0, 1], [1, 2], [1, 3]], supports={0: "pin", 2: "pin", 3: "pin"})
    s = restraints(g)
    c = s.chords[0]
    held = {d: bool(c.restrained[d][1]) for d in c.directions}
    assert held == {"out_of_plane": False, "in_plane": True} or \
        held == {"out_of_plane": True, "in_plane": False}
    vertical = "out_of_plane" if held["out_of_plane"] else "in_plane"
    np.testing.assert_allclose(np.abs(c.directions[vertical]), [0, 0, 1], atol=1e-12)


def test_a_free_end_is_no_restraint_point():
    """A cantilevered chain: pinned at one end only, the rest free; the free end is not held
    and the overhang is its length (the whole chain here: the pinned end is the one point)."""
    f = Frame.from_arrays([[0, 0], [1, 0], [2, 0]], [[0, 1], [1, 2]], supports={0: "pin"})
    c = restraints(f).chords[0]
    assert c.ends_held["in_plane"] == (True, False)
    assert c.lengths["in_plane"].tolist() == [2.0]
    assert not restraints(f).held_with_continuous_chords


def test_find_chords_stops_at_a_kink_and_pairs_the_straightest():
    """A pitched top chord (kink at the ridge, 18 degrees) is two chords; a cross of two
    straight lines through one joint is two chords, each straight through it."""
    f = spaceframe.load(MODELS / "hall_truss.toml")
    chains = [[f.joint_ids[j] for j in J] for J, _ in find_chords(f)]
    assert chains == [["L0", "L1", "L2", "L3", "L4", "L5", "L6"], ["L0", "U1", "U2", "U3"],
                      ["U3", "U4", "U5", "L6"]]
    cross = Frame.from_arrays([[-1, 0], [0, 0], [1, 0], [0, -1], [0, 1]],
                              [[0, 1], [1, 2], [3, 1], [1, 4]])
    got = [(J.tolist(), K.tolist()) for J, K in find_chords(cross)]
    assert got == [([0, 1, 2], [0, 1]), ([3, 1, 4], [2, 3])]
    # two members within the tolerance of continuing member 0 (0.29 degrees off for member
    # 2): the exactly opposite one is its partner, the other ends there
    fork = Frame.from_arrays([[0, 0], [1, 0], [-1, 0.005], [-1, 0]], [[0, 1], [0, 2], [0, 3]])
    assert [(J.tolist(), K.tolist()) for J, K in find_chords(fork)] == [([3, 0, 1], [2, 0])]


def test_restraint_forces_on_a_braced_bay_by_hand():
    """A braced bay in plan (a plane frame in x, y): chords A1-B1-C1 (y = 0) and A2-B2-C2
    (y = b) in panels a = 3, b = 4 (diagonals d = 5), ties A1A2, B1B2, C1C2, diagonals A1B2
    and C1B2; A1 pinned, A2 held along x.  A load P = 10 along -x at C1 and at C2 puts every
    chord member in compression P (method of joints: C2 gives C2B2 = -P and C1C2 = 0, then
    C1B2 = 0, C1B1 = -P, and B1, B2 give the rest; the ties and diagonals carry nothing).

    The frame is rigid, so all six joints are restraint points; with F = 0.02 each gets
    Q = F P = 0.2 along +y.  Method of joints on that case (derived):
      C2: C2B2 = 0, C1C2 = +Q;   C1: C1B2 = -2 Q d / b = -0.5, C1B1 = +2 Q a / b = +0.3;
      B1: B1A1 = +0.3, B1B2 = -Q;  B2: A1B2 = +4 Q d / b = +1.0, A2B2 = -6 Q a / b = -0.9;
      A2: A1A2 = +Q, reaction Rx = +6 Q a / b = 0.9;  A1: reaction (-0.9, -6 Q) = (-0.9, -1.2).
    """
    a, b, P, F = 3.0, 4.0, 10.0, 0.02
    coords = [[0, 0], [a, 0], [2 * a, 0], [0, b], [a, b], [2 * a, b]]
    ids = ["A1", "B1", "C1", "A2", "B2", "C2"]
    ends = [[0, 1], [1, 2], [3, 4], [4, 5], [0, 3], [1, 4], [2, 5], [0, 4], [2, 4]]
    mids = ["A1B1", "B1C1", "A2B2", "B2C2", "A1A2", "B1B2", "C1C2", "A1B2", "C1B2"]
    group = ["chord"] * 4 + ["tie"] * 3 + ["brace"] * 2
    loads = LoadSet(cases=(LoadCase("thrust", ("C1", "C2"), [[-P, 0], [-P, 0]]),))
    f = Frame.from_arrays(coords, ends, joint_ids=ids, member_ids=mids,
                          supports={0: "pin", 3: "x"}, loads=loads,
                          member_tags={"group": group, "role": group})
    r = restraints(f, chords="role=chord", fraction=F)
    assert len(r.chords) == 2 and all(c.restrained["in_plane"].all() for c in r.chords)
    np.testing.assert_allclose([c.compression[0] for c in r.chords], [P, P], rtol=1e-12)
    Q = F * P
    np.testing.assert_allclose(r.restraint_loads, [[0, Q]] * 6, atol=1e-12)
    t = dict(zip(mids, r.restraint_forces.member_forces[0]))
    d = np.hypot(a, b)
    expected = {"C1C2": Q, "B2C2": 0.0, "C1B2": -2 * Q * d / b, "B1C1": 2 * Q * a / b,
                "A1B1": 2 * Q * a / b, "B1B2": -Q, "A1B2": 4 * Q * d / b, "A2B2": -6 * Q * a / b,
                "A1A2": Q}
    for k, v in expected.items():
        assert t[k] == pytest.approx(v, abs=1e-9), k
    R = dict(zip([f.joint_ids[j] for j in r.restraint_forces.reaction_joints],
                 r.restraint_forces.reactions[0]))
    np.testing.assert_allclose(R["A1"], [-6 * Q * a / b, -6 * Q], atol=1e-9)
    np.testing.assert_allclose(R["A2"], [6 * Q * a / b, 0.0], atol=1e-9)
    doc = r.to_dict()
    assert doc["restraint_forces"]["members"]["A1B2"] == pytest.approx(1.0)
    assert doc["chords"][0]["restrained"]["out_of_plane"] is None       # a plane frame


def test_hall_demo_bottom_chords_under_uplift():
    """The braced hall (ties at L1..L5, ceiling braced in the end bays): bottom chords held
    at every joint out of plane, 2.0 m panels; under the demo's uplift case they are the
    chords in compression, under snow the top chords are."""
    f = spaceframe.load(MODELS / "hall_roof_braced.toml")
    r = restraints(f, chords="role=chord")
    up, snow = r.case_names.index("uplift"), r.case_names.index("snow")
    for k in range(1, 7):
        bottom = _chord(r, f"F{k}.L0", f"F{k}.L6")
        np.testing.assert_allclose(bottom.lengths["out_of_plane"], [2.0] * 6, rtol=1e-12)
        assert bottom.compression[up] > 0 and bottom.compression[snow] == 0
        top = _chord(r, f"F{k}.L0", f"F{k}.U3")
        assert top.compression[snow] > 0
    unbraced = restraints(spaceframe.load(MODELS / "hall_roof_unbraced.toml"), chords="role=chord")
    bottom = _chord(unbraced, "F3.L0", "F3.L6")
    assert not bottom.restrained["out_of_plane"].any()          # every bearing free along the hall
    assert not unbraced.held_with_continuous_chords


def test_bad_rule_and_fraction():
    f = roof(["L2", "L4"])
    with pytest.raises(SpaceframeError, match="did you mean 'role'"):
        chord_members(f, "rol=chord")
    with pytest.raises(SpaceframeError, match="did you mean 'chord'"):
        chord_members(f, "role=chrod")
    with pytest.raises(SpaceframeError, match="TAG=VALUE"):
        chord_members(f, "chord")
    loaded = spaceframe.load(MODELS / "hall_roof_braced.toml")
    for bad in (0.0, 1.0, 1.5, -0.1, float("nan")):
        with pytest.raises(SpaceframeError, match="between 0 and 1"):
            restraints(loaded, fraction=bad)
    with pytest.raises(SpaceframeError, match="load cases"):
        restraints(f, fraction=0.02)


def test_units_scale_lengths_and_json_is_deterministic():
    """The same roof in m (coordinates / 1000) gives lengths / 1000 and the same points."""
    mm = roof(["L2", "L4"])
    m = Frame(joint_ids=mm.joint_ids, coords=mm.coords / 1000.0, member_ids=mm.member_ids,
              ends=mm.ends, restraint_joint=mm.restraint_joint, restraint_dir=mm.restraint_dir,
              units="m", joint_tags=mm.joint_tags, member_tags=mm.member_tags)
    a, b = restraints(mm, chords="role=chord"), restraints(m, chords="role=chord")
    for c, e in zip(a.chords, b.chords):
        assert c.joints.tolist() == e.joints.tolist()
        for d in c.directions:
            np.testing.assert_allclose(c.lengths[d] / 1000.0, e.lengths[d], rtol=1e-12)
    one = json.dumps(a.to_dict())
    assert one == json.dumps(restraints(mm, chords="role=chord").to_dict())


@pytest.mark.parametrize("braced", [True, False])
def test_modes_held_sparse_give_the_same_restraints(braced):
    """A frame with many mechanisms has its modes held as sparse rows (``Limits.dense_modes``);
    the restraint reading works on those rows without the dense basis and must give the same
    chords, restraint points, lengths and verdict as on the dense modes (same mode space, so
    the same joints move: a derived equality, not a tolerance)."""
    from dataclasses import replace

    from spaceframe.tolerances import DEFAULT

    sparse = replace(DEFAULT, limits=replace(DEFAULT.limits, dense_modes=0))
    frame = roof(["L2", "L4"], braced=braced, bearings="all")
    dense_audit = spaceframe.audit(frame)
    sparse_audit = spaceframe.audit(frame, tol=sparse)
    assert not dense_audit.modes.sparse and sparse_audit.modes.sparse
    a = restraints(frame, chords="role=chord", audit=dense_audit)
    b = restraints(frame, chords="role=chord", audit=sparse_audit)
    assert a.to_dict() == b.to_dict()
    assert [m for m, _ in a.not_held] == [m for m, _ in b.not_held]
