"""Meshes and line files as frames: every unique edge a member, every vertex a joint.

Read through trimesh's loaders (STL, PLY, glTF/GLB, and the faces of OBJ),
except OBJ line elements (``l``), which this module reads itself (a file with
lines only would come back from the loader as a point cloud), and OFF, read
here so that its polygons keep their sides.

- Faces keep their polygons: each side of a face is a member; no diagonal is
  added to a quadrilateral (OBJ, PLY and OFF polygons alike).
- Vertices closer than ``tol.merge * size`` (``size`` the diagonal of the
  vertices' bounding box, :class:`~spaceframe.tolerances.Tolerances`) are one
  joint: an STL file gives each triangle its own three corners.
- An edge whose two ends merge into one joint is dropped with a warning.
- An edge is a member once, however many faces share it: a space-frame mesh
  whose web edges are sides of three faces or more (non-manifold) is read
  as drawn.  Only faces given twice over the same corners are reported, and
  dropped.
- Units: glTF is in metres by its specification; STL, OBJ, PLY and OFF carry
  no unit, so their lengths are ``units`` (the ``--units`` option), or
  metres when it is not given.
- Joints are ``J1, J2...`` in the order their first vertex appears; members
  ``M1, M2...`` in the order of their first edge.  A mesh has no supports:
  give them with selection rules (:mod:`spaceframe.selection`).
"""

from __future__ import annotations

import os
import warnings
from pathlib import Path

import numpy as np

from .._optional import require
from ..errors import ModelError, SpaceframeWarning, where
from ..model import UNITS, Frame, bounding_diagonal
from ..tolerances import DEFAULT, Tolerances
from .sourcelines import checked

__all__ = ["read_mesh", "frame_from_edges", "file_units", "MESH_SUFFIXES"]

#: Suffixes read by :func:`read_mesh`.
MESH_SUFFIXES = (".stl", ".obj", ".ply", ".off", ".glb", ".gltf")
#: Formats whose unit of length is fixed by their specification.
_FIXED_UNITS = {".glb": "m", ".gltf": "m"}


def file_units(found: str | None, given: str | None, source: str, *, how: str = "") -> str:
    """The frame's unit of length from what the file says and what the user gave.

    Parameters
    ----------
    found : str or None
        The unit the file declares (one of :data:`~spaceframe.model.UNITS`),
        or None when it declares none.
    given : str or None
        The ``--units`` option, or None.
    how : str
        Where the file says it, for the message (``"$INSUNITS = 4"``).

    Returns
    -------
    units : str
        ``found`` when the file declares a unit, else ``given``, else ``"m"``.

    Raises
    ------
    ModelError
        For a ``given`` unit that is not one of ``UNITS``, or one that
        contradicts the unit the file declares.
    """
    if given is not None and given not in UNITS:
        from ..suggest import did_you_mean
        raise ModelError(f"unknown unit {given!r}{did_you_mean(given, UNITS)}; --units takes "
                         f"one of {', '.join(UNITS)}", path=source)
    if found is None:
        return given or "m"
    if given is not None and given != found:
        said = f" ({how})" if how else ""
        raise ModelError(f"gives its lengths in {found}{said}, but --units says {given}; "
                         f"leave --units out (it is for files that carry no unit)", path=source)
    return found


def read_mesh(path, *, tol: Tolerances = DEFAULT, units: str | None = None) -> Frame:
    """Read a mesh or line file into a checked space :class:`Frame` without supports.

    Parameters
    ----------
    path : str or os.PathLike
        An ``.stl``, ``.obj``, ``.ply``, ``.off``, ``.glb`` or ``.gltf`` file.
    tol : Tolerances, optional
        ``tol.merge`` sets the distance within which vertices are one joint.
    units : str, optional
        The unit of length of a file that carries none (STL, OBJ, PLY, OFF);
        default ``"m"``.  glTF is in metres.

    Returns
    -------
    frame : Frame
        ``dimension == 3``, in ``units``.

    Raises
    ------
    ModelError
        For a file the loader cannot read, a mesh with no edges, an OBJ line
        element naming a vertex that does not exist (with its line), an OFF
        face naming a vertex that does not exist, a unit that contradicts
        the format's.

    Warns
    -----
    SpaceframeWarning
        For faces given twice over the same corners (dropped).

    Notes
    -----
    Cost O(V log V + E log E) for V vertices and E edges (a k-d tree for the
    merge, a sort for unique edges and faces).
    """
    source = os.fspath(path)
    suffix = Path(source).suffix.lower()
    if not Path(source).is_file():
        raise ModelError("no such file; check the path and its spelling", path=source)
    units = file_units(_FIXED_UNITS.get(suffix), units, source,
                       how=f"{suffix[1:]} is in metres by its specification")
    points, edges, faces = [], [], []
    if suffix == ".obj":
        v, lines, has_faces = _obj_lines(source)
        points.append(v)
        edges.append(lines)
        if has_faces:
            fv, ff = _loaded_polygons(source, "obj")
            faces.append((fv, ff, len(v)))
    elif suffix == ".off":
        faces.append((*_off_polygons(source), 0))
    else:
        fv, ff = _loaded_polygons(source, suffix[1:])
        faces.append((fv, ff, 0))
    offset = sum(len(p) for p in points)
    for fv, ff, _ in faces:
        points.append(fv)
        _warn_duplicate_faces(ff, fv, source)
        edges.append(_polygon_edges(ff) + offset)
        offset += len(fv)
    coords = np.concatenate(points) if points else np.zeros((0, 3))
    all_edges = np.concatenate(edges) if edges else np.zeros((0, 2), dtype=np.int64)
    if len(all_edges) == 0:
        raise ModelError("holds no faces and no lines, so there is no member to audit; export "
                         "the frame's members as faces or as line elements", path=source)
    return frame_from_edges(coords, all_edges, source=source, tol=tol, units=units)


