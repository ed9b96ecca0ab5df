"""Planar drawings as plane frames: every straight line segment a member.

DXF and SVG line work is read through trimesh's path loaders
(``trimesh.load_path``; SVG needs the ``svg.path`` and ``lxml`` packages).

- Each straight segment (a LINE, or each leg of a polyline) is a member;
  curves (arcs, splines) are not members and are skipped with a warning.
- Line ends within the merge distance of each other are one joint: the
  spec's ``merge`` (an absolute distance in drawing units) or, by default,
  ``tol.merge * size`` (:class:`~spaceframe.tolerances.Tolerances`).
- A line end that meets no other line but lies within ``tol.near_miss *
  size`` of another end or line is an error: the lines nearly but do not
  meet.  The message lists every such end, its coordinates and the gap.
- Lines drawn twice over the same two joints are counted once, with a
  warning naming where.
- Lines that cross without sharing a joint there are not joined (a
  pin-jointed frame joins members at joints only); a warning says where.
- ``layers`` selects the lines that are members: DXF layer names; in SVG the
  ``id`` or ``inkscape:label`` of an enclosing group, or the element's
  stroke colour, or its class.
- SVG's y axis points down the page; it is turned up (``y = -y_svg``), so the
  frame stands as drawn.

Joints are ``J1, J2...`` in the order lines first reach them, members ``M1,
M2...`` in drawing order.  A drawing has no supports: the extrusion spec or a
selection rule gives them.
"""

from __future__ import annotations

import io
import os
import warnings
import xml.etree.ElementTree as ET
from pathlib import Path

import numpy as np

from .._optional import require
from ..errors import ModelError, SpaceframeWarning, where
from ..model import Frame
from ..tolerances import DEFAULT, Tolerances
from .mesh import frame_from_edges

__all__ = ["read_drawing", "DRAWING_SUFFIXES"]

#: Suffixes read by :func:`read_drawing`.
DRAWING_SUFFIXES = (".dxf", ".svg")
_LISTED = 5
_OPTIONS = ("layers", "merge")


def read_drawing(path, *, tol: Tolerances = DEFAULT, layers=None, merge=None, **unknown) -> Frame:
    """Read a DXF or SVG drawing into a checked plane :class:`Frame` without supports.

    Parameters
    ----------
    path : str or os.PathLike
    layers : list of str, optional
        Only lines on these layers (DXF) or groups, colours or classes (SVG).
    merge : float, optional
        Distance within which line ends are one joint, in drawing units.

    Raises
    ------
    ModelError
        For a file the loader cannot read, a drawing with no straight lines
        (on the chosen layers), and line ends that nearly but do not meet.

    Notes
    -----
    Cost O(s log s) for the merge of s segments, plus O(s^2) vector work for
    the crossing and near-miss checks (done row by row).
    """
    source = os.fspath(path)
    if unknown:
        raise ModelError(f"unknown [drawing] option(s) {', '.join(sorted(unknown))}; the options "
                         f"are {', '.join(_OPTIONS)}", path=source)
    if merge is not None and not (type(merge) in (int, float) and merge >= 0):
        raise ModelError(f"[drawing] merge must be a distance >= 0; got {merge!r}", path=source)
    if isinstance(layers, str):
        layers = [layers]
    suffix = Path(source).suffix.lower()
    segments = _segments(source, suffix, layers)
    if len(segments) == 0:
        chosen = f" on layer(s) {', '.join(layers)}" if layers else ""
        raise ModelError(f"holds no straight lines{chosen}, so there is no member; draw each "
                         f"member as a line" + ("" if not layers else " or check the layer names"),
                         path=source)
    points = segments.reshape(-1, 2)
    edges = np.arange(len(points)).reshape(-1, 2)
    frame = frame_from_edges(points, edges, source=source, tol=tol, dimension=2, merge=merge,
                             what="line")
    _check_near_misses(frame, tol)
    _warn_crossings(frame, tol)
    return frame


