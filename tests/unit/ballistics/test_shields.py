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
    sandwich_summed_face_sheets,
)
from pockmark.constants import KSI_IN_MPA
from pockmark.errors import InputError, ModelRangeWarning

# The example sandwich-Whipple definition warns on purpose (known non-conservative); the tests
# that are about the warning check it with pytest.warns, which sees it regardless.
pytestmark = pytest.mark.filterwarnings("ignore::pockmark.errors.ModelRangeWarning")

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
STUFFED = {
    "equation": "christiansen_1995",
    "bumper_thickness": 0.2,
    "bumper_material": "Al6061-T6",
    "nextel_layers": 6,
    "nextel_material": "Nextel-AF62",
    "kevlar_layers": 6,
    "kevlar_material": "Kevlar-KM2",
    "standoff": 11.4,
    "rear_wall_thickness": 0.48,
    "rear_wall_material": "Al2219-T87",
}
CFRP_PANEL = {
    "equation": "sandwich_summed_face_sheets",
    "front_sheet_thickness": 0.04,
    "front_sheet_material": "CFRP",
    "core_thickness": 2.5,
    "core_density": 0.05,
    "rear_sheet_thickness": 0.04,
    "rear_sheet_material": "CFRP",
    "equivalent_material": "Al6061-T6",
}
AL_PANEL_WHIPPLE = {
    "equation": "sandwich_whipple_approximation",
    "front_sheet_thickness": 0.04,
    "front_sheet_material": "Al6061-T6",
    "core_thickness": 2.54,
    "core_density": 0.05,
    "rear_sheet_thickness": 0.04,
    "rear_sheet_material": "Al6061-T6",
}
TABLE = {
    "equation": "tabulated_diameter",
    "speeds": [2, 7, 15],
    "angles": [0, 45, 75],
    "diameters": [[0.2, 0.3, 0.6], [0.3, 0.35, 0.5], [0.25, 0.3, 0.45]],
}
MULTI_SHOCK = {
    "equation": "christiansen_1995_multi_shock",
    "bumper_layers": 4,
    "bumper_material": "Nextel-AF62",
    "standoff": 15.0,
    "rear_wall_thickness": 0.16,
    "rear_wall_material": "Al2219-T87",
}
AL_HONEYCOMB = {
    "equation": "ryan_2008_aluminium",
    "front_sheet_thickness": 0.04,
    "front_sheet_material": "Al2024-T3",
    "core_thickness": 2.54,
    "core_density": 0.05,
    "rear_sheet_thickness": 0.04,
    "rear_sheet_material": "Al2024-T3",
}
CFRP_HONEYCOMB = {**CFRP_PANEL, "equation": "ryan_2008_cfrp", "mli_areal_density": 0.05}
del CFRP_HONEYCOMB["equivalent_material"]
TRIPLE_WALL = {
    "equation": "schafer_2008_aluminium",
    "outer_sheet_thickness": 0.041,
    "outer_sheet_material": "Al2024-T3",
    "core_thickness": 3.5,
    "core_density": 0.05,
    "inner_sheet_thickness": 0.041,
    "inner_sheet_material": "Al2024-T3",
    "gap": 30.0,
    "wall_thickness": 0.15,
    "wall_material": "Al6061-T6",
}
CFRP_TRIPLE_WALL = {**TRIPLE_WALL, "equation": "schafer_2008_cfrp",
                    "outer_sheet_material": "CFRP", "inner_sheet_material": "CFRP"}
BLANKET = {"equation": "christiansen_2009_mli", "wall_thickness": 0.1,
           "wall_material": "Al6061-T6"}
# Default obliquity caps: the triple-wall source evaluates larger angles at 65° (read
# second-hand); multi-shock and blanket shields stop short of the angles where their regime
# limits cross (75°, common practice, no source).
DEFAULT_CAPS = {
    "schafer_2008_aluminium": 65.0,
    "schafer_2008_cfrp": 65.0,
    "christiansen_1995_multi_shock": 75.0,
    "christiansen_2009_mli": 75.0,
}
EXAMPLES = {
    "christiansen_1995_multi_shock": MULTI_SHOCK,
    "ryan_2008_aluminium": AL_HONEYCOMB,
    "ryan_2008_cfrp": CFRP_HONEYCOMB,
    "schafer_2008_aluminium": TRIPLE_WALL,
    "schafer_2008_cfrp": CFRP_TRIPLE_WALL,
    "christiansen_2009_mli": BLANKET,
    "cour_palais_1987": SINGLE,
    "christiansen_1993": WHIPPLE,
    "christiansen_1995": STUFFED,
    "sandwich_summed_face_sheets": CFRP_PANEL,
    "sandwich_whipple_approximation": AL_PANEL_WHIPPLE,
    "tabulated_diameter": TABLE,
    "threshold_diameter": THRESHOLD,
}


