"""What every subcommand shares: error handling, warnings to stderr, shared options."""

from __future__ import annotations

import functools
import sys
import warnings

import click

from ..errors import OutputExistsError, SpaceframeError, SpaceframeWarning

__all__ = ["run_guarded", "debug_option", "force_option", "supports_option", "reading_options",
           "EXIT_BAD_INPUT", "EXIT_INTERNAL"]

EXIT_BAD_INPUT = 2
EXIT_INTERNAL = 3

debug_option = click.option("--debug", is_flag=True,
                            help="Show the Python traceback of an error.")

force_option = click.option("--force", is_flag=True,
                            help="Replace the output file if it exists (never an input file).")

supports_option = click.option(
    "--supports", "supports", multiple=True, metavar="RULE",
    help="A support rule 'HELD at WHERE', e.g. 'pin at z = min' or 'y at x = 0 within 10' "
         "(repeatable; applied after the model's own supports and its sidecar "
         "<model>.supports.toml).")


def reading_options(command):
    """``--units``, ``--layers``, ``--merge`` and ``--no-split``, passed on as ``reading``.

    The command receives one keyword ``reading``: a dict of the options given
    (None for those not given), for :func:`spaceframe.io.load`.
    """
    from ..model import UNITS

    @functools.wraps(command)          # keeps the options already attached to the command
    def with_reading(*args, units, layers, merge, no_split, **kw):
        names = [n.strip() for value in layers for n in value.split(",") if n.strip()]
        return command(*args, reading={"units": units, "layers": names or None,
                                       "merge": merge, "split": False if no_split else None},
                       **kw)
    for option in reversed([
            click.option("--units", type=click.Choice(UNITS), default=None,
                         help="Unit of length of a file that carries none (STL, OBJ, PLY, OFF, "
                              "a drawing without units); default m."),
            click.option("--layers", multiple=True, metavar="NAME[,NAME]",
                         help="Only the lines on these layers (DXF) or groups, colours or "
                              "classes (SVG) are members."),
            click.option("--merge", type=float, default=None, metavar="DISTANCE",
                         help="Line or axis ends closer than this (model units) are one joint "
                              "(drawings, IFC building models)."),
            click.option("--no-split", "no_split", is_flag=True,
                         help="Do not split a line where another line's end lies on it "
                              "(T-junctions in drawings and IFC models).")]):
        with_reading = option(with_reading)
    return with_reading


def run_guarded(job, *, debug: bool = False):
    """Run ``job()`` with warnings sent to stderr and errors turned into exit codes.

    A :class:`SpaceframeError` prints ``spaceframe: error: <message>`` and
    exits 2; any other exception is an internal error (exit 3) with a request
    to report it.  With ``debug`` both show their traceback.
    """
    def show(message, category, filename, lineno, file=None, line=None):
        text = str(message)
        click.echo(f"spaceframe: warning: {text}", err=True)

    old = warnings.showwarning
    warnings.showwarning = show
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("always", SpaceframeWarning)
            return job()
    except SpaceframeError as exc:
        if debug:
            raise
        with_flag = " with --force" if isinstance(exc, OutputExistsError) and not exc.option else ""
        click.echo(f"spaceframe: error: {exc}{with_flag}", err=True)
        sys.exit(EXIT_BAD_INPUT)
    except (KeyboardInterrupt, click.exceptions.Exit, click.ClickException, SystemExit):
        raise
    except Exception as exc:  # a bug, not the user's fault
        if debug:
            raise
        click.echo(f"spaceframe: internal error: {type(exc).__name__}: {exc}\n"
                   f"  This is a fault in spaceframe, not in your model. Rerun with --debug and "
                   f"report the traceback with the model file.", err=True)
        sys.exit(EXIT_INTERNAL)
    finally:
        warnings.showwarning = old
