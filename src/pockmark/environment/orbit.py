"""Earth-orbit geometry used by the environment models: circular speed, gravitational focusing
and Earth shielding.

Scope: circular orbits about a spherical Earth. The focusing and shielding functions implement
the simplified convention of the International Space Station design documents (NASA SSP 30425
Rev. B, 1994; NASA TM-4527, 1994); they apply to meteoroids only. The 1991 orbital-debris model
already contains its geometry and must never be multiplied by them.
"""

import numpy as np

from pockmark.constants import ATMOSPHERE_ALLOWANCE, EARTH_MU, EARTH_RADIUS
from pockmark.errors import InputError


def _altitude_array(altitude, minimum=0.0):
    """Return ``altitude`` as a float array after checking it is finite and above ``minimum``."""
    array = np.asarray(altitude, dtype=np.float64)
    bad = ~(np.isfinite(array) & (array > minimum))
    if np.any(bad):
        value = array.ravel()[int(np.flatnonzero(bad.ravel())[0])]
        raise InputError(
            f"altitude must be finite and greater than {minimum:g} km; got {value:g} km"
        )
    return array


def circular_speed(altitude):
    """Speed of a circular orbit at the given altitude above the Earth's equatorial radius.

    Parameters
    ----------
    altitude : numeric
        Altitude above the Earth's equatorial radius [km]. Must be > 0.

    Returns
    -------
    numeric
        Circular orbital speed [km s⁻¹].

    Raises
    ------
    InputError
        If an altitude is not finite or not positive.

    Notes
    -----
    .. math:: v_c = \\sqrt{\\mu / (R_E + h)}

    with :math:`\\mu` = ``EARTH_MU`` and :math:`R_E` = ``EARTH_RADIUS``. At 400 km this gives
    7.6686 km s⁻¹, so the head-on closing speed of two circular orbits cannot exceed
    :math:`2 v_c` = 15.34 km s⁻¹.
    """
    h = _altitude_array(altitude)
    speed = np.sqrt(EARTH_MU / (EARTH_RADIUS + h))
    return speed if speed.ndim else float(speed)


def focusing_factor_nasa(altitude):
    """Gravitational focusing factor of the meteoroid flux, simplified engineering convention.

    Parameters
    ----------
    altitude : numeric
        Altitude above the Earth's equatorial radius [km]. Must be > 0.

    Returns
    -------
    numeric
        Factor by which the interplanetary (1 AU) meteoroid flux is raised near the Earth
        [unitless].

    Raises
    ------
    InputError
        If an altitude is not finite or not positive.

    Notes
    -----
    .. math:: G = 1 + \\frac{R_E + 100\\ \\mathrm{km}}{R_E + h}

    This is the form of the ISS design documents [1]_, [2]_ (from memory, corroborated by an
    independent unpublished reproduction). It equals the physical focusing factor
    :math:`1 + v_{esc}^2(r)/v_\\infty^2` for a single free-space speed equal to the escape
    speed at 100 km altitude (11.09 km s⁻¹), and is therefore 40–50 % larger than the physical
    form averaged over a realistic speed distribution (ECSS-E-ST-10-04C, Annex C.1.2). At
    400 km, :math:`G` = 1.9557.

    The two conventions must never be combined; pockmark records the one used in the run
    parameters (``"focusing": "nasa"``).

    See Also
    --------
    earth_shielding_factor

    References
    ----------
    .. [1] NASA, "Space Station Program Natural Environment Definition for Design,"
       SSP 30425 Rev. B, 1994.
    .. [2] B. J. Anderson and R. E. Smith (eds.), "Natural Orbital Environment Guidelines for
       Use in Aerospace Vehicle Development," NASA TM-4527, 1994.
    """
    h = _altitude_array(altitude)
    factor = 1.0 + (EARTH_RADIUS + ATMOSPHERE_ALLOWANCE) / (EARTH_RADIUS + h)
    return factor if factor.ndim else float(factor)


def earth_shielding_half_angle(altitude):
    """Angular radius of the Earth plus its meteoroid-stopping atmosphere, seen from the orbit.

    Parameters
    ----------
    altitude : numeric
        Altitude above the Earth's equatorial radius [km]. Must exceed the 100 km atmosphere
        allowance.

    Returns
    -------
    numeric
        Half-angle :math:`\\eta` of the blocked cone about nadir [°].

    Raises
    ------
    InputError
        If an altitude is not finite or does not exceed ``ATMOSPHERE_ALLOWANCE``.

    Notes
    -----
    .. math:: \\sin\\eta = \\frac{R_E + 100\\ \\mathrm{km}}{R_E + h}

    (ECSS-E-ST-10-04C, Annex C.1.3.1 [1]_; equation form from memory, checked by Monte Carlo).
    At 400 km, :math:`\\eta` = 72.89°.

    See Also
    --------
    earth_shielding_factor

    References
    ----------
    .. [1] ECSS, "Space engineering – Space environment," ECSS-E-ST-10-04C, ESA-ESTEC, 2008.
    """
    h = _altitude_array(altitude, minimum=ATMOSPHERE_ALLOWANCE)
    angle = np.degrees(np.arcsin((EARTH_RADIUS + ATMOSPHERE_ALLOWANCE) / (EARTH_RADIUS + h)))
    return angle if angle.ndim else float(angle)


def earth_shielding_factor(altitude):
    """Orientation-averaged fraction of an isotropic flux not blocked by the Earth.

    Parameters
    ----------
    altitude : numeric
        Altitude above the Earth's equatorial radius [km]. Must exceed the 100 km atmosphere
        allowance.

    Returns
    -------
    numeric
        Shielding factor :math:`s_f` [unitless], between 0.5 and 1.

    Raises
    ------
    InputError
        If an altitude is not finite or does not exceed ``ATMOSPHERE_ALLOWANCE``.

    Notes
    -----
    .. math:: s_f = \\frac{1 + \\cos\\eta}{2}

    with :math:`\\eta` from :func:`earth_shielding_half_angle` (ECSS-E-ST-10-04C, Annex
    C.1.3.1 [1]_). It is the fraction of the sphere of arrival directions outside the cone of
    half-angle :math:`\\eta` about nadir, and hence the random-orientation average of what a
    one-sided plate receives once those directions are removed. Per orientation, a
    zenith-facing plate keeps all of its flux and a nadir-facing plate keeps
    :math:`\\cos^2\\eta`. At 400 km, :math:`s_f` = 0.64711.

    See Also
    --------
    earth_shielding_half_angle, focusing_factor_nasa

    References
    ----------
    .. [1] ECSS, "Space engineering – Space environment," ECSS-E-ST-10-04C, ESA-ESTEC, 2008.
    """
    eta = np.radians(earth_shielding_half_angle(altitude))
    factor = 0.5 * (1.0 + np.cos(eta))
    return factor if np.ndim(factor) else float(factor)