# --- materials ----------------------------------------------------------------------------------


METALS = sorted(name for name, material in MATERIALS.items() if material.kind == "metal")


def test_material_catalogue():
    assert set(METALS) == {"Al6061-T6", "Al2219-T87", "Al2024-T3", "Al7075-T6", "Ti-6Al-4V"}
    al = get_material("Al6061-T6")
    assert (al.density, al.brinell_hardness, al.yield_strength, al.sound_speed) == (
        2.70, 95.0, 276.0, 5.05,
    )
    for name, material in MATERIALS.items():
        assert material.name == name
        assert "from memory" in material.source
    for name in METALS:
        material = MATERIALS[name]
        assert material.ultimate_strength > material.yield_strength > 0
        assert material.layer_areal_density is None


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
    st.floats(0.01, 1.0), st.sampled_from(METALS),
    st.floats(0.05, 2.0), st.sampled_from(METALS),
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
    valid = (
        "valid keys for christiansen_1993: angle_cap, bumper_density, bumper_material, "
        "bumper_thickness"
    )
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


@pytest.mark.parametrize("name", sorted(EQUATIONS))
def test_shield_parameters_match_signature(name):
    """Every example definition resolves to exactly the equation's keyword arguments."""
    import inspect

    shield = make_shield("s", EXAMPLES[name])
    accepted = list(inspect.signature(EQUATIONS[name]).parameters)[3:]
    assert set(shield.parameters) == set(accepted)
    direct = EQUATIONS[name](np.array([2.0, 6.0, 11.0]), 20.0, 2.8, **shield.parameters)
    np.testing.assert_array_equal(shield.critical_diameter([2.0, 6.0, 11.0], 20.0, 2.8), direct)


def test_every_equation_has_an_example_definition():
    assert set(EXAMPLES) == set(EQUATIONS)


# --- stuffed Whipple ------------------------------------------------------------------------


def test_stuffed_whipple_from_layers():
    shield = make_shield("module_wall", STUFFED)
    # mb = 0.2 × 2.70 (bumper) + 6 × 0.1 (Nextel AF62) + 6 × 0.025 (Kevlar KM2) [g cm⁻²]
    assert shield.parameters == {
        "front_areal_density": pytest.approx(0.54 + 0.6 + 0.15, rel=1e-12),
        "standoff": 11.4,
        "rear_wall_thickness": 0.48,
        "rear_wall_density": 2.84,
        "rear_wall_yield_strength": 393.0,
    }
    # + rear wall 0.48 × 2.84 = 1.3632 g cm⁻²; × 10 → kg m⁻²
    assert shield.areal_density == pytest.approx(10 * (1.29 + 1.3632), rel=1e-12)


def test_stuffed_whipple_from_blanket_areal_density():
    definition = {k: v for k, v in STUFFED.items() if not k.startswith(("nextel", "kevlar"))}
    definition["blanket_areal_density"] = 0.75
    shield = make_shield("w", definition)
    assert shield.parameters["front_areal_density"] == pytest.approx(0.54 + 0.75, rel=1e-12)


def test_stuffed_whipple_explicit_layer_areal_density_overrides_material():
    shield = make_shield("w", {**STUFFED, "nextel_layer_areal_density": 0.05})
    assert shield.parameters["front_areal_density"] == pytest.approx(0.54 + 0.3 + 0.15)


def test_stuffed_whipple_user_fabric():
    materials = {"Nextel-AF99": {"density": 2.7, "layer_areal_density": 0.2}}
    shield = make_shield("w", {**STUFFED, "nextel_material": "Nextel-AF99"}, materials)
    assert shield.parameters["front_areal_density"] == pytest.approx(0.54 + 1.2 + 0.15)


