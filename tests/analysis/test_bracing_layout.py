"""Bracing layout rules, filters that say what they matched, per-kind costs, the designer's scheme.

Sources, named per test:
- "common practice": facts of the trade.  Longitudinal bracing of a building of portal or
  truss frames goes in the end bays, or in bays at a spacing the designer chooses; a scaffold
  is tied to the facade it stands against, a tie holding along the facade's normal only; the
  floor of a building is kept clear of bracing (no rakers across the space under the frames).
- "derived": worked out by hand from the geometry, stated in the test.
- "brute force": every subset of the candidate groups, each braced frame's mechanisms
  counted from a compatibility matrix built independently (``common.matrices``) with numpy's
  SVD.
- "scenario of our own": the facade scaffold demo (models/facade_scaffold.toml), invented.
"""

from __future__ import annotations

import itertools
import json
from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner

import spaceframe
from spaceframe import Frame
from spaceframe.analysis.bracing import recommend_bracing
from spaceframe.analysis.bracing.candidates import CandidateSet, MemberCandidate
from spaceframe.analysis.bracing.frames import candidate_bay
from spaceframe.analysis.bracing.layout import LayoutRules, clear_space_hits, parse_costs
from spaceframe.errors import SpaceframeError

from common.matrices import dense_compatibility

MODELS = Path(__file__).resolve().parents[2] / "models"
HALL = MODELS / "hall_roof_unbraced.toml"
SCAFFOLD = MODELS / "facade_scaffold.toml"
TIES = ["F1.I2", "F3.I2", "F4.I2", "F6.I2", "F1.I3", "F3.I3", "F4.I3", "F6.I3"]


def run(*args):
    from spaceframe.cli import main

    return CliRunner().invoke(main, [str(a) for a in args])


def _dense_mechanisms(frame: Frame) -> int:
    """Mechanisms of a frame with axis-aligned supports, from a matrix built in the test."""
    held = [(int(j), int(np.argmax(np.abs(e)))) for j, e in
            zip(frame.restraint_joint, frame.restraint_dir)]
    assert all(np.count_nonzero(np.abs(e) > 1e-12) == 1 for e in frame.restraint_dir)
    C = dense_compatibility(frame.coords, frame.ends.tolist(), held)
    s = np.linalg.svd(C, compute_uv=False)
    return C.shape[1] - int(np.sum(s > 1e-9 * s[0]))


def _braces(r):
    c = r.candidates
    return [i for i in r.members_added if c.origin[i] != "tie"]


# ---------------------------------------------------------------------------- braced bays

def test_braced_bays_ends_on_the_hall():
    # source: common practice (longitudinal bracing in both end bays of a row of trusses).
    # derived: the hall has 5 bays between its 6 trusses, so the end bays are 1 and 5; the
    # 12 lines that slide along the hall can be held by braces in any one bay, so the rule
    # costs no mechanism: the braced frame is held, checked by a matrix built in the test.
    frame = spaceframe.load(HALL)
    r = recommend_bracing(frame, alternatives=0, layout=LayoutRules(braced_bays="ends"))
    bays = {candidate_bay(frame, r.candidates, i) for i in _braces(r)}
    assert bays == {"1", "5"}
    assert r.after.stable and _dense_mechanisms(r.braced) == 0
    assert r.layout.required == (("1",), ("5",)) and r.layout.unmet == ()
    # as few as without the rule (every basis of the matroid has the same size)
    assert r.layout.count == r.layout.least_count == 37
    filters = {kind: n for kind, _, n in r.candidates.filters}
    assert filters["braced bays"] > 0


def test_braced_bays_every_two_on_the_hall():
    # source: common practice (a braced bay in every N consecutive bays; N is the designer's).
    frame = spaceframe.load(HALL)
    r = recommend_bracing(frame, alternatives=0, layout=LayoutRules(braced_bays="every:2"))
    bays = {int(candidate_bay(frame, r.candidates, i)) for i in _braces(r)}
    for start in range(1, 5):                      # windows {1,2} {2,3} {3,4} {4,5}
        assert bays & {start, start + 1}
    assert r.after.stable and _dense_mechanisms(r.braced) == 0


