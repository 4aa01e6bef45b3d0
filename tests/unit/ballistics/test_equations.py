"""Unit tests of the ballistic-limit equations and the registry/dispatcher.

Behaviour common to every registered equation is parametrised over ``EQUATIONS``; model
specifics (regimes, continuity, monotonicity) follow. Published or note values live in
``tests/reference/``.
"""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from tests.equation_parameters import PARAMETERS

from pockmark.ballistics import (
    EQUATIONS,
    FAILURE_COEFFICIENTS,
    critical_diameter,
    threshold_diameter,
)
from pockmark.constants import KSI_IN_MPA
from pockmark.errors import InputError

ALL = sorted(EQUATIONS)
# Parameters that may be zero (an absent layer); every other scalar must be positive.
NONNEGATIVE = {"mli_areal_density"}
# Parameters that are positive scalars (the table of tabulated_diameter is tested on its own).
SCALAR = {
    name: [p for p, value in parameters.items() if np.ndim(value) == 0 and p not in NONNEGATIVE]
    for name, parameters in PARAMETERS.items()
}


def _call(name, velocity, angle, density, **overrides):
    parameters = {**PARAMETERS[name], **overrides}
    return EQUATIONS[name](velocity, angle, density, **parameters)


# --- registry and dispatcher ----------------------------------------------------------------


def test_every_equation_has_a_test_parameter_set():
    assert set(PARAMETERS) == set(EQUATIONS)


@pytest.mark.parametrize("name", ALL)
def test_registry_key_is_function_name(name):
    assert EQUATIONS[name].__name__ == name


@pytest.mark.parametrize("name", ALL)
def test_dispatcher_matches_direct_call(name):
    velocity = np.array([2.0, 5.0, 9.0])
    got = critical_diameter(velocity, 30.0, 2.8, name, **PARAMETERS[name])
    np.testing.assert_array_equal(got, _call(name, velocity, 30.0, 2.8))


def test_dispatcher_unknown_equation_lists_choices():
    with pytest.raises(InputError, match="unknown ballistic-limit equation 'whipple'") as info:
        critical_diameter(7.0, 0.0, 2.8, "whipple", diameter=0.1)
    for name in EQUATIONS:
        assert name in str(info.value)


def test_dispatcher_unknown_parameter():
    with pytest.raises(InputError, match="does not take parameter.*wall_thick"):
        critical_diameter(7.0, 0.0, 2.8, "threshold_diameter", diameter=0.1, wall_thick=0.2)


def test_dispatcher_missing_parameter():
    parameters = dict(PARAMETERS["christiansen_1993"])
    del parameters["standoff"]
    with pytest.raises(InputError, match="missing parameter.*standoff"):
        critical_diameter(7.0, 0.0, 2.8, "christiansen_1993", **parameters)


def test_dispatcher_optional_parameter_may_be_omitted():
    parameters = dict(PARAMETERS["cour_palais_1987"])
    del parameters["failure_coefficient"]
    got = critical_diameter(7.0, 0.0, 2.8, "cour_palais_1987", **parameters)
    assert float(got) == float(_call("cour_palais_1987", 7.0, 0.0, 2.8))


# --- behaviour common to all equations ------------------------------------------------------


@pytest.mark.parametrize("name", ALL)
def test_scalar_input_gives_0d_float64_array(name):
    got = _call(name, 7.0, 30.0, 2.8)
    assert isinstance(got, np.ndarray)
    assert got.shape == ()
    assert got.dtype == np.float64
    assert np.isfinite(got) and got > 0


@pytest.mark.parametrize("name", ALL)
def test_inputs_broadcast(name):
    velocity = np.linspace(1.0, 15.0, 4)[:, None]
    angle = np.array([0.0, 30.0, 60.0])
    got = _call(name, velocity, angle, [[[1.0]], [[2.8]]])
    assert got.shape == (2, 4, 3)
    assert got.dtype == np.float64
    # numpy's vectorised pow may differ from the scalar one in the last bit
    np.testing.assert_allclose(
        got[1, 2, 1], _call(name, velocity[2, 0], angle[1], 2.8), rtol=1e-14
    )


@pytest.mark.parametrize("name", ALL)
def test_int_and_list_inputs(name):
    got = _call(name, [3, 7], 0, 3)
    assert got.dtype == np.float64 and got.shape == (2,)


@pytest.mark.parametrize("name", ALL)
@pytest.mark.parametrize("which", ["velocity", "angle", "density"])
def test_nan_impact_condition_gives_nan(name, which):
    values = {"velocity": np.array([7.0, 7.0]), "angle": np.array([0.0, 0.0]),
              "density": np.array([2.8, 2.8])}
    values[which][1] = np.nan
    got = _call(name, values["velocity"], values["angle"], values["density"])
    assert np.isfinite(got[0]) and np.isnan(got[1])


