"""The audit as text for a person: counts, what they mean, modes, verdict."""

from __future__ import annotations

import numpy as np

from ..results import CAUTION, AuditResult

__all__ = ["render_audit", "verdict"]

_AXES = "xyz"


def verdict(r: AuditResult) -> str:
    """One line: is the frame held, and if not, how it can move."""
    if r.stable:
        extra = (f"; {r.self_stress_states} state{_s(r.self_stress_states)} of self-stress"
                 if r.self_stress_states else "; statically determinate")
        return (f"HELD - no mechanism: every joint is held in every direction by members and "
                f"supports{extra}.")
    if r.rigid:
        return (f"NOT HELD - the frame keeps its shape but can move as one rigid body on its "
                f"supports ({r.rigid_body_modes} rigid-body mode{_s(r.rigid_body_modes)}): "
                f"add restraints.")
    tail = (f" and {r.rigid_body_modes} rigid-body mode{_s(r.rigid_body_modes)}"
            if r.rigid_body_modes else "")
    return (f"MECHANISM - {r.internal_mechanisms} internal mechanism"
            f"{_s(r.internal_mechanisms)}{tail}: the frame can change shape without any member "
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
    lines.append(f"{kind}; {r.joints} joints, {r.members} members, {r.restraints} restrained "
                 f"directions; lengths in {f.units}")
    lines.append("")
    lines.append(f"Counting rule (Maxwell): members + restraints - {d} x joints = "
                 f"{r.members} + {r.restraints} - {d * r.joints} = {r.maxwell:+d}")
    if r.maxwell < 0:
        lines.append(f"  Negative: the frame has at least {-r.maxwell} mechanism"
                     f"{_s(-r.maxwell)}, whatever its geometry.")
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
        lines.append("Mechanisms (joint movements that stretch no member; largest movement = 1):")
        for i in range(min(r.mechanisms, max_modes)):
            moving = r.mode_joints(i)
            shown = ", ".join(f"{jid} {_direction(u, d)}" for jid, u in moving[:max_entries])
            more = f", and {len(moving) - max_entries} more joints" if len(moving) > max_entries \
                else ""
            lines.append(f"  mode {i + 1} ({r.mode_kinds[i]}, {len(moving)} joint"
                         f"{_s(len(moving))} moving): {shown}{more}")
        if r.mechanisms > max_modes:
            lines.append(f"  ... {r.mechanisms - max_modes} more modes in the JSON (--json)")
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
            lines.append(f"  state {i + 1} ({len(carrying)} member{_s(len(carrying))}): "
                         f"{shown}{more}")
        shown_states = min(q, max_modes)
        if shown_states < r.self_stress_states:
            lines.append(f"  ... {r.self_stress_states - shown_states} more states "
                         + ("in the JSON (--json)" if q > shown_states else
                            "not computed (raise --self-stress to compute more)"))
    if r.warnings:
        lines.append("")
        lines.extend(f"Note: {w}" for w in r.warnings)
    lines.append("")
    lines.append("Verdict: " + verdict(r))
    lines.append("Caution: " + CAUTION)
    return "\n".join(lines) + "\n"


def _direction(u: np.ndarray, d: int) -> str:
    """A movement in words: its axis when it is nearly along one, else its vector."""
    n = float(np.linalg.norm(u))
    a = int(np.argmax(np.abs(u)))
    if abs(u[a]) >= 0.98 * n:
        return f"{'+' if u[a] > 0 else '-'}{_AXES[a]} {n:.2f}"
    return "(" + ", ".join(f"{x:+.2f}" for x in u) + ")"


def _s(k: int) -> str:
    return "" if k == 1 else "s"
