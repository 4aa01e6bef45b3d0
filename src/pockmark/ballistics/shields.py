"""Shield definitions: from a user's table of keys to a callable critical diameter.

Scope: turning one shield definition, as read from a case file (a TOML table such as
``[shields.bus_wall]``), into a :class:`Shield` whose parameters are fully resolved numbers in
canonical units, with its areal density, its obliquity cap and its validity range. Material
names are looked up in the user's materials (the case's ``[materials.NAME]`` tables) and
then in :data:`pockmark.ballistics.materials.MATERIALS`; explicit numeric keys override the
material. Every problem raises :class:`~pockmark.errors.InputError` with a one-line message
that names the shield tag and the key.

Contents
--------
Shield
    Resolved shield: equation name, parameters, areal density, obliquity cap, validity
    ranges; ``critical_diameter``, ``out_of_range`` and ``regime_boundaries``.
make_shield
    Validate and resolve one definition.
describe_equations
    Name, summary, reference, status, validity, default obliquity cap and case-file keys
    (with units) of each equation, for documentation and the command line.

Keys every definition may give
------------------------------
``equation``
    Key of :data:`pockmark.ballistics.EQUATIONS` (required).
``angle_cap``
    Obliquity cap [°], in (0, 90): impacts at larger angles (below 90°) are evaluated at the
    cap. Default: none for every equation (see :func:`describe_equations`).

Examples of definitions
-----------------------
``{"equation": "christiansen_1993", "bumper_thickness": 0.127, "bumper_material": "Al6061-T6",
"standoff": 10.0, "rear_wall_thickness": 0.3175, "rear_wall_material": "Al2219-T87"}``

``{"equation": "christiansen_1995", "bumper_thickness": 0.2, "bumper_material": "Al6061-T6",
"nextel_layers": 6, "nextel_material": "Nextel-AF62", "kevlar_layers": 6,
"kevlar_material": "Kevlar-KM2", "standoff": 11.4, "rear_wall_thickness": 0.48,
"rear_wall_material": "Al2219-T87", "angle_cap": 65}``

``{"equation": "sandwich_summed_face_sheets", "front_sheet_thickness": 0.04,
"front_sheet_material": "CFRP", "core_thickness": 2.5, "core_density": 0.05,
"rear_sheet_thickness": 0.04, "rear_sheet_material": "CFRP",
"equivalent_material": "Al6061-T6"}``

``{"equation": "cour_palais_1987", "wall_thickness": 0.2, "wall_material": "Al6061-T6",
"failure": "detached_spall"}``

``{"equation": "tabulated_diameter", "speeds": [2, 7, 15], "angles": [0, 45, 75],
"diameters": [[0.2, 0.3, 0.6], [0.3, 0.35, 0.5], [0.25, 0.3, 0.45]]}``

``{"equation": "threshold_diameter", "diameter": 0.1}``
"""

import difflib
import math
import warnings
from collections.abc import Mapping
from dataclasses import dataclass, field

import numpy as np

from pockmark.ballistics import blanket, multi_shock, sandwich, stuffed_whipple, whipple
from pockmark.ballistics._common import ValidityRange, _outside
from pockmark.ballistics.blanket import christiansen_2009_mli
from pockmark.ballistics.materials import MATERIALS, get_material, make_material
from pockmark.ballistics.multi_shock import christiansen_1995_multi_shock
from pockmark.ballistics.sandwich import (
    ryan_2008_aluminium,
    ryan_2008_cfrp,
    sandwich_summed_face_sheets,
    sandwich_whipple_approximation,
)
from pockmark.ballistics.single_wall import FAILURE_COEFFICIENTS, cour_palais_1987
from pockmark.ballistics.stuffed_whipple import christiansen_1995
from pockmark.ballistics.tabulated import tabulated_diameter
from pockmark.ballistics.threshold import threshold_diameter
from pockmark.ballistics.triple_wall import schafer_2008_aluminium, schafer_2008_cfrp
from pockmark.ballistics.whipple import christiansen_1993
from pockmark.errors import InputError, ModelRangeWarning

__all__ = ["Shield", "make_shield", "describe_equations", "layer_thicknesses", "MLI_TREATMENTS"]

#: Converts thickness [cm] × density [g cm⁻³] = [g cm⁻²] to areal density [kg m⁻²].
_G_PER_CM2_IN_KG_PER_M2 = 10.0

MLI_TREATMENTS = {
    "ignore": "the blanket's mass is counted in the areal density, not in the equation "
    "(conservative; default)",
    "add_to_bumper": "the blanket's areal density is added to the bumper's in the equation "
    "(practice, not a fitted equation; emits a ModelRangeWarning)",
}
"""Treatments of a thermal blanket (MLI) in a Whipple or stuffed-Whipple definition.

The published blanket forms cover other build-ups: ``christiansen_2009_mli`` (a blanket
standing off a single aluminium wall) and the ``mli_areal_density`` term of the honeycomb and
triple-wall equations. For Whipple and stuffed-Whipple shields none was found; practice (from
memory) is to (i) ignore the blanket, which is conservative, or (ii) add its areal density to
the bumper's; (ii) is offered as an option with a warning, labelled as practice.
"""


# --- the resolved shield --------------------------------------------------------------------


