"""Property tests of the published three-regime forms: multi-shock, honeycomb panel, triple
wall and thermal blanket.

Equations under test: :func:`~pockmark.ballistics.christiansen_1995_multi_shock`,
:func:`~pockmark.ballistics.ryan_2008_aluminium`, :func:`~pockmark.ballistics.ryan_2008_cfrp`,
:func:`~pockmark.ballistics.schafer_2008_aluminium`,
:func:`~pockmark.ballistics.schafer_2008_cfrp` and
:func:`~pockmark.ballistics.christiansen_2009_mli`.

Reference for every test: the form as stated in each function's docstring (constants read
second-hand, see the module). Each of those modules names one transcription (pyBLOSSUM, MIT
licence, commit c9aa929); no printed page and no published test point was read. These tests
therefore check the *form* (continuity, linear blend, monotonicity, exponents, identities,
units) and use few constant values. Where a test needs a constant, such as a regime limit,
K3S or the reference alloy, its docstring says which one. There are no check values from a
paper here; those belong in ``tests/reference/``. Where a test rests on habit rather than
on the docstring, it says "common practice, no source".
"""

import contextlib
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from tests.equation_parameters import PARAMETERS

from pockmark.ballistics import (
    christiansen_1993,
    christiansen_1995_multi_shock,
    christiansen_2009_mli,
    make_shield,
    ryan_2008_aluminium,
    ryan_2008_cfrp,
    schafer_2008_aluminium,
    schafer_2008_cfrp,
)
from pockmark.ballistics.sandwich import ryan_angle_exponent
from pockmark.constants import KSI_IN_MPA
from pockmark.errors import ModelRangeWarning

# One physically plausible parameter set per equation (canonical units: cm, g cm⁻³,
# g cm⁻², MPa). Common practice, no source: sizes of the build-ups named in the docstrings.
FUNCTIONS = {
    "christiansen_1995_multi_shock": christiansen_1995_multi_shock,
    "ryan_2008_aluminium": ryan_2008_aluminium,
    "ryan_2008_cfrp": ryan_2008_cfrp,
    "schafer_2008_aluminium": schafer_2008_aluminium,
    "schafer_2008_cfrp": schafer_2008_cfrp,
    "christiansen_2009_mli": christiansen_2009_mli,
}
BASE = {name: PARAMETERS[name] for name in FUNCTIONS}
ALL = sorted(FUNCTIONS)
# Equations whose angle exponent δ (and ε) switches at 45° and 65° (docstrings).
SWITCHING = {"ryan_2008_aluminium", "schafer_2008_aluminium"}


def _call(name, velocity, angle, density=2.8, **overrides):
    return FUNCTIONS[name](velocity, angle, density, **{**BASE[name], **overrides})


def _limits(name, angle):
    """Total-speed regime limits (V_L, V_H) [km s⁻¹], written independently of the code.

    Form as stated in the docstrings (constants read second-hand, see module):
    multi-shock 2.4/cos^½θ, 6.4/cos^¼θ; Ryan/SRL aluminium 3/cosθ, 7/cosθ; CFRP 4.2/cosθ,
    8.4/cosθ; MLI 2.5/cosθ, 6/cos^½θ.
    """
    cos = math.cos(math.radians(angle))
    if name == "christiansen_1995_multi_shock":
        return 2.4 / cos**0.5, 6.4 / cos**0.25
    if name == "christiansen_2009_mli":
        return 2.5 / cos, 6.0 / cos**0.5
    if name.endswith("_cfrp"):
        return 4.2 / cos, 8.4 / cos
    return 3.0 / cos, 7.0 / cos


def _cos(angle):
    return math.cos(math.radians(angle))


SETTINGS = settings(max_examples=40, deadline=None)
REL = 1e-12


def _ordered(pair):
    return tuple(sorted(pair))


def _pair(low, high, min_value=None):
    values = st.floats(low if min_value is None else min_value, high)
    return st.tuples(values, values).map(_ordered)


# --- 1. continuity across the regime limits ----------------------------------------------------


def _continuity_cases():
    cases = []
    for name in ALL:
        # Away from 45°/65° for the switching equations; below 80° for the blanket (see
        # test_mli_regime_limits_cross_above_80_degrees).
        angles = [0.0, 30.0, 50.0, 60.0, 70.0, 79.0]
        if name == "christiansen_1995_multi_shock":
            angles.append(85.0)
        for angle in angles:
            for which in (0, 1):
                cases.append((name, angle, which))
    return cases


@pytest.mark.parametrize("name, angle, which", _continuity_cases())
@pytest.mark.parametrize("density", [1.0, 2.8, 7.8])
def test_continuous_at_regime_limits(name, angle, density, which):
    """d_c(V_lim(1 − 1e-9)) ≈ d_c(V_lim) ≈ d_c(V_lim(1 + 1e-9)). Form as stated in the
    docstring (constants read second-hand, see module): the intermediate line joins the end
    equations evaluated at the limits, so the blend is continuous by construction."""
    limit = _limits(name, angle)[which]
    below, at, above = _call(name, limit * np.array([1 - 1e-9, 1.0, 1 + 1e-9]), angle, density)
    # The intermediate slope changes d_c by at most a few 1e-9 over the ±1e-9 step.
    assert abs(above / below - 1.0) < 1e-7
    assert abs(at / below - 1.0) < 1e-7


@pytest.mark.parametrize("name", ["ryan_2008_aluminium", "schafer_2008_aluminium"])
@pytest.mark.parametrize("which", [0, 1])
@pytest.mark.parametrize("angle", [20.0, 55.0, 75.0])
def test_continuous_at_regime_limits_in_every_angle_band(name, which, angle):
    """One angle inside each band where δ is constant ([0, 45], (45, 65), [65, 90)). The
    limits depend on the material, not on δ. Form as stated in the docstring (constants read
    second-hand, see module)."""
    limit = _limits(name, angle)[which]
    below, above = _call(name, limit * np.array([1 - 1e-9, 1 + 1e-9]), angle)
    assert abs(above / below - 1.0) < 1e-7


@pytest.mark.parametrize(
    "name, angle",
    [("christiansen_2009_mli", 82.0), ("christiansen_2009_mli", 88.0),
     ("christiansen_1995_multi_shock", 89.0)],
)
def test_crossed_regime_limits_jump_at_the_low_limit(name, angle):
    """Form as stated in the docstring (constants read second-hand, see module): above 80°
    (blanket: V_L = 2.5/cosθ overtakes V_H = 6/cos^½θ) and 88.9° (multi-shock) there is no
    intermediate regime and d_c drops at V_L, as documented."""
    low, high = _limits(name, angle)
    assert low > high
    below, above = _call(name, low * np.array([1 - 1e-9, 1 + 1e-9]), angle)
    assert above < below * (1 - 1e-3)


