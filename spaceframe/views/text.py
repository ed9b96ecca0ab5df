"""The audit as text for a person: counts, what they mean, modes, verdict."""

from __future__ import annotations


import numpy as np

from ..analysis.prestress import NOT_STIFFENED, STIFFENED
from ..naming import count as counted
from ..naming import direction_words, join_words, joint_label, natural_sorted, placed_joints
from ..results import CAUTION, MORE_STATES, SOFT_NOT_ASKED, AuditResult
from ..tolerances import DISPLAY

__all__ = ["render_audit", "verdict"]

_AXES = "xyz"


def verdict(r: AuditResult) -> str:
    """One line: is the frame held, and if not, how it can move."""
    w = r.one_way
    if r.stable and r.mechanisms == 0:
        extra = (f"; {counted(r.self_stress_states, 'state')} of self-stress"
                 if r.self_stress_states else "; statically determinate")
        if w is not None:
            extra += ("; its one-way members hold it acting one way only (with rods and props "
                      "fitted snug)")
        return (f"HELD - no mechanism: every joint is held in every direction by members and "
                f"supports{extra}.")
    if r.mechanisms == 0 and w is not None:
        if w.motion is None:
            return ("NOT HELD - no state of self-stress keeps every tension-only member in "
                    "tension and every compression-only one in compression by a margin; the "
                    "frame is held only if they carry both ways.")
        return (f"NOT HELD - held only while every member carries both ways; as modelled, "
                f"{_one_way_motion(w)} Add a member or a restraint that resists this movement, "
                f"or use members that carry both ways.")
    if r.stable:  # only with mechanisms that the declared prestress holds
        return (f"HELD BY ITS DECLARED PRESTRESS - "
                f"{counted(r.internal_mechanisms, 'internal mechanism')}, "
                f"{'each ' * (r.internal_mechanisms > 1)}stiffened "
                f"by the prestress the model "
                f"declares; held only while that prestress is kept. Without it the frame is a "
                f"mechanism.")
    if w is not None and w.margin is not None:  # the declared prestress held the mechanisms
        return ("NOT HELD - the declared prestress stiffens every mechanism but does not keep "
                "every tension-only member in tension and every compression-only one in "
                "compression; the frame is a mechanism unless it does.")
    if r.rigid:
        return (f"NOT HELD - the frame keeps its shape but can move as one rigid body on its "
                f"supports ({counted(r.rigid_body_modes, 'rigid-body mode')}): "
                f"add restraints.")
    tail = (f" and {counted(r.rigid_body_modes, 'rigid-body mode')}"
            if r.rigid_body_modes else "")
    return (f"MECHANISM - {counted(r.internal_mechanisms, 'internal mechanism')}"
            f"{tail}: the frame can change shape without any member "
            f"changing length. Brace or restrain it before sizing anything.")


