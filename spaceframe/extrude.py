"""From a planar truss to the frame as built: repeat it along a building and tie the frames.

A plane frame (``dimension = 2``, coordinates ``[x, y]``, y up) is stood in the
vertical plane of 3D: planar ``(x, y)`` becomes ``(x, 0, y)``, so z is up in
the 3D model and the plane's normal is +y.  It is repeated in ``frames``
copies along the extrusion direction (default +y), tied frame to frame by
longitudinal members at the planar joints the spec names, optionally braced
in named bays and planes, with optional posts; each planar support becomes a
3D support with an explicit choice for the out-of-plane direction.

The extrusion spec is a small TOML file::

    frames = 6                      # number of planar frames (1 gives a warning)
    spacing = 5.0                   # distance between frames; or bays = [5.0, 6.0, ...]
    # direction = [0.0, 1.0, 0.0]   # extrusion direction in 3D; default normal to the frame
    out_of_plane = "free"           # what every planar support holds out of plane: held or free

    [ties]                          # role = planar joints tied frame to frame, one member a bay
    purlin = ["U1", "U2", "U4", "U5"]
    ridge = ["U3"]
    eaves = ["L0", "L6"]

    [[support]]                     # exceptions, applied in order (later ones win)
    at = "L0, L6"                   # planar joints: ids or a selector (spaceframe.selection)
    frames = "ends"                 # all (default), ends, first, last, or a list [1, 6]
    out_of_plane = "held"           # held or free
    # plane = "pin"                 # the in-plane support instead of the planar model's

    [planes]                        # named chains of planar joints, for bracing
    left_roof = ["L0", "U1", "U2", "U3"]

    [[bracing]]                     # diagonals between the frames of a bay
    planes = ["left_roof"]
    bays = "ends"                   # all, ends, first, last, or a list [1, 5]
    pattern = "cross"               # cross (both diagonals of each panel) or single

    [posts]                         # posts from planar joints down to new feet
    at = ["U1", "U2"]
    frames = "ends"
    base = -3.0                     # planar y of the feet
    foot = "pin"                    # the feet's 3D support

    [drawing]                       # only when the planar frame is a drawing
    layers = ["TRUSS"]              # layers (DXF) or colours (SVG strokes) that are members
    merge = 0.001                   # distance within which line ends are one joint
    split = true                    # split a line where another line's end lies on it
    units = "mm"                    # only for a drawing that declares no unit

Ids of the 3D model say where an item is: ``F3.U2`` is planar joint ``U2`` in
frame 3 (and ``F3.TC2`` planar member ``TC2`` there); ``B2.U2`` is the tie at
``U2`` in bay 2 (between frames 2 and 3); ``B1.left_roof.2a`` and ``...2b``
are the two diagonals of panel 2 of plane ``left_roof`` in bay 1 (``a`` runs
from frame k at the panel's first joint to frame k + 1 at its second);
``F1.U2.post`` and ``F1.U2.foot`` are a post and its foot.

Every joint and member is tagged (:attr:`~spaceframe.model.Frame.member_tags`):
``group`` is frame, tie, brace or post; ``role`` is the planar role (chord,
web, ... from the planar model's own ``role`` tag, else ``frame``), the tie's
name in ``[ties]`` (purlin, ridge, ...), ``brace`` or ``post`` (feet:
``foot``); ``frame`` is the frame number (``""`` for items between frames);
``bay`` is the bay number of ties and braces.
"""

from __future__ import annotations

import os
import warnings
from dataclasses import dataclass, field

import numpy as np

from . import edit
from .errors import ModelError, SpaceframeWarning, where
from .model import Frame
from .selection import parse_selector, select
from .suggest import closest, did_you_mean
from .supports import restraint_rows
from .tolerances import DEFAULT, Tolerances

__all__ = ["Spec", "read_spec", "spec_from_document", "extrude", "extruded_counts", "SPEC_KEYS"]

#: Top-level keys of an extrusion spec.
SPEC_KEYS = ("name", "frames", "spacing", "bays", "direction", "out_of_plane", "ties", "support",
             "planes", "bracing", "posts", "drawing")
_HELD = ("held", "free")
_PATTERNS = ("cross", "single")
_NORMAL = np.array([0.0, 1.0, 0.0])


