"""Reading and writing the native model format, and every message for bad input.

The bad inputs are a registry (:data:`ERROR_CASES`, :data:`WARNING_CASES`) of
small files, each written to its own temporary file; ``test_cli_errors.py``
runs the same files through the command line.
"""

from __future__ import annotations

import json
import os
import warnings
from dataclasses import dataclass

import numpy as np
import pytest

import spaceframe
from spaceframe import Frame, ModelError, SpaceframeWarning
from spaceframe.io import native

# The sample of the format's documentation, exactly as written there.
SAMPLE = """\
name = "Plant platform, south bay"
units = "m"          # m, mm, cm, ft or in; results do not depend on it
dimension = 3        # 3 = space frame; 2 = plane frame analysed in its plane, coordinates [x, y]

[joints]             # id = [x, y, z]
A = [0.0, 0.0, 0.0]
B = [4.0, 0.0, 0.0]
C = [2.0, 0.0, 3.0]

[members]            # id = [end, end]
AB = ["A", "B"]
BC = ["B", "C"]
CA = ["C", "A"]

[supports]           # joint = what is held
A = "pin"            # every translation held (x, y, z; in 2D x, y)
B = "yz"             # any non-empty combination of the letters x, y, z: those axes held
# C = [[0.0, 0.6, 0.8]]   # or a list of direction vectors held (inclined roller); need not be unit length
"""

SAMPLE_JSON = """\
{
  "name": "Plant platform, south bay",
  "units": "m",
  "dimension": 3,
  "joints": {
    "A": [0.0, 0.0, 0.0],
    "B": [4.0, 0.0, 0.0],
    "C": [2.0, 0.0, 3.0]
  },
  "members": {
    "AB": ["A", "B"],
    "BC": ["B", "C"],
    "CA": ["C", "A"]
  },
  "supports": {
    "A": "pin",
    "B": "yz"
  }
}
"""

# The base of the bad files: small, one item a line, so each line is known.
BASE = """\
name = "bad input"
[joints]
A = [0.0, 0.0, 0.0]
B = [4.0, 0.0, 0.0]
C = [2.0, 0.0, 3.0]
[members]
AB = ["A", "B"]
BC = ["B", "C"]
CA = ["C", "A"]
[supports]
A = "pin"
B = "yz"
"""

BASE_2D = """\
dimension = 2
[joints]
A = [0.0, 0.0]
B = [4.0, 0.0]
C = [2.0, 3.0]
[members]
AB = ["A", "B"]
BC = ["B", "C"]
CA = ["C", "A"]
[supports]
A = "pin"
B = "y"
"""

BASE_JSON = """\
{
  "name": "bad input",
  "joints": {
    "A": [0.0, 0.0, 0.0],
    "B": [4.0, 0.0, 0.0],
    "C": [2.0, 0.0, 3.0]
  },
  "members": {
    "AB": ["A", "B"],
    "BC": ["B", "C"],
    "CA": ["C", "A"]
  },
  "supports": {
    "A": "pin",
    "B": "yz"
  }
}
"""

HERE = "# here"     # marks the line a message must name


def variant(base: str, old: str, new: str) -> str:
    """``base`` with the one line holding ``old`` replaced by ``new``."""
    assert base.count(old) == 1, old
    return base.replace(old, new)


def line_of(text: str, piece: str, nth: int = 1) -> int:
    """1-based line of the ``nth`` line of ``text`` holding ``piece``."""
    hits = [k for k, line in enumerate(text.splitlines(), 1) if piece in line]
    return hits[nth - 1]


@dataclass(frozen=True)
class Case:
    """One bad model file and what its message must say.

    ``line`` is the line the message must name (None where no line applies);
    ``expect`` are pieces the message must contain: the id, what is wrong and
    the key words of the fix.  The file name is always checked.
    """

    name: str
    suffix: str
    text: str | bytes
    expect: tuple[str, ...]
    line: int | None
    item: str | None = None

    def write(self, folder) -> str:
        path = folder / f"{self.name}{self.suffix}"
        if isinstance(self.text, bytes):
            path.write_bytes(self.text)
        else:
            path.write_text(self.text, encoding="utf-8")
        return str(path)