def render_audit(r: AuditResult, *, max_modes: int = 8, max_entries: int = 6) -> str:
    """The audit report as plain text.

    Parameters
    ----------
    r : AuditResult
    max_modes : int
        Mechanisms and states of self-stress listed, each (the JSON has all).
    max_entries : int
        Joints or members listed per mode or state.
    """
    f = r.frame
    d = r.dimension
    lines = []
    title = f.name or "(unnamed frame)"
    lines.append(f"Stability audit: {title}" + (f"  [{f.source}]" if f.source else ""))
    kind = "space frame" if d == 3 else "plane frame (analysed in its plane)"
    lines.append(f"{kind}; {counted(r.joints, 'joint')}, {counted(r.members, 'member')}, "
                 f"{counted(r.restraints, 'restrained direction')}; lengths in {f.units}")
    lines.append("")
    lines.append(f"Counting rule (Maxwell): members + restraints - {d} x joints = "
                 f"{r.members} + {r.restraints} - {d * r.joints} = {r.maxwell:+d}")
    if r.maxwell < 0:
        lines.append(f"  Negative: the frame has at least {counted(-r.maxwell, 'mechanism')}, "
                     f"whatever its geometry.")
    else:
        lines.append("  Zero or more is necessary for a frame that is held, not sufficient: "
                     "members can be placed where they do no work. The rank below decides.")
    lines.append("")
    lines.append(f"  rank of the equilibrium matrix  {r.rank}")
    lines.append(f"  mechanisms                      {r.mechanisms}"
                 f"   ({r.internal_mechanisms} internal, {r.rigid_body_modes} rigid-body)")
    lines.append(f"  states of self-stress           {r.self_stress_states}")
    lines.append(f"  check: mechanisms - self-stress = {r.mechanisms - r.self_stress_states:+d} "
                 f"= -(counting rule)")
    g = r.gap
    parts = [f"threshold {g.tolerance:.0e} of the largest singular value ({g.method} engine)"]
    if g.largest_zero is not None:
        parts.append(f"largest judged zero {g.largest_zero:.1e}")
    if g.smallest_nonzero is not None:
        parts.append(f"smallest judged non-zero {g.smallest_nonzero:.1e}")
    lines.append("  rank decision: " + "; ".join(parts))
    if r.mechanisms:
        lines.append("")
        lines.append("Mechanisms (joint movements that stretch no member), grouped by kind:")
        shown, last, i = 0, None, 0
        while i < r.mechanisms:
            if shown >= max_modes:
                lines.append(f"  ... {counted(r.mechanisms - i, 'more mode')} (--all lists them; "
                             f"--json has them all)")
                break
            kind = r.mode_kinds[i]
            if kind != last:
                count = sum(1 for k in r.mode_kinds if k == kind)
                lines.append(f"  {kind} ({counted(count, 'mode')}):")
                last = kind
            run = _single_joint_run(r, i)
            if len(run) > 3:  # many joints each free the same way: one line for them all
                info = r.mode_info[i]
                names = _frame_grouped(r, [r.mode_info[j].joints[0] for j in run])
                how = "out of the plane of their members" if kind == "out-of-plane" else \
                    "on their own"
                lines.append(f"    {i + 1}-{run[-1] + 1}. Joints {names} are each "
                             f"free {how} ({direction_words(info.direction, signed=False)}): "
                             f"no member or support holds them that way.{_order_note(r, i, plural=True)}")
                i = run[-1] + 1
            else:
                lines.append(f"    {i + 1}. {r.mode_info[i].description}"
                             f"{_order_note(r, i)}")
                i += 1
            shown += 1
        lines.extend(_prestress_lines(r))
    if r.self_stress_states:
        lines.append("")
        q = r.self_stress_forces.shape[0]
        head = "States of self-stress (member forces with no load; + tension, - compression"
        head += "; largest = 1):" if q else "):"
        lines.append(head)
        for i in range(min(q, max_modes)):
            carrying = r.state_members(i)
            shown = ", ".join(f"{mid} {t:+.3f} {'T' if t > 0 else 'C'}"
                              for mid, t in carrying[:max_entries])
            more = f", and {len(carrying) - max_entries} more" if len(carrying) > max_entries \
                else ""
            lines.append(f"  state {i + 1} ({counted(len(carrying), 'member')}): "
                         f"{shown}{more}")
        shown_states = min(q, max_modes)
        if shown_states < r.self_stress_states:
            lines.append(f"  ... {r.self_stress_states - shown_states} more states "
                         + ("in the JSON (--json)" if q > shown_states else
                            "not computed (raise --self-stress to compute more)"))
    if r.soft_info:
        lines.append("")
        ea = "EA from the model" if "EA" in r.frame.member_properties else "uniform EA"
        lines.append(f"Soft modes (held, but a local pattern with less than 0.1 % of the "
                     f"frame's typical joint stiffness; {ea}):")
        for ratio, info in zip(r.soft_ratios, r.soft_info):
            lines.append(f"  - {_pct(ratio)} of the typical stiffness: "
                         f"{info.description}")
    if r.soft_skipped not in (None, SOFT_NOT_ASKED):
        lines.append("")
        lines.append(f"Soft modes: not looked for ({r.soft_skipped}); --soft looks for them, "
                     f"at the cost of a second factorisation.")
    lines.extend(_one_way_lines(r))
    lines.extend(_robustness(r, max_entries))
    if r.warnings:
        lines.append("")
        # the library's words for more states, in this view's (its options') terms
        lines.extend(f"Note: {w}".replace(MORE_STATES, "--self-stress N or all computes more")
                     for w in r.warnings)
    lines.append("")
    lines.append("Verdict: " + verdict(r))
    lines.append("Caution: " + CAUTION)
    return "\n".join(lines) + "\n"


def _one_way_motion(w) -> str:
    """``"joints ... move ...: R1 goes slack ..."`` with a lower-case start."""
    text = w.info.description
    return text[0].lower() + text[1:]


