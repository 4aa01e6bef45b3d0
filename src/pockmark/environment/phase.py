"""The impact environment of a mission phase, as directional fluxes in the vehicle's body frame.

Scope: one entry point, :func:`phase_fluxes`, that combines everything the risk integration
needs for one phase of a mission into short lists of
:class:`~pockmark.environment.flux.DirectionalFlux`:

* **time**: the 1991 debris model's growth laws and solar activity over the phase, in epochs
  of at most one calendar year (``DEBRIS_EPOCH_STEP``), each with the F10.7 solar flux of the
  year before (:func:`debris_epochs`);
* **orbit**: circular orbits, or elliptical orbits sampled in true anomaly with exact Kepler
  time weights (:func:`~pockmark.environment.orbit.elliptical_orbit_samples`);
* **attitude**: body fixed in the local orbital frame, randomly tumbling, or spinning about a
  body axis (:class:`Attitude`);
* **sources**: the 1991 debris model (:class:`DebrisSpec`), the Grün (1985) meteoroid model
  with one of two focusing conventions (:class:`MeteoroidSpec`), and user environment tables
  (:mod:`pockmark.environment.tables`).

The result maps each source name to a list of fluxes whose directions are in the body frame
(``parameters["frame"] == "body"``) and whose weights already contain every time fraction: a
face of unit normal :math:`n` (body frame), area :math:`A` and visible fraction :math:`v_j`
receives over the phase

.. math:: N = T \\sum_{\\text{fluxes}} \\sum_j \\sum_k w_{jk}\\,\\max(0, n\\cdot u_j)\\,v_j\\,
          \\Phi_0(\\ge d_c(V_k, \\theta_j))\\,A

impacts, :math:`T` the phase duration. Lists are short by construction: debris gives one
flux per distinct orbit sample altitude (1 for a circular orbit, ``orbit_samples // 2 + 1`` for
an elliptical one; 5 by default) with its epochs averaged inside the flux's size
distribution; meteoroids give one flux (orbit samples merged exactly, see
:func:`phase_fluxes`); a user table gives one flux per distinct size distribution.

Results are memoised on disk (:func:`phase_fluxes`, ``cache``).
"""

import dataclasses
import hashlib
import logging
import math
import numbers
import warnings
from collections.abc import Mapping
from dataclasses import dataclass, field

import numpy as np

from pockmark import __version__
from pockmark.environment import _cache
from pockmark.environment.directions import fibonacci_directions
from pockmark.environment.flux import (
    FOCUSING_CONVENTIONS,
    DirectionalFlux,
    debris_flux,
    meteoroid_flux,
)
from pockmark.environment.kessler_1991 import (
    ALTITUDE_MAX,
    KESSLER_1991_GROWTH,
    _check_epoch,
    _warn,
)
from pockmark.environment.orbit import elliptical_orbit_samples, orbital_speed
from pockmark.environment.tables import table_fluxes
from pockmark.errors import InputError, ModelRangeWarning
from pockmark.geometry.frames import ATTITUDE_AXES, body_from_orbital, spin_rotations

logger = logging.getLogger(__name__)

#: Default 13-month smoothed F10.7 solar radio flux [10⁴ Jy = sfu] used by the 1991 debris
#: model when a case gives none. **Not a forecast and not a measured value**: 70 sfu is a
#: solar-minimum level. The model's debris flux is highest at low solar activity (less drag),
#: so assuming a quiet Sun when the mission's solar activity is unknown is the conservative
#: choice (common practice, no source: a rule of thumb, not a published recommendation). At
#: 400 km it gives the altitude factor Φ(400 km, 70) = 0.5 exactly (environment.md §1.3),
#: where 100 sfu gives 0.379 and 150 sfu 0.212, so the choice matters. For real work give
#: yearly values (``DebrisSpec.solar_flux = {year: sfu}``) from a solar-cycle prediction.
DEFAULT_SOLAR_FLUX = 70.0

#: Longest debris epoch [yr]. Epochs are also cut at calendar-year boundaries so that each has
#: one F10.7 value; within one year the midpoint rule errs by at most (ln 1.04)²/24 ≈ 6e-5 in
#: the fragment growth factor (g1 grows 4 %/yr) and not at all in the linear g2.
DEBRIS_EPOCH_STEP = 1.0

#: Attitude modes (:class:`Attitude`).
ATTITUDE_MODES = ("fixed", "tumbling", "spinning")

