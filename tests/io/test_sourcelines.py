"""The one source-line finder (spaceframe/io/sourcelines.py) for every reader, and the
file-free errors of spaceframe/validation.py that the readers give a file and line.

Expected lines are counted in the test texts by ``line_of`` (the line holding a
piece of text), independently of the finder.
"""

from __future__ import annotations

import ast
import dataclasses
import inspect
import tomllib
import warnings

import numpy as np
import pytest

import spaceframe
import spaceframe.validation
from spaceframe import Frame, ModelError, SpaceframeWarning
from spaceframe.errors import OutputExistsError
from spaceframe.batch import read_variants
from spaceframe.extrude import read_spec
from spaceframe.io.sourcelines import SourceLines, checked, locate
from spaceframe.selection import read_sidecar
from spaceframe.validation import check_frame

from common.model_files import BASE, SAMPLE, SAMPLE_JSON, line_of, variant

TAGGED = SAMPLE + """
[tags.members.role]
chord = ["AB"]
web = ["BC", "CA"]

[properties.members.EA]
default = 2.0e5
AB = 1.0e5
"""

SPEC = """\
frames = 4
spacing = 5.0

[ties]
purlin = ["U1"]

[[support]]
at = "L0"
out_of_plane = "held"

[[support]]
at = "L6"
frames = "ends"
out_of_plane = "free"
"""

VARIANTS = """\
base = true

[generate]
each_member_removed = true

[[variant]]
name = "one"
remove_members = ["AB"]

[[variant]]
name = "two"
free_supports = ["A"]
"""

SIDECAR = """\
# rules for the imported dome
supports = [
  "pin at z = min",
  "y at x = 0 within 10",
]
"""


# ------------------------------------------------------------ one finder, five readers

def test_model_toml_lines():
    lines = SourceLines(TAGGED, "toml")
    assert lines.item("joint", "B") == line_of(TAGGED, "B = [4.0")
    assert lines.item("member", "CA") == line_of(TAGGED, 'CA = ["C", "A"]')
    assert lines.item("support", "B") == line_of(TAGGED, 'B = "yz"')
    assert lines.item("key", "units") == 2
    assert lines.item("key", "joints") == line_of(TAGGED, "[joints]")   # a section by its name
    assert lines.item("joint", "Z") is None and lines.item("support", "C") is None
    assert lines.near(("tags", "members", "role"), "web") == line_of(TAGGED, "web = ")
    assert lines.near(("properties", "members", "EA"), "AB") == line_of(TAGGED, "AB = 1.0e5")
    assert lines.near(("tags", "members", "role"), "none") == line_of(TAGGED, "[tags.members")
    # the public finder of the format is the same one
    assert spaceframe.io.native.toml_line(TAGGED, "member", "BC") == lines.item("member", "BC")


def test_model_json_lines():
    lines = SourceLines(SAMPLE_JSON, "json")
    assert lines.item("joint", "C") == line_of(SAMPLE_JSON, '"C": [2.0')
    # "B" is a joint, a member end and a support: the support is the one after "supports"
    assert lines.item("support", "B") == line_of(SAMPLE_JSON, '"B": "yz"')
    assert lines.item("key", "dimension") == line_of(SAMPLE_JSON, '"dimension"')
    assert lines.item("member", "ZZ") is None
    assert lines.every(("joints",), "A") == [line_of(SAMPLE_JSON, '"A": [0.0'),
                                             line_of(SAMPLE_JSON, '"A": "pin"')]


def test_model_reader_errors_name_the_finders_line(tmp_path):
    """A check in validation (a zero-length member) gets the line of the member, both syntaxes."""
    toml = variant(BASE, 'BC = ["B", "C"]', 'BC = ["B", "B"]')
    path = tmp_path / "loop.toml"
    path.write_text(toml, encoding="utf-8")
    with pytest.raises(ModelError) as info:
        spaceframe.load(path)
    err = info.value
    assert (err.path, err.line, err.item, err.kind) == (str(path), line_of(toml, 'BC = '), "BC",
                                                        "member")
    assert str(err).startswith(f"{path}:{err.line}: member 'BC' has both ends at joint 'B'")


def test_spec_lines(tmp_path):
    path = tmp_path / "bays.spec.toml"
    path.write_text(SPEC, encoding="utf-8")
    spec = read_spec(path)
    second = line_of(SPEC, "[[support]]", 2)
    assert spec.line("support", "out_of_plane", 2) == line_of(SPEC, 'out_of_plane = "free"')
    assert spec.line("support", "out_of_plane", 1) == line_of(SPEC, 'out_of_plane = "held"')
    assert spec.line("support", None, 2) == second
    assert spec.line("support", "plane", 2) == second          # not given: the table's header
    assert spec.line("ties", "purlin") == line_of(SPEC, "purlin = ")
    assert spec.line(None, "spacing") == 2
    assert spec.support_rules[1]["line"] == line_of(SPEC, 'at = "L6"')
    bad = tmp_path / "bad.spec.toml"
    bad.write_text(SPEC.replace('frames = "ends"', 'frames = [9]'), encoding="utf-8")
    with pytest.raises(ModelError, match="frame 9 does not exist") as info:
        read_spec(bad)
    assert info.value.line == line_of(SPEC, 'frames = "ends"')


