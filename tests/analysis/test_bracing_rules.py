"""Member rules of a bracing proposal: one-way rods, needed ties, robustness, forces.

Sources, named per test:
- Roth & Whiteley, "Tensegrity frameworks", Trans. AMS 265(2), 1981, Theorem 5.2: a frame with
  tension-only members is held exactly when its two-way form has no mechanism and some state
  of self-stress is strictly positive in every tension-only member.  Checked here with a
  compatibility matrix built independently (``common.matrices.dense_compatibility``), numpy's
  SVD for the rank and scipy's ``linprog`` (its default method) for the proper state.
- "brute force": every subset of the candidates (itertools), each braced frame's mechanisms
  counted from that independent matrix by numpy's SVD.
- "derived": worked out by hand in the comment.
- "common practice": a rod carries tension only; a single rod holds a panel against racking
  one way only.
"""

from __future__ import annotations

import csv
import io
import itertools
import json
from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner
from scipy.optimize import linprog

import spaceframe
from spaceframe import Frame
from spaceframe.analysis.bracing import recommend_bracing
from spaceframe.edit import remove_members
from spaceframe.io import save
from spaceframe.tolerances import Limits, Tolerances
from spaceframe.views.bracing_document import bracing_document, bracing_notes

from common.bracing_frames import box_frame, plane_grid, small_extruded
from common.matrices import dense_compatibility

MODELS = Path(__file__).resolve().parents[2] / "models"


def _held(frame):
    return [(int(j), int(np.argmax(np.abs(e)))) for j, e in
            zip(frame.restraint_joint, frame.restraint_dir)]


def _matrix(frame, ends=None):
    ends = frame.ends.tolist() if ends is None else ends
    return dense_compatibility(frame.coords, ends, _held(frame))


def _mechanisms(C):
    if C.size == 0:
        return C.shape[1]
    s = np.linalg.svd(C, compute_uv=False)
    return C.shape[1] - int(np.sum(s > 1e-9 * s[0]))


def _proper_margin(C, rods):
    """Roth & Whiteley's condition 2 by linprog: max t, C.T s = 0, s_rod >= t, |s| <= 1."""
    m, n = C.shape
    c = np.zeros(m + 1)
    c[m] = -1.0
    A_ub = np.zeros((len(rods), m + 1))
    for k, e in enumerate(rods):
        A_ub[k, e], A_ub[k, m] = -1.0, 1.0
    res = linprog(c, A_ub=A_ub, b_ub=np.zeros(len(rods)),
                  A_eq=np.c_[C.T, np.zeros(n)], b_eq=np.zeros(n),
                  bounds=[(-1, 1)] * m + [(0, None)])
    assert res.status == 0
    return -res.fun


def _held_one_way(frame):
    """Held with its tension-only members acting one way (Roth & Whiteley, Theorem 5.2)."""
    C = _matrix(frame)
    labels = frame.member_tags.get("carries", ("",) * frame.n_members)
    rods = [k for k, lab in enumerate(labels) if lab == "tension"]
    return _mechanisms(C) == 0 and (not rods or _proper_margin(C, rods) > 1e-6)


def run(*args):
    from spaceframe.cli import main

    return CliRunner().invoke(main, [str(a) for a in args])


# ------------------------------------------------------------------------ one-way rods

