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


class InputError(ValueError):
    """Bad input from the user: shown as one line, exit code 2 (a ValueError, for callers that
    catch those).

    The library names keys as the alloy file does (``composition``, ``steel.grain_size_astm``);
    a caller that took the value from elsewhere (a command-line option) names its own key
    with :meth:`relocated`. ``got``, where given, is the value refused as (number, unit),
    written after the problem, so that a caller that took it in another unit can say it in
    that unit.
    """

    def __init__(self, source, key, problem, got=None):
        self.source, self.key, self.problem, self.got = source, key, problem, got
        where = f"{source}: " if source else ""
        at = f"{key}: " if key else ""
        shown = f", got {got[0]:g} {got[1]}" if got is not None else ""
        super().__init__(one_line(f"{where}{at}{problem}{shown}"))

    def relocated(self, source=None, keys=None):
        """The same error, from ``source`` and with the key renamed through ``keys``: a name,
        or (name, unit, units per the library's unit) for a value the caller took in another
        unit (``"size_m": ("--size-mm", "mm", 1000.0)``).

        >>> InputError(None, "size_m", "must be positive", got=(-0.005, "m")).relocated(
        ...     keys={"size_m": ("--size-mm", "mm", 1000.0)}).args[0]
        '--size-mm: must be positive, got -5 mm'
        """
        key, got = (keys or {}).get(self.key, self.key), self.got
        if isinstance(key, tuple):
            key, unit, scale = key
            got = None if got is None else (got[0] * scale, unit)
        return InputError(source if source is not None else self.source, key, self.problem, got)


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


# --- Shared validators: one per kind of value. The library checks its arguments with these,
# so the API and the command line refuse a value with the same line (the command line only
# renames the key to its option). Each returns the value as the library uses it.

#: Longest name (of an alloy, a heat, a product), characters.
NAME_LIMIT = 120


def _bounds_text(low, high, low_open, high_open, unit):
    parts = [f"{'above' if low_open else 'at least'} {low:g}"] if low is not None else []
    parts += [f"{'below' if high_open else 'at most'} {high:g}"] if high is not None else []
    return " and ".join(parts) + (f" {unit}" if unit and parts else "")


def numbers(key, value, low=None, high=None, *, low_open=False, high_open=False, unit="", source=None,
            _what="finite numbers"):
    """``value`` (a number, a list or an array of them, not text or booleans, not empty) as a
    float array, every element finite and within the bounds; InputError naming ``key`` otherwise.

    >>> numbers("time_s", [1, 2.5], low=0, low_open=True).tolist()
    [1.0, 2.5]
    """
    import numpy as np

    span = _bounds_text(low, high, low_open, high_open, unit)
    wanted = _what + (f" {span}" if span else "")
    try:
        given = np.asarray(value)
    except (TypeError, ValueError, OverflowError):  # e.g. ragged lists
        raise InputError(source, key, f"must be {wanted}, got {_shown(value)}") from None
    if given.dtype.kind == "O":  # a table column of mixed cells: the first that is not a number is named
        odd = [v for v in given.flat if isinstance(v, (bool, np.bool_)) or not isinstance(v, (int, float, np.number))]
        if odd:
            raise InputError(source, key, f"must be {wanted}, got {_shown(odd[0])}")
        try:
            given = given.astype(float)
        except OverflowError:  # an int beyond any float
            raise InputError(source, key, f"must be {wanted}, got {_shown(value)}") from None
    if given.dtype.kind not in "iuf":
        raise InputError(source, key, f"must be {wanted}, got {_shown(value)}")
    array = given.astype(float)
    if array.size == 0:
        raise InputError(source, key, f"is empty; give {wanted}")
    bad = ~np.isfinite(array)
    if low is not None:
        bad |= (array <= low) if low_open else (array < low)
    if high is not None:
        bad |= (array >= high) if high_open else (array > high)
    if bad.any():
        raise InputError(source, key, f"must be {wanted}, got {array[bad].flat[0]:g}")
    return array


def number(key, value, low=None, high=None, *, low_open=False, high_open=False, unit="", source=None) -> float:
    """One finite number within the bounds, as a float (see :func:`numbers`).

    >>> number("margin_K", 20, low=0, high=500)
    20.0
    """
    import numpy as np

    if not isinstance(value, (str, bytes)) and np.ndim(value) != 0:
        span = _bounds_text(low, high, low_open, high_open, unit)
        raise InputError(source, key, f"must be one finite number{' ' + span if span else ''}, got {_shown(value)}")
    return float(numbers(key, value, low, high, low_open=low_open, high_open=high_open, unit=unit, source=source,
                         _what="one finite number"))


def text(key, value, limit=NAME_LIMIT, source=None) -> str:
    """A name or a note: non-blank text of at most ``limit`` characters on one line.

    >>> text("name", "Heat 4711")
    'Heat 4711'
    """
    if not isinstance(value, str) or not value.strip():
        raise InputError(source, key, f"must be a non-blank text, got {_shown(value)}")
    if _CONTROL.search(value):
        raise InputError(source, key, "must be one line of text without tabs or other control characters")
    if len(value) > limit:
        raise InputError(source, key, f"must be at most {limit} characters, got {len(value)}")
    return value


def choice(key, value, choices, source=None):
    """One of ``choices`` (compared as given)."""
    if isinstance(value, str) and value in choices:
        return value
    raise InputError(source, key, f"must be one of {', '.join(map(repr, choices))}, got {_shown(value)}")


def _shown(value, limit=40) -> str:
    """A value as a message shows it: its repr, shortened."""
    shown = repr(value) if isinstance(value, (str, bytes, int, float, bool, type(None))) else type(value).__name__
    return shown if len(shown) <= limit else shown[: limit - 3] + "..."


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
        """``value`` as a float inside the range, through the shared :func:`number` check;
        InputError naming ``key`` with this kind's own rule otherwise."""
        try:
            return number(key, value, self.low, self.high, low_open=self.low_open, unit=self.unit)
        except InputError:
            given = real_number(value)
            raise InputError(None, key, f"{self.rule}, got {value!r:.40}" if given is None else
                             f"{self.rule}, got {given!r}{' ' if self.unit else ''}{self.unit}") from None
