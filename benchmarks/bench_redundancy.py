"""Benchmark: key members and redundancy shares on a grid of about 10,000 members.

Run from the repository root::

    python benchmarks/bench_redundancy.py

A double-layer grid 35 x 35 (9,800 members) on perimeter supports is audited
without and with every member's redundancy share; the table gives the median
of three runs of each, side by side, and checks that the shares sum to the
number of states of self-stress (the trace of a projector).
"""

from __future__ import annotations

import statistics
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))  # the checkout, not an install

from spaceframe import audit  # noqa: E402
from spaceframe.families import double_layer_grid  # noqa: E402


def main() -> None:
    frame = double_layer_grid(35, supports="perimeter")
    audit(double_layer_grid(4), soft=False)  # warm-up: imports and first calls
    plain, shares = [], []
    for _ in range(3):
        t0 = time.perf_counter()
        audit(frame, soft=False, redundancy=False)
        plain.append(time.perf_counter() - t0)
        t0 = time.perf_counter()
        r = audit(frame, soft=False, redundancy=True)
        shares.append(time.perf_counter() - t0)
    total = float(r.redundancy.sum())
    print(f"double-layer grid 35x35: {frame.n_joints:,} joints, {frame.n_members:,} members, "
          f"{r.self_stress_states:,} states of self-stress, {len(r.key_members)} key members")
    print(f"  audit without redundancy shares, median of 3   {statistics.median(plain):8.2f} s")
    print(f"  audit with every member's share, median of 3   {statistics.median(shares):8.2f} s")
    print(f"  sum of the shares {total:.6f} vs states of self-stress {r.self_stress_states}: "
          f"{'equal' if abs(total - r.self_stress_states) < 1e-6 * r.self_stress_states else 'DIFFER'}")


if __name__ == "__main__":
    main()