@pytest.mark.parametrize("name", ALL)
def test_no_impact_gives_inf(name):
    velocity = np.array([0.0, -3.0, 7.0, 7.0, 7.0, 7.0])
    angle = np.array([0.0, 0.0, 90.0, 120.0, 180.0, 89.9])
    got = _call(name, velocity, angle, 2.8)
    assert np.all(np.isposinf(got[:5]))
    assert np.isfinite(got[5])


@pytest.mark.parametrize("name", ALL)
@pytest.mark.parametrize(
    "velocity, angle, density, needle",
    [
        (np.inf, 0.0, 2.8, "impact_velocity"),
        (-np.inf, 0.0, 2.8, "impact_velocity"),
        (7.0, -1.0, 2.8, "impact_angle"),
        (7.0, [10.0, 181.0], 2.8, "impact_angle.*181.*index 1"),
        (7.0, np.inf, 2.8, "impact_angle"),
        (7.0, 0.0, 0.0, "projectile_density"),
        (7.0, 0.0, -2.8, "projectile_density"),
        (7.0, 0.0, np.inf, "projectile_density"),
    ],
)
def test_impossible_impact_conditions_raise(name, velocity, angle, density, needle):
    with pytest.raises(InputError, match=needle):
        _call(name, velocity, angle, density)


@pytest.mark.parametrize(
    "name, parameter",
    [(name, parameter) for name in ALL for parameter in SCALAR[name]],
)
@pytest.mark.parametrize("bad", [0.0, -1.0, np.nan, np.inf])
def test_impossible_shield_parameter_raises(name, parameter, bad):
    with pytest.raises(InputError, match=f"{parameter} must be positive and finite"):
        _call(name, 7.0, 0.0, 2.8, **{parameter: bad})


@pytest.mark.parametrize(
    "name", [name for name in ALL if NONNEGATIVE & set(PARAMETERS[name])]
)
def test_absent_layer_may_be_zero_but_not_negative(name):
    (parameter,) = NONNEGATIVE & set(PARAMETERS[name])
    assert np.isfinite(_call(name, 7.0, 0.0, 2.8, **{parameter: 0.0}))
    for bad in (-1.0, np.nan, np.inf):
        with pytest.raises(InputError, match=f"{parameter} must be zero or positive"):
            _call(name, 7.0, 0.0, 2.8, **{parameter: bad})


@pytest.mark.parametrize("name", [name for name in ALL if SCALAR[name]])
def test_shield_parameters_broadcast(name):
    parameter = SCALAR[name][0]
    value = PARAMETERS[name][parameter]
    column = np.array([[value], [2 * value]])
    got = _call(name, np.array([5.0, 8.0]), 0.0, 2.8, **{parameter: column})
    assert got.shape == (2, 2)
    # Equal up to rounding: numpy may order a broadcast product differently.
    np.testing.assert_allclose(got[0], _call(name, np.array([5.0, 8.0]), 0.0, 2.8), rtol=1e-14)


# --- threshold_diameter -----------------------------------------------------------------------


def test_threshold_diameter_returns_diameter_broadcast():
    velocity = np.array([[1.0, 5.0, 20.0]])
    angle = np.array([[0.0], [45.0], [89.0]])
    got = threshold_diameter(velocity, angle, 1.0, 0.25)
    assert got.shape == (3, 3)
    np.testing.assert_array_equal(got, 0.25)


# --- cour_palais_1987 ----------------------------------------------------------------------------


def test_cour_palais_1987_failure_coefficients():
    assert FAILURE_COEFFICIENTS == {
        "perforation": 1.8, "detached_spall": 2.2, "incipient_spall": 3.0,
    }
    base = _call("cour_palais_1987", 7.0, 0.0, 2.8, failure_coefficient=1.8)
    spall = _call("cour_palais_1987", 7.0, 0.0, 2.8, failure_coefficient=2.2)
    # d_c ∝ k^(-18/19)
    assert float(spall / base) == pytest.approx((2.2 / 1.8) ** (-18 / 19), rel=1e-12)


def test_cour_palais_1987_normal_velocity_scaling():
    """Only V cos θ enters: d_c(V, θ) = d_c(V cos θ, 0)."""
    angle = np.array([10.0, 40.0, 70.0, 85.0])
    velocity = 12.0
    normal = velocity * np.cos(np.radians(angle))
    np.testing.assert_allclose(
        _call("cour_palais_1987", velocity, angle, 2.8),
        _call("cour_palais_1987", normal, 0.0, 2.8),
        rtol=1e-12,
    )


# --- christiansen_1993 -----------------------------------------------------------------------