@dataclass(frozen=True)
class Spec:
    """A checked extrusion spec (see the module docstring for the file).

    Attributes
    ----------
    frames : int
    bays : (frames - 1,) float
        Distance from each frame to the next, along ``direction``.
    direction : (3,) float
        Unit extrusion direction.
    out_of_plane : {"held", "free"}
    ties : dict of str to list of str
        Role -> planar joint ids.
    support_rules : list of dict
        Each with ``at`` (str), ``frames`` (set of int), optional ``plane``
        (str) and ``out_of_plane`` (str), and ``line``.
    planes : dict of str to list of str
    bracing : list of dict
        Each with ``planes`` (list of str), ``bays`` (set of int),
        ``pattern`` and ``line``.
    posts : dict or None
        ``at`` (list of str), ``frames`` (set of int), ``base`` (float),
        ``foot`` (str), ``line``.
    drawing : dict
        Options for reading a drawing (``layers``, ``merge``).
    name : str
    source, text : str or None
        The spec file and its text, for messages.
    """

    frames: int
    bays: np.ndarray
    direction: np.ndarray = field(default_factory=lambda: _NORMAL.copy())
    out_of_plane: str = "free"
    ties: dict = field(default_factory=dict)
    support_rules: list = field(default_factory=list)
    planes: dict = field(default_factory=dict)
    bracing: list = field(default_factory=list)
    posts: dict | None = None
    drawing: dict = field(default_factory=dict)
    name: str = ""
    source: str | None = None
    text: str | None = None

    def line(self, section: str | None, key: str | None = None, nth: int = 1) -> int | None:
        """The line of ``key`` in the ``nth`` table ``[section]`` / ``[[section]]``, where found.

        Else the line of that table's header (None: the top level).  Found by
        :class:`~spaceframe.io.sourcelines.SourceLines`, when a message needs it.
        """
        from .io.sourcelines import SourceLines

        table = () if section is None else (section,)
        return SourceLines(self.text).near(table, key, nth=nth)

    def error(self, message: str, section: str | None = None, key: str | None = None,
              nth: int = 1, item: str | None = None) -> ModelError:
        return ModelError(message, path=self.source, line=self.line(section, key, nth), item=item)


# ------------------------------------------------------------------ the spec

def read_spec(path) -> Spec:
    """Read and check an extrusion spec file.

    Raises
    ------
    ModelError
        For a file that cannot be read or is not TOML, and for every check of
        :func:`spec_from_document`.
    """
    from .io.settings import read_settings

    source = os.fspath(path)
    doc, text = read_settings(source, "spec")
    return spec_from_document(doc, path=source, text=text)


def spec_from_document(doc: dict, *, path=None, text: str | None = None) -> Spec:
    """Check a parsed spec (a dict, as from TOML) and return a :class:`Spec`.

    Checks what needs no planar frame: the number of frames (a whole number
    >= 1; one frame draws a warning, since nothing out of plane can then be
    judged), spacings (> 0, one per bay), the direction (three finite numbers,
    not zero), the held/free words, bay and frame numbers in range, the
    bracing patterns and plane names.  Joint ids are checked against the
    planar frame by :func:`extrude`.

    Raises
    ------
    ModelError
        Naming the spec file, the line and the fix.

    Warns
    -----
    SpaceframeWarning
        For one frame only, and for unknown keys.
    """
    source = None if path is None else os.fspath(path)
    probe = Spec(frames=1, bays=np.zeros(0), source=source, text=text)
    for key in doc:
        if key not in SPEC_KEYS:
            close = closest(key, SPEC_KEYS)
            hint = f"did you mean {close!r}? " if close is not None else ""
            warnings.warn(f"{where(source, probe.line(None, key))}unknown spec key {key!r} is "
                          f"ignored; {hint}the keys are {', '.join(SPEC_KEYS)}",
                          SpaceframeWarning, stacklevel=3)
    frames = doc.get("frames")
    if type(frames) is not int or frames < 1:
        raise probe.error(f"frames must be a whole number of planar frames, 1 or more, e.g. "
                          f"frames = 6; got {frames!r}", None, "frames")
    if frames == 1:
        warnings.warn(f"{where(source, probe.line(None, 'frames'))}one frame only: nothing ties "
                      f"it out of its plane, so nothing out of plane can be judged; give "
                      f"frames = 2 or more for a building", SpaceframeWarning, stacklevel=3)
    bays = _bays(doc, frames, probe)
    direction = _direction(doc, probe)
    out_of_plane = _held_word(doc.get("out_of_plane", "free"), probe, None, "out_of_plane")
    ties = _ties(doc, probe)
    rules = [_support_rule(r, k, frames, probe)
             for k, r in enumerate(_tables(doc, "support", probe), 1)]
    planes = _planes(doc, probe)
    bracing = [_bracing(b, k, frames, planes, probe)
               for k, b in enumerate(_tables(doc, "bracing", probe), 1)]
    posts = _posts(doc, frames, probe)
    drawing = doc.get("drawing", {})
    if not isinstance(drawing, dict):
        raise probe.error("[drawing] must be a table: layers = [...], merge = DISTANCE",
                          None, "drawing")
    name = doc.get("name", "")
    if not isinstance(name, str):
        raise probe.error(f"name must be text in quotes; got {name!r}", None, "name")
    return Spec(frames=frames, bays=bays, direction=direction, out_of_plane=out_of_plane,
                ties=ties, support_rules=rules, planes=planes, bracing=bracing, posts=posts,
                drawing=dict(drawing), name=name, source=source, text=text)