def test_braced_bays_list_accepts_the_printed_form():
    frame = spaceframe.load(HALL)
    a = recommend_bracing(frame, alternatives=0, layout=LayoutRules(braced_bays="B2,B4"))
    b = recommend_bracing(frame, alternatives=0, layout=LayoutRules(braced_bays=["2", "4"]))
    assert a.chosen == b.chosen
    assert {candidate_bay(frame, a.candidates, i) for i in _braces(a)} == {"2", "4"}


# ------------------------------------------------------------------------------ symmetric

def _mirror_permutations(frame):
    """Joint permutations of the mirrors about the centre lines, found here from coordinates."""
    X = frame.coords
    out = []
    for ax in range(frame.dimension - 1):
        c = 0.5 * (X[:, ax].min() + X[:, ax].max())
        Y = X.copy()
        Y[:, ax] = 2 * c - Y[:, ax]
        perm = [int(np.argmin(np.linalg.norm(X - y, axis=1))) for y in Y]
        if np.allclose(X[perm], Y):
            out.append((ax, perm))
    return out


def _proposal_items(r):
    c = r.candidates
    members = {frozenset(c.ends[i].tolist()) for i in r.members_added}
    restraints = {(int(c.joint[i]), tuple(np.abs(c.direction[i]).round(12)))
                  for i in r.restraints_added}
    return members, restraints


@pytest.mark.parametrize("model", [HALL, SCAFFOLD])
def test_symmetric_proposal_maps_onto_itself(model):
    # source: derived.  Under each mirror about the centre lines the hall's (x = 6,
    # y = 12.5) and the scaffold's (x = 6.25, y = 0.8) joints and members map onto
    # themselves; the proposal is chosen in mirror-image groups, so its members and
    # restraints map onto themselves too.
    frame = spaceframe.load(model)
    perms = _mirror_permutations(frame)
    assert perms
    r = recommend_bracing(frame, alternatives=0, layout=LayoutRules(symmetric=True))
    members, restraints = _proposal_items(r)
    for ax, p in perms:
        assert {frozenset(p[j] for j in m) for m in members} == members
        assert {(p[j], e) for j, e in restraints} == restraints
    plain = recommend_bracing(frame, alternatives=0)
    assert r.after.mechanisms == plain.after.mechanisms


def _box(seed):
    rng = np.random.default_rng(seed)
    a, b, h = 3 + rng.uniform(0, 2), 2 + rng.uniform(0, 2), 2.5 + rng.uniform(0, 1)
    coords = [[0, 0, 0], [a, 0, 0], [a, b, 0], [0, b, 0],
              [0, 0, h], [a, 0, h], [a, b, h], [0, b, h]]
    ends = [[0, 4], [1, 5], [2, 6], [3, 7], [4, 5], [5, 6], [6, 7], [7, 4]]
    return Frame.from_arrays(coords, ends, supports={i: "pin" for i in range(4)})


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_symmetric_exact_search_equals_brute_force(seed):
    # source: brute force over every set of mirror-image groups of the candidates.  A box of
    # four pinned columns and a roof ring is symmetric about both centre lines; its 10
    # candidate diagonals fall into a few groups, so the search is the exact one.
    frame = _box(seed)
    r = recommend_bracing(frame, alternatives=0, layout=LayoutRules(symmetric=True))
    assert r.layout.method in ("exhaustive", "matroid", "bound") and r.layout.exact
    c = r.candidates
    perms = [p for _, p in _mirror_permutations(frame)]
    pairs = [frozenset(e) for e in c.ends.tolist()]
    groups, seen = [], set()
    for i, e in enumerate(pairs):
        if i in seen:
            continue
        orbit, todo = {i}, [i]
        while todo:
            k = todo.pop()
            for p in perms:
                j = pairs.index(frozenset(p[q] for q in pairs[k]))
                if j not in orbit:
                    orbit.add(j)
                    todo.append(j)
        seen |= orbit
        groups.append(sorted(orbit))
    X, ends = frame.coords, frame.ends.tolist()
    held = [(j, a) for j in range(4) for a in range(3)]

    def left(sub):
        C = dense_compatibility(X, ends + [list(c.ends[i]) for g in sub for i in g], held)
        s = np.linalg.svd(C, compute_uv=False)
        return C.shape[1] - int(np.sum(s > 1e-9 * s[0]))
    best = None
    for n in range(len(groups) + 1):
        for sub in itertools.combinations(groups, n):
            key = (left(sub), sum(len(g) for g in sub),
                   round(sum(c.length[i] for g in sub for i in g), 9))
            best = key if best is None or key < best else best
    assert (r.after.mechanisms, len(r.members_added),
            round(r.total_length, 9)) == best


