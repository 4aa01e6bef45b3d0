"""A critical diameter tabulated by the user over impact speed and angle.

Models
------
tabulated_diameter
    Not a published ballistic-limit equation: bilinear interpolation in a user's table of
    critical diameter against impact speed and impact angle, e.g. from test results, a
    hydrocode study or an equation that pockmark does not implement. Outside the table the
    nearest edge value is used.
"""

import numpy as np

from pockmark._validation import require_positive
from pockmark.ballistics._common import _finish, _impact_conditions
from pockmark.errors import InputError

__all__ = ["tabulated_diameter"]


def _axis(name, values, unit, low, high, what):
    """A strictly increasing 1-D float axis with at least two values inside [low, high)."""
    try:
        axis = np.asarray(values, dtype=np.float64)
    except (TypeError, ValueError):
        raise InputError(f"{name} must be a list of numbers [{unit}]; got {values!r}") from None
    if axis.ndim != 1 or axis.size < 2:
        raise InputError(
            f"{name} must be a list of at least two numbers [{unit}]; got shape {axis.shape}"
        )
    bad = ~(np.isfinite(axis) & (axis >= low) & (axis < high))
    if np.any(bad):
        index = int(np.flatnonzero(bad)[0])
        raise InputError(f"{name} must be {what} [{unit}]; got {axis[index]:g} at index {index}")
    steps = np.diff(axis)
    if np.any(steps <= 0):
        index = int(np.flatnonzero(steps <= 0)[0]) + 1
        raise InputError(
            f"{name} must be strictly increasing [{unit}]; got {axis[index]:g} after "
            f"{axis[index - 1]:g} at index {index}"
        )
    return axis


def _bracket(axis, values):
    """Lower cell index and weight of ``values`` (already clipped to the axis)."""
    index = np.clip(np.searchsorted(axis, values, side="right") - 1, 0, axis.size - 2)
    with np.errstate(invalid="ignore"):
        weight = (values - axis[index]) / (axis[index + 1] - axis[index])
    return index, weight


def tabulated_diameter(impact_velocity, impact_angle, projectile_density, speeds, angles,
                       diameters):
    r"""Critical diameter interpolated bilinearly in a table over impact speed and angle.

    Parameters
    ----------
    impact_velocity : numeric
        Impact speed [km s⁻¹]. Values ≤ 0 mean no impact and give ``inf``.
    impact_angle : numeric
        Impact angle from the surface normal [°], in [0, 180]. Angles ≥ 90 give ``inf``.
    projectile_density : numeric
        Projectile density [g cm⁻³]; checked but otherwise unused (see Notes).
    speeds : (n,) array-like
        Tabulated impact speeds, strictly increasing, positive [km s⁻¹]; n ≥ 2.
    angles : (m,) array-like
        Tabulated impact angles from the normal, strictly increasing, in [0, 90) [°]; m ≥ 2.
    diameters : (n, m) array-like
        Critical diameter at each (speed, angle) [cm]: one row per speed, one column per
        angle; positive and finite.

    Returns
    -------
    numpy.ndarray
        Interpolated critical diameter [cm]; float64, broadcast shape of the impact
        conditions. ``inf`` where there is no impact, NaN where an impact condition is NaN.

    Raises
    ------
    InputError
        If the table is malformed (too short, not increasing, wrong shape, values out of
        their domain) or an impact condition is physically impossible.

    Notes
    -----
    Inside the table, with :math:`V_i \le V \le V_{i+1}` and
    :math:`\theta_j \le \theta \le \theta_{j+1}`,

    .. math::

        d_c = (1-u)(1-w)\, d_{ij} + u (1-w)\, d_{i+1,j} + (1-u) w\, d_{i,j+1}
            + u w\, d_{i+1,j+1},

    with :math:`u = (V - V_i)/(V_{i+1} - V_i)` and
    :math:`w = (\theta - \theta_j)/(\theta_{j+1} - \theta_j)`. The result is continuous and
    equals the table at its nodes. Speed is the **total** impact speed and angle the angle
    from the surface normal; the table must be built on the same definitions.

    **Range and behaviour outside it.** The table's own extent,
    :math:`[V_1, V_n] \times [\theta_1, \theta_m]`, is the validity range. Outside it each
    coordinate is clamped to the nearest edge (constant extrapolation), without warning;
    :meth:`pockmark.ballistics.Shield.out_of_range` flags such impacts so that a run can
    report the flux that fell outside. Clamping in angle beyond the last tabulated angle is
    usually conservative (critical diameters tend to grow towards grazing incidence);
    clamping in speed is not necessarily so.

    **Projectile density.** A table holds one projectile density (the one it was built
    for); it is not scaled with :math:`\rho_p`. Give separate shields for very different
    particle classes if that matters.

    This is not a published model; it is named for what it does.

    See Also
    --------
    pockmark.ballistics.threshold_diameter : Constant critical diameter.

    Examples
    --------
    >>> from pockmark.ballistics import tabulated_diameter
    >>> table = dict(speeds=[3.0, 7.0], angles=[0.0, 60.0], diameters=[[0.2, 0.4], [0.5, 0.6]])
    >>> round(float(tabulated_diameter(5.0, 30.0, 2.8, **table)), 12)
    0.425
    """
    velocity, angle, density = _impact_conditions(
        impact_velocity, impact_angle, projectile_density
    )
    speed_axis = _axis("speeds", speeds, "km s⁻¹", 0.0, np.inf, "positive and finite")
    speed_axis = require_positive("speeds", speed_axis, "km s⁻¹")
    angle_axis = _axis("angles", angles, "°", 0.0, 90.0, "in [0, 90)")
    try:
        table = np.asarray(diameters, dtype=np.float64)
    except (TypeError, ValueError):
        raise InputError(
            f"diameters must be a table (list of rows) of numbers [cm]; got {diameters!r}"
        ) from None
    expected = (speed_axis.size, angle_axis.size)
    if table.shape != expected:
        raise InputError(
            f"diameters must have shape (len(speeds), len(angles)) = {expected}, one row per "
            f"speed; got {table.shape}"
        )
    table = require_positive("diameters", table, "cm")

    velocity, angle, density = np.broadcast_arrays(velocity, angle, density)
    v = np.clip(velocity, speed_axis[0], speed_axis[-1])
    a = np.clip(angle, angle_axis[0], angle_axis[-1])
    i, u = _bracket(speed_axis, v)
    j, w = _bracket(angle_axis, a)
    critical = (
        (1.0 - u) * (1.0 - w) * table[i, j]
        + u * (1.0 - w) * table[i + 1, j]
        + (1.0 - u) * w * table[i, j + 1]
        + u * w * table[i + 1, j + 1]
    )
    critical = critical + 0.0 * density  # NaN density propagates, as for the models
    return _finish(critical, velocity, angle)