#: Lowest accepted perigee altitude [km]: the meteoroid Earth-shielding model counts the
#: atmosphere up to 100 km as part of the Earth, and nothing orbits below it.
MIN_PERIGEE_ALTITUDE = 100.0


@dataclass(frozen=True)
class Attitude:
    """How the body axes move relative to the local orbital frame.

    Attributes
    ----------
    mode : {"fixed", "tumbling", "spinning"}
        ``"fixed"``: the body is fixed in the local orbital frame (``flight_axis`` along the
        flight direction, ``nadir_axis`` toward the Earth). ``"tumbling"``: random orientation;
        every flux is replaced by its orientation average, an isotropic flux with the same
        speed distribution and the same total weight. ``"spinning"``: the fixed attitude, then
        a uniform spin about ``spin_axis``, averaged over ``spin_steps`` equally spaced angles.
    flight_axis, nadir_axis : str
        Body axes (names of :data:`~pockmark.geometry.frames.ATTITUDE_AXES`) along the flight
        direction and toward nadir; must be perpendicular. Default ``"+x"`` and ``"-z"``.
    spin_axis : str or None
        Body axis of the spin (``"spinning"`` only, required there).
    spin_steps : int
        Number of spin angles averaged, >= 1 (default 12: every 30°). The average is exact for
        any flux component varying with the spin angle as a harmonic below ``spin_steps``.
    """

    mode: str = "fixed"
    flight_axis: str = "+x"
    nadir_axis: str = "-z"
    spin_axis: str | None = None
    spin_steps: int = 12


@dataclass(frozen=True)
class PhaseSpec:
    """One mission phase: time span, orbit and attitude.

    Attributes
    ----------
    name : str
        Name used in messages and in the fluxes' parameters.
    start_year : float
        Start of the phase as a decimal year [yr].
    duration : float
        Duration [yr], > 0.
    perigee_altitude, apogee_altitude : float
        Altitudes above the Earth's equatorial radius [km]; equal for a circular orbit.
        ``MIN_PERIGEE_ALTITUDE`` < perigee <= apogee.
    inclination : float
        Orbit inclination [°], in [0, 180].
    attitude : Attitude
        Attitude during the phase.
    orbit_samples : int
        True-anomaly intervals of an elliptical orbit (default 8, giving 5 distinct
        altitudes); ignored for a circular orbit.
    """

    name: str
    start_year: float
    duration: float
    perigee_altitude: float
    apogee_altitude: float
    inclination: float
    attitude: Attitude = field(default_factory=Attitude)
    orbit_samples: int = 8


@dataclass(frozen=True)
class DebrisSpec:
    """Inputs of the 1991 orbital-debris model.

    Attributes
    ----------
    solar_flux : float or dict
        13-month smoothed F10.7 [sfu]: one value for every year, or ``{year: value}`` per
        calendar year (int keys; strings of digits are accepted). The flux at a date in year
        *Y* uses the value of year *Y − 1*, as the model requires, so a phase from 2030 to 2032
        needs the years 2029–2031. Default ``DEFAULT_SOLAR_FLUX`` (see there: not a forecast).
    projectile_density : float or str
        Debris density [g cm⁻³], > 0 (default 2.8, aluminium), or ``"kessler_1991"`` for the
        model's size law (:mod:`~pockmark.environment.density`).
    population : tuple or None
        Debris inclination families for the direction and speed distribution (see
        :func:`~pockmark.environment.debris_directions.debris_direction_distribution`);
        ``None`` for the default population.
    """

    solar_flux: float | dict = DEFAULT_SOLAR_FLUX
    projectile_density: float | str = 2.8
    population: tuple | None = None


@dataclass(frozen=True)
class MeteoroidSpec:
    """Inputs of the Grün (1985) meteoroid model.

    Attributes
    ----------
    projectile_density : float or str
        Meteoroid density [g cm⁻³], > 0 (default 1.0), or ``"ssp_30425"`` for the three-step
        law by mass (:mod:`~pockmark.environment.density`).
    focusing : {"nasa_1994", "ecss_2008"}
        Gravitational focusing convention (see
        :func:`~pockmark.environment.flux.meteoroid_flux`). Default ``"nasa_1994"``.
    vehicle_motion : bool
        Apply the vehicle's orbital velocity (vis-viva speed at each orbit sample, along the
        flight direction): ram faces meet more and faster meteoroids than wake faces.
        Default ``True``; ``False`` keeps the flux as it is at rest with the Earth.
    """

    projectile_density: float | str = 1.0
    focusing: str = "nasa_1994"
    vehicle_motion: bool = True


