"""``spaceframe convert IN -o OUT``: any model the readers take, written as a native file."""

from __future__ import annotations

import click

from .common import (debug_option, force_option, model_argument, reading_options,
                     run_guarded,
                     supports_option)

__all__ = ["convert_command"]


@click.command("convert")
@model_argument
@click.option("-o", "--output", required=True, type=click.Path(path_type=str),
              help="The model file to write (.toml, .json, .npz or .ifc).")
@supports_option
@reading_options
@force_option
@debug_option
def convert_command(model, output, supports, reading, force, debug):
    """Read MODEL (native, mesh, line, CSV, drawing or IFC file) and write it as a model
    file that can be edited (or as an IFC structural analysis model), in the units it was
    read in, with the supports of its sidecar file and of --supports.
    """
    def job():
        from .. import load
        from ..io import WRITERS, save
        from ..io.output import check_output
        from ..selection import supports_for

        check_output(output, inputs=(model,), overwrite=force, suffixes=WRITERS,
                     what="a model")
        frame = supports_for(load(model, **reading), model, supports)
        save(frame, output, overwrite=force, inputs=(model,))
        click.echo(f"wrote {output}: {frame.n_joints} joints, {frame.n_members} members, "
                   f"{frame.n_restraints} restraints; lengths in {frame.units}")

    run_guarded(job, debug=debug)
