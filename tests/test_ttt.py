"""The TTT solver: ordering, C-shape, noses, monotone effects, batches (hypothesis)."""

import numpy as np
import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st

from isokin.compute.grid import temperature_grid
from isokin.compute.ttt import solve_ttt
from isokin.products.nucleation_growth import NucleationGrowthParameters, NucleationGrowthProduct

FRACTIONS = (0.01, 0.5, 0.99)

# Plausible metallic ranges (common practice, no single source): interface energies of
# coherent to incoherent interfaces, latent heats of solid-state and melting reactions,
# diffusion in metals.
physical = st.fixed_dictionaries(
    {
        "equilibrium_K": st.floats(500.0, 1800.0),
        "latent_heat_J_mol": st.floats(2e3, 3e4),
        "molar_volume_m3_mol": st.floats(6e-6, 2e-5),
        "interface_energy_J_m2": st.floats(0.02, 0.3),
        "wetting_angle_deg": st.floats(30.0, 180.0),
        "nucleation_activation_J_mol": st.floats(0.0, 2.5e5),
        "diffusion_prefactor_m2_s": st.floats(1e-7, 1e-3),
        "diffusion_activation_J_mol": st.floats(5e4, 3e5),
        "diffusion_distance_m": st.floats(2.5e-10, 1e-7),
        "mode": st.sampled_from(["continuous", "site-saturation"]),
        "site_density_m3": st.one_of(st.none(), st.floats(1e18, 1e26)),
    }
)


# A dilute precipitation case with a nose near 350 °C, used by the single-case tests below.
PRECIPITATION = dict(equilibrium_K=780.0, latent_heat_J_mol=1e4, molar_volume_m3_mol=1e-5, interface_energy_J_m2=0.1,
                     nucleation_activation_J_mol=136e3, diffusion_prefactor_m2_s=6.5e-5,
                     diffusion_activation_J_mol=136e3, diffusion_distance_m=1e-8, site_density_m3=1e24)


def _product(values, **changes):
    params = NucleationGrowthParameters(**{**values, **changes})
    return NucleationGrowthProduct("new phase", params)


def _wide_grid(product):
    # from 0.1 Te, where diffusion is frozen, to just below Te: a C-curve's nose lies inside
    upper = float(product.upper_K)
    return temperature_grid(0.1 * upper, upper - 0.5, 400)


def _solve(product, grid):
    times, noses = solve_ttt([product], grid, FRACTIONS)
    return times[product.name], noses[product.name]


@settings(max_examples=60, deadline=None)
@given(physical)
def test_fraction_ordering_and_no_bad_times(values):
    product = _product(values)
    t, _ = _solve(product, _wide_grid(product))
    assert not np.isnan(t).any() and np.all(t > 0)
    finite = np.isfinite(t).all(axis=0)
    assert np.all(t[0, finite] < t[1, finite]) and np.all(t[1, finite] < t[2, finite])


@settings(max_examples=60, deadline=None)
@given(physical)
def test_one_nose_inside_the_bounds(values):
    # A C-curve: times fall from the equilibrium temperature to the nose and rise below it.
    product = _product(values)
    grid = _wide_grid(product)
    times, noses = _solve(product, grid)
    row = times[1]
    finite = np.isfinite(row)
    assume(finite.sum() >= 3)  # a barrier so high that nothing ever forms draws no curve at all
    r = row[finite]
    local_minima = np.sum((r[1:-1] < r[:-2]) & (r[1:-1] < r[2:]))
    assert local_minima == 1
    assert noses.inside[1] and grid[0] < noses.temperature_K[1] < grid[-1]


@settings(max_examples=40, deadline=None)
@given(physical, st.floats(1.05, 3.0))
def test_larger_interface_energy_is_slower_everywhere(values, factor):
    # Theory fixes it: dG* grows as gamma^3, so nucleation and all times are slower.
    if values["mode"] == "site-saturation":
        values = {**values, "mode": "continuous"}
    base = _product(values)
    slow = _product(values, interface_energy_J_m2=values["interface_energy_J_m2"] * factor)
    grid = _wide_grid(base)
    t0, t1 = base.time_to_fraction(grid, 0.5), slow.time_to_fraction(grid, 0.5)
    finite = np.isfinite(t0) & np.isfinite(t1)
    assert np.all(t1[finite] > t0[finite])
    assert np.all(np.isinf(t1[~np.isfinite(t0)]))