@dataclass(frozen=True)
class Shield:
    """A resolved shield: one ballistic-limit equation with all its parameters.

    Parameters
    ----------
    tag : str
        Name of the shield as used in the case file and the mesh's face tags.
    equation : str
        Registry key of the equation in :data:`pockmark.ballistics.EQUATIONS`.
    parameters : dict
        Keyword arguments of the equation, fully resolved numbers in canonical units
        (tables as tuples).
    areal_density : float
        Areal density of the whole build-up [kg m⁻²]: every plate, fabric layer, core and
        blanket the definition describes (for ``threshold_diameter`` and
        ``tabulated_diameter``, the optional ``areal_density`` key, default 0).
    angle_cap : float or None, default None
        Obliquity cap [°]: impacts at angles above it (and below 90°) are evaluated at the
        cap, with the same total speed. ``None``: no cap.
    ranges : tuple of ValidityRange, default ()
        The equation's stated range in the impact variables, as used by
        :meth:`out_of_range`.
    notes : tuple of str, default ()
        Warnings given when the shield was defined (approximations, practice options).
    """

    tag: str
    equation: str
    parameters: dict = field(hash=False)
    areal_density: float
    angle_cap: float | None = None
    ranges: tuple = ()
    notes: tuple = ()

    @property
    def validity(self):
        """The validity range as one line: ``"parameter range (source); ..."``."""
        if not self.ranges:
            return "no stated range"
        return "; ".join(limits.describe() for limits in self.ranges)

    @property
    def validity_bounds(self):
        """The validity range's bounds only: ``"impact_velocity ≤ 8 km s⁻¹; ..."``."""
        if not self.ranges:
            return "no stated range"
        return "; ".join(limits.describe(with_note=False) for limits in self.ranges)

    def _function(self):
        try:
            return _SPECS[self.equation].function
        except KeyError:
            raise InputError(
                f"shield {self.tag!r}: unknown equation {self.equation!r}; "
                f"choose one of: {', '.join(sorted(_SPECS))}"
            ) from None

    def evaluated_angle(self, impact_angle):
        """The angle at which the equation is evaluated: the impact angle, capped.

        Parameters
        ----------
        impact_angle : numeric
            Impact angle from the surface normal [°].

        Returns
        -------
        numpy.ndarray
            ``min(angle, angle_cap)`` for angles below 90°; other angles (≥ 90°, NaN,
            invalid) unchanged. float64, shape of the input.
        """
        angle = np.asarray(impact_angle, dtype=np.float64)
        if self.angle_cap is None:
            return angle
        return np.where((angle > self.angle_cap) & (angle < 90.0), self.angle_cap, angle)

    def critical_diameter(self, impact_velocity, impact_angle, projectile_density):
        """Critical projectile diameter of this shield.

        Parameters
        ----------
        impact_velocity : numeric
            Impact speed [km s⁻¹].
        impact_angle : numeric
            Impact angle from the surface normal [°]. Angles above :attr:`angle_cap` (and
            below 90°) are evaluated at the cap.
        projectile_density : numeric
            Projectile density [g cm⁻³], of the particle class being integrated (debris or
            meteoroid).

        Returns
        -------
        numpy.ndarray
            Critical diameter [cm], float64, broadcast shape of the arguments; ``inf`` where
            there is no impact.
        """
        function = self._function()
        return function(
            impact_velocity, self.evaluated_angle(impact_angle), projectile_density,
            **self.parameters,
        )

    def out_of_range(self, impact_velocity, impact_angle, projectile_density):
        """Which impacts lie outside the equation's stated validity range.

        Parameters
        ----------
        impact_velocity : numeric
            Impact speed [km s⁻¹].
        impact_angle : numeric
            Impact angle from the surface normal [°], as the particle arrives (before any
            obliquity cap: a capped impact beyond the equation's angle range still counts
            as outside it).
        projectile_density : numeric
            Projectile density [g cm⁻³].

        Returns
        -------
        numpy.ndarray of bool
            Broadcast shape of the arguments; ``True`` where an impact's conditions leave
            any of :attr:`ranges`. No-impact conditions (speed ≤ 0, angle ≥ 90°) and NaN
            conditions are ``False``.

        Raises
        ------
        InputError
            For physically impossible impact conditions, as ``critical_diameter`` does.
        """
        return _outside(self.ranges, impact_velocity, impact_angle, projectile_density)

    def regime_boundaries(self, impact_angle):
        """Speeds at which the equation changes regime, at one impact angle.

        Parameters
        ----------
        impact_angle : float
            Impact angle from the surface normal [°]; the obliquity cap applies.

        Returns
        -------
        tuple of (str, float)
            ``(label, speed [km s⁻¹])`` pairs in increasing speed; empty for equations
            without regimes and for angles ≥ 90°.
        """
        regimes = _SPECS[self.equation].regimes if self.equation in _SPECS else None
        angle = float(self.evaluated_angle(float(impact_angle)))
        if regimes is None or not 0.0 <= angle < 90.0:
            return ()
        pairs = regimes(math.cos(math.radians(angle)))
        return tuple((label, float(speed)) for label, speed in pairs)


# --- equation specifications ----------------------------------------------------------------


@dataclass(frozen=True)
class _Quantity:
    """One value of a shield definition."""

    name: str
    unit: str
    description: str
    material_key: str | None = None  # definition key of the material that can supply it
    material_field: str | None = None  # attribute of Material that supplies it
    default: object = None
    choice_key: str | None = None  # definition key naming a value from `choices`
    choices: Mapping | None = None
    kind: str = "positive"  # positive | nonnegative | count | list | table
    required: bool = True  # False: None when nothing supplies it (the build decides)


@dataclass(frozen=True)
class _Option:
    """A string-valued key of a shield definition."""

    name: str
    choices: Mapping
    default: str
    description: str


@dataclass(frozen=True)
class _EquationSpec:
    function: object
    reference: str
    quantities: tuple
    build: object  # (tag, values) -> (equation parameters, areal density [g cm⁻²], notes)
    status: str  # "published (constants from memory)", "practice, no source", "not a model"
    validity: str  # static description of the validity range
    ranges: object = None  # parameters -> tuple of ValidityRange
    material_keys: tuple = ()
    material_fallbacks: tuple = ()  # (key, fallback key): use the fallback's metal if absent
    options: tuple = ()
    regimes: object = None  # cos θ -> ((label, speed [km s⁻¹]), ...)
    default_angle_cap: float | None = None
    notice: str | None = None  # warning emitted whenever a shield uses this equation
    # Thickness keys a trade study may scale, outermost layer first (resisting layers only).
    layer_thicknesses: tuple = ()


# Validity ranges, each with its provenance (shared reference note on ballistic limits).
_SINGLE_WALL_SPEED = ValidityRange(
    "impact_velocity", 0.0, 8.0, "km s⁻¹",
    "test data mostly ≤ 8 km s⁻¹, extrapolated above; from memory, note §2.1",
)
_WHIPPLE_SPEED = ValidityRange(
    "impact_velocity", 0.0, 8.0, "km s⁻¹",
    "test data to about 7-8 km s⁻¹, the hypervelocity branch above rests on hydrocode "
    "extrapolation; from memory, note §2.3",
)
_STUFFED_ANGLE = ValidityRange(
    "impact_angle", 0.0, 65.0, "°",
    "test base up to about 60-65°; from memory, note §2.4",
)
_STUFFED_SPEED = ValidityRange(
    "impact_velocity", 0.0, 8.0, "km s⁻¹",
    "assumed light-gas-gun test range as for the Whipple equation; the note states none",
)

_PANEL_SPEED = ValidityRange(
    "impact_velocity", 0.0, 8.0, "km s⁻¹",
    "sandwich-panel tests up to about 7-8 km s⁻¹ (shots compiled with the transcription)",
)
_TRIPLE_ANGLE = ValidityRange(
    "impact_angle", 0.0, 65.0, "°",
    "the source evaluates larger angles at 65° (read second-hand)",
)
_MULTI_SHOCK_SPEED = ValidityRange(
    "impact_velocity", 0.0, 8.0, "km s⁻¹",
    "light-gas-gun test range; from memory, low confidence",
)
_MULTI_SHOCK_ANGLE = ValidityRange(
    "impact_angle", 0.0, 60.0, "°", "test base up to about 60°; from memory, low confidence",
)
_BLANKET_SPEED = ValidityRange(
    "impact_velocity", 0.0, 7.0, "km s⁻¹",
    "light-gas-gun test range; from memory, low confidence",
)

