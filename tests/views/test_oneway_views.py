"""The one-way motion in the pictures and the report: shown, and on one side only."""

from __future__ import annotations

import numpy as np
from click.testing import CliRunner

from spaceframe import Frame, audit
from spaceframe.cli import main
from spaceframe.views.report import report_document
from spaceframe.views.scene import phases, scene_of


def portal(rods):
    """A pinned portal (columns 3 high, 4 apart) with tension-only rods; common practice:
    one rod holds sway one way only, crossed rods hold both."""
    ends = [[0, 2], [1, 3], [2, 3]] + [[0, 3], [1, 2]][:rods]
    return Frame.from_arrays([[0, 0], [4, 0], [0, 3], [4, 3]], ends,
                             joint_ids=["A", "B", "C", "D"],
                             member_ids=["AC", "BD", "CD", "R1", "R2"][:3 + rods],
                             supports={0: "pin", 1: "pin"}, name="portal",
                             member_tags={"carries": ["", "", "", "tension", "tension"][:3 + rods]})


def test_scene_moves_one_side_only():
    r = audit(portal(1))
    s = scene_of(r)
    assert s.one_way == 0 and len(s.modes) == 1          # no mechanism, then the motion
    u = s.modes[0]
    rest = s.displaced(None, 0.0)
    amounts = []
    for phi in phases(24):
        d = s.displaced(0, phi) - rest
        a = float(np.sum(d * u) / np.sum(u * u))
        assert np.allclose(d, a * u) and a >= -1e-12       # never the resisted way
        amounts.append(a)
    assert max(amounts) > 0.1 * s.extent                   # it does move
    assert scene_of(audit(portal(2))).one_way is None


def test_report_lists_the_motion_after_the_mechanisms():
    doc = report_document(audit(portal(1)))
    (entry,) = doc["audit"]["mechanism_modes"]
    assert entry["kind"] == "one-way (sway)" and "R1 (tension only) goes slack" in \
        entry["description"]
    assert doc["geometry"]["one_way"] == 0 and len(doc["geometry"]["modes"]) == 1
    assert doc["verdict"].startswith("NOT HELD")


def test_animate_one_way_refuses_a_held_frame(tmp_path):
    from spaceframe.io import save

    path = tmp_path / "portal.toml"
    save(portal(2), path)
    res = CliRunner().invoke(main, ["animate", str(path), "--one-way", "-o",
                                    str(tmp_path / "x.png")])
    assert res.exit_code == 2 and "the one-way members hold the frame" in res.output
