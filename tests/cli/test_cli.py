"""The audit command's contract: exit codes, JSON keys, stdout holding only JSON."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from click.testing import CliRunner

from spaceframe.cli import main

from common.model_files import SAMPLE

MODELS = Path(__file__).resolve().parents[2] / "models"

KEYS = {"dimension", "joints", "members", "restraints", "maxwell", "rank", "mechanisms",
        "rigid_body_modes", "internal_mechanisms", "self_stress_states", "stable", "rigid",
        "mechanism_modes", "self_stress_modes"}

# the documented sample model (the triangle of the format description), from test_io
TRIANGLE = SAMPLE


def run(*args):
    return CliRunner().invoke(main, list(args))


def test_sample_from_the_issue_loads_and_audits(write):
    """The triangle of the model-format sample: held at A (pin) and B (y, z), it can
    still turn about the line AB: one rigid-body mode, C moving along y (derived)."""
    path = write("triangle.toml", TRIANGLE)
    res = run("audit", str(path), "--json")
    assert res.exit_code == 1
    doc = json.loads(res.stdout)
    assert KEYS <= set(doc)
    assert (doc["joints"], doc["members"], doc["restraints"], doc["maxwell"]) == (3, 3, 5, -1)
    assert (doc["mechanisms"], doc["rigid_body_modes"], doc["internal_mechanisms"]) == (1, 1, 0)
    assert doc["stable"] is False and doc["rigid"] is True
    (mode,) = doc["mechanism_modes"]
    assert set(mode["displacements"]) == {"C"}
    assert mode["displacements"]["C"] == [0.0, pytest.approx(1.0), 0.0] or \
        mode["displacements"]["C"] == [0.0, pytest.approx(-1.0), 0.0]


# extrusion specs, support sidecars and batch variants are TOML too, but not models
DEMO_MODELS = sorted(p for p in MODELS.glob("*.toml")
                     if not p.name.endswith((".spec.toml", ".supports.toml", ".variants.toml")))


@pytest.mark.parametrize("model", DEMO_MODELS, ids=lambda p: p.name)
def test_demo_models_exit_codes_and_json(model):
    res = run("audit", str(model), "--json")
    assert res.exit_code in (0, 1), res.output
    doc = json.loads(res.stdout)  # stdout holds only the document
    assert KEYS <= set(doc)
    assert res.exit_code == (0 if doc["stable"] else 1)
    assert doc["mechanisms"] - doc["self_stress_states"] == \
        doc["dimension"] * doc["joints"] - doc["restraints"] - doc["members"]
    assert len(doc["mechanism_modes"]) == doc["mechanisms"]
    text = run("audit", str(model))
    assert text.exit_code == res.exit_code
    assert "Verdict:" in text.stdout and "competent engineer" in text.stdout


def test_json_is_deterministic():
    model = str(MODELS / "canopy_sway.toml")
    assert run("audit", model, "--json").stdout == run("audit", model, "--json").stdout


def test_self_stress_cap_is_stated(write):
    """A braced square with both diagonals, doubled side by side, has two states; a cap
    of one lists one and says so."""
    path = write("panels.toml", """dimension = 2
[joints]
a = [0, 0]
b = [2, 0]
c = [2, 2]
d = [0, 2]
e = [4, 0]
f = [4, 2]
[members]
ab = ["a", "b"]
bc = ["b", "c"]
cd = ["c", "d"]
da = ["d", "a"]
ac = ["a", "c"]
bd = ["b", "d"]
be = ["b", "e"]
ef = ["e", "f"]
fc = ["f", "c"]
bf = ["b", "f"]
ce = ["c", "e"]
[supports]
a = "pin"
e = "y"
""")
    doc = json.loads(run("audit", str(path), "--json", "--self-stress", "1").stdout)
    assert doc["self_stress_states"] == 2
    assert len(doc["self_stress_modes"]) == 1
    text = run("audit", str(path), "--self-stress", "1").stdout
    assert "2 states of self-stress: the first 1 are listed (--self-stress N or all computes " \
           "more)" in text
    assert doc["self_stress_modes_complete"] is False
    full = json.loads(run("audit", str(path), "--json", "--self-stress", "all").stdout)
    assert len(full["self_stress_modes"]) == 2 and full["self_stress_modes_complete"]


def test_bad_option_values_exit_2(write):
    path = write("t.toml", TRIANGLE)
    for args in (["--self-stress", "lots"], ["--method", "magic"]):
        res = run("audit", str(path), *args)
        assert res.exit_code == 2
        assert "Traceback" not in res.output