@pytest.mark.parametrize(
    "change, needle",
    [
        ({"blanket_areal_density": 0.5}, "either as 'blanket_areal_density' or as"),
        ({"nextel_layers": 0, "kevlar_layers": 0}, "needs a fabric blanket.*christiansen_1993"),
        ({"nextel_material": None}, "nextel_layers is 6 but.*'nextel_material'"),
        ({"nextel_layers": 2.5}, "'nextel_layers' must be a whole number"),
        ({"nextel_layers": -1}, "'nextel_layers' must be a whole number"),
        ({"nextel_material": "Al6061-T6"}, "material 'Al6061-T6' \\(metal.*no layer_areal_density"),
        ({"rear_wall_material": "CFRP"}, "material 'CFRP' \\(composite.*rear_wall_yield_strength"),
    ],
)
def test_stuffed_whipple_errors(change, needle):
    definition = {**STUFFED, **change}
    definition = {k: v for k, v in definition.items() if v is not None}
    message = _error("w", definition)
    assert message.startswith("shield 'w': ")
    import re
    assert re.search(needle, message), message


# --- MLI allowance ----------------------------------------------------------------------------


def test_mli_ignored_by_default_but_counted_in_mass():
    plain = make_shield("w", WHIPPLE)
    with_mli = make_shield("w", {**WHIPPLE, "mli_areal_density": 0.05})
    assert with_mli.parameters == plain.parameters
    assert with_mli.notes == ()
    # 0.05 g cm⁻² = 0.5 kg m⁻²
    assert with_mli.areal_density == pytest.approx(plain.areal_density + 0.5, rel=1e-12)


def test_mli_added_to_whipple_bumper_warns():
    plain = make_shield("w", WHIPPLE)
    with pytest.warns(ModelRangeWarning, match="practice, not a fitted equation"):
        shield = make_shield(
            "w", {**WHIPPLE, "mli_areal_density": 0.05, "mli_treatment": "add_to_bumper"}
        )
    # as bumper-material (2.70 g cm⁻³) thickness
    assert shield.parameters["bumper_thickness"] == pytest.approx(0.127 + 0.05 / 2.70)
    assert shield.areal_density == pytest.approx(plain.areal_density + 0.5, rel=1e-12)
    assert len(shield.notes) == 1 and "add_to_bumper" in shield.notes[0]
    low = 2.0  # the bumper term acts in the ballistic regime: a stronger shield
    assert shield.critical_diameter(low, 0.0, 2.8) > plain.critical_diameter(low, 0.0, 2.8)


def test_mli_added_to_stuffed_whipple_front_areal_density():
    with pytest.warns(ModelRangeWarning):
        shield = make_shield(
            "w", {**STUFFED, "mli_areal_density": 0.05, "mli_treatment": "add_to_bumper"}
        )
    assert shield.parameters["front_areal_density"] == pytest.approx(1.29 + 0.05, rel=1e-12)


@pytest.mark.parametrize(
    "change, needle",
    [
        ({"mli_treatment": "add_to_bumper"}, "'mli_areal_density' is not given"),
        ({"mli_treatment": "stack"}, "unknown mli_treatment 'stack'.*ignore, add_to_bumper"),
        ({"mli_areal_density": -0.1}, "'mli_areal_density' must be ≥ 0"),
    ],
)
def test_mli_errors(change, needle):
    import re
    assert re.search(needle, _error("w", {**WHIPPLE, **change}))


# --- sandwich panels -----------------------------------------------------------------------------


def test_cfrp_panel_bound():
    shield = make_shield("panel", CFRP_PANEL)
    areal_sheets = 2 * 0.04 * 1.60
    assert shield.parameters == {
        "face_sheets_areal_density": pytest.approx(areal_sheets, rel=1e-12),
        "wall_density": 2.70,
        "brinell_hardness": 95.0,
        "sound_speed": 5.05,
        "failure_coefficient": 1.8,
    }
    # sheets + core 2.5 cm × 0.05 g cm⁻³, × 10 → kg m⁻²
    assert shield.areal_density == pytest.approx(10 * (areal_sheets + 0.125), rel=1e-12)


def test_cfrp_panel_needs_an_equivalent_metal():
    definition = {k: v for k, v in CFRP_PANEL.items() if k != "equivalent_material"}
    message = _error("panel", definition)
    assert "missing key 'equivalent_density'" in message and "'equivalent_material'" in message