def test_canopy_tension_only_rods_are_one_way_and_held(tmp_path):
    # source: Roth & Whiteley 1981, Theorem 5.2 (independent matrix, SVD and linprog).
    # The canopy's one sway mechanism needs one brace; as rods, a panel needs both diagonals
    # (common practice), which the re-audit checks one way.
    frame = spaceframe.load(MODELS / "canopy_sway.toml")
    r = recommend_bracing(frame, tension_only=True, alternatives=0)
    carries = r.braced.member_tags["carries"]
    assert carries[frame.n_members:] == ("tension",) * len(r.members_added) == ("tension",) * 2
    assert set(carries[:frame.n_members]) == {""}
    assert r.after.one_way is not None and r.after.one_way.held and r.after.stable
    assert _held_one_way(r.braced)
    # with one rod only (either), a motion slackens it: not held (common practice)
    for k in (0, 1):
        one = remove_members(r.braced, [frame.n_members + k])
        assert _mechanisms(_matrix(one)) == 0 and not _held_one_way(one)
    # brace --write writes the rods tagged; read back they are one-way and held
    out = tmp_path / "canopy_rods.toml"
    res = run("brace", MODELS / "canopy_sway.toml", "--tension-only", "--write", out, "--json")
    assert res.exit_code == 0, res.output
    doc = json.loads(res.stdout)
    assert [a["carries"] for a in doc["added"]] == ["tension", "tension"]
    assert doc["one_way"] is True and doc["one_way_held"] is True
    assert "[tags.members.carries]" in out.read_text()
    again = spaceframe.load(out)
    assert _held_one_way(again) and spaceframe.audit(again).one_way.held


def _mast(anchors, weights):
    """A mast 6 m high pinned at its foot; guy anchors pinned on the ground around it."""
    coords = [[0, 0, 0], [0, 0, 6.0]] + [list(a) + [0.0] for a in anchors]
    ids = ["foot", "top"] + [f"A{k}" for k in range(len(anchors))]
    frame = Frame.from_arrays(coords, [[0, 1]], joint_ids=ids,
                              supports={i: "pin" for i in range(len(coords)) if i != 1})
    listed = (np.array([[1, 2 + k] for k in range(len(anchors))]), np.asarray(weights, float))
    return frame, listed


def _on_all_sides(frame, r):
    """Guys on all sides: every horizontal direction v has a guy pulling the top along v
    (the anchors' plan directions surround the mast: largest angular gap < 180 degrees)."""
    X = frame.coords
    ang = sorted(float(np.arctan2(*(X[b, 1::-1] - X[1, 1::-1]))) for a, b in
                 (r.candidates.ends[i] for i in r.members_added))
    gaps = np.diff(ang + [ang[0] + 2 * np.pi])
    return len(ang) >= 3 and gaps.max() < np.pi - 1e-9


def test_guyed_mast_tension_only_has_guys_on_all_sides():
    # source: Roth & Whiteley 1981 (independent check) and derived: the top has 2 mechanisms
    # (the mast turns about its pinned foot); two guys hold it two-way but, as guys, both
    # go slack when the top moves between their anchors: the one-way repair adds guys until
    # they surround the mast.  The two cheapest guys pull to the east and north-east.
    anchors = [(4, 0), (-4, 0), (0, 4), (0, -4), (3, 3)]
    frame, listed = _mast(anchors, [1.0, 1.2, 1.1, 1.3, 0.9])
    two_way = recommend_bracing(frame, listed=listed, panels=False, alternatives=0)
    assert len(two_way.members_added) == 2 and not _on_all_sides(frame, two_way)
    r = recommend_bracing(frame, listed=listed, panels=False, tension_only=True,
                          alternatives=0)
    assert r.after.stable and r.after.one_way.held and _held_one_way(r.braced)
    assert _on_all_sides(frame, r)
    assert r.rules.repaired and r.rules.held
    assert r.braced.member_tags["carries"][1:] == ("tension",) * len(r.members_added)
    note = next(n for n in bracing_notes(r) if n.startswith("one-way members"))
    assert "greedy + repair" in note and "not proven the cheapest" in note


def test_guyed_mast_with_guys_to_one_side_is_not_held():
    # source: derived.  Every anchor east of the mast: a top moving west slackens every guy,
    # so no set of these guys holds it one way; the proposal says so and exits 1.
    frame, listed = _mast([(4, 1), (4, -1), (3, 0)], [1.0, 1.0, 1.0])
    r = recommend_bracing(frame, listed=listed, panels=False, tension_only=True,
                          alternatives=0)
    assert not r.after.stable and not r.rules.held
    assert any("cannot hold it" in n for n in bracing_notes(r))


