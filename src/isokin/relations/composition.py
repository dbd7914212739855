"""Steel composition in mass percent, for one steel or a batch of steels.

Iron is the balance and is never given. Every element is a float or an array; arrays of a
batch share one shape (or broadcast to it), such as (B, 1) so that a batch of B steels
broadcasts against a temperature axis of shape (N,) into (B, N) results.
"""

from __future__ import annotations

import difflib
from collections.abc import Mapping
from dataclasses import dataclass, fields

import numpy as np

#: Element symbols a composition may hold, in mass percent; any not given is 0.
ELEMENTS = ("C", "Mn", "Si", "Ni", "Cr", "Mo", "V", "W", "Cu", "Al", "P", "Co", "Ti", "As", "B", "Nb", "S", "N")


# Full names a user may type instead of the symbol, so the hint can point at the symbol.
_NAMES = {
    "carbon": "C", "manganese": "Mn", "silicon": "Si", "nickel": "Ni", "chromium": "Cr",
    "molybdenum": "Mo", "vanadium": "V", "tungsten": "W", "copper": "Cu", "aluminium": "Al",
    "aluminum": "Al", "phosphorus": "P", "cobalt": "Co", "titanium": "Ti", "arsenic": "As",
    "boron": "B", "niobium": "Nb", "columbium": "Nb", "sulfur": "S", "sulphur": "S", "nitrogen": "N",
}


def _unknown_symbol_message(symbol: str) -> str:
    key = symbol.strip().lower()
    if key in ("fe", "iron"):
        return "Fe is the balance of a steel; give only the alloying elements"
    if key in _NAMES:
        nearest = _NAMES[key]
    else:
        by_lower = {e.lower(): e for e in ELEMENTS}
        nearest = by_lower[difflib.get_close_matches(key, list(by_lower), n=1, cutoff=0.0)[0]]
    return f"unknown element '{symbol}'; did you mean '{nearest}'? (known: {', '.join(ELEMENTS)})"


def validate_composition(mass_percent: Mapping[str, object]) -> None:
    """Raise ``ValueError`` with a one-line message if a composition cannot be a steel.

    Checks, in order: every key is a known element symbol (the message names the nearest
    valid one), every content is a finite number, none is negative, the contents broadcast
    to one batch shape, and the alloying elements leave some iron (sum < 100 mass %).

    Parameters
    ----------
    mass_percent : mapping of str to float or array_like
        Element symbol to content in mass percent.

    Examples
    --------
    >>> validate_composition({"C": 0.4, "Mn": 0.8})
    >>> validate_composition({"C": 0.4, "mn": 0.8})
    Traceback (most recent call last):
    ...
    ValueError: unknown element 'mn'; did you mean 'Mn'? (known: C, Mn, Si, Ni, Cr, Mo, V, W, Cu, Al, P, Co, Ti, As, B, Nb, S, N)
    """
    arrays = {}
    for symbol, value in mass_percent.items():
        if symbol not in ELEMENTS:
            raise ValueError(_unknown_symbol_message(str(symbol)))
        try:
            array = np.asarray(value, dtype=float)
        except (TypeError, ValueError):
            raise ValueError(f"content of {symbol} is not a number: {value!r}") from None
        if array.size == 0:
            raise ValueError(f"content of {symbol} is empty; give a number, or one per heat")
        if not np.all(np.isfinite(array)):
            raise ValueError(f"content of {symbol} must be a finite number of mass %")
        if np.any(array < 0.0):
            raise ValueError(
                f"content of {symbol} is negative ({array.min():g} mass %); contents are >= 0"
            )
        arrays[symbol] = array
    try:
        shape = np.broadcast_shapes(*(a.shape for a in arrays.values()))
    except ValueError:
        shapes = ", ".join(f"{k} {a.shape}" for k, a in arrays.items())
        raise ValueError(f"element arrays do not share one batch shape: {shapes}") from None
    total = sum(arrays.values(), np.zeros(shape))
    if np.any(total >= 100.0):
        raise ValueError(
            f"alloying elements sum to {np.max(total):g} mass %, which leaves no iron; "
            "the sum must stay below 100"
        )