def _bays(doc: dict, frames: int, probe: Spec) -> np.ndarray:
    if "spacing" in doc and "bays" in doc:
        raise probe.error("give either spacing (all bays alike) or bays (a list of bay widths), "
                          "not both", None, "bays")
    if frames == 1:
        return np.zeros(0)
    if "bays" in doc:
        key, raw = "bays", doc["bays"]
        if not (isinstance(raw, list) and all(type(v) in (int, float) for v in raw)):
            raise probe.error(f"bays must be a list of numbers, one width per bay, e.g. "
                              f"bays = {[5.0] * (frames - 1)}; got {raw!r}", None, key)
        if len(raw) != frames - 1:
            raise probe.error(f"bays lists {len(raw)} widths but {frames} frames make "
                              f"{frames - 1} bays; give one width per bay", None, key)
        values = np.array(raw, dtype=float)
    elif "spacing" in doc:
        key, raw = "spacing", doc["spacing"]
        if type(raw) not in (int, float):
            raise probe.error(f"spacing must be a number (the distance between frames); got "
                              f"{raw!r}", None, key)
        values = np.full(frames - 1, float(raw))
    else:
        raise probe.error("the spec needs the spacing of the frames: spacing = 5.0, or bays = "
                          "[5.0, 6.0, ...] (one width per bay)", None, "frames")
    bad = np.flatnonzero(~(np.isfinite(values) & (values > 0)))
    if bad.size:
        which = f"bay {bad[0] + 1} has width" if key == "bays" else "spacing is"
        raise probe.error(f"{which} {values[bad[0]]:g}; frames must stand apart: give a distance "
                          f"greater than zero", None, key)
    return values


def _direction(doc: dict, probe: Spec) -> np.ndarray:
    raw = doc.get("direction", [0.0, 1.0, 0.0])
    ok = isinstance(raw, list) and len(raw) == 3 and all(type(v) in (int, float) for v in raw)
    vec = np.array(raw, dtype=float) if ok else None
    if vec is None or not np.all(np.isfinite(vec)) or not np.linalg.norm(vec) > 0:
        raise probe.error(f"direction must be three numbers, not all zero, e.g. direction = "
                          f"[0.0, 1.0, 0.0] (the frame stands in the plane y = 0); got {raw!r}",
                          None, "direction")
    vec = vec / np.linalg.norm(vec)
    if abs(vec @ _NORMAL) < DEFAULT.in_plane_direction:
        raise probe.error(f"direction {raw!r} lies in the frame's own plane (x, z), so the frames "
                          f"would fall onto one another; give a direction with a y component, "
                          f"e.g. [0.0, 1.0, 0.0]", None, "direction")
    return vec


def _held_word(value, probe: Spec, section, key, nth: int = 1) -> str:
    if value in _HELD:
        return value
    raise probe.error(f"{key} must be \"held\" or \"free\" (is the out-of-plane direction held "
                      f"at the support?); got {value!r}", section, key, nth)


