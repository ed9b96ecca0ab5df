"""IFC building models (ISO 16739) in and out, through ifcopenshell.

ifcopenshell is an optional extra (``pip install 'spaceframe[ifc]'``),
imported inside the functions that need it.

Reading (:func:`read_ifc`) takes one of two kinds of model:

- **A structural analysis model** (``IfcStructuralCurveMember`` present):
  each ``IfcStructuralPointConnection`` with vertex topology
  (``IfcVertexPoint``) is a joint, each ``IfcStructuralCurveMember`` with
  edge topology (``IfcEdge``) a member between the connections at its two
  ends (within the merge distance).  A connection lying on a member's
  interior splits the member there, as a T-junction in a drawing does.
  Supports come from each connection's ``IfcBoundaryNodeCondition``: a
  translation given as fixed (``IfcBoolean`` true), or with a translational
  stiffness of at least ``tol.held_stiffness``, is a held direction, along
  the connection's ``ConditionCoordinateSystem`` where it has one.  Rotational
  conditions do not matter to a pin-jointed frame.
- **An architectural model** (otherwise): the axis of every ``IfcMember``,
  ``IfcBeam`` and ``IfcColumn`` (its ``Axis`` representation, a polyline, or
  else the line an ``IfcExtrudedAreaSolid`` body is swept along) is a
  member; axis ends within the merge distance are one joint, and an end on
  another axis's interior splits it (``split``).  An axis end that stops
  short of another axis or joint (within ``tol.near_miss * size``), as a beam
  modelled to a column's face does, is named in a warning with the merge
  distance that would join it.  There are no supports: give them with
  selection rules, as for meshes.

Placements (``IfcLocalPlacement`` chains) are applied.  Lengths are in the
project's length unit: an ``IfcSIUnit`` metre with its prefix (none: m,
``CENTI``: cm, ``MILLI``: mm; others converted to m), or a conversion-based
foot or inch.  Ids are the items' ``Name`` where it is given and unique, else
the ``GlobalId``; every item keeps its ``GlobalId`` as the tag ``ifc_guid``
(and its name as ``ifc_name`` where it is not the id).  The property set
``SpaceframeTags`` carries tags written by :func:`dump_ifc`.

Writing (:func:`dump_ifc`) gives an IFC4 structural analysis model:
connections with vertex topology and boundary conditions for the supports,
curve members with edge topology tied to their connections by
``IfcRelConnectsStructuralMember``, and every tag in ``SpaceframeTags``.
Members with the tag ``role = "brace"`` (added by ``spaceframe brace``) are
described as bracing (``Description`` and ``ObjectType`` ``"bracing"``), so
the result can go back into the design model.  A plane frame is written in
the x-z plane (its y up) and read back as a plane frame.

References
----------
.. [1] ISO 16739-1:2018, Industry Foundation Classes (IFC) for data sharing
   in the construction and facility management industries; the schema's
   structural analysis domain (IfcStructuralAnalysisDomain).
"""

from __future__ import annotations

import dataclasses
import hashlib
import os
import warnings
from pathlib import Path

import numpy as np

from .._optional import require
from ..errors import ModelError, SpaceframeWarning, where
from ..model import Frame, bounding_diagonal
from ..tolerances import DEFAULT, Tolerances
from .sourcelines import checked
from .drawing import _check_near_misses, _split_frame, split_at_junctions
from .mesh import _point, frame_from_edges

__all__ = ["read_ifc", "dump_ifc", "IFC_SUFFIXES"]

#: Suffixes read by :func:`read_ifc` and written by :func:`dump_ifc`.
IFC_SUFFIXES = (".ifc",)
_TAGS = "SpaceframeTags"
_MODEL = "SpaceframeModel"
_ELEMENTS = ("IfcMember", "IfcBeam", "IfcColumn")
#: IfcSIUnit prefixes of a metre kept as a unit of the model; others are converted to m.
_PREFIX_UNITS = {None: "m", "CENTI": "cm", "MILLI": "mm"}
_NAMED_UNITS = {"foot": "ft", "feet": "ft", "ft": "ft", "inch": "in", "inches": "in", "in": "in"}
#: The header's time stamp: fixed, so that output is deterministic.
_TIME_STAMP = "2000-01-01T00:00:00"
_METRES = {"m": 1.0, "cm": 0.01, "mm": 0.001, "ft": 0.3048, "in": 0.0254}


