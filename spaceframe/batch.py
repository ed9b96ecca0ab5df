"""Batches: many models, or one model in many variants, audited in parallel on Dask.

A batch is a list of tasks, one per (model, variant); each task is audited on
a worker of a ``dask.distributed`` cluster and gives one row of counts.  Rows
are written to the results file as each task completes, so an interrupted
batch loses nothing, and a later run with ``resume`` skips every (model,
variant) already in the file.

The variants file
-----------------
A small TOML file; every variant applies to each model of the batch::

    base = true                  # also audit the model as given (variant "base"); default true

    [generate]
    each_member_removed = true   # one variant per member, "remove <id>"; or a list of
                                 # member ids, or a tag selector such as "role=brace"
    each_support_freed = true    # one variant per supported joint, "free <joint>";
                                 # or a list of joint ids

    [[variant]]
    name = "end bays braced"     # required, unique; the row's variant column
    add_members = { "X1" = ["F1.U1", "F2.U2"], "X2" = ["F1.U2", "F2.U1"] }

    [[variant]]
    name = "north gable on rollers"
    remove_members = ["P4"]               # member ids taken out
    free_supports = ["F6.L0"]             # supported joints whose support is taken away
    supports = { "F6.L6" = "z" }          # joint = what is held, as in a model's [supports]
    move_joints = { "F6.U3" = [6.0, 25.0, 2.4] }   # joint = new coordinates

The changes apply in the order: move joints, remove members, add members,
free supports, set supports.  An added member takes the median of the
model's member properties (EA), and no tags.  Spacings are tried by batching
the model files that ``spaceframe extrude`` writes for each spacing.

The structure of the file is checked when it is read (a mistake there is bad
input of the whole batch).  The ids are checked against each model when the
variant is built on a worker: a variant that names a member or joint the
model does not have becomes a row with its error, the batch goes on.

Results
-------
One row per (model, variant), with the columns of :data:`COLUMNS`: the
counts of :class:`~spaceframe.results.AuditResult`, the kind and description
of the first mechanism (internal mechanisms come first), the seconds the
variant took on its worker, an ``error`` (empty when the audit ran) and the
warnings.  Written as CSV, or JSON lines for a name ending in ``.jsonl``.
Rows are in the order tasks complete, not the order of the variants.
"""

from __future__ import annotations

import csv
import dataclasses
import io
import json
import os
import time
import warnings
from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path

from . import edit
from ._optional import require
from .errors import ModelError, SpaceframeError, SpaceframeWarning
from .io.output import check_output
from .model import Frame
from .suggest import closest, did_you_mean

__all__ = ["Variant", "VariantSet", "Task", "COLUMNS", "BASE", "read_variants", "expand",
           "apply_variant", "audit_task", "error_row", "ResultsFile", "run_batch",
           "local_cluster"]

#: The name of the variant that is the model as given.
BASE = "base"

#: The columns of a results row, in file order.
COLUMNS = ("model", "variant", "joints", "members", "restraints", "mechanisms",
           "rigid_body_modes", "internal_mechanisms", "self_stress_states", "stable",
           "mechanism_kind", "mechanism", "seconds", "error", "warnings")

#: Suffix of the results file (lower case) -> format.
FORMATS = {".csv": "csv", ".jsonl": "jsonl"}

_VARIANT_KEYS = ("name", "remove_members", "add_members", "free_supports", "supports",
                 "move_joints")
_GENERATORS = ("each_member_removed", "each_support_freed")
_TOP_KEYS = ("base", "generate", "variant")


@dataclass(frozen=True)
class Variant:
    """Changes to a model, by id.

    Attributes
    ----------
    name : str
        Unique within a batch's variants; the ``variant`` column.
    remove_members : tuple of str
    add_members : tuple of (str, str, str)
        ``(id, end, end)`` of each member added.
    free_supports : tuple of str
        Joints whose every restraint is taken away.
    supports : tuple of (str, object)
        ``(joint, spec)``: the joint is held as ``spec`` says (a model's
        support code or direction vectors) instead of as the model holds it.
    move_joints : tuple of (str, tuple of float)
    source : str or None
        The variants file, for messages.
    line : int or None
        The line of the variant in ``source``.
    problem : str or None
        Why the variant cannot be built, found when it was generated (a tag
        selector that matches no member); :func:`apply_variant` raises it.
    """

    name: str
    remove_members: tuple = ()
    add_members: tuple = ()
    free_supports: tuple = ()
    supports: tuple = ()
    move_joints: tuple = ()
    source: str | None = None
    line: int | None = None
    problem: str | None = None