def _quiet():
    return contextlib.nullcontext()


@pytest.mark.parametrize("name", ["christiansen_2009_mli", "christiansen_1995_multi_shock"])
def test_shields_cap_before_the_limits_cross(name):
    """A shield of either form caps the obliquity at 75° by default (common practice, no
    source), below the angle where the limits cross, so its curve is continuous in speed at
    every angle (both limits checked at 89°, evaluated at the cap)."""
    definitions = {
        "christiansen_2009_mli": {"wall_thickness": 0.1, "wall_material": "Al6061-T6"},
        "christiansen_1995_multi_shock": {
            "bumper_areal_density": 0.4, "standoff": 15.0, "rear_wall_thickness": 0.16,
            "rear_wall_material": "Al2219-T87",
        },
    }
    with pytest.warns(ModelRangeWarning) if name == "christiansen_2009_mli" else _quiet():
        shield = make_shield("s", {"equation": name, **definitions[name]})
    assert shield.angle_cap == 75.0
    for _, limit in shield.regime_boundaries(89.0):
        below, above = shield.critical_diameter(limit * np.array([1 - 1e-9, 1 + 1e-9]), 89.0,
                                                2.8)
        assert abs(above / below - 1.0) < 1e-7


# --- 1b. the deliberate jumps in angle (δ, ε switch at 45° and 65°) ----------------------------

_STEP = 1e-7  # [°]; the smooth cos^-δ θ factor changes by < 1e-8 over 2·_STEP


def _across(name, velocity, angle, **overrides):
    """(d_c just below, d_c just above) the angle ``angle`` at fixed speed."""
    below, above = _call(name, velocity, np.array([angle - _STEP, angle + _STEP]), **overrides)
    return below, above


def test_ryan_angle_exponent_bands():
    """δ = 5/4 strictly between 45° and 65°, 4/3 elsewhere (also exactly at 45° and 65°);
    δ = 4/3 at every angle for CFRP. Form as stated in the docstring (constants read
    second-hand, see module)."""
    angle = np.array([0.0, 30.0, 45.0, 45.0 + _STEP, 55.0, 65.0 - _STEP, 65.0, 80.0])
    cos = np.cos(np.radians(angle))
    expected = np.where((angle > 45.0) & (angle < 65.0), 5 / 4, 4 / 3)
    np.testing.assert_array_equal(ryan_angle_exponent(cos, "aluminium"), expected)
    np.testing.assert_array_equal(ryan_angle_exponent(cos, "cfrp"), 4 / 3)


@pytest.mark.parametrize(
    "angle, velocity, branch",
    [(45.0, 1.0, "low"), (45.0, 20.0, "high"), (65.0, 1.0, "low"), (65.0, 20.0, "high")],
)
@pytest.mark.parametrize("density", [1.0, 2.8])
def test_ryan_aluminium_angle_jump_in_end_branches(angle, velocity, branch, density):
    """Form as stated in the docstring (constants read second-hand, see module): the end
    branches go as cos^-δ θ (high speed) and cos^-(18δ/19) θ (low speed). δ falls by 1/12
    at 45° and rises by 1/12 at 65°, so d_c jumps by cos^(±1/12)θ (high speed) or
    cos^(±18/228)θ (low speed).

    The docstring's sizes: "about −3 %" at 45° (the form gives −2.70 % low, −2.85 % high)
    and "+7 %" at 65° (the form gives +7.04 % low, +7.44 % high)."""
    low, high = _limits("ryan_2008_aluminium", angle)
    assert (velocity <= low) if branch == "low" else (velocity >= high)
    below, above = _across("ryan_2008_aluminium", velocity, angle, density=density)
    power = 1 / 12 if branch == "high" else 18 / 19 / 12
    sign = 1.0 if angle == 45.0 else -1.0  # cos^(+1/12) < 1 at 45°, cos^(-1/12) > 1 at 65°
    assert above / below == pytest.approx(_cos(angle) ** (sign * power), rel=1e-6)
    if angle == 45.0:
        assert -0.03 < above / below - 1 < -0.02  # "about −3 %": −2.7 % to −2.85 %
    else:
        assert 0.07 < above / below - 1 < 0.08  # "+7 %": +7.0 % to +7.4 %


@pytest.mark.parametrize("angle, velocity", [(45.0, 7.0), (65.0, 12.0)])
def test_ryan_aluminium_angle_jump_in_intermediate_regime(angle, velocity):
    """Between the limits both anchors jump (by the low- and the high-speed factors), so the
    blend jumps by a factor between the two. Form as stated in the docstring (constants read
    second-hand, see module)."""
    low, high = _limits("ryan_2008_aluminium", angle)
    assert low < velocity < high
    below, above = _across("ryan_2008_aluminium", velocity, angle)
    sign = 1.0 if angle == 45.0 else -1.0
    bounds = sorted([_cos(angle) ** (sign / 12), _cos(angle) ** (sign * 18 / 19 / 12)])
    assert bounds[0] * (1 - 1e-6) <= above / below <= bounds[1] * (1 + 1e-6)


@pytest.mark.parametrize("angle", [45.0, 65.0])
@pytest.mark.parametrize("gap", [1.0, 30.0])
def test_schafer_aluminium_angle_jump(angle, gap):
    """Form as stated in the docstring (constants read second-hand, see module). The
    low-speed branch has no gap term, so it jumps exactly as Ryan's does (cos^(±18/228)θ).
    In the high-speed branch δ falls by 1/12 and ε (of the gap term's cos^-ε θ) falls by
    1/6 at 45°; both rise again at 65°. So the high-speed jump lies between the core
    term's cos^(±1/12)θ and the gap term's cos^(±1/4)θ: downwards at 45°, upwards at 65°."""
    sign = 1.0 if angle == 45.0 else -1.0
    below, above = _across("schafer_2008_aluminium", 1.0, angle, gap=gap)
    assert above / below == pytest.approx(_cos(angle) ** (sign * 18 / 19 / 12), rel=1e-6)
    below, above = _across("schafer_2008_aluminium", 20.0, angle, gap=gap)
    assert (above < below) if angle == 45.0 else (above > below)
    bounds = sorted([_cos(angle) ** (sign / 12), _cos(angle) ** (sign / 4)])
    assert bounds[0] * (1 - 1e-6) <= above / below <= bounds[1] * (1 + 1e-6)


