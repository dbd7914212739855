"""The error a user sees: one line naming the file, the key, what is wrong and what is right."""

import operator
import re

#: Control characters (newlines included) never reach the terminal raw: a message stays one line.
_CONTROL = re.compile(r"[\x00-\x1f\x7f-\x9f\u2028\u2029]")


def one_line(text) -> str:
    """``text`` with control characters written as escapes, so that it prints as one line.

    >>> one_line("a\\nb")
    'a\\\\nb'
    """
    return _CONTROL.sub(lambda m: m.group().encode("unicode_escape").decode("ascii"), str(text))


class InputError(Exception):
    """Bad input from the user: shown as one line, exit code 2.

    The library names keys as the alloy file does (``composition``, ``steel.grain_size_astm``);
    a caller that took the value from elsewhere (a command-line option) names its own key
    with :meth:`relocated`.
    """

    def __init__(self, source, key, problem):
        self.source, self.key, self.problem = source, key, problem
        where = f"{source}: " if source else ""
        at = f"{key}: " if key else ""
        super().__init__(one_line(f"{where}{at}{problem}"))

    def relocated(self, source=None, keys=None):
        """The same error, from ``source`` and with the key renamed through ``keys``."""
        key = (keys or {}).get(self.key, self.key)
        return InputError(source if source is not None else self.source, key, self.problem)


def whole_number(key, value, low=0, high=None) -> int:
    """``value`` as an int (an int or a numpy integer, never a float) from ``low`` to ``high``;
    InputError naming ``key`` otherwise.

    >>> whole_number("seed", 3)
    3
    """
    try:
        number = operator.index(value)
    except TypeError:
        number = None
    if number is None or number < low or (high is not None and number > high):
        span = f"from {low} to {high}" if high is not None else f"of {low} or more"
        raise InputError(None, key, f"must be a whole number {span}, got {value!r}")
    return number
