"""Benchmark: restraint points and unrestrained lengths, beside the audit they read.

Run from the repository root::

    python benchmarks/bench_restraints.py              # the two frames below, medians of 3
    python benchmarks/bench_restraints.py --repeat 5

Frames (built in this process, :mod:`spaceframe.families`): a roof of 50 plane
trusses of 20 panels with untied bottom chords (``plane_truss_roof(50, 20)``:
5,079 members, 971 mechanisms, so many chords with joints that move) and a
double-layer grid (``double_layer_grid(60)``: 28,800 members, held, so every
joint is a restraint point).  Timed in the same process and rounds, each the
median of ``--repeat`` runs:

- ``spaceframe.audit(frame, soft=False, self_stress_cap=0, redundancy=False)``:
  the audit ``restraints`` makes when none is given (the reference);
- ``restraints(frame, audit=...)`` on that audit: chords, lateral directions,
  restraint points, lengths and the continuous-chord verdict.

The ratio is the cost of the restraint reading over the audit.
"""

from __future__ import annotations

import argparse
import statistics
import sys
import time
from pathlib import Path

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))  # benchmark the checkout, not an installed copy


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--repeat", type=int, default=3)
    args = ap.parse_args()

    import spaceframe
    from spaceframe.analysis.restraints import restraints
    from spaceframe.families import double_layer_grid, plane_truss_roof

    frames = [("roof 50 x 20, untied bottom chords", plane_truss_roof(50, 20)),
              ("grid 60 x 60", double_layer_grid(60))]
    print(f"{'frame':<36} {'members':>8} {'mech.':>6} {'chords':>7} {'audit s':>8} "
          f"{'restraints s':>13} {'ratio':>6}")
    for name, frame in frames:
        audits, reads = [], []
        for _ in range(args.repeat):
            t0 = time.perf_counter()
            found = spaceframe.audit(frame, soft=False, self_stress_cap=0, redundancy=False)
            t1 = time.perf_counter()
            r = restraints(frame, audit=found)
            t2 = time.perf_counter()
            audits.append(t1 - t0)
            reads.append(t2 - t1)
        a, b = statistics.median(audits), statistics.median(reads)
        print(f"{name:<36} {frame.n_members:>8,} {r.mechanisms:>6} {len(r.chords):>7} "
              f"{a:>8.2f} {b:>13.2f} {b / a:>6.2f}")


if __name__ == "__main__":
    main()
