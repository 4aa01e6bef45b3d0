"""Named wall materials whose properties feed the ballistic-limit equations.

Scope: a small catalogue of the materials that spacecraft walls, bumpers and blankets are
built from, with the properties that the equations in :mod:`pockmark.ballistics` need:
density, Brinell hardness, yield and ultimate strength and sound speed for metals; areal
density per layer for fabrics; density for composites. Shield definitions name a material by
its key; explicit numeric values in a shield definition override the material. Users add
their own materials with :func:`make_material` (a case file's ``[materials.NAME]`` tables).

Contents
--------
Material
    Frozen record of one material's properties in canonical units.
MATERIALS
    The catalogue, keyed by name: aluminium alloys "Al6061-T6", "Al2219-T87", "Al2024-T3",
    "Al7075-T6"; titanium "Ti-6Al-4V"; fabrics "Nextel-AF62", "Nextel-AF10", "Kevlar-KM2";
    composite "CFRP".
MATERIAL_KEYS
    The property names a user material may give, with their units.
make_material
    Validate a user's property table into a :class:`Material`.
get_material
    Look a material up by name (user materials first, then the catalogue), with an error
    that lists the known names.
"""

import difflib
import math
from collections.abc import Mapping
from dataclasses import dataclass

from pockmark.errors import InputError

__all__ = ["Material", "MATERIALS", "MATERIAL_KEYS", "make_material", "get_material"]

_HANDBOOK = "typical handbook values (ASM/MMPDS-typical), from memory"


@dataclass(frozen=True)
class Material:
    """Properties of one wall material in canonical units.

    Properties that a material class does not have (a Brinell hardness for a fabric, a
    per-layer areal density for a plate) are ``None``; an equation that needs one of them
    raises an error naming the material and the key to give instead.

    Parameters
    ----------
    name : str
        Catalogue key, e.g. ``"Al6061-T6"``.
    density : float
        Mass density [g cm⁻³]; for fabrics, the fibre density.
    brinell_hardness : float or None
        Brinell hardness number [HB] (aluminium alloys: 500 kg load, 10 mm ball; titanium
        alloys: 3000 kg load). Metals only.
    yield_strength : float or None
        Tensile yield strength, 0.2 % offset [MPa]. Metals only.
    ultimate_strength : float or None
        Ultimate tensile strength [MPa]. Metals only.
    sound_speed : float or None
        Bar sound speed :math:`\\sqrt{E/\\rho}` [km s⁻¹]; this is the "C" of the
        Cour-Palais single-wall equation. Metals only.
    source : str
        Where the numbers come from, with their provenance ("from memory", "user").
    layer_areal_density : float or None, default None
        Areal density of one layer [g cm⁻²]. Fabrics only.
    kind : str, default "metal"
        ``"metal"``, ``"fabric"`` or ``"composite"``.
    """

    name: str
    density: float
    brinell_hardness: float | None
    yield_strength: float | None
    ultimate_strength: float | None
    sound_speed: float | None
    source: str
    layer_areal_density: float | None = None
    kind: str = "metal"


