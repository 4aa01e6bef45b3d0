"""Unit tests of shield definitions (``pockmark.ballistics.shields``) and the material table."""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from pockmark.ballistics import (
    EQUATIONS,
    FAILURE_COEFFICIENTS,
    MATERIALS,
    Shield,
    christiansen_1993,
    cour_palais_1987,
    describe_equations,
    get_material,
    make_shield,
)
from pockmark.errors import InputError

WHIPPLE = {
    "equation": "christiansen_1993",
    "bumper_thickness": 0.127,
    "bumper_material": "Al6061-T6",
    "standoff": 10.0,
    "rear_wall_thickness": 0.3175,
    "rear_wall_material": "Al2219-T87",
}
SINGLE = {
    "equation": "cour_palais_1987",
    "wall_thickness": 0.2,
    "wall_material": "Al6061-T6",
    "failure": "detached_spall",
}
THRESHOLD = {"equation": "threshold_diameter", "diameter": 0.1}


# --- materials ----------------------------------------------------------------------------------


def test_material_catalogue():
    assert set(MATERIALS) == {"Al6061-T6", "Al2219-T87", "Al2024-T3", "Al7075-T6", "Ti-6Al-4V"}
    al = get_material("Al6061-T6")
    assert (al.density, al.brinell_hardness, al.yield_strength, al.sound_speed) == (
        2.70, 95.0, 276.0, 5.05,
    )
    for name, material in MATERIALS.items():
        assert material.name == name
        assert "from memory" in material.source
        assert material.ultimate_strength > material.yield_strength > 0


def test_material_is_frozen():
    with pytest.raises(AttributeError):
        MATERIALS["Al6061-T6"].density = 2.8


@pytest.mark.parametrize("name", ["al6061-t6", "Steel", 6061])
def test_unknown_material_lists_known_names(name):
    with pytest.raises(InputError) as info:
        get_material(name)
    assert repr(name) in str(info.value)
    for known in MATERIALS:
        assert known in str(info.value)


# --- resolution ---------------------------------------------------------------------------------


def test_whipple_from_materials():
    shield = make_shield("bus_wall", WHIPPLE)
    assert isinstance(shield, Shield)
    assert shield.tag == "bus_wall" and shield.equation == "christiansen_1993"
    assert shield.parameters == {
        "bumper_thickness": 0.127,
        "bumper_density": 2.70,
        "standoff": 10.0,
        "rear_wall_thickness": 0.3175,
        "rear_wall_yield_strength": 393.0,
    }
    velocity = np.array([2.0, 5.0, 8.0])
    np.testing.assert_array_equal(
        shield.critical_diameter(velocity, 30.0, 2.8),
        christiansen_1993(velocity, 30.0, 2.8, **shield.parameters),
    )


def test_single_wall_from_material_with_named_failure():
    shield = make_shield("plate", SINGLE)
    assert shield.parameters == {
        "wall_thickness": 0.2,
        "wall_density": 2.70,
        "brinell_hardness": 95.0,
        "sound_speed": 5.05,
        "failure_coefficient": FAILURE_COEFFICIENTS["detached_spall"],
    }
    np.testing.assert_array_equal(
        shield.critical_diameter(7.0, 0.0, 2.8),
        cour_palais_1987(7.0, 0.0, 2.8, **shield.parameters),
    )


def test_single_wall_defaults_to_perforation():
    definition = {k: v for k, v in SINGLE.items() if k != "failure"}
    assert make_shield("plate", definition).parameters["failure_coefficient"] == 1.8


def test_explicit_numbers_override_material():
    definition = {**SINGLE, "wall_density": 2.713, "sound_speed": 5.1, "failure_coefficient": 2.0}
    del definition["failure"]
    parameters = make_shield("plate", definition).parameters
    assert parameters["wall_density"] == 2.713
    assert parameters["sound_speed"] == 5.1
    assert parameters["brinell_hardness"] == 95.0  # still from the material
    assert parameters["failure_coefficient"] == 2.0


