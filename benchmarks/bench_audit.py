"""Benchmark: load and audit a large double-layer grid, and audit against a dense reference.

Run from the repository root::

    python benchmarks/bench_audit.py            # ~100,000 members; reference at ~6,000
    python benchmarks/bench_audit.py --quick    # small sizes, well under a minute

Two parts, printed as one table:

(i) Scale.  A square-on-square double-layer grid of about ``--members``
    members (:func:`spaceframe.families.double_layer_grid`) is written to a
    temporary native model file, TOML and JSON.  Each repeat starts a fresh
    Python process that loads the file with :func:`spaceframe.load` and
    audits it with :func:`spaceframe.audit` (counts, mechanism basis,
    self-stress count), timing each step and reading the process's peak
    resident memory from ``resource.getrusage(RUSAGE_SELF).ru_maxrss``; a
    fresh process per repeat keeps earlier runs from inflating the peak.
    The timed audit is ``audit(frame, soft=False)``: counts, mechanism basis
    and its readable account, self-stress count, key members; a second line
    times the audit with soft modes as well, whose target is at most twice
    the first.  Targets: load plus audit at most 5 s, peak memory at most
    2 GiB.  The
    audit's counts are compared with the closed-form counts of the family
    (derived by dense SVD, see ``tests/test_families.py``).

(ii) Reference.  A grid of about ``--ref-members`` members is audited by
    spaceframe and, side by side in the same process and rounds, by the dense
    reference: ``scipy.linalg.null_space`` of the dense compatibility matrix
    (mechanisms) and of its transpose (states of self-stress).  The counts
    must be identical (the script exits with status 1 otherwise), the
    mechanism bases must span the same space, and spaceframe's states of
    self-stress must lie in the reference's.  Target: spaceframe at least 200
    times faster.  The reference time excludes building its dense matrix, so
    the ratio, if anything, favours the reference.

Every timing is the median of the repeats.  Models are generated
deterministically; nothing is random.
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))  # benchmark the checkout, not an installed copy

COUNT_FIELDS = ("rank", "mechanisms", "rigid_body_modes", "internal_mechanisms",
                "self_stress_states")
LOAD_AUDIT_TARGET_S = 5.0
MEMORY_TARGET_BYTES = 2 * 1024 ** 3
SPEEDUP_TARGET = 200.0


# --------------------------------------------------------------------------
# Child process: one load + audit, measured from a clean start
# --------------------------------------------------------------------------

def _peak_rss_bytes() -> int:
    """Peak resident set size of this process (``ru_maxrss`` is KiB on Linux, bytes on macOS)."""
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    return int(peak) if sys.platform == "darwin" else int(peak) * 1024


def _child(path: str | None) -> None:
    import spaceframe

    out = {}
    if path is not None:
        t0 = time.perf_counter()
        frame = spaceframe.load(path)
        t1 = time.perf_counter()
        result = spaceframe.audit(frame, soft=False)
        t2 = time.perf_counter()
        spaceframe.audit(frame)  # with soft modes as well: the whole readable account
        t3 = time.perf_counter()
        out = {"load_s": t1 - t0, "audit_s": t2 - t1, "full_audit_s": t3 - t2,
               "modes_shape": list(result.modes.shape),
               **{k: int(getattr(result, k)) for k in COUNT_FIELDS}}
    out["peak_rss_bytes"] = _peak_rss_bytes()
    print(json.dumps(out))


def _run_child(path: str | None) -> dict:
    env = dict(os.environ)
    env["PYTHONPATH"] = os.pathsep.join(filter(None, [str(REPO), env.get("PYTHONPATH")]))
    cmd = [sys.executable, str(Path(__file__).resolve()), "--child"] + ([path] if path else [])
    done = subprocess.run(cmd, env=env, capture_output=True, text=True)
    if done.returncode != 0:
        sys.stderr.write(done.stderr)
        raise SystemExit(f"child process failed: {' '.join(cmd)}")
    return json.loads(done.stdout.strip().splitlines()[-1])


# --------------------------------------------------------------------------
# The dense reference, independent of spaceframe.analysis
# --------------------------------------------------------------------------

def dense_compatibility(frame) -> tuple[np.ndarray, np.ndarray]:
    """Dense compatibility matrix ``(m, free dofs)`` and the kept dof indices.

    Row ``e`` has ``-u`` at the start joint and ``+u`` at the end joint,
    ``u`` the unit vector along member ``e``; columns of restrained degrees of
    freedom are deleted (the grids here restrain whole axes only).
    """
    d, n, m = frame.dimension, frame.n_joints, frame.n_members
    u = frame.coords[frame.ends[:, 1]] - frame.coords[frame.ends[:, 0]]
    u /= np.linalg.norm(u, axis=1)[:, None]
    C = np.zeros((m, n * d))
    rows = np.arange(m)
    for k in range(d):
        C[rows, frame.ends[:, 0] * d + k] -= u[:, k]
        C[rows, frame.ends[:, 1] * d + k] += u[:, k]
    axis = np.argmax(np.abs(frame.restraint_dir), axis=1)
    if not np.allclose(np.abs(frame.restraint_dir[np.arange(len(axis)), axis]), 1.0):
        raise SystemExit("the dense reference here handles axis supports only")
    keep = np.setdiff1d(np.arange(n * d), frame.restraint_joint * d + axis)
    return C[:, keep], keep


def dense_rigid_body_modes(frame) -> int:
    """Rigid-body motions of the whole frame (3-D) that its supports permit."""
    x = frame.coords - frame.coords.mean(axis=0)
    n = frame.n_joints
    B = np.array([np.tile(e, n) for e in np.eye(3)]
                 + [np.cross(w, x).ravel() for w in np.eye(3)]).T
    R = np.zeros((frame.n_restraints, 3 * n))
    R[np.arange(frame.n_restraints)[:, None],
      frame.restraint_joint[:, None] * 3 + np.arange(3)] = frame.restraint_dir
    held = np.linalg.matrix_rank(R @ B) if frame.n_restraints else 0
    return int(np.linalg.matrix_rank(B) - held)


def dense_reference(C: np.ndarray):
    """The reference: ``scipy.linalg.null_space`` of ``C`` and of ``C.T``."""
    from scipy.linalg import null_space

    return null_space(C), null_space(C.T)


# --------------------------------------------------------------------------
# Closed-form counts of the grid family (see double_layer_grid's docstring)
# --------------------------------------------------------------------------

def grid_counts(nx: int, supports: str) -> dict:
    """Counts of a square ``nx``-bay grid, ``nx >= 2``; derived by dense SVD up to 7 x 7."""
    joints, members = 2 * nx * nx + 2 * nx + 1, 8 * nx * nx
    restraints = {"corners": 12, "perimeter": 12 * nx, "minimal": 6, "none": 0}[supports]
    mech, rbm = {"corners": (0, 0), "perimeter": (0, 0), "minimal": (1, 0),
                 "none": (7, 6)}[supports]
    rank = 3 * joints - restraints - mech
    return {"rank": rank, "mechanisms": mech, "rigid_body_modes": rbm,
            "internal_mechanisms": mech - rbm, "self_stress_states": members - rank}


# --------------------------------------------------------------------------
# The two parts
# --------------------------------------------------------------------------

def _median(values):
    return statistics.median(values)


def _fmt_counts(c: dict) -> str:
    return (f"rank {c['rank']}, mechanisms {c['mechanisms']} "
            f"(rigid-body {c['rigid_body_modes']}, internal {c['internal_mechanisms']}), "
            f"self-stress {c['self_stress_states']}")


def part_scale(members: int, supports: str, repeat: int, rows: list, problems: list) -> None:
    from spaceframe.families import double_layer_grid, double_layer_grid_size
    from spaceframe.io.native import dump_json, dump_toml

    nx = double_layer_grid_size(members)
    frame = double_layer_grid(nx, supports=supports)
    expected = grid_counts(nx, supports)
    rows.append((f"(i) scale: double-layer grid {nx}x{nx}, supports={supports!r}: "
                 f"{frame.n_joints:,} joints, {frame.n_members:,} members, "
                 f"{3 * frame.n_joints - frame.n_restraints:,} free dofs",))
    base = _run_child(None)
    rows.append(("peak memory of a process that only imports spaceframe",
                 f"{base['peak_rss_bytes'] / 2**20:,.0f} MiB", ""))
    with tempfile.TemporaryDirectory(prefix="spaceframe-bench-") as tmp:
        for fmt, dump in (("TOML", dump_toml), ("JSON", dump_json)):
            path = os.path.join(tmp, f"grid.{fmt.lower()}")
            t0 = time.perf_counter()
            dump(frame, path)
            write_s = time.perf_counter() - t0
            runs = [_run_child(path) for _ in range(repeat)]
            load_s = _median([r["load_s"] for r in runs])
            audit_s = _median([r["audit_s"] for r in runs])
            full_s = _median([r["full_audit_s"] for r in runs])
            total_s = _median([r["load_s"] + r["audit_s"] for r in runs])
            peak = max(r["peak_rss_bytes"] for r in runs)
            got = {k: runs[0][k] for k in COUNT_FIELDS}
            if any({k: r[k] for k in COUNT_FIELDS} != got for r in runs):
                problems.append(f"{fmt}: the audit's counts differ between repeats")
            if got != expected:
                problems.append(f"{fmt}: audit {got} differs from the family's counts {expected}")
            ok_t = total_s <= LOAD_AUDIT_TARGET_S
            ok_m = peak <= MEMORY_TARGET_BYTES
            size = os.path.getsize(path) / 2**20
            rows += [
                (f"{fmt}: write the model file ({size:,.1f} MiB, once, not a target)",
                 f"{write_s:.2f} s", ""),
                (f"{fmt}: spaceframe.load, median of {repeat}", f"{load_s:.2f} s", ""),
                (f"{fmt}: spaceframe.audit (soft=False), median of {repeat}",
                 f"{audit_s:.2f} s", ""),
                (f"{fmt}: spaceframe.audit with soft modes too, median of {repeat}",
                 f"{full_s:.2f} s", f"<= 2 x the line above: "
                 f"{'met' if full_s <= 2 * audit_s else 'MISSED'} ({full_s / audit_s:.2f} x)"),
                (f"{fmt}: load + audit, median of {repeat}", f"{total_s:.2f} s",
                 f"<= {LOAD_AUDIT_TARGET_S:g} s: {'met' if ok_t else 'MISSED'}"),
                (f"{fmt}: peak memory of the process, worst of {repeat}",
                 f"{peak / 2**20:,.0f} MiB", f"<= 2048 MiB: {'met' if ok_m else 'MISSED'}"),
                (f"{fmt}: audit counts", _fmt_counts(got),
                 "same as family formula" if got == expected else "DIFFER from formula"),
            ]


def part_reference(members: int, supports: str, repeat: int, rows: list, problems: list) -> None:
    import spaceframe
    from scipy.linalg import subspace_angles
    from spaceframe.families import double_layer_grid, double_layer_grid_size

    nx = double_layer_grid_size(members)
    frame = double_layer_grid(nx, supports=supports)
    C, keep = dense_compatibility(frame)
    rows.append((f"(ii) reference: double-layer grid {nx}x{nx}, supports={supports!r}: "
                 f"{frame.n_joints:,} joints, {frame.n_members:,} members, dense C "
                 f"{C.shape[0]:,} x {C.shape[1]:,}",))

    spaceframe.audit(frame, soft=False)  # warm-up: imports and first-call costs are not timed
    sf_times, ref_times = [], []
    for _ in range(repeat):  # interleaved rounds, so both see the same machine load
        for _ in range(5):
            t0 = time.perf_counter()
            result = spaceframe.audit(frame, soft=False)
            sf_times.append(time.perf_counter() - t0)
        t0 = time.perf_counter()
        mech_basis, ss_basis = dense_reference(C)
        ref_times.append(time.perf_counter() - t0)

    ref = {"mechanisms": mech_basis.shape[1], "self_stress_states": ss_basis.shape[1],
           "rigid_body_modes": dense_rigid_body_modes(frame)}
    ref["rank"] = C.shape[1] - ref["mechanisms"]
    ref["internal_mechanisms"] = ref["mechanisms"] - ref["rigid_body_modes"]
    got = {k: int(getattr(result, k)) for k in COUNT_FIELDS}
    same = got == ref
    if not same:
        problems.append(f"reference counts {ref} differ from spaceframe's {got}")
    if ref["rank"] != C.shape[0] - ref["self_stress_states"]:
        problems.append("the reference's two null spaces disagree on the rank")

    # The spaces, not just their dimensions.
    modes = result.modes.dense().reshape(len(result.modes), -1)   # one mechanism here: small
    angle = "-"
    if ref["mechanisms"] and len(modes) == ref["mechanisms"]:
        angle = f"{np.max(subspace_angles(modes[:, keep].T, mech_basis)):.1e} rad"
    states = np.asarray(result.self_stress_forces)
    outside = "-"
    if len(states):
        off = states.T - ss_basis @ (ss_basis.T @ states.T)
        outside = f"{np.max(np.linalg.norm(off, axis=0) / np.linalg.norm(states, axis=1)):.1e}"

    t_sf, t_ref = _median(sf_times), _median(ref_times)
    ratio = t_ref / t_sf
    rows += [
        ("reference counts (scipy.linalg.null_space)", _fmt_counts(ref), ""),
        ("spaceframe counts", _fmt_counts(got), "identical" if same else "DIFFER"),
        ("largest angle between the mechanism bases", angle, ""),
        (f"spaceframe's {len(states)} self-stress states: largest relative part outside "
             f"the reference's", outside, ""),
        (f"reference: null_space(C) + null_space(C.T), median of {repeat}",
         f"{t_ref:.2f} s", ""),
        (f"spaceframe.audit, median of {len(sf_times)}", f"{t_sf * 1e3:.1f} ms", ""),
        ("speed ratio, reference / spaceframe", f"{ratio:,.0f}x",
         f">= {SPEEDUP_TARGET:g}x: {'met' if ratio >= SPEEDUP_TARGET else 'MISSED'}"),
    ]


def _print_table(rows: list) -> None:
    """Print rows ``(what, value, target)``; a row ``(text,)`` is a section heading."""
    body = [r for r in rows if len(r) == 3]
    w_what = max(len(r[0]) for r in body)
    w_value = max(len(r[1]) for r in body if len(r[1]) <= 16)
    for r in rows:
        if len(r) == 1:
            print(f"\n{r[0]}")
        elif len(r[1]) > 16:  # a long value (counts) goes on a line of its own
            print(f"  {r[0]:<{w_what}}  {r[2]}".rstrip())
            print(f"      {r[1]}")
        else:
            print(f"  {r[0]:<{w_what}}  {r[1]:>{w_value}}  {r[2]}".rstrip())


def main(argv=None) -> int:
    p = argparse.ArgumentParser(description=__doc__.split("\n\n")[0],
                                formatter_class=argparse.RawDescriptionHelpFormatter)
    p.add_argument("--quick", action="store_true",
                   help="small sizes (8,000 and 800 members), for a check in seconds")
    p.add_argument("--members", type=int, help="members of the scale grid (default 100,000)")
    p.add_argument("--ref-members", type=int,
                   help="members of the reference grid (default 6,000)")
    p.add_argument("--repeat", type=int, default=3, help="repeats of each timing (default 3)")
    p.add_argument("--supports", default="minimal",
                   choices=("minimal", "corners", "perimeter", "none"),
                   help="support layout of both grids (default 'minimal': six restraints, "
                        "so each grid has one internal mechanism, its twist)")
    p.add_argument("--skip-reference", action="store_true", help="run part (i) only")
    p.add_argument("--child", nargs="?", const="", default=None, help=argparse.SUPPRESS)
    args = p.parse_args(argv)

    if args.child is not None:
        _child(args.child or None)
        return 0
    members = args.members or (8_000 if args.quick else 100_000)
    ref_members = args.ref_members or (800 if args.quick else 6_000)
    if args.repeat < 1:
        p.error("--repeat must be at least 1")

    import scipy

    given = " ".join(sys.argv[1:] if argv is None else argv)
    print(f"command: python benchmarks/bench_audit.py {given}".rstrip())
    print(f"machine: {platform.machine()}, {os.cpu_count()} CPUs, "
          f"Python {platform.python_version()}, NumPy {np.__version__}, SciPy {scipy.__version__}")
    rows: list = []
    problems: list = []
    part_scale(members, args.supports, args.repeat, rows, problems)
    if not args.skip_reference:
        part_reference(ref_members, args.supports, args.repeat, rows, problems)
    _print_table(rows)
    for text in problems:
        print(f"PROBLEM: {text}", file=sys.stderr)
    return 1 if problems else 0


if __name__ == "__main__":
    raise SystemExit(main())
