"""Chords, restraint points, unrestrained lengths and restraint forces in words.

Every sentence of ``spaceframe restraints`` and of ``audit --continuous-chords``
is made here, from a :class:`~spaceframe.restraint_results.RestraintResult`.
"""

from __future__ import annotations

import numpy as np

from ..naming import count, fixed_decimals, join_words, natural_sorted
from ..restraint_results import LATERAL, RESTRAINT_CAUTION, RestraintResult

__all__ = ["render_restraints", "render_continuous", "continuous_verdict", "chord_span", "why_lines",
           "DIRECTION_WORDS"]

#: The lateral directions as the text names them.
DIRECTION_WORDS = {"out_of_plane": "out of plane", "in_plane": "in plane"}


def chord_span(r: RestraintResult, i: int) -> str:
    """``C3 F2.L0-F2.L6``: the chord's label and its first and last joints."""
    c, ids = r.chords[i], r.frame.joint_ids
    return f"{r.chord_id(i)} {ids[c.joints[0]]}-{ids[c.joints[-1]]}"


def _length(v: float, r: RestraintResult) -> str:
    return f"{v:.{fixed_decimals([r.frame.size()])}f} {r.frame.units}"


def _longest_words(r: RestraintResult) -> str:
    parts = []
    for d in LATERAL:
        got = r.longest(d)
        if got is not None:
            parts.append(f"{_length(got[0], r)} {DIRECTION_WORDS[d]} ({chord_span(r, got[1])})")
    return "; ".join(parts)


def continuous_verdict(r: RestraintResult) -> str:
    """One paragraph: is the frame held pin-jointed, held with continuous chords, or neither."""
    if not r.chords:
        return ("NO CHORD - no straight chain of two or more members was found"
                + (f" among the members with {r.rule}" if r.rule else "")
                + ", so nothing can be read as a continuous chord.")
    longest = _longest_words(r)
    if r.held_pin_jointed:
        return (f"HELD AS PIN-JOINTED - no mechanism: every chord joint is held sideways by the "
                f"frame itself. Longest unrestrained length: {longest}.")
    if r.held_with_continuous_chords:
        return (f"HELD WITH CONTINUOUS CHORDS - as pin-jointed the frame has "
                f"{count(r.mechanisms, 'mechanism')}, "
                f"{'each' if r.mechanisms > 1 else 'and it is'} a sideways movement of chord "
                f"joints between restraint points. Read as continuous through its joints, each "
                f"chord holds them by its bending over its unrestrained lengths; longest: "
                f"{longest}. The chords must be designed for buckling over those lengths.")
    ids = r.frame.joint_ids
    first = r.not_held[0]
    n = len(r.not_held)
    which = (("its one mechanism moves" if n == 1 else f"every one of its {n} mechanisms moves")
             if n == r.mechanisms else
             f"{count(n, 'mechanism')} of {r.mechanisms} move{'s' if n == 1 else ''}")
    return (f"NOT HELD, EVEN WITH CONTINUOUS CHORDS - {which} joints that no chord "
            f"holds between restraint points (mechanism {first[0] + 1} moves "
            f"{join_words([ids[j] for j in first[1]], most=6)}): brace or restrain "
            f"{'it' if len(r.not_held) == 1 else 'them'} first (spaceframe brace). Longest "
            f"unrestrained length so far: {longest}.")


def why_lines(r: RestraintResult, most: int = 6) -> list[str]:
    """Why chords lack restraint points: one line per chord and direction with no interior
    restraint point or a free end (at most ``most`` lines, longest first)."""
    ids, mids = r.frame.joint_ids, r.frame.member_ids
    out = []
    for i in r.order_longest():
        c = r.chords[i]
        for d in LATERAL:
            if d not in c.directions:
                continue
            inner = c.restrained[d][1:-1]
            free = [end for end, held in zip(("first", "last"), c.ends_held[d]) if not held]
            if inner.any() and not free:
                continue
            untied = [ids[u.joint] for u in c.unrestrained[d] if u.reason == "untied"]
            tied = [u for u in c.unrestrained[d] if u.reason == "tied"]
            ties = natural_sorted({mids[k] for u in tied for k in u.members})
            what = []
            if untied:
                what.append(f"nothing ties {join_words(untied, most=4)} {DIRECTION_WORDS[d]}")
            if tied:
                what.append(f"{join_words([ids[u.joint] for u in tied], most=4)} "
                            f"{'is' if len(tied) == 1 else 'are'} tied "
                            f"({join_words(ties, most=4)}) to joints that move with "
                            f"{'it' if len(tied) == 1 else 'them'}: those ties are held by no "
                            f"braced bay or support")
            head = (f"{chord_span(r, i)} {DIRECTION_WORDS[d]}: "
                    + ("no interior restraint point" if not inner.any() else
                       f"the {' and '.join(free)} end{'s' if len(free) > 1 else ''} not held"))
            out.append(head + (" - " + "; ".join(what) if what else "") + ".")
    if len(out) > most:
        out = out[:most] + [f"... and {len(out) - most} more chords alike (--all lists them)"]
    return out


