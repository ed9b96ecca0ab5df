"""The audit as one self-contained HTML file: tables, cautions and a 3D view.

The page itself (template, script, style) lives in ``viewers/report/`` as
plain files, shipped inside the package as ``spaceframe/assets/report`` and
read with :mod:`importlib.resources`.  This module writes what a reader needs
as plain HTML (the verdict, the counts, the mechanisms, the states of
self-stress, a bracing proposal, key members and cautions: every string
escaped), so the page reads with scripts off; it puts the audit's document
into the template as JSON, escaped so that no id or name can end the script
element, for the 3D viewer that the script adds on top, and inlines the
script and the style: the file needs no network and no other file.
"""

from __future__ import annotations

import html
import json
import re
from functools import lru_cache
from importlib import resources

import numpy as np

from .. import __version__
from ..errors import SpaceframeError
from ..naming import count, fixed_decimals, join_words
from ..results import AuditResult
from ..tolerances import DISPLAY
from .scene import (AMPLITUDE, ARROW, GLYPH, carrying_members, embed, frame_scene, moving_joints,
                    scene_of)
from .text import verdict

__all__ = ["render_report", "report_document", "asset"]

#: What every report says about the model's limits (besides the caution).
LIMITS = (
    "Pin-jointed idealisation: members carry axial force only, joints are frictionless pins; "
    "bending stiffness and joint fixity are ignored.",
    "First-order analysis: a mechanism found may be infinitesimal only; one that a prestress "
    "would stiffen is still a mechanism unless the model declares that prestress, and "
    "relying on prestress for stability is a design decision for a competent engineer.",
    "Stability and, where load cases are given, first-order axial forces of the idealised "
    "frame only: no member sizing, buckling or connection design; load values are the user's.",
    "Movements in the 3D view are drawn enlarged, at "
    f"{AMPLITUDE:.0%} of the frame's size: the shape of a mechanism, not its size.",
)

_MARK = re.compile(r"/\*SPACEFRAME:(STYLE|SCRIPT|DATA)\*/|<!--SPACEFRAME:([A-Z_]+)-->")


@lru_cache(maxsize=None)
def asset(name: str) -> str:
    """The text of one file of the report's page (``template.html``, ``viewer.js``, ...)."""
    try:
        return resources.files("spaceframe").joinpath("assets", "report", name).read_text(
            encoding="utf-8")
    except (FileNotFoundError, NotADirectoryError):
        raise SpaceframeError(f"the report's page file {name} is missing from the installed "
                              f"package: reinstall spaceframe") from None


