"""The benchmark families at about 5,000 members give the dense reference's counts.

Reference: numpy's dense SVD of the compatibility matrix built in the test
(``conftest.dense_compatibility``), its rank decided with the same relative
threshold; the reference's own spectrum must show a clear gap there.
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np
import pytest

import spaceframe
from spaceframe.families import double_layer_grid

from common.matrices import dense_compatibility

sys.path.insert(0, str(Path(__file__).resolve().parents[2] / "benchmarks"))


@pytest.mark.slow
@pytest.mark.parametrize("family", ["grid", "scaffold"])
def test_five_thousand_member_families_match_dense_svd(family):
    # ~5,000 members: well past the dense engine's limit, so the sparse engine runs, while
    # the reference SVD takes seconds (at ~10,000 members it took 1-2 minutes each).
    if family == "grid":
        frame = double_layer_grid(25, supports="minimal")              # 5,000 members
    else:
        from bench_scale import _scaffold
        frame = _scaffold(44, 14)
    assert frame.n_members > 4500
    held = [(int(j), int(np.argmax(np.abs(v)))) for j, v in
            zip(frame.restraint_joint, frame.restraint_dir)]
    C = dense_compatibility(frame.coords, frame.ends, held)
    s = np.linalg.svd(C, compute_uv=False)
    rank = int(np.sum(s > 1e-6 * s[0]))
    assert rank == len(s) or s[rank] < 1e-9 * s[0]            # the reference's gap is clear
    assert s[rank - 1] > 1e-5 * s[0]
    r = spaceframe.audit(frame, soft=False, redundancy=False)
    assert r.gap.method == "sparse"
    assert (r.rank, r.mechanisms, r.self_stress_states) == \
        (rank, C.shape[1] - rank, C.shape[0] - rank)
