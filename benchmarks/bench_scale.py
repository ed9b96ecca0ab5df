"""Benchmark: audit time and peak memory against the number of members, two frame families.

Run from the repository root::

    python benchmarks/bench_scale.py                  # 10^3 ... 10^5 members
    python benchmarks/bench_scale.py --max 1000000    # up to 10^6 (minutes)

Families, generated deterministically by :mod:`spaceframe.families`:

* a double-layer grid (``double_layer_grid``, six restraints: the free grid's
  twist is its one mechanism), members ``8 nx^2``;
* a scaffold wrap: a facade scaffold two frames deep (standards, ledgers and
  transoms at every lift, a diagonal in every bay of both faces and every
  transom bay), pinned at every base joint; ``_scaffold`` below, members
  about ``10 nx nz`` for ``nx`` bays along and ``nz`` lifts up.  (A lone
  four-legged tower, ``braced_tower``, is not used: at 10^4 members it is
  about 1,000 times taller than wide, and its bending modes then sit within a
  factor two of the rank threshold, which the audit reports as a decision
  that is not clear-cut.)

Each size is audited once in a fresh Python process (``audit(frame,
soft=False)``: counts, mechanism basis and its account, self-stress count,
key members), timing the audit alone and reading the process's peak resident
memory.  Where the dense matrix is small enough (at most ``--dense-max``
members) the same process also runs the dense reference,
``scipy.linalg.null_space`` of the compatibility matrix and of its transpose,
and checks the counts agree; its time and the ratio are printed beside.  The
growth exponent is the least-squares slope of log(time) against
log(members) over the sizes of at least 10^4 members.
"""

from __future__ import annotations

import argparse
import json
import math
import os
import resource
import subprocess
import sys
import time
from pathlib import Path

import numpy as np

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))  # the checkout, not an installed copy


def _scaffold(nx: int, nz: int, bay: float = 2.5, lift: float = 2.0, depth: float = 1.0):
    """A facade scaffold of ``nx`` bays and ``nz`` lifts, two frames deep, fully braced."""
    from spaceframe import Frame

    def j(i, k, side):
        return (k * (nx + 1) + i) * 2 + side

    X = np.array([[i * bay, side * depth, k * lift] for k in range(nz + 1)
                  for i in range(nx + 1) for side in (0, 1)])
    E = []
    for k in range(nz + 1):
        for i in range(nx + 1):
            if k:
                E += [[j(i, k - 1, 0), j(i, k, 0)], [j(i, k - 1, 1), j(i, k, 1)]]   # standards
                E.append([j(i, k, 0), j(i, k, 1)])                                  # transom
            if i < nx:
                E += [[j(i, k, 0), j(i + 1, k, 0)], [j(i, k, 1), j(i + 1, k, 1)]]   # ledgers
                if k:
                    E += [[j(i, k - 1, 0), j(i + 1, k, 0)], [j(i, k - 1, 1), j(i + 1, k, 1)]]
                    E.append([j(i, k, 0), j(i + 1, k, 1)])                          # plan brace
            if k and i == 0:
                E.append([j(i, k - 1, 0), j(i, k, 1)])                              # end frame
    sup = {j(i, 0, side): "pin" for i in range(nx + 1) for side in (0, 1)}
    return Frame.from_arrays(X, E, supports=sup, name=f"scaffold {nx} x {nz}")


def _frame(family: str, members: int):
    from spaceframe.families import double_layer_grid

    if family == "grid":
        return double_layer_grid(max(2, round(math.sqrt(members / 8))), supports="minimal")
    n = max(2, round(math.sqrt(members / 10)))
    return _scaffold(2 * n, max(1, n // 2))


def _dense_counts(frame):
    """Counts from ``scipy.linalg.null_space`` of the dense compatibility matrix."""
    from scipy.linalg import null_space

    from bench_audit import dense_compatibility  # the one dense reference of the benchmarks

    C, _ = dense_compatibility(frame)
    t0 = time.perf_counter()
    mech, stress = null_space(C).shape[1], null_space(C.T).shape[1]
    return mech, stress, time.perf_counter() - t0


def _child(family: str, members: int, dense_max: int) -> None:
    import spaceframe

    frame = _frame(family, members)
    spaceframe.audit(_frame(family, 1000), soft=False)      # imports and first calls
    t0 = time.perf_counter()
    r = spaceframe.audit(frame, soft=False)
    seconds = time.perf_counter() - t0
    out = {"members": frame.n_members, "joints": frame.n_joints, "seconds": seconds,
           "mechanisms": r.mechanisms, "self_stress": r.self_stress_states,
           "peak": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024}
    if frame.n_members <= dense_max:
        m, s, dense_s = _dense_counts(frame)
        out.update(dense_seconds=dense_s, dense_same=(m, s) == (r.mechanisms,
                                                                r.self_stress_states))
    print(json.dumps(out))


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--max", type=float, default=1e5, help="largest size, in members")
    ap.add_argument("--dense-max", type=int, default=3000,
                    help="run the dense reference up to this many members")
    ap.add_argument("--child", nargs=3, help=argparse.SUPPRESS)
    args = ap.parse_args()
    if args.child:
        _child(args.child[0], int(args.child[1]), int(args.child[2]))
        return
    sizes = [int(10 ** e) for e in np.arange(3, math.log10(args.max) + 1e-9, 0.5)]
    env = dict(os.environ, PYTHONPATH=str(REPO))
    print(f"command: python benchmarks/bench_scale.py --max {args.max:g}")
    print(f"{'family':8} {'members':>10} {'joints':>9} {'audit s':>9} {'peak MiB':>9} "
          f"{'mech':>5} {'self-stress':>11} {'dense s':>9} {'ratio':>7}")
    for family in ("grid", "scaffold"):
        rows = []
        for size in sizes:
            done = subprocess.run([sys.executable, __file__, "--child", family, str(size),
                                   str(args.dense_max)], env=env, capture_output=True,
                                  text=True)
            if done.returncode:
                sys.stderr.write(done.stderr)
                raise SystemExit(f"the {family} of {size} members failed")
            r = json.loads(done.stdout.strip().splitlines()[-1])
            rows.append(r)
            dense = ratio = ""
            if "dense_seconds" in r:
                dense = f"{r['dense_seconds']:.2f}"
                ratio = f"{r['dense_seconds'] / r['seconds']:.0f}x"
                if not r["dense_same"]:
                    ratio += " DIFFER"
            print(f"{family:8} {r['members']:>10,} {r['joints']:>9,} {r['seconds']:>9.2f} "
                  f"{r['peak'] / 2**20:>9,.0f} {r['mechanisms']:>5} {r['self_stress']:>11,} "
                  f"{dense:>9} {ratio:>7}", flush=True)
        big = [r for r in rows if r["members"] >= 10_000]
        if len(big) >= 2:
            slope = np.polyfit(np.log([r["members"] for r in big]),
                               np.log([r["seconds"] for r in big]), 1)[0]
            print(f"{family:8} growth exponent of the audit time (sizes >= 10^4): {slope:.2f}")


if __name__ == "__main__":
    main()