def _toml(name, old, new, expect, *, item=None, base=BASE, marker=HERE, nth=1):
    text = variant(base, old, new)
    return Case(name, ".toml", text, tuple(expect), line_of(text, marker, nth), item)


def _json(name, old, new, expect, *, at, item=None, nth=1, base=BASE_JSON):
    text = variant(base, old, new)
    return Case(name, ".json", text, tuple(expect), line_of(text, at, nth), item)


ERROR_CASES = [
    # members
    _toml("member-unknown-joint", 'AB = ["A", "B"]', 'AB = ["A", "Bx"]  # here',
          ["member 'AB'", "joint 'Bx'", "not in [joints]",
           "add the joint or correct the id (did you mean 'B'?)"], item="AB"),
    _json("member-unknown-joint-json", '"BC": ["B", "C"]', '"BC": ["B", "Cc"]',
          ["member 'BC'", "joint 'Cc'", 'not in "joints"',
           "add the joint or correct the id (did you mean 'C'?)"],
          at='"BC"', item="BC"),
    _toml("member-one-end", 'AB = ["A", "B"]', 'AB = ["A"]  # here',
          ["member 'AB'", "must be a list of two joint ids", "['A']"], item="AB"),
    _toml("member-three-ends", 'AB = ["A", "B"]', 'AB = ["A", "B", "C"]  # here',
          ["member 'AB'", "must be a list of two joint ids"], item="AB"),
    _toml("member-text", 'BC = ["B", "C"]', 'BC = "B-C"  # here',
          ["member 'BC'", "must be a list of two joint ids", "'B-C'"], item="BC"),
    _toml("member-numbers", 'CA = ["C", "A"]', 'CA = [3, 1]  # here',
          ["member 'CA'", "two joint ids", "put them in quotes"], item="CA"),
    _toml("member-self-loop", 'CA = ["C", "A"]', 'CA = ["C", "A"]\nAA = ["A", "A"]  # here',
          ["member 'AA'", "both ends at joint 'A'", "correct one end or delete the member"],
          item="AA"),
    _json("member-self-loop-json", '"CA": ["C", "A"]', '"CA": ["C", "C"]',
          ["member 'CA'", "both ends at joint 'C'", "delete the member"], at='"CA"', item="CA"),
    _toml("member-zero-length", 'CA = ["C", "A"]', 'CA = ["C", "A"]\nAD = ["A", "D"]  # here',
          ["member 'AD'", "joint 'A'", "joint 'D'", "length 0 m", "zero-length tolerance",
           "move one of them"],
          base=variant(BASE, "C = [2.0, 0.0, 3.0]", "C = [2.0, 0.0, 3.0]\nD = [0.0, 0.0, 0.0]"),
          item="AD"),
    # ids given twice
    _toml("joint-twice", "C = [2.0, 0.0, 3.0]", "C = [2.0, 0.0, 3.0]\nA = [1.0, 0.0, 0.0]  # here",
          ["joint id 'A'", "given twice in [joints]", "first at line 3",
           "rename one or delete the repeat"], item="A"),
    _toml("member-twice", 'CA = ["C", "A"]', 'CA = ["C", "A"]\nBC = ["C", "B"]  # here',
          ["member id 'BC'", "given twice in [members]", "first at line 8", "rename one"],
          item="BC"),
    _toml("support-twice", 'B = "yz"', 'B = "yz"\nB = "z"  # here',
          ["joint 'B' has two supports in [supports]", "first at line 12",
           "give each joint one support that holds all its directions"], item="B"),
    _toml("multi-line-joint-twice", "C = [2.0, 0.0, 3.0]",
          "C = [2.0, 0.0, 3.0]\nA = [  # here\n  1.0,\n  0.0,\n  0.0,\n]",
          ["joint id 'A'", "given twice", "first at line 3"], item="A"),
    _toml("section-twice", "[supports]", "[joints]  # here\nD = [1.0, 1.0, 1.0]\n[supports]",
          ["section [joints] appears twice", "first at line 2", "under one [joints] header"],
          item="joints"),
    _toml("name-twice", 'name = "bad input"', 'name = "bad input"\nname = "again"  # here',
          ["key 'name' is given twice (first at line 1); keep one"], item="name"),
    _json("joint-twice-json", '"C": [2.0, 0.0, 3.0]', '"C": [2.0, 0.0, 3.0],\n    "A": [1.0, 0.0, 0.0]',
          ["joint id 'A'", 'given twice in "joints"', "first at line 4", "rename one"],
          at='"A": [1.0', item="A"),
    _json("member-twice-json", '"CA": ["C", "A"]', '"CA": ["C", "A"],\n    "AB": ["B", "A"]',
          ["member id 'AB'", 'given twice in "members"', "first at line 9", "rename one"],
          at='"AB": ["B"', item="AB"),
    _json("support-twice-json", '"B": "yz"', '"B": "yz",\n    "A": "z"',
          ["joint 'A' has two supports in \"supports\"",
           "first at line %d" % line_of(BASE_JSON, '"A": "pin"')],
          at='"A": "z"', item="A"),
    # coordinates
    _toml("coordinate-text", "C = [2.0, 0.0, 3.0]", 'C = [2.0, "0", 3.0]  # here',
          ["joint 'C'", "coordinate y is '0', not a number", "write numbers without quotes"],
          item="C"),
    _toml("coordinate-boolean", "C = [2.0, 0.0, 3.0]", "C = [2.0, true, 3.0]  # here",
          ["joint 'C'", "coordinate y is True, not a number"], item="C"),
    _toml("coordinates-empty", "C = [2.0, 0.0, 3.0]", "C = []  # here",
          ["joint 'C' has no coordinates", "give 3 numbers [x, y, z]"], item="C"),
    _toml("coordinates-not-list", "C = [2.0, 0.0, 3.0]", "C = 2.0  # here",
          ["joint 'C'", "coordinates must be a list of 3 numbers [x, y, z]", "got 2.0"],
          item="C"),
    _json("coordinates-missing-json", '"B": [4.0, 0.0, 0.0]', '"B": null',
          ["joint 'B'", "must be a list of 3 numbers", "got None"], at='"B": null', item="B"),
    _toml("coordinates-two-in-3d", "C = [2.0, 0.0, 3.0]", "C = [2.0, 3.0]  # here",
          ["joint 'C' has 2 coordinates", "3-dimensional (dimension = 3)",
           "give 3 numbers [x, y, z]", "set dimension = 2 at the top of the file"], item="C"),
    _toml("coordinates-three-in-2d", "C = [2.0, 3.0]", "C = [2.0, 3.0, 1.0]  # here",
          ["joint 'C' has 3 coordinates", "2-dimensional (dimension = 2)", "give 2 numbers [x, y]",
           "set dimension = 3 at the top of the file"], base=BASE_2D, item="C"),
    _json("coordinates-two-in-3d-json", '"A": [0.0, 0.0, 0.0]', '"A": [0.0, 0.0]',
          ["joint 'A' has 2 coordinates", 'set "dimension": 2'], at='"A": [0.0, 0.0]', item="A"),
    _toml("coordinate-nan", "C = [2.0, 0.0, 3.0]", "C = [nan, 0.0, 3.0]  # here",
          ["joint 'C'", "not a finite number", "give every coordinate as a finite number"],
          item="C"),
    _json("coordinate-infinity-json", '"B": [4.0, 0.0, 0.0]', '"B": [Infinity, 0.0, 0.0]',
          ["joint 'B'", "not a finite number"], at="Infinity", item="B"),
    _toml("joints-coincident", "C = [2.0, 0.0, 3.0]", "C = [2.0, 0.0, 3.0]\nD = [0.0, 0.0, 1e-12]  # here",
          ["joints 'A' (line 3) and 'D'", "apart", "coincident-joint tolerance", "1e-09",
           "false mechanism", "merge them into one joint", "or move one of them"], item="D"),
    _toml("key-after-header", "C = [2.0, 0.0, 3.0]", "C = [2.0, 0.0, 3.0]\ndimension = 3  # here",
          ["joint 'dimension'", "move it above the first [section] header"], item="dimension"),
    # supports
    _toml("support-unknown-joint", 'B = "yz"', 'B = "yz"\nAA = "pin"  # here',
          ["support on joint 'AA'", "not in [joints]",
           "add the joint or correct the id (did you mean 'A'?)"], item="AA"),
    _toml("support-unknown-code", 'B = "yz"', 'B = "yq"  # here',
          ["support on joint 'B'", "unknown code 'yq'", "'pin'", "letters from 'xyz'"], item="B"),
    _toml("support-z-in-2d", 'B = "y"', 'B = "yz"  # here',
          ["support on joint 'B'", "unknown code 'yz'", "letters from 'xy'"], base=BASE_2D,
          item="B"),
    _toml("support-zero-vector", 'B = "yz"', 'B = [[0.0, 0.0, 0.0]]  # here',
          ["support on joint 'B'", "is zero", "give the direction held"], item="B"),
    _toml("support-empty-list", 'B = "yz"', "B = []  # here",
          ["support on joint 'B'", "direction vector needs 3 numbers"], item="B"),
    _json("support-unknown-code-json", '"B": "yz"', '"B": "roller"',
          ["support on joint 'B'", "unknown code 'roller'", "'pin'"], at='"roller"', item="B"),
    # the top level
    _toml("dimension-four", 'name = "bad input"', 'name = "bad input"\ndimension = 4  # here',
          ["dimension must be 2", "or 3", "not 4", "write dimension = 3 or dimension = 2"]),
    _toml("dimension-text", 'name = "bad input"', 'name = "bad input"\ndimension = "3"  # here',
          ["dimension must be 2", "not '3'"]),
    _json("dimension-float-json", '"name": "bad input",', '"name": "bad input",\n  "dimension": 3.5,',
          ["dimension must be 2", "not 3.5", 'write "dimension": 3'], at='"dimension"'),
    _toml("unit-unknown", 'name = "bad input"', 'name = "bad input"\nunits = "meters"  # here',
          ["unknown unit 'meters'", "one of m, mm, cm, ft, in", "results do not depend on it"]),
    _toml("unit-capital", 'name = "bad input"', 'name = "bad input"\nunits = "MM"  # here',
          ["unknown unit 'MM' (did you mean 'mm'?)"]),
    _toml("name-not-text", 'name = "bad input"', "name = 5  # here",
          ["name must be text in quotes", "got 5"]),
    _toml("joints-not-table", "[joints]\nA = [0.0, 0.0, 0.0]\nB = [4.0, 0.0, 0.0]\nC = [2.0, 0.0, 3.0]",
          "joints = [[0.0, 0.0, 0.0]]  # here",
          ["joints must be a table of id = [x, y, z]", "[joints]", "got list"]),
    _toml("supports-not-table", 'name = "bad input"', 'supports = "pin"  # here',
          ["supports must be a table", "[supports]", "got str"],
          base=BASE.replace('[supports]\nA = "pin"\nB = "yz"\n', "")),
    _toml("key-after-members-header", 'CA = ["C", "A"]', 'CA = ["C", "A"]\nunits = "mm"  # here',
          ["member 'units' must be a list of two joint ids",
           "move it above the first [section] header"], item="units"),
    _toml("empty-id", "C = [2.0, 0.0, 3.0]", 'C = [2.0, 0.0, 3.0]\n"" = [1.0, 1.0, 1.0]  # here',
          ["an empty id in [joints]", "give it one or delete the entry"], item=""),
    Case("no-joints", ".toml", 'name = "nothing yet"\nunits = "m"\n',
         ("the model has no joints", "a model needs [joints] (id = [x, y, z])",
          "[members] (id = [end, end])", "[supports]"), None),
    Case("empty-file", ".toml", "", ("the model has no joints", "a model needs [joints]"), None),
    Case("empty-joints", ".toml", 'name = "x"\n[joints]  # here\n[members]\n',
         ("the model has no joints",), 2),
    Case("empty-json", ".json", "{}", ("the model has no joints", '"joints" (id: [x, y, z])', '"members" (id: [end, end])'), None),
    Case("json-list", ".json", "[1, 2, 3]", ("the top level of a model must be an object",), 1),
    # syntax
    _toml("toml-syntax", "B = [4.0, 0.0, 0.0]", "B = [4.0, 0.0 0.0]  # here",
          ["not valid TOML", "unclosed array", "at column", "fix the syntax there"]),
    _toml("toml-unquoted-text", 'name = "bad input"', "name = bad input  # here",
          ["not valid TOML", "at column", "ids and text in quotes"]),
    Case("toml-unclosed-at-end", ".toml", BASE + 'BC = ["B", "C"',
         ("not valid TOML", "at the end of the file"), len((BASE + "x").splitlines())),
    Case("json-in-toml-file", ".toml", SAMPLE_JSON, ("not valid TOML", "looks like JSON",
                                                     "name the file .json"), 1),
    _json("json-syntax", '"AB": ["A", "B"],', '"AB": ["A", "B"],,', ["not valid JSON",
          "at column", "fix the syntax there"], at='"AB"'),
    Case("json-trailing-comma", ".json", variant(BASE_JSON, '"B": "yz"', '"B": "yz",'),
         ("not valid JSON", "none after the last"), line_of(BASE_JSON, '"B": "yz"') + 1),
    Case("toml-in-json-file", ".json", SAMPLE, ("not valid JSON", "looks like TOML",
                                                "name the file .toml"), 1),
    Case("not-utf8", ".toml", b'name = "caf\xe9"\n[joints]\n',
         ("is not UTF-8 text", "save it as UTF-8"), 1),
]

