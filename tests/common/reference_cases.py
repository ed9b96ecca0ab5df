"""Reference frames with counts known from sources outside the project.

Each case names its source.  ``expected`` holds the counts the audit must
give: (mechanisms, rigid_body_modes, internal_mechanisms, self_stress_states).
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass, field

import numpy as np

from spaceframe import Frame


@dataclass(frozen=True)
class Case:
    name: str
    frame: Frame
    expected: tuple[int, int, int, int]
    source: str
    rational: bool = field(default=False)  # coordinates exact in binary: sympy can check


def _edges_at(X, length):
    n = len(X)
    return [[i, j] for i in range(n) for j in range(i + 1, n)
            if abs(np.linalg.norm(X[i] - X[j]) - length) < 1e-9]


def tetrahedron():
    X = np.array([[0, 0, 0], [2, 0, 0], [0, 2, 0], [0, 0, 2]], float)
    return Frame.from_arrays(X, [[i, j] for i in range(4) for j in range(i + 1, 4)])


def octahedron():
    X = np.vstack([np.eye(3), -np.eye(3)])
    return Frame.from_arrays(X, _edges_at(X, np.sqrt(2)))


def icosahedron():
    p = (1 + 5 ** 0.5) / 2
    X = []
    for a, b in itertools.product((-1, 1), (-p, p)):
        X += [[0, a, b], [a, b, 0], [b, 0, a]]
    X = np.array(X)
    return Frame.from_arrays(X, _edges_at(X, 2.0))


def cube(diagonals=False):
    X = np.array(list(itertools.product((0, 2), (0, 2), (0, 2))), float)
    E = [[i, j] for i in range(8) for j in range(i + 1, 8) if np.abs(X[i] - X[j]).sum() == 2]
    if diagonals:  # one diagonal on each of the six faces
        for axis in range(3):
            for side in (0, 2):
                face = [i for i in range(8) if X[i, axis] == side]
                a = face[0]
                b = max(face, key=lambda j: np.linalg.norm(X[j] - X[a]))
                E.append([a, b])
    return Frame.from_arrays(X, E)


def collinear_pair(dimension):
    X = np.zeros((3, dimension))
    X[:, 0] = [0.0, 1.0, 2.0]
    return Frame.from_arrays(X, [[0, 1], [1, 2]], supports={0: "pin", 2: "pin"})


def flat_truss(bays=6, *, out_of_plane_held=()):
    """A Pratt-like triangulated truss in the plane z = 0, restrained in plane only.

    Bottom chord joints 0..bays, top chord joints above 1..bays-1; pinned in
    x and y at the left end, held in y at the right end; ``out_of_plane_held``
    adds z restraints at those joints.
    """
    bottom = [[2.0 * i, 0.0, 0.0] for i in range(bays + 1)]
    top = [[2.0 * i, 1.5, 0.0] for i in range(1, bays)]
    X = np.array(bottom + top)
    T = lambda i: bays + i  # top joint above bottom joint i (1..bays-1)
    E = [[i, i + 1] for i in range(bays)]                      # bottom chord
    E += [[T(i), T(i + 1)] for i in range(1, bays - 1)]        # top chord
    E += [[0, T(1)], [bays, T(bays - 1)]]                      # end rakers
    E += [[i, T(i)] for i in range(1, bays)]                   # verticals
    E += [[i, T(i + 1)] if i < bays // 2 else [i + 1, T(i)] for i in range(1, bays - 1)]
    sup = {0: "xy", bays: "y"}
    for j in out_of_plane_held:
        sup[j] = sup.get(j, "") + "z"
    return Frame.from_arrays(X, E, supports=sup)


def four_bar_square():
    X = np.array([[0, 0], [2, 0], [2, 2], [0, 2]], float)
    return Frame.from_arrays(X, [[0, 1], [1, 2], [2, 3], [3, 0]], supports={0: "pin", 1: "pin"})


def braced_square():
    X = np.array([[0, 0], [2, 0], [2, 2], [0, 2]], float)
    return Frame.from_arrays(X, [[0, 1], [1, 2], [2, 3], [3, 0], [0, 2], [1, 3]],
                             supports={0: "pin", 1: "y"})


def dangling_joint():
    X = np.array([[0, 0, 0], [3, 0, 0], [0, 3, 0], [0, 0, 3], [5, 5, 5]], float)
    E = [[0, 1], [0, 2], [0, 3], [1, 2], [1, 3], [2, 3]]
    return Frame.from_arrays(X, E, supports={0: "pin", 1: "yz", 2: "z"})


CASES = [
    Case("tetrahedron", tetrahedron(), (6, 6, 0, 0),
         "Cauchy (1813) / Dehn (1916): triangulated convex polyhedra are infinitesimally rigid",
         rational=True),
    Case("octahedron", octahedron(), (6, 6, 0, 0), "Cauchy / Dehn", rational=True),
    Case("icosahedron", icosahedron(), (6, 6, 0, 0), "Cauchy / Dehn"),
    Case("cube, 12 bars", cube(), (12, 6, 6, 0),
         "Maxwell count 12 - 3x8 = -12 with no self-stress: 6 internal mechanisms "
         "(a classic example, e.g. Pellegrino & Calladine 1986; the face-racking modes)",
         rational=True),
    Case("cube, one diagonal per face", cube(diagonals=True), (6, 6, 0, 0),
         "Cauchy / Dehn: a triangulated convex polyhedron", rational=True),
    Case("two collinear bars, plane", collinear_pair(2), (1, 0, 1, 1),
         "Pellegrino & Calladine (1986), their first example", rational=True),
    Case("two collinear bars, space", collinear_pair(3), (2, 0, 2, 1),
         "Pellegrino & Calladine (1986): in space the middle joint has two free directions",
         rational=True),
    Case("flat truss in space, in-plane restraints", flat_truss(6), (12, 3, 9, 0),
         "derived: in-plane bars have no out-of-plane component, so each of the 12 joints is "
         "free out of plane (3 of these combinations are rigid-body: lift and two tilts)",
         rational=True),
    Case("flat truss, two joints held out of plane", flat_truss(6, out_of_plane_held=(0, 6)),
         (10, 1, 9, 0), "derived: out-of-plane mechanisms = joints - out-of-plane restraints "
         "(12 - 2); one is the rigid spin about the line through the two held joints",
         rational=True),
    Case("plane four-bar linkage", four_bar_square(), (1, 0, 1, 1),
         "Maxwell count 4 + 4 - 8 = 0, yet a square of four bars racks (common practice); "
         "the bar between the two pins is redundant with them: one self-stress (derived)",
         rational=True),
    Case("braced square, both diagonals", braced_square(), (0, 0, 0, 1),
         "Maxwell count 6 + 3 - 8 = +1, triangulated: one state of self-stress (common practice)",
         rational=True),
    Case("tetrahedron with a dangling joint", dangling_joint(), (3, 0, 3, 0),
         "derived: a joint with no members has three free directions", rational=True),
]