def test_x_braced_bay_with_tension_only_rods_is_held():
    # source: Roth & Whiteley 1981 (independent check); common practice: a bay of a plane
    # frame braced with rods needs both diagonals.  A 4 x 3 bay pinned at its feet sways.
    frame = Frame.from_arrays([[0, 0], [0, 3], [4, 3], [4, 0]], [[0, 1], [1, 2], [2, 3]],
                              joint_ids=list("ABCD"), supports={0: "pin", 3: "pin"})
    r = recommend_bracing(frame, tension_only=True, alternatives=0)
    assert sorted(map(tuple, r.candidates.ends[r.members_added].tolist())) == [(0, 2), (1, 3)]
    assert r.after.stable and _held_one_way(r.braced)


def test_model_rods_are_tested_one_way_without_the_option():
    # source: Roth & Whiteley 1981; derived: the bay's own rod A-C holds it against sway to
    # +x only (two-way it is held, so the audit finds no mechanism); the proposal adds the
    # other diagonal as an ordinary member, which the one-way test then holds.
    frame = Frame.from_arrays([[0, 0], [0, 3], [4, 3], [4, 0]],
                              [[0, 1], [1, 2], [2, 3], [0, 2]], joint_ids=list("ABCD"),
                              member_ids=["AB", "BC", "CD", "AC"],
                              supports={0: "pin", 3: "pin"},
                              member_tags={"carries": ("", "", "", "tension")})
    assert spaceframe.audit(frame).mechanisms == 0 and not _held_one_way(frame)
    r = recommend_bracing(frame, within=5.5, alternatives=0)
    assert r.rules.one_way and r.rules.repaired
    assert r.candidates.ends[r.members_added].tolist() == [[1, 3]]
    assert r.braced.member_tags["carries"] == ("", "", "", "tension", "")
    assert r.after.stable and _held_one_way(r.braced)
    res = run_frame(frame, "brace")
    assert "Nothing to brace" not in res


def run_frame(frame, *args):
    """The text of ``brace`` on a frame written to a temporary model file."""
    import tempfile

    with tempfile.TemporaryDirectory() as d:
        path = Path(d) / "bay.toml"
        save(frame, path)
        return run(*args, path, "--within", "5.5").output


def test_needed_ties_come_with_their_diagonal():
    # source: derived.  A diagonal of a panel closed by tie candidates is a brace only with
    # those ties: with_needed_ties adds exactly the panel's sides that no member joins
    # (frames.missing_ties), and the frame braced with them has every side of the panel.
    from spaceframe.analysis.bracing import braced_frame, find_candidates
    from spaceframe.analysis.bracing.frames import missing_ties
    from spaceframe.analysis.bracing.rules import with_needed_ties

    frame = small_extruded(2)
    cand = find_candidates(frame)
    diagonals = [i for i, o in enumerate(cand.origin) if o == "tie panel"]
    assert diagonals
    for i in diagonals:
        got = with_needed_ties(cand, [i])
        assert got[0] == i and all(cand.origin[t] == "tie" for t in got[1:])
        want = {frozenset(p) for p in missing_ties(frame, cand.panel[i])}
        assert {frozenset(cand.ends[t].tolist()) for t in got[1:]} == want and want
        edges = {frozenset(e) for e in braced_frame(frame, cand, got).ends.tolist()}
        corners = cand.panel[i]
        assert all(frozenset(s) in edges for s in zip(corners, corners[1:] + corners[:1]))
        assert with_needed_ties(cand, got) == got      # nothing twice
    for seed in range(1, 6):        # and every proposal has its tie panels' sides
        frame = small_extruded(seed)
        for robust in (False, True):
            r = recommend_bracing(frame, robust=robust, alternatives=0, forces=False)
            edges = {frozenset(e) for e in r.braced.ends.tolist()}
            for i in r.members_added:
                corners = r.candidates.panel[i]
                if r.candidates.origin[i] == "tie panel":
                    assert all(frozenset(s) in edges
                               for s in zip(corners, corners[1:] + corners[:1]))


