"""The demo models' verdicts, pinned.

Each model in ``models/`` (the TOML files, and ``dome_canopy.obj`` with its
sidecar ``dome_canopy.supports.toml``) is audited as a user runs it
(``spaceframe audit MODEL --json``), and its counts must equal the constants
below.  Each count says where it comes from: derived by hand where that is
short (Maxwell's count ``members + restraints - dimension * joints`` plus one
known fact), and in every case checked again against numpy's dense SVD of a
compatibility matrix this file builds on its own: the model file read with
``tomllib`` (or the OBJ's ``v``/``f`` lines by hand), the matrix from
``common.matrices.dense_compatibility`` and the rigid-body motions from their
definition.  Nothing of spaceframe's reader, assembly or engine is used for
the reference.
"""

from __future__ import annotations

import json
import tomllib
from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner

from spaceframe.cli import main

from common.matrices import dense_compatibility

MODELS = Path(__file__).resolve().parents[2] / "models"

COUNTS = ("joints", "members", "restraints", "mechanisms", "rigid_body_modes",
          "internal_mechanisms", "self_stress_states", "stable")

#: model file -> (joints, members, restraints, mechanisms, rigid_body_modes,
#: internal_mechanisms, self_stress_states, stable)
PINNED = {
    # A plane Pratt truss, pin at L0 and roller at L6.  Maxwell: 21 + 3 - 2 x 12 = 0.  It is a
    # simple truss (each panel a triangle added to the last by two members, none collinear),
    # which is statically determinate: no self-stress (Hibbeler, "Structural Analysis", the
    # simple truss and its determinacy, from memory), so 0 mechanisms either; a pin and a
    # roller whose held direction does not pass through the pin leave no rigid-body motion.
    "hall_truss.toml": (12, 21, 3, 0, 0, 0, 0, True),
    # A plane Pratt truss (end verticals) entered in 3D, every member in y = 0; B0 pinned, B6
    # held in y and z.  In its own plane it is a simple truss with 2 x 14 = 25 + 3 in-plane
    # restraints: determinate, no self-stress (as above).  Out of the plane nothing but the
    # two bearings holds y: 14 - 2 = 12 mechanisms (Maxwell: 25 + 5 - 42 = -12, with no
    # self-stress).  Of the rigid motions moving joints in y (translation along y, turns
    # about x and about z), only the turn about the line B0-B6 keeps y = 0 at both bearings:
    # 1 rigid-body mode, 11 internal.
    "footbridge_truss.toml": (14, 25, 5, 12, 1, 11, 0, False),
    # Five pinned column lines under a mono-pitch roof, walls cross-braced in bay 1, one roof
    # diagonal left out.  Maxwell: 31 + 30 - 60 = +1.  Each of the two wall panels with
    # both diagonals carries one state of self-stress (a braced quadrilateral with one
    # member more than a triangulated one: common practice) and nothing else is
    # over-braced (the SVD below confirms): 2 states, so 2 - 1 = 1 mechanism (extended
    # Maxwell rule, Calladine 1978).  Ten pinned bases not on one line: no rigid-body
    # motion, so the mechanism is internal.
    "canopy_sway.toml": (20, 31, 30, 1, 0, 1, 2, False),
    # A double-layer deck on four pinned posts with one sway brace a side.  Maxwell:
    # 56 + 12 - 66 = +2.  The counts come from numpy's dense SVD (below): rank 54, so
    # 0 mechanisms and 56 - 54 = 2 states of self-stress.
    "plant_platform.toml": (22, 56, 12, 0, 0, 0, 2, True),
    # Six trusses tied by purlins only, every bearing held in x and z or in z only.
    # Maxwell: 161 + 18 - 216 = -37; numpy's dense SVD finds no self-stress (rank 161 of
    # 161 members), so 37 mechanisms.  Nothing holds y anywhere: the translation along y is
    # a rigid-body mode.  Every turn is stopped: about z by the x restraints at L0 of frames
    # at different y, about y by the z restraints at x = 0 and x = 12, about x by the z
    # restraints at different y.  So 1 rigid-body mode and 36 internal.
    "hall_roof_unbraced.toml": (72, 161, 18, 37, 1, 36, 0, False),
    # The same hall with ties, end-bay bracing and held bearings at the end frames.
    # Maxwell: 234 + 22 - 216 = +40; numpy's dense SVD gives rank 194, all of the
    # 216 - 22 = 194 free coordinates: 0 mechanisms, so 234 - 194 = 40 states of self-stress.
    "hall_roof_braced.toml": (72, 234, 22, 0, 0, 0, 40, True),
    # A facade scaffold: 6 standard pairs, 3 lifts, ledgers and transoms, feet pinned.
    # Maxwell: 84 + 36 - 3 x 48 = -24; no closed triangle or braced panel anywhere, and
    # numpy's dense SVD below finds rank 84 (no self-stress): 24 mechanisms.  Twelve pinned
    # feet not on one line leave no rigid-body motion.
    "facade_scaffold.toml": (48, 84, 36, 24, 0, 24, 0, False),
    # A triangulated dome (84 triangles, 132 unique edges) with its 12 base-ring joints
    # pinned by the sidecar.  Maxwell: 132 + 36 - 147 = +21.  A convex polyhedron with
    # triangular faces is infinitesimally rigid (Dehn 1916; from memory), and the pinned
    # base ring plays the part of the missing, rigid base face: 0 mechanisms, so 21 states
    # of self-stress; numpy's dense SVD agrees (rank 111 = 147 - 36).
    "dome_canopy.obj": (49, 132, 36, 0, 0, 0, 21, True),
    # A mast pinned at its foot, no guy yet, six pinned anchors.  Maxwell: 1 + 21 - 24 = -2;
    # one member cannot be over-braced, so no self-stress and 2 mechanisms (its head turns
    # about the foot in two directions); every joint but the head is pinned, so no rigid
    # body motion: both internal.
    "stage_mast.toml": (8, 1, 21, 2, 0, 2, 0, False),
}


