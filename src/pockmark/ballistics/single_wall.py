"""Ballistic-limit equations for a single monolithic metallic wall.

Models
------
cour_palais_1987
    Modified Cour-Palais crater-depth equation, solved for the critical projectile diameter
    that perforates (or spalls) a single metallic plate. Domain: metallic (mainly aluminium)
    plates hit by solid spheres at hypervelocity.

Also defined here: :data:`FAILURE_COEFFICIENTS`, the named multipliers from crater depth to
failure thickness.
"""

import numpy as np

from pockmark._validation import require_positive
from pockmark.ballistics._common import _finish, _impact_conditions

__all__ = ["DENSITY_RATIO_SWITCH", "FAILURE_COEFFICIENTS", "cour_palais_1987"]

FAILURE_COEFFICIENTS = {"perforation": 1.8, "detached_spall": 2.2, "incipient_spall": 3.0}
"""Failure thickness in units of the semi-infinite crater depth, by failure criterion.

``t = k · P∞``: a plate of thickness ``t`` just fails by the named criterion when the crater
depth the same impact would make in a semi-infinite target is ``P∞ = t / k``.

- ``"perforation"`` (k = 1.8): a through-hole;
- ``"detached_spall"`` (k = 2.2): material detached from the rear face, no hole required;
- ``"incipient_spall"`` (k = 3.0): rear-face bulging or cracking at the threshold of spall.

The three values are from memory (see shared reference note, §2.1 and §5 item 12), as given
for the modified Cour-Palais equation in [1]_; confirm them against the source before relying
on them.

References
----------
.. [1] E. L. Christiansen, "Meteoroid/Debris Shielding," NASA, Houston, TX, USA,
   Tech. Paper NASA/TP-2003-210788, 2003.
"""

# Modified Cour-Palais crater-depth constant [cm^(-1/18) (HB)^(1/4)] for d in cm,
# V and C in km/s, densities in g/cm³. From memory (see shared reference note, §2.1).
_CRATER_CONSTANT = 5.24
#: Projectile-to-wall density ratio at which the density exponent changes from 1/2 to 2/3.
DENSITY_RATIO_SWITCH = 1.5


# --- model ----------------------------------------------------------------------------------