# --------------------------------------------------------------------- ties to a building

def test_ties_first_on_the_facade_scaffold():
    # source: scenario of our own (models/facade_scaffold.toml) and common practice: a
    # scaffold is tied to the facade at the tie points, each tie holding along the facade's
    # normal (y) only, and braced for what the ties leave.  derived: each tie point is an
    # inner standard joint that moves across the facade in some mechanism, and no two are
    # tied to the same movement, so all 8 ties are independent and all are taken first.
    frame = spaceframe.load(SCAFFOLD)
    index = {j: i for i, j in enumerate(frame.joint_ids)}
    dirs = [(index[j], (0.0, 1.0, 0.0)) for j in TIES]
    r = recommend_bracing(frame, alternatives=0, attach_directions=dirs,
                          layout=LayoutRules(ties_first=True))
    c = r.candidates
    ties = r.restraints_added
    assert sorted(frame.joint_ids[c.joint[i]] for i in ties) == sorted(TIES)
    assert all(np.allclose(c.direction[i], [0, 1, 0]) for i in ties)
    assert list(r.chosen[:len(ties)]) == ties          # before every brace
    assert r.after.stable and _dense_mechanisms(r.braced) == 0
    # the complaint: without --ties-first the members win and no tie is used
    plain = recommend_bracing(frame, alternatives=0, attach_directions=dirs)
    assert plain.restraints_added == [] and len(plain.members_added) == 24
    assert len(r.members_added) == 24 - 8


def test_cli_ties_first_and_attach_directions():
    res = run("brace", SCAFFOLD, "--ties-first", "--json", "--alternatives", "0",
              "--attach", ",".join(f"{j}:y" for j in TIES[:4]),
              "--attach", ",".join(f"{j}:0,1,0" for j in TIES[4:]))
    assert res.exit_code == 0, res.output
    doc = json.loads(res.stdout)
    assert sorted(x["joint"] for x in doc["restraints_added"]) == sorted(TIES)
    assert {x["axis"] for x in doc["restraints_added"]} == {"y"}
    text = run("brace", SCAFFOLD, "--ties-first", "--alternatives", "0",
               "--attach", ",".join(f"{j}:y" for j in TIES)).output
    assert "tie points given: 8 restraint candidates at 8 joints" in text
    assert "Restraints to add (8)" in text


def test_text_says_which_search_held():
    # derived: on the hall, braces in B1 and B5 can do all that braces in any bay do, so the
    # search under the rule finds a choice as few and as cheap as the plain greedy pass
    text = run("brace", HALL, "--braced-bays", "ends", "--alternatives", "0").output
    assert "Layout: exact: the greedy search over the rules" in text
    assert "B1 and B5 each hold a brace" in text
    sym = run("brace", HALL, "--symmetric", "--alternatives", "0").output
    assert "Layout: greedy search over the rules" in sym and "not proven least" in sym
    assert "mirror-image groups about x = 6 and y = 12.5" in sym