def _ids_list(value, probe: Spec, section, key, nth: int = 1, what="planar joint ids") -> list:
    if isinstance(value, str):
        value = [v.strip() for v in value.split(",")]
    if not (isinstance(value, list) and value and all(isinstance(v, str) and v for v in value)):
        raise probe.error(f"{key} must be a list of {what} in quotes, e.g. {key} = "
                          f"[\"A\", \"B\"]; got {value!r}", section, key, nth)
    return value


def _ties(doc: dict, probe: Spec) -> dict:
    ties = doc.get("ties", {})
    if not isinstance(ties, dict):
        raise probe.error("[ties] must be a table of role = [planar joint ids], e.g. "
                          "purlin = [\"U1\", \"U2\"]", None, "ties")
    return {role: _ids_list(ids, probe, "ties", role) for role, ids in ties.items()}


def _tables(doc: dict, key: str, probe: Spec) -> list:
    value = doc.get(key, [])
    if isinstance(value, dict):
        value = [value]
    if not (isinstance(value, list) and all(isinstance(v, dict) for v in value)):
        raise probe.error(f"{key} entries are tables, each under its own [[{key}]] header",
                          None, key)
    return value


def _numbers_set(value, top: int, probe: Spec, section: str, key: str, nth: int,
                 what: str) -> set:
    """Frame or bay numbers from ``"all"``, ``"ends"``, ``"first"``, ``"last"`` or a list."""
    if top < 1:
        return set()
    words = {"all": set(range(1, top + 1)), "ends": {1, top}, "first": {1}, "last": {top}}
    if isinstance(value, str) and value in words:
        return words[value]
    if isinstance(value, list) and value and all(type(v) is int for v in value):
        bad = [v for v in value if not 1 <= v <= top]
        if bad:
            raise probe.error(f"{key} = {value!r}: {what} {bad[0]} does not exist; {what}s are "
                              f"numbered 1 to {top}", section, key, nth)
        return set(value)
    raise probe.error(f"{key} must be \"all\", \"ends\", \"first\", \"last\" or a list of {what} "
                      f"numbers 1 to {top}; got {value!r}", section, key, nth)


def _support_rule(rule: dict, nth: int, frames: int, probe: Spec) -> dict:
    if "at" not in rule:
        raise probe.error("a [[support]] entry needs at = \"...\": the planar joints it is for "
                          "(ids such as \"L0, L6\", or a selector such as \"y = min\")",
                          "support", None, nth)
    at = rule["at"]
    if isinstance(at, list) and all(isinstance(a, str) for a in at):
        at = ", ".join(at)
    if not isinstance(at, str):
        raise probe.error(f"at must be text: joint ids or a selector; got {at!r}",
                          "support", "at", nth)
    out = {"at": at, "line": probe.line("support", "at", nth),
           "frames": _numbers_set(rule.get("frames", "all"), frames, probe, "support", "frames",
                                  nth, "frame")}
    if "out_of_plane" in rule:
        out["out_of_plane"] = _held_word(rule["out_of_plane"], probe, "support", "out_of_plane",
                                         nth)
    if "plane" in rule:
        plane = rule["plane"]
        if not isinstance(plane, str):
            raise probe.error(f"plane must be a plane-frame support code (pin, x, y or free); "
                              f"got {plane!r}", "support", "plane", nth)
        out["plane"] = plane
    for key in rule:
        if key not in ("at", "frames", "out_of_plane", "plane"):
            raise probe.error(f"unknown key {key!r} in [[support]]; its keys are at, frames, "
                              f"plane and out_of_plane", "support", key, nth)
    return out


def _planes(doc: dict, probe: Spec) -> dict:
    planes = doc.get("planes", {})
    if not isinstance(planes, dict):
        raise probe.error("[planes] must be a table of name = [planar joint ids along the "
                          "plane]", None, "planes")
    out = {}
    for name, chain in planes.items():
        chain = _ids_list(chain, probe, "planes", name)
        if len(chain) < 2:
            raise probe.error(f"plane {name!r} needs at least two planar joints (a panel runs "
                              f"between two)", "planes", name)
        out[name] = chain
    return out


