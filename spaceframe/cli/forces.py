"""``spaceframe forces MODEL``: member forces and reactions under the model's load cases."""

from __future__ import annotations

import json
import sys

import click

from .common import (debug_option, force_option, json_option, model_argument, run_guarded,
                     supports_option)

__all__ = ["forces_command"]

EXIT_CARRIED = 0
EXIT_NOT_CARRIED = 1


@click.command("forces")
@model_argument
@click.option("--case", "cases", multiple=True, metavar="NAME",
              help="Solve only this case or combination (repeatable; default every case).")
@json_option
@click.option("--csv", "csv_path", type=click.Path(dir_okay=False, path_type=str), metavar="FILE",
              help="Also write case,member,force,state rows (carried cases) to FILE.")
@click.option("--all", "show_all", is_flag=True, help="List every member and support in the text.")
@supports_option
@force_option
@debug_option
def forces_command(model, cases, as_json, csv_path, show_all, supports, force, debug):
    """Member forces (+ tension, - compression) and support reactions of the frame in MODEL
    under its load cases ([loads.NAME] tables), combinations, self-weight and notional loads.

    Exit status: 0 when every case is carried, 1 when some load acts on a mechanism (its
    forces are not given), 2 for bad input or usage.
    """
    def job():
        from .. import forces, load
        from ..io.output import check_output, write_text
        from ..selection import supports_for
        from ..views.forces_text import forces_csv, render_forces

        if csv_path is not None:
            check_output(csv_path, inputs=(model,), overwrite=force, suffixes=(".csv",),
                         what="the forces table")
        frame = supports_for(load(model), model, supports)
        result = forces(frame, list(cases) or None)
        if csv_path is not None:
            write_text(csv_path, forces_csv(result), overwrite=force)
        if as_json:
            click.echo(json.dumps(result.to_dict(), indent=1, allow_nan=False))
        else:
            click.echo(render_forces(result, max_rows=sys.maxsize if show_all else 10), nl=False)
        return result

    result = run_guarded(job, debug=debug)
    sys.exit(EXIT_CARRIED if result.all_carried else EXIT_NOT_CARRIED)
