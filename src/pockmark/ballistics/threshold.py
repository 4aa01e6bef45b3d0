"""A constant critical diameter, for impact counting and tests.

Models
------
threshold_diameter
    Not a published ballistic-limit equation: every particle at least a given size counts as
    a failure, whatever its speed, direction or density. Use it to count impacts above a
    size (e.g. for comparison with returned-surface crater counts) or to test the risk
    pipeline with a shield whose answer is known.
"""

from pockmark._validation import require_positive
from pockmark.ballistics._common import _finish, _impact_conditions

__all__ = ["threshold_diameter"]


def threshold_diameter(impact_velocity, impact_angle, projectile_density, diameter):
    r"""Constant critical diameter, independent of the impact conditions.

    Parameters
    ----------
    impact_velocity : numeric
        Impact speed [km s⁻¹]. Values ≤ 0 mean no impact and give ``inf``.
    impact_angle : numeric
        Impact angle from the surface normal [°], in [0, 180]. Angles ≥ 90 give ``inf``.
    projectile_density : numeric
        Density of the projectile [g cm⁻³]; checked but otherwise unused.
    diameter : numeric
        Threshold diameter [cm]: every particle at least this large counts.

    Returns
    -------
    numpy.ndarray
        ``diameter`` broadcast against the impact conditions [cm]; float64, 0-d for scalar
        arguments. ``inf`` where there is no impact (speed ≤ 0 or angle ≥ 90°), NaN where an
        impact condition is NaN.

    Raises
    ------
    InputError
        If ``diameter`` or ``projectile_density`` is not positive and finite, if
        ``impact_angle`` is outside [0, 180] or if ``impact_velocity`` is infinite.

    Notes
    -----
    .. math::

        d_c(V, \theta, \rho_p) = d_{\mathrm{threshold}}

    This is not a published model and has no validity range; it is named for what it does
    rather than after an author and year, and its registry key is
    ``"threshold_diameter"``. The no-impact rules of the other equations still apply, so
    particles moving away from or parallel to the face are not counted.

    See Also
    --------
    pockmark.ballistics.tabulated_diameter : User table over speed and angle.
    pockmark.ballistics.cour_palais_1987 : Single metallic wall.
    pockmark.ballistics.christiansen_1993 : Whipple shield.

    Examples
    --------
    >>> from pockmark.ballistics import threshold_diameter
    >>> threshold_diameter([5.0, 10.0], [0.0, 95.0], 2.8, 0.1)
    array([0.1, inf])
    """
    velocity, angle, density = _impact_conditions(
        impact_velocity, impact_angle, projectile_density
    )
    size = require_positive("diameter", diameter, "cm")
    # NaN in any impact condition propagates, as for the physical models.
    critical = size + 0.0 * velocity * angle * density
    return _finish(critical, velocity, angle)
