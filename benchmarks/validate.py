"""Measured accuracy of the Ms and Bs correlations isokin offers, against open data.

    python benchmarks/validate.py [--figure PATH]

The measurements are read from ``../shared/validation/`` beside the repository (never
copied into it; its README.md describes them):

- Ms: the database published with M. Wentzien, M. Koch, T. Friedrich, J. Ingber, H. Kempka,
  D. Schmalzried, M. Kunert, "Machine Learning-Based Prediction of the Martensite Start
  Temperature", steel research int. 95(10) (2024) 2400210, doi:10.1002/srin.202400210
  (``ms_wentzien2024.csv``, from the repository EAH-Materials/MartensiteStart_DeepLearning);
  and the experimental Ms compilation of the libreCalphad project (M. Frichtl, repository
  mfrichtl/librecalphad, commit ccd18dab, MIT licence; no DOI; ``ms_librecalphad.csv``), of
  which only the lath and plate (alpha') martensite rows are used.
- Bs: the data supplement of B. Schuscha, D. Brandl, L. Romaner, E. Kozeschnik, R. Ebner,
  A. Jacob, P. Presoly, D. Scheiber, "Predictive modeling of the bainite start temperature
  using Bayesian inference", Acta Mater. (2025) 121131, doi:10.1016/j.actamat.2025.121131
  (``bs_schuscha2025.csv``).

For every Ms method of :data:`isokin.products.critical.MS_METHODS` and Bs method of
``BS_METHODS`` it prints predicted minus measured (K) over all records, those inside the
method's stated range, those outside, and the low-alloy records (the ones the figure
shows); then the Ms errors by carbon band over the low-alloy records; then one batch of
every Ms record with C <= 2.1 % through the public ``isokin.steel``. The two Ms sets share
many measurements (the script counts them); they are pooled as published, not merged.

Rules (both are judgement, written here so that the numbers can be reproduced):

- *Inside a method's stated range*: every element the range
  (``isokin.relations.steel_critical.CALIBRATED_RANGES``) names lies within its bounds;
  the alloying elements it does not name sum to at most ``OTHERS_LIMIT`` (1 mass %: the
  residual silicon and copper and the microalloying of ordinary steels, common practice);
  nitrogen, when the range does not name it, is at most ``NITROGEN_LIMIT`` (0.05 %: an
  interstitial that lowers Ms about as carbon does, so a nitrogen steel is not a carbon
  steel; the level is common practice). The impurities P, S, B and As (and H and O of the
  libreCalphad notes) never count: they are held at trace levels (at most 0.07 P, 0.1 S,
  0.03 B here). Elements outside isokin's set (Ta, Ce, Zr in the libreCalphad notes) count
  as unnamed alloying elements. So a record with 5 % W is outside every range.
- *Low-alloy*: the alloying elements besides carbon (same exclusions, nitrogen included)
  sum to at most ``LOW_ALLOY_LIMIT`` (5 mass %, the usual boundary of low-alloy steels,
  common practice) and nitrogen is at most ``NITROGEN_LIMIT``.

Not a test: ``tests/test_validation_data.py`` holds the defaults to these numbers.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

import numpy as np
import pandas as pd

import isokin
from isokin.constants import celsius_to_kelvin, kelvin_to_celsius
from isokin.products.critical import BS_METHODS, DEFAULT_BS_METHOD, DEFAULT_MS_METHOD, MS_METHODS
from isokin.products.steel import MAX_STEEL_CARBON
from isokin.relations.composition import ELEMENTS, Composition
from isokin.relations.steel_critical import CALIBRATED_RANGES

#: The shared folder of measured data, beside the repository.
DATA_DIR = Path(__file__).resolve().parents[1].parent / "shared" / "validation"
#: libreCalphad martensite types that are alpha' martensite (epsilon martensite is another phase).
MARTENSITE_TYPES = ("lath", "plate")
#: Impurities left out of every sum of alloying elements (see the module docstring).
TRACE_ELEMENTS = ("P", "S", "B", "As", "H", "O")
#: Unnamed alloying elements a record inside a range may hold in total, mass %.
OTHERS_LIMIT = 1.0
#: Nitrogen a record inside a range (or a low-alloy record) may hold, mass %.
NITROGEN_LIMIT = 0.05
#: Alloying besides carbon of a low-alloy steel, at most, mass %.
LOW_ALLOY_LIMIT = 5.0
#: Carbon bands of the Ms breakdown, mass %: [low, high).
CARBON_BANDS = ((0.0, 0.2), (0.2, 0.4), (0.4, 0.6), (0.6, 0.8), (0.8, 1.0), (1.0, 1.4), (1.4, np.inf))
#: The alternative drawn beside each default.
ALTERNATIVES = {"Ms": "andrews_1965", "Bs": "steven_haynes_1956"}
#: The band drawn about the 1:1 line, K.
BAND_K = 50.0
#: Figure and square axes, inches: fixed, so that the text check sees the layout as saved.
FIGURE_IN = (11.0, 5.8)
AXES_SIDE_IN = 4.4
AXES_LEFT_IN = (0.8, 6.2)
AXES_BOTTOM_IN = 0.85
SOURCES = "Measured: Wentzien et al. 2024 and the libreCalphad compilation (Ms), Schuscha et al. 2025 (Bs)"
COUNTED = [e for e in ELEMENTS if e not in TRACE_ELEMENTS]


def _unlisted_mass_percent(notes: pd.Series) -> np.ndarray:
    """Mass % of elements outside isokin's set, from notes such as 'Ce=0.13 Ta=0.48' (H, O left out)."""
    def total(text):
        pairs = (item.split("=") for item in str(text).split()) if isinstance(text, str) else ()
        return sum(float(value) for symbol, value in pairs if symbol not in TRACE_ELEMENTS)
    return notes.map(total).to_numpy(dtype=float)


