"""Writing a :class:`Frame` as a native model file (TOML or JSON), deterministically.

Where a file may be written is decided by :mod:`spaceframe.io.output`, the
one home of that rule.
"""

from __future__ import annotations

import json
import re

import numpy as np

from ...errors import ModelError
from ...model import Frame
from ...supports import AXES
from ..loads import json_entries, toml_lines
from ..output import check_output, write_text

__all__ = ["dump_toml", "dump_json", "check_model_output", "toml_id"]


_BARE = re.compile(r"[A-Za-z0-9_-]+")


def _quote(text: str) -> str:
    """A double-quoted string valid in both TOML and JSON."""
    return json.dumps(text, ensure_ascii=False).replace("\x7f", "\\u007f")


def toml_id(text: str) -> str:
    """An id as a TOML key: bare where TOML allows (letters, digits, ``_``, ``-``), else quoted."""
    return text if _BARE.fullmatch(text) else _quote(text)


def _numbers(row) -> str:
    return "[" + ", ".join(repr(float(x)) for x in row) + "]"


def _support_specs(frame: Frame) -> list[tuple[str, object]]:
    """``(joint id, spec)`` in joint order: ``"pin"``, axis letters, or direction vectors."""
    d = frame.dimension
    order = np.argsort(frame.restraint_joint, kind="stable")
    rj, rd = frame.restraint_joint[order], frame.restraint_dir[order]
    cuts = np.flatnonzero(np.diff(rj)) + 1
    specs = []
    for joint, rows in zip(rj[np.r_[0, cuts]] if rj.size else [], np.split(rd, cuts)):
        on_axis = (np.count_nonzero(rows, axis=1) == 1) & (rows.max(axis=1) == 1.0)
        if on_axis.all():
            axes = sorted({int(np.argmax(r)) for r in rows})
            spec = "pin" if len(axes) == d else "".join(AXES[a] for a in axes)
        else:
            spec = rows
        specs.append((frame.joint_ids[joint], spec))
    return specs


def check_model_output(frame: Frame, path, overwrite: bool) -> str:
    """Check that ``frame`` may be written to ``path`` as a model file; return the path.

    :func:`~spaceframe.io.output.check_output` (never the frame's own
    source, an existing file only with ``overwrite``), then that every
    coordinate is finite, since a model file holds finite numbers only.
    Every native writer (TOML, JSON, ``.npz``) calls it.
    """
    target = check_output(path, source=frame.source, overwrite=overwrite,
                          option="overwrite=True", what="the model")
    bad = np.flatnonzero(~np.isfinite(frame.coords).all(axis=1))
    if bad.size:
        raise ModelError(f"joint {frame.joint_ids[bad[0]]!r} has a coordinate that is not finite; "
                         f"a model file holds finite numbers only", path=target,
                         item=frame.joint_ids[bad[0]], kind="joint")
    return target


def dump_toml(frame: Frame, path, *, overwrite: bool = False) -> None:
    """Write a frame as a TOML model file that :func:`read_toml` reads back.

    The output is deterministic: items in the frame's order, coordinates as
    the shortest decimal that reads back to the same double, ids bare where
    TOML allows (letters, digits, ``_`` and ``-``) and quoted otherwise.

    Parameters
    ----------
    frame : Frame
    path : str or os.PathLike
        The file to write.
    overwrite : bool, optional
        Replace an existing file.  Default False.  The file the frame was
        read from is never replaced.

    Raises
    ------
    ModelError
        If ``path`` is the frame's source, is a folder, or a coordinate is
        not finite (:func:`check_model_output`).
    OutputExistsError
        If ``path`` exists and ``overwrite`` is False.
    """
    target = check_model_output(frame, path, overwrite)
    load_head, load_tables = toml_lines(frame.loads)
    out = [f"name = {_quote(frame.name)}", f"units = {_quote(frame.units)}",
           f"dimension = {frame.dimension}", *load_head, "", "[joints]"]
    out += [f"{toml_id(j)} = {_numbers(x)}" for j, x in zip(frame.joint_ids, frame.coords)]
    out += ["", "[members]"]
    ids = frame.joint_ids
    out += [f"{toml_id(mid)} = [{_quote(ids[a])}, {_quote(ids[b])}]"
            for mid, (a, b) in zip(frame.member_ids, frame.ends.tolist())]
    out += ["", "[supports]"]
    for jid, spec in _support_specs(frame):
        value = (_quote(spec) if isinstance(spec, str)
                 else "[" + ", ".join(_numbers(r) for r in spec) + "]")
        out.append(f"{toml_id(jid)} = {value}")
    for kind, attr, groups in _tag_groups(frame):
        out += ["", f"[tags.{kind}.{toml_id(attr)}]"]
        out += [f"{toml_id(label)} = [{', '.join(map(_quote, items))}]"
                for label, items in groups]
    for name, items in _property_rows(frame):
        out += ["", f"[properties.members.{toml_id(name)}]"]
        out += [f"{toml_id(key)} = {float(v)!r}" for key, v in items]
    out += load_tables
    if frame.prestress is not None:
        out += ["", "[prestress]"]
        out += [f"{toml_id(mid)} = {float(v)!r}" for mid, v in
                zip(frame.member_ids, frame.prestress) if v]
    write_text(target, "\n".join(out) + "\n", overwrite=overwrite, option="overwrite=True")


