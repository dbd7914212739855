"""The options several commands share, and the steel a command line can give instead of a file.

Nothing of the library is imported here but how numbers are written (readout): ``isokin --help``
reads every option, and the library loads only inside a command.
"""

from __future__ import annotations

import functools
import inspect
from enum import Enum
from pathlib import Path
from typing import Annotated, Optional

import typer

from ..errors import InputError
from ..readout import format_temperature


class FigureFormat(str, Enum):
    png = "png"
    svg = "svg"
    pdf = "pdf"


class Units(str, Enum):
    C = "C"
    F = "F"


def in_units(t_c: float, units: Units) -> str:
    """A temperature for a printed table, in the units of --units."""
    return format_temperature(t_c, units.value)


def decimal_number(text: str) -> float:
    """Option values: plain decimal numbers only (not 0_4, infinity, nan or other scripts' digits)."""
    from ..io.schema import parse_number

    value = parse_number(text)
    if value is None:
        raise typer.BadParameter(f"must be a plain finite decimal number such as 0.5 or 850, got {text!r}")
    return value


def duration(text: str, option: str) -> float:
    """Seconds from a duration as typed (90s, 30min, 2h, 1.5d or seconds); one line naming the option otherwise."""
    from ..io.schema import parse_duration

    value = parse_duration(text)
    if value is None:
        raise InputError(None, option, f"{text!r} is not a duration; write e.g. 90s, 30min, 2h, 1.5d or seconds")
    return value


def whole_number(text: str) -> int:
    from ..io.schema import parse_number

    value = parse_number(text, integer=True)
    if value is None:
        raise typer.BadParameter(f"must be a whole number such as 200, got {text!r}")
    return value


def hardness_target(hv_text, hrc_text):
    """Target hardness, HV: one value or the two ends of a range, from --target-hv or --target-hrc."""
    if hv_text is not None and hrc_text is not None:
        raise InputError(None, "--target-hv", "give --target-hv or --target-hrc, not both")
    text, option = (hv_text, "--target-hv") if hv_text is not None else (hrc_text, "--target-hrc")
    if text is None:
        return None
    from ..io.schema import parse_number

    values = [parse_number(part) for part in text.split(":")]
    if not 1 <= len(values) <= 2 or None in values:
        raise InputError(None, option, f"{text!r} is not a hardness or a range LOW:HIGH, e.g. 32 or 30:34")
    if option == "--target-hrc":
        if not all(20.0 <= v <= 68.0 for v in values):
            raise InputError(None, option, "Rockwell C hardness must lie from 20 to 68; give softer targets in HV")
        from ..relations.hardness import hv_from_hrc_astm_e140

        values = [float(hv_from_hrc_astm_e140(v)) for v in values]
    return sorted(values)



class Inline:
    """The steel options of a command line: --composition and what goes with it, --kinetics."""

    def __init__(self, composition=None, grain_size=None, austenitizing_c=None, ms_method=None, bs_method=None,
                 kinetics=None, calibration=None, name=None):
        self.composition, self.grain_size, self.austenitizing_c = composition, grain_size, austenitizing_c
        self.ms_method, self.bs_method, self.kinetics = ms_method, bs_method, kinetics
        self.calibration, self.name = calibration, name

    def given(self):
        """The options given that only go with --composition."""
        return {k: v for k, v in (("--grain-size", self.grain_size), ("--austenitizing-c", self.austenitizing_c),
                                  ("--ms-method", self.ms_method), ("--bs-method", self.bs_method),
                                  ("--calibration", self.calibration), ("--name", self.name)) if v is not None}


AlloyArg = Annotated[
    Optional[Path],
    typer.Argument(metavar="ALLOY.toml", help="Alloy file (TOML). Leave out when giving --composition.",
                   show_default=False),
]
CompositionOpt = Annotated[
    Optional[str],
    typer.Option("--composition", metavar="EL=MASS%,...",
                 help='Steel heat analysis in mass %, e.g. "C=0.79,Mn=0.76,Si=0.25".'),
]
GrainOpt = Annotated[
    Optional[float],
    typer.Option("--grain-size", parser=decimal_number, metavar="NUMBER", help="ASTM austenite grain size number, with --composition (default 7)."),
]
AustenitizingOpt = Annotated[
    Optional[float],
    typer.Option("--austenitizing-c", parser=decimal_number, metavar="NUMBER", help="Austenitizing temperature, °C, with --composition (warns below Ae3)."),
]
MsMethodOpt = Annotated[
    Optional[str],
    typer.Option("--ms-method", metavar="METHOD", help="Ms correlation with --composition: van_bohemen_2012 (default, the most "
                 "accurate on measured data), andrews_1965, andrews_1965_product or steven_haynes_1956."),
]
BsMethodOpt = Annotated[
    Optional[str],
    typer.Option("--bs-method", metavar="METHOD", help="Bs line with --composition: van_bohemen_2012 (default), steven_haynes_1956, "
                 "kirkaldy_venugopalan_1984 or li_1998."),
]
KineticsOpt = Annotated[
    Optional[str],
    typer.Option("--kinetics", metavar="MODEL", help="Steel kinetics: kirkaldy_venugopalan_1984 (default) or li_1998; with an alloy "
                 "file it replaces the file's choice."),
]
CalibrationOpt = Annotated[
    Optional[Path],
    typer.Option("--calibration", metavar="FILE", help="A calibrated alloy file (from isokin fit) whose fitted kinetics to apply "
                 "to the --composition heat.", show_default=False),
]
NameOpt = Annotated[
    Optional[str],
    typer.Option("--name", metavar="NAME", help="Name of the heat, with --composition; also names the output files."),
]
#: The options of a steel given on the command line, in the order --help lists them.
_STEEL_OPTIONS = (("composition", CompositionOpt), ("grain_size", GrainOpt), ("austenitizing_c", AustenitizingOpt),
                  ("ms_method", MsMethodOpt), ("bs_method", BsMethodOpt), ("kinetics", KineticsOpt),
                  ("calibration", CalibrationOpt), ("name", NameOpt))


