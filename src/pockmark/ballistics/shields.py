"""Shield definitions: from a user's table of keys to a callable critical diameter.

Scope: turning one shield definition, as read from a case file (a TOML table such as
``[shields.bus_wall]``), into a :class:`Shield` whose parameters are fully resolved numbers in
canonical units. Material names are looked up in :data:`pockmark.ballistics.materials.MATERIALS`;
explicit numeric keys override the material. Every problem raises
:class:`~pockmark.errors.InputError` with a one-line message that names the shield tag and
the key.

Contents
--------
Shield
    Resolved shield: equation name, parameters, areal density and ``critical_diameter``.
make_shield
    Validate and resolve one definition.
describe_equations
    Name, summary, reference and parameters (with units) of each equation, for
    documentation and the command line.

Examples of definitions
-----------------------
``{"equation": "christiansen_1993", "bumper_thickness": 0.127, "bumper_material": "Al6061-T6",
"standoff": 10.0, "rear_wall_thickness": 0.3175, "rear_wall_material": "Al2219-T87"}``

``{"equation": "cour_palais_1987", "wall_thickness": 0.2, "wall_material": "Al6061-T6",
"failure": "detached_spall"}``

``{"equation": "threshold_diameter", "diameter": 0.1}``
"""

import difflib
import math
from collections.abc import Mapping
from dataclasses import dataclass, field

from pockmark.ballistics.materials import MATERIALS, get_material
from pockmark.ballistics.single_wall import FAILURE_COEFFICIENTS, cour_palais_1987
from pockmark.ballistics.threshold import threshold_diameter
from pockmark.ballistics.whipple import christiansen_1993
from pockmark.errors import InputError

__all__ = ["Shield", "make_shield", "describe_equations"]

#: Converts thickness [cm] × density [g cm⁻³] = [g cm⁻²] to areal density [kg m⁻²].
_G_PER_CM2_IN_KG_PER_M2 = 10.0


@dataclass(frozen=True)
class _Quantity:
    """One numeric input of a shield definition."""

    name: str
    unit: str
    description: str
    material_key: str | None = None  # definition key of the material that can supply it
    material_field: str | None = None  # attribute of Material that supplies it
    default: float | None = None
    choice_key: str | None = None  # definition key naming a value from `choices`
    choices: Mapping | None = None
    to_equation: bool = True  # False: used only for the areal density


@dataclass(frozen=True)
class _EquationSpec:
    function: object
    reference: str
    quantities: tuple
    material_keys: tuple = ()
    layers: tuple = ()  # (thickness name, density name) pairs summed into the areal density