@dataclass(frozen=True)
class Composition:
    """Mass percent of each alloying element of a steel or of a batch of steels.

    Attributes are the element symbols of :data:`ELEMENTS`, each a float ndarray of the
    batch shape (``()`` for one steel). Build it with :meth:`from_dict`; direct keyword
    construction validates the same way.

    Examples
    --------
    >>> steel = Composition.from_dict({"C": 0.40, "Mn": 0.80, "Cr": 1.0})
    >>> float(steel.C), float(steel.Ni), steel.shape
    (0.4, 0.0, ())
    >>> batch = Composition.from_dict({"C": [[0.2], [0.4]], "Mn": 0.8})
    >>> batch.shape, batch.Mn.shape
    ((2, 1), (2, 1))
    """

    C: np.ndarray = 0.0
    Mn: np.ndarray = 0.0
    Si: np.ndarray = 0.0
    Ni: np.ndarray = 0.0
    Cr: np.ndarray = 0.0
    Mo: np.ndarray = 0.0
    V: np.ndarray = 0.0
    W: np.ndarray = 0.0
    Cu: np.ndarray = 0.0
    Al: np.ndarray = 0.0
    P: np.ndarray = 0.0
    Co: np.ndarray = 0.0
    Ti: np.ndarray = 0.0
    As: np.ndarray = 0.0
    B: np.ndarray = 0.0
    Nb: np.ndarray = 0.0
    S: np.ndarray = 0.0
    N: np.ndarray = 0.0

    def __post_init__(self):
        given = {f.name: getattr(self, f.name) for f in fields(self)}
        validate_composition(given)
        arrays = np.broadcast_arrays(*(np.asarray(v, dtype=float) for v in given.values()))
        for name, array in zip(given, arrays):
            # Read-only copies: a batch is shared by several products and must not change
            # under them.
            array = np.array(array)
            array.flags.writeable = False
            object.__setattr__(self, name, array)

    @classmethod
    def from_dict(cls, mass_percent: Mapping[str, object]) -> Composition:
        """Composition from a mapping of element symbol to mass percent (float or array).

        Raises ``ValueError`` (see :func:`validate_composition`) for an unknown symbol,
        a negative or non-finite content, mismatched batch shapes, or no iron left.
        """
        validate_composition(mass_percent)
        return cls(**mass_percent)

    @property
    def shape(self) -> tuple[int, ...]:
        """Batch shape; ``()`` for a single steel."""
        return self.C.shape

    def as_dict(self) -> dict[str, np.ndarray]:
        """Element symbol to mass percent, for every element of :data:`ELEMENTS`."""
        return {name: getattr(self, name) for name in ELEMENTS}

    def analysis(self) -> dict[str, float]:
        """The heat analysis of one steel as plain numbers: carbon and every element present.

        >>> Composition.from_dict({"C": 0.4, "Cr": 1.0}).analysis()
        {'C': 0.4, 'Cr': 1.0}
        """
        return {e: float(v) for e, v in self.as_dict().items() if e == "C" or float(v) > 0.0}


def range_warnings(
    composition: Composition, ranges: Mapping[str, tuple[float, float]], source: str
) -> list[str]:
    """One-line warnings, one per element outside a model's calibrated range.

    Parameters
    ----------
    composition : Composition
        One steel or a batch.
    ranges : mapping of str to (float, float)
        Element symbol to (lowest, highest) mass percent the model was fitted over.
    source : str
        The model and its reference, named in each warning.

    Returns
    -------
    list of str
        Empty when every element of every steel lies inside its range.

    Examples
    --------
    >>> steel = Composition.from_dict({"C": 0.9, "Mn": 0.7})
    >>> range_warnings(steel, {"C": (0.1, 0.6), "Mn": (0.2, 2.0)}, "Andrews (1965)")
    ['C = 0.9 mass % is outside 0.1-0.6 mass %, the range of Andrews (1965); the result is an extrapolation']
    """
    warnings = []
    for symbol, (low, high) in ranges.items():
        values = getattr(composition, symbol)
        outside = (values < low) | (values > high)
        if not np.any(outside):
            continue
        span = f"{low:g}-{high:g} mass %, the range of {source}; the result is an extrapolation"
        if values.size == 1:
            warnings.append(f"{symbol} = {float(values.ravel()[0]):g} mass % is outside {span}")
        else:
            bad = values[outside]
            warnings.append(
                f"{symbol} in {np.count_nonzero(outside)} of {values.size} steels "
                f"({bad.min():g} to {bad.max():g} mass %) is outside {span}"
            )
    return warnings
