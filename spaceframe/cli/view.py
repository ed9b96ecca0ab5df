"""``spaceframe view MODEL``: an interactive window on the frame and its mechanisms."""

from __future__ import annotations

import os

import click

from .common import debug_option, model_argument, run_guarded, supports_option

__all__ = ["view_command"]


@click.command("view")
@model_argument
@click.option("--bracing/--no-bracing", default=True, show_default=True,
              help="For a frame with mechanisms, offer the bracing proposal as a switch.")
@supports_option
@debug_option
def view_command(model, bracing, supports, debug):
    """Open a window on the frame in MODEL: turn it with the mouse, choose a mechanism and
    play it, set the amplitude, colour a state of self-stress, show the proposed bracing,
    and click near a joint to name it and the nearest member.

    Needs a display; on a machine without one, use `spaceframe report` or `animate`.
    """
    def job():
        from .. import audit, load
        from ..errors import SpaceframeError
        from ..selection import supports_for
        from ..views.desktop import DeskViewer

        if not (os.environ.get("DISPLAY") or os.environ.get("WAYLAND_DISPLAY")):
            raise SpaceframeError("spaceframe view needs a display (none is set here); on a "
                                  "machine without one, `spaceframe report MODEL -o "
                                  "report.html` gives the same view in a browser")
        frame = supports_for(load(model), model, supports)
        result = audit(frame)
        proposal = None
        if bracing and not result.stable:
            from ..analysis.bracing import recommend_bracing
            proposal = recommend_bracing(frame, forces=False)
        DeskViewer(result, proposal).show()

    run_guarded(job, debug=debug)
