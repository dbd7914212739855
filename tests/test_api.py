"""The public Python API as a notebook user calls it: alloys, batches, results, figures."""

import ast
import json
import os
import re
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

import isokin
from isokin.compute.ttt import NOSE_TOLERANCE_K

ROOT = Path(__file__).resolve().parents[1]
SRC = ROOT / "src" / "isokin"
# AISI 4140 at mid-range of SAE J404 (ranges from memory), as in alloys/aisi-4140-crmo.toml.
AISI_4140 = {"C": 0.405, "Mn": 0.875, "Si": 0.25, "Cr": 0.95, "Mo": 0.20}


def test_readme_notebook_example_runs_as_written(tmp_path):
    # The README's Python blocks, run as one script in a fresh interpreter from the project root.
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    blocks = re.findall(r"```python\n(.*?)```", text, re.S)
    assert blocks
    env = {**os.environ, "MPLBACKEND": "Agg"}
    done = subprocess.run([sys.executable, "-c", "\n".join(blocks)], cwd=ROOT, env=env, capture_output=True,
                          text=True)
    assert done.returncode == 0, done.stderr


def test_import_is_cheap_and_names_resolve_lazily():
    code = ("import sys, isokin; heavy = [m for m in ('numpy', 'scipy', 'pandas', 'matplotlib') if m in sys.modules];"
            "print(heavy); isokin.ttt; print('numpy' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout.split()
    assert out == ["[]", "True"]
    assert set(isokin.__all__) <= set(dir(isokin))
    with pytest.raises(AttributeError):
        isokin.no_such_name


def test_plotting_never_switches_the_backend_and_draws_into_a_given_axes():
    # The caller's backend stays as it was (here svg, a non-interactive one).
    code = ("import matplotlib; matplotlib.use('svg'); import isokin.plot.ttt; "
            "print(matplotlib.get_backend())")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout.strip()
    assert out == "svg"
    import matplotlib.pyplot as plt

    fig, ax = plt.subplots()
    result = isokin.ttt(isokin.steel(AISI_4140, 7.0), points=60)
    assert isokin.plot_ttt(result, ax=ax) is ax
    assert len(ax.lines) >= 9 and "4140" not in ax.get_title()  # a default name from the analysis
    plt.close(fig)


def test_five_steels_as_a_batch_equal_five_single_runs():
    # Five heats of one grade (the case that failed in the solver before): times of shape
    # (batch, fraction, temperature) and one nose per member, equal to single runs.
    heats = {"C": [0.38, 0.40, 0.41, 0.42, 0.43], "Mn": [0.80, 0.85, 0.90, 0.95, 0.88], "Si": 0.25,
             "Cr": [0.85, 0.95, 1.00, 1.05, 0.90], "Mo": 0.20}
    grains = np.array([6.0, 7.0, 7.0, 8.0, 6.5])
    result = isokin.ttt(isokin.steel(heats, grains), points=120)
    assert result.batch_shape == (5,)
    assert result.times_s["pearlite"].shape == (5, 3, 120)
    assert result.noses["bainite"].temperature_K.shape == (5, 3)
    for i in range(5):
        one = isokin.ttt(isokin.steel({k: np.ravel(v)[i] if np.ndim(v) else v for k, v in heats.items()}, grains[i]),
                         temperatures_C=result.temperatures_C)
        member = result.member(i)
        for name in one.products:
            # the whole-decomposition curve is root-found (to 1e-10 in ln t), the products' are closed form
            np.testing.assert_allclose(member.times_s[name], one.times_s[name], rtol=1e-9 if name == "total" else 1e-13)
            np.testing.assert_allclose(member.noses[name].temperature_K, one.noses[name].temperature_K,
                                       atol=NOSE_TOLERANCE_K)
        assert member.critical_K == pytest.approx(one.critical_K)
    frame = result.to_frame()
    assert list(frame.columns) == ["member", "product", "fraction", "temperature_C", "time_s"]
    assert sorted(frame.member.unique()) == [0, 1, 2, 3, 4]
    noses = result.noses_frame()
    assert list(noses.columns) == ["member", "product", "fraction", "nose_temperature_C", "nose_time_s",
                                   "nose_inside_range"]


def test_a_table_of_heats_with_their_own_grain_sizes():
    pd = pytest.importorskip("pandas")
    table = pd.DataFrame({"C": [0.2, 0.4, 0.8], "Mn": [0.8, 0.8, 0.76], "grain_size_astm": [5.0, 7.0, 9.0]})
    alloy = isokin.steel(table)
    assert alloy.batch_shape == (3,)
    # Past the eutectoid the third heat has no Ae3 line and no ferrite.
    assert np.isnan(alloy.critical_K["Ae3"][2]) and np.isfinite(alloy.critical_K["Ae3"][:2]).all()
    result = isokin.ttt(alloy, points=80)
    assert "Ae3" not in result.member(2).critical_K and not result.member(2).noses["ferrite"].forms.any()
    with pytest.raises(isokin.InputError, match="grain_size_astm"):
        isokin.steel(table, 7.0)


def test_noses_of_a_thousand_curves_are_refined_together_to_the_tolerance():
    # Each refined nose agrees with scipy's bounded minimize_scalar (reference library) run
    # on that one curve, within the stated tolerance.
    from scipy.optimize import minimize_scalar

    rng = np.random.default_rng(11)
    heats = {k: rng.normal(v, 0.05 * v, 40).clip(0.0) for k, v in AISI_4140.items()}
    alloy = isokin.steel(heats, 7.0)
    result = isokin.ttt(alloy, points=100)
    grid = result.temperatures_K
    bainite = alloy.products[2]
    noses = result.noses["bainite"]
    for i in rng.choice(40, 6, replace=False):
        single = isokin.steel({k: float(v[i]) for k, v in heats.items()}, 7.0).products[2]
        k = int(np.argmin(result.times_s["bainite"][i, 1]))
        ref = minimize_scalar(lambda T: float(np.log(single.time_to_fraction(T, 0.5))),
                              bounds=(grid[k - 1], grid[k + 1]), method="bounded", options={"xatol": 1e-5})
        assert noses.temperature_K[i, 1] == pytest.approx(ref.x, abs=NOSE_TOLERANCE_K)
        assert noses.time_s[i, 1] <= np.exp(ref.fun) * (1 + 1e-9)
    assert bainite.batch_shape == (40,)


def test_load_alloy_and_kinetics_override_reach_the_record(tmp_path):
    base = (ROOT / "alloys" / "aisi-4140-crmo.toml").read_text()
    path = tmp_path / "q.toml"
    path.write_text(base + "\n[steel.kinetics.ferrite]\nactivation_energy_cal_mol = 27500\n")
    default = isokin.ttt(isokin.load_alloy(ROOT / "alloys" / "aisi-4140-crmo.toml"))
    changed = isokin.ttt(isokin.load_alloy(path))
    assert changed.provenance["kinetics"]["ferrite"]["activation_energy_cal_mol"] == pytest.approx(27500.0)
    assert default.provenance["kinetics"]["ferrite"]["activation_energy_cal_mol"] == pytest.approx(23500.0)
    assert changed.provenance["kinetics_overridden"] == ["ferrite"]
    assert "from memory" in changed.provenance["kinetics_note"]
    assert changed.provenance["kinetics_model"] == "kirkaldy_venugopalan_1984"
    assert "in doubt" in isokin.steel({"C": 0.4, "Mn": 0.8}, kinetics_model="li_1998").provenance["kinetics_note"]
    # A higher activation energy means slower ferrite at every temperature.
    ok = np.isfinite(default.times_s["ferrite"])
    assert np.all(changed.times_s["ferrite"][ok] > default.times_s["ferrite"][ok])
    # bainite does not wait for ferrite (pearlite does, so it moves too)
    np.testing.assert_array_equal(changed.times_s["bainite"], default.times_s["bainite"])
    bad = tmp_path / "bad.toml"
    bad.write_text(base + "\n[steel.kinetics.ferrite]\nactivation_energy = 27500\n")
    with pytest.raises(isokin.InputError, match=r"steel.kinetics.ferrite.activation_energy: unknown key"):
        isokin.load_alloy(bad)


def test_default_methods_are_the_ones_the_data_chose_and_the_summary_says_which():
    from isokin.io.export import summary

    high = isokin.ttt(isokin.steel({"C": 0.79, "Mn": 0.76}), points=40)
    forced = isokin.ttt(isokin.steel({"C": 0.79, "Mn": 0.76}, ms_method="andrews_1965"), points=40)
    choices = summary(high)["model_choices"]
    assert choices["ms_method"] == "van_bohemen_2012" and choices["bs_method"] == "van_bohemen_2012"
    assert "van Bohemen" in summary(high)["critical_temperatures"]["Ms"]["method"]
    # Andrews' linear form runs low past 0.6 % C (the measured data show it: benchmarks/validate.py)
    assert forced.critical_K["Ms"] < high.critical_K["Ms"] - 30.0
    json.dumps(summary(high))


def test_martensite_is_an_athermal_product_of_the_steel():
    from isokin.products.base import AthermalProduct
    from isokin.relations.steel_critical import martensite_fraction_koistinen_marburger_1959

    alloy = isokin.steel(AISI_4140, 7.0)
    m = alloy.martensite
    assert isinstance(m, AthermalProduct) and m.upper_K == alloy.critical_K["Ms"]
    T = np.array([300.0, 400.0, 500.0, 700.0])
    np.testing.assert_array_equal(m.fraction(T), martensite_fraction_koistinen_marburger_1959(T, m.upper_K))
    assert float(m.temperature_for_fraction(0.9)) == pytest.approx(alloy.critical_K["M90"], rel=1e-14)


def test_tabulated_driving_force_is_searched_once_not_per_evaluation(monkeypatch):
    from isokin.products.nucleation_growth import NucleationGrowthParameters, NucleationGrowthProduct
    from isokin.relations.driving_force import DrivingForceTable

    calls = []
    original = DrivingForceTable.crossing_K
    monkeypatch.setattr(DrivingForceTable, "crossing_K", lambda self, o=0.0: calls.append(o) or original(self, o))
    table = DrivingForceTable(np.array([500.0, 800.0]), np.array([-3000.0, 0.0]))
    params = NucleationGrowthParameters(
        molar_volume_m3_mol=1e-5, interface_energy_J_m2=0.1, nucleation_activation_J_mol=1.3e5,
        diffusion_prefactor_m2_s=6e-5, diffusion_activation_J_mol=1.3e5, diffusion_distance_m=1e-8,
        driving_force="table", table=table, strain_energy_J_m3=np.array([0.0, 1e7, 2e7]))
    product = NucleationGrowthProduct("precipitate", params)
    for _ in range(5):
        product.time_to_fraction(np.linspace(600, 790, 50)[None, :], 0.5)
        product.upper_K
    assert len(calls) == 3


# --- the layout: imports run one way ---------------------------------------------------------

#: Rank of each top-level part; a module may import only parts of lower or equal rank.
LAYERS = {"constants": 0, "errors": 0, "readout": 0, "relations": 1, "products": 2, "results": 3, "compute": 4,
          "io": 5, "plot": 5, "cli": 6, "__init__": 7, "__main__": 7}


def _part(module):
    return module.split(".")[1] if "." in module else "__init__"


def _imports():
    graph = {}
    for path in SRC.rglob("*.py"):
        parts = path.relative_to(SRC.parent).with_suffix("").parts
        module = ".".join(parts[:-1] if parts[-1] == "__init__" else parts)
        package = module if path.name == "__init__.py" else module.rsplit(".", 1)[0]
        targets = set()
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.ImportFrom):
                if node.level:
                    base = package.split(".")
                    base = base[: len(base) - node.level + 1]
                    name = ".".join(base + ([node.module] if node.module else []))
                else:
                    name = node.module or ""
                if name.startswith("isokin"):
                    targets.add(name)
            elif isinstance(node, ast.Import):
                targets |= {a.name for a in node.names if a.name.startswith("isokin")}
        graph[module] = targets
    return graph