@dataclass(frozen=True)
class VariantSet:
    """A variants file, read: the base flag, the generators and the written variants.

    Attributes
    ----------
    base : bool
        Audit each model as given too.
    each_member_removed : bool, tuple of str or str
        False, True (every member), member ids, or a tag selector
        ``"<attribute>=<label>"``.
    each_support_freed : bool or tuple of str
        False, True (every supported joint) or joint ids.
    variants : tuple of Variant
    source : str or None
    lines : mapping of str to int
        The line of each generator's key in ``source``, for messages.
    """

    base: bool = True
    each_member_removed: object = False
    each_support_freed: object = False
    variants: tuple = ()
    source: str | None = None
    lines: dict = field(default_factory=dict)


@dataclass(frozen=True)
class Task:
    """One row to compute: a model file and a variant of it.

    ``model`` is the path as the user gave it (the ``model`` column and the
    resume key); ``path`` is its absolute form, which the worker reads.
    ``error`` set means the row is known to fail before any audit (the model
    could not be read to expand the variants).
    """

    model: str
    path: str
    variant: Variant = field(default_factory=lambda: Variant(BASE))
    error: str | None = None

    @property
    def key(self) -> tuple[str, str]:
        return (self.model, self.variant.name)


# ------------------------------------------------------------- variants file

def read_variants(path) -> VariantSet:
    """Read and check the structure of a variants file (see the module docstring).

    Parameters
    ----------
    path : str or os.PathLike

    Returns
    -------
    VariantSet

    Raises
    ------
    SpaceframeError
        For a file that cannot be read or is not TOML, an unknown key (with
        the nearest known one), a value of the wrong kind, a variant without a
        name, or two variants of one name; the message names the file, the
        line and the fix.  Ids are not checked here (see :func:`apply_variant`).
    """
    from .io.settings import read_settings
    from .io.sourcelines import SourceLines

    source = os.fspath(path)
    doc, text = read_settings(source, "variants")
    where = SourceLines(text)
    lines = where.tables(("variant",))
    _check_keys(doc, _TOP_KEYS, "the variants file", source, where, ())
    base = doc.get("base", True)
    if not isinstance(base, bool):
        raise ModelError(f"base must be true or false, not {base!r}", path=source,
                         line=where.line((), "base"))
    generate = doc.get("generate", {})
    gen_line = where.table(("generate",))
    if not isinstance(generate, dict):
        raise ModelError("generate must be a table [generate] of each_member_removed = true "
                         "and each_support_freed = true", path=source, line=gen_line)
    _check_keys(generate, _GENERATORS, "[generate]", source, where, ("generate",), line=gen_line)
    gen_lines = {key: where.line(("generate",), key) for key in _GENERATORS}
    gens = {key: _generator(generate.get(key, False), key, source, gen_lines[key])
            for key in _GENERATORS}
    raw = doc.get("variant", [])
    if not isinstance(raw, list) or not all(isinstance(v, dict) for v in raw):
        raise ModelError('variants are tables [[variant]], each with name = "..." and its '
                         'changes', path=source, line=where.line((), "variant"))
    variants, seen = [], {}
    for i, entry in enumerate(raw):
        line = lines[i] if i < len(lines) else None
        variants.append(_variant(entry, source, line, where, i + 1))
        name = variants[-1].name
        if name in seen or name == BASE:
            first = "the model as given" if name == BASE else f"line {seen[name]}"
            raise ModelError(f"variant name {name!r} is already used ({first}); give each "
                             f"variant its own name", path=source, line=line, item=name)
        seen[name] = line
    return VariantSet(base=base, variants=tuple(variants), source=source, lines=gen_lines,
                      **gens)


def _check_keys(table: dict, known, what: str, source, where, path: tuple, *, nth: int = 1,
                line: int | None = None) -> None:
    """Refuse a key not in ``known``, at its line (``where``: the file's SourceLines)."""
    for key in table:
        if key not in known:
            close = closest(key, known)
            hint = f"did you mean {close!r}?" if close else f"the keys are {', '.join(known)}"
            raise ModelError(f"unknown key {key!r} in {what}; {hint}", path=source,
                             line=where.line(path, key, nth=nth) or line)


