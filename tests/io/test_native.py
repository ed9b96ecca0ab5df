"""Reading and writing the native model format, and every message for bad input.

The files are the registry of ``common/model_files.py``.
"""

from __future__ import annotations

import json
import os
import warnings

import numpy as np
import pytest

import spaceframe
from spaceframe import Frame, ModelError, SpaceframeWarning
from spaceframe.io import native

from common.model_files import (BASE, BASE_2D, ERROR_CASES, SAMPLE, SAMPLE_JSON, WARNING_CASES,
                                variant)

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
                    + "[groups]\nchords = [\"AB\"]\n[properties]\n",
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
    from spaceframe.io.sourcelines import SourceLines

    monkeypatch.setattr(SourceLines, "_toml", refuse)
    monkeypatch.setattr(SourceLines, "_json_matches", refuse)
    for name, text in (("p.toml", SAMPLE), ("p.json", SAMPLE_JSON)):
        (tmp_path / name).write_text(text, encoding="utf-8")
        assert spaceframe.load(tmp_path / name).n_members == 3