def _angle_continuity_cases():
    cases = []
    for name in ALL:
        angles = [10.0, 30.0, 44.0, 46.0, 55.0, 64.0, 66.0, 75.0]
        if name not in SWITCHING:
            angles += [45.0, 65.0]  # no switch: continuous there too
        cases += [(name, angle) for angle in angles]
    return cases


@pytest.mark.parametrize("name, angle", _angle_continuity_cases())
def test_continuous_in_angle_elsewhere(name, angle):
    """At fixed speed d_c is continuous in θ wherever δ and ε do not switch. The regime
    limits move continuously with θ, and the blend is continuous in them. Form as stated in
    the docstring (constants read second-hand, see module); angles below the blanket's 80°
    crossing."""
    speeds = np.array([1.0, 3.5, 5.0, 7.0, 9.0, 12.0, 20.0, 30.0])[:, None]
    d = _call(name, speeds, np.array([angle - _STEP, angle + _STEP]))
    np.testing.assert_allclose(d[:, 1], d[:, 0], rtol=1e-6)


# --- 2. intermediate regime: straight line in total speed ---------------------------------------


@pytest.mark.parametrize("name", ALL)
@pytest.mark.parametrize("angle", [0.0, 30.0, 55.0, 70.0])
def test_intermediate_regime_is_linear_in_total_speed(name, angle):
    """Form as stated in the docstring (constants read second-hand, see module): between the
    limits, d_c is the straight line in V between the end equations at the limits."""
    low, high = _limits(name, angle)
    fractions = np.array([0.0, 0.25, 0.5, 0.9, 1.0])
    d = _call(name, low + fractions * (high - low), angle)
    expected = d[0] * (1 - fractions) + d[-1] * fractions
    np.testing.assert_allclose(d, expected, rtol=1e-12)
    # and the anchors are the end equations: just outside the limits the same values
    outside = _call(name, np.array([low * (1 - 1e-12), high * (1 + 1e-12)]), angle)
    np.testing.assert_allclose(outside, d[[0, -1]], rtol=1e-9)


# --- 3. monotonicity (hypothesis, ordered pairs) ------------------------------------------------

speeds = st.floats(0.5, 25.0)
angles = st.floats(0.0, 89.0)
densities = st.floats(0.5, 8.0)

_THICKNESS = (0.01, 1.0)
_SHEET_DENSITY = (1.0, 8.0)
_YIELD = (50.0, 1000.0)
_MLI = (0.0, 1.0)

# (equation, parameter, range, direction): +1 non-decreasing, -1 non-increasing.
# Form as stated in the docstrings: every term with a thickness, spacing, areal density or
# strength sits in the numerator of both end equations, or is absent from one of them (so
# the anchors of the blend move the same way). Spacing enters only the high-speed branch.
MONOTONE = [
    ("christiansen_1995_multi_shock", "bumper_areal_density", (0.05, 5.0), 1),
    ("christiansen_1995_multi_shock", "standoff", (1.0, 50.0), 1),
    ("christiansen_1995_multi_shock", "rear_wall_thickness", _THICKNESS, 1),
    ("christiansen_1995_multi_shock", "rear_wall_density", _SHEET_DENSITY, 1),
    ("christiansen_1995_multi_shock", "rear_wall_yield_strength", _YIELD, 1),
    ("ryan_2008_aluminium", "front_sheet_thickness", _THICKNESS, 1),
    ("ryan_2008_aluminium", "core_thickness", (0.5, 10.0), 1),
    ("ryan_2008_aluminium", "rear_sheet_thickness", _THICKNESS, 1),
    ("ryan_2008_aluminium", "rear_sheet_yield_strength", _YIELD, 1),
    ("ryan_2008_aluminium", "mli_areal_density", _MLI, 1),
    ("ryan_2008_cfrp", "front_sheet_thickness", _THICKNESS, 1),
    ("ryan_2008_cfrp", "front_sheet_density", _SHEET_DENSITY, 1),
    ("ryan_2008_cfrp", "core_thickness", (0.5, 10.0), 1),
    ("ryan_2008_cfrp", "rear_sheet_thickness", _THICKNESS, 1),
    ("ryan_2008_cfrp", "rear_sheet_density", _SHEET_DENSITY, 1),
    ("ryan_2008_cfrp", "mli_areal_density", _MLI, 1),
    ("schafer_2008_aluminium", "outer_sheet_thickness", _THICKNESS, 1),
    ("schafer_2008_aluminium", "core_thickness", (0.5, 10.0), 1),
    ("schafer_2008_aluminium", "inner_sheet_thickness", _THICKNESS, 1),
    ("schafer_2008_aluminium", "gap", (0.1, 50.0), 1),
    ("schafer_2008_aluminium", "wall_thickness", _THICKNESS, 1),
    ("schafer_2008_aluminium", "wall_yield_strength", _YIELD, 1),
    ("schafer_2008_aluminium", "mli_areal_density", _MLI, 1),
    ("schafer_2008_cfrp", "outer_sheet_thickness", _THICKNESS, 1),
    ("schafer_2008_cfrp", "outer_sheet_density", _SHEET_DENSITY, 1),
    ("schafer_2008_cfrp", "core_thickness", (0.5, 10.0), 1),
    ("schafer_2008_cfrp", "inner_sheet_thickness", _THICKNESS, 1),
    ("schafer_2008_cfrp", "inner_sheet_density", _SHEET_DENSITY, 1),
    ("schafer_2008_cfrp", "gap", (0.1, 50.0), 1),
    ("schafer_2008_cfrp", "wall_thickness", _THICKNESS, 1),
    ("schafer_2008_cfrp", "wall_yield_strength", _YIELD, 1),
    ("schafer_2008_cfrp", "mli_areal_density", _MLI, 1),
    ("christiansen_2009_mli", "wall_thickness", _THICKNESS, 1),
    ("christiansen_2009_mli", "blanket_areal_density", (0.01, 2.0), 1),
]


@pytest.mark.parametrize("name, parameter, bounds, direction", MONOTONE,
                         ids=[f"{m[0]}-{m[1]}" for m in MONOTONE])
@SETTINGS
@given(v=speeds, theta=angles, rho=densities, fractions=st.tuples(
    st.floats(0.0, 1.0), st.floats(0.0, 1.0)).map(_ordered))
