"""The Grün et al. (1985) interplanetary meteoroid flux at 1 AU.

Scope: cumulative flux of sporadic meteoroids (stream average) of at least a given mass at the
Earth's heliocentric distance, far from the Earth, on a one-sided randomly oriented plate.
Models in this module:

* :func:`grun_1985`: masses 10⁻¹⁸–10² g.

The Earth-orbit corrections (gravitational focusing, Earth shielding) are in
:mod:`pockmark.environment.orbit`; the speed distribution is in
:mod:`pockmark.environment.meteoroid_speed`.
"""

import warnings

import numpy as np

from pockmark.constants import SECONDS_PER_YEAR
from pockmark.errors import InputError, ModelRangeWarning

#: Stated mass range of the model [g] (from memory, not verified).
MASS_RANGE = (1e-18, 1e2)


def _flux_terms(mass):
    """The three terms F1, F2, F3 of the model [m⁻² s⁻¹], with no validation; mass in [g]."""
    m = np.asarray(mass, dtype=np.float64)
    with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
        f1 = (2.2e3 * m**0.306 + 15.0) ** -4.38
        f2 = 1.3e-9 * (m + 1e11 * m**2 + 1e27 * m**4) ** -0.36
        f3 = 1.3e-16 * (m + 1e6 * m**2) ** -0.85
    return f1, f2, f3


def grun_1985(mass):
    """Cumulative interplanetary meteoroid flux at 1 AU on a randomly oriented plate.

    Parameters
    ----------
    mass : numeric
        Meteoroid mass [g]; the flux of all meteoroids at least this heavy is returned. Must be
        > 0; ``numpy.inf`` gives 0 and NaN propagates.

    Returns
    -------
    numeric
        Cumulative flux :math:`F_{met,0}` of meteoroids with mass >= ``mass`` on a single-sided,
        randomly oriented flat plate at 1 AU, unshielded and unfocused [m⁻² yr⁻¹].

    Raises
    ------
    InputError
        If a mass is zero or negative.

    Warns
    -----
    ModelRangeWarning
        Once per call if any finite mass lies outside 10⁻¹⁸–10² g; the equation is then
        evaluated anyway (extrapolated).

    Notes
    -----
    Eq. of [1]_ as given in [2]_ (§10.2.4.1, constants verified there):

    .. math::

        F_{met,0}(m) = C\\,[F_1(m) + F_2(m) + F_3(m)]

        F_1(m) = (2.2\\times10^3\\,m^{0.306} + 15)^{-4.38}

        F_2(m) = 1.3\\times10^{-9}\\,(m + 10^{11} m^2 + 10^{27} m^4)^{-0.36}

        F_3(m) = 1.3\\times10^{-16}\\,(m + 10^{6} m^2)^{-0.85}

    The bracket is in m⁻² s⁻¹; :math:`C` = ``SECONDS_PER_YEAR`` (Julian year,
    3.15576×10⁷ s) converts it to m⁻² yr⁻¹. The three terms are always summed; they are not
    piecewise. :math:`F_1` dominates above about 10⁻⁹ g, :math:`F_2` between about 10⁻¹⁴ and
    10⁻¹⁰ g and :math:`F_3` below about 10⁻¹⁵ g.

    The flux is isotropic. Per unit area normal to the arrival direction (a sphere's
    cross-section), the flux is :math:`4F_{met,0}`.

    Validity: 10⁻¹⁸–10² g (range from memory). Outside it the equation is evaluated as is and
    a warning is emitted.

    See Also
    --------
    pockmark.environment.kessler_1991.kessler_1991 : orbital-debris flux.

    References
    ----------
    .. [1] E. Grün, H. A. Zook, H. Fechtig and R. H. Giese, "Collisional balance of the
       meteoritic complex," *Icarus*, vol. 62, no. 2, pp. 244–272, 1985,
       :doi:`10.1016/0019-1035(85)90121-6`.
    .. [2] ECSS, "Space engineering – Space environment," ECSS-E-ST-10-04C, ESA-ESTEC,
       15 Nov. 2008, §10.2.4.1.
    """
    m = np.asarray(mass, dtype=np.float64)
    if np.any(m <= 0.0):
        bad = m.ravel()[int(np.flatnonzero((m <= 0.0).ravel())[0])]
        raise InputError(
            f"mass must be positive [g]; got {bad:g}. Use numpy.inf for 'no particle is "
            f"heavy enough' (flux 0)"
        )
    lo, hi = MASS_RANGE
    outside = int(np.count_nonzero(np.isfinite(m) & ((m < lo) | (m > hi))))
    if outside:
        warnings.warn(
            f"grun_1985: mass outside the stated range {lo:g}–{hi:g} g for {outside} value(s); "
            f"the equation is extrapolated",
            ModelRangeWarning,
            stacklevel=2,
        )
    f1, f2, f3 = _flux_terms(m)
    flux = SECONDS_PER_YEAR * (f1 + f2 + f3)
    flux = np.where(np.isposinf(m), 0.0, flux)
    return flux if flux.ndim else float(flux)
