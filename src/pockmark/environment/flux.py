"""Directional particle flux in the local orbital frame: the container and its builders.

Scope: turns the cumulative flux models (:func:`~pockmark.environment.kessler_1991.kessler_1991`
for orbital debris, :func:`~pockmark.environment.grun_1985.grun_1985` for meteoroids) into a
discrete distribution over arrival directions and impact speeds for a spacecraft in a circular
orbit, in the form the risk integration consumes. The same container carries user environment
tables (model ``"user_table"``, built by :mod:`pockmark.environment.tables`) and the fluxes of
whole mission phases in the body frame (:mod:`pockmark.environment.phase`).

Frame (fixed): the local orbital frame has :math:`\\hat x` along the flight direction
(the spacecraft velocity, horizontal for a circular orbit), :math:`\\hat z` along the local
zenith (radially away from the Earth) and :math:`\\hat y = \\hat z \\times \\hat x` (to the
left of the flight direction). Directions are unit vectors pointing **from** the vehicle
**toward** where the particles come from.

Normalisation: a flat face of unit normal :math:`n` and area :math:`A`, fully unshadowed,
receives over :math:`T` years

.. math:: N = \\sum_j \\sum_k w_{jk}\\,\\max(0, n\\cdot u_j)\\,\\Phi_0(\\ge d_c)\\,A\\,T

impacts by particles larger than :math:`d_c`, with :math:`\\Phi_0` the omnidirectional flux
per unit cross-sectional area (:meth:`DirectionalFlux.cumulative_flux`). For an isotropic
source the orientation average of :math:`\\max(0, n\\cdot u)` is 1/4, so a randomly oriented
one-sided plate receives :math:`\\Phi_0/4` times the total weight, the flux the models give.
"""

import re
import warnings
from dataclasses import dataclass

import numpy as np

from pockmark._validation import require_positive
from pockmark.constants import tol
from pockmark.environment import kessler_1991 as _kessler
from pockmark.environment.debris_directions import _population, debris_direction_distribution
from pockmark.environment.density import KESSLER_1991_SMALL_DENSITY, density_classes
from pockmark.environment.directions import fibonacci_directions_above
from pockmark.environment.grun_1985 import grun_1985
from pockmark.environment.meteoroid_speed import (
    RAW_NORMALISATION_NASA,
    speed_bins_ecss_2008,
    speed_bins_nasa,
)
from pockmark.environment.motion import to_moving_frame
from pockmark.environment.orbit import (
    circular_speed,
    earth_shielding_factor,
    earth_shielding_half_angle,
    focusing_factor_nasa,
)
from pockmark.errors import InputError, ModelRangeWarning

#: A source name: a letter or digit, then letters, digits, ``_``, ``-`` or ``.``. The built-in
#: sources are ``"debris"`` and ``"meteoroid"``; user tables name their own.
SOURCE_NAME_PATTERN = r"[A-Za-z0-9][A-Za-z0-9_.\-]*"

#: Gravitational focusing conventions of the meteoroid flux (environment.md §2.2, §4 #10).
FOCUSING_CONVENTIONS = ("nasa_1994", "ecss_2008")


def _positive_diameter(diameter):
    d = np.asarray(diameter, dtype=np.float64)
    if np.any(d <= 0.0):
        bad = d.ravel()[int(np.flatnonzero((d <= 0.0).ravel())[0])]
        raise InputError(
            f"diameter must be positive [cm]; got {bad:g}. Use numpy.inf for 'no particle is "
            f"large enough' (flux 0)"
        )
    return d