_MLI_QUANTITY = _Quantity(
    "mli_areal_density", "g cm⁻²",
    "areal density of a thermal blanket (MLI) on the outside; see 'mli_treatment'",
    default=0.0, kind="nonnegative",
)
_MLI_OPTION = _Option(
    "mli_treatment", MLI_TREATMENTS, "ignore",
    "how the MLI enters the equation: " + ", ".join(MLI_TREATMENTS),
)
_PUBLISHED_MLI_QUANTITY = _Quantity(
    "mli_areal_density", "g cm⁻²",
    "areal density of a thermal blanket (MLI) on the outer sheet; enters the equation as "
    "published (3 × m / 2.78 cm of outer-sheet aluminium)",
    default=0.0, kind="nonnegative",
)
_AREAL_DENSITY_QUANTITY = _Quantity(
    "areal_density", "kg m⁻²", "areal density of the build-up, for mass reporting only",
    default=0.0, kind="nonnegative",
)


def _failure_quantity():
    return _Quantity(
        "failure_coefficient", "unitless",
        "failure thickness / crater depth (or give 'failure' by name)",
        default=FAILURE_COEFFICIENTS["perforation"],
        choice_key="failure", choices=FAILURE_COEFFICIENTS,
    )


def _mli(tag, values, front_density_name):
    """(areal density added to the front layers in the equation, notes) for the MLI keys."""
    mli = values["mli_areal_density"]
    treatment = values["mli_treatment"]
    if treatment == "ignore":
        return 0.0, ()
    if mli == 0.0:
        raise InputError(
            f"shield {tag!r}: 'mli_treatment' is {treatment!r} but 'mli_areal_density' is "
            f"not given; give 'mli_areal_density' [g cm⁻²] or drop 'mli_treatment'"
        )
    note = (
        f"shield {tag!r}: mli_treatment 'add_to_bumper' adds the blanket's {mli:g} g cm⁻² to "
        f"the {front_density_name} in the equation; this is practice, not a fitted equation "
        f"(no published blanket form for this build-up was found), and it makes the shield "
        f"look stronger than the default 'ignore' does"
    )
    return mli, (note,)


def _build_single_wall(tag, values):
    names = ("wall_thickness", "wall_density", "brinell_hardness", "sound_speed",
             "failure_coefficient")
    parameters = {name: values[name] for name in names}
    return parameters, values["wall_thickness"] * values["wall_density"], ()


def _build_whipple(tag, values):
    extra, notes = _mli(tag, values, "bumper (as bumper-material thickness)")
    parameters = {
        "bumper_thickness": values["bumper_thickness"] + extra / values["bumper_density"],
        "bumper_density": values["bumper_density"],
        "standoff": values["standoff"],
        "rear_wall_thickness": values["rear_wall_thickness"],
        "rear_wall_yield_strength": values["rear_wall_yield_strength"],
    }
    areal = (
        values["bumper_thickness"] * values["bumper_density"]
        + values["rear_wall_thickness"] * values["rear_wall_density"]
        + values["mli_areal_density"]
    )
    return parameters, areal, notes


def _blanket(tag, values):
    """Areal density of the fabric blanket of a stuffed Whipple [g cm⁻²]."""
    layered = {
        fabric: values[f"{fabric}_layers"] for fabric in ("nextel", "kevlar")
    }
    given = values["blanket_areal_density"]
    if given is not None:
        if any(layered.values()):
            raise InputError(
                f"shield {tag!r}: give the blanket either as 'blanket_areal_density' or as "
                f"'nextel_layers'/'kevlar_layers', not both"
            )
        return given
    total = 0.0
    for fabric, count in layered.items():
        if count == 0:
            continue
        per_layer = values[f"{fabric}_layer_areal_density"]
        if per_layer is None:
            raise InputError(
                f"shield {tag!r}: {fabric}_layers is {count} but the areal density of one "
                f"layer is unknown; give '{fabric}_material' (e.g. "
                f"{'Nextel-AF62' if fabric == 'nextel' else 'Kevlar-KM2'!r}) or "
                f"'{fabric}_layer_areal_density' [g cm⁻²]"
            )
        total += count * per_layer
    if total == 0.0:
        raise InputError(
            f"shield {tag!r}: christiansen_1995 needs a fabric blanket; give 'nextel_layers' "
            f"and/or 'kevlar_layers' with their materials, or 'blanket_areal_density' "
            f"[g cm⁻²]; for an empty gap use christiansen_1993"
        )
    return total


def _build_stuffed_whipple(tag, values):
    bumper = values["bumper_thickness"] * values["bumper_density"]
    blanket = _blanket(tag, values)
    extra, notes = _mli(tag, values, "front areal density (bumper + blanket)")
    parameters = {
        "front_areal_density": bumper + blanket + extra,
        "standoff": values["standoff"],
        "rear_wall_thickness": values["rear_wall_thickness"],
        "rear_wall_density": values["rear_wall_density"],
        "rear_wall_yield_strength": values["rear_wall_yield_strength"],
    }
    areal = (
        bumper + blanket + values["rear_wall_thickness"] * values["rear_wall_density"]
        + values["mli_areal_density"]
    )
    return parameters, areal, notes


def _sheets(values):
    return (
        values["front_sheet_thickness"] * values["front_sheet_density"],
        values["core_thickness"] * values["core_density"],
        values["rear_sheet_thickness"] * values["rear_sheet_density"],
    )


def _build_sandwich_bound(tag, values):
    front, core, rear = _sheets(values)
    parameters = {
        "face_sheets_areal_density": front + rear,
        "wall_density": values["equivalent_density"],
        "brinell_hardness": values["equivalent_brinell_hardness"],
        "sound_speed": values["equivalent_sound_speed"],
        "failure_coefficient": values["failure_coefficient"],
    }
    return parameters, front + core + rear, ()


def _build_sandwich_whipple(tag, values):
    front, core, rear = _sheets(values)
    parameters = {
        "front_sheet_thickness": values["front_sheet_thickness"],
        "front_sheet_density": values["front_sheet_density"],
        "core_thickness": values["core_thickness"],
        "rear_sheet_thickness": values["rear_sheet_thickness"],
        "rear_sheet_yield_strength": values["rear_sheet_yield_strength"],
    }
    return parameters, front + core + rear, ()


def _layered_areal_density(tag, equation, values, name, layers, per_layer, example):
    """Areal density [g cm⁻²] given as ``name`` or as ``layers`` × ``per_layer``."""
    given, count, each = values[name], values[layers], values[per_layer]
    if given is not None:
        if count:
            raise InputError(
                f"shield {tag!r}: give either {name!r} or {layers!r}, not both"
            )
        return given
    if count == 0:
        raise InputError(
            f"shield {tag!r}: {equation} needs {name!r} [g cm⁻²] or {layers!r} with a "
            f"material (e.g. {example!r})"
        )
    if each is None:
        raise InputError(
            f"shield {tag!r}: {layers} is {count} but the areal density of one layer is "
            f"unknown; give a material (e.g. {example!r}) or {per_layer!r} [g cm⁻²]"
        )
    return count * each


