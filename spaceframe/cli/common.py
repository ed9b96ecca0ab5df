"""What every subcommand shares: the boundary between the library and the command line.

- :func:`run_guarded` is the one place where library errors become exit
  statuses and messages: a :class:`~spaceframe.errors.SpaceframeError` (bad
  input, a missing extra) exits 2, an
  :class:`~spaceframe.errors.InternalError` or any other exception exits 3.
  Library messages speak of the library's arguments; an
  :class:`~spaceframe.errors.OutputExistsError` is given in the library's
  neutral words ("allow replacing it", whatever argument the caller named)
  followed by the command's own option (``--force``, or for a batch
  ``--resume``/``--force``).
- The options and arguments several subcommands take are defined once below,
  each as a click decorator; a new shared option is one more decorator here,
  applied to the commands that take it.
"""

from __future__ import annotations

import functools
import sys
import warnings

import click

from ..errors import InternalError, OutputExistsError, SpaceframeError, SpaceframeWarning

__all__ = ["run_guarded", "MODEL_PATH", "model_argument", "json_option", "force_option",
           "quiet_option", "debug_option", "supports_option", "chords_option", "reading_options",
           "REPLACE_HINT",
           "EXIT_BAD_INPUT", "EXIT_INTERNAL"]

EXIT_BAD_INPUT = 2
EXIT_INTERNAL = 3

#: What the command line adds to an OutputExistsError: the option that replaces the file.
REPLACE_HINT = "give --force to replace it"

#: A model path as the readers take it: a file, or a folder holding a CSV pair.
MODEL_PATH = click.Path(dir_okay=True, path_type=str)

model_argument = click.argument("model", type=MODEL_PATH)

json_option = click.option("--json", "as_json", is_flag=True,
                           help="Print one JSON document on stdout (warnings go to stderr).")

force_option = click.option("--force", is_flag=True,
                            help="Replace the output file if it exists (never an input file).")

quiet_option = click.option("--quiet", is_flag=True,
                            help="No progress display (nor a summary line where the command "
                                 "prints one).")

debug_option = click.option("--debug", is_flag=True,
                            help="Show the Python traceback of an error.")

supports_option = click.option(
    "--supports", "supports", multiple=True, metavar="RULE",
    help="A support rule 'HELD at WHERE', e.g. 'pin at z = min' or 'y at x = 0 within 10' "
         "(repeatable; applied after the model's own supports and its sidecar "
         "<model>.supports.toml).")

chords_option = click.option(
    "--chords", "chords", default=None, metavar="TAG=VALUE",
    help="Make chords only of the members with this tag label, e.g. 'role=chord' (labels "
         "joined by commas: 'role=chord,tie'); default every member.")


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


def run_guarded(job, *, debug: bool = False, replace_hint: str = REPLACE_HINT):
    """Run ``job()`` with warnings sent to stderr and errors turned into exit codes.

    Parameters
    ----------
    job : callable
        The command's work; its return value is returned.
    debug : bool
        Let every error through with its traceback instead.
    replace_hint : str
        Appended to the message of an :class:`OutputExistsError`: the options
        of this command that let the file be written.

    Notes
    -----
    A :class:`SpaceframeError` prints ``spaceframe: error: <message>`` and
    exits 2.  An :class:`InternalError` prints the stage that failed, what
    was computed before it, and how to report it, and exits 3; so does any
    other exception (a bug).
    """
    def show(message, category, filename, lineno, file=None, line=None):
        click.echo(f"spaceframe: warning: {message}", err=True)

    old = warnings.showwarning
    warnings.showwarning = show
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("always", SpaceframeWarning)
            return job()
    except SpaceframeError as exc:
        if debug:
            raise
        if isinstance(exc, OutputExistsError):  # in the library's own words, then the option
            message = f"{OutputExistsError(exc.path)}; {replace_hint}"
        else:
            message = str(exc)
        click.echo(f"spaceframe: error: {message}", err=True)
        sys.exit(EXIT_BAD_INPUT)
    except (KeyboardInterrupt, click.exceptions.Exit, click.ClickException, SystemExit):
        raise
    except Exception as exc:  # our fault, not the user's
        if debug:
            raise
        click.echo(internal_message(exc), err=True)
        sys.exit(EXIT_INTERNAL)
    finally:
        warnings.showwarning = old


def internal_message(exc: Exception) -> str:
    """The message of exit status 3: what failed, that the input is not to blame, what to do."""
    if isinstance(exc, InternalError):
        lines = [f"spaceframe: internal error at the {exc.stage} stage: {exc}"]
        if exc.partial:
            lines.append("  Computed before the failure: " + ", ".join(
                f"{name.replace('_', ' ')} {_short(value)}" for name, value in exc.partial.items()))
    else:
        lines = [f"spaceframe: internal error: {type(exc).__name__}: {exc}"]
    lines.append("  This is a fault in spaceframe, not in your model: the model was read and "
                 "is valid as far as the checks go.")
    lines.append("  To report it: rerun the same command with --debug and send the traceback "
                 "together with the model file (and any sidecar or variants file) to the "
                 "spaceframe maintainers.")
    return "\n".join(lines)


def _short(value) -> str:
    """A partial result in a few characters: numbers as they are, arrays by their shape."""
    shape = getattr(value, "shape", None)
    if shape is not None and len(shape):
        return "array of shape " + "x".join(map(str, shape))
    if isinstance(value, float):
        return f"{value:.6g}"
    return str(value)