@dataclass(frozen=True)
class WarnCase:
    """One model that loads, with a warning that must say ``expect``."""

    name: str
    suffix: str
    text: str
    expect: tuple[str, ...]
    line: int | None
    n_members: int
    write = Case.write


WARNING_CASES = [
    WarnCase("key-misspelt", ".toml", variant(BASE, "[members]", "[member]  # here"),
             ("unknown key 'member'; did you mean 'members'?", "ignored"),
             line_of(variant(BASE, "[members]", "[member]  # here"), HERE), 0),
    WarnCase("key-unknown", ".toml", "colour = \"red\"  # here\n" + BASE,
             ("unknown key 'colour' is ignored", "the keys of a model are name, units"), 1, 3),
    WarnCase("key-misspelt-json", ".json", variant(BASE_JSON, '"supports"', '"suports"'),
             ("unknown key 'suports'; did you mean 'supports'?",),
             line_of(BASE_JSON, '"supports"'), 3),
    WarnCase("member-repeated-reversed", ".toml",
             variant(BASE, 'CA = ["C", "A"]', 'CA = ["C", "A"]\nBA = ["B", "A"]  # here'),
             ("member 'BA' (line 10) repeats member 'AB' (line 7)", "between joints 'A' and 'B'",
              "two bars between the same pins act as one bar", "counted once",
              "delete the repeats"), 10, 3),
    WarnCase("member-repeated-json", ".json",
             variant(BASE_JSON, '"CA": ["C", "A"]', '"CA": ["C", "A"],\n    "CA2": ["C", "A"]'),
             ("member 'CA2' (line 12) repeats member 'CA' (line 11)", "counted once"), 12, 3),
    WarnCase("support-letter-repeated", ".toml", variant(BASE, 'B = "yz"', 'B = "yzz"  # here'),
             ("support on joint 'B'", "repeated", "held once"), 12, 3),
    WarnCase("support-directions-dependent", ".toml",
             variant(BASE, 'B = "yz"', "B = [[0.0, 1.0, 0.0], [0.0, -2.0, 0.0]]  # here"),
             ("support on joint 'B'", "2 directions given but only 1 are independent",
              "ignored"), 12, 3),
]