def _build_multi_shock(tag, values):
    bumpers = _layered_areal_density(
        tag, "christiansen_1995_multi_shock", values, "bumper_areal_density",
        "bumper_layers", "bumper_layer_areal_density", "Nextel-AF62",
    )
    parameters = {
        "bumper_areal_density": bumpers,
        "standoff": values["standoff"],
        "rear_wall_thickness": values["rear_wall_thickness"],
        "rear_wall_density": values["rear_wall_density"],
        "rear_wall_yield_strength": values["rear_wall_yield_strength"],
    }
    return parameters, bumpers + values["rear_wall_thickness"] * values["rear_wall_density"], ()


def _build_ryan(material):
    def build(tag, values):
        front, core, rear = _sheets(values)
        names = ["front_sheet_thickness", "front_sheet_density", "core_thickness",
                 "rear_sheet_thickness", "mli_areal_density"]
        names.append("rear_sheet_yield_strength" if material == "aluminium"
                     else "rear_sheet_density")
        parameters = {name: values[name] for name in names}
        return parameters, front + core + rear + values["mli_areal_density"], ()
    return build


def _build_triple_wall(material):
    def build(tag, values):
        names = ["outer_sheet_thickness", "core_thickness", "inner_sheet_thickness",
                 "inner_sheet_density", "gap", "wall_thickness", "wall_yield_strength",
                 "mli_areal_density"]
        if material == "cfrp":
            names.append("outer_sheet_density")
        parameters = {name: values[name] for name in names}
        areal = (
            values["outer_sheet_thickness"] * values["outer_sheet_density"]
            + values["core_thickness"] * values["core_density"]
            + values["inner_sheet_thickness"] * values["inner_sheet_density"]
            + values["wall_thickness"] * values["wall_density"]
            + values["mli_areal_density"]
        )
        return parameters, areal, ()
    return build


def _build_blanket(tag, values):
    parameters = {
        "wall_thickness": values["wall_thickness"],
        "blanket_areal_density": values["blanket_areal_density"],
    }
    areal = values["wall_thickness"] * values["wall_density"] + values["blanket_areal_density"]
    return parameters, areal, ()


def _build_tabulated(tag, values):
    parameters = {name: values[name] for name in ("speeds", "angles", "diameters")}
    return parameters, values["areal_density"] / _G_PER_CM2_IN_KG_PER_M2, ()


def _build_threshold(tag, values):
    return {"diameter": values["diameter"]}, values["areal_density"] / _G_PER_CM2_IN_KG_PER_M2, ()


def _tabulated_ranges(parameters):
    speeds, angles = parameters["speeds"], parameters["angles"]
    return (
        ValidityRange("impact_velocity", float(speeds[0]), float(speeds[-1]), "km s⁻¹",
                      "extent of the user's table; clamped to its edge outside"),
        ValidityRange("impact_angle", float(angles[0]), float(angles[-1]), "°",
                      "extent of the user's table; clamped to its edge outside"),
    )


def _whipple_regimes(cos_angle):
    return (
        ("ballistic → shatter", whipple._LOW_SPEED_LIMIT / cos_angle),
        ("shatter → hypervelocity", whipple._HIGH_SPEED_LIMIT / cos_angle),
    )


def _stuffed_regimes(cos_angle):
    low, high = stuffed_whipple._regime_speeds(cos_angle)
    return (("low → intermediate", low), ("intermediate → high", high))


def _multi_shock_regimes(cos_angle):
    low, high = multi_shock.regime_speeds(cos_angle)
    return (("low → intermediate", low), ("intermediate → high", high))


def _blanket_regimes(cos_angle):
    low, high = blanket.regime_speeds(cos_angle)
    return (("low → intermediate", low), ("intermediate → high", high))


def _panel_regimes(material):
    low, high = sandwich.RYAN_REGIME_LIMITS[material]
    return lambda cos_angle: (("low → intermediate", low / cos_angle),
                              ("intermediate → high", high / cos_angle))


def _triple_wall_quantities(outer_density_in_equation):
    outer = "outer face-sheet density" + (
        "" if outer_density_in_equation else " (areal density only)")
    return (
        _Quantity("outer_sheet_thickness", "cm", "outer face-sheet thickness of the panel"),
        _Quantity("outer_sheet_density", "g cm⁻³", outer, "outer_sheet_material", "density"),
        _Quantity("core_thickness", "cm", "honeycomb core thickness"),
        _Quantity("core_density", "g cm⁻³",
                  "bulk density of the honeycomb core (areal density only)"),
        _Quantity("inner_sheet_thickness", "cm", "inner face-sheet thickness of the panel"),
        _Quantity("inner_sheet_density", "g cm⁻³", "inner face-sheet density",
                  "inner_sheet_material", "density"),
        _Quantity("gap", "cm", "distance from the panel's inner sheet to the equipment wall"),
        _Quantity("wall_thickness", "cm", "equipment (aluminium) wall thickness"),
        _Quantity("wall_density", "g cm⁻³", "equipment wall density (areal density only)",
                  "wall_material", "density"),
        _Quantity("wall_yield_strength", "MPa", "equipment wall yield strength (0.2 % offset)",
                  "wall_material", "yield_strength"),
        _PUBLISHED_MLI_QUANTITY,
    )


def _sheet_quantities(yield_from_rear):
    quantities = [
        _Quantity("front_sheet_thickness", "cm", "front (outer) face-sheet thickness"),
        _Quantity("front_sheet_density", "g cm⁻³", "front face-sheet density",
                  "front_sheet_material", "density"),
        _Quantity("core_thickness", "cm", "honeycomb core thickness"),
        _Quantity("core_density", "g cm⁻³",
                  "bulk density of the honeycomb core (areal density only)"),
        _Quantity("rear_sheet_thickness", "cm", "rear face-sheet thickness"),
        _Quantity("rear_sheet_density", "g cm⁻³", "rear face-sheet density",
                  "rear_sheet_material", "density"),
    ]
    if yield_from_rear:
        quantities.append(
            _Quantity("rear_sheet_yield_strength", "MPa",
                      "rear face-sheet yield strength (0.2 % offset)",
                      "rear_sheet_material", "yield_strength")
        )
    return tuple(quantities)


