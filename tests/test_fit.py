"""Calibration to measured isothermal holds: recovery, intervals, robustness, files, bad data."""

import json
import sys
from pathlib import Path

import numpy as np
import pytest

import isokin
from isokin.compute import fit as F
from isokin.constants import celsius_to_kelvin, kelvin_to_celsius
from isokin.io.measurements import read_measurements

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(Path(__file__).parent))
from test_hardening import refused, run_main  # noqa: E402

STEEL = isokin.load_alloy(ROOT / "alloys" / "aisi-4140-crmo.toml")
T_C = (380.0, 420.0, 460.0)


def synthetic(alloy, truth, noise, seed, temperatures=T_C, points=20, product=None):
    """Measurements generated from known parameters, with log-normal scatter in time (invented)."""
    rng = np.random.default_rng(seed)
    T = np.repeat(celsius_to_kelvin(np.array(temperatures)), points)
    X = np.tile(np.linspace(0.05, 0.95, points), len(temperatures))
    names = (product,) * T.size
    exact = F.model_times(F.with_values(alloy, truth), F.Measurements(T, X, np.ones_like(T), names))
    noisy = (exact * np.exp(rng.normal(0.0, noise, T.size))).reshape(len(temperatures), points)
    # a dilatometer records in time order: the fractions rise along each isotherm
    return F.Measurements(T, X, np.sort(noisy, axis=1).ravel(), names)


def test_the_fit_recovers_known_parameters_within_its_intervals():
    # Coverage over seeds: the 95 % intervals hold the truth in most repeats.
    truth = {"bainite.factor": 2.0, "bainite.activation_energy_cal_mol": 28000.0}
    hits, repeats = 0, 12
    for seed in range(repeats):
        result = F.fit(STEEL, synthetic(STEEL, truth, 0.08, seed), free=tuple(truth))
        hits += all(result.intervals[n][0] <= v <= result.intervals[n][1] for n, v in truth.items())
    assert hits / repeats >= 0.75


def test_avrami_regression_recovers_the_exponent():
    # Synthetic JMAK data, X = 1 - exp(-k t^n), for n = 1, 2.5, 4 (Avrami 1939-41).
    t = np.geomspace(1.0, 100.0, 12)
    for n in (1.0, 2.5, 4.0):
        k = (1.0 / 30.0) ** n
        X = 1 - np.exp(-k * t**n)
        keep = (X > 1e-4) & (X < 1 - 1e-9)
        assert F.avrami_exponent(t[keep], X[keep]) == pytest.approx(n, rel=1e-10)


def test_no_free_parameters_reproduce_the_model_and_the_calibrated_file_reloads(tmp_path):
    data = synthetic(STEEL, {"bainite.factor": 1.5}, 0.05, 3)
    none = F.fit(STEEL, data, free=())
    assert none.fitted is STEEL and none.values == {}
    np.testing.assert_allclose(none.residuals_ln_t, np.log(F.model_times(STEEL, data) / data.time_s), rtol=1e-12)
    csv = tmp_path / "holds.csv"
    csv.write_text("temperature_C,time_s,fraction\n" + "".join(
        f"{kelvin_to_celsius(T):.6f},{float(t)!r},{float(x)!r}\n" for T, t, x in zip(data.temperature_K, data.time_s,
                                                                   data.fraction)))
    out = tmp_path / "calibrated.toml"
    code, text, err, _ = run_main("fit", csv, "--alloy", ROOT / "alloys" / "aisi-4140-crmo.toml", "--out", out,
                                  "--free", "bainite.factor")
    assert code == 0, err
    reloaded = isokin.load_alloy(out)
    data_again, _ = read_measurements(csv)
    fitted = F.fit(STEEL, data_again, free=("bainite.factor",)).fitted
    a, b = isokin.ttt(fitted, points=60), isokin.ttt(reloaded, points=60)
    for name in a.products:
        np.testing.assert_allclose(b.times_s[name], a.times_s[name], rtol=1e-9)
    assert reloaded.inputs["calibration"]["free"] == ["bainite.factor"]
    report = json.loads((tmp_path / "calibrated-fit.json").read_text())
    assert report["parameters"][0]["name"] == "bainite.factor" and len(report["points"]) == data.time_s.size