# ----------------------------------------------------------------- good input

def test_sample_loads_as_written(tmp_path):
    path = tmp_path / "platform.toml"
    path.write_text(SAMPLE, encoding="utf-8")
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        frame = spaceframe.load(path)
    assert frame.joint_ids == ("A", "B", "C")
    assert frame.member_ids == ("AB", "BC", "CA")
    assert (frame.n_joints, frame.n_members, frame.n_restraints) == (3, 3, 5)
    assert frame.name == "Plant platform, south bay" and frame.units == "m"
    assert frame.dimension == 3 and frame.source == str(path)
    np.testing.assert_array_equal(frame.coords, [[0, 0, 0], [4, 0, 0], [2, 0, 3]])
    np.testing.assert_array_equal(frame.ends, [[0, 1], [1, 2], [2, 0]])
    np.testing.assert_array_equal(frame.restraint_joint, [0, 0, 0, 1, 1])
    np.testing.assert_array_equal(frame.restraint_dir, [[1, 0, 0], [0, 1, 0], [0, 0, 1],
                                                        [0, 1, 0], [0, 0, 1]])


def same_frame(a: Frame, b: Frame) -> None:
    assert a.joint_ids == b.joint_ids and a.member_ids == b.member_ids
    assert (a.dimension, a.name, a.units) == (b.dimension, b.name, b.units)
    np.testing.assert_array_equal(a.coords, b.coords)
    np.testing.assert_array_equal(a.ends, b.ends)
    np.testing.assert_array_equal(a.restraint_joint, b.restraint_joint)
    np.testing.assert_allclose(a.restraint_dir, b.restraint_dir, rtol=0, atol=1e-15)


