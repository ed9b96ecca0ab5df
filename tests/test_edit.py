"""Frame edits (spaceframe/edit.py) and every path that edits a frame: what survives, by field.

Sources, named per test:
- "derived": what an edit must give, written out by hand from the frame's own fields and the
  rules of spaceframe/edit.py's docstring (new members get the median EA of the frame, tags
  "" unless given; supports of untouched joints keep their rows and order).
- The bracing re-audit and ``brace --write`` paths are in tests/analysis/test_bracing.py,
  the batch variants in tests/test_batch.py; the extrusion path is here.
"""

from __future__ import annotations

import numpy as np
import pytest

from spaceframe import Frame, edit
from spaceframe.errors import ModelError
from spaceframe.extrude import extrude

from common.frames import assert_same_frame

EA = [1.0e5, 2.0e5, 4.0e5, 3.0e5, 8.0e5]


def _tagged():
    """A braced-square-like plane frame with joint and member tags, EA and three supports."""
    return Frame.from_arrays(
        [[0, 0], [2, 0], [2, 1.5], [0, 1.5]], [[0, 1], [1, 2], [2, 3], [3, 0], [0, 2]],
        joint_ids=["A", "B", "C", "D"], member_ids=["AB", "BC", "CD", "DA", "AC"],
        supports={0: "pin", 1: "y"}, name="square", units="mm",
        joint_tags={"role": ["foot", "foot", "top", "top"], "frame": ["1", "1", "1", "1"]},
        member_tags={"role": ["chord", "post", "chord", "post", "brace"],
                     "bay": ["", "", "", "", "1"]},
        member_properties={"EA": EA})


def _like(frame, **changes):
    """``frame`` with fields replaced, built afresh through the constructor (the expectation)."""
    fields = dict(joint_ids=frame.joint_ids, coords=frame.coords, member_ids=frame.member_ids,
                  ends=frame.ends, restraint_joint=frame.restraint_joint,
                  restraint_dir=frame.restraint_dir, dimension=frame.dimension, name=frame.name,
                  units=frame.units, joint_tags=dict(frame.joint_tags),
                  member_tags=dict(frame.member_tags),
                  member_properties=dict(frame.member_properties))
    fields.update(changes)
    return Frame(**fields)


def test_add_members_keeps_everything_and_gives_the_median_ea():
    # source: derived.  median(1, 2, 4, 3, 8) x 1e5 = 3e5; the tag "group" is new: "" before.
    f = _tagged()
    g = edit.add_members(f, ["BD"], [[1, 3]], tags={"role": ["brace"], "group": ["brace"]})
    want = _like(f, member_ids=f.member_ids + ("BD",), ends=[*f.ends.tolist(), [1, 3]],
                 member_tags={"role": ("chord", "post", "chord", "post", "brace", "brace"),
                              "bay": ("", "", "", "", "1", ""),
                              "group": ("", "", "", "", "", "brace")},
                 member_properties={"EA": EA + [3.0e5]})
    assert_same_frame(g, want)
    h = edit.add_members(f, ["BD"], [[1, 3]], properties={"EA": [7.0]})
    assert h.member_properties["EA"].tolist() == EA + [7.0]
    assert f.n_members == 5  # the input is unchanged


def test_remove_move_and_support_edits():
    # source: derived
    f = _tagged()
    g = edit.remove_members(f, [4, 1])
    assert_same_frame(g, _like(f, member_ids=("AB", "CD", "DA"), ends=[[0, 1], [2, 3], [3, 0]],
                               member_tags={"role": ("chord", "chord", "post"),
                                            "bay": ("", "", "")},
                               member_properties={"EA": [1.0e5, 4.0e5, 3.0e5]}))
    moved = edit.move_joints(f, [2], [[2.5, 1.5]])
    assert moved.coords.tolist() == [[0, 0], [2, 0], [2.5, 1.5], [0, 1.5]]
    freed = edit.free_supports(f, [0])
    assert_same_frame(freed, _like(f, restraint_joint=[1], restraint_dir=[[0.0, 1.0]]))
    s = np.sqrt(0.5)
    reset = edit.set_supports(f, {0: np.array([[s, s]]), 3: np.eye(2)})
    assert_same_frame(reset, _like(f, restraint_joint=[1, 0, 3, 3],
                                   restraint_dir=[[0, 1], [s, s], [1, 0], [0, 1]]))
    more = edit.add_restraints(f, [2], [[1.0, 0.0]])
    assert more.restraint_joint.tolist() == [0, 0, 1, 2]
    assert_same_frame(edit.add_joints(f, ["E"], [[1.0, 3.0]], tags={"role": ["apex"]}),
                      _like(f, joint_ids=f.joint_ids + ("E",),
                            coords=[*f.coords.tolist(), [1.0, 3.0]],
                            joint_tags={"role": ("foot", "foot", "top", "top", "apex"),
                                        "frame": ("1", "1", "1", "1", "")}))