def render_continuous(r: RestraintResult, *, most: int = 6) -> str:
    """The section ``audit --continuous-chords`` adds: the verdict read with continuous chords,
    where restraint points are missing, and the caution."""
    out = ["", "Read with continuous chords ("
           + (f"chords among the members with {r.rule}" if r.rule else
              "every straight chain of two or more members")
           + f", {count(len(r.chords), 'chord')}):", continuous_verdict(r)]
    why = why_lines(r, most=most)
    if why:
        out += ["Where restraint points are missing:"] + [f"  {w}" for w in why]
    out.append("(spaceframe restraints gives every chord's restraint points and lengths.) "
               + RESTRAINT_CAUTION)
    return "\n".join(out) + "\n"


def render_restraints(r: RestraintResult, *, max_rows: int = 12, max_details: int = 4) -> str:
    """The restraints report as plain text: verdict, a table of chords (longest first), the
    restraint points and lengths of the first ``max_details`` chords, the compressed chords
    per case, the restraint forces, the caution."""
    f = r.frame
    u = f.units
    where = f"  [{f.source}]" if f.source else ""
    out = [f"Restraints: {f.name or '(unnamed frame)'}{where}",
           f"{count(len(r.chords), 'chord')}"
           + (f" among the members with {r.rule}" if r.rule else " (every straight chain of "
              "two or more members)") + f"; lengths in {u}"
           + (f", forces in {r.force_units}" if r.case_names else "") + ".",
           "A restraint point is a chord joint no mechanism of the pin-jointed frame moves "
           "sideways (supports count); an unrestrained length runs between two of them."
           + (" A plane frame analysed in its plane: in plane only (out of plane is not "
              "modelled)." if f.dimension == 2 else ""),
           "", continuous_verdict(r)]
    why = why_lines(r, most=max_rows)
    if why:
        out += ["", "Where restraint points are missing:"] + [f"  {w}" for w in why]
    if r.chords:
        out += ["", *_table(r, max_rows), "", *_details(r, max_details)]
    if r.case_names:
        out += ["", *_cases(r, max_rows)]
    if r.fraction is not None:
        out += ["", *_forces(r, max_rows)]
    out += ["", RESTRAINT_CAUTION]
    return "\n".join(out) + "\n"


def _table(r: RestraintResult, max_rows: int) -> list[str]:
    dp = fixed_decimals([r.frame.size()])
    spans = [chord_span(r, i) for i in range(len(r.chords))]
    w = max(len(s) for s in spans + ["chord"])
    head = f"{'chord':<{w}}  {'joints':>6}  {'length':>9}"
    for d in LATERAL:
        if any(d in c.directions for c in r.chords):
            head += f"  {'longest ' + DIRECTION_WORDS[d]:>22}  {'restraint points':>16}"
    if r.case_names:
        head += f"  largest compression ({r.force_units})"
    lines = [head]
    order = r.order_longest()
    for i in order[:max_rows]:
        c = r.chords[i]
        row = f"{spans[i]:<{w}}  {len(c.joints):>6}  {c.length:>9.{dp}f}"
        for d in LATERAL:
            if d in c.directions:
                row += f"  {c.longest(d):>22.{dp}f}  {int(c.restrained[d].sum()):>16}"
            elif any(d in x.directions for x in r.chords):
                row += f"  {'-':>22}  {'-':>16}"
        if r.case_names:
            row += "  " + _compression(r, c)
        lines.append(row)
    if len(order) > max_rows:
        lines.append(f"... and {len(order) - max_rows} more chords (--all lists every chord)")
    return lines


def _runs(values, dp: int) -> str:
    """Lengths in order, repeats folded: ``4000 x 3, 2000``."""
    words = [f"{v:.{dp}f}" for v in values]
    out, i = [], 0
    while i < len(words):
        j = i
        while j + 1 < len(words) and words[j + 1] == words[i]:
            j += 1
        out.append(words[i] + (f" x {j - i + 1}" if j > i else ""))
        i = j + 1
    return ", ".join(out)


def _details(r: RestraintResult, most: int) -> list[str]:
    """Each chord's restraint points and unrestrained lengths, longest first."""
    ids = r.frame.joint_ids
    dp = fixed_decimals([r.frame.size()])
    lines = [f"Restraint points and unrestrained lengths ({r.frame.units}), chord by chord:"]
    order = r.order_longest()
    for i in order[:most]:
        c = r.chords[i]
        lines.append(f"  {chord_span(r, i)}")
        for d in LATERAL:
            if d not in c.directions:
                continue
            pts = c.points(d)
            which = ("every joint" if len(pts) == len(c.joints) else
                     "none" if not len(pts) else join_words([ids[j] for j in pts], most=8))
            lines.append(f"    {DIRECTION_WORDS[d]}: {which}; lengths {_runs(c.lengths[d], dp)}")
    if len(order) > most:
        lines.append(f"  ... and {len(order) - most} more (--all lists every chord)")
    return lines


