"""Ballistic-limit equations for Whipple shields (a thin bumper, an empty gap, a rear wall).

Models
------
christiansen_1993
    Three-regime (ballistic, shatter, hypervelocity) critical diameter of an aluminium
    Whipple shield, failure = perforation or detached spall of the rear wall. Domain:
    aluminium spheres on all-aluminium Whipple shields with a bumper near the optimum
    thickness.
"""

import numpy as np

from pockmark._validation import require_positive
from pockmark.ballistics._common import _finish, _impact_conditions
from pockmark.constants import KSI_IN_MPA

__all__ = ["christiansen_1993"]

# Constants of Christiansen (1993), all from memory (see shared reference note, §2.3).
# Coefficient of the ballistic (low-speed, Vn ≤ 3 km/s) equation.
_BALLISTIC_COEFFICIENT = 0.6
# Hypervelocity-branch coefficient of the Vn ≥ 7 km/s equation.
_HYPERVELOCITY_COEFFICIENT = 3.918
# Normal-velocity limits of the three regimes [km s⁻¹].
_LOW_SPEED_LIMIT = 3.0
_HIGH_SPEED_LIMIT = 7.0
# Strength normalisations of the rear-wall terms [ksi] (40 ksi ≈ 6061-T6 yield).
_SIGMA_BALLISTIC_KSI = 40.0
_SIGMA_HYPERVELOCITY_KSI = 70.0


def _ballistic(normal_velocity, cos_angle, density, bumper_thickness, rear_wall_thickness,
               sigma_ksi):
    """Low-speed branch written in Vn: cos^(5/3)θ · V^(2/3) = cosθ · Vn^(2/3)."""
    resisting = rear_wall_thickness * np.sqrt(sigma_ksi / _SIGMA_BALLISTIC_KSI) + bumper_thickness
    return (
        resisting
        / (_BALLISTIC_COEFFICIENT * cos_angle * np.sqrt(density) * normal_velocity ** (2.0 / 3.0))
    ) ** (18.0 / 19.0)


def _hypervelocity(normal_velocity, density, bumper_density, standoff, rear_wall_thickness,
                   sigma_ksi):
    """High-speed branch; depends on the angle only through Vn."""
    return (
        _HYPERVELOCITY_COEFFICIENT
        * rear_wall_thickness ** (2.0 / 3.0)
        * density ** (-1.0 / 3.0)
        * bumper_density ** (-1.0 / 9.0)
        * normal_velocity ** (-2.0 / 3.0)
        * standoff ** (1.0 / 3.0)
        * (sigma_ksi / _SIGMA_HYPERVELOCITY_KSI) ** (1.0 / 3.0)
    )


