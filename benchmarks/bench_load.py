"""Benchmark: reading a million-member model from TOML, JSON and the binary .npz format.

Run from the repository root::

    python benchmarks/bench_load.py [--nx 354]

A double-layer grid of ``8 nx^2`` members (default 1,002,528) is written once
in each native format; each is then read with :func:`spaceframe.load` in a
fresh process, three times, and the median is printed beside the file size.
"""

from __future__ import annotations

import argparse
import json
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))


def _child(path: str) -> None:
    import spaceframe

    t0 = time.perf_counter()
    f = spaceframe.load(path)
    print(json.dumps({"seconds": time.perf_counter() - t0, "members": f.n_members}))


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--nx", type=int, default=354)
    ap.add_argument("--child", help=argparse.SUPPRESS)
    args = ap.parse_args()
    if args.child:
        _child(args.child)
        return
    from spaceframe.families import double_layer_grid
    from spaceframe.io import save

    frame = double_layer_grid(args.nx, supports="minimal")
    env = dict(os.environ, PYTHONPATH=str(REPO))
    print(f"double-layer grid {args.nx}x{args.nx}: {frame.n_members:,} members, "
          f"{frame.n_joints:,} joints; spaceframe.load in a fresh process, median of 3")
    with tempfile.TemporaryDirectory() as tmp:
        for suffix in (".npz", ".json", ".toml"):
            path = os.path.join(tmp, "grid" + suffix)
            save(frame, path)
            times = []
            for _ in range(3):
                out = subprocess.run([sys.executable, __file__, "--child", path], env=env,
                                     capture_output=True, text=True, check=True)
                times.append(json.loads(out.stdout.strip().splitlines()[-1])["seconds"])
            print(f"  {suffix:6} {os.path.getsize(path) / 2**20:8.1f} MiB "
                  f"{statistics.median(times):8.2f} s")


if __name__ == "__main__":
    main()