def frame_from_edges(points, edges, *, source: str | None = None, tol: Tolerances = DEFAULT,
                     dimension: int = 3, merge: float | None = None, name: str | None = None,
                     what: str = "edge", units: str = "m", edge_ids=None, edge_tags=None,
                     point_tags=None) -> Frame:
    """Merge coincident points into joints and unique edges into members.

    Parameters
    ----------
    points : (p, dimension) float
    edges : (e, 2) int
        Indices into ``points``.
    merge : float, optional
        Absolute merge distance; default ``tol.merge * size``.
    what : str
        What an edge is called in messages (``"edge"``, ``"line"``).
    units : str
        The frame's unit of length (one of :data:`spaceframe.model.UNITS`).
    edge_ids : (e,) sequence of str, optional
        Member ids of the edges (default ``M1, M2...`` in the order kept).
    edge_tags, point_tags : mapping of str to (e,) or (p,) sequence of str, optional
        Member tags of the edges; joint tags of the points (a joint takes
        those of its first point).

    Returns
    -------
    frame : Frame
        Checked by :func:`~spaceframe.validation.check_frame`.

    Warns
    -----
    SpaceframeWarning
        For edges dropped because both ends merged into one joint (the count
        and where the first lies) and for edges given more than once (counted
        once).
    """
    from scipy.sparse import coo_matrix
    from scipy.sparse.csgraph import connected_components
    from scipy.spatial import cKDTree

    points = np.asarray(points, dtype=float).reshape(-1, dimension)
    edges = np.asarray(edges, dtype=np.int64).reshape(-1, 2)
    used = np.unique(edges)
    size = bounding_diagonal(points[used])
    limit = tol.merge * size if merge is None else float(merge)
    pairs = cKDTree(points).query_pairs(limit, output_type="ndarray") if len(points) > 1 \
        else np.zeros((0, 2), dtype=np.int64)
    graph = coo_matrix((np.ones(len(pairs)), (pairs[:, 0], pairs[:, 1])),
                       shape=(len(points), len(points)))
    _, label = connected_components(graph, directed=False)
    # joints in order of first use by an edge
    first_use = np.full(label.max() + 1, np.iinfo(np.int64).max)
    flat = edges.reshape(-1)
    np.minimum.at(first_use, label[flat], np.arange(flat.size))
    keep = np.flatnonzero(first_use < np.iinfo(np.int64).max)
    keep = keep[np.argsort(first_use[keep])]
    new = np.full(label.max() + 1, -1)
    new[keep] = np.arange(len(keep))
    rep = np.full(label.max() + 1, -1)
    rep[label[flat[::-1]]] = flat[::-1]          # first point of each joint, in edge order
    coords = points[rep[keep]]
    ends = new[label[edges]]
    loops = ends[:, 0] == ends[:, 1]
    if loops.any():
        at = coords[ends[np.argmax(loops), 0]]
        warnings.warn(f"{where(source)}{int(loops.sum())} {what}(s) of no length dropped (both "
                      f"ends within the merge distance {limit:.3g} of each other), the first at "
                      f"{_point(at)}", SpaceframeWarning, stacklevel=3)
        ends = ends[~loops]
    key = np.sort(ends, axis=1)
    _, first, counts = np.unique(key, axis=0, return_index=True, return_counts=True)
    if (counts > 1).any() and what != "edge":
        k = first[np.argmax(counts > 1)]
        warnings.warn(f"{where(source)}{int((counts - 1).sum())} {what}(s) drawn twice over the "
                      f"same two joints, counted once; the first between {_point(coords[ends[k, 0]])}"
                      f" and {_point(coords[ends[k, 1]])}", SpaceframeWarning, stacklevel=3)
    kept = np.flatnonzero(~loops)[np.sort(first)]     # input edge of each member
    ends = ends[np.sort(first)]
    stem = Path(source).stem if source is not None else ""
    member_ids = (tuple(f"M{i + 1}" for i in range(len(ends))) if edge_ids is None
                  else tuple(str(edge_ids[k]) for k in kept))
    frame = Frame(joint_ids=tuple(f"J{i + 1}" for i in range(len(coords))), coords=coords,
                  member_ids=member_ids, ends=ends,
                  restraint_joint=np.zeros(0, dtype=np.int64),
                  restraint_dir=np.zeros((0, dimension)), dimension=dimension,
                  name=stem if name is None else name, units=units, source=source,
                  joint_tags={k: [str(v[i]) for i in rep[keep]] for k, v in
                              (point_tags or {}).items()},
                  member_tags={k: [str(v[i]) for i in kept] for k, v in (edge_tags or {}).items()})
    return checked(frame, tol=tol)


