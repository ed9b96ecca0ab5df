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