def test_aluminium_panel_bound_defaults_to_rear_sheet_metal():
    definition = {
        **CFRP_PANEL, "front_sheet_material": "Al2024-T3", "rear_sheet_material": "Al2024-T3",
    }
    del definition["equivalent_material"]
    shield = make_shield("panel", definition)
    assert shield.parameters["wall_density"] == 2.78
    assert shield.parameters["brinell_hardness"] == 120.0
    # exactly the single wall of the summed thickness
    np.testing.assert_allclose(
        shield.critical_diameter([3.0, 7.0], 0.0, 2.8),
        cour_palais_1987([3.0, 7.0], 0.0, 2.8, 0.08, 2.78, 120.0, 5.13),
        rtol=1e-14,
    )


def test_panel_whipple_approximation_warns_non_conservative():
    with pytest.warns(ModelRangeWarning, match="NON-conservative"):
        shield = make_shield("panel", AL_PANEL_WHIPPLE)
    assert "non-conservative" in shield.notes[0].lower()
    assert shield.parameters["rear_sheet_yield_strength"] == 276.0
    assert shield.areal_density == pytest.approx(10 * (0.08 * 2.70 + 2.54 * 0.05), rel=1e-12)


def test_panel_whipple_approximation_cfrp_rear_sheet_needs_yield_strength():
    definition = {**AL_PANEL_WHIPPLE, "rear_sheet_material": "CFRP"}
    message = _error("panel", definition)
    assert "material 'CFRP'" in message and "'rear_sheet_yield_strength'" in message


# --- tabulated and threshold ----------------------------------------------------------------


def test_tabulated_shield():
    shield = make_shield("box", {**TABLE, "areal_density": 12.5})
    assert shield.parameters["speeds"] == (2.0, 7.0, 15.0)
    assert shield.parameters["diameters"][1] == (0.3, 0.35, 0.5)
    assert shield.areal_density == pytest.approx(12.5, rel=1e-12)
    hash(shield)
    np.testing.assert_array_equal(shield.critical_diameter([7.0, 7.0], [45.0, 0.0], 2.8),
                                  [0.35, 0.3])


@pytest.mark.parametrize(
    "change, needle",
    [
        ({"speeds": [2, 7]}, "shield 'box': diameters must have shape"),
        ({"angles": [0, 45, 95]}, r"shield 'box': angles must be in \[0, 90\)"),
        ({"speeds": "fast"}, "key 'speeds' must be a list of numbers"),
        ({"diameters": [0.2, 0.3]}, "key 'diameters' must be a list of rows"),
        ({"speeds": [2, 7, 7]}, "speeds must be strictly increasing"),
    ],
)
def test_tabulated_shield_errors(change, needle):
    import re
    assert re.search(needle, _error("box", {**TABLE, **change}))


def test_threshold_areal_density_key():
    assert make_shield("count", {**THRESHOLD, "areal_density": 3.0}).areal_density == 3.0


# --- unit conversions ---------------------------------------------------------------------------


def test_areal_density_g_cm2_to_kg_m2():
    """1 g cm⁻² = 10⁻³ kg / 10⁻⁴ m² = 10 kg m⁻²: a 1 cm plate of 1 g cm⁻³ is 10 kg m⁻²."""
    definition = {**SINGLE, "wall_thickness": 1.0, "wall_density": 1.0}
    del definition["wall_material"]
    definition.update(brinell_hardness=95.0, sound_speed=5.1)
    assert make_shield("p", definition).areal_density == pytest.approx(10.0, rel=1e-15)


def test_yield_strength_from_material_is_mpa():
    """Al 2219-T87 yield 393 MPa = 57.0 ksi enters the Whipple equation as 57 ksi."""
    assert MATERIALS["Al2219-T87"].yield_strength / KSI_IN_MPA == pytest.approx(57.0, abs=0.05)
    shield = make_shield("w", WHIPPLE)
    np.testing.assert_allclose(
        shield.critical_diameter(2.0, 0.0, 2.8),
        christiansen_1993(2.0, 0.0, 2.8, 0.127, 2.70, 10.0, 0.3175, 57.0 * KSI_IN_MPA),
        rtol=2e-3,
    )


# --- obliquity cap --------------------------------------------------------------------------


