"""Member forces as text for a person (tables per case, envelope, summary) and as CSV."""

from __future__ import annotations

import csv
import io

import numpy as np

from ..naming import count as counted, fixed_decimals
from ..force_results import FORCES_CAUTION, STIFFNESS_NOTE, ForcesResult

__all__ = ["render_forces", "forces_csv", "bracing_members", "case_heading"]

#: Member tags that mark bracing and ties (an extruded model's ``group``, or ``role``).
_BRACING = {"brace", "tie", "purlin", "ridge", "bracing"}


#: How each kind of case (``AppliedLoads.kinds``) is introduced in words.
_CASE_HEADINGS = {"case": "Load case", "self-weight": "Self-weight case",
                  "combination": "Combination", "notional": "Notional case"}


def case_heading(name: str, kind: str) -> str:
    """Case ``name`` of ``kind`` in words: ``case_heading("gravity", "combination") ==
    "Combination 'gravity'"``."""
    return f"{_CASE_HEADINGS[kind]} {name!r}"


def _state(value: float) -> str:
    return "T" if value > 0 else "C" if value < 0 else "-"


def bracing_members(frame) -> np.ndarray:
    """Indices of the members tagged as braces or ties (``group`` or ``role``)."""
    hit = np.zeros(frame.n_members, dtype=bool)
    for attr in ("group", "role"):
        labels = frame.member_tags.get(attr)
        if labels is not None:
            hit |= np.array([lab in _BRACING or "brace" in lab or "tie" in lab for lab in labels],
                            dtype=bool)
    return np.flatnonzero(hit)


def render_forces(r: ForcesResult, *, max_rows: int = 10) -> str:
    """The forces report as plain text.

    Parameters
    ----------
    r : ForcesResult
    max_rows : int
        Members listed per case and in the envelope, largest forces first
        (the JSON and CSV hold every member).
    """
    f = r.frame
    u = r.force_units
    role = f.member_tags.get("role") or f.member_tags.get("group")
    where = f"  [{f.source}]" if f.source else ""
    out = [f"Member forces: {f.name or '(unnamed frame)'}{where}",
           f"{len(r.names)} case{'s' if len(r.names) != 1 else ''}; forces in {u}, + tension, "
           f"- compression; {f.n_members} members, {len(r.reaction_joints)} supported joints"]
    if r.statically_determinate:
        out.append("Statically determinate: the forces follow from equilibrium alone (no "
                   "stiffness is needed).")
    else:
        ea = ("from the model's [properties.members.EA]" if r.ea_given
              else "taken as uniform because the model gives no [properties.members.EA]")
        out.append(STIFFNESS_NOTE.format(ea=ea)
                   + f" ({counted(r.self_stress_states, 'state')} of self-stress.)")
    width = max([len(m) for m in f.member_ids] + [6])
    for i, name in enumerate(r.names):
        total = ", ".join(f"{v:.4g}" for v in r.loads[i].sum(axis=0))
        out += ["", f"{case_heading(name, r.kinds[i])}; total load [{total}] {u}"]
        if not r.carried[i]:
            out.append(f"  NOT CARRIED: {100 * r.mechanism_fraction[i]:.3g} % of the load acts on "
                       f"the frame's mechanisms, which nothing resists:")
            for e in r.excited[i]:
                out.append(f"    mechanism {e.mode} ({e.kind}; {100 * e.fraction:.3g} % of the "
                           f"load): {e.description}")
            out.append("  No forces are given: the frame as modelled cannot carry this load. "
                       "Brace or restrain it first (spaceframe brace).")
            continue
        t = r.shown_forces(i)
        order = np.argsort(-np.abs(t), kind="stable")
        nt, nc = int(np.sum(t > 0)), int(np.sum(t < 0))
        out.append(f"  carried ({r.methods[i]}): {counted(nt, 'member')} in tension, {nc} in "
                   f"compression, {f.n_members - nt - nc} carrying nothing")
        if r.slack[i]:
            out.append(f"  slack (tension-only, left out): {', '.join(r.slack[i])}")
        out.append(f"  {'member':<{width}}  {'force ' + u:>12}  T/C" + ("  role" if role else ""))
        dp = fixed_decimals(t)
        for k in order[:max_rows]:
            out.append(f"  {f.member_ids[k]:<{width}}  {t[k]:>12.{dp}f}  {_state(t[k]):>3}"
                       + (f"  {role[k]}" if role else ""))
        if len(order) > max_rows:
            out.append(f"  ... and {len(order) - max_rows} more (--all lists every member)")
        R = r.shown_reactions(i)
        if len(R):
            axes = "xyz"[:f.dimension]
            jw = max([len(f.joint_ids[j]) for j in r.reaction_joints] + [5])
            out.append(f"  reactions (force of each support on the frame, {u}):")
            out.append(f"  {'joint':<{jw}}  " + "  ".join(f"{'R' + a:>10}" for a in axes))
            big = np.argsort(-np.linalg.norm(R, axis=1), kind="stable")
            rp = fixed_decimals(R)
            for k in big[:max_rows]:
                out.append(f"  {f.joint_ids[r.reaction_joints[k]]:<{jw}}  "
                           + "  ".join(f"{v:>10.{rp}f}" for v in R[k]))
            if len(big) > max_rows:
                out.append(f"  ... and {len(big) - max_rows} more supports")
    out += _envelope_lines(r, width, max_rows)
    if r.warnings:
        out += [""] + [f"Warning: {w}" for w in r.warnings]
    out += ["", _verdict(r), "", FORCES_CAUTION]
    return "\n".join(out) + "\n"


