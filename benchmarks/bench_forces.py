"""Benchmark: member forces for 10 load cases on the 100,352-member grid, beside one audit.

Run from the repository root::

    python benchmarks/bench_forces.py              # double_layer_grid(112), medians of 3
    python benchmarks/bench_forces.py --nx 40      # smaller, quicker
    python benchmarks/bench_forces.py --supports minimal   # six restraints: one mechanism

The frame is :func:`spaceframe.families.double_layer_grid` (default supports:
a pin at each top corner), built in this process.  Ten load cases are made
deterministically on the top layer: a uniform load, four half-span loads,
four quarter-panel patches and one horizontal load along x.  Timed, in the
same process and rounds, each the median of ``--repeat`` runs:

- ``spaceframe.audit(frame)``: the audit as a user calls it (with soft modes);
- ``spaceframe.audit(frame, soft=False)``;
- ``spaceframe.forces(frame)``: every case (its own audit of the mechanisms,
  one factorisation, one block solve).

Target (issue 14): forces for the 10 cases at most 2 times one audit.  The
script also checks that every carried case balances (reactions sum to minus
the loads) and prints the largest relative residual.
"""

from __future__ import annotations

import argparse
import statistics
import sys
import time
from pathlib import Path

import numpy as np

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))  # benchmark the checkout, not an installed copy

TARGET = 2.0


def load_cases(frame):
    """Ten deterministic load cases on the top layer (ids ``T...``), kN."""
    from spaceframe.loads import LoadCase, LoadSet

    top = np.array([j.startswith("T") for j in frame.joint_ids])
    x, y = frame.coords[:, 0], frame.coords[:, 1]
    mx, my = np.median(x[top]), np.median(y[top])
    masks = {"uniform": top, "west half": top & (x < mx), "east half": top & (x > mx),
             "south half": top & (y < my), "north half": top & (y > my)}
    for qx in (0, 1):
        for qy in (0, 1):
            masks[f"patch {qx}{qy}"] = top & ((x < mx) == bool(qx)) & ((y < my) == bool(qy))
    cases = []
    for name, mask in masks.items():
        ids = tuple(np.array(frame.joint_ids)[mask])
        cases.append(LoadCase(name, ids, np.tile([0.0, 0.0, -1.2], (len(ids), 1))))
    edge = top & (x == x[top].min())
    ids = tuple(np.array(frame.joint_ids)[edge])
    cases.append(LoadCase("wind x", ids, np.tile([0.8, 0.0, 0.0], (len(ids), 1))))
    return LoadSet(cases=tuple(cases))


def timed(fn, repeat):
    times, out = [], None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times), out


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--nx", type=int, default=112)
    ap.add_argument("--supports", default="corners")
    ap.add_argument("--repeat", type=int, default=3)
    args = ap.parse_args(argv)

    import dataclasses

    import spaceframe
    from spaceframe.families import double_layer_grid

    frame = double_layer_grid(args.nx, supports=args.supports)
    frame = dataclasses.replace(frame, loads=load_cases(frame))
    print(f"double_layer_grid({args.nx}, supports={args.supports!r}): {frame.n_joints:,} joints, "
          f"{frame.n_members:,} members, {frame.n_restraints} restraints; "
          f"{len(frame.loads.cases)} load cases; median of {args.repeat}")
    t_audit, a = timed(lambda: spaceframe.audit(frame), args.repeat)
    t_fast, _ = timed(lambda: spaceframe.audit(frame, soft=False), args.repeat)
    t_forces, r = timed(lambda: spaceframe.forces(frame), args.repeat)
    worst = 0.0
    for i in np.flatnonzero(r.carried):
        R = np.zeros_like(r.loads[i])
        R[r.reaction_joints] = r.reactions[i]
        worst = max(worst, float(np.abs((r.loads[i] + R).sum(axis=0)).max()
                                 / np.abs(r.loads[i]).sum()))
    print(f"audit: {a.mechanisms} mechanisms, {a.self_stress_states:,} states of self-stress; "
          f"forces: {int(r.carried.sum())} of {len(r.names)} cases carried, method "
          f"{sorted(set(r.methods))}, largest equilibrium residual "
          f"{np.nanmax(r.residual) if r.carried.any() else float('nan'):.2g}, "
          f"reactions + loads {worst:.2g} of the load")
    print()
    print("| measurement | seconds | ratio to audit(frame) | target |")
    print("|---|---|---|---|")
    print(f"| `spaceframe.audit(frame)` | {t_audit:.2f} | 1.00 | |")
    print(f"| `spaceframe.audit(frame, soft=False)` | {t_fast:.2f} | {t_fast / t_audit:.2f} | |")
    met = "met" if t_forces <= TARGET * t_audit else "NOT met"
    print(f"| `spaceframe.forces(frame)`, 10 cases | {t_forces:.2f} | {t_forces / t_audit:.2f} "
          f"| <= {TARGET:g} x: {met} |")
    return 0 if met == "met" else 1


if __name__ == "__main__":
    sys.exit(main())