def test_restraints_always_compete_on_cost():
    # source: derived.  The hall's bearings leave y free at L0 and x, y free at L6.  Every basis
    # of the matroid has 37 elements.  With restraints made cheap and competing on cost, the
    # greedy pass takes each independent one first: y at the L0 line and y at the L6 line hold
    # the two eaves lines (x at L6 only stresses the determinate truss: no mechanism moves it),
    # so 2 restraints; under "auto" restraints come after members, so only the one for the
    # rigid-body slide that no member removes.
    frame = spaceframe.load(HALL)
    cheap = LayoutRules(costs=parse_costs("restraint=0.01"))
    auto = recommend_bracing(frame, alternatives=0, layout=cheap)
    always = recommend_bracing(frame, alternatives=0, restraints="always", layout=cheap)
    assert len(auto.restraints_added) == 1
    assert len(always.restraints_added) == 2
    assert len(always.chosen) == len(auto.chosen) == 37
    assert always.after.stable
    dirs = {tuple(always.candidates.direction[i]) for i in always.restraints_added}
    assert dirs == {(0.0, 1.0, 0.0)}


def test_cost_factors_and_the_csv_cost_column(tmp_path):
    with pytest.raises(SpaceframeError, match="did you mean 'brace'"):
        parse_costs("brase=2")
    with pytest.raises(SpaceframeError, match="positive"):
        parse_costs("tie=-1")
    # a listed candidate with a cost column wins as one with the same weight does
    lst = tmp_path / "cands.csv"
    lst.write_text("start,end,cost\nR3a,R4b,0.5\n")
    res = run("brace", MODELS / "canopy_sway.toml", "--candidates", lst, "--json")
    assert res.exit_code == 0 and json.loads(res.stdout)["added"][0]["ends"] == ["R3a", "R4b"]
    # braces made dear: the canopy still needs its one brace, at ten times the length
    res = run("brace", MODELS / "canopy_sway.toml", "--json", "--cost", "brace=10")
    doc = json.loads(res.stdout)
    assert doc["added"][0]["cost"] == pytest.approx(10 * doc["added"][0]["length"])


# ---------------------------------------------------------------------- planes, rakers

def test_planes_keep_braces_in_the_planes_given():
    from spaceframe.analysis.bracing.layout import plane_kinds

    frame = spaceframe.load(HALL)
    r = recommend_bracing(frame, alternatives=0, layout=LayoutRules(planes=("roof", "walls")))
    kinds = plane_kinds(frame, r.candidates)
    assert {kinds[i] for i in _braces(r)} <= {"roof", "walls"}
    assert "plan" not in kinds
    assert r.after.stable


def _portal_shed():
    """Four portal frames 6 m apart: columns 6 m high at x = 0 and 12, rafters to an apex at
    (6, 8); eaves and ridge ties between frames; feet pinned.  Tagged by frame."""
    import dataclasses

    coords, ids, tag = [], [], []
    for k in range(4):
        y = 6.0 * k
        for name, p in (("A", (0, y, 0)), ("B", (0, y, 6)), ("C", (6, y, 8)), ("D", (12, y, 6)),
                        ("E", (12, y, 0))):
            coords.append(p)
            ids.append(f"F{k + 1}.{name}")
            tag.append(str(k + 1))
    ends = []
    for k in range(4):
        a = 5 * k
        ends += [[a, a + 1], [a + 1, a + 2], [a + 2, a + 3], [a + 3, a + 4]]
        if k < 3:
            ends += [[a + 1, a + 6], [a + 2, a + 7], [a + 3, a + 8]]
    supports = {5 * k + j: "pin" for k in range(4) for j in (0, 4)}
    f = Frame.from_arrays(coords, ends, joint_ids=ids, supports=supports)
    return dataclasses.replace(f, joint_tags={"frame": tuple(tag)})