def _debris_omnidirectional(flux, diameter, density=None):
    """Φ0 = 4 F_kessler_1991(d) [m⁻² yr⁻¹] for the stored orbit and epoch(s).

    With ``parameters["epochs"]`` (a list of ``{"year", "solar_flux", "fraction"}``), the
    time-weighted mean over the epochs: the direction-speed weights of the model depend on the
    orbit only, so one flux with the averaged size distribution is exact for the total.
    The model counts diameters, so ``density`` plays no part.
    """
    d, issues = _kessler._check_diameter(diameter)
    _kessler._warn("kessler_1991", issues, stacklevel=4)
    p = flux.parameters
    psi = _kessler._inclination_factor(p["inclination"])
    epochs = p.get("epochs") or [
        {"year": p["year"], "solar_flux": p["solar_flux"], "fraction": 1.0}
    ]
    total = 0.0
    for epoch in epochs:
        total = total + epoch["fraction"] * _kessler._flux(
            d, p["altitude"], psi, epoch["year"], epoch["solar_flux"]
        )
    return 4.0 * total


def _meteoroid_omnidirectional(flux, diameter, density=None):
    """Φ0 = 4 G K F_grun_1985(π/6 ρ d³) [m⁻² yr⁻¹] for the stored focusing factor, motion
    gain K (1 at rest) and density (``density`` when given)."""
    d = _positive_diameter(diameter)
    rho = flux.projectile_density if density is None else density
    mass = np.pi / 6.0 * rho * d**3
    gain = flux.parameters.get("motion_factor", 1.0)
    return 4.0 * flux.parameters["focusing_factor"] * gain * np.asarray(grun_1985(mass))


def tabulated_cumulative_flux(diameters, fluxes, diameter, label="user_table"):
    """Interpolate a tabulated cumulative flux, log-log between the tabulated diameters.

    Parameters
    ----------
    diameters : (n,) float
        Tabulated diameters [cm], strictly increasing, n >= 2.
    fluxes : (n,) float
        Cumulative flux of particles at least that large [m⁻² yr⁻¹], non-increasing, >= 0.
    diameter : numeric
        Diameters at which to evaluate [cm], > 0; ``numpy.inf`` gives 0, NaN propagates.
    label : str
        Name used in warnings.

    Returns
    -------
    ndarray
        Cumulative flux at ``diameter`` [m⁻² yr⁻¹], same shape.

    Raises
    ------
    InputError
        If a diameter is zero or negative.

    Warns
    -----
    ModelRangeWarning
        Once per call if any diameter lies below the smallest tabulated diameter, or above
        the largest while the flux there is not zero.

    Notes
    -----
    Inside the table, between two positive values the flux is a power law of the diameter
    (linear in log–log); on an interval that ends at zero flux it falls linearly in the
    diameter to zero (a power law cannot reach zero).

    Outside the table, the choice is the conservative one (it never lowers the flux below what
    the table implies):

    * **below** the smallest diameter :math:`d_1` the flux can only be larger than
      :math:`F(d_1)`; holding :math:`F(d_1)` would be a guaranteed underestimate, so the power
      law of the first interval is continued (held constant if that interval ends at zero);
    * **above** the largest diameter :math:`d_n` the flux can only be smaller than
      :math:`F(d_n)`, so :math:`F(d_n)` is held: an upper bound, whereas a continued power law
      could fall below the truth. End the table with a diameter where the flux is 0 to state
      that no larger particles exist; then the flux is exactly 0 above it and no warning is
      given.
    """
    d = _positive_diameter(diameter)
    dia = np.asarray(diameters, dtype=np.float64)
    flx = np.asarray(fluxes, dtype=np.float64)
    flat = d.ravel()
    out = np.full(flat.shape, np.nan)
    finite = np.isfinite(flat)
    out[np.isposinf(flat)] = 0.0
    below = finite & (flat < dia[0])
    above = finite & (flat > dia[-1])
    inside = finite & ~below & ~above
    log_d = np.log(dia)
    with np.errstate(divide="ignore", invalid="ignore"):
        log_f = np.log(flx)
        x = flat[inside]
        i = np.clip(np.searchsorted(dia, x, side="right") - 1, 0, len(dia) - 2)
        t = (np.log(x) - log_d[i]) / (log_d[i + 1] - log_d[i])
        power = np.exp(log_f[i] + t * (log_f[i + 1] - log_f[i]))
        linear = flx[i] * (dia[i + 1] - x) / (dia[i + 1] - dia[i])
        value = np.where(flx[i + 1] > 0.0, power, np.where(flx[i] > 0.0, linear, 0.0))
        value = np.where(x == dia[i + 1], flx[i + 1], value)
        out[inside] = value
        if flx[0] > 0.0 and flx[1] > 0.0:
            slope = (log_f[1] - log_f[0]) / (log_d[1] - log_d[0])
        else:
            slope = 0.0
        out[below] = flx[0] * (flat[below] / dia[0]) ** slope
    out[above] = flx[-1]
    issues = []
    if np.any(below):
        issues.append(
            f"diameter below the smallest tabulated {dia[0]:g} cm for {int(below.sum())} "
            f"value(s); the first interval's power law is continued"
        )
    if flx[-1] > 0.0 and np.any(above):
        issues.append(
            f"diameter above the largest tabulated {dia[-1]:g} cm for {int(above.sum())} "
            f"value(s); its flux {flx[-1]:g} m⁻² yr⁻¹ is held (an upper bound; end the table "
            f"with a zero flux to state that no larger particles exist)"
        )
    if issues:
        warnings.warn(f"{label}: " + "; ".join(issues), ModelRangeWarning, stacklevel=3)
    return out.reshape(d.shape)