def test_nose_refinement_matches_a_dense_grid_and_scipy():
    # The vectorised golden-section search lands on the nose that a 20,001-point grid and
    # scipy's bounded minimize_scalar (reference library) find, within 0.02 K, and never
    # above the coarse grid's minimum time.
    from scipy.optimize import minimize_scalar

    product = _product(PRECIPITATION)
    coarse = temperature_grid(420.0, 779.0, 50)
    times, noses = _solve(product, coarse)
    dense = temperature_grid(420.0, 779.0, 20001)
    t_dense = product.time_to_fraction(dense, 0.5)
    assert noses.temperature_K[1] == pytest.approx(dense[np.argmin(t_dense)], abs=0.05)
    assert noses.time_s[1] <= times[1].min()
    assert noses.time_s[1] == pytest.approx(t_dense.min(), rel=1e-6)
    for k, x in enumerate(FRACTIONS):
        ref = minimize_scalar(lambda T: float(np.log(product.time_to_fraction(T, x))), bounds=(420.0, 779.0),
                              method="bounded", options={"xatol": 1e-4})
        assert noses.temperature_K[k] == pytest.approx(ref.x, abs=0.02)
        assert noses.time_s[k] == pytest.approx(np.exp(ref.fun), rel=1e-7)


def test_nose_outside_range_is_flagged():
    _, noses = _solve(_product(PRECIPITATION), temperature_grid(700.0, 779.0, 100))
    assert not noses.inside.any()


def test_nothing_forms_above_equilibrium_and_curves_hold_only_practical_times():
    import isokin
    from isokin.products.nucleation_growth import nucleation_growth_alloy

    alloy = nucleation_growth_alloy("test case", [_product(PRECIPITATION)])
    result = isokin.ttt(alloy, temperatures_C=temperature_grid(300.0, 900.0, 301) - 273.15)
    assert np.all(np.isinf(result.times_s["new phase"][:, result.temperatures_K >= 780.0]))
    curves = result.to_frame()
    assert list(curves.columns) == ["product", "fraction", "temperature_C", "time_s"]
    assert np.all(np.isfinite(curves.time_s)) and curves.time_s.max() <= 1e9
    assert curves.temperature_C.max() < 780.0 - 273.15


def test_batch_of_parameter_sets_equals_one_by_one():
    # A batch is one numpy pass and gives the same numbers as separate products: times and
    # refined noses alike.
    rng = np.random.default_rng(7)
    gammas = rng.uniform(0.05, 0.2, 25)
    batch = _product(PRECIPITATION, interface_energy_J_m2=gammas)
    grid = temperature_grid(450.0, 779.0, 120)
    assert batch.time_to_fraction(grid[None, :], 0.5).shape == (25, 120)
    times, noses = _solve(batch, grid)
    assert times.shape == (25, 3, 120) and noses.time_s.shape == (25, 3)
    for k, g in enumerate(gammas):
        t_one, n_one = _solve(_product(PRECIPITATION, interface_energy_J_m2=g), grid)
        np.testing.assert_allclose(times[k], t_one, rtol=1e-13)
        np.testing.assert_allclose(noses.temperature_K[k], n_one.temperature_K, atol=1e-9)
        np.testing.assert_array_equal(noses.inside[k], n_one.inside)


def test_strain_energy_lowers_the_upper_temperature():
    # Strain energy opposes the chemical driving force: the product forms only below
    # Te (1 - Gs/dHv) for the linear form (common practice, no source needed).
    values = dict(equilibrium_K=800.0, latent_heat_J_mol=1e4, molar_volume_m3_mol=1e-5, interface_energy_J_m2=0.1,
                  nucleation_activation_J_mol=1e5, diffusion_prefactor_m2_s=1e-5,
                  diffusion_activation_J_mol=1e5, diffusion_distance_m=1e-8)
    p = _product(values, strain_energy_J_m3=1e8)
    assert float(p.upper_K) == pytest.approx(800.0 * (1 - 1e8 * 1e-5 / 1e4))
    assert float(p.effective_driving_force(p.upper_K)) == pytest.approx(0.0, abs=1e-6)
    h = _product(values, strain_energy_J_m3=1e8, driving_force="hoffman")
    assert float(h.effective_driving_force(h.upper_K)) == pytest.approx(0.0, abs=1e-3)


def test_rate_form_matches_isothermal_times():
    # Integrating dt = dX / rate(T, X) from X = 0.01 to 0.99 gives t99 - t01 (scipy quad).
    from scipy.integrate import quad

    values = PRECIPITATION
    for p in (_product(values), _product(values, mode="site-saturation"), _product(values, avrami_exponent=2.5)):
        T = 640.0
        span, _ = quad(lambda x: 1.0 / float(p.rate(T, x)), 0.01, 0.99, limit=200)
        t01, t99 = p.time_to_fraction(T, np.array([0.01, 0.99]))
        assert span == pytest.approx(t99 - t01, rel=1e-7)


def test_given_exponent_keeps_the_characteristic_time():
    values = PRECIPITATION
    x_char = 1 - np.exp(-1)  # at t = K^(-1/n) the fraction is 1 - 1/e for every n
    a = _product(values).time_to_fraction(650.0, x_char)
    b = _product(values, avrami_exponent=1.5).time_to_fraction(650.0, x_char)
    assert float(b) == pytest.approx(float(a), rel=1e-12)
