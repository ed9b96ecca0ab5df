"""Members that act one way only (rods, guys, props): the Roth & Whiteley test.

Every verdict is checked twice over, independently of the code under test:

- the certificate it returns proves it: a *held* verdict carries a state of
  self-stress, checked here for equilibrium at every free joint (summing the
  member forces along unit vectors computed in the test) and for its signs;
  a *not held* verdict carries a motion, checked here by finite differences of
  the member lengths (two-way members keep their length to first order, the
  members named slack get shorter (rods) or longer (props), none is
  stretched against its one way);
- where the frame has at most one state of self-stress, sympy's exact null
  space of the equilibrium matrix (built in the test with exact coordinates)
  gives the answer by its sign pattern: held exactly when that state (or its
  negative) is positive in every tension-only and negative in every
  compression-only member (Roth & Whiteley 1981, Theorem 5.2: held iff the
  two-way frame is held and a proper state exists).

Source: B. Roth and W. Whiteley, "Tensegrity frameworks", Trans. Amer. Math.
Soc. 265(2), 419-446, 1981.
"""

from __future__ import annotations

import numpy as np
import pytest
import sympy

from spaceframe import Frame, audit
from spaceframe.errors import ModelError
from spaceframe.model import one_way_members


def frame(coords, members, supports, carries, **kw):
    """A frame from ``{id: xyz}``, ``{id: (a, b)}``, ``{joint: code}``, ``{member: label}``."""
    jids = list(coords)
    index = {j: i for i, j in enumerate(jids)}
    mids = list(members)
    return Frame.from_arrays([coords[j] for j in jids],
                             [[index[a], index[b]] for a, b in members.values()],
                             joint_ids=jids, member_ids=mids,
                             supports={index[j]: s for j, s in supports.items()},
                             member_tags={"carries": [carries.get(m, "") for m in mids]}, **kw)


def lengths(f, X):
    return np.linalg.norm(X[f.ends[:, 1]] - X[f.ends[:, 0]], axis=1)


def check_motion(f, r):
    """The motion stretches no two-way member and only slackens one-way members."""
    w = r.one_way
    assert not w.held and w.motion is not None and w.slack
    eps = 1e-6 * f.size()
    dL = (lengths(f, f.coords + eps * w.motion) - lengths(f, f.coords - eps * w.motion)) / (2 * eps)
    scale = np.abs(dL).max()
    assert scale > 0.05  # the motion changes some length
    ids = list(f.member_ids)
    for k, mid in enumerate(ids):
        if mid in w.tension:
            assert dL[k] <= 1e-7 * scale, (mid, dL[k])          # a rod never lengthens
            assert (dL[k] < -1e-4 * scale) == (mid in w.slack)  # named slack iff it shortens
        elif mid in w.compression:
            assert dL[k] >= -1e-7 * scale, (mid, dL[k])         # a prop never shortens
            assert (dL[k] > 1e-4 * scale) == (mid in w.slack)
        else:
            assert abs(dL[k]) <= 1e-7 * scale, (mid, dL[k])     # two-way: length kept
    # supported directions do not move
    for j, d in zip(f.restraint_joint, f.restraint_dir):
        assert abs(w.motion[j] @ d) < 1e-9


def check_state(f, r):
    """The state is in equilibrium at every joint with no load and has the one-way signs."""
    w = r.one_way
    assert w.held and w.state is not None
    t = w.state
    unit = f.coords[f.ends[:, 1]] - f.coords[f.ends[:, 0]]
    unit /= np.linalg.norm(unit, axis=1)[:, None]
    force = np.zeros_like(f.coords)
    np.add.at(force, f.ends[:, 0], t[:, None] * unit)    # tension pulls end 0 towards end 1
    np.add.at(force, f.ends[:, 1], -t[:, None] * unit)
    for j in range(f.n_joints):                          # supports take what they hold
        D = f.restraint_dir[f.restraint_joint == j]
        if len(D):
            Q, _ = np.linalg.qr(D.T)
            force[j] -= Q @ (Q.T @ force[j])
    assert np.abs(force).max() < 1e-8
    ids = list(f.member_ids)
    for mid in w.tension:
        assert t[ids.index(mid)] > 1e-3
    for mid in w.compression:
        assert t[ids.index(mid)] < -1e-3