def _table_omnidirectional(flux, diameter, density=None):
    """Φ0(≥ d) [m⁻² yr⁻¹] interpolated in the size distribution stored in the parameters."""
    table = flux.parameters["size_distribution"]
    return tabulated_cumulative_flux(
        table["diameter_cm"], table["cumulative_flux"], diameter, label=f"user_table {flux.source}"
    )


_OMNIDIRECTIONAL = {
    "kessler_1991": _debris_omnidirectional,
    "grun_1985": _meteoroid_omnidirectional,
    "user_table": _table_omnidirectional,
}


@dataclass(frozen=True, eq=False)
class DirectionalFlux:
    """Discrete distribution of a particle flux over arrival directions and impact speeds.

    Attributes
    ----------
    source : str
        Source name: ``"debris"``, ``"meteoroid"`` or a user table's name
        (``SOURCE_NAME_PATTERN``).
    model : str
        Key of the cumulative flux evaluator: ``"kessler_1991"``, ``"grun_1985"`` or
        ``"user_table"`` (size distribution stored in ``parameters["size_distribution"]``).
    directions : (nd, 3) float
        Unit vectors pointing from the vehicle toward where the particles come from, in the
        local orbital frame, or in the body frame when ``parameters["frame"] == "body"``.
    speeds : (nv,) float
        Impact speeds relative to the vehicle [km s⁻¹].
    weights : (nd, nv) float
        Fraction of the omnidirectional flux arriving from direction ``j`` at speed ``k``
        [unitless]; non-negative, summing to at most 1. Directions blocked by the Earth are
        omitted.
    projectile_density : float
        Density of the particles [g cm⁻³]; with ``parameters["density_classes"]`` (a size
        law, :mod:`pockmark.environment.density`) the nominal density reported, while the
        classes decide every flux.
    parameters : dict
        Every input and convention used to build the flux, JSON-serialisable, for the run
        manifest. :meth:`cumulative_flux` reads the model inputs from it.

    Notes
    -----
    A face of unit normal :math:`n` and area :math:`A` [m²], fully unshadowed, receives
    :math:`\\sum_{jk} w_{jk} \\max(0, n \\cdot u_j)\\,\\Phi_0(\\ge d_c)\\,A\\,T` impacts larger
    than :math:`d_c` in :math:`T` years. The arrays are stored read-only. Instances compare by
    identity and pickle by value.
    """

    source: str
    model: str
    directions: np.ndarray
    speeds: np.ndarray
    weights: np.ndarray
    projectile_density: float
    parameters: dict

    def __post_init__(self):
        if not isinstance(self.source, str) or not re.fullmatch(SOURCE_NAME_PATTERN, self.source):
            raise InputError(
                f"source must be a name of letters, digits, '_', '-' or '.' starting with a "
                f"letter or digit (e.g. 'debris', 'meteoroid'); got {self.source!r}"
            )
        if self.model not in _OMNIDIRECTIONAL:
            raise InputError(
                f"unknown flux model {self.model!r}; choose one of: "
                f"{', '.join(sorted(_OMNIDIRECTIONAL))}"
            )
        directions = np.array(self.directions, dtype=np.float64)
        speeds = np.array(self.speeds, dtype=np.float64)
        weights = np.array(self.weights, dtype=np.float64)
        if directions.ndim != 2 or directions.shape[1] != 3:
            raise InputError(f"directions must have shape (nd, 3); got {directions.shape}")
        if speeds.ndim != 1:
            raise InputError(f"speeds must have shape (nv,); got {speeds.shape}")
        if weights.shape != (directions.shape[0], speeds.shape[0]):
            raise InputError(
                f"weights must have shape (nd, nv) = ({directions.shape[0]}, {speeds.shape[0]}); "
                f"got {weights.shape}"
            )
        norm = np.linalg.norm(directions, axis=1)
        if not np.all(np.abs(norm - 1.0) <= tol.unit_norm):
            raise InputError(
                f"directions must be unit vectors (|norm − 1| <= {tol.unit_norm:g}); got a norm "
                f"of {norm[np.argmax(np.abs(norm - 1.0))]:.9g}"
            )
        if not np.all(np.isfinite(speeds) & (speeds >= 0.0)):
            raise InputError(f"speeds must be finite and >= 0 [km s⁻¹]; got min {speeds.min():g}")
        if not np.all(np.isfinite(weights) & (weights >= 0.0)) or weights.sum() > 1.0 + 1e-9:
            raise InputError(
                f"weights must be finite, >= 0 and sum to at most 1; got min {weights.min():g}, "
                f"sum {weights.sum():.12g}"
            )
        density = float(require_positive("projectile_density", self.projectile_density, "g cm⁻³"))
        for name, array in (("directions", directions), ("speeds", speeds), ("weights", weights)):
            array.setflags(write=False)
            object.__setattr__(self, name, array)
        object.__setattr__(self, "projectile_density", density)
        object.__setattr__(self, "parameters", dict(self.parameters))

    def cumulative_flux(self, diameter):
        """Omnidirectional flux of particles at least as large as the given diameter.

        Parameters
        ----------
        diameter : numeric
            Particle diameter [cm], > 0; ``numpy.inf`` gives 0 and NaN propagates.

        Returns
        -------
        numeric
            Flux :math:`\\Phi_0(\\ge d)` per unit cross-sectional area normal to the particles'
            direction of travel [m⁻² yr⁻¹]; 4 × the flux on a randomly tumbling one-sided
            plate. Debris: :math:`4 F_{kessler\\_1991}(d)` (time-averaged over
            ``parameters["epochs"]`` when present). Meteoroids:
            :math:`4 G F_{grun\\_1985}(\\pi\\rho d^3/6)` with the focusing factor :math:`G` in
            ``parameters`` and no Earth shielding (that is in the weights). User tables: the
            stored size distribution, interpolated by :func:`tabulated_cumulative_flux`.

        Raises
        ------
        InputError
            If a diameter is zero or negative.
        """
        return self.penetrating_flux(lambda density: diameter)

    def density_classes(self):
        """``[(density [g cm⁻³], smallest, largest [cm]), ...]``: the particles' density by
        size; one class of :attr:`projectile_density` for all sizes unless a law is stored."""
        stored = self.parameters.get("density_classes")
        if stored is None:
            return [(self.projectile_density, 0.0, np.inf)]
        return [(float(rho), float(a), float(b)) for rho, a, b in stored]

    def penetrating_flux(self, critical_diameter, weight=None):
        """Omnidirectional flux of the particles at least as large as a density-dependent size.

        Parameters
        ----------
        critical_diameter : callable
            ``critical_diameter(density)`` → diameters [cm] (any shape; the same shape for
            every density): the smallest particle of that density that counts, e.g. the
            critical diameter of a shield. ``numpy.inf`` counts nothing.
        weight : callable, optional
            ``weight(density)`` → factors broadcastable to that shape (e.g. a mask of
            impacts outside an equation's range), applied to each class's flux.

        Returns
        -------
        numeric
            :math:`\\sum_c [\\Phi_{\\rho_c}(\\ge \\max(d_c(\\rho_c), a_c))
            - \\Phi_{\\rho_c}(\\ge b_c)]^+` over the density classes
            ``(ρ_c, a_c, b_c)`` [m⁻² yr⁻¹]: within a class of constant density a particle
            counts when it reaches that density's size, so no iteration is needed. With one
            class (no law) this is :math:`\\Phi_0(\\ge d_c(\\rho))`.
        """
        evaluate = _OMNIDIRECTIONAL[self.model]
        total = 0.0
        for density, smallest, largest in self.density_classes():
            threshold = np.maximum(np.asarray(critical_diameter(density), dtype=np.float64),
                                   smallest)
            counted = evaluate(self, threshold, density)
            if np.isfinite(largest):
                counted = np.maximum(counted - evaluate(self, largest, density), 0.0)
            if weight is not None:
                counted = counted * weight(density)
            total = total + counted
        return total if np.ndim(total) else float(total)

    def mean_speed(self):
        """Flux-weighted mean impact speed [km s⁻¹]."""
        total = self.weights.sum()
        return float(self.weights.sum(axis=0) @ self.speeds / total) if total > 0 else 0.0