def _records(frame: pd.DataFrame, measured_C: pd.Series, source: str) -> pd.DataFrame:
    """Element columns (blanks 0), the unlisted elements, the measured value in K and the source."""
    records = frame.reindex(columns=list(ELEMENTS)).fillna(0.0).astype(float)
    notes = frame["other_elements"] if "other_elements" in frame else pd.Series(np.nan, index=frame.index)
    records["unlisted"] = _unlisted_mass_percent(notes)
    records["measured_K"] = celsius_to_kelvin(measured_C.to_numpy(dtype=float))
    records["source"] = source
    return records.reset_index(drop=True)


def read_ms(folder: Path = DATA_DIR) -> pd.DataFrame:
    """The measured Ms of both sets, one row per record (alpha' martensite only)."""
    wentzien = pd.read_csv(folder / "ms_wentzien2024.csv")
    librecalphad = pd.read_csv(folder / "ms_librecalphad.csv")
    librecalphad = librecalphad[librecalphad["martensite_type"].isin(MARTENSITE_TYPES)]
    return pd.concat([_records(wentzien, wentzien["Ms_meas_C"], "Wentzien et al. 2024"),
                      _records(librecalphad, librecalphad["Ms_meas_C"], "libreCalphad")], ignore_index=True)


def read_bs(folder: Path = DATA_DIR) -> pd.DataFrame:
    """The measured Bs of Schuscha et al. (2025), one row per record."""
    schuscha = pd.read_csv(folder / "bs_schuscha2025.csv")
    return _records(schuscha, schuscha["Bs_meas_C"], "Schuscha et al. 2025")


def shared_records(ms: pd.DataFrame) -> int:
    """libreCalphad records whose analysis (to 0.01 %) and Ms (to 1 K) also appear in Wentzien's set."""
    key = ms[list(ELEMENTS)].round(2).astype(str).agg("|".join, axis=1) + "#" + ms["measured_K"].round(0).astype(str)
    wentzien = set(key[ms["source"] == "Wentzien et al. 2024"])
    return int(key[ms["source"] == "libreCalphad"].isin(wentzien).sum())


def composition(records: pd.DataFrame) -> Composition:
    return Composition.from_dict({e: records[e].to_numpy() for e in ELEMENTS})


def _alloying(records: pd.DataFrame, elements) -> np.ndarray:
    return records[list(elements)].sum(axis=1).to_numpy() + records["unlisted"].to_numpy()


def inside_range(records: pd.DataFrame, ranges: dict) -> np.ndarray:
    """Records inside a correlation's stated range (the rule of the module docstring)."""
    inside = np.ones(len(records), dtype=bool)
    for element, (low, high) in ranges.items():
        inside &= records[element].between(low, high).to_numpy()
    unnamed = [e for e in COUNTED if e not in ranges and e != "N"]
    nitrogen_ok = records["N"].to_numpy() <= NITROGEN_LIMIT if "N" not in ranges else True
    return inside & (_alloying(records, unnamed) <= OTHERS_LIMIT) & nitrogen_ok


def low_alloy(records: pd.DataFrame) -> np.ndarray:
    """Records of low-alloy steels (the rule of the module docstring)."""
    besides_carbon = [e for e in COUNTED if e != "C"]
    return (_alloying(records, besides_carbon) <= LOW_ALLOY_LIMIT) & (records["N"].to_numpy() <= NITROGEN_LIMIT)


def errors_K(records: pd.DataFrame, function) -> np.ndarray:
    """Predicted minus measured, K, of one correlation over the records."""
    return np.asarray(function(composition(records)), dtype=float) - records["measured_K"].to_numpy()


