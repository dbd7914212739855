"""Classical nucleation, driving force and growth against published closed forms and data."""

import numpy as np
import pytest
from scipy.integrate import quad
from scipy.optimize import brentq, minimize_scalar

from isokin.constants import AVOGADRO_PER_MOL, BOLTZMANN_J_K, GAS_CONSTANT_J_MOL_K, PLANCK_J_S
from isokin.relations.driving_force import (
    DrivingForceTable,
    driving_force_hoffman,
    driving_force_table,
    driving_force_turnbull_linear,
)
from isokin.relations.growth import diffusivity_arrhenius, growth_velocity_diffusion_limited
from isokin.relations.nucleation import (
    critical_radius,
    log_nucleation_rate_turnbull_fisher,
    nucleation_barrier_homogeneous,
    shape_factor_spherical_cap,
)


def test_shape_factor_limits():
    # Spherical-cap shape factor (Christian 2002, ch. 10; Porter, Easterling & Sherif, ch. 4):
    # complete wetting 0, 90 degrees 1/2, no wetting 1 (homogeneous).
    s = shape_factor_spherical_cap(np.deg2rad([0.0, 90.0, 180.0]))
    np.testing.assert_allclose(s, [0.0, 0.5, 1.0], atol=1e-15)


@pytest.mark.parametrize("theta_deg", [20.0, 45.0, 70.0, 110.0, 150.0])
def test_shape_factor_is_cap_volume_over_sphere_volume(theta_deg):
    # The heterogeneous barrier is the homogeneous one times V_cap / V_sphere (Christian 2002,
    # ch. 10).  The cap volume is integrated with scipy's quad from its circular sections.
    r, theta = 1.0, np.deg2rad(theta_deg)
    v_cap, _ = quad(lambda z: np.pi * (r**2 - z**2), r * np.cos(theta), r)
    assert shape_factor_spherical_cap(theta) == pytest.approx(v_cap / (4.0 / 3.0 * np.pi * r**3), rel=1e-12)


@pytest.mark.parametrize("gamma,dgv", [(0.1, -1e8), (0.2, -3e8), (0.55, -2e9)])
def test_critical_nucleus_is_the_maximum_of_the_free_energy(gamma, dgv):
    # Gibbs/Volmer: dG(r) = 4/3 pi r^3 dGv + 4 pi r^2 gamma has its maximum at r* = -2 gamma/dGv
    # with height 16 pi gamma^3 / (3 dGv^2) (Turnbull & Fisher 1949).  Found here by scipy.
    r_star = float(critical_radius(gamma, dgv))
    res = minimize_scalar(lambda r: -(4 / 3 * np.pi * r**3 * dgv + 4 * np.pi * r**2 * gamma),
                          bounds=(0.01 * r_star, 10 * r_star), method="bounded", options={"xatol": 1e-6 * r_star})
    assert res.x == pytest.approx(r_star, rel=1e-4)
    assert -res.fun == pytest.approx(float(nucleation_barrier_homogeneous(gamma, dgv)), rel=1e-8)
    # the identity dG* = (4/3) pi r*^2 gamma
    assert float(nucleation_barrier_homogeneous(gamma, dgv)) == pytest.approx(4 / 3 * np.pi * r_star**2 * gamma)


def test_no_nucleus_without_driving_force():
    assert np.isinf(critical_radius(0.2, 0.0)) and np.isinf(nucleation_barrier_homogeneous(0.2, 1e6))


def test_turnbull_fisher_rate_against_direct_evaluation():
    # I = N (kT/h) exp(-Q/RT) exp(-dG*/kT) (Turnbull & Fisher, J. Chem. Phys. 17 (1949) 71),
    # evaluated directly with mpmath at 80-digit precision.
    mpmath = pytest.importorskip("mpmath")
    mpmath.mp.dps = 80
    T, N, Q, G = 850.0, 3.0e24, 1.2e5, 4.0e-19
    direct = (mpmath.mpf(N) * mpmath.mpf(BOLTZMANN_J_K) * T / mpmath.mpf(PLANCK_J_S)
              * mpmath.exp(-mpmath.mpf(Q) / (mpmath.mpf(GAS_CONSTANT_J_MOL_K) * T))
              * mpmath.exp(-mpmath.mpf(G) / (mpmath.mpf(BOLTZMANN_J_K) * T)))
    assert float(log_nucleation_rate_turnbull_fisher(T, N, Q, G)) == pytest.approx(float(mpmath.log(direct)), rel=1e-12)


# Turnbull, J. Appl. Phys. 21 (1950) 1022, Table I: melting point (K), largest undercooling
# observed in small clean droplets (K), and the solid-liquid interface energy he derived
# (erg/cm2).  Heats of fusion (J/mol) and solid molar volumes (cm3/mol) are handbook values.
# All of these are quoted from memory of the widely reproduced table.
TURNBULL_1950 = {
    #      Tm,     dT_max, sigma, dHf,   Vm
    "Sn": (505.1, 105.0, 54.5, 7030.0, 16.29),
    "Pb": (600.6, 80.0, 33.3, 4770.0, 18.26),
    "Al": (933.5, 130.0, 93.0, 10710.0, 10.00),
    "Ag": (1234.9, 227.0, 126.0, 11280.0, 10.27),
    "Au": (1337.3, 230.0, 132.0, 12550.0, 10.21),
    "Cu": (1357.8, 236.0, 177.0, 13050.0, 7.11),
    "Ni": (1728.0, 319.0, 255.0, 17480.0, 6.59),
    "Fe": (1811.0, 295.0, 204.0, 13810.0, 7.09),
    "Pt": (2041.4, 370.0, 240.0, 22170.0, 9.09),
}
OBSERVABLE_RATE = 1.0e6  # one nucleus per cm3 per second, in 1/(m3 s)