def _whipple(velocity, angle, density=2.8, **overrides):
    return _call("christiansen_1993", velocity, angle, density, **overrides)


def test_ksi_mpa_conversion():
    assert 40.0 * KSI_IN_MPA == pytest.approx(275.79, abs=0.005)
    # 275.79 MPa and exactly 40 ksi give the same d_c to the 5 digits of 275.79
    speeds = np.array([2.0, 5.0, 9.0])
    np.testing.assert_allclose(
        _whipple(speeds, 0.0, rear_wall_yield_strength=275.79),
        _whipple(speeds, 0.0, rear_wall_yield_strength=40.0 * KSI_IN_MPA),
        rtol=1e-5,
    )


def test_christiansen_1993_ballistic_branch_by_hand():
    """At σ = 40 ksi the strength term is 1.

    d = [(tw + tb) / (0.6 cos^(5/3)θ ρp^½ V^(2/3))]^(18/19)
    """
    velocity, angle, density = 2.5, 20.0, 2.8
    cos = math.cos(math.radians(angle))
    denominator = 0.6 * cos ** (5 / 3) * density**0.5 * velocity ** (2 / 3)
    expected = ((0.3175 + 0.127) / denominator) ** (18 / 19)
    got = _whipple(velocity, angle, density, rear_wall_yield_strength=40.0 * KSI_IN_MPA)
    assert float(got) == pytest.approx(expected, rel=1e-12)


def test_christiansen_1993_hypervelocity_branch_by_hand():
    """At σ = 70 ksi the strength term is 1."""
    velocity, angle, density = 11.0, 30.0, 1.0
    normal = velocity * math.cos(math.radians(angle))
    expected = (
        3.918 * 0.3175 ** (2 / 3) * density ** (-1 / 3) * 2.713 ** (-1 / 9)
        * normal ** (-2 / 3) * 10.0 ** (1 / 3)
    )
    got = _whipple(velocity, angle, density, rear_wall_yield_strength=70.0 * KSI_IN_MPA)
    assert float(got) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("angle", [0.0, 30.0, 45.0, 60.0, 80.0])
@pytest.mark.parametrize("density, sigma", [(2.8, 276.0), (1.0, 393.0), (7.8, 150.0)])
@pytest.mark.parametrize("boundary", [3.0, 7.0])
def test_christiansen_1993_continuous_at_regime_boundaries(angle, density, sigma, boundary):
    speed = boundary / math.cos(math.radians(angle))
    below, at, above = _whipple(
        speed * np.array([1 - 1e-12, 1.0, 1 + 1e-12]), angle, density,
        rear_wall_yield_strength=sigma,
    )
    assert abs(above / below - 1.0) < 1e-9
    assert abs(at / below - 1.0) < 1e-9


def test_christiansen_1993_shatter_regime_is_linear_in_normal_velocity():
    angle = 40.0
    cos = math.cos(math.radians(angle))
    d3, d4, d5, d7 = _whipple(np.array([3.0, 4.0, 5.0, 7.0]) / cos, angle)
    assert d5 == pytest.approx(0.5 * (d3 + d7), rel=1e-12)
    assert d4 == pytest.approx(0.75 * d3 + 0.25 * d7, rel=1e-12)


def test_christiansen_1993_hypervelocity_anchor_independent_of_angle():
    angles = np.array([0.0, 20.0, 45.0, 70.0])
    got = _whipple(7.0 / np.cos(np.radians(angles)), angles)
    np.testing.assert_allclose(got, got[0], rtol=1e-12)


def test_christiansen_1993_standoff_only_matters_above_ballistic_regime():
    low = _whipple(np.array([1.0, 2.9]), 0.0, standoff=np.array([[5.0], [30.0]]))
    np.testing.assert_array_equal(low[0], low[1])


# --- monotonicity (hypothesis) ---------------------------------------------------------------

SETTINGS = settings(max_examples=60, deadline=None)
REL = 1e-12  # room for last-bit rounding of pow

speeds = st.floats(0.5, 20.0)
angles = st.floats(0.0, 89.0)
densities = st.floats(0.5, 8.0)
lengths = st.floats(0.01, 2.0)
standoffs = st.floats(1.0, 50.0)
strengths = st.floats(50.0, 1000.0)


def _ordered(pair):
    return tuple(sorted(pair))


@SETTINGS
@given(speeds, angles, densities, st.tuples(lengths, lengths).map(_ordered))
def test_single_wall_non_decreasing_in_wall_thickness(v, theta, rho, thickness):
    d1, d2 = _call("cour_palais_1987", v, theta, rho, wall_thickness=np.array(thickness))
    assert d2 >= d1 * (1 - REL)


