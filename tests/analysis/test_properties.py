"""Member properties (EA) in the native format, and the soft modes they weight."""

from __future__ import annotations

import numpy as np
import pytest
from click.testing import CliRunner

import spaceframe
from spaceframe import ModelError, audit
from spaceframe.cli import main
from spaceframe.io.native import dump_json, dump_toml

# A joint D held by three members from three pinned joints (a tripod): stable, and D's
# stiffness along each leg comes from that leg alone.
TRIPOD = """name = "Tripod"
[joints]
A = [0.0, 0.0, 0.0]
B = [4.0, 0.0, 0.0]
C = [0.0, 4.0, 0.0]
D = [1.0, 1.0, 3.0]
[members]
AD = ["A", "D"]
BD = ["B", "D"]
CD = ["C", "D"]
[supports]
A = "pin"
B = "pin"
C = "pin"
[tags.members.role]
leg = ["AD", "BD"]
prop = ["CD"]
"""


def tripod(write, ea_table=""):
    return spaceframe.load(write("tripod.toml", TRIPOD + ea_table))


def test_ea_default_selector_and_id(write):
    f = tripod(write, '[properties.members.EA]\ndefault = 2.0\n"role=prop" = 5.0\nAD = 7.0\n')
    assert f.member_properties["EA"].tolist() == [7.0, 2.0, 5.0]


@pytest.mark.parametrize("dump,suffix", [(dump_toml, ".toml"), (dump_json, ".json")])
def test_ea_round_trip(write, tmp_path, dump, suffix):
    f = tripod(write, '[properties.members.EA]\ndefault = 2.0\nBD = 0.5\n')
    out = tmp_path / f"again{suffix}"
    dump(f, out)
    g = spaceframe.load(out)
    assert g.member_properties["EA"].tolist() == f.member_properties["EA"].tolist()


@pytest.mark.parametrize("table,words,line", [
    ('[properties.members.EA]\nAX = 1.0\ndefault = 1.0\n', ["'AX'", "not in", "correct the id"], 19),
    ('[properties.members.EA]\ndefault = -1.0\n', ["positive number"], 19),
    ('[properties.members.EA]\nAD = 1.0\n', ["no value for member", "default = 2.0e5"], 18),
    ('[properties.members.EA]\ndefault = 1\n"role=strut" = 2\n', ["matches no member"], 20),
])
def test_bad_ea_tables(write, table, words, line):
    path = write("tripod.toml", TRIPOD + table)
    with pytest.raises(ModelError) as err:
        spaceframe.load(path)
    message = str(err.value)
    assert f"tripod.toml:{line}:" in message
    for w in words:
        assert w in message
    res = CliRunner().invoke(main, ["audit", str(path)])
    assert res.exit_code == 2 and "Traceback" not in res.output


def test_a_weak_leg_gives_a_soft_mode(write):
    """Derived: with one leg a millionth as stiff (EA), joint D is held along that leg only
    weakly: the softest mode moves D alone, with a stiffness ratio of order 1e-6 that
    scales with the weak EA (the Rayleigh quotient is linear in each member's EA/L)."""
    assert audit(tripod(write)).soft_info == ()          # uniform EA: nothing soft
    r6 = audit(tripod(write, '[properties.members.EA]\ndefault = 1.0\nCD = 1e-6\n'))
    r7 = audit(tripod(write, '[properties.members.EA]\ndefault = 1.0\nCD = 1e-7\n'))
    assert r6.stable and len(r6.soft_info) == 1
    assert r6.soft_info[0].joints == ("D",)
    assert 1e-7 < r6.soft_ratios[0] < 1e-5
    assert r7.soft_ratios[0] == pytest.approx(r6.soft_ratios[0] / 10, rel=0.05)


def test_soft_ratio_has_no_unit(write):
    """Derived: the ratio is dimensionless: the same in mm with EA in other units."""
    f = tripod(write, '[properties.members.EA]\ndefault = 1.0\nCD = 1e-6\n')
    g = spaceframe.Frame.from_arrays(f.coords * 1000, f.ends, joint_ids=f.joint_ids,
                                     member_ids=f.member_ids,
                                     supports={0: "pin", 1: "pin", 2: "pin"},
                                     member_properties={"EA": f.member_properties["EA"] * 7e3})
    assert audit(g).soft_ratios == pytest.approx(audit(f).soft_ratios, rel=1e-9)


def test_soft_modes_on_request_above_the_default_size(write):
    """A default audit looks for soft modes up to ``Limits.soft_auto`` free coordinates;
    above, it says it did not and why, and ``soft=True`` finds the same mode as a default
    audit of a small frame (the weak leg above)."""
    from dataclasses import replace

    from spaceframe.tolerances import DEFAULT
    from spaceframe.views.text import render_audit

    frame = tripod(write, '[properties.members.EA]\ndefault = 1.0\nCD = 1e-6\n')
    small = replace(DEFAULT, limits=replace(DEFAULT.limits, soft_auto=2))
    looked = audit(frame)
    skipped = audit(frame, tol=small)
    assert looked.soft_skipped is None and len(looked.soft_info) == 1
    assert skipped.soft_info == () and "free coordinates, more than the 2 a default audit" \
        in skipped.soft_skipped
    assert "Soft modes: not looked for (3 free coordinates" in render_audit(skipped)
    assert "--soft looks for them" in render_audit(skipped)
    assert skipped.to_dict()["soft_modes_skipped"] == skipped.soft_skipped
    assert looked.to_dict()["soft_modes_skipped"] is None
    asked = audit(frame, soft=True, tol=small)
    assert asked.soft_skipped is None
    assert asked.soft_ratios == pytest.approx(looked.soft_ratios, rel=1e-12)
    off = audit(frame, soft=False)
    assert off.soft_skipped == "not asked for" and "Soft modes" not in render_audit(off)


def test_soft_options_of_the_audit_command(write):
    path = write("tripod.toml", TRIPOD + '[properties.members.EA]\ndefault = 1.0\nCD = 1e-6\n')
    on = CliRunner().invoke(main, ["audit", str(path), "--soft"])
    off = CliRunner().invoke(main, ["audit", str(path), "--no-soft"])
    assert on.exit_code == off.exit_code == 0
    assert "Soft modes (held" in on.output and "Soft modes" not in off.output