# ------------------------------------------------------------------------------ robust

def _survives_each_loss(frame, r):
    """Held after the loss of any one added member or restraint (independent SVD)."""
    X = frame.coords
    ends = frame.ends.tolist() + [r.candidates.ends[i].tolist() for i in r.members_added]
    held = _held(frame) + [(int(r.candidates.joint[i]),
                            int(np.argmax(np.abs(r.candidates.direction[i]))))
                           for i in r.restraints_added]
    assert _mechanisms(dense_compatibility(X, ends, held)) == 0
    for k in range(frame.n_members, len(ends)):
        if _mechanisms(dense_compatibility(X, ends[:k] + ends[k + 1:], held)) != 0:
            return False
    for k in range(frame.n_restraints, len(held)):
        if _mechanisms(dense_compatibility(X, ends, held[:k] + held[k + 1:])) != 0:
            return False
    return True


@pytest.mark.parametrize("model", ["canopy_sway.toml", "hall_roof_unbraced.toml"])
def test_robust_demo_survives_the_loss_of_any_added_member(model):
    # source: numpy's dense SVD of a compatibility matrix built in the test, each added
    # member (and restraint) taken out in turn.
    frame = spaceframe.load(MODELS / model)
    default = recommend_bracing(frame, alternatives=0, forces=False)
    r = recommend_bracing(frame, robust=True, alternatives=0, forces=False)
    assert r.after.stable and _survives_each_loss(frame, r)
    assert not _survives_each_loss(frame, default)
    assert not any(r.rules.key) and all(default.rules.key)
    assert r.cost >= default.cost
    doc = bracing_document(r)
    assert doc["robust"]["method"] in ("exact", "greedy")
    assert doc["robust"]["ratio"] == pytest.approx(r.cost / r.robust.least_cost)
    assert any(n.startswith("robust:") and f"({r.cost / r.robust.least_cost:.2f} x)" in n
               for n in doc["notes"])
    one = "the added member is key" if len(default.chosen) == 1 else "every added member is key"
    assert any(n.startswith(one + ": losing") for n in bracing_document(default)["notes"])


def _cheapest_robust(frame, cand_ends):
    """Brute force: the least total length of a candidate set that holds the frame and
    still does after the loss of any one of its members (itertools over every subset)."""
    X, ends, held = frame.coords, frame.ends.tolist(), _held(frame)
    L = [float(np.linalg.norm(X[a] - X[b])) for a, b in cand_ends]
    best = np.inf
    for size in range(1, len(cand_ends) + 1):
        for sub in itertools.combinations(range(len(cand_ends)), size):
            cost = sum(L[i] for i in sub)
            if cost >= best:
                continue
            chosen = [list(cand_ends[i]) for i in sub]
            if _mechanisms(dense_compatibility(X, ends + chosen, held)):
                continue
            if all(_mechanisms(dense_compatibility(X, ends + chosen[:k] + chosen[k + 1:],
                                                   held)) == 0 for k in range(size)):
                best = cost
    return best


@pytest.mark.parametrize("make,seed", [(plane_grid, 1), (plane_grid, 2), (plane_grid, 3),
                                       (box_frame, 1), (box_frame, 2)])
def test_robust_is_the_cheapest_such_set_by_brute_force(make, seed):
    # source: brute force over every subset of the candidates (itertools), independent SVD.
    frame = make(seed)
    r = recommend_bracing(frame, robust=True, alternatives=0, forces=False)
    cand_ends = [tuple(e) for e in r.candidates.ends.tolist()]
    assert 4 <= len(cand_ends) <= 12
    best = _cheapest_robust(frame, cand_ends)
    assert r.robust.method == "exact"
    assert r.total_length == pytest.approx(best, abs=1e-9)
    assert _survives_each_loss(frame, r)
    # the greedy augmentation (no exact search): still robust, never cheaper than the best
    tol = Tolerances(limits=Limits(robust_search=0))
    g = recommend_bracing(frame, robust=True, alternatives=0, forces=False, tol=tol)
    assert g.robust.method in ("greedy", "exact") and _survives_each_loss(frame, g)
    assert g.total_length >= best - 1e-9


