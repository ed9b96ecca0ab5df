"""Tests of the frame family generators in :mod:`spaceframe.families`.

Two kinds of fact are checked:

* counts of joints, members and restraints against the formulas in the
  docstrings, and the geometry (lengths, levels) the docstrings describe;
* numbers of mechanisms (rigid-body and internal) and of states of
  self-stress, each marked ``# derived``: they come from the dense reference
  below, the rank of the compatibility matrix by ``numpy.linalg.matrix_rank``
  (a full SVD), with the restrained degrees of freedom deleted.  The general
  formulas were read off that reference for every grid up to 7 by 7 and
  every tower up to 5 storeys, and are tested here on a spread of sizes.
  Maxwell's rule (self-stress minus mechanisms equals ``m - 3n + r``,
  Pellegrino and Calladine 1986) ties the two counts together and is checked
  everywhere.

Where ``spaceframe.audit`` is available, its counts are compared with the
dense reference for the same frames.
"""

from __future__ import annotations

import itertools
import re

import numpy as np
import pytest

from spaceframe.errors import SpaceframeError
from spaceframe.families import (GRID_SUPPORTS, TOWER_BRACING, braced_tower, double_layer_grid,
                                 double_layer_grid_size)


# --------------------------------------------------------------------------
# Dense reference, independent of spaceframe.analysis
# --------------------------------------------------------------------------

def compatibility(frame):
    """Dense compatibility matrix ``(m, free dofs)`` and the kept dof indices.

    Row ``e`` holds ``-u`` at the start joint and ``+u`` at the end joint,
    ``u`` the unit vector along member ``e``; columns of restrained degrees of
    freedom are deleted.  The families only restrain whole axes, which this
    asserts.
    """
    d, n = frame.dimension, frame.n_joints
    u = frame.coords[frame.ends[:, 1]] - frame.coords[frame.ends[:, 0]]
    u /= np.linalg.norm(u, axis=1)[:, None]
    C = np.zeros((frame.n_members, n * d))
    rows = np.arange(frame.n_members)
    for k in range(d):
        np.add.at(C, (rows, frame.ends[:, 0] * d + k), -u[:, k])
        np.add.at(C, (rows, frame.ends[:, 1] * d + k), u[:, k])
    axis = np.argmax(np.abs(frame.restraint_dir), axis=1)
    assert np.allclose(np.abs(frame.restraint_dir[np.arange(len(axis)), axis]), 1.0)
    held = frame.restraint_joint * d + axis
    keep = np.setdiff1d(np.arange(n * d), held)
    return C[:, keep], keep


def rigid_body_count(frame):
    """Rigid-body motions of the whole frame that the supports allow."""
    x = frame.coords - frame.coords.mean(axis=0)
    n = frame.n_joints
    basis = [np.tile(e, n) for e in np.eye(3)] + [np.cross(w, x).ravel() for w in np.eye(3)]
    B = np.array(basis).T                                       # (3n, 6)
    R = np.zeros((frame.n_restraints, 3 * n))
    R[np.arange(frame.n_restraints)[:, None],
      frame.restraint_joint[:, None] * 3 + np.arange(3)] = frame.restraint_dir
    held = np.linalg.matrix_rank(R @ B) if frame.n_restraints else 0
    return np.linalg.matrix_rank(B) - held


def dense_counts(frame):
    C, keep = compatibility(frame)
    rank = int(np.linalg.matrix_rank(C))
    mech = len(keep) - rank
    rbm = int(rigid_body_count(frame))
    return {"rank": rank, "mechanisms": mech, "rigid_body_modes": rbm,
            "internal_mechanisms": mech - rbm, "self_stress_states": frame.n_members - rank,
            "maxwell": frame.n_members - 3 * frame.n_joints + frame.n_restraints}


# --------------------------------------------------------------------------
# double_layer_grid: counts and geometry from the docstring formulas
# --------------------------------------------------------------------------

SIZES = [(1, 1), (1, 4), (2, 2), (3, 2), (2, 5), (4, 4), (6, 3)]
RESTRAINTS = {"corners": lambda nx, ny: 12, "perimeter": lambda nx, ny: 6 * (nx + ny),
              "minimal": lambda nx, ny: 6, "none": lambda nx, ny: 0}


