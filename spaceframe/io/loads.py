"""Loads in the native model format: force units, load cases, combinations, self-weight, notional.

In TOML::

    force_units = "kN"          # N, kN, MN, lbf or kip; default kN

    [loads.snow]                # a load case: joint = [fx, fy, fz] ([fx, fy] in 2D)
    U1 = [0.0, 0.0, -6.0]
    U2 = [0.0, 0.0, -6.0]

    [loads."wind west"]
    U1 = [2.0, 0.0, 1.5]

    [combinations.ULS1]         # case = factor
    snow = 1.5
    self_weight = 1.35

    [self_weight]
    per_length = 0.2            # force units per length unit, half to each end joint, -z

    [notional]
    fraction = 0.005            # of each case's vertical load, in each of +-x and +-y
    cases = ["ULS1"]            # optional: the cases that get it (default every case)

JSON has the same structure.  :func:`read_loads` checks a parsed document
and returns a :class:`~spaceframe.loads.LoadSet` (or None when the document
has no loads); :func:`toml_lines` and :func:`json_entries` write one back.
"""

from __future__ import annotations

from typing import Callable

import numpy as np

from ..errors import ModelError
from ..loads import FORCE_UNITS, SELF_WEIGHT, Combination, LoadCase, LoadSet
from ..suggest import did_you_mean

__all__ = ["KEYS", "read_loads", "toml_lines", "json_entries"]

#: The top-level keys this module reads.
KEYS = ("force_units", "loads", "combinations", "self_weight", "notional")

_NUMBER = (int, float)
Locate = Callable[..., "int | None"]


def read_loads(doc: dict, dimension: int, joint_ids, *, locate: Locate | None = None,
               path: str | None = None) -> LoadSet | None:
    """The load set of a parsed model document, checked, or None when it has none.

    Parameters
    ----------
    doc : dict
        The parsed model file.
    dimension : int
        2 or 3: the number of force components.
    joint_ids : sequence of str
        The model's joints.
    locate : callable, optional
        ``locate(*keys) -> line or None``: the line of a key path such as
        ``("loads", "snow", "U1")``, for messages.
    path : str, optional
        The file, for messages.

    Raises
    ------
    ModelError
        Naming the file, line and item, and the fix: an unknown force unit, a
        load on an unknown joint, the wrong number of components, a value that
        is not a number, an unknown case in a combination, a self-weight or
        notional value that is not a positive number, an unknown key.

    Notes
    -----
    Cost O(loaded joints + combination entries).
    """
    if not any(key in doc for key in KEYS):
        return None
    locate = locate or (lambda *keys: None)

    def error(message, *keys, item=None):
        return ModelError(message, path=path, line=locate(*keys) if keys else None, item=item)

    units = doc.get("force_units", "kN")
    if units not in FORCE_UNITS:
        lower = {u.lower(): u for u in FORCE_UNITS}
        hint = (f" (did you mean {lower[units.lower()]!r}?)"
                if isinstance(units, str) and units.lower() in lower
                else did_you_mean(str(units), FORCE_UNITS))
        raise error(f"unknown force unit {units!r}{hint}; write force_units as one of "
                    f"{', '.join(FORCE_UNITS)}, e.g. force_units = \"kN\"", "force_units")
    example = "[fx, fy, fz]" if dimension == 3 else "[fx, fy]"
    loads = _table(doc, "loads", f"tables [loads.NAME] of joint = {example}", error)
    index = dict(zip(joint_ids, range(len(joint_ids))))
    cases = []
    for name, table in loads.items():
        if not isinstance(table, dict):
            raise error(f"load case {name!r} must be a table [loads.{name}] of joint = {example}",
                        "loads", name, item=name)
        joints, forces = [], []
        for jid, value in table.items():
            if jid not in index:
                raise error(f"load case {name!r} loads joint {jid!r}, which is not in [joints]; "
                            f"correct the id or add the joint{did_you_mean(jid, index)}",
                            "loads", name, jid, item=jid)
            if not (isinstance(value, list) and len(value) == dimension):
                got = (f"{len(value)} components" if isinstance(value, list) else repr(value))
                raise error(f"load case {name!r}, joint {jid!r}: give {dimension} force "
                            f"components {example} (the model is {dimension}-dimensional); "
                            f"got {got}", "loads", name, jid, item=jid)
            if not all(_is_number(v) for v in value):
                raise error(f"load case {name!r}, joint {jid!r}: every component must be a "
                            f"finite number without quotes, e.g. {jid} = {[0.0] * dimension}",
                            "loads", name, jid, item=jid)
            joints.append(jid)
            forces.append(value)
        cases.append(LoadCase(name, tuple(joints),
                              np.array(forces, dtype=float).reshape(len(joints), dimension)))

    self_weight = _settings(doc, "self_weight", {"per_length": "0.2"}, error).get("per_length")
    if "self_weight" in doc:
        if self_weight is None or not _is_number(self_weight) or self_weight <= 0:
            raise error(f"[self_weight] per_length must be a positive number (force per unit "
                        f"length of member), e.g. per_length = 0.2; got {self_weight!r}",
                        "self_weight", "per_length")
        if SELF_WEIGHT in loads:
            raise error(f"a load case is named {SELF_WEIGHT!r}, the name of the self-weight "
                        f"case; rename it", "loads", SELF_WEIGHT, item=SELF_WEIGHT)
    primary = [c.name for c in cases] + ([SELF_WEIGHT] if self_weight else [])

    combinations = []
    for name, table in _table(doc, "combinations", "tables [combinations.NAME] of case = factor",
                              error).items():
        if not isinstance(table, dict) or not table:
            raise error(f"combination {name!r} must be a table [combinations.{name}] of "
                        f"case = factor, e.g. snow = 1.5", "combinations", name, item=name)
        if name in primary:
            raise error(f"combination {name!r} has the name of a load case; rename one",
                        "combinations", name, item=name)
        for case, factor in table.items():
            if case not in primary:
                known = ", ".join(map(repr, primary)) or "none"
                raise error(f"combination {name!r} names case {case!r}, which is not a load "
                            f"case (the cases are {known}); correct the name or add "
                            f"[loads.{case}]{did_you_mean(case, primary)}",
                            "combinations", name, case, item=case)
            if not _is_number(factor):
                raise error(f"combination {name!r}: the factor of {case!r} must be a number, "
                            f"e.g. {case} = 1.5; got {factor!r}", "combinations", name, case,
                            item=case)
        combinations.append(Combination(name, tuple((k, float(v)) for k, v in table.items())))

    notional = _settings(doc, "notional", {"fraction": "0.005", "cases": '["ULS1"]'}, error)
    fraction, chosen = notional.get("fraction"), notional.get("cases")
    if "notional" in doc:
        if not _is_number(fraction) or not 0 < fraction < 1:
            raise error(f"[notional] fraction must be a number between 0 and 1 (of each case's "
                        f"vertical load; local codes set the value), e.g. fraction = 0.005; "
                        f"got {fraction!r}", "notional", "fraction")
        names = primary + [c.name for c in combinations]
        if chosen is not None:
            if not (isinstance(chosen, list) and all(isinstance(c, str) for c in chosen)):
                raise error(f"[notional] cases must be a list of case names in quotes, e.g. "
                            f"cases = [\"snow\"]; got {chosen!r}", "notional", "cases")
            for case in chosen:
                if case not in names:
                    raise error(f"[notional] cases names {case!r}, which is not a load case or "
                                f"combination; correct the name{did_you_mean(case, names)}",
                                "notional", "cases", item=case)
            chosen = tuple(chosen)
    return LoadSet(cases=tuple(cases), combinations=tuple(combinations),
                   self_weight=float(self_weight) if self_weight else None,
                   notional=float(fraction) if "notional" in doc else None,
                   notional_cases=chosen, force_units=units)