MATERIALS = {
    "Al6061-T6": Material("Al6061-T6", 2.70, 95.0, 276.0, 310.0, 5.05, _HANDBOOK),
    "Al2219-T87": Material("Al2219-T87", 2.84, 130.0, 393.0, 476.0, 5.07, _HANDBOOK),
    "Al2024-T3": Material("Al2024-T3", 2.78, 120.0, 345.0, 483.0, 5.13, _HANDBOOK),
    "Al7075-T6": Material("Al7075-T6", 2.81, 150.0, 503.0, 572.0, 5.05, _HANDBOOK),
    "Ti-6Al-4V": Material("Ti-6Al-4V", 4.43, 334.0, 880.0, 950.0, 5.07, _HANDBOOK),
    "Nextel-AF62": Material(
        "Nextel-AF62", 2.7, None, None, None, None,
        "Nextel 312 ceramic fabric, style AF62: fibre density 2.7 g cm⁻³ (from memory, medium "
        "confidence); 0.1 g cm⁻² per layer (from memory, low confidence); shared reference "
        "note on ballistic limits, §3",
        layer_areal_density=0.1, kind="fabric",
    ),
    "Nextel-AF10": Material(
        "Nextel-AF10", 2.7, None, None, None, None,
        "Nextel 312 ceramic fabric, style AF10: fibre density 2.7 g cm⁻³ (from memory, medium "
        "confidence); 0.03 g cm⁻² per layer (from memory, low confidence); shared reference "
        "note on ballistic limits, §3",
        layer_areal_density=0.03, kind="fabric",
    ),
    "Kevlar-KM2": Material(
        "Kevlar-KM2", 1.44, None, None, None, None,
        "Kevlar KM2 aramid fabric: fibre density 1.44 g cm⁻³ (from memory, high confidence); "
        "0.025 g cm⁻² per layer, the middle of the 0.02-0.03 g cm⁻² that the shared reference "
        "note on ballistic limits (§3) gives for the usual styles (from memory, low "
        "confidence); give the style's own value when it is known",
        layer_areal_density=0.025, kind="fabric",
    ),
    "CFRP": Material(
        "CFRP", 1.60, None, None, None, None,
        "carbon-fibre laminate (e.g. T300 or M55J in epoxy or cyanate ester): 1.60 g cm⁻³, "
        "inside the 1.55-1.70 g cm⁻³ range of the shared reference note on ballistic limits "
        "(§3; from memory, medium confidence); lay-up dependent, give the laminate's own "
        "density when it is known",
        kind="composite",
    ),
}
"""Catalogue of wall materials, keyed by name.

Metal values are typical handbook values (ASM/MMPDS-typical), recalled from memory and
transcribed from the project's shared reference note on ballistic limits (§3); they are not
design allowables. Each metal's sound speed is the bar speed :math:`\\sqrt{E/\\rho}` computed
from a recalled Young's modulus (68.9, 73.1, 73.1, 71.7 and 113.8 GPa in the order of the
keys) and the listed density.

Fabrics and the composite enter the equations only through their areal density: per layer
for fabrics (``layer_areal_density`` [g cm⁻²]), thickness × ``density`` for the composite.
Their per-layer areal densities are low-confidence recollections; every entry's ``source``
states its provenance.

Notes
-----
- Al 6061-T6 density is 2.70 g cm⁻³ here; ballistic-limit work often uses 2.713 g cm⁻³ and a
  sound speed of about 5.1 km s⁻¹ for aluminium. Give ``wall_density``/``sound_speed``
  explicitly in a shield definition to use those values.
- Other choices of "C" exist (longitudinal plate speed ≈ 6.2–6.4 km s⁻¹, Hugoniot bulk speed
  ≈ 5.1–5.35 km s⁻¹); choosing 6.3 instead of 5.1 raises single-wall critical diameters by
  about 14 %.
- Ti-6Al-4V is annealed; its Brinell number is for a 3000 kg load.
- CFRP has no Brinell hardness or yield strength in the sense of the metallic equations.
"""

MATERIAL_KEYS = {
    "density": "g cm⁻³",
    "brinell_hardness": "HB",
    "yield_strength": "MPa",
    "ultimate_strength": "MPa",
    "sound_speed": "km s⁻¹",
    "layer_areal_density": "g cm⁻²",
}
"""Numeric properties a user material may give, with their canonical units.

``density`` is required; the others are optional. A table may also give ``source`` (a
string; default ``"user-defined"``) and ``kind`` (``"metal"``, ``"fabric"`` or
``"composite"``; by default ``"metal"`` when a Brinell hardness is given, ``"fabric"`` when a
layer areal density is given, otherwise ``"composite"``).
"""

_KINDS = ("composite", "fabric", "metal")


