"""Ballistic-limit equations: the smallest particle that fails a wall.

Scope: for each wall type, the critical projectile diameter d_c [cm] as a function of the
impact speed [km s⁻¹], the impact angle from the surface normal [°] and the projectile
density [g cm⁻³]. A particle of diameter ≥ d_c fails the wall by the equation's criterion.
Every equation is a plain vectorised function named after its source; :data:`EQUATIONS`
registers them under the same names and :func:`critical_diameter` dispatches by name.

Equations
---------
cour_palais_1987
    Single metallic wall (modified Cour-Palais); perforation, detached or incipient spall.
christiansen_1993
    Aluminium Whipple shield (bumper, empty gap, rear wall); three velocity regimes.
threshold_diameter
    Constant critical diameter; not a published model (impact counting and tests).

Common behaviour: inputs broadcast as numpy arrays; the result is a float64 ndarray (0-d for
scalar inputs); no impact (speed ≤ 0 or angle ≥ 90°) gives ``inf``; NaN impact conditions give
NaN; physically impossible parameters raise :class:`~pockmark.errors.InputError`. This version
applies no obliquity cap and emits no model-range warnings; each function's Notes state its
fitted range.

Supporting modules: :mod:`~pockmark.ballistics.materials` (named wall materials) and
:mod:`~pockmark.ballistics.shields` (case-file shield definitions → :class:`Shield`).

Every equation constant in this subpackage was recalled from memory of the cited documents
(see the shared reference note on ballistic limits) and has not yet been checked against the
printed pages.
"""

import inspect

from pockmark.ballistics.materials import MATERIALS, Material, get_material
from pockmark.ballistics.shields import Shield, describe_equations, make_shield
from pockmark.ballistics.single_wall import FAILURE_COEFFICIENTS, cour_palais_1987
from pockmark.ballistics.threshold import threshold_diameter
from pockmark.ballistics.whipple import christiansen_1993
from pockmark.errors import InputError

__all__ = [
    "EQUATIONS",
    "critical_diameter",
    "cour_palais_1987",
    "christiansen_1993",
    "threshold_diameter",
    "FAILURE_COEFFICIENTS",
    "Material",
    "MATERIALS",
    "get_material",
    "Shield",
    "make_shield",
    "describe_equations",
]

EQUATIONS = {
    function.__name__: function
    for function in (cour_palais_1987, christiansen_1993, threshold_diameter)
}
"""Registry of ballistic-limit equations: {name: function}. Keys equal function names."""

_IMPACT_ARGUMENTS = ("impact_velocity", "impact_angle", "projectile_density")


def critical_diameter(impact_velocity, impact_angle, projectile_density, equation, **parameters):
    """Critical projectile diameter from a named ballistic-limit equation.

    Parameters
    ----------
    impact_velocity : numeric
        Impact speed [km s⁻¹]. Values ≤ 0 mean no impact and give ``inf``.
    impact_angle : numeric
        Impact angle from the surface normal [°], in [0, 180]. Angles ≥ 90 give ``inf``.
    projectile_density : numeric
        Projectile density [g cm⁻³].
    equation : str
        Key of :data:`EQUATIONS`: ``"cour_palais_1987"``, ``"christiansen_1993"`` or
        ``"threshold_diameter"``.
    **parameters
        Shield parameters of that equation, in canonical units (see its docstring).

    Returns
    -------
    numpy.ndarray
        Critical diameter [cm], float64, broadcast shape of the arguments (0-d for scalars).

    Raises
    ------
    InputError
        If ``equation`` is unknown, a parameter is missing or not accepted by the equation,
        or a value is outside its physical domain.

    See Also
    --------
    cour_palais_1987, christiansen_1993, threshold_diameter

    Examples
    --------
    >>> float(critical_diameter(7.0, 0.0, 2.8, "threshold_diameter", diameter=0.2))
    0.2
    """
    try:
        function = EQUATIONS[equation]
    except (KeyError, TypeError):
        raise InputError(
            f"unknown ballistic-limit equation {equation!r}; "
            f"choose one of: {', '.join(sorted(EQUATIONS))}"
        ) from None
    signature = inspect.signature(function)
    accepted = [name for name in signature.parameters if name not in _IMPACT_ARGUMENTS]
    unknown = sorted(set(parameters) - set(accepted))
    if unknown:
        raise InputError(
            f"{equation} does not take parameter(s) {', '.join(unknown)}; "
            f"its parameters are: {', '.join(accepted)}"
        )
    missing = [
        name
        for name in accepted
        if name not in parameters
        and signature.parameters[name].default is inspect.Parameter.empty
    ]
    if missing:
        raise InputError(
            f"{equation} is missing parameter(s) {', '.join(missing)}; "
            f"its parameters are: {', '.join(accepted)}"
        )
    return function(impact_velocity, impact_angle, projectile_density, **parameters)