def _ifcopenshell(source: str | None = None):
    """ifcopenshell and the helpers used here, through :func:`spaceframe._optional.require`.

    A missing one is a :class:`~spaceframe.errors.MissingExtraError` naming the
    extra ``ifc``.
    """
    for helper in ("ifcopenshell.util.element", "ifcopenshell.util.placement",
                   "ifcopenshell.util.unit", "ifcopenshell.guid"):
        require(helper)
    return require("ifcopenshell")


# ------------------------------------------------------------------ reading

def read_ifc(path, *, tol: Tolerances = DEFAULT, merge=None, split=True) -> Frame:
    """Read an IFC file into a checked :class:`Frame` (see the module notes).

    Parameters
    ----------
    path : str or os.PathLike
    tol : Tolerances, optional
        ``tol.merge`` (joints within ``tol.merge * size`` are one; member
        ends matched to connections within it) and ``tol.held_stiffness``.
    merge : float, optional
        An absolute merge distance in the model's units instead.
    split : bool, optional
        Split members where a joint lies on their interior (default True).

    Returns
    -------
    frame : Frame
        ``dimension == 3`` (2 for a plane frame written by :func:`dump_ifc`),
        in the project's length unit.

    Raises
    ------
    ModelError
        For a missing ifcopenshell (naming the extra), a file it cannot read,
        a model with no members, a member whose end is at no connection, a
        connection or member without the topology it needs.

    Notes
    -----
    Cost O(n + m) entity look-ups, plus O(m log n) for matching ends and
    splitting members (k-d trees).
    """
    source = os.fspath(path)
    ifcopenshell = _ifcopenshell(source)
    if merge is not None and not (type(merge) in (int, float) and merge >= 0):
        raise ModelError(f"merge must be a distance >= 0; got {merge!r}", path=source)
    try:
        f = ifcopenshell.open(source)
    except Exception as exc:           # the parser's own errors are many and unrelated
        raise ModelError(f"cannot be read as IFC ({type(exc).__name__}: {exc}); check the file",
                         path=source) from None
    units, scale = _length_unit(f, source)
    model = _model_settings(f)
    dimension = int(model.get("dimension", 3)) if model.get("dimension") in (2, 3, "2", "3") \
        else 3
    if f.by_type("IfcStructuralCurveMember"):
        frame = _structural(f, source, tol, merge, split, units, scale)
    else:
        frame = _architectural(f, source, tol, merge, split, units, scale)
    name = model.get("name") or _project_name(f) or Path(source).stem
    if dimension == 2:
        frame = _as_plane(frame, source, tol)
    return checked(_renamed(frame, name), tol=tol)


def _length_unit(f, source: str) -> tuple[str, float]:
    """The model's unit name and the factor from the file's numbers to it."""
    unit_util = require("ifcopenshell.util.unit")

    unit = unit_util.get_project_unit(f, "LENGTHUNIT")
    if unit is None:
        return "m", 1.0
    if unit.is_a("IfcSIUnit"):
        if unit.Name == "METRE" and unit.Prefix in _PREFIX_UNITS:
            return _PREFIX_UNITS[unit.Prefix], 1.0
        return "m", float(unit_util.calculate_unit_scale(f, "LENGTHUNIT"))
    label = str(getattr(unit, "Name", "") or "").strip().lower()
    if label in _NAMED_UNITS:
        named = _NAMED_UNITS[label]
        return named, float(unit_util.calculate_unit_scale(f, "LENGTHUNIT")) / _METRES[named]
    return "m", float(unit_util.calculate_unit_scale(f, "LENGTHUNIT"))


def _project_name(f) -> str:
    projects = f.by_type("IfcProject")
    return str(projects[0].Name or "") if projects else ""


def _model_settings(f) -> dict:
    """The ``SpaceframeModel`` property set of the analysis model, where there is one."""
    element = require("ifcopenshell.util.element")

    for model in f.by_type("IfcStructuralAnalysisModel"):
        props = element.get_psets(model).get(_MODEL)
        if props:
            return {k: v for k, v in props.items() if k != "id"}
    return {}


