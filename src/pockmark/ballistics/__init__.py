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
    Aluminium Whipple shield (bumper, empty gap, rear wall); three regimes on V cos θ.
christiansen_1995
    Stuffed Whipple shield (bumper, Nextel/Kevlar blanket, rear wall); three regimes on the
    total speed with angle-dependent limits.
sandwich_summed_face_sheets
    Honeycomb sandwich panel (aluminium or CFRP face sheets) bounded by one wall of the
    summed face sheets; common practice, no source, conservative.
sandwich_whipple_approximation
    Honeycomb sandwich panel treated as a Whipple shield; known to be non-conservative.
tabulated_diameter
    User table over speed and angle, bilinear; not a published model.
threshold_diameter
    Constant critical diameter; not a published model (impact counting and tests).

Not implemented, because their constants could not be read in a source (shared reference
note on ballistic limits, §2.5-§2.8): multi-shock shields, the published honeycomb-panel
equations (aluminium and CFRP face sheets), triple-wall forms for equipment behind a panel,
and a fitted MLI equation (a practice allowance is offered as a shield option instead).

Common behaviour: inputs broadcast as numpy arrays; the result is a float64 ndarray (0-d for
scalar inputs); no impact (speed ≤ 0 or angle ≥ 90°) gives ``inf``; NaN impact conditions give
NaN; physically impossible parameters raise :class:`~pockmark.errors.InputError`. The
functions apply no obliquity cap and emit no model-range warnings; each function's Notes state
its validity range and what it does outside it. Shields built by :func:`make_shield` add an
optional obliquity cap and :meth:`Shield.out_of_range`, which flags impacts outside the
stated range so that a run can report the flux that fell there.

Supporting modules: :mod:`~pockmark.ballistics.materials` (named wall materials, user
materials) and :mod:`~pockmark.ballistics.shields` (case-file shield definitions →
:class:`Shield`).

Every equation constant in this subpackage was recalled from memory of the cited documents
(see the shared reference note on ballistic limits) and has not yet been checked against the
printed pages.
"""

import inspect

from pockmark.ballistics._common import ValidityRange
from pockmark.ballistics.materials import (
    MATERIAL_KEYS,
    MATERIALS,
    Material,
    get_material,
    make_material,
)
from pockmark.ballistics.sandwich import (
    sandwich_summed_face_sheets,
    sandwich_whipple_approximation,
)
from pockmark.ballistics.shields import MLI_TREATMENTS, Shield, describe_equations, make_shield
from pockmark.ballistics.single_wall import FAILURE_COEFFICIENTS, cour_palais_1987
from pockmark.ballistics.stuffed_whipple import christiansen_1995
from pockmark.ballistics.tabulated import tabulated_diameter
from pockmark.ballistics.threshold import threshold_diameter
from pockmark.ballistics.whipple import christiansen_1993
from pockmark.errors import InputError

__all__ = [
    "EQUATIONS",
    "critical_diameter",
    "cour_palais_1987",
    "christiansen_1993",
    "christiansen_1995",
    "sandwich_summed_face_sheets",
    "sandwich_whipple_approximation",
    "tabulated_diameter",
    "threshold_diameter",
    "FAILURE_COEFFICIENTS",
    "MLI_TREATMENTS",
    "Material",
    "MATERIALS",
    "MATERIAL_KEYS",
    "make_material",
    "get_material",
    "Shield",
    "ValidityRange",
    "make_shield",
    "describe_equations",
]

EQUATIONS = {
    function.__name__: function
    for function in (
        cour_palais_1987,
        christiansen_1993,
        christiansen_1995,
        sandwich_summed_face_sheets,
        sandwich_whipple_approximation,
        tabulated_diameter,
        threshold_diameter,
    )
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
        Key of :data:`EQUATIONS`, e.g. ``"cour_palais_1987"``, ``"christiansen_1993"``,
        ``"christiansen_1995"`` or ``"threshold_diameter"``.
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
    cour_palais_1987, christiansen_1993, christiansen_1995, sandwich_summed_face_sheets,
    sandwich_whipple_approximation, tabulated_diameter, threshold_diameter

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
