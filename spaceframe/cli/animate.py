"""``spaceframe animate MODEL -o OUT``: a mechanism in motion, or a state of self-stress."""

from __future__ import annotations

from pathlib import Path

import click

from .common import (debug_option, force_option, model_argument, quiet_option, run_guarded,
                     supports_option)

__all__ = ["animate_command"]

SUFFIXES = (".gif", ".mp4", ".png")


@click.command("animate")
@model_argument
@click.option("-o", "--output", "out", required=True, metavar="OUT",
              help="Picture to write: .gif (looping), .mp4, or .png (a sheet at most 1,600 px wide: "
                   "each mode's caption once above its poses, the legend once at the foot; "
                   "modes that pass 4,800 px in height go on more sheets, OUT-modes-A-B.png).")
@click.option("--mode", "mode", type=int, default=None, metavar="K",
              help="The mechanism to show, numbered from 1 in the order the audit lists them "
                   "(default 1).")
@click.option("--all", "every", is_flag=True,
              help="Every mechanism in turn (in a PNG, each its own block of poses).")
@click.option("--one-way", "one_way", is_flag=True,
              help="Show how a frame with one-way members (rods, props) moves when they go "
                   "slack: out and back on one side only.")
@click.option("--state", "state", type=int, default=None, metavar="K",
              help="Draw state of self-stress K instead (a still .png): members coloured by force.")
@click.option("--forces", "case", default=None, metavar="CASE",
              help="Draw the member forces of load case CASE instead (a still .png): members "
                   "coloured by force, arrows for loads and reactions.")
@click.option("--frames", "n", type=click.IntRange(2, 240), default=None,
              help="Poses per cycle (default 24 for .gif/.mp4, 6 for .png), starting at the "
                   "largest movement. Use an even number: with an odd one two poses in a row "
                   "are the same, and a GIF merges them.")
@click.option("--fps", type=click.FloatRange(1, 60), default=12.0, show_default=True,
              help="Poses per second of a .gif or .mp4.")
@click.option("--size", default="800x480", show_default=True, metavar="WxH",
              help="Picture size in pixels.")
@quiet_option
@supports_option
@force_option
@debug_option
def animate_command(model, out, mode, every, one_way, state, case, n, fps, size, quiet, supports,
                    force, debug):
    """Show how the frame in MODEL can move: one mechanism (or each) drawn through a full
    cycle, the frame at rest ghosted behind, supports as stalks with plates (one per
    direction held), the mode's description as the caption.

    A frame with no mechanism is drawn once, at rest. Exit status 0 when the picture is
    written, 2 for bad input or usage.
    """
    def job():
        from .. import audit, load
        from ..errors import SpaceframeError
        from ..io.output import check_output
        from ..naming import count as counted
        from ..selection import supports_for
        from ..views.progress import progress
        from ..views.render import (mode_frames, plan_sheets, state_picture, write_frames,
                                    write_sheets)

        if sum(x is not None and x is not False
               for x in (mode, state, every or None, one_way or None, case)) > 1:
            raise SpaceframeError("give one of --mode K, --all, --one-way, --state K and "
                                  "--forces CASE")
        wh = _size(size)
        path = Path(check_output(out, inputs=(model,), overwrite=force, suffixes=SUFFIXES,
                                 what="a picture"))
        frame = supports_for(load(model), model, supports)
        if case is not None:
            from .. import forces
            from ..views.forces_render import forces_picture

            if path.suffix.lower() != ".png":
                raise SpaceframeError("a forces picture is a still: write it to a .png")
            result = forces(frame, [case])
            write_frames([[forces_picture(result, 0, size=wh)]], path)
            return
        result = audit(frame)
        if state is not None:
            if path.suffix.lower() != ".png":
                raise SpaceframeError("a state of self-stress is a still: write it to a .png")
            if result.self_stress_states == 0:
                raise SpaceframeError("the frame has no state of self-stress to draw")
            write_frames([[state_picture(result, state - 1, size=wh)]], path)
            return
        count = result.mechanisms
        if one_way:
            w = result.one_way
            if w is None or w.motion is None:
                raise SpaceframeError(
                    "--one-way: the model has no one-way members (tag them with "
                    "[tags.members.carries])" if w is None else
                    "--one-way: the one-way members hold the frame; nothing moves that way"
                    if w.held else "--one-way: the frame has mechanisms even with every member "
                                   "carrying both ways; show them with --mode or --all")
            modes, poses = [count], n or (6 if path.suffix.lower() == ".png" else 24)
        else:
            if mode is not None and not 1 <= mode <= max(count, 1):
                raise SpaceframeError(f"--mode {mode}: the audit found "
                                      f"{counted(count, 'mechanism')}; "
                                      f"give a number from 1 to {count}" if count else
                                      f"--mode {mode}: the frame has no mechanism")
            if count == 0:
                click.echo("spaceframe: the frame is held (no mechanism): drawing it at rest.",
                           err=True)
                modes, poses = [None], 1
            else:
                modes = list(range(count)) if every else [(mode or 1) - 1]
                poses = n or (6 if path.suffix.lower() == ".png" else 24)
        if path.suffix.lower() == ".png":
            plan = plan_sheets(result, modes, path, n=poses, size=wh)
            for other in (p for p in plan.paths if p != path):    # every sheet, before work
                check_output(other, inputs=(model,), overwrite=force, suffixes=SUFFIXES,
                             what="a picture")
            with progress(len(modes) * poses, f"rendering {path.name}", quiet=quiet) as step:
                written = write_sheets(result, plan, on_frame=step)
            if not quiet:
                click.echo(_sheets_written(plan, written, count), err=True)
            return
        rows = []
        with progress(len(modes) * poses, f"rendering {path.name}", quiet=quiet) as step:
            for k in modes:
                rows.append(mode_frames(result, k, n=poses, size=wh, on_frame=step))
        write_frames(rows, path, fps=fps)

    run_guarded(job, debug=debug)


def _sheets_written(plan, written, mechanisms: int) -> str:
    """What ``animate`` wrote to PNG: the sheet, or each sheet with the modes on it."""
    from ..naming import count
    from ..views.render import SHEET_HEIGHT

    def which(group):
        if group[0] >= mechanisms:           # after the mechanisms: the one-way motion
            return "the one-way motion"
        a, b = group[0] + 1, group[-1] + 1
        return f"mode {a}" if a == b else f"modes {a}-{b}"

    w, h = plan.pose_size
    if plan.groups == ((None,),):
        return f"spaceframe: wrote {written[0]} (the frame at rest, {w}x{h} px)."
    each = f"{count(plan.poses, 'pose')} of {w}x{h} px"
    if len(written) == 1:
        return f"spaceframe: wrote {written[0]} ({which(plan.groups[0])}: {each} each)."
    lines = [f"spaceframe: wrote {len(written)} sheets ({each} a mode; at most "
             f"{SHEET_HEIGHT:,} px high each, so the modes are split):"]
    lines += [f"  {p}  ({which(g)})" for p, g in zip(written, plan.groups)]
    return "\n".join(lines)


def _size(text: str) -> tuple[int, int]:
    from ..errors import SpaceframeError

    try:
        w, h = (int(v) for v in text.lower().split("x"))
    except ValueError:
        raise SpaceframeError(f"--size takes WIDTHxHEIGHT in pixels, e.g. 800x480, "
                              f"not {text!r}") from None
    if not (320 <= w <= 3840 and 240 <= h <= 2160):
        raise SpaceframeError(f"--size {text}: width 320 to 3840 and height 240 to 2160 pixels")
    return w, h
