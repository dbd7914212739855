"""The typer application: every command, in the order ``isokin --help`` lists them."""

from __future__ import annotations

import typer

from .. import __version__
from ..readout import CAUTION
from .cooling import cct, cool
from .diagram import check, diagram
from .fit import fit
from .hold import hold
from .plan import plan
from .section import jominy, section
from .sheet import sheet
from .spread import compare, spread
from .temper import temper

app = typer.Typer(
    add_completion=False,
    no_args_is_help=True,
    help="isokin: isothermal transformation (TTT) diagrams from nucleation and growth kinetics, "
    "for heat-treatment planning. " + CAUTION,
)

for _command in (diagram, check, hold, cct, cool, section, jominy, plan, temper, sheet, fit, spread, compare):
    app.command()(_command)


@app.command()
def version():
    """Print the isokin version."""
    typer.echo(__version__)