_CHRISTIANSEN_1993 = (
    "E. L. Christiansen, \"Design and performance equations for advanced meteoroid and debris "
    "shields,\" Int. J. Impact Eng., vol. 14, pp. 145-156, 1993, doi:10.1016/0734-743X(93)90016-Z"
)
_TP_2003 = "E. L. Christiansen, \"Meteoroid/Debris Shielding,\" NASA/TP-2003-210788, 2003"
_CARRIERE_2021 = (
    "R. Carriere and A. Cherniaev, \"Hypervelocity impacts on satellite sandwich structures - "
    "a review of experimental findings and predictive models,\" Appl. Mech., vol. 2, "
    "pp. 25-45, 2021, doi:10.3390/applmech2010003"
)

_RYAN_2008 = (
    "S. Ryan, F. Schafer, R. Destefanis and M. Lambert, \"A ballistic limit equation for "
    "hypervelocity impacts on composite honeycomb sandwich panel satellite structures,\" Adv. "
    "Space Res., vol. 41, pp. 1152-1166, 2008, doi:10.1016/j.asr.2007.02.032"
)
_SCHAFER_2008 = (
    "F. Schafer, S. Ryan, M. Lambert and R. Putzar, \"Ballistic limit equation for equipment "
    "placed behind satellite structure walls,\" Int. J. Impact Eng., vol. 35, pp. 1784-1791, "
    "2008, doi:10.1016/j.ijimpeng.2008.07.074"
)
_SECOND_HAND = "published (constants read in a second-hand transcription)"
_TRIPLE_WALL_NOTICE = (
    "the triple-wall low-speed branch uses t_w where the transcription it was read in has "
    "t_w^(1/2) (taken for a typo); treat results below the high-speed limit with extra doubt"
)



def _panel_spec(function, material):
    """The honeycomb-panel equation for one face-sheet material."""
    return _EquationSpec(
        function=function,
        layer_thicknesses=("front_sheet_thickness", "rear_sheet_thickness"),
        reference=_RYAN_2008,
        status=_SECOND_HAND,
        validity=_PANEL_SPEED.describe(),
        quantities=(_sheet_quantities(yield_from_rear=material == "aluminium")
                    + (_PUBLISHED_MLI_QUANTITY,)),
        material_keys=("front_sheet_material", "rear_sheet_material"),
        build=_build_ryan(material),
        ranges=lambda parameters: (_PANEL_SPEED,),
        regimes=_panel_regimes(material),
    )


def _triple_wall_spec(function, material):
    """The triple-wall equation behind a panel of one face-sheet material."""
    return _EquationSpec(
        function=function,
        layer_thicknesses=("wall_thickness",),
        reference=_SCHAFER_2008,
        status=_SECOND_HAND,
        validity=f"{_TRIPLE_ANGLE.describe()}; {_PANEL_SPEED.describe()}",
        quantities=_triple_wall_quantities(outer_density_in_equation=material == "cfrp"),
        material_keys=("outer_sheet_material", "inner_sheet_material", "wall_material"),
        build=_build_triple_wall(material),
        ranges=lambda parameters: (_TRIPLE_ANGLE, _PANEL_SPEED),
        regimes=_panel_regimes(material),
        default_angle_cap=65.0,
        notice=_TRIPLE_WALL_NOTICE,
    )


