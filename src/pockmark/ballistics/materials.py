"""Named wall materials whose properties feed the ballistic-limit equations.

Scope: a small catalogue of structural metals used for spacecraft walls and bumpers, with the
properties that the equations in :mod:`pockmark.ballistics` need (density, Brinell hardness,
yield and ultimate strength, sound speed). Shield definitions name a material by its key in
:data:`MATERIALS`; explicit numeric values in a shield definition override the catalogue.

Contents
--------
Material
    Frozen record of one material's properties in canonical units.
MATERIALS
    The catalogue, keyed by name ("Al6061-T6", "Al2219-T87", "Al2024-T3", "Al7075-T6",
    "Ti-6Al-4V").
get_material
    Look a material up by name, with an error that lists the known names.
"""

from dataclasses import dataclass

from pockmark.errors import InputError

__all__ = ["Material", "MATERIALS", "get_material"]

_HANDBOOK = "typical handbook values (ASM/MMPDS-typical), from memory"


@dataclass(frozen=True)
class Material:
    """Properties of one wall material in canonical units.

    Parameters
    ----------
    name : str
        Catalogue key, e.g. ``"Al6061-T6"``.
    density : float
        Mass density [g cm⁻³].
    brinell_hardness : float
        Brinell hardness number [HB] (aluminium alloys: 500 kg load, 10 mm ball; titanium
        alloys: 3000 kg load).
    yield_strength : float
        Tensile yield strength, 0.2 % offset [MPa].
    ultimate_strength : float
        Ultimate tensile strength [MPa].
    sound_speed : float
        Bar sound speed :math:`\\sqrt{E/\\rho}` [km s⁻¹]; this is the "C" of the
        Cour-Palais single-wall equation.
    source : str
        Where the numbers come from.
    """

    name: str
    density: float
    brinell_hardness: float
    yield_strength: float
    ultimate_strength: float
    sound_speed: float
    source: str


MATERIALS = {
    "Al6061-T6": Material("Al6061-T6", 2.70, 95.0, 276.0, 310.0, 5.05, _HANDBOOK),
    "Al2219-T87": Material("Al2219-T87", 2.84, 130.0, 393.0, 476.0, 5.07, _HANDBOOK),
    "Al2024-T3": Material("Al2024-T3", 2.78, 120.0, 345.0, 483.0, 5.13, _HANDBOOK),
    "Al7075-T6": Material("Al7075-T6", 2.81, 150.0, 503.0, 572.0, 5.05, _HANDBOOK),
    "Ti-6Al-4V": Material("Ti-6Al-4V", 4.43, 334.0, 880.0, 950.0, 5.07, _HANDBOOK),
}
"""Catalogue of wall materials, keyed by name.

Values are typical handbook values (ASM/MMPDS-typical), recalled from memory and transcribed
from the project's shared reference note on ballistic limits (§3); they are not design
allowables. Each sound speed is the bar speed :math:`\\sqrt{E/\\rho}` computed from a
recalled Young's modulus (68.9, 73.1, 73.1, 71.7 and 113.8 GPa in the order of the keys) and
the listed density.

Notes
-----
- Al 6061-T6 density is 2.70 g cm⁻³ here; ballistic-limit work often uses 2.713 g cm⁻³ and a
  sound speed of about 5.1 km s⁻¹ for aluminium. Give ``wall_density``/``sound_speed``
  explicitly in a shield definition to use those values.
- Other choices of "C" exist (longitudinal plate speed ≈ 6.2–6.4 km s⁻¹, Hugoniot bulk speed
  ≈ 5.1–5.35 km s⁻¹); choosing 6.3 instead of 5.1 raises single-wall critical diameters by
  about 14 %.
- Ti-6Al-4V is annealed; its Brinell number is for a 3000 kg load.
"""


def get_material(name):
    """Return the catalogue entry for a material name.

    Parameters
    ----------
    name : str
        Key in :data:`MATERIALS`, e.g. ``"Al6061-T6"``. Case and surrounding spaces must
        match exactly.

    Returns
    -------
    Material

    Raises
    ------
    InputError
        If ``name`` is not a string or not a known material.
    """
    if not isinstance(name, str):
        raise InputError(
            f"material name must be a string; got {name!r} of type {type(name).__name__}; "
            f"choose one of: {', '.join(sorted(MATERIALS))}"
        )
    try:
        return MATERIALS[name]
    except KeyError:
        raise InputError(
            f"unknown material {name!r}; choose one of: {', '.join(sorted(MATERIALS))}"
        ) from None
