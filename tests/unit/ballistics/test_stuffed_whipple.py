"""Unit tests of :func:`pockmark.ballistics.christiansen_1995` (stuffed Whipple shield).

The constants under test (2.2, 0.37, 0.6, 2.6, 6.5 and the exponents) are from memory
(shared reference note on ballistic limits, §2.4). These tests check the structure (regimes,
continuity, monotonicity, units) independently of their values; the note's computed check
values are in ``tests/reference/test_christiansen_1995.py``.
"""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from pockmark.ballistics import christiansen_1995
from pockmark.constants import KSI_IN_MPA

BASE = {
    "front_areal_density": 1.34,
    "standoff": 11.4,
    "rear_wall_thickness": 0.48,
    "rear_wall_density": 2.84,
    "rear_wall_yield_strength": 393.0,
}


def _stuffed(velocity, angle, density=2.8, **overrides):
    return christiansen_1995(velocity, angle, density, **{**BASE, **overrides})


def _limits(angle):
    """Regime limits on the total speed, written independently of the code (note §2.4)."""
    cos = math.cos(math.radians(angle))
    return 2.6 / cos**0.5, 6.5 / cos**0.75


def test_low_speed_branch_by_hand():
    """At σ = 40 ksi: d = 2.2 [(tw + 0.37 mb) / (cos^(4/3)θ ρp^½ V^(2/3))]^(18/19)."""
    velocity, angle, density = 2.0, 30.0, 2.8
    cos = math.cos(math.radians(angle))
    assert velocity < _limits(angle)[0]
    expected = 2.2 * (
        (0.48 + 0.37 * 1.34) / (cos ** (4 / 3) * density**0.5 * velocity ** (2 / 3))
    ) ** (18 / 19)
    got = _stuffed(velocity, angle, density, rear_wall_yield_strength=40.0 * KSI_IN_MPA)
    assert float(got) == pytest.approx(expected, rel=1e-12)


def test_high_speed_branch_by_hand():
    """At σ = 40 ksi: d = 0.6 (tw ρw)^⅓ ρp^-⅓ V^-⅓ cos^-½θ S^(2/3)."""
    velocity, angle, density = 12.0, 20.0, 1.0
    cos = math.cos(math.radians(angle))
    assert velocity > _limits(angle)[1]
    expected = (
        0.6 * (0.48 * 2.84) ** (1 / 3) * density ** (-1 / 3) * velocity ** (-1 / 3)
        * cos**-0.5 * 11.4 ** (2 / 3)
    )
    got = _stuffed(velocity, angle, density, rear_wall_yield_strength=40.0 * KSI_IN_MPA)
    assert float(got) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("angle", [0.0, 30.0, 45.0, 60.0, 75.0, 85.0])
@pytest.mark.parametrize("density, sigma", [(2.8, 393.0), (1.0, 276.0), (7.8, 150.0)])
@pytest.mark.parametrize("which", [0, 1])
def test_continuous_at_regime_limits(angle, density, sigma, which):
    limit = _limits(angle)[which]
    below, at, above = _stuffed(
        limit * np.array([1 - 1e-12, 1.0, 1 + 1e-12]), angle, density,
        rear_wall_yield_strength=sigma,
    )
    assert abs(above / below - 1.0) < 1e-9
    assert abs(at / below - 1.0) < 1e-9


def test_intermediate_regime_is_linear_in_total_speed():
    angle = 40.0
    low, high = _limits(angle)
    quarter = low + 0.25 * (high - low)
    middle = 0.5 * (low + high)
    d_low, d_quarter, d_middle, d_high = _stuffed(np.array([low, quarter, middle, high]), angle)
    assert d_middle == pytest.approx(0.5 * (d_low + d_high), rel=1e-12)
    assert d_quarter == pytest.approx(0.75 * d_low + 0.25 * d_high, rel=1e-12)


def test_regimes_use_total_speed_not_normal_component():
    """At 60° and 7 km/s, Vn = 3.5 < 6.5 would be low/intermediate on Vn; on total speed
    7 < V_H = 10.93 km/s is intermediate and 12 km/s > V_H is high speed."""
    angle = 60.0
    cos = math.cos(math.radians(angle))
    hv = (
        0.6 * (0.48 * 2.84) ** (1 / 3) * 2.8 ** (-1 / 3) * 12.0 ** (-1 / 3) * cos**-0.5
        * 11.4 ** (2 / 3) * (393.0 / KSI_IN_MPA / 40) ** (1 / 6)
    )
    assert float(_stuffed(12.0, angle)) == pytest.approx(hv, rel=1e-12)
    # the same formula at 7 km/s is not what the equation returns there (intermediate)
    hv7 = hv * (7.0 / 12.0) ** (-1 / 3)
    assert abs(float(_stuffed(7.0, angle)) / hv7 - 1) > 0.01


def test_front_areal_density_acts_only_below_high_speed():
    low_speed = _stuffed(2.0, 0.0, front_areal_density=np.array([0.5, 2.0]))
    assert low_speed[1] > low_speed[0]
    high_speed = _stuffed(10.0, 0.0, front_areal_density=np.array([0.5, 2.0]))
    assert high_speed[0] == high_speed[1]


def test_standoff_acts_only_above_low_speed():
    low_speed = _stuffed(2.0, 0.0, standoff=np.array([5.0, 30.0]))
    assert low_speed[0] == low_speed[1]
    high_speed = _stuffed(10.0, 0.0, standoff=np.array([5.0, 30.0]))
    assert high_speed[1] / high_speed[0] == pytest.approx(6.0 ** (2 / 3), rel=1e-12)