def _generator(value, key: str, source, line):
    if isinstance(value, bool):
        return value
    if isinstance(value, list) and all(isinstance(v, str) for v in value):
        return tuple(value)
    if key == "each_member_removed" and isinstance(value, str) and "=" in value:
        return value
    what = ("true, a list of member ids, or a tag selector such as \"role=brace\""
            if key == "each_member_removed" else "true or a list of joint ids")
    raise ModelError(f"{key} takes {what}; not {value!r}", path=source, line=line)


def _variant(entry: dict, source, line, where, nth: int) -> Variant:
    def fail(message):
        return ModelError(message, path=source, line=line, item=entry.get("name"))

    name = entry.get("name")
    if not isinstance(name, str) or not name.strip():
        raise fail('a variant needs a name: name = "..." (text, not empty)')
    _check_keys(entry, _VARIANT_KEYS, f"variant {name!r}", source, where, ("variant",), nth=nth,
                line=line)

    def ids(key):
        value = entry.get(key, [])
        if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
            raise fail(f"variant {name!r}: {key} is a list of ids in quotes, e.g. "
                       f'{key} = ["A", "B"]; not {value!r}')
        return tuple(value)

    def table(key, example, check):
        value = entry.get(key, {})
        if not isinstance(value, dict) or not all(check(v) for v in value.values()):
            raise fail(f"variant {name!r}: {key} is a table of {example}; not {value!r}")
        return tuple(value.items())

    def numbers(v):
        return isinstance(v, list) and all(isinstance(x, (int, float)) and
                                           not isinstance(x, bool) for x in v)

    added = table("add_members", '{ id = ["end", "end"] }',
                  lambda v: isinstance(v, list) and len(v) == 2 and
                  all(isinstance(x, str) for x in v))
    return Variant(
        name=name, remove_members=ids("remove_members"),
        add_members=tuple((k, a, b) for k, (a, b) in added),
        free_supports=ids("free_supports"),
        supports=table("supports", '{ joint = "pin" } (a code or direction vectors)',
                       lambda v: isinstance(v, str) or
                       (isinstance(v, list) and all(numbers(r) for r in v))),
        move_joints=tuple((k, tuple(float(x) for x in v)) for k, v in
                          table("move_joints", "{ joint = [x, y, z] }", numbers)),
        source=source, line=line)


def expand(variants: VariantSet, frame: Frame) -> list[Variant]:
    """The variants of one model: the base, the written variants, then the generated ones.

    Parameters
    ----------
    variants : VariantSet
    frame : Frame
        The model; the generators run over its members and supported joints.

    Returns
    -------
    list of Variant
        Names are deterministic: ``base``, the written names, ``remove <member>``
        in the model's member order and ``free <joint>`` in its joint order.
        A generated name equal to a written one is left out (the written
        variant stands).

    Notes
    -----
    A tag selector that matches no member gives one variant named after the
    selector, which fails on the worker with a message saying so.
    """
    out = [Variant(BASE)] if variants.base else []
    out.extend(variants.variants)
    removed = variants.each_member_removed
    src = dict(source=variants.source, line=variants.lines.get("each_member_removed"))
    if removed is True:
        removed = frame.member_ids
    elif isinstance(removed, str):
        attr, _, label = removed.partition("=")
        labels = frame.member_tags.get(attr.strip(), ())
        chosen = tuple(m for m, lab in zip(frame.member_ids, labels) if lab == label.strip())
        if not chosen:
            known = sorted({f"{a}={lab}" for a, labs in frame.member_tags.items()
                            for lab in labs if lab})
            out.append(Variant(f"remove {removed}", **src, problem=(
                f"each_member_removed = {removed!r} matches no member of "
                f"{frame.source or 'the model'}; give a tag the model has"
                + (f", one of {', '.join(known[:8])}" if known else " (it has no member tags)")
                + ", or a list of member ids")))
        removed = chosen
    for mid in removed or ():
        out.append(Variant(f"remove {mid}", remove_members=(mid,), **src))
    freed = variants.each_support_freed
    if freed is True:
        held = set(frame.restraint_joint.tolist())
        freed = tuple(j for i, j in enumerate(frame.joint_ids) if i in held)
    src["line"] = variants.lines.get("each_support_freed")
    for jid in freed or ():
        out.append(Variant(f"free {jid}", free_supports=(jid,), **src))
    seen, result = set(), []
    for v in out:  # the first of a name stands: written variants come before generated ones
        if v.name not in seen:
            seen.add(v.name)
            result.append(v)
    return result


