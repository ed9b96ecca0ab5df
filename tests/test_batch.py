"""Batches on Dask: rows equal to one-by-one audits, error rows, resume after a kill, bad arguments."""

from __future__ import annotations

import csv
import json
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest
from click.testing import CliRunner

import spaceframe
from spaceframe import Frame
from spaceframe.batch import COLUMNS
from spaceframe.cli import main

pytest.importorskip("distributed")

ROOT = Path(__file__).resolve().parent.parent
HALL = ROOT / "models" / "hall_roof_unbraced.toml"
COUNTS = ("joints", "members", "restraints", "mechanisms", "rigid_body_modes",
          "internal_mechanisms", "self_stress_states")


def toml_model(name, joints, members, supports):
    """A plane model file's text from dicts id -> (x, y), id -> (a, b), id -> code."""
    out = [f'name = "{name}"', "dimension = 2", "[joints]"]
    out += [f'{j} = [{x!r}, {y!r}]' for j, (x, y) in joints.items()]
    out += ["[members]"] + [f'{m} = ["{a}", "{b}"]' for m, (a, b) in members.items()]
    out += ["[supports]"] + [f'{j} = "{s}"' for j, s in supports.items()]
    return "\n".join(out) + "\n"


def warren(panels=5):
    """A Warren truss on a pin and a roller: m + r = 2j, statically determinate."""
    joints = {f"B{i}": (2.0 * i, 0.0) for i in range(panels + 1)}
    joints |= {f"T{i}": (2.0 * i + 1.0, 1.5) for i in range(panels)}
    members = {f"BB{i}": (f"B{i}", f"B{i + 1}") for i in range(panels)}
    members |= {f"TT{i}": (f"T{i}", f"T{i + 1}") for i in range(panels - 1)}
    for i in range(panels):
        members[f"DU{i}"] = (f"B{i}", f"T{i}")
        members[f"DD{i}"] = (f"T{i}", f"B{i + 1}")
    return joints, members, {"B0": "pin", f"B{panels}": "y"}


SQUARE = ({"A": (0.0, 0.0), "B": (3.0, 0.0), "C": (3.0, 3.0), "D": (0.0, 3.0)},
          {"AB": ("A", "B"), "BC": ("B", "C"), "CD": ("C", "D"), "DA": ("D", "A"),
           "AC": ("A", "C"), "BD": ("B", "D")},
          {"A": "pin", "B": "y"})

VARIANTS = """\
[generate]
each_member_removed = true
each_support_freed = true

[[variant]]
name = "stiffened"
add_members = { X1 = ["B0", "T1"] }

[[variant]]
name = "both ends pinned"
supports = { B5 = "pin" }

[[variant]]
name = "apex lifted"
move_joints = { T2 = [5.0, 2.5] }
"""


def expected(joints, members, supports, name):
    """The counts of one variant, built from the dicts and audited on its own."""
    joints, members, supports = dict(joints), dict(members), dict(supports)
    if name.startswith("remove "):
        del members[name[7:]]
    elif name.startswith("free "):
        del supports[name[5:]]
    elif name == "stiffened":
        members["X1"] = ("B0", "T1")
    elif name == "both ends pinned":
        supports["B5"] = "pin"
    elif name == "apex lifted":
        joints["T2"] = (5.0, 2.5)
    ids = list(joints)
    frame = Frame.from_arrays([joints[j] for j in ids],
                              [[ids.index(a), ids.index(b)] for a, b in members.values()],
                              joint_ids=ids, member_ids=list(members),
                              supports={ids.index(j): s for j, s in supports.items()})
    r = spaceframe.audit(frame)
    return {k: getattr(r, k) for k in COUNTS} | {"stable": r.stable}


def read_rows(path):
    with open(path, newline="", encoding="utf-8") as f:
        return list(csv.DictReader(f))


def batch(*args):
    return CliRunner().invoke(main, ["batch", *map(str, args)])