def _tag_groups(frame: Frame) -> list[tuple[str, str, list[tuple[str, list[str]]]]]:
    """``(kind, attribute, [(label, [ids])])`` for every tag, labels in order of first use."""
    found = []
    for kind, tags, ids in (("joints", frame.joint_tags, frame.joint_ids),
                            ("members", frame.member_tags, frame.member_ids)):
        for attr, labels in tags.items():
            groups: dict[str, list[str]] = {}
            for item, label in zip(ids, labels):
                if label:
                    groups.setdefault(label, []).append(item)
            found.append((kind, attr, list(groups.items())))
    return found


def dump_json(frame: Frame, path, *, overwrite: bool = False) -> None:
    """Write a frame as a JSON model file that :func:`read_json` reads back.

    The output is deterministic: one item per line, in the frame's order,
    coordinates as the shortest decimal that reads back to the same double.
    Parameters and errors as for :func:`dump_toml`.
    """
    target = check_model_output(frame, path, overwrite)
    ids = frame.joint_ids

    def block(name, rows):
        if not rows:
            return f'  "{name}": {{}}'
        return f'  "{name}": {{\n' + ",\n".join(f"    {k}: {v}" for k, v in rows) + "\n  }"

    joints = [(_quote(j), _numbers(x)) for j, x in zip(ids, frame.coords)]
    members = [(_quote(mid), f"[{_quote(ids[a])}, {_quote(ids[b])}]")
               for mid, (a, b) in zip(frame.member_ids, frame.ends.tolist())]
    supports = [(_quote(jid), _quote(spec) if isinstance(spec, str)
                 else "[" + ", ".join(_numbers(r) for r in spec) + "]")
                for jid, spec in _support_specs(frame)]
    head = [f'  "name": {_quote(frame.name)}', f'  "units": {_quote(frame.units)}',
            f'  "dimension": {frame.dimension}']
    body = head + [block("joints", joints), block("members", members),
                   block("supports", supports)]
    tag_groups = _tag_groups(frame)
    if tag_groups:
        sections: dict[str, list[str]] = {}
        for kind, attr, groups in tag_groups:
            inner = ",\n".join(f"      {_quote(label)}: [{', '.join(map(_quote, items))}]"
                               for label, items in groups)
            sections.setdefault(kind, []).append(f"    {_quote(attr)}: {{\n{inner}\n    }}"
                                                 if groups else f"    {_quote(attr)}: {{}}")
        body.append('  "tags": {\n' + ",\n".join(f'   "{kind}": {{\n' + ",\n".join(v)
                                                 + "\n   }" for kind, v in sections.items())
                    + "\n  }")
    prop_rows = _property_rows(frame)
    if prop_rows:
        inner = ",\n".join(f"    {_quote(name)}: {{" + ", ".join(
            f"{_quote(key)}: {float(v)!r}" for key, v in items) + "}" for name, items in prop_rows)
        body.append('  "properties": {\n   "members": {\n' + inner + "\n   }\n  }")
    body += json_entries(frame.loads)
    if frame.prestress is not None:
        body.append(block("prestress", [(_quote(mid), repr(float(v))) for mid, v in
                                        zip(frame.member_ids, frame.prestress) if v]))
    write_text(target, "{\n" + ",\n".join(body) + "\n}\n", overwrite=overwrite,
               option="overwrite=True")


def _property_rows(frame: Frame) -> list[tuple[str, list[tuple[str, float]]]]:
    """``(name, [(key, value)])`` to write each member property: a default, then exceptions."""
    rows = []
    for name, values in frame.member_properties.items():
        vals, counts = np.unique(values, return_counts=True)
        default = float(vals[np.argmax(counts)])
        items = [("default", default)] + [(mid, float(v)) for mid, v in
                                          zip(frame.member_ids, values) if v != default]
        rows.append((name, items))
    return rows
