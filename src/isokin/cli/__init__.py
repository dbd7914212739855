"""Command line: thin wrappers that read input, call the library and report.

No physics and no defaults of its own here. Bad input ends with one line on stderr and exit
code 2. A module per command or family of commands; :mod:`.runner` is the sequence they all
follow and :mod:`.options` the options they share. The library is imported inside each
command, so ``isokin --help`` and ``isokin version`` start fast.
"""

from __future__ import annotations

import signal
import sys

import typer

from .. import __version__
from ..readout import CAUTION
from . import cooling, diagram, fit, hold, plan, spread
from .status import status

app = typer.Typer(
    add_completion=False,
    no_args_is_help=True,
    help="isokin: isothermal transformation (TTT) diagrams from nucleation and growth kinetics, "
    "for heat-treatment planning. " + CAUTION,
)

# in the order --help lists them
for _command in (diagram.diagram, diagram.check, hold.hold, cooling.cct, cooling.cool, plan.plan, fit.fit,
                 spread.spread, spread.compare):
    app.command()(_command)


@app.command()
def version():
    """Print the isokin version."""
    typer.echo(__version__)


def _terminated(signum, frame):
    # unwinds like an exception, so that temporary files are cleaned up on the way out
    raise SystemExit(128 + signum)


def main():
    """Entry point: a usage error (unknown option, wrong type, value out of range) ends with one line too."""
    signal.signal(signal.SIGTERM, _terminated)
    status.restart()
    try:
        code = app(standalone_mode=False)
    except KeyboardInterrupt:
        typer.echo("isokin: interrupted; nothing more was written", err=True)
        sys.exit(130)
    except Exception as exc:
        # click-style usage errors, whichever click copy typer carries: exit code 2 and a message
        if getattr(exc, "exit_code", None) != 2 or not hasattr(exc, "format_message"):
            raise
        command = exc.ctx.command_path if getattr(exc, "ctx", None) else "isokin"
        typer.echo(f"isokin: error: {exc.format_message()} (see: {command} --help)", err=True)
        sys.exit(2)
    sys.exit(code if isinstance(code, int) else 0)
