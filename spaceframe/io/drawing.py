"""Planar drawings as plane frames: every straight line segment a member.

DXF and SVG line work is read through trimesh's path loaders
(``trimesh.load_path``; SVG needs the ``svg.path`` and ``lxml`` packages).

- Each straight segment (a LINE, or each leg of a polyline) is a member;
  curves (arcs, splines) are not members and are skipped with a warning.
- Line ends within the merge distance of each other are one joint: the
  spec's ``merge`` (an absolute distance in the drawing's units) or, by
  default, ``tol.merge * size`` (:class:`~spaceframe.tolerances.Tolerances`).
- T-junctions: a line end that lies on another line's interior, within the
  merge distance, splits that line there (``split``, on by default), so a
  chord drawn as one line becomes the chain of members it stands for.  A
  warning says how many lines were split and where.
- A line end that meets no other line but lies within ``tol.near_miss *
  size`` of another end or line (and beyond the merge distance) is an error:
  the lines nearly but do not meet.  The message lists every such end, its
  coordinates and the gap, and the advice that fits: a larger merge
  distance, splitting (when it is turned off), or a layer to add (when the
  line it nearly meets is on a layer that is not read).
- Lines drawn twice over the same two joints are counted once, with a
  warning naming where.
- Lines that cross without an end at the crossing are not joined (a
  pin-jointed frame joins members at joints only); a warning says where.
- ``layers`` selects the lines that are members: DXF layer names; in SVG the
  ``id`` or ``inkscape:label`` of an enclosing group, or the element's
  stroke colour, or its class.  Each joint and member keeps the DXF layer of
  its first line as the tag ``layer``.
- Units: DXF ``$INSUNITS`` (1 in, 2 ft, 4 mm, 5 cm, 6 m; other units of
  length are converted to the nearest of those); SVG user units, scaled by
  the root's ``viewBox`` and its ``width`` in mm, cm, in, pt or pc.  A
  drawing that gives none (``$INSUNITS = 0``, an SVG sized in pixels) is in
  ``units`` (the ``--units`` option), metres when it is not given.
- SVG's y axis points down the page; it is turned up (``y = -y_svg``), so the
  frame stands as drawn.

Joints are ``J1, J2...`` in the order lines first reach them, members ``M1,
M2...`` in drawing order.  A drawing has no supports: the extrusion spec or a
selection rule gives them.
"""

from __future__ import annotations

import io
import os
import re
import warnings
import xml.etree.ElementTree as ET
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from .._optional import require
from ..errors import ModelError, SpaceframeWarning, where
from ..model import Frame, bounding_diagonal
from ..tolerances import DEFAULT, Tolerances
from .mesh import _point, file_units, frame_from_edges

__all__ = ["read_drawing", "split_at_junctions", "DRAWING_SUFFIXES", "INSUNITS"]

#: Suffixes read by :func:`read_drawing`.
DRAWING_SUFFIXES = (".dxf", ".svg")
_LISTED = 5
_OPTIONS = ("layers", "merge", "split", "units")

#: DXF ``$INSUNITS`` code -> (unit of the frame, factor from the drawing's numbers to it).
#: Codes 1-6 and 14 are units of the trade; the others are converted.  From the DXF
#: reference's header variable table (from memory; the test checks it against ezdxf).
INSUNITS = {1: ("in", 1.0), 2: ("ft", 1.0), 3: ("ft", 5280.0), 4: ("mm", 1.0), 5: ("cm", 1.0),
            6: ("m", 1.0), 7: ("m", 1000.0), 8: ("in", 1e-6), 9: ("in", 1e-3),
            10: ("ft", 3.0), 13: ("mm", 1e-3), 14: ("cm", 10.0), 15: ("m", 10.0),
            16: ("m", 100.0)}

#: SVG length unit -> (unit of the frame, factor from it).  CSS fixes 1 in = 72 pt = 6 pc.
_SVG_UNITS = {"mm": ("mm", 1.0), "cm": ("cm", 1.0), "in": ("in", 1.0), "pt": ("in", 1 / 72),
              "pc": ("in", 1 / 6)}