def report_document(result: AuditResult, bracing=None, robust=None) -> dict:
    """The JSON document the page reads: the audit, its verdict, and the geometry to draw.

    With ``bracing`` (a :class:`spaceframe.analysis.bracing.BracingResult` of the
    same frame) the document also holds the proposed members (their ends as
    joint indices, so the view can draw them), the restraints, and the verdict
    and counts of the braced frame's audit; ``robust`` (the robust proposal of
    the same frame) the same under ``bracing_robust``.

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
    if s.one_way is not None:  # listed after the mechanisms, as the scene holds it
        motion = dict(audit["one_way"]["motion"], order="one way only: the reverse is resisted")
        motion["kind"] = f"one-way ({motion['kind']})"
        motion.pop("displacements", None)
        motion["members"] = []
        audit["mechanism_modes"].append(motion)
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
            "glyph": GLYPH * s.unit / s.extent,   # the stalk's length over the extent
            "supports": [[j, r6(d)] for (j, _), d in zip(s.supports, glyph_dirs)],
            "modes": [r6(u) for u in s.modes],
            "one_way": s.one_way,
            "moving": moving,
            "forces": [np.round(np.asarray(t, float), DISPLAY.force_decimals).tolist()
                       for t in result.self_stress_forces],
            "views": [r6(s.view(i)) for i in range(len(s.modes))],
            "rest_view": r6(s.view()),
        },
        "bracing": None if bracing is None else _bracing_document(bracing),
        "bracing_robust": None if robust is None else _bracing_document(robust),
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
        "notes": doc["notes"],
        "robust": doc["robust"],
        "forces": doc["forces"],
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


def forces_document(forces) -> dict:
    """What the page shows of the load cases.

    Per case: its forces scaled to the largest (``scaled``, on [-1, 1], for the
    colours), that largest force, the largest tension and compression members
    and how many members carry each, the reactions by joint id in the model's
    axes (``reactions``), the arrows to draw (``arrows``: ``loads`` and
    ``reactions`` as ``[joint index, [x, y, z]]`` in the pictures' 3D, see
    :func:`spaceframe.views.scene.embed`), or the mechanisms a case not
    carried acts on.  Forces keep 6 significant figures.  ``arrow`` is the
    longest arrow over the frame's extent, as in the forces still
    (:data:`~spaceframe.views.scene.ARROW` of the marks' unit).
    """
    from ..force_results import FORCES_CAUTION

    f = forces.frame
    ids = f.member_ids
    sig = lambda v: float(f"{v:.6g}")  # noqa: E731
    s = frame_scene(f)

    def arrows(joints, vectors):
        v = embed(np.asarray(vectors, float), f.dimension)
        keep = np.flatnonzero(np.linalg.norm(v, axis=1) > 0)
        return [[int(joints[k]), [sig(x) for x in v[k]]] for k in keep]

    cases = []
    for i, name in enumerate(forces.names):
        applied = np.asarray(forces.loads[i], float)
        entry = {"name": name, "kind": forces.kinds[i], "carried": bool(forces.carried[i]),
                 "method": forces.methods[i], "scaled": None, "largest": 0.0,
                 "tension": None, "compression": None, "in_tension": 0, "in_compression": 0,
                 "reactions": [], "slack": list(forces.slack[i]),
                 "arrows": {"loads": arrows(np.arange(f.n_joints), applied), "reactions": []},
                 "excited": [{"mode": e.mode, "description": e.description,
                              "fraction": round(e.fraction, DISPLAY.decimals)}
                             for e in forces.excited[i]]}
        if forces.carried[i]:
            t = forces.shown_forces(i)
            top = float(np.max(np.abs(t))) if t.size else 0.0
            entry["largest"] = top
            entry["scaled"] = np.round(t / (top or 1.0), DISPLAY.force_decimals).tolist()
            hi, lo = int(np.argmax(t)), int(np.argmin(t))
            entry["tension"] = [ids[hi], float(t[hi])] if t.size and t[hi] > 0 else None
            entry["compression"] = [ids[lo], float(t[lo])] if t.size and t[lo] < 0 else None
            entry["in_tension"], entry["in_compression"] = int(np.sum(t > 0)), int(np.sum(t < 0))
            R = forces.shown_reactions(i)
            entry["reactions"] = [[f.joint_ids[j], [sig(x) for x in r]]
                                  for j, r in zip(forces.reaction_joints.tolist(), R)]
            entry["arrows"]["reactions"] = arrows(forces.reaction_joints, R)
        cases.append(entry)
    return {"force_units": forces.force_units, "cases": cases,
            "determinate": forces.statically_determinate, "caution": FORCES_CAUTION,
            "arrow": ARROW * s.unit / s.extent}    # the longest arrow over the extent


def _cases_html(loads: dict) -> str:
    """The load cases' section as plain HTML: a summary, one row per case (carried or not,
    the largest tension and compression, the reactions), the caution.  The script adds
    only the case selector of the 3D view."""
    e = html.escape
    u = loads["force_units"]
    cases = loads["cases"]
    bad = sum(not c["carried"] for c in cases)
    summary = (count(len(cases), "case")
               + (f", {bad} not carried (a load on a mechanism: no forces)" if bad else
                  ", every one carried") + ". "
               + ("Statically determinate: forces from equilibrium alone." if loads["determinate"]
                  else "Statically indeterminate: forces depend on the members' relative axial "
                       "stiffness (EA).")
               + f" Forces in {u}: + tension (the member pulls), - compression (it pushes).")
    rows = []
    for c in cases:
        head = f"<td>{e(c['name'])}</td><td>{e(c['kind'])}</td>"
        if not c["carried"]:
            why = " ".join(f"Mechanism {x['mode']} ({100 * x['fraction']:.3g} % of the load): "
                           f"{x['description']}" for x in c["excited"])
            rows.append(f'<tr class="not-carried">{head}<td>no</td>'
                        f'<td colspan="3">{e(why)}</td></tr>')
            continue
        pull = _case_largest(c["tension"], c["in_tension"], "tension")
        push = _case_largest(c["compression"], c["in_compression"], "compression")
        rows.append(f'<tr>{head}<td>yes</td><td class="ids">{e(pull)}</td>'
                    f'<td class="ids">{e(push)}</td>'
                    f'<td class="ids">{e(_reactions_words(c["reactions"]))}</td></tr>')
    return ('  <section id="cases-section">\n    <h2>Load cases and member forces</h2>\n'
            f'    <p id="cases-summary">{e(summary)}</p>\n'
            '    <table id="cases"><thead><tr><th>case</th><th>kind</th><th>carried</th>'
            '<th>largest tension</th><th>largest compression</th>'
            f'<th>reactions ({e(u)}), largest first</th></tr></thead><tbody>\n'
            + "\n".join(rows) + "\n</tbody></table>\n"
            f'    <p id="forces-caution" class="caution">{e(loads["caution"])}</p>\n'
            "  </section>")


def _case_largest(entry, n: int, way: str) -> str:
    """``BC1 +33.75, of 10 members in tension`` (``entry``: member id and force), or
    ``none in tension``."""
    return f"{entry[0]} {entry[1]:+.4g}, of {count(n, 'member')} in {way}" if entry else \
        f"none in {way}"


def _reactions_words(reactions, most: int = 3) -> str:
    """``A (+0.00, +12.50), B (...) and 2 more``: the largest reactions first, one fixed
    point for all (four significant figures of the largest, as the forces text)."""
    if not reactions:
        return "none"
    R = np.array([r for _, r in reactions], float)
    order = np.argsort(-np.linalg.norm(R, axis=1), kind="stable")
    dp = fixed_decimals(R)
    words = [f"{reactions[k][0]} ({', '.join(f'{v:+.{dp}f}' for v in R[k])})"
             for k in order]
    return join_words(words, most=most)


def restraints_document(r) -> dict:
    """What the page shows of the chords (a :class:`~spaceframe.restraint_results.RestraintResult`):
    per chord its members (indices) with the unrestrained length each lies in, its restraint
    points (joint indices), out of plane (in plane for a plane frame), the longest lengths,
    and the verdict read with continuous chords."""
    from .restraints_text import DIRECTION_WORDS, chord_span, continuous_verdict, why_lines
    from ..restraint_results import RESTRAINT_CAUTION

    r6 = DISPLAY.decimals
    chords = []
    for i in r.order_longest():
        c = r.chords[i]
        main = "out_of_plane" if "out_of_plane" in c.directions else "in_plane"
        chords.append({
            "id": r.chord_id(i), "span": chord_span(r, i), "joints": len(c.joints),
            "length": round(c.length, r6), "direction": DIRECTION_WORDS[main],
            "members": c.members.tolist(),
            "segments": np.round(c.member_lengths(main), r6).tolist(),
            "points": c.points(main).tolist(),
            "longest": {DIRECTION_WORDS[d]: round(c.longest(d), r6) for d in c.directions},
            "counts": {DIRECTION_WORDS[d]: int(c.restrained[d].sum()) for d in c.directions},
            "compression": [None if not np.isfinite(v) else round(float(v), r6)
                            for v in c.compression.tolist()]})
    top = max((max(c["segments"]) for c in chords), default=0.0)
    return {"verdict": continuous_verdict(r), "held": r.held_with_continuous_chords,
            "rule": r.rule, "units": r.frame.units, "size": r.frame.size(), "chords": chords,
            "longest": top,
            "cases": list(r.case_names), "force_units": r.force_units, "why": why_lines(r),
            "fraction": r.fraction, "caution": RESTRAINT_CAUTION}


def render_report(result: AuditResult, bracing=None, forces=None, restraints=None,
                  robust=None) -> str:
    """The report of ``result`` as one HTML document (str), with ``bracing`` if given
    (and ``robust``, the robust proposal, beside it: the page switches between them),
    the load cases' member forces when ``forces`` (a
    :class:`~spaceframe.force_results.ForcesResult` of the same frame) is given, and the
    chords, restraint points and unrestrained lengths when ``restraints`` (a
    :class:`~spaceframe.restraint_results.RestraintResult` of the same frame) is given;
    its restraint-force case, where computed, is one more case of the forces view.

    Cost: O(p n) for p mechanisms and n joints, plus one view search per mode.
    """
    style, script = asset("report.css"), asset("viewer.js")
    for name, text, end in (("report.css", style, "</style"), ("viewer.js", script, "</script")):
        if end in text.lower():
            raise SpaceframeError(f"the report's {name} contains {end}>, which would end its "
                                  f"element early")
    doc = report_document(result, bracing, robust)
    doc["loads"] = None if forces is None else forces_document(forces)
    doc["restraints"] = None
    if restraints is not None and restraints.chords:
        doc["restraints"] = restraints_document(restraints)
        solved = restraints.restraint_forces
        if solved is not None and doc["loads"] is not None:
            case = forces_document(solved)["cases"][0]
            case["name"] = f"restraint forces ({100 * restraints.fraction:.4g} %)"
            case["kind"] = "restraint"
            doc["restraints"]["case"] = len(doc["loads"]["cases"])
            doc["loads"]["cases"].append(case)
    parts = {"STYLE": style, "SCRIPT": script, "DATA": script_json(doc), **page_text(doc)}
    # one pass: text put in is never searched again for markers
    return _MARK.sub(lambda m: parts[m.group(1) or m.group(2)], asset("template.html"))


def page_text(doc: dict) -> dict:
    """The report's words as HTML fragments, by marker name (every string escaped).

    Parameters
    ----------
    doc : dict
        From :func:`report_document`.

    Returns
    -------
    dict of str
        ``PAGE_TITLE``, ``TITLE``, ``SOURCE``, ``VERDICT``, ``CAUTION``,
        ``COUNTS``, ``MECH_SUMMARY``, ``MECHANISMS``, ``STRESS_SUMMARY``,
        ``STATES``, ``BRACING``, ``CASES``, ``RESTRAINTS``, ``KEY_SUMMARY``,
        ``KEY_MEMBERS``,
        ``CAUTIONS``, ``FOOTER``.
    """
    a = doc["audit"]
    e = html.escape
    d = a["dimension"]
    name = a["name"] or "(unnamed frame)"
    counts = [
        ("joints", a["joints"], f"points where members meet, each free to move in {d} "
                                f"directions unless held"),
        ("members", a["members"], "pin-ended bars; each keeps one distance fixed"),
        ("restraints", a["restraints"], "independent directions held by the supports"),
        ("counting rule", f"{a['maxwell']:+d}" if a["maxwell"] else "0",
         f"members + restraints - {d} x joints: negative proves mechanisms; zero or more "
         f"proves nothing"),
        ("rank", a["rank"], "independent member forces the joints can feel (rank of the "
                            "equilibrium matrix)"),
        ("mechanisms", a["mechanisms"], "independent ways the joints can move with no member "
                                        "changing length"),
        ("rigid-body modes", a["rigid_body_modes"], "of those, the whole frame moving as one "
                                                    "body on its supports"),
        ("internal mechanisms", a["internal_mechanisms"], "the rest: the frame changes shape"),
        ("states of self-stress", a["self_stress_states"], "independent sets of member forces "
                                                           "with no load: the degree of "
                                                           "redundancy"),
    ]
    q = len(doc["states"])
    stress = ("None: no member carries force without load (the frame, as far as it is held, is "
              "statically determinate)." if a["self_stress_states"] == 0 else
              count(a["self_stress_states"], "independent state of self-stress",
                    "independent states of self-stress")
              + ("" if a["self_stress_modes_complete"] else f" (the first {q} computed)")
              + ". Forces are scaled so the largest is 1; + is tension (the member pulls), "
                "- compression (it pushes).")
    key = a["key_members"] or []
    cautions = [a["caution"], *doc["limits"], *(a["warnings"] or [])]
    if doc.get("restraints"):
        cautions.append(doc["restraints"]["caution"])
    if (a.get("rank_decision") or {}).get("narrow"):
        cautions.append("The rank decision was narrow: the result is sensitive to the "
                        "geometry's precision.")
    mech = ("None: every joint is held in every direction by members and supports."
            if a["mechanisms"] == 0 else
            f"{count(a['mechanisms'], 'mechanism')} ({a['internal_mechanisms']} internal, "
            f"{a['rigid_body_modes']} rigid-body), numbered as the audit lists them; the 3D "
            f"view above (with scripts on) shows each one moving.")
    kind = "space frame" if d == 3 else "plane frame analysed in its plane"
    return {
        "PAGE_TITLE": e(f"spaceframe report: {a['name'] or 'frame'}"),
        "TITLE": e(name),
        "SOURCE": e((f"Model {a['source']}; " if a.get("source") else "")
                    + f"{kind}; lengths in {a['units']}."),
        "VERDICT": f'<p id="verdict" class="verdict{" held" if a["stable"] else ""}">'
                   f'{e(doc["verdict"])}</p>',
        "CAUTION": e(a["caution"]),
        "COUNTS": "\n".join(_row([k, (v, "num"), m]) for k, v, m in counts),
        "MECH_SUMMARY": e(mech),
        "MECHANISMS": "\n".join(
            _row([(i + 1, "num"), m["kind"], m.get("description") or "",
                  (join_words(m.get("joints") or [], most=8), "ids"),
                  m.get("order") or "(rigid-body)"])
            for i, m in enumerate(a["mechanism_modes"])),
        "STRESS_SUMMARY": e(stress),
        "STATES": "\n".join(
            _row([(i + 1, "num"), (st["members"], "num"),
                  (_forces(st["tension"], st["more_tension"]), "ids"),
                  (_forces(st["compression"], st["more_compression"]), "ids")])
            for i, st in enumerate(doc["states"])),
        "BRACING": _bracing_html(doc["bracing"], a["units"], doc.get("bracing_robust"))
        if doc["bracing"] else "",
        "CASES": _cases_html(doc["loads"]) if doc.get("loads") else "",
        "RESTRAINTS": _restraints_html(doc.get("restraints")),
        "KEY_SUMMARY": e(
            "No key member: every member takes part in some state of self-stress, so losing "
            "any single one leaves no new mechanism." if not key else
            f"{count(len(key), 'member')} carr{'ies' if len(key) == 1 else 'y'} no force in any "
            f"state of self-stress: losing any one of them leaves a mechanism."),
        "KEY_MEMBERS": e(", ".join(key)),
        "CAUTIONS": "\n".join(f"<li>{e(c)}</li>" for c in cautions),
        "FOOTER": e(f"Made by spaceframe {doc['version']}."),
    }


def _row(cells) -> str:
    """One table row; a cell is its text, or ``(text, css class)``."""
    out = []
    for c in cells:
        text, cls = c if isinstance(c, tuple) else (c, None)
        attr = f' class="{cls}"' if cls else ""
        out.append(f"<td{attr}>{html.escape(str(text))}</td>")
    return "<tr>" + "".join(out) + "</tr>"


def _forces(entries, more: int) -> str:
    text = ", ".join(f"{mid} {t:+.3f}" for mid, t in entries)
    return (text + (f" and {more} more" if more > 0 else "")) or "none"


def _largest(f) -> str:
    """A member's largest tension and compression over the cases, for the table."""
    if not f:
        return ""
    parts = [f"{v[0]:+.3f} ({v[1]})" for v in (f["tension"], f["compression"]) if v]
    return (" / ".join(parts) or "0") + (f"; {f['note']}" if f.get("note") else "")