def test_json_gives_the_same_frame(tmp_path):
    (tmp_path / "p.toml").write_text(SAMPLE, encoding="utf-8")
    (tmp_path / "p.json").write_text(SAMPLE_JSON, encoding="utf-8")
    same_frame(spaceframe.load(tmp_path / "p.toml"), spaceframe.load(tmp_path / "p.json"))


def test_suffix_is_read_in_any_case(tmp_path):
    (tmp_path / "P.TOML").write_text(SAMPLE, encoding="utf-8")
    assert spaceframe.load(tmp_path / "P.TOML").n_members == 3


def test_defaults(tmp_path):
    path = tmp_path / "gable_truss.toml"
    path.write_text(BASE.replace('name = "bad input"\n', ""), encoding="utf-8")
    frame = spaceframe.load(path)
    assert (frame.name, frame.units, frame.dimension) == ("gable_truss", "m", 3)


def test_plane_frame(tmp_path):
    path = tmp_path / "plane.toml"
    path.write_text(BASE_2D, encoding="utf-8")
    frame = spaceframe.load(path)
    assert frame.dimension == 2 and frame.coords.shape == (3, 2)
    np.testing.assert_array_equal(frame.restraint_dir, [[1, 0], [0, 1], [0, 1]])
    np.testing.assert_array_equal(frame.restraint_joint, [0, 0, 1])