def test_monotonic_in_shield_parameter(name, parameter, bounds, direction, v, theta, rho,
                                       fractions):
    """Monotonic at every speed and angle: the branch chosen depends only on V and θ, each
    end equation is monotonic in the parameter and the anchors move with it. (This also
    holds where the blanket's limits cross, since the blend is then never used.) Form as
    stated in the docstring (constants read second-hand, see module)."""
    low, high = bounds
    values = low + np.array(fractions) * (high - low)
    d1, d2 = _call(name, v, theta, rho, **{parameter: values})
    if direction > 0:
        assert d2 >= d1 * (1 - REL)
    else:
        assert d2 <= d1 * (1 + REL)


@pytest.mark.parametrize("name", ALL)
@SETTINGS
@given(v=speeds, theta=angles, rho=st.tuples(densities, densities).map(_ordered))
def test_non_increasing_in_projectile_density(name, v, theta, rho):
    """ρ_p^-½ or ρ_p^-(9/19) at low speed, ρ_p^-⅓ at high speed; the limits do not depend
    on ρ_p. Form as stated in the docstring (constants read second-hand, see module)."""
    d1, d2 = _call(name, v, theta, np.array(rho))
    assert d2 <= d1 * (1 + REL)


@pytest.mark.parametrize("name", ALL)
@SETTINGS
@given(v=speeds, rho=densities, standoff=_pair(0.5, 50.0))
def test_spacing_does_not_enter_low_speed_branch(name, v, rho, standoff):
    """Form as stated in the docstring (constants read second-hand, see module): standoff
    (multi-shock), core thickness (Ryan, SRL) and gap (SRL) appear only in the high-speed
    branch. At low speed d_c does not depend on them. The blanket has no spacing
    parameter, so its test is trivial."""
    spacing = {
        "christiansen_1995_multi_shock": ["standoff"],
        "ryan_2008_aluminium": ["core_thickness"],
        "ryan_2008_cfrp": ["core_thickness"],
        "schafer_2008_aluminium": ["core_thickness", "gap"],
        "schafer_2008_cfrp": ["core_thickness", "gap"],
        "christiansen_2009_mli": [],
    }[name]
    theta = 30.0
    velocity = min(v, _limits(name, theta)[0])
    for parameter in spacing:
        d1, d2 = _call(name, velocity, theta, rho, **{parameter: np.array(standoff)})
        assert d1 == d2


def _angle_bands(name, regime):
    """Angle bands [lo, hi] in which the branch's angle exponent is constant.

    Aluminium Ryan/SRL: δ switches at 45° and 65°, and d_c jumps *down* at 45°
    (test_ryan_aluminium_angle_jump_in_end_branches), so monotonicity in θ holds only
    within [0, 45], (45, 65) and [65, 89]. The middle band is shrunk by 1e-3° because the
    code finds θ again from cos θ (round-off right at the edges). Blanket, high speed: below
    the 80° crossing of its limits (beyond it the low-speed branch applies up to V_L).
    Multi-shock, high speed: below its 88.87° crossing.
    """
    if name in SWITCHING:
        return [(0.0, 45.0), (45.001, 64.999), (65.0, 89.0)]
    if regime == "high" and name == "christiansen_2009_mli":
        return [(0.0, 79.9)]
    if regime == "high" and name == "christiansen_1995_multi_shock":
        return [(0.0, 88.8)]
    return [(0.0, 89.0)]


ANGLE_CASES = [
    (name, regime, band)
    for name in ALL
    for regime in ("low", "high")
    for band in _angle_bands(name, regime)
]


@pytest.mark.parametrize("name, regime, band", ANGLE_CASES,
                         ids=[f"{n}-{r}-{lo:g}-{hi:g}" for n, r, (lo, hi) in ANGLE_CASES])
@SETTINGS
@given(fractions=st.tuples(st.floats(0.0, 1.0), st.floats(0.0, 1.0)).map(_ordered),
       rho=densities, position=st.floats(0.0, 1.0))
def test_non_decreasing_in_angle_within_regime_and_band(name, regime, band, fractions, rho,
                                                        position):
    """Both angles in the same regime and in one band of constant δ (and ε). Each end
    equation then goes as a negative power of cos θ (cos^-(18δ/19), cos^-(4/3), cos^-δ,
    cos^-⅓, cos^-⅔; SRL adds a cos^-ε gap term), so it is non-decreasing in θ. Across a
    band edge it is not, and in the intermediate regime it is not in general either: the
    limits move with θ. Low speed: V ≤ V_L(θ1) ≤ V_L(θ2). High speed: V ≥ V_H(θ2) ≥ V_H(θ1).
    Form as stated in the docstring (constants read second-hand, see module)."""
    lo, hi = band
    theta = lo + np.array(fractions) * (hi - lo)
    if regime == "low":
        v = 0.5 + position * (_limits(name, theta[0])[0] - 0.5)
    else:
        v = _limits(name, theta[1])[1] * (1.0 + 2.0 * position)
    d1, d2 = _call(name, v, theta, rho)
    assert d2 >= d1 * (1 - REL)


# --- 4. scaling exponents of the published forms -------------------------------------------------


def _ratio(name, velocity, angle, parameter, factor, density=2.8):
    """d_c(parameter · factor) / d_c(parameter) at fixed impact conditions."""
    value = BASE[name][parameter]
    d = _call(name, velocity, angle, density, **{parameter: np.array([value, value * factor])})
    return d[1] / d[0]


_HIGH = 40.0  # [km s⁻¹]: above every high-speed limit at the angles used below (≤ 60°)
_LOW = 0.8  # [km s⁻¹]: below every low-speed limit


