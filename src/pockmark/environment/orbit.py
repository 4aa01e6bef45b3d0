"""Earth-orbit geometry used by the environment models: circular and escape speed,
gravitational focusing, Earth shielding and time sampling of elliptical orbits.

Scope: Keplerian orbits about a spherical Earth. Two gravitational-focusing conventions are
provided and must never be combined: the simplified one of the International Space Station
design documents (:func:`focusing_factor_nasa`; NASA SSP 30425 Rev. B, 1994; NASA TM-4527,
1994) and the physical single-speed factor of ECSS-E-ST-10-04C (2008) Annex C.1.2
(:func:`focusing_factor_ecss`). Focusing and shielding apply to meteoroids only; the 1991
orbital-debris model already contains its geometry and must never be multiplied by them.
:func:`elliptical_orbit_samples` splits an elliptical orbit into true-anomaly intervals with
their exact fractions of the orbital period (Kepler's equation).
"""

import operator

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


def orbital_speed(altitude, perigee_altitude, apogee_altitude):
    """Speed on an elliptical (or circular) Earth orbit at a given altitude (vis-viva).

    Parameters
    ----------
    altitude : numeric
        Altitude on the orbit [km], between perigee and apogee.
    perigee_altitude, apogee_altitude : float
        Altitudes of perigee and apogee above the Earth's equatorial radius [km].

    Returns
    -------
    float or ndarray
        :math:`v = \\sqrt{\\mu (2/r - 1/a)}` [km s⁻¹] with :math:`r = R_E + h` and
        :math:`a = R_E + (h_p + h_a)/2`; equals :func:`circular_speed` on a circular orbit.
    """
    h = _altitude_array(altitude)
    a = EARTH_RADIUS + 0.5 * (float(perigee_altitude) + float(apogee_altitude))
    speed = np.sqrt(EARTH_MU * (2.0 / (EARTH_RADIUS + h) - 1.0 / a))
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

    This is the form of the space-station design documents [1]_, [2]_ (from memory, corroborated by an
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


def escape_speed(altitude):
    """Escape speed from the Earth at the given altitude.

    Parameters
    ----------
    altitude : numeric
        Altitude above the Earth's equatorial radius [km]. Must be > 0.

    Returns
    -------
    numeric
        :math:`v_{esc} = \\sqrt{2\\mu/(R_E + h)}` [km s⁻¹]: 11.093 km s⁻¹ at 100 km and
        10.845 km s⁻¹ at 400 km (environment.md §3.2, [B]).

    Raises
    ------
    InputError
        If an altitude is not finite or not positive.
    """
    h = _altitude_array(altitude)
    speed = np.sqrt(2.0 * EARTH_MU / (EARTH_RADIUS + h))
    return speed if speed.ndim else float(speed)


def focusing_factor_ecss(altitude, free_space_speed):
    """Gravitational focusing factor of a meteoroid stream of one free-space speed.

    Parameters
    ----------
    altitude : numeric
        Altitude above the Earth's equatorial radius [km]. Must be > 0.
    free_space_speed : numeric
        Meteoroid speed far from the Earth, :math:`v_\\infty` [km s⁻¹]. Must be > 0.

    Returns
    -------
    numeric
        Factor :math:`G` by which the flux far from the Earth is raised at the altitude
        [unitless]; inputs broadcast together.

    Raises
    ------
    InputError
        If an altitude or a speed is not finite or not positive.

    Notes
    -----
    The physical form described in ECSS-E-ST-10-04C, Annex C.1.2 [1]_ (equations C-1 to C-4;
    the text was read, the equation form is from memory and follows from energy
    conservation):

    .. math:: G = \\frac{v^2}{v_\\infty^2} = 1 + \\frac{v_{esc}^2(r)}{v_\\infty^2}, \\qquad
              v^2 = v_\\infty^2 + v_{esc}^2(r),

    with :math:`v_{esc}` from :func:`escape_speed`. At 400 km, :math:`G` = 1.294 for
    :math:`v_\\infty` = 20 km s⁻¹ and 1.407 for 17 km s⁻¹ (environment.md §2.2, [B]). For a
    speed distribution the flux factor is the mean :math:`\\bar G = \\sum_k n_k G_k` (eq. C-6
    of [1]_); see :func:`pockmark.environment.meteoroid_speed.speed_bins_ecss_2008`. Never
    multiply a flux by this factor and by :func:`focusing_factor_nasa`.

    See Also
    --------
    focusing_factor_nasa, escape_speed

    References
    ----------
    .. [1] ECSS, "Space engineering – Space environment," ECSS-E-ST-10-04C, ESA-ESTEC, 2008.
    """
    v_esc = np.asarray(escape_speed(altitude))
    v_inf = np.asarray(free_space_speed, dtype=np.float64)
    bad = ~(np.isfinite(v_inf) & (v_inf > 0.0))
    if np.any(bad):
        value = v_inf.ravel()[int(np.flatnonzero(bad.ravel())[0])]
        raise InputError(f"free_space_speed must be positive and finite [km s⁻¹]; got {value:g}")
    factor = 1.0 + v_esc**2 / v_inf**2
    return factor if factor.ndim else float(factor)


def _mean_anomaly(true_anomaly_rad, eccentricity):
    """Mean anomaly [rad] of a true anomaly [rad], continuous and increasing for any real angle."""
    nu = np.asarray(true_anomaly_rad, dtype=np.float64)
    turns = np.floor((nu + np.pi) / (2.0 * np.pi))
    wrapped = nu - 2.0 * np.pi * turns  # in [−π, π)
    e = eccentricity
    eccentric = 2.0 * np.arctan2(
        np.sqrt(1.0 - e) * np.sin(0.5 * wrapped), np.sqrt(1.0 + e) * np.cos(0.5 * wrapped)
    )
    return eccentric - e * np.sin(eccentric) + 2.0 * np.pi * turns


def elliptical_orbit_samples(perigee_altitude, apogee_altitude, samples=8):
    """True-anomaly samples of an orbit with the fraction of the period each one represents.

    Parameters
    ----------
    perigee_altitude, apogee_altitude : float
        Altitudes of perigee and apogee above the Earth's equatorial radius [km];
        0 < perigee <= apogee. Equal values give a circular orbit.
    samples : int
        Number of equal true-anomaly intervals over the whole orbit, >= 1 (default 8).

    Returns
    -------
    true_anomaly : (k,) float
        Sample true anomalies [°] in [0, 180]: the centres of the intervals, folded onto one
        half of the orbit.
    altitude : (k,) float
        Altitude at each sample [km].
    time_fraction : (k,) float
        Fraction of the orbital period spent in the interval(s) the sample represents
        [unitless]; they sum to 1.

    Raises
    ------
    InputError
        For altitudes that are not finite, a perigee not above 0 km, an apogee below the
        perigee, or a sample count that is not a positive integer.

    Notes
    -----
    The orbit is cut into ``samples`` intervals of equal true anomaly
    :math:`\\Delta\\nu = 360°/\\mathrm{samples}` centred on
    :math:`\\nu_i = i\\,\\Delta\\nu` (so perigee, and apogee for an even count, are sample
    centres). Each interval's weight is the exact fraction of the period spent in it, the
    integral of Kepler's second law :math:`dt \\propto r^2\\,d\\nu`, obtained from the mean
    anomaly through the eccentric anomaly (Kepler's equation, e.g. Vallado, *Fundamentals of
    Astrodynamics and Applications*, §2.2; from memory):

    .. math::

        \\tan\\frac{E}{2} = \\sqrt{\\frac{1 - e}{1 + e}}\\tan\\frac{\\nu}{2}, \\qquad
        M = E - e\\sin E, \\qquad
        f_i = \\frac{M(\\nu_i + \\Delta\\nu/2) - M(\\nu_i - \\Delta\\nu/2)}{2\\pi}.

    The altitude is :math:`r(\\nu_i) - R_E` with :math:`r = a(1 - e^2)/(1 + e\\cos\\nu)`. The
    orbit is symmetric about its line of apsides, so the samples at :math:`\\pm\\nu_i` have
    the same altitude; they are merged (their fractions added), which leaves
    ``samples // 2 + 1`` samples. A circular orbit (equal altitudes) gives the single sample
    ``([0.0], [perigee_altitude], [1.0])`` whatever ``samples`` is.
    """
    try:
        count = operator.index(samples)
    except TypeError:
        count = None
    if count is None or isinstance(samples, bool) or count < 1:
        raise InputError(f"samples must be a positive integer; got {samples!r}")
    h_p = float(_altitude_array(perigee_altitude))
    h_a = float(np.asarray(apogee_altitude, dtype=np.float64))
    if not np.isfinite(h_a) or h_a < h_p:
        raise InputError(
            f"apogee_altitude must be finite and at least the perigee altitude {h_p:g} km; got "
            f"{h_a:g} km (swap the two values if they are reversed)"
        )
    if h_a == h_p:
        return np.array([0.0]), np.array([h_p]), np.array([1.0])
    r_p, r_a = EARTH_RADIUS + h_p, EARTH_RADIUS + h_a
    e = (r_a - r_p) / (r_a + r_p)
    semi_latus = 2.0 * r_a * r_p / (r_a + r_p)  # a (1 − e²)
    step = 2.0 * np.pi / count
    centres = step * np.arange(count)
    fractions = (
        _mean_anomaly(centres + 0.5 * step, e) - _mean_anomaly(centres - 0.5 * step, e)
    ) / (2.0 * np.pi)
    keep = np.arange(count // 2 + 1)
    folded = fractions[keep].copy()
    mirror = (count - keep) % count
    paired = mirror != keep
    folded[paired] += fractions[mirror[paired]]
    nu = centres[keep]
    altitude = semi_latus / (1.0 + e * np.cos(nu)) - EARTH_RADIUS
    altitude[0] = h_p  # exact at the apsides
    if count % 2 == 0:
        altitude[-1] = h_a
    return np.degrees(nu), altitude, folded / folded.sum()
