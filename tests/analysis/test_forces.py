"""Member forces and reactions against hand derivations, textbook cases and numpy."""

from __future__ import annotations

import numpy as np
import pytest

import spaceframe
from spaceframe import Frame
from spaceframe.loads import SELF_WEIGHT, Combination, LoadCase, LoadSet


def cases(*items, **kw) -> LoadSet:
    """A load set from ``(name, {joint: force})`` pairs."""
    return LoadSet(cases=tuple(LoadCase(name, tuple(loads), list(loads.values()))
                               for name, loads in items), **kw)


def check_equilibrium(r, i=0):
    """Loads plus reactions balance in force and moment (statics: the resultant of all
    external forces on a body in equilibrium is zero)."""
    f = r.frame
    F = r.loads[i]
    R = np.zeros_like(F)
    R[r.reaction_joints] = r.reactions[i]
    total = F + R
    scale = np.abs(F).sum() + 1e-300
    assert np.abs(total.sum(axis=0)).max() <= 1e-9 * scale
    x = f.coords - f.coords.mean(axis=0)
    if f.dimension == 2:
        moment = np.sum(x[:, 0] * total[:, 1] - x[:, 1] * total[:, 0])
    else:
        moment = np.cross(x, total).sum(axis=0)
    assert np.abs(moment).max() <= 1e-9 * scale * f.size()


# ----------------------------------------------------------------- triangle

def triangle(P=12.0):
    f = Frame.from_arrays([[0, 0], [4, 0], [2, 3]], [[0, 1], [1, 2], [2, 0]],
                          joint_ids=["A", "B", "C"], member_ids=["AB", "BC", "CA"],
                          supports={0: "pin", 1: "y"})
    return f, cases(("apex", {"C": [0.0, -P]}))


def test_triangle_apex_load_method_of_joints():
    """Method of joints, derived by hand: A(0,0) pinned, B(4,0) on a roller (y held),
    apex C(2,3) loaded by P = 12 down.  By symmetry each support takes P/2 = 6 up.
    Joint A: the rafter AC has direction (2, 3)/sqrt(13); vertically N_AC * 3/sqrt(13) + 6 = 0,
    so N_AC = -2 sqrt(13) = -7.211 (compression); horizontally N_AB + N_AC * 2/sqrt(13) = 0,
    so N_AB = +4 (tension).  BC equals AC by symmetry.  Reactions: A (0, 6), B (0, 6)."""
    f, loads = triangle()
    r = spaceframe.forces(f, loads=loads)
    assert r.all_carried and r.methods == ("equilibrium",) and r.statically_determinate
    N = r.member_forces[0]
    assert N == pytest.approx([4.0, -2 * np.sqrt(13), -2 * np.sqrt(13)], rel=1e-12)
    assert r.reactions[0] == pytest.approx(np.array([[0.0, 6.0], [0.0, 6.0]]), abs=1e-12)
    check_equilibrium(r)


# -------------------------------------------------------------- Pratt truss

def pratt(a=3.0, h=4.0, panels=6):
    """A simply supported Pratt truss: bottom L0..L6, top U1..U5, verticals, end
    diagonals L0-U1 and L6-U5, diagonals falling towards mid-span."""
    half = panels // 2
    ids = [f"L{i}" for i in range(panels + 1)] + [f"U{i}" for i in range(1, panels)]
    xy = [[i * a, 0.0] for i in range(panels + 1)] + [[i * a, h] for i in range(1, panels)]
    at = {j: k for k, j in enumerate(ids)}
    bars = [(f"L{i}", f"L{i + 1}") for i in range(panels)]
    bars += [(f"U{i}", f"U{i + 1}") for i in range(1, panels - 1)]
    bars += [(f"U{i}", f"L{i}") for i in range(1, panels)]
    bars += [("L0", "U1"), (f"L{panels}", f"U{panels - 1}")]
    bars += [(f"U{i}", f"L{i + 1}") for i in range(1, half)]
    bars += [(f"U{i}", f"L{i - 1}") for i in range(half + 1, panels)]
    return Frame.from_arrays(xy, [[at[p], at[q]] for p, q in bars], joint_ids=ids,
                             member_ids=[f"{p}-{q}" for p, q in bars],
                             supports={at["L0"]: "pin", at[f"L{panels}"]: "y"})