def _proposal_block(b: dict, units: str, suffix: str, title: str) -> str:
    """One proposal: its summary, its table (members, restraints, what is left), its notes."""
    e = html.escape
    n, r = len(b["added"]), len(b["restraints_added"])
    what = ("that stay held after the loss of any one" if b.get("robust") else
            "the fewest, then the shortest, that remove what the candidates can")
    summary = (f"{count(n, 'member')} ({b['total_length']:.3f} {units} in all)"
               + (f" and {count(r, 'added restraint direction')}" if r else "")
               + f": {what}. After them: {b['after_verdict']}")
    force_head = ("<th>largest force, " + e((b.get("forces") or {}).get("force_units", ""))
                  + "</th>") if b.get("forces") else ""
    rows = []
    for m in b["added"]:
        cells = [m["id"], m["ends"][0], m["ends"][1], (f"{m['length']:.3f}", "num"),
                 "tension only" if m.get("carries") == "tension" else "both ways",
                 m.get("location") or "", ", ".join(str(k) for k in m.get("modes") or []),
                 "key" if m.get("key") else "-"]
        if b.get("forces"):
            cells.append(_largest(m.get("forces")))
        rows.append(_row(cells))
    for q in b["restraints_added"]:
        cells = ["restraint", q["joint"], "", "", "both ways",
                 "hold along (" + ", ".join(f"{v:.2f}" for v in q["direction"]) + ")",
                 ", ".join(str(k) for k in q.get("modes") or []), "key" if q.get("key") else "-"]
        if b.get("forces"):
            cells.append(_largest(q.get("forces")))
        rows.append(_row(cells))
    width = 9 if b.get("forces") else 8
    rows += [_row(["left", "", "", "", "", t, "", ""] + [""] * (width - 8))
             for t in b["remaining"]]
    notes = "".join(f"<li>{e(t)}</li>" for t in b.get("notes") or [])
    basis = (f'<p class="muted">Forces: {e(b["forces"]["basis"])}.</p>'
             if b.get("forces") else "")
    table_id = "bracing" + suffix
    return (f'    <div id="bracing-block{suffix}" class="proposal">\n'
            f'    <h3>{e(title)}</h3>\n'
            f'    <p id="bracing-summary{suffix}">{e(summary)}</p>\n'
            f'    <table id="{table_id}"><thead><tr><th>id</th><th>from</th><th>to</th>'
            '<th>length</th><th>carries</th><th>where</th><th>modes acted on</th><th>key</th>'
            + force_head + '</tr></thead><tbody>\n'
            + "\n".join(rows) + "\n</tbody></table>\n"
            + basis + (f'    <ul class="notes">{notes}</ul>\n' if notes else "")
            + "    </div>\n")