@pytest.mark.parametrize("nx,ny", SIZES)
@pytest.mark.parametrize("supports", GRID_SUPPORTS)
def test_grid_counts(nx, ny, supports):
    f = double_layer_grid(nx, ny, supports=supports)
    assert f.dimension == 3
    assert f.n_joints == 2 * nx * ny + nx + ny + 1
    assert f.n_members == 8 * nx * ny
    assert f.n_restraints == RESTRAINTS[supports](nx, ny)
    assert len(set(f.joint_ids)) == f.n_joints
    assert len(set(f.member_ids)) == f.n_members


@pytest.mark.parametrize("nx,ny", SIZES)
def test_grid_members_by_role(nx, ny):
    f = double_layer_grid(nx, ny)
    ids = np.array(f.member_ids)
    role = np.array([m[0] if m[0] == "D" else m[:2] for m in f.member_ids])
    expected = {"TX": nx * (ny + 1), "TY": (nx + 1) * ny, "BX": (nx - 1) * ny,
                "BY": nx * (ny - 1), "D": 4 * nx * ny}
    assert {r: int(np.sum(role == r)) for r in expected} == expected
    assert sum(expected.values()) == len(ids)
    # The ids name their ends: TX{i}_{j} runs from T{i}_{j} to T{i+1}_{j}, etc.
    start = [f.joint_ids[a] for a in f.ends[:, 0]]
    for mid, a, b in zip(f.member_ids, start, (f.joint_ids[k] for k in f.ends[:, 1])):
        if mid[:2] in ("TX", "TY", "BX", "BY"):
            i, j = map(int, mid[2:].split("_"))
            di, dj = (1, 0) if mid[1] == "X" else (0, 1)
            assert (a, b) == (f"{mid[0]}{i}_{j}", f"{mid[0]}{i + di}_{j + dj}")
        else:
            i, j = map(int, mid[1:-2].split("_"))
            di, dj = {"sw": (0, 0), "se": (1, 0), "ne": (1, 1), "nw": (0, 1)}[mid[-2:]]
            assert (a, b) == (f"B{i}_{j}", f"T{i + di}_{j + dj}")


def test_grid_geometry():
    bay, depth = 2.4, 1.5
    f = double_layer_grid(5, 3, bay=bay, depth=depth)
    L = dict(zip(f.member_ids, f.lengths()))
    for mid, length in L.items():
        want = np.hypot(bay / np.sqrt(2), depth) if mid.startswith("D") else bay
        assert length == pytest.approx(want, rel=1e-12), mid
    xyz = dict(zip(f.joint_ids, f.coords))
    assert np.allclose(xyz["T5_3"], [5 * bay, 3 * bay, depth])
    assert np.allclose(xyz["B4_2"], [4.5 * bay, 2.5 * bay, 0.0])
    assert f.units == "m" and f.name == "double-layer grid 5x3"


def test_grid_is_deterministic():
    a = double_layer_grid(7, 4, supports="perimeter")
    b = double_layer_grid(7, 4, supports="perimeter")
    assert a.joint_ids == b.joint_ids and a.member_ids == b.member_ids
    for name in ("coords", "ends", "restraint_joint", "restraint_dir"):
        assert np.array_equal(getattr(a, name), getattr(b, name))


def test_grid_square_by_default():
    assert double_layer_grid(4).n_members == double_layer_grid(4, 4).n_members == 128


def test_grid_custom_supports():
    f = double_layer_grid(3, 2, supports={"T0_0": "pin", "B2_1": "z", "T3_2": [[1, 1, 0]]})
    assert f.n_restraints == 5
    held = {f.joint_ids[j] for j in f.restraint_joint}
    assert held == {"T0_0", "B2_1", "T3_2"}


@pytest.mark.parametrize("kwargs,argument", [
    (dict(nx=0), "nx"), (dict(nx=2, ny=-1), "ny"), (dict(nx=2.5), "nx"), (dict(nx=True), "nx"),
    (dict(nx=2, bay=0.0), "bay"), (dict(nx=2, depth=float("nan")), "depth"),
    (dict(nx=2, supports="edges"), "supports"), (dict(nx=2, supports={"T9_9": "pin"}), "supports"),
    (dict(nx=2, units="furlong"), "units"),
])
def test_grid_bad_arguments(kwargs, argument):
    with pytest.raises(SpaceframeError, match=f"^{argument}: expected") as info:
        double_layer_grid(**kwargs)
    assert isinstance(info.value, ValueError)


# --------------------------------------------------------------------------
# double_layer_grid: mechanisms and self-stress, by dense SVD
# --------------------------------------------------------------------------

DENSE_SIZES = [(2, 2), (2, 5), (3, 3), (4, 3), (5, 5)]


