"""Generators of standard frame families, for tests, benchmarks and examples.

Each generator is deterministic: the same arguments give the same
:class:`~spaceframe.model.Frame`, joint for joint and member for member, in
the same order and with the same ids.  Ids are readable and say where an item
is and what it does (``T3_7`` is the top-chord joint in column 3, row 7;
``D2_4ne`` is the diagonal from bottom joint ``B2_4`` to the top joint to its
north-east).

The counts of joints, members and restraints of each family are given as
formulas in its docstring; the tests check them, and check the numbers of
mechanisms and states of self-stress of small members of each family against
a dense singular value decomposition.
"""

from __future__ import annotations

import math
from typing import Mapping

import numpy as np

from .errors import SpaceframeError
from .model import Frame, UNITS

__all__ = ["double_layer_grid", "double_layer_grid_size", "braced_tower", "plane_truss_roof",
           "GRID_SUPPORTS", "TOWER_BRACING"]

#: Support layouts :func:`double_layer_grid` knows by name.
GRID_SUPPORTS = ("corners", "perimeter", "minimal", "none")

#: Face bracing patterns :func:`braced_tower` knows by name.
TOWER_BRACING = ("x", "single", "none")

#: Corner letters of a tower, counter-clockwise in plan from (-x, -y).
_CORNERS = "abcd"


def _bad(argument: str, expected: str, received, fix: str) -> SpaceframeError:
    """One message template for a bad argument: which, what was expected, what came, the fix."""
    return SpaceframeError(f"{argument}: expected {expected}, received {received!r}; {fix}")


def _count(value, argument: str, minimum: int = 1) -> int:
    if isinstance(value, bool) or not isinstance(value, (int, np.integer)) or value < minimum:
        raise _bad(argument, f"an integer >= {minimum}", value,
                   f"give a whole number of bays or storeys, e.g. {argument}={max(minimum, 4)}")
    return int(value)


def _length(value, argument: str) -> float:
    try:
        x = float(value)
    except (TypeError, ValueError):
        x = math.nan
    if not (math.isfinite(x) and x > 0):
        raise _bad(argument, "a finite length > 0", value, f"give {argument} in the model's units")
    return x


def _units(units) -> str:
    if units not in UNITS:
        raise _bad("units", f"one of {', '.join(UNITS)}", units,
                   "pick the unit of the lengths given")
    return units