@pytest.mark.parametrize("name", sorted(EQUATIONS))
def test_no_cap_by_default(name):
    shield = make_shield("s", EXAMPLES[name])
    if name in DEFAULT_CAPS:
        assert shield.angle_cap == DEFAULT_CAPS[name]
        return
    assert shield.angle_cap is None
    angles = np.array([10.0, 70.0, 85.0])
    np.testing.assert_array_equal(
        shield.critical_diameter(9.0, angles, 2.8),
        EQUATIONS[name](9.0, angles, 2.8, **shield.parameters),
    )


@pytest.mark.parametrize("name", sorted(EQUATIONS))
def test_angles_above_the_cap_are_evaluated_at_the_cap(name):
    shield = make_shield("s", {**EXAMPLES[name], "angle_cap": 65})
    assert shield.angle_cap == 65.0
    speeds = np.array([[2.0], [6.0], [11.0]])
    angles = np.array([0.0, 30.0, 65.0, 70.0, 89.9, 90.0, 120.0])
    got = shield.critical_diameter(speeds, angles, 2.8)
    function = EQUATIONS[name]
    np.testing.assert_array_equal(
        got[:, :3], function(speeds, angles[:3], 2.8, **shield.parameters)
    )
    at_cap = function(speeds, 65.0, 2.8, **shield.parameters)
    # Equal up to rounding: a power of a 0-d array and of an array may differ by an ulp.
    np.testing.assert_allclose(got[:, 3:5], np.broadcast_to(at_cap, (3, 2)), rtol=1e-14)
    assert np.all(np.isposinf(got[:, 5:]))


def test_cap_makes_grazing_values_continuous_and_bounded():
    shield = make_shield("s", {**WHIPPLE, "angle_cap": 65.0})
    below, above = shield.critical_diameter(2.0, [65.0 - 1e-9, 65.0 + 1e-9], 2.8)
    assert above == pytest.approx(below, rel=1e-8)
    uncapped = make_shield("s", WHIPPLE).critical_diameter(2.0, 89.0, 2.8)
    assert shield.critical_diameter(2.0, 89.0, 2.8) < uncapped


@pytest.mark.parametrize("cap", [0, 90, 95.0, -5, "65", True, math.nan])
def test_bad_angle_cap(cap):
    message = _error("s", {**WHIPPLE, "angle_cap": cap})
    assert "'angle_cap' must be a number in (0, 90)" in message


# --- validity ranges and out_of_range ------------------------------------------------------


def test_whipple_out_of_range_speed():
    shield = make_shield("w", WHIPPLE)
    speeds = np.array([0.0, -1.0, 3.0, 8.0, 8.01, 15.0, np.nan, 12.0])
    angles = np.array([0.0, 0.0, 0.0, 10.0, 10.0, 45.0, 0.0, 90.0])
    np.testing.assert_array_equal(
        shield.out_of_range(speeds, angles, 2.8),
        [False, False, False, False, True, True, False, False],
    )
    assert "impact_velocity ≤ 8 km s⁻¹" in shield.validity and "from memory" in shield.validity


def test_out_of_range_broadcasts():
    shield = make_shield("w", STUFFED)
    mask = shield.out_of_range(
        np.array([[5.0], [10.0]]), np.array([0.0, 60.0, 70.0]), [[[1.0]], [[2.8]]]
    )
    assert mask.shape == (2, 2, 3) and mask.dtype == bool
    np.testing.assert_array_equal(mask[0], [[False, False, True], [True, True, True]])


def test_stuffed_whipple_angle_range_counts_capped_impacts():
    """Capping evaluates at 65° but the impact itself is still outside the tested range."""
    shield = make_shield("w", {**STUFFED, "angle_cap": 65.0})
    np.testing.assert_array_equal(
        shield.out_of_range(7.0, [30.0, 65.0, 66.0, 89.0], 2.8), [False, False, True, True]
    )
    assert "impact_angle in [0, 65]°" in shield.validity


def test_tabulated_out_of_range_is_the_table_extent():
    shield = make_shield("box", TABLE)
    np.testing.assert_array_equal(
        shield.out_of_range([1.0, 2.0, 15.0, 16.0, 7.0, 7.0], [0, 0, 75, 0, 75.5, 80], 2.8),
        [True, False, False, True, True, True],
    )
    assert "impact_velocity in [2, 15] km s⁻¹" in shield.validity
    assert "impact_angle in [0, 75]°" in shield.validity


