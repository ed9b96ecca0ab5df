"""Small frames for the bracing tests (invented: corners jittered by a seed)."""

from __future__ import annotations

import numpy as np

from spaceframe import Frame


def _jitter(coords, seed, amount):
    rng = np.random.default_rng(seed)
    return np.asarray(coords, float) + amount * rng.uniform(-1, 1, np.shape(coords))


def plane_grid(seed):
    """2 x 2 panels in the plane, pinned at the three feet, no diagonals; corners jittered."""
    coords = [[x, y] for y in (0, 1, 2) for x in (0, 1, 2)]
    coords = _jitter(coords, seed, 0.15)
    ends = [[0, 3], [1, 4], [2, 5], [3, 6], [4, 7], [5, 8],
            [3, 4], [4, 5], [6, 7], [7, 8]]
    return Frame.from_arrays(coords, ends, supports={0: "pin", 1: "pin", 2: "pin"})


def box_frame(seed):
    """Four pinned columns and a roof ring, no bracing: a 3D box; the roof jittered in z only
    would warp panels, so the whole box is stretched, keeping faces planar."""
    rng = np.random.default_rng(seed)
    a, b, h = 3 + rng.uniform(0, 2), 2 + rng.uniform(0, 2), 2.5 + rng.uniform(0, 1)
    coords = [[0, 0, 0], [a, 0, 0], [a, b, 0], [0, b, 0],
              [0, 0, h], [a, 0, h], [a, b, h], [0, b, h]]
    ends = [[0, 4], [1, 5], [2, 6], [3, 7], [4, 5], [5, 6], [6, 7], [7, 4]]
    return Frame.from_arrays(coords, ends, supports={i: "pin" for i in range(4)})


def small_extruded(seed):
    """Two frames of a king-post truss, tied at the eaves and the ridge only;
    the first frame's left bearing held along the building so there is no rigid-body mode.
    Height and spacing vary with the seed, so the cost order does."""
    from spaceframe.extrude import extrude

    rng = np.random.default_rng(seed)
    h, spacing = 0.8 + rng.uniform(0, 0.8), 2.5 + rng.uniform(0, 1.5)
    planar = Frame.from_arrays([[0, 0], [2, 0], [4, 0], [2, h]],
                               [[0, 1], [1, 2], [0, 3], [3, 2], [1, 3]],
                               supports={0: "pin", 2: "y"}, joint_ids=["L0", "L1", "L2", "U1"])
    spec = {"frames": 2, "spacing": spacing, "out_of_plane": "free",
            "ties": {"eaves": ["L0", "L2"], "ridge": ["U1"]},
            "support": [{"at": "L0", "frames": [1], "out_of_plane": "held"}]}
    return extrude(planar, spec)