@dataclass(frozen=True)
class _Lines:
    """Every straight segment of a drawing, before any layer is chosen."""

    segments: np.ndarray     # (s, 2, 2) float, in the frame's units
    layers: np.ndarray       # (s,) str, "" where the format has no layer
    chosen: np.ndarray       # (s,) bool, on the chosen layers
    units: str | None        # what the file declares, or None
    how: str                 # where it declares it, for messages


def read_drawing(path, *, tol: Tolerances = DEFAULT, layers=None, merge=None, split=True,
                 units=None, **unknown) -> Frame:
    """Read a DXF or SVG drawing into a checked plane :class:`Frame` without supports.

    Parameters
    ----------
    path : str or os.PathLike
    layers : list of str, optional
        Only lines on these layers (DXF) or groups, colours or classes (SVG).
    merge : float, optional
        Distance within which line ends are one joint, in the drawing's units.
    split : bool, optional
        Split a line where another line's end lies on it (default True).
    units : str, optional
        The unit of a drawing that declares none (default ``"m"``).

    Raises
    ------
    ModelError
        For a file the loader cannot read, a drawing with no straight lines
        (on the chosen layers), line ends that nearly but do not meet, and a
        ``units`` that contradicts the file's.

    Notes
    -----
    Cost O(s log s) for the merge and the T-junction search of s segments
    (k-d trees), plus O(s^2) vector work for the crossing and near-miss
    checks (done row by row).
    """
    source = os.fspath(path)
    if unknown:
        raise ModelError(f"unknown [drawing] option(s) {', '.join(sorted(unknown))}; the options "
                         f"are {', '.join(_OPTIONS)}", path=source)
    if merge is not None and not (type(merge) in (int, float) and merge >= 0):
        raise ModelError(f"[drawing] merge must be a distance >= 0; got {merge!r}", path=source)
    if not isinstance(split, bool):
        raise ModelError(f"[drawing] split must be true or false; got {split!r}", path=source)
    if isinstance(layers, str):
        layers = [layers]
    suffix = Path(source).suffix.lower()
    drawn = _lines(source, suffix, layers)
    frame_units = file_units(drawn.units, units, source, how=drawn.how)
    segments = drawn.segments[drawn.chosen]
    if len(segments) == 0:
        chosen = f" on layer(s) {', '.join(layers)}" if layers else ""
        found = sorted(set(drawn.layers) - {""})
        hint = (f" or check the layer names (the drawing's layers: {', '.join(found)})" if found
                else " or check the layer names") if layers else ""
        raise ModelError(f"holds no straight lines{chosen}, so there is no member; draw each "
                         f"member as a line{hint}", path=source)
    points = segments.reshape(-1, 2)
    edges = np.arange(len(points)).reshape(-1, 2)
    size = bounding_diagonal(points)
    limit = tol.merge * size if merge is None else float(merge)
    layer_of = drawn.layers[drawn.chosen]
    tags = {"layer": layer_of} if layer_of.any() else {}
    frame = frame_from_edges(points, edges, source=source, tol=tol, dimension=2, merge=limit,
                             what="line", units=frame_units, edge_tags=tags,
                             point_tags={k: np.repeat(v, 2) for k, v in tags.items()})
    if split:
        frame = _split_frame(frame, limit, tol)
    _check_near_misses(frame, tol, limit, split, drawn.segments[~drawn.chosen],
                       drawn.layers[~drawn.chosen])
    _warn_crossings(frame, tol)
    return frame