@pytest.mark.parametrize("nx,ny", DENSE_SIZES)
@pytest.mark.parametrize("supports", GRID_SUPPORTS)
def test_grid_dense_counts(nx, ny, supports):
    c = dense_counts(double_layer_grid(nx, ny, supports=supports))
    assert c["self_stress_states"] - c["mechanisms"] == c["maxwell"]  # Maxwell's rule
    free_ss = 2 * nx * ny - 3 * (nx + ny) + 4
    expected = {  # derived: dense SVD, every grid 2..7 by 2..7 (see module docstring)
        # free: 6 rigid-body motions and one internal twist
        "none": dict(mechanisms=7, rigid_body_modes=6, self_stress_states=free_ss),
        # six restraints stop the rigid-body motions, not the twist
        "minimal": dict(mechanisms=1, rigid_body_modes=0, self_stress_states=free_ss),
        # corner pins stop the twist; no mechanism, so self-stress = Maxwell's count
        "corners": dict(mechanisms=0, rigid_body_modes=0,
                        self_stress_states=2 * nx * ny - 3 * (nx + ny) + 9),
        "perimeter": dict(mechanisms=0, rigid_body_modes=0,
                          self_stress_states=2 * nx * ny + 3 * (nx + ny) - 3),
    }[supports]
    assert {k: c[k] for k in expected} == expected


@pytest.mark.parametrize("nx,ny", [(3, 3), (4, 2), (5, 3)])
def test_grid_twist_mechanism_is_a_saddle(nx, ny):
    """The one internal mechanism of the grid on six restraints is a twist.

    Why this matters: it shows the mechanism found is the physical one, not
    noise.  With ``T0_0`` pinned and ``T{nx}_0``, ``T0_{ny}`` held vertically,
    the vertical displacement of every joint is proportional to ``x * y``
    (a hyperbolic paraboloid), which vanishes along both held edges.
    """
    f = double_layer_grid(nx, ny, supports="minimal")
    C, keep = compatibility(f)
    _, s, vt = np.linalg.svd(C)
    assert s[-1] <= 1e-12 * s[0] and s[-2] > 1e-3 * s[0]   # one clear zero
    mode = np.zeros(3 * f.n_joints)
    mode[keep] = vt[-1]
    w = mode.reshape(-1, 3)[:, 2]
    xy = f.coords[:, 0] * f.coords[:, 1]
    cosine = abs(w @ xy) / (np.linalg.norm(w) * np.linalg.norm(xy))
    assert cosine > 1 - 1e-10


@pytest.mark.parametrize("ny", [2, 3, 5])
def test_grid_strip_one_bay_wide(ny):
    c = dense_counts(double_layer_grid(1, ny, supports="corners"))
    # derived: dense SVD; each interior top chord across the strip can turn
    assert c["mechanisms"] == c["internal_mechanisms"] == ny - 1
    assert c["self_stress_states"] == 5


# --------------------------------------------------------------------------
# double_layer_grid_size
# --------------------------------------------------------------------------

def test_grid_size_nearest():
    for target in itertools.chain(range(1, 3000, 7), [6_000, 100_000, 1_000_000]):
        nx = double_layer_grid_size(target)
        best = min(range(1, 400), key=lambda k: (abs(8 * k * k - target), k))
        assert nx == best, target
    assert double_layer_grid_size(100_000) == 112      # 100,352 members
    assert double_layer_grid(double_layer_grid_size(6_000)).n_members == 5_832


@pytest.mark.parametrize("bad", [0, -5, 2.0, "100"])
def test_grid_size_bad(bad):
    with pytest.raises(SpaceframeError, match="^members: expected"):
        double_layer_grid_size(bad)


# --------------------------------------------------------------------------
# braced_tower
# --------------------------------------------------------------------------

BRACES = {"x": 8, "single": 4, "none": 0}


@pytest.mark.parametrize("storeys", [1, 2, 5, 12])
@pytest.mark.parametrize("bracing", TOWER_BRACING)
@pytest.mark.parametrize("plan", [False, True])
def test_tower_counts(storeys, bracing, plan):
    f = braced_tower(storeys, bracing=bracing, plan_bracing=plan)
    s = storeys
    assert f.n_joints == 4 * (s + 1)
    assert f.n_members == 8 * s + BRACES[bracing] * s + (s if plan else 0)
    assert f.n_restraints == 12
    assert {f.joint_ids[j] for j in f.restraint_joint} == {"N0a", "N0b", "N0c", "N0d"}
    assert len(set(f.member_ids)) == f.n_members
    roles = [re.match(r"[A-Z]+", m).group() for m in f.member_ids]
    assert roles.count("LEG") == roles.count("RING") == 4 * s
    assert roles.count("BR") == BRACES[bracing] * s
    assert roles.count("PLAN") == (s if plan else 0)