def test_edit_errors_name_the_id():
    f = _tagged()
    with pytest.raises(ModelError, match="'AC' is already in the frame"):
        edit.add_members(f, ["AC"], [[1, 3]])
    with pytest.raises(ModelError, match="'AC' is already in the frame"):
        edit.add_members(f, ["X", "AC"], [[1, 3], [0, 2]])
    with pytest.raises(ModelError, match="no 'A0'"):
        edit.add_members(f, ["BD"], [[1, 3]], properties={"A0": [1.0]})
    with pytest.raises(ModelError, match="2 'role' tag labels for 1 new member"):
        edit.add_members(f, ["BD"], [[1, 3]], tags={"role": ["a", "b"]})
    with pytest.raises(ModelError, match="joint id 'D' is already"):
        edit.add_joints(f, ["D"], [[5.0, 5.0]])


def test_extrusion_carries_ea_tags_and_supports():
    # source: derived.  Two frames of the square, tied at C and D: every planar member is copied
    # with its EA and tags into each frame; the ties take the median EA (3e5, edit.py's rule)
    # and no planar tag; the planar joint tags other than role/frame/bay are copied too.
    planar = _like(_tagged(), joint_tags={"role": ["foot", "foot", "top", "top"],
                                          "level": ["0", "0", "1", "1"]},
                   member_tags={"role": ("chord", "post", "chord", "post", "brace"),
                                "kind": ("a", "b", "c", "d", "e")})
    frame = extrude(planar, {"frames": 2, "spacing": 3.0, "out_of_plane": "held",
                             "ties": {"purlin": ["C", "D"]}})
    jid = tuple(f"F{k}.{j}" for k in (1, 2) for j in "ABCD")
    mid = tuple(f"F{k}.{m}" for k in (1, 2) for m in planar.member_ids) + ("B1.C", "B1.D")
    X = [[x, y, z] for y in (0.0, 3.0) for x, z in planar.coords.tolist()]
    y, x, z = [0, 1, 0], [1, 0, 0], [0, 0, 1]
    rows = [(0, x), (0, z), (0, y), (1, z), (1, y), (4, x), (4, z), (4, y), (5, z), (5, y)]
    want = Frame(joint_ids=jid, coords=X, member_ids=mid,
                 ends=[*planar.ends.tolist(), *(planar.ends + 4).tolist(), [2, 6], [3, 7]],
                 restraint_joint=[j for j, _ in rows], restraint_dir=[d for _, d in rows],
                 dimension=3, name="square, 2 frames", units="mm",
                 joint_tags={"role": ("foot", "foot", "top", "top") * 2,
                             "frame": ("1",) * 4 + ("2",) * 4, "bay": ("",) * 8,
                             "level": ("0", "0", "1", "1") * 2},
                 member_tags={"group": ("frame",) * 10 + ("tie", "tie"),
                              "role": ("chord", "post", "chord", "post", "brace") * 2
                              + ("purlin", "purlin"),
                              "frame": ("1",) * 5 + ("2",) * 5 + ("", ""),
                              "bay": ("",) * 10 + ("1", "1"),
                              "kind": ("a", "b", "c", "d", "e") * 2 + ("", "")},
                 member_properties={"EA": EA * 2 + [3.0e5, 3.0e5]})
    assert_same_frame(frame, want)