def statistics(errors: np.ndarray) -> dict:
    """n, mean, RMS, median absolute and maximum absolute error, K (NaN for no records)."""
    errors = np.asarray(errors, dtype=float)
    if errors.size == 0:
        return {"n": 0, "mean_K": np.nan, "rms_K": np.nan, "median_abs_K": np.nan, "max_abs_K": np.nan}
    return {"n": errors.size, "mean_K": errors.mean(), "rms_K": np.sqrt(np.mean(errors**2)),
            "median_abs_K": np.median(np.abs(errors)), "max_abs_K": np.max(np.abs(errors))}


def accuracy_table(ms: pd.DataFrame, bs: pd.DataFrame) -> pd.DataFrame:
    """Every method on all records, inside its stated range, outside it, and on the low-alloy records."""
    rows = []
    for quantity, methods, records in (("Ms", MS_METHODS, ms), ("Bs", BS_METHODS, bs)):
        for key, (function, label, range_key) in methods.items():
            errors = errors_K(records, function)
            inside = inside_range(records, CALIBRATED_RANGES[range_key])
            for subset, mask in (("all", slice(None)), ("inside", inside), ("outside", ~inside),
                                 ("low-alloy", low_alloy(records))):
                rows.append({"quantity": quantity, "method": label, "key": key, "subset": subset,
                             **statistics(errors[mask])})
    return pd.DataFrame(rows)


def carbon_bands(ms: pd.DataFrame) -> pd.DataFrame:
    """Ms errors of every method by carbon band, over the low-alloy records (last row: all bands)."""
    records = ms[low_alloy(ms)]
    carbon = records["C"].to_numpy()
    bands = [(f"{low:.1f}-{high:.1f}" if np.isfinite(high) else f">{low:.1f}", (carbon >= low) & (carbon < high))
             for low, high in CARBON_BANDS] + [("all", np.ones(carbon.size, dtype=bool))]
    rows = []
    for key, (function, label, _) in MS_METHODS.items():
        errors = errors_K(records, function)
        rows += [{"C_band": band, "method": label, "key": key, **statistics(errors[mask])} for band, mask in bands]
    return pd.DataFrame(rows)


def batch_check(ms: pd.DataFrame) -> dict:
    """Every Ms record with C <= 2.1 % as one batch through ``isokin.steel``, against the default relation.

    A record counts as computed where the batch marks it valid and gives it an Ms.
    """
    kept = ms[ms["C"] <= MAX_STEEL_CARBON]
    alloy = isokin.steel(kept[list(ELEMENTS)])
    ms_K = np.asarray(alloy.critical_K["Ms"], dtype=float)
    relation = np.asarray(MS_METHODS[DEFAULT_MS_METHOD][0](composition(kept)), dtype=float)
    valid = np.ones(len(kept), dtype=bool) if alloy.valid is None else np.asarray(alloy.valid)
    finite = np.isfinite(ms_K)
    return {"records": len(kept), "dropped_cast_iron": len(ms) - len(kept), "valid_mask": alloy.valid is not None,
            "valid": int(valid.sum()), "computed": int(np.sum(valid & finite)),
            "ms_on_invalid": int(np.sum(~valid & finite)),
            "max_difference_K": float(np.max(np.abs(ms_K[finite] - relation[finite]))),
            "missed": int(np.sum(valid & (relation > 0.0) & ~finite))}


def _fmt(frame: pd.DataFrame) -> str:
    return frame.drop(columns="key").to_string(index=False, float_format=lambda v: f"{v:.1f}")


def report(ms: pd.DataFrame, bs: pd.DataFrame) -> None:
    print(f"Ms: {len(ms)} records ({(ms['source'] == 'Wentzien et al. 2024').sum()} Wentzien et al. 2024, "
          f"{(ms['source'] == 'libreCalphad').sum()} libreCalphad lath/plate; {shared_records(ms)} libreCalphad "
          f"records repeat an analysis and Ms of Wentzien's set); Bs: {len(bs)} records (Schuscha et al. 2025)")
    print("\nPredicted minus measured, K (inside: the method's stated range; low-alloy: see the docstring)")
    print(_fmt(accuracy_table(ms, bs)))
    print(f"\nMs by carbon band, mass %, over the {int(low_alloy(ms).sum())} low-alloy records, K")
    print(_fmt(carbon_bands(ms)))
    batch = batch_check(ms)
    print(f"\nisokin.steel on one batch of {batch['records']} Ms records ({batch['dropped_cast_iron']} with C above "
          f"{MAX_STEEL_CARBON:g} % dropped as cast iron): {batch['valid']} valid, {batch['computed']} computed "
          f"(valid with an Ms), {batch['missed']} valid with a relation above 0 K but no Ms; Ms equals "
          f"{MS_METHODS[DEFAULT_MS_METHOD][1]} within {batch['max_difference_K']:.2g} K wherever given; "
          f"{batch['ms_on_invalid']} heats marked invalid still carry an Ms")