# ----------------------------------------------------------------------------- validation


def _finite(name, value, unit, phase):
    try:
        number = float(value)
    except (TypeError, ValueError):
        number = math.nan
    if isinstance(value, bool) or not math.isfinite(number):
        raise InputError(f"phase {phase!r}: {name} must be a finite number [{unit}]; got {value!r}")
    return number


def _validate_attitude(attitude, phase):
    if not isinstance(attitude, Attitude):
        raise InputError(f"phase {phase!r}: attitude must be an Attitude; got {attitude!r}")
    if attitude.mode not in ATTITUDE_MODES:
        raise InputError(
            f"phase {phase!r}: attitude mode must be one of {', '.join(ATTITUDE_MODES)}; got "
            f"{attitude.mode!r}"
        )
    try:
        rotation = body_from_orbital(attitude.flight_axis, attitude.nadir_axis)
    except InputError as error:
        raise InputError(f"phase {phase!r}: {error}") from None
    if attitude.mode == "spinning":
        if attitude.spin_axis not in ATTITUDE_AXES:
            raise InputError(
                f"phase {phase!r}: a spinning attitude needs spin_axis, one of "
                f"{', '.join(ATTITUDE_AXES)}; got {attitude.spin_axis!r}"
            )
        steps = attitude.spin_steps
        if isinstance(steps, bool) or not isinstance(steps, numbers.Integral) or steps < 1:
            raise InputError(
                f"phase {phase!r}: spin_steps must be a positive integer; got {steps!r}"
            )
    return rotation


def _validate_phase(phase, debris):
    if not isinstance(phase, PhaseSpec):
        raise InputError(f"phase must be a PhaseSpec; got {type(phase).__name__}")
    name = phase.name
    _finite("start_year", phase.start_year, "yr", name)
    duration = _finite("duration", phase.duration, "yr", name)
    if duration <= 0.0:
        raise InputError(f"phase {name!r}: duration must be positive [yr]; got {duration:g}")
    perigee = _finite("perigee_altitude", phase.perigee_altitude, "km", name)
    apogee = _finite("apogee_altitude", phase.apogee_altitude, "km", name)
    if perigee <= MIN_PERIGEE_ALTITUDE:
        raise InputError(
            f"phase {name!r}: perigee_altitude must be above {MIN_PERIGEE_ALTITUDE:g} km (the "
            f"atmosphere); got {perigee:g} km"
        )
    if apogee < perigee:
        raise InputError(
            f"phase {name!r}: apogee_altitude {apogee:g} km is below perigee_altitude "
            f"{perigee:g} km; swap them"
        )
    if debris is not None and apogee > ALTITUDE_MAX:
        raise InputError(
            f"phase {name!r}: apogee_altitude {apogee:g} km is above the "
            f"{ALTITUDE_MAX:g} km limit of the 1991 debris model; disable the debris "
            f"model for this phase or give the debris environment as a table"
        )
    inclination = _finite("inclination", phase.inclination, "°", name)
    if not 0.0 <= inclination <= 180.0:
        raise InputError(f"phase {name!r}: inclination must be in [0, 180]°; got {inclination:g}°")
    samples = phase.orbit_samples
    if isinstance(samples, bool) or not isinstance(samples, numbers.Integral) or samples < 1:
        raise InputError(
            f"phase {name!r}: orbit_samples must be a positive integer; got {samples!r}"
        )
    return _validate_attitude(phase.attitude, name)


def _solar_flux_table(solar_flux):
    """Return a float or ``{int year: float}`` after validation."""
    if isinstance(solar_flux, Mapping):
        table = {}
        for key, value in solar_flux.items():
            try:
                year = int(key)
                if isinstance(key, float) and key != year:
                    raise ValueError
            except (TypeError, ValueError):
                raise InputError(
                    f"solar_flux years must be integers (calendar years); got {key!r}"
                ) from None
            number = float(value) if isinstance(value, numbers.Real) else math.nan
            if not (math.isfinite(number) and number > 0.0):
                raise InputError(
                    f"solar_flux for {year} must be a positive number [sfu]; got {value!r}"
                )
            table[year] = number
        if not table:
            raise InputError("solar_flux must give at least one year, or be a single number [sfu]")
        return table
    number = float(solar_flux) if isinstance(solar_flux, numbers.Real) else math.nan
    if isinstance(solar_flux, bool) or not (math.isfinite(number) and number > 0.0):
        raise InputError(
            f"solar_flux must be a positive number [sfu] or a {{year: value}} table; got "
            f"{solar_flux!r}"
        )
    return number