def split_at_junctions(coords: np.ndarray, ends: np.ndarray, limit: float):
    """Split each member where a joint lies on its interior within ``limit``.

    Parameters
    ----------
    coords : (n, d) float
        Joint coordinates (ends already merged).
    ends : (m, 2) int
    limit : float
        A joint ``p`` splits member ``a-b`` when its distance to the segment
        is ``<= limit`` and its projection ``t = (p - a).(b - a) / |b - a|^2``
        lies strictly between 0 and 1.

    Returns
    -------
    new_ends : (m', 2) int
        Each member replaced by the chain through its interior joints in
        order of ``t`` (members not split are unchanged), in member order.
    parent : (m',) int
        The member each row comes from.
    splits : list of (int, list of int)
        Each split member and the joints it was split at.

    Notes
    -----
    Cost O(m log n + h) with a k-d tree over the joints, ``h`` the joints
    found in the balls around the members.
    """
    from scipy.spatial import cKDTree

    coords = np.asarray(coords, dtype=float)
    ends = np.asarray(ends, dtype=np.int64).reshape(-1, 2)
    if len(ends) == 0:
        return ends, np.zeros(0, dtype=np.int64), []
    a, b = coords[ends[:, 0]], coords[ends[:, 1]]
    half = np.linalg.norm(b - a, axis=1) / 2
    near = cKDTree(coords).query_ball_point((a + b) / 2, half + limit)
    new_ends, parent, splits = [], [], []
    for k, found in enumerate(near):
        found = np.array([j for j in found if j != ends[k, 0] and j != ends[k, 1]],
                         dtype=np.int64)
        on = np.zeros(0, dtype=np.int64)
        if found.size:
            ab = b[k] - a[k]
            t = (coords[found] - a[k]) @ ab / (ab @ ab)
            gap = np.linalg.norm(a[k] + t[:, None] * ab - coords[found], axis=1)
            inside = (t > 0) & (t < 1) & (gap <= limit)
            on = found[inside][np.argsort(t[inside], kind="stable")]
        chain = [int(ends[k, 0]), *on.tolist(), int(ends[k, 1])]
        new_ends.extend(zip(chain[:-1], chain[1:]))
        parent.extend([k] * (len(chain) - 1))
        if on.size:
            splits.append((k, on.tolist()))
    return (np.array(new_ends, dtype=np.int64).reshape(-1, 2), np.array(parent, dtype=np.int64),
            splits)


def _split_frame(frame: Frame, limit: float, tol: Tolerances, *, what: str = "line",
                 ids=None) -> Frame:
    """The frame with its T-junctions split (:func:`split_at_junctions`), and a warning.

    ``ids(parent_id, piece, pieces)`` names the pieces of a split member; by
    default members are numbered afresh.
    """
    new_ends, parent, splits = split_at_junctions(frame.coords, frame.ends, limit)
    if not splits:
        return frame
    listed = "; ".join(f"{what} {frame.member_ids[k]} at "
                       + ", ".join(_point(frame.coords[j]) for j in at[:3])
                       + (f" and {len(at) - 3} more" if len(at) > 3 else "")
                       for k, at in splits[:_LISTED])
    more = f"; and {len(splits) - _LISTED} more" if len(splits) > _LISTED else ""
    pieces = sum(len(at) + 1 for _, at in splits)
    warnings.warn(f"{where(frame.source)}{len(splits)} {what}(s) split where another {what}'s "
                  f"end lies on them (T-junctions), into {pieces} members: {listed}{more}; "
                  f"--no-split (or [drawing] split = false) turns this off", SpaceframeWarning,
                  stacklevel=4)
    member_ids = None
    if ids is not None:
        count = np.bincount(parent, minlength=frame.n_members)
        piece = np.zeros(len(parent), dtype=np.int64)
        for i in range(1, len(parent)):
            piece[i] = piece[i - 1] + 1 if parent[i] == parent[i - 1] else 0
        member_ids = [ids(frame.member_ids[k], int(q), int(count[k]))
                      for k, q in zip(parent, piece)]
    return frame_from_edges(frame.coords, new_ends, source=frame.source, tol=tol,
                            dimension=frame.dimension, merge=limit, name=frame.name, what=what,
                            units=frame.units, edge_ids=member_ids,
                            edge_tags={k: np.asarray(v)[parent] for k, v in
                                       frame.member_tags.items()},
                            point_tags=dict(frame.joint_tags))