def equilibrium_matrix(frame):
    """The equilibrium matrix built here from the geometry (rows: every joint
    coordinate, then one column per restraint reaction), independently of the package."""
    n, d, m = frame.n_joints, frame.dimension, frame.n_members
    A = np.zeros((n * d, m + frame.n_restraints))
    for k, (a, b) in enumerate(frame.ends):
        w = frame.coords[b] - frame.coords[a]
        w /= np.linalg.norm(w)
        A[a * d:a * d + d, k] += w       # tension pulls a towards b
        A[b * d:b * d + d, k] -= w
    for r, (j, u) in enumerate(zip(frame.restraint_joint, frame.restraint_dir)):
        A[j * d:j * d + d, m + r] = u
    return A


def test_pratt_truss_chords_by_the_method_of_sections_and_lstsq():
    """Panel-point loads P = 10 at L1..L5 of a 6-panel Pratt truss (a = 3, h = 4): each
    support takes R = 5P/2.  Method of sections (common practice; derived): the bottom
    chord of a panel cut with its diagonal meeting the top chord at U_i carries
    M(x_i)/h, the top chord -M(x_{i+1})/h, with the beam moment
    M(x) = R x - sum over loads left of x of P (x - x_j).  M(a) = 2.5 P a = 75,
    M(2a) = 4 P a = 120, M(3a) = 4.5 P a = 135.  So L0-L1 = 75/4 = 18.75 (moment about U1),
    L2-L3 = 120/4 = 30, U2-U3 = -135/4 = -33.75.  Checked also against numpy.linalg.lstsq
    of the full equilibrium equations, joint loads + member pulls + reactions = 0."""
    f = pratt()
    P = 10.0
    loads = cases(("panel points", {f"L{i}": [0.0, -P] for i in range(1, 6)}))
    r = spaceframe.forces(f, loads=loads)
    assert r.statically_determinate and r.methods == ("equilibrium",)
    N = dict(zip(f.member_ids, r.member_forces[0]))
    assert N["L0-L1"] == pytest.approx(18.75, rel=1e-12)
    assert N["L2-L3"] == pytest.approx(30.0, rel=1e-12)
    assert N["L3-L4"] == pytest.approx(30.0, rel=1e-12)
    assert N["U2-U3"] == pytest.approx(-33.75, rel=1e-12)
    assert N["U3-U4"] == pytest.approx(-33.75, rel=1e-12)
    # numpy's least squares of A [t; reactions] = -F (the equations are square and regular)
    A = equilibrium_matrix(f)
    F = r.loads[0].ravel()
    sol, *_ = np.linalg.lstsq(A, -F, rcond=None)
    assert np.abs(A @ sol + F).max() < 1e-10
    assert r.member_forces[0] == pytest.approx(sol[:f.n_members], abs=1e-9)
    assert r.reactions[0][:, 1] == pytest.approx([2.5 * P, 2.5 * P], rel=1e-12)
    check_equilibrium(r)


def test_forces_do_not_depend_on_the_length_unit_and_scale_with_the_load():
    """Statics: member forces are set by angles, not lengths, and are linear in the load.
    The Pratt truss in metres and in millimetres gives the same forces; 2.5 times the load
    gives 2.5 times every force; a combination is the factored sum of its cases."""
    f = pratt()
    mm = Frame.from_arrays(f.coords * 1000.0, f.ends, joint_ids=f.joint_ids,
                           member_ids=f.member_ids, supports={0: "pin", 6: "y"}, units="mm")
    loads = cases(("a", {"L2": [0.0, -7.0], "U3": [1.5, 0.0]}), ("b", {"L4": [0.0, -3.0]}),
                  combinations=(Combination("c", (("a", 2.5), ("b", -1.2))),))
    r, r_mm = spaceframe.forces(f, loads=loads), spaceframe.forces(mm, loads=loads)
    assert r_mm.member_forces == pytest.approx(r.member_forces, rel=1e-10, abs=1e-10)
    combined = 2.5 * r.member_forces[0] - 1.2 * r.member_forces[1]
    assert r.member_forces[2] == pytest.approx(combined, rel=1e-10, abs=1e-10)
    for i in range(3):
        check_equilibrium(r, i)


# ------------------------------------------------------------- three bars

def three_bars(theta_deg, ea_side, ea_middle=1.0, L=2.0):
    t = np.radians(theta_deg)
    xy = [[-L * np.tan(t), L], [0.0, L], [L * np.tan(t), L], [0.0, 0.0]]
    return Frame.from_arrays(xy, [[0, 3], [1, 3], [2, 3]], joint_ids=["A", "B", "C", "D"],
                             member_ids=["AD", "BD", "CD"],
                             supports={0: "pin", 1: "pin", 2: "pin"},
                             member_properties={"EA": [ea_side, ea_middle, ea_side]})


