"""The ``spaceframe`` command: one group, one module per subcommand.

Library errors become clean messages and exit status 2 here, at the boundary
only; ``--debug`` shows the traceback instead.
"""

from __future__ import annotations

import click

from .. import __version__
__all__ = ["main"]


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="spaceframe")
def main():
    """Stability audit of pin-jointed frames: is the frame, as it will stand, held in every
    direction?

    Idealised pin-jointed model only; results must be checked by a competent engineer
    against the codes in force.
    """


from .animate import animate_command  # noqa: E402
from .audit import audit_command  # noqa: E402  (subcommands register on the group)
from .batch import batch_command  # noqa: E402
from .brace import brace_command  # noqa: E402
from .convert import convert_command  # noqa: E402
from .extrude import extrude_command  # noqa: E402
from .forces import forces_command  # noqa: E402
from .report import report_command  # noqa: E402
from .restraints import restraints_command  # noqa: E402
from .view import view_command  # noqa: E402

main.add_command(audit_command)
main.add_command(extrude_command)
main.add_command(convert_command)
main.add_command(animate_command)
main.add_command(report_command)
main.add_command(view_command)
main.add_command(brace_command)
main.add_command(batch_command)
main.add_command(forces_command)
main.add_command(restraints_command)
