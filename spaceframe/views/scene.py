"""Geometry shared by the pictures: the frame in 3D, mode motion, camera, support glyphs.

Plain NumPy; no drawing library.  :mod:`spaceframe.views.render` (pictures,
animations) and :mod:`spaceframe.views.report` (the HTML report's viewer) read
the same numbers from here, so a still, an animation and the report show one
frame the same way.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..model import Frame
from ..modeset import ModeSet
from ..results import AuditResult
from ..tolerances import DEFAULT, DISPLAY

__all__ = ["Scene", "Motions", "scene_of", "frame_scene", "phases", "view_direction",
           "moving_joints", "carrying_members", "embed", "AMPLITUDE", "GLYPH", "ARROW"]

#: Largest joint movement drawn, as a fraction of the frame's largest extent.
AMPLITUDE = 0.12

#: Length of a support glyph's stalk, as a fraction of the frame's largest extent.
GLYPH = 0.06

#: Longest load or reaction arrow, as a fraction of the frame's largest extent (the
#: forces still and the report's view).
ARROW = 0.16


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
    modes : sequence of (n, 3) float
        The audit's mechanisms (largest joint movement 1), in its order, then
        the one-way motion of a frame its one-way members do not hold; each
        embedded in 3D as it is read (:class:`Motions`), so a frame with
        thousands of sparse modes is never expanded whole.
    supports : list of (joint index, (3,) unit vector)
        One entry per restrained direction.
    normal : (3,) float or None
        Normal of the frames' own plane, the direction to look along to see
        their elevation: the direction of a row of tagged frames (an
        extrusion), or the normal of a frame whose members all lie in one
        plane; None otherwise.
    one_way : int or None
        Index in ``modes`` of that one-way motion (it goes one way only).
    """

    coords: np.ndarray
    ends: np.ndarray
    extent: float
    modes: "Motions"
    supports: list
    normal: np.ndarray | None = None
    one_way: int | None = None

    @property
    def unit(self) -> float:
        """Size of the drawing's marks (tube radii, balls, support glyphs) are fractions of:
        the extent, or six median member lengths when that is smaller (a tall tower's
        balls and plates stay the size of its members)."""
        if not len(self.ends):
            return self.extent
        length = np.linalg.norm(self.coords[self.ends[:, 1]] - self.coords[self.ends[:, 0]], axis=1)
        return float(min(self.extent, 6.0 * np.median(length))) or self.extent

    def view(self, mode: int | None = None) -> np.ndarray:
        """The camera direction for mode ``mode`` (0-based; None: at rest), see
        :func:`view_direction`."""
        motion = None if mode is None else self.modes[mode]
        return view_direction(self.coords, motion, ends=self.ends, normal=self.normal)

    def displaced(self, mode: int | None, phase: float) -> np.ndarray:
        """Joint positions ``(n, 3)`` at ``phase`` (radians) of mode ``mode`` (0-based).

        The movement is ``AMPLITUDE * extent * sin(phase) * u``: a seamless loop
        over ``phase`` in ``[0, 2 pi)``.  ``mode=None`` is the frame at rest.
        The one-way motion goes out and back on one side only, by
        ``(1 + sin(phase)) / 2``: the reverse movement is resisted.
        """
        if mode is None:
            return self.coords.copy()
        a = (1.0 + np.sin(phase)) / 2 if mode == self.one_way else np.sin(phase)
        return self.coords + AMPLITUDE * self.extent * a * self.modes[mode]

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
            end = p + sign * GLYPH * self.unit * d
            out.append((p, end, d))
        return out


class Motions:
    """Joint movements read one at a time, in 3D: a :class:`ModeSet`, then extra motions.

    ``len(motions)``, ``motions[i]`` (``(n, 3)``, a plane frame's ``[x, y]`` as
    ``[x, 0, y]``) and iteration; nothing is expanded until it is read.
    """

    def __init__(self, modes: ModeSet, dimension: int, extra=()):
        self.base, self.dimension = modes, dimension
        self.extra = [np.asarray(u, float) for u in extra]

    def __len__(self) -> int:
        return len(self.base) + len(self.extra)

    def __getitem__(self, i: int) -> np.ndarray:
        k = len(self.base)
        if not -len(self) <= i < len(self):
            raise IndexError(f"motion {i} of {len(self)}")
        i %= len(self)
        u = self.base[i] if i < k else self.extra[i - k]
        return embed(u, self.dimension)

    def __iter__(self):
        return (self[i] for i in range(len(self)))


def scene_of(result: AuditResult) -> Scene:
    """The :class:`Scene` of an audited frame: its mechanisms, then any one-way motion.

    Cost O(n + m) to build; each motion O(n) when it is read.
    """
    w = result.one_way
    one_way = None
    extra = ()
    if w is not None and w.motion is not None:
        one_way, extra = result.mechanisms, (w.motion,)
    return frame_scene(result.frame, Motions(result.modes, result.frame.dimension, extra),
                       one_way=one_way)


def frame_scene(f: Frame, modes=None, *, one_way: int | None = None) -> Scene:
    """The :class:`Scene` of a frame with the joint movements ``modes`` ``(p, n, d)``
    (none: the frame at rest; or :class:`Motions`); ``one_way`` is the index of a
    one-way motion among them."""
    coords = embed(np.asarray(f.coords, float), f.dimension)
    if not isinstance(modes, Motions):
        modes = np.zeros((0, f.n_joints, f.dimension)) if modes is None else \
            np.asarray(modes, float)
        modes = Motions(ModeSet(modes, (f.n_joints, f.dimension)), f.dimension)
    dirs = embed(np.asarray(f.restraint_dir, float), f.dimension)
    extent = float(np.ptp(coords, axis=0).max()) if len(coords) > 1 else 0.0
    supports = [(int(j), d / np.linalg.norm(d)) for j, d in zip(f.restraint_joint, dirs)]
    ends = np.asarray(f.ends, np.int64)
    return Scene(coords=coords, ends=ends, extent=extent or 1.0, modes=modes,
                 supports=supports, one_way=one_way,
                 normal=_frames_normal(f.tag("joint", "frame"), coords, ends))