def debris_epochs(start_year, duration, solar_flux=DEFAULT_SOLAR_FLUX):
    """Epochs of a phase for the 1991 debris model, with their solar flux and time fraction.

    Parameters
    ----------
    start_year : float
        Start of the phase as a decimal year [yr].
    duration : float
        Duration of the phase [yr], > 0.
    solar_flux : float or dict
        F10.7 [sfu]: one value, or ``{calendar year: value}``.

    Returns
    -------
    list of dict
        One per epoch, in time order: ``start``, ``end`` and ``year`` (midpoint) [decimal yr],
        ``solar_flux`` [sfu], ``solar_flux_year`` (the calendar year whose value is used, or
        ``None`` for a single value) and ``fraction`` (epoch length / duration; they sum to 1).

    Raises
    ------
    InputError
        For a non-positive duration, an invalid solar flux, or a table missing a needed year.

    Notes
    -----
    The phase is cut at every calendar-year boundary, so each epoch lies within one calendar
    year *Y* and is no longer than ``DEBRIS_EPOCH_STEP``; the model is evaluated at the
    epoch's midpoint with the F10.7 of year *Y − 1*: the 1991 model takes the 13-month
    smoothed solar flux one year before the date (environment.md §1.2, §4 #6).
    """
    t0, length = float(start_year), float(duration)
    if not (math.isfinite(t0) and math.isfinite(length) and length > 0.0):
        raise InputError(
            f"start_year must be finite and duration positive [yr]; got {start_year!r}, "
            f"{duration!r}"
        )
    table = _solar_flux_table(solar_flux)
    t1 = t0 + length
    cuts = [t0]
    boundary = math.floor(t0) + 1.0
    while boundary < t1:
        cuts.append(boundary)
        boundary += 1.0
    cuts.append(t1)
    epochs = []
    for start, end in zip(cuts[:-1], cuts[1:], strict=True):
        if end <= start:
            continue
        calendar_year = math.floor(start)
        if isinstance(table, dict):
            needed = calendar_year - 1
            if needed not in table:
                have = f"{min(table)}–{max(table)}"
                raise InputError(
                    f"solar_flux has no value for {needed}, needed for the debris flux in "
                    f"{calendar_year} (the 1991 model uses the F10.7 of the year before); the "
                    f"table covers {have}: add {needed}"
                )
            value, source_year = table[needed], needed
        else:
            value, source_year = table, None
        epochs.append({
            "start": start,
            "end": end,
            "year": 0.5 * (start + end),
            "solar_flux": value,
            "solar_flux_year": source_year,
            "fraction": (end - start) / length,
        })
    total = sum(e["fraction"] for e in epochs)
    for epoch in epochs:
        epoch["fraction"] /= total
    return epochs


# ------------------------------------------------------------------------------ attitudes


def _with(flux, directions=None, speeds=None, weights=None, **parameters):
    """A copy of ``flux`` with some arrays replaced and parameters added."""
    merged = dict(flux.parameters)
    merged.update(parameters)
    return DirectionalFlux(
        source=flux.source,
        model=flux.model,
        directions=flux.directions if directions is None else directions,
        speeds=flux.speeds if speeds is None else speeds,
        weights=flux.weights if weights is None else weights,
        projectile_density=flux.projectile_density,
        parameters=merged,
    )


def _isotropic(flux, directions):
    """Orientation average: isotropic directions, same speed marginal and total weight."""
    units = fibonacci_directions(directions)
    marginal = flux.weights.sum(axis=0)
    return _with(flux, directions=units, weights=np.outer(np.full(len(units), 1.0 / len(units)),
                                                         marginal))


def _is_cone_isotropic(flux):
    """True for a meteoroid flux of this package: isotropic except the Earth cone."""
    return flux.model == "grun_1985" and "earth_shielding_half_angle" in flux.parameters