def _is_number(value) -> bool:
    return (isinstance(value, _NUMBER) and not isinstance(value, bool)
            and bool(np.isfinite(float(value))))


def _table(doc: dict, key: str, shape: str, error) -> dict:
    value = doc.get(key, {})
    if not isinstance(value, dict):
        raise error(f"{key} must be {shape}; got {type(value).__name__}", key)
    if "" in value:
        raise error(f"an empty name in [{key}]; give every case a name", key)
    return value


def _settings(doc: dict, key: str, allowed: dict, error) -> dict:
    """A small table of settings: only the keys in ``allowed`` (key -> example value)."""
    value = doc.get(key, {})
    example = ", ".join(f"{k} = {v}" for k, v in allowed.items())
    if not isinstance(value, dict):
        raise error(f"{key} must be a table [{key}] holding {example}; got {value!r}", key)
    for k in value:
        if k not in allowed:
            raise error(f"unknown key {k!r} in [{key}]{did_you_mean(k, allowed)}; it holds "
                        f"{example}", key, k, item=k)
    return value


# --------------------------------------------------------------------- writing

def toml_lines(loads: LoadSet | None) -> tuple[list[str], list[str]]:
    """``(top-level lines, section lines)`` writing ``loads`` in TOML (empty for None).

    The top-level lines (``force_units``) belong above the first section
    header; the section lines go at the end of the file.
    """
    from .native.write import _numbers as _row, _quote, toml_id as _key

    if loads is None:
        return [], []
    out: list[str] = []
    for case in loads.cases:
        out += ["", f"[loads.{_key(case.name)}]"]
        out += [f"{_key(j)} = {_row(f)}" for j, f in zip(case.joints, case.forces)]
    for combo in loads.combinations:
        out += ["", f"[combinations.{_key(combo.name)}]"]
        out += [f"{_key(k)} = {v!r}" for k, v in combo.factors]
    if loads.self_weight:
        out += ["", "[self_weight]", f"per_length = {loads.self_weight!r}"]
    if loads.notional:
        out += ["", "[notional]", f"fraction = {loads.notional!r}"]
        if loads.notional_cases is not None:
            out.append(f"cases = [{', '.join(map(_quote, loads.notional_cases))}]")
    return [f"force_units = {_quote(loads.force_units)}"], out


def json_entries(loads: LoadSet | None) -> list[str]:
    """Top-level JSON members (``'  "key": value'``) writing ``loads`` (empty for None)."""
    from .native.write import _numbers as _row, _quote

    if loads is None:
        return []

    def obj(rows, indent):
        pad = " " * indent
        if not rows:
            return "{}"
        return "{\n" + ",\n".join(f"{pad} {k}: {v}" for k, v in rows) + f"\n{pad}}}"

    out = [f'  "force_units": {_quote(loads.force_units)}']
    cases = [(_quote(c.name), obj([(_quote(j), _row(f)) for j, f in zip(c.joints, c.forces)], 3))
             for c in loads.cases]
    out.append(f'  "loads": {obj(cases, 2)}')
    if loads.combinations:
        combos = [(_quote(c.name), "{" + ", ".join(f"{_quote(k)}: {v!r}" for k, v in c.factors)
                   + "}") for c in loads.combinations]
        out.append(f'  "combinations": {obj(combos, 2)}')
    if loads.self_weight:
        out.append(f'  "self_weight": {{"per_length": {loads.self_weight!r}}}')
    if loads.notional:
        cases = ("" if loads.notional_cases is None else
                 f', "cases": [{", ".join(map(_quote, loads.notional_cases))}]')
        out.append(f'  "notional": {{"fraction": {loads.notional!r}{cases}}}')
    return out
