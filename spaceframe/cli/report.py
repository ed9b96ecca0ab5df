"""``spaceframe report MODEL -o report.html``: the audit as one self-contained HTML page."""

from __future__ import annotations

import click

from .common import (chords_option, debug_option, force_option, model_argument, run_guarded,
                     supports_option)

__all__ = ["report_command"]


@click.command("report")
@model_argument
@click.option("-o", "--output", "out", required=True, metavar="OUT.html",
              help="The HTML file to write.")
@click.option("--bracing/--no-bracing", default=True, show_default=True,
              help="For a frame with mechanisms, include the bracing proposal of "
                   "`spaceframe brace` (default candidates) and the audit after it, with the "
                   "robust proposal (`brace --robust`) beside it.")
@chords_option
@click.option("--restraint-fraction", "fraction", type=float, default=None, metavar="F",
              help="With load cases: add the restraint-force case (F x each compressed "
                   "chord's compression at its restraint points, 0 < F < 1) to the forces "
                   "view; see `spaceframe restraints --fraction`.")
@supports_option
@force_option
@debug_option
def report_command(model, out, bracing, chords, fraction, supports, force, debug):
    """Write the audit of MODEL as one HTML file: the verdict, the counts and what they
    mean, the mechanisms and states of self-stress, the key members, the cautions, and a
    3D view (turn, move, zoom, click to name a joint or member, choose a mode to see it
    move; and, for a frame with mechanisms, the proposed bracing with the audit after
    it; and, for a model with load cases, a case selector colouring the members by force;
    and the chords coloured by their unrestrained lengths, with their restraint points).
    The file needs no network and no other file.

    Exit status 0 when the report is written, whatever the verdict; 2 for bad input.
    """
    def job():
        from .. import audit, load
        from ..io.output import check_output, write_text
        from ..selection import supports_for
        from ..views.report import render_report

        path = check_output(out, inputs=(model,), overwrite=force, suffixes=(".html", ".htm"),
                            what="a report")
        frame = supports_for(load(model), model, supports)
        result = audit(frame)
        proposal = robust = None
        if bracing and not result.stable:
            from ..analysis.bracing import recommend_bracing
            proposal = recommend_bracing(frame)
            robust = recommend_bracing(frame, robust=True)
        loads = None
        if frame.loads is not None:
            from .. import forces
            loads = forces(frame)
        from ..analysis.restraints import restraints
        held = restraints(frame, chords=chords, fraction=fraction, audit=result, forces=loads)
        write_text(path, render_report(result, proposal, loads, held, robust=robust),
                   overwrite=force)
        click.echo(f"spaceframe: wrote {path}", err=True)

    run_guarded(job, debug=debug)
