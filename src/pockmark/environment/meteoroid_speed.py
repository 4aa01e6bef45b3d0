"""Speed distribution of meteoroids in Earth orbit.

Scope: the analytic near-Earth meteoroid speed distribution of the ISS design environment
(NASA SSP 30425 Rev. B / TM-4527, 1994), 11.1–72.2 km s⁻¹, and its discretisation into speed
bins. The distribution is independent of arrival direction in this version.
"""

import numpy as np

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
    """Probability density of meteoroid impact speed in Earth orbit, ISS design convention.

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