def _spun(flux, rotation, spins, directions):
    """Average over the spin angles of a flux given in the orbital frame."""
    steps = len(spins)
    if _is_cone_isotropic(flux):
        # Isotropic except a cone about nadir: evaluate the spin-averaged density on a fixed
        # body-frame grid rather than concatenating `steps` rotated copies of the whole grid.
        units = fibonacci_directions(directions)
        cos_eta = np.cos(np.radians(flux.parameters["earth_shielding_half_angle"]))
        shielded = flux.parameters.get("earth_shielding", True)
        # orbital-frame direction of body direction u at spin s: (S_s R)ᵀ u
        orbital_z = np.einsum("sij,ni->snj", spins @ rotation, units)[:, :, 2]
        open_fraction = np.mean(orbital_z > -cos_eta, axis=0) if shielded else np.ones(len(units))
        speed_marginal = flux.weights.sum(axis=0)
        weights = np.outer(open_fraction / len(units), speed_marginal / speed_marginal.sum())
        weights *= flux.weights.sum() / weights.sum()  # exact total: the solid angle kept
        return _with(flux, directions=units, weights=weights,
                     spin_discretisation="spin-averaged density on a fibonacci grid, total "
                                         "weight rescaled to the unspun total")
    body = flux.directions @ rotation.T
    copies = np.concatenate([body @ spin.T for spin in spins])
    return _with(flux, directions=copies,
                 weights=np.concatenate([flux.weights / steps] * steps),
                 spin_discretisation="rotated copies concatenated")


def _to_body(flux, attitude, rotation, directions):
    """Express an orbital-frame flux in the body frame for the attitude."""
    described = dataclasses.asdict(attitude)
    if attitude.mode == "tumbling":
        out = _isotropic(flux, directions)
    elif attitude.mode == "spinning":
        out = _spun(flux, rotation, spin_rotations(attitude.spin_axis, attitude.spin_steps),
                    directions)
    else:
        out = _with(flux, directions=flux.directions @ rotation.T)
    return _with(out, frame="body", attitude=described)


# ------------------------------------------------------------------------------- sources


def _debris(phase, spec, samples, azimuth_bins):
    epochs = debris_epochs(phase.start_year, phase.duration, spec.solar_flux)
    years = np.array([e["year"] for e in epochs])
    solar = np.array([e["solar_flux"] for e in epochs])
    _, _, issues = _check_epoch(years, solar)
    _warn("kessler_1991", issues)
    fluxes = []
    for nu, altitude, fraction in zip(*samples, strict=True):
        # The epochs were checked (and warned about) together above; the base flux is built
        # at the model's reference epoch so that it warns about the orbit only. Its year and
        # solar flux are replaced by the epochs.
        base = debris_flux(
            altitude=float(altitude),
            inclination=phase.inclination,
            year=KESSLER_1991_GROWTH["epoch"],
            solar_flux=epochs[0]["solar_flux"],
            projectile_density=spec.projectile_density,
            azimuth_bins=azimuth_bins,
            population=spec.population,
        )
        fluxes.append(_with(
            base,
            weights=base.weights * fraction,
            epochs=epochs,
            year=None,
            solar_flux=None,
            orbit_sample={"true_anomaly": float(nu), "altitude": float(altitude),
                          "time_fraction": float(fraction)},
        ))
    return fluxes


