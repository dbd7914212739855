"""Results as data: arrays, names and provenance, never live models.

A result can be saved, compared, sliced to one batch member and turned into a tidy table
without the models that computed it. pandas is imported by the ``to_frame`` methods that
use it, not here: the command line reads results without ever building a table, and
pandas costs a third of a second to import.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .constants import kelvin_to_celsius
from .errors import InputError

#: Times beyond this (about 32 years) are reported as "does not form in practice": they are
#: left out of the curves, the figure and the exports rather than shown as huge numbers.
PRACTICAL_HORIZON_S = 1.0e9
#: The name of the curve of the decomposition as a whole (all products together).
OVERALL = "total"


class CriticalInCelsius:
    """``critical_C``: the labelled lines of ``critical_K`` in °C, for a result that has them."""

    @property
    def critical_C(self) -> dict:
        """Line -> temperature, °C (a float, or an array for a batch), as ``critical_K`` in K."""
        return {name: kelvin_to_celsius(np.asarray(t, dtype=float)) if np.ndim(t) else kelvin_to_celsius(float(t))
                for name, t in self.critical_K.items()}


@dataclass(frozen=True)
class Measurements:
    """Measured points: temperature (K), fraction, time (s), and product (None: the total)."""

    temperature_K: np.ndarray
    fraction: np.ndarray
    time_s: np.ndarray
    product: tuple
    source: str = "data"
    rows: tuple = ()


def check_measurements(data):
    """``data`` itself if it is :class:`Measurements`; InputError otherwise."""
    if not isinstance(data, Measurements):
        raise InputError(None, "data", f"must be measurements from isokin.read_measurements, got {type(data).__name__}")
    return data


@dataclass(frozen=True)
class Noses:
    """The nose of each C-curve: arrays of shape (batch..., fraction).

    ``time_s`` is ``inf`` where the curve does not exist in the range; ``inside`` is False
    where the minimum lies on a bound of the range, so the true nose is outside it.
    """

    temperature_K: np.ndarray
    time_s: np.ndarray
    inside: np.ndarray

    @property
    def temperature_C(self):
        return kelvin_to_celsius(self.temperature_K)

    @property
    def forms(self):
        """Where the curve has a nose within the practical horizon."""
        return np.isfinite(self.time_s) & (self.time_s <= PRACTICAL_HORIZON_S)

    def __getitem__(self, index):
        return Noses(self.temperature_K[index], self.time_s[index], self.inside[index])


@dataclass(frozen=True)
class TTTResult(CriticalInCelsius):
    """An isothermal diagram: t(X, T) and the noses of every product, for one alloy or a batch.

    Attributes
    ----------
    alloy, model : str
        The alloy's name and model.
    temperatures_K : ndarray, shape (N,)
        Hold temperatures, ascending.
    fractions : ndarray, shape (F,)
        Transformed fractions of each product's own completion.
    products : tuple of str
        Product names, in the alloy's order; last :data:`OVERALL` ("total"), the
        decomposition as a whole, where the alloy has more than one product.
    times_s : dict of str to ndarray
        Seconds to each fraction, shape (batch..., F, N); ``inf`` where the product does not
        form at that temperature.
    noses : dict of str to Noses
        Shape (batch..., F).
    product_models, upper_K : dict
        Per product: the model's name, and the temperature it forms below (K, batch shape).
    critical_K, critical_methods : dict
        Labelled lines (K, batch shape) and their methods.
    batch_shape : tuple
    footer : str
    warnings : tuple of str
    inputs, provenance : dict
        The input as read; the model choices and coefficients used.
    regions : tuple of (float, float, tuple of str)
        What the parent of a single alloy has become once its transformation has finished,
        at the temperatures a figure names regions at: temperature K, finish time s, phases.
    parent, athermal : str
        The parent phase ("austenite") and the product formed on cooling below its start
        ("martensite"; None for an alloy without one), for the figure's words.
    fraction_meanings : dict of str to str
        What a fraction X of each curve is, in plain words.
    fraction_of : dict of str to str
        The same in a few words for a table beside the fraction ("of the austenite", "of
        what can transform", "of its own completion").
    valid : ndarray of bool or None
        For a batch, the members that could be computed (the others have no curves); None
        where all could.
    """

    alloy: str
    model: str
    temperatures_K: np.ndarray
    fractions: np.ndarray
    products: tuple
    times_s: dict
    noses: dict
    product_models: dict
    upper_K: dict
    critical_K: dict
    critical_methods: dict
    batch_shape: tuple = ()
    footer: str = ""
    warnings: tuple = ()
    inputs: dict = field(default_factory=dict)
    provenance: dict = field(default_factory=dict)
    regions: tuple = ()
    fraction_meanings: dict = field(default_factory=dict)
    fraction_of: dict = field(default_factory=dict)
    valid: object = None
    parent: str = "untransformed"
    athermal: object = None

    @property
    def temperatures_C(self):
        return kelvin_to_celsius(self.temperatures_K)

    def practical(self, product):
        """Mask of the points where the product forms within the practical horizon."""
        t = self.times_s[product]
        return np.isfinite(t) & (t <= PRACTICAL_HORIZON_S)

    def member(self, index) -> TTTResult:
        """The result of one batch member (an int, or a tuple for a batch of several axes)."""
        if not self.batch_shape:
            raise ValueError("this result holds a single alloy, not a batch")
        index = index if isinstance(index, tuple) else (index,)
        if len(index) != len(self.batch_shape):
            raise ValueError(f"give one index per batch axis; the batch has shape {self.batch_shape}")
        pick = lambda a: np.asarray(a)[index] if np.ndim(a) else a  # noqa: E731
        lines = {k: float(pick(v)) for k, v in self.critical_K.items()}
        lines = {k: v for k, v in lines.items() if np.isfinite(v)}
        return TTTResult(
            alloy=f"{self.alloy} [{', '.join(map(str, index))}]",
            model=self.model,
            temperatures_K=self.temperatures_K,
            fractions=self.fractions,
            products=self.products,
            times_s={k: v[index] for k, v in self.times_s.items()},
            noses={k: v[index] for k, v in self.noses.items()},
            product_models=self.product_models,
            upper_K={k: float(pick(v)) for k, v in self.upper_K.items()},
            critical_K=lines,
            critical_methods={k: self.critical_methods[k] for k in lines},
            footer=self.footer,
            warnings=self.warnings,
            inputs=self.inputs,
            provenance=self.provenance,
            fraction_meanings=self.fraction_meanings,
            fraction_of=self.fraction_of,
        )

    @property
    def overall(self):
        """The name of the whole-decomposition curve, or None for a single product."""
        return OVERALL if OVERALL in self.products else None

    def curve_columns(self) -> dict:
        """Columns of the tidy curve table (practical times only), as arrays.

        ``member`` (the flat batch index, for a batch), ``product``, ``fraction``,
        ``temperature_C``, ``time_s``.
        """
        members = int(np.prod(self.batch_shape))
        nf, nt = self.fractions.size, self.temperatures_K.size
        parts = []
        for name in self.products:
            t = self.times_s[name].reshape(members, nf, nt)
            m, f, k = np.nonzero(self.practical(name).reshape(members, nf, nt))
            parts.append({"member": m, "product": np.full(m.size, name, dtype=object),
                          "fraction": self.fractions[f], "temperature_C": self.temperatures_C[k],
                          "time_s": t[m, f, k]})
        columns = {key: np.concatenate([p[key] for p in parts]) for key in parts[0]}
        if not self.batch_shape:
            del columns["member"]
        return columns

    def nose_columns(self) -> dict:
        """Columns of the tidy nose table (curves that form within the practical horizon)."""
        members = int(np.prod(self.batch_shape))
        nf = self.fractions.size
        parts = []
        for name in self.products:
            n = self.noses[name]
            m, f = np.nonzero(n.forms.reshape(members, nf))
            parts.append({
                "member": m, "product": np.full(m.size, name, dtype=object), "fraction": self.fractions[f],
                "nose_temperature_C": n.temperature_C.reshape(members, nf)[m, f],
                "nose_time_s": n.time_s.reshape(members, nf)[m, f],
                "nose_inside_range": n.inside.reshape(members, nf)[m, f],
            })
        columns = {key: np.concatenate([p[key] for p in parts]) for key in parts[0]}
        if not self.batch_shape:
            del columns["member"]
        return columns

    def to_frame(self):
        """Tidy pandas table: [member,] product, fraction, temperature_C, time_s."""
        import pandas as pd  # on the first table only: start-up (module notes)

        return pd.DataFrame(self.curve_columns())

    def noses_frame(self):
        """Tidy pandas table of the noses: [member,] product, fraction, nose_temperature_C,
        nose_time_s, nose_inside_range."""
        import pandas as pd  # on the first table only: start-up (module notes)

        return pd.DataFrame(self.nose_columns())

    def forming_range_C(self, product, fraction_index):
        """(lowest, highest) grid temperature in °C where a curve exists (over the whole
        batch), or None."""
        ok = self.practical(product)[..., fraction_index, :].reshape(-1, self.temperatures_K.size).any(axis=0)
        if not ok.any():
            return None
        t_c = self.temperatures_C[ok]
        return float(t_c.min()), float(t_c.max())


@dataclass(frozen=True)
class HoldResult(CriticalInCelsius):
    """The microstructure after isothermal holds and a quench, as data.

    Attributes
    ----------
    alloy : str
    temperatures_C, times_s : ndarray
        The holds, broadcast to one shape P.
    quench_to_C : float
    fractions : dict of str to ndarray
        Phase -> share of the part after the hold and the quench (shape P); they sum to 1.
    milestone_fractions : ndarray, shape (M,)
        The fractions of the milestones (0.01, 0.5, 0.99).
    milestones_s : dict of str to ndarray
        Product (and "total") -> seconds to each milestone at each temperature, shape P + (M,);
        a product's milestones are shares of its own completion, the total's of what can
        transform at that temperature (``transformable``); ``inf`` where never.
    milestone_of : dict of str to str
        Curve -> what its milestones are a share of, in a few words for a table (a steel
        product's own completion, unlike the diagram's share of the austenite).
    transformable : ndarray
        Share of the part that can transform at each temperature, given time.
    austenite_carbon, martensite_start_K : ndarray or None
        For steels: the carbon (mass %) of the austenite left at the end of each hold, and
        its Ms (K), from which the quench forms martensite.
    critical_K : dict
        The alloy's labelled lines (K), as the diagram has them (``critical_C`` in °C).
    warnings : tuple of str
    inputs, provenance : dict
    """

    alloy: str
    temperatures_C: np.ndarray
    times_s: np.ndarray
    quench_to_C: float
    fractions: dict
    milestone_fractions: np.ndarray
    milestones_s: dict
    transformable: np.ndarray
    milestone_of: dict = field(default_factory=dict)
    austenite_carbon: object = None
    martensite_start_K: object = None
    critical_K: dict = field(default_factory=dict)
    warnings: tuple = ()
    inputs: dict = field(default_factory=dict)
    provenance: dict = field(default_factory=dict)

    @property
    def martensite_start_C(self):
        """Ms of the austenite left at the end of each hold, °C (steels; None otherwise)."""
        return None if self.martensite_start_K is None else kelvin_to_celsius(self.martensite_start_K)

    def to_frame(self):
        """Wide pandas table: temperature_C, time_s, one column per phase (shares of the part)
        and, for steels, the carbon and Ms of the austenite left at the end of the hold."""
        import pandas as pd  # on the first table only: start-up (module notes)

        shape = np.shape(self.times_s)
        columns = {"temperature_C": np.ravel(self.temperatures_C), "time_s": np.ravel(self.times_s)}
        columns.update({name: np.ravel(np.broadcast_to(v, shape)) for name, v in self.fractions.items()})
        if self.austenite_carbon is not None:
            columns["austenite_carbon_mass_percent"] = np.ravel(np.broadcast_to(self.austenite_carbon, shape))
            columns["austenite_Ms_C"] = np.ravel(np.broadcast_to(kelvin_to_celsius(self.martensite_start_K), shape))
        return pd.DataFrame(columns)


@dataclass(frozen=True)
class CoolingResult(CriticalInCelsius):
    """Phases along cooling paths, as data: arrays of shape (path, step) and per path.

    ``fractions``: phase -> (P, M) share of the part along each path (they sum to 1);
    ``final``: phase -> (P,) at the end; ``start_time_s``/``start_temperature_K``: product
    -> (P,) where it first makes up 1 % of the part (NaN: never); ``hardness_HV`` and
    ``rate_at_700_C_per_h``: (P,) for steels, None otherwise; ``austenite_carbon`` and
    ``martensite_start_K``: (P,) for steels, the carbon (mass %) of the austenite left when
    martensite forms and its Ms (K).
    """

    alloy: str
    labels: tuple
    time_s: np.ndarray
    temperature_K: np.ndarray
    fractions: dict
    final: dict
    start_time_s: dict
    start_temperature_K: dict
    hardness_HV: object
    rate_at_700_C_per_h: object
    critical_K: dict
    warnings: tuple = ()
    inputs: dict = field(default_factory=dict)
    provenance: dict = field(default_factory=dict)
    austenite_carbon: object = None
    martensite_start_K: object = None

    def columns(self) -> dict:
        """The phases along the paths as columns: path, time_s, temperature_C, one per phase."""
        _, M = self.time_s.shape
        columns = {"path": np.repeat(np.array(self.labels, dtype=object), M), "time_s": self.time_s.ravel(),
                   "temperature_C": kelvin_to_celsius(self.temperature_K).ravel()}
        columns.update({name: v.ravel() for name, v in self.fractions.items()})
        return columns

    def to_frame(self):
        """Tidy pandas table along the paths: path, time_s, temperature_C, and a column per phase."""
        import pandas as pd  # on the first table only: start-up (module notes)

        return pd.DataFrame(self.columns())


@dataclass(frozen=True)
class SectionResult(CriticalInCelsius):
    """A quenched section, as data: a batch of B sections of one shape, N nodes each, M steps.

    ``size_m`` (B,): thickness or diameter; ``depth_m`` (B, N): each node's depth below the
    surface (nodes run from the centre to the surface); ``time_s`` (M,); ``temperature_K``
    (B, N, M); ``curves_K``: "surface", "mid-radius", "centre" -> (B, M); ``final``: phase ->
    (B, N) at the end of the run; ``hardness_HV`` (B, N) for steels, else None;
    ``martensite_depth_m``: share (0.5, 0.9) -> (B,) depth to which martensite makes up at
    least that share (the half-size where it does throughout, 0 where not even at the
    surface); ``centre_at_medium_s`` (B,): when the centre comes within 5 K of the medium;
    ``biot_number`` (B,): h (V/A) / k at the start; the heat balance over the run, J per
    unit of r^m area: ``heat_out_J`` through the surface, ``latent_J`` released by the
    products, ``sensible_J`` the change of the nodes' heat content (negative on cooling).
    """

    alloy: str
    shape: str
    size_m: np.ndarray
    medium_C: float
    start_C: float
    surface: str
    depth_m: np.ndarray
    time_s: np.ndarray
    temperature_K: np.ndarray
    curves_K: dict
    final: dict
    hardness_HV: object
    rate_at_700_C_per_h: np.ndarray
    austenite_carbon: object
    martensite_depth_m: dict
    centre_at_medium_s: np.ndarray
    biot_number: np.ndarray
    heat_out_J: np.ndarray
    latent_J: np.ndarray
    sensible_J: np.ndarray
    critical_K: dict
    warnings: tuple = ()
    inputs: dict = field(default_factory=dict)
    provenance: dict = field(default_factory=dict)

    def profile_columns(self) -> dict:
        """Phases and hardness against depth: size_mm, depth_mm, one column per phase, hardness_HV."""
        B, N = self.depth_m.shape
        columns = {"size_mm": np.repeat(self.size_m * 1e3, N), "depth_mm": self.depth_m.ravel() * 1e3}
        columns.update({name: v.ravel() for name, v in self.final.items()})
        if self.hardness_HV is not None:
            columns["hardness_HV"] = self.hardness_HV.ravel()
        columns["cooling_rate_at_700_C_per_h"] = self.rate_at_700_C_per_h.ravel()
        return columns

    def curve_columns(self) -> dict:
        """The cooling curves: size_mm, location, time_s, temperature_C."""
        B, M = self.curves_K["centre"].shape
        names = list(self.curves_K)
        return {"size_mm": np.repeat(self.size_m * 1e3, len(names) * M),
                "location": np.tile(np.repeat(np.array(names, dtype=object), M), B),
                "time_s": np.tile(self.time_s, B * len(names)),
                "temperature_C": kelvin_to_celsius(np.stack([self.curves_K[n] for n in names], axis=1)).ravel()}

    def to_frame(self):
        """Tidy pandas table of the profile: one row per section and node."""
        import pandas as pd  # on the first table only: start-up (module notes)

        return pd.DataFrame(self.profile_columns())


@dataclass(frozen=True)
class JominyResult(CriticalInCelsius):
    """An end-quench test, as data: against the distance from the quenched end (N nodes,
    ``distance_m`` rising), the hardness (HV), martensite share and cooling rate at 700 °C
    (K/s); ``temperature_K`` (N, M) over ``time_s``; the hardness at the standard distances
    (``distances_mm``, and ``sixteenths`` of an inch); ``half_martensite_m``: the distance to
    50 % martensite; ``ideal_diameter_in``: DI by Grossmann's method; ``band``: the band
    checked (distance_m, hrc_min, hrc_max, predicted_HRC, outside), or None.
    """

    alloy: str
    distance_m: np.ndarray
    hardness_HV: np.ndarray
    martensite: np.ndarray
    rate_at_700_C_per_s: np.ndarray
    time_s: np.ndarray
    temperature_K: np.ndarray
    distances_mm: np.ndarray
    hardness_mm_HV: np.ndarray
    sixteenths: np.ndarray
    hardness_sixteenths_HV: np.ndarray
    half_martensite_m: float
    ideal_diameter_in: float
    band: object
    start_C: float
    water_C: float
    jet_W_m2K: float
    critical_K: dict
    warnings: tuple = ()
    inputs: dict = field(default_factory=dict)
    provenance: dict = field(default_factory=dict)

    def columns(self) -> dict:
        """The curve at the standard distances: position, distance_mm, hardness_HV."""
        return {"position": np.array([f"{d:g} mm" for d in self.distances_mm]
                                     + [f"J{j}" for j in self.sixteenths], dtype=object),
                "distance_mm": np.concatenate([self.distances_mm, self.sixteenths * 25.4 / 16.0]),
                "hardness_HV": np.concatenate([self.hardness_mm_HV, self.hardness_sixteenths_HV])}

    def to_frame(self):
        """Tidy pandas table of the curve at the standard distances."""
        import pandas as pd  # on the first table only: start-up (module notes)

        return pd.DataFrame(self.columns())


@dataclass(frozen=True)
class CCTResult(CriticalInCelsius):
    """A continuous-cooling diagram as data: per rate, where each curve starts and finishes.

    ``curves``: product (and "total") -> {"start": (times s, temperatures K),
    "finish": (...)}, each of shape (curve rates,), NaN where the curve does not reach that
    rate; ``curve_rates_K_s``: the rates the curves are traced through (the rates asked for
    and more between them, so that a curve is smooth); ``cooling``: the CoolingResult of the
    paths of the rates asked for (``rates_K_s``); ``critical_rates``: see
    :func:`isokin.compute.cooling.critical_rates`.
    """

    alloy: str
    rates_K_s: np.ndarray
    start_C: float
    cooling: CoolingResult
    curves: dict
    critical_rates: dict
    critical_K: dict
    curve_rates_K_s: np.ndarray = None

    def to_frame(self):
        """Tidy pandas table: rate_K_s, curve (product or total), edge (start, finish), time_s, temperature_C."""
        import pandas as pd  # on the first table only: start-up (module notes)

        return pd.DataFrame(self.curve_columns())

    def curve_columns(self) -> dict:
        rows = {"rate_K_s": [], "curve": [], "edge": [], "time_s": [], "temperature_C": []}
        for name, edges in self.curves.items():
            for edge, (times, temps) in edges.items():
                ok = np.isfinite(times)
                rows["rate_K_s"] += (self.rates_K_s if self.curve_rates_K_s is None
                                     else self.curve_rates_K_s)[ok].tolist()
                rows["curve"] += [name] * int(ok.sum())
                rows["edge"] += [edge] * int(ok.sum())
                rows["time_s"] += times[ok].tolist()
                rows["temperature_C"] += kelvin_to_celsius(temps[ok]).tolist()
        return {k: np.array(v, dtype=object if k in ("curve", "edge") else float) for k, v in rows.items()}


@dataclass(frozen=True)
class PlanResult(CriticalInCelsius):
    """A heat-treat plan for one route, as data.

    ``rows``: column -> array over the candidate temperatures (temperature_C, feasible,
    hold_time_s, governing, and the route's own columns); ``window_C``: [lowest, highest]
    feasible temperature (edges refined by bisection), or None; ``recommendation``: the
    chosen temperature, hold time and reason (or None); ``no_window``: the nearest feasible
    change where nothing works.
    """

    route: str
    alloy: str
    rows: dict
    window_C: object
    recommendation: object
    no_window: object
    options: dict
    critical_K: dict
    cautions: tuple = ()
    warnings: tuple = ()
    inputs: dict = field(default_factory=dict)
    provenance: dict = field(default_factory=dict)

    def to_frame(self):
        """The candidates as a pandas table, one row per temperature."""
        import pandas as pd  # on the first table only: start-up (module notes)

        return pd.DataFrame({k: np.asarray(v) for k, v in self.rows.items()})


@dataclass(frozen=True)
class FitResult:
    """A calibration: the fitted parameters with intervals, the residuals and the fitted alloy.

    ``values``/``model_values``: parameter -> fitted / starting value; ``intervals``: the
    confidence interval from the Jacobian; ``bootstrap_intervals``: percentile intervals
    where a bootstrap was asked for; ``residuals_ln_t``: ln(model time / measured time) per
    point; ``avrami``: per isotherm, the measured and the model's Avrami exponent.
    ``alloy`` and ``fitted`` are the live models the fit started from and ended with.
    """

    alloy: object
    fitted: object
    free: tuple
    values: dict
    model_values: dict
    intervals: dict
    bootstrap_intervals: dict
    residuals_ln_t: np.ndarray
    rms_ln_t: float
    data: object
    covariance: np.ndarray
    loss: str
    avrami: tuple = ()
    theta: object = None
    model_times_s: object = None

    def to_frame(self):
        """One row per free parameter: parameter, model value, fitted value, interval."""
        import pandas as pd  # on the first table only: start-up (module notes)

        return pd.DataFrame([{"parameter": n, "model_value": self.model_values[n], "fitted_value": self.values[n],
                              "interval_low": self.intervals[n][0], "interval_high": self.intervals[n][1]}
                             for n in self.free])


@dataclass(frozen=True)
class SpreadResult:
    """A composition spread, as data.

    ``quantiles_s[name]``: shape (Q, F, N) times at the ``quantile_levels``; ``earliest_s``
    and ``latest_s``: (F, N), the envelope over the samples; ``nose_quantiles``: per curve the
    quantiles of the nose temperature and time (Q, F); ``ms_range_K``; ``sensitivity``:
    elements ranked by their effect on the earliest start; ``nominal``: the TTTResult of
    the nominal composition; ``compositions``: the samples; ``times_s``: every sample's times.
    """

    alloy: str
    samples: int
    seed: int
    ranges: dict
    nominal: TTTResult
    quantile_levels: np.ndarray
    quantiles_s: dict
    earliest_s: dict
    latest_s: dict
    nose_quantiles: dict
    ms_range_K: tuple
    sensitivity: tuple
    compositions: dict
    times_s: dict

    @property
    def earliest_start_s(self) -> np.ndarray:
        """The worst case for holds and quenches, (N,): at each temperature the earliest time
        over the heats at which any curve reaches its first fraction (the whole decomposition
        where there is one)."""
        return np.min(np.stack([t[0] for t in self.earliest_s.values()]), axis=0)

    def earliest_start(self) -> tuple:
        """(temperature_K, time_s) of the earliest start over the heats, on the grid; time
        ``inf`` where nothing starts."""
        t = self.earliest_start_s
        i = int(np.argmin(t))
        return float(self.nominal.temperatures_K[i]), float(t[i])

    def curve_columns(self) -> dict:
        """Quantile table: product, fraction, temperature_C, nominal, q05, q50, q95, earliest, latest (s)."""
        rows = {"product": [], "fraction": [], "temperature_C": [], "nominal_time_s": [], "earliest_time_s": [],
                "latest_time_s": []}
        rows.update({f"q{int(round(q * 100)):02d}_time_s": [] for q in self.quantile_levels})
        T = self.nominal.temperatures_C
        for name in self.quantiles_s:
            for k, x in enumerate(self.nominal.fractions):
                e = self.earliest_s[name][k]
                ok = np.isfinite(e) & (e <= PRACTICAL_HORIZON_S)
                n = int(ok.sum())
                rows["product"] += [name] * n
                rows["fraction"] += [float(x)] * n
                rows["temperature_C"] += T[ok].tolist()
                rows["nominal_time_s"] += self.nominal.times_s[name][k][ok].tolist()
                rows["earliest_time_s"] += e[ok].tolist()
                rows["latest_time_s"] += self.latest_s[name][k][ok].tolist()
                for j, q in enumerate(self.quantile_levels):
                    rows[f"q{int(round(q * 100)):02d}_time_s"] += self.quantiles_s[name][j, k][ok].tolist()
        return {k: np.array(v, dtype=object if k == "product" else float) for k, v in rows.items()}

    def to_frame(self):
        import pandas as pd  # on the first table only: start-up (module notes)

        return pd.DataFrame(self.curve_columns())


@dataclass(frozen=True)
class TemperingCurve:
    """A measured tempering curve: hardness (HV) after tempering a fully hardened steel for
    ``time_s`` at each temperature (K); where it comes from in ``source``."""

    temperature_K: np.ndarray
    hardness_HV: np.ndarray
    time_s: np.ndarray
    source: str = "tempering curve"


@dataclass(frozen=True)
class TemperResult:
    """Tempers as data, one row per temper: temperature, time, Hollomon-Jaffe parameter, the
    equivalent temperature of a 1 h temper, and the hardness read from the tempering curve
    (NaN outside the curve's span). ``target_HV``: the hardness asked for, where the rows
    answer "which temper reaches it" (None for "what does this temper give")."""

    alloy: str
    temperatures_C: np.ndarray
    times_s: np.ndarray
    parameter: np.ndarray
    equivalent_1h_C: np.ndarray
    hardness_HV: np.ndarray
    constant: float
    curve: TemperingCurve
    target_HV: object = None
    embrittlement: np.ndarray = None
    warnings: tuple = ()
    inputs: dict = field(default_factory=dict)
    provenance: dict = field(default_factory=dict)

    def to_frame(self):
        """Tidy pandas table: one row per temper, the embrittlement range flagged."""
        import pandas as pd  # on the first table only: start-up (module notes)

        columns = {"temperature_C": self.temperatures_C, "time_s": self.times_s,
                   "hollomon_jaffe_parameter": self.parameter, "equivalent_1h_temperature_C": self.equivalent_1h_C,
                   "hardness_HV": self.hardness_HV, "embrittlement_range": self.embrittlement}
        if self.target_HV is not None:
            columns["target_HV"] = self.target_HV
        return pd.DataFrame(columns)
