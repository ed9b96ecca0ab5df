"""Benchmark of the bracing selection: 10,000 candidates on a 20,000-member frame.

The frame is a 50 x 50 double-layer grid (:func:`spaceframe.families.double_layer_grid`,
20,000 members, pinned along the top perimeter) from which the four diagonals of 100
bottom joints (every fifth joint each way) are removed: each of those joints then hangs
on four coplanar bottom chords and moves freely up and down, 100 mechanisms.  The
candidates are the removed diagonals and the diagonals of the grid's planar panels,
10,000 in all, taken in a fixed order.  Everything is deterministic.

    python benchmarks/bench_brace.py [--quick]

Prints a table: time to audit the frame as given, to gather the candidates, to select
(reaches and the greedy pass), to re-audit the braced frame, with the target beside; then
the robust proposal (no added member whose loss brings a mechanism back) beside the
default one: its selection (the greedy pass, the exact search up to its limit, the greedy
augmentation), the key-member check and the re-audit, with the ratio of each to the
default's, and the robust set's size and cost against the least-cost basis.  Then the
layout rules (:mod:`spaceframe.analysis.bracing.layout`) on the same candidates, side by
side with the default: for each, the rules' preparation (costs, filters, groups), the
reaches and the choice, its ratio to the default, the count chosen and what the re-audit
leaves.  The grid's members are tagged with a bay (10 bays of 5 grid spacings along x) so
that the braced-bay rules have bays to work on.
"""

from __future__ import annotations

import argparse
import time

import numpy as np

from spaceframe import Frame, audit
from spaceframe.analysis.bracing import (braced_frame, find_candidates, greedy_basis,
                                         reach_rows)
from spaceframe.analysis.bracing import layout
from spaceframe.analysis.bracing.layout import LayoutRules
from spaceframe.analysis.bracing.robust import robust_elements
from spaceframe.analysis.bracing.rules import coloops
from spaceframe.analysis.bracing.selection import _s_max
from spaceframe.families import double_layer_grid

TARGET = 10.0  # seconds, selection + re-audit, on the 2-core benchmark machine


def frame_with_mechanisms(n: int, step: int = 5):
    grid = double_layer_grid(n, supports="perimeter")
    hung = {f"B{i}_{j}" for i in range(2, n, step) for j in range(2, n, step)}
    ids = grid.joint_ids
    keep, removed = [], []
    for k, (mid, (a, b)) in enumerate(zip(grid.member_ids, grid.ends.tolist())):
        diagonal = mid.startswith("D")
        (removed if diagonal and (ids[a] in hung or ids[b] in hung) else keep).append(k)
    X = grid.coords
    mid_x = 0.5 * (X[grid.ends[keep, 0], 0] + X[grid.ends[keep, 1], 0])
    span = float(np.ptp(X[:, 0])) or 1.0
    bay = tuple(str(min(10, int(10 * (x - X[:, 0].min()) / span) + 1)) for x in mid_x.tolist())
    frame = Frame(joint_ids=grid.joint_ids, coords=grid.coords,
                  member_ids=tuple(grid.member_ids[k] for k in keep), ends=grid.ends[keep],
                  restraint_joint=grid.restraint_joint, restraint_dir=grid.restraint_dir,
                  name=f"{grid.name}, {len(hung)} bottom joints hanging",
                  member_tags={"bay": bay})
    return frame, grid.ends[removed], len(hung)


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="a 20 x 20 grid instead")
    args = ap.parse_args()
    n, want = (20, 1_600) if args.quick else (50, 10_000)
    frame, removed, hung = frame_with_mechanisms(n, step=5)
    opts = dict(self_stress_cap=0, redundancy=False, soft=False)
    rows = []

    t = time.perf_counter()
    before = audit(frame, **opts)
    rows.append(("audit as given", time.perf_counter() - t))
    k = before.mechanisms

    t = time.perf_counter()
    cand = find_candidates(frame, listed=(removed, np.full(len(removed), np.nan)))
    listed = [i for i, o in enumerate(cand.origin) if o == "listed"]
    others = [i for i, o in enumerate(cand.origin) if o != "listed"]
    cand = cand.subset(np.sort(listed + others[:max(0, want - len(listed))]))
    rows.append(("candidates (panels found)", time.perf_counter() - t))

    t = time.perf_counter()
    U = before.modes.dense().reshape(k, -1).T        # 100 modes: small enough to expand
    Q, _ = np.linalg.qr(U)
    reach = np.asarray(reach_rows(frame, cand) @ Q)
    kept = greedy_basis(reach, cand.order(), 1e-6 * _s_max(frame))
    select = time.perf_counter() - t
    rows.append(("selection (reach + greedy)", select))

    # the same with the removed diagonals made the dearest, so that the pass goes through
    # every panel diagonal (none of which acts on a vertical movement) before them
    t = time.perf_counter()
    dear = cand.cost + 1000.0 * np.array([o == "listed" for o in cand.origin])
    order = np.lexsort((cand.order().argsort(), dear))
    worst = greedy_basis(reach, order, 1e-6 * _s_max(frame))
    rows.append(("selection, dearest last (greedy)", time.perf_counter() - t))
    assert sorted(worst) == sorted(kept)

    t = time.perf_counter()
    after = audit(braced_frame(frame, cand, kept), **opts)
    reaudit = time.perf_counter() - t
    rows.append(("re-audit of the braced frame", reaudit))

    print(f"frame: {frame.n_members} members, {frame.n_joints} joints, {k} mechanisms "
          f"({hung} hanging joints); {len(cand)} candidates")
    print(f"chosen {len(kept)}; after re-audit: {after.mechanisms} mechanisms")
    print(f"{'step':32s} {'seconds':>8s}")
    for name, sec in rows:
        print(f"{name:32s} {sec:8.2f}")
    total = select + reaudit
    print(f"{'selection + re-audit':32s} {total:8.2f}   target <= {TARGET:.0f} s: "
          f"{'met' if total <= TARGET else 'NOT met'}")
    robust_side_by_side(frame, cand, before, U, opts)
    print()
    layout_table(frame, cand, Q, k, opts)