# ------------------------------------------------------------ building a variant

def apply_variant(frame: Frame, variant: Variant) -> Frame:
    """The frame with a variant's changes, checked like a model read from a file.

    Parameters
    ----------
    frame : Frame
    variant : Variant

    Returns
    -------
    Frame
        Named ``"<model name> [<variant>]"``; passed through
        :func:`~spaceframe.validation.check_frame`.

    Raises
    ------
    ModelError
        For an id the model does not have (with the nearest one), an added
        member whose id is taken, freeing a joint that has no support, moved
        coordinates of the wrong count, and what ``check_frame`` finds in the
        changed geometry.  The message names the variants file, the line and
        the variant.

    Notes
    -----
    Cost O(n + m) array work plus ``check_frame``.
    """
    from .supports import restraint_rows
    from .validation import check_frame

    if variant.name == BASE and variant == Variant(BASE):
        return frame

    def fail(message, item=None):
        return ModelError(f"variant {variant.name!r}: {message}", path=variant.source,
                          line=variant.line, item=item)

    if variant.problem is not None:
        raise fail(variant.problem)

    model = frame.source or "the model"
    jindex = {j: i for i, j in enumerate(frame.joint_ids)}
    mindex = {m: i for i, m in enumerate(frame.member_ids)}

    def joint(jid, key):
        if jid not in jindex:
            raise fail(f"{key} names joint {jid!r}, which is not in {model}; correct the id"
                       f"{did_you_mean(jid, jindex)}", jid)
        return jindex[jid]

    d = frame.dimension
    for jid, xyz in variant.move_joints:
        if len(xyz) != d:
            raise fail(f"move_joints gives joint {jid!r} {len(xyz)} coordinates; the model "
                       f"is {d}-dimensional, so give {d}", jid)
    moved = [joint(jid, "move_joints") for jid, _ in variant.move_joints]
    changed = edit.move_joints(frame, moved, [xyz for _, xyz in variant.move_joints])

    removed = []
    for mid in variant.remove_members:
        if mid not in mindex:
            raise fail(f"remove_members names member {mid!r}, which is not in {model}; "
                       f"correct the id{did_you_mean(mid, mindex)}", mid)
        removed.append(mindex[mid])
    for mid, a, b in variant.add_members:
        if mid in mindex:
            raise fail(f"add_members: member id {mid!r} is already in {model}; give the new "
                       f"member another id", mid)
    # added before the removal, with the same result (added members come after the kept
    # ones either way), so that their EA is the median of the model as given
    changed = edit.add_members(changed, [mid for mid, _, _ in variant.add_members],
                               [[joint(a, "add_members"), joint(b, "add_members")]
                                for _, a, b in variant.add_members])
    changed = edit.remove_members(changed, removed)

    held = set(frame.restraint_joint.tolist())
    freed = []
    for jid in variant.free_supports:
        j = joint(jid, "free_supports")
        if j not in held:
            raise fail(f"free_supports names joint {jid!r}, which has no support in {model}; "
                       f"name a supported joint", jid)
        freed.append(j)
    changed = edit.free_supports(changed, freed)
    changed = edit.set_supports(changed, {
        joint(jid, "supports"): restraint_rows(spec, d, joint=jid, path=variant.source,
                                               line=variant.line)
        for jid, spec in variant.supports})
    changed = dataclasses.replace(changed, name=f"{frame.name} [{variant.name}]")
    try:
        return check_frame(changed)
    except ModelError as exc:
        raise fail(f"the changed frame is not valid: {exc}") from None


# ---------------------------------------------------------------- on a worker

@lru_cache(maxsize=8)
def _load_cached(path: str, stamp: tuple) -> Frame:
    """A model read once per worker process (``stamp``: size and change time of the file)."""
    from .io import load
    from .selection import supports_for

    return supports_for(load(path), path)


