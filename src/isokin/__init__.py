"""isokin: isothermal transformation (TTT) diagrams from nucleation and growth kinetics.

The public API, the same functions the command line calls::

    import isokin
    alloy = isokin.load_alloy("alloys/aisi-4140-crmo.toml")   # or isokin.steel({"C": 0.4, ...}, 7.0)
    result = isokin.ttt(alloy)
    result.to_frame()          # product, fraction, temperature_C, time_s
    isokin.plot_ttt(result)    # draws into a matplotlib Axes and returns it

Names are imported on first use, so ``import isokin`` stays cheap.
"""

import importlib

__version__ = "0.2.0"

_EXPORTS = {
    "load_alloy": "isokin.io.alloy_file",
    "steel": "isokin.products.steel",
    "Calibration": "isokin.products.steel",
    "load_calibration": "isokin.io.steel_file",
    "Alloy": "isokin.products.alloy",
    "ttt": "isokin.compute.ttt",
    "hold": "isokin.compute.decomposition",
    "cool": "isokin.compute.cooling",
    "cct": "isokin.compute.cooling",
    "constant_rate": "isokin.compute.cooling",
    "newtonian": "isokin.compute.cooling",
    "newtonian_section": "isokin.compute.cooling",
    "measured": "isokin.compute.cooling",
    "section": "isokin.compute.section",
    "jominy": "isokin.compute.section",
    "ThermalProperties": "isokin.compute.section",
    "SectionResult": "isokin.results",
    "JominyResult": "isokin.results",
    "read_cooling_log": "isokin.io.tables",
    "austemper": "isokin.compute.plan",
    "interrupted_quench": "isokin.compute.plan",
    "anneal": "isokin.compute.plan",
    "PlanResult": "isokin.results",
    "temper": "isokin.compute.temper",
    "temper_for_hardness": "isokin.compute.temper",
    "tempering_curve": "isokin.compute.temper",
    "equivalent_time": "isokin.compute.temper",
    "read_tempering_curve": "isokin.io.tables",
    "TemperResult": "isokin.results",
    "fit": "isokin.compute.fit",
    "spread": "isokin.compute.spread",
    "SpreadResult": "isokin.results",
    "read_measurements": "isokin.io.measurements",
    "TTTResult": "isokin.results",
    "HoldResult": "isokin.results",
    "CoolingResult": "isokin.results",
    "CCTResult": "isokin.results",
    "plot_ttt": "isokin.plot.ttt",
    "process_sheet": "isokin.plot.sheet",
    "InputError": "isokin.errors",
}
__all__ = ["__version__", *_EXPORTS]


def __getattr__(name):
    if name in _EXPORTS:
        value = getattr(importlib.import_module(_EXPORTS[name]), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'isokin' has no attribute {name!r}")


def __dir__():
    return sorted(set(globals()) | set(_EXPORTS))