def test_a_gross_outlier_moves_the_robust_fit_less_than_plain_least_squares():
    data = synthetic(STEEL, {"bainite.factor": 2.0}, 0.03, 5)
    times = data.time_s.copy()
    times[7] *= 30.0  # one hold read wrong by a factor of 30
    spoiled = F.Measurements(data.temperature_K, data.fraction, times, data.product)
    free = ("bainite.factor",)
    clean = F.fit(STEEL, data, free=free).values["bainite.factor"]
    robust = F.fit(STEEL, spoiled, free=free).values["bainite.factor"]
    plain = F.fit(STEEL, spoiled, free=free, loss="linear").values["bainite.factor"]
    assert abs(np.log(robust / clean)) < abs(np.log(plain / clean))


def test_a_physical_alloy_is_fitted_in_its_own_parameters():
    alloy = isokin.load_alloy(ROOT / "alloys" / "brackwater-ba42-precipitation.toml")
    truth = {"precipitate.interface_energy_J_m2": 0.105}
    data = synthetic(alloy, truth, 0.05, 9, temperatures=(300.0, 350.0, 400.0), product="precipitate")
    result = F.fit(alloy, data, free=tuple(truth))
    low, high = result.intervals["precipitate.interface_energy_J_m2"]
    assert low <= 0.105 <= high and high - low < 0.005


@pytest.mark.parametrize("text, expected", [
    ("temperature_C,time_s,fraction\n400,10,1.2\n", "from 0.0001 to 0.9999"),
    ("temperature_C,time_s,fraction\n400,-10,0.5\n", "times must lie from 0.001"),
    ("temperature_C,time_s,fraction\n400,10,0.5\n400,20,0.3\n", "falls with time"),
    ("temperature_C,time_s,fraction,product\n900,10,0.5,bainite\n", "cannot reach"),
    ("temperature_C,time_s,fraction\n400,10,0.5\n", "cannot fit"),
    ("temperature_C,time_s,fraction,product\n400,10,0.5,sorbite\n", "unknown product"),
    ("time,fraction\n1,0.5\n", "needs the columns"),
])
def test_bad_data_is_named_by_its_row(text, expected, tmp_path):
    data = tmp_path / "bad.csv"
    data.write_text(text)
    code, _, err, _ = run_main("fit", data, "--alloy", ROOT / "alloys" / "aisi-4140-crmo.toml", "--out",
                               tmp_path / "c.toml", "--free", "bainite.factor", "--free", "ferrite.factor")
    assert refused(code, err, expected)


def test_the_demo_fit_never_overwrites_its_input(tmp_path):
    demo = ROOT / "alloys" / "brackwater-bw52crv-dilatometer.csv"
    alloy = ROOT / "alloys" / "brackwater-bw52crv.toml"
    code, _, err, _ = run_main("fit", demo, "--alloy", alloy, "--out", alloy, "--overwrite")
    assert code == 2 and "never overwrites its input" in err
    code, out, err, _ = run_main("fit", demo, "--alloy", alloy, "--out", tmp_path / "bw52-cal.toml")
    assert code == 0, err
    assert "bainite.factor" in out and (tmp_path / "bw52-cal-fit.png").stat().st_size > 10_000
    fitted = isokin.load_alloy(tmp_path / "bw52-cal.toml")
    data, _ = read_measurements(demo)
    residual = np.log(F.model_times(fitted, data) / data.time_s)
    assert np.sqrt(np.mean(residual**2)) < 0.1  # the diagram passes through the measurements


