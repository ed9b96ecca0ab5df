"""The compact binary model format (.npz): the same frame back, and bad archives refused."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner

import spaceframe
from spaceframe import ModelError
from spaceframe.cli import main
from spaceframe.io.binary import dump_npz

MODELS = Path(__file__).resolve().parents[2] / "models"


@pytest.mark.parametrize("name", ["hall_roof_unbraced.toml", "canopy_sway.toml",
                                  "hall_truss.toml"])
def test_round_trip_keeps_everything(tmp_path, name):
    f = spaceframe.load(MODELS / name)
    out = tmp_path / "m.npz"
    dump_npz(f, out)
    g = spaceframe.load(out)
    assert g.joint_ids == f.joint_ids and g.member_ids == f.member_ids
    assert np.array_equal(g.coords, f.coords) and np.array_equal(g.ends, f.ends)
    assert np.array_equal(g.restraint_dir, f.restraint_dir)
    assert dict(g.joint_tags) == dict(f.joint_tags)
    assert dict(g.member_tags) == dict(f.member_tags)
    assert (g.name, g.units, g.dimension) == (f.name, f.units, f.dimension)
    a, b = spaceframe.audit(f), spaceframe.audit(g)
    assert (a.mechanisms, a.self_stress_states) == (b.mechanisms, b.self_stress_states)


@pytest.mark.parametrize("name", ["hall_truss.toml", "footbridge_truss.toml",
                                  "hall_roof_braced.toml", "plant_platform.toml"])
def test_round_trip_keeps_the_loads(tmp_path, name):
    """Every demo model with loads: the load set back field by field (cases, combinations,
    self-weight, notional fraction and its cases, force units), so the member forces of
    every case are the same numbers (numpy's ``savez``/``load`` keep float64 bit for bit)."""
    from common.frames import assert_same_frame

    f = spaceframe.load(MODELS / name)
    assert f.loads is not None
    out = tmp_path / "m.npz"
    dump_npz(f, out)
    g = spaceframe.load(out)
    assert_same_frame(g, f)
    a, b = spaceframe.forces(f), spaceframe.forces(g)
    assert a.names == b.names and np.array_equal(a.carried, b.carried)
    np.testing.assert_array_equal(a.member_forces, b.member_forces)


def test_loads_of_odd_names_and_damaged_archives(tmp_path):
    """Case names with ':' and quotes survive (entries are numbered, not named); an archive
    whose loads name a joint the frame lacks, or lose an entry, is refused with a message."""
    import dataclasses

    from common.frames import assert_same_loads

    from spaceframe.loads import Combination, LoadCase, LoadSet

    f = spaceframe.load(MODELS / "canopy_sway.toml")
    j = f.joint_ids
    d = f.dimension
    loads = LoadSet(cases=(LoadCase('snow: "drift"', (j[0], j[1]), np.ones((2, d))),
                           LoadCase("wind:x", (j[2],), [[1.5] + [0.0] * (d - 1)])),
                    combinations=(Combination("c:1", (('snow: "drift"', 1.35), ("wind:x", 0.9))),),
                    notional=0.005, notional_cases=("c:1",), force_units="N")
    out = tmp_path / "odd.npz"
    dump_npz(dataclasses.replace(f, loads=loads), out)
    assert_same_loads(spaceframe.load(out).loads, loads)
    with np.load(out) as z:
        data = {k: z[k] for k in z.files}
    bad = dict(data, **{"loads:case:1:joints": np.array(["nowhere"])})
    np.savez(tmp_path / "bad.npz", **bad)
    with pytest.raises(ModelError, match="nowhere"):
        spaceframe.load(tmp_path / "bad.npz")
    lost = {k: v for k, v in data.items() if k != "loads:combination:0:factors"}
    np.savez(tmp_path / "lost.npz", **lost)
    with pytest.raises(ModelError, match="lack loads:combination:0:factors"):
        spaceframe.load(tmp_path / "lost.npz")


def test_convert_writes_npz_and_never_over_an_existing_file(tmp_path):
    out = tmp_path / "roof.npz"
    run = lambda *a: CliRunner().invoke(main, [str(x) for x in a])  # noqa: E731
    assert run("convert", MODELS / "canopy_sway.toml", "-o", out).exit_code == 0
    assert run("audit", out).exit_code == 1            # the canopy's sway mechanism
    again = run("convert", MODELS / "canopy_sway.toml", "-o", out)
    assert again.exit_code == 2 and "Traceback" not in again.output


def test_bad_archives_are_refused(tmp_path):
    junk = tmp_path / "junk.npz"
    junk.write_bytes(b"not a zip file")
    other = tmp_path / "other.npz"
    np.savez(other, a=np.arange(3))
    for path, words in ((junk, "not a spaceframe .npz"), (other, "not a spaceframe model")):
        with pytest.raises(ModelError) as err:
            spaceframe.load(path)
        assert words in str(err.value) and "convert" in str(err.value)
        res = CliRunner().invoke(main, ["audit", str(path)])
        assert res.exit_code == 2 and "Traceback" not in res.output
    # a member pointing past the joints: refused, not an IndexError
    f = spaceframe.load(MODELS / "canopy_sway.toml")
    good = tmp_path / "good.npz"
    dump_npz(f, good)
    with np.load(good) as z:
        data = {k: z[k] for k in z.files}
    data["ends"] = data["ends"].copy()
    data["ends"][0, 1] = 10_000
    bad = tmp_path / "bad.npz"
    np.savez(bad, **data)
    with pytest.raises(ModelError, match="outside the joint list"):
        spaceframe.load(bad)
