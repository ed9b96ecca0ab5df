"""A bracing recommendation in words: where each brace goes, what is left, the JSON document.

The analysis (:mod:`spaceframe.analysis.bracing`) gives data: candidates by
origin, joint indices, panels, bay labels and, for each mode left, a
:class:`~spaceframe.analysis.bracing.Remedy`.  This module words them in the
trade's terms (``"bottom-chord tie at L2, bay 3"``, ``"vertical plane x = 6"``)
and builds the document of ``spaceframe brace --json``, which the text view,
the CSV list and the HTML report read.
"""

from __future__ import annotations

import numpy as np

from ..analysis.bracing import BRACING_CAUTION
from ..analysis.bracing.frames import bay_between, missing_ties, panel_bay, planar_id, tie_level
from ..naming import measure
from ..results import CAUTION
from ..supports import AXES
from ..tolerances import DISPLAY

__all__ = ["bracing_document", "candidate_entry", "location", "remedy_text", "bracing_notes"]

#: A panel is horizontal (vertical) when the vertical component of its unit normal is above
#: ``axis_plane`` (below ``1 - axis_plane``); otherwise its pitch is given.  A plane is named
#: by an axis when that component of its normal is above ``axis_plane`` (Display.axis_plane).
_LEVEL, _PLUMB = DISPLAY.axis_plane, 1 - DISPLAY.axis_plane


def _tie_name(frame, a: int, b: int) -> str:
    """A tie in the trade's words: ``"bottom-chord tie at L2, bay 3"``."""
    jf = frame.joint_tags["frame"]
    kind = "bottom-chord tie" if tie_level(frame, a) == "bottom chord" else "longitudinal tie"
    return f"{kind} at {planar_id(frame, a, jf[a])}, bay {bay_between(jf, a, b)}"


def _plane_words(frame, corners) -> str | None:
    P = frame.coords[[c for c in corners if c >= 0]]
    normal = np.cross(P[1] - P[0], P[2] - P[0])
    normal /= np.linalg.norm(normal)
    centre = P.mean(axis=0)
    if abs(normal[2]) > _LEVEL:
        return f"horizontal plane z = {measure(centre[2], frame.size())}"
    if abs(normal[2]) < _PLUMB:
        axis = int(np.argmax(np.abs(normal[:2])))
        along = f" {AXES[axis]} = {measure(centre[axis], frame.size())}" \
            if abs(normal[axis]) > _LEVEL else ""
        return f"vertical plane{along}"
    pitch = np.degrees(np.arccos(min(1.0, abs(normal[2]))))
    return f"plane pitched {pitch:.0f} deg"


def location(frame, cand, i: int) -> str:
    """Where candidate member ``i`` is, in words: frames, bay and plane, from tags and geometry."""
    a, b = cand.ends[i]
    jf = frame.joint_tags.get("frame")
    if cand.origin[i] == "tie":
        return _tie_name(frame, a, b)
    words = []
    if jf is not None and jf[a] and jf[b]:
        words.append(f"frame {jf[a]}" if jf[a] == jf[b] else f"between frames {jf[a]} and {jf[b]}")
    bay = panel_bay(frame, cand.panel[i])
    if bay:
        words.append(f"bay {bay}")
    corners = cand.panel[i]
    if corners is not None and frame.dimension == 3:
        words.append(_plane_words(frame, corners))
    if cand.origin[i] == "wall panel":
        words.append("wall panel closed by the ground")
    elif cand.origin[i] == "tie panel":
        at = " and ".join(planar_id(frame, p, jf[p]) for p, _ in missing_ties(frame, corners))
        kind = ("plan bracing" if words and words[-1].startswith("horizontal") else
                "vertical bracing" if words and words[-1].startswith("vertical") else "bracing")
        words.append(f"{kind} in the panel closed by the ties at {at} (needs its ties)")
    elif cand.origin[i] in ("within", "listed"):
        words.append("no panel" if cand.origin[i] == "within" else "from the candidate list")
    return ", ".join(words) or "-"


def candidate_entry(r, i: int, modes=None) -> dict:
    """The JSON entry of candidate ``i`` of the recommendation ``r``."""
    f, c = r.frame, r.candidates
    if c.joint[i] >= 0:
        e = c.direction[i]
        axis = AXES[int(np.argmax(np.abs(e)))] if np.count_nonzero(e) == 1 else None
        entry = {"joint": f.joint_ids[c.joint[i]], "direction": [float(x) for x in e],
                 "axis": axis, "origin": c.origin[i]}
    else:
        a, b = c.ends[i]
        entry = {"ends": [f.joint_ids[a], f.joint_ids[b]],
                 "length": round(float(c.length[i]), 6),
                 "cost": round(float(c.cost[i]), 6), "origin": c.origin[i],
                 "location": location(f, c, i)}
        if c.panel[i] is not None:
            entry["panel"] = [f.joint_ids[j] if j >= 0 else "ground" for j in c.panel[i]]
        if c.origin[i] == "tie panel":
            entry["needs_ties"] = [[f.joint_ids[p], f.joint_ids[q]]
                                   for p, q in missing_ties(f, c.panel[i])]
    if modes is not None:
        entry["modes"] = list(modes)
    return entry


