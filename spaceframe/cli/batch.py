"""``spaceframe batch MODEL... -o RESULTS``: many models, or variants of them, on Dask."""

from __future__ import annotations

import os
import sys

import click

from .common import debug_option, force_option, quiet_option, run_guarded

__all__ = ["batch_command"]

EXIT_WRITTEN = 0


def _default_workers() -> int:
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # not on Linux
        return max(1, os.cpu_count() or 1)


def _tasks(models, variants_path):
    """Every (model, variant) task of the batch, in a deterministic order."""
    from ..batch import BASE, Task, Variant, expand, read_variants
    from ..errors import SpaceframeError

    variants = read_variants(variants_path) if variants_path else None
    tasks = []
    for model in models:
        path = os.path.abspath(model)
        if variants is None:
            tasks.append(Task(model, path))
            continue
        from ..io import load
        from ..selection import supports_for
        try:
            frame = supports_for(load(model), model)
        except SpaceframeError as exc:  # the model's one row says why
            tasks.append(Task(model, path, Variant(BASE), error=str(exc)))
            continue
        tasks.extend(Task(model, path, v) for v in expand(variants, frame))
    unique = {}
    for t in tasks:  # a model given twice is audited once
        unique.setdefault(t.key, t)
    return list(unique.values())


@click.command("batch")
@click.argument("models", nargs=-1, type=click.Path(dir_okay=False, path_type=str))
@click.option("-o", "--output", "output", required=True, metavar="RESULTS",
              help="Results file: .csv, or .jsonl for JSON lines; one row per (model, variant), "
                   "appended as each completes.")
@click.option("--variants", "variants_path", metavar="FILE", type=click.Path(path_type=str),
              help="A variants TOML file (see the README, 'Batches'); each of its variants is "
                   "audited for every MODEL.")
@click.option("--scheduler", metavar="ADDRESS",
              help="Address of a running Dask scheduler, e.g. tcp://127.0.0.1:8786 (default: "
                   "start a local cluster on 127.0.0.1).")
@click.option("--workers", type=int, metavar="N",
              help="Worker processes of the local cluster (default: one per CPU).")
@click.option("--resume", is_flag=True,
              help="Continue an existing results file: skip every (model, variant) in it.")
@quiet_option
@force_option
@debug_option
def batch_command(models, output, variants_path, scheduler, workers, resume, quiet, force,
                  debug):
    """Audit every MODEL (or each variant of it, with --variants) in parallel on Dask, one
    results row per (model, variant).

    A variant that cannot be built or audited is a row with its error; the batch goes on.
    Exit status: 0 when every row was written (whatever the verdicts), 2 for bad arguments.
    """
    def job():
        from .._optional import require
        from ..batch import ResultsFile, run_batch
        from ..errors import ModelError, SpaceframeError
        from ..views.progress import progress

        if not models:
            raise SpaceframeError("give at least one model file, e.g. "
                                  "spaceframe batch roof.toml --variants roof_variants.toml "
                                  "-o results.csv")
        if resume and force:
            raise SpaceframeError("--resume keeps the results file and --force replaces it; "
                                  "give one of them")
        if scheduler and workers is not None:
            raise SpaceframeError("--workers sets the size of the local cluster; with "
                                  "--scheduler the scheduler's own workers are used, so leave "
                                  "--workers out")
        if workers is not None and workers < 1:
            raise SpaceframeError(f"--workers takes a whole number >= 1, not {workers}")
        for model in models:
            if not os.path.isfile(model):
                raise ModelError("no such model file; check the path and its spelling",
                                 path=model)
        require("dask.distributed")  # a missing extra is reported before any file is written
        inputs = (*models, variants_path)
        ResultsFile.check(output, resume=resume, force=force, inputs=inputs)
        tasks = _tasks(models, variants_path)
        with ResultsFile(output, resume=resume, force=force, inputs=inputs) as results:
            todo = [t for t in tasks if t.key not in results.done]
            skipped = len(tasks) - len(todo)
            counts = {"held": 0, "mechanisms": 0, "errors": 0}

            with progress(len(todo), "Auditing variants", quiet=quiet) as step:
                def on_row(row):
                    counts["errors" if row["error"] else
                           "held" if row["stable"] else "mechanisms"] += 1
                    step()

                written = run_batch(todo, results, scheduler=scheduler,
                                    workers=workers or min(_default_workers(), len(todo) or 1),
                                    on_row=on_row)
        if not quiet:
            click.echo(f"spaceframe: {written} rows written to {output} ({counts['held']} held, "
                       f"{counts['mechanisms']} with mechanisms, {counts['errors']} errors)"
                       + (f"; {skipped} already there, skipped" if skipped else ""), err=True)
        return written

    run_guarded(job, debug=debug,
                replace_hint="give --resume to continue it, or --force to replace it")
    sys.exit(EXIT_WRITTEN)
