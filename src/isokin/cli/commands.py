"""The typer application: every command, in the order ``isokin --help`` lists them."""

from __future__ import annotations

import typer

from .. import __version__
from ..readout import CAUTION
from . import cooling, diagram, fit, hold, plan, spread

app = typer.Typer(
    add_completion=False,
    no_args_is_help=True,
    help="isokin: isothermal transformation (TTT) diagrams from nucleation and growth kinetics, "
    "for heat-treatment planning. " + CAUTION,
)

for _command in (diagram.diagram, diagram.check, hold.hold, cooling.cct, cooling.cool, plan.plan, fit.fit,
                 spread.spread, spread.compare):
    app.command()(_command)


@app.command()
def version():
    """Print the isokin version."""
    typer.echo(__version__)