def _merge_meteoroids(fluxes, fractions, samples):
    """One flux for the orbit samples of a meteoroid source (exact; see phase_fluxes).

    The samples differ by the scalar G·K (focusing times motion gain) and by their weights;
    the merged flux keeps the time-weighted mean G as its focusing factor and puts the rest
    of the mean G·K in its motion gain."""
    focusing = np.array([f.parameters["focusing_factor"] for f in fluxes])
    factors = focusing * np.array([f.parameters.get("motion_factor", 1.0) for f in fluxes])
    mean_factor = float(np.dot(fractions, factors))
    mean_focusing = float(np.dot(fractions, focusing))
    directions, row_of = np.unique(np.concatenate([f.directions for f in fluxes]), axis=0,
                                   return_inverse=True)
    speeds, column_of = np.unique(np.concatenate([f.speeds for f in fluxes]), return_inverse=True)
    row_of, column_of = np.ravel(row_of), np.ravel(column_of)
    weights = np.zeros((len(directions), len(speeds)))
    row_start = column_start = 0
    for flux, fraction, factor in zip(fluxes, fractions, factors, strict=True):
        rows = row_of[row_start:row_start + len(flux.directions)]
        columns = column_of[column_start:column_start + len(flux.speeds)]
        weights[np.ix_(rows, columns)] += flux.weights * (fraction * factor / mean_factor)
        row_start += len(flux.directions)
        column_start += len(flux.speeds)
    described = [
        {"true_anomaly": float(nu), "altitude": float(h), "time_fraction": float(fraction),
         "focusing_factor": float(flux.parameters["focusing_factor"]),
         "vehicle_speed": float(flux.parameters.get("vehicle_speed", 0.0)),
         "motion_factor": float(flux.parameters.get("motion_factor", 1.0)),
         "earth_shielding_factor": float(flux.parameters["earth_shielding_factor"])}
        for nu, h, fraction, flux in zip(*samples, fluxes, strict=True)
    ]
    first = fluxes[0]
    parameters = {k: v for k, v in first.parameters.items()
                  if k not in ("altitude", "earth_shielding_half_angle", "earth_shielding_factor",
                               "directions_kept", "orbit_sample", "vehicle_speed",
                               "directionality")}
    parameters.update(
        focusing_factor=mean_focusing,
        motion_factor=mean_factor / mean_focusing,
        directionality=(
            "rest-frame isotropic flux seen from the moving vehicle, at the orbit's speed at "
            "each sample (see orbit_samples)" if fluxes[0].parameters.get("vehicle_speed")
            else fluxes[0].parameters["directionality"]),
        orbit_samples=described,
        orbit_merge="samples merged: weights x time fraction x G(h)K(h)/mean GK, size "
                    "distribution x mean GK (exact: the samples differ only by the scalar GK and "
                    "the weights)",
    )
    return DirectionalFlux(first.source, first.model, directions, speeds, weights,
                           first.projectile_density, parameters)


def _meteoroids(phase, spec, samples, directions, attitude, rotation):
    if spec.focusing not in FOCUSING_CONVENTIONS:
        raise InputError(
            f"phase {phase.name!r}: unknown meteoroid focusing convention {spec.focusing!r}; "
            f"choose one of: {', '.join(FOCUSING_CONVENTIONS)}"
        )
    per_sample = []
    for altitude in samples[1]:
        speed = (orbital_speed(altitude, phase.perigee_altitude, phase.apogee_altitude)
                 if spec.vehicle_motion else 0.0)
        flux = meteoroid_flux(
            altitude=float(altitude),
            projectile_density=spec.projectile_density,
            directions=directions,
            focusing=spec.focusing,
            vehicle_speed=speed,
        )
        per_sample.append(_to_body(flux, attitude, rotation, directions))
    if len(per_sample) == 1:
        only = per_sample[0]
        return [_with(only, orbit_sample={"true_anomaly": 0.0,
                                          "altitude": float(samples[1][0]),
                                          "time_fraction": 1.0})]
    return [_merge_meteoroids(per_sample, samples[2], samples)]


def _table_arrays(table):
    get = table.get if isinstance(table, Mapping) else (lambda k: getattr(table, k, None))
    return get


def _tables(phase, tables, directions, attitude, rotation, taken):
    result = {}
    for table in tables:
        for flux in table_fluxes(table, directions=directions):
            if flux.source in taken:
                raise InputError(
                    f"environment table {flux.parameters['table']} names its source "
                    f"{flux.source!r}, which the {flux.source} model already supplies in phase "
                    f"{phase.name!r}; rename the table's source or switch the model off"
                )
            if flux.parameters["directionality"] == "isotropic":
                out = _with(flux, frame="body", attitude=dataclasses.asdict(attitude),
                            attitude_note="isotropic: unchanged by any attitude")
            elif flux.parameters["table_frame"] == "body":
                out = _with(flux, frame="body", attitude=dataclasses.asdict(attitude),
                            attitude_note="table given in the body frame: used as it stands")
            else:
                out = _to_body(flux, attitude, rotation, directions)
            result.setdefault(flux.source, []).append(_with(out, phase=phase.name))
    return result


# ------------------------------------------------------------------------------- caching


def _array_digest(value):
    if value is None:
        return None
    array = np.ascontiguousarray(value, dtype=np.float64)
    digest = hashlib.sha256(array.tobytes())
    digest.update(str(array.shape).encode())
    return digest.hexdigest()


def _jsonable(value):
    if isinstance(value, Mapping):
        return {str(k): _jsonable(v) for k, v in sorted(value.items(), key=lambda kv: str(kv[0]))}
    if isinstance(value, (list, tuple)):
        return [_jsonable(v) for v in value]
    if isinstance(value, (np.floating, float)):
        return float(value)
    if isinstance(value, (np.integer, int)) and not isinstance(value, bool):
        return int(value)
    if isinstance(value, np.ndarray):
        return _array_digest(value)
    return value