def test_explicit_numbers_replace_material():
    definition = {
        "equation": "christiansen_1993",
        "bumper_thickness": 0.1,
        "bumper_density": 2.713,
        "standoff": 12,  # TOML integers are accepted
        "rear_wall_thickness": 0.3,
        "rear_wall_yield_strength": 276.0,
        "rear_wall_density": 2.8,
    }
    shield = make_shield("w", definition)
    assert shield.parameters["standoff"] == 12.0
    assert isinstance(shield.parameters["standoff"], float)
    assert shield.areal_density == pytest.approx((0.1 * 2.713 + 0.3 * 2.8) * 10.0, rel=1e-12)


def test_threshold_shield():
    shield = make_shield("count", THRESHOLD)
    assert shield.parameters == {"diameter": 0.1}
    assert shield.areal_density == 0.0
    np.testing.assert_array_equal(shield.critical_diameter([3.0, 12.0], 10.0, 1.0), [0.1, 0.1])


def test_definition_is_not_mutated():
    definition = dict(WHIPPLE)
    make_shield("bus_wall", definition)
    assert definition == WHIPPLE


def test_shield_is_hashable_and_frozen():
    shield = make_shield("count", THRESHOLD)
    hash(shield)
    with pytest.raises(AttributeError):
        shield.tag = "other"


# --- areal density ------------------------------------------------------------------------------


@settings(max_examples=50, deadline=None)
@given(
    st.floats(0.01, 1.0), st.sampled_from(sorted(MATERIALS)),
    st.floats(0.05, 2.0), st.sampled_from(sorted(MATERIALS)),
)
def test_whipple_areal_density(bumper_thickness, bumper_material, wall_thickness, wall_material):
    """(tb·ρb + tw·ρw) [cm · g cm⁻³ = g cm⁻²] × 10 = kg m⁻²."""
    definition = {
        **WHIPPLE,
        "bumper_thickness": bumper_thickness,
        "bumper_material": bumper_material,
        "rear_wall_thickness": wall_thickness,
        "rear_wall_material": wall_material,
    }
    expected = 10.0 * (
        bumper_thickness * MATERIALS[bumper_material].density
        + wall_thickness * MATERIALS[wall_material].density
    )
    assert make_shield("w", definition).areal_density == pytest.approx(expected, rel=1e-12)


def test_single_wall_areal_density():
    # 0.2 cm × 2.70 g cm⁻³ = 0.54 g cm⁻² = 5.4 kg m⁻²
    assert make_shield("plate", SINGLE).areal_density == pytest.approx(5.4, rel=1e-12)


# --- errors -------------------------------------------------------------------------------------


def _error(tag, definition):
    with pytest.raises(InputError) as info:
        make_shield(tag, definition)
    message = str(info.value)
    assert "\n" not in message
    return message


def test_unknown_key_names_tag_key_and_valid_keys():
    definition = {**WHIPPLE, "standof": 10.0}
    del definition["standoff"]
    message = _error("bus_wall", definition)
    assert message.startswith("shield 'bus_wall': unknown key 'standof'")
    assert "did you mean 'standoff'" in message
    valid = "valid keys for christiansen_1993: bumper_density, bumper_material, bumper_thickness"
    assert valid in message


def test_key_of_another_equation_is_unknown():
    message = _error("plate", {**SINGLE, "standoff": 10.0})
    assert "unknown key 'standoff'" in message and "cour_palais_1987" in message


@pytest.mark.parametrize(
    "definition, key",
    [
        ({k: v for k, v in WHIPPLE.items() if k != "standoff"}, "standoff"),
        ({k: v for k, v in WHIPPLE.items() if k != "bumper_material"}, "bumper_density"),
        (
            {k: v for k, v in WHIPPLE.items() if k != "rear_wall_material"},
            "rear_wall_yield_strength",
        ),
        (
            {**{k: v for k, v in WHIPPLE.items() if k != "rear_wall_material"},
             "rear_wall_yield_strength": 276.0},
            "rear_wall_density",
        ),
        ({k: v for k, v in SINGLE.items() if k != "wall_thickness"}, "wall_thickness"),
        ({k: v for k, v in SINGLE.items() if k != "wall_material"}, "wall_density"),
        ({"equation": "threshold_diameter"}, "diameter"),
    ],
)
def test_missing_key(definition, key):
    message = _error("s1", definition)
    assert message.startswith(f"shield 's1': missing key {key!r}")


