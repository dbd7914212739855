"""Files a plan can be built on: tidy CSV of the curves, a JSON summary, the figure.

The files of one run are written to temporary names in the target folder and put in place
together at the end (:func:`write_outputs`), so a failure midway never leaves a new figure
beside an old table, nor half a file where a good one was.
"""

from __future__ import annotations

import copy
import errno
import json
import math
import os
import tempfile
import warnings
from pathlib import Path

import numpy as np

from .. import __version__
from ..constants import kelvin_to_celsius
from ..readout import CAUTION_SHORT, format_duration
from ..relations.hardness import hrc_from_hv_astm_e140
from ..results import PRACTICAL_HORIZON_S, TTTResult
from .toml_out import dumps

CURVE_COLUMNS = ["product", "fraction", "temperature_C", "time_s"]


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask


def write_outputs(writers: dict, overwrite: bool = False):
    """Write a set of files so that they land together or not at all.

    Parameters
    ----------
    writers : dict of Path to callable
        For each final path, a function that writes the file at the path it is given.
    overwrite : bool
        Replace existing files. Without it every final name is created exclusively (an
        existing file, or a dangling link, makes the whole set fail and nothing is left).

    Raises
    ------
    FileExistsError
        Without ``overwrite``, when a final name exists by the time the set is put in place.
    """
    temporaries = {}
    placed = []
    mode = 0o666 & ~_umask()
    try:
        for target, write in writers.items():
            target = Path(target)
            fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=target.suffix, dir=target.parent)
            os.close(fd)
            temporaries[target] = Path(tmp)
            write(Path(tmp))
            os.chmod(tmp, mode)
        for target in temporaries:  # what would stop a rename halfway is found before the first
            if target.is_dir() and not target.is_symlink():
                raise IsADirectoryError(errno.EISDIR, "a folder is in the way", str(target))
        for target, tmp in temporaries.items():
            if overwrite:
                os.replace(tmp, target)
            else:
                _place_exclusively(tmp, target)
                placed.append(target)
        placed.clear()
    finally:
        for target in placed:  # a later file failed: take back the ones put in place
            target.unlink(missing_ok=True)
        for tmp in temporaries.values():
            tmp.unlink(missing_ok=True)


def _place_exclusively(tmp: Path, target: Path):
    """Give ``tmp`` the name ``target`` only if no such name exists (race-free via a hard link)."""
    try:
        os.link(tmp, target)
    except OSError as exc:
        if exc.errno == errno.EEXIST:
            raise FileExistsError(errno.EEXIST, "exists", str(target)) from None
        # no hard links on this file system: an exclusive create, then the content
        fd = os.open(target, os.O_CREAT | os.O_EXCL | os.O_WRONLY, 0o600)
        os.close(fd)
        os.replace(tmp, target)


def _csv_text(value: str) -> str:
    """A text cell, quoted as CSV requires (commas, quotes, line breaks)."""
    if any(ch in value for ch in ',"\r\n'):
        return '"' + value.replace('"', '""') + '"'
    return value


def _column_text(values: np.ndarray) -> list:
    """Cells of one column: numbers as the shortest text that reads back as the same float, so
    distinct values stay distinct; texts quoted as CSV requires."""
    if values.dtype.kind == "f":
        # a value that does not exist (never formed) is an empty cell, never inf or nan
        return [repr(v) if math.isfinite(v) else "" for v in values.tolist()]
    if values.dtype.kind in "iub":
        return [str(v) for v in values.tolist()]
    quoted = {v: _csv_text(str(v)) for v in set(values.tolist())}
    return [quoted[v] for v in values.tolist()]


def write_curves_csv(result: TTTResult, target: Path):
    """The tidy curve table (``member`` first for a batch)."""
    write_columns_csv(result.curve_columns(), target)


def write_columns_csv(columns: dict, target: Path):
    """A table of equal-length columns as CSV."""
    cells = [_column_text(np.asarray(v)) for v in columns.values()]
    with open(target, "w", newline="", encoding="utf-8") as handle:
        handle.write(",".join(columns) + "\n")
        handle.writelines(",".join(row) + "\n" for row in zip(*cells))


