"""One-way members through ``spaceframe audit``: labels read and checked, exit status, text."""

from __future__ import annotations

import json

import pytest
from click.testing import CliRunner

from spaceframe.cli import main

PORTAL = """\
name = "Portal, one rod"
dimension = 2
[joints]
A = [0.0, 0.0]
B = [4.0, 0.0]
C = [0.0, 3.0]
D = [4.0, 3.0]
[members]
AC = ["A", "C"]
BD = ["B", "D"]
CD = ["C", "D"]
R1 = ["A", "D"]
[supports]
A = "pin"
B = "pin"
[tags.members.carries]
tension = ["R1"]
"""

CROSSED = PORTAL.replace('R1 = ["A", "D"]\n', 'R1 = ["A", "D"]\nR2 = ["B", "C"]\n') \
    .replace('tension = ["R1"]', 'tension = ["R1", "R2"]')

PORTAL_JSON = {
    "dimension": 2,
    "joints": {"A": [0, 0], "B": [4, 0], "C": [0, 3], "D": [4, 3]},
    "members": {"AC": ["A", "C"], "BD": ["B", "D"], "CD": ["C", "D"], "R1": ["A", "D"]},
    "supports": {"A": "pin", "B": "pin"},
    "tags": {"members": {"carries": {"tension": ["R1"]}}},
}


def run(*args):
    return CliRunner().invoke(main, ["audit", *map(str, args)])


def test_single_rod_portal_exits_1_and_says_what_goes_slack(write):
    """Common practice: one rod braces a portal against sway one way only."""
    res = run(write("portal.toml", PORTAL))
    assert res.exit_code == 1, res.output
    assert "Verdict: NOT HELD" in res.output
    assert "R1 (tension only) goes slack" in res.output
    assert "Joints C and D move along -x" in res.output or "joints C and D move along -x" \
        in res.output
    doc = json.loads(run(write("p.toml", PORTAL), "--json").stdout)
    assert doc["mechanisms"] == 0 and doc["stable"] is False
    assert doc["one_way"]["slack"] == ["R1"] and doc["one_way"]["held"] is False


def test_crossed_rods_exit_0(write):
    res = run(write("crossed.toml", CROSSED))
    assert res.exit_code == 0, res.output
    assert "Verdict: HELD" in res.output and "fitted snug" in res.output


def test_json_model_reads_the_same_tags(write):
    res = run(write("portal.json", json.dumps(PORTAL_JSON, indent=1)), "--json")
    assert res.exit_code == 1
    assert json.loads(res.stdout)["one_way"]["slack"] == ["R1"]


def _refused(res, path, line, *pieces):
    assert res.exit_code == 2, res.output
    assert "Traceback" not in res.output
    assert f"{path}:{line}: " in res.output, res.output
    for p in pieces:
        assert p in res.output, res.output


@pytest.mark.parametrize("old, new, pieces", [
    ('tension = ["R1"]', 'tensile = ["R1"]',
     ("label 'tensile' is not known", "tension and compression", "did you mean 'tension'?")),
    ('tension = ["R1"]', 'tension = ["R-1"]',
     ("lists member 'R-1', which is not in [members]", "did you mean 'R1'?")),
])
def test_bad_label_or_id_exits_2_naming_it(write, old, new, pieces):
    path = write("bad.toml", PORTAL.replace(old, new))
    line = PORTAL.replace(old, new).splitlines().index(new) + 1
    _refused(run(path), path, line, *pieces)


def test_bad_label_in_json_exits_2_with_its_line(write):
    doc = json.loads(json.dumps(PORTAL_JSON))
    doc["tags"]["members"]["carries"] = {"compresion": ["R1"]}
    text = json.dumps(doc, indent=1)
    line = next(k for k, t in enumerate(text.splitlines(), 1) if '"compresion"' in t)
    _refused(run(write("bad.json", text)), write("bad.json", text), line,
             "label 'compresion' is not known", "did you mean 'compression'?")
