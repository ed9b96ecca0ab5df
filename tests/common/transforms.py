"""The same frame in other units, turned, moved and reordered: for invariance checks."""

from __future__ import annotations

import numpy as np

from spaceframe import Frame


def transformed(frame, *, scale=1.0, rotation=None, shift=None, seed=0):
    """The same frame in other units, turned, moved, and with joints and members reordered."""
    rng = np.random.default_rng(seed)
    d = frame.dimension
    R = np.eye(d) if rotation is None else rotation
    X = frame.coords @ R.T * scale + (0 if shift is None else shift)
    pj = rng.permutation(frame.n_joints)
    inv = np.argsort(pj)
    pm = rng.permutation(frame.n_members)
    ends = inv[frame.ends[pm]][:, ::-1]  # also swap each member's ends
    sup = {}
    for j, v in zip(frame.restraint_joint, frame.restraint_dir):
        sup.setdefault(int(inv[j]), []).append((R @ v).tolist())
    return Frame.from_arrays(X[pj], ends, supports=sup,
                             joint_ids=[frame.joint_ids[i] for i in pj],
                             member_ids=[frame.member_ids[i] for i in pm])


def rotation(d, seed):
    q, _ = np.linalg.qr(np.random.default_rng(seed).standard_normal((d, d)))
    return q