@pytest.mark.parametrize(
    "name, parameter, exponent",
    [
        ("christiansen_1995_multi_shock", "standoff", 2 / 3),
        ("christiansen_1995_multi_shock", "rear_wall_thickness", 1 / 3),
        ("christiansen_1995_multi_shock", "rear_wall_density", 1 / 3),
        ("christiansen_1995_multi_shock", "bumper_areal_density", 0.0),
        ("christiansen_1995_multi_shock", "rear_wall_yield_strength", 1 / 6),
        ("ryan_2008_aluminium", "core_thickness", 1 / 3),
        ("ryan_2008_aluminium", "rear_sheet_thickness", 2 / 3),
        ("ryan_2008_aluminium", "front_sheet_density", -1 / 9),
        ("ryan_2008_aluminium", "rear_sheet_yield_strength", 1 / 3),
        ("ryan_2008_aluminium", "front_sheet_thickness", 0.0),
        ("ryan_2008_aluminium", "mli_areal_density", 0.0),
        ("ryan_2008_cfrp", "core_thickness", 1 / 3),
        ("ryan_2008_cfrp", "rear_sheet_thickness", 2 / 3),
        ("ryan_2008_cfrp", "rear_sheet_density", 2 / 3),
        ("ryan_2008_cfrp", "front_sheet_thickness", 0.0),
        ("ryan_2008_cfrp", "front_sheet_density", 0.0),
        ("ryan_2008_cfrp", "mli_areal_density", 0.0),
        ("schafer_2008_aluminium", "inner_sheet_density", -1 / 9),
        ("schafer_2008_aluminium", "wall_yield_strength", 1 / 3),
        ("schafer_2008_aluminium", "outer_sheet_thickness", 0.0),
        ("schafer_2008_aluminium", "mli_areal_density", 0.0),
        ("schafer_2008_cfrp", "wall_yield_strength", 1 / 3),
        ("schafer_2008_cfrp", "outer_sheet_thickness", 0.0),
        ("schafer_2008_cfrp", "mli_areal_density", 0.0),
        ("christiansen_2009_mli", "wall_thickness", 2 / 3),
        ("christiansen_2009_mli", "blanket_areal_density", 0.0),
    ],
)
@pytest.mark.parametrize("angle", [0.0, 30.0, 60.0])
def test_high_speed_exponent_of_shield_parameter(name, parameter, exponent, angle):
    """Exponents read off the high-speed branches as stated in the docstrings (constants
    read second-hand, see module). Multi-shock: (t_w ρ_w)^⅓ (σ/40)^(1/6) S^⅔, no bumper
    term. Ryan: S^⅓ t_r^⅔ (σ/70)^⅓ ρ_f^(-1/9), no front-sheet thickness or MLI term; CFRP
    sheets enter through t·ρ, with ρ_f fixed at the reference alloy's. SRL: (σ/70)^⅓
    ρ_i^(-1/9) (ρ_i fixed at 2.78 for CFRP, where it scales t_i ρ_i instead: not a pure power,
    so not listed), no outer sheet or MLI. Blanket: t_w^⅔, no blanket term."""
    assert _HIGH > _limits(name, angle)[1]
    assert _ratio(name, _HIGH, angle, parameter, 2.0) == pytest.approx(2.0**exponent, rel=1e-12)


@pytest.mark.parametrize("name, v_exponent, rho_exponent", [
    ("christiansen_1995_multi_shock", -1 / 3, -1 / 3),
    ("ryan_2008_aluminium", -2 / 3, -1 / 3),
    ("ryan_2008_cfrp", -2 / 3, -1 / 3),
    ("schafer_2008_aluminium", -2 / 3, -1 / 3),
    ("schafer_2008_cfrp", -2 / 3, -1 / 3),
    ("christiansen_2009_mli", -2 / 3, -1 / 3),
])
@pytest.mark.parametrize("angle", [0.0, 50.0])
def test_high_speed_exponents_of_speed_and_projectile_density(name, v_exponent, rho_exponent,
                                                              angle):
    """Multi-shock d ∝ V^-⅓ ρ_p^-⅓; Ryan, SRL and blanket d ∝ V^-⅔ ρ_p^-⅓. Form as
    stated in the docstring (constants read second-hand, see module)."""
    d = _call(name, np.array([_HIGH, 2 * _HIGH]), angle)
    assert d[1] / d[0] == pytest.approx(2.0**v_exponent, rel=1e-12)
    d = _call(name, _HIGH, angle, np.array([1.0, 2.0]))
    assert d[1] / d[0] == pytest.approx(2.0**rho_exponent, rel=1e-12)


@pytest.mark.parametrize("name, exponent", [
    ("christiansen_1995_multi_shock", -1 / 3),
    ("ryan_2008_aluminium", -4 / 3),  # δ = 4/3 at 0° and 30°
    ("ryan_2008_cfrp", -4 / 3),
    ("christiansen_2009_mli", -2 / 3),
])
def test_high_speed_angle_exponent(name, exponent):
    """At fixed total speed above V_H at both angles: cos^-⅓ θ (multi-shock), cos^-δ θ
    (Ryan; note: Christiansen's Whipple has (V cos θ)^-⅔), cos^-⅔ θ (blanket). Form as
    stated in the docstring (constants read second-hand, see module)."""
    d = _call(name, _HIGH, np.array([0.0, 30.0]))
    assert d[1] / d[0] == pytest.approx(_cos(30.0) ** exponent, rel=1e-12)


def test_multi_shock_high_speed_depends_on_rear_wall_areal_density_only():
    """(t_w ρ_w)^⅓: doubling t_w and halving ρ_w leaves d_c unchanged at high speed (not at
    low speed, where only t_w enters). Form as stated in the docstring (constants read
    second-hand, see module)."""
    name = "christiansen_1995_multi_shock"
    t, rho = BASE[name]["rear_wall_thickness"], BASE[name]["rear_wall_density"]
    base = _call(name, np.array([_LOW, _HIGH]), 20.0)
    swapped = _call(name, np.array([_LOW, _HIGH]), 20.0, rear_wall_thickness=2 * t,
                    rear_wall_density=rho / 2)
    assert swapped[1] == pytest.approx(base[1], rel=1e-12)
    assert swapped[0] > base[0]


@pytest.mark.parametrize("gap_factor", [2.0, 8.0])
@pytest.mark.parametrize("name, beta", [("schafer_2008_aluminium", 2 / 3),
                                        ("schafer_2008_cfrp", 1 / 3)])
@pytest.mark.parametrize("angle", [0.0, 30.0])
def test_schafer_high_speed_gap_term_exponent(name, beta, gap_factor, angle):
    """The high-speed numerator is [core term + K_S2 S2^β t_w^γ cos^-ε θ]. Subtracting the
    value at a vanishing gap leaves the gap term, which goes as S2^β (β = 2/3 aluminium,
    1/3 CFRP). Form as stated in the docstring (constants read second-hand, see module)."""
    gap = BASE[name]["gap"]
    d0, d1, d2 = _call(name, _HIGH, angle, gap=np.array([1e-30, gap, gap * gap_factor]))
    assert (d2 - d0) / (d1 - d0) == pytest.approx(gap_factor**beta, rel=1e-9)