def remedy_text(r, remedy) -> str:
    """One mode left after bracing and what kind of candidate would remove it, in words."""
    frame, after = r.braced, r.after
    m = remedy.mode
    info = after.mode_info[m] if m < len(after.mode_info) else None
    what = f"mode {m + 1} ({info.kind}: {info.description})" if info else f"mode {m + 1}"
    if remedy.kind == "restraint":
        first = ("no restraint candidate holds it" if r.restraints_used else
                 "only a restraint removes it: allow restraint candidates "
                 "(--restraints always)")
        return (f"{what}: {first}; mark joints that can be tied to the ground or to a "
                f"braced structure (--attach JOINT)")
    jid = frame.joint_ids[remedy.joint]
    if remedy.kind == "member":
        L, size = remedy.length, frame.size()
        return (f"{what}: no candidate acts on it; a member such as "
                f"{jid}-{frame.joint_ids[remedy.other]} ({measure(L, size)} {frame.units}, "
                f"bounded by no panel) would: allow such members with --within "
                f"{measure(L, size, up=True)}, or list them with --candidates FILE")
    along = ", ".join(f"{v:+.2f}" for v in remedy.direction)
    return (f"{what}: no candidate acts on it; joint {jid} needs a member or "
            f"restraint along its movement ({along}), to a joint or structure that does not "
            f"move with it (list one with --candidates FILE, or --attach {jid})")


def _lateral_text(frame, lateral) -> str:
    normal, centre = lateral.normal, lateral.centre
    ids = [frame.joint_ids[j] for j in lateral.joints]
    axis = int(np.argmax(np.abs(normal)))
    where = (f"the plane {AXES[axis]} = {measure(centre[axis], frame.size())}"
             if abs(normal[axis]) > _LEVEL else
             "one plane")
    direction = AXES[axis] if abs(normal[axis]) > _LEVEL else "out of that plane"
    return (f"every member lies in {where} and nothing ties the frame to another: no member "
            f"in that plane can hold a joint out of it.  Joints {', '.join(ids)} "
            f"({len(ids)}) need lateral restraint along {direction}, from something stiff "
            f"beside the frame (a deck, plan bracing, a second braced truss).  Mark the joints "
            f"that can be tied to it: --attach {','.join(ids)}")


def bracing_notes(r) -> list[str]:
    """The notes of a recommendation, in the order the text and the JSON give them."""
    notes = []
    if r.restraints_used and not len(r.frame.restraint_joint):
        notes.append("the frame has no support: restraint candidates stand at every joint")
    if r.tension_only:
        notes.append("tension-only bracing: each chosen panel gets both diagonals, one for each "
                     "racking direction; a rod carries no compression")
    if r.after.mechanisms > r.expected_after:
        notes.append(f"the re-audit finds {r.after.mechanisms} mechanisms where the selection "
                     f"expected {r.expected_after}: the rank decision is close; check the braced "
                     f"frame")
    if r.lateral is not None:
        notes.append(_lateral_text(r.braced, r.lateral))
    if r.before.mechanisms and r.before.mechanisms - r.after.mechanisms <= 0:
        notes.append("no candidate removes any mechanism")
    return notes


def bracing_document(r) -> dict:
    """The JSON document of ``spaceframe brace --json`` (plain Python types).

    Parameters
    ----------
    r : BracingResult
    """
    acts = dict(zip(r.chosen, r.acts_on))
    added = [{"id": mid, **candidate_entry(r, i, acts[i])}
             for mid, i in zip(r.added_ids, r.members_added)]
    b = r.before
    return {
        "name": r.frame.name, "source": r.frame.source, "units": r.frame.units,
        "before": {"mechanisms": b.mechanisms, "internal_mechanisms": b.internal_mechanisms,
                   "rigid_body_modes": b.rigid_body_modes,
                   "modes": [{"mode": n + 1, "kind": info.kind, "description": info.description}
                             for n, info in enumerate(b.mode_info)]},
        "candidates": {"members": int(np.sum(r.candidates.is_member)),
                       "restraints": int(np.sum(~r.candidates.is_member))},
        "tension_only": r.tension_only,
        "added": added,
        "restraints_added": [candidate_entry(r, i, acts[i]) for i in r.restraints_added],
        "members_added": len(added),
        "total_length": round(r.total_length, 6),
        "stable_after": r.after.stable,
        "remaining": [remedy_text(r, h) for h in r.remaining],
        "alternatives": [{"added": [candidate_entry(r, i) for i in alt],
                          "total_cost": round(cost, 6),
                          "instead_of": [candidate_entry(r, i) for i in r.chosen if i not in alt],
                          "take": [candidate_entry(r, i) for i in alt if i not in r.chosen]}
                         for alt, cost in r.alternatives],
        "mode_options": [{"mode": n + 1, "candidates": [candidate_entry(r, i) for i in opts]}
                         for n, opts in enumerate(r.mode_options)],
        "notes": bracing_notes(r),
        "after": r.after.to_dict(),
        "caution": CAUTION + " " + BRACING_CAUTION,
    }
