"""``spaceframe restraints`` and ``audit --continuous-chords``: exit codes, JSON, bad input."""

from __future__ import annotations

import json
from pathlib import Path

from click.testing import CliRunner

from spaceframe.cli import main

MODELS = Path(__file__).resolve().parents[2] / "models"
BRACED, UNBRACED = str(MODELS / "hall_roof_braced.toml"), str(MODELS / "hall_roof_unbraced.toml")


def run(*args):
    return CliRunner().invoke(main, list(args))


def test_json_of_the_braced_hall_bottom_chords_under_uplift():
    """Ties at L1..L5 into the braced ceiling of the end bays: every bottom-chord joint is a
    restraint point, so the lengths are the 2.0 m panels (the model's spec, derived); the
    uplift case compresses the bottom chords."""
    res = run("restraints", BRACED, "--chords", "role=chord", "--case", "uplift", "--json")
    assert res.exit_code == 0, res.output
    doc = json.loads(res.output)
    assert doc["held_pin_jointed"] and doc["held_with_continuous_chords"]
    assert doc["units"] == "m" and doc["cases"] == ["uplift"]
    bottom = next(c for c in doc["chords"] if c["joints"][0] == "F3.L0" and
                  c["joints"][-1] == "F3.L6")
    assert bottom["restrained"]["out_of_plane"] == [f"F3.L{i}" for i in range(7)]
    assert bottom["lengths"]["out_of_plane"] == [2.0] * 6
    assert bottom["compression"]["uplift"] > 0
    top = next(c for c in doc["chords"] if c["joints"] == ["F3.L0", "F3.U1", "F3.U2", "F3.U3"])
    assert top["compression"]["uplift"] == 0
    assert doc["restraint_forces"] is None and "competent engineer" in doc["caution"]


def test_text_and_exit_status_of_the_unbraced_hall():
    res = run("restraints", UNBRACED, "--chords", "role=chord")
    assert res.exit_code == 1, res.output
    assert "NOT HELD, EVEN WITH CONTINUOUS CHORDS" in res.output
    assert "12.00 m out of plane" in res.output          # the whole 12 m span: bearings free
    assert "competent engineer" in res.output


def test_restraint_forces_json_and_text():
    res = run("restraints", BRACED, "--chords", "role=chord", "--case", "uplift",
              "--fraction", "0.025", "--json")
    assert res.exit_code == 0, res.output
    rf = json.loads(res.output)["restraint_forces"]
    assert rf["fraction"] == 0.025 and rf["carried"] is True
    # every applied force is along +y (the trusses' normal) and the reactions balance them
    applied = list(rf["applied"].values())
    assert applied and all(v[0] == 0 and v[1] > 0 and v[2] == 0 for v in applied)
    total = sum(v[1] for v in applied)
    assert abs(total + sum(r[1] for r in rf["reactions"].values())) < 1e-5 * total
    text = run("restraints", BRACED, "--chords", "role=chord", "--case", "uplift",
               "--fraction", "0.025").output
    assert "Restraint forces: 2.5 %" in text and "ties and braces" in text


def test_output_is_deterministic():
    a = run("restraints", BRACED, "--fraction", "0.02", "--json").output
    assert a == run("restraints", BRACED, "--fraction", "0.02", "--json").output


def test_bad_input_exit_2():
    res = run("restraints", BRACED, "--chords", "rol=chord")
    assert res.exit_code == 2 and "did you mean 'role'" in res.output
    assert "Traceback" not in res.output
    res = run("restraints", BRACED, "--chords", "role=cord")
    assert res.exit_code == 2 and "did you mean 'chord'" in res.output
    for bad in ("0", "1", "1.5", "-0.02"):
        res = run("restraints", BRACED, "--fraction", bad)
        assert res.exit_code == 2 and "between 0 and 1" in res.output, bad
    res = run("restraints", UNBRACED, "--fraction", "0.02")
    assert res.exit_code == 2 and "load cases" in res.output
    res = run("restraints", BRACED, "--case", "uplfit")
    assert res.exit_code == 2 and "uplift" in res.output
    res = run("audit", BRACED, "--chords", "role=chord")
    assert res.exit_code == 2 and "--continuous-chords" in res.output


def test_audit_continuous_chords():
    res = run("audit", UNBRACED, "--continuous-chords", "--chords", "role=chord")
    assert res.exit_code == 1
    assert "Read with continuous chords" in res.output
    assert "NOT HELD, EVEN WITH CONTINUOUS CHORDS" in res.output
    res = run("audit", UNBRACED, "--continuous-chords", "--json")
    doc = json.loads(res.output)["continuous_chords"]
    assert doc["held_with_continuous_chords"] is False and doc["held_pin_jointed"] is False
    assert doc["longest"]["out_of_plane"]["length"] > 0 and doc["verdict"].startswith("NOT HELD")