def exact_verdict(coords, members, supports, carries):
    """Held or not from sympy's exact self-stress space (at most one state)."""
    jids = list(coords)
    free = [j for j in jids if supports.get(j) != "pin"]   # these tests pin or free joints
    d = len(next(iter(coords.values())))
    rows = []
    for j in free:
        for a in range(d):
            row = []
            for mid, (p, q) in members.items():
                if j not in (p, q):
                    row.append(0)
                    continue
                other = q if j == p else p
                v = [sympy.nsimplify(coords[other][b]) - sympy.nsimplify(coords[j][b])
                     for b in range(d)]
                row.append(v[a] / sympy.sqrt(sum(x * x for x in v)))
            rows.append(row)
    A = sympy.Matrix(rows)
    assert A.rank() == len(rows), "the two-way frame must be held for this check"
    null = A.nullspace()
    assert len(null) <= 1
    if not null:
        return not any(carries.values())
    s = [sympy.nsimplify(x) for x in null[0]]
    sign = {"tension": 1, "compression": -1}
    ids = list(members)
    for flip in (1, -1):
        if all(flip * sign[lab] * s[ids.index(m)] > 0 for m, lab in carries.items()):
            return True
    return False


# ----------------------------------------------------------------- the cases

PORTAL = {"A": (0, 0), "B": (4, 0), "C": (0, 3), "D": (4, 3)}
PORTAL_MEMBERS = {"AC": ("A", "C"), "BD": ("B", "D"), "CD": ("C", "D")}
PINS = {"A": "pin", "B": "pin"}


def test_single_rod_in_a_portal_is_not_held():
    """Common practice: a portal braced by one rod holds sway one way only; pushed the other
    way (C and D towards -x, the rod A-D shortening) the rod goes slack."""
    members = dict(PORTAL_MEMBERS, R1=("A", "D"))
    carries = {"R1": "tension"}
    f = frame(PORTAL, members, PINS, carries)
    r = audit(f)
    assert r.mechanisms == 0 and r.self_stress_states == 0      # two-way: held, determinate
    assert not r.stable and r.one_way.slack == ("R1",)
    check_motion(f, r)
    assert r.one_way.motion[3, 0] < -0.9                          # D goes towards -x
    assert "-x" in r.one_way.info.description and "R1" in r.one_way.info.description
    assert exact_verdict(PORTAL, members, PINS, carries) is False
    # the same rod carrying both ways holds the portal
    assert audit(frame(PORTAL, members, PINS, {})).stable


def test_crossed_rods_in_a_portal_are_held():
    """Common practice: crossed rods hold sway both ways (one taut, the other slack); Roth &
    Whiteley: the one state of self-stress has both rods in tension."""
    members = dict(PORTAL_MEMBERS, R1=("A", "D"), R2=("B", "C"))
    carries = {"R1": "tension", "R2": "tension"}
    f = frame(PORTAL, members, PINS, carries)
    r = audit(f)
    assert r.stable and r.one_way.held and r.one_way.slack == () and r.one_way.motion is None
    check_state(f, r)
    assert exact_verdict(PORTAL, members, PINS, carries) is True
    # the one state has both diagonals of one sign: two compression-only struts hold too
    # (the state negated: columns and beam in tension), one rod and one strut do not
    both = {"R1": "compression", "R2": "compression"}
    assert audit(frame(PORTAL, members, PINS, both)).stable
    assert exact_verdict(PORTAL, members, PINS, both) is True
    mixed = {"R1": "tension", "R2": "compression"}
    f = frame(PORTAL, members, PINS, mixed)
    r = audit(f)
    assert not r.stable
    check_motion(f, r)
    assert exact_verdict(PORTAL, members, PINS, mixed) is False


def mast(angles_deg, radius=6.0, height=10.0):
    coords = {"O": (0, 0, 0), "T": (0, 0, height)}
    members = {"MAST": ("O", "T")}
    supports = {"O": "pin"}
    carries = {}
    for k, a in enumerate(angles_deg, 1):
        x, y = radius * sympy.cos(sympy.rad(a)), radius * sympy.sin(sympy.rad(a))
        coords[f"A{k}"] = (x, y, 0)
        members[f"G{k}"] = ("T", f"A{k}")
        supports[f"A{k}"] = "pin"
        carries[f"G{k}"] = "tension"
    num = {j: tuple(float(c) for c in v) for j, v in coords.items()}
    return num, coords, members, supports, carries