def _bracing(entry: dict, nth: int, frames: int, planes: dict, probe: Spec) -> dict:
    names = _ids_list(entry.get("planes"), probe, "bracing", "planes", nth,
                      what="plane names from [planes]")
    for name in names:
        if name not in planes:
            raise probe.error(f"bracing names plane {name!r}, which is not in [planes]"
                              f"{did_you_mean(name, planes)}; "
                              f"add it there as {name} = [planar joint ids]",
                              "bracing", "planes", nth)
    pattern = entry.get("pattern", "cross")
    if pattern not in _PATTERNS:
        raise probe.error(f"pattern must be \"cross\" (both diagonals of each panel) or "
                          f"\"single\" (one, alternating); got {pattern!r}",
                          "bracing", "pattern", nth)
    if frames < 2:
        raise probe.error("bracing needs two frames or more: it runs between frames",
                          "bracing", "planes", nth)
    return {"planes": names, "pattern": pattern, "line": probe.line("bracing", "planes", nth),
            "bays": _numbers_set(entry.get("bays", "all"), frames - 1, probe, "bracing", "bays",
                                 nth, "bay")}


def _posts(doc: dict, frames: int, probe: Spec) -> dict | None:
    posts = doc.get("posts")
    if posts is None:
        return None
    if not isinstance(posts, dict):
        raise probe.error("[posts] must be a table: at = [...], base = Y", None, "posts")
    base = posts.get("base")
    if type(base) not in (int, float):
        raise probe.error(f"[posts] needs base = Y, the planar y of the posts' feet; got "
                          f"{base!r}", "posts", "base" if "base" in posts else None)
    return {"at": _ids_list(posts.get("at"), probe, "posts", "at"), "base": float(base),
            "foot": str(posts.get("foot", "pin")), "line": probe.line("posts", "at"),
            "frames": _numbers_set(posts.get("frames", "ends"), frames, probe, "posts", "frames",
                                   1, "frame")}


# ------------------------------------------------------------- the extrusion

def extruded_counts(planar: Frame, spec: Spec) -> dict:
    """The joint and member counts :func:`extrude` gives, from the spec alone.

    ``joints = frames * n + feet``, ``members = frames * m + (frames - 1) * ties + braces
    + posts``, with ``ties`` the number of tied planar joints, ``braces`` the
    diagonals (two a panel for ``cross``, one for ``single``) and one foot
    and one post per post joint and post frame.
    """
    ties = sum(len(v) for v in spec.ties.values())
    braces = sum((2 if b["pattern"] == "cross" else 1) * len(b["bays"])
                 * sum(len(spec.planes[p]) - 1 for p in b["planes"]) for b in spec.bracing)
    posts = len(spec.posts["at"]) * len(spec.posts["frames"]) if spec.posts else 0
    return {"joints": spec.frames * planar.n_joints + posts,
            "members": spec.frames * planar.n_members + (spec.frames - 1) * ties + braces + posts}


