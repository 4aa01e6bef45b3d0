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
christiansen_1995_multi_shock
    Multi-shock shield (spaced Nextel bumpers, aluminium rear wall).
ryan_2008_aluminium, ryan_2008_cfrp
    Honeycomb sandwich panel with aluminium or CFRP face sheets (published fit with a
    channelling knock-down).
schafer_2008_aluminium, schafer_2008_cfrp
    Triple wall: equipment wall behind an aluminium- or CFRP-sheet sandwich panel (SRL).
christiansen_2009_mli
    Aluminium wall behind a baseline thermal blanket (MLI) at the tested 1.5 cm standoff.
sandwich_summed_face_sheets
    Honeycomb sandwich panel (aluminium or CFRP face sheets) bounded by one wall of the
    summed face sheets; common practice, no source, conservative.
sandwich_whipple_approximation
    Honeycomb sandwich panel treated as a Whipple shield; known to be non-conservative.
tabulated_diameter
    User table over speed and angle, bilinear; not a published model.
threshold_diameter
    Constant critical diameter; not a published model (impact counting and tests).

Not implemented: the modified Christiansen equation of Taylor et al. (1999) for CFRP
honeycomb panels (constants not found), the handbook's toughened-blanket equation and the
fabric-rear-wall and hybrid multi-shock variants (their transcriptions are inconsistent; see
the module docstrings).

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

Provenance of the constants: those of cour_palais_1987, christiansen_1993 and
christiansen_1995 were first recalled from memory and later compared with a second-hand
transcription (an open-source library of ballistic-limit equations by S. Ryan, who co-wrote
several of the sources); those of the multi-shock, honeycomb, triple-wall and MLI equations
were read in that transcription only. None has been checked against the printed pages; each
docstring says what was compared and what differs.
"""

import inspect

from pockmark.ballistics._common import ValidityRange
from pockmark.ballistics.blanket import christiansen_2009_mli
from pockmark.ballistics.materials import (
    MATERIAL_KEYS,
    MATERIALS,
    Material,
    get_material,
    make_material,
)
from pockmark.ballistics.multi_shock import christiansen_1995_multi_shock
from pockmark.ballistics.sandwich import (
    ryan_2008_aluminium,
    ryan_2008_cfrp,
    sandwich_summed_face_sheets,
    sandwich_whipple_approximation,
)
from pockmark.ballistics.shields import MLI_TREATMENTS, Shield, describe_equations, make_shield
from pockmark.ballistics.single_wall import FAILURE_COEFFICIENTS, cour_palais_1987
from pockmark.ballistics.stuffed_whipple import christiansen_1995
from pockmark.ballistics.tabulated import tabulated_diameter
from pockmark.ballistics.threshold import threshold_diameter
from pockmark.ballistics.triple_wall import schafer_2008_aluminium, schafer_2008_cfrp
from pockmark.ballistics.whipple import christiansen_1993
from pockmark.errors import InputError

__all__ = [
    "EQUATIONS",
    "critical_diameter",
    "cour_palais_1987",
    "christiansen_1993",
    "christiansen_1995",
    "christiansen_1995_multi_shock",
    "christiansen_2009_mli",
    "ryan_2008_aluminium",
    "ryan_2008_cfrp",
    "schafer_2008_aluminium",
    "schafer_2008_cfrp",
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
        christiansen_1995_multi_shock,
        ryan_2008_aluminium,
        ryan_2008_cfrp,
        schafer_2008_aluminium,
        schafer_2008_cfrp,
        christiansen_2009_mli,
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
    EQUATIONS : every registered equation.

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