def test_variants_lines(tmp_path):
    path = tmp_path / "v.variants.toml"
    path.write_text(VARIANTS, encoding="utf-8")
    read = read_variants(path)
    assert [v.line for v in read.variants] == [line_of(VARIANTS, "[[variant]]", 1),
                                               line_of(VARIANTS, "[[variant]]", 2)]
    assert read.lines["each_member_removed"] == line_of(VARIANTS, "each_member_removed")
    # an unknown key in the second variant is named at its own line, not the first variant's
    bad = tmp_path / "bad.variants.toml"
    text = VARIANTS + 'remove_member = ["AB"]\n'
    bad.write_text(text, encoding="utf-8")
    with pytest.raises(ModelError, match="unknown key 'remove_member' in variant 'two'; did "
                                         "you mean 'remove_members'") as info:
        read_variants(bad)
    assert info.value.line == len(text.splitlines())


def test_sidecar_lines(tmp_path):
    path = tmp_path / "dome.supports.toml"
    path.write_text(SIDECAR, encoding="utf-8")
    rules, lines = read_sidecar(path)
    assert rules == tomllib.loads(SIDECAR)["supports"]
    assert lines == [line_of(SIDECAR, "pin at z"), line_of(SIDECAR, "y at x")]


# ------------------------------------------------- validation knows no file

def _loop_frame(source=None):
    return Frame.from_arrays([[0, 0], [1, 0], [0, 1]], [[0, 1], [1, 1], [2, 0]],
                             joint_ids=["A", "B", "C"], member_ids=["AB", "BB", "CA"],
                             source=source)


def test_validation_errors_carry_item_and_kind_without_a_path():
    with pytest.raises(ModelError) as info:
        check_frame(_loop_frame(source="somewhere/model.toml"))
    err = info.value
    assert (err.item, err.kind, err.path, err.line) == ("BB", "member", None, None)
    assert "somewhere" not in str(err) and str(err).startswith("member 'BB' has both ends")


def test_coincident_joints_mark_where_the_other_line_goes():
    frame = Frame.from_arrays([[0, 0], [1, 0], [0, 1], [1e-12, 0]], [[0, 1], [1, 2], [2, 3]],
                              joint_ids=["A", "B", "C", "D"])
    with pytest.raises(ModelError) as info:
        check_frame(frame)
    err = info.value
    assert (err.item, err.kind, err.path) == ("D", "joint", None)
    (offset, kind, item), = err.marks
    assert (kind, item) == ("joint", "A") and err.reason[:offset] == "joints 'A'"
    lines = {("joint", "A"): 3, ("joint", "D"): 7}
    placed = locate(err, "m.toml", lambda k, i: lines.get((k, i)))
    assert str(placed).startswith("m.toml:7: joints 'A' (line 3) and 'D' are ")
    assert (placed.item, placed.kind) == ("D", "joint")


def test_repeated_members_warning_carries_the_item_and_the_reader_adds_lines():
    frame = Frame.from_arrays([[0, 0], [1, 0], [0, 1]], [[0, 1], [1, 2], [2, 0], [1, 0]],
                              joint_ids=["A", "B", "C"], member_ids=["AB", "BC", "CA", "BA"],
                              source="somewhere/model.toml")
    with pytest.warns(SpaceframeWarning) as caught:
        check_frame(frame)
    w = caught[0].message
    assert (w.item, w.kind) == ("BA", "member") and "somewhere" not in str(w)
    assert str(w).startswith("member 'BA' repeats member 'AB' between joints 'A' and 'B'")
    lines = dataclass_lines(frame, {("member", "AB"): 7, ("member", "BA"): 10})
    with pytest.warns(SpaceframeWarning) as caught:
        out = checked(lines)
    assert out.member_ids == ("AB", "BC", "CA")
    assert str(caught[0].message).startswith(
        "somewhere/model.toml:10: member 'BA' (line 10) repeats member 'AB' (line 7)")


def dataclass_lines(frame: Frame, lines: dict) -> Frame:
    return dataclasses.replace(frame, lines=lines)


def test_checked_adds_the_file_and_the_frames_own_lines():
    frame = dataclass_lines(_loop_frame(source="pair.joints.csv"), {("member", "BB"): 4})
    with pytest.raises(ModelError) as info:
        checked(frame)
    assert (info.value.path, info.value.line, info.value.item) == ("pair.joints.csv", 4, "BB")
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        ok = Frame.from_arrays(np.eye(2), [[0, 1]])
        assert checked(ok) is ok


def test_validation_imports_nothing_from_io():
    """One-way imports: io calls validation, never the reverse."""
    tree = ast.parse(inspect.getsource(spaceframe.validation))
    modules = [node.module or "" for node in ast.walk(tree) if isinstance(node, ast.ImportFrom)]
    modules += [a.name for node in ast.walk(tree) if isinstance(node, ast.Import)
                for a in node.names]
    assert modules and not [m for m in modules if m == "io" or m.startswith(("io.", "spaceframe.io"))]


def test_save_names_no_command_line_flag(tmp_path):
    """The library says how in its own terms; the command line adds --force."""
    out = tmp_path / "out.toml"
    out.write_text("# mine\n", encoding="utf-8")
    frame = Frame.from_arrays(np.eye(2), [[0, 1]])
    with pytest.raises(OutputExistsError) as info:
        spaceframe.io.save(frame, out)
    assert "allow replacing it" in str(info.value) and "--" not in str(info.value)
    assert out.read_text(encoding="utf-8") == "# mine\n"
