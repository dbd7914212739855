"""Command line: thin wrappers that read input, call the library and report.

No physics and no defaults of its own here. Bad input ends with one line on stderr and exit
code 2. A module per command or family of commands; :mod:`.runner` is the sequence they all
follow, :mod:`.options` the options they share and :mod:`.commands` the typer application. The
library is imported inside each command, so ``isokin --help`` starts fast, and ``isokin
version`` answers before the command-line framework loads.
"""

from __future__ import annotations

import signal
import sys

from .. import __version__


def __getattr__(name):
    # the typer application is built on first use: ``isokin version`` answers without it
    if name == "app":
        from .commands import app

        return app
    raise AttributeError(f"module 'isokin.cli' has no attribute {name!r}")


def _terminated(signum, frame):
    # unwinds like an exception, so that temporary files are cleaned up on the way out
    raise SystemExit(128 + signum)


def main():
    """Entry point: a usage error (unknown option, wrong type, value out of range) ends with one line too."""
    if sys.argv[1:] == ["version"]:  # the one command that needs no command-line framework
        print(__version__)
        sys.exit(0)
    import typer

    from .commands import app
    from .status import status

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
        message = exc.format_message().strip() or "give a command, e.g. isokin diagram alloys/aisi-1080-eutectoid.toml"
        typer.echo(f"isokin: error: {message} (see: {command} --help)", err=True)
        sys.exit(2)
    sys.exit(code if isinstance(code, int) else 0)