@pytest.mark.parametrize("theta", [30.0, 45.0])
@pytest.mark.parametrize("ratio", [1.0, 2.5])
def test_three_bar_system_by_compatibility(theta, ratio):
    """The statically indeterminate three-bar system (a standard textbook case; from
    memory): a vertical bar of length L and two bars at theta either side, all pinned
    above and meeting at D, loaded by P down.  Compatibility: D moves down by delta, so
    the middle bar stretches delta and the side bars delta cos(theta) over a length
    L / cos(theta).  N_mid = EA_m delta / L, N_side = EA_s delta cos^2(theta) / L;
    vertical equilibrium N_mid + 2 N_side cos(theta) = P gives
    N_mid = P EA_m / (EA_m + 2 EA_s cos^3 theta), N_side = N_mid (EA_s/EA_m) cos^2 theta."""
    P = 9.0
    f = three_bars(theta, ratio)
    r = spaceframe.forces(f, loads=cases(("P", {"D": [0.0, -P]})))
    assert r.self_stress_states == 1 and r.methods == ("stiffness",) and r.ea_given
    c = np.cos(np.radians(theta))
    mid = P / (1 + 2 * ratio * c ** 3)
    side = mid * ratio * c ** 2
    assert r.member_forces[0] == pytest.approx([side, mid, side], rel=1e-10)
    check_equilibrium(r)
    # the length unit does not matter with EA given: K scales as a whole
    g = Frame.from_arrays(f.coords * 1000, f.ends, member_ids=f.member_ids,
                          joint_ids=f.joint_ids, supports={0: "pin", 1: "pin", 2: "pin"},
                          member_properties=f.member_properties)
    assert spaceframe.forces(g, loads=cases(("P", {"D": [0.0, -P]}))).member_forces[0] == \
        pytest.approx(r.member_forces[0], rel=1e-10)


# ------------------------------------------------------------------ portal

def portal():
    """Two columns and a beam, pinned feet, no diagonal: one sway mechanism."""
    return Frame.from_arrays([[0, 0], [0, 4], [6, 4], [6, 0]], [[0, 1], [1, 2], [2, 3]],
                             joint_ids=["A", "B", "C", "D"], member_ids=["AB", "BC", "CD"],
                             supports={0: "pin", 3: "pin"})


def test_portal_without_diagonal_carries_vertical_loads_not_a_horizontal_one():
    """A pin-footed portal with no diagonal sways (derived: B and C move together along x,
    stretching no member).  Vertical loads P at B and C go straight down the columns
    (each -P, compression) and the beam carries nothing: the load is orthogonal to the
    sway.  A horizontal load H at B is not carried: the sway mode is (1, 0) at B and C,
    unit length with 1/sqrt(2) at each, so its share of the load is 1/sqrt(2)."""
    f = portal()
    loads = cases(("gravity", {"B": [0.0, -5.0], "C": [0.0, -5.0]}),
                  ("wind", {"B": [2.0, 0.0]}))
    r = spaceframe.forces(f, loads=loads)
    assert r.mechanisms == 1 and r.statically_determinate
    assert list(r.carried) == [True, False] and not r.all_carried
    N = dict(zip(f.member_ids, r.shown_forces(0)))
    assert N["AB"] == pytest.approx(-5.0, rel=1e-12) and N["CD"] == pytest.approx(-5.0, rel=1e-12)
    assert N["BC"] == 0.0
    check_equilibrium(r, 0)
    assert r.mechanism_fraction[1] == pytest.approx(1 / np.sqrt(2), rel=1e-9)
    (e,) = r.excited[1]
    assert e.mode == 1 and e.fraction == pytest.approx(1 / np.sqrt(2), rel=1e-9)
    assert e.description and e.kind == "sway"
    assert np.isnan(r.member_forces[1]).all() and np.isnan(r.reactions[1]).all()
    assert any("still a mechanism" in w for w in r.warnings)
    doc = r.to_dict()
    assert doc["cases"][1]["member_forces"] is None and doc["cases"][1]["reactions"] is None
    assert doc["cases"][1]["excited_mechanisms"][0]["description"] == e.description