def _compression(r: RestraintResult, c) -> str:
    v = c.compression
    ok = np.isfinite(v) & (v > 0)
    if not ok.any():
        return "none"
    k = int(np.argmax(np.where(ok, v, -1.0)))
    return f"{v[k]:.{fixed_decimals(v[ok])}f} ({r.case_names[k]})"


def _cases(r: RestraintResult, max_rows: int) -> list[str]:
    """Per case, the chords in compression with their compression and longest lengths."""
    dp = fixed_decimals([r.frame.size()])
    lines = [f"Chords in compression, by case (largest compression in {r.force_units}; longest "
             f"unrestrained lengths in {r.frame.units}):"]
    for q, name in enumerate(r.case_names):
        if not r.forces.carried[q]:
            lines.append(f"  {name}: not carried (a load on a mechanism), no forces")
            continue
        hit = [i for i in r.order_longest() if r.chords[i].compression[q] > 0]
        if not hit:
            lines.append(f"  {name}: no chord in compression")
            continue
        lines.append(f"  {name}: {count(len(hit), 'chord')} in compression")
        cp = fixed_decimals([r.chords[i].compression[q] for i in hit])
        for i in hit[:max_rows]:
            c = r.chords[i]
            lens = ", ".join(f"{c.longest(d):.{dp}f} {DIRECTION_WORDS[d]}"
                             for d in LATERAL if d in c.directions)
            lines.append(f"    {chord_span(r, i)}: {c.compression[q]:.{cp}f}; {lens}")
        if len(hit) > max_rows:
            lines.append(f"    ... and {len(hit) - max_rows} more")
    return lines


def _forces(r: RestraintResult, max_rows: int) -> list[str]:
    """The restraint-force case: what was applied and what each tie, brace and support carries."""
    from .forces_text import bracing_members

    f, fu = r.frame, r.force_units
    pct = f"{100 * r.fraction:.4g} %"
    cases = join_words([repr(n) for n in r.case_names])
    F = r.restraint_loads
    hit = np.flatnonzero(np.any(F != 0, axis=1))
    lines = [f"Restraint forces: {pct} of each compressed chord's largest compression over "
             f"{cases}, applied sideways ({'out of plane' if f.dimension == 3 else 'in plane'}) "
             f"at its restraint points and solved as one load case."]
    if not hit.size:
        lines.append("  No chord is in compression under these cases: no restraint force.")
        return lines
    total = F[hit].sum(axis=0)
    lines.append(f"  {count(len(hit), 'joint')} loaded, {np.linalg.norm(total):.4g} {fu} in all "
                 f"(largest {np.linalg.norm(F[hit], axis=1).max():.4g} {fu} at "
                 f"{f.joint_ids[hit[np.argmax(np.linalg.norm(F[hit], axis=1))]]}).")
    s = r.restraint_forces
    if s is None or not s.carried[0]:
        lines.append("  Not carried: the restraint loads act on a mechanism.")
        return lines
    t = s.shown_forces(0)
    role = f.member_tags.get("group") or f.member_tags.get("role")
    braced = set(bracing_members(f).tolist())
    carrying = [k for k in np.argsort(-np.abs(t), kind="stable") if t[k] != 0]
    ties = [k for k in carrying if k in braced] if braced else carrying
    w = max([len(f.member_ids[k]) for k in ties] + [6])
    dp = fixed_decimals(t[ties]) if ties else 0
    label = "ties and braces" if braced else "members"
    lines.append(f"  {label} ({count(len(ties), 'member')} carrying force; + tension, - "
                 f"compression, {fu}):")
    for k in ties[:max_rows]:
        lines.append(f"    {f.member_ids[k]:<{w}}  {t[k]:>12.{dp}f}" + (f"  {role[k]}" if role
                                                                           else ""))
    if len(ties) > max_rows:
        lines.append(f"    ... and {len(ties) - max_rows} more (--json gives every member)")
    R = s.shown_reactions(0)
    keep = [i for i in np.argsort(-np.linalg.norm(R, axis=1), kind="stable") if np.any(R[i])]
    if keep:
        axes = "xyz"[:f.dimension]
        jw = max([len(f.joint_ids[s.reaction_joints[i]]) for i in keep] + [5])
        rp = fixed_decimals(R)
        lines.append(f"  supports (force of each on the frame, {fu}):")
        lines.append(f"    {'joint':<{jw}}  " + "  ".join(f"{'R' + a:>10}" for a in axes))
        for i in keep[:max_rows]:
            lines.append(f"    {f.joint_ids[s.reaction_joints[i]]:<{jw}}  "
                         + "  ".join(f"{v:>10.{rp}f}" for v in R[i]))
        if len(keep) > max_rows:
            lines.append(f"    ... and {len(keep) - max_rows} more supports")
    return lines
