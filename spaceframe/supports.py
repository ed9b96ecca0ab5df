"""Support codes: what a support holds, as unit direction vectors.

A support is written as ``"pin"`` (every translation held), as the letters of
the axes held (``"x"``, ``"yz"``, ``"xyz"``; in a plane frame only ``x`` and
``y``), or as a list of direction vectors held (an inclined roller; the
vectors need not be of unit length).
"""

from __future__ import annotations

import warnings

import numpy as np

from .errors import ModelError, SpaceframeWarning, where
from .tolerances import DEFAULT

__all__ = ["restraint_rows", "AXES"]

AXES = "xyz"


def restraint_rows(spec, dimension: int, *, joint: str, path: str | None = None,
                   line: int | None = None, tol=DEFAULT) -> np.ndarray:
    """Turn one support specification into independent unit direction rows.

    Parameters
    ----------
    spec : str or sequence of sequence of float
        ``"pin"``, axis letters, or direction vectors.
    dimension : int
        2 or 3.
    joint : str
        The joint id, for messages.

    Returns
    -------
    rows : (k, dimension) float
        Unit vectors of the held directions, ``k <= dimension``.  Directions
        that depend on earlier ones (their smallest singular value at or below
        ``tol.restraint_dependence``) are dropped with a warning: a joint can be
        held in at most ``dimension`` independent directions.

    Raises
    ------
    ModelError
        For an unknown code, a vector of the wrong length, or a zero vector.
    """
    axes = AXES[:dimension]
    at = dict(path=path, line=line, item=joint)
    if isinstance(spec, str):
        code = spec.strip().lower()
        if code == "pin":
            return np.eye(dimension)
        if not code or any(c not in axes for c in code):
            allowed = " or ".join(["'pin'"] + [f"letters from '{axes}'"])
            raise ModelError(
                f"support on joint {joint!r}: unknown code {spec!r}; write {allowed} "
                f"(the axes held), or a list of direction vectors such as [[0, 0, 1]]"
                if dimension == 3 else
                f"support on joint {joint!r}: unknown code {spec!r}; write {allowed} "
                f"(the axes held), or a list of direction vectors such as [[0, 1]]", **at)
        if len(set(code)) != len(code):
            warnings.warn(f"{where(path, line)}support on joint {joint!r}: axis letter "
                          f"repeated in {spec!r}; each axis is held once", SpaceframeWarning,
                          stacklevel=2)
        return np.eye(dimension)[sorted({axes.index(c) for c in code})]
    try:
        vecs = np.array(spec, dtype=float)
    except (TypeError, ValueError):
        raise ModelError(f"support on joint {joint!r}: {spec!r} is neither a code nor a list of "
                         f"direction vectors of {dimension} numbers", **at) from None
    if vecs.ndim == 1 and vecs.size == dimension:
        vecs = vecs[None, :]
    if vecs.ndim != 2 or vecs.shape[1] != dimension or len(vecs) == 0:
        raise ModelError(f"support on joint {joint!r}: each direction vector needs {dimension} "
                         f"numbers, e.g. {[[0.0] * (dimension - 1) + [1.0]]}", **at)
    if not np.all(np.isfinite(vecs)):
        raise ModelError(f"support on joint {joint!r}: a direction vector is not finite", **at)
    norms = np.linalg.norm(vecs, axis=1)
    if np.any(norms == 0):
        raise ModelError(f"support on joint {joint!r}: direction vector "
                         f"{vecs[np.argmin(norms)].tolist()} is zero; give the direction held, "
                         f"e.g. [0, 0, 1] for vertical", **at)
    unit = vecs / norms[:, None]
    kept: list[np.ndarray] = []
    for v in unit:
        trial = np.array(kept + [v])
        if np.linalg.svd(trial, compute_uv=False)[-1] > tol.restraint_dependence:
            kept.append(v)
    if len(kept) < len(unit):
        warnings.warn(f"{where(path, line)}support on joint {joint!r}: {len(unit)} directions "
                      f"given but only {len(kept)} are independent; the others add nothing and are "
                      f"ignored", SpaceframeWarning, stacklevel=2)
    return np.array(kept)