def test_angle_exponents():
    """Low speed ∝ cos^(-24/19) θ at fixed V; high speed ∝ cos^(-1/2) θ."""
    low = _stuffed(1.0, np.array([0.0, 30.0]))  # 1 km/s < V_L at both angles
    ratio = math.cos(math.radians(30.0)) ** (-24 / 19)
    assert low[1] / low[0] == pytest.approx(ratio, rel=1e-12)
    high = _stuffed(15.0, np.array([0.0, 30.0]))  # 15 km/s > V_H at both angles
    assert high[1] / high[0] == pytest.approx(math.cos(math.radians(30.0)) ** -0.5, rel=1e-12)


@pytest.mark.parametrize("sigma_ksi", [30.0, 40.0, 57.0, 73.0])
def test_yield_strength_is_converted_from_mpa_to_ksi(sigma_ksi):
    """σ enters as (σ/40 ksi); feeding MPa unconverted would change d_c by far more."""
    sigma_mpa = sigma_ksi * KSI_IN_MPA
    high = float(_stuffed(15.0, 0.0, rear_wall_yield_strength=sigma_mpa))
    reference = float(_stuffed(15.0, 0.0, rear_wall_yield_strength=40.0 * KSI_IN_MPA))
    assert high / reference == pytest.approx((sigma_ksi / 40.0) ** (1 / 6), rel=1e-12)


# --- monotonicity (hypothesis) ---------------------------------------------------------------

SETTINGS = settings(max_examples=60, deadline=None)
REL = 1e-12

speeds = st.floats(0.5, 20.0)
angles = st.floats(0.0, 89.0)
densities = st.floats(0.5, 8.0)


def _ordered(pair):
    return tuple(sorted(pair))


@SETTINGS
@given(speeds, angles, densities, st.tuples(st.floats(0.05, 2.0), st.floats(0.05, 2.0)).map(
    _ordered))
def test_non_decreasing_in_rear_wall_thickness(v, theta, rho, thickness):
    d1, d2 = _stuffed(v, theta, rho, rear_wall_thickness=np.array(thickness))
    assert d2 >= d1 * (1 - REL)


@SETTINGS
@given(speeds, angles, densities, st.tuples(st.floats(0.1, 5.0), st.floats(0.1, 5.0)).map(_ordered))
def test_non_decreasing_in_front_areal_density(v, theta, rho, areal):
    d1, d2 = _stuffed(v, theta, rho, front_areal_density=np.array(areal))
    assert d2 >= d1 * (1 - REL)


@SETTINGS
@given(speeds, angles, densities, st.tuples(st.floats(1.0, 50.0), st.floats(1.0, 50.0)).map(
    _ordered))
def test_non_decreasing_in_standoff(v, theta, rho, standoff):
    d1, d2 = _stuffed(v, theta, rho, standoff=np.array(standoff))
    assert d2 >= d1 * (1 - REL)


@SETTINGS
@given(speeds, angles, densities,
       st.tuples(st.floats(50.0, 1000.0), st.floats(50.0, 1000.0)).map(_ordered))
def test_non_decreasing_in_yield_strength(v, theta, rho, sigma):
    d1, d2 = _stuffed(v, theta, rho, rear_wall_yield_strength=np.array(sigma))
    assert d2 >= d1 * (1 - REL)


@SETTINGS
@given(speeds, angles, st.tuples(densities, densities).map(_ordered))
def test_non_increasing_in_projectile_density(v, theta, rho):
    d1, d2 = _stuffed(v, theta, np.array(rho))
    assert d2 <= d1 * (1 + REL)


@SETTINGS
@given(st.tuples(angles, angles).map(_ordered), densities, st.floats(0.0, 1.0))
def test_non_decreasing_in_angle_within_low_speed_regime(theta, rho, fraction):
    """V ≤ V_L(θ1) ≤ V_L(θ2): both angles on the low-speed branch, ∝ cos^(-24/19) θ."""
    v = 0.5 + fraction * (_limits(theta[0])[0] - 0.5)
    d1, d2 = _stuffed(v, np.array(theta), rho)
    assert d2 >= d1 * (1 - REL)


@SETTINGS
@given(st.tuples(angles, angles).map(_ordered), densities, st.floats(0.0, 1.0))
def test_non_decreasing_in_angle_within_high_speed_regime(theta, rho, fraction):
    """V ≥ V_H(θ2) ≥ V_H(θ1): both angles on the high-speed branch, ∝ cos^(-1/2) θ."""
    v = _limits(theta[1])[1] * (1.0 + 2.0 * fraction)
    d1, d2 = _stuffed(v, np.array(theta), rho)
    assert d2 >= d1 * (1 - REL)


def test_not_monotonic_in_angle_in_intermediate_regime():
    """Documented behaviour of the recalled form: at 7 km/s d_c peaks near 25.3° (where
    V_H(θ) = 7 km/s and the high-speed branch ends) and dips by 1.7 % to 39° (the anchors
    and the limits both move with θ)."""
    d = _stuffed(7.0, np.array([25.0, 39.0, 60.0]))
    assert d[1] < d[0]
    assert d[1] / d[0] == pytest.approx(1.36944 / 1.39269, abs=1e-4)
    assert d[2] > d[0]