@pytest.mark.parametrize("angles, held", [
    ((90, 210, 330), True),   # three guys at 120 degrees: held
    ((90, 210), False),       # two guys: the top can go towards both anchors
    ((0, 40, 80), False),     # three guys on one side: the top can go towards all three
])
def test_guyed_mast(angles, held):
    """Roth & Whiteley 1981: a pinned mast held by guys (tension only) is held exactly when a
    state of self-stress has every guy in tension; with the anchors inside one half-plane
    (two guys, or three on one side) none exists, and the top moves towards the anchors."""
    num, exact, members, supports, carries = mast(angles)
    f = frame(num, members, supports, carries)
    r = audit(f)
    assert r.mechanisms == 0                     # every member two-way: held
    assert r.stable is held and r.one_way.held is held
    if held:
        check_state(f, r)
        assert r.one_way.state[0] < 0            # the mast in compression
    else:
        check_motion(f, r)
        assert set(r.one_way.slack) == set(carries)   # every guy can go slack at once
        assert abs(r.one_way.motion[1, 2]) < 1e-9     # the top moves level (mast length kept)
    assert exact_verdict(exact, members, supports, carries) is held


def x_braced_bay():
    """A tower bay: four columns on pinned bases, a top ring, crossed rods in the four sides
    and on top."""
    base = {"B1": (0, 0, 0), "B2": (3, 0, 0), "B3": (3, 3, 0), "B4": (0, 3, 0)}
    top = {f"T{k}": (x, y, 4) for k, (x, y, _) in enumerate(base.values(), 1)}
    coords = {**base, **top}
    members, carries = {}, {}
    for k in range(1, 5):
        n = k % 4 + 1
        members[f"C{k}"] = (f"B{k}", f"T{k}")
        members[f"R{k}"] = (f"T{k}", f"T{n}")
        for name, (a, b) in ((f"X{k}a", (f"B{k}", f"T{n}")), (f"X{k}b", (f"B{n}", f"T{k}"))):
            members[name] = (a, b)
            carries[name] = "tension"
    for name, (a, b) in (("P1", ("T1", "T3")), ("P2", ("T2", "T4"))):
        members[name] = (a, b)
        carries[name] = "tension"
    return coords, members, {j: "pin" for j in base}, carries


def test_x_braced_bay_with_every_rod_tension_only_is_held():
    """Roth & Whiteley 1981: crossed rods in every face of a braced bay (and in plan) admit
    a state of self-stress with every rod in tension, so the bay is held with rods alone."""
    coords, members, supports, carries = x_braced_bay()
    f = frame(coords, members, supports, carries)
    r = audit(f)
    assert r.mechanisms == 0 and r.self_stress_states == 6   # 18 members on 12 coordinates
    assert r.stable and r.one_way.held
    assert len(r.one_way.tension) == 10
    check_state(f, r)
    # one rod of each cross removed: the bay is determinate and every rod can go slack
    single = {m: v for m, v in members.items() if not m.endswith("b") and m != "P2"}
    f1 = frame(coords, single, supports, {m: "tension" for m in carries if m in single})
    r1 = audit(f1)
    assert r1.mechanisms == 0 and not r1.stable
    check_motion(f1, r1)


PROP = {"A": (0, 1), "B": (1, 0), "D": (2, 0), "P": (1, 1)}
PROP_PINS = {"A": "pin", "B": "pin", "D": "pin"}


def test_prop_lifts_off_unless_a_rod_holds_it_down():
    """Common practice: a beam end on a compression-only prop lifts off when pulled up; a rod
    to an anchor below (tension only) holds it down, prop in compression and rod in tension
    in the one state of self-stress (joint P: t_beam = t_rod / sqrt 2, t_prop = -t_rod /
    sqrt 2, derived from equilibrium along x and y)."""
    members = {"AP": ("A", "P"), "BP": ("B", "P")}
    f = frame(PROP, members, PROP_PINS, {"BP": "compression"})
    r = audit(f)
    assert r.mechanisms == 0 and not r.stable and r.one_way.slack == ("BP",)
    check_motion(f, r)
    assert r.one_way.motion[3, 1] > 0.99                    # P lifts, straight up
    assert "lifts off" in r.one_way.info.description
    members["DP"] = ("D", "P")
    carries = {"BP": "compression", "DP": "tension"}
    f = frame(PROP, members, PROP_PINS, carries)
    r = audit(f)
    assert r.stable
    check_state(f, r)
    t = dict(zip(f.member_ids, r.one_way.state))
    assert t["AP"] == pytest.approx(t["DP"] / np.sqrt(2)) and \
        t["BP"] == pytest.approx(-t["DP"] / np.sqrt(2))
    assert exact_verdict(PROP, members, PROP_PINS, carries) is True
    # the prop declared a rod instead cannot hold: in the one state it pushes
    wrong = {"BP": "tension", "DP": "tension"}
    r = audit(frame(PROP, members, PROP_PINS, wrong))
    assert not r.stable and r.one_way.slack
    assert exact_verdict(PROP, members, PROP_PINS, wrong) is False