def test_threshold_never_out_of_range():
    shield = make_shield("count", THRESHOLD)
    assert not shield.out_of_range([0.1, 50.0], [0.0, 89.0], 2.8).any()
    assert shield.validity == "no stated range"


def test_out_of_range_rejects_impossible_conditions():
    with pytest.raises(InputError, match="impact_angle"):
        make_shield("w", WHIPPLE).out_of_range(7.0, -3.0, 2.8)


@pytest.mark.parametrize("name", sorted(EQUATIONS))
def test_out_of_range_shape_for_every_equation(name):
    shield = make_shield("s", EXAMPLES[name])
    mask = shield.out_of_range(np.linspace(0.5, 20, 7)[:, None], [0.0, 45.0, 80.0], 1.0)
    assert mask.shape == (7, 3) and mask.dtype == bool


# --- regime boundaries ------------------------------------------------------------------------


def test_regime_boundaries():
    whipple = make_shield("w", WHIPPLE)
    assert [s for _, s in whipple.regime_boundaries(0.0)] == pytest.approx([3.0, 7.0])
    assert [s for _, s in whipple.regime_boundaries(60.0)] == pytest.approx([6.0, 14.0])
    stuffed = make_shield("w", STUFFED)
    cos = math.cos(math.radians(45.0))
    assert [s for _, s in stuffed.regime_boundaries(45.0)] == pytest.approx(
        [2.6 / cos**0.5, 6.5 / cos**0.75]
    )
    capped = make_shield("w", {**WHIPPLE, "angle_cap": 60.0})
    assert capped.regime_boundaries(80.0) == whipple.regime_boundaries(60.0)
    assert make_shield("p", SINGLE).regime_boundaries(0.0) == ()
    assert whipple.regime_boundaries(90.0) == ()


# --- user materials through make_shield ----------------------------------------------------------


def test_user_material_in_definition():
    materials = {"Al-jsc": {"density": 2.713, "brinell_hardness": 95.0, "sound_speed": 5.1}}
    shield = make_shield("p", {**SINGLE, "wall_material": "Al-jsc"}, materials=materials)
    assert shield.parameters["wall_density"] == 2.713
    assert shield.parameters["sound_speed"] == 5.1


def test_user_material_errors_name_shield_and_key():
    materials = {"Al-jsc": {"density": -1.0}}
    message = _error_with("p", {**SINGLE, "wall_material": "Al-jsc"}, materials)
    assert message.startswith("shield 'p': key 'wall_material': material 'Al-jsc'")
    clash = _error_with("p", SINGLE, {"Al6061-T6": {"density": 2.713}})
    assert "already in the catalogue" in clash


def test_unknown_material_lists_user_materials():
    message = _error_with("p", {**SINGLE, "wall_material": "Al-xx"}, {"Al-jsc": {"density": 2.7}})
    assert "Al-jsc" in message and "Al6061-T6" in message


def test_unused_broken_user_material_is_not_checked_here():
    make_shield("p", SINGLE, materials={"broken": {"density": "heavy"}})


def test_materials_must_be_a_table():
    message = _error_with("p", SINGLE, [("Al-jsc", {"density": 2.7})])
    assert "materials must be a table" in message


def _error_with(tag, definition, materials):
    with pytest.raises(InputError) as info:
        make_shield(tag, definition, materials)
    message = str(info.value)
    assert "\n" not in message
    return message


# --- describe ---------------------------------------------------------------------------------


def test_describe_equations_status_validity_and_cap():
    descriptions = {d["name"]: d for d in describe_equations()}
    assert descriptions["sandwich_whipple_approximation"]["status"].endswith("non-conservative")
    assert "practice" in descriptions["sandwich_summed_face_sheets"]["status"]
    assert "from memory" in descriptions["christiansen_1995"]["status"]
    for name, description in descriptions.items():
        assert description["default_angle_cap"] == DEFAULT_CAPS.get(name)
        assert description["validity"]
        assert "angle_cap" in description["keys"]
    assert descriptions["christiansen_1993"]["options"][0]["name"] == "mli_treatment"


def test_sandwich_bound_function_reused():
    """The shield calls the registered function, not a copy."""
    shield = make_shield("panel", CFRP_PANEL)
    np.testing.assert_array_equal(
        shield.critical_diameter(7.0, 0.0, 2.8),
        sandwich_summed_face_sheets(7.0, 0.0, 2.8, **shield.parameters),
    )