def _point(x) -> str:
    return "(" + ", ".join(f"{v + 0.0:.6g}" for v in x) + ")"      # no "-0"


def _polygon_edges(faces) -> np.ndarray:
    """The sides of each polygon, ``(sum of corners, 2) int`` (rows of -1 padding skipped)."""
    out = []
    for face in faces:
        face = [int(i) for i in face]
        out.extend(zip(face, face[1:] + face[:1]) if len(face) > 2 else [tuple(face)])
    return np.array(out, dtype=np.int64).reshape(-1, 2)


def _warn_duplicate_faces(faces, points: np.ndarray, source: str) -> None:
    """Warn about faces given twice over the same corners (the edges are counted once anyway)."""
    if not len(faces):
        return
    # compare by coordinates: loaders may give each face its own corners
    _, inverse = np.unique(np.round(points, 12), axis=0, return_inverse=True)
    inverse = inverse.reshape(-1)
    seen, twice, first = set(), 0, None
    for face in faces:
        key = tuple(sorted(int(inverse[int(i)]) for i in face))
        if key in seen:
            twice += 1
            first = face if first is None else first
        seen.add(key)
    if twice:
        warnings.warn(f"{where(source)}{twice} face(s) given twice over the same corners, "
                      f"dropped (each edge is a member once); the first has corners "
                      f"{', '.join(_point(points[int(i)]) for i in first)}", SpaceframeWarning,
                      stacklevel=4)


def _loaded_polygons(source: str, file_type: str) -> tuple[np.ndarray, list]:
    """Vertices and polygons as trimesh's loader gives them, scene transforms applied."""
    trimesh = require("trimesh")
    if file_type in ("glb", "gltf"):
        try:
            scene = trimesh.load(source, process=False, force="scene")
        except Exception as exc:     # the loader's own errors are many and unrelated
            raise ModelError(f"cannot be read as {file_type.upper()} ({exc}); check the file",
                             path=source) from None
        verts, faces, offset = [], [], 0
        for node in scene.graph.nodes_geometry:
            transform, name = scene.graph[node]
            geom = scene.geometry[name]
            v = trimesh.transform_points(np.asarray(geom.vertices, float), transform)
            if hasattr(geom, "faces"):
                faces.extend((np.asarray(geom.faces) + offset).tolist())
            elif hasattr(geom, "entities"):
                for e in geom.entities:
                    pts = np.asarray(e.points) + offset
                    faces.extend([[int(a), int(b)] for a, b in zip(pts[:-1], pts[1:])])
            verts.append(v)
            offset += len(v)
        return (np.concatenate(verts) if verts else np.zeros((0, 3))), faces
    loader = trimesh.exchange.load.mesh_loaders.get(file_type)
    if loader is None:
        raise ModelError(f"cannot read .{file_type} files; install a trimesh that reads them",
                         path=source)
    try:
        with open(source, "rb") as fh:
            raw = loader(fh, file_type=file_type)
    except Exception as exc:         # the loader's own errors are many and unrelated
        raise ModelError(f"cannot be read as {file_type.upper()} ({type(exc).__name__}: {exc}); "
                         f"check the file", path=source) from None
    parts = list(raw["geometry"].values()) if "geometry" in raw else [raw]
    verts, faces, offset = [], [], 0
    for part in parts:
        v = np.asarray(part.get("vertices", np.zeros((0, 3))), dtype=float).reshape(-1, 3)
        f = part.get("faces")
        if f is not None and len(f):
            faces.extend([[int(i) + offset for i in face] for face in f])
        verts.append(v)
        offset += len(v)
    return (np.concatenate(verts) if verts else np.zeros((0, 3))), faces


