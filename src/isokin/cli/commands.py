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

class _Command(typer.core.TyperCommand):
    """A command whose help shows no Python type names: the --help flag takes no value, and an
    argument is shown by its placeholder alone (ALLOY.toml)."""

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        for param in self.params:
            if param.param_type_name == "argument" and param.metavar:
                param.display_type_rich = lambda ctx: ""

    def get_help_option(self, ctx):
        option = super().get_help_option(ctx)
        if option is not None:
            option.metavar = ""
        return option


class _Group(typer.core.TyperGroup):
    def get_help_option(self, ctx):
        option = super().get_help_option(ctx)
        if option is not None:
            option.metavar = ""
        return option


app = typer.Typer(
    cls=_Group,
    add_completion=False,
    no_args_is_help=True,
    help="isokin: isothermal transformation (TTT) diagrams from nucleation and growth kinetics, "
    "for heat-treatment planning. " + CAUTION,
)

for _command in (diagram, check, hold, cct, cool, section, jominy, plan, temper, sheet, fit, spread, compare):
    app.command(cls=_Command)(_command)


@app.command(cls=_Command)
def version():
    """Print the isokin version."""
    typer.echo(__version__)