def test_rows_equal_one_by_one_audits_with_error_rows(tmp_path):
    """A Warren truss, a braced square and a broken model, each in every variant, on a local
    cluster of two workers: one row per (model, variant), counts equal to auditing each
    variant alone; every member of the determinate truss is key (removing any leaves a
    mechanism) and every member of the doubly braced square is redundant (removing any
    leaves it held) (derived)."""
    truss, square = tmp_path / "truss.toml", tmp_path / "square.toml"
    truss.write_text(toml_model("Warren truss", *warren()))
    square.write_text(toml_model("Braced square", *SQUARE))
    broken = tmp_path / "broken.toml"
    broken.write_text(toml_model("Broken", {"A": (0.0, 0.0), "B": (1.0, 0.0)},
                                 {"AB": ("A", "Q")}, {}))
    variants = tmp_path / "variants.toml"
    variants.write_text(VARIANTS)
    out = tmp_path / "rows.csv"
    start = time.perf_counter()
    res = batch(truss, square, broken, "--variants", variants, "--workers", 2, "-o", out)
    elapsed = time.perf_counter() - start
    assert res.exit_code == 0, res.output
    rows = read_rows(out)
    assert list(rows[0]) == list(COLUMNS)
    keys = [(Path(r["model"]).stem, r["variant"]) for r in rows]
    assert len(keys) == len(set(keys))
    by = dict(zip(keys, rows))

    written = ["base", "stiffened", "both ends pinned", "apex lifted"]
    for stem, (joints, members, supports) in (("truss", warren()), ("square", SQUARE)):
        names = written + [f"remove {m}" for m in members] + \
            [f"free {j}" for j in supports]
        assert {v for s, v in keys if s == stem} == set(names)
        for name in names:
            row = by[stem, name]
            if stem == "square" and name in written[1:]:  # they name truss joints
                assert "is not in" in row["error"] and str(variants) in row["error"], row
                assert row["mechanisms"] == ""
                continue
            assert row["error"] == "", row
            want = expected(joints, members, supports, name)
            assert {k: int(row[k]) for k in COUNTS} == {k: want[k] for k in COUNTS}, name
            assert row["stable"] == ("true" if want["stable"] else "false")
            assert (row["mechanism"] != "") == (want["mechanisms"] > 0)
            # an audit on a worker is timed inside the batch, so it cannot take longer
            assert 0 <= float(row["seconds"]) <= elapsed
        removed = [by[stem, f"remove {m}"] for m in members]
        if stem == "truss":
            assert by[stem, "base"]["stable"] == "true"
            assert all(int(r["mechanisms"]) >= 1 for r in removed)
        else:
            assert all(r["stable"] == "true" for r in removed)
    (bad,) = [r for k, r in by.items() if k[0] == "broken"]
    assert bad["variant"] == "base" and str(broken) in bad["error"] and "'Q'" in bad["error"]
    assert "Traceback" not in res.output


def _data_lines(path):
    if not path.exists():
        return []
    text = path.read_text(encoding="utf-8")
    return text.splitlines()[1:] if text.endswith("\n") else text.splitlines()[1:-1]


def test_resume_after_kill_finishes_without_repeats(tmp_path):
    """Killed part-way (SIGKILL to the batch and its workers), the rows written stay; --resume
    writes only the rest, and the union is the full set of (model, variant)."""
    variants = tmp_path / "each.toml"
    variants.write_text("[generate]\neach_member_removed = true\neach_support_freed = true\n")
    out = tmp_path / "rows.csv"
    cmd = [sys.executable, "-m", "spaceframe", "batch", str(HALL), "--variants", str(variants),
           "--workers", "2", "--quiet", "-o", str(out)]
    frame = spaceframe.load(HALL)
    held = sorted({frame.joint_ids[j] for j in frame.restraint_joint.tolist()})
    full = {"base"} | {f"remove {m}" for m in frame.member_ids} | {f"free {j}" for j in held}

    proc = subprocess.Popen(cmd, start_new_session=True, stdout=subprocess.DEVNULL,
                            stderr=subprocess.PIPE)
    try:
        deadline = time.monotonic() + 40
        while len(_data_lines(out)) < 5 and proc.poll() is None and time.monotonic() < deadline:
            time.sleep(0.002)
        os.killpg(proc.pid, signal.SIGKILL)
    finally:
        proc.wait()
    before = _data_lines(out)
    assert 5 <= len(before) < len(full), "the batch was not interrupted part-way"

    done = subprocess.run(cmd + ["--resume"], capture_output=True, text=True, timeout=60)
    assert done.returncode == 0, done.stderr
    after = _data_lines(out)
    assert after[:len(before)] == before  # appended, never rewritten
    rows = read_rows(out)
    names = [r["variant"] for r in rows]
    assert len(names) == len(set(names)) and set(names) == full
    assert all(r["error"] == "" and r["model"] == str(HALL) for r in rows)
    assert all(int(r["mechanisms"]) >= 1 for r in rows)  # the unbraced roof never holds

    again = subprocess.run(cmd + ["--resume"], capture_output=True, text=True, timeout=60)
    assert again.returncode == 0 and len(_data_lines(out)) == len(full)


