"""Every bad model file, run through ``spaceframe audit``: exit 2, our message, no traceback.

The files are the registry of ``test_io.py``; here they go through the command
line in-process, so what a user sees at the terminal is what is checked.
"""

from __future__ import annotations

import pytest
from click.testing import CliRunner

from spaceframe.cli import main

from common.model_files import ERROR_CASES, SAMPLE


def run(*args):
    return CliRunner().invoke(main, ["audit", *map(str, args)])


def check_refused(result, path, line, pieces):
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output
    prefix = f"{path}:{line}: " if line is not None else f"{path}: "
    assert prefix in result.output, result.output
    for piece in pieces:
        assert piece in result.output, f"{piece!r} not in {result.output!r}"


@pytest.mark.parametrize("case", ERROR_CASES, ids=lambda c: c.name)
def test_bad_model_exits_2_with_its_message(tmp_path, case):
    path = case.write(tmp_path)
    check_refused(run(path), path, case.line, case.expect)


def test_missing_file_exits_2(tmp_path):
    path = tmp_path / "nowhere.toml"
    check_refused(run(path), path, None, ["no such file; check the path"])


def test_directory_exits_2(tmp_path):
    check_refused(run(tmp_path), tmp_path, None, ["is a directory"])


def test_unknown_suffix_exits_2(tmp_path):
    path = tmp_path / "model.txt"
    path.write_text(SAMPLE, encoding="utf-8")
    check_refused(run(path), path, None, [".json, .npz, .obj, .off, .ply, .stl, .svg or .toml model files"])
