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
from ..analysis.bracing.rules import rods_of
from ..naming import count, join_words, measure
from ..results import CAUTION
from ..supports import AXES
from ..tolerances import DEFAULT, DISPLAY

__all__ = ["bracing_document", "candidate_entry", "location", "remedy_text", "bracing_notes",
           "filter_lines", "layout_text", "bay_name", "compare_document", "forces_section",
           "force_note"]

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
        paired = any(r.candidates.partner[i] in set(r.chosen) for i in r.members_added)
        notes.append("tension-only bracing: the added braces are rods (tagged carries = "
                     "tension in the braced model) that go slack in compression"
                     + ("; each chosen panel gets both diagonals, one for each racking "
                        "direction" if paired else "")
                     + "; ties and restraints carry both ways")
    notes += _rule_notes(r)
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


def _ids(r, items) -> list[str]:
    """Names of chosen candidates: a member's id in the braced frame, a restraint's joint."""
    mid = dict(zip(r.members_added, r.added_ids))
    return [mid[i] if i in mid else f"{r.frame.joint_ids[r.candidates.joint[i]]} restraint"
            for i in items]


def _rule_notes(r) -> list[str]:
    """What the member rules did: needed ties, the one-way rule, key items, robustness."""
    notes, rules = [], r.rules
    if rules.ties:
        notes.append(f"a chosen diagonal needs the ties that close its panel: "
                     f"{count(len(rules.ties), 'tie')} added with it "
                     f"({join_words(_ids(r, rules.ties), most=8)})")
    if rules.one_way:
        text = ("one-way members: the proposal is chosen and re-audited with them acting one "
                "way only (Roth & Whiteley's test). Method: greedy + repair: the least-cost "
                "basis that holds the frame with every member two-way, then, while the test "
                "finds a motion that slackens one-way members, the cheapest candidate that "
                "resists it; held whenever the candidates together can hold it, not proven the "
                "cheapest")
        if rules.repaired:
            text += (f"; the repair added {count(len(rules.repaired), 'item')} "
                     f"({join_words(_ids(r, rules.repaired), most=8)})")
        if not rules.held:
            text += ("; the candidates cannot "
                     + ("keep it held after the loss of every single added member"
                        if r.robust is not None and r.after.stable else
                        "hold it with its one-way members acting one way")
                     + ": allow more (--within, --candidates)")
        notes.append(text)
    key = [i for i, k in zip(r.chosen, rules.key) if k]
    if r.robust is None and key and len(key) == len(r.chosen) and r.after.stable:
        back = ("a mechanism back, or a motion that slackens one-way members"
                if rules.one_way else "a mechanism back")
        notes.append(f"every added member is key: losing any one brings {back} (--robust "
                     f"proposes a set that stays held after the loss of any one)"
                     if len(key) > 1 else
                     f"the added member is key: losing it brings {back} (--robust proposes "
                     f"a set that stays held after the loss of any one)")
    elif r.robust is None and key:
        notes.append(f"{count(len(key), 'added item is', 'added items are')} key (losing one "
                     f"brings a mechanism back): {join_words(_ids(r, key), most=8)}")
    if r.robust is not None:
        notes.append(_robust_note(r, key))
    return notes


def _robust_note(r, key) -> str:
    b = r.robust
    parts = (f", in {b.parts} independent parts" if b.parts > 1 else "")
    how = (f"exact: the cheapest such set ({count(b.searched, 'subset')} of the candidates "
           f"searched in order of cost{parts})" if b.method == "exact" else
           "greedy + repair: a set robust with every member two-way, then what the one-way "
           "repair adds while the loss of one member leaves a motion that slackens one-way "
           "members; not proven the cheapest" if b.method == "repair" else
           f"greedy augmentation of the least-cost basis (the exact search stopped after "
           f"{count(b.searched, 'subset')}"
           + (f"; exact in {b.exact_parts} of its {b.parts} independent parts"
              if b.parts > 1 and b.exact_parts else "")
           + "): not proven the cheapest")
    ratio = (f"; cost {r.cost:.3f} against {b.least_cost:.3f} for the least-cost basis "
             f"({r.cost / b.least_cost:.2f} x)" if b.least_cost > 0 else "")
    text = (f"robust: the braced frame stays held after the loss of any one added item; "
            f"method {how}{ratio}")
    if key:
        text = (f"robust as far as the candidates allow: {join_words(_ids(r, key), most=8)} "
                f"stay key (no candidate allowed makes good the loss of "
                f"{'it' if len(key) == 1 else 'any of them'}: allow more with --within or "
                f"--candidates); method {how}{ratio}")
    return text


def force_note(r, i: int, k: int, pf) -> str:
    """The note beside added member ``k`` (candidate ``i``) in the forces table."""
    t = pf.members[:, k]
    slack = [n for n, s in zip(pf.names, pf.slack[:, k]) if s]
    if slack:
        c = r.candidates
        p = int(c.partner[i])
        mid = dict(zip(r.members_added, r.added_ids))
        instead = (f"{mid[p]}, the other diagonal of its panel, carries the load then"
                   if p in mid and not all(pf.slack[:, r.members_added.index(p)][
                       [n in slack for n in pf.names]]) else
                   "the rest of the frame carries the load then (forces shown with it slack)")
        when = ("in every case" if len(slack) == len(pf.names) else
                f"under {join_words(slack, most=4)}")
        return f"rod: would be in compression, so goes slack, {when}; {instead}"
    ok = pf.carried & np.isfinite(t)
    comp = [n for n, v, c in zip(pf.names, t, ok) if c and v < -_zero(pf)]
    if comp and len(comp) == int(ok.sum()):
        return "compression in every case: check it for buckling"
    if comp:
        return f"compression under {join_words(comp, most=4)}: check it for buckling"
    return ""