def test_indeterminate_part_beside_a_mechanism_by_the_shifted_stiffness_solve():
    """The three-bar system and the swaying portal side by side in one frame: one
    mechanism and one state of self-stress.  A load on the three bars only is orthogonal
    to the sway, so it is carried, with the three-bar closed form (derived above)."""
    bars, frame2 = three_bars(30.0, 2.0), portal()
    xy = np.vstack([bars.coords, frame2.coords + [10.0, 0.0]])
    ends = np.vstack([bars.ends, frame2.ends + 4])
    f = Frame.from_arrays(xy, ends, joint_ids=list("ABCDEFGH"),
                          member_ids=["AD", "BD", "CD", "EF", "FG", "GH"],
                          supports={0: "pin", 1: "pin", 2: "pin", 4: "pin", 7: "pin"},
                          member_properties={"EA": [2.0, 1.0, 2.0, 1.0, 1.0, 1.0]})
    r = spaceframe.forces(f, loads=cases(("P", {"D": [0.0, -9.0]})))
    assert (r.mechanisms, r.self_stress_states) == (1, 1) and r.methods == ("stiffness",)
    c = np.cos(np.radians(30.0))
    mid = 9.0 / (1 + 4 * c ** 3)
    assert r.member_forces[0][:3] == pytest.approx([2 * mid * c ** 2, mid, 2 * mid * c ** 2],
                                                   rel=1e-9)
    assert np.abs(r.member_forces[0][3:]).max() <= 1e-9 * mid
    check_equilibrium(r)


# ------------------------------------------------- self-weight, notional, envelope

def test_self_weight_half_to_each_end_and_notional_variants():
    """Self-weight w per length shared half to each end joint, downward (the model's
    rule): the triangle's total vertical load is -w times the sum of the lengths,
    4 + 2 sqrt(13).  A notional load of fraction a puts a |Fz| horizontally at each joint,
    in +x and -x for a plane frame."""
    f, loads = triangle()
    loads = LoadSet(cases=loads.cases, self_weight=0.5, notional=0.01)
    applied = loads.applied(f)
    assert applied.names == ("apex", SELF_WEIGHT, "apex notional +x", "apex notional -x",
                             f"{SELF_WEIGHT} notional +x", f"{SELF_WEIGHT} notional -x")
    total = applied.forces[1].sum(axis=0)
    assert total == pytest.approx([0.0, -0.5 * (4 + 2 * np.sqrt(13))], rel=1e-12)
    assert applied.forces[1][0, 1] == pytest.approx(-0.25 * (4 + np.sqrt(13)), rel=1e-12)
    assert applied.forces[2][2] == pytest.approx([0.12, -12.0], rel=1e-12)
    assert applied.forces[3][2] == pytest.approx([-0.12, -12.0], rel=1e-12)


def test_envelope_names_the_governing_case():
    """Uplift against gravity on the triangle (derived from the apex case by linearity):
    the tie is in tension under gravity and in compression under uplift."""
    f, _ = triangle()
    r = spaceframe.forces(f, loads=cases(("down", {"C": [0.0, -12.0]}),
                                         ("up", {"C": [0.0, 6.0]})))
    env = r.envelope()
    assert env.tension[0] == pytest.approx(4.0) and r.names[env.tension_case[0]] == "down"
    assert env.compression[0] == pytest.approx(-2.0) and r.names[env.compression_case[0]] == "up"
    assert env.compression[1] == pytest.approx(-2 * np.sqrt(13))
    assert env.tension[1] == pytest.approx(np.sqrt(13))


def test_no_loads_and_unknown_case_are_errors():
    f, loads = triangle()
    with pytest.raises(spaceframe.ModelError, match=r"no load cases.*\[loads\.NAME\]"):
        spaceframe.forces(f)
    with pytest.raises(spaceframe.ModelError, match=r"no load case 'apx'.*did you mean 'apex'"):
        spaceframe.forces(f, ["apx"], loads=loads)


