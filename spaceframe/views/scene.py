"""Geometry shared by the pictures: the frame in 3D, mode motion, camera, support glyphs.

Plain NumPy; no drawing library.  :mod:`spaceframe.views.render` (pictures,
animations) and :mod:`spaceframe.views.report` (the HTML report's viewer) read
the same numbers from here, so a still, an animation and the report show one
frame the same way.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..results import AuditResult
from ..tolerances import DISPLAY

__all__ = ["Scene", "scene_of", "phases", "view_direction", "moving_joints", "carrying_members",
           "AMPLITUDE"]

#: Largest joint movement drawn, as a fraction of the frame's largest extent.
AMPLITUDE = 0.12

#: Length of a support glyph's stalk, as a fraction of the frame's largest extent.
GLYPH = 0.06


@dataclass(frozen=True)
class Scene:
    """What a picture of one audited frame needs, in three dimensions.

    Attributes
    ----------
    coords : (n, 3) float
        Joint coordinates; a plane frame's ``[x, y]`` becomes ``[x, 0, y]``
        (its y is up, as z is up in a space frame).
    ends : (m, 2) int
    extent : float
        Largest side of the joints' bounding box (1 for a single point).
    modes : (p, n, 3) float
        The audit's mechanisms (largest joint movement 1), in its order.
    supports : list of (joint index, (3,) unit vector)
        One entry per restrained direction.
    """

    coords: np.ndarray
    ends: np.ndarray
    extent: float
    modes: np.ndarray
    supports: list

    def displaced(self, mode: int | None, phase: float) -> np.ndarray:
        """Joint positions ``(n, 3)`` at ``phase`` (radians) of mode ``mode`` (0-based).

        The movement is ``AMPLITUDE * extent * sin(phase) * u``: a seamless loop
        over ``phase`` in ``[0, 2 pi)``.  ``mode=None`` is the frame at rest.
        """
        if mode is None:
            return self.coords.copy()
        return self.coords + AMPLITUDE * self.extent * np.sin(phase) * self.modes[mode]

    def glyphs(self) -> list[tuple[np.ndarray, np.ndarray, np.ndarray]]:
        """Support glyphs: one stalk per held direction, ``(start, end, direction)``.

        The stalk runs from the joint along the held direction, on the side
        away from the frame's centre (below a base joint for a vertical
        restraint), and ends in a plate across it: the plate is what the
        joint bears against.
        """
        centre = 0.5 * (self.coords.min(axis=0) + self.coords.max(axis=0))
        out = []
        for j, d in self.supports:
            p = self.coords[j]
            side = np.dot(p - centre, d)
            if abs(side) < DISPLAY.zero_coordinate * self.extent:
                side = -1.0 if d[2] > 0.5 else 1.0  # vertical: below; otherwise outward
            sign = 1.0 if side > 0 else -1.0
            end = p + sign * GLYPH * self.extent * d
            out.append((p, end, d))
        return out


def scene_of(result: AuditResult) -> Scene:
    """The :class:`Scene` of an audited frame.

    Cost O(p n) for p modes and n joints.
    """
    f = result.frame
    coords = _embed(np.asarray(f.coords, float), f.dimension)
    modes = np.asarray(result.mode_displacements, float)
    modes = np.stack([_embed(u, f.dimension) for u in modes]) if len(modes) else \
        np.zeros((0, len(coords), 3))
    dirs = _embed(np.asarray(f.restraint_dir, float), f.dimension)
    extent = float(np.ptp(coords, axis=0).max()) if len(coords) > 1 else 0.0
    supports = [(int(j), d / np.linalg.norm(d)) for j, d in zip(f.restraint_joint, dirs)]
    return Scene(coords=coords, ends=np.asarray(f.ends, np.int64), extent=extent or 1.0,
                 modes=modes, supports=supports)


def moving_joints(motion: np.ndarray) -> np.ndarray:
    """Joints that move in ``motion`` ``(n, d)``, ``(n,) bool``.

    ``|u_j| > moving * max |u|``, ``moving`` from :class:`~spaceframe.tolerances.Display`.
    """
    size = np.linalg.norm(motion, axis=1)
    return size > DISPLAY.moving * size.max() if size.size else np.zeros(0, bool)


def carrying_members(forces: np.ndarray) -> np.ndarray:
    """Members that carry a state of self-stress ``forces`` ``(m,)``, ``(m,) bool``.

    ``|t_e| > floor``, ``floor`` from :class:`~spaceframe.tolerances.Display`.
    """
    return np.abs(forces) > DISPLAY.floor


def phases(n: int) -> np.ndarray:
    """``n`` phases evenly around one cycle, the last one step short of the first."""
    return np.linspace(0.0, 2.0 * np.pi, n + 1)[:-1]


def view_direction(coords: np.ndarray, motion: np.ndarray | None = None) -> np.ndarray:
    """Unit vector from the frame's centre towards the camera, chosen to show ``motion``.

    Among views from 5 to 60 degrees above level, every 15 degrees of
    azimuth, it picks the one that maximises ``seen * spread * tilt``:
    ``seen`` is the share of the motion across the line of sight (1 when the
    camera looks along the axis of least motion), ``spread`` the area of the
    frame's projected outline relative to the best view's (so that a plane
    truss is not seen edge on), and ``tilt`` a preference for views 20 to 35
    degrees above level, where both plan and height read (1 there, 0.6 at
    60 degrees).  With no motion ``seen`` is 1.  Ties go to the first
    candidate, so the choice is deterministic.

    Parameters
    ----------
    coords : (n, 3) float
    motion : (n, 3) float, optional
        Joint movements.

    Returns
    -------
    (3,) float
    """
    az = np.radians(np.arange(0, 360, 15) + 30.0)
    elevations = {20.0: 1.0, 35.0: 1.0, 50.0: 0.8, 60.0: 0.6, 5.0: 0.7}
    el = np.radians(list(elevations))
    tilt = np.repeat(list(elevations.values()), len(az))
    cand = np.array([[np.cos(e) * np.cos(a), np.cos(e) * np.sin(a), np.sin(e)]
                     for e in el for a in az])
    x = coords - coords.mean(axis=0)
    spread = np.empty(len(cand))
    for i, v in enumerate(cand):
        p = x - np.outer(x @ v, v)
        s = np.linalg.svd(p, compute_uv=False) if len(p) > 1 else np.zeros(3)
        spread[i] = s[0] * s[1] if len(s) > 1 else 0.0
    spread = spread / spread.max() if spread.max() > 0 else np.ones(len(cand))
    seen = np.ones(len(cand))
    if motion is not None and np.any(motion):
        m = np.asarray(motion, float)
        total = float(np.sum(m * m))
        along = (m @ cand.T) ** 2               # (n, candidates)
        seen = 1.0 - along.sum(axis=0) / total
    score = seen * spread * tilt
    return cand[int(np.argmax(score))]


def _embed(a: np.ndarray, dimension: int) -> np.ndarray:
    """``(k, 2)`` plane rows ``[x, y]`` to ``[x, 0, y]``; 3D rows unchanged."""
    a = np.asarray(a, float).reshape(-1, dimension)
    if dimension == 3:
        return a.copy()
    out = np.zeros((len(a), 3))
    out[:, 0], out[:, 2] = a[:, 0], a[:, 1]
    return out