def test_one_way_members_of_a_frame_with_mechanisms_are_not_tested():
    """A portal with no bracing sways whatever its members carry (the two-way mechanism)."""
    f = frame(PORTAL, PORTAL_MEMBERS, PINS, {"CD": "compression"})
    r = audit(f)
    assert r.mechanisms == 1 and not r.stable
    assert r.one_way.held is False and r.one_way.motion is None and r.one_way.margin is None
    doc = r.to_dict()["one_way"]
    assert doc == {"members": {"tension": [], "compression": ["CD"]}, "held": False,
                   "margin": None, "slack": [], "motion": None}


def test_without_one_way_members_nothing_changes():
    f = frame(PORTAL, dict(PORTAL_MEMBERS, R1=("A", "D")), PINS, {})
    r = audit(f)
    assert r.one_way is None and r.stable and r.to_dict()["one_way"] is None


def test_one_way_members_and_bad_labels():
    f = frame(PROP, {"AP": ("A", "P"), "BP": ("B", "P")}, PROP_PINS, {"BP": "compression"})
    ten, com = one_way_members(f)
    assert ten.tolist() == [] and com.tolist() == [1]
    bad = frame(PROP, {"AP": ("A", "P"), "BP": ("B", "P")}, PROP_PINS, {"BP": "tensoin"})
    with pytest.raises(ModelError, match="'tensoin'.*did you mean 'tension'"):
        one_way_members(bad)


def test_json_motion_has_the_form_of_a_mechanism_mode():
    members = dict(PORTAL_MEMBERS, R1=("A", "D"))
    r = audit(frame(PORTAL, members, PINS, {"R1": "tension"}))
    doc = r.to_dict()
    w = doc["one_way"]
    assert w["held"] is False and w["slack"] == ["R1"] and w["margin"] == 0.0
    assert w["members"] == {"tension": ["R1"], "compression": []}
    # the keys of a mechanism_modes entry; "lines" and "pivots" only where they apply
    required = {"kind", "description", "joints", "members", "direction", "frames",
                "displacements"}
    assert required <= set(w["motion"]) <= required | {"lines", "pivots"}
    assert w["motion"]["displacements"]["D"] == [-1.0, 0.0]
    assert doc["stable"] is False and doc["mechanisms"] == 0


def test_pretensioned_string_of_rods_is_held_only_by_its_declared_tension():
    """Connelly & Whiteley, "Second-order rigidity and prestress stability for tensegrity
    frameworks", SIAM J. Discrete Math. 9(3), 1996: a proper state of self-stress that
    stiffens every first-order flex holds a tensegrity.  Two collinear rods between pins,
    pretensioned: held; without the declared prestress, or with the rods declared in
    compression (which they cannot carry), not."""
    coords = {"A": (0, 0), "B": (2, 0), "C": (4, 0)}
    members = {"AB": ("A", "B"), "BC": ("B", "C")}
    pins = {"A": "pin", "C": "pin"}
    rods = {"AB": "tension", "BC": "tension"}
    r = audit(frame(coords, members, pins, rods))
    assert r.mechanisms == 1 and not r.stable and r.one_way.margin is None
    r = audit(frame(coords, members, pins, rods, prestress=[3.0, 3.0]))
    assert r.stable and r.one_way.held and r.one_way.margin == pytest.approx(1.0)
    r = audit(frame(coords, members, pins, {"AB": "compression", "BC": "compression"},
                    prestress=[3.0, 3.0]))
    assert not r.stable and not r.one_way.held