def test_inclined_roller_is_normalised(tmp_path):
    path = tmp_path / "roller.toml"
    path.write_text(variant(BASE, 'B = "yz"', "B = [[0.0, 3.0, 4.0], [0, 0, -2]]"),
                    encoding="utf-8")
    frame = spaceframe.load(path)
    rows = frame.restraint_dir[frame.restraint_joint == 1]
    np.testing.assert_allclose(rows, [[0.0, 0.6, 0.8], [0.0, 0.0, -1.0]], rtol=0, atol=1e-15)
    np.testing.assert_allclose(np.linalg.norm(frame.restraint_dir, axis=1), 1.0, atol=1e-15)


def test_joint_without_members_is_not_an_error(tmp_path):
    path = tmp_path / "loose.toml"
    path.write_text(variant(BASE, "C = [2.0, 0.0, 3.0]", "C = [2.0, 0.0, 3.0]\nD = [9.0, 9.0, 9.0]"),
                    encoding="utf-8")
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        frame = spaceframe.load(path)
    assert frame.n_joints == 4 and frame.n_members == 3


def test_no_members_and_no_supports_load(tmp_path):
    path = tmp_path / "points.toml"
    path.write_text("[joints]\nA = [0, 0, 0]\nB = [1, 0, 0]\n", encoding="utf-8")
    frame = spaceframe.load(path)
    assert (frame.n_joints, frame.n_members, frame.n_restraints) == (2, 0, 0)
    assert frame.ends.shape == (0, 2) and frame.restraint_dir.shape == (0, 3)


