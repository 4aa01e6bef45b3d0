"""Speed distribution of meteoroids in Earth orbit.

Scope: the analytic near-Earth meteoroid speed distribution of the space-station design environment
(NASA SSP 30425 Rev. B / TM-4527, 1994), 11.1–72.2 km s⁻¹, and its discretisation into speed
bins, in two focusing conventions that must never be combined:

* ``"nasa_1994"`` (:func:`speed_bins_nasa`): the distribution used as it stands at every
  altitude, with the simplified focusing factor
  :func:`~pockmark.environment.orbit.focusing_factor_nasa`;
* ``"ecss_2008"`` (:func:`speed_bins_ecss_2008`): the physical focusing procedure of
  ECSS-E-ST-10-04C Annex C.1.2 applied to a free-space distribution that **we derive** from
  the same NASA distribution (ECSS's own Table C-1 could not be read).

The distribution is independent of arrival direction.
"""

import numpy as np

from pockmark.environment.orbit import escape_speed
from pockmark.errors import InputError

#: Pieces of the raw (un-normalised) speed distribution of SSP 30425 / TM-4527 (from memory):
#: ``(lower [km s⁻¹], upper [km s⁻¹], coefficient, exponent)`` with
#: n(v) = coefficient · v^exponent on [lower, upper). The recollection is self-consistent:
#: the pieces are continuous at 16.3 and 55 km s⁻¹ to 4 digits, and 11.1 km s⁻¹ is the escape
#: speed at 100 km altitude.
SPEED_PIECES_NASA = (
    (11.1, 16.3, 0.112, 0.0),
    (16.3, 55.0, 3.328e5, -5.34),
    (55.0, 72.2, 1.695e-4, 0.0),
)

#: Lowest and highest meteoroid speed of the distribution [km s⁻¹].
SPEED_RANGE_NASA = (SPEED_PIECES_NASA[0][0], SPEED_PIECES_NASA[-1][1])


def _raw_moments(lower, upper):
    """Zeroth and first moments of the raw n(v) over [lower, upper] (arrays, in km s⁻¹)."""
    lower = np.asarray(lower, dtype=np.float64)
    upper = np.asarray(upper, dtype=np.float64)
    m0 = np.zeros(np.broadcast(lower, upper).shape)
    m1 = np.zeros_like(m0)
    for start, stop, coefficient, exponent in SPEED_PIECES_NASA:
        a = np.clip(lower, start, stop)
        b = np.clip(upper, start, stop)
        m0 += coefficient * (b ** (exponent + 1) - a ** (exponent + 1)) / (exponent + 1)
        m1 += coefficient * (b ** (exponent + 2) - a ** (exponent + 2)) / (exponent + 2)
    return m0, m1


#: Integral of the raw distribution over 11.1–72.2 km s⁻¹ [unitless]; 1.0037, not 1.
RAW_NORMALISATION_NASA = float(_raw_moments(*SPEED_RANGE_NASA)[0])


