"""Benchmark of the rank engine at the machine's limit: one table, five frames (and one more).

Run from the repository root::

    python benchmarks/bench_engine.py                        # this checkout only
    python benchmarks/bench_engine.py --prev /tmp/engine_prev  # and the previous engine
    python benchmarks/bench_engine.py --million              # add the 1,002,528-member grid
    python benchmarks/bench_engine.py --quick                # small sizes, a minute
    python benchmarks/bench_engine.py --only "roof,roof 5k"  # some rows, no reference row

``--prev`` names a checkout of the previous engine, made for instance with::

    git archive 91be4a4 | tar -x -C /tmp/engine_prev

Rows (every frame built deterministically here and written once to a ``.npz`` model,
then audited by the call users make, ``spaceframe.audit(spaceframe.load(path))``,
in a fresh process per engine so that ``ru_maxrss`` is that audit's peak):

``grid``         double-layer grid 112 x 112 (100,352 members), six restraints;
``grid holed``   the same grid with the four diagonals of 121 bottom joints removed
                 (every tenth joint each way): each hangs on four coplanar chords,
                 121 local mechanisms;
``roof``         980 plane trusses of 20 panels, purlins, bottom chords untied
                 (``spaceframe.families.plane_truss_roof``; 99,980 members);
                 (p - 1) F + p + 1 = 18,641 mechanisms (derived in
                 ``tests/analysis/test_local_mechanisms.py``);
``roof 5k``      the same with 50 trusses (5,080 members, 971 mechanisms);
``grid 5k``      a 25 x 25 grid (5,000 members), against the previous engine;
``grid 1M``      ``double_layer_grid(354)``, ``audit(frame, soft=False)`` (``--million``);
``grid 5k ref``  the 25 x 25 grid against ``scipy.linalg.null_space`` of C and of C.T in
                 the same process (the counts must agree): the reference's median of
                 ``--repeat`` runs against the median of five audits after a first one
                 (which loads the libraries).

Each child reports its wall time and its CPU time (``time.process_time``, every thread),
which a loaded machine disturbs far less.  Each child's address space is capped (``--memory``, default 6 GiB) so that an engine
that cannot hold a frame fails instead of swapping the shared machine; such a row
says so.  The path column says which engine ran (dense, or sparse with the
factorisation it used: PARDISO with the extra ``pardiso``, SuperLU without it or
below ``Limits.pardiso_engine``; and how many mechanisms were found joint by joint).  Timings are single runs unless
``--repeat``; on a shared machine they are disturbed, so compare the ratios, which
are taken side by side in the same run.
"""

from __future__ import annotations

import argparse
import json
import os
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

REPO = Path(__file__).resolve().parents[1]

COUNTS = ("mechanisms", "internal_mechanisms", "self_stress_states")


def _peak_rss_bytes() -> int:
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    return int(peak) if sys.platform == "darwin" else int(peak) * 1024


def _child(path: str, soft: bool) -> None:
    import spaceframe

    t0 = time.perf_counter()
    frame = spaceframe.load(path)
    t1, c1 = time.perf_counter(), time.process_time()
    result = spaceframe.audit(frame) if soft else spaceframe.audit(frame, soft=False)
    t2, c2 = time.perf_counter(), time.process_time()
    out = {"load_s": t1 - t0, "audit_s": t2 - t1, "cpu_s": c2 - c1, "peak": _peak_rss_bytes(),
           **{k: int(getattr(result, k)) for k in COUNTS}, "method": result.gap.method,
           # engines before the choice of factorisation had SuperLU only
           "factorisation": getattr(result.gap, "factorisation", "SuperLU"),
           # engines before soft modes on request looked for them whenever soft=True
           "soft": soft and getattr(result, "soft_skipped", None) is None}
    try:
        from spaceframe.analysis.equilibrium import compatibility_matrix, free_dofs
        from spaceframe.analysis.nullspace import local_mechanisms

        dofs = free_dofs(frame)
        out["local"] = local_mechanisms(compatibility_matrix(frame, dofs),
                                        dofs.joint_of()).count
    except ImportError:
        out["local"] = None  # the previous engine has no joint-by-joint split
    print(json.dumps(out))


