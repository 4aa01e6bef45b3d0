"""Ballistic limit of a multi-shock shield (spaced ceramic-fabric bumpers, aluminium rear wall).

Models
------
christiansen_1995_multi_shock
    Three-regime critical diameter of a shield of several (typically four) spaced Nextel
    fabric bumpers in front of an aluminium rear wall; failure = perforation or detached
    spall of the rear wall. The multi-shock concept is Cour-Palais and Crews (1990); the
    equation is from Christiansen et al. (1995), as restated in NASA/TP-2003-210788.

Variants not implemented: the fabric rear wall and the "hybrid" shield of later JSC
documents (their transcription holds two different hypervelocity coefficients).
"""

import numpy as np

from pockmark._validation import require_positive
from pockmark.ballistics._common import _finish, _impact_conditions, _three_regimes
from pockmark.constants import KSI_IN_MPA

__all__ = ["christiansen_1995_multi_shock"]

# Constants, read second-hand (see the docstring): low- and high-speed coefficients, the
# areal-density-to-aluminium-thickness factor, and the total-speed regime limits
# V_L = 2.4 / cos^(1/2) θ and V_H = 6.4 / cos^(1/4) θ [km s⁻¹].
_LOW_SPEED_COEFFICIENT = 2.0
_HIGH_SPEED_COEFFICIENT = 0.358
_AREAL_DENSITY_FACTOR = 0.37
_LOW_SPEED_LIMIT, _LOW_SPEED_LIMIT_EXPONENT = 2.4, 0.5
_HIGH_SPEED_LIMIT, _HIGH_SPEED_LIMIT_EXPONENT = 6.4, 0.25


def regime_speeds(cos_angle):
    """Total-speed limits (V_L, V_H) of the three regimes [km s⁻¹] at a given cos θ."""
    return (
        _LOW_SPEED_LIMIT / cos_angle**_LOW_SPEED_LIMIT_EXPONENT,
        _HIGH_SPEED_LIMIT / cos_angle**_HIGH_SPEED_LIMIT_EXPONENT,
    )


