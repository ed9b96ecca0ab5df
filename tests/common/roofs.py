"""Roofs of plane trusses for the restraint tests: a flat Pratt truss in mm, extruded.

Invented geometry (round numbers); the facts checked against it are derived by
hand in the tests.
"""

from __future__ import annotations

import numpy as np

from spaceframe import Frame
from spaceframe.extrude import extrude

__all__ = ["flat_truss", "roof", "PANEL", "DEPTH", "SPACING", "PANELS"]

PANEL, DEPTH, SPACING, PANELS = 2000.0, 1500.0, 4000.0, 6


def flat_truss() -> Frame:
    """A flat Pratt truss in mm: bottom joints L0..L6, top joints U0..U6, 2000 mm panels,
    1500 mm deep, end verticals; pinned at L0, on a roller at L6.  14 joints, 25 members,
    3 restraints: 2 x 14 = 25 + 3, triangulated panel by panel, so rigid in its plane."""
    xs = np.arange(PANELS + 1) * PANEL
    coords = [[x, 0.0] for x in xs] + [[x, DEPTH] for x in xs]
    ids = [f"L{i}" for i in range(PANELS + 1)] + [f"U{i}" for i in range(PANELS + 1)]
    L, U = (lambda i: i), (lambda i: PANELS + 1 + i)
    ends, mids, role = [], [], []
    for i in range(PANELS):
        ends += [(L(i), L(i + 1)), (U(i), U(i + 1)), (L(i), U(i + 1)) if i < 3 else
                 (U(i), L(i + 1))]
        mids += [f"BC{i + 1}", f"TC{i + 1}", f"D{i + 1}"]
        role += ["chord", "chord", "web"]
    for i in range(PANELS + 1):
        ends.append((L(i), U(i)))
        mids.append(f"V{i}")
        role.append("web")
    return Frame.from_arrays(coords, ends, joint_ids=ids, member_ids=mids,
                             supports={0: "pin", PANELS: "y"}, units="mm",
                             member_tags={"role": role}, name="flat truss")


def roof(bottom_ties, *, braced=True, bearings="ends"):
    """Five trusses at 4000 mm, purlins at every top joint, eaves ties at L0 and L6, bottom
    ties at ``bottom_ties``; with ``braced``, cross bracing in the roof plane and in the
    ceiling plane (through L0, the tied joints and L6) of the two end bays; bearings L0, L6
    held along the building in the frames ``bearings``.  The end verticals' planes are braced
    too: without them the braced roof plane could lean along the building over the braced
    ceiling (the verticals between them lie in the trusses' planes)."""
    ceiling = ["L0", *bottom_ties, "L6"]
    spec = {"frames": 5, "spacing": SPACING,
            "ties": {"purlin": [f"U{i}" for i in range(PANELS + 1)], "eaves": ["L0", "L6"],
                     **({"tie": list(bottom_ties)} if bottom_ties else {})},
            "support": [{"at": "L0, L6", "frames": bearings, "out_of_plane": "held"}]}
    if braced:
        spec["planes"] = {"roof": [f"U{i}" for i in range(PANELS + 1)], "ceiling": ceiling,
                          "west_end": ["L0", "U0"], "east_end": ["L6", "U6"]}
        spec["bracing"] = [{"planes": list(spec["planes"]), "bays": "ends"}]
    return extrude(flat_truss(), spec)