def robust_side_by_side(frame, cand, before, U, opts, repeats: int = 3):
    """The default and the robust proposal on the same reaches, medians of ``repeats``."""
    threshold = 1e-6 * _s_max(frame)
    Q, _ = np.linalg.qr(U)
    reach = np.asarray(reach_rows(frame, cand) @ Q)
    order = cand.order()
    times = {key: [] for key in ("default select", "robust select", "default key",
                                 "robust key", "default re-audit", "robust re-audit")}
    for _ in range(repeats):
        t = time.perf_counter()
        basis = greedy_basis(reach, order, threshold)
        times["default select"].append(time.perf_counter() - t)
        t = time.perf_counter()
        basis_r = greedy_basis(reach, order, threshold)
        rc = robust_elements(reach, order, cand.cost, cand.is_member, basis_r, threshold)
        times["robust select"].append(time.perf_counter() - t)
        for name, chosen in (("default", basis), ("robust", list(rc.elements))):
            t = time.perf_counter()
            _, key = coloops(reach[chosen], threshold)
            times[f"{name} key"].append(time.perf_counter() - t)
            t = time.perf_counter()
            after = audit(braced_frame(frame, cand, chosen), **opts)
            times[f"{name} re-audit"].append(time.perf_counter() - t)
            if name == "robust":
                assert after.mechanisms == 0 and not key.any()
    med = {k: float(np.median(v)) for k, v in times.items()}
    cost = lambda ids: float(cand.cost[list(ids)].sum())  # noqa: E731
    print()
    print(f"robust proposal ({rc.method}; exact search looked at {rc.searched} subsets): "
          f"{len(rc.elements)} members against {len(basis)}, cost {cost(rc.elements):.1f} "
          f"against {cost(basis):.1f} ({cost(rc.elements) / cost(basis):.2f} x); "
          f"medians of {repeats}")
    print(f"{'step':22s} {'default s':>10s} {'robust s':>10s} {'ratio':>7s}")
    for step in ("select", "key", "re-audit"):
        a, b = med[f"default {step}"], med[f"robust {step}"]
        print(f"{step:22s} {a:10.3f} {b:10.3f} {b / a:7.1f}")
    a = sum(med[f"default {s}"] for s in ("select", "key", "re-audit"))
    b = sum(med[f"robust {s}"] for s in ("select", "key", "re-audit"))
    print(f"{'total':22s} {a:10.3f} {b:10.3f} {b / a:7.1f}")


def layout_table(frame, cand, Q, k, opts, repeats: int = 3):
    """The layout rules against the default, on the same candidates; medians of ``repeats``."""
    threshold = 1e-6 * _s_max(frame)
    runs = [("default (no rule)", None, "auto"),
            ("planes roof,walls", LayoutRules(planes=("roof", "walls")), "auto"),
            ("braced bays ends", LayoutRules(braced_bays="ends"), "auto"),
            ("braced bays every:3", LayoutRules(braced_bays="every:3"), "auto"),
            ("symmetric", LayoutRules(symmetric=True), "auto"),
            ("cost brace=1.5, restraints always",
             LayoutRules(costs={"brace": 1.5}), "always")]
    print(f"{'layout rule':34s} {'seconds':>8s} {'ratio':>6s} {'chosen':>7s} {'left':>5s}  "
          f"{'search':s}")
    base = None
    for name, rules, restraints in runs:
        times = []
        for _ in range(repeats):
            t = time.perf_counter()
            c2, plan = layout.prepare(frame, cand, rules, restraints=restraints)
            reach = np.asarray(reach_rows(frame, c2) @ Q)
            if plan.search:
                chosen, _, choice = layout.select(plan, c2, reach, threshold)
                how = f"{choice.method}, {choice.tried} tried"
            else:
                chosen = greedy_basis(reach, c2.order(), threshold)
                how = "matroid greedy"
            times.append(time.perf_counter() - t)
        sec = float(np.median(times))
        base = sec if base is None else base
        left = audit(braced_frame(frame, c2, chosen), **opts).mechanisms
        print(f"{name:34s} {sec:8.2f} {sec / base:6.2f} {len(chosen):7d} {left:5d}  {how}")


if __name__ == "__main__":
    main()
