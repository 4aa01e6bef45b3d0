"""Ballistic-limit equations for stuffed Whipple shields (bumper, fabric blanket, rear wall).

Models
------
christiansen_1995
    Three-regime (low, intermediate, high speed) critical diameter of an aluminium bumper,
    an intermediate blanket of ceramic (Nextel) and aramid (Kevlar) fabric in the gap and an
    aluminium rear wall; failure = perforation or detached spall of the rear wall. Domain:
    aluminium spheres, obliquities up to about 65°.

The multi-shock shield equation of the same paper is in
:mod:`pockmark.ballistics.multi_shock`.
"""

import numpy as np

from pockmark._validation import require_positive
from pockmark.ballistics._common import _finish, _impact_conditions
from pockmark.constants import KSI_IN_MPA

__all__ = ["christiansen_1995"]

# Constants of Christiansen et al. (1995), all from memory (shared reference note, §2.4).
# Low-speed coefficient and the areal-density-to-aluminium-thickness factor (≈ 1/2.7).
_LOW_SPEED_COEFFICIENT = 2.2
_AREAL_DENSITY_FACTOR = 0.37
# High-speed coefficient.
_HIGH_SPEED_COEFFICIENT = 0.6
# Regime limits on the total speed: V_L = 2.6 / cos^(1/2) θ, V_H = 6.5 / cos^(3/4) θ [km s⁻¹].
_LOW_SPEED_LIMIT = 2.6
_LOW_SPEED_LIMIT_EXPONENT = 0.5
_HIGH_SPEED_LIMIT = 6.5
_HIGH_SPEED_LIMIT_EXPONENT = 0.75
# Strength normalisation of the rear-wall terms [ksi].
_SIGMA_KSI = 40.0


def _regime_speeds(cos_angle):
    """Total-speed limits (V_L, V_H) of the three regimes [km s⁻¹] at a given cos θ."""
    return (
        _LOW_SPEED_LIMIT / cos_angle**_LOW_SPEED_LIMIT_EXPONENT,
        _HIGH_SPEED_LIMIT / cos_angle**_HIGH_SPEED_LIMIT_EXPONENT,
    )


def _low_speed(velocity, cos_angle, density, front_areal_density, rear_wall_thickness,
               sigma_ksi):
    resisting = (
        rear_wall_thickness * np.sqrt(sigma_ksi / _SIGMA_KSI)
        + _AREAL_DENSITY_FACTOR * front_areal_density
    )
    return _LOW_SPEED_COEFFICIENT * (
        resisting / (cos_angle ** (4.0 / 3.0) * np.sqrt(density) * velocity ** (2.0 / 3.0))
    ) ** (18.0 / 19.0)


def _high_speed(velocity, cos_angle, density, standoff, rear_wall_thickness,
                rear_wall_density, sigma_ksi):
    return (
        _HIGH_SPEED_COEFFICIENT
        * (rear_wall_thickness * rear_wall_density) ** (1.0 / 3.0)
        * density ** (-1.0 / 3.0)
        * velocity ** (-1.0 / 3.0)
        * cos_angle ** (-0.5)
        * standoff ** (2.0 / 3.0)
        * (sigma_ksi / _SIGMA_KSI) ** (1.0 / 6.0)
    )