def _one_way_lines(r: AuditResult) -> list[str]:
    """The one-way members and the verdict with them acting one way (Roth & Whiteley)."""
    w = r.one_way
    if w is None:
        return []
    kinds = []
    if w.tension:
        kinds.append(f"tension only (rods, guys) {_names(w.tension)}")
    if w.compression:
        kinds.append(f"compression only (props) {_names(w.compression)}")
    out = ["", "One-way members: " + "; ".join(kinds)]
    if r.mechanisms and w.margin is None:
        out.append("  Not tested: the frame has mechanisms even with every member carrying "
                   "both ways; the mechanisms above come first.")
    elif r.mechanisms:
        out.append(f"  {'Held' if w.held else 'Not held'} with them acting one way: the "
                   f"declared prestress {'keeps' if w.held else 'does not keep'} every "
                   f"tension-only member in tension and every compression-only one in "
                   f"compression (the weakest at {w.margin:.2g} of its largest force).")
    elif w.held:
        out.append(f"  Held with them acting one way: a state of self-stress keeps every "
                   f"tension-only member in tension and every compression-only one in "
                   f"compression (the weakest at {w.margin:.2g} of the largest force), so any "
                   f"movement that slackens one stretches another member (Roth & Whiteley "
                   f"1981). This assumes each "
                   f"is fitted snug: rods taut, props bearing.")
    elif w.motion is None:
        out.append(f"  Not held: the best state of self-stress keeps them carrying only "
                   f"{w.margin:.1e} of its largest force, which is counted as none.")
    else:
        out.append(f"  Not held: {_one_way_motion(w)}")
    return out


def _names(ids, most: int = 12) -> str:
    return ", ".join(ids[:most]) + (f" and {len(ids) - most} more" if len(ids) > most else "")


def _pct(ratio: float) -> str:
    pct = 100 * ratio
    return f"{pct:.2g} %" if pct >= 0.01 else f"{ratio:.1e} (as a fraction)"


def _order_note(r: AuditResult, i: int, *, plural: bool = False) -> str:
    """What prestress does to mechanism ``i``, never suggesting it is safe."""
    order = r.mode_orders[i] if i < len(r.mode_orders) else None
    it, real = ("them", "real mechanisms") if plural else ("it", "a real mechanism")
    declared = r.declared_prestress
    if order is None:
        return ""
    if order == NOT_STIFFENED:
        return f"  [no prestress stiffens {it}: treat as {real}, likely finite]"
    if declared is not None and i < len(declared.stiffens):
        if declared.stiffens[i]:
            return ("  [stiffened by the prestress the model declares, and only while that "
                    "prestress is kept]")
        return f"  [the declared prestress does not stiffen {it}: treat as {real}]"
    return (f"  [first-order: stiffened only if the frame is built and kept prestressed in "
            f"{_stiffening_state(r, i)}; frames normally are not, so treat {it} as {real} "
            f"unless that prestress is designed in]")


def _stiffening_state(r: AuditResult, i: int) -> str:
    """``"state 2 (tension in R1, R2)"``: the state that stiffens mode ``i``, in words."""
    index, t = r.stiffening.support(i)
    # largest tension first; forces equal to the printed digits in the model's member order,
    # so that rounding in the last bits does not reorder the words
    pull = sorted(np.flatnonzero(t > 0.05).tolist(), key=lambda k: (-round(float(t[k]), 6), k))
    ids = [r.frame.member_ids[index[k]] for k in pull]
    words = ", ".join(ids[:4]) + (f" and {len(ids) - 4} more" if len(ids) > 4 else "")
    for j, s in enumerate(r.self_stress_forces):
        if abs(s[index] @ t) >= 0.999 * np.linalg.norm(s) * np.linalg.norm(t):
            return f"state of self-stress {j + 1} (tension in {words})"
    return f"a state of self-stress with tension in {words}"


def _prestress_lines(r: AuditResult) -> list[str]:
    """The whole frame and prestress: declared, or only possible (then not relied on)."""
    declared = r.declared_prestress
    if declared is not None:
        count = int(np.count_nonzero(declared.forces))
        head = f"  Prestress declared in the model ([prestress], {counted(count, 'member')}): "
        if declared.holds:
            head += "it stiffens every internal mechanism, so they count as held"
        elif r.internal_mechanisms:
            head += (f"it stiffens {int(declared.stiffens.sum())} of the "
                     f"{r.internal_mechanisms} internal mechanisms, not all of them at once"
                     + ("" if not r.rigid_body_modes else "; no prestress holds a rigid-body "
                                                           "motion"))
        else:
            head += "no prestress holds a rigid-body motion"
        return [head + ". Held only while that prestress is kept: lost pretension (slip, creep, "
                "temperature, a cut rod) leaves mechanisms. Relying on prestress for stability "
                "is a design decision for a competent engineer."]
    if not (r.internal_mechanisms and any(o == STIFFENED for o in r.mode_orders)):
        return []
    whole = {True: "one state of self-stress would stiffen every internal mechanism at once "
                   "(prestress stable), but only if the frame is built and kept prestressed "
                   "in it",
             False: "some internal mechanism is stiffened by no prestress at all, and the "
                    "others only if the frame is built and kept prestressed",
             None: "no single state of self-stress was found that stiffens every internal "
                   "mechanism at once; each marked one is stiffened only if the frame is "
                   "built and kept prestressed"}[r.prestress_stable]
    return [f"  Prestress: {whole}. "
            f"Frames normally are not: these are mechanisms unless that prestress is designed "
            f"in (a model declares it as [prestress], member = force)."]


