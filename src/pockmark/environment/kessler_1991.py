"""The 1991 NASA analytic orbital-debris engineering model (Kessler et al.).

Scope: cumulative flux of orbital debris larger than a given diameter on a randomly tumbling
surface in a circular low Earth orbit, as a function of altitude, inclination, date and solar
activity. Models in this module:

* :func:`kessler_1991`: debris diameters 0.001–100 cm, altitudes up to 2000 km (stated range
  up to 1000 km), all inclinations (inclination factor tabulated for 28.5°–120°).

The directional (speed and azimuth) distribution of the debris is not part of this module; see
:mod:`pockmark.environment.debris_directions`.

Provenance: the equation and every constant below were recalled from the primary source and
could not be re-read when this module was written ([C] in the project's research notes); they
are corroborated by three independent third-party implementations. The inclination factor table
is the least certain part (Ψ(60°) may be 1.07 rather than 1.09).
"""

import warnings

import numpy as np

from pockmark._validation import require_positive
from pockmark.errors import InputError, ModelRangeWarning

#: Growth-rate constants of the 1991 model [1/yr] (from memory, corroborated):
#: ``p`` is the linear growth rate of the mass in orbit (multiplies the large-object term),
#: ``q`` the compounded growth rate of fragments before 2011, ``q_prime`` from 2011 on, and
#: ``epoch`` the reference year at which both growth factors equal 1.
KESSLER_1991_GROWTH = {"p": 0.05, "q": 0.02, "q_prime": 0.04, "epoch": 1988.0, "break": 2011.0}

#: Inclination factor Ψ(i) of the 1991 model (from memory): inclination [°] → Ψ [unitless].
#: Linearly interpolated in between; clamped to the end values outside 28.5°–120°.
KESSLER_1991_INCLINATION_FACTOR = {
    28.5: 0.91,
    30.0: 0.92,
    40.0: 0.96,
    50.0: 1.02,
    60.0: 1.09,
    70.0: 1.26,
    80.0: 1.71,
    90.0: 1.37,
    100.0: 1.78,
    120.0: 1.18,
}

_PSI_INCLINATION = np.array(list(KESSLER_1991_INCLINATION_FACTOR), dtype=np.float64)
_PSI_VALUE = np.array(list(KESSLER_1991_INCLINATION_FACTOR.values()), dtype=np.float64)

#: Stated diameter range of the model [cm] (from memory, not verified).
DIAMETER_RANGE = (1e-3, 100.0)
#: Altitude range [km]: the model accepts up to 2000 km but is stated for below 1000 km.
ALTITUDE_STATED_MAX = 1000.0
ALTITUDE_MAX = 2000.0


def _size_factor(diameter):
    """Size-dependent correction H(d) that raises the 2–10 cm flux [unitless]; d in [cm]."""
    log_d = np.log10(diameter)
    return np.sqrt(10.0 ** np.exp(-(((log_d - 0.78) / 0.637) ** 2)))


def _altitude_factor(altitude, solar_flux):
    """Altitude and solar-activity factor Φ(h, S) [unitless]; h in [km], S in [10⁴ Jy]."""
    phi1 = 10.0 ** (np.asarray(altitude) / 200.0 - np.asarray(solar_flux) / 140.0 - 1.5)
    return phi1 / (phi1 + 1.0)


def _inclination_factor(inclination):
    """Inclination factor Ψ(i) [unitless]; i in [°], clamped silently outside 28.5°–120°."""
    return np.interp(inclination, _PSI_INCLINATION, _PSI_VALUE)


def _fragment_growth(year):
    """Growth factor g1(t) of the small-fragment term [unitless]; continuous at 2011."""
    t = np.asarray(year, dtype=np.float64)
    g = KESSLER_1991_GROWTH
    before = (1.0 + g["q"]) ** (t - g["epoch"])
    after = (1.0 + g["q"]) ** (g["break"] - g["epoch"]) * (1.0 + g["q_prime"]) ** (t - g["break"])
    return np.where(t < g["break"], before, after)


def _mass_growth(year):
    """Growth factor g2(t) of the large-object term [unitless]."""
    g = KESSLER_1991_GROWTH
    return 1.0 + g["p"] * (np.asarray(year, dtype=np.float64) - g["epoch"])


def _flux(diameter, altitude, inclination_factor, year, solar_flux):
    """Equation of the 1991 model with no validation [m⁻² yr⁻¹]; diameter in [cm]."""
    d = np.asarray(diameter, dtype=np.float64)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        f1 = 1.22e-5 * d**-2.5
        f2 = 8.1e10 * (d + 700.0) ** -6
        flux = (
            _size_factor(d)
            * _altitude_factor(altitude, solar_flux)
            * inclination_factor
            * (f1 * _fragment_growth(year) + f2 * _mass_growth(year))
        )
    return np.where(np.isposinf(d), 0.0, flux)