def audit_task(task: Task) -> dict:
    """Build and audit one variant: the results row (see :data:`COLUMNS`).

    Runs on a worker.  It never raises for bad input: a
    :class:`~spaceframe.errors.SpaceframeError` becomes the row's ``error``,
    any other exception an ``internal error: ...`` there.
    """
    from .analysis.audit import audit

    start = time.perf_counter()
    if task.error is not None:
        return error_row(task, task.error)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", SpaceframeWarning)
        try:
            st = os.stat(task.path)
            frame = _load_cached(task.path, (st.st_size, st.st_mtime_ns))
            result = audit(apply_variant(frame, task.variant), self_stress_cap=0, soft=False,
                           redundancy=False)
        except FileNotFoundError:
            return error_row(task, f"{task.model}: no such file on the worker; workers must "
                                   f"see the same files as the client")
        except SpaceframeError as exc:
            return error_row(task, str(exc))
        except Exception as exc:  # a fault in spaceframe: reported in the row, batch goes on
            return error_row(task, f"internal error: {type(exc).__name__}: {exc}")
    first = result.mode_info[0] if result.mode_info else None
    kind = result.mode_kinds[0] if result.mode_kinds else ""
    if first is None and result.one_way is not None and result.one_way.info is not None:
        first, kind = result.one_way.info, "one-way"   # one-way members that go slack
    row = {"model": task.model, "variant": task.variant.name, "joints": result.joints,
           "members": result.members, "restraints": result.restraints,
           "mechanisms": result.mechanisms, "rigid_body_modes": result.rigid_body_modes,
           "internal_mechanisms": result.internal_mechanisms,
           "self_stress_states": result.self_stress_states, "stable": result.stable,
           "mechanism_kind": kind,
           "mechanism": first.description if first is not None else "",
           "seconds": round(time.perf_counter() - start, 4), "error": None,
           "warnings": " | ".join(str(w.message) for w in caught)}
    return row


def error_row(task: Task, message: str) -> dict:
    """The row of a task that failed: its key and the message, no counts (None)."""
    row = dict.fromkeys(COLUMNS)
    row.update(model=task.model, variant=task.variant.name, error=message)
    return row


# ------------------------------------------------------------- results file

class ResultsFile:
    """The results file, appended one flushed row at a time.

    Parameters
    ----------
    path : str or os.PathLike
        Ends in ``.csv`` or ``.jsonl``.
    resume : bool
        Continue an existing file: its rows are kept and their keys are in
        :attr:`done`.  A torn last line (a run killed while writing it) is
        cut off; a file with other columns is refused.
    force : bool
        Replace an existing file.
    inputs : iterable of path-like, optional
        The files the batch reads (models, the variants file): never written.

    Raises
    ------
    ModelError
        For another suffix, a path that is an input or a folder, or a file to
        resume that is not a results file of this format.
    OutputExistsError
        For an existing file without ``resume`` or ``force``.
    """

    def __init__(self, path, *, resume: bool = False, force: bool = False, inputs=()):
        self.path = self.check(path, resume=resume, force=force, inputs=inputs)
        self.format = FORMATS[Path(self.path).suffix.lower()]
        self.done: set[tuple[str, str]] = set()
        exists = os.path.exists(self.path)
        if exists and resume:
            self._read_done()
            self._file = open(self.path, "a", encoding="utf-8", newline="")
        else:
            self._file = open(self.path, "w", encoding="utf-8", newline="")
            if self.format == "csv":
                self._write(",".join(COLUMNS) + "\n")

    @staticmethod
    def check(path, *, resume: bool = False, force: bool = False, inputs=()) -> str:
        """Check, before any work, that the results may go to ``path`` (see the class).

        Returns the path as a string; raises as the class does.
        """
        return check_output(path, inputs=inputs, overwrite=resume or force, suffixes=FORMATS,
                            what="a results file (CSV or JSON lines)")

    def _read_done(self) -> None:
        with open(self.path, "rb") as f:
            data = f.read()
        cut = data.rfind(b"\n") + 1
        if cut < len(data):  # a torn last row: cut it off, it is written again
            with open(self.path, "r+b") as f:
                f.truncate(cut)
        try:
            text = data[:cut].decode("utf-8")
        except UnicodeDecodeError:
            raise ModelError("is not a results file of spaceframe batch (not UTF-8 text); "
                             "give another output name", path=self.path) from None
        if self.format == "csv":
            rows = list(csv.reader(io.StringIO(text)))
            if not rows:
                with open(self.path, "a", encoding="utf-8") as f:
                    f.write(",".join(COLUMNS) + "\n")
                return
            if tuple(rows[0]) != COLUMNS:
                raise ModelError("its first line is not the header of spaceframe batch results "
                                 f"({','.join(COLUMNS[:3])},...); resume only a file a batch "
                                 "wrote, or give another output name", path=self.path, line=1)
            self.done = {(r[0], r[1]) for r in rows[1:] if len(r) >= 2}
            return
        for n, line in enumerate(text.splitlines(), 1):
            try:
                row = json.loads(line)
                self.done.add((row["model"], row["variant"]))
            except (ValueError, KeyError, TypeError):
                raise ModelError("is not a JSON-lines file of spaceframe batch results (each "
                                 "line an object with model and variant); resume only a file a "
                                 "batch wrote, or give another output name", path=self.path,
                                 line=n) from None

    def _write(self, text: str) -> None:
        self._file.write(text)
        self._file.flush()

    def write(self, row: dict) -> None:
        """Append one row and flush it to the operating system."""
        if self.format == "jsonl":
            self._write(json.dumps({k: row[k] for k in COLUMNS}, allow_nan=False) + "\n")
        else:
            buf = io.StringIO()
            values = [("true" if v else "false") if isinstance(v, bool) else v
                      for v in (row[k] for k in COLUMNS)]
            csv.writer(buf, lineterminator="\n").writerow(values)
            self._write(buf.getvalue())
        self.done.add((row["model"], row["variant"]))

    def close(self) -> None:
        self._file.close()

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.close()


