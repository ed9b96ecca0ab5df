"""The audit as one self-contained HTML file: tables, cautions and a 3D view.

The page itself (template, script, style) lives in ``viewers/report/`` as
plain files, shipped inside the package as ``spaceframe/assets/report`` and
read with :mod:`importlib.resources`.  This module only puts the audit's
document into the template as JSON, escaped so that no id or name can end
the script element, and inlines the script and the style: the file needs no
network and no other file.
"""

from __future__ import annotations

import json
import re
from functools import lru_cache
from importlib import resources

import numpy as np

from .. import __version__
from ..errors import SpaceframeError
from ..results import AuditResult
from ..tolerances import DISPLAY
from .scene import AMPLITUDE, GLYPH, carrying_members, moving_joints, scene_of, view_direction
from .text import verdict

__all__ = ["render_report", "report_document", "asset"]

#: What every report says about the model's limits (besides the caution).
LIMITS = (
    "Pin-jointed idealisation: members carry axial force only, joints are frictionless pins; "
    "bending stiffness and joint fixity are ignored.",
    "First-order analysis: a mechanism found may be infinitesimal only; relying on prestress "
    "for stability is a design decision for a competent engineer.",
    "Stability of the idealised frame only: no loads, member sizing, buckling or connection "
    "design.",
    "Movements in the 3D view are drawn enlarged, at "
    f"{AMPLITUDE:.0%} of the frame's size: the shape of a mechanism, not its size.",
)

_MARK = re.compile(r"/\*SPACEFRAME:(STYLE|SCRIPT|DATA)\*/")


@lru_cache(maxsize=None)
def asset(name: str) -> str:
    """The text of one file of the report's page (``template.html``, ``viewer.js``, ...)."""
    try:
        return resources.files("spaceframe").joinpath("assets", "report", name).read_text(
            encoding="utf-8")
    except (FileNotFoundError, NotADirectoryError):
        raise SpaceframeError(f"the report's page file {name} is missing from the installed "
                              f"package: reinstall spaceframe") from None


def report_document(result: AuditResult, bracing=None) -> dict:
    """The JSON document the page reads: the audit, its verdict, and the geometry to draw.

    With ``bracing`` (a :class:`spaceframe.analysis.bracing.BracingResult` of the
    same frame) the document also holds the proposed members (their ends as
    joint indices, so the view can draw them), the restraints, and the verdict
    and counts of the braced frame's audit.

    ``geometry`` holds the frame in 3D (a plane frame's y becomes z), the
    mechanisms as ``(p, n, 3)`` arrays, the joints each one moves, the
    states of self-stress by member, the supports as ``[joint, signed held
    direction]`` (the glyph's stalk points that way) and a suggested view
    direction per mode (:func:`spaceframe.views.scene.view_direction`).
    """
    s = scene_of(result)
    f = result.frame
    moving = [moving_joints(u).tolist() for u in s.modes]
    glyph_dirs = [(end - start) / np.linalg.norm(end - start) for start, end, _ in s.glyphs()]
    r6 = lambda a: np.round(np.asarray(a, float), DISPLAY.decimals).tolist()  # noqa: E731
    audit = result.to_dict()
    # the geometry below carries every movement and force as arrays: the audit's
    # per-item dictionaries would only double the file for a large frame
    for m in audit["mechanism_modes"]:
        m.pop("displacements", None)
        m.pop("prestress", None)
        m["members"] = []
    audit["self_stress_modes"] = []
    audit["redundancy"] = None
    for sm in audit.get("soft_modes", []):
        sm.pop("displacements", None)
    return {
        "version": __version__,
        "audit": audit,
        "states": [_state_summary(result, i) for i in range(result.self_stress_forces.shape[0])],
        "verdict": verdict(result),
        "limits": list(LIMITS),
        "geometry": {
            "joints": list(f.joint_ids),
            "members": list(f.member_ids),
            "coords": r6(s.coords),
            "ends": s.ends.tolist(),
            "extent": s.extent,
            "amplitude": AMPLITUDE,
            "glyph": GLYPH,
            "supports": [[j, r6(d)] for (j, _), d in zip(s.supports, glyph_dirs)],
            "modes": [r6(u) for u in s.modes],
            "moving": moving,
            "forces": [np.round(np.asarray(t, float), DISPLAY.force_decimals).tolist()
                       for t in result.self_stress_forces],
            "views": [r6(view_direction(s.coords, u)) for u in s.modes],
            "rest_view": r6(view_direction(s.coords)),
        },
        "bracing": None if bracing is None else _bracing_document(bracing),
    }


def _state_summary(result: AuditResult, i: int, most: int = 4) -> dict:
    """A state of self-stress for the tables: how many members, the largest of each sign."""
    t = result.self_stress_forces[i]
    ids = result.frame.member_ids
    carrying = carrying_members(t)
    tension = [k for k in np.argsort(-t, kind="stable") if carrying[k] and t[k] > 0]
    compression = [k for k in np.argsort(t, kind="stable") if carrying[k] and t[k] < 0]
    places = DISPLAY.decimals
    pick = lambda ks: [[ids[k], round(float(t[k]), places)] for k in ks[:most]]  # noqa: E731
    return {"members": int(carrying.sum()), "tension": pick(tension),
            "more_tension": max(0, len(tension) - most), "compression": pick(compression),
            "more_compression": max(0, len(compression) - most)}


def _bracing_document(b) -> dict:
    """What the page shows of a bracing proposal: members, restraints, the audit after."""
    from .bracing_document import bracing_document

    doc = bracing_document(b)
    c = b.candidates
    for entry, i in zip(doc["added"], b.members_added):
        entry["joint_indices"] = [int(j) for j in c.ends[i]]
    after = b.after
    return {
        "added": doc["added"],
        "restraints_added": doc["restraints_added"],
        "total_length": doc["total_length"],
        "after_verdict": verdict(after),
        "after": {k: getattr(after, k) for k in ("mechanisms", "internal_mechanisms",
                                                 "rigid_body_modes", "self_stress_states")},
        "after_stable": bool(after.stable),
        "remaining": doc["remaining"],
        "caution": doc["caution"],
    }


def script_json(doc) -> str:
    """``doc`` as JSON that is safe inside ``<script>``: no ``<``, ``>``, ``&`` or line
    separators appear literally (they become ``\\u`` escapes, which JSON reads back)."""
    text = json.dumps(doc, ensure_ascii=False, allow_nan=False, separators=(",", ":"))
    for ch, esc in (("<", "\\u003c"), (">", "\\u003e"), ("&", "\\u0026"),
                    ("\u2028", "\\u2028"), ("\u2029", "\\u2029")):
        text = text.replace(ch, esc)
    return text


def render_report(result: AuditResult, bracing=None) -> str:
    """The report of ``result`` as one HTML document (str), with ``bracing`` if given.

    Cost: O(p n) for p mechanisms and n joints, plus one view search per mode.
    """
    style, script = asset("report.css"), asset("viewer.js")
    for name, text, end in (("report.css", style, "</style"), ("viewer.js", script, "</script")):
        if end in text.lower():
            raise SpaceframeError(f"the report's {name} contains {end}>, which would end its "
                                  f"element early")
    parts = {"STYLE": style, "SCRIPT": script,
             "DATA": script_json(report_document(result, bracing))}
    # one pass: text put in is never searched again for markers
    return _MARK.sub(lambda m: parts[m.group(1)], asset("template.html"))
