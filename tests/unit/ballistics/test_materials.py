"""Unit tests of the material catalogue and user materials (``pockmark.ballistics.materials``)."""

import math

import pytest

from pockmark.ballistics import MATERIAL_KEYS, MATERIALS, Material, get_material, make_material
from pockmark.errors import InputError


def test_fabrics_and_composite_in_catalogue():
    fabrics = {name for name, m in MATERIALS.items() if m.kind == "fabric"}
    assert fabrics == {"Nextel-AF62", "Nextel-AF10", "Kevlar-KM2"}
    assert MATERIALS["CFRP"].kind == "composite"
    # values as the shared reference note on ballistic limits gives them (§3), from memory
    assert MATERIALS["Nextel-AF62"].layer_areal_density == 0.1
    assert MATERIALS["Nextel-AF10"].layer_areal_density == 0.03
    assert MATERIALS["Kevlar-KM2"].layer_areal_density == 0.025  # middle of 0.02-0.03
    assert MATERIALS["Kevlar-KM2"].density == 1.44
    assert MATERIALS["Nextel-AF62"].density == 2.7
    assert 1.55 <= MATERIALS["CFRP"].density <= 1.70
    for name in ("Nextel-AF62", "Nextel-AF10", "Kevlar-KM2", "CFRP"):
        material = MATERIALS[name]
        assert material.brinell_hardness is None and material.yield_strength is None
        assert "from memory" in material.source and "confidence" in material.source


def test_make_material_metal():
    material = make_material(
        "Al6061-T6-jsc",
        {"density": 2.713, "brinell_hardness": 95, "yield_strength": 276,
         "ultimate_strength": 310, "sound_speed": 5.1, "source": "test lab sheet"},
    )
    assert material == Material("Al6061-T6-jsc", 2.713, 95.0, 276.0, 310.0, 5.1,
                                "test lab sheet", None, "metal")
    assert isinstance(material.brinell_hardness, float)


@pytest.mark.parametrize(
    "properties, kind",
    [
        ({"density": 1.2, "layer_areal_density": 0.02}, "fabric"),
        ({"density": 1.6}, "composite"),
        ({"density": 1.6, "kind": "fabric", "layer_areal_density": 0.05}, "fabric"),
    ],
)
def test_make_material_kind(properties, kind):
    material = make_material("m", properties)
    assert material.kind == kind
    assert material.source == "user-defined"


def test_make_material_accepts_material_instance():
    material = Material("mine", 2.0, None, None, None, None, "x", 0.05, "fabric")
    assert make_material("mine", material) is material
    with pytest.raises(InputError, match="named 'mine'"):
        make_material("other", material)


@pytest.mark.parametrize(
    "name, properties, needle",
    [
        ("Al6061-T6", {"density": 2.713}, "already in the catalogue.*another name"),
        ("m", {"brinell_hardness": 95}, "missing key 'density'"),
        ("m", {"density": 2.7, "densty": 2.7}, "unknown key 'densty'.*did you mean 'density'"),
        ("m", {"density": 0.0}, r"'density' must be positive and finite \[g cm⁻³\]; got 0"),
        ("m", {"density": math.nan}, "'density' must be positive and finite"),
        ("m", {"density": "2.7"}, "'density' must be a number"),
        ("m", {"density": True}, "'density' must be a number"),
        ("m", {"density": 2.7, "yield_strength": -3}, "'yield_strength' must be positive"),
        ("m", {"density": 2.7, "kind": "ceramic"},
         "unknown kind 'ceramic'.*composite, fabric, metal"),
        ("m", {"density": 2.7, "source": 3}, "'source' must be a string"),
        ("m", [("density", 2.7)], "must be a table of properties"),
        ("", {"density": 2.7}, "non-empty string"),
    ],
)
def test_make_material_errors(name, properties, needle):
    with pytest.raises(InputError, match=needle) as info:
        make_material(name, properties)
    assert "\n" not in str(info.value)


def test_material_keys_have_units():
    assert MATERIAL_KEYS["density"] == "g cm⁻³"
    assert MATERIAL_KEYS["yield_strength"] == "MPa"
    assert MATERIAL_KEYS["layer_areal_density"] == "g cm⁻²"


def test_get_material_prefers_user_materials_and_lists_them():
    mine = make_material("mine", {"density": 1.0})
    assert get_material("mine", {"mine": mine}) is mine
    assert get_material("CFRP", {"mine": mine}) is MATERIALS["CFRP"]
    with pytest.raises(InputError, match="unknown material 'yours'.*mine"):
        get_material("yours", {"mine": mine})