def test_clear_space_rakers_and_what_stays():
    # source: derived from the geometry of the portal shed above (and common practice: the
    # floor under the frames is kept clear).
    frame = _portal_shed()
    J = {j: i for i, j in enumerate(frame.joint_ids)}
    pairs = {"raker F2 foot to F3 apex": ("F2.A", "F3.C", True),     # across the bay's floor
             "in the plane of interior frame F2": ("F2.A", "F2.D", True),
             "wall brace x = 0": ("F2.A", "F3.B", False),              # along the wall line
             "roof brace in the rafter plane": ("F2.B", "F3.C", False),
             "gable bracing in end frame F1": ("F1.A", "F1.D", False)}
    members = [MemberCandidate(min(J[a], J[b]), max(J[a], J[b]), "listed")
               for a, b, _ in pairs.values()]
    cand = CandidateSet.from_records(frame, members, [])
    hits = clear_space_hits(frame, cand)
    for (name, (a, b, inside)), hit in zip(pairs.items(), hits):
        assert bool(hit) == inside, name
    r = recommend_bracing(frame, within=12.5, alternatives=0)
    assert not np.any(clear_space_hits(frame, r.candidates))
    removed = dict((k, n) for k, _, n in r.candidates.filters)["clear space"]
    assert removed > 0
    free = recommend_bracing(frame, within=12.5, alternatives=0,
                             layout=LayoutRules(allow_rakers=True))
    assert len(free.candidates) == len(r.candidates) + removed


# ------------------------------------------------------------------ filters say what matched

def test_exclude_bay_accepts_both_forms_and_reports_the_count():
    frame = spaceframe.load(HALL)
    a = recommend_bracing(frame, alternatives=0, exclude_bays=["B1"])
    b = recommend_bracing(frame, alternatives=0, exclude_bays=["1"])
    assert a.chosen == b.chosen
    (kind, value, n), = [f for f in a.candidates.filters if f[0] == "exclude bay"]
    assert value == "B1" and n > 0
    assert not {candidate_bay(frame, a.candidates, i) for i in _braces(a)} & {"1"}
    res = run("brace", HALL, "--exclude-bay", "B1", "--alternatives", "0")
    assert f"excluded bay B1: {n} candidates removed" in res.output


@pytest.mark.parametrize("args,words", [
    (("--exclude-bay", "B9"), ["'B9'", "B1, B2, B3, B4, B5"]),
    (("--braced-bays", "B1,B7"), ["'B7'", "B1, B2, B3, B4, B5"]),
    (("--exclude-panel", "F1.L0,F1.L1,F1.U1,F2.L0"), ["no candidate panel", "F1.L0"]),
    (("--exclude-box", "100,100,100,101,101,101"), ["no candidate member", "0,0,0,12,25,2"]),
    (("--planes", "rooof"), ["'rooof'", "did you mean 'roof'"]),
    (("--attach", "F1.Q9"), ["'F1.Q9'", "did you mean"]),
    (("--attach", "F1.L0:z"), ["already hold", "F1.L0"]),
    (("--cost", "bracing=2"), ["'bracing'", "tie, brace, restraint"]),
    (("--braced-bays", "every:0"), ["every:N", "at least 1"]),
    (("--attach", "F1.L1:2,0"), ["3 numbers"]),
])
def test_filter_that_matches_nothing_is_exit_2_with_the_valid_values(args, words):
    res = run("brace", HALL, *args)
    assert res.exit_code == 2, res.output
    assert "Traceback" not in res.output
    for w in words:
        assert w in res.output


@pytest.mark.parametrize("args,words", [
    (("--braced-bays", "ends"), ["has no bays"]),
    (("--ties-first",), ["--attach"]),
    (("--attach", "R3a", "--restraints", "never"), ["--restraints never"]),
    (("--planes", ","), ["at least one of roof, walls, plan"]),
])
def test_rules_that_cannot_apply_are_exit_2(args, words):
    # the canopy has no frame tag and no bay tag: no bays for a bay rule
    res = run("brace", MODELS / "canopy_sway.toml", *args)
    assert res.exit_code == 2 and "Traceback" not in res.output, res.output
    for w in words:
        assert w in res.output