def _bracing_html(b: dict, units: str, robust: dict | None = None) -> str:
    """The proposal's section: the least-cost proposal and, if given, the robust one (both
    plain HTML; the script puts a switch between them on top), and the caution."""
    e = html.escape
    switch = ('    <div id="bracing-switch" class="switch" role="group" '
              'aria-label="Which proposal" hidden>'
              '<button type="button" data-proposal="default" aria-pressed="true">Least cost'
              '</button><button type="button" data-proposal="robust" aria-pressed="false">'
              'Robust to the loss of any one member</button></div>\n' if robust else "")
    blocks = _proposal_block(b, units, "", "Least cost")
    if robust:
        blocks += _proposal_block(robust, units, "-robust",
                                  "Robust: held after the loss of any one added member")
    return ('  <section id="bracing-section">\n    <h2>Proposed bracing</h2>\n'
            + switch + blocks
            + f'    <p id="bracing-caution" class="caution">{e(b["caution"])}</p>\n  </section>')


def _restraints_html(d: dict | None, most: int = 40) -> str:
    """The chords' section: the verdict read with continuous chords, where restraint points
    are missing, a table of chords (longest unrestrained length first), the caution."""
    if not d:
        return ""
    e = html.escape
    u = d["units"]
    dirs = list(dict.fromkeys(k for c in d["chords"] for k in c["longest"]))
    head = "".join(f"<th>longest {e(k)} ({e(u)})</th><th>points {e(k)}</th>" for k in dirs)
    if d["cases"]:
        head += f"<th>largest compression ({e(d['force_units'])})</th>"
    rows = []
    dp = fixed_decimals([d["size"]])
    for c in d["chords"][:most]:
        cells = [(c["span"], "ids"), (c["joints"], "num"), (f"{c['length']:.{dp}f}", "num")]
        for k in dirs:
            got = c["longest"].get(k)
            cells += [(f"{got:.{dp}f}" if got is not None else "-", "num"),
                      (c["counts"].get(k, "-"), "num")]
        if d["cases"]:
            pairs = [(v, n) for v, n in zip(c["compression"], d["cases"]) if v]
            cells.append(f"{max(pairs)[0]:.4g} ({max(pairs)[1]})" if pairs else "none")
        rows.append(_row(cells))
    more = len(d["chords"]) - most
    if more > 0:
        rows.append(_row([f"... and {more} more chords (spaceframe restraints --all lists "
                          f"them)"]))
    why = "".join(f"<li>{e(w)}</li>" for w in d["why"])
    case = ""
    if d.get("case") is not None:
        pct = f"{100 * d['fraction']:.4g} %"
        case = ('    <p id="restraint-case">The restraint-force case (' + e(pct) + " of each "
                "compressed chord's compression, applied sideways at its restraint points) is "
                "among the load cases of the 3D view.</p>\n")
    return ('  <section id="restraints-section">\n    <h2>Chords and restraint points</h2>\n'
            f'    <p id="restraints-verdict" class="verdict{" held" if d["held"] else ""}">'
            f'{e(d["verdict"])}</p>\n'
            + (f'    <ul id="restraints-why">{why}</ul>\n' if why else "")
            + case
            + f'    <table id="chords"><thead><tr><th>chord</th><th>joints</th><th>length '
              f'({e(u)})</th>{head}</tr></thead><tbody>\n' + "\n".join(rows)
            + "\n</tbody></table>\n"
              f'    <p id="restraints-caution" class="caution">{e(d["caution"])}</p>\n'
              "  </section>")