# ------------------------------------------------------------------- running

def local_cluster(workers: int):
    """A local Dask cluster of ``workers`` single-threaded processes, on 127.0.0.1 only."""
    LocalCluster = require("dask.distributed").LocalCluster

    return LocalCluster(n_workers=workers, threads_per_worker=1, processes=True,
                        host="127.0.0.1", dashboard_address=None)


def run_batch(tasks, results: ResultsFile, *, scheduler: str | None = None,
              workers: int = 1, on_row=None) -> int:
    """Audit every task on Dask and write each row as it completes.

    Parameters
    ----------
    tasks : sequence of Task
        Those to compute (already without the done ones).
    results : ResultsFile
    scheduler : str, optional
        Address of a running ``dask.distributed`` scheduler; by default a
        :func:`local_cluster` is started and closed again.
    workers : int
        Worker processes of the local cluster.
    on_row : callable, optional
        Called with each row after it is written (the progress display).

    Returns
    -------
    int
        Rows written.  A task whose worker died is a row with that error.

    Raises
    ------
    SpaceframeError
        When the scheduler cannot be reached.
    """
    distributed = require("dask.distributed")
    Client, as_completed = distributed.Client, distributed.as_completed

    tasks = list(tasks)
    if not tasks:
        return 0
    cluster = None
    try:
        if scheduler is None:
            cluster = local_cluster(workers)
            client = Client(cluster)
        else:
            try:
                client = Client(scheduler, timeout="10s")
            except (OSError, TimeoutError, ValueError) as exc:
                raise SpaceframeError(f"cannot reach a Dask scheduler at {scheduler} "
                                      f"({exc}); check the address "
                                      f"(tcp://HOST:PORT) and that the scheduler is "
                                      f"running") from None
        try:
            futures = [client.submit(audit_task, t, pure=False) for t in tasks]
            task_of = {f.key: t for f, t in zip(futures, tasks)}
            written = 0
            for future in as_completed(futures):
                try:
                    row = future.result()
                except Exception as exc:  # the worker died or the task was lost
                    row = error_row(task_of[future.key],
                                    f"the worker failed: {type(exc).__name__}: {exc}")
                results.write(row)
                written += 1
                future.release()
                if on_row is not None:
                    on_row(row)
            return written
        finally:
            client.close()
    finally:
        if cluster is not None:
            cluster.close()