def test_imports_run_one_way_through_the_layers():
    for module, targets in _imports().items():
        for target in targets:
            if target == "isokin":  # the package itself: its version and lazy names, light to import
                continue
            assert LAYERS[_part(target)] <= LAYERS[_part(module)], f"{module} imports {target}"


def test_no_module_reaches_into_another_objects_private_attributes():
    # obj._name is used only on self (or cls) of the module's own classes.
    for path in [*SRC.rglob("*.py"), *(ROOT / "benchmarks").glob("*.py")]:
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if (isinstance(node, ast.Attribute) and node.attr.startswith("_") and not node.attr.startswith("__")
                    and not (isinstance(node.value, ast.Name) and node.value.id in ("self", "cls"))):
                pytest.fail(f"{path.name}: private attribute {node.attr} read from outside")


def test_no_import_cycles():
    graph = _imports()
    state = {}

    def visit(module, path):
        state[module] = "open"
        for target in graph.get(module, ()):
            if target not in graph or target == module:
                continue
            assert state.get(target) != "open", " -> ".join([*path, target])
            if target not in state:
                visit(target, [*path, target])
        state[module] = "done"

    for module in graph:
        if module not in state:
            visit(module, [module])


def test_a_batch_with_heats_that_cannot_be_computed_returns_the_others():
    # Ti 3 % puts Andrews' Ae3 near 1950 C (past the solidus): that heat is left out and named;
    # Ms and Bs below absolute zero (25 Ni, 18 Cr) are answers: no martensite, no bainite.
    heats = {"C": [0.4, 0.4, 0.4], "Mn": 0.8, "Ti": [0.0, 3.0, 0.0], "Ni": [0.0, 0.0, 25.0], "Cr": [1.0, 1.0, 18.0]}
    alloy = isokin.steel(heats, 7.0, ms_method="andrews_1965")
    assert alloy.valid.tolist() == [True, False, True]
    assert any("Ae3" in w and "heat 1 of 3" in w and "left out" in w for w in alloy.warnings)
    assert any("Ms by Andrews (1965), linear lies below absolute zero (heat 2 of 3)" in w for w in alloy.warnings)
    result = isokin.ttt(alloy, points=40)
    assert result.valid.tolist() == [True, False, True]
    assert np.all(np.isinf(result.times_s["total"][1])) and np.isfinite(result.noses["total"].time_s[0]).all()
    assert np.isnan(alloy.critical_K["Ae1"][1]) and np.isnan(alloy.critical_K["Ms"][2])
    single = isokin.steel({k: (v[0] if isinstance(v, list) else v) for k, v in heats.items()}, 7.0,
                          ms_method="andrews_1965")
    np.testing.assert_allclose(result.times_s["total"][0], isokin.ttt(single, points=40).times_s["total"], rtol=1e-12)
    with pytest.raises(isokin.InputError, match="Ae3 from Andrews"):
        isokin.steel({"C": 0.4, "Mn": 0.8, "Ti": 3.0}, 7.0)


def test_compute_never_asks_which_model_it_holds():
    # Everything compute needs is on the product's interface: no hasattr on anything, and
    # isinstance only on plain containers (a path or a list of them).
    plain = {"list", "tuple", "dict", "str", "int", "float", "bool"}
    for path in (SRC / "compute").glob("*.py"):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.Call) and isinstance(node.func, ast.Name):
                assert node.func.id != "hasattr", f"{path.name}: hasattr"
                if node.func.id == "isinstance":
                    kinds = node.args[1].elts if isinstance(node.args[1], ast.Tuple) else [node.args[1]]
                    assert all(isinstance(k, ast.Name) and k.id in plain for k in kinds), f"{path.name}: isinstance"