@pytest.mark.parametrize("name, rho_exponent, angle_power", [
    ("christiansen_1995_multi_shock", -1 / 2, -4 / 3),
    ("ryan_2008_aluminium", -9 / 19, -18 / 19 * 4 / 3),
    ("ryan_2008_cfrp", -9 / 19, -18 / 19 * 4 / 3),
    ("schafer_2008_aluminium", -9 / 19, -18 / 19 * 4 / 3),
    ("schafer_2008_cfrp", -9 / 19, -18 / 19 * 4 / 3),
    ("christiansen_2009_mli", -1 / 2, -4 / 3),
])
def test_low_speed_exponents(name, rho_exponent, angle_power):
    """Low-speed branches: multi-shock and blanket d ∝ V^-⅔ ρ_p^-½ cos^-(4/3) θ (no 18/19
    power); Ryan and SRL d ∝ [· / (cos^δ θ ρ_p^½ V^⅔)]^(18/19), i.e. V^(-12/19),
    ρ_p^(-9/19), cos^(-18δ/19) θ with δ = 4/3 below 45°. Form as stated in the docstring
    (constants read second-hand, see module)."""
    v_exponent = -2 / 3 if rho_exponent == -1 / 2 else -12 / 19
    d = _call(name, np.array([_LOW / 2, _LOW]), 0.0)
    assert d[1] / d[0] == pytest.approx(2.0**v_exponent, rel=1e-12)
    d = _call(name, _LOW, 0.0, np.array([1.0, 2.0]))
    assert d[1] / d[0] == pytest.approx(2.0**rho_exponent, rel=1e-12)
    d = _call(name, _LOW, np.array([0.0, 30.0]))
    assert d[1] / d[0] == pytest.approx(_cos(30.0) ** angle_power, rel=1e-12)


@pytest.mark.parametrize("name, parameter, power", [
    ("christiansen_1995_multi_shock", "bumper_areal_density", 1.0),
    ("christiansen_1995_multi_shock", "rear_wall_thickness", 1.0),
    ("ryan_2008_aluminium", "front_sheet_thickness", 19 / 18),
    ("ryan_2008_aluminium", "rear_sheet_thickness", 19 / 18),
    ("ryan_2008_aluminium", "mli_areal_density", 19 / 18),
    ("ryan_2008_cfrp", "front_sheet_thickness", 19 / 18),
    ("ryan_2008_cfrp", "rear_sheet_density", 19 / 18),
    ("schafer_2008_aluminium", "outer_sheet_thickness", 19 / 18),
    ("schafer_2008_aluminium", "wall_thickness", 19 / 18),
    ("schafer_2008_cfrp", "inner_sheet_thickness", 19 / 18),
    ("christiansen_2009_mli", "wall_thickness", 1.0),
    ("christiansen_2009_mli", "blanket_areal_density", 1.0),
])
def test_low_speed_branch_is_affine_in_resisting_terms(name, parameter, power):
    """The low-speed numerators are sums of thickness and areal-density terms (t_w(σ/40)^½
    + 0.37 m_B; t_r(σ/40)^½/K3S + t_f + 3 m/2.78; …). So d_c, raised to the power 19/18
    for the 18/19 forms, is affine in each term: equal steps give equal differences. Form
    as stated in the docstring (constants read second-hand, see module)."""
    value = BASE[name][parameter] or 0.1
    d = _call(name, _LOW, 20.0, **{parameter: value * np.array([1.0, 2.0, 3.0])}) ** power
    assert d[2] - d[1] == pytest.approx(d[1] - d[0], rel=1e-10)


def test_schafer_aluminium_low_speed_symmetric_in_wall_and_inner_sheet():
    """SRL low speed: (t_w + t_i)(σ/40)^½/K3S. Swapping the wall and inner-sheet
    thicknesses leaves it unchanged, but not the high-speed branch, (t_i + K_tw t_w)^⅔ +
    gap term. Form as stated in the docstring (constants read second-hand, see module),
    including the docstring's deviation t_w^½ → t_w."""
    name = "schafer_2008_aluminium"
    speeds = np.array([_LOW, _HIGH])
    a = _call(name, speeds, 20.0, inner_sheet_thickness=0.05, wall_thickness=0.2)
    b = _call(name, speeds, 20.0, inner_sheet_thickness=0.2, wall_thickness=0.05)
    assert a[0] == pytest.approx(b[0], rel=1e-14)
    assert a[1] != pytest.approx(b[1], rel=1e-3)


# --- 5. structural identities -----------------------------------------------------------------


@pytest.mark.parametrize("velocity", [7.0, 9.0, 15.0])
@pytest.mark.parametrize("sigma", [200.0, 276.0, 480.0])
def test_ryan_high_speed_is_whipple_times_channelling_knock_down(velocity, sigma):
    """Form as stated in the docstring (constants read second-hand, see module): at normal
    incidence the Ryan hypervelocity branch is christiansen_1993's with the rear-wall sizing
    constant 0.16 replaced by K3D = 0.4, a factor (0.16/0.4)^⅔ = 0.543. Same sheets,
    S = core thickness, same σ. The docstrings print 1.155 for 3.918 · 0.16^⅔ = 1.15476,
    so the ratio agrees to 2.2e-4, not to round-off."""
    sheets = dict(t_f=0.08, rho_f=2.713, s=5.0, t_r=0.1)
    ryan = ryan_2008_aluminium(velocity, 0.0, 2.8, sheets["t_f"], sheets["rho_f"], sheets["s"],
                               sheets["t_r"], sigma)
    whipple = christiansen_1993(velocity, 0.0, 2.8, sheets["t_f"], sheets["rho_f"], sheets["s"],
                                sheets["t_r"], sigma)
    assert float(ryan / whipple) == pytest.approx((0.16 / 0.4) ** (2 / 3), rel=5e-4)
    assert (0.16 / 0.4) ** (2 / 3) == pytest.approx(0.543, abs=5e-4)


@pytest.mark.parametrize("velocity", [0.5, 1.5, 3.0])
def test_ryan_low_speed_is_whipple_with_rear_sheet_over_k3s(velocity):
    """At normal incidence the Ryan low-speed branch is christiansen_1993's with t_w → t_r /
    K3S (K3S = 1.4 for aluminium). Both have 0.6, the 18/19 power and V^⅔, and
    cos^δ = cos^(5/3) = 1 at 0°. Form as stated in the docstring (constants read
    second-hand, see module)."""
    ryan = ryan_2008_aluminium(velocity, 0.0, 2.8, 0.08, 2.713, 5.0, 1.4 * 0.1, 300.0)
    whipple = christiansen_1993(velocity, 0.0, 2.8, 0.08, 2.713, 5.0, 0.1, 300.0)
    assert float(ryan) == pytest.approx(float(whipple), rel=1e-12)