def make_material(name, properties):
    """Validate a user's material table into a :class:`Material`.

    Parameters
    ----------
    name : str
        Name the shield definitions use for it. It must not be a catalogue name, so that a
        catalogue material never changes meaning within a case.
    properties : mapping or Material
        Keys of :data:`MATERIAL_KEYS` with positive, finite numbers in their canonical units,
        plus optional ``source`` and ``kind`` strings. A :class:`Material` is accepted as is
        (its name must equal ``name``).

    Returns
    -------
    Material

    Raises
    ------
    InputError
        If the name clashes with the catalogue, a key is unknown, ``density`` is missing, a
        value is not a positive finite number, or ``kind`` is not a known kind.

    Examples
    --------
    >>> make_material("Al6061-T6-jsc", {"density": 2.713, "brinell_hardness": 95,
    ...     "yield_strength": 276, "ultimate_strength": 310, "sound_speed": 5.1}).kind
    'metal'
    """
    if not isinstance(name, str) or not name:
        raise InputError(f"material name must be a non-empty string; got {name!r}")
    if name in MATERIALS:
        raise InputError(
            f"material {name!r} is already in the catalogue; give the user material another "
            f"name (e.g. {name + '-custom'!r}) and use that name in the shield definitions"
        )
    if isinstance(properties, Material):
        if properties.name != name:
            raise InputError(f"material {name!r}: the Material given is named {properties.name!r}")
        return properties
    if not isinstance(properties, Mapping):
        raise InputError(
            f"material {name!r}: must be a table of properties; got {type(properties).__name__}"
        )
    valid = sorted([*MATERIAL_KEYS, "kind", "source"])
    for key in properties:
        if key not in valid:
            close = difflib.get_close_matches(str(key), valid, n=1)
            hint = f" (did you mean {close[0]!r}?)" if close else ""
            raise InputError(
                f"material {name!r}: unknown key {key!r}{hint}; valid keys: {', '.join(valid)}"
            )
    if "density" not in properties:
        raise InputError(f"material {name!r}: missing key 'density' [g cm⁻³]")
    values = {}
    for key, unit in MATERIAL_KEYS.items():
        if key not in properties:
            values[key] = None
            continue
        value = properties[key]
        if not isinstance(value, (int, float)) or isinstance(value, bool):
            raise InputError(
                f"material {name!r}: key {key!r} must be a number [{unit}]; "
                f"got {value!r} of type {type(value).__name__}"
            )
        value = float(value)
        if not (math.isfinite(value) and value > 0.0):
            raise InputError(
                f"material {name!r}: key {key!r} must be positive and finite [{unit}]; "
                f"got {value:g}"
            )
        values[key] = value
    source = properties.get("source", "user-defined")
    if not isinstance(source, str):
        raise InputError(f"material {name!r}: key 'source' must be a string; got {source!r}")
    if values["brinell_hardness"] is not None:
        inferred = "metal"
    elif values["layer_areal_density"] is not None:
        inferred = "fabric"
    else:
        inferred = "composite"
    kind = properties.get("kind", inferred)
    if kind not in _KINDS:
        raise InputError(
            f"material {name!r}: unknown kind {kind!r} for key 'kind'; "
            f"choose one of: {', '.join(_KINDS)}"
        )
    return Material(name=name, source=source, kind=kind, **values)


def get_material(name, materials=None):
    """Return the material of a name: a user material, else the catalogue entry.

    Parameters
    ----------
    name : str
        Key in ``materials`` or :data:`MATERIALS`, e.g. ``"Al6061-T6"``. Case and
        surrounding spaces must match exactly.
    materials : mapping of str to Material, optional
        User materials (already validated with :func:`make_material`).

    Returns
    -------
    Material

    Raises
    ------
    InputError
        If ``name`` is not a string or not a known material.
    """
    known = sorted({*MATERIALS, *(materials or {})})
    if not isinstance(name, str):
        raise InputError(
            f"material name must be a string; got {name!r} of type {type(name).__name__}; "
            f"choose one of: {', '.join(known)}"
        )
    if materials and name in materials:
        return materials[name]
    try:
        return MATERIALS[name]
    except KeyError:
        raise InputError(f"unknown material {name!r}; choose one of: {', '.join(known)}") from None