#: How much finer the rest-frame direction grid is than the output grid of a moving vehicle,
#: so that each output cell collects many moved cells (measured: the flux on a ram or wake
#: plate then agrees with the closed form to 0.3 % at 600 output directions).
_MOTION_REFINEMENT = 8


def _vehicle_speed(value):
    speed = _scalar("vehicle_speed", value, "km s⁻¹")
    if not (np.isfinite(speed) and speed >= 0.0):
        raise InputError(f"vehicle_speed must be ≥ 0 and finite [km s⁻¹]; got {speed:g}")
    return speed


def _scalar(name, value, unit):
    if np.ndim(value):
        raise InputError(f"{name} must be a scalar [{unit}]; got shape {np.shape(value)}")
    return float(value)


#: Density reported for a flux that carries a size law (the classes decide every number).
_NOMINAL_DENSITY = {"kessler_1991": KESSLER_1991_SMALL_DENSITY, "ssp_30425": 1.0}


def _density(value, source):
    """``(nominal density, extra parameters)`` for a density in g cm⁻³ or a law's name."""
    if isinstance(value, str):
        classes = density_classes(value, source)
        return _NOMINAL_DENSITY[value], {
            "density_law": value,
            "density_classes": [list(c) for c in classes],
            "density_classes_columns": ["density_g_cm3", "smallest_cm", "largest_cm"],
        }
    density = float(require_positive(
        "projectile_density", _scalar("projectile_density", value, "g cm⁻³"), "g cm⁻³"))
    return density, {"density_law": None}


