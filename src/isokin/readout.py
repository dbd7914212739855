"""How results are written for people: durations and the cautions every output carries."""

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