_SPECS = {
    "cour_palais_1987": _EquationSpec(
        function=cour_palais_1987,
        reference=(
            "B. G. Cour-Palais, \"Hypervelocity impact in metals, glass and composites,\" "
            "Int. J. Impact Eng., vol. 5, pp. 221-237, 1987, doi:10.1016/0734-743X(87)90040-0; "
            "as given in E. L. Christiansen, \"Meteoroid/Debris Shielding,\" "
            "NASA/TP-2003-210788, 2003"
        ),
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
            _Quantity(
                "failure_coefficient", "unitless",
                "failure thickness / crater depth (or give 'failure' by name)",
                default=FAILURE_COEFFICIENTS["perforation"],
                choice_key="failure", choices=FAILURE_COEFFICIENTS,
            ),
        ),
        material_keys=("wall_material",),
        layers=(("wall_thickness", "wall_density"),),
    ),
    "christiansen_1993": _EquationSpec(
        function=christiansen_1993,
        reference=(
            "E. L. Christiansen, \"Design and performance equations for advanced meteoroid "
            "and debris shields,\" Int. J. Impact Eng., vol. 14, pp. 145-156, 1993, "
            "doi:10.1016/0734-743X(93)90016-Z; E. L. Christiansen, "
            "\"Meteoroid/Debris Shielding,\" NASA/TP-2003-210788, 2003"
        ),
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
                "rear_wall_material", "density", to_equation=False,
            ),
        ),
        material_keys=("bumper_material", "rear_wall_material"),
        layers=(
            ("bumper_thickness", "bumper_density"),
            ("rear_wall_thickness", "rear_wall_density"),
        ),
    ),
    "threshold_diameter": _EquationSpec(
        function=threshold_diameter,
        reference="not a published model: constant critical diameter for impact counting and tests",
        quantities=(_Quantity("diameter", "cm", "threshold diameter"),),
    ),
}


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
        Keyword arguments of the equation, fully resolved numbers in canonical units.
    areal_density : float
        Areal density of the build-up [kg m⁻²], the sum of thickness × density over the
        layers the equation knows about (0 for ``threshold_diameter``, which models no wall).
    """

    tag: str
    equation: str
    parameters: dict = field(hash=False)
    areal_density: float

    def critical_diameter(self, impact_velocity, impact_angle, projectile_density):
        """Critical projectile diameter of this shield.

        Parameters
        ----------
        impact_velocity : numeric
            Impact speed [km s⁻¹].
        impact_angle : numeric
            Impact angle from the surface normal [°].
        projectile_density : numeric
            Projectile density [g cm⁻³].

        Returns
        -------
        numpy.ndarray
            Critical diameter [cm], float64, broadcast shape of the arguments; ``inf`` where
            there is no impact.
        """
        try:
            function = _SPECS[self.equation].function
        except KeyError:
            raise InputError(
                f"shield {self.tag!r}: unknown equation {self.equation!r}; "
                f"choose one of: {', '.join(sorted(_SPECS))}"
            ) from None
        return function(impact_velocity, impact_angle, projectile_density, **self.parameters)


def _valid_keys(spec):
    keys = {"equation", *spec.material_keys}
    for quantity in spec.quantities:
        keys.add(quantity.name)
        if quantity.choice_key:
            keys.add(quantity.choice_key)
    return sorted(keys)


def _is_number(value):
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def _resolve(tag, equation, spec, definition, materials):
    """Value of every quantity of ``spec``: explicit key, named choice, material, default."""
    values = {}
    for quantity in spec.quantities:
        name = quantity.name
        choice_key = quantity.choice_key
        if name in definition and choice_key and choice_key in definition:
            raise InputError(
                f"shield {tag!r}: keys {choice_key!r} and {name!r} both given; "
                f"give only one ({choice_key!r} by name, or {name!r} as a number)"
            )
        if name in definition:
            value = definition[name]
            if not _is_number(value):
                raise InputError(
                    f"shield {tag!r}: key {name!r} must be a number [{quantity.unit}]; "
                    f"got {value!r} of type {type(value).__name__}"
                )
            value = float(value)
            if not (math.isfinite(value) and value > 0.0):
                raise InputError(
                    f"shield {tag!r}: key {name!r} must be positive and finite "
                    f"[{quantity.unit}]; got {value:g}"
                )
        elif choice_key and choice_key in definition:
            choice = definition[choice_key]
            if not isinstance(choice, str) or choice not in quantity.choices:
                raise InputError(
                    f"shield {tag!r}: unknown {choice_key} {choice!r} for key {choice_key!r}; "
                    f"choose one of: {', '.join(sorted(quantity.choices))}"
                )
            value = float(quantity.choices[choice])
        elif quantity.material_key and quantity.material_key in materials:
            value = float(getattr(materials[quantity.material_key], quantity.material_field))
        elif quantity.default is not None:
            value = float(quantity.default)
        else:
            how = f"give {name!r} [{quantity.unit}]"
            if quantity.material_key:
                how += (
                    f" or {quantity.material_key!r} (one of: {', '.join(sorted(MATERIALS))})"
                )
            raise InputError(f"shield {tag!r}: missing key {name!r} for {equation}; {how}")
        values[name] = value
    return values


def make_shield(tag, definition):
    """Validate a shield definition and resolve it into a :class:`Shield`.

    Parameters
    ----------
    tag : str
        Name of the shield; it prefixes every error message.
    definition : mapping
        Keys and values as read from a case-file table: ``equation`` (a key of
        :data:`pockmark.ballistics.EQUATIONS`), the equation's numeric parameters in
        canonical units, optional ``*_material`` names (keys of
        :data:`~pockmark.ballistics.materials.MATERIALS`) that supply density, Brinell
        hardness, sound speed and yield strength, and for ``cour_palais_1987`` an optional
        ``failure`` name (a key of
        :data:`~pockmark.ballistics.single_wall.FAILURE_COEFFICIENTS`). Explicit numbers
        override values from a material.

    Returns
    -------
    Shield

    Raises
    ------
    InputError
        For a missing or unknown key, a value of the wrong type, an unknown equation,
        material or failure name, a non-positive or non-finite number, or both ``failure``
        and ``failure_coefficient``. The message is one line naming the tag and the key.

    Notes
    -----
    ``christiansen_1993`` needs the rear-wall density only for the areal density; give
    ``rear_wall_density`` [g cm⁻³] when no ``rear_wall_material`` is given. When
    ``failure`` and ``failure_coefficient`` are both absent, ``cour_palais_1987`` uses
    perforation (k = 1.8).

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

    materials = {}
    for key in spec.material_keys:
        if key in definition:
            try:
                materials[key] = get_material(definition[key])
            except InputError as error:
                raise InputError(f"shield {tag!r}: key {key!r}: {error}") from None

    values = _resolve(tag, equation, spec, definition, materials)
    parameters = {q.name: values[q.name] for q in spec.quantities if q.to_equation}
    areal_density = _G_PER_CM2_IN_KG_PER_M2 * sum(
        values[thickness] * values[density] for thickness, density in spec.layers
    )
    return Shield(tag=tag, equation=equation, parameters=parameters,
                  areal_density=float(areal_density))


def describe_equations():
    """Describe every registered ballistic-limit equation.

    Returns
    -------
    list of dict
        One dict per equation, sorted by name, with keys ``name`` (registry key),
        ``summary`` (first line of the docstring), ``reference`` (citation string),
        ``parameters`` (list of dicts with ``name``, ``unit``, ``description``,
        ``default`` — ``None`` when required — and ``material`` — the definition key
        that can supply it, or ``None``) and ``keys`` (every key a shield definition for
        this equation may contain).
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
                "keys": _valid_keys(spec),
            }
        )
    return out