def _single_joint_run(r: AuditResult, i: int) -> list[int]:
    """Modes from ``i`` on of one kind, order and direction, each moving one joint."""
    def key(j):
        info = r.mode_info[j]
        order = r.mode_orders[j] if j < len(r.mode_orders) else None
        return (info.kind, order, tuple(np.round(np.abs(info.direction), 3)))
    run = []
    j = i
    while j < r.mechanisms and len(r.mode_info[j].joints) == 1 and key(j) == key(i):
        run.append(j)
        j += 1
    return run


def _frame_grouped(r: AuditResult, joints: list[str]) -> str:
    """``L1, L2 of frames 1-6 (12 joints)`` when the same joints of several frames are listed."""
    f = r.frame
    frames = f.tag("joint", "frame")
    index = {jid: i for i, jid in enumerate(f.joint_ids)}
    if placed_joints(f):   # ids that say nothing of where a joint is: its place beside it
        size = f.size() or 1.0
        return join_words([joint_label(f, index[j], size) for j in joints], most=8)
    if not frames or len(joints) < 4:
        return ", ".join(joints)
    by_frame: dict[str, list[str]] = {}
    for jid in joints:
        fr = frames[index[jid]]
        if not fr or "." not in jid:
            return ", ".join(joints)
        by_frame.setdefault(fr, []).append(jid.split(".", 1)[1])
    locals_ = {tuple(natural_sorted(v)) for v in by_frame.values()}
    order = [fr for fr in dict.fromkeys(frames) if fr in by_frame]
    span = f"frames {order[0]}-{order[-1]}" if len(order) > 2 else \
        " and ".join(f"frame {fr}" for fr in order)
    if len(locals_) == 1 and len(order) > 1:
        return f"{', '.join(next(iter(locals_)))} of {span} ({len(joints)} joints)"
    return ", ".join(joints)


def _robustness(r: AuditResult, max_entries: int) -> list[str]:
    """Key members and redundancy shares."""
    out = [""]
    key = r.key_members
    if r.members == 0:
        return []
    if r.self_stress_states == 0:
        out.append("Key members: all of them. With no state of self-stress the frame is "
                   "statically determinate (as far as it is held): losing any member leaves a "
                   "mechanism.")
    elif key:
        names = ", ".join(key[:max_entries * 2]) + (
            f" and {len(key) - max_entries * 2} more" if len(key) > max_entries * 2 else "")
        out.append(f"Key members ({len(key)} of {r.members}; losing any one leaves a mechanism): "
                   f"{names}")
    else:
        out.append("Key members: none. Every member carries force in some state of "
                   "self-stress, so the loss of any single member leaves no mechanism.")
    if r.one_way is not None and r.members:
        out.append("  (Key members and shares count every member as two-way: losing a rod or a "
                   "prop can leave the frame not held where it is not listed as key.)")
    if r.redundancy is not None and r.self_stress_states:
        red = r.redundancy
        lo, hi = int(np.argmin(red)), int(np.argmax(red))
        out.append(f"Redundancy shares (0 = key, 1 = not needed; they sum to "
                   f"{r.self_stress_states}): least {red[lo]:.2f} ({r.frame.member_ids[lo]}), "
                   f"median {np.median(red):.2f}, most {red[hi]:.2f} ({r.frame.member_ids[hi]})")
    return out


def _direction(u: np.ndarray, d: int) -> str:
    """A movement in words: its axis when it is nearly along one, else its vector."""
    n = float(np.linalg.norm(u))
    a = int(np.argmax(np.abs(u)))
    if abs(u[a]) >= DISPLAY.along_axis * n:
        return f"{'+' if u[a] > 0 else '-'}{_AXES[a]} {n:.2f}"
    return "(" + ", ".join(f"{x:+.2f}" for x in u) + ")"