def extrude(planar, spec, *, tol: Tolerances = DEFAULT,
            reading: dict | None = None) -> Frame:
    """Repeat a plane frame along a building and tie, brace and support it as the spec says.

    Parameters
    ----------
    planar : Frame or path
        A plane frame (``dimension == 2``), or the path of a plane-frame
        model file or of a DXF/SVG drawing (read with the spec's
        ``[drawing]`` options).
    spec : Spec, dict or path
        From :func:`read_spec` or :func:`spec_from_document`, or what they read.
    tol : Tolerances, optional
        For the selectors in the spec and the checks of the result.
    reading : dict, optional
        Reading options of the command line (``layers``, ``units``,
        ``merge``, ``split``; None where not given); they override the
        spec's ``[drawing]`` table.

    Returns
    -------
    frame : Frame
        A space frame, checked by :func:`~spaceframe.validation.check_frame`,
        with joint tags ``role``, ``frame``, ``bay`` and member tags ``group``,
        ``role``, ``frame``, ``bay`` (module docstring).  Counts as
        :func:`extruded_counts`.

    Raises
    ------
    ModelError
        For a planar frame that is not plane, and for a spec naming a planar
        joint that does not exist (the spec's file and line, and the nearest
        id), a tie role given twice for one joint, or a selector that picks
        nothing.

    Notes
    -----
    Cost O(frames * (n + m) + ties + braces): every array is made by NumPy
    in one go per kind of item.
    """
    if not isinstance(spec, Spec):
        spec = spec_from_document(spec) if isinstance(spec, dict) else read_spec(spec)
    if not isinstance(planar, Frame):
        from .io import load_planar
        planar = load_planar(planar, spec.drawing, tol=tol, **(reading or {}))
    if planar.dimension != 2:
        raise ModelError("the planar frame must be a plane frame (dimension = 2, coordinates "
                         "[x, y]); this model is 3-dimensional: extrude a plane frame",
                         path=planar.source)
    N, n, m = spec.frames, planar.n_joints, planar.n_members
    index = {j: i for i, j in enumerate(planar.joint_ids)}
    offsets = np.concatenate([[0.0], np.cumsum(spec.bays)])
    base = np.column_stack([planar.coords[:, 0], np.zeros(n), planar.coords[:, 1]])
    coords = [base[None, :, :] + offsets[:, None, None] * spec.direction]
    coords = [coords[0].reshape(-1, 3)]
    jid = [f"F{k}.{j}" for k in range(1, N + 1) for j in planar.joint_ids]
    jrole0 = planar.joint_tags.get("role") or ("frame",) * n
    jtags = {"role": [r or "frame" for r in jrole0] * N,
             "frame": [str(k) for k in range(1, N + 1) for _ in range(n)], "bay": [""] * (N * n)}
    jtags.update({k: tuple(v) * N for k, v in planar.joint_tags.items() if k not in jtags})

    def frame_joint(k: int, planar_index: int) -> int:
        return (k - 1) * n + planar_index

    ends = (planar.ends[None, :, :] + (np.arange(N) * n)[:, None, None]).reshape(-1, 2)
    mid = [f"F{k}.{mm}" for k in range(1, N + 1) for mm in planar.member_ids]
    mrole0 = planar.member_tags.get("role") or ("frame",) * m
    mtags = {"group": ["frame"] * (N * m), "role": [r or "frame" for r in mrole0] * N,
             "frame": [str(k) for k in range(1, N + 1) for _ in range(m)],
             "bay": [""] * (N * m)}
    mtags.update({k: tuple(v) * N for k, v in planar.member_tags.items() if k not in mtags})
    rj, rd = _supports_3d(planar, spec, tol, n)
    frame = Frame(joint_ids=tuple(jid), coords=coords[0], member_ids=tuple(mid), ends=ends,
                  restraint_joint=rj, restraint_dir=rd, dimension=3,
                  name=spec.name or (f"{planar.name}, {N} frames" if planar.name else ""),
                  units=planar.units, joint_tags=jtags, member_tags=mtags,
                  member_properties={k: np.tile(v, N)
                                     for k, v in planar.member_properties.items()})

    # ties, braces and posts, added in one edit: ids, end joints and tags
    new_ids, new_ends = [], []
    new_tags = {"group": [], "role": [], "frame": [], "bay": []}

    def add_member(ident: str, a: int, b: int, group: str, role: str, frame: str, bay: str):
        new_ids.append(ident)
        new_ends.append((a, b))
        for key, value in (("group", group), ("role", role), ("frame", frame), ("bay", bay)):
            new_tags[key].append(value)

    def planar_index(jidx: str, section: str, key: str, nth: int = 1) -> int:
        if jidx not in index:
            raise spec.error(f"{section} names planar joint {jidx!r}, which is not in the planar "
                             f"frame{_from(planar)}{did_you_mean(jidx, index)}; correct the id",
                             section, key, nth,
                             item=jidx)
        return index[jidx]

    tied_role: dict[str, str] = {}
    for role, joints in spec.ties.items():
        for j in joints:
            p = planar_index(j, "ties", role)
            if j in tied_role:
                raise spec.error(f"planar joint {j!r} is tied twice, as {tied_role[j]!r} and "
                                 f"{role!r}; one longitudinal member runs a bay at each joint: "
                                 f"keep it under one role", "ties", role, item=j)
            tied_role[j] = role
            for k in range(1, N):
                add_member(f"B{k}.{j}", frame_joint(k, p), frame_joint(k + 1, p), "tie", role,
                           "", str(k))

    for entry in spec.bracing:
        nth = spec.bracing.index(entry) + 1
        for name in entry["planes"]:
            chain = [planar_index(j, "bracing", "planes", nth) for j in spec.planes[name]]
            for k in sorted(entry["bays"]):
                for i in range(1, len(chain)):
                    a, b = chain[i - 1], chain[i]
                    diagonals = ("a", "b") if entry["pattern"] == "cross" else (
                        ("a",) if (i + k) % 2 == 0 else ("b",))
                    for d in diagonals:
                        lo, hi = (a, b) if d == "a" else (b, a)
                        add_member(f"B{k}.{name}.{i}{d}", frame_joint(k, lo),
                                   frame_joint(k + 1, hi), "brace", "brace", "", str(k))

    feet: list[tuple[int, int]] = []
    foot_ids, foot_tags = [], {"role": [], "frame": [], "bay": []}
    if spec.posts:
        for k in sorted(spec.posts["frames"]):
            for j in spec.posts["at"]:
                p = planar_index(j, "posts", "at")
                top = frame_joint(k, p)
                foot = np.array([[planar.coords[p, 0], 0.0, spec.posts["base"]]])
                coords.append(foot + offsets[k - 1] * spec.direction)
                feet.append((N * n + len(feet), k))
                foot_ids.append(f"F{k}.{j}.foot")
                for key, value in (("role", "foot"), ("frame", str(k)), ("bay", "")):
                    foot_tags[key].append(value)
                add_member(f"F{k}.{j}.post", feet[-1][0], top, "post", "post", str(k), "")

    frame = edit.add_joints(frame, foot_ids,
                            np.concatenate(coords[1:]) if feet else np.zeros((0, 3)),
                            tags=foot_tags)
    frame = edit.add_members(frame, new_ids, np.array(new_ends, dtype=np.int64).reshape(-1, 2),
                             tags=new_tags)
    if feet:
        foot_rows = restraint_rows(spec.posts["foot"], 3, joint="the posts' feet",
                                   path=spec.source, line=spec.posts["line"])
        frame = edit.add_restraints(frame, np.repeat([f for f, _ in feet], len(foot_rows)),
                                    np.tile(foot_rows, (len(feet), 1)))
    from .validation import check_frame
    return check_frame(frame, tol=tol)