def _placement(product) -> np.ndarray:
    placement = require("ifcopenshell.util.placement")

    if getattr(product, "ObjectPlacement", None) is None:
        return np.eye(4)
    return np.asarray(placement.get_local_placement(product.ObjectPlacement), dtype=float)


def _apply(matrix: np.ndarray, points) -> np.ndarray:
    p = np.asarray(points, dtype=float).reshape(-1, 3)
    return p @ matrix[:3, :3].T + matrix[:3, 3]


def _xyz(point) -> list[float]:
    c = [float(v) for v in point.Coordinates]
    return (c + [0.0, 0.0])[:3]


def _topology(product, kind: str) -> list:
    """The topology items (``IfcVertexPoint`` or ``IfcEdge``) of a product's representations."""
    shape = getattr(product, "Representation", None)
    items = []
    for rep in (shape.Representations if shape else ()):
        for item in rep.Items or ():
            if item.is_a(kind):
                items.append(item)
            elif kind == "IfcEdge" and item.is_a("IfcOrientedEdge"):
                items.append(item.EdgeElement)
    return items


def _ids(products) -> list[str]:
    """Each product's Name where given and unique, else its GlobalId."""
    names = [str(p.Name or "").strip() for p in products]
    count: dict[str, int] = {}
    for n in names:
        count[n] = count.get(n, 0) + 1
    return [n if n and count[n] == 1 else str(p.GlobalId) for n, p in zip(names, products)]


def _tags(products, ids) -> dict[str, list[str]]:
    """Tags of the products: ``ifc_guid``, ``ifc_name`` and the ``SpaceframeTags`` set."""
    element = require("ifcopenshell.util.element")

    rows = []
    for p, pid in zip(products, ids):
        row = {"ifc_guid": str(p.GlobalId)}
        name = str(p.Name or "").strip()
        if name and name != pid:
            row["ifc_name"] = name
        for k, v in (element.get_psets(p).get(_TAGS) or {}).items():
            if k != "id" and v is not None:
                row[str(k)] = str(v)
        rows.append(row)
    keys = list(dict.fromkeys(k for row in rows for k in row))
    return {k: [row.get(k, "") for row in rows] for k in keys}


