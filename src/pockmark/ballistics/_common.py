"""Validation and masking of impact conditions shared by every ballistic-limit equation."""

import numpy as np

from pockmark.errors import InputError

def _first_bad(name, values, bad, valid):
    """Raise InputError for the first element of ``values`` flagged in ``bad``."""
    index = int(np.flatnonzero(bad.ravel())[0])
    where = f" at index {index}" if values.ndim else ""
    raise InputError(f"{name} must be {valid}; got {values.ravel()[index]:g}{where}")


def _impact_conditions(impact_velocity, impact_angle, projectile_density):
    """Coerce and check the impact conditions common to all ballistic-limit equations.

    NaN passes through (it gives NaN critical diameter); everything else physically
    impossible raises.

    Returns
    -------
    velocity, angle, density : ndarray
        float64 arrays, not yet broadcast against each other.
    """
    velocity = np.asarray(impact_velocity, dtype=np.float64)
    angle = np.asarray(impact_angle, dtype=np.float64)
    density = np.asarray(projectile_density, dtype=np.float64)
    bad = np.isinf(velocity)
    if np.any(bad):
        _first_bad(
            "impact_velocity", velocity, bad,
            "finite [km s⁻¹] (values ≤ 0 are allowed and mean no impact)",
        )
    bad = ~np.isnan(angle) & ~((angle >= 0.0) & (angle <= 180.0))
    if np.any(bad):
        _first_bad(
            "impact_angle", angle, bad,
            "in [0, 180] [°] measured from the surface normal (≥ 90 means the particle "
            "cannot hit the face); convert elevation angles with 90 - elevation",
        )
    bad = ~np.isnan(density) & ~(np.isfinite(density) & (density > 0.0))
    if np.any(bad):
        _first_bad("projectile_density", density, bad, "positive and finite [g cm⁻³]")
    return velocity, angle, density


def _no_impact(velocity, angle):
    """Mask of conditions under which the particle does not strike the face."""
    return (velocity <= 0.0) | (angle >= 90.0)


def _finish(critical, velocity, angle):
    """Set d_c = inf where there is no impact and return a float64 ndarray."""
    out = np.where(_no_impact(velocity, angle), np.inf, critical)
    return np.asarray(out, dtype=np.float64)
