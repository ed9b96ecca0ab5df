"""``spaceframe extrude PLANAR SPEC -o MODEL``: a plane frame repeated, tied and braced in 3D."""

from __future__ import annotations

import click

from .common import MODEL_PATH, debug_option, force_option, reading_options, run_guarded

__all__ = ["extrude_command"]


@click.command("extrude")
@click.argument("planar", type=MODEL_PATH)
@click.argument("spec", type=MODEL_PATH)
@click.option("-o", "--output", required=True, type=click.Path(path_type=str),
              help="The 3D model file to write (.toml or .json).")
@reading_options
@force_option
@debug_option
def extrude_command(planar, spec, output, reading, force, debug):
    """Repeat the plane frame in PLANAR (a dimension = 2 model file, or a DXF/SVG drawing)
    along a building as the extrusion SPEC (TOML) says, and write the 3D model.

    Ids of the output say frame and planar id (F3.U2); every joint and member is tagged
    with its group, role, frame and bay.
    """
    def job():
        from ..extrude import extrude
        from ..io import WRITERS, save
        from ..io.output import check_output

        check_output(output, inputs=(planar, spec), overwrite=force, suffixes=WRITERS,
                     what="a model")
        frame = extrude(planar, spec, reading=reading)
        save(frame, output, overwrite=force, inputs=(planar, spec))
        click.echo(f"wrote {output}: {frame.n_joints} joints, {frame.n_members} members, "
                   f"{frame.n_restraints} restraints")

    run_guarded(job, debug=debug)
