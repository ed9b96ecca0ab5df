"""A bracing recommendation as text: the members and restraints to add, totals, verdict after."""

from __future__ import annotations

from ..analysis.bracing import BRACING_CAUTION
from ..naming import joint_label, placed_joints
from ..results import CAUTION
from .bracing_document import bracing_document, filter_lines, layout_text
from .text import verdict

__all__ = ["render_bracing", "render_comparison"]


def _modes(numbers) -> str:
    return ", ".join(str(n) for n in numbers) if numbers else "-"


def render_bracing(r, *, max_rows: int = 40) -> str:
    """The recommendation of :func:`spaceframe.analysis.bracing.recommend_bracing` as text.

    Parameters
    ----------
    r : BracingResult
    max_rows : int
        Rows of each table shown (the JSON has all).
    """
    f, doc = r.frame, bracing_document(r)
    units = f.units
    index, size = {jid: i for i, jid in enumerate(f.joint_ids)}, f.size()
    name = (lambda jid: joint_label(f, index[jid], size)) if placed_joints(f) else str
    lines = [f"Bracing recommendation: {f.name or '(unnamed frame)'}"
             + (f"  [{f.source}]" if f.source else "")]
    b = r.before
    lines.append(f"before: {b.mechanisms} mechanism{'s' * (b.mechanisms != 1)} "
                 f"({b.internal_mechanisms} internal, {b.rigid_body_modes} rigid-body); "
                 f"candidates: {doc['candidates']['members']} members, "
                 f"{doc['candidates']['restraints']} restraint directions")
    for line in filter_lines(r):
        lines.append(f"  {line}")
    if b.stable and not b.mechanisms:
        lines += ["", "Nothing to brace: the frame has no mechanism.", "",
                  "Caution: " + CAUTION]
        return "\n".join(lines) + "\n"
    if not b.mechanisms:
        lines.append("before: no mechanism with every member two-way, but not held with its "
                     "one-way members acting one way")
    lines.append("")
    added = doc["added"]
    if added:
        under_rules = r.layout is not None and not r.layout.exact
        lines.append(f"Members to add ({len(added)}), "
                     + ("that stay held after the loss of any one:" if r.robust is not None
                        else "chosen under the layout rules (see Layout below):" if under_rules
                        else "the fewest and then the shortest that remove what the "
                             "candidates can" + (", with what the notes below add:"
                                                 if r.rules.ties or r.rules.repaired else ":")))
        rows = [("id", "from", "to", f"length {units}", "carries", "where", "modes acted on",
                 "key")]
        rows += [(a["id"], name(a["ends"][0]), name(a["ends"][1]), f"{a['length']:.3f}",
                  "tension only" if a["carries"] == "tension" else "both ways",
                  a["location"] + ("" if a["added_for"] == "mechanisms" else
                                   f" ({a['added_for']})"),
                  _modes(a["modes"]), "key" if a["key"] else "-") for a in added[:max_rows]]
        lines += _table(rows)
        if len(added) > max_rows:
            lines.append(f"  ... and {len(added) - max_rows} more (see --json or --csv)")
    else:
        lines.append("No member to add: no candidate member removes a mechanism.")
    if doc["restraints_added"]:
        lines.append("")
        lines.append(f"Restraints to add ({len(doc['restraints_added'])}):")
        rows = [("joint", "held direction", "modes acted on", "key")]
        rows += [(name(x["joint"]), x["axis"] or str(x["direction"]), _modes(x["modes"]),
                  "key" if x["key"] else "-")
                 for x in doc["restraints_added"][:max_rows]]
        lines += _table(rows)
    lines.append("")
    n_ties = sum(a["origin"] == "tie" for a in added)
    split = f" ({n_ties} ties, {len(added) - n_ties} braces)" if n_ties else ""
    lines.append(f"Total: {len(added)} member{'s' * (len(added) != 1)}{split}, "
                 f"{doc['total_length']:.3f} {units}; "
                 f"{len(doc['restraints_added'])} restraint"
                 f"{'s' * (len(doc['restraints_added']) != 1)}")
    def names(items):
        return "; ".join("-".join(a["ends"]) if "ends" in a else f"{a['joint']} {a['axis']}"
                         for a in items)

    for alt in doc["alternatives"]:
        lines.append(f"  alternative of the same size, cost {alt['total_cost']:.3f}: "
                     f"{names(alt['take'])} instead of {names(alt['instead_of'])}")
    how = layout_text(r)
    if how:
        lines.append(f"Layout: {how}")
    for note in doc["notes"]:
        lines.append(f"Note: {note}")
    lines += _forces_lines(doc, max_rows)
    lines.append("")
    lines.append("After re-audit of the braced frame"
                 + (" (one-way members acting one way)" if r.after.one_way is not None else "")
                 + ": " + verdict(r.after))
    remaining = doc["remaining"]
    if remaining:
        lines.append("")
        lines.append(f"Left ({len(remaining)}), and what would remove them:")
        for h in remaining[:max_rows]:
            lines.append(f"  - {h}")
        if len(remaining) > max_rows:
            lines.append(f"  ... and {len(remaining) - max_rows} more (see --json)")
    lines.append("")
    lines.append("Caution: " + CAUTION + " " + BRACING_CAUTION)
    return "\n".join(lines) + "\n"