def test_tripod_in_space_and_against_lstsq():
    """A symmetric tripod (derived): legs from the apex (0, 0, h) to three pins on a circle
    of radius rho; a vertical load P shares equally, each leg -P L / (3 h) with
    L = sqrt(rho^2 + h^2).  A general load is checked against numpy.linalg.lstsq of the
    equilibrium equations built in this test."""
    h, rho, P = 3.0, 2.0, 6.0
    ang = np.radians([90.0, 210.0, 330.0])
    xyz = np.c_[rho * np.cos(ang), rho * np.sin(ang), np.zeros(3)]
    f = Frame.from_arrays(np.vstack([xyz, [0.0, 0.0, h]]), [[0, 3], [1, 3], [2, 3]],
                          supports={0: "pin", 1: "pin", 2: "pin"})
    r = spaceframe.forces(f, loads=cases(("down", {"J4": [0.0, 0.0, -P]}),
                                         ("any", {"J4": [1.0, -2.0, -3.5]})))
    L = np.hypot(rho, h)
    assert r.member_forces[0] == pytest.approx([-P * L / (3 * h)] * 3, rel=1e-12)
    A = equilibrium_matrix(f)
    sol, *_ = np.linalg.lstsq(A, -r.loads[1].ravel(), rcond=None)
    assert r.member_forces[1] == pytest.approx(sol[:3], rel=1e-10)
    for i in range(2):
        check_equilibrium(r, i)


def test_slack_rod_chosen_by_going_back_when_the_first_choice_fails():
    """A portal with columns 3.2 and 2.8 high (A(0,0) B(0,3.2) C(4,2.8) D(4,0), pinned at A
    and D) and crossed rods AC, BD, under 10 down at B and C and H = -0.05 at B.  Both rods
    come out compressed with every member two-way (the columns shorten), BD the more; left
    out first, it leaves AC compressed too, and without both the portal sways.  The load is
    carried with AC slack instead (derived by the method of joints on the frame without AC:
    joint C gives N_BC = 0 and N_CD = -10; joint B gives N_BD = -H L_BD / 4 = 0.05 x
    5.1225 / 4 = 0.06403, L_BD = sqrt(4^2 + 3.2^2), and N_AB = -10 - N_BD x 3.2 / L_BD)."""
    f = Frame.from_arrays([[0, 0], [0, 3.2], [4, 2.8], [4, 0]],
                          [[0, 1], [1, 2], [2, 3], [0, 2], [1, 3]],
                          joint_ids=list("ABCD"), member_ids=["AB", "BC", "CD", "AC", "BD"],
                          supports={0: "pin", 3: "pin"},
                          member_tags={"carries": ("", "", "", "tension", "tension")})
    r = spaceframe.forces(f, loads=cases(("sway", {"B": [-0.05, -10.0], "C": [0.0, -10.0]})))
    L = np.hypot(4.0, 3.2)
    n_bd = 0.05 * L / 4
    assert r.all_carried and r.slack[0] == ("AC",)
    assert r.shown_forces(0) == pytest.approx([-10 - n_bd * 3.2 / L, 0.0, -10.0, 0.0, n_bd],
                                              abs=1e-9)
    check_equilibrium(r, 0)


def test_tension_only_diagonals_go_slack():
    """An X-braced portal with rod diagonals (tag carries = tension), w = 4, h = 3: under a
    horizontal H = 6 at B the diagonal BD shortens and goes slack; the rest is then
    determinate (method of joints, derived): joint B gives N_BC = -H and N_AB = 0;
    joint C gives N_AC = H L / w = 7.5 (L = 5) and N_CD = -H h / w = -4.5.  Under gravity
    P = 5 at B and C both rods shorten equally with the columns; once one is slack the
    frame is determinate and the other carries nothing (joint C: BC = 0, so at B the
    rod's is 0 too); the columns carry -P each."""
    f = Frame.from_arrays([[0, 0], [0, 3], [4, 3], [4, 0]],
                          [[0, 1], [1, 2], [2, 3], [0, 2], [1, 3]],
                          joint_ids=list("ABCD"), member_ids=["AB", "BC", "CD", "AC", "BD"],
                          supports={0: "pin", 3: "pin"},
                          member_tags={"carries": ("", "", "", "tension", "tension")})
    r = spaceframe.forces(f, loads=cases(("wind", {"B": [6.0, 0.0]}),
                                         ("gravity", {"B": [0.0, -5.0], "C": [0.0, -5.0]})))
    assert r.all_carried and r.slack[0] == ("BD",) and len(r.slack[1]) == 1
    assert r.shown_forces(0) == pytest.approx([0.0, -6.0, -4.5, 7.5, 0.0], abs=1e-9)
    assert r.methods[0] == "equilibrium"
    assert r.shown_forces(1) == pytest.approx([-5.0, 0.0, -5.0, 0.0, 0.0], abs=1e-9)
    assert r.to_dict()["cases"][0]["slack_members"] == ["BD"]
    for i in range(2):
        check_equilibrium(r, i)