def draw(ms: pd.DataFrame, bs: pd.DataFrame, path: Path) -> None:
    """Predicted against measured Ms and Bs, the defaults and one alternative each, low-alloy records."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    fig = plt.figure(figsize=FIGURE_IN)
    axes = [fig.add_axes((left / FIGURE_IN[0], AXES_BOTTOM_IN / FIGURE_IN[1], AXES_SIDE_IN / FIGURE_IN[0],
                          AXES_SIDE_IN / FIGURE_IN[1])) for left in AXES_LEFT_IN]
    panels = (("Ms", "Martensite start", MS_METHODS, DEFAULT_MS_METHOD, ms),
              ("Bs", "Bainite start", BS_METHODS, DEFAULT_BS_METHOD, bs))
    for ax, (quantity, title, methods, default, records) in zip(axes, panels):
        records = records[low_alloy(records)]
        measured = kelvin_to_celsius(records["measured_K"].to_numpy())
        for key, marker, colour in ((ALTERNATIVES[quantity], "^", "tab:orange"), (default, "o", "tab:blue")):
            function, label, _ = methods[key]
            errors = errors_K(records, function)
            ax.scatter(measured, measured + errors, s=9, marker=marker, color=colour, alpha=0.45, linewidths=0,
                       label=f"{label}: RMS {statistics(errors)['rms_K']:.0f} K")
        low, high = np.min(measured) - 40.0, np.max(measured) + 40.0
        ax.plot([low, high], [low, high], color="black", lw=1.0, label="predicted = measured")
        for sign in (1.0, -1.0):
            ax.plot([low, high], [low + sign * BAND_K, high + sign * BAND_K], color="grey", lw=0.8, ls="--",
                    label=f"±{BAND_K:g} K" if sign > 0 else None)
        ax.set(xlim=(low, high), ylim=(low, high), xlabel=f"measured {quantity}, °C",
               ylabel=f"predicted {quantity}, °C", title=f"{title}, {quantity}: {len(records)} low-alloy records")
        ax.legend(loc="upper left", fontsize=8, framealpha=0.9)
    fig.text(0.5, 0.005, SOURCES, ha="center", va="bottom", fontsize=7.5, color="dimgrey")
    clashes = text_clashes(fig)
    if clashes:
        raise RuntimeError(f"figure text overlaps or leaves the figure: {clashes[0]}")
    path.parent.mkdir(parents=True, exist_ok=True)
    fig.savefig(path, dpi=150)
    plt.close(fig)


def text_clashes(fig) -> list[str]:
    """Pairs of drawn texts whose boxes overlap, and texts that leave the figure (tick labels of ticks
    outside an axis' limits are not drawn and do not count)."""
    from matplotlib.text import Text

    fig.canvas.draw()
    renderer = fig.canvas.get_renderer()
    frame = fig.bbox
    undrawn = {id(label) for ax in fig.axes for axis in (ax.xaxis, ax.yaxis)
               for tick in axis.get_major_ticks() + axis.get_minor_ticks()
               if not min(axis.get_view_interval()) <= tick.get_loc() <= max(axis.get_view_interval())
               for label in (tick.label1, tick.label2)}
    texts = [t for t in fig.findobj(Text) if t.get_visible() and t.get_text().strip() and id(t) not in undrawn]
    boxes = [(t.get_text(), t.get_window_extent(renderer)) for t in texts]
    clashes = [f"'{text}' outside the figure" for text, box in boxes
               if box.x0 < frame.x0 or box.y0 < frame.y0 or box.x1 > frame.x1 or box.y1 > frame.y1]
    clashes += [f"'{a}' overlaps '{b}'" for i, (a, box_a) in enumerate(boxes) for b, box_b in boxes[i + 1:]
                if box_a.overlaps(box_b)]
    return clashes


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description="Measured accuracy of isokin's Ms and Bs correlations.")
    parser.add_argument("--figure", type=Path, help="also draw predicted against measured Ms and Bs to this file")
    args = parser.parse_args(argv)
    if not DATA_DIR.is_dir():
        print(f"validate: no measured data at {DATA_DIR} (see the module docstring)", file=sys.stderr)
        return 2
    ms, bs = read_ms(), read_bs()
    report(ms, bs)
    if args.figure is not None:
        draw(ms, bs, args.figure)
        print(f"\nfigure written to {args.figure}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