def christiansen_1995_multi_shock(
    impact_velocity,
    impact_angle,
    projectile_density,
    bumper_areal_density,
    standoff,
    rear_wall_thickness,
    rear_wall_density,
    rear_wall_yield_strength,
):
    r"""Critical projectile diameter for a multi-shock shield with an aluminium rear wall.

    Parameters
    ----------
    impact_velocity : numeric
        Impact speed [km s⁻¹]. Values ≤ 0 mean no impact and give ``inf``.
    impact_angle : numeric
        Impact angle from the surface normal [°], in [0, 180]. Angles ≥ 90 give ``inf``.
    projectile_density : numeric
        Density of the (spherical) projectile [g cm⁻³].
    bumper_areal_density : numeric
        Total areal density of all the fabric bumpers [g cm⁻²].
    standoff : numeric
        Overall spacing from the first bumper to the rear wall [cm].
    rear_wall_thickness : numeric
        Aluminium rear-wall thickness [cm].
    rear_wall_density : numeric
        Rear-wall density [g cm⁻³].
    rear_wall_yield_strength : numeric
        Rear-wall yield strength, 0.2 % offset [MPa].

    Returns
    -------
    numpy.ndarray
        Critical projectile diameter [cm] for perforation or detached spall of the rear
        wall; float64, broadcast shape of the arguments. ``inf`` where there is no impact,
        NaN where an impact condition is NaN.

    Raises
    ------
    InputError
        If a shield parameter or ``projectile_density`` is not positive and finite, if
        ``impact_angle`` is outside [0, 180] or if ``impact_velocity`` is infinite.

    Notes
    -----
    With :math:`m_B` the bumpers' areal density, :math:`t_w, \rho_w` the rear wall's thickness
    and density, :math:`S` the overall spacing and :math:`\sigma` the rear wall's yield
    strength in ksi, regimes are chosen on the **total** speed against angle-dependent limits
    :math:`V_L = 2.4/\cos^{1/2}\theta` and :math:`V_H = 6.4/\cos^{1/4}\theta`:

    .. math::

        d_{\mathrm{LV}} = 2.0\, \frac{t_w (\sigma/40)^{1/2} + 0.37\, m_B}
            {\cos^{4/3}\theta\, \rho_p^{1/2} V^{2/3}},
        \qquad
        d_{\mathrm{HV}} = 0.358\, \frac{(t_w \rho_w)^{1/3} (\sigma/40)^{1/6} S^{2/3}}
            {\rho_p^{1/3} V^{1/3} \cos^{1/3}\theta}

    and a straight line in :math:`V` between the end equations evaluated at the limits
    (continuous by construction). Above 88.9° the limits cross (:math:`V_L > V_H`): there
    is no intermediate regime and :math:`d_c` drops at :math:`V_L`. Shields built with
    :func:`~pockmark.ballistics.make_shield` cap the obliquity at 75° by default, as the
    transcription does for the related hybrid multi-shock shield.

    Unlike the Whipple equation, the low-speed branch has no 18/19 power. The structure is
    that of the stuffed-Whipple equation (:func:`~pockmark.ballistics.christiansen_1995`),
    with the fabric bumpers as the front areal density.

    **Provenance.** The form and constants (2.0, 0.358, 0.37, 2.4, 6.4 and the exponents)
    were read in a second-hand transcription: an open-source library of ballistic-limit
    equations by S. Ryan (pyBLOSSUM, MIT licence, commit c9aa929) citing equations 4-25 to
    4-37 of [2]_; not on the printed pages. No published test point was available to check
    them; the tests check the form's properties only.

    **Validity range.** Aluminium spheres on shields of four Nextel bumpers (the test base of
    [1]_, [2]_), light-gas-gun speeds up to about 7–8 km s⁻¹, obliquities up to about 60°
    (from memory, low confidence). Evaluated without clipping outside it;
    :meth:`pockmark.ballistics.Shield.out_of_range` flags such impacts.

    See Also
    --------
    pockmark.ballistics.christiansen_1995 : Stuffed Whipple shield.

    References
    ----------
    .. [1] B. G. Cour-Palais and J. L. Crews, "A multi-shock concept for spacecraft
       shielding," Int. J. Impact Eng., vol. 10, pp. 135–146, 1990.
    .. [2] E. L. Christiansen, "Meteoroid/Debris Shielding," NASA, Houston, TX, USA,
       Tech. Paper NASA/TP-2003-210788, 2003; after E. L. Christiansen, J. L. Crews,
       J. E. Williamsen, J. H. Robinson and A. M. Nolen, "Enhanced meteoroid and orbital
       debris shielding," Int. J. Impact Eng., vol. 17, pp. 217–228, 1995.

    Examples
    --------
    >>> from pockmark.ballistics import christiansen_1995_multi_shock
    >>> float(christiansen_1995_multi_shock(7.0, 0.0, 2.8, 0.4, 15.0, 0.16, 2.84, 393.0))
    ... # doctest: +ELLIPSIS
    0.65...
    """
    velocity, angle, density = _impact_conditions(
        impact_velocity, impact_angle, projectile_density
    )
    m_b = require_positive("bumper_areal_density", bumper_areal_density, "g cm⁻²")
    s = require_positive("standoff", standoff, "cm")
    t_w = require_positive("rear_wall_thickness", rear_wall_thickness, "cm")
    rho_w = require_positive("rear_wall_density", rear_wall_density, "g cm⁻³")
    sigma_ksi = require_positive(
        "rear_wall_yield_strength", rear_wall_yield_strength, "MPa") / KSI_IN_MPA
    cos_angle = np.cos(np.radians(angle))

    def low_speed(v):
        resisting = t_w * np.sqrt(sigma_ksi / 40.0) + _AREAL_DENSITY_FACTOR * m_b
        return _LOW_SPEED_COEFFICIENT * resisting / (
            cos_angle ** (4.0 / 3.0) * np.sqrt(density) * v ** (2.0 / 3.0))

    def high_speed(v):
        return (
            _HIGH_SPEED_COEFFICIENT * (t_w * rho_w) ** (1.0 / 3.0)
            * (sigma_ksi / 40.0) ** (1.0 / 6.0) * s ** (2.0 / 3.0)
            / (density ** (1.0 / 3.0) * v ** (1.0 / 3.0) * cos_angle ** (1.0 / 3.0))
        )

    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        v_low, v_high = regime_speeds(cos_angle)
        critical = _three_regimes(velocity, v_low, v_high, low_speed, high_speed)
    return _finish(critical, velocity, angle)