def test_robust_tension_only_mast_says_what_stays_key():
    # source: derived.  Five guys around the mast; losing the only guy to the west (or to the
    # south) leaves no guy to pull that way, so those two stay key.
    anchors = [(4, 0), (-4, 0), (0, 4), (0, -4), (3, 3)]
    frame, listed = _mast(anchors, [1.0, 1.2, 1.1, 1.3, 0.9])
    r = recommend_bracing(frame, listed=listed, panels=False, tension_only=True, robust=True,
                          alternatives=0, forces=False)
    assert r.after.stable
    key = {frame.joint_ids[r.candidates.ends[i][1]] for i, k in zip(r.chosen, r.rules.key) if k}
    assert key == {"A1", "A3"}
    assert any("stay key" in n for n in bracing_notes(r))


# ------------------------------------------------------------------------------ forces

def test_forces_in_the_added_diagonal_by_the_method_of_joints():
    # source: derived by the method of joints.  Bay A(0,0) B(0,3) C(4,3) D(4,0), pinned at
    # A and D, no load case: 1 kN down at B and C and a notional 1/200 of it, H = 0.005 at B
    # and at C.  With one diagonal the bay is determinate: joint B gives N_BC = -H, joint C
    # then 0.8 N_diag = 2 H, N_diag = 0.0125 (tension for A-C under +x, compression under -x;
    # the other diagonal B-D the reverse).
    frame = Frame.from_arrays([[0, 0], [0, 3], [4, 3], [4, 0]], [[0, 1], [1, 2], [2, 3]],
                              joint_ids=list("ABCD"), supports={0: "pin", 3: "pin"})
    r = recommend_bracing(frame, alternatives=0)
    pf = r.proposal_forces
    assert pf.source == "unit" and pf.notional == pytest.approx(1 / 200)
    assert pf.names == ("unit vertical notional +x", "unit vertical notional -x")
    ac = r.candidates.ends[r.members_added[0]].tolist() == [0, 2]
    want = 0.0125 if ac else -0.0125
    assert pf.members[:, 0] == pytest.approx([want, -want], abs=1e-9)
    doc = bracing_document(r)
    entry = doc["added"][0]["forces"]
    assert entry["compression"][0] == pytest.approx(-0.0125, abs=1e-9)
    assert "buckling" in entry["note"]
    assert "local codes set it" in doc["forces"]["basis"]
    # as rods both diagonals come, each carries 0.0125 one way and goes slack the other
    rods = recommend_bracing(frame, tension_only=True, alternatives=0)
    pf = rods.proposal_forces
    assert np.sort(pf.members, axis=1).ravel() == pytest.approx([0, 0.0125, 0, 0.0125], abs=1e-9)
    assert pf.slack.sum(axis=1).tolist() == [1, 1]
    notes = [f["note"] for f in (a["forces"] for a in bracing_document(rods)["added"])]
    assert all("goes slack" in n and "the other diagonal of its panel" in n for n in notes)


def test_forces_under_the_model_cases_in_text_json_and_csv(tmp_path):
    # source: the canopy file's own loads: wind_y (across the canopy) reaches the sway of
    # lines 4 and 5 only through the added brace, so it is in tension or compression there;
    # gravity alone is carried without it (the model's own derivation).
    csv_path = tmp_path / "list.csv"
    res = run("brace", MODELS / "canopy_sway.toml", "--json", "--csv", csv_path)
    assert res.exit_code == 0, res.output
    doc = json.loads(res.stdout)
    f = doc["added"][0]["forces"]
    assert abs(f["cases"]["wind_y"]) > 0.1 and abs(f["cases"]["roof"]) < 1e-6
    assert set(doc["forces"]["cases"]) >= {"roof", "wind_y", "roof notional +y"}
    rows = list(csv.DictReader(io.StringIO(csv_path.read_text())))
    assert rows[0]["key"] == "key" and rows[0]["carries"] == "both"
    assert float(rows[0]["tension_max_kN"] or rows[0]["compression_max_kN"]) != 0
    text = run("brace", MODELS / "canopy_sway.toml").output
    assert "Forces in what is added (kN" in text and "local codes set it" in text
    bare = json.loads(run("brace", MODELS / "canopy_sway.toml", "--json", "--no-forces").stdout)
    assert bare["forces"] is None and "forces" not in bare["added"][0]
    assert "the added member is key: losing it brings a mechanism back" in text


