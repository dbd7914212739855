"""How results are written for people: durations, temperatures and the cautions every output carries."""

from .constants import celsius_to_fahrenheit, kelvin_to_celsius

#: The full caution: CLI help and the end of every command's output.
CAUTION = (
    "Estimates only. Confirm with dilatometry or a trial heat treatment before production. Molten salt, "
    "hot oil and quench tanks are hazards: follow the applicable heat-treatment specifications, local "
    "codes and a qualified metallurgist's sign-off for safety-critical parts."
)
#: The one-line caution for figure footers and file summaries.
CAUTION_SHORT = (
    "Estimate only: confirm by dilatometry or trial heat treatment before production; "
    "follow the applicable specifications and local codes."
)


def format_duration(t_s):
    """A time in the unit a planner reads it in: s, min, h or days.

    >>> format_duration(12.2), format_duration(465.0), format_duration(9000.0)
    ('12.2 s', '7.75 min', '2.5 h')
    """
    if t_s < 1e-3:
        return f"{t_s:.2g} s"
    if t_s < 100:
        return f"{t_s:.3g} s"
    if t_s < 5400:
        return f"{t_s / 60:.3g} min"
    if t_s < 172800:
        return f"{t_s / 3600:.3g} h"
    return f"{t_s / 86400:.3g} d"


def format_temperature(t_c, units="C"):
    """A temperature for a printed table, in °C or (``units="F"``) °F.

    >>> format_temperature(450.0), format_temperature(450.0, "F")
    ('450.0 °C', '842.0 °F')
    """
    return f"{celsius_to_fahrenheit(t_c) if units == 'F' else t_c:.1f} °{units}"


def format_austenite_left(carbon, martensite_start_K, units="C"):
    """The carbon and Ms of the austenite left at the end of a hold or cooling path.

    >>> format_austenite_left(0.571, 541.65)
    '0.57 % C, Ms 268.5 °C'
    """
    return f"{float(carbon):.2f} % C, Ms {format_temperature(float(kelvin_to_celsius(martensite_start_K)), units)}"