@SETTINGS
@given(speeds, st.tuples(angles, angles).map(_ordered), densities)
def test_single_wall_non_decreasing_in_angle(v, theta, rho):
    d1, d2 = _call("cour_palais_1987", v, np.array(theta), rho)
    assert d2 >= d1 * (1 - REL)


@SETTINGS
@given(speeds, angles, st.tuples(densities, densities).map(_ordered))
def test_single_wall_non_increasing_in_projectile_density(v, theta, rho):
    d1, d2 = _call("cour_palais_1987", v, theta, np.array(rho))
    assert d2 <= d1 * (1 + REL)


@SETTINGS
@given(speeds, angles, densities, st.tuples(lengths, lengths).map(_ordered))
def test_whipple_non_decreasing_in_rear_wall_thickness(v, theta, rho, thickness):
    d1, d2 = _whipple(v, theta, rho, rear_wall_thickness=np.array(thickness))
    assert d2 >= d1 * (1 - REL)


@SETTINGS
@given(speeds, angles, densities, st.tuples(strengths, strengths).map(_ordered))
def test_whipple_non_decreasing_in_yield_strength(v, theta, rho, sigma):
    d1, d2 = _whipple(v, theta, rho, rear_wall_yield_strength=np.array(sigma))
    assert d2 >= d1 * (1 - REL)


@SETTINGS
@given(speeds, angles, st.tuples(densities, densities).map(_ordered))
def test_whipple_non_increasing_in_projectile_density(v, theta, rho):
    d1, d2 = _whipple(v, theta, np.array(rho))
    assert d2 <= d1 * (1 + REL)


@SETTINGS
@given(
    st.floats(7.0, 20.0), st.floats(0.0, 60.0), densities,
    st.tuples(standoffs, standoffs).map(_ordered),
)
def test_whipple_non_decreasing_in_standoff_hypervelocity(normal_speed, theta, rho, standoff):
    v = normal_speed / math.cos(math.radians(theta))
    d1, d2 = _whipple(v, theta, rho, standoff=np.array(standoff))
    assert d2 >= d1 * (1 - REL)
    if standoff[1] > standoff[0] * (1 + 1e-9):
        assert d2 > d1


@SETTINGS
@given(speeds, angles, densities, st.tuples(standoffs, standoffs).map(_ordered))
def test_whipple_non_decreasing_in_standoff_any_regime(v, theta, rho, standoff):
    d1, d2 = _whipple(v, theta, rho, standoff=np.array(standoff))
    assert d2 >= d1 * (1 - REL)


@SETTINGS
@given(st.floats(0.01, 500.0))
def test_ksi_round_trip(sigma_ksi):
    """σ given in MPa = σ_ksi · 6.894757 behaves exactly like σ_ksi in the printed form."""
    resisting = 0.3175 * (sigma_ksi / 40) ** 0.5 + 0.127
    expected = (resisting / (0.6 * 2.8**0.5 * 2.0 ** (2 / 3))) ** (18 / 19)
    got = _whipple(2.0, 0.0, 2.8, rear_wall_yield_strength=sigma_ksi * KSI_IN_MPA)
    assert float(got) == pytest.approx(expected, rel=1e-12)


# --- provenance and units across the registry -----------------------------------------------


@pytest.mark.parametrize("name", ALL)
def test_docstring_states_provenance_units_and_range(name):
    """Constants not read in a source are marked 'from memory'; practice is labelled."""
    doc = EQUATIONS[name].__doc__
    assert "[km s⁻¹]" in doc and "[°]" in doc and "[cm]" in doc
    assert "Notes" in doc and ("Validity range" in doc or "Range" in doc or "no validity" in doc)
    if name in {"cour_palais_1987", "christiansen_1993", "christiansen_1995"}:
        assert "from memory" in doc and "References" in doc
    elif name.split("_")[0] in {"christiansen", "ryan", "schafer"}:
        assert "second-hand transcription" in doc and "References" in doc
    elif name.startswith("sandwich_"):
        assert "no source" in doc or "NON-conservative" in doc
    else:
        assert "not a published model" in doc.lower() or "This is not a published" in doc


def test_lengths_are_centimetres():
    """Spacing in m instead of cm (10 cm given as 0.1) would shrink the hypervelocity
    Whipple diameter by 100^(1/3) = 4.64 and the stuffed-Whipple one by 100^(2/3) = 21.5."""
    whipple = _call("christiansen_1993", 10.0, 0.0, 2.8, standoff=np.array([10.0, 0.1]))
    assert whipple[0] / whipple[1] == pytest.approx(100 ** (1 / 3), rel=1e-12)
    stuffed = _call("christiansen_1995", 10.0, 0.0, 2.8, standoff=np.array([11.4, 0.114]))
    assert stuffed[0] / stuffed[1] == pytest.approx(100 ** (2 / 3), rel=1e-12)