def _run(tree: Path, path: Path, soft: bool, memory: int, timeout: float) -> dict:
    env = dict(os.environ)
    env["PYTHONPATH"] = str(tree)
    cmd = [sys.executable, str(Path(__file__).resolve()), "--child", str(path)] + \
        ([] if soft else ["--no-soft"])

    def cap():
        resource.setrlimit(resource.RLIMIT_AS, (memory, memory))

    try:
        done = subprocess.run(cmd, env=env, capture_output=True, text=True, timeout=timeout,
                              preexec_fn=cap, cwd=str(tree))
    except subprocess.TimeoutExpired:
        return {"error": f"over {timeout:.0f} s"}
    if done.returncode != 0:
        last = (done.stderr.strip().splitlines() or ["?"])[-1]
        return {"error": "out of memory" if "MemoryError" in done.stderr or
                "Unable to allocate" in done.stderr else last[:60]}
    return json.loads(done.stdout.strip().splitlines()[-1])


def _frames(quick: bool, million: bool):
    from spaceframe import Frame
    from spaceframe.families import double_layer_grid, plane_truss_roof

    nx, step, trusses = (24, 4, 40) if quick else (112, 10, 980)
    grid = double_layer_grid(nx, supports="minimal")
    yield "grid", grid, True, {"mechanisms": 1}
    hung = {f"B{i}_{j}" for i in range(2, nx, step) for j in range(2, nx, step)}
    ids = grid.joint_ids
    keep = [k for k, (mid, (a, b)) in enumerate(zip(grid.member_ids, grid.ends.tolist()))
            if not (mid.startswith("D") and (ids[a] in hung or ids[b] in hung))]
    holed = Frame(joint_ids=grid.joint_ids, coords=grid.coords,
                  member_ids=tuple(grid.member_ids[k] for k in keep), ends=grid.ends[keep],
                  restraint_joint=grid.restraint_joint, restraint_dir=grid.restraint_dir,
                  name=f"{grid.name}, {len(hung)} bottom joints hanging")
    yield "grid holed", holed, True, {"mechanisms": 1 + len(hung)}
    p = 20
    for label, F in (("roof", trusses), ("roof 5k", 50 if not quick else 10)):
        yield label, plane_truss_roof(F, p), True, {"mechanisms": (p - 1) * F + p + 1,
                                                      "self_stress_states": F}
    yield "grid 5k", double_layer_grid(12 if quick else 25, supports="minimal"), True, \
        {"mechanisms": 1}
    if million:
        yield "grid 1M", double_layer_grid(354, supports="minimal"), False, {"mechanisms": 1}


def _reference(quick: bool, repeat: int):
    """The 5,000-member grid against scipy.linalg.null_space of C and C.T, same process."""
    import spaceframe
    from spaceframe.families import double_layer_grid
    sys.path.insert(0, str(REPO / "benchmarks"))
    from bench_audit import dense_compatibility, dense_reference

    grid = double_layer_grid(12 if quick else 25, supports="minimal")
    C, _ = dense_compatibility(grid)
    ref_t, ours_t = [], []
    spaceframe.audit(grid)  # once first: the libraries loaded, as in a session that audits more
    for _ in range(repeat):
        t = time.perf_counter()
        N, S = dense_reference(C)
        ref_t.append(time.perf_counter() - t)
        for _ in range(5):
            t = time.perf_counter()
            r = spaceframe.audit(grid)
            ours_t.append(time.perf_counter() - t)
    same = (N.shape[1], S.shape[1]) == (r.mechanisms, r.self_stress_states)
    return grid, statistics.median(ref_t), statistics.median(ours_t), same, r