def test_missing_key_suggests_material():
    definition = {k: v for k, v in SINGLE.items() if k != "wall_material"}
    message = _error("s1", definition)
    assert "'wall_material'" in message and "Al6061-T6" in message


def test_missing_equation_lists_choices():
    message = _error("s1", {"diameter": 0.1})
    assert message.startswith("shield 's1': missing key 'equation'")
    for name in EQUATIONS:
        assert name in message


@pytest.mark.parametrize("equation", ["whipple", "Christiansen_1993", 1993, None])
def test_unknown_equation(equation):
    message = _error("s1", {**THRESHOLD, "equation": equation})
    assert f"unknown equation {equation!r}" in message and "'equation'" in message
    for name in EQUATIONS:
        assert name in message


@pytest.mark.parametrize("key", ["bumper_material", "rear_wall_material"])
@pytest.mark.parametrize("value", ["Al6061", "steel", 6061])
def test_unknown_material(key, value):
    message = _error("bus_wall", {**WHIPPLE, key: value})
    assert message.startswith(f"shield 'bus_wall': key {key!r}")
    assert repr(value) in message and "Al2219-T87" in message


@pytest.mark.parametrize("failure", ["perforate", "spall", 1.8])
def test_unknown_failure(failure):
    message = _error("plate", {**SINGLE, "failure": failure})
    assert "shield 'plate'" in message and "'failure'" in message and repr(failure) in message
    for name in FAILURE_COEFFICIENTS:
        assert name in message


def test_failure_and_coefficient_both_given():
    message = _error("plate", {**SINGLE, "failure_coefficient": 2.2})
    assert "'failure'" in message and "'failure_coefficient'" in message


@pytest.mark.parametrize("value", ["0.127", True, [0.127], None, {"value": 0.127}])
def test_wrong_type(value):
    message = _error("bus_wall", {**WHIPPLE, "bumper_thickness": value})
    assert message.startswith("shield 'bus_wall': key 'bumper_thickness' must be a number [cm]")


@pytest.mark.parametrize("value", [0, 0.0, -0.1, math.inf, math.nan])
@pytest.mark.parametrize("key", ["bumper_thickness", "standoff", "rear_wall_yield_strength"])
def test_non_positive_or_non_finite(key, value):
    message = _error("bus_wall", {**WHIPPLE, key: value})
    assert message.startswith(f"shield 'bus_wall': key {key!r} must be positive and finite")


@pytest.mark.parametrize("tag", ["", None, 3])
def test_bad_tag(tag):
    with pytest.raises(InputError, match="shield tag must be a non-empty string"):
        make_shield(tag, THRESHOLD)


def test_definition_must_be_a_table():
    message = _error("s1", [("equation", "threshold_diameter")])
    assert message.startswith("shield 's1': definition must be a table")


@settings(max_examples=50, deadline=None)
@given(st.text(min_size=1, max_size=20).filter(lambda key: key not in WHIPPLE))
def test_any_unknown_key_is_reported(key):
    if key in {"bumper_density", "rear_wall_yield_strength", "rear_wall_density"}:
        return
    message = _error("bus_wall", {**WHIPPLE, key: 1.0})
    assert f"unknown key {key!r}" in message


# --- describe_equations --------------------------------------------------------------------------


def test_describe_equations_covers_the_registry():
    descriptions = describe_equations()
    assert [d["name"] for d in descriptions] == sorted(EQUATIONS)
    for description in descriptions:
        assert description["summary"] and description["reference"]
        assert "\n" not in description["summary"]
        for parameter in description["parameters"]:
            assert parameter["unit"]
            assert parameter["name"] in description["keys"]


def test_describe_equations_parameters_match_signatures():
    import inspect

    for description in describe_equations():
        function = EQUATIONS[description["name"]]
        accepted = list(inspect.signature(function).parameters)[3:]
        described = [p["name"] for p in description["parameters"]]
        assert set(accepted) <= set(described)