def _cache_inputs(phase, debris, meteoroid, tables, directions, azimuth_bins):
    described_tables = []
    for table in tables:
        get = _table_arrays(table)
        described_tables.append({
            "path": str(get("path")),
            "header": _jsonable(get("header")),
            **{name: _array_digest(get(name)) for name in
               ("diameters", "cumulative_flux", "directions", "speeds", "speed_fractions")},
        })
    return {
        "phase": _jsonable(dataclasses.asdict(phase)),
        "debris": None if debris is None else _jsonable(dataclasses.asdict(debris)),
        "meteoroid": None if meteoroid is None else _jsonable(dataclasses.asdict(meteoroid)),
        "tables": described_tables,
        "directions": int(directions),
        "debris_azimuth_bins": int(azimuth_bins),
    }


def _replay(seen):
    """Re-emit the model-range warnings of a build (stored with the cached result)."""
    for _, message in seen:
        warnings.warn(message, ModelRangeWarning, stacklevel=3)


# ----------------------------------------------------------------------------- the entry


def _build(phase, debris, meteoroid, tables, directions, azimuth_bins, rotation):
    samples = elliptical_orbit_samples(phase.perigee_altitude, phase.apogee_altitude,
                                       phase.orbit_samples)
    attitude = phase.attitude
    result = {}
    if debris is not None:
        fluxes = _debris(phase, debris, samples, azimuth_bins)
        result["debris"] = [_with(_to_body(f, attitude, rotation, directions), phase=phase.name)
                            for f in fluxes]
    if meteoroid is not None:
        result["meteoroid"] = [_with(f, phase=phase.name) for f in
                               _meteoroids(phase, meteoroid, samples, directions, attitude,
                                           rotation)]
    for source, fluxes in _tables(phase, tables, directions, attitude, rotation,
                                  set(result)).items():
        result.setdefault(source, []).extend(fluxes)
    return result


