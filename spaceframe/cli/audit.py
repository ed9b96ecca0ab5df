"""``spaceframe audit MODEL``: counts, mechanisms, self-stress and a verdict."""

from __future__ import annotations

import sys

import click

from ..tolerances import DEFAULT
from .common import (chords_option, debug_option, json_option, model_argument,
                     reading_options, run_guarded, supports_option)

__all__ = ["audit_command"]

EXIT_HELD = 0
EXIT_MECHANISM = 1


@click.command("audit")
@model_argument
@json_option
@click.option("--self-stress", "self_stress", default="16", show_default=True, metavar="N|all",
              help="How many states of self-stress to compute and list (their number is "
                   "always exact).")
@click.option("--method", type=click.Choice(["auto", "dense", "sparse"]), default="auto",
              show_default=True, help="Rank engine: dense SVD for small frames, sparse for large.")
@click.option("--all", "show_all", is_flag=True, help="List every mode and state in the text.")
@click.option("--redundancy/--no-redundancy", default=None,
              help="Compute every member's redundancy share (default: where it is cheap, up "
                   f"to {DEFAULT.limits.redundancy_auto:,} free coordinates).")
@click.option("--soft/--no-soft", default=None,
              help="Look for soft modes (held, but only just: a second factorisation; "
                   f"default: up to {DEFAULT.limits.soft_auto:,} free coordinates).")
@click.option("--continuous-chords", "continuous", is_flag=True,
              help="Also say whether the frame is held once its chords (straight chains of "
                   "members) are read as continuous through their joints, with the longest "
                   "unrestrained lengths (see `spaceframe restraints`).")
@chords_option
@supports_option
@reading_options
@debug_option
def audit_command(model, as_json, self_stress, method, show_all, redundancy, soft, continuous,
                  chords, supports, reading, debug):
    """Audit the stability of the frame in MODEL (.toml or .json; or imported geometry:
    .stl, .obj, .ply, .off, .glb, .gltf, .dxf, .svg, .ifc, a ...joints.csv/...members.csv
    pair).

    Exit status: 0 when the frame is held (no mechanism), 1 when mechanisms are
    found (also when continuous chords would hold them), 2 for bad input or usage.
    """
    def job():
        from .. import audit, load
        from ..errors import SpaceframeError
        from ..views.text import render_audit

        if self_stress == "all":
            cap = sys.maxsize
        else:
            try:
                cap = int(self_stress)
                if cap < 0:
                    raise ValueError
            except ValueError:
                raise SpaceframeError(f"--self-stress takes a whole number >= 0 or 'all', "
                                      f"not {self_stress!r}") from None
        from ..selection import supports_for
        frame = supports_for(load(model, **reading), model, supports)
        if chords is not None and not continuous:
            raise SpaceframeError("--chords chooses the chords of --continuous-chords; give "
                                  "both, or leave --chords out")
        result = audit(frame, self_stress_cap=cap, method=method, redundancy=redundancy,
                       soft=soft)
        held = None
        if continuous:
            from ..analysis.restraints import restraints
            held = restraints(frame, chords=chords, audit=result, compression=False)
        if as_json:
            from ..jsonstream import chunks
            doc = result.document()          # its mechanisms made one at a time as written
            if held is not None:
                from ..views.restraints_text import continuous_verdict
                doc["continuous_chords"] = dict(held.summary(), verdict=continuous_verdict(held))
            pieces = []
            for piece in chunks(doc, indent=1, allow_nan=False):
                pieces.append(piece)
                if len(pieces) >= 4096:
                    click.echo("".join(pieces), nl=False)
                    pieces.clear()
            click.echo("".join(pieces))
        else:
            many = sys.maxsize if show_all else 8
            text = render_audit(result, max_modes=many,
                                max_entries=sys.maxsize if show_all else 6)
            if held is not None:
                from ..views.restraints_text import render_continuous
                text += render_continuous(held, most=sys.maxsize if show_all else 6)
            click.echo(text, nl=False)
        return result

    result = run_guarded(job, debug=debug)
    sys.exit(EXIT_HELD if result.stable else EXIT_MECHANISM)