def test_reserved_keys_are_accepted_silently(tmp_path):
    path = tmp_path / "later.toml"
    path.write_text('notes = "checked on site"\n' + BASE
                    + "[groups]\nchords = [\"AB\"]\n[properties]\n[loads]\nC = [0, 0, -10]\n",
                    encoding="utf-8")
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        assert spaceframe.load(path).n_members == 3


def test_quoted_and_odd_ids(tmp_path):
    text = ('[joints]\n"north gable" = [0, 0, 0]\n\'B"1\' = [4, 0, 0]\n3 = [2, 0, 3]\n'
            '[members]\n"ridge/1" = ["north gable", \'B"1\']\n'
            'x = [\'B"1\', "3"]\ny = ["3", "north gable"]\n[supports]\n"north gable" = "pin"\n')
    path = tmp_path / "ids.toml"
    path.write_text(text, encoding="utf-8")
    frame = spaceframe.load(path)
    assert frame.joint_ids == ("north gable", 'B"1', "3")
    assert frame.member_ids == ("ridge/1", "x", "y")
    np.testing.assert_array_equal(frame.ends, [[0, 1], [1, 2], [2, 0]])


# ------------------------------------------------------------------ writing

ODD = Frame.from_arrays(
    [[0.1, 0.2, 0.3], [1e-7, 4.0, -2.5], [1 / 3, 2 / 3, 7.0], [5.0, 5.0, 5.0]],
    [[0, 1], [1, 2], [2, 0], [3, 0], [3, 1]],
    joint_ids=["A", "b c", 'q"uote', "tab\there"],
    member_ids=["1", "two words", "back\\slash", "ü", "x=y"],
    supports={0: "pin", 1: "xz", 3: [[0.0, 3.0, 4.0]]}, name='Odd "ids" frame', units="mm")


@pytest.mark.parametrize("suffix, dump", [(".toml", native.dump_toml), (".json", native.dump_json)])
def test_round_trip(tmp_path, suffix, dump):
    first = tmp_path / f"first{suffix}"
    dump(ODD, first)
    again = spaceframe.load(first)
    same_frame(ODD, again)
    second = tmp_path / f"second{suffix}"
    dump(again, second)
    assert first.read_bytes() == second.read_bytes()      # deterministic


@pytest.mark.parametrize("dump", [native.dump_toml, native.dump_json])
def test_sample_round_trip_both_formats(tmp_path, dump):
    (tmp_path / "p.toml").write_text(SAMPLE, encoding="utf-8")
    frame = spaceframe.load(tmp_path / "p.toml")
    out = tmp_path / ("out.toml" if dump is native.dump_toml else "out.json")
    dump(frame, out)
    same_frame(frame, spaceframe.load(out))


def test_plane_frame_round_trip(tmp_path):
    (tmp_path / "plane.toml").write_text(BASE_2D, encoding="utf-8")
    frame = spaceframe.load(tmp_path / "plane.toml")
    native.dump_json(frame, tmp_path / "plane.json")
    same_frame(frame, spaceframe.load(tmp_path / "plane.json"))


@pytest.mark.parametrize("dump", [native.dump_toml, native.dump_json])
def test_dump_refuses_the_source_file(tmp_path, dump):
    path = tmp_path / ("model.toml" if dump is native.dump_toml else "model.json")
    path.write_text(SAMPLE if dump is native.dump_toml else SAMPLE_JSON, encoding="utf-8")
    before = path.read_bytes()
    frame = spaceframe.load(path)
    for overwrite in (False, True):
        with pytest.raises(ModelError, match="read from and is never overwritten"):
            dump(frame, path, overwrite=overwrite)
    assert path.read_bytes() == before


def test_dump_refuses_an_existing_file_unless_asked(tmp_path):
    path = tmp_path / "mine.toml"
    path.write_text("# my notes\n", encoding="utf-8")
    with pytest.raises(ModelError, match="already exists.*overwrite=True") as info:
        native.dump_toml(ODD, path)
    assert str(path) in str(info.value)
    assert path.read_text(encoding="utf-8") == "# my notes\n"
    native.dump_toml(ODD, path, overwrite=True)
    same_frame(ODD, spaceframe.load(path))
    assert not [p for p in os.listdir(tmp_path) if p.endswith(".tmp")]