def christiansen_1995(
    impact_velocity,
    impact_angle,
    projectile_density,
    front_areal_density,
    standoff,
    rear_wall_thickness,
    rear_wall_density,
    rear_wall_yield_strength,
):
    r"""Critical projectile diameter for a stuffed Whipple shield (Nextel/Kevlar blanket).

    Parameters
    ----------
    impact_velocity : numeric
        Impact speed [km s⁻¹]. Values ≤ 0 mean no impact and give ``inf``.
    impact_angle : numeric
        Impact angle from the surface normal [°], in [0, 180]. Angles ≥ 90 give ``inf``.
    projectile_density : numeric
        Density of the (spherical) projectile [g cm⁻³].
    front_areal_density : numeric
        Total areal density of every layer in front of the rear wall: the aluminium bumper
        plus the Nextel/Kevlar blanket (and any other layer counted ahead of the rear wall)
        [g cm⁻²].
    standoff : numeric
        Overall spacing from the outer bumper to the rear wall [cm].
    rear_wall_thickness : numeric
        Rear-wall thickness [cm].
    rear_wall_density : numeric
        Rear-wall density [g cm⁻³].
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
    With :math:`m_b` the front areal density [g cm⁻²], :math:`t_w, \rho_w` the rear-wall
    thickness and density, :math:`S` the spacing and :math:`\sigma` the rear-wall yield
    strength in ksi, the regimes are selected on the **total** speed :math:`V` against
    limits that depend on the angle,

    .. math::

        V_L = 2.6\, (\cos\theta)^{-1/2}, \qquad V_H = 6.5\, (\cos\theta)^{-3/4},

    and the equations of [1]_, as restated in [2]_, are:

    Low speed, :math:`V \le V_L`:

    .. math::

        d_c = 2.2 \left[\frac{t_w (\sigma/40)^{1/2} + 0.37\, m_b}
            {(\cos\theta)^{4/3}\, \rho_p^{1/2}\, V^{2/3}}\right]^{18/19}

    High speed, :math:`V \ge V_H`:

    .. math::

        d_c = 0.6\, (t_w \rho_w)^{1/3}\, \rho_p^{-1/3}\, V^{-1/3}\, (\cos\theta)^{-1/2}
            S^{2/3} (\sigma/40)^{1/6}

    Intermediate, :math:`V_L < V < V_H`, linear in :math:`V` between the two end
    equations evaluated at their limits:

    .. math::

        d_c = d_{\mathrm{LV}}(V_L) \frac{V_H - V}{V_H - V_L}
            + d_{\mathrm{HV}}(V_H) \frac{V - V_L}{V_H - V_L}

    **Velocity definition.** Unlike :func:`~pockmark.ballistics.christiansen_1993`, which
    selects its regimes on the normal component :math:`V\cos\theta`, this equation uses the
    total speed with angle-dependent limits; the angle enters the branches through the
    powers of :math:`\cos\theta` shown. Mixing the two conventions changes oblique results by
    tens of per cent.

    **Units.** The equations are stated in cm, g cm⁻², g cm⁻³, km s⁻¹ and ksi. All inputs
    are in pockmark's canonical units; only the yield strength is converted, from MPa to ksi
    (1 ksi = 6.894757 MPa), on entry. The factor 0.37 (≈ 1/2.7) turns the front areal
    density into an aluminium-equivalent thickness, which is why :math:`m_b` counts every
    layer in front of the rear wall (bumper and blanket); reproductions differ on this point
    (shared reference note, §5 item 8).

    **Anchors.** The intermediate regime's anchors are computed by evaluating the end
    equations at :math:`V_L` and :math:`V_H`, so :math:`d_c` is continuous by construction.
    (In closed form they are :math:`1.2032\,[\ldots]^{18/19}` with
    :math:`1.2032 = 2.2 \cdot 2.6^{-12/19}` and :math:`0.32150\,(\ldots)(\cos\theta)^{-1/4}`
    with :math:`0.32150 = 0.6 \cdot 6.5^{-1/3}`.)

    **Provenance.** All constants (2.2, 0.37, 0.6, 2.6, 6.5, 40 ksi and every exponent) are
    from memory (shared reference note on ballistic limits, §2.4); no equation page of [1]_
    or [2]_ was read when this was written, so equation numbers are not given. The
    high-speed coefficient is weakly supported by a recalled rear-wall sizing rule
    (:math:`c_w \approx 8.8` s km⁻¹ inverts to 0.601); the low-speed branch has no
    independent check. In particular, with :math:`m_b \to 0` it does **not** reduce to the
    single-wall equation (:func:`~pockmark.ballistics.cour_palais_1987` gives a critical
    diameter about 0.7 times as large for a 40 ksi aluminium wall at normal incidence).
    A later comparison with a second-hand transcription (an open-source library of
    ballistic-limit equations by S. Ryan, pyBLOSSUM, commit c9aa929, citing a 2001 paper by
    Christiansen and Kerr and the 2009 NASA handbook) agrees on the high-speed branch, the
    regime limits, the factor 0.37 and on :math:`m_b` being the total in front of the rear
    wall, but writes the low-speed branch as :math:`2.35\,[\ldots]` with no 18/19 power
    (1–6 % larger :math:`d_c`), and lowers the high-speed coefficient to 0.45 when the
    blanket is 10–15 % of the shield's areal density. Which form the 1995 paper prints was
    not settled; the recalled one is kept and is the more conservative of the two.

    **Angle dependence.** Low speed :math:`\propto \cos^{-24/19}\theta`; high speed
    :math:`\propto \cos^{-1/2}\theta`. In the intermediate regime both anchors and both
    limits move with the angle, and :math:`d_c` is not monotonic in :math:`\theta` there
    (e.g. at 7 km s⁻¹ it peaks at 25.3°, where the high-speed branch ends, and falls by
    1.7 % to 39° for the check shield of the note, §4.2 C). No obliquity cap is applied
    here; shields built with :func:`~pockmark.ballistics.make_shield` take an optional
    ``angle_cap`` (default: none). Some practice evaluates multi-layer equations at 65° for
    larger angles (from memory, low confidence); set ``angle_cap = 65`` to do so.

    **Validity range.** Aluminium spheres; obliquities up to about 60–65° in the test base
    (from memory, medium confidence); light-gas-gun test speeds, up to about 7–8 km s⁻¹
    (assumed as for the Whipple equation; the note gives no speed range for this one), so
    the high-speed branch above that is an extrapolation. Outside this range the function
    evaluates the same formulas without clipping and without warning;
    :meth:`pockmark.ballistics.Shield.out_of_range` flags such impacts.

    See Also
    --------
    pockmark.ballistics.christiansen_1993 : Whipple shield with an empty gap.
    pockmark.ballistics.cour_palais_1987 : Single metallic wall.

    References
    ----------
    .. [1] E. L. Christiansen, J. L. Crews, J. E. Williamsen, J. H. Robinson and
       A. M. Nolen, "Enhanced meteoroid and orbital debris shielding," Int. J. Impact Eng.,
       vol. 17, no. 1–3, pp. 217–228, 1995 (authors, journal, volume and pages seen in a
       published reference list; DOI not verified, so not given).
    .. [2] E. L. Christiansen, "Meteoroid/Debris Shielding," NASA, Houston, TX, USA,
       Tech. Paper NASA/TP-2003-210788, 2003.

    Examples
    --------
    >>> from pockmark.ballistics import christiansen_1995
    >>> float(christiansen_1995(7.0, 0.0, 2.8, 1.34, 11.4, 0.48, 2.84, 393.0))
    ... # doctest: +ELLIPSIS
    1.32...
    """
    velocity, angle, density = _impact_conditions(
        impact_velocity, impact_angle, projectile_density
    )
    m_b = require_positive("front_areal_density", front_areal_density, "g cm⁻²")
    s = require_positive("standoff", standoff, "cm")
    t_w = require_positive("rear_wall_thickness", rear_wall_thickness, "cm")
    rho_w = require_positive("rear_wall_density", rear_wall_density, "g cm⁻³")
    sigma_mpa = require_positive("rear_wall_yield_strength", rear_wall_yield_strength, "MPa")
    sigma_ksi = sigma_mpa / KSI_IN_MPA  # the equations are stated in ksi

    cos_angle = np.cos(np.radians(angle))
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        v_low, v_high = _regime_speeds(cos_angle)
        low = _low_speed(velocity, cos_angle, density, m_b, t_w, sigma_ksi)
        high = _high_speed(velocity, cos_angle, density, s, t_w, rho_w, sigma_ksi)
        low_anchor = _low_speed(v_low, cos_angle, density, m_b, t_w, sigma_ksi)
        high_anchor = _high_speed(v_high, cos_angle, density, s, t_w, rho_w, sigma_ksi)
        weight = (velocity - v_low) / (v_high - v_low)
        intermediate = low_anchor * (1.0 - weight) + high_anchor * weight
        critical = np.where(
            velocity <= v_low, low, np.where(velocity >= v_high, high, intermediate)
        )
    return _finish(critical, velocity, angle)