def _lines(source: str, suffix: str, layers) -> _Lines:
    """Every straight segment of the drawing, in drawing order, with its layer and the units."""
    trimesh = require("trimesh")
    for helper in ("svg.path", "lxml.etree") if suffix == ".svg" else ():
        require(helper)  # trimesh's SVG loader imports them when it runs
    found, how, scale = None, "", 1.0
    try:
        if suffix == ".svg":
            data = Path(source).read_bytes()
            found, how, scale, offset = _svg_units(source, data)
            path = trimesh.load_path(io.BytesIO(data), file_type="svg")
            if layers:
                picked = trimesh.load_path(io.BytesIO(_svg_selected(source, data, layers)),
                                           file_type="svg")
        else:
            path = trimesh.load_path(source)
            code = (getattr(path, "metadata", None) or {}).get("$INSUNITS")
            try:
                code = int(code) if code is not None else None
            except (TypeError, ValueError):
                code = None
            if code in INSUNITS:
                found, scale = INSUNITS[code]
                how = f"$INSUNITS = {code}"
            elif code not in (None, 0):
                warnings.warn(f"{where(source)}$INSUNITS = {code} is not a unit of length "
                              f"spaceframe knows; the numbers are read as they are, in --units "
                              f"(default m)", SpaceframeWarning, stacklevel=4)
    except ModelError:
        raise
    except Exception as exc:         # the loaders' own errors are many and unrelated
        raise ModelError(f"cannot be read as a {suffix[1:].upper()} drawing ({type(exc).__name__}:"
                         f" {exc}); check the file", path=source) from None
    segs, names = _straight(path, source)
    if suffix == ".svg":
        chosen = np.ones(len(segs), dtype=bool)
        if layers:
            # the same parser on the same numbers: the chosen segments compare equal
            mine = {tuple(x.ravel()) for x in _straight(picked, source)[0]}
            chosen = np.array([tuple(x.ravel()) in mine for x in segs], dtype=bool)
        segs = (segs - offset) * scale
        segs[:, :, 1] *= -1.0
    else:
        chosen = np.isin(names, list(layers)) if layers else np.ones(len(segs), dtype=bool)
        segs = segs * scale
    return _Lines(segs, names, chosen, found, how)


def _straight(path, source: str) -> tuple[np.ndarray, np.ndarray]:
    """The straight segments ``(s, 2, 2)`` of a loaded path and each one's layer ``(s,)``."""
    if path is None or not hasattr(path, "entities"):
        return np.zeros((0, 2, 2)), np.zeros(0, dtype=str)
    vertices = np.asarray(path.vertices, dtype=float)[:, :2]
    out, names, curves = [], [], 0
    for entity in path.entities:
        if type(entity).__name__ != "Line":
            curves += 1
            continue
        pts = vertices[np.asarray(entity.points)]
        out.extend(np.stack([pts[:-1], pts[1:]], axis=1))
        names.extend([str((entity.metadata or {}).get("layer", "") or "")] * (len(pts) - 1))
    if curves:
        warnings.warn(f"{where(source)}{curves} curve(s) (arcs, splines) are not straight members "
                      f"and are skipped; draw members as straight lines", SpaceframeWarning,
                      stacklevel=5)
    return np.array(out, dtype=float).reshape(-1, 2, 2), np.array(names, dtype=object)


_LENGTH = re.compile(r"^\s*([0-9.eE+-]+)\s*([a-z%]*)\s*$")


def _svg_units(source: str, data: bytes):
    """Unit, where it is said, scale and offset of an SVG's user units.

    The root's ``width`` in a unit of length and its ``viewBox``
    ``min-x min-y w h`` give ``scale = width / w`` of that unit per user unit
    (SVG 1.1, 7.7: the viewBox maps onto the viewport; uniform scaling is
    assumed).  Without a viewBox a user unit is a CSS pixel, 1/96 in.
    """
    try:
        root = ET.fromstring(data)
    except ET.ParseError as exc:
        raise ModelError(f"is not valid SVG ({exc}); check the file", path=source) from None
    m = _LENGTH.match(root.get("width", "") or "")
    offset = np.zeros(2)
    if not m or m.group(2) not in _SVG_UNITS:
        return None, "", 1.0, offset
    unit, factor = _SVG_UNITS[m.group(2)]
    width = float(m.group(1)) * factor
    box = (root.get("viewBox") or "").replace(",", " ").split()
    if len(box) == 4:
        try:
            x0, y0, w, _ = (float(v) for v in box)
        except ValueError:
            raise ModelError(f"has a viewBox {root.get('viewBox')!r} that is not four numbers",
                             path=source) from None
        if w <= 0:
            raise ModelError("has a viewBox of no width; give it 'min-x min-y width height'",
                             path=source)
        offset = np.array([x0, y0])
        return unit, f'width="{root.get("width")}" and viewBox', width / w, offset
    px = {"mm": 25.4, "cm": 2.54, "in": 1.0}[unit] / 96
    return unit, f'width="{root.get("width")}" with no viewBox (1 user unit = 1 px)', px, offset