# --------------------------------------------------------------- bad input

@pytest.mark.parametrize("case", ERROR_CASES, ids=lambda c: c.name)
def test_bad_input_is_named(tmp_path, case):
    path = case.write(tmp_path)
    with pytest.raises(ModelError) as info:
        spaceframe.load(path)
    message = str(info.value)
    prefix = f"{path}:{case.line}: " if case.line is not None else f"{path}: "
    assert message.startswith(prefix), message
    assert info.value.line == case.line
    for piece in case.expect:
        assert piece in message, f"{piece!r} not in {message!r}"
    if case.item is not None:
        assert info.value.item == case.item


def test_error_registry_covers_each_case_once():
    names = [c.name for c in ERROR_CASES]
    assert len(names) == len(set(names))


@pytest.mark.parametrize("case", WARNING_CASES, ids=lambda c: c.name)
def test_warning_is_named(tmp_path, case):
    path = case.write(tmp_path)
    with pytest.warns(SpaceframeWarning) as record:
        frame = spaceframe.load(path)
    messages = [str(w.message) for w in record if issubclass(w.category, SpaceframeWarning)]
    assert len(messages) == 1, messages
    prefix = f"{path}:{case.line}: " if case.line is not None else f"{path}: "
    assert messages[0].startswith(prefix), messages[0]
    for piece in case.expect:
        assert piece in messages[0], f"{piece!r} not in {messages[0]!r}"
    assert frame.n_members == case.n_members


def test_repeated_member_keeps_the_first(tmp_path):
    path = tmp_path / "twice.toml"
    path.write_text(variant(BASE, 'CA = ["C", "A"]', 'CA = ["C", "A"]\nBA = ["B", "A"]\nAC = ["A", "C"]'),
                    encoding="utf-8")
    with pytest.warns(SpaceframeWarning, match="'BA'.*'AB'.*'AC'.*'CA'"):
        frame = spaceframe.load(path)
    assert frame.member_ids == ("AB", "BC", "CA")
    np.testing.assert_array_equal(frame.ends, [[0, 1], [1, 2], [2, 0]])


def test_missing_file(tmp_path):
    path = tmp_path / "nowhere.toml"
    with pytest.raises(ModelError, match="no such file; check the path") as info:
        spaceframe.load(path)
    assert str(info.value).startswith(f"{path}: ")


def test_directory(tmp_path):
    with pytest.raises(ModelError, match=r"is a directory.*give the path of a \.csv, .*\.json, "
                                         r".*\.stl, \.svg or \.toml model file") as info:
        spaceframe.load(tmp_path)
    assert str(tmp_path) in str(info.value)


@pytest.mark.parametrize("name", ["model.txt", "model"])
def test_unknown_suffix(tmp_path, name):
    path = tmp_path / name
    path.write_text(SAMPLE, encoding="utf-8")
    with pytest.raises(ModelError, match=r"spaceframe reads \.csv, .*\.json, .*\.svg or \.toml "
                                         r"model files") as info:
        spaceframe.load(path)
    assert str(info.value).startswith(f"{path}: ")


def test_document_without_a_file():
    doc = json.loads(SAMPLE_JSON)
    doc["members"]["AB"] = ["A", "Z"]
    with pytest.raises(ModelError, match="^member 'AB' names joint 'Z'"):
        native.frame_from_document(doc)


def test_valid_model_finds_no_lines(tmp_path, monkeypatch):
    """The success path never searches the text: line finding is for messages only."""
    def refuse(*args):
        raise AssertionError("a line was searched for on the success path")
    monkeypatch.setattr(native, "toml_line", refuse)
    monkeypatch.setattr(native, "json_line", refuse)
    for name, text in (("p.toml", SAMPLE), ("p.json", SAMPLE_JSON)):
        (tmp_path / name).write_text(text, encoding="utf-8")
        assert spaceframe.load(tmp_path / name).n_members == 3
