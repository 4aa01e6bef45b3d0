"""Ballistic limit of a thermal blanket (MLI) standing off an aluminium wall.

Models
------
christiansen_2009_mli
    Three-regime critical diameter of an aluminium wall covered by a baseline
    multi-layer-insulation blanket (aluminised polymer films) 1.5 cm in front of it; failure
    = perforation or detached spall of the wall. From the NASA shielding design handbook.

The blanket as part of other build-ups: :func:`~pockmark.ballistics.ryan_2008_aluminium`,
:func:`~pockmark.ballistics.ryan_2008_cfrp` and the triple-wall equations take an outer
blanket's areal density as published with them; the Whipple and stuffed-Whipple shields offer
the practice options of :data:`~pockmark.ballistics.MLI_TREATMENTS`. The handbook's
"toughened" blanket (Nextel and Kevlar layers added) is not implemented: its transcription
gives it a smaller hypervelocity critical diameter than the baseline blanket, which cannot be
right for a tougher blanket, so the constants are in doubt.
"""

import numpy as np

from pockmark._validation import require_positive
from pockmark.ballistics._common import _finish, _impact_conditions, _three_regimes

__all__ = ["christiansen_2009_mli"]

# Constants, read second-hand (see the docstring).
_LOW_SPEED_COEFFICIENT = 1.7
_AREAL_DENSITY_FACTOR = 0.37
_HIGH_SPEED_COEFFICIENT = 2.9
#: Regime limits V_L = 2.5 / cos θ and V_H = 6 / cos^(1/2) θ [km s⁻¹].
_LOW_SPEED_LIMIT = 2.5
_HIGH_SPEED_LIMIT, _HIGH_SPEED_LIMIT_EXPONENT = 6.0, 0.5
#: The tested build-up: blanket areal density [g cm⁻²] and its standoff from the wall [cm].
TESTED_BLANKET_AREAL_DENSITY = 0.188
TESTED_BLANKET_STANDOFF = 1.5


def regime_speeds(cos_angle):
    """Total-speed limits (V_L, V_H) of the three regimes [km s⁻¹] at a given cos θ."""
    return (
        _LOW_SPEED_LIMIT / cos_angle,
        _HIGH_SPEED_LIMIT / cos_angle**_HIGH_SPEED_LIMIT_EXPONENT,
    )


def christiansen_2009_mli(
    impact_velocity,
    impact_angle,
    projectile_density,
    wall_thickness,
    blanket_areal_density,
):
    r"""Critical projectile diameter for an aluminium wall behind a baseline MLI blanket.

    Parameters
    ----------
    impact_velocity : numeric
        Impact speed [km s⁻¹]. Values ≤ 0 mean no impact and give ``inf``.
    impact_angle : numeric
        Impact angle from the surface normal [°], in [0, 180]. Angles ≥ 90 give ``inf``.
    projectile_density : numeric
        Density of the (spherical) projectile [g cm⁻³].
    wall_thickness : numeric
        Aluminium wall thickness [cm].
    blanket_areal_density : numeric
        Areal density of the blanket [g cm⁻²] (the tested blanket: 0.188).

    Returns
    -------
    numpy.ndarray
        Critical projectile diameter [cm] for failure of the wall; float64, broadcast shape
        of the arguments. ``inf`` where there is no impact, NaN where an impact condition is
        NaN.

    Raises
    ------
    InputError
        If a parameter or ``projectile_density`` is not positive and finite, if
        ``impact_angle`` is outside [0, 180] or if ``impact_velocity`` is infinite.

    Notes
    -----
    With :math:`t_w` the wall thickness and :math:`m` the blanket's areal density, regimes on
    the total speed with limits :math:`V_L = 2.5/\cos\theta` and
    :math:`V_H = 6/\cos^{1/2}\theta`:

    .. math::

        d_{\mathrm{LV}} = 1.7\, \frac{t_w + 0.37\, m}{\cos^{4/3}\theta\, \rho_p^{1/2} V^{2/3}},
        \qquad
        d_{\mathrm{HV}} = 2.9\, \frac{t_w^{2/3}}{\rho_p^{1/3} V^{2/3} \cos^{2/3}\theta}

    and a straight line in :math:`V` between the end equations at the limits (continuous by
    construction). Above 80° the limits cross (:math:`V_L > V_H`): there is no intermediate
    regime and :math:`d_c` drops at :math:`V_L` (by 25 % at 81°). Shields built with
    :func:`~pockmark.ballistics.make_shield` therefore cap the obliquity at 75° by default
    (common practice, no source).

    The hypervelocity branch has no standoff, strength or blanket term: it holds only for
    the tested build-up, a 0.188 g cm⁻² blanket 1.5 cm in front of the wall; shields built
    with :func:`~pockmark.ballistics.make_shield` warn about this.

    **Provenance.** Form and constants (1.7, 0.37, 2.9, 2.5, 6 and the exponents) were read
    in a second-hand transcription: an open-source library of ballistic-limit equations by
    S. Ryan (pyBLOSSUM, MIT licence, commit c9aa929) citing p. 99 of [1]_; not on the
    printed page. No published test point was available to check them.

    **Validity range.** Aluminium projectiles on the tested build-up, light-gas-gun speeds up
    to about 7 km s⁻¹ (from memory, low confidence). Evaluated without clipping outside it.

    References
    ----------
    .. [1] E. L. Christiansen et al., "Handbook for Designing MMOD Protection," NASA, Houston,
       TX, USA, Tech. Memo. NASA/TM-2009-214785, 2009.

    Examples
    --------
    >>> from pockmark.ballistics import christiansen_2009_mli
    >>> float(christiansen_2009_mli(7.0, 0.0, 2.8, 0.1, 0.188))  # doctest: +ELLIPSIS
    0.12...
    """
    velocity, angle, density = _impact_conditions(
        impact_velocity, impact_angle, projectile_density
    )
    t_w = require_positive("wall_thickness", wall_thickness, "cm")
    m = require_positive("blanket_areal_density", blanket_areal_density, "g cm⁻²")
    cos_angle = np.cos(np.radians(angle))

    def low_speed(v):
        return _LOW_SPEED_COEFFICIENT * (t_w + _AREAL_DENSITY_FACTOR * m) / (
            cos_angle ** (4.0 / 3.0) * np.sqrt(density) * v ** (2.0 / 3.0))

    def high_speed(v):
        return _HIGH_SPEED_COEFFICIENT * t_w ** (2.0 / 3.0) / (
            density ** (1.0 / 3.0) * v ** (2.0 / 3.0) * cos_angle ** (2.0 / 3.0))

    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        v_low, v_high = regime_speeds(cos_angle)
        critical = _three_regimes(velocity, v_low, v_high, low_speed, high_speed)
    return _finish(critical, velocity, angle)