def debris_flux(
    altitude,
    inclination,
    year,
    solar_flux,
    projectile_density=2.8,
    azimuth_bins=90,
    population=None,
):
    """Directional orbital-debris flux for a circular orbit, 1991 NASA model.

    Parameters
    ----------
    altitude : float
        Circular-orbit altitude [km], in (0, 2000] (stated model range up to 1000 km).
    inclination : float
        Orbit inclination [°], in [0, 180].
    year : float
        Date as a decimal year [yr].
    solar_flux : float
        13-month smoothed F10.7 solar radio flux of the year **before** ``year``
        [10⁴ Jy].
    projectile_density : float or str
        Debris density [g cm⁻³], > 0, one value for all sizes (default 2.8, aluminium), or
        ``"kessler_1991"`` for the model's own size law
        (:mod:`pockmark.environment.density`).
    azimuth_bins : int
        Number of equal azimuth bins over [−90°, 90°]; even.
    population : sequence of tuple, optional
        Debris inclination families for the direction and speed distribution; see
        :func:`~pockmark.environment.debris_directions.debris_direction_distribution`.
        Default ``DEFAULT_DEBRIS_POPULATION`` (an assumption, see its documentation).

    Returns
    -------
    DirectionalFlux
        ``source="debris"``, ``model="kessler_1991"``. ``directions`` are horizontal,
        one per azimuth bin, all in the forward hemisphere (positive :math:`x`); ``speeds``
        are the bins' mean speeds (``nv = nd``) and ``weights`` is diagonal, summing to 1.

    Raises
    ------
    InputError
        As :func:`~pockmark.environment.kessler_1991.kessler_1991` and
        :func:`~pockmark.environment.debris_directions.debris_direction_distribution`, and for
        a non-positive density or non-scalar inputs.

    Warns
    -----
    ModelRangeWarning
        Once, for an altitude above 1000 km, an inclination outside 28.5°–120° or a year
        before 1988 (see :func:`~pockmark.environment.kessler_1991.kessler_1991`).

    Notes
    -----
    The magnitude is :math:`\\Phi_0 = 4F` with :math:`F` from
    :func:`~pockmark.environment.kessler_1991.kessler_1991` (:math:`k = 1`); the directions and
    speeds come from circular-orbit crossing geometry and an assumed inclination population,
    not from the 1991 model's own speed distribution. All debris arrives horizontally from
    within ±90° of the flight direction, so the wake-, zenith- and nadir-facing faces receive
    none, and a ram-facing flat plate receives :math:`k_{ram} = 2\\langle V\\rangle / v_c`
    times the randomly-tumbling flux. No Earth shielding and no gravitational focusing are
    applied: the 1991 model already contains its geometry.

    See Also
    --------
    meteoroid_flux
    """
    h = _scalar("altitude", altitude, "km")
    i = _scalar("inclination", inclination, "°")
    t = _scalar("year", year, "yr")
    s = _scalar("solar_flux", solar_flux, "10⁴ Jy")
    density, density_parameters = _density(projectile_density, "debris")
    _, _, orbit_issues = _kessler._check_orbit(h, i)
    _, _, epoch_issues = _kessler._check_epoch(t, s)
    _kessler._warn("kessler_1991", orbit_issues + epoch_issues)

    azimuths, speeds, weights = debris_direction_distribution(h, i, azimuth_bins, population)
    alpha = np.radians(azimuths)
    directions = np.column_stack((np.cos(alpha), np.sin(alpha), np.zeros_like(alpha)))
    families = np.column_stack(_population(population))
    parameters = {
        "altitude": h,
        "inclination": i,
        "year": t,
        "solar_flux": s,
        "solar_flux_convention": "13-month smoothed F10.7 of the year before `year`",
        "circular_speed": circular_speed(h),
        "azimuth_bins": int(azimuth_bins),
        "direction_model": "circular-orbit crossing geometry, uniform node (Kessler 1981)",
        "population": "default" if population is None else "user",
        "population_families": families.tolist(),
        "population_columns": ["inclination_deg", "normalised_weight", "half_width_deg"],
        "earth_shielding": False,
        "focusing": "none",
        "frame": "local orbital: x flight direction, z zenith, y = z x x; directions toward source",
        **density_parameters,
    }
    return DirectionalFlux(
        source="debris",
        model="kessler_1991",
        directions=directions,
        speeds=speeds,
        weights=np.diag(weights),
        projectile_density=density,
        parameters=parameters,
    )