_LABEL = "{http://www.inkscape.org/namespaces/inkscape}label"


def _svg_selected(source: str, data: bytes, layers) -> bytes:
    """The SVG's bytes, with only the elements ``layers`` selects."""
    try:
        root = ET.fromstring(data)
    except ET.ParseError as exc:
        raise ModelError(f"is not valid SVG ({exc}); check the file", path=source) from None
    wanted = set(layers)

    def names(el) -> set:
        style = dict(p.split(":", 1) for p in el.get("style", "").replace(" ", "").split(";")
                     if ":" in p)
        return {el.get("id"), el.get(_LABEL), el.get("stroke"), style.get("stroke"),
                *el.get("class", "").split()} - {None, ""}

    def prune(el, chosen: bool):
        for child in list(el):
            keep = chosen or bool(names(child) & wanted)
            if len(child):
                prune(child, keep)
            elif not keep and child.tag.split("}")[-1] in ("line", "polyline", "polygon", "path",
                                                           "rect"):
                el.remove(child)
    prune(root, False)
    return ET.tostring(root)


def _segment_distance(p: np.ndarray, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Distance from point ``p`` to each segment ``a[i]-b[i]``."""
    ab = b - a
    t = np.clip(np.einsum("ij,ij->i", p - a, ab) / np.einsum("ij,ij->i", ab, ab), 0.0, 1.0)
    return np.linalg.norm(a + t[:, None] * ab - p, axis=1)


def _check_near_misses(frame: Frame, tol: Tolerances, limit: float, split: bool,
                       unread: np.ndarray, unread_layers: np.ndarray, *, what: str = "line",
                       refuse: bool = True) -> None:
    """Refuse line ends that nearly meet a line, each with the advice that fits.

    With ``refuse`` false the same message is a warning (IFC building models,
    where an element may well stop short of its neighbour's axis).

    A dangling end (a joint with one member) is looked at against the other
    members and against the lines on layers that are not read; within
    ``tol.near_miss * size`` of one, the nearest decides the advice: on an
    unread layer, add it; within the merge distance of an interior with
    splitting off, split; otherwise raise the merge distance past the gap,
    which is the gap to the nearest joint when one lies within
    ``tol.near_miss * size`` (an end most often stops short of a joint).
    """
    n = frame.n_joints
    degree = np.bincount(frame.ends.reshape(-1), minlength=n)
    near = tol.near_miss * frame.size()
    a, b = frame.coords[frame.ends[:, 0]], frame.coords[frame.ends[:, 1]]
    found = []                          # (kind, end point, gap, what it nearly meets)
    for j in np.flatnonzero(degree == 1):
        p = frame.coords[j]
        others = np.flatnonzero((frame.ends != j).all(axis=1))
        best = (np.inf, None, None)
        if others.size:
            dist = _segment_distance(p, a[others], b[others])
            k = int(np.argmin(dist))
            best = (float(dist[k]), "member", int(others[k]))
        if len(unread):
            dist = _segment_distance(p, unread[:, 0], unread[:, 1])
            k = int(np.argmin(dist))
            if dist[k] <= max(limit, 0.0) or dist[k] < best[0]:
                best = (float(dist[k]), "unread", k)
        gap, kind, k = best
        if kind is None or gap > near:
            continue
        if kind == "unread":
            on = f"on layer {unread_layers[k]!r}" if unread_layers[k] else "left out by --layers"
            found.append(("layer", p, gap, f"a line {on} "
                          f"({_point(unread[k, 0])} to {_point(unread[k, 1])})",
                          str(unread_layers[k])))
            continue
        # the end most likely meant to meet a joint: the gap to the nearest one decides
        to_joint = np.linalg.norm(frame.coords - p, axis=1)
        to_joint[j] = np.inf
        q = int(np.argmin(to_joint))
        if to_joint[q] <= near:
            found.append(("merge", p, float(to_joint[q]),
                          f"joint {frame.joint_ids[q]} {_point(frame.coords[q])}", ""))
            continue
        line = (f"{what} {frame.member_ids[k]} ({_point(a[k])} to {_point(b[k])})")
        ab = b[k] - a[k]
        t = float((p - a[k]) @ ab / (ab @ ab))
        kind = "split" if (not split and gap <= limit and 0 < t < 1) else "merge"
        found.append((kind, p, gap, line, ""))
    if not found:
        return
    listed = "; ".join(f"end {_point(p)} is {gap:.3g} from {what}"
                       for _, p, gap, what, _ in found[:_LISTED])
    more = f"; and {len(found) - _LISTED} more" if len(found) > _LISTED else ""
    advice = []
    kinds = {k for k, *_ in found}
    if "layer" in kinds:
        names = sorted({name for k, *_, name in found if k == "layer"} - {""})
        which = f"layer(s) {', '.join(names)} are" if names else "the other lines' group, " \
            "colour or class is"
        advice.append(f"the lines are on different layers and {which} not read: add them to "
                      f"--layers (or [drawing] layers), or move the lines onto one layer")
    if "split" in kinds:
        advice.append(f"an end lies on another {what} part-way (a T-junction) and splitting "
                      f"is off: leave out --no-split (or [drawing] split = false) so that the "
                      f"{what} is split there")
    if "merge" in kinds:
        worst = max(gap for k, _, gap, *_ in found if k == "merge")
        advice.append(f"the gap is larger than the merge distance {limit:.3g}: extend each "
                      f"{what} to meet the other, or give a merge distance of at least {worst:.3g} "
                      f"(--merge, or [drawing] merge = ...)")
    message = (f"{len(found)} {what} end(s) nearly but do not meet another {what}: "
               f"{listed}{more}; " + "; ".join(advice))
    if refuse:
        raise ModelError(message, path=frame.source)
    warnings.warn(f"{where(frame.source)}{message}", SpaceframeWarning, stacklevel=4)


def _warn_crossings(frame: Frame, tol: Tolerances) -> None:
    a, b = frame.coords[frame.ends[:, 0]], frame.coords[frame.ends[:, 1]]
    m = len(a)
    crossings = []
    for i in range(m - 1):
        j = np.arange(i + 1, m)
        shared = (frame.ends[j] == frame.ends[i, 0]).any(axis=1) | \
                 (frame.ends[j] == frame.ends[i, 1]).any(axis=1)
        r, s = b[i] - a[i], b[j] - a[j]
        denom = r[0] * s[:, 1] - r[1] * s[:, 0]
        q = a[j] - a[i]
        with np.errstate(divide="ignore", invalid="ignore"):
            t = (q[:, 0] * s[:, 1] - q[:, 1] * s[:, 0]) / denom
            u = (q[:, 0] * r[1] - q[:, 1] * r[0]) / denom
        eps = tol.crossing_margin
        hit = (~shared) & (np.abs(denom) > tol.parallel_lines) & (t > eps) & (t < 1 - eps) & (u > eps) & \
              (u < 1 - eps)
        for k in np.flatnonzero(hit):
            crossings.append((frame.member_ids[i], frame.member_ids[j[k]], a[i] + t[k] * r))
    if not crossings:
        return
    listed = "; ".join(f"{x} and {y} at {_point(p)}" for x, y, p in crossings[:_LISTED])
    more = f"; and {len(crossings) - _LISTED} more" if len(crossings) > _LISTED else ""
    warnings.warn(f"{where(frame.source)}{len(crossings)} pair(s) of lines cross without a joint: "
                  f"{listed}{more}; in a pin-jointed frame they are not joined there. If they are "
                  f"joined, split both lines at the crossing", SpaceframeWarning, stacklevel=3)