def cour_palais_1987(
    impact_velocity,
    impact_angle,
    projectile_density,
    wall_thickness,
    wall_density,
    brinell_hardness,
    sound_speed,
    failure_coefficient=1.8,
):
    r"""Critical projectile diameter for a single metallic wall.

    Parameters
    ----------
    impact_velocity : numeric
        Impact speed [km s⁻¹]. Values ≤ 0 mean no impact and give ``inf``.
    impact_angle : numeric
        Impact angle from the surface normal [°], in [0, 180]. Angles ≥ 90 give ``inf``.
    projectile_density : numeric
        Density of the (spherical) projectile [g cm⁻³].
    wall_thickness : numeric
        Plate thickness [cm].
    wall_density : numeric
        Plate density [g cm⁻³].
    brinell_hardness : numeric
        Brinell hardness of the plate [HB].
    sound_speed : numeric
        Sound speed of the plate material, usually the bar speed
        :math:`\sqrt{E/\rho}` [km s⁻¹].
    failure_coefficient : numeric, default 1.8
        Ratio k of failure thickness to semi-infinite crater depth [unitless]; see
        :data:`FAILURE_COEFFICIENTS` (1.8 perforation, 2.2 detached spall, 3.0 incipient
        spall).

    Returns
    -------
    numpy.ndarray
        Critical projectile diameter [cm]: the smallest sphere that fails the wall by the
        chosen criterion. float64, with the broadcast shape of all arguments (0-d for
        scalar arguments). ``inf`` where there is no impact, NaN where an impact condition
        is NaN.

    Raises
    ------
    InputError
        If a wall parameter or ``failure_coefficient`` is not positive and finite, if
        ``projectile_density`` is not positive and finite, if ``impact_angle`` is outside
        [0, 180] or if ``impact_velocity`` is infinite.

    Notes
    -----
    The semi-infinite crater depth of the modified Cour-Palais equation, as given in
    [1]_ and [2]_, is

    .. math::

        P_\infty = 5.24\, d^{19/18}\, \mathrm{BH}^{-1/4}
            \left(\frac{\rho_p}{\rho_t}\right)^{\beta}
            \left(\frac{V \cos\theta}{C}\right)^{2/3},
        \qquad \beta = \begin{cases} 1/2 & \rho_p/\rho_t < 1.5 \\
            2/3 & \rho_p/\rho_t \ge 1.5, \end{cases}

    and a plate of thickness :math:`t = k P_\infty` just fails. Solved for the diameter:

    .. math::

        d_c = \left[\frac{t\, \mathrm{BH}^{1/4}}{5.24\, k}
            \left(\frac{\rho_t}{\rho_p}\right)^{\beta}
            \left(\frac{C}{V \cos\theta}\right)^{2/3}\right]^{18/19}.

    The density exponent changes for dense projectiles (steel on aluminium: ratio ≈ 2.9), so
    :math:`d_c` steps down by about 6 % as the ratio passes 1.5. The switch at 1.5 was read
    in a second-hand transcription (an open-source library of ballistic-limit equations by
    S. Ryan, pyBLOSSUM, commit c9aa929, citing the NASA handbook); that transcription writes
    the exponent above it as 3/2, which we take for a typo of 2/3 (from memory, medium
    confidence: 3/2 would make the crater grow with density three times faster than below
    the switch).

    Units are those of the published form (cm, g cm⁻³, km s⁻¹, HB), which are pockmark's
    canonical units, so no conversion is made.

    **Provenance.** The constant 5.24, the exponents and the failure coefficients
    k = 1.8 / 2.2 / 3.0 are from memory (see shared reference note, §2.1); no equation page
    of [1]_ or [2]_ was read when this was written, so equation numbers are not given.
    The prefactor :math:`1.8 \cdot 5.24\, \mathrm{BH}^{-1/4} \rho_t^{-1/2} C^{-2/3} = 0.619`
    for Al 6061-T6 agrees to 3 % with the independently recalled coefficient 0.6 of the
    ballistic branch of :func:`pockmark.ballistics.christiansen_1993`.

    **Velocity definition.** Only the normal component :math:`V\cos\theta` enters, so
    :math:`d_c \propto \cos^{-12/19}\theta` and :math:`d_c \to \infty` as
    :math:`\theta \to 90°`.

    **Validity range.** Derived for aluminium projectiles on aluminium alloys at
    hypervelocity; test data reach about 8 km s⁻¹ and higher speeds are an extrapolation;
    used for other metals through BH, :math:`\rho_t` and C; spherical projectiles only.
    Outside this range the function evaluates the same formula without clipping and
    without warning; :meth:`pockmark.ballistics.Shield.out_of_range` flags impacts above
    8 km s⁻¹ so that a run can report the flux that fell there. No obliquity cap is
    applied here (the default of shields built with
    :func:`~pockmark.ballistics.make_shield` too; their ``angle_cap`` key sets one): at
    grazing angles below 90° the diameter grows without bound.

    **Choice of C.** Results depend on which sound speed is used: 6.3 km s⁻¹ (longitudinal)
    instead of 5.1 km s⁻¹ (bar) raises :math:`d_c` by 14 %.

    See Also
    --------
    pockmark.ballistics.christiansen_1993 : Whipple shield (bumper, gap, rear wall).
    pockmark.ballistics.christiansen_1995 : Stuffed Whipple shield.
    pockmark.ballistics.sandwich_summed_face_sheets : Sandwich panel bound built on this.
    pockmark.ballistics.threshold_diameter : Constant critical diameter (not a model).

    References
    ----------
    .. [1] B. G. Cour-Palais, "Hypervelocity impact in metals, glass and composites,"
       Int. J. Impact Eng., vol. 5, pp. 221–237, 1987.
       :doi:`10.1016/0734-743X(87)90040-0` (citation details from memory).
    .. [2] E. L. Christiansen, "Meteoroid/Debris Shielding," NASA, Houston, TX, USA,
       Tech. Paper NASA/TP-2003-210788, 2003.

    Examples
    --------
    >>> from pockmark.ballistics import cour_palais_1987
    >>> float(cour_palais_1987(7.0, 0.0, 2.8, 0.1, 2.713, 95.0, 5.1))  # doctest: +ELLIPSIS
    0.0319...
    """
    velocity, angle, density = _impact_conditions(
        impact_velocity, impact_angle, projectile_density
    )
    t = require_positive("wall_thickness", wall_thickness, "cm")
    rho_t = require_positive("wall_density", wall_density, "g cm⁻³")
    hardness = require_positive("brinell_hardness", brinell_hardness, "HB")
    c = require_positive("sound_speed", sound_speed, "km s⁻¹")
    k = require_positive("failure_coefficient", failure_coefficient, "unitless")

    angle_rad = np.radians(angle)
    density_exponent = np.where(density / rho_t < DENSITY_RATIO_SWITCH, 0.5, 2.0 / 3.0)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        normal_velocity = velocity * np.cos(angle_rad)
        critical = (
            t * hardness**0.25 * (rho_t / density) ** density_exponent
            * (c / normal_velocity) ** (2.0 / 3.0)
            / (_CRATER_CONSTANT * k)
        ) ** (18.0 / 19.0)
    return _finish(critical, velocity, angle)