def _fmt(row: dict | None, key="audit_s") -> str:
    if row is None:
        return ""
    if "error" in row:
        return row["error"]
    return f"{row[key]:.2f}"


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--child", help=argparse.SUPPRESS)
    ap.add_argument("--no-soft", action="store_true", help=argparse.SUPPRESS)
    ap.add_argument("--prev", type=Path, help="checkout of the previous engine")
    ap.add_argument("--million", action="store_true", help="add the 1,002,528-member grid")
    ap.add_argument("--quick", action="store_true", help="small sizes")
    ap.add_argument("--memory", type=float, default=6.0, help="GiB cap per child (default 6)")
    ap.add_argument("--timeout", type=float, default=900.0, help="seconds per child")
    ap.add_argument("--repeat", type=int, default=1, help="runs of the reference row")
    ap.add_argument("--only", help="comma-separated row labels to run (the reference row "
                                   "is 'grid 5k ref'); default all")
    args = ap.parse_args(argv)
    if args.child:  # runs the engine on PYTHONPATH: this checkout or --prev
        _child(args.child, not args.no_soft)
        return 0
    sys.path.insert(0, str(REPO))
    from spaceframe.io import save

    memory = int(args.memory * 1024 ** 3)
    tmp = Path(tempfile.mkdtemp(prefix="bench_engine_"))
    rows, bad = [], False
    only = None if args.only is None else {x.strip() for x in args.only.split(",")}
    for label, frame, soft, expect in _frames(args.quick, args.million):
        if only is not None and label not in only:
            continue
        path = tmp / f"{label.replace(' ', '_')}.npz"
        save(frame, path)
        new = _run(REPO, path, soft, memory, args.timeout)
        old = _run(args.prev, path, soft, memory, args.timeout) if args.prev else None
        ok = "error" not in new and all(new[k] == v for k, v in expect.items())
        bad |= not ok
        rows.append((label, frame, soft, new, old, ok))
        print(f"  {label}: {new} | previous: {old}", file=sys.stderr, flush=True)

    print(f"\ncores: {os.cpu_count()}, load average {os.getloadavg()[0]:.1f} at the start "
          f"of the last row; {time.strftime('%Y-%m-%d %H:%M UTC', time.gmtime())}")
    head = ("| frame | members | call | audit s | cpu s | load s | peak MiB | mechanisms | "
            "self-stress | path | previous s | previous cpu s | previous MiB | ratio |")
    print(head)
    print("|" + "---|" * (head.count("|") - 1))
    for label, frame, soft, new, old, ok in rows:
        call = "audit(load(path))" if soft else "audit(load(path), soft=False)"
        if "error" in new:
            print(f"| {label} | {frame.n_members:,} | {call} | {new['error']} | | | | | | | "
                  f"{_fmt(old)} | | | |")
            continue
        path = f"{new['method']}, {new['factorisation']}" if new["method"] == "sparse" \
            else new["method"]
        if new.get("local") is not None:
            path += f"; {new['local']:,} local"
        path += "; soft modes " + ("looked for" if new.get("soft") else "not looked for")
        prev_s, prev_c, prev_m, ratio = _fmt(old), "", "", ""
        if old and "error" not in old:
            prev_m = f"{old['peak'] / 2 ** 20:,.0f}"
            prev_c = f"{old['cpu_s']:.2f}" if "cpu_s" in old else ""
            ratio = f"{old['audit_s'] / new['audit_s']:.1f}x"
        print(f"| {label} | {frame.n_members:,} | {call} | {new['audit_s']:.2f} | "
              f"{new['cpu_s']:.2f} | {new['load_s']:.2f} | {new['peak'] / 2 ** 20:,.0f} | "
              f"{new['mechanisms']:,} | {new['self_stress_states']:,} | {path} | {prev_s} | "
              f"{prev_c} | {prev_m} | {ratio} |"
              + ("" if ok else " **counts differ from the derived ones**"))
    if only is not None and "grid 5k ref" not in only:
        return 1 if bad else 0
    grid, ref_s, ours_s, same, r = _reference(args.quick, args.repeat)
    bad |= not same
    print(f"| grid 5k ref | {grid.n_members:,} | audit(frame), same process | {ours_s:.3f} | | "
          f"| | {r.mechanisms} | {r.self_stress_states:,} | "
          f"{r.gap.method}, {r.gap.factorisation} | "
          f"null_space(C), null_space(C.T): {ref_s:.1f} s | | | {ref_s / ours_s:.0f}x "
          f"{'(counts agree)' if same else '**counts differ**'} |")
    return 1 if bad else 0


if __name__ == "__main__":
    raise SystemExit(main())
