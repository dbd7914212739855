"""The library refuses what the command line refuses, with the same InputError: the checks
live in the library and the command line only names its own options (one line, exit 2)."""

import re
from datetime import datetime
from pathlib import Path

import numpy as np
import pytest

import isokin
from isokin.compute import fit as F
from isokin.compute.cooling import lumped_time_constant, measured
from isokin.io.export import calibrated_file
from isokin.io.measurements import read_measurements

from test_hardening import run_main

ROOT = Path(__file__).resolve().parents[1]
STEEL_FILE = ROOT / "alloys" / "aisi-4140-crmo.toml"
DEMO_ALLOY = ROOT / "alloys" / "brackwater-bw52crv.toml"
DEMO_DATA = ROOT / "alloys" / "brackwater-bw52crv-dilatometer.csv"


def refused_by_cli(args, option, words):
    """The CLI refuses ``args`` in one line naming ``option`` and saying ``words``; exit 2."""
    code, out, err, _ = run_main(*args)
    lines = err.strip().splitlines()
    assert code == 2 and len(lines) == 1, err
    assert lines[0].startswith(f"isokin: error: {option}: ") and words in lines[0], lines[0]
    return lines[0]


@pytest.mark.parametrize("arguments, key, option, words", [
    ({"shape": "cube"}, "shape", "--shape", "plate, bar or sphere"),
    ({"thickness_m": 0.0}, "thickness_m", "--thickness-mm", "positive"),
    ({"heat_transfer_W_m2K": -5.0}, "heat_transfer_W_m2K", "--htc", "positive"),
])
def test_a_bad_section_is_refused_by_both(arguments, key, option, words, tmp_path):
    given = {"thickness_m": 0.02, "heat_transfer_W_m2K": 500.0, "shape": "plate", **arguments}
    with pytest.raises(isokin.InputError, match=words) as caught:
        isokin.newtonian_section(850.0, 60.0, given["thickness_m"], given["heat_transfer_W_m2K"], given["shape"])
    assert caught.value.key == key
    with pytest.raises(isokin.InputError):
        lumped_time_constant(given["thickness_m"], given["heat_transfer_W_m2K"], shape=given["shape"])
    refused_by_cli(["cool", STEEL_FILE, "--medium-c", 60, "--thickness-mm", given["thickness_m"] * 1e3,
             "--htc", given["heat_transfer_W_m2K"], "--shape", given["shape"], "--out", tmp_path], option, words)
    assert not any(tmp_path.iterdir())


def test_a_cooling_log_that_stays_hot_is_refused_by_both(tmp_path):
    # 4140 first forms ferrite below Andrews' Ae3 of its analysis (about 760 °C, as the library
    # computes it): a log from 900 to 880 °C has nothing to predict
    log = tmp_path / "hot.csv"
    log.write_text("time_s,temperature_C\n0,900\n10,880\n")
    alloy = isokin.load_alloy(STEEL_FILE)
    with pytest.raises(isokin.InputError, match="never cools below") as caught:
        isokin.cool(alloy, measured([0.0, 10.0], [900.0, 880.0]))
    assert caught.value.key == "path"
    refused_by_cli(["cool", STEEL_FILE, "--log", log, "--out", tmp_path / "out"], "--log", "never cools below")
    # one path that does cool is enough
    cooled = isokin.cool(alloy, [measured([0.0, 10.0], [900.0, 880.0]), isokin.constant_rate(10.0, 850.0)])
    assert cooled.final["martensite"].shape == (2,)


def test_a_bootstrap_beyond_the_limit_is_refused_by_both(tmp_path):
    alloy = isokin.load_alloy(DEMO_ALLOY)
    data, _ = read_measurements(DEMO_DATA)
    for bad in (F.MAX_BOOTSTRAP + 1, -1, 2.5):
        with pytest.raises(isokin.InputError, match="from 0 to") as caught:
            F.fit(alloy, data, bootstrap=bad)
        assert caught.value.key == "bootstrap"
    refused_by_cli(["fit", DEMO_DATA, "--alloy", DEMO_ALLOY, "--out", tmp_path / "c.toml", "--bootstrap",
             F.MAX_BOOTSTRAP + 1], "--bootstrap", "from 0 to")
    assert not any(tmp_path.iterdir())


def test_a_notebook_writes_the_same_calibrated_file_as_the_command_line(tmp_path):
    code, _, err, _ = run_main("fit", DEMO_DATA, "--alloy", DEMO_ALLOY, "--out", tmp_path / "cal.toml")
    assert code == 0, err
    written = (tmp_path / "cal.toml").read_text(encoding="utf-8")
    date = re.search(r"^date = \"([^\"]+)\"", written, re.M).group(1)
    datetime.fromisoformat(date)
    alloy = isokin.load_alloy(DEMO_ALLOY)
    data, digest = read_measurements(DEMO_DATA, [p.name for p in alloy.products])
    assert calibrated_file(F.fit(alloy, data), DEMO_DATA.name, digest, date) == written
    again = isokin.load_alloy(tmp_path / "cal.toml")
    assert again.name.endswith("(calibrated)")


def test_an_analysis_without_a_grain_size_says_so_in_both():
    # the library's default grain size (ASTM 7, its documented default), said as a warning
    # whether called from Python or the CLI
    alloy = isokin.steel({"C": 0.4, "Mn": 0.8})
    assert alloy.warnings[0] == "no grain size given; taking ASTM 7"
    assert isokin.steel({"C": 0.4, "Mn": 0.8}, 7.0).warnings[:1] != ("no grain size given; taking ASTM 7",)
    code, out, err, _ = run_main("check", "--composition", "C=0.4,Mn=0.8")
    assert code == 0 and "isokin: warning: no grain size given; taking ASTM 7" in err
    # and the default name is the library's
    assert out.startswith(f"{alloy.name}:")
    assert np.isclose(float(alloy.options["grain_size_astm"]), 7.0)


def test_a_negative_seed_is_refused_by_both(tmp_path):
    # once a traceback from numpy's generator
    alloy = isokin.load_alloy(STEEL_FILE)
    with pytest.raises(isokin.InputError, match="whole number") as caught:
        isokin.spread(alloy, {"C": ("range", 0.38, 0.43)}, samples=10, seed=-1)
    assert caught.value.key == "seed"
    refused_by_cli(["spread", STEEL_FILE, "--seed", -1, "--out", tmp_path], "--seed", "whole number")
    refused_by_cli(["plan", STEEL_FILE, "--route", "austemper", "--worst-case", "--seed", -1, "--out", tmp_path],
            "--seed", "whole number")


def test_an_unknown_kinetic_model_is_the_options_fault_not_the_files(tmp_path):
    with pytest.raises(isokin.InputError) as caught:
        isokin.load_alloy(STEEL_FILE, kinetics_model="nope")
    assert caught.value.source is None and caught.value.key == "steel.kinetics_model"
    refused_by_cli(["diagram", STEEL_FILE, "--kinetics", "nope", "--out", tmp_path], "--kinetics", "must be one of")