def test_plane_holding_no_candidate_lists_those_that_do():
    # derived: the canopy's candidates are in its walls and its mono-pitch roof; none is level
    res = run("brace", MODELS / "canopy_sway.toml", "--planes", "plan")
    assert res.exit_code == 2 and "no candidate brace lies in the plan plane" in res.output
    assert "roof (" in res.output


def test_symmetric_on_a_frame_that_is_not():
    # derived: a panel with one joint off to the right has no mirror about x = 1
    f = Frame.from_arrays([[0, 0], [1, 0], [1, 1], [0, 1], [2, 0.3]],
                          [[0, 3], [1, 2], [2, 3], [1, 4]], supports={0: "pin", 1: "pin"})
    with pytest.raises(SpaceframeError, match="mirror image"):
        recommend_bracing(f, layout=LayoutRules(symmetric=True))


# ------------------------------------------------------------------ the designer's scheme

def test_compare_with_the_designers_scheme():
    # source: the models' own derivations: the braced hall (hall_roof_braced.toml) is held with
    # 40 states of self-stress, 234 - 161 = 73 members more than the unbraced hall; the
    # proposal is statically determinate (0 states: every added member is a key member).
    res = run("brace", HALL, "--json", "--alternatives", "0",
              "--compare", MODELS / "hall_roof_braced.toml")
    assert res.exit_code == 0, res.output
    doc = json.loads(res.stdout)["compare"]
    p, d = doc["proposal"], doc["designer"]
    assert d["members_added"] == 73 and d["mechanisms_left"] == 0
    assert d["self_stress_states"] == 40
    assert p["mechanisms_left"] == 0 and p["self_stress_states"] == 0
    assert p["key_members_added"] == p["members_added"] == 36
    assert doc["loads_from"] == "scheme"
    assert p["largest_brace_force"]["force"] > 0 and d["largest_brace_force"]["force"] > 0
    text = run("brace", HALL, "--alternatives", "0", "--compare",
               MODELS / "hall_roof_braced.toml").output
    assert "Compared with the designer's scheme" in text and "designer's scheme" in text


def test_compare_with_a_csv_list(tmp_path):
    # source: the canopy model's own derivation (one sway mechanism, held by a roof diagonal
    # of bay 3): a scheme of that one diagonal leaves nothing; a joint not in the model is
    # refused with its file and line.
    good = tmp_path / "good.csv"
    good.write_text("start,end\nR3a,R4b\n")
    res = run("brace", MODELS / "canopy_sway.toml", "--json", "--compare", good)
    doc = json.loads(res.stdout)["compare"]
    assert doc["designer"]["members_added"] == 1 and doc["designer"]["mechanisms_left"] == 0
    bad = tmp_path / "bad.csv"
    bad.write_text("start,end\nR1a,Q9\n")
    res = run("brace", MODELS / "canopy_sway.toml", "--compare", bad)
    assert res.exit_code == 2 and "'Q9'" in res.output


def test_tension_only_symmetric_keeps_both_diagonals_and_the_mirror():
    # source: common practice (a rod-braced panel takes both diagonals) and derived (mirror).
    frame = _box(5)
    r = recommend_bracing(frame, alternatives=0, tension_only=True,
                          layout=LayoutRules(symmetric=True))
    chosen = set(r.chosen)
    assert chosen and all(r.candidates.partner[i] in chosen for i in r.members_added)
    members, _ = _proposal_items(r)
    for _, p in _mirror_permutations(frame):
        assert {frozenset(p[j] for j in m) for m in members} == members
    assert r.after.stable and _dense_mechanisms(r.braced) == 0
