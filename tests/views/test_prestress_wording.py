"""What the text says about prestress: never that a mechanism is safe unless the model
declares the prestress it is built and kept in.

Sources: Pellegrino & Calladine, "Matrix analysis of statically and kinematically
indeterminate frameworks", Int. J. Solids Struct. 22(4), 1986 (two collinear bars between
pins: a first-order mechanism stiffened by tension in both bars, softened by compression);
the four-bar linkage is a finite mechanism (common practice), which no prestress stiffens.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
from click.testing import CliRunner

from spaceframe import Frame, audit
from spaceframe.cli import main
from spaceframe.errors import ModelError
from spaceframe.views.text import render_audit, verdict

from common.reference_cases import collinear_pair, four_bar_square

SAFE_SOUNDING = ("a prestress stiffens", "stiffened by prestress")


def text_of(frame):
    r = audit(frame)
    return r, render_audit(r)


def test_possible_prestress_is_a_mechanism_by_default():
    """Collinear bars: the mode is first-order, but with no prestress declared it is a
    mechanism in the verdict and the exit status, and the words say why."""
    r, text = text_of(collinear_pair(2))
    assert not r.stable and r.mechanisms == 1
    assert verdict(r).startswith("MECHANISM")
    assert "stiffened only if the frame is built and kept prestressed in state of " \
           "self-stress 1 (tension in M1, M2)" in text
    assert "frames normally are not, so treat it as a real mechanism unless that prestress " \
           "is designed in" in text
    for phrase in SAFE_SOUNDING:
        assert phrase not in text


def test_declared_tension_holds_the_collinear_bars_and_says_so():
    """Pellegrino & Calladine: tension in both bars stiffens the sideways mode."""
    f = dataclasses.replace(collinear_pair(2), prestress=[5.0, 5.0])
    r, text = text_of(f)
    assert r.stable and r.mechanisms == 1            # counts unchanged, held by prestress
    assert r.declared_prestress.holds
    assert verdict(r).startswith("HELD BY ITS DECLARED PRESTRESS")
    assert "held only while that prestress is kept" in verdict(r)
    assert "stiffened by the prestress the model declares" in text
    assert r.to_dict()["declared_prestress"] == {"forces": {"M1": 5.0, "M2": 5.0},
                                                 "holds": True, "stiffened_modes": [1]}


def test_declared_compression_does_not_hold():
    """Pellegrino & Calladine: compression in the bars softens the mode (u.T G u < 0)."""
    f = dataclasses.replace(collinear_pair(2), prestress=[-5.0, -5.0])
    r, text = text_of(f)
    assert not r.stable and not r.declared_prestress.holds
    assert verdict(r).startswith("MECHANISM")
    assert "the declared prestress does not stiffen it: treat as a real mechanism" in text


def test_finite_mechanism_never_reads_as_stiffened():
    """A four-bar linkage moves finitely: its one self-stress is in the bar between the pins
    (derived: both its ends are held), and declared or not, nothing stiffens the linkage."""
    for f in (four_bar_square(), dataclasses.replace(four_bar_square(),
                                                     prestress=[8.0, 0.0, 0.0, 0.0])):
        r, text = text_of(f)
        assert not r.stable and verdict(r).startswith("MECHANISM")
        assert "no prestress stiffens it: treat as a real mechanism, likely finite" in text
        assert "stiffened by the prestress the model declares" not in text
        assert "stiffened only if" not in text
        for phrase in SAFE_SOUNDING:
            assert phrase not in text


def test_declared_prestress_out_of_balance_is_refused():
    """Derived: one collinear bar in tension alone pulls joint 2 sideways-free along x."""
    f = dataclasses.replace(collinear_pair(2), prestress=[5.0, 0.0])
    with pytest.raises(ModelError, match="not a state of self-stress: at joint 'J2'"):
        audit(f)


MODEL = """\
name = "Pretensioned string"
dimension = 2
[joints]
A = [0.0, 0.0]
B = [2.0, 0.0]
C = [4.0, 0.0]
[members]
AB = ["A", "B"]
BC = ["B", "C"]
[supports]
A = "pin"
C = "pin"
"""


def run(*args):
    return CliRunner().invoke(main, ["audit", *map(str, args)])


def test_cli_exit_status_follows_the_declared_prestress(write):
    assert run(write("plain.toml", MODEL)).exit_code == 1
    res = run(write("pre.toml", MODEL + "[prestress]\nAB = 10.0\nBC = 10.0\n"))
    assert res.exit_code == 0, res.output
    assert "HELD BY ITS DECLARED PRESTRESS" in res.output


@pytest.mark.parametrize("table, line, pieces", [
    ("[prestress]\nAB = 10.0\nB-C = 10.0\n", 15, ("names member 'B-C'", "did you mean 'BC'?")),
    ("[prestress]\nAB = 10.0\nBC = \"tight\"\n", 15, ("give the member's force as a number",)),
    ("[prestress]\nAB = 10.0\n", None, ("not a state of self-stress: at joint 'B'",
                                         "list the force of every member")),
])
def test_cli_bad_prestress_exits_2(write, table, line, pieces):
    path = write("bad.toml", MODEL + table)
    res = run(path)
    assert res.exit_code == 2, res.output
    assert "Traceback" not in res.output
    assert (f"{path}:{line}: " if line else f"{path}: ") in res.output, res.output
    for p in pieces:
        assert p in res.output, res.output


@pytest.mark.parametrize("suffix", [".toml", ".json", ".npz"])
def test_declared_prestress_is_written_and_read_back(tmp_path, suffix):
    from spaceframe import load
    from spaceframe.io import save

    f = dataclasses.replace(collinear_pair(3), prestress=[2.5, 2.5])
    save(f, tmp_path / f"m{suffix}")
    back = load(tmp_path / f"m{suffix}")
    assert back.prestress.tolist() == [2.5, 2.5]
    assert audit(back).stable


def test_summary_never_pairs_no_prestress_with_only_if_prestressed():
    """A roof whose tie lines no prestress can stiffen (finite slides: common practice, a
    sliding line of purlins needs bracing) while its out-of-plane chord joints would be:
    the summary says which is which instead of one clause that contradicts itself."""
    from spaceframe.families import plane_truss_roof

    r = audit(plane_truss_roof(4, 4))
    assert r.prestress_stable is False
    line = next(s for s in render_audit(r).splitlines() if s.strip().startswith("Prestress:"))
    assert "stiffened by no prestress at all, and the others only if" in line
    assert "no prestress, but only if" not in line