def _frames_normal(frames, coords: np.ndarray, ends: np.ndarray) -> np.ndarray | None:
    """Direction across the frames' own plane (:attr:`Scene.normal`), or None."""
    if frames:
        names = [fr for fr in dict.fromkeys(frames) if fr]
        if len(names) >= 2:
            labels = np.array(frames)
            v = coords[labels == names[-1]].mean(axis=0) - coords[labels == names[0]].mean(axis=0)
            if np.linalg.norm(v) > 0:
                return v / np.linalg.norm(v)
    if len(ends) < 2:
        return None
    w = coords[ends[:, 1]] - coords[ends[:, 0]]
    _, s, vt = np.linalg.svd(w, full_matrices=False)
    eps = DEFAULT.direction_rank            # as for the plane of a joint's members
    if len(s) == 3 and s[2] <= eps * s[0] and s[1] > eps * s[0]:
        return vt[2]
    return None


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


def view_direction(coords: np.ndarray, motion: np.ndarray | None = None, *,
                   ends: np.ndarray | None = None,
                   normal: np.ndarray | None = None) -> np.ndarray:
    """Unit vector from the frame's centre towards the camera, chosen to show ``motion``.

    The view sought is an engineer's oblique elevation: low (10 to 30
    degrees above level), looking across the motion, with the frames'
    members seen at length.  Among views every 15 degrees of azimuth and at
    10, 20, 30, 45 and 60 degrees above level it picks the one that
    maximises ``sqrt(seen * spread) * members**2 * face * tilt``:

    - ``seen``: the share of the motion across the line of sight (1 when the
      camera looks along the axis of least motion; 1 with no motion);
    - ``spread``: the area of the frame's projected outline relative to the
      best view's (a plane truss is not seen edge on);
    - ``members``: the members' projected length over their length (weighted
      by length; 1 without ``ends``), which is low when a family of members
      (the chords of trusses in a row, say) points at the camera;
    - ``face``: with ``normal`` (the frames' plane, :attr:`Scene.normal`),
      ``0.25 + 0.75 min(1, |v . normal| / 0.7)``, so the frames are seen in elevation
      rather than edge on (but not straight along a row, where they hide each
      other); 1 without;
    - ``tilt``: 1 at 20 degrees, 0.9 at 10 and 30, 0.6 at 45, 0.4 at 60,
      so that a roof is seen in elevation rather than as a plan grid.

    Ties go to the first candidate, so the choice is deterministic, except that
    of a view and its mirror in ``y = 0`` that score the same (to 1e-9: every
    plane frame, which lies in that plane) the one from ``-y`` is taken, so
    that x runs from left to right as on a drawn elevation (common practice).

    Parameters
    ----------
    coords : (n, 3) float
    motion : (n, 3) float, optional
        Joint movements.
    ends : (m, 2) int, optional
        Member ends (joint indices).
    normal : (3,) float, optional
        Normal of the frames' own plane.

    Returns
    -------
    (3,) float

    Notes
    -----
    Cost O((n + m) c) for the c = 120 candidate views.
    """
    az = np.radians(np.arange(0, 360, 15) + 30.0)
    elevations = {20.0: 1.0, 10.0: 0.9, 30.0: 0.9, 45.0: 0.6, 60.0: 0.4}
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
    members = np.ones(len(cand))
    if ends is not None and len(ends):
        w = coords[ends[:, 1]] - coords[ends[:, 0]]                 # (m, 3)
        length = np.linalg.norm(w, axis=1)
        cos2 = (w @ cand.T) ** 2 / np.maximum(length ** 2, 1e-300)[:, None]
        members = length @ np.sqrt(np.clip(1.0 - cos2, 0.0, 1.0)) / max(length.sum(), 1e-300)
    face = 0.25 + 0.75 * np.minimum(1.0, np.abs(cand @ normal) / 0.7) if normal is not None \
        else np.ones(len(cand))
    score = np.sqrt(seen * spread) * members ** 2 * face * tilt
    best = int(np.argmax(score))
    if cand[best, 1] > 0:       # its mirror in y = 0 as good (a plane frame): look from -y
        mirror = int(np.argmin(np.linalg.norm(cand - cand[best] * [1, -1, 1], axis=1)))
        if score[mirror] >= score[best] * (1 - 1e-9):
            best = mirror
    return cand[best]


def embed(a: np.ndarray, dimension: int) -> np.ndarray:
    """Rows of a frame's space in the pictures' 3D, ``(k, 3)`` float: a plane frame's
    ``[x, y]`` becomes ``[x, 0, y]`` (its y is up, as z is in space); 3D rows are copied.

    Used for every array drawn: coordinates, modes, restraint directions, loads and
    reactions (pictures and the report alike).

    Examples
    --------
    >>> embed([[1.0, 2.0]], 2).tolist()
    [[1.0, 0.0, 2.0]]
    """
    a = np.asarray(a, float).reshape(-1, dimension)
    if dimension == 3:
        return a.copy()
    out = np.zeros((len(a), 3))
    out[:, 0], out[:, 2] = a[:, 0], a[:, 1]
    return out