def test_tower_geometry_and_taper():
    f = braced_tower(4, width=3.0, top_width=1.0, storey_height=2.5)
    xyz = dict(zip(f.joint_ids, f.coords))
    assert np.allclose(xyz["N0a"], [-1.5, -1.5, 0.0])
    assert np.allclose(xyz["N4c"], [0.5, 0.5, 10.0])
    assert np.allclose(xyz["N2b"], [1.0, -1.0, 5.0])
    straight = braced_tower(4, width=3.0)
    assert np.allclose(straight.coords[-4:, :2], straight.coords[:4, :2])


def test_tower_single_diagonals_zigzag():
    f = braced_tower(2, bracing="single")
    ends = {m: (f.joint_ids[a], f.joint_ids[b]) for m, (a, b) in zip(f.member_ids, f.ends)}
    assert ends["BR1ab"] == ("N0a", "N1b")
    assert ends["BR2ab"] == ("N1b", "N2a")          # meets BR1ab at N1b


@pytest.mark.parametrize("storeys", [1, 2, 3, 5])
@pytest.mark.parametrize("bracing", TOWER_BRACING)
@pytest.mark.parametrize("plan", [False, True])
@pytest.mark.parametrize("top_width", [None, 0.8])
def test_tower_dense_counts(storeys, bracing, plan, top_width):
    f = braced_tower(storeys, bracing=bracing, plan_bracing=plan, top_width=top_width)
    c = dense_counts(f)
    s, p = storeys, (storeys if plan else 0)
    assert c["self_stress_states"] - c["mechanisms"] == c["maxwell"]  # Maxwell's rule
    assert c["rigid_body_modes"] == 0                  # the four base pins
    expected = {  # derived: dense SVD, towers of 1..5 storeys, straight and tapered
        # single diagonals: statically and kinematically determinate
        "single": dict(mechanisms=0, self_stress_states=p),
        # one redundant diagonal per X-braced panel, plus each plan diagonal
        "x": dict(mechanisms=0, self_stress_states=4 * s + p),
        # unbraced: four shear mechanisms a storey, one fewer with a plan diagonal
        "none": dict(mechanisms=4 * s - p, self_stress_states=0),
    }[bracing]
    assert {k: c[k] for k in expected} == expected


@pytest.mark.parametrize("kwargs,argument", [
    (dict(storeys=0), "storeys"), (dict(storeys=3, width=-1), "width"),
    (dict(storeys=3, storey_height="tall"), "storey_height"),
    (dict(storeys=3, top_width=0), "top_width"),
    (dict(storeys=3, bracing="k"), "bracing"),
])
def test_tower_bad_arguments(kwargs, argument):
    with pytest.raises(SpaceframeError, match=f"^{argument}: expected"):
        braced_tower(**kwargs)


# --------------------------------------------------------------------------
# The audit, where it exists, against the dense reference
# --------------------------------------------------------------------------

FRAMES = {
    "grid 4x3 corners": lambda: double_layer_grid(4, 3),
    "grid 3x3 minimal": lambda: double_layer_grid(3, 3, supports="minimal"),
    "grid 3x2 free": lambda: double_layer_grid(3, 2, supports="none"),
    "grid 5x4 perimeter": lambda: double_layer_grid(5, 4, supports="perimeter"),
    "strip 1x4 corners": lambda: double_layer_grid(1, 4),
    "tower 4 x": lambda: braced_tower(4),
    "tower 3 single tapered": lambda: braced_tower(3, bracing="single", top_width=1.2),
    "tower 3 unbraced + plan": lambda: braced_tower(3, bracing="none", plan_bracing=True),
}


@pytest.mark.parametrize("case", sorted(FRAMES))
def test_audit_matches_dense(case):
    import spaceframe

    f = FRAMES[case]()
    r = spaceframe.audit(f)
    c = dense_counts(f)
    got = {k: int(getattr(r, k)) for k in c}
    assert got == c
    assert (r.joints, r.members, r.restraints) == (f.n_joints, f.n_members, f.n_restraints)
    assert r.stable == (c["mechanisms"] == 0)
    assert np.shape(r.mode_displacements) == (c["mechanisms"], f.n_joints, 3)