def _axes(code: str, d: int) -> list[int]:
    """Held axes of a support code: "pin" holds all, letters hold their axes."""
    return list(range(d)) if code == "pin" else ["xyz".index(c) for c in code]


def _read_toml(path: Path):
    """Coordinates, member ends and held (joint, axis) pairs, read with tomllib alone."""
    doc = tomllib.loads(path.read_text(encoding="utf-8"))
    d = doc["dimension"]
    ids = list(doc["joints"])
    index = {j: i for i, j in enumerate(ids)}
    X = np.array([doc["joints"][j] for j in ids], float)
    ends = [(index[a], index[b]) for a, b in doc["members"].values()]
    held = [(index[j], a) for j, code in doc.get("supports", {}).items() for a in _axes(code, d)]
    return X, ends, held


def _read_dome(path: Path):
    """The OBJ's vertices and the unique edges of its faces; the base ring pinned.

    The sidecar says "pin at z = min": the joints at the lowest z (here exactly 0).
    """
    X, edges = [], set()
    for line in path.read_text(encoding="utf-8").splitlines():
        parts = line.split()
        if parts[:1] == ["v"]:
            X.append([float(v) for v in parts[1:4]])
        elif parts[:1] == ["f"]:
            f = [int(p.split("/")[0]) - 1 for p in parts[1:]]
            edges |= {tuple(sorted((f[k], f[(k + 1) % len(f)]))) for k in range(len(f))}
    X = np.array(X)
    base = np.flatnonzero(np.isclose(X[:, 2], X[:, 2].min(), rtol=0, atol=1e-9))
    return X, sorted(edges), [(int(j), a) for j in base for a in range(3)]


def _reference(X, ends, held):
    """Counts from numpy's dense SVD and the rigid motions, independent of spaceframe."""
    n, d = X.shape
    C = dense_compatibility(X, ends, held)
    s = np.linalg.svd(C, compute_uv=False)
    rank = int(np.sum(s > 1e-9 * s[0]))
    mechanisms, self_stress = C.shape[1] - rank, len(ends) - rank
    # rigid motions in full coordinates: d translations and the turns about the centroid
    x = (X - X.mean(axis=0)) / np.linalg.norm(np.ptp(X, axis=0))
    motions = [np.tile(np.eye(d)[a], (n, 1)) for a in range(d)]
    motions += [np.cross(np.eye(3)[a], x) for a in range(3)] if d == 3 else \
        [np.c_[-x[:, 1], x[:, 0]]]
    G = np.stack([m.ravel() for m in motions], axis=1)
    held_rows = [j * d + a for j, a in held]
    r_all = np.linalg.matrix_rank(G)
    rigid = r_all - (np.linalg.matrix_rank(G[held_rows]) if held_rows else 0)
    return (n, len(ends), len(held), mechanisms, rigid, mechanisms - rigid, self_stress,
            mechanisms == 0)


def test_every_demo_model_is_pinned():
    """A new demo model needs its verdict here too."""
    on_disk = {p.name for p in MODELS.glob("*.toml")
               if not p.name.endswith((".spec.toml", ".variants.toml", ".supports.toml"))}
    assert on_disk | {"dome_canopy.obj"} == set(PINNED)


@pytest.mark.parametrize("name", sorted(PINNED))
def test_demo_model_verdict(name):
    path = MODELS / name
    res = CliRunner().invoke(main, ["audit", str(path), "--json"])
    doc = json.loads(res.stdout)
    got = tuple(doc[k] for k in COUNTS)
    assert got == PINNED[name]
    # exit status: 0 for a frame with no mechanism, 1 otherwise (README)
    assert res.exit_code == (0 if PINNED[name][-1] else 1)


@pytest.mark.parametrize("name", sorted(PINNED))
def test_pinned_counts_match_dense_svd(name):
    """numpy's SVD of the independently built matrix gives the same constants."""
    path = MODELS / name
    X, ends, held = _read_dome(path) if path.suffix == ".obj" else _read_toml(path)
    assert _reference(X, ends, held) == PINNED[name]