def _envelope_lines(r: ForcesResult, width: int, max_rows: int) -> list[str]:
    f = r.frame
    if not r.carried.any() or not f.n_members:
        return []
    env = r.envelope()
    u = r.force_units
    peak = np.maximum(env.tension, -env.compression)
    order = np.argsort(-peak, kind="stable")
    ever_t, ever_c = int(np.sum(env.tension > 0)), int(np.sum(env.compression < 0))
    cw = max(len(n) for n in r.names)
    out = ["", f"Envelope over the {counted(int(r.carried.sum()), 'carried case')}: "
               f"{counted(ever_t, 'member')} in tension and {ever_c} in compression in some case "
               f"(members in compression need restraint against buckling)",
           f"  {'member':<{width}}  {'tension ' + u:>12}  {'case':<{cw}}  "
           f"{'compression ' + u:>14}  case"]

    dp = fixed_decimals(peak)

    def row(k):
        tc = r.names[env.tension_case[k]] if env.tension_case[k] >= 0 else "-"
        cc = r.names[env.compression_case[k]] if env.compression_case[k] >= 0 else "-"
        return (f"  {f.member_ids[k]:<{width}}  {env.tension[k]:>12.{dp}f}  {tc:<{cw}}  "
                f"{env.compression[k]:>14.{dp}f}  {cc}")

    out += [row(k) for k in order[:max_rows]]
    if len(order) > max_rows:
        out.append(f"  ... and {len(order) - max_rows} more (--json or --csv for every member)")
    braces = bracing_members(f)
    if braces.size:
        top = braces[np.argsort(-peak[braces], kind="stable")][:5]
        out.append(f"Braces and ties carrying the most ({braces.size} tagged):")
        out += [row(k) for k in top]
    return out


def _verdict(r: ForcesResult) -> str:
    bad = [n for n, c in zip(r.names, r.carried) if not c]
    if not bad:
        return f"CARRIED - every case ({len(r.names)}) is carried by the frame as modelled."
    return (f"NOT CARRIED - {len(bad)} of {len(r.names)} cases act on a mechanism: "
            + ", ".join(map(repr, bad[:6])) + (" ..." if len(bad) > 6 else "")
            + ". Their forces are not given.")


def forces_csv(r: ForcesResult) -> str:
    """One row per (carried case, member): ``case,member,force,state`` (state T, C or -)."""
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(["case", "member", f"force_{r.force_units}", "state"])
    for i, name in enumerate(r.names):
        if not r.carried[i]:
            continue
        for mid, v in zip(r.frame.member_ids, r.shown_forces(i).tolist()):
            w.writerow([name, mid, repr(v), _state(v)])
    return buf.getvalue()
