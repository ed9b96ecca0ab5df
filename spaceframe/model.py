"""The frame: joint coordinates, member ends, restraints and their ids.

A :class:`Frame` is a few NumPy arrays and id lists, nothing more.  Readers in
:mod:`spaceframe.io` build it; analyses in :mod:`spaceframe.analysis` read it.
It never changes after it is made.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Mapping, Sequence

import numpy as np

from .errors import ModelError
from .loads import LoadSet

__all__ = ["Frame", "UNITS", "CARRIES", "CARRIES_TAG", "one_way_members", "bounding_diagonal"]

#: Units of length a model may declare.  Results never depend on them.
UNITS = ("m", "mm", "cm", "ft", "in")

#: The member tag that makes members one-way, and its labels: a ``tension``
#: member (rod, cable, guy) carries tension only, a ``compression`` member
#: (prop, bearing) compression only; a member with no label carries both.
CARRIES_TAG = "carries"
CARRIES = ("tension", "compression")


@dataclass(frozen=True, eq=False)
class Frame:
    """An idealised pin-jointed frame.

    Attributes
    ----------
    joint_ids : tuple of str, length n
        Joint ids, in the order of the rows of ``coords``.
    coords : (n, dimension) float
        Joint coordinates, in ``units``.
    member_ids : tuple of str, length m
        Member ids, in the order of the rows of ``ends``.
    ends : (m, 2) int
        Indices into ``joint_ids`` of each member's two end joints.
    restraint_joint : (k,) int
        For each restrained direction, the index of its joint.  A pin in space
        is three rows, one per axis.
    restraint_dir : (k, dimension) float
        For each restrained direction, a unit vector along it.  The directions
        at one joint are linearly independent (readers merge or reject the
        rest).
    dimension : int
        3 for a space frame, 2 for a plane frame analysed in its own plane.
    name : str
        A title for reports.
    units : str
        Unit of length of ``coords``, one of :data:`UNITS`.
    source : str or None
        The file the frame was read from, for messages.
    lines : mapping of (str, str) to int
        Where known, the 1-based line in ``source`` of each item, keyed by
        ``("joint", id)``, ``("member", id)`` or ``("support", id)``.
    joint_tags, member_tags : mapping of str to tuple of str
        Named attributes of joints and members, one label per item (``""``
        where an item has none).  Conventional names: ``"role"`` (chord, web,
        post, tie, purlin, brace, ...), ``"frame"`` (the planar frame an item
        belongs to, ``"1"``, ``"2"``...), ``"bay"``.  Analyses use them to
        describe results; they never change the numbers.
    member_properties : mapping of str to (m,) float
        Numeric member properties; ``"EA"`` (axial stiffness, any consistent
        unit) weights the soft-mode search and the forces.  Absent: uniform.
    loads : LoadSet or None
        The load cases (:mod:`spaceframe.loads`), joints named by id; None
        when the model gives none.
    prestress : (m,) float or None
        The prestress the frame is built and kept in, as the model declares
        it (member forces, + tension, in any consistent unit): a state of
        self-stress the frame really carries (pretensioned rods, a
        tensegrity).  Only a declared prestress lets the audit count a
        mechanism it stiffens as held.  None: no prestress is designed in.
    """

    joint_ids: tuple[str, ...]
    coords: np.ndarray
    member_ids: tuple[str, ...]
    ends: np.ndarray
    restraint_joint: np.ndarray
    restraint_dir: np.ndarray
    dimension: int = 3
    name: str = ""
    units: str = "m"
    source: str | None = None
    lines: Mapping[tuple[str, str], int] = field(default_factory=dict)
    joint_tags: Mapping[str, tuple[str, ...]] = field(default_factory=dict)
    member_tags: Mapping[str, tuple[str, ...]] = field(default_factory=dict)
    member_properties: Mapping[str, np.ndarray] = field(default_factory=dict)
    loads: LoadSet | None = None
    prestress: np.ndarray | None = None

    def __post_init__(self):
        d = self.dimension
        if d not in (2, 3):
            raise ModelError(f"dimension must be 2 or 3, not {d!r}", path=self.source)
        coords = np.ascontiguousarray(self.coords, dtype=float).reshape(-1, d)
        ends = np.ascontiguousarray(self.ends, dtype=np.int64).reshape(-1, 2)
        rj = np.ascontiguousarray(self.restraint_joint, dtype=np.int64).reshape(-1)
        rd = np.ascontiguousarray(self.restraint_dir, dtype=float).reshape(-1, d)
        if len(self.joint_ids) != len(coords):
            raise ModelError(f"{len(self.joint_ids)} joint ids for {len(coords)} coordinate rows",
                             path=self.source)
        if len(self.member_ids) != len(ends):
            raise ModelError(f"{len(self.member_ids)} member ids for {len(ends)} end pairs",
                             path=self.source)
        if len(rj) != len(rd):
            raise ModelError("restraint_joint and restraint_dir differ in length", path=self.source)
        n = len(coords)
        if ends.size and (ends.min() < 0 or ends.max() >= n):
            raise ModelError("a member end index is outside the joint list", path=self.source)
        if rj.size and (rj.min() < 0 or rj.max() >= n):
            raise ModelError("a restraint joint index is outside the joint list", path=self.source)
        for name, arr in (("coords", coords), ("ends", ends), ("restraint_joint", rj),
                          ("restraint_dir", rd)):
            arr.setflags(write=False)
            object.__setattr__(self, name, arr)
        object.__setattr__(self, "joint_ids", tuple(self.joint_ids))
        object.__setattr__(self, "member_ids", tuple(self.member_ids))
        object.__setattr__(self, "lines", MappingProxyType(dict(self.lines)))
        for attr, count in (("joint_tags", n), ("member_tags", len(ends))):
            tags = {}
            for key, labels in dict(getattr(self, attr)).items():
                labels = tuple(str(v) for v in labels)
                if len(labels) != count:
                    raise ModelError(f"{attr}[{key!r}] has {len(labels)} labels for {count} items",
                                     path=self.source)
                tags[str(key)] = labels
            object.__setattr__(self, attr, MappingProxyType(tags))
        props = {}
        for key, values in dict(self.member_properties).items():
            arr = np.array(values, dtype=float).reshape(-1)
            if len(arr) != len(ends) or not np.all(np.isfinite(arr)) or np.any(arr <= 0):
                raise ModelError(f"member property {key!r} needs one positive finite value per "
                                 f"member ({len(ends)})", path=self.source)
            arr.setflags(write=False)
            props[str(key)] = arr
        object.__setattr__(self, "member_properties", MappingProxyType(props))
        if self.prestress is not None:
            t = np.array(self.prestress, dtype=float).reshape(-1)
            if len(t) != len(ends) or not np.all(np.isfinite(t)) or not np.any(t):
                raise ModelError(f"the prestress needs one finite force per member "
                                 f"({len(ends)}), not all zero", path=self.source)
            t.setflags(write=False)
            object.__setattr__(self, "prestress", t)

    @property
    def n_joints(self) -> int:
        return len(self.joint_ids)

    @property
    def n_members(self) -> int:
        return len(self.member_ids)

    @property
    def n_restraints(self) -> int:
        """Number of independent restrained directions."""
        return len(self.restraint_joint)

    def lengths(self) -> np.ndarray:
        """Member lengths, ``(m,) float``, in ``units``."""
        return np.linalg.norm(self.coords[self.ends[:, 1]] - self.coords[self.ends[:, 0]], axis=1)

    def size(self) -> float:
        """The model's size: the diagonal of the joints' bounding box.

        0 for fewer than two distinct joints.  Every relative tolerance of
        length (:mod:`spaceframe.tolerances`) is a fraction of it.
        """
        return bounding_diagonal(self.coords)

    def bending_scale(self, *, flat: float = 1e-4) -> float | None:
        """How slender the frame is: ``(t / L) * (l / L)``, dimensionless.

        ``L`` and ``t`` are twice the largest and the smallest standard
        deviation of the joints along their principal axes (the square roots
        of the eigenvalues of their covariance, so a turned frame gives the
        same; for two layers or legs at ``+-t/2`` exactly their distance ``t``,
        for joints spread evenly over a span ``S`` about ``0.58 S``); a
        deviation of at most ``flat`` times the largest does not count (a
        plane truss standing in space is as thin as its depth, not zero).
        ``l`` is the median member length.  A pin-jointed lattice bends like a
        beam or a plate of depth ``t`` and span ``L`` with panels of size
        ``l``: its softest non-zero deformation stretches members by about
        ``(t / L) * (l / L)`` of what a unit movement does, so the smallest
        singular value of its compatibility matrix is of that order, relative
        to the largest (measured: a double-layer grid of 112 x 112 bays of 3 m,
        2.1 m deep, ``1.67e-4`` against a smallest singular value of
        ``7.5e-5``; a lone tower 2 m wide of 625 storeys of 3 m, ``5.1e-6``
        against ``6.9e-7``).  The rank and one-way thresholds are kept below
        it (:meth:`spaceframe.tolerances.Tolerances.rank_threshold`).

        Returns None when the frame has no member or no extent beside its
        length (a line of joints).  Cost O(n + m).
        """
        if self.n_members == 0 or self.n_joints < 2:
            return None
        x = self.coords - self.coords.mean(axis=0)
        spread = 2 * np.sqrt(np.clip(np.linalg.eigvalsh(x.T @ x / len(x)), 0.0, None))
        L = float(spread.max())
        deep = spread[spread > flat * L]
        if L == 0 or len(deep) < 2:
            return None
        return float(deep.min() / L * np.median(self.lengths()) / L)

    def tag(self, kind: str, name: str) -> tuple[str, ...] | None:
        """Labels of attribute ``name`` for ``kind`` ``"joint"`` or ``"member"``, or None."""
        return (self.joint_tags if kind == "joint" else self.member_tags).get(name)

    def line_of(self, kind: str, item: str) -> int | None:
        """The source line of ``(kind, item)``, or None where it is not known."""
        return self.lines.get((kind, item))

    @classmethod
    def from_arrays(cls, coords, ends, *, joint_ids: Sequence[str] | None = None,
                    member_ids: Sequence[str] | None = None,
                    supports: Mapping[int, object] | None = None,
                    dimension: int | None = None, **kw) -> "Frame":
        """Build a frame from arrays, naming joints ``J1…`` and members ``M1…`` by default.

        Parameters
        ----------
        coords : (n, d) array_like of float
        ends : (m, 2) array_like of int
            Joint indices of each member.
        supports : mapping of int to str or (k, d) array_like, optional
            Joint index → support: ``"pin"``, letters of held axes (``"xz"``)
            or a list of direction vectors held.
        dimension : int, optional
            Defaults to the number of columns of ``coords``.

        Examples
        --------
        >>> f = Frame.from_arrays([[0, 0], [1, 0], [0, 1]], [[0, 1], [1, 2], [2, 0]],
        ...                       supports={0: "pin", 1: "y"})
        >>> f.n_joints, f.n_members, f.n_restraints
        (3, 3, 3)
        """
        from .supports import restraint_rows

        coords = np.asarray(coords, dtype=float)
        dimension = dimension or coords.shape[1]
        n, m = len(coords), len(np.asarray(ends).reshape(-1, 2))
        joint_ids = tuple(joint_ids) if joint_ids is not None else tuple(f"J{i + 1}" for i in range(n))
        member_ids = tuple(member_ids) if member_ids is not None else tuple(f"M{i + 1}" for i in range(m))
        rj, rd = [], []
        for j, spec in (supports or {}).items():
            rows = restraint_rows(spec, dimension, joint=joint_ids[j])
            rj.extend([j] * len(rows))
            rd.extend(rows)
        return cls(joint_ids=joint_ids, coords=coords, member_ids=member_ids, ends=ends,
                   restraint_joint=np.array(rj, dtype=np.int64),
                   restraint_dir=np.array(rd, dtype=float).reshape(-1, dimension),
                   dimension=dimension, **kw)


def one_way_members(frame: Frame) -> tuple[np.ndarray, np.ndarray]:
    """The members that act one way only, from the member tag ``carries``.

    Parameters
    ----------
    frame : Frame

    Returns
    -------
    tension : (a,) int
        Indices of the members labelled ``tension`` (they go slack when they
        would shorten), ascending.
    compression : (b,) int
        Indices of the members labelled ``compression`` (they lift off when
        they would lengthen), ascending.

    Raises
    ------
    ModelError
        For a label other than those of :data:`CARRIES` (readers of model
        files check it first, with the line).

    Examples
    --------
    >>> f = Frame.from_arrays([[0, 0], [1, 0], [0, 1]], [[0, 1], [1, 2], [2, 0]],
    ...                       member_tags={"carries": ["", "tension", ""]})
    >>> one_way_members(f)
    (array([1]), array([], dtype=int64))

    Notes
    -----
    Cost O(m).
    """
    labels = frame.member_tags.get(CARRIES_TAG)
    if labels is None:
        empty = np.zeros(0, dtype=np.int64)
        return empty, empty.copy()
    bad = sorted({lab for lab in labels if lab and lab not in CARRIES})
    if bad:
        from .suggest import did_you_mean
        k = labels.index(bad[0])
        raise ModelError(f"member tag {CARRIES_TAG!r} has label {bad[0]!r}; the labels are "
                         f"{' and '.join(CARRIES)} (members not listed carry both)"
                         f"{did_you_mean(bad[0], CARRIES)}", path=frame.source,
                         line=frame.line_of("member", frame.member_ids[k]),
                         item=frame.member_ids[k])
    arr = np.array(labels, dtype=object)
    return (np.flatnonzero(arr == "tension").astype(np.int64),
            np.flatnonzero(arr == "compression").astype(np.int64))


def bounding_diagonal(points) -> float:
    """Diagonal of the bounding box of ``points`` ``(n, d)``; 0 when there are none.

    :meth:`Frame.size` is this of the joints; a reader uses it on the
    vertices it has before there is a frame.
    """
    points = np.asarray(points, dtype=float)
    if len(points) == 0:
        return 0.0
    return float(np.linalg.norm(points.max(axis=0) - points.min(axis=0)))