def double_layer_grid(nx: int, ny: int | None = None, *, bay: float = 3.0, depth: float = 2.1,
                      supports: str | Mapping[str, object] = "corners", name: str | None = None,
                      units: str = "m") -> Frame:
    """A square-on-square offset double-layer grid of ``nx`` by ``ny`` bays.

    The top layer is a square grid of ``(nx + 1) * (ny + 1)`` joints at
    ``z = depth``; the bottom layer is a square grid of ``nx * ny`` joints at
    ``z = 0``, one under the centre of each top bay.  Both layers have chords
    in both directions, and four diagonals run from each bottom joint up to the
    four top joints around it.

    Parameters
    ----------
    nx, ny : int
        Number of bays along x and along y, each ``>= 1``.  ``ny`` defaults to
        ``nx`` (a square grid).
    bay : float, optional
        Chord length of both layers, in ``units``.  Default 3.0.
    depth : float, optional
        Vertical distance between the layers, in ``units``.  Default 2.1.
    supports : str or mapping of str to support, optional
        Where the grid is held.  All named layouts are on top-layer joints:

        ``"corners"`` (default)
            a pin at each of the four top corners;
        ``"perimeter"``
            a pin at every top joint of the perimeter;
        ``"minimal"``
            the six restraints that stop rigid-body motion and nothing more:
            a pin at ``T0_0``, ``"yz"`` at ``T{nx}_0`` and ``"z"`` at
            ``T0_{ny}``;
        ``"none"``
            free in space.

        A mapping of joint id to support (``"pin"``, axis letters or a list of
        direction vectors, as in a model file) places supports anywhere.
    name : str, optional
        Title of the frame.  Defaults to ``"double-layer grid {nx}x{ny}"``.
    units : str, optional
        Unit of length, one of :data:`spaceframe.model.UNITS`.  Default ``"m"``.

    Returns
    -------
    frame : Frame
        Three-dimensional, with

        * joints ``n = (nx + 1)(ny + 1) + nx ny = 2 nx ny + nx + ny + 1``:
          first the top joints ``T{i}_{j}`` at ``(i bay, j bay, depth)``,
          ``i`` outer and ``j`` inner, then the bottom joints ``B{i}_{j}`` at
          ``((i + 1/2) bay, (j + 1/2) bay, 0)``;
        * members ``m = 8 nx ny``, in this order: top chords along x
          ``TX{i}_{j}`` (``T{i}_{j}``-``T{i+1}_{j}``, ``nx (ny + 1)`` of them),
          top chords along y ``TY{i}_{j}`` (``T{i}_{j}``-``T{i}_{j+1}``,
          ``(nx + 1) ny``), bottom chords ``BX{i}_{j}`` (``(nx - 1) ny``) and
          ``BY{i}_{j}`` (``nx (ny - 1)``), then the diagonals
          ``D{i}_{j}sw``, ``…se``, ``…ne``, ``…nw`` from ``B{i}_{j}`` up to
          the top joints south-west, south-east, north-east and north-west of
          it, taking x as east and y as north (``4 nx ny``);
        * restraints ``r = 12`` for ``"corners"``, ``6 (nx + ny)`` for
          ``"perimeter"``, ``6`` for ``"minimal"``, ``0`` for ``"none"``.

        Maxwell's count is therefore ``m - 3n + r = 2 nx ny - 3 (nx + ny + 1) + r``.

    Raises
    ------
    SpaceframeError
        For a count below one, a length that is not finite and positive, an
        unknown support layout or a support on a joint the grid does not have.

    Notes
    -----
    Building the frame costs O(nx ny) time and memory.

    What the audit finds, for ``nx, ny >= 2`` (found by dense SVD for every
    size up to 7 by 7 and checked in ``tests/test_families.py``):

    * free (``"none"``): 7 mechanisms, the 6 rigid-body motions and one
      internal twist (the layers shear in opposite senses while the grid warps
      into a saddle, ``w ~ x y``); ``2 nx ny - 3 (nx + ny) + 4`` states of
      self-stress;
    * ``"minimal"``: the twist alone, 1 internal mechanism, and the same
      self-stress count as the free grid;
    * ``"corners"`` and ``"perimeter"``: no mechanism, so the self-stress
      count equals Maxwell's count, ``2 nx ny - 3 (nx + ny) + 9`` and
      ``2 nx ny + 3 (nx + ny) - 3``.

    A strip one bay wide has more: with ``nx = 1`` and corner supports, each
    of the ``ny - 1`` interior top chords across the strip can turn, giving
    ``ny - 1`` mechanisms.

    References
    ----------
    .. [1] Z. S. Makowski (ed.), *Analysis, Design and Construction of
       Double-Layer Grids*, Applied Science Publishers, 1981.
    .. [2] S. Pellegrino and C. R. Calladine, "Matrix analysis of statically
       and kinematically indeterminate frameworks", *Int. J. Solids Struct.*
       22(4), 409-428, 1986.

    Examples
    --------
    >>> f = double_layer_grid(4, 3, supports="perimeter")
    >>> f.n_joints, f.n_members, f.n_restraints
    (32, 96, 42)
    >>> f.joint_ids[:3], f.member_ids[-1]
    (('T0_0', 'T0_1', 'T0_2'), 'D3_2nw')
    """
    nx = _count(nx, "nx")
    ny = nx if ny is None else _count(ny, "ny")
    bay = _length(bay, "bay")
    depth = _length(depth, "depth")
    units = _units(units)

    # Joints: top (nx+1)(ny+1), then bottom nx*ny, each block i-major.
    ti, tj = np.meshgrid(np.arange(nx + 1), np.arange(ny + 1), indexing="ij")
    bi, bj = np.meshgrid(np.arange(nx), np.arange(ny), indexing="ij")
    ti, tj, bi, bj = ti.ravel(), tj.ravel(), bi.ravel(), bj.ravel()
    n_top = (nx + 1) * (ny + 1)
    coords = np.concatenate([
        np.column_stack([ti * bay, tj * bay, np.full(n_top, depth)]),
        np.column_stack([(bi + 0.5) * bay, (bj + 0.5) * bay, np.zeros(nx * ny)]),
    ])
    joint_ids = ([f"T{i}_{j}" for i, j in zip(ti.tolist(), tj.tolist())]
                 + [f"B{i}_{j}" for i, j in zip(bi.tolist(), bj.tolist())])

    def top(i, j):
        return i * (ny + 1) + j

    def bottom(i, j):
        return n_top + i * ny + j

    blocks, ids = [], []

    def add(prefix, i, j, a, b):
        blocks.append(np.column_stack([a, b]))
        ids.extend(f"{prefix}{p}_{q}" for p, q in zip(i.tolist(), j.tolist()))

    def grid(ni, nj):
        i, j = np.meshgrid(np.arange(ni), np.arange(nj), indexing="ij")
        return i.ravel(), j.ravel()

    i, j = grid(nx, ny + 1)
    add("TX", i, j, top(i, j), top(i + 1, j))
    i, j = grid(nx + 1, ny)
    add("TY", i, j, top(i, j), top(i, j + 1))
    i, j = grid(nx - 1, ny)
    add("BX", i, j, bottom(i, j), bottom(i + 1, j))
    i, j = grid(nx, ny - 1)
    add("BY", i, j, bottom(i, j), bottom(i, j + 1))
    # Diagonals grouped by bottom joint, four in turn (sw, se, ne, nw).
    b = bottom(bi, bj)
    diag = np.stack([top(bi, bj), top(bi + 1, bj), top(bi + 1, bj + 1), top(bi, bj + 1)], axis=1)
    blocks.append(np.column_stack([np.repeat(b, 4), diag.ravel()]))
    ids.extend(f"D{p}_{q}{s}" for p, q in zip(bi.tolist(), bj.tolist())
               for s in ("sw", "se", "ne", "nw"))
    ends = np.concatenate(blocks)

    if isinstance(supports, str):
        if supports == "corners":
            held = {top(0, 0): "pin", top(nx, 0): "pin", top(nx, ny): "pin", top(0, ny): "pin"}
        elif supports == "perimeter":
            edge = (ti == 0) | (ti == nx) | (tj == 0) | (tj == ny)
            held = {int(k): "pin" for k in np.flatnonzero(edge)}
        elif supports == "minimal":
            held = {top(0, 0): "pin", top(nx, 0): "yz", top(0, ny): "z"}
        elif supports == "none":
            held = {}
        else:
            raise _bad("supports", f"one of {', '.join(map(repr, GRID_SUPPORTS))} or a mapping "
                       f"of joint id to support", supports,
                       "name a layout, or pass e.g. {'T0_0': 'pin'}")
    else:
        index = {jid: k for k, jid in enumerate(joint_ids)}
        held = {}
        for jid, spec in dict(supports).items():
            if jid not in index:
                raise _bad("supports", "ids of joints of the grid", jid,
                           f"use ids such as 'T0_0' (top, 0..{nx} by 0..{ny}) or 'B0_0' "
                           f"(bottom, 0..{nx - 1} by 0..{ny - 1})")
            held[index[jid]] = spec
    return Frame.from_arrays(coords, ends, joint_ids=joint_ids, member_ids=ids, supports=held,
                             name=name if name is not None else f"double-layer grid {nx}x{ny}",
                             units=units)