def speed_density_nasa(speed):
    """Probability density of meteoroid impact speed in Earth orbit, space-station design convention.

    Parameters
    ----------
    speed : numeric
        Meteoroid speed [km s⁻¹].

    Returns
    -------
    numeric
        Probability density [s km⁻¹], renormalised to integrate to 1 over 11.1–72.2 km s⁻¹;
        0 outside that range, NaN for NaN.

    Notes
    -----
    The distribution of [1]_, [2]_ (from memory), based on Erickson (1968) and Kessler (1969)
    according to [3]_:

    .. math::

        n(v) = \\begin{cases}
            0.112 & 11.1 \\le v < 16.3 \\\\
            3.328\\times10^{5}\\,v^{-5.34} & 16.3 \\le v < 55 \\\\
            1.695\\times10^{-4} & 55 \\le v \\le 72.2
        \\end{cases}

    As recalled its integral is 1.0037 (``RAW_NORMALISATION_NASA``); this function divides by
    that value so that the density integrates to exactly 1. The renormalised mean is
    16.86 km s⁻¹. The lower limit 11.1 km s⁻¹ is the escape speed at 100 km altitude: the
    distribution already contains the Earth's gravitational acceleration and is used at every
    orbital altitude as it stands. It is treated here as the distribution of the flux (impact
    rate) over speed.

    See Also
    --------
    speed_bins_nasa

    References
    ----------
    .. [1] NASA, "Space Station Program Natural Environment Definition for Design,"
       SSP 30425 Rev. B, 1994.
    .. [2] B. J. Anderson and R. E. Smith (eds.), "Natural Orbital Environment Guidelines for
       Use in Aerospace Vehicle Development," NASA TM-4527, 1994.
    .. [3] National Research Council, *Protecting the Space Station from Meteoroids and
       Orbital Debris*, National Academy Press, 1997, p. 18.
    """
    v = np.asarray(speed, dtype=np.float64)
    density = np.zeros_like(v)
    for start, stop, coefficient, exponent in SPEED_PIECES_NASA:
        inside = (v >= start) & ((v < stop) | ((stop == SPEED_RANGE_NASA[1]) & (v == stop)))
        density = np.where(inside, coefficient * np.where(inside, v, 1.0) ** exponent, density)
    density = np.where(np.isnan(v), np.nan, density / RAW_NORMALISATION_NASA)
    return density if density.ndim else float(density)


def speed_bins_nasa(speed_bin_width=1.0):
    """Discretise the meteoroid speed distribution into equal-width speed bins.

    Parameters
    ----------
    speed_bin_width : float
        Width of the speed bins [km s⁻¹], > 0. Bins start at 11.1 km s⁻¹; the last one is cut
        at 72.2 km s⁻¹.

    Returns
    -------
    speeds : (nv,) float
        Representative speed of each bin: the mean of the distribution within the bin
        [km s⁻¹].
    probabilities : (nv,) float
        Probability of each bin [unitless]; they sum to 1.

    Raises
    ------
    InputError
        If ``speed_bin_width`` is not a positive finite number.

    Notes
    -----
    With :math:`n` from :func:`speed_density_nasa` and bin :math:`k` covering
    :math:`[v_k, v_{k+1}]`,

    .. math::

        p_k = \\int_{v_k}^{v_{k+1}} n(v)\\,dv, \\qquad
        \\bar v_k = \\frac{1}{p_k}\\int_{v_k}^{v_{k+1}} v\\,n(v)\\,dv,

    evaluated in closed form. Because each bin sits at its own mean, :math:`\\sum p_k \\bar v_k`
    equals the mean of the continuous distribution (16.86 km s⁻¹) for any bin width.

    See Also
    --------
    speed_density_nasa
    """
    width = float(speed_bin_width)
    if not (np.isfinite(width) and width > 0.0):
        raise InputError(f"speed_bin_width must be positive and finite [km s⁻¹]; got {width:g}")
    lo, hi = SPEED_RANGE_NASA
    count = max(1, int(np.ceil((hi - lo) / width - 1e-9)))
    edges = np.minimum(lo + width * np.arange(count + 1), hi)
    edges[-1] = hi
    m0, m1 = _raw_moments(edges[:-1], edges[1:])
    keep = m0 > 0.0
    return m1[keep] / m0[keep], m0[keep] / RAW_NORMALISATION_NASA


#: Altitude at which the NASA distribution is taken to hold as it stands [km]: its lower limit,
#: 11.1 km s⁻¹, is the escape speed at 100 km (11.09 km s⁻¹), the top of the atmosphere allowed
#: for in Earth shielding. Used by the ``"ecss_2008"`` derivation.
NASA_REFERENCE_ALTITUDE = 100.0

# Gauss–Legendre nodes per sub-interval of the focused-speed bins.
_GL_NODES = 16


def _inverse_square_mean():
    """⟨v⁻²⟩ of the renormalised NASA distribution [s² km⁻²], in closed form."""
    total = 0.0
    for start, stop, coefficient, exponent in SPEED_PIECES_NASA:
        q = exponent - 1.0  # ∫ v^(p−2) dv = v^(p−1)/(p−1); p = 1 does not occur
        total += coefficient * (stop**q - start**q) / q
    return total / RAW_NORMALISATION_NASA