def _structural(f, source, tol, merge, split, units, scale) -> Frame:
    connections = list(f.by_type("IfcStructuralPointConnection"))
    members = list(f.by_type("IfcStructuralCurveMember"))
    joint_ids = _ids(connections)
    coords = []
    for c, jid in zip(connections, joint_ids):
        vertex = _topology(c, "IfcVertexPoint")
        if not vertex:
            raise ModelError(f"IfcStructuralPointConnection {jid} has no vertex topology "
                             f"(IfcVertexPoint); give it one, at the joint", path=source, item=jid)
        coords.append(_apply(_placement(c), _xyz(vertex[0].VertexGeometry))[0] * scale)
    coords = np.array(coords, dtype=float).reshape(-1, 3)
    member_ids = _ids(members)
    points = []
    for m, mid in zip(members, member_ids):
        edge = _topology(m, "IfcEdge")
        if not edge:
            raise ModelError(f"IfcStructuralCurveMember {mid} has no edge topology (IfcEdge); "
                             f"give it one between its two connections", path=source, item=mid)
        ends = [_xyz(edge[0].EdgeStart.VertexGeometry), _xyz(edge[0].EdgeEnd.VertexGeometry)]
        points.append(_apply(_placement(m), ends) * scale)
    points = np.array(points, dtype=float).reshape(-1, 2, 3)
    if not len(coords):
        raise ModelError("holds structural members but no IfcStructuralPointConnection; the "
                         "joints must be point connections", path=source)
    everything = np.concatenate([coords, points.reshape(-1, 3)])
    size = bounding_diagonal(everything)
    limit = tol.merge * size if merge is None else float(merge)
    from scipy.spatial import cKDTree

    gap, nearest = cKDTree(coords).query(points.reshape(-1, 3))
    far = np.flatnonzero(gap > limit)
    if far.size:
        k = int(far[0])
        raise ModelError(f"{far.size} member end(s) are at no IfcStructuralPointConnection "
                         f"(within the merge distance {limit:.3g} {units}): the first, member "
                         f"{member_ids[k // 2]}'s {'start' if k % 2 == 0 else 'end'} at "
                         f"{_point(points.reshape(-1, 3)[k])}, is {gap[k]:.3g} from "
                         f"{joint_ids[nearest[k]]}; add a connection there or move the member's "
                         f"end onto one", path=source, item=member_ids[k // 2])
    ends = nearest.reshape(-1, 2)
    rj, rd = _supports(connections, joint_ids, tol, source)
    frame = Frame(joint_ids=tuple(joint_ids), coords=coords, member_ids=tuple(member_ids),
                  ends=ends, restraint_joint=rj, restraint_dir=rd, units=units, source=source,
                  joint_tags=_tags(connections, joint_ids),
                  member_tags=_tags(members, member_ids))
    if split:
        frame = _split_keeping_supports(frame, limit, tol)
    return frame


def _split_keeping_supports(frame: Frame, limit: float, tol: Tolerances) -> Frame:
    """Split members at connections on their interior; joints, ids and supports kept."""
    if not split_at_junctions(frame.coords, frame.ends, limit)[2]:
        return frame
    cut = _split_frame(frame, limit, tol, what="member",
                       ids=lambda mid, q, n: mid if n == 1 else f"{mid}.{q + 1}")
    # the rebuilt frame numbers joints by first use: map back to the connections' ids
    index = {tuple(x): i for i, x in enumerate(frame.coords.tolist())}   # the same numbers
    old = np.array([index[tuple(x)] for x in cut.coords.tolist()], dtype=np.int64)
    return Frame(joint_ids=frame.joint_ids, coords=frame.coords, member_ids=cut.member_ids,
                 ends=old[cut.ends], restraint_joint=frame.restraint_joint,
                 restraint_dir=frame.restraint_dir, units=frame.units, source=frame.source,
                 joint_tags=frame.joint_tags, member_tags=cut.member_tags)


def _held(value, threshold: float) -> bool:
    """Whether one translational condition holds: fixed, or stiffness >= threshold."""
    if value is None:
        return False
    if hasattr(value, "wrappedValue"):
        value = value.wrappedValue
    if isinstance(value, bool):
        return value
    try:
        return float(value) >= threshold
    except (TypeError, ValueError):
        return False


def _supports(connections, joint_ids, tol: Tolerances, source: str):
    """Restrained directions ``(k,)`` joint indices and ``(k, 3)`` rows from the conditions."""
    placement = require("ifcopenshell.util.placement")

    rj, rd = [], []
    for j, c in enumerate(connections):
        cond = getattr(c, "AppliedCondition", None)
        if cond is None or not cond.is_a("IfcBoundaryNodeCondition"):
            continue
        axes = np.eye(3)
        system = getattr(c, "ConditionCoordinateSystem", None)
        if system is not None:
            axes = np.asarray(placement.get_axis2placement(system), dtype=float)[:3, :3].T
        for a, attr in enumerate(("TranslationalStiffnessX", "TranslationalStiffnessY",
                                  "TranslationalStiffnessZ")):
            if _held(getattr(cond, attr, None), tol.held_stiffness):
                rj.append(j)
                rd.append(axes[a] / np.linalg.norm(axes[a]))
    return np.array(rj, dtype=np.int64), np.array(rd, dtype=float).reshape(-1, 3)


def _axis(element, scale: float) -> np.ndarray | None:
    """The two ends ``(2, 3)`` of an element's axis, placed, or None."""
    placement = require("ifcopenshell.util.placement")

    shape = getattr(element, "Representation", None)
    where_ = _placement(element)
    body = None
    for rep in (shape.Representations if shape else ()):
        for item in rep.Items or ():
            if rep.RepresentationIdentifier == "Axis":
                pts = None
                if item.is_a("IfcPolyline"):
                    pts = [_xyz(p) for p in item.Points]
                elif item.is_a("IfcIndexedPolyCurve"):
                    pts = [(list(map(float, p)) + [0.0])[:3] for p in item.Points.CoordList]
                if pts and len(pts) >= 2:
                    return _apply(where_, [pts[0], pts[-1]]) * scale
            elif item.is_a("IfcExtrudedAreaSolid") and body is None:
                body = item
    if body is None:
        return None
    local = np.eye(4) if body.Position is None else \
        np.asarray(placement.get_axis2placement(body.Position), dtype=float)
    direction = np.array(_xyz_ratios(body.ExtrudedDirection), dtype=float)
    ends = _apply(local, [[0.0, 0.0, 0.0], direction * float(body.Depth)])
    return _apply(where_, ends) * scale


def _xyz_ratios(direction) -> list[float]:
    r = [float(v) for v in direction.DirectionRatios]
    return (r + [0.0, 0.0])[:3]


def _architectural(f, source, tol, merge, split, units, scale) -> Frame:
    elements = [e for kind in _ELEMENTS for e in f.by_type(kind)]
    ids = _ids(elements)
    segments, kept, kept_ids, skipped = [], [], [], []
    for e, eid in zip(elements, ids):
        axis = _axis(e, scale)
        if axis is None:
            skipped.append(eid)
            continue
        segments.append(axis)
        kept.append(e)
        kept_ids.append(eid)
    if skipped:
        warnings.warn(f"{where(source)}{len(skipped)} element(s) with neither an axis nor an "
                      f"extruded body are not members: {', '.join(skipped[:5])}"
                      + (" and more" if len(skipped) > 5 else ""), SpaceframeWarning,
                      stacklevel=4)
    if not segments:
        raise ModelError("holds no IfcStructuralCurveMember and no IfcMember, IfcBeam or "
                         "IfcColumn with an axis, so there is no member; export the structural "
                         "analysis model, or give the elements an Axis representation",
                         path=source)
    points = np.concatenate(segments)
    size = bounding_diagonal(points)
    limit = tol.merge * size if merge is None else float(merge)
    tags = _tags(kept, kept_ids)
    tags["ifc_class"] = [e.is_a() for e in kept]
    frame = frame_from_edges(points, np.arange(len(points)).reshape(-1, 2), source=source,
                             tol=tol, merge=limit, units=units, edge_ids=kept_ids,
                             edge_tags=tags, what="axis")
    if split:
        frame = _split_frame(frame, limit, tol, what="axis",
                             ids=lambda mid, q, n: mid if n == 1 else f"{mid}.{q + 1}")
    _check_near_misses(frame, tol, limit, split, np.zeros((0, 2, 3)), np.zeros(0, dtype=object),
                       what="axis", refuse=False)
    return frame


def _as_plane(frame: Frame, source: str, tol: Tolerances) -> Frame:
    """A plane frame written in the x-z plane, read back with coordinates ``[x, z]``.

    Its joints are in that plane when their y coordinates differ by no more
    than ``tol.coincident * size``.
    """
    if frame.n_joints and np.ptp(frame.coords[:, 1]) > tol.coincident * frame.size():
        raise ModelError("says it is a plane frame (SpaceframeModel dimension = 2) but its "
                         "joints are not in one x-z plane; remove the property or correct "
                         "the model", path=source)
    d = frame.restraint_dir[:, [0, 2]]
    keep = np.linalg.norm(d, axis=1) > 0.5
    return Frame(joint_ids=frame.joint_ids, coords=frame.coords[:, [0, 2]],
                 member_ids=frame.member_ids, ends=frame.ends,
                 restraint_joint=frame.restraint_joint[keep], restraint_dir=d[keep],
                 dimension=2, units=frame.units, source=source, joint_tags=frame.joint_tags,
                 member_tags=frame.member_tags)


def _renamed(frame: Frame, name: str) -> Frame:
    return dataclasses.replace(frame, name=name)


# ------------------------------------------------------------------ writing

def _guid(ifcopenshell, *parts: str) -> str:
    """A GlobalId made from the parts (the same frame gives the same file)."""
    digest = hashlib.sha1("\x1f".join(parts).encode("utf-8")).hexdigest()[:32]
    return ifcopenshell.guid.compress(digest)


def _length_unit_entity(f, units: str):
    if units in ("m", "cm", "mm"):
        prefix = {"m": None, "cm": "CENTI", "mm": "MILLI"}[units]
        return f.createIfcSIUnit(None, "LENGTHUNIT", prefix, "METRE")
    metre = f.createIfcSIUnit(None, "LENGTHUNIT", None, "METRE")
    exponents = f.createIfcDimensionalExponents(1, 0, 0, 0, 0, 0, 0)
    factor = f.createIfcMeasureWithUnit(f.createIfcLengthMeasure(_METRES[units]), metre)
    return f.createIfcConversionBasedUnit(exponents, "LENGTHUNIT",
                                          {"ft": "foot", "in": "inch"}[units], factor)


def _perpendicular(v: np.ndarray) -> list[float]:
    """A unit vector at right angles to ``v``: the member's local z axis."""
    v = v / np.linalg.norm(v)
    trial = np.array([0.0, 0.0, 1.0]) if abs(v[2]) < 0.9 else np.array([1.0, 0.0, 0.0])
    z = trial - (trial @ v) * v
    return [float(c) for c in z / np.linalg.norm(z)]


def _support_condition(f, rows: np.ndarray, label: str):
    """A boundary condition for the unit rows held at one joint, and its coordinate system.

    Rows along the axes give fixed translations about the global axes; other
    rows get a ``ConditionCoordinateSystem`` whose first axes are the rows.
    """
    eye = np.eye(3)
    along = [int(np.argmax(np.abs(r))) for r in rows]
    if all(np.all(np.abs(np.abs(r) - eye[a]) <= DEFAULT.axis_restraint)
           for r, a in zip(rows, along)):
        held, system = set(along), None
    else:
        q, _ = np.linalg.qr(np.column_stack([*rows, eye]).astype(float))
        basis = q[:, :3].T
        basis[:len(rows)] = rows
        if np.linalg.det(basis) < 0:
            basis[2] = -basis[2]
        held = set(range(len(rows)))
        system = f.createIfcAxis2Placement3D(
            f.createIfcCartesianPoint((0.0, 0.0, 0.0)),
            f.createIfcDirection([float(c) for c in basis[2]]),
            f.createIfcDirection([float(c) for c in basis[0]]))
    fix = [f.create_entity("IfcBoolean", a in held) for a in range(3)]
    free = [f.create_entity("IfcBoolean", False) for _ in range(3)]
    return f.createIfcBoundaryNodeCondition(label, *fix, *free), system


def _tag_set(f, ifcopenshell, owner, obj, labels: dict[str, str], key: str):
    props = [f.createIfcPropertySingleValue(k, None, f.createIfcLabel(v), None)
             for k, v in labels.items() if v != "" and k not in ("ifc_guid", "ifc_name")]
    if not props:
        return
    pset = f.createIfcPropertySet(_guid(ifcopenshell, key, "pset"), owner, _TAGS, None, props)
    f.createIfcRelDefinesByProperties(_guid(ifcopenshell, key, "rel"), owner, None, None, [obj],
                                      pset)


def dump_ifc(frame: Frame, path, *, overwrite: bool = False) -> None:
    """Write a frame as an IFC4 structural analysis model (see the module notes).

    Parameters
    ----------
    frame : Frame
    path : str or os.PathLike
    overwrite : bool, optional
        Replace an existing file (the caller has checked it is no input).

    Raises
    ------
    ModelError
        For a missing ifcopenshell (naming the extra to install), a
        coordinate that is not finite, or an existing file without
        ``overwrite`` (:func:`~spaceframe.io.native.write.check_model_output`).

    Notes
    -----
    Cost O(n + m) entities.  The GlobalIds are the items' ``ifc_guid`` tags
    where they have them, else derived from the frame's name and the ids, so
    the same frame gives the same file.
    """
    from .native.write import check_model_output
    from .output import write_text

    target = check_model_output(frame, path, overwrite)
    ifcopenshell = _ifcopenshell(target)
    f = ifcopenshell.file(schema="IFC4")
    key = frame.name or Path(target).stem
    owner = None
    origin = f.createIfcAxis2Placement3D(f.createIfcCartesianPoint((0.0, 0.0, 0.0)), None, None)
    context = f.createIfcGeometricRepresentationContext(None, "Model", 3, 1e-5, origin, None)
    units = f.createIfcUnitAssignment([_length_unit_entity(f, frame.units)])
    project = f.createIfcProject(_guid(ifcopenshell, key, "project"), owner, key, None, None,
                                 None, None, [context], units)
    shared = f.createIfcLocalPlacement(None, origin)
    model = f.createIfcStructuralAnalysisModel(
        _guid(ifcopenshell, key, "model"), owner, key, "pin-jointed frame written by spaceframe",
        None, "LOADING_3D", None, None, None, shared)
    f.createIfcRelDeclares(_guid(ifcopenshell, key, "declares"), owner, None, None, project,
                           [model])
    settings = [f.createIfcPropertySingleValue("dimension", None,
                                               f.createIfcInteger(frame.dimension), None),
                f.createIfcPropertySingleValue("name", None, f.createIfcLabel(key), None)]
    pset = f.createIfcPropertySet(_guid(ifcopenshell, key, "settings"), owner, _MODEL, None,
                                  settings)
    f.createIfcRelDefinesByProperties(_guid(ifcopenshell, key, "settings-rel"), owner, None,
                                      None, [model], pset)
    X = frame.coords if frame.dimension == 3 else \
        np.column_stack([frame.coords[:, 0], np.zeros(frame.n_joints), frame.coords[:, 1]])
    R = frame.restraint_dir if frame.dimension == 3 else \
        np.column_stack([frame.restraint_dir[:, 0], np.zeros(frame.n_restraints),
                         frame.restraint_dir[:, 1]])

    def labels(tags, i):
        return {k: v[i] for k, v in tags.items()}

    vertices, items = [], []
    for j, jid in enumerate(frame.joint_ids):
        tags = labels(frame.joint_tags, j)
        vertex = f.createIfcVertexPoint(f.createIfcCartesianPoint([float(c) for c in X[j]]))
        vertices.append(vertex)
        shape = f.createIfcProductDefinitionShape(None, None, [
            f.createIfcTopologyRepresentation(context, "Reference", "Vertex", [vertex])])
        rows = R[frame.restraint_joint == j]
        condition = system = None
        if len(rows):
            condition, system = _support_condition(f, rows, f"support {jid}")
        guid = tags.get("ifc_guid") or _guid(ifcopenshell, key, "joint", jid)
        joint = f.createIfcStructuralPointConnection(
            guid, owner, tags.get("ifc_name") or jid, None, None, shared, shape, condition,
            system)
        _tag_set(f, ifcopenshell, owner, joint, tags, guid)
        items.append(joint)
    joints = list(items)
    role = frame.member_tags.get("role")
    for k, mid in enumerate(frame.member_ids):
        tags = labels(frame.member_tags, k)
        a, b = (int(i) for i in frame.ends[k])
        edge = f.createIfcEdge(vertices[a], vertices[b])
        shape = f.createIfcProductDefinitionShape(None, None, [
            f.createIfcTopologyRepresentation(context, "Reference", "Edge", [edge])])
        brace = role is not None and role[k] == "brace"
        guid = tags.get("ifc_guid") or _guid(ifcopenshell, key, "member", mid)
        member = f.createIfcStructuralCurveMember(
            guid, owner, tags.get("ifc_name") or mid, "bracing" if brace else None,
            "bracing" if brace else None, shared, shape, "PIN_JOINED_MEMBER",
            f.createIfcDirection(_perpendicular(X[b] - X[a])))
        for end, joint in (("start", joints[a]), ("end", joints[b])):
            f.createIfcRelConnectsStructuralMember(
                _guid(ifcopenshell, key, "connects", mid, end), owner, None, None, member, joint,
                None, None, None, None)
        _tag_set(f, ifcopenshell, owner, member, tags, guid)
        items.append(member)
    if items:
        f.createIfcRelAssignsToGroup(_guid(ifcopenshell, key, "group"), owner, None, None,
                                     items, None, model)
    header = f.header.file_name
    header.name = Path(target).name
    header.time_stamp = _TIME_STAMP        # the same frame gives the same file, byte for byte
    header.originating_system = "spaceframe"
    write_text(target, f.to_string(), overwrite=overwrite)
    if frame.loads is not None:     # said, not silently dropped
        warnings.warn(f"{target}: the IFC file written holds the frame, not its load cases; "
                      f"keep the loads in the TOML, JSON or .npz model", SpaceframeWarning,
                      stacklevel=2)
