"""The proposal beside the designer's scheme: both audited, the same figures for each.

The designer's scheme is the same frame braced another way: a braced model
whose joints carry the model's ids, or the model with a list of members
added (:func:`scheme_from_list`).  :func:`compare_schemes` audits it and
gathers, for it and for the proposal, what a designer compares: members and
restraints added, their length, mechanisms left, states of self-stress, how
many added members are key members (no state of self-stress passes through
them: losing one leaves a mechanism), and, where loads are given, the
largest force in an added member (:func:`spaceframe.analysis.forces.forces`).
Data only; :mod:`spaceframe.views.bracing_document` words it.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ... import edit
from ...errors import SpaceframeError
from ...model import Frame
from ...results import AuditResult
from ...tolerances import DEFAULT
from ..audit import audit
from ..forces import forces

__all__ = ["SchemeFigures", "Comparison", "compare_schemes", "scheme_from_list"]


@dataclass(frozen=True, eq=False)
class SchemeFigures:
    """One braced frame's figures.

    Attributes
    ----------
    frame : Frame
        The braced frame.
    after : AuditResult
        Its audit.
    added : tuple of str
        Ids of its members that join two joints no member of the model joins.
    restraints_added : int
        Restraint rows beyond the model's, joint by joint.
    length : float
        Total length of the added members, in the model's units.
    key_added : tuple of str
        The added members that are key members of the braced frame.
    largest : tuple (float, str, str) or None
        The largest force magnitude in an added member over the carried load
        cases, that member's id and the case; None without loads or added
        members.
    not_carried : tuple of str
        Load cases the braced frame does not carry (they act on a mechanism).
    """

    frame: Frame
    after: AuditResult
    added: tuple[str, ...]
    restraints_added: int
    length: float
    key_added: tuple[str, ...]
    largest: tuple | None
    not_carried: tuple[str, ...] = ()


@dataclass(frozen=True, eq=False)
class Comparison:
    """The proposal and the designer's scheme, side by side.

    Attributes
    ----------
    proposal, scheme : SchemeFigures
    source : str
        Where the scheme came from.
    loads_from : str
        ``"model"``, ``"scheme"`` or ``""`` (no loads: no forces compared).
    force_units : str
    """

    proposal: SchemeFigures
    scheme: SchemeFigures
    source: str
    loads_from: str
    force_units: str = ""


def scheme_from_list(frame: Frame, ends) -> Frame:
    """The model with the listed members ``(k, 2)`` joint indices added (ids ``S1``, ``S2``...)."""
    used = set(frame.member_ids)
    ids, n = [], 1
    for _ in range(len(ends)):
        while f"S{n}" in used:
            n += 1
        ids.append(f"S{n}")
        used.add(f"S{n}")
    return edit.add_members(frame, ids, np.asarray(ends, dtype=np.int64).reshape(-1, 2),
                            tags={"role": ["brace"] * len(ids)})


def _figures(model: Frame, braced: Frame, after: AuditResult, loads) -> SchemeFigures:
    base = {frozenset((model.joint_ids[a], model.joint_ids[b])) for a, b in model.ends.tolist()}
    J = braced.joint_ids
    added = [k for k, (a, b) in enumerate(braced.ends.tolist())
             if frozenset((J[a], J[b])) not in base]
    ids = tuple(braced.member_ids[k] for k in added)
    L = braced.lengths()
    count = lambda f: {jid: int(np.sum(f.restraint_joint == j))       # noqa: E731
                       for j, jid in enumerate(f.joint_ids)}
    before, now = count(model), count(braced)
    extra = sum(max(0, n - before.get(jid, 0)) for jid, n in now.items())
    key = set(after.key_members)
    largest, not_carried = None, ()
    if loads is not None and added:
        res = forces(braced, loads=loads)
        not_carried = tuple(n for n, ok in zip(res.names, res.carried) if not ok)
        best = None
        for q, name in enumerate(res.names):
            if not res.carried[q]:
                continue
            t = np.abs(res.member_forces[q, added])
            i = int(np.argmax(t))
            if best is None or t[i] > best[0]:
                best = (float(t[i]), ids[i], name)
        largest = best
    return SchemeFigures(frame=braced, after=after, added=ids, restraints_added=extra,
                         length=float(L[added].sum()) if added else 0.0,
                         key_added=tuple(i for i in ids if i in key), largest=largest,
                         not_carried=not_carried)


def compare_schemes(result, scheme: Frame, *, source: str = "",
                    audit_options: dict | None = None) -> Comparison:
    """Audit the designer's ``scheme`` and set its figures beside the proposal's.

    Parameters
    ----------
    result : BracingResult
        The proposal for the model.
    scheme : Frame
        The designer's braced frame: every joint of the model, by id, at the
        same place (new joints are allowed).
    source : str
        Where the scheme came from, for the views.
    audit_options : dict, optional
        Passed to :func:`spaceframe.analysis.audit.audit`.

    Returns
    -------
    Comparison

    Raises
    ------
    SpaceframeError
        When a joint of the model is missing from the scheme or stands
        elsewhere (more than ``tol.merge`` of the model's size away).
    """
    model = result.frame
    at = {jid: j for j, jid in enumerate(scheme.joint_ids)}
    missing = [jid for jid in model.joint_ids if jid not in at]
    if missing:
        raise SpaceframeError(f"the scheme {source or ''} lacks joint {missing[0]!r} of "
                              f"{model.source or 'the model'} ({len(missing)} missing); the "
                              f"scheme must be the same frame, its joints under the same ids")
    idx = np.array([at[jid] for jid in model.joint_ids])
    off = np.linalg.norm(scheme.coords[idx] - model.coords, axis=1)
    if np.any(off > DEFAULT.merge * model.size()):
        j = int(np.argmax(off))
        raise SpaceframeError(f"joint {model.joint_ids[j]!r} stands {off[j]:.4g} "
                              f"{model.units} away from its place in the model in the scheme "
                              f"{source}; the scheme must be the same frame")
    loads, loads_from = model.loads, "model"
    if loads is None:
        loads, loads_from = scheme.loads, "scheme"
    if loads is None:
        loads_from = ""
    opts = dict(audit_options or {})
    theirs = audit(scheme, **opts)
    proposal = _figures(model, result.braced, result.after, loads)
    other = _figures(model, scheme, theirs, loads)
    return Comparison(proposal=proposal, scheme=other, source=source, loads_from=loads_from,
                      force_units=getattr(loads, "force_units", "") if loads is not None else "")