def mean_focusing_factor_ecss_2008(altitude):
    """Mean gravitational focusing factor of the ``"ecss_2008"`` convention.

    Parameters
    ----------
    altitude : numeric
        Altitude above the Earth's equatorial radius [km]; must exceed 100 km.

    Returns
    -------
    numeric
        :math:`\\bar G(h) = \\sum_k n_\\infty(v_{\\infty,k})\\,G_k(h)` [unitless] for the free-space
        distribution derived in :func:`speed_bins_ecss_2008`.

    Raises
    ------
    InputError
        If an altitude is not finite or does not exceed 100 km.

    Notes
    -----
    With :math:`e_0 = v_{esc}(100\\ \\mathrm{km})`, :math:`e = v_{esc}(h)`,
    :math:`\\Delta = e_0^2 - e^2` and :math:`\\langle v^{-2}\\rangle` the mean of
    :math:`v^{-2}` over the renormalised NASA distribution (0.0042868 s² km⁻²), the
    derivation of :func:`speed_bins_ecss_2008` gives in closed form

    .. math:: \\bar G(h) = \\frac{1 - \\Delta\\,\\langle v^{-2}\\rangle}
                                {1 - e_0^2\\,\\langle v^{-2}\\rangle}.

    It is 2.117 at 100 km, 2.067 at 400 km and 1.980 at 1000 km: within 6 % of the simplified
    factor :math:`1 + (R_E + 100)/(R_E + h)` (2.000, 1.956, 1.878), **not** in the 1.3–1.4 band
    quoted for 400 km in environment.md §2.2. That band is the physical factor for a single
    free-space speed of 17–20 km s⁻¹, close to the mean of ECSS's own free-space distribution;
    the free-space distribution derived from the NASA near-Earth one is much slower (it keeps
    the many meteoroids arriving just above escape speed, whose free-space speed is small and
    whose focusing is large). The 40–50 % difference between the conventions stated in
    environment.md §4 #10 therefore does not appear with this derivation.
    """
    e0_sq = escape_speed(NASA_REFERENCE_ALTITUDE) ** 2
    h = np.asarray(altitude, dtype=np.float64)
    if np.any(~np.isfinite(h) | (h <= NASA_REFERENCE_ALTITUDE)):
        bad = h.ravel()[int(np.flatnonzero((~np.isfinite(h) | (h <= 100.0)).ravel())[0])]
        raise InputError(
            f"altitude must be finite and greater than {NASA_REFERENCE_ALTITUDE:g} km for the "
            f"ecss_2008 focusing convention; got {bad:g} km"
        )
    delta = e0_sq - np.asarray(escape_speed(h)) ** 2
    inverse_square = _inverse_square_mean()
    factor = (1.0 - delta * inverse_square) / (1.0 - e0_sq * inverse_square)
    return factor if np.ndim(factor) else float(factor)