def _segments(source: str, suffix: str, layers) -> np.ndarray:
    """Straight segments ``(s, 2, 2)`` of the drawing, in drawing order."""
    trimesh = require("trimesh")
    for helper in ("svg.path", "lxml.etree") if suffix == ".svg" else ():
        require(helper)  # trimesh's SVG loader imports them when it runs
    try:
        if suffix == ".svg":
            data = _svg_selected(source, layers)
            path = trimesh.load_path(io.BytesIO(data), file_type="svg")
        else:
            path = trimesh.load_path(source)
    except ModelError:
        raise
    except Exception as exc:         # the loaders' own errors are many and unrelated
        raise ModelError(f"cannot be read as a {suffix[1:].upper()} drawing ({type(exc).__name__}:"
                         f" {exc}); check the file", path=source) from None
    if path is None or not hasattr(path, "entities"):
        return np.zeros((0, 2, 2))
    vertices = np.asarray(path.vertices, dtype=float)[:, :2]
    out, curves = [], 0
    for entity in path.entities:
        if type(entity).__name__ != "Line":
            curves += 1
            continue
        if suffix == ".dxf" and layers and str(entity.metadata.get("layer", "")) not in layers:
            continue
        pts = vertices[np.asarray(entity.points)]
        out.extend(np.stack([pts[:-1], pts[1:]], axis=1))
    if curves:
        warnings.warn(f"{where(source)}{curves} curve(s) (arcs, splines) are not straight members "
                      f"and are skipped; draw members as straight lines", SpaceframeWarning,
                      stacklevel=4)
    segs = np.array(out, dtype=float).reshape(-1, 2, 2)
    if suffix == ".svg":
        segs[:, :, 1] *= -1.0
    return segs


_LABEL = "{http://www.inkscape.org/namespaces/inkscape}label"


def _svg_selected(source: str, layers) -> bytes:
    """The SVG's bytes, with only the elements ``layers`` selects when it is given."""
    data = Path(source).read_bytes()
    if not layers:
        return data
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


def _point(x) -> str:
    return "(" + ", ".join(f"{v:.6g}" for v in x) + ")"


def _segment_distance(p: np.ndarray, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Distance from point ``p`` to each segment ``a[i]-b[i]``."""
    ab = b - a
    t = np.clip(np.einsum("ij,ij->i", p - a, ab) / np.einsum("ij,ij->i", ab, ab), 0.0, 1.0)
    return np.linalg.norm(a + t[:, None] * ab - p, axis=1)


def _check_near_misses(frame: Frame, tol: Tolerances) -> None:
    n = frame.n_joints
    degree = np.bincount(frame.ends.reshape(-1), minlength=n)
    limit = tol.near_miss * frame.size()
    a, b = frame.coords[frame.ends[:, 0]], frame.coords[frame.ends[:, 1]]
    found = []
    for j in np.flatnonzero(degree == 1):
        p = frame.coords[j]
        others = np.flatnonzero((frame.ends != j).all(axis=1))
        if others.size == 0:
            continue
        dist = _segment_distance(p, a[others], b[others])
        k = int(np.argmin(dist))
        if dist[k] <= limit:
            found.append((frame.joint_ids[j], p, float(dist[k]), frame.member_ids[others[k]]))
    if not found:
        return
    listed = "; ".join(f"end {_point(p)} is {gap:.3g} from line {mid} "
                       f"({_point(frame.coords[frame.ends[frame.member_ids.index(mid), 0]])} to "
                       f"{_point(frame.coords[frame.ends[frame.member_ids.index(mid), 1]])})"
                       for _, p, gap, mid in found[:_LISTED])
    more = f"; and {len(found) - _LISTED} more" if len(found) > _LISTED else ""
    raise ModelError(f"{len(found)} line end(s) nearly but do not meet another line (the gap is "
                     f"larger than the merge distance): {listed}{more}; extend each line to meet "
                     f"the other at a shared end point, or give a larger merge distance "
                     f"([drawing] merge = ...)", path=frame.source)


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