def _temperature_C(t_k):
    """°C to 3 decimals; None (null) for 0 K, which the models give where a line does not exist."""
    return round(float(kelvin_to_celsius(t_k)), 3) if float(t_k) > 0.0 else None


def summary(result: TTTResult) -> dict:
    """Noses, critical temperatures, inputs, model choices and version: enough to trace a plan back."""
    if result.batch_shape:
        raise ValueError("the summary describes one alloy; take result.member(i) of a batch")
    products = {}
    for name in result.products:
        entry = {"model": result.product_models[name], "upper_temperature_C": _temperature_C(result.upper_K[name]),
                 "fractions": {}}
        noses = result.noses[name]
        for k, x in enumerate(result.fractions):
            span = result.forming_range_C(name, k)
            record = {"forms": span is not None and bool(noses.forms[k])}
            if record["forms"]:
                record.update(
                    nose_temperature_C=round(float(noses.temperature_C[k]), 3),
                    nose_time_s=float(f"{float(noses.time_s[k]):.6g}"),
                    nose_inside_range=bool(noses.inside[k]),
                    lowest_temperature_C=round(span[0], 3),
                    highest_temperature_C=round(span[1], 3),
                )
            entry["fractions"][f"{x:g}"] = record
        products[name] = entry
    lines = {name: {"temperature_C": _temperature_C(t), "method": result.critical_methods.get(name, "")}
             for name, t in result.critical_K.items()}
    return {
        "isokin_version": __version__,
        "alloy": result.alloy,
        "model": result.model,
        "temperature_range_C": [_temperature_C(t) for t in result.temperatures_K[[0, -1]]],
        "points": int(result.temperatures_K.size),
        "practical_horizon_s": PRACTICAL_HORIZON_S,
        "fraction_meaning": dict(result.fraction_meanings),
        "critical_temperatures": lines,
        "products": products,
        **_record(result),
    }


