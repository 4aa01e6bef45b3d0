"""Quadrature grids of arrival directions on the unit sphere.

Scope: deterministic, approximately equal-area point sets used to discretise isotropic (or
isotropic-minus-Earth) particle fluxes in the local orbital frame: the Fibonacci lattice
(:func:`fibonacci_directions`) and the same lattice cut exactly at a cone about its axis
(:func:`fibonacci_directions_above`).
"""

import operator

import numpy as np

from pockmark.errors import InputError

#: Golden angle [rad]: the azimuth step of the Fibonacci lattice, π (3 − √5).
GOLDEN_ANGLE = np.pi * (3.0 - np.sqrt(5.0))


def fibonacci_directions(n):
    """Equal-area set of ``n`` unit vectors on the sphere (Fibonacci lattice).

    Parameters
    ----------
    n : int
        Number of directions. Must be >= 1.

    Returns
    -------
    (n, 3) float
        Unit vectors. Each one represents a solid angle of :math:`4\\pi/n` [sr].

    Raises
    ------
    InputError
        If ``n`` is not a positive integer.

    Notes
    -----
    The points form the spherical Fibonacci (golden-spiral) lattice of [1]_:

    .. math::

        z_k = 1 - \\frac{2k + 1}{n}, \\qquad
        \\varphi_k = k\\,\\pi(3 - \\sqrt5), \\qquad k = 0, \\dots, n - 1,

    with :math:`x_k = \\sqrt{1 - z_k^2}\\cos\\varphi_k` and
    :math:`y_k = \\sqrt{1 - z_k^2}\\sin\\varphi_k`. Because :math:`z` is uniform on
    :math:`[-1, 1]` for an isotropic distribution, each point is the centre of one of ``n``
    equal-area zonal bands; within a band the golden-angle azimuths spread the points evenly.
    The lattice axis is the local zenith :math:`\\hat z`, so a cone about nadir (the Earth's
    disc) is cut along band boundaries and the fraction of points inside it is exact to within
    one point, :math:`1/n`. [1]_ uses an odd number of points, :math:`2N + 1`; this form allows
    any ``n``. The result is deterministic.

    References
    ----------
    .. [1] Á. González, "Measurement of areas on a sphere using Fibonacci and
       latitude–longitude lattices," *Math. Geosci.*, vol. 42, no. 1, pp. 49–64, 2010,
       :doi:`10.1007/s11004-009-9257-x`.
    """
    try:
        count = operator.index(n)
    except TypeError:
        raise InputError(
            f"n must be a positive integer number of directions; got {n!r} of type "
            f"{type(n).__name__}"
        ) from None
    if count < 1:
        raise InputError(f"n must be a positive integer number of directions; got {count}")
    k = np.arange(count, dtype=np.float64)
    z = 1.0 - (2.0 * k + 1.0) / count
    radius = np.sqrt(np.maximum(0.0, 1.0 - z * z))
    azimuth = k * GOLDEN_ANGLE
    return np.column_stack((radius * np.cos(azimuth), radius * np.sin(azimuth), z))


def fibonacci_directions_above(n, z_min):
    """Fibonacci lattice restricted to the spherical cap above a height, with exact cell areas.

    Parameters
    ----------
    n : int
        Number of directions of the full lattice (:func:`fibonacci_directions`), >= 1.
    z_min : float
        Lower edge of the cap, in [−1, 1]: directions with :math:`z > z_{min}` are kept
        (:math:`z_{min} = -\\cos\\eta` removes the cone of half-angle :math:`\\eta` about
        :math:`-\\hat z`).

    Returns
    -------
    directions : (k, 3) float
        Unit vectors of the kept cells.
    fractions : (k,) float
        Fraction of the full sphere's solid angle each cell represents [unitless]; they sum to
        the cap's fraction :math:`(1 - z_{min})/2` to round-off.

    Raises
    ------
    InputError
        If ``n`` is not a positive integer or ``z_min`` is not in [−1, 1].

    Notes
    -----
    Point :math:`k` of the lattice is the centre of the equal-area band
    :math:`1 - 2(k+1)/n \\le z \\le 1 - 2k/n`. Bands entirely above :math:`z_{min}` are kept
    with the fraction :math:`1/n`; bands entirely below are dropped; the one band the cap's
    edge cuts keeps only its part above the edge, represented by a point at that part's
    centre height (same azimuth) with the fraction :math:`(z_{top} - z_{min})/2`. The kept
    solid angle is therefore exact, where simply dropping lattice points inside the cone is
    exact only to within :math:`1/n`.
    """
    units = fibonacci_directions(n)
    count = units.shape[0]
    z_cut = float(z_min)
    if not (np.isfinite(z_cut) and -1.0 <= z_cut <= 1.0):
        raise InputError(f"z_min must be in [−1, 1]; got {z_min!r}")
    k = np.arange(count, dtype=np.float64)
    top = 1.0 - 2.0 * k / count
    bottom = 1.0 - 2.0 * (k + 1.0) / count
    full = bottom >= z_cut
    cut = (bottom < z_cut) & (top > z_cut)
    fractions = np.where(full, 1.0 / count, 0.0)
    directions = units.copy()
    if np.any(cut):
        b = int(np.flatnonzero(cut)[0])
        z = 0.5 * (top[b] + z_cut)
        radius = np.sqrt(max(0.0, 1.0 - z * z))
        azimuth = b * GOLDEN_ANGLE
        directions[b] = (radius * np.cos(azimuth), radius * np.sin(azimuth), z)
        fractions[b] = 0.5 * (top[b] - z_cut)
    keep = fractions > 0.0
    return directions[keep], fractions[keep]