def _finite(name, value, unit):
    array = np.asarray(value, dtype=np.float64)
    if not np.all(np.isfinite(array)):
        bad = array.ravel()[int(np.flatnonzero(~np.isfinite(array.ravel()))[0])]
        raise InputError(f"{name} must be finite [{unit}]; got {bad}")
    return array


def _count(mask, name, range_text, action):
    n = int(np.count_nonzero(mask))
    return [f"{name} outside {range_text} for {n} value(s); {action}"] if n else []


def _check_diameter(diameter):
    """Return (diameter array, range issues); raise for non-positive values, keep NaN/inf."""
    d = np.asarray(diameter, dtype=np.float64)
    if np.any(d <= 0.0):
        bad = d.ravel()[int(np.flatnonzero((d <= 0.0).ravel())[0])]
        raise InputError(
            f"diameter must be positive [cm]; got {bad:g}. Use numpy.inf for 'no particle "
            f"is large enough' (flux 0)"
        )
    lo, hi = DIAMETER_RANGE
    issues = _count(
        np.isfinite(d) & ((d < lo) | (d > hi)),
        "diameter",
        f"the stated range {lo:g}–{hi:g} cm",
        "the equation is extrapolated",
    )
    return d, issues


def _check_orbit(altitude, inclination):
    """Validate altitude and inclination; return arrays and range issues."""
    h = _finite("altitude", altitude, "km")
    if np.any((h <= 0.0) | (h > ALTITUDE_MAX)):
        bad = h.ravel()[int(np.flatnonzero(((h <= 0.0) | (h > ALTITUDE_MAX)).ravel())[0])]
        raise InputError(
            f"altitude must be in (0, {ALTITUDE_MAX:g}] km for the 1991 debris model; got "
            f"{bad:g} km"
        )
    i = _finite("inclination", inclination, "°")
    if np.any((i < 0.0) | (i > 180.0)):
        bad = i.ravel()[int(np.flatnonzero(((i < 0.0) | (i > 180.0)).ravel())[0])]
        raise InputError(f"inclination must be in [0, 180]°; got {bad:g}°")
    issues = _count(
        h > ALTITUDE_STATED_MAX,
        "altitude",
        f"the stated range 0–{ALTITUDE_STATED_MAX:g} km",
        "the altitude factor is saturated there and the result is an extrapolation",
    )
    issues += _count(
        (i < _PSI_INCLINATION[0]) | (i > _PSI_INCLINATION[-1]),
        "inclination",
        f"the tabulated range {_PSI_INCLINATION[0]:g}–{_PSI_INCLINATION[-1]:g}°",
        "the inclination factor is clamped to the nearest table end",
    )
    return h, i, issues


def _check_epoch(year, solar_flux):
    """Validate year and solar flux; return arrays and range issues."""
    t = _finite("year", year, "yr")
    epoch = KESSLER_1991_GROWTH["epoch"]
    lowest = epoch - 1.0 / KESSLER_1991_GROWTH["p"]
    if np.any(t <= lowest):
        bad = t.ravel()[int(np.flatnonzero((t <= lowest).ravel())[0])]
        raise InputError(
            f"year must be later than {lowest:g}, where the linear mass-growth factor of the "
            f"1991 model reaches zero; got {bad:g}"
        )
    s = require_positive("solar_flux", solar_flux, "10⁴ Jy")
    issues = _count(
        t < epoch,
        "year",
        f"the model's projection period (from its reference epoch {epoch:g} on)",
        "the growth laws are extrapolated backwards",
    )
    return t, s, issues


def _warn(model, issues, stacklevel=3):
    """Emit one ModelRangeWarning listing every range issue of one call."""
    if issues:
        warnings.warn(f"{model}: " + "; ".join(issues), ModelRangeWarning, stacklevel=stacklevel)