def double_layer_grid_size(members: int) -> int:
    """The number of bays ``nx`` of the square grid with nearest ``members``.

    ``double_layer_grid(nx)`` has ``8 nx**2`` members; this returns the
    ``nx >= 1`` that brings ``8 nx**2`` nearest to ``members`` (the smaller on
    a tie).

    Parameters
    ----------
    members : int
        Target member count, ``>= 1``.

    Returns
    -------
    nx : int

    Raises
    ------
    SpaceframeError
        If ``members`` is not an integer ``>= 1``.

    Notes
    -----
    O(1).

    Examples
    --------
    >>> double_layer_grid_size(100_000), double_layer_grid_size(6_000)
    (112, 27)
    >>> 8 * 112 ** 2
    100352
    """
    members = _count(members, "members")
    lo = max(1, math.isqrt(members // 8))
    candidates = [k for k in (lo - 1, lo, lo + 1, lo + 2) if k >= 1]
    return min(candidates, key=lambda k: (abs(8 * k * k - members), k))


def braced_tower(storeys: int, *, width: float = 2.0, storey_height: float = 3.0,
                 top_width: float | None = None, bracing: str = "x",
                 plan_bracing: bool = False, name: str | None = None,
                 units: str = "m") -> Frame:
    """A square lattice tower: four legs, a ring of horizontals at every level, braced faces.

    Parameters
    ----------
    storeys : int
        Number of storeys (panels up the height), ``>= 1``.
    width : float, optional
        Side of the square plan at the base, in ``units``.  Default 2.0.
    storey_height : float, optional
        Height of each storey, in ``units``.  Default 3.0.
    top_width : float, optional
        Side of the plan at the top; the legs taper linearly from ``width``.
        Defaults to ``width`` (straight legs).
    bracing : {"x", "single", "none"}, optional
        Bracing of each face panel.  ``"x"`` (default): two crossing
        diagonals, not joined where they cross.  ``"single"``: one diagonal,
        its direction alternating storey by storey (a zigzag up each face).
        ``"none"``: unbraced, for comparison.
    plan_bracing : bool, optional
        Add one horizontal diagonal (from corner ``a`` to corner ``c``) at
        every level above the base.  Default False.
    name : str, optional
        Title.  Defaults to ``"braced tower, {storeys} storeys"``.
    units : str, optional
        Unit of length.  Default ``"m"``.

    Returns
    -------
    frame : Frame
        Three-dimensional, with ``s = storeys`` and

        * joints ``n = 4 (s + 1)``: ``N{k}{c}`` at level ``k = 0..s``
          (height ``k * storey_height``), corner ``c`` one of ``a b c d``,
          counter-clockwise in plan from ``(-w/2, -w/2)``; level by level;
        * members, storey by storey: legs ``LEG{k}{c}`` (``4 s``), rings
          ``RING{k}{cc'}`` at levels ``1..s`` (``4 s``), face braces
          ``BR{k}{cc'}`` (``"single"``, ``4 s``) or ``BR{k}{cc'}_1`` and
          ``_2`` (``"x"``, ``8 s``), and ``PLAN{k}`` (``s`` with
          ``plan_bracing``).  In all ``m = 8 s + {8 s, 4 s, 0} + {s, 0}``;
        * restraints ``r = 12``: the four base joints are pinned.

    Raises
    ------
    SpaceframeError
        For a storey count below one, a length that is not finite and
        positive, or an unknown bracing pattern.

    Notes
    -----
    Building the frame costs O(s) time and memory.

    With ``"single"`` bracing the tower is statically and kinematically
    determinate: ``m = 12 s`` equals the ``12 s`` free degrees of freedom and
    the audit finds no mechanism and no state of self-stress.  Each
    ``"x"``-braced panel adds one state of self-stress (``4 s`` in all), and
    each plan diagonal one more.  Unbraced, each storey's four faces are
    rectangles free to shear.  All checked by dense SVD in the tests.

    References
    ----------
    .. [1] S. Pellegrino and C. R. Calladine, "Matrix analysis of statically
       and kinematically indeterminate frameworks", *Int. J. Solids Struct.*
       22(4), 409-428, 1986.

    Examples
    --------
    >>> f = braced_tower(5, bracing="single")
    >>> f.n_joints, f.n_members, f.n_restraints
    (24, 60, 12)
    >>> f.member_ids[:2]
    ('LEG1a', 'LEG1b')
    """
    s = _count(storeys, "storeys")
    width = _length(width, "width")
    storey_height = _length(storey_height, "storey_height")
    top = width if top_width is None else _length(top_width, "top_width")
    if bracing not in TOWER_BRACING:
        raise _bad("bracing", " or ".join(map(repr, TOWER_BRACING)), bracing,
                   "choose crossing ('x'), one diagonal per panel ('single') or none")
    units = _units(units)

    signs = np.array([[-1, -1], [1, -1], [1, 1], [-1, 1]], dtype=float)
    levels = np.arange(s + 1)
    half = 0.5 * (width + (top - width) * levels / s)
    coords = np.concatenate([
        np.column_stack([signs * h, np.full(4, k * storey_height)]) for k, h in zip(levels, half)
    ])
    joint_ids = [f"N{k}{c}" for k in levels.tolist() for c in _CORNERS]

    def node(k, c):
        return 4 * k + c

    ends, ids = [], []
    for k in range(1, s + 1):
        for c in range(4):
            ends.append((node(k - 1, c), node(k, c)))
            ids.append(f"LEG{k}{_CORNERS[c]}")
        for c in range(4):
            ends.append((node(k, c), node(k, (c + 1) % 4)))
            ids.append(f"RING{k}{_CORNERS[c]}{_CORNERS[(c + 1) % 4]}")
        for c in range(4):
            c2 = (c + 1) % 4
            face = f"{_CORNERS[c]}{_CORNERS[c2]}"
            if bracing == "x":
                ends += [(node(k - 1, c), node(k, c2)), (node(k - 1, c2), node(k, c))]
                ids += [f"BR{k}{face}_1", f"BR{k}{face}_2"]
            elif bracing == "single":
                lo, hi = (c, c2) if k % 2 else (c2, c)
                ends.append((node(k - 1, lo), node(k, hi)))
                ids.append(f"BR{k}{face}")
        if plan_bracing:
            ends.append((node(k, 0), node(k, 2)))
            ids.append(f"PLAN{k}")
    return Frame.from_arrays(coords, np.array(ends, dtype=np.int64).reshape(-1, 2),
                             joint_ids=joint_ids, member_ids=ids,
                             supports={node(0, c): "pin" for c in range(4)},
                             name=name if name is not None else f"braced tower, {s} storeys",
                             units=units)


def plane_truss_roof(trusses: int, panels: int, *, panel: float = 3.0, depth: float = 2.0,
                     spacing: float = 6.0, name: str | None = None, units: str = "m") -> Frame:
    """A row of flat plane trusses tied by purlins at the top chord, bottom chords untied.

    Each truss is a Pratt-like girder in its own vertical plane ``y = f spacing``:
    bottom-chord joints ``F{f}.L{i}`` at ``(i panel, y, 0)`` and top-chord joints
    ``F{f}.U{i}`` at ``(i panel, y, depth)``, ``i = 0..panels``, with chords,
    verticals and one diagonal per panel; each truss is pinned at both bottom ends.
    Purlins ``P{f}.{i}`` join ``F{f}.U{i}`` to ``F{f+1}.U{i}``.  Nothing ties the
    bottom chords sideways and no bay is braced: the common unbraced roof under
    construction.

    Parameters
    ----------
    trusses : int
        Number of trusses ``F >= 1``, labelled ``F1..F{F}`` (joint tag ``frame``).
    panels : int
        Panels per truss ``p >= 1``.
    panel, depth, spacing : float, optional
        Panel length, truss depth and truss spacing, in ``units``.
    name : str, optional
    units : str, optional

    Returns
    -------
    frame : Frame
        Three-dimensional, with joints ``n = 2 F (p + 1)``, members
        ``m = F (4 p + 1) + (F - 1)(p + 1)`` (member tag ``role``: ``chord``,
        ``vertical``, ``diagonal``, ``purlin``) and restraints ``r = 6 F``.

    Notes
    -----
    Building the frame costs O(F p).  In its own plane each truss is a simple
    truss (``2 (p + 1)`` joints, ``4 p + 1 = 2 (2 (p + 1)) - 3`` members) on two
    pins: rigid, with one state of self-stress.  Out of plane (along y) only the
    purlins act: each interior bottom joint is free alone (``(p - 1) F``) and each
    line of top joints moves as one (``p + 1``), so the frame has
    ``(p - 1) F + p + 1`` mechanisms and ``F`` states of self-stress (checked by
    dense SVD in the tests).

    Examples
    --------
    >>> f = plane_truss_roof(3, 4)
    >>> f.n_joints, f.n_members, f.n_restraints
    (30, 61, 18)
    """
    F, p = _count(trusses, "trusses"), _count(panels, "panels")
    panel, depth, spacing = (_length(panel, "panel"), _length(depth, "depth"),
                             _length(spacing, "spacing"))
    units = _units(units)
    per = 2 * (p + 1)
    i = np.arange(p + 1)
    coords = np.zeros((F * per, 3))
    joint_ids, frame_tag = [], []
    for f in range(F):
        base = f * per
        coords[base:base + p + 1] = np.column_stack([i * panel, np.full(p + 1, f * spacing),
                                                     np.zeros(p + 1)])
        coords[base + p + 1:base + per] = np.column_stack([i * panel, np.full(p + 1, f * spacing),
                                                           np.full(p + 1, depth)])
        joint_ids += [f"F{f + 1}.L{k}" for k in range(p + 1)] + \
            [f"F{f + 1}.U{k}" for k in range(p + 1)]
        frame_tag += [f"F{f + 1}"] * per
    lo, up = (lambda f, k: f * per + k), (lambda f, k: f * per + p + 1 + k)
    ends, ids, role = [], [], []
    for f in range(F):
        lab = f"F{f + 1}"
        for k in range(p):
            ends += [(up(f, k), up(f, k + 1)), (lo(f, k), lo(f, k + 1)), (lo(f, k), up(f, k + 1))]
            ids += [f"{lab}.T{k}", f"{lab}.B{k}", f"{lab}.D{k}"]
            role += ["chord", "chord", "diagonal"]
        for k in range(p + 1):
            ends.append((lo(f, k), up(f, k)))
            ids.append(f"{lab}.V{k}")
            role.append("vertical")
    for f in range(F - 1):
        for k in range(p + 1):
            ends.append((up(f, k), up(f + 1, k)))
            ids.append(f"P{f + 1}.{k}")
            role.append("purlin")
    supports = {lo(f, k): "pin" for f in range(F) for k in (0, p)}
    return Frame.from_arrays(coords, np.array(ends, dtype=np.int64).reshape(-1, 2),
                             joint_ids=joint_ids, member_ids=ids, supports=supports,
                             joint_tags={"frame": tuple(frame_tag)},
                             member_tags={"role": tuple(role)},
                             name=name if name is not None else
                             f"roof of {F} plane trusses, {p} panels, bottom chords untied",
                             units=units)