def steel_options(command):
    """Give a command the options of a steel on the command line (see :data:`_STEEL_OPTIONS`),
    after its alloy file; the command receives them as one ``inline`` argument."""
    signature = inspect.signature(command, eval_str=True)
    params = [p for p in signature.parameters.values() if p.name != "inline"]
    extra = [inspect.Parameter(name, inspect.Parameter.POSITIONAL_OR_KEYWORD, default=None, annotation=kind)
             for name, kind in _STEEL_OPTIONS]

    @functools.wraps(command)
    def with_options(**kwargs):
        return command(inline=Inline(**{name: kwargs.pop(name) for name, _ in _STEEL_OPTIONS}), **kwargs)

    with_options.__signature__ = signature.replace(parameters=[params[0], *extra, *params[1:]])
    with_options.__annotations__ = {p.name: p.annotation for p in with_options.__signature__.parameters.values()}
    return with_options


UnitsOpt = Annotated[Units, typer.Option("--units", metavar="C|F", help="Temperatures of the figure and printed tables: C or F "
                                          "(files keep °C).")]
OutOpt = Annotated[Path, typer.Option("--out", metavar="FOLDER", help="Folder for the output files.")]
FormatOpt = Annotated[FigureFormat, typer.Option("--format", metavar="png|svg|pdf", help="Figure file type.")]
OverwriteOpt = Annotated[bool, typer.Option("--overwrite", metavar="",
                                            help="Replace output files that already exist.")]
RangeOpt = Annotated[Optional[str], typer.Option("--range", metavar="EL=MIN:MAX,...",
                     help='Composition range, mass %, e.g. "C=0.38:0.43,Mn=0.75:1.00" (or EL=NOMINAL+-SIGMA).')]
SamplesOpt = Annotated[Optional[int], typer.Option("--samples", parser=whole_number, metavar="N",
                       help="Heats sampled over the range (Latin hypercube): spread 2 to 10,000 (default "
                            "2,000), plan --worst-case 2 to 256 (default 64).")]
SeedOpt = Annotated[Optional[int], typer.Option("--seed", parser=whole_number, metavar="N",
                    help="Seed of the sampling (default 0): the same seed gives the same heats.")]


# --- The options of a heat-treatment route, shared by ``plan`` and ``sheet`` ---------------------
MaxHoldOpt = Annotated[Optional[str], typer.Option("--max-hold", metavar="DURATION",
                       help="Austemper: the longest hold the line allows (default 4h).")]
BudgetOpt = Annotated[Optional[str], typer.Option("--budget", metavar="DURATION",
                      help="Anneal: the time budget of the hold (default 8h).")]
GoalOpt = Annotated[Optional[str], typer.Option("--goal", metavar="soft|shortest",
                    help="Anneal: recommend the softest structure (the hottest hold that transforms all the "
                         "austenite in the budget; the default) or the shortest cycle.")]
MarginOpt = Annotated[Optional[float], typer.Option("--margin-k", parser=decimal_number, metavar="NUMBER",
                      help="Austemper, interrupted quench: keep hold temperatures this far above Ms, 0 to 500 K "
                           "(default 20 and 10).")]
SafetyOpt = Annotated[Optional[float], typer.Option("--safety", parser=decimal_number, metavar="NUMBER",
                      help="Hold routes: safety factor on the model's times, 1 to 100 (austemper 1.5, interrupted "
                           "quench 2, anneal 1.5).")]
TargetHvOpt = Annotated[Optional[str], typer.Option("--target-hv", metavar="HV[:HV]",
                        help="Austemper: recommend the temperature closest to this hardness, HV. Quench and temper: "
                             "the hardness after tempering, a value or a range such as 300:340.")]
TargetHrcOpt = Annotated[Optional[str], typer.Option("--target-hrc", metavar="HRC[:HRC]",
                         help="As --target-hv, in Rockwell C (e.g. 30:34).")]
CurveOpt = Annotated[Optional[Path], typer.Option("--curve", metavar="FILE", show_default=False,
                     help="Quench and temper: the grade's measured tempering curve (CSV, as for isokin temper).")]
TemperTimeOpt = Annotated[Optional[str], typer.Option("--temper-time", metavar="DURATION",
                          help="Quench and temper: the tempering time (default 2h).")]
QuenchRateOpt = Annotated[Optional[float], typer.Option("--quench-rate", parser=decimal_number, metavar="K_PER_S",
                          help="Quench and temper: the quench as a constant rate, K/s, to check it hardens the part "
                               "(without it the part is taken as fully hardened).")]
AllowEmbrittlementOpt = Annotated[bool, typer.Option("--allow-embrittlement", metavar="",
                                  help="Quench and temper: let tempers in the embrittlement range (250-400 °C) "
                                       "count.")]
WorstCaseOpt = Annotated[bool, typer.Option("--worst-case", metavar="",
                         help="Hold routes: plan on every sampled heat of the composition range (the file's "
                              "composition_range table, or --range), not the nominal.")]
