"""``spaceframe forces``: exit codes, JSON keys, CSV, and bad load input (exit 2, named)."""

from __future__ import annotations

import csv
import json
from pathlib import Path

import pytest
from click.testing import CliRunner

from spaceframe.cli import main

from common.model_files import BASE_2D, line_of

MODELS = Path(__file__).resolve().parents[2] / "models"

PORTAL = """\
name = "portal, no diagonal"
dimension = 2
force_units = "kN"
[joints]
A = [0.0, 0.0]
B = [0.0, 4.0]
C = [6.0, 4.0]
D = [6.0, 0.0]
[members]
AB = ["A", "B"]
BC = ["B", "C"]
CD = ["C", "D"]
[supports]
A = "pin"
D = "pin"
[loads.gravity]
B = [0.0, -5.0]
C = [0.0, -5.0]
[loads.wind]
B = [2.0, 0.0]
"""

LOADED = BASE_2D + """\
[loads.apex]
C = [0.0, -12.0]
[loads.uplift]
C = [0.0, 3.0]
[combinations.both]
apex = 1.35
uplift = 1.5
"""


def run(*args):
    return CliRunner().invoke(main, ["forces", *map(str, args)])


def test_portal_json_and_exit_codes(write):
    """The portal of tests/analysis/test_forces.py (derived there): gravity carried with
    the columns in compression, the horizontal load not carried: exit 1, no forces."""
    path = write("portal.toml", PORTAL)
    res = run(path, "--json")
    assert res.exit_code == 1, res.output
    doc = json.loads(res.stdout)
    assert {"force_units", "cases", "envelope", "caution"} <= set(doc)
    gravity, wind = doc["cases"]
    assert {"name", "carried", "member_forces", "reactions", "excited_mechanisms",
            "method"} <= set(gravity)
    assert gravity["carried"] and gravity["method"] == "equilibrium"
    assert gravity["member_forces"]["AB"] == pytest.approx(-5.0)
    assert gravity["member_forces"]["BC"] == 0.0
    assert sum(r[1] for r in gravity["reactions"].values()) == pytest.approx(10.0)
    assert not wind["carried"] and wind["member_forces"] is None
    assert wind["excited_mechanisms"][0]["kind"] == "sway"
    only = run(path, "--case", "gravity", "--json")
    assert only.exit_code == 0 and [c["name"] for c in json.loads(only.stdout)["cases"]] == \
        ["gravity"]
    text = run(path)
    assert text.exit_code == 1
    assert "NOT CARRIED" in text.output and "70.7 %" in text.output
    assert "competent engineer" in text.output


def test_text_csv_and_envelope(write, tmp_path):
    """The triangle (method of joints in tests/analysis/test_forces.py): apex 12 down gives
    the tie +4; 1.35 * apex + 1.5 * uplift gives 1.35 * 4 - 1.5 * 1 = 3.9 (linearity)."""
    path = write("tri.toml", LOADED)
    out = tmp_path / "forces.csv"
    res = run(path, "--csv", out)
    assert res.exit_code == 0, res.output
    assert "CARRIED" in res.output and "Envelope" in res.output
    assert "equilibrium alone" in res.output
    rows = list(csv.DictReader(out.open(encoding="utf-8")))
    assert len(rows) == 9
    tie = {r["case"]: float(r["force_kN"]) for r in rows if r["member"] == "AB"}
    assert tie == pytest.approx({"apex": 4.0, "uplift": -1.0, "both": 3.9})
    again = run(path, "--csv", out)
    assert again.exit_code == 2 and "exists" in again.output
    assert run(path, "--csv", path).exit_code == 2


def test_demo_models_with_loads_run():
    """Every demo model with load cases gives a verdict (0 or 1), never an error."""
    demos = [p for p in MODELS.glob("*.toml") if "[loads." in p.read_text(encoding="utf-8")]
    assert demos
    for p in demos:
        res = run(p, "--json")
        assert res.exit_code in (0, 1), (p, res.output)
        doc = json.loads(res.stdout)
        for case in doc["cases"]:
            if case["carried"]:
                total = [sum(r[a] for r in case["reactions"].values())
                         for a in range(len(case["total_load"]))]
                assert total == pytest.approx([-v for v in case["total_load"]], abs=1e-6 *
                                              max(1.0, max(map(abs, case["total_load"]))))


