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


# --- numbers within bounds: one check per kind of value (added for the cooling paths, issue 19) ---------


def real_number(value):
    """``value`` as a float where it is one real number (an int, a float or a numpy scalar; not a
    bool, a string, an array of several or an int beyond any float), else None.

    >>> real_number(3), real_number("3"), real_number(True)
    (3.0, None, None)
    """
    import numbers

    if isinstance(value, bool) or not (isinstance(value, numbers.Real) or getattr(value, "ndim", None) == 0):
        return None
    try:
        return float(value)
    except (TypeError, ValueError, OverflowError):
        return None


class Bounds:
    """A kind of number and the range it may take, said once: ``rule`` completes "<key> ...".

    The same instance checks one value (:meth:`check`) and whole arrays (:meth:`outside`),
    so a command-line option, an API argument and a row of a file meet one rule.

    >>> rate = Bounds(1e-4, 1e7, "must be a cooling rate from 1e-4 to 1e7 K/s", unit="K/s")
    >>> rate.check("rate_K_s", 10)
    10.0
    >>> rate.check("rate_K_s", 0)
    Traceback (most recent call last):
    ...
    isokin.errors.InputError: rate_K_s: must be a cooling rate from 1e-4 to 1e7 K/s, got 0.0 K/s
    """

    def __init__(self, low, high, rule, *, unit="", low_open=False):
        self.low, self.high, self.rule, self.unit, self.low_open = low, high, rule, unit, low_open

    def outside(self, values):
        """Where ``values`` (numbers, any shape) break the rule: NaN and infinities always do."""
        import numpy as np

        v = np.asarray(values, dtype=float)
        with np.errstate(invalid="ignore"):
            inside = ((v > self.low) if self.low_open else (v >= self.low)) & (v <= self.high)
        return ~inside

    def check(self, key, value) -> float:
        """``value`` as a float inside the range; InputError naming ``key`` otherwise."""
        number = real_number(value)
        if number is None or bool(self.outside(number)):
            raise InputError(None, key, f"{self.rule}, got {value!r:.40}" if number is None else
                             f"{self.rule}, got {number!r}{' ' if self.unit else ''}{self.unit}")
        return number