def speed_bins_ecss_2008(altitude, speed_bin_width=1.0):
    """Meteoroid speed bins at an altitude in the ``"ecss_2008"`` focusing convention.

    Parameters
    ----------
    altitude : float
        Altitude above the Earth's equatorial radius [km]; must exceed 100 km.
    speed_bin_width : float
        Width of the speed bins at the altitude [km s⁻¹], > 0. Default 1.0.

    Returns
    -------
    speeds : (nv,) float
        Mean focused speed in each bin at the altitude [km s⁻¹].
    probabilities : (nv,) float
        Fraction of the focused flux in each bin [unitless]; they sum to 1.
    mean_focusing_factor : float
        :math:`\\bar G` [unitless] (:func:`mean_focusing_factor_ecss_2008`).

    Raises
    ------
    InputError
        For an altitude not above 100 km or a bin width that is not positive and finite.

    Notes
    -----
    ECSS-E-ST-10-04C Annex C.1.2 [1]_ (text read; equation forms from memory) maps each
    free-space speed :math:`v_\\infty` to :math:`v = \\sqrt{v_\\infty^2 + v_{esc}^2(r)}`, raises the
    flux at that speed by :math:`G = 1 + v_{esc}^2(r)/v_\\infty^2`, and gives the focused speed
    distribution the weights :math:`n_\\infty G/\\bar G` with :math:`\\bar G = \\sum n_\\infty G`.
    It starts from a free-space distribution (its Table C-1, which we could not read). **We
    derive a free-space distribution ourselves** from the NASA near-Earth distribution
    :math:`n(v)` (:func:`speed_density_nasa`), taken to hold at 100 km altitude, where its
    lower limit 11.1 km s⁻¹ equals the escape speed :math:`e_0` = 11.09 km s⁻¹:

    1. remove the escape speed, :math:`v_\\infty^2 = v^2 - e_0^2`;
    2. undo the focusing at 100 km by weighting with :math:`1/G_0 = v_\\infty^2/v^2` and
       normalising: :math:`n_\\infty \\propto n(v)\\,v_\\infty^2/v^2`;
    3. re-focus to the altitude with the ECSS mapping: speed
       :math:`v_h = \\sqrt{v_\\infty^2 + e^2}` and weight :math:`n_\\infty G_h/\\bar G`.

    Written in the 100 km speed :math:`v`, the focused flux density is
    :math:`n(v)\\,(1 - \\Delta/v^2)` up to normalisation, at speed
    :math:`v_h = \\sqrt{v^2 - \\Delta}`, :math:`\\Delta = e_0^2 - e^2`. At 100 km the NASA
    distribution is recovered exactly. The bins are equal-width in :math:`v_h` from
    :math:`\\sqrt{11.1^2 - \\Delta}` to :math:`\\sqrt{72.2^2 - \\Delta}` km s⁻¹; each bin's
    probability and mean speed are integrated over :math:`v_h` by Gauss–Legendre quadrature
    (16 nodes per sub-interval between the distribution's break points, relative error below
    1e-12), so the binned mean equals the continuous mean. This derivation is ours, not
    ECSS's; see :func:`mean_focusing_factor_ecss_2008` for what it implies.

    See Also
    --------
    speed_bins_nasa, mean_focusing_factor_ecss_2008,
    pockmark.environment.orbit.focusing_factor_ecss

    References
    ----------
    .. [1] ECSS, "Space engineering – Space environment," ECSS-E-ST-10-04C, ESA-ESTEC, 2008.
    """
    factor = mean_focusing_factor_ecss_2008(altitude)
    if np.ndim(factor):
        raise InputError(f"altitude must be a scalar [km]; got shape {np.shape(altitude)}")
    width = float(speed_bin_width)
    if not (np.isfinite(width) and width > 0.0):
        raise InputError(f"speed_bin_width must be positive and finite [km s⁻¹]; got {width:g}")
    delta = escape_speed(NASA_REFERENCE_ALTITUDE) ** 2 - escape_speed(float(altitude)) ** 2
    limits = np.array([p[0] for p in SPEED_PIECES_NASA] + [SPEED_RANGE_NASA[1]])
    breaks = np.sqrt(limits**2 - delta)
    lo, hi = breaks[0], breaks[-1]
    count = max(1, int(np.ceil((hi - lo) / width - 1e-9)))
    edges = np.minimum(lo + width * np.arange(count + 1), hi)
    edges[-1] = hi
    x, w = np.polynomial.legendre.leggauss(_GL_NODES)
    mass = np.zeros(count)
    moment = np.zeros(count)
    for k in range(count):
        cuts = np.concatenate(([edges[k]], breaks[(breaks > edges[k]) & (breaks < edges[k + 1])],
                               [edges[k + 1]]))
        for a, b in zip(cuts[:-1], cuts[1:], strict=True):
            v_h = 0.5 * (a + b) + 0.5 * (b - a) * x
            v = np.sqrt(v_h**2 + delta)
            # focused density in v_h: n(v) (1 − Δ/v²) dv/dv_h = n(v) v_h³ / v³
            density = np.asarray(speed_density_nasa(v)) * v_h**3 / v**3
            mass[k] += 0.5 * (b - a) * np.sum(w * density)
            moment[k] += 0.5 * (b - a) * np.sum(w * density * v_h)
    keep = mass > 0.0
    return moment[keep] / mass[keep], mass[keep] / mass[keep].sum(), factor