def phase_fluxes(phase, debris=None, meteoroid=None, tables=(), directions=600,
                 debris_azimuth_bins=90, *, cache=True):
    """Directional fluxes of every source over one mission phase, in the body frame.

    Parameters
    ----------
    phase : PhaseSpec
        Time span, orbit and attitude.
    debris : DebrisSpec, optional
        Enables the 1991 orbital-debris model (source ``"debris"``).
    meteoroid : MeteoroidSpec, optional
        Enables the Grün (1985) meteoroid model (source ``"meteoroid"``).
    tables : sequence
        User environment tables, each as returned by
        :func:`pockmark.io.environment_table.load_environment_table`; the source name is the
        table's ``source`` header. Several tables may share a source name (their fluxes
        add); a table may not reuse the name of an enabled model.
    directions : int
        Size of the Fibonacci direction grids (meteoroids, tumbling and spinning averages,
        isotropic tables). Default 600.
    debris_azimuth_bins : int
        Azimuth bins of the debris direction distribution (even). Default 90.
    cache : bool
        Memoise the result on disk (default ``True``); see Notes.

    Returns
    -------
    dict of str to list of DirectionalFlux
        For each source, in the order debris, meteoroid, tables: fluxes with directions in the
        body frame (``parameters["frame"] == "body"``) and weights including every time
        fraction, so the phase's expected count is the sum over the list of each flux's
        integral times ``phase.duration``.

    Raises
    ------
    InputError
        For an invalid phase (non-positive duration, perigee not above 100 km, apogee below
        perigee, apogee above 2000 km with debris, inclination outside [0, 180]°, bad
        attitude), a solar-flux table missing a needed year, or any model input error; the
        message names the phase where it can.

    Warns
    -----
    ModelRangeWarning
        As the models do (e.g. altitude above 1000 km or inclination outside 28.5°–120° for
        the debris model, a year before 1988), once per distinct message, also when the
        result comes from the cache.

    Notes
    -----
    **Time.** Debris epochs come from :func:`debris_epochs` (calendar-year pieces, F10.7 of the
    year before). The 1991 model's direction-speed distribution depends on the orbit only, so
    the epochs of one orbit sample share one flux whose size distribution is the
    time-weighted mean of the epochs' (``parameters["epochs"]``): exact for the total and it
    keeps the list short however long the phase.

    **Orbit.** An elliptical orbit is sampled by
    :func:`~pockmark.environment.orbit.elliptical_orbit_samples` (true-anomaly intervals,
    exact Kepler time fractions, mirror samples merged). **Approximation:** the debris and
    meteoroid models are circular-orbit models, so at each sample they are evaluated as for
    a circular orbit at that sample's altitude, with the flight direction along the local
    horizontal (the flight-path angle, up to :math:`\\arctan(e \\sin\\nu/(1 + e\\cos\\nu))`,
    is ignored) and the circular speed of that altitude in the debris crossing geometry.
    Debris gives one flux per sample, weights times the sample's time fraction. Meteoroid
    samples differ only by the focusing factor :math:`G(h)` (a scalar on the size
    distribution), the Earth-cone cut and (``"ecss_2008"``) the speeds, so they merge into
    one flux over the union of directions and speeds with weights
    :math:`f_s G_s/\\bar G\\,w_s` and size distribution :math:`\\bar G = \\sum f_s G_s` times
    the unfocused one: exact. A circular orbit (perigee = apogee) gives exactly the circular
    models' result.

    **Attitude.** ``"fixed"`` rotates the directions with
    :func:`~pockmark.geometry.frames.body_from_orbital`. ``"tumbling"`` replaces each flux by
    its orientation average, isotropic on a ``directions``-point Fibonacci grid, with the same
    speed marginal and total weight; the Earth-blocked part of the meteoroid flux stays
    removed in total (the weights sum to :math:`s_f`), it is only spread over all directions.
    ``"spinning"`` averages the fixed attitude over ``spin_steps`` equally spaced rotations
    about the body spin axis: debris and directional tables as one flux holding the rotated
    copies (directions concatenated, weights divided by ``spin_steps``); meteoroids, which
    are isotropic apart from the Earth cone, as the same spin-averaged density evaluated on a
    ``directions``-point body-frame grid (the fraction of spin angles at which each grid
    direction is outside the cone), rescaled to the exact unspun total, so the ray count does
    not grow ``spin_steps``-fold. User tables in the body frame, and isotropic tables, are
    used as they stand for every attitude.

    **Cache.** With ``cache=True`` the result is stored in ``$POCKMARK_CACHE_DIR`` (default
    ``~/.cache/pockmark/environment``) as ``<key>.npz``, key the sha256 of a canonical JSON
    of every input (tables by the sha256 of their arrays), the pockmark version and the
    source of the environment package; arrays in ``.npz``, parameters and warnings as JSON
    inside it, written atomically. An unreadable file is ignored and rewritten; a cache
    directory that cannot be written is skipped with a logged warning.
    """
    if (isinstance(directions, bool) or not isinstance(directions, numbers.Integral)
            or directions < 1):
        raise InputError(f"directions must be a positive integer; got {directions!r}")
    rotation = _validate_phase(phase, debris)
    tables = tuple(tables)
    for spec, kind in ((debris, DebrisSpec), (meteoroid, MeteoroidSpec)):
        if spec is not None and not isinstance(spec, kind):
            raise InputError(f"expected a {kind.__name__} or None; got {type(spec).__name__}")
    if debris is not None:
        _solar_flux_table(debris.solar_flux)  # early, clear error

    key = None
    if cache:
        inputs = _cache_inputs(phase, debris, meteoroid, tables, directions, debris_azimuth_bins)
        key = _cache.cache_key(inputs, __version__)
        cached = _cache.load(key, DirectionalFlux)
        if cached is not None:
            result, seen = cached
            logger.debug("environment of phase %r read from the cache (%s)", phase.name, key)
            _replay(seen)
            return result

    with warnings.catch_warnings(record=True) as record:
        warnings.simplefilter("always")
        result = _build(phase, debris, meteoroid, tables, directions, debris_azimuth_bins,
                        rotation)
    seen = []
    for item in record:
        if issubclass(item.category, ModelRangeWarning):
            entry = ("ModelRangeWarning", str(item.message))
            if entry not in seen:
                seen.append(entry)
        else:  # not part of the result: passed on as raised, not cached
            warnings.warn(item.message, item.category, stacklevel=2)
    if cache:
        _cache.store(key, result, seen, inputs)
    _replay(seen)
    return result


__all__ = [
    "ATTITUDE_MODES",
    "DEFAULT_SOLAR_FLUX",
    "Attitude",
    "DebrisSpec",
    "MeteoroidSpec",
    "PhaseSpec",
    "debris_epochs",
    "phase_fluxes",
]
