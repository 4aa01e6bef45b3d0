"""A meteoroid flux seen from a moving vehicle: arrival directions, speeds and flux gain.

Meteoroid models give the flux in a frame at rest with the Earth (isotropic apart from the
Earth's shadow). A vehicle moving at orbital speed meets more particles ahead than behind,
at higher speeds ahead, and sees every arrival direction tilted toward its flight direction.
:func:`to_moving_frame` makes that change of frame exactly for each (direction, speed) cell
of a discretised flux and re-bins the result on a direction grid and speed bins.
"""

import numpy as np
from scipy.spatial import cKDTree

from pockmark.environment.directions import fibonacci_directions
from pockmark.errors import InputError

__all__ = ["to_moving_frame"]

#: Flight direction of the vehicle in the local orbital frame.
FLIGHT_DIRECTION = np.array([1.0, 0.0, 0.0])


def to_moving_frame(directions, fractions, speeds, probabilities, vehicle_speed, grid_size,
                    speed_bin_width):
    r"""Re-express a direction × speed flux at rest in the frame of a moving vehicle.

    Parameters
    ----------
    directions : (nj, 3) float
        Unit vectors toward where the particles come from, in the rest frame (local orbital
        axes), typically a fine grid.
    fractions : (nj,) float
        Share of the flux from each direction [unitless].
    speeds : (nk,) float
        Particle speeds in the rest frame [km s⁻¹], > 0.
    probabilities : (nk,) float
        Share of the flux at each speed [unitless], the same for every direction.
    vehicle_speed : float
        Vehicle speed along :math:`+\hat x` [km s⁻¹], ≥ 0.
    grid_size : int
        Number of directions of the output Fibonacci grid over the whole sphere.
    speed_bin_width : float
        Width of the output speed bins [km s⁻¹], > 0.

    Returns
    -------
    directions : (mj, 3) float
        The output grid's directions that receive flux.
    speeds : (mk,) float
        Centre of each non-empty output speed bin [km s⁻¹]. Centres rather than means, so
        that fluxes at several orbit positions share one speed grid and merge without
        multiplying the speeds (error ≤ half a bin width).
    weights : (mj, mk) float
        Share of the moving vehicle's flux per cell, normalised to the same total as
        ``fractions × probabilities``.
    gain : float
        Ratio of the flux the moving vehicle meets to the flux at rest,
        :math:`K = \sum w_{jk} |u_{jk}| / v_k \,/\, \sum w_{jk}` (≥ 1).

    Raises
    ------
    InputError
        If the vehicle speed is negative or not finite, a speed is not positive, or the sizes
        do not match.

    Notes
    -----
    A particle of rest-frame speed :math:`v` arriving from direction :math:`d` moves with
    velocity :math:`-v d`; relative to a vehicle of velocity :math:`s\hat x` it moves with
    :math:`-(v d + s \hat x)`, so it arrives from :math:`u = (v d + s\hat x)/|v d + s\hat x|`
    at speed :math:`|v d + s\hat x|`. The number of particles crossing a unit area normal to
    their motion per unit time scales with the relative speed, so the cell's flux is
    multiplied by :math:`|v d + s\hat x| / v` (the kinematics of a moving observer in a
    stream of particles; the same vector addition underlies the oriented-surface factors of
    ECSS-E-ST-10-04C, Annex C — from memory). Each cell's share is then put in the output
    grid cell nearest to :math:`u` (equal-area Voronoi cells of the Fibonacci grid) and the
    speed bin of its relative speed. Gravity's bending of the paths near the vehicle is
    ignored (the focusing factor keeps only its effect on the flux).

    For an isotropic flux of one speed :math:`v > s` the gain is the mean relative speed over
    :math:`v`, :math:`K = 1 + s^2/(3 v^2)`, and a flat plate facing the flight direction
    meets :math:`(1 + s/v)^2` times, one facing away :math:`(1 - s/v)^2` times, the flux of a
    plate at rest; the tests check both.
    """
    directions = np.asarray(directions, dtype=np.float64)
    fractions = np.asarray(fractions, dtype=np.float64)
    speeds = np.asarray(speeds, dtype=np.float64)
    probabilities = np.asarray(probabilities, dtype=np.float64)
    s = float(vehicle_speed)
    if not (np.isfinite(s) and s >= 0.0):
        raise InputError(f"vehicle_speed must be ≥ 0 and finite [km s⁻¹]; got {vehicle_speed!r}")
    if not np.all(speeds > 0.0):
        raise InputError("meteoroid speeds must be positive [km s⁻¹]")
    if directions.shape != (len(fractions), 3) or speeds.shape != probabilities.shape:
        raise InputError("directions/fractions and speeds/probabilities must match in length")
    if not (np.isfinite(speed_bin_width) and speed_bin_width > 0.0):
        raise InputError(f"speed_bin_width must be > 0 [km s⁻¹]; got {speed_bin_width!r}")

    arriving = directions[:, None, :] * speeds[None, :, None] + s * FLIGHT_DIRECTION
    relative = np.linalg.norm(arriving, axis=2)
    rest = fractions[:, None] * probabilities[None, :]
    moving = rest * relative / speeds[None, :]
    gain = float(moving.sum() / rest.sum())

    grid = fibonacci_directions(grid_size)
    _, cell = cKDTree(grid).query((arriving / relative[..., None]).reshape(-1, 3))
    speed_bin = np.floor(relative.ravel() / speed_bin_width).astype(np.int64)
    n_bins = int(speed_bin.max()) + 1
    flat = cell * n_bins + speed_bin
    weights = np.bincount(flat, weights=moving.ravel(), minlength=grid_size * n_bins)
    weights = weights.reshape(grid_size, n_bins)
    rows = np.flatnonzero(weights.sum(axis=1) > 0.0)
    columns = np.flatnonzero(weights.sum(axis=0) > 0.0)
    bin_speeds = (columns + 0.5) * speed_bin_width
    return grid[rows], bin_speeds, weights[np.ix_(rows, columns)] / gain, gain
