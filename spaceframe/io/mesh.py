"""Meshes and line files as frames: every unique edge a member, every vertex a joint.

Read through trimesh's loaders (STL, PLY, OFF, glTF/GLB, and the faces of
OBJ), except OBJ line elements (``l``), which this module reads itself: a
file with lines only would come back from the loader as a point cloud.

- Faces keep their polygons: each side of a face is a member; no diagonal is
  added to a quadrilateral.  OFF files are split into triangles by their
  loader, so an OFF face with more than three corners is refused.
- Vertices closer than ``tol.merge * size`` (``size`` the diagonal of the
  vertices' bounding box, :class:`~spaceframe.tolerances.Tolerances`) are one
  joint: an STL file gives each triangle its own three corners.
- An edge whose two ends merge into one joint is dropped with a warning.
- An edge shared by more than two faces (a non-manifold mesh) is refused: the
  faces meet in a way no surface of a frame does, most often faces given
  twice or stacked; export the members as lines instead.
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
from ..model import Frame, bounding_diagonal
from ..tolerances import DEFAULT, Tolerances
from .sourcelines import checked

__all__ = ["read_mesh", "frame_from_edges", "MESH_SUFFIXES"]

#: Suffixes read by :func:`read_mesh`.
MESH_SUFFIXES = (".stl", ".obj", ".ply", ".off", ".glb", ".gltf")


def read_mesh(path, *, tol: Tolerances = DEFAULT) -> Frame:
    """Read a mesh or line file into a checked space :class:`Frame` without supports.

    Parameters
    ----------
    path : str or os.PathLike
        An ``.stl``, ``.obj``, ``.ply``, ``.off``, ``.glb`` or ``.gltf`` file.
    tol : Tolerances, optional
        ``tol.merge`` sets the distance within which vertices are one joint.

    Returns
    -------
    frame : Frame
        ``dimension == 3``, units ``"m"`` (a mesh does not say; results do
        not depend on it).

    Raises
    ------
    ModelError
        For a file the loader cannot read, a mesh with no edges, a
        non-manifold edge, an OBJ line element naming a vertex that does not
        exist (with its line), an OFF face of more than three corners.

    Notes
    -----
    Cost O(V log V + E log E) for V vertices and E edges (a k-d tree for the
    merge, a sort for unique edges).
    """
    source = os.fspath(path)
    suffix = Path(source).suffix.lower()
    if not Path(source).is_file():
        raise ModelError("no such file; check the path and its spelling", path=source)
    points, edges, faces = [], [], []
    if suffix == ".obj":
        v, lines, has_faces = _obj_lines(source)
        points.append(v)
        edges.append(lines)
        if has_faces:
            fv, ff = _loaded_polygons(source, "obj")
            faces.append((fv, ff, len(v)))
    else:
        fv, ff = _loaded_polygons(source, suffix[1:])
        faces.append((fv, ff, 0))
    offset = sum(len(p) for p in points)
    for fv, ff, _ in faces:
        points.append(fv)
        face_edges = _polygon_edges(ff)
        _check_manifold(face_edges, fv, source)
        edges.append(face_edges + offset)
        offset += len(fv)
    coords = np.concatenate(points) if points else np.zeros((0, 3))
    all_edges = np.concatenate(edges) if edges else np.zeros((0, 2), dtype=np.int64)
    if len(all_edges) == 0:
        raise ModelError("holds no faces and no lines, so there is no member to audit; export "
                         "the frame's members as faces or as line elements", path=source)
    return frame_from_edges(coords, all_edges, source=source, tol=tol)


def frame_from_edges(points, edges, *, source: str | None = None, tol: Tolerances = DEFAULT,
                     dimension: int = 3, merge: float | None = None, name: str | None = None,
                     what: str = "edge") -> Frame:
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
    ends = ends[np.sort(first)]
    stem = Path(source).stem if source is not None else ""
    frame = Frame(joint_ids=tuple(f"J{i + 1}" for i in range(len(coords))), coords=coords,
                  member_ids=tuple(f"M{i + 1}" for i in range(len(ends))), ends=ends,
                  restraint_joint=np.zeros(0, dtype=np.int64),
                  restraint_dir=np.zeros((0, dimension)), dimension=dimension,
                  name=stem if name is None else name, source=source)
    return checked(frame, tol=tol)


def _point(x) -> str:
    return "(" + ", ".join(f"{v:.6g}" for v in x) + ")"


def _polygon_edges(faces) -> np.ndarray:
    """The sides of each polygon, ``(sum of corners, 2) int`` (rows of -1 padding skipped)."""
    out = []
    for face in faces:
        face = [int(i) for i in face]
        out.extend(zip(face, face[1:] + face[:1]) if len(face) > 2 else [tuple(face)])
    return np.array(out, dtype=np.int64).reshape(-1, 2)


def _check_manifold(edges: np.ndarray, points: np.ndarray, source: str) -> None:
    if len(edges) == 0:
        return
    # compare by coordinates: loaders may give each face its own corners
    _, inverse = np.unique(np.round(points, 12), axis=0, return_inverse=True)
    key = np.sort(inverse.reshape(-1)[edges], axis=1)
    _, counts = np.unique(key, axis=0, return_counts=True)
    if (counts > 2).any():
        k = np.flatnonzero(counts > 2)
        uniq = np.unique(key, axis=0)
        a, b = uniq[k[0]]
        pa = points[np.flatnonzero(inverse.reshape(-1) == a)[0]]
        pb = points[np.flatnonzero(inverse.reshape(-1) == b)[0]]
        raise ModelError(f"is a non-manifold mesh: {len(k)} edge(s) are sides of three faces or "
                         f"more, the first from {_point(pa)} to {_point(pb)} "
                         f"({counts[k[0]]} faces); faces are given twice or stacked there: "
                         f"remove the extra faces, or export the members as lines (OBJ 'l' "
                         f"elements or a CSV pair)", path=source)


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
    if file_type == "off":
        _check_off_polygons(source, len(faces))
    return (np.concatenate(verts) if verts else np.zeros((0, 3))), faces


def _check_off_polygons(source: str, triangles: int) -> None:
    """Refuse OFF faces of more than 3 corners: the loader splits them, adding members."""
    with open(source, "rb") as fh:
        words = []
        for raw in fh:
            line = raw.split(b"#")[0].split()
            words.extend(line)
            if len(words) >= 3 and words[0].upper().endswith(b"OFF"):
                break
    try:
        declared = int(words[2])
    except (IndexError, ValueError):
        return
    if triangles > declared:
        raise ModelError(f"has faces of more than three corners ({declared} faces became "
                         f"{triangles} triangles); the OFF loader splits them, adding diagonals "
                         f"that are not in the frame: export as OBJ or PLY, which keep "
                         f"polygons, or as triangles only", path=source)


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