_SPECS = {
    "cour_palais_1987": _EquationSpec(
        function=cour_palais_1987,
        layer_thicknesses=("wall_thickness",),
        reference=(
            "B. G. Cour-Palais, \"Hypervelocity impact in metals, glass and composites,\" "
            "Int. J. Impact Eng., vol. 5, pp. 221-237, 1987, doi:10.1016/0734-743X(87)90040-0; "
            f"as given in {_TP_2003}"
        ),
        status="published (constants from memory)",
        validity=_SINGLE_WALL_SPEED.describe(),
        quantities=(
            _Quantity("wall_thickness", "cm", "plate thickness"),
            _Quantity("wall_density", "g cm⁻³", "plate density", "wall_material", "density"),
            _Quantity(
                "brinell_hardness", "HB", "plate Brinell hardness",
                "wall_material", "brinell_hardness",
            ),
            _Quantity(
                "sound_speed", "km s⁻¹", "plate sound speed (bar speed)",
                "wall_material", "sound_speed",
            ),
            _failure_quantity(),
        ),
        material_keys=("wall_material",),
        build=_build_single_wall,
        ranges=lambda parameters: (_SINGLE_WALL_SPEED,),
    ),
    "christiansen_1993": _EquationSpec(
        function=christiansen_1993,
        layer_thicknesses=("bumper_thickness", "rear_wall_thickness"),
        reference=f"{_CHRISTIANSEN_1993}; {_TP_2003}",
        status="published (constants from memory)",
        validity=_WHIPPLE_SPEED.describe(),
        quantities=(
            _Quantity("bumper_thickness", "cm", "bumper thickness"),
            _Quantity("bumper_density", "g cm⁻³", "bumper density", "bumper_material", "density"),
            _Quantity("standoff", "cm", "spacing from outer bumper face to rear wall"),
            _Quantity("rear_wall_thickness", "cm", "rear-wall thickness"),
            _Quantity(
                "rear_wall_yield_strength", "MPa", "rear-wall yield strength (0.2 % offset)",
                "rear_wall_material", "yield_strength",
            ),
            _Quantity(
                "rear_wall_density", "g cm⁻³", "rear-wall density (areal density only)",
                "rear_wall_material", "density",
            ),
            _MLI_QUANTITY,
        ),
        options=(_MLI_OPTION,),
        material_keys=("bumper_material", "rear_wall_material"),
        build=_build_whipple,
        ranges=lambda parameters: (_WHIPPLE_SPEED,),
        regimes=_whipple_regimes,
    ),
    "christiansen_1995": _EquationSpec(
        function=christiansen_1995,
        layer_thicknesses=("bumper_thickness", "rear_wall_thickness"),
        reference=(
            "E. L. Christiansen, J. L. Crews, J. E. Williamsen, J. H. Robinson and A. M. Nolen, "
            "\"Enhanced meteoroid and orbital debris shielding,\" Int. J. Impact Eng., vol. 17, "
            f"pp. 217-228, 1995; {_TP_2003}"
        ),
        status="published (constants from memory)",
        validity=f"{_STUFFED_ANGLE.describe()}; {_STUFFED_SPEED.describe()}",
        quantities=(
            _Quantity("bumper_thickness", "cm", "aluminium bumper thickness"),
            _Quantity("bumper_density", "g cm⁻³", "bumper density", "bumper_material", "density"),
            _Quantity("nextel_layers", "count", "number of ceramic-fabric layers",
                      default=0, kind="count"),
            _Quantity("nextel_layer_areal_density", "g cm⁻²",
                      "areal density of one ceramic-fabric layer",
                      "nextel_material", "layer_areal_density", required=False),
            _Quantity("kevlar_layers", "count", "number of aramid-fabric layers",
                      default=0, kind="count"),
            _Quantity("kevlar_layer_areal_density", "g cm⁻²",
                      "areal density of one aramid-fabric layer",
                      "kevlar_material", "layer_areal_density", required=False),
            _Quantity("blanket_areal_density", "g cm⁻²",
                      "areal density of the whole fabric blanket (instead of layers)",
                      required=False),
            _Quantity("standoff", "cm", "spacing from outer bumper to rear wall"),
            _Quantity("rear_wall_thickness", "cm", "rear-wall thickness"),
            _Quantity("rear_wall_density", "g cm⁻³", "rear-wall density",
                      "rear_wall_material", "density"),
            _Quantity(
                "rear_wall_yield_strength", "MPa", "rear-wall yield strength (0.2 % offset)",
                "rear_wall_material", "yield_strength",
            ),
            _MLI_QUANTITY,
        ),
        options=(_MLI_OPTION,),
        material_keys=("bumper_material", "nextel_material", "kevlar_material",
                       "rear_wall_material"),
        build=_build_stuffed_whipple,
        ranges=lambda parameters: (_STUFFED_ANGLE, _STUFFED_SPEED),
        regimes=_stuffed_regimes,
    ),
    "sandwich_summed_face_sheets": _EquationSpec(
        function=sandwich_summed_face_sheets,
        layer_thicknesses=("front_sheet_thickness", "rear_sheet_thickness"),
        reference=(
            "common practice, no source: face sheets as one wall of their summed areal density "
            f"(conservative bound), evaluated with cour_palais_1987; review of the published "
            f"sandwich-panel equations: {_CARRIERE_2021}"
        ),
        status="practice, no source (conservative bound)",
        validity=_SINGLE_WALL_SPEED.describe(),
        quantities=_sheet_quantities(yield_from_rear=False) + (
            _Quantity("equivalent_density", "g cm⁻³",
                      "density of the metal the equivalent plate is made of",
                      "equivalent_material", "density"),
            _Quantity("equivalent_brinell_hardness", "HB",
                      "Brinell hardness of the equivalent plate's metal",
                      "equivalent_material", "brinell_hardness"),
            _Quantity("equivalent_sound_speed", "km s⁻¹",
                      "sound speed of the equivalent plate's metal",
                      "equivalent_material", "sound_speed"),
            _failure_quantity(),
        ),
        material_keys=("front_sheet_material", "rear_sheet_material", "equivalent_material"),
        material_fallbacks=(("equivalent_material", "rear_sheet_material"),),
        build=_build_sandwich_bound,
        ranges=lambda parameters: (_SINGLE_WALL_SPEED,),
    ),
    "sandwich_whipple_approximation": _EquationSpec(
        function=sandwich_whipple_approximation,
        layer_thicknesses=("front_sheet_thickness", "rear_sheet_thickness"),
        reference=(
            "common practice, no source: the panel as a Whipple shield (christiansen_1993), "
            f"known to be non-conservative; {_CARRIERE_2021}"
        ),
        status="approximation, known non-conservative",
        validity=_WHIPPLE_SPEED.describe(),
        quantities=_sheet_quantities(yield_from_rear=True),
        material_keys=("front_sheet_material", "rear_sheet_material"),
        build=_build_sandwich_whipple,
        ranges=lambda parameters: (_WHIPPLE_SPEED,),
        regimes=_whipple_regimes,
        notice=(
            "sandwich_whipple_approximation treats a honeycomb panel as a Whipple shield, "
            "which is known to be NON-conservative (the cells channel the debris cloud); "
            "compare with sandwich_summed_face_sheets, a conservative bound"
        ),
    ),
    "christiansen_1995_multi_shock": _EquationSpec(
        function=christiansen_1995_multi_shock,
        layer_thicknesses=("rear_wall_thickness",),
        reference=(
            "B. G. Cour-Palais and J. L. Crews, \"A multi-shock concept for spacecraft "
            "shielding,\" Int. J. Impact Eng., vol. 10, pp. 135-146, 1990; equation of "
            f"Christiansen et al. (1995) as restated in {_TP_2003}"
        ),
        status=_SECOND_HAND,
        validity=f"{_MULTI_SHOCK_ANGLE.describe()}; {_MULTI_SHOCK_SPEED.describe()}",
        quantities=(
            _Quantity("bumper_layers", "count", "number of fabric bumpers (usually 4)",
                      default=0, kind="count"),
            _Quantity("bumper_layer_areal_density", "g cm⁻²", "areal density of one bumper",
                      "bumper_material", "layer_areal_density", required=False),
            _Quantity("bumper_areal_density", "g cm⁻²",
                      "areal density of all bumpers together (instead of layers)",
                      required=False),
            _Quantity("standoff", "cm", "spacing from the first bumper to the rear wall"),
            _Quantity("rear_wall_thickness", "cm", "aluminium rear-wall thickness"),
            _Quantity("rear_wall_density", "g cm⁻³", "rear-wall density",
                      "rear_wall_material", "density"),
            _Quantity("rear_wall_yield_strength", "MPa",
                      "rear-wall yield strength (0.2 % offset)",
                      "rear_wall_material", "yield_strength"),
        ),
        material_keys=("bumper_material", "rear_wall_material"),
        build=_build_multi_shock,
        ranges=lambda parameters: (_MULTI_SHOCK_ANGLE, _MULTI_SHOCK_SPEED),
        regimes=_multi_shock_regimes,
        default_angle_cap=75.0,
    ),
    "ryan_2008_aluminium": _panel_spec(ryan_2008_aluminium, "aluminium"),
    "ryan_2008_cfrp": _panel_spec(ryan_2008_cfrp, "cfrp"),
    "schafer_2008_aluminium": _triple_wall_spec(schafer_2008_aluminium, "aluminium"),
    "schafer_2008_cfrp": _triple_wall_spec(schafer_2008_cfrp, "cfrp"),
    "christiansen_2009_mli": _EquationSpec(
        function=christiansen_2009_mli,
        layer_thicknesses=("wall_thickness",),
        reference=(
            "E. L. Christiansen et al., \"Handbook for Designing MMOD Protection,\" "
            "NASA/TM-2009-214785, 2009"
        ),
        status=_SECOND_HAND,
        validity=_BLANKET_SPEED.describe(),
        quantities=(
            _Quantity("wall_thickness", "cm", "aluminium wall thickness"),
            _Quantity("wall_density", "g cm⁻³", "wall density (areal density only)",
                      "wall_material", "density"),
            _Quantity("blanket_areal_density", "g cm⁻²", "areal density of the blanket",
                      default=blanket.TESTED_BLANKET_AREAL_DENSITY),
        ),
        material_keys=("wall_material",),
        build=_build_blanket,
        ranges=lambda parameters: (_BLANKET_SPEED,),
        regimes=_blanket_regimes,
        default_angle_cap=75.0,
        notice=(
            f"christiansen_2009_mli holds only for the tested build-up (a "
            f"{blanket.TESTED_BLANKET_AREAL_DENSITY} g cm⁻² blanket "
            f"{blanket.TESTED_BLANKET_STANDOFF} cm in front of an aluminium wall): its "
            f"high-speed branch has no standoff or blanket term"
        ),
    ),
    "tabulated_diameter": _EquationSpec(
        function=tabulated_diameter,
        reference="not a published model: user table of critical diameter over speed and angle",
        status="not a model (user table)",
        validity="the table's extent in impact speed and angle; clamped to its edge outside",
        quantities=(
            _Quantity("speeds", "km s⁻¹", "tabulated impact speeds, increasing", kind="list"),
            _Quantity("angles", "°", "tabulated impact angles, increasing, in [0, 90)",
                      kind="list"),
            _Quantity("diameters", "cm", "critical diameters, one row per speed",
                      kind="table"),
            _AREAL_DENSITY_QUANTITY,
        ),
        build=_build_tabulated,
        ranges=_tabulated_ranges,
    ),
    "threshold_diameter": _EquationSpec(
        function=threshold_diameter,
        reference="not a published model: constant critical diameter for impact counting and tests",
        status="not a model (constant)",
        validity="no stated range",
        quantities=(_Quantity("diameter", "cm", "threshold diameter"), _AREAL_DENSITY_QUANTITY),
        build=_build_threshold,
    ),
}