def test_cli_guys_from_a_candidate_list_tension_only(tmp_path):
    # source: derived, as test_guyed_mast_tension_only_has_guys_on_all_sides; through the
    # command line, the user's list is kept under --tension-only and every guy is a rod.
    anchors = [(4, 0), (-4, 0), (0, 4), (0, -4), (3, 3)]
    frame, _ = _mast(anchors, [1.0] * 5)
    model = tmp_path / "mast.toml"
    save(frame, model)
    guys = tmp_path / "guys.csv"
    guys.write_text("start,end,weight\n" + "".join(
        f"top,A{k},{w}\n" for k, w in enumerate([1.0, 1.2, 1.1, 1.3, 0.9])))
    res = run("brace", model, "--no-panels", "--candidates", guys, "--tension-only", "--json")
    assert res.exit_code == 0, res.output
    doc = json.loads(res.stdout)
    assert doc["one_way_held"] is True and len(doc["added"]) >= 3
    assert {a["carries"] for a in doc["added"]} == {"tension"}
    assert {a["origin"] for a in doc["added"]} == {"listed"}
    assert any(a["added_for"] == "one-way repair" for a in doc["added"])


def test_stage_mast_demo_gets_guys_all_round():
    # source: Roth & Whiteley 1981 (independent check) and derived: the two shortest guys
    # (north 9.43 m, east 9.71 m) hold the head two-way, but both go slack when it moves
    # between them; the repair adds the west guy (10.0 m), then the south one (10.25 m)
    # against a movement north that slackens the north guy alone.
    from spaceframe.io.candidates import read_candidate_list

    frame = spaceframe.load(MODELS / "stage_mast.toml")
    listed = read_candidate_list(MODELS / "stage_mast.guys.csv", frame)[:2]
    r = recommend_bracing(frame, listed=listed, panels=False, tension_only=True,
                          alternatives=0)
    anchors = [frame.joint_ids[r.candidates.ends[i][1]] for i in r.members_added]
    assert anchors == ["AN", "AE", "AW", "AS"]
    assert r.after.stable and _held_one_way(r.braced)
    assert _on_all_sides(frame, r)



def test_robust_search_splits_into_independent_parts():
    # source: derived.  Two bays 4 x 3 apart (no member joins them), each pinned at its feet,
    # sway independently: the matroid has two components (Krogdahl 1977), each needing both
    # of its diagonals (5 m) to survive the loss of one, so 4 diagonals, 20 m, proven by the
    # search part by part; checked again by losing each in turn (independent SVD).
    coords = [[0, 0], [0, 3], [4, 3], [4, 0], [10, 0], [10, 3], [14, 3], [14, 0]]
    ends = [[0, 1], [1, 2], [2, 3], [4, 5], [5, 6], [6, 7]]
    frame = Frame.from_arrays(coords, ends, supports={j: "pin" for j in (0, 3, 4, 7)})
    r = recommend_bracing(frame, robust=True, alternatives=0, forces=False)
    assert r.robust.method == "exact" and r.robust.parts == 2 and r.robust.exact_parts == 2
    assert len(r.members_added) == 4 and r.total_length == pytest.approx(20.0)
    assert _survives_each_loss(frame, r)
    assert any("in 2 independent parts" in n for n in bracing_notes(r))