def test_text_introduces_each_kind_of_case_in_words():
    """Cases, the self-weight case, combinations and notional variants each read as what they are."""
    res = run(MODELS / "hall_truss.toml")
    assert res.exit_code == 0, res.output
    for heading in ("Load case 'roof';", "Self-weight case 'self_weight';",
                    "Combination 'gravity';", "Notional case 'gravity notional +x';"):
        assert heading in res.output, heading
    assert "(case)" not in res.output and "(combination)" not in res.output


BAD = [
    ("unknown joint", LOADED.replace("C = [0.0, -12.0]", "Q = [0.0, -12.0]"), "Q = [0.0",
     ["load case 'apex' loads joint 'Q'", "not in [joints]", "correct the id"]),
    ("component count", LOADED.replace("C = [0.0, -12.0]", "C = [0.0, 0.0, -12.0]"),
     "C = [0.0, 0.0, -12.0]", ["joint 'C'", "give 2 force components [fx, fy]", "3 components"]),
    ("unknown case", LOADED.replace("uplift = 1.5", "uplfit = 1.5"), "uplfit = 1.5",
     ["combination 'both' names case 'uplfit'", "did you mean 'uplift'"]),
    ("negative EA", LOADED + "[properties.members.EA]\ndefault = 1.0\nAB = -3.0\n", "AB = -3.0",
     ["[properties.members.EA] 'AB'", "give a positive number"]),
    ("force unit", LOADED.replace("dimension = 2", 'dimension = 2\nforce_units = "kn"'),
     'force_units = "kn"', ["unknown force unit 'kn'", "did you mean 'kN'"]),
    ("factor", LOADED.replace("uplift = 1.5", 'uplift = "1.5"'), 'uplift = "1.5"',
     ["the factor of 'uplift' must be a number"]),
    ("self weight", LOADED + "[self_weight]\nper_length = -0.2\n", "per_length = -0.2",
     ["[self_weight] per_length must be a positive number"]),
]


@pytest.mark.parametrize("name,text,marker,pieces", BAD, ids=[b[0] for b in BAD])
def test_bad_load_input_exits_2_naming_the_item(write, name, text, marker, pieces):
    path = write("bad.toml", text)
    res = run(path)
    assert res.exit_code == 2, res.output
    assert "Traceback" not in res.output
    assert f"{path}:{line_of(text, marker)}: " in res.output, res.output
    for piece in pieces:
        assert piece in res.output, (piece, res.output)


def test_bad_load_input_in_json_names_the_line(write):
    text = json.dumps({"dimension": 2, "joints": {"A": [0, 0], "B": [4, 0], "C": [2, 3]},
                       "members": {"AB": ["A", "B"], "BC": ["B", "C"], "CA": ["C", "A"]},
                       "supports": {"A": "pin", "B": "y"},
                       "loads": {"apex": {"C": [0, -12]}},
                       "combinations": {"c": {"apex": 1.0, "wind": 1.5}}}, indent=1)
    path = write("bad.json", text)
    res = run(path)
    assert res.exit_code == 2
    line = line_of(text, '"wind"')
    assert f"{path}:{line}: " in res.output, res.output
    assert "combination 'c' names case 'wind'" in res.output


def test_model_without_loads_exits_2(write):
    path = write("none.toml", BASE_2D)
    res = run(path)
    assert res.exit_code == 2 and "no load cases; add a table [loads.NAME]" in res.output
    res = run(write("tri.toml", LOADED), "--case", "snow")
    assert res.exit_code == 2 and "no load case 'snow'" in res.output


def test_loads_round_trip_through_toml_and_json(write, tmp_path):
    import numpy as np

    import spaceframe
    from spaceframe.io.native import dump_json, dump_toml

    text = LOADED + '[self_weight]\nper_length = 0.25\n[notional]\nfraction = 0.01\n' \
        'cases = ["both"]\n'
    frame = spaceframe.load(write("tri.toml", text))
    before = frame.loads.applied(frame)
    for name, dump in (("out.toml", dump_toml), ("out.json", dump_json)):
        dump(frame, tmp_path / name)
        again = spaceframe.load(tmp_path / name)
        after = again.loads.applied(again)
        assert after.names == before.names and np.array_equal(after.forces, before.forces)
