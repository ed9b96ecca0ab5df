"""``spaceframe convert IN -o OUT``: any model the readers take, written as a native file."""

from __future__ import annotations

import click

from .common import debug_option, force_option, model_argument, run_guarded, supports_option

__all__ = ["convert_command"]


@click.command("convert")
@model_argument
@click.option("-o", "--output", required=True, type=click.Path(path_type=str),
              help="The native model file to write (.toml or .json).")
@supports_option
@force_option
@debug_option
def convert_command(model, output, supports, force, debug):
    """Read MODEL (native, mesh, line, CSV or drawing file) and write it as a native model
    file that can be edited, with the supports of its sidecar file and of --supports.
    """
    def job():
        from .. import load
        from ..io import WRITERS, save
        from ..io.output import check_output
        from ..selection import supports_for

        check_output(output, inputs=(model,), overwrite=force, suffixes=WRITERS,
                     what="a model")
        frame = supports_for(load(model), model, supports)
        save(frame, output, overwrite=force, inputs=(model,))
        click.echo(f"wrote {output}: {frame.n_joints} joints, {frame.n_members} members, "
                   f"{frame.n_restraints} restraints")

    run_guarded(job, debug=debug)