def christiansen_1993(
    impact_velocity,
    impact_angle,
    projectile_density,
    bumper_thickness,
    bumper_density,
    standoff,
    rear_wall_thickness,
    rear_wall_yield_strength,
):
    r"""Critical projectile diameter for an aluminium Whipple shield.

    Parameters
    ----------
    impact_velocity : numeric
        Impact speed [km s⁻¹]. Values ≤ 0 mean no impact and give ``inf``.
    impact_angle : numeric
        Impact angle from the surface normal [°], in [0, 180]. Angles ≥ 90 give ``inf``.
    projectile_density : numeric
        Density of the (spherical) projectile [g cm⁻³].
    bumper_thickness : numeric
        Bumper thickness [cm].
    bumper_density : numeric
        Bumper density [g cm⁻³].
    standoff : numeric
        Spacing from the outer face of the bumper to the rear wall [cm].
    rear_wall_thickness : numeric
        Rear-wall thickness [cm].
    rear_wall_yield_strength : numeric
        Rear-wall tensile yield strength, 0.2 % offset [MPa] (not the ultimate strength).

    Returns
    -------
    numpy.ndarray
        Critical projectile diameter [cm] for perforation or detached spall of the rear
        wall. float64, with the broadcast shape of all arguments (0-d for scalar
        arguments). ``inf`` where there is no impact, NaN where an impact condition is NaN.

    Raises
    ------
    InputError
        If a shield parameter or ``projectile_density`` is not positive and finite, if
        ``impact_angle`` is outside [0, 180] or if ``impact_velocity`` is infinite.

    Notes
    -----
    The regime is chosen on the normal velocity component :math:`V_n = V\cos\theta`
    [km s⁻¹]. With :math:`\sigma` the rear-wall yield strength in ksi, the equations of
    [1]_, as restated in [2]_, are:

    Ballistic regime, :math:`V_n \le 3`:

    .. math::

        d_c = \left[\frac{t_w (\sigma/40)^{1/2} + t_b}
            {0.6\, (\cos\theta)^{5/3}\, \rho_p^{1/2}\, V^{2/3}}\right]^{18/19}

    Hypervelocity regime, :math:`V_n \ge 7`:

    .. math::

        d_c = 3.918\, t_w^{2/3}\, \rho_p^{-1/3}\, \rho_b^{-1/9}\, (V\cos\theta)^{-2/3}
            S^{1/3} (\sigma/70)^{1/3}

    Shatter regime, :math:`3 < V_n < 7`, linear in :math:`V_n` between the two end
    equations evaluated at :math:`V_n = 3` and :math:`V_n = 7`:

    .. math::

        d_c = d_{\mathrm{LV}}\big|_{V_n=3} \left(1.75 - \frac{V_n}{4}\right)
            + d_{\mathrm{HV}}\big|_{V_n=7} \left(\frac{V_n}{4} - 0.75\right)

    **Units.** The equations are stated in cm, g cm⁻³, km s⁻¹ and ksi. All inputs are in
    pockmark's canonical units; only the yield strength is converted, from MPa to ksi
    (1 ksi = 6.894757 MPa), on entry.

    **Deviation from the printed form.** The printed shatter-regime equation carries the
    anchors as the rounded constants 1.248 (= :math:`0.6 \cdot 3^{2/3}` = 1.24805) and
    1.071 (= :math:`3.918 \cdot 7^{-2/3}` = 1.07069), which makes the printed curve jump by
    +3.8e-5 (relative) at :math:`V_n = 3` and −2.85e-4 at :math:`V_n = 7`. This function
    evaluates the anchors exactly from the end equations, so :math:`d_c` is continuous in
    :math:`V_n`; it differs from the printed form by less than 0.03 %.

    **Provenance.** All constants (0.6, 3.918, 3, 7, 40 ksi, 70 ksi and the exponents) are
    from memory (see shared reference note, §2.3); no equation page of [1]_ or [2]_ was read
    when this was written, so equation numbers are not given. Two independent cross-checks
    hold: the sizing equation of [1]_ with :math:`c_w = 0.16` inverts to 3.9177, and the
    single-wall prefactor of :func:`~pockmark.ballistics.cour_palais_1987` for Al 6061-T6
    (0.619) is within 3 % of 0.6. Later the form and every constant were found the same in
    a second-hand transcription (an open-source library of ballistic-limit equations by
    S. Ryan, pyBLOSSUM, commit c9aa929), whose stored results on three published shots this
    function reproduces to ten digits (tests/reference/test_christiansen_1993.py). That
    transcription caps the obliquity at 65° (set ``angle_cap = 65`` on the shield to do the
    same) and records that later JSC practice moved the hypervelocity limit to 8.5–9.1 km s⁻¹
    for projectiles denser than aluminium; neither is applied here by default.

    **Angle dependence.** The ballistic branch scales as :math:`\cos^{-30/19}\theta`
    (diverging at grazing incidence) and the hypervelocity branch as
    :math:`\cos^{-2/3}\theta`; :math:`d_c` is therefore not monotonic in angle or speed.

    **Validity range.** Aluminium spheres on aluminium Whipple shields with a bumper of
    roughly optimum thickness (:math:`t_b \approx 0.2\text{–}0.25\, d\,\rho_p/\rho_b`) and
    :math:`S/d` of order 15–30 or more. Test data reach about 7–8 km s⁻¹; the hypervelocity
    branch above that is an extrapolation (hydrocode-supported). Thin bumpers
    (:math:`t_b/d` well below 0.1–0.2) make the hypervelocity branch non-conservative, and
    the bumper term was fitted for aluminium bumpers. Outside this range the function
    evaluates the same formulas without clipping and without warning;
    :meth:`pockmark.ballistics.Shield.out_of_range` flags impacts above 8 km s⁻¹ (the
    bumper-to-diameter and spacing-to-diameter conditions are not checked). No obliquity cap
    is applied here (the default of shields built with
    :func:`~pockmark.ballistics.make_shield` too; their ``angle_cap`` key sets one): at
    grazing angles below 90° the ballistic branch grows without bound.

    See Also
    --------
    pockmark.ballistics.cour_palais_1987 : Single metallic wall.
    pockmark.ballistics.christiansen_1995 : Stuffed Whipple shield (fabric blanket in the gap).
    pockmark.ballistics.sandwich_whipple_approximation : Sandwich panel taken as a Whipple.
    pockmark.ballistics.threshold_diameter : Constant critical diameter (not a model).

    References
    ----------
    .. [1] E. L. Christiansen, "Design and performance equations for advanced meteoroid and
       debris shields," Int. J. Impact Eng., vol. 14, pp. 145–156, 1993.
       :doi:`10.1016/0734-743X(93)90016-Z` (citation details from memory).
    .. [2] E. L. Christiansen, "Meteoroid/Debris Shielding," NASA, Houston, TX, USA,
       Tech. Paper NASA/TP-2003-210788, 2003.

    Examples
    --------
    >>> from pockmark.ballistics import christiansen_1993
    >>> float(christiansen_1993(7.0, 0.0, 2.8, 0.127, 2.713, 10.0, 0.3175, 275.79))
    ... # doctest: +ELLIPSIS
    0.5657...
    """
    velocity, angle, density = _impact_conditions(
        impact_velocity, impact_angle, projectile_density
    )
    t_b = require_positive("bumper_thickness", bumper_thickness, "cm")
    rho_b = require_positive("bumper_density", bumper_density, "g cm⁻³")
    s = require_positive("standoff", standoff, "cm")
    t_w = require_positive("rear_wall_thickness", rear_wall_thickness, "cm")
    sigma_mpa = require_positive("rear_wall_yield_strength", rear_wall_yield_strength, "MPa")
    sigma_ksi = sigma_mpa / KSI_IN_MPA  # the equations are stated in ksi

    cos_angle = np.cos(np.radians(angle))
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        v_n = velocity * cos_angle
        low = _ballistic(v_n, cos_angle, density, t_b, t_w, sigma_ksi)
        high = _hypervelocity(v_n, density, rho_b, s, t_w, sigma_ksi)
        # Shatter regime: anchors evaluated exactly from the end equations.
        low_anchor = _ballistic(_LOW_SPEED_LIMIT, cos_angle, density, t_b, t_w, sigma_ksi)
        high_anchor = _hypervelocity(_HIGH_SPEED_LIMIT, density, rho_b, s, t_w, sigma_ksi)
        weight = (v_n - _LOW_SPEED_LIMIT) / (_HIGH_SPEED_LIMIT - _LOW_SPEED_LIMIT)
        shatter = low_anchor * (1.0 - weight) + high_anchor * weight
        critical = np.where(
            v_n <= _LOW_SPEED_LIMIT, low, np.where(v_n >= _HIGH_SPEED_LIMIT, high, shatter)
        )
    return _finish(critical, velocity, angle)