# --- resolution -----------------------------------------------------------------------------


def _valid_keys(spec):
    keys = {"equation", "angle_cap", *spec.material_keys}
    for quantity in spec.quantities:
        keys.add(quantity.name)
        if quantity.choice_key:
            keys.add(quantity.choice_key)
    keys.update(option.name for option in spec.options)
    return sorted(keys)


def _is_number(value):
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def _explicit(tag, quantity, value):
    """Validate an explicit value of a quantity by its kind."""
    name, unit = quantity.name, quantity.unit
    if quantity.kind == "count":
        if not isinstance(value, int) or isinstance(value, bool) or value < 0:
            raise InputError(
                f"shield {tag!r}: key {name!r} must be a whole number ≥ 0; got {value!r}"
            )
        return value
    if quantity.kind in ("list", "table"):
        shape = "a list of numbers" if quantity.kind == "list" else "a list of rows of numbers"
        rows = value if quantity.kind == "table" else [value]
        if not isinstance(value, (list, tuple)) or not all(
            isinstance(row, (list, tuple)) and all(_is_number(x) for x in row) for row in rows
        ):
            raise InputError(
                f"shield {tag!r}: key {name!r} must be {shape} [{unit}]; got {value!r}"
            )
        if quantity.kind == "list":
            return tuple(float(x) for x in value)
        return tuple(tuple(float(x) for x in row) for row in value)
    if not _is_number(value):
        raise InputError(
            f"shield {tag!r}: key {name!r} must be a number [{unit}]; "
            f"got {value!r} of type {type(value).__name__}"
        )
    value = float(value)
    if quantity.kind == "nonnegative":
        if not (math.isfinite(value) and value >= 0.0):
            raise InputError(
                f"shield {tag!r}: key {name!r} must be ≥ 0 and finite [{unit}]; got {value:g}"
            )
    elif not (math.isfinite(value) and value > 0.0):
        raise InputError(
            f"shield {tag!r}: key {name!r} must be positive and finite [{unit}]; got {value:g}"
        )
    return value


def _resolve(tag, equation, spec, definition, materials):
    """Value of every quantity of ``spec``: explicit key, named choice, material, default."""
    values = {}
    for quantity in spec.quantities:
        name = quantity.name
        choice_key = quantity.choice_key
        material = materials.get(quantity.material_key) if quantity.material_key else None
        if name in definition and choice_key and choice_key in definition:
            raise InputError(
                f"shield {tag!r}: keys {choice_key!r} and {name!r} both given; "
                f"give only one ({choice_key!r} by name, or {name!r} as a number)"
            )
        if name in definition:
            value = _explicit(tag, quantity, definition[name])
        elif choice_key and choice_key in definition:
            choice = definition[choice_key]
            if not isinstance(choice, str) or choice not in quantity.choices:
                raise InputError(
                    f"shield {tag!r}: unknown {choice_key} {choice!r} for key {choice_key!r}; "
                    f"choose one of: {', '.join(sorted(quantity.choices))}"
                )
            value = float(quantity.choices[choice])
        elif material is not None:
            value = getattr(material, quantity.material_field)
            if value is None:
                raise InputError(
                    f"shield {tag!r}: material {material.name!r} ({material.kind}, key "
                    f"{quantity.material_key!r}) has no {quantity.material_field}; "
                    f"give {name!r} [{quantity.unit}] explicitly or choose another material"
                )
            value = float(value)
        elif quantity.default is not None:
            value = quantity.default
        elif not quantity.required:
            value = None
        else:
            how = f"give {name!r} [{quantity.unit}] ({quantity.description})"
            if quantity.material_key:
                having = sorted(
                    key for key, entry in MATERIALS.items()
                    if getattr(entry, quantity.material_field) is not None
                )
                how += f" or {quantity.material_key!r} (one of: {', '.join(having)})"
            raise InputError(f"shield {tag!r}: missing key {name!r} for {equation}; {how}")
        values[name] = value
    for option in spec.options:
        choice = definition.get(option.name, option.default)
        if not isinstance(choice, str) or choice not in option.choices:
            raise InputError(
                f"shield {tag!r}: unknown {option.name} {choice!r} for key {option.name!r}; "
                f"choose one of: {', '.join(option.choices)}"
            )
        values[option.name] = choice
    return values


def _look_up(tag, key, name, user_materials):
    """The Material named by definition key ``key``: user materials first, then catalogue."""
    try:
        if isinstance(name, str) and name in user_materials:
            return make_material(name, user_materials[name])
        return get_material(name, {n: None for n in user_materials})
    except InputError as error:
        raise InputError(f"shield {tag!r}: key {key!r}: {error}") from None


def _materials(tag, spec, definition, user_materials):
    materials = {}
    for key in spec.material_keys:
        if key in definition:
            materials[key] = _look_up(tag, key, definition[key], user_materials)
    for key, fallback in spec.material_fallbacks:
        candidate = materials.get(fallback)
        if key not in materials and candidate is not None and candidate.kind == "metal":
            materials[key] = candidate
    return materials


def _angle_cap(tag, definition, spec):
    if "angle_cap" not in definition:
        return spec.default_angle_cap
    cap = definition["angle_cap"]
    if not _is_number(cap) or not (0.0 < float(cap) < 90.0):
        raise InputError(
            f"shield {tag!r}: key 'angle_cap' must be a number in (0, 90) [°]; got {cap!r}; "
            f"leave it out for no cap"
        )
    return float(cap)