def test_demo_variants_file():
    """models/hall_roof.variants.toml on the unbraced hall roof: the layout that copies the
    braced spec (end bays, ceiling ties, end bearings held) holds it, as the braced model is
    held; the others leave mechanisms."""
    from spaceframe.batch import apply_variant, expand, read_variants

    frame = spaceframe.load(HALL)
    variants = expand(read_variants(ROOT / "models" / "hall_roof.variants.toml"), frame)
    held = {v.name for v in variants if spaceframe.audit(apply_variant(frame, v), soft=False,
                                                         redundancy=False).stable}
    assert held == {"end bays braced, ceiling ties, end bearings held along the building"}
    assert len(variants) == 5 + 12  # base, four layouts, twelve bearings


def test_variant_keeps_the_loads():
    """A variant of a loaded model (the braced hall roof's snow, wind and their combination)
    keeps its load set field by field: loads name joints by id, and a variant edits members
    and supports, never joints (spaceframe/edit.py carries every field of the frame). Its
    load cases then run on the changed frame: a roof variant that frees a gable bearing still
    has every case, and each case's reactions balance its load (Newton's third law: the sum
    of the support reactions is minus the total applied load)."""
    import numpy as np

    from spaceframe.batch import Variant, apply_variant

    from common.frames import assert_same_loads

    frame = spaceframe.load(ROOT / "models" / "hall_roof_braced.toml")
    held = sorted({frame.joint_ids[j] for j in frame.restraint_joint.tolist()})
    v = Variant("moved", move_joints=((held[0], tuple(frame.coords[frame.joint_ids.index(
        held[0])] + [0.0, 0.0, 0.05])),), supports=((held[1], "z"),))
    changed = apply_variant(frame, v)
    assert_same_loads(changed.loads, frame.loads)
    r = spaceframe.forces(changed)
    assert r.names == frame.loads.applied(frame).names
    for i in np.flatnonzero(r.carried):
        np.testing.assert_allclose(r.reactions[i].sum(axis=0), -r.loads[i].sum(axis=0),
                                   atol=1e-6 * max(1.0, np.abs(r.loads[i]).sum()))


def test_variant_keeps_ea_tags_and_supports_field_by_field():
    """Every change a variant can make, on a frame with tags and EA: the result written out by
    hand (source: derived from the frame's own fields and spaceframe/edit.py's rule: an added
    member has no tags and the median EA of the model as given, here median(1, 2, 3, 4, 5, 6)
    x 1e5 = 3.5e5; supports of other joints keep their rows and their order)."""
    from spaceframe.batch import Variant, apply_variant

    from common.frames import assert_same_frame

    joints, members, supports = SQUARE
    ids, mids = list(joints), list(members)
    ea = [1e5, 2e5, 3e5, 4e5, 5e5, 6e5]
    role = ["chord", "post", "chord", "post", "brace", "brace"]
    frame = Frame.from_arrays([joints[j] for j in ids],
                              [[ids.index(a), ids.index(b)] for a, b in members.values()],
                              joint_ids=ids, member_ids=mids, name="square",
                              supports={0: "pin", 1: "y", 3: "x"},
                              joint_tags={"level": ["0", "0", "1", "1"]},
                              member_tags={"role": role},
                              member_properties={"EA": ea})
    v = Variant("all", remove_members=("BD",), add_members=(("X", "B", "D"),),
                free_supports=("D",), supports=(("B", "xy"),), move_joints=(("C", (3.0, 3.5)),))
    got = apply_variant(frame, v)
    want = Frame(joint_ids=tuple(ids), coords=[[0, 0], [3, 0], [3, 3.5], [0, 3]],
                 member_ids=("AB", "BC", "CD", "DA", "AC", "X"),
                 ends=[[0, 1], [1, 2], [2, 3], [3, 0], [0, 2], [1, 3]],
                 restraint_joint=[0, 0, 1, 1], restraint_dir=[[1, 0], [0, 1], [1, 0], [0, 1]],
                 dimension=2, name="square [all]", joint_tags={"level": ("0", "0", "1", "1")},
                 member_tags={"role": tuple(role[:5]) + ("",)},
                 member_properties={"EA": ea[:5] + [3.5e5]})
    assert_same_frame(got, want)