def _finite_or_null(value):
    """The record with every non-finite number as null: JSON has no NaN or infinity."""
    if isinstance(value, dict):
        return {k: _finite_or_null(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_finite_or_null(v) for v in value]
    if isinstance(value, float) and not np.isfinite(value):
        return None
    return value


def write_json(data: dict, target: Path):
    text = json.dumps(_finite_or_null(data), indent=2, ensure_ascii=False, allow_nan=False)
    Path(target).write_text(text + "\n", encoding="utf-8")


def write_summary_json(result: TTTResult, target: Path):
    write_json(summary(result), target)


def write_figure(fig, target: Path, fmt: str, dpi=150):
    """Write a matplotlib figure in the format named (png, svg, pdf)."""
    with warnings.catch_warnings():
        # a crowded figure keeps its default layout; the note would only be noise for the user
        warnings.filterwarnings("ignore", message="constrained_layout not applied")
        fig.savefig(target, dpi=dpi, format=fmt)


def _critical_C(critical_K) -> dict:
    """Critical temperatures for a summary, °C (those that exist)."""
    return {k: round(float(kelvin_to_celsius(v)), 3) for k, v in critical_K.items() if np.isfinite(v)}


def _record(result) -> dict:
    """The end of every summary: the model choices, the warnings, the inputs and the caution."""
    return {"model_choices": result.provenance, "warnings": list(result.warnings), "inputs": result.inputs,
            "note": CAUTION_SHORT}


def _finite_or_none(value, digits=6):
    value = float(value)
    return float(f"{value:.{digits}g}") if np.isfinite(value) else None


def _seconds_or_none(value):
    return _finite_or_none(value) if float(value) <= PRACTICAL_HORIZON_S else None


def _austenite_left(result, index) -> dict:
    """The carbon and Ms of the austenite left (steels), for one hold or path."""
    if result.austenite_carbon is None:
        return {}
    carbon, start = np.ravel(result.austenite_carbon)[index], np.ravel(result.martensite_start_K)[index]
    return {"austenite_carbon_mass_percent": round(float(carbon), 5),
            "austenite_Ms_C": _finite_or_none(kelvin_to_celsius(start), 5)}


def hold_summary(result) -> dict:
    """The microstructure after each hold of one temperature, the milestones and the record."""
    temperatures = np.unique(np.ravel(result.temperatures_C))
    if temperatures.size != 1:
        raise ValueError("the hold summary describes holds at one temperature")
    holds = [{"time_s": float(t), "fractions": {name: round(float(v), 6) for name, v in zip(
        result.fractions, (np.ravel(f)[k] for f in result.fractions.values()))},
        **_austenite_left(result, k)} for k, t in enumerate(np.ravel(result.times_s))]
    milestones = {
        name: {f"{x:g}": _seconds_or_none(t) for x, t in zip(result.milestone_fractions, np.ravel(times)[:len(
            result.milestone_fractions)])}
        for name, times in result.milestones_s.items()
    }
    return {
        "isokin_version": __version__,
        "alloy": result.alloy,
        "hold_temperature_C": float(temperatures[0]),
        "quench_to_C": result.quench_to_C,
        "holds": holds,
        "fraction_meaning": "share of the part after the hold and the quench; the phases sum to 1",
        "transformable_share": round(float(np.ravel(result.transformable)[0]), 6),
        "milestones_s": milestones,
        "milestone_meaning": ("seconds of hold to 1, 50 and 99 % of each product's own completion, and for 'total' "
                              "of what can transform at this temperature (milestone_of says it per curve); null: not "
                              "within the practical horizon"),
        "milestone_of": dict(result.milestone_of),
        "practical_horizon_s": PRACTICAL_HORIZON_S,
        **_record(result),
    }


def write_hold_json(result, target: Path):
    write_json(hold_summary(result), target)


def _cooling_entries(result, index):
    entry = {"final_fractions": {name: round(float(v[index]), 6) for name, v in result.final.items()},
             "starts": {name: {"time_s": _finite_or_none(result.start_time_s[name][index]),
                               "temperature_C": _finite_or_none(kelvin_to_celsius(result.start_temperature_K[name][index]))}
                        for name in result.start_time_s},
             **_austenite_left(result, index)}
    if result.hardness_HV is not None:
        hv = float(result.hardness_HV[index])
        entry["hardness_HV"] = _finite_or_none(hv, 4)
        entry["hardness_HRC"] = _finite_or_none(hrc_from_hv_astm_e140(hv), 3)
        entry["cooling_rate_at_700_C_per_h"] = _finite_or_none(result.rate_at_700_C_per_h[index], 4)
    return entry


_HARDNESS_NOTE = ("volume-fraction mixture: bainite and ferrite + pearlite by Maynier, Jungmann & Dollet (1978) at the "
                  "path's rate at 700 C (coefficients from memory); martensite by ASTM A255's carbon polynomial of the "
                  "austenite it formed from (from memory of the standard); retained austenite counted at 200 HV; HRC by "
                  "ASTM E140 rows typed from memory (null outside HRC 20-68)")


def cooling_summary(result) -> dict:
    """The phases at the end of each path, where each product starts, the hardness and the record."""
    return {
        "isokin_version": __version__,
        "alloy": result.alloy,
        "paths": [{"path": label, **_cooling_entries(result, k)} for k, label in enumerate(result.labels)],
        "fraction_meaning": "share of the part at the end of the path; the phases sum to 1",
        "start_meaning": "where a product first makes up 1 % of the part along the path",
        "hardness_method": _HARDNESS_NOTE,
        "critical_temperatures_C": _critical_C(result.critical_K),
        **_record(result),
    }


def cct_summary(result) -> dict:
    """Per rate: the final phases and hardness; the critical cooling rates; the record."""
    base = cooling_summary(result.cooling)
    base["rates"] = [{"rate_K_s": float(r), **_cooling_entries(result.cooling, k)}
                     for k, r in enumerate(result.rates_K_s)]
    del base["paths"]
    base["start_temperature_C"] = result.start_C
    base["critical_cooling_rates"] = result.critical_rates
    base["curve_meaning"] = ("start: a product (or all together, 'total') first makes up 1 % of the part; finish: it "
                             "reaches 99 % of its share at the end of that cooling; times since the start temperature")
    return base


def write_cooling_csv(result, target: Path):
    """Phases along each path: path, time_s, temperature_C and one column per phase."""
    write_columns_csv(result.columns(), target)


def _plain(value):
    if isinstance(value, (np.bool_, bool)):
        return bool(value)
    if isinstance(value, (np.floating, float)):
        return float(value) if np.isfinite(value) else None
    if isinstance(value, (np.integer, int)):
        return int(value)
    return str(value)


def plan_summary(result) -> dict:
    """The plan as a heat-treat sheet can take it: options, window, recommendation, candidates."""
    columns = list(result.rows)
    n = len(result.rows["temperature_C"])
    return {
        "isokin_version": __version__,
        "alloy": result.alloy,
        "route": result.route,
        "options": {k: _plain(v) if v is not None else None for k, v in result.options.items()},
        "window_C": None if result.window_C is None else [round(float(x), 3) for x in result.window_C],
        "recommendation": None if result.recommendation is None else {
            k: _plain(v) for k, v in result.recommendation.items()},
        "no_window": result.no_window,
        "candidates": [{c: _plain(np.asarray(result.rows[c])[k]) for c in columns} for k in range(n)],
        "critical_temperatures_C": _critical_C(result.critical_K),
        "cautions": list(result.cautions),
        "warnings": list(result.warnings),
        "model_choices": result.provenance,
        "inputs": result.inputs,
        "note": CAUTION_SHORT,
    }


def with_readable_times(columns: dict) -> dict:
    """The columns with, after each time in seconds (a name ending in ``_s``, not a rate in
    ``_K_s``), the same time as a planner reads it (``2.5 h``; empty where there is none) in
    ``<name>_readable``."""
    out = {}
    for name, values in columns.items():
        values = np.asarray(values)
        out[name] = values
        if column_unit(name) == "s" and values.dtype.kind == "f":
            out[name[:-2] + "_readable"] = np.array(
                [format_duration(v) if np.isfinite(v) and v <= PRACTICAL_HORIZON_S else "" for v in values.tolist()],
                dtype=object)
    return out


#: Units of a column, read from how its name ends (the project writes every unit into the name).
_UNIT_SUFFIXES = (("_K_s", "K/s"), ("_C", "°C"), ("_K", "K"), ("_s", "s"), ("_HV", "HV (Vickers)"),
                  ("_HRC", "HRC (Rockwell C)"), ("_readable", "text: s, min, h or d"), ("_m", "m"),
                  ("_W_m2K", "W/(m2 K)"))


def column_unit(name: str) -> str:
    """The unit a column's name gives (``hold_time_s`` -> s), or "" for a share, a flag or a text.

    >>> column_unit("required_rate_K_s"), column_unit("temperature_C"), column_unit("feasible")
    ('K/s', '°C', '')
    """
    return next((unit for suffix, unit in _UNIT_SUFFIXES if name.endswith(suffix)), "")


def write_plan_csv(result, target: Path):
    write_columns_csv(with_readable_times(result.rows), target)


def write_plan_xlsx(result, curves, target: Path):
    """A spreadsheet: the plan's candidates, a summary sheet, and the curves where given (openpyxl
    through pandas)."""
    import pandas as pd  # only a spreadsheet needs it: the other exports start without it

    summary = plan_summary(result)
    head = [("alloy", result.alloy), ("route", result.route),
            ("window_C", "" if result.window_C is None else f"{result.window_C[0]:.2f} to {result.window_C[1]:.2f}")]
    head += [(f"recommended {k}", v) for k, v in (summary["recommendation"] or {}).items()]
    head += [("no window", result.no_window or ""), ("isokin version", __version__)]
    head += [("caution", c) for c in result.cautions] + [("note", CAUTION_SHORT)]
    plan = with_readable_times(result.rows)
    columns = [(name, column_unit(name)) for name in plan]
    inputs = [(f"option {k}", _plain(v)) for k, v in result.options.items()]
    inputs += [(f"input {table}", str(values)) for table, values in result.inputs.items()]
    inputs += [(f"model {k}", str(v)) for k, v in result.provenance.items()]
    with pd.ExcelWriter(target, engine="openpyxl") as book:
        pd.DataFrame(head, columns=["item", "value"]).to_excel(book, sheet_name="summary", index=False)
        pd.DataFrame(plan).to_excel(book, sheet_name="plan", index=False)
        pd.DataFrame(columns, columns=["column", "unit"]).to_excel(book, sheet_name="units", index=False)
        pd.DataFrame(inputs, columns=["item", "value"]).to_excel(book, sheet_name="inputs", index=False)
        if curves is not None:
            curves.to_frame().to_excel(book, sheet_name="curves", index=False)


def calibrated_tables(result, data_name: str, digest: str, date: str) -> dict:
    """The alloy file's tables with the fitted values in place and a [calibration] record."""
    tables = copy.deepcopy({k: v for k, v in result.alloy.inputs.items() if k != "calibration"})
    tables["alloy"] = {**tables.get("alloy", {})}
    base_name = tables["alloy"].get("name", result.alloy.name)
    if not base_name.endswith("(calibrated)"):
        tables["alloy"]["name"] = f"{base_name} (calibrated)"[:120]
    if result.alloy.model == "steel":
        steel = tables.setdefault("steel", {})
        kinetics = steel.setdefault("kinetics", {})
        for name in result.free:
            product, _, parameter = name.partition(".")
            entry = kinetics.setdefault(product, {})
            coefficients = next(p for p in result.fitted.products if p.name == product).coefficients
            if parameter == "factor":
                entry["factor"] = float(coefficients.factor)
            elif parameter == "activation_energy_cal_mol":
                entry.pop("activation_energy_J_mol", None)
                entry["activation_energy_cal_mol"] = float(coefficients.activation_energy_cal_mol)
            else:
                entry[parameter] = float(getattr(coefficients, parameter))
        if not kinetics:
            del steel["kinetics"]
    else:
        for item in tables["product"]:
            for name in result.free:
                product, _, parameter = name.partition(".")
                if item.get("name") == product:
                    item[parameter] = float(result.values[name])
    tables["calibration"] = {
        "data_file": data_name,
        "data_sha256": digest,
        "date": date,
        "isokin_version": __version__,
        "free": list(result.free),
        "fitted": [float(result.values[n]) for n in result.free],
        "model_values": [float(result.model_values[n]) for n in result.free],
        "interval_low": [float(result.intervals[n][0]) for n in result.free],
        "interval_high": [float(result.intervals[n][1]) for n in result.free],
        "confidence": 0.95,
        "loss": result.loss,
        "points": int(result.data.time_s.size),
        "rms_ln_t": float(result.rms_ln_t),
    }
    return tables


def calibrated_file(result, data_name: str, digest: str, date: str) -> str:
    """The text of the calibrated alloy file: a header saying what was fitted to what and how
    well, then :func:`calibrated_tables` (loadable by ``isokin.load_alloy``, and by
    ``isokin.load_calibration`` for another heat). ``date``: ISO 8601, as the record keeps it."""
    header = (f"Calibrated by isokin {__version__} on {date} from {data_name} (sha256 {digest[:16]}...).\n"
              f"Fitted: {', '.join(result.free) or 'nothing'}; rms of ln(model/measured time) {result.rms_ln_t:.3f}.\n"
              "A calibration describes the heat it was measured on; confirm before production.")
    return dumps(calibrated_tables(result, data_name, digest, date), header)


def fit_report(result, data_name: str, digest: str, date: str) -> dict:
    """Parameters with intervals, residuals per point, Avrami exponents, fit quality, the record."""
    model = result.model_times_s
    d = result.data
    return {
        "isokin_version": __version__,
        "alloy": result.alloy.name,
        "data_file": data_name,
        "data_sha256": digest,
        "date": date,
        "loss": result.loss,
        "parameters": [{"name": n, "model_value": result.model_values[n], "fitted": result.values[n],
                        "interval_95": [_plain(v) for v in result.intervals[n]],
                        **({"bootstrap_interval_95": [_plain(v) for v in result.bootstrap_intervals[n]]}
                           if n in result.bootstrap_intervals else {})} for n in result.free],
        "rms_ln_t": result.rms_ln_t,
        "points": [{"row": int(d.rows[k]) if d.rows else k + 1, "temperature_C": float(kelvin_to_celsius(d.temperature_K[k])),
                    "fraction": float(d.fraction[k]), "product": d.product[k] or "total",
                    "measured_time_s": float(d.time_s[k]), "model_time_s": _plain(model[k]),
                    "residual_ln_t": _plain(result.residuals_ln_t[k])} for k in range(d.time_s.size)],
        "avrami_exponents": [{k: _plain(v) if not isinstance(v, str) else v for k, v in a.items()}
                             for a in result.avrami],
        "meaning": ("residual = ln(model time / measured time); intervals from the Jacobian at the solution "
                    "(Student t, 95 %); the band of the figure from 100 parameter sets drawn from that covariance"),
        "note": CAUTION_SHORT,
    }


def spread_summary(result) -> dict:
    """Noses and Ms over the composition range, the drivers of the spread, the sampling."""
    T_first, t_first = result.earliest_start()
    noses = {}
    for curve, q in result.nose_quantiles.items():
        noses[curve] = {f"{x:g}": {"temperature_C": {f"q{int(round(l * 100)):02d}": _plain(float(kelvin_to_celsius(
            q["temperature_K"][j, k]))) for j, l in enumerate(result.quantile_levels)},
            "time_s": {f"q{int(round(l * 100)):02d}": _plain(float(q["time_s"][j, k]))
                       for j, l in enumerate(result.quantile_levels)}}
            for k, x in enumerate(result.nominal.fractions)}
    return {
        "isokin_version": __version__,
        "alloy": result.alloy,
        "samples": result.samples,
        "seed": result.seed,
        "design": "Latin hypercube (scipy.stats.qmc): uniform over [min, max], normal for nominal +- one sigma",
        "ranges": {e: {"kind": k, "a": a, "b": b} for e, (k, a, b) in result.ranges.items()},
        "ms_range_C": [round(float(kelvin_to_celsius(t)), 3) for t in result.ms_range_K],
        "earliest_start": {"temperature_C": round(float(kelvin_to_celsius(T_first)), 3), "time_s": _plain(t_first)},
        "noses": noses,
        "sensitivity": list(result.sensitivity),
        "meaning": ("quantiles over the sampled heats; the earliest 1 % curve is the worst case for holds and "
                    "quenches; null: not formed within the practical horizon"),
        "note": CAUTION_SHORT,
    }


def compare_summary(results) -> dict:
    out = []
    for r in results:
        n = r.noses[r.overall or r.products[0]]
        out.append({"alloy": r.alloy, "critical_temperatures_C": {k: round(float(kelvin_to_celsius(v)), 3)
                                                                   for k, v in r.critical_K.items()},
                    "start_nose_temperature_C": _plain(float(n.temperature_C[0])) if n.forms[0] else None,
                    "start_nose_time_s": _plain(float(n.time_s[0])) if n.forms[0] else None,
                    "inputs": r.inputs})
    return {"isokin_version": __version__, "alloys": out, "start_meaning": "1 % of what can transform (total)",
            "note": CAUTION_SHORT}


def temper_summary(result) -> dict:
    """Each temper with its parameter, equivalent 1 h temperature and hardness (HV, HRC), the
    curve it was read from, the embrittlement flags and the record."""
    tempers = [{"temperature_C": _finite_or_none(T), "time_s": _finite_or_none(t),
                "hollomon_jaffe_parameter": _finite_or_none(P), "equivalent_1h_temperature_C": _finite_or_none(T1),
                "hardness_HV": _finite_or_none(hv, 4), "hardness_HRC": _finite_or_none(hrc_from_hv_astm_e140(hv), 3),
                "embrittlement_range": bool(flag),
                **({} if result.target_HV is None else {"target_HV": _finite_or_none(result.target_HV[k], 4)})}
               for k, (T, t, P, T1, hv, flag) in enumerate(zip(
                   result.temperatures_C, result.times_s, result.parameter, result.equivalent_1h_C,
                   result.hardness_HV, result.embrittlement))]
    curve = result.curve
    return {
        "isokin_version": __version__,
        "alloy": result.alloy,
        "method": ("Hollomon-Jaffe (1945) parameter P = T_K (C + log10 t_h); hardness read from the measured "
                   "tempering curve at equal P (linear in P, not extrapolated)"),
        "hollomon_jaffe_constant": result.constant,
        "tempers": tempers,
        "tempering_curve": {"source": curve.source, "temperature_C": [round(float(v), 4) for v in
                                                                      kelvin_to_celsius(curve.temperature_K)],
                            "hardness_HV": [round(float(v), 4) for v in curve.hardness_HV],
                            "time_s": [float(v) for v in curve.time_s]},
        "warnings": list(result.warnings),
        "inputs": result.inputs,
        "note": CAUTION_SHORT,
    }


def section_summary(result) -> dict:
    """A quenched section: its inputs, depths to martensite, centre arrival, profile and record."""
    sections = []
    for k, size in enumerate(result.size_m):
        entry = {"size_mm": float(size * 1e3), "biot_number": _finite_or_none(result.biot_number[k], 4),
                 "martensite_depth_mm": {f"{level:g}": round(float(d[k] * 1e3), 3)
                                         for level, d in result.martensite_depth_m.items()},
                 "centre_within_5_K_of_medium_s": _finite_or_none(result.centre_at_medium_s[k], 5),
                 "heat_balance_J": {"out_through_surface": _finite_or_none(result.heat_out_J[k]),
                                    "released_by_products": _finite_or_none(result.latent_J[k])},
                 "profile": [{"depth_mm": round(float(result.depth_m[k, j] * 1e3), 4),
                              **{name: round(float(v[k, j]), 5) for name, v in result.final.items()},
                              **({"hardness_HV": _finite_or_none(result.hardness_HV[k, j], 4),
                                  "hardness_HRC": _finite_or_none(hrc_from_hv_astm_e140(result.hardness_HV[k, j]), 3)}
                                 if result.hardness_HV is not None else {})}
                             for j in range(result.depth_m.shape[1])]}
        sections.append(entry)
    return {
        "isokin_version": __version__,
        "alloy": result.alloy,
        "shape": result.shape,
        "start_temperature_C": result.start_C,
        "medium_temperature_C": result.medium_C,
        "surface": result.surface,
        "sections": sections,
        "size_meaning": "thickness of a plate, diameter of a bar or sphere",
        "heat_balance_meaning": "J per unit of r^m area (per m2 of plate face; per radian and m of bar; per steradian)",
        "hardness_method": _HARDNESS_NOTE,
        "critical_temperatures_C": _critical_C(result.critical_K),
        **_record(result),
    }


def write_temper_json(result, target: Path):
    write_json(temper_summary(result), target)


def write_temper_csv(result, target: Path):
    write_columns_csv(with_readable_times({"temperature_C": result.temperatures_C, "time_s": result.times_s,
                       "hollomon_jaffe_parameter": result.parameter,
                       "equivalent_1h_temperature_C": result.equivalent_1h_C, "hardness_HV": result.hardness_HV,
                       "hardness_HRC": hrc_from_hv_astm_e140(result.hardness_HV),
                       "embrittlement_range": result.embrittlement.astype(int)}), target)


def jominy_summary(result) -> dict:
    """The end-quench curve at the standard distances, J50, DI, the band check and the record."""
    band = None
    if result.band is not None:
        b = result.band
        band = [{"distance_mm": round(float(d * 1e3), 3), "hrc_min": float(lo), "hrc_max": float(hi),
                 "predicted_HRC": round(float(p), 2), "inside": not bool(o)}
                for d, lo, hi, p, o in zip(b["distance_m"], b["hrc_min"], b["hrc_max"], b["predicted_HRC"],
                                           b["outside"])]
    columns = result.columns()
    return {
        "isokin_version": __version__,
        "alloy": result.alloy,
        "start_temperature_C": result.start_C,
        "water_temperature_C": result.water_C,
        "curve": [{"position": p, "distance_mm": round(float(d), 4), "hardness_HV": _finite_or_none(hv, 4),
                   "hardness_HRC": _finite_or_none(hrc_from_hv_astm_e140(hv), 3)}
                  for p, d, hv in zip(columns["position"], columns["distance_mm"], columns["hardness_HV"])],
        "distance_to_50_percent_martensite_mm": round(result.half_martensite_m * 1e3, 3),
        "ideal_critical_diameter_in": round(result.ideal_diameter_in, 3),
        "ideal_critical_diameter_mm": round(result.ideal_diameter_in * 25.4, 1),
        "band": band,
        "hardness_method": _HARDNESS_NOTE,
        **_record(result),
    }