def test_a_calibration_transfers_to_another_heat_by_the_models_own_composition_terms(tmp_path):
    # Reference grade A (the shipped 4140) calibrated on curves made with known factors; the
    # calibrated file applied to A reproduces A's fitted curves, and applied to another heat B
    # moves B's curves by the same factors: t_B,cal / t_A,cal = t_B / t_A (the model's own ratio).
    data = synthetic(STEEL, {"bainite.factor": 2.0}, 0.0, 0, product="bainite")
    data_f = synthetic(STEEL, {"ferrite.factor": 0.6}, 0.0, 1, temperatures=(650.0, 680.0), product="ferrite")
    rows = ["temperature_C,time_s,fraction,product"]
    for d in (data, data_f):
        rows += [f"{kelvin_to_celsius(T):.6g},{float(t)!r},{float(x)!r},{p}"
                 for T, t, x, p in zip(d.temperature_K, d.time_s, d.fraction, d.product)]
    (tmp_path / "a.csv").write_text("\n".join(rows) + "\n")
    code, _, err, _ = run_main("fit", tmp_path / "a.csv", "--alloy", ROOT / "alloys" / "aisi-4140-crmo.toml",
                               "--out", tmp_path / "a-cal.toml", "--free", "bainite.factor", "--free", "ferrite.factor")
    assert code == 0, err
    calibration = isokin.load_calibration(tmp_path / "a-cal.toml")
    assert calibration.kinetics_model == STEEL.options["kinetics_model"]
    a = {k: float(v) for k, v in STEEL.inputs["composition"].items()}
    b = {**a, "C": 0.30, "Mn": 1.1, "Mo": 0.05}
    T = np.linspace(350.0, 700.0, 36)
    times = {}
    for label, composition, cal in (("A", a, None), ("A cal", a, calibration), ("B", b, None), ("B cal", b, calibration)):
        result = isokin.ttt(isokin.steel(composition, 7.0, calibration=cal), temperatures_C=T)
        times[label] = {p: result.times_s[p] for p in ("ferrite", "bainite")}
    for p, factor in (("ferrite", 0.6), ("bainite", 2.0)):
        ok = np.isfinite(times["A"][p]) & np.isfinite(times["B"][p])
        np.testing.assert_allclose(times["A cal"][p][ok] / times["A"][p][ok], factor, rtol=1e-6)
        np.testing.assert_allclose(times["B cal"][p][ok] / times["A cal"][p][ok], times["B"][p][ok] / times["A"][p][ok],
                                   rtol=1e-6)
    # the command line applies it to an analysis, and the summary records both heats
    code, _, err, _ = run_main("diagram", "--composition", "C=0.30,Mn=1.1,Si=0.25,Cr=0.95,Mo=0.05", "--calibration",
                               tmp_path / "a-cal.toml", "--name", "heat B", "--out", tmp_path / "b")
    assert code == 0, err
    summary = json.loads((tmp_path / "b" / "heat-b-summary.json").read_text())
    record = summary["model_choices"]["calibration"]
    assert record["reference_composition"]["C"] == pytest.approx(0.405) and record["data_sha256"]
    assert summary["inputs"]["composition"]["C"] == pytest.approx(0.30)
    assert summary["model_choices"]["kinetics"]["bainite"]["factor"] == pytest.approx(2.0, rel=1e-6)
    code, _, err, _ = run_main("diagram", ROOT / "alloys" / "aisi-4140-crmo.toml", "--calibration", tmp_path / "a-cal.toml")
    assert refused(code, err, "--calibration")
    code, _, err, _ = run_main("diagram", "--composition", "C=0.3,Mn=1", "--calibration", ROOT / "alloys" /
                               "aisi-4140-crmo.toml")
    assert code == 2 and "no [calibration] record" in err


def test_a_fit_with_nothing_free_reports_the_model_as_it_is():
    # Consistency: with no free parameter the "fit" is the model itself; its report (once a
    # crash: the model times were missing) gives the model's own times and residuals.
    from isokin.io.export import fit_report

    alloy = isokin.load_alloy(ROOT / "alloys" / "aisi-4140-crmo.toml")
    data = synthetic(alloy, {"bainite.factor": 2.0}, 0.0, 0, product="bainite")
    result = F.fit(alloy, data, free=())
    np.testing.assert_allclose(result.model_times_s, F.model_times(alloy, data), rtol=0.0)
    np.testing.assert_allclose(result.residuals_ln_t, np.log(F.model_times(alloy, data) / data.time_s), rtol=1e-12)
    report = fit_report(result, "holds.csv", "0" * 64, "2026-12-02T00:00:00+00:00")
    assert json.loads(json.dumps(report)) == report
