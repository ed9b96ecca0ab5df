"""``spaceframe restraints MODEL``: chords, restraint points, unrestrained lengths, restraint forces."""

from __future__ import annotations

import json
import sys

import click

from .common import (chords_option, debug_option, json_option, model_argument, run_guarded,
                     supports_option)

__all__ = ["restraints_command"]

EXIT_HELD = 0
EXIT_NOT_HELD = 1


@click.command("restraints")
@model_argument
@chords_option
@click.option("--case", "cases", multiple=True, metavar="NAME",
              help="Give the chords' compression under this case or combination only "
                   "(repeatable; default every case the model has).")
@click.option("--fraction", type=float, default=None, metavar="F",
              help="Restraint forces: at each restraint point of a compressed chord a sideways "
                   "force F x the chord's compression there (0 < F < 1; the share is set by the "
                   "codes in force), solved as one load case.")
@json_option
@click.option("--all", "show_all", is_flag=True, help="List every chord in the text.")
@supports_option
@debug_option
def restraints_command(model, chords, cases, fraction, as_json, show_all, supports, debug):
    """Chords of the frame in MODEL (straight chains of members through joints), their
    restraint points (joints no mechanism moves sideways), the unrestrained lengths between
    them, whether the frame is held once its chords are read as continuous, and, with load
    cases, the chords in compression and (with --fraction) the restraint forces.

    Exit status: 0 when the frame is held, pin-jointed or with continuous chords; 1 when it
    is not held even so; 2 for bad input or usage.
    """
    def job():
        from .. import load, restraints
        from ..selection import supports_for
        from ..views.restraints_text import render_restraints

        frame = supports_for(load(model), model, supports)
        result = restraints(frame, chords=chords, cases=list(cases) or None, fraction=fraction)
        if as_json:
            click.echo(json.dumps(result.to_dict(), indent=1, allow_nan=False))
        else:
            many = sys.maxsize if show_all else None
            click.echo(render_restraints(result, max_rows=many or 12, max_details=many or 4),
                       nl=False)
        return result

    result = run_guarded(job, debug=debug)
    sys.exit(EXIT_HELD if result.held_with_continuous_chords else EXIT_NOT_HELD)