def kessler_1991(diameter, altitude, inclination, year, solar_flux):
    """Cumulative orbital-debris flux on a randomly tumbling surface, 1991 NASA model.

    Parameters
    ----------
    diameter : numeric
        Debris diameter [cm]; the flux of all debris at least this large is returned. Must be
        > 0; ``numpy.inf`` gives 0 and NaN propagates.
    altitude : numeric
        Circular-orbit altitude [km], in (0, 2000].
    inclination : numeric
        Orbit inclination [°], in [0, 180].
    year : numeric
        Date as a decimal year [yr] (not rounded), later than 1968.
    solar_flux : numeric
        13-month smoothed 10.7 cm solar radio flux F10.7 [10⁴ Jy] (solar flux units) of the
        year **before** ``year``, i.e. :math:`F_{10.7}(t - 1\\ \\mathrm{yr})`. Pass that
        value; the function does not shift it.

    Returns
    -------
    numeric
        Cumulative flux :math:`F` of debris with diameter >= ``diameter`` on a randomly
        tumbling, one-sided surface [m⁻² yr⁻¹]. All inputs broadcast together.

    Raises
    ------
    InputError
        If a diameter is zero or negative, an altitude is outside (0, 2000] km, an inclination
        outside [0, 180]°, a year not after 1968, a solar flux not positive, or any input other
        than the diameter is not finite.

    Warns
    -----
    ModelRangeWarning
        Once per call, listing every input outside the stated range: altitude above 1000 km,
        inclination outside 28.5°–120° (Ψ clamped), year before 1988, diameter outside
        0.001–100 cm.

    Notes
    -----
    Equation of [1]_ (restated in [2]_), with the orientation factor :math:`k = 1` of a
    randomly tumbling surface:

    .. math::

        F(d, h, i, t, S) = k\\,H(d)\\,\\Phi(h, S)\\,\\Psi(i)\\,
            \\left[F_1(d)\\,g_1(t) + F_2(d)\\,g_2(t)\\right]

        H(d) = \\sqrt{10^{\\exp\\left(-\\left((\\log_{10} d - 0.78)/0.637\\right)^2\\right)}}

        \\Phi(h, S) = \\frac{\\Phi_1}{\\Phi_1 + 1}, \\qquad
            \\Phi_1 = 10^{h/200 - S/140 - 1.5}

        F_1(d) = 1.22\\times10^{-5}\\,d^{-2.5}, \\qquad
            F_2(d) = 8.1\\times10^{10}\\,(d + 700)^{-6}

        g_1(t) = (1 + q)^{t - 1988} \\ (t < 2011), \\qquad
            g_1(t) = (1 + q)^{23}(1 + q')^{t - 2011} \\ (t \\ge 2011)

        g_2(t) = 1 + p\\,(t - 1988)

    with :math:`p` = 0.05, :math:`q` = 0.02, :math:`q'` = 0.04 (``KESSLER_1991_GROWTH``) and
    :math:`\\Psi(i)` from ``KESSLER_1991_INCLINATION_FACTOR``. All constants are from memory
    and corroborated by independent implementations, not re-read from [1]_. Resolved
    ambiguities: the exponent of :math:`H` divides by :math:`0.637^2` and uses
    :math:`\\log_{10}`, so :math:`H` peaks at :math:`\\sqrt{10}` for
    :math:`d = 10^{0.78}` cm; :math:`H` multiplies the whole bracket; :math:`g_1` is
    continuous at 2011; the year is not rounded; a larger :math:`S` gives a lower flux.

    Validity and behaviour outside it: sizes 0.001–100 cm (from memory); altitudes below
    1000 km as stated in [3]_, accepted up to 2000 km with a warning (:math:`\\Phi`
    saturates at 1 above about 900 km); circular orbits. :math:`\\Psi(i)` is tabulated for
    28.5°–120°, linearly interpolated inside and clamped to the end values outside, with a
    warning. Years before the 1988 reference epoch are extrapolated backwards with a warning.

    For an oriented surface the flux is :math:`\\Phi_0 = 4F` per unit area normal to the
    arrival direction, distributed over directions as in
    :func:`pockmark.environment.debris_directions.debris_direction_distribution`.

    See Also
    --------
    pockmark.environment.grun_1985.grun_1985 : meteoroid flux.

    References
    ----------
    .. [1] D. J. Kessler, "Orbital debris environment for spacecraft in low Earth orbit,"
       *J. Spacecraft Rockets*, vol. 28, no. 3, pp. 347–351, 1991,
       :doi:`10.2514/3.26250` (DOI from memory, not re-checked).
    .. [2] NASA, "Space Station Program Natural Environment Definition for Design,"
       SSP 30425 Rev. B, 1994.
    .. [3] National Research Council, *Protecting the Space Station from Meteoroids and
       Orbital Debris*, National Academy Press, 1997, pp. 18–19.
    """
    d, issues = _check_diameter(diameter)
    h, i, orbit_issues = _check_orbit(altitude, inclination)
    t, s, epoch_issues = _check_epoch(year, solar_flux)
    _warn("kessler_1991", issues + orbit_issues + epoch_issues)
    flux = _flux(d, h, _inclination_factor(i), t, s)
    return flux if np.ndim(flux) else float(flux)
