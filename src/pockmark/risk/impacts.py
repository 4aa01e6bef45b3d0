"""Per-face impact and penetration rates from a directional flux, visibility and shields.

For a face *i* with area :math:`A_i`, unit normal :math:`n_i` and visible fraction
:math:`v_{ij}` toward direction :math:`u_j`, a source whose omnidirectional flux of particles
of diameter at least *d* is :math:`\\Phi_0(\\ge d)` per unit cross-section and whose
direction-speed distribution has weights :math:`w_{jk}` at speeds :math:`V_k` gives, over a
time *T*,

.. math::

    N_i^{imp} = A_i T \\Phi_0(\\ge d_{imp}) \\sum_j \\max(0, n_i\\cdot u_j)\\, v_{ij} \\sum_k w_{jk}

    N_i^{pen} = A_i T \\sum_j \\max(0, n_i\\cdot u_j)\\, v_{ij}
                \\sum_k w_{jk}\\, \\Phi_0(\\ge d_c(V_k, \\theta_{ij}, \\rho_p))

with :math:`\\cos\\theta_{ij} = n_i\\cdot u_j`. The inner sum over speeds depends on the face
only through its shield and the impact angle, so it is tabulated once per shield and
direction on a fine grid of angles (:data:`ANGLE_STEP`) and interpolated linearly.
"""

import warnings

import numpy as np

from pockmark.errors import ModelRangeWarning

#: Spacing of the impact-angle grid on which penetration fluxes are tabulated [°].
ANGLE_STEP = 0.25
ANGLE_NODES = np.arange(0.0, 90.0 + ANGLE_STEP / 2, ANGLE_STEP)


def penetration_table(shield, flux):
    """Flux of penetrating particles per direction and impact angle.

    Parameters
    ----------
    shield : pockmark.ballistics.shields.Shield
    flux : DirectionalFlux-like
        ``speeds`` (nv,), ``weights`` (nd, nv) and ``penetrating_flux``.

    Returns
    -------
    (nd, na) float
        :math:`\\sum_k w_{jk}\\Phi_0(\\ge d_c(V_k, \\theta_a))` at the angles
        :data:`ANGLE_NODES` [m⁻² yr⁻¹], each particle at its own density when the flux
        carries a density law.
    """
    return _tabulate(shield, flux)


def out_of_range_table(shield, flux):
    """The part of :func:`penetration_table` from impacts outside the equation's stated range."""
    speeds, angles = _table_grid(flux)
    return _tabulate(shield, flux, lambda density: shield.out_of_range(speeds, angles, density))


def _table_grid(flux):
    """(speeds (1, nv), angles (na, 1)) of the penetration tables."""
    return np.asarray(flux.speeds, dtype=np.float64)[None, :], ANGLE_NODES[:, None]


def _tabulate(shield, flux, weight=None, smallest=None):
    """Σ_k w_jk × (penetrating flux at speed k and angle a), for particles of at least
    ``smallest`` [cm] too when given, with an optional per-density weight."""
    speeds, angles = _table_grid(flux)
    shape = (len(ANGLE_NODES), speeds.shape[1])

    def critical(density):
        values = np.broadcast_to(shield.critical_diameter(speeds, angles, density), shape)
        return values if smallest is None else np.maximum(values, smallest)

    # The table spans every speed bin at every angle up to grazing, so it always reaches
    # critical diameters far beyond a flux model's size range (slow or grazing impacts) where
    # the flux is negligible; the models' range warnings would only be noise here.
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ModelRangeWarning)
        penetrating = np.broadcast_to(flux.penetrating_flux(critical, weight), shape)
    return np.asarray(flux.weights, dtype=np.float64) @ np.asarray(penetrating, dtype=np.float64).T


def angle_positions(cosines):
    """Lower grid node and interpolation fraction of the impact angles given by ``cosines``."""
    angles = np.degrees(np.arccos(np.clip(cosines, 0.0, 1.0)))
    position = angles / ANGLE_STEP
    lower = np.minimum(position.astype(np.int64), len(ANGLE_NODES) - 2)
    return lower, position - lower


def accumulate_angle_exposure(histogram, lower, fraction, exposure):
    """Add ``exposure`` (f, c) to ``histogram`` (c, na) at each entry's two angle nodes.

    Because the face sums interpolate linearly between the same two nodes, any tabulated
    quantity Q(j, θ) summed over these faces equals Σ_ja histogram[j, a] · Q[j, a] exactly;
    this gives breakdowns by particle size or direction without a second pass over faces.
    """
    c, na = histogram.shape
    rows = np.broadcast_to(np.arange(c)[None, :], lower.shape)
    flat = (rows * na + lower).ravel()
    histogram += np.bincount(flat, weights=(exposure * (1.0 - fraction)).ravel(), minlength=c * na).reshape(c, na)
    histogram += np.bincount(flat + 1, weights=(exposure * fraction).ravel(), minlength=c * na).reshape(c, na)


def interpolate_angles(table_rows, cosines):
    """Interpolate tabulated values at the impact angles given by ``cosines``.

    Parameters
    ----------
    table_rows : (c, na) float
        One row of :func:`penetration_table` per direction.
    cosines : (f, c) float
        :math:`\\cos\\theta` of each face toward each direction, in [0, 1].
    """
    return interpolate_at(table_rows, *angle_positions(cosines))


def interpolate_at(table_rows, lower, fraction):
    """Values of ``table_rows`` (c, na) at angle positions from :func:`angle_positions`."""
    columns = np.arange(table_rows.shape[0])[None, :]
    return table_rows[columns, lower] * (1.0 - fraction) + table_rows[columns, lower + 1] * fraction


#: Edges of the particle-size bins of the size breakdown [cm].
SIZE_EDGES = (0.0, 0.001, 0.003, 0.01, 0.03, 0.1, 0.3, 1.0, 3.0, 10.0, np.inf)


def penetration_table_by_size(shield, flux, edges=SIZE_EDGES):
    """:func:`penetration_table` split by particle size: (n_bins, nd, na) [m⁻² yr⁻¹].

    Bin *b* holds the penetrating particles with diameter in [edges[b], edges[b+1]):
    :math:`\\Phi_0(\\ge\\max(d_c, e_b)) - \\Phi_0(\\ge\\max(d_c, e_{b+1}))`. The bins add
    up to :func:`penetration_table`.
    """
    cumulative = [_tabulate(shield, flux, smallest=edge) for edge in edges]
    return np.stack([low - high for low, high in zip(cumulative[:-1], cumulative[1:])])
