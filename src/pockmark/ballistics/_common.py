"""Validation and masking of impact conditions shared by every ballistic-limit equation.

Also: :class:`ValidityRange`, the stated range of an equation in one impact variable, and the
mask of impacts outside a set of them.
"""

from typing import NamedTuple

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


class ValidityRange(NamedTuple):
    """The fitted or tested range of an equation in one impact variable.

    Attributes
    ----------
    parameter : str
        ``"impact_velocity"`` [km s⁻¹], ``"normal_velocity"`` (V cos θ) [km s⁻¹],
        ``"impact_angle"`` [°] or ``"projectile_density"`` [g cm⁻³].
    minimum, maximum : float
        Closed bounds in the unit of the parameter; ``-inf``/``inf`` where there is none.
    unit : str
        Unit of the bounds.
    note : str
        Where the range comes from, with its provenance.
    """

    parameter: str
    minimum: float
    maximum: float
    unit: str
    note: str

    def describe(self, with_note=True):
        """One phrase: ``"impact_velocity in [0, 8] km s⁻¹ (note)"``; without the note when
        ``with_note`` is false."""
        if self.minimum == -np.inf or (self.minimum <= 0 and self.parameter != "impact_angle"):
            bounds = f"≤ {self.maximum:g}"
        elif self.maximum == np.inf:
            bounds = f"≥ {self.minimum:g}"
        else:
            bounds = f"in [{self.minimum:g}, {self.maximum:g}]"
        unit = "°" if self.unit == "°" else f" {self.unit}"
        text = f"{self.parameter} {bounds}{unit}"
        return f"{text} ({self.note})" if with_note else text


def _outside(ranges, impact_velocity, impact_angle, projectile_density):
    """Boolean mask, broadcast shape: an impact whose conditions leave any of ``ranges``.

    No-impact conditions (speed ≤ 0 or angle ≥ 90°) and NaN conditions are never flagged.
    """
    velocity, angle, density = _impact_conditions(
        impact_velocity, impact_angle, projectile_density
    )
    velocity, angle, density = np.broadcast_arrays(velocity, angle, density)
    with np.errstate(invalid="ignore"):
        values = {
            "impact_velocity": velocity,
            "normal_velocity": velocity * np.cos(np.radians(angle)),
            "impact_angle": angle,
            "projectile_density": density,
        }
        flagged = np.zeros(velocity.shape, dtype=bool)
        for limits in ranges:
            value = values[limits.parameter]
            flagged |= (value < limits.minimum) | (value > limits.maximum)
        valid = ~(np.isnan(velocity) | np.isnan(angle) | np.isnan(density))
        return flagged & valid & ~_no_impact(velocity, angle)


def _three_regimes(velocity, low_limit, high_limit, low_speed, high_speed):
    """The usual three-regime blend of a ballistic-limit equation.

    ``low_speed(v)`` below ``low_limit``, ``high_speed(v)`` above ``high_limit`` and, between
    them, the straight line in speed from ``low_speed(low_limit)`` to
    ``high_speed(high_limit)``. The anchors are the end equations evaluated at the limits, so
    the result is continuous by construction wherever ``low_limit < high_limit``. Where an
    equation's angle-dependent limits cross (near grazing incidence), there is no
    intermediate regime: the low-speed branch holds up to ``low_limit`` and the high-speed
    one above it, with a jump at ``low_limit``, as the sources' regime tests read.
    Call inside ``np.errstate`` where the branches can divide by zero (grazing angles, zero
    speed).
    """
    low_anchor = low_speed(low_limit)
    high_anchor = high_speed(high_limit)
    weight = (velocity - low_limit) / (high_limit - low_limit)
    intermediate = low_anchor * (1.0 - weight) + high_anchor * weight
    return np.where(
        velocity <= low_limit,
        low_speed(velocity),
        np.where(velocity >= high_limit, high_speed(velocity), intermediate),
    )