def render_comparison(c) -> str:
    """The proposal and the designer's scheme side by side (:func:`compare_schemes`)."""
    units, fu = c.proposal.frame.units, c.force_units or "force units"

    def force(f):
        if f.largest is None:
            return "-" if not f.added else "no loads given"
        value, member, case = f.largest
        return f"{value:.4g} {fu} ({member}, {case})"

    rows = [("", "proposal", "designer's scheme")]
    for label, get in (("members added", lambda f: str(len(f.added))),
                       ("restraints added", lambda f: str(f.restraints_added)),
                       (f"length added {units}", lambda f: f"{f.length:.3f}"),
                       ("mechanisms left", lambda f: str(f.after.mechanisms)),
                       ("states of self-stress", lambda f: str(f.after.self_stress_states)),
                       ("key members among those added",
                        lambda f: f"{len(f.key_added)} of {len(f.added)}"),
                       ("largest force in an added member", force)):
        rows.append((label, get(c.proposal), get(c.scheme)))
    lines = [f"Compared with the designer's scheme [{c.source}]:"] + _table(rows)
    if c.loads_from:
        lines.append(f"  loads: the cases of the {c.loads_from} on both")
    for who, f in (("proposal", c.proposal), ("designer's scheme", c.scheme)):
        if f.not_carried:
            lines.append(f"  the {who} does not carry: {', '.join(f.not_carried)} "
                         f"(the load acts on a mechanism)")
    lines.append("  A key member carries no state of self-stress: losing it leaves a mechanism.")
    return "\n".join(lines) + "\n"


def _forces_lines(doc, max_rows: int) -> list[str]:
    """The forces in what is added: largest tension and compression over the cases."""
    fs = doc["forces"]
    if fs is None:
        return []
    u = fs["force_units"]
    lines = ["", f"Forces in what is added ({u}; + tension, - compression), over "
                 f"{len(fs['cases'])} cases: {fs['basis']}."]

    def big(x):
        return f"{x[0]:+.3f} ({x[1]})" if x else "-"

    rows = [("item", "largest tension", "largest compression", "note")]
    rows += [(a["id"], big(a["forces"]["tension"]), big(a["forces"]["compression"]),
              a["forces"]["note"]) for a in doc["added"][:max_rows]]
    rows += [(f"{x['joint']} {x['axis'] or 'restraint'}", big(x["forces"]["tension"]),
              big(x["forces"]["compression"]), "reaction along the held direction")
             for x in doc["restraints_added"][:max_rows]]
    lines += _table(rows)
    if fs["not_carried"]:
        lines.append(f"  not carried by the braced frame: {', '.join(fs['not_carried'])}")
    return lines


def _table(rows) -> list[str]:
    widths = [max(len(str(row[c])) for row in rows) for c in range(len(rows[0]))]
    return ["  " + "  ".join(str(v).ljust(w) for v, w in zip(row, widths)).rstrip()
            for row in rows]