def make_shield(tag, definition, materials=None):
    """Validate a shield definition and resolve it into a :class:`Shield`.

    Parameters
    ----------
    tag : str
        Name of the shield; it prefixes every error message.
    definition : mapping
        Keys and values as read from a case-file table: ``equation`` (a key of
        :data:`pockmark.ballistics.EQUATIONS`), the equation's keys in canonical units (see
        :func:`describe_equations` for each equation's keys), optional ``*_material`` names
        that supply densities, hardness, sound speed, yield strength and per-layer areal
        densities, an optional ``failure`` name for the single-wall forms (a key of
        :data:`~pockmark.ballistics.single_wall.FAILURE_COEFFICIENTS`) and an optional
        ``angle_cap`` [°]. Explicit numbers override values from a material.
    materials : mapping of str to mapping, optional
        User materials, name → table of properties (keys of
        :data:`~pockmark.ballistics.materials.MATERIAL_KEYS`, plus ``source`` and ``kind``),
        as read from a case's ``[materials.NAME]`` tables; :class:`Material` values are also
        accepted. They are looked up before the catalogue and validated when a definition
        uses them; their names must not repeat a catalogue name.

    Returns
    -------
    Shield

    Raises
    ------
    InputError
        For a missing or unknown key, a value of the wrong type, an unknown equation,
        material, failure or option name, a non-positive or non-finite number, a material
        that lacks a property the equation needs, or both ``failure`` and
        ``failure_coefficient``. The message is one line naming the tag and the key.

    Warns
    -----
    ModelRangeWarning
        When the definition selects an approximation known to be non-conservative
        (``sandwich_whipple_approximation``) or a practice option that is not a fitted
        equation (``mli_treatment = "add_to_bumper"``). The texts are also kept in
        :attr:`Shield.notes`.

    Notes
    -----
    Areal density [kg m⁻²] = 10 × Σ thickness [cm] × density [g cm⁻³] over plates and core,
    plus layers × per-layer areal density [g cm⁻²] for fabrics and the MLI areal density,
    all × 10. ``christiansen_1993`` needs the rear-wall density only for the areal density.
    When ``failure`` and ``failure_coefficient`` are both absent, the single-wall forms use
    perforation (k = 1.8). For ``sandwich_summed_face_sheets`` the equivalent plate's metal
    defaults to the rear sheet's material when that is a metal; CFRP sheets need an
    ``equivalent_material`` (an aluminium alloy).

    Examples
    --------
    >>> shield = make_shield("plate", {"equation": "threshold_diameter", "diameter": 0.1})
    >>> float(shield.critical_diameter(7.0, 30.0, 2.8))
    0.1
    """
    if not isinstance(tag, str) or not tag:
        raise InputError(f"shield tag must be a non-empty string; got {tag!r}")
    if not isinstance(definition, Mapping):
        raise InputError(
            f"shield {tag!r}: definition must be a table of keys; "
            f"got {type(definition).__name__}"
        )
    if materials is None:
        materials = {}
    if not isinstance(materials, Mapping):
        raise InputError(
            f"shield {tag!r}: materials must be a table of name → properties; "
            f"got {type(materials).__name__}"
        )
    if "equation" not in definition:
        raise InputError(
            f"shield {tag!r}: missing key 'equation'; choose one of: {', '.join(sorted(_SPECS))}"
        )
    equation = definition["equation"]
    if not isinstance(equation, str) or equation not in _SPECS:
        raise InputError(
            f"shield {tag!r}: unknown equation {equation!r} for key 'equation'; "
            f"choose one of: {', '.join(sorted(_SPECS))}"
        )
    spec = _SPECS[equation]

    valid = _valid_keys(spec)
    for key in definition:
        if key not in valid:
            close = difflib.get_close_matches(str(key), valid, n=1)
            hint = f" (did you mean {close[0]!r}?)" if close else ""
            raise InputError(
                f"shield {tag!r}: unknown key {key!r}{hint}; "
                f"valid keys for {equation}: {', '.join(valid)}"
            )

    resolved_materials = _materials(tag, spec, definition, materials)
    values = _resolve(tag, equation, spec, definition, resolved_materials)
    angle_cap = _angle_cap(tag, definition, spec)
    parameters, areal_density, notes = spec.build(tag, values)
    # Let the equation check what the definition cannot (e.g. a table's shape and order).
    try:
        spec.function(7.0, 0.0, 2.8, **parameters)
    except InputError as error:
        raise InputError(f"shield {tag!r}: {error}") from None
    if spec.notice:
        notes = (f"shield {tag!r}: {spec.notice}", *notes)
    for note in notes:
        warnings.warn(note, ModelRangeWarning, stacklevel=2)
    ranges = spec.ranges(parameters) if spec.ranges else ()
    return Shield(
        tag=tag,
        equation=equation,
        parameters=parameters,
        areal_density=float(_G_PER_CM2_IN_KG_PER_M2 * areal_density),
        angle_cap=angle_cap,
        ranges=tuple(ranges),
        notes=tuple(notes),
    )


def layer_thicknesses(equation):
    """Thickness keys of an equation's resisting layers, outermost first, for trade studies.

    Parameters
    ----------
    equation : str
        Registry key of the equation.

    Returns
    -------
    tuple of str
        Definition keys [cm] whose increase makes the shield stronger (bumper or front
        sheet, rear or equipment wall); empty for tables and constant thresholds.
    """
    return _SPECS[equation].layer_thicknesses if equation in _SPECS else ()


def describe_equations():
    """Describe every registered ballistic-limit equation.

    Returns
    -------
    list of dict
        One dict per equation, sorted by name, with keys ``name`` (registry key),
        ``summary`` (first line of the docstring), ``reference`` (citation string),
        ``status`` (published with constants from memory / practice / approximation / not
        a model), ``validity`` (stated range of the impact variables and its provenance),
        ``default_angle_cap`` ([°] or ``None`` for no cap), ``parameters`` (list of dicts
        with ``name``, ``unit``, ``description``, ``default`` — ``None`` when required or
        optional without default — and ``material`` — the definition key that can supply
        it, or ``None``), ``options`` (string keys with their choices) and ``keys`` (every
        key a shield definition for this equation may contain).
    """
    out = []
    for name in sorted(_SPECS):
        spec = _SPECS[name]
        doc = (spec.function.__doc__ or "").strip().splitlines()
        out.append(
            {
                "name": name,
                "summary": doc[0].strip() if doc else "",
                "reference": spec.reference,
                "status": spec.status,
                "validity": spec.validity,
                "default_angle_cap": spec.default_angle_cap,
                "parameters": [
                    {
                        "name": q.name,
                        "unit": q.unit,
                        "description": q.description,
                        "default": q.default,
                        "material": q.material_key,
                    }
                    for q in spec.quantities
                ],
                "options": [
                    {"name": o.name, "choices": list(o.choices), "default": o.default,
                     "description": o.description}
                    for o in spec.options
                ],
                "keys": _valid_keys(spec),
            }
        )
    return out