SPEEDS = np.array([0.7, 2.0, 3.5, 5.0, 6.5, 8.0, 9.5, 12.0, 20.0, 40.0])


@pytest.mark.parametrize("angle", [0.0, 30.0, 50.0, 70.0])
def test_schafer_cfrp_without_gap_is_ryan_cfrp_with_wall_added_to_rear_sheet(angle):
    """Form as stated in the docstrings (constants read second-hand, see module). For CFRP,
    K_tw = 1 and the only gap term is K_S2 S2^β t_w^γ. With S2 → 0, SRL is Ryan's CFRP form
    with rear sheet t_i' + t_w, where t_i' = t_i ρ_i/2.78 and t_w is aluminium (cm) of
    the equipment wall. This holds at every speed, because the low-speed numerator is
    (t_w + t_i')(σ/40)^½/K3S too. Two conditions make it hold. Ryan's CFRP form fixes
    σ = 59.5 ksi and ρ_f = 2.78 g cm⁻³, while SRL takes the wall's σ, so the wall must have
    σ = 59.5 ksi. And the wall enters as the aluminium-equivalent rear-sheet areal density
    t_w · 2.78."""
    name = "schafer_2008_cfrp"
    p = BASE[name]
    sigma_mpa = 59.5 * KSI_IN_MPA
    srl = schafer_2008_cfrp(SPEEDS, angle, 2.8, p["outer_sheet_thickness"],
                            p["outer_sheet_density"], p["core_thickness"],
                            p["inner_sheet_thickness"], p["inner_sheet_density"], 1e-30,
                            p["wall_thickness"], sigma_mpa, p["mli_areal_density"])
    rear_areal = p["inner_sheet_thickness"] * p["inner_sheet_density"] + p["wall_thickness"] * 2.78
    ryan = ryan_2008_cfrp(SPEEDS, angle, 2.8, p["outer_sheet_thickness"],
                          p["outer_sheet_density"], p["core_thickness"],
                          rear_areal / p["inner_sheet_density"], p["inner_sheet_density"],
                          p["mli_areal_density"])
    np.testing.assert_allclose(srl, ryan, rtol=1e-8)


@pytest.mark.parametrize("angle", [0.0, 30.0, 50.0, 70.0])
def test_schafer_aluminium_low_speed_is_ryan_with_wall_added_to_rear_sheet(angle):
    """SRL aluminium, low speed: ((t_w + t_i)(σ/40)^½/K3S + t_o')/…, which is Ryan's
    aluminium low-speed branch with rear sheet t_i + t_w. Core and gap do not enter, and δ
    is the same function of θ. Form as stated in the docstring (constants read second-hand,
    see module), with its t_w^½ → t_w deviation."""
    p = BASE["schafer_2008_aluminium"]
    velocity = 0.8 * _limits("ryan_2008_aluminium", angle)[0] * np.array([0.5, 1.0])
    srl = _call("schafer_2008_aluminium", velocity, angle)
    ryan = ryan_2008_aluminium(velocity, angle, 2.8, p["outer_sheet_thickness"],
                               p["inner_sheet_density"], 1.0,
                               p["inner_sheet_thickness"] + p["wall_thickness"],
                               p["wall_yield_strength"], p["mli_areal_density"])
    np.testing.assert_allclose(srl, ryan, rtol=1e-12)


@pytest.mark.parametrize("angle", [0.0, 30.0, 50.0, 70.0])
def test_schafer_aluminium_high_speed_without_gap_is_ryan_with_k_tw(angle):
    """SRL aluminium, high speed, S2 → 0: 1.155 S1^⅓ (t_i + K_tw t_w)^⅔ … ρ_i^(-1/9). This
    is Ryan's aluminium high-speed branch with rear sheet t_i + K_tw t_w (K_tw = 1.5) and
    front-sheet density ρ_i. Both use the same δ(θ), including its 45°/65° switch. The
    docstring's remark "with no gap and K_tw = 1 … that of ryan_2008_aluminium for a rear
    sheet of t_i + t_w" holds only in this modified sense: the aluminium form has
    K_tw = 1.5, and Ryan's ρ_f is the front sheet's density where SRL's is the inner
    sheet's. Form as stated in the docstring (constants read second-hand, see module)."""
    p = BASE["schafer_2008_aluminium"]
    velocity = _limits("ryan_2008_aluminium", angle)[1] * np.array([1.0, 1.5, 3.0])
    srl = _call("schafer_2008_aluminium", velocity, angle, gap=1e-30)
    ryan = ryan_2008_aluminium(velocity, angle, 2.8, p["outer_sheet_thickness"],
                               p["inner_sheet_density"], p["core_thickness"],
                               p["inner_sheet_thickness"] + 1.5 * p["wall_thickness"],
                               p["wall_yield_strength"], p["mli_areal_density"])
    np.testing.assert_allclose(srl, ryan, rtol=1e-12)


@pytest.mark.parametrize("angle", [0.0, 40.0, 70.0])
@pytest.mark.parametrize("sheet", ["front", "rear", "both"])
def test_ryan_cfrp_depends_on_sheet_areal_density_only(angle, sheet):
    """CFRP sheets enter as reference aluminium of equal areal density, t ρ / 2.78. So
    doubling a sheet's thickness and halving its density changes nothing, at any speed.
    Form as stated in the docstring (constants read second-hand, see module)."""
    p = BASE["ryan_2008_cfrp"]
    changed = {}
    for which in (["front", "rear"] if sheet == "both" else [sheet]):
        changed[f"{which}_sheet_thickness"] = 2 * p[f"{which}_sheet_thickness"]
        changed[f"{which}_sheet_density"] = p[f"{which}_sheet_density"] / 2
    np.testing.assert_allclose(_call("ryan_2008_cfrp", SPEEDS, angle, **changed),
                               _call("ryan_2008_cfrp", SPEEDS, angle), rtol=1e-12)


