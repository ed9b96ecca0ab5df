"""A compatibility matrix built from scratch, independent of spaceframe's assembly."""

from __future__ import annotations

import numpy as np


def dense_compatibility(coords, ends, held=()):
    """Compatibility matrix built from scratch, for axis-aligned supports only.

    Independent of spaceframe's assembly: one row per member with the unit
    vector from its first to its second end joint, then the columns of the
    held degrees of freedom (joint, axis) deleted.
    """
    X = np.asarray(coords, float)
    n, d = X.shape
    C = np.zeros((len(ends), n * d))
    for k, (a, b) in enumerate(ends):
        w = (X[b] - X[a]) / np.linalg.norm(X[b] - X[a])
        C[k, a * d:(a + 1) * d] = -w
        C[k, b * d:(b + 1) * d] = w
    keep = [i for i in range(n * d) if (i // d, i % d) not in set(held)]
    return C[:, keep]