def _zero(pf) -> float:
    """What counts as no force: ``Tolerances.zero_force`` of the largest added force."""
    finite = np.abs(pf.members[np.isfinite(pf.members)])
    finite = np.r_[finite, np.abs(pf.restraints[np.isfinite(pf.restraints)])]
    return DEFAULT.zero_force * (float(finite.max()) if finite.size else 0.0)


def _extreme(values, names, sign):
    """``[value, case]`` of the largest value of this sign, or None."""
    best = None
    for v, n in zip(values, names):
        if np.isfinite(v) and sign * v > 0 and (best is None or sign * v > sign * best[0]):
            best = [float(v), n]
    return best


def forces_section(r) -> dict | None:
    """The forces part of the document: the cases and, per added item, its forces."""
    pf = r.proposal_forces
    if pf is None:
        return None
    z = _zero(pf)

    def clean(v):
        return None if not np.isfinite(v) else round(0.0 if abs(v) <= z else float(v), 6)

    def entry(values, slack=None):
        vals = [clean(v) for v in values]
        out = {"cases": dict(zip(pf.names, vals)),
               "tension": _extreme([v if v is not None else np.nan for v in vals], pf.names, 1),
               "compression": _extreme([v if v is not None else np.nan for v in vals],
                                       pf.names, -1)}
        if slack is not None:
            out["slack"] = [n for n, s in zip(pf.names, slack) if s]
        return out

    if pf.source == "unit":
        basis = (f"no load case in the model: a vertical load of 1 {pf.force_units} at every "
                 f"joint not held in every direction, with a notional horizontal load of "
                 f"{pf.notional:.4g} of it at each joint in each direction; forces per unit "
                 f"of vertical load, to scale")
    elif pf.notional is not None:
        basis = (f"the model's load cases, and a notional horizontal load of "
                 f"{pf.notional:.4g} of each case's vertical load at each joint, in each "
                 f"direction (the model declares no [notional] rule)")
    else:
        basis = "the model's load cases"
    if pf.notional is not None:
        basis += ("; the notional fraction is an assumption (1/200 of the vertical load, the "
                  "order of the initial sway imperfection common practice uses): local codes "
                  "set it")
    return {"force_units": pf.force_units, "basis": basis, "source": pf.source,
            "notional": pf.notional, "cases": list(pf.names),
            "not_carried": [n for n, c in zip(pf.names, pf.carried) if not c],
            "members": [dict(entry(pf.members[:, k], pf.slack[:, k]), id=mid,
                             note=force_note(r, i, k, pf))
                        for k, (mid, i) in enumerate(zip(r.added_ids, r.members_added))],
            "restraints": [dict(entry(pf.restraints[:, k]),
                                joint=r.frame.joint_ids[r.candidates.joint[i]])
                           for k, i in enumerate(r.restraints_added)]}


def bracing_document(r) -> dict:
    """The JSON document of ``spaceframe brace --json`` (plain Python types).

    Parameters
    ----------
    r : BracingResult
    """
    acts = dict(zip(r.chosen, r.acts_on))
    key = dict(zip(r.chosen, r.rules.key))
    rods = set(rods_of(r.candidates, r.chosen, r.tension_only))
    why = {**{i: "needed tie" for i in r.rules.ties},
           **{i: "one-way repair" for i in r.rules.repaired}}
    added = [{"id": mid, **candidate_entry(r, i, acts[i]),
              "carries": "tension" if i in rods else "both", "key": bool(key.get(i, False)),
              "added_for": why.get(i, "mechanisms")}
             for mid, i in zip(r.added_ids, r.members_added)]
    restraints = [dict(candidate_entry(r, i, acts[i]), key=bool(key.get(i, False)))
                  for i in r.restraints_added]
    forces = forces_section(r)
    if forces is not None:
        for a, f in zip(added, forces["members"]):
            a["forces"] = {k: v for k, v in f.items() if k != "id"}
        for a, f in zip(restraints, forces["restraints"]):
            a["forces"] = {k: v for k, v in f.items() if k != "joint"}
    b = r.before
    rb = r.robust
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
        "one_way": r.rules.one_way,
        "one_way_held": None if r.after.one_way is None else bool(r.after.one_way.held),
        "robust": None if rb is None else {
            "method": rb.method, "searched": rb.searched, "parts": rb.parts,
            "exact_parts": rb.exact_parts, "cost": round(r.cost, 6),
            "least_cost": round(rb.least_cost, 6),
            "ratio": round(r.cost / rb.least_cost, 6) if rb.least_cost > 0 else None,
            "uncoverable": _ids(r, [i for i in rb.uncoverable if i in set(r.chosen)])},
        "added": added,
        "restraints_added": restraints,
        "key": _ids(r, [i for i, k in zip(r.chosen, r.rules.key) if k]),
        "forces": None if forces is None else {k: v for k, v in forces.items()
                                               if k not in ("members", "restraints")},
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