@pytest.mark.filterwarnings("ignore:Port .* is already in use")
def test_existing_scheduler_and_json_lines(tmp_path):
    """--scheduler uses a running scheduler (here one on 127.0.0.1 in this process); a .jsonl
    output holds one object per row, null counts and the message in an error row."""
    from dask.distributed import LocalCluster

    square = tmp_path / "square.toml"
    square.write_text(toml_model("Braced square", *SQUARE))
    variants = tmp_path / "v.toml"
    variants.write_text('base = false\n[generate]\neach_member_removed = ["AB", "ACC"]\n')
    out = tmp_path / "rows.jsonl"
    with LocalCluster(n_workers=1, threads_per_worker=1, processes=False, protocol="tcp",
                      host="127.0.0.1",
                      dashboard_address=None) as cluster:
        res = batch(square, "--variants", variants, "--scheduler", cluster.scheduler_address,
                    "-o", out)
    assert res.exit_code == 0, res.output
    rows = {r["variant"]: r for r in map(json.loads, out.read_text().splitlines())}
    assert set(rows) == {"remove AB", "remove ACC"}
    ok, bad = rows["remove AB"], rows["remove ACC"]
    assert list(ok) == list(COLUMNS)
    assert (ok["members"], ok["mechanisms"], ok["self_stress_states"], ok["stable"]) == \
        (5, 0, 0, True) and ok["error"] is None
    assert bad["mechanisms"] is None and "'ACC'" in bad["error"]
    assert "did you mean 'AC'" in bad["error"] and f"{variants}:3:" in bad["error"]


@pytest.mark.parametrize("args, words", [
    ((), "at least one model"),
    (("missing.toml",), "no such model file"),
    (("{square}", "--workers", "0"), "--workers"),
    (("{square}", "--resume", "--force"), "give one of them"),
    (("{square}", "--scheduler", "tcp://127.0.0.1:1", "--workers", "2"), "leave --workers out"),
    (("{square}", "--variants", "{typo}"), "did you mean 'remove_members'"),
    (("{square}", "--variants", "{twice}"), "already used"),
    (("{square}", "--variants", "nowhere.toml"), "no such variants file"),
])
def test_bad_arguments_exit_2(tmp_path, args, words):
    square = tmp_path / "square.toml"
    square.write_text(toml_model("Braced square", *SQUARE))
    typo = tmp_path / "typo.toml"
    typo.write_text('[[variant]]\nname = "a"\nremove_member = ["AB"]\n')
    twice = tmp_path / "twice.toml"
    twice.write_text('[[variant]]\nname = "a"\n[[variant]]\nname = "a"\n')
    names = {"square": square, "typo": typo, "twice": twice}
    res = batch(*[a.format(**names) for a in args], "-o", tmp_path / "rows.csv")
    assert res.exit_code == 2, res.output
    assert words in res.output and "Traceback" not in res.output
    if "typo" in " ".join(args) or "twice" in " ".join(args):
        assert ":3:" in res.output or ":4:" in res.output  # the line of the variant
    assert not (tmp_path / "rows.csv").exists()


def test_results_file_is_never_clobbered(tmp_path):
    square = tmp_path / "square.toml"
    square.write_text(toml_model("Braced square", *SQUARE))
    out = tmp_path / "mine.csv"
    out.write_text("my own notes\n")
    res = batch(square, "-o", out)
    assert res.exit_code == 2 and "--resume" in res.output and "--force" in res.output
    res = batch(square, "-o", out, "--resume")
    assert res.exit_code == 2 and "header" in res.output
    assert out.read_text() == "my own notes\n"
    for bad_out in (square, tmp_path / "rows.parquet"):
        res = batch(square, "-o", bad_out)
        assert res.exit_code == 2, res.output
    assert square.read_text() == toml_model("Braced square", *SQUARE)