def _from(planar: Frame) -> str:
    return f" ({planar.source})" if planar.source else ""


def _supports_3d(planar: Frame, spec: Spec, tol: Tolerances, n: int):
    """Restraint joints and 3D directions of every frame's supports."""
    normal = _NORMAL
    in_plane = {}           # planar index -> (k, 2) rows, from the planar model
    for j in range(n):
        rows = planar.restraint_dir[planar.restraint_joint == j]
        if len(rows):
            in_plane[j] = rows
    # state per (frame, planar joint): (in-plane rows, out-of-plane word)
    state = {(k, j): (rows, spec.out_of_plane) for k in range(1, spec.frames + 1)
             for j, rows in in_plane.items()}
    for nth, rule in enumerate(spec.support_rules, 1):
        try:
            picked = select(parse_selector(rule["at"], path=spec.source, line=rule["line"]),
                            planar, tol=tol, path=spec.source, line=rule["line"])
        except ModelError as exc:
            raise ModelError(f"[[support]] number {nth}: {exc.reason}", path=spec.source,
                             line=rule["line"], item=exc.item) from None
        plane_rows = None
        if "plane" in rule:
            code = rule["plane"]
            plane_rows = (np.zeros((0, 2)) if code == "free" else
                          restraint_rows(code, 2, joint=rule["at"], path=spec.source,
                                         line=spec.line("support", "plane", nth), tol=tol))
        for k in rule["frames"]:
            for j in picked:
                rows, word = state.get((k, int(j)), (np.zeros((0, 2)), spec.out_of_plane))
                if plane_rows is not None:
                    rows = plane_rows
                word = rule.get("out_of_plane", word)
                state[(k, int(j))] = (rows, word)
    rj, rd = [], []
    for (k, j), (rows, word) in sorted(state.items()):
        rows3 = [np.array([r[0], 0.0, r[1]]) for r in rows]
        if word == "held":
            rows3.append(normal)
        for r in rows3:
            rj.append((k - 1) * n + j)
            rd.append(r)
    return np.array(rj, dtype=np.int64), np.array(rd, dtype=float).reshape(-1, 3)