def meteoroid_flux(
    altitude,
    projectile_density=1.0,
    directions=600,
    speed_bin_width=1.0,
    earth_shielding=True,
    focusing="nasa_1994",
    vehicle_speed=0.0,
):
    """Directional meteoroid flux for a circular Earth orbit, Grün et al. (1985) model.

    Parameters
    ----------
    altitude : float
        Orbit altitude [km]; must exceed the 100 km atmosphere allowance.
    projectile_density : float or str
        Meteoroid density [g cm⁻³], > 0, used to turn diameters into masses (default 1.0),
        or ``"ssp_30425"`` for the three-step law by mass
        (:mod:`pockmark.environment.density`).
    directions : int
        Number of directions of the Fibonacci grid over the full sphere, before the Earth's
        disc is removed. Default 600.
    speed_bin_width : float
        Width of the speed bins [km s⁻¹]. Default 1.0.
    earth_shielding : bool
        Remove the directions blocked by the Earth and its atmosphere (default ``True``).
        ``False`` keeps the whole sphere; for tests and for comparison only.
    focusing : {"nasa_1994", "ecss_2008"}
        Gravitational focusing convention (see Notes). Default ``"nasa_1994"``.
    vehicle_speed : float
        Speed of the vehicle along its flight direction :math:`+\\hat x` [km s⁻¹], ≥ 0.
        0 (default): the flux as it is at rest with the Earth. A positive speed gives the
        flux the moving vehicle meets (:func:`~pockmark.environment.motion.to_moving_frame`):
        more and faster particles on ram faces, fewer and slower on wake faces, the arrival
        directions tilted toward the flight direction, and the total multiplied by the gain
        ``parameters["motion_factor"]``.

    Returns
    -------
    DirectionalFlux
        ``source="meteoroid"``, ``model="grun_1985"``. ``weights[j, k]`` is
        :math:`a_j p_k` with :math:`a_j` the fraction of the sphere cell :math:`j` covers and
        :math:`p_k` the speed-bin probability, so the weights sum to the shielding factor
        :math:`s_f` (exactly, to round-off).

    Raises
    ------
    InputError
        For an altitude not above 100 km, a non-positive density, a grid size that is not a
        positive integer, a non-positive speed-bin width or an unknown focusing convention.

    Notes
    -----
    Two focusing conventions, never combined (environment.md §2.2 and §4 #10); the one used is
    recorded in ``parameters["focusing"]`` with its factor in ``"focusing_factor"``:

    * ``"nasa_1994"``, that of the space-station design documents (NASA SSP 30425 Rev. B and TM-4527,
      1994): :math:`G = 1 + (R_E + 100\\ \\mathrm{km})/(R_E + h)`
      (:func:`~pockmark.environment.orbit.focusing_factor_nasa`) with the NASA analytic speed
      distribution as it stands (:func:`~pockmark.environment.meteoroid_speed.speed_bins_nasa`,
      renormalised from its recalled integral 1.0037);
    * ``"ecss_2008"``, the physical procedure of ECSS-E-ST-10-04C Annex C.1.2:
      :math:`\\bar G = \\sum n_\\infty (1 + v_{esc}^2/v_\\infty^2)` and the speed distribution
      re-focused to the altitude, applied to a free-space distribution **derived by us** from
      the NASA one (:func:`~pockmark.environment.meteoroid_speed.speed_bins_ecss_2008`, which
      documents the derivation and why it lands near the NASA factor).

    Common to both:

    * magnitude :math:`\\Phi_0(\\ge d) = 4\\,G\\,K\\,F_{grun\\_1985}(\\pi\\rho d^3/6)`, with
      :math:`K` the gain from the vehicle's motion (1 at rest);
    * Earth shielding by removing the cone of half-angle :math:`\\eta` about nadir
      (:math:`-\\hat z`), :math:`\\sin\\eta = (R_E + 100\\ \\mathrm{km})/(R_E + h)`; the
      orientation average then reproduces :math:`s_f = (1 + \\cos\\eta)/2`, a zenith-facing
      plate keeps its whole flux and a nadir-facing plate :math:`\\cos^2\\eta` of it;
    * at rest (``vehicle_speed = 0``): speeds independent of direction and arrival directions
      isotropic apart from the Earth's cone;
    * moving: the rest-frame flux is built on a grid 8 times finer, then each cell is moved
      into the vehicle's frame and re-binned on the ``directions`` grid over the whole
      sphere and on speed bins of ``speed_bin_width`` (see
      :func:`~pockmark.environment.motion.to_moving_frame`); the Earth's cone is cut in the
      rest frame, where the Earth blocks the paths.

    The directions are the Fibonacci lattice with its axis along :math:`\\hat z`, cut exactly
    at the cone (:func:`~pockmark.environment.directions.fibonacci_directions_above`): the one
    band the cone's rim crosses keeps only its unblocked part, so the total weight equals
    :math:`s_f` exactly rather than to within :math:`1/n`.

    See Also
    --------
    debris_flux
    """
    h = _scalar("altitude", altitude, "km")
    eta = earth_shielding_half_angle(h)  # validates h > 100 km
    density, density_parameters = _density(projectile_density, "meteoroid")
    if focusing not in FOCUSING_CONVENTIONS:
        raise InputError(
            f"unknown meteoroid focusing convention {focusing!r}; choose one of: "
            f"{', '.join(FOCUSING_CONVENTIONS)}"
        )
    z_min = -np.cos(np.radians(eta)) if earth_shielding else -1.0
    count = int(directions) if isinstance(directions, (int, np.integer)) else directions
    moving = _vehicle_speed(vehicle_speed) > 0.0
    units, fractions = fibonacci_directions_above(
        _MOTION_REFINEMENT * count if moving and isinstance(count, int) else count, z_min)
    if focusing == "nasa_1994":
        speeds, probabilities = speed_bins_nasa(speed_bin_width)
        factor = focusing_factor_nasa(h)
        distribution = "nasa analytic n(v), 11.1-72.2 km/s, as it stands"
    else:
        speeds, probabilities, factor = speed_bins_ecss_2008(h, speed_bin_width)
        distribution = (
            "nasa analytic n(v) taken at 100 km, escape speed removed and re-focused to the "
            "altitude (ECSS Annex C.1.2 mapping; free-space distribution derived by pockmark)"
        )
    weights = np.outer(fractions, probabilities)
    gain = 1.0
    if moving:
        units, speeds, weights, gain = to_moving_frame(
            units, fractions, speeds, probabilities, vehicle_speed, count, speed_bin_width)
    parameters = {
        "altitude": h,
        "focusing": focusing,
        "focusing_factor": float(factor),
        "earth_shielding": bool(earth_shielding),
        "earth_shielding_half_angle": eta,
        "earth_shielding_factor": earth_shielding_factor(h) if earth_shielding else 1.0,
        "directions": count,
        "directions_kept": int(units.shape[0]),
        "direction_grid": "fibonacci, axis along zenith, Earth cone cut exactly",
        "speed_distribution": distribution,
        "speed_distribution_raw_integral": RAW_NORMALISATION_NASA,
        "speed_bin_width": float(speed_bin_width),
        "vehicle_speed": float(vehicle_speed),
        "motion_factor": gain,
        "directionality": (
            f"rest-frame isotropic flux seen from a vehicle moving at {float(vehicle_speed):g} "
            f"km/s along +x (flux gain {gain:.4f})" if moving
            else "isotropic at rest with the Earth (vehicle motion not applied)"
        ),
        "frame": "local orbital: x flight direction, z zenith, y = z x x; directions toward source",
        **density_parameters,
    }
    return DirectionalFlux(
        source="meteoroid",
        model="grun_1985",
        directions=units,
        speeds=speeds,
        weights=weights,
        projectile_density=density,
        parameters=parameters,
    )


__all__ = ["FOCUSING_CONVENTIONS", "DirectionalFlux", "debris_flux", "meteoroid_flux",
           "tabulated_cumulative_flux"]