def _undercooling_at_observable_rate(tm, sigma_erg_cm2, dhf, vm_cm3):
    vm = vm_cm3 * 1e-6
    sigma = sigma_erg_cm2 * 1e-3

    def excess(dt):
        dgv = driving_force_turnbull_linear(tm - dt, tm, dhf / vm)
        barrier = nucleation_barrier_homogeneous(sigma, dgv)
        # homogeneous: every atom a site; transport across the liquid-nucleus interface taken
        # as unhindered (Q = 0), as Turnbull did for simple liquid metals
        return log_nucleation_rate_turnbull_fisher(tm - dt, AVOGADRO_PER_MOL / vm, 0.0, barrier) - np.log(OBSERVABLE_RATE)

    return brentq(excess, 1.0, 0.9 * tm)


@pytest.mark.parametrize("metal", sorted(TURNBULL_1950))
def test_homogeneous_undercooling_of_pure_metals_turnbull_1950(metal):
    # The undercooling at which the homogeneous rate reaches one nucleus per cm3 per second
    # lands within 25 % of Turnbull's measured maximum undercooling.  The tolerance covers
    # his rounder pre-exponential factor and differences in the heats of fusion.
    tm, dt_max, sigma, dhf, vm = TURNBULL_1950[metal]
    assert _undercooling_at_observable_rate(tm, sigma, dhf, vm) == pytest.approx(dt_max, rel=0.25)


def test_turnbull_rule_of_about_0_18_tm():
    # Turnbull (1950): the maximum undercooling of clean metal droplets is about 0.18 Tm.
    # Our predictions over his metals average within 0.12-0.20 Tm.
    ratios = [_undercooling_at_observable_rate(tm, s, h, v) / tm for tm, _, s, h, v in TURNBULL_1950.values()]
    assert 0.12 <= np.mean(ratios) <= 0.20


def test_hoffman_and_turnbull_forms():
    # Hoffman (1958): dGv = -dHv dT T / Te^2, i.e. Turnbull's linear form times T/Te;
    # both vanish at Te and are negative below it.
    T = np.linspace(500.0, 999.0, 50)
    lin = driving_force_turnbull_linear(T, 1000.0, 2e9)
    hof = driving_force_hoffman(T, 1000.0, 2e9)
    np.testing.assert_allclose(hof / lin, T / 1000.0, rtol=1e-12)
    assert driving_force_turnbull_linear(1000.0, 1000.0, 2e9) == 0.0 == driving_force_hoffman(1000.0, 1000.0, 2e9)
    assert np.all(lin < 0) and np.all(hof < 0)


def test_table_driving_force_and_crossing():
    # A tabulated dGm linear in T crossing zero at 900 K: interpolation is exact and the
    # crossing is found where the straight line puts it (common practice, no source needed).
    T = np.array([600.0, 700.0, 800.0, 950.0])
    g = 8.0 * (T - 900.0)
    tab = DrivingForceTable(T, g)
    assert tab.crossing_K() == pytest.approx(900.0)
    assert tab.crossing_K(offset_J_mol=400.0) == pytest.approx(850.0)
    assert float(driving_force_table(750.0, tab, 1e-5)) == pytest.approx(8.0 * (750.0 - 900.0) / 1e-5)


def test_arrhenius_diffusivity_slope():
    # ln D against 1/T is a line of slope -Q/R (Arrhenius); the slope is fitted with numpy.
    T = np.linspace(600.0, 1200.0, 30)
    slope = np.polyfit(1.0 / T, np.log(diffusivity_arrhenius(T, 2e-5, 142e3)), 1)[0]
    assert slope == pytest.approx(-142e3 / GAS_CONSTANT_J_MOL_K, rel=1e-10)


def test_growth_velocity_vanishes_at_equilibrium_and_has_one_maximum():
    # Net forward-minus-backward transfer (Turnbull 1951): zero at Te, positive below, and a
    # single maximum where the falling diffusivity overtakes the rising driving force.
    te, dh = 1000.0, 10e3
    T = np.linspace(300.0, te, 2001)
    dgm = -dh * (te - T) / te
    u = growth_velocity_diffusion_limited(T, diffusivity_arrhenius(T, 1e-5, 120e3), 1e-9, dgm)
    assert u[-1] == 0.0 and np.all(u[:-1] > 0)
    interior_maxima = np.sum((u[1:-1] > u[:-2]) & (u[1:-1] > u[2:]))
    assert interior_maxima == 1


def test_constants_are_the_codata_values_scipy_ships():
    # Reference: scipy.constants (CODATA; k, h, N_A exact since the 2019 SI).
    from scipy import constants

    from isokin import constants as ours

    assert ours.BOLTZMANN_J_K == constants.k and ours.PLANCK_J_S == constants.h
    assert ours.AVOGADRO_PER_MOL == constants.N_A
    assert ours.GAS_CONSTANT_J_MOL_K == pytest.approx(constants.R, rel=1e-15)
    assert ours.ZERO_CELSIUS_K == constants.zero_Celsius and ours.CALORIE_J == constants.calorie
