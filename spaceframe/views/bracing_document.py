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
from ..analysis.bracing.layout import candidate_kind, plane_kind
from ..naming import count, join_words
from ..results import CAUTION
from ..supports import AXES
from ..tolerances import DISPLAY

__all__ = ["bracing_document", "candidate_entry", "location", "remedy_text", "bracing_notes",
           "filter_lines", "layout_text", "bay_name", "compare_document"]

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
        return f"horizontal plane z = {centre[2]:.3g}"
    if abs(normal[2]) < _PLUMB:
        axis = int(np.argmax(np.abs(normal[:2])))
        along = f" {AXES[axis]} = {centre[axis]:.3g}" if abs(normal[axis]) > _LEVEL else ""
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
                 "axis": axis, "origin": c.origin[i], "kind": "restraint",
                 "cost": round(float(c.cost[i]), 6)}
    else:
        a, b = c.ends[i]
        entry = {"ends": [f.joint_ids[a], f.joint_ids[b]],
                 "length": round(float(c.length[i]), 6),
                 "cost": round(float(c.cost[i]), 6), "origin": c.origin[i],
                 "kind": candidate_kind(c, i), "location": location(f, c, i)}
        if entry["kind"] == "brace":
            entry["plane"] = plane_kind(f, c, i)
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
        L = remedy.length
        return (f"{what}: no candidate acts on it; a member such as "
                f"{jid}-{frame.joint_ids[remedy.other]} ({L:.3g} {frame.units}, "
                f"bounded by no panel) would: allow such members with --within "
                f"{L:.3g}, or list them with --candidates FILE")
    along = ", ".join(f"{v:+.2f}" for v in remedy.direction)
    return (f"{what}: no candidate acts on it; joint {jid} needs a member or "
            f"restraint along its movement ({along}), to a joint or structure that does not "
            f"move with it (list one with --candidates FILE, or --attach {jid})")


def _lateral_text(frame, lateral) -> str:
    normal, centre = lateral.normal, lateral.centre
    ids = [frame.joint_ids[j] for j in lateral.joints]
    axis = int(np.argmax(np.abs(normal)))
    where = (f"the plane {AXES[axis]} = {centre[axis]:.3g}" if abs(normal[axis]) > _LEVEL else
             "one plane")
    direction = AXES[axis] if abs(normal[axis]) > _LEVEL else "out of that plane"
    return (f"every member lies in {where} and nothing ties the frame to another: no member "
            f"in that plane can hold a joint out of it.  Joints {', '.join(ids)} "
            f"({len(ids)}) need lateral restraint along {direction}, from something stiff "
            f"beside the frame (a deck, plan bracing, a second braced truss).  Mark the joints "
            f"that can be tied to it: --attach {','.join(ids)}")


def bay_name(label: str) -> str:
    """A bay as the output writes it: ``B3`` for bay ``3``, other labels as they are."""
    return f"B{label}" if label[:1].isdigit() else label


_FILTERS = {"exclude box": "excluded box {}", "exclude bay": "excluded bay {}",
            "exclude panel": "excluded panel {}", "planes": "braces only in the planes {}",
            "braced bays": "braces only in the bays of the rule '{}'",
            "tension only": "tension only: diagonals without a second in their panel",
            "clear space": "no member through the clear space of the frames at floor level "
                           "(--allow-rakers lets them)",
            "symmetric": "symmetric: candidates whose mirror image is no candidate"}


def filter_lines(r) -> list[str]:
    """What each filter matched: ``"excluded bay B1: 54 candidates removed"``, in order.

    The clear-space rule, which is on unless asked off, is listed only when
    it removed something.
    """
    out = []
    for kind, value, n in r.candidates.filters:
        if kind == "clear space" and not n:
            continue
        if kind == "attach":
            out.append(f"tie points given: {count(n, 'restraint candidate')} at "
                       f"{count(int(value), 'joint')}")
            continue
        what = _FILTERS.get(kind, kind + " {}").format(value)
        out.append(f"{what}: {count(n, 'candidate')} removed")
    return out


def _groups_words(groups, held: bool) -> str:
    if all(len(g) == 1 for g in groups):
        names = [bay_name(g[0]) for g in groups]
        one = len(names) == 1
        return (join_words(names) + (" holds a brace" if one else " each hold a brace")
                if held else join_words(names) + (" holds" if one else " hold") + " no brace")
    if held:
        return f"every run of {len(groups[0])} consecutive bays holds a brace"
    spans = [f"{bay_name(g[0])}-{bay_name(g[-1])}" for g in groups]
    return "no brace in the bays " + join_words(spans)


def layout_text(r) -> str | None:
    """How the choice under layout rules was made and which rules held, or None."""
    c = r.layout
    if c is None:
        return None
    how = {"matroid": "exact: the greedy pass of the matroid met every rule",
           "exhaustive": f"exact: all {c.tried} sets of the groups that act were compared",
           "bound": f"exact: the greedy search over the rules ({count(c.tried, 'pass', 'passes')}) "
                    f"found a choice as few and as cheap as the plain greedy pass",
           "greedy": f"greedy search over the rules ({count(c.tried, 'pass', 'passes')}; "
                     f"not proven least)"}
    parts = [how[c.method]]
    if c.mirrors:
        parts.append("chosen in mirror-image groups about "
                     + join_words([f"{ax} = {v:.4g}" for ax, v in c.mirrors]))
    if c.required:
        met = [g for g in c.required if g not in c.unmet]
        if met:
            parts.append(_groups_words(met, True))
        if c.unmet:
            parts.append(_groups_words(c.unmet, False)
                         + " (no candidate brace there removes a mechanism the others leave)")
    parts.append(f"{count(c.count, 'member or restraint', 'members and restraints')}, cost "
                 f"{c.cost:.3f}; the plain greedy pass over the candidates the rules allow "
                 f"takes {c.least_count}, cost {c.least_cost:.3f} (no set removing as much "
                 f"has fewer)")
    return "; ".join(parts)


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


def _layout_entry(c):
    if c is None:
        return None
    return {"method": c.method, "exact": c.exact, "tried": c.tried, "count": c.count,
            "cost": round(c.cost, 6), "plain_greedy": {"count": c.least_count,
                                                        "cost": round(c.least_cost, 6)},
            "required_bays": [list(map(bay_name, g)) for g in c.required],
            "unmet_bays": [list(map(bay_name, g)) for g in c.unmet],
            "mirrors": [{"axis": ax, "at": v} for ax, v in c.mirrors]}


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
        "filters": [{"filter": kind, "value": value, "removed": n}
                    for kind, value, n in r.candidates.filters],
        "layout": _layout_entry(r.layout),
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


def _figures_entry(f, units: str) -> dict:
    return {"members_added": len(f.added), "restraints_added": f.restraints_added,
            "length_added": round(f.length, 6), "mechanisms_left": f.after.mechanisms,
            "self_stress_states": f.after.self_stress_states,
            "key_members_added": len(f.key_added),
            "largest_brace_force": (None if f.largest is None else
                                    {"force": round(f.largest[0], 6), "member": f.largest[1],
                                     "case": f.largest[2]}),
            "cases_not_carried": list(f.not_carried), "units": units}


def compare_document(c) -> dict:
    """The ``compare`` entry of ``brace --json``: the proposal and the designer's scheme."""
    units = c.proposal.frame.units
    return {"scheme": c.source, "loads_from": c.loads_from, "force_units": c.force_units,
            "proposal": _figures_entry(c.proposal, units),
            "designer": _figures_entry(c.scheme, units),
            "caution": CAUTION + " " + BRACING_CAUTION}
