"""The library/CLI boundary: one output policy for every command that writes, and exit 3.

Every command that writes a file goes through ``spaceframe.io.output`` and
``cli.common.run_guarded``: an existing output is refused with the same words
and the command's own option to replace it, an input is never written over,
and a refused file is left byte for byte as it was.  An internal failure (the
sparse factorisation breaking down) exits 3 with the stage, what was computed
before it and how to report it.
"""

from __future__ import annotations

from pathlib import Path

import pytest
import scipy.sparse.linalg
from click.testing import CliRunner

from spaceframe import ModelError, audit, load
from spaceframe.batch import ResultsFile
from spaceframe.cli import main
from spaceframe.errors import InternalError, OutputExistsError
from spaceframe.io.output import check_output

from common.model_files import SAMPLE

MODELS = Path(__file__).resolve().parents[2] / "models"
TRUSS, SPEC = MODELS / "hall_truss.toml", MODELS / "hall_roof_braced.spec.toml"

EXISTS = "already exists and is not overwritten; choose another name, or allow replacing it"


def run(*args):
    return CliRunner().invoke(main, [str(a) for a in args])


@pytest.fixture
def sample(tmp_path):
    path = tmp_path / "platform.toml"
    path.write_text(SAMPLE, encoding="utf-8")
    return path


# Each writing command, with the name of its output in a folder and its input model.
WRITERS = {
    "animate": lambda m, out: ("animate", m, "-o", out / "motion.gif"),
    "report": lambda m, out: ("report", m, "-o", out / "page.html"),
    "brace --write": lambda m, out: ("brace", m, "--write", out / "braced.toml"),
    "brace --csv": lambda m, out: ("brace", m, "--csv", out / "braces.csv"),
    "convert": lambda m, out: ("convert", m, "-o", out / "copy.json"),
    "extrude": lambda m, out: ("extrude", TRUSS, SPEC, "-o", out / "roof.toml"),
    "batch": lambda m, out: ("batch", m, "-o", out / "rows.csv"),
}


def _output_of(args):
    return Path(args[args.index("-o") + 1] if "-o" in args else args[-1])


@pytest.mark.parametrize("command", sorted(WRITERS))
def test_every_writer_refuses_an_existing_output_with_one_message(tmp_path, sample, command):
    args = WRITERS[command](sample, tmp_path)
    out = _output_of(args)
    out.write_bytes(b"the user's own file\n")
    res = run(*args)
    assert res.exit_code == 2, res.output
    assert "Traceback" not in res.output
    assert f"spaceframe: error: {out}: {EXISTS}; " in res.stderr
    hint = ("give --resume to continue it, or --force to replace it" if command == "batch"
            else "give --force to replace it")
    assert res.stderr.rstrip().endswith(hint), res.stderr
    assert out.read_bytes() == b"the user's own file\n"


@pytest.mark.parametrize("command", sorted(WRITERS))
def test_every_writer_refuses_to_write_over_its_input(tmp_path, sample, command):
    """The output is a link to an input, under the output's own name, and --force is given."""
    args = list(WRITERS[command](sample, tmp_path))
    source = sample
    if command == "extrude":           # a copy, so that nothing can harm the demo file
        source = tmp_path / "spec.toml"
        source.write_text(SPEC.read_text(encoding="utf-8"), encoding="utf-8")
        args[2] = source
    _output_of(args).symlink_to(source)
    before = source.read_bytes()
    res = run(*args, "--force")
    assert res.exit_code == 2, res.output
    assert f"{_output_of(args)}: is an input of this command and is never overwritten; write " \
           f"to another file" in res.stderr
    assert source.read_bytes() == before


def test_force_replaces_a_report_whole(tmp_path, sample):
    out = tmp_path / "page.html"
    out.write_text("old", encoding="utf-8")
    assert run("report", sample, "-o", out, "--force").exit_code == 0
    assert out.read_text(encoding="utf-8").startswith("<!DOCTYPE html>")
    assert not [p for p in tmp_path.iterdir() if p.name.startswith(".spaceframe-")]


def test_library_messages_name_no_option(tmp_path):
    """The library says what to allow in its own terms; only the CLI names --force."""
    out = tmp_path / "rows.csv"
    out.write_text("", encoding="utf-8")
    for refuse in (lambda: check_output(out), lambda: ResultsFile(out)):
        with pytest.raises(OutputExistsError) as info:
            refuse()
        assert str(info.value) == f"{out}: {EXISTS}"
        assert "--" not in str(info.value)
    with pytest.raises(ModelError, match="a results file .* is written as .csv or .jsonl"):
        ResultsFile(tmp_path / "rows.txt")


def test_a_missing_folder_is_bad_input_not_a_fault(tmp_path, sample):
    res = run("report", sample, "-o", tmp_path / "no" / "page.html")
    assert res.exit_code == 2 and "does not exist; create it or write elsewhere" in res.stderr


# ----------------------------------------------------------------- exit status 3

def _broken_factorisation(*args, **kwargs):
    raise RuntimeError("Factor is exactly singular")


def test_factorisation_failure_exits_3_with_stage_and_partial_counts(sample, monkeypatch):
    # SuperLU fails on every shift the sparse engine tries (nullspace._shifted_ldl).
    monkeypatch.setattr(scipy.sparse.linalg, "splu", _broken_factorisation)
    res = run("audit", sample, "--method", "sparse")
    assert res.exit_code == 3, res.output
    assert "Traceback" not in res.output
    err = res.stderr
    assert err.startswith("spaceframe: internal error at the factorisation stage: the sparse "
                          "engine could not factorise")
    assert "not in your model" in err
    assert "rerun the same command with --debug" in err and "model file" in err
    # What was known before the failure, derived from the sample: 3 joints, 3 members;
    # A = "pin" holds 3 directions and B = "yz" 2, so 5 restraints; 3 x 3 - 5 = 4 free
    # coordinates; Maxwell's count 3 + 5 - 3 x 3 = -1; SuperLU tried at 4 shifts.
    assert ("Computed before the failure: joints 3, members 3, restraints 5, free coordinates 4, "
            "maxwell -1, shifts tried 4") in err


def test_factorisation_failure_carries_partial_results(sample, monkeypatch):
    monkeypatch.setattr(scipy.sparse.linalg, "splu", _broken_factorisation)
    with pytest.raises(InternalError) as info:
        audit(load(sample), method="sparse")
    exc = info.value
    assert not isinstance(exc, ValueError)        # not a SpaceframeError: not the user's input
    assert exc.stage == "factorisation"
    assert exc.partial == {"joints": 3, "members": 3, "restraints": 5, "free_coordinates": 4,
                           "maxwell": -1, "shifts_tried": 4}
    # --debug lets the same error through with its traceback
    res = CliRunner().invoke(main, ["audit", str(sample), "--method", "sparse", "--debug"])
    assert isinstance(res.exception, InternalError) and res.exception.partial == exc.partial


def test_the_dense_engine_is_untouched_by_the_broken_factorisation(sample, monkeypatch):
    monkeypatch.setattr(scipy.sparse.linalg, "splu", _broken_factorisation)
    # derived above: the triangle turns about AB (A pinned, B on a roller along x)
    assert run("audit", sample, "--method", "dense").exit_code == 1