def _off_polygons(source: str) -> tuple[np.ndarray, list]:
    """Vertices and polygons of an OFF file (``OFF``, ``COFF``, ``NOFF``... headers).

    The header keyword, then the counts ``V F E``, then ``V`` vertex rows
    (``x y z`` and any colour or normal after), then ``F`` face rows (``k``
    then ``k`` vertex numbers from 0, any colour after).  ``#`` starts a
    comment.
    """
    try:
        text = Path(source).read_text(encoding="utf-8", errors="replace")
    except OSError as exc:
        raise ModelError(f"cannot be read ({exc})", path=source) from None
    rows = [(n, line.split("#")[0].split()) for n, line in enumerate(text.splitlines(), 1)]
    rows = [(n, words) for n, words in rows if words]
    if not rows or not rows[0][1][0].upper().endswith("OFF"):
        raise ModelError("is not an OFF file: its first word must be OFF (or COFF, NOFF...)",
                         path=source, line=rows[0][0] if rows else None)
    first = rows[0][1][1:]
    rows = rows[1:]
    if not first:
        if not rows:
            raise ModelError("has no counts line 'vertices faces edges' after OFF", path=source)
        (counts_line, first), rows = rows[0], rows[1:]
    else:
        counts_line = 1
    try:
        nv, nf = int(first[0]), int(first[1])
    except (IndexError, ValueError):
        raise ModelError("the counts line must be 'vertices faces edges' (whole numbers)",
                         path=source, line=counts_line) from None
    if len(rows) < nv + nf:
        raise ModelError(f"declares {nv} vertices and {nf} faces but has only {len(rows)} rows "
                         f"after the counts; the file is cut short", path=source)
    try:
        verts = np.array([[float(x) for x in words[:3]] for _, words in rows[:nv]], dtype=float)
    except ValueError:
        raise ModelError("a vertex row has a coordinate that is not a number; fix the number",
                         path=source) from None
    faces = []
    for number, words in rows[nv:nv + nf]:
        try:
            k = int(words[0])
            face = [int(w) for w in words[1:1 + k]]
        except ValueError:
            raise ModelError("a face row must be 'k i1 ... ik' with whole numbers", path=source,
                             line=number) from None
        if len(face) != k or any(not 0 <= i < nv for i in face):
            raise ModelError(f"face {' '.join(words)!r} names a vertex that does not exist "
                             f"(vertices are numbered 0 to {nv - 1}); correct it", path=source,
                             line=number)
        faces.append(face)
    return verts.reshape(-1, 3), faces


def _obj_lines(source: str) -> tuple[np.ndarray, np.ndarray, bool]:
    """OBJ vertices (``v``), line elements (``l``) as edges, and whether faces exist."""
    verts, edges, has_faces = [], [], False
    with open(source, "rb") as fh:
        pending = None
        for number, raw in enumerate(fh, 1):
            text = raw.decode("utf-8", "replace").split("#")[0].rstrip()
            if pending is not None:
                text, pending = pending[1] + " " + text.strip(), None
            if text.endswith("\\"):
                pending = (number, text[:-1])
                continue
            parts = text.split()
            if not parts:
                continue
            if parts[0] == "v":
                try:
                    verts.append([float(x) for x in parts[1:4]])
                except ValueError:
                    raise ModelError(f"vertex {len(verts) + 1} has a coordinate that is not a "
                                     f"number: {text.strip()!r}; fix the number", path=source,
                                     line=number) from None
                if len(verts[-1]) != 3:
                    raise ModelError("a vertex needs three coordinates 'v x y z'",
                                     path=source, line=number)
            elif parts[0] == "l":
                idx = []
                for token in parts[1:]:
                    try:
                        i = int(token.split("/")[0])
                    except ValueError:
                        raise ModelError(f"line element {text.strip()!r}: {token!r} is not a "
                                         f"vertex number", path=source, line=number) from None
                    i = i - 1 if i > 0 else len(verts) + i
                    if not 0 <= i < len(verts):
                        raise ModelError(f"line element {text.strip()!r} names vertex {token}, "
                                         f"but only {len(verts)} vertices stand before it; "
                                         f"correct the number", path=source, line=number)
                    idx.append(i)
                if len(idx) < 2:
                    raise ModelError("a line element needs two vertices or more, 'l 1 2'",
                                     path=source, line=number)
                edges.extend(zip(idx[:-1], idx[1:]))
            elif parts[0] == "f":
                has_faces = True
    return (np.array(verts, dtype=float).reshape(-1, 3),
            np.array(edges, dtype=np.int64).reshape(-1, 2), has_faces)