@pytest.mark.parametrize("angle", [0.0, 40.0, 70.0])
@pytest.mark.parametrize("sheet", ["outer", "inner"])
def test_schafer_cfrp_depends_on_sheet_areal_density_only(angle, sheet):
    """As for Ryan's CFRP form: t ρ / 2.78 for both panel sheets, and ρ_i in the
    hypervelocity branch fixed at 2.78. Form as stated in the docstring (constants read
    second-hand, see module)."""
    p = BASE["schafer_2008_cfrp"]
    changed = {f"{sheet}_sheet_thickness": 2 * p[f"{sheet}_sheet_thickness"],
               f"{sheet}_sheet_density": p[f"{sheet}_sheet_density"] / 2}
    np.testing.assert_allclose(_call("schafer_2008_cfrp", SPEEDS, angle, **changed),
                               _call("schafer_2008_cfrp", SPEEDS, angle), rtol=1e-12)


@pytest.mark.parametrize("name, sheet", [
    ("ryan_2008_aluminium", "front_sheet_thickness"),
    ("schafer_2008_aluminium", "outer_sheet_thickness"),
])
@pytest.mark.parametrize("angle", [0.0, 50.0])
def test_mli_counts_as_front_sheet_aluminium(name, sheet, angle):
    """t_f' = t_f + 3 m_MLI / 2.78: a blanket of areal density m is the same as 3 m / 2.78
    cm more front (outer) sheet, at every speed. Form as stated in the docstring (constants
    read second-hand, see module)."""
    m = 0.1
    with_blanket = _call(name, SPEEDS, angle, mli_areal_density=m)
    as_sheet = _call(name, SPEEDS, angle, mli_areal_density=0.0,
                     **{sheet: BASE[name][sheet] + 3 * m / 2.78})
    np.testing.assert_allclose(with_blanket, as_sheet, rtol=1e-12)


# --- 6. units -----------------------------------------------------------------------------------


def test_ryan_aluminium_yield_strength_in_mpa_by_printed_form():
    """The printed form uses ksi. σ given as 60 ksi · 6.894757 MPa must give the
    hand-evaluated printed form at σ = 60 ksi: d = 1.155 S^⅓ t_r^⅔ (σ/70)^⅓ / (0.4^⅔
    ρ_p^⅓ ρ_f^(1/9) V^⅔ cos^δ θ), δ = 4/3 at 0°. Form as stated in the docstring
    (constants read second-hand, see module)."""
    velocity, density, t_f, rho_f, s, t_r = 10.0, 2.8, 0.04, 2.7, 2.54, 0.05
    got = ryan_2008_aluminium(velocity, 0.0, density, t_f, rho_f, s, t_r, 60.0 * 6.894757)
    expected = (1.155 * s ** (1 / 3) * t_r ** (2 / 3) * (60.0 / 70.0) ** (1 / 3)
                / (0.4 ** (2 / 3) * density ** (1 / 3) * rho_f ** (1 / 9)
                   * velocity ** (2 / 3)))
    assert float(got) == pytest.approx(expected, rel=1e-7)


def test_multi_shock_yield_strength_in_mpa_by_printed_form():
    """Printed form in ksi: d_LV = 2.0 (t_w (σ/40)^½ + 0.37 m_B) / (cos^(4/3)θ ρ_p^½ V^⅔) and
    d_HV = 0.358 (t_w ρ_w)^⅓ (σ/40)^(1/6) S^⅔ / (ρ_p^⅓ V^⅓ cos^⅓ θ). Check both at
    σ = 57 ksi, given in MPa. Form as stated in the docstring (constants read second-hand,
    see module)."""
    m_b, s, t_w, rho_w, density, sigma_ksi = 0.4, 15.0, 0.16, 2.84, 2.8, 57.0
    low_v, high_v = 1.5, 12.0
    got = christiansen_1995_multi_shock(np.array([low_v, high_v]), 0.0, density, m_b, s, t_w,
                                        rho_w, sigma_ksi * 6.894757)
    low = 2.0 * (t_w * (sigma_ksi / 40) ** 0.5 + 0.37 * m_b) / (density**0.5 * low_v ** (2 / 3))
    high = (0.358 * (t_w * rho_w) ** (1 / 3) * (sigma_ksi / 40) ** (1 / 6) * s ** (2 / 3)
            / (density ** (1 / 3) * high_v ** (1 / 3)))
    np.testing.assert_allclose(got, [low, high], rtol=1e-7)


def test_schafer_aluminium_yield_strength_in_mpa_by_printed_form():
    """Printed low-speed form in ksi: [((t_w + t_i)(σ/40)^½/1.4 + t_o') / (0.6 cos^δ θ ρ_p^½
    V^⅔)]^(18/19), with t_o' = t_o (no blanket) and δ = 4/3 at 0°. Form as stated in the
    docstring (constants read second-hand, see module), with its t_w^½ → t_w deviation."""
    t_o, s1, t_i, rho_i, gap, t_w, density, velocity = 0.041, 3.5, 0.041, 2.7, 30.0, 0.15, 2.8, 2.0
    sigma_ksi = 36.0
    got = schafer_2008_aluminium(velocity, 0.0, density, t_o, s1, t_i, rho_i, gap, t_w,
                                 sigma_ksi * 6.894757)
    expected = (((t_w + t_i) * (sigma_ksi / 40) ** 0.5 / 1.4 + t_o)
                / (0.6 * density**0.5 * velocity ** (2 / 3))) ** (18 / 19)
    assert float(got) == pytest.approx(expected, rel=1e-7)


def test_ksi_in_mpa_constant():
    """1 ksi = 6.894757 MPa (common practice, no source: the conversion factor)."""
    assert KSI_IN_MPA == pytest.approx(6.894757, rel=1e-7)


@pytest.mark.parametrize("name, parameter, exponent", [
    ("christiansen_1995_multi_shock", "standoff", 2 / 3),
    ("ryan_2008_aluminium", "core_thickness", 1 / 3),
    ("ryan_2008_aluminium", "rear_sheet_thickness", 2 / 3),
    ("ryan_2008_cfrp", "core_thickness", 1 / 3),
    ("christiansen_2009_mli", "wall_thickness", 2 / 3),
])
def test_lengths_are_centimetres(name, parameter, exponent):
    """A length given in metres instead of centimetres is 100 times too small. At high speed
    d_c then changes by 100^-exponent, the power the docstring prints for that length
    (S^⅔, core^⅓, t_r^⅔, t_w^⅔). Form as stated in the docstring (constants read
    second-hand, see module)."""
    ratio = _ratio(name, _HIGH, 0.0, parameter, 0.01)
    assert ratio == pytest.approx(100.0 ** (-exponent), rel=1e-12)
