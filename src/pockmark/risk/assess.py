"""The whole analysis of one case: mesh, shields, environment, visibility, risk per face.

:func:`assess` is the library entry point that the ``pockmark run`` command wraps. It returns
an :class:`Assessment` holding per-face arrays (one entry per triangle, in the mesh's face
order) and per-phase totals; :mod:`pockmark.report.summary` turns it into tables and JSON.
"""

import logging
import time
import warnings
from dataclasses import dataclass, field

import numpy as np

from pockmark import environment
from pockmark.ballistics import make_material, make_shield
from pockmark.errors import ConfigError, InputError, MeshError, ModelRangeWarning
from pockmark.io.environment_table import load_environment_table
from pockmark.risk.impacts import (
    ANGLE_NODES,
    SIZE_EDGES,
    accumulate_angle_exposure,
    angle_positions,
    interpolate_at,
    out_of_range_table,
    penetration_table,
    penetration_table_by_size,
)
from pockmark.risk.vehicle import build_vehicle
from pockmark.visibility import VisibilityEngine

logger = logging.getLogger(__name__)

#: Upper bound on faces × directions held in memory at once by the integration.
CHUNK_ELEMENTS = 4_000_000


@dataclass
class SourceResult:
    """Per-face results of one source over one phase."""

    impact_flux: float  # Φ0(≥ impact diameter) [m⁻² yr⁻¹]
    open_exposure: np.ndarray  # (m,) Σ_j w_j max(0, n·u_j) [unitless]
    visible_exposure: np.ndarray  # (m,) the same with the visible fraction
    penetration_flux: np.ndarray  # (m,) [m⁻² yr⁻¹]
    angle_exposure: list  # per tag: (nd, na) visible exposure × area at the angle nodes [m²]
    tables: list  # per tag: (nd, na) penetration_table [m⁻² yr⁻¹]


@dataclass
class Assessment:
    """Results of :func:`assess`."""

    case: object
    vehicle: object  # pockmark.risk.vehicle.Vehicle
    shields: dict
    duration: float  # [yr]
    face: dict  # name -> (m,) array of per-face results
    by_phase: list  # per phase: {"name", "duration_years", "by_source": {...}}
    environment: dict  # per phase and source: model parameters
    sources: tuple  # source names in the order they first appear
    breakdowns: dict  # per source: critical penetrations by particle size and by direction
    outside_validity: np.ndarray  # per tag: expected penetrations from impacts outside the equation's range
    timings: dict = field(default_factory=dict)
    # Per flux integrated: {"phase", "source", "flux", "duration", "angle_exposure"}, the
    # per-tag visible exposure × area at the angle nodes. With a shield's penetration_table
    # it gives that tag's expected penetrations exactly as the run computed them, so other
    # shields can be tried on a tag without tracing a ray (pockmark.risk.trade).
    exposures: list = field(default_factory=list)

    @property
    def mesh(self):
        return self.vehicle.mesh


def case_materials(case):
    """The case's ``[materials.NAME]`` tables as :class:`~pockmark.ballistics.Material`."""
    materials = {}
    for name, properties in (case.materials or {}).items():
        try:
            materials[name] = make_material(name, properties)
        except InputError as error:
            raise ConfigError(f"{case.where('materials', name)}: {error}") from None
    return materials


def build_shields(case, mesh):
    """Check the case's shield definitions against the ballistic library and the mesh tags."""
    materials = case_materials(case)
    shields = {}
    for tag, definition in case.shields.items():
        try:
            shields[tag] = make_shield(tag, definition, materials=materials)
        except InputError as error:
            raise ConfigError(f"{case.where('shields', tag)}: {error}") from None
    counts = np.bincount(mesh.face_tags, minlength=len(mesh.tag_names))
    missing = [(name, int(counts[i])) for i, name in enumerate(mesh.tag_names) if name not in shields]
    if missing:
        listed = ", ".join(f"{name!r} ({count} faces)" for name, count in missing)
        raise ConfigError(
            f"{case.path}: mesh {mesh.source} uses shield tags with no definition: {listed}; "
            "add a [shields.TAG] table for each"
        )
    unused = sorted(set(shields) - set(mesh.tag_names))
    for tag in unused:
        logger.warning("shield %r is defined in %s but no face of the mesh uses it", tag, case.where("shields", tag))
    return shields


def build_fluxes(case, index):
    """Directional fluxes in the body frame of every source the case names, for one phase.

    Returns ``{source: [DirectionalFlux, ...]}``; see :func:`pockmark.environment.phase_fluxes`.
    """
    phase = case.phases[index]
    settings = case.analysis
    where = case.where("phases", index)
    spec = environment.PhaseSpec(
        name=phase.name,
        start_year=phase.start_year,
        duration=phase.duration,
        perigee_altitude=phase.perigee_altitude,
        apogee_altitude=phase.apogee_altitude,
        inclination=phase.inclination,
        attitude=environment.Attitude(
            mode=phase.attitude,
            flight_axis=phase.flight_axis,
            nadir_axis=phase.nadir_axis,
            spin_axis=phase.spin_axis,
            spin_steps=phase.spin_steps,
        ),
        orbit_samples=settings.orbit_samples,
    )
    debris = meteoroid = None
    if case.debris is not None:
        options = {"projectile_density": case.debris.projectile_density, "population": case.debris.population}
        if case.debris.solar_flux is not None:
            options["solar_flux"] = case.debris.solar_flux
        debris = environment.DebrisSpec(**options)
    if case.meteoroid is not None:
        meteoroid = environment.MeteoroidSpec(
            projectile_density=case.meteoroid.projectile_density, focusing=case.meteoroid.focusing,
            vehicle_motion=case.meteoroid.vehicle_motion,
        )
    try:
        tables = tuple(load_environment_table(path) for path in case.environment_tables)
        return environment.phase_fluxes(
            spec,
            debris=debris,
            meteoroid=meteoroid,
            tables=tables,
            directions=settings.directions,
            debris_azimuth_bins=settings.debris_azimuth_bins,
        )
    except InputError as error:
        raise ConfigError(f"{where}: {error}") from None


def integrate_source(engine, mesh, shields, flux, impact_diameter, threads, progress):
    """Impact and penetration rates per face for one directional flux in the body frame."""
    directions = np.ascontiguousarray(flux.directions, dtype=np.float64)
    weights = np.asarray(flux.weights, dtype=np.float64)
    direction_weights = weights.sum(axis=1)
    tables = [penetration_table(shields[name], flux) for name in mesh.tag_names]
    faces_of_tag = [np.flatnonzero(mesh.face_tags == t) for t in range(len(mesh.tag_names))]
    normals = mesh.face_normals
    m = mesh.n_faces
    open_exposure = np.zeros(m)
    visible_exposure = np.zeros(m)
    penetration_flux = np.zeros(m)
    areas = mesh.face_areas
    angle_exposure = [np.zeros((len(directions), len(ANGLE_NODES))) for _ in mesh.tag_names]
    # only faces of this tag contribute to its histogram
    chunk = max(1, CHUNK_ELEMENTS // m)
    for start in range(0, len(directions), chunk):
        stop = min(start + chunk, len(directions))
        block = directions[start:stop]
        visible = engine.visible_fraction(block, threads=threads)
        cosines = np.maximum(normals @ block.T, 0.0)
        open_exposure += cosines @ direction_weights[start:stop]
        exposed = cosines * visible
        visible_exposure += exposed @ direction_weights[start:stop]
        for tag_index, faces in enumerate(faces_of_tag):
            if len(faces) == 0:
                continue
            rows = tables[tag_index][start:stop]
            lower, fraction = angle_positions(cosines[faces])
            values = interpolate_at(rows, lower, fraction)
            penetration_flux[faces] += np.einsum("fc,fc->f", exposed[faces], values)
            accumulate_angle_exposure(
                angle_exposure[tag_index][start:stop], lower, fraction, exposed[faces] * areas[faces, None]
            )
        if progress is not None:
            progress(stop - start)
    return SourceResult(
        impact_flux=float(flux.cumulative_flux(np.array(impact_diameter))),
        open_exposure=open_exposure,
        visible_exposure=visible_exposure,
        penetration_flux=penetration_flux,
        angle_exposure=angle_exposure,
        tables=tables,
    )


def _usable_threads(requested):
    """``None`` (all cores) for 0, else ``requested`` capped at the threads numba can run."""
    if not requested:
        return None
    import numba

    available = numba.config.NUMBA_NUM_THREADS
    if requested > available:
        logger.warning("%d threads requested but numba can run %d here; using %d", requested, available, available)
        return available
    return requested


def assess(case, progress=None):
    """Run the analysis a case file describes.

    Parameters
    ----------
    case : pockmark.io.config.Case
    progress : callable, optional
        ``progress(done, total)`` in directions, called while ray shadowing.

    Returns
    -------
    Assessment
    """
    timings = {}
    clock = time.perf_counter()
    vehicle = build_vehicle(case)
    mesh = vehicle.mesh
    if mesh.area <= 0:
        raise MeshError(f"{mesh.source}: all faces have zero area; check the mesh and its length unit")
    shields = build_shields(case, mesh)
    timings["load_seconds"] = time.perf_counter() - clock

    clock = time.perf_counter()
    phase_fluxes = [build_fluxes(case, index) for index in range(len(case.phases))]
    timings["environment_seconds"] = time.perf_counter() - clock

    settings = case.analysis
    threads = _usable_threads(settings.threads)
    clock = time.perf_counter()
    # The on-disk visibility cache (keyed by geometry, directions and sampling) lets a rerun
    # that changes only shields, tags or the environment's magnitudes skip the ray work.
    engine = VisibilityEngine(
        mesh.vertices, mesh.faces, samples_per_face=settings.samples_per_face, seed=settings.seed, cache=True
    )
    total = sum(len(f.directions) for fluxes in phase_fluxes for group in fluxes.values() for f in group)
    done = 0

    def advance(count):
        nonlocal done
        done += count
        if progress is not None:
            progress(done, total)

    m = mesh.n_faces
    areas = mesh.face_areas
    critical = np.array([c.role == "critical" for c in vehicle.components])[vehicle.face_components]
    critical_tags = [t for t in range(len(mesh.tag_names)) if critical[mesh.face_tags == t].all()]
    breakdowns = {}
    outside_validity = np.zeros(len(mesh.tag_names))
    face = {}
    by_phase = []
    environment_parameters = {}
    open_impacts = np.zeros(m)
    sources = []
    exposures = []
    for phase, fluxes in zip(case.phases, phase_fluxes):
        phase_summary = {"name": phase.name, "duration_years": phase.duration, "by_source": {}}
        for source, group in fluxes.items():
            if source not in sources:
                sources.append(source)
            impacts = np.zeros(m)
            penetrations = np.zeros(m)
            for flux in group:
                result = integrate_source(engine, mesh, shields, flux, settings.impact_diameter, threads, advance)
                impacts += areas * phase.duration * result.impact_flux * result.visible_exposure
                penetrations += areas * phase.duration * result.penetration_flux
                open_impacts += areas * phase.duration * result.impact_flux * result.open_exposure
                exposures.append({"phase": phase.name, "source": source, "flux": flux,
                                  "duration": phase.duration, "angle_exposure": result.angle_exposure})
                by_direction = sum(
                    ((result.angle_exposure[t] * result.tables[t]).sum(axis=1) for t in critical_tags),
                    np.zeros(len(flux.directions)),
                ) * phase.duration
                by_size = sum((
                    np.einsum("ja,bja->b", result.angle_exposure[t], penetration_table_by_size(shields[mesh.tag_names[t]], flux))
                    for t in critical_tags
                ), np.zeros(len(SIZE_EDGES) - 1)) * phase.duration
                for t in range(len(mesh.tag_names)):
                    if result.angle_exposure[t].any():
                        outside = (result.angle_exposure[t] * out_of_range_table(shields[mesh.tag_names[t]], flux)).sum()
                        outside_validity[t] += outside * phase.duration
                breakdown = breakdowns.setdefault(source, {"directions": [], "direction_penetrations": [], "size": 0.0})
                breakdown["directions"].append(flux.directions)
                breakdown["direction_penetrations"].append(by_direction)
                breakdown["size"] = breakdown["size"] + by_size
                environment_parameters.setdefault(phase.name, {}).setdefault(source, []).append(
                    {
                        "model": flux.model,
                        "parameters": flux.parameters,
                        "directions": len(flux.directions),
                        "speed_bins": len(flux.speeds),
                        "total_weight": float(np.sum(flux.weights)),
                        "mean_speed_km_s": float(flux.mean_speed()),
                        "impact_flux_per_m2_year": result.impact_flux,
                    }
                )
            for name, values in ((f"{source}_impacts", impacts), (f"{source}_penetrations", penetrations)):
                face[name] = face.get(name, np.zeros(m)) + values
            phase_summary["by_source"][source] = {
                "expected_impacts": float(impacts.sum()),
                "expected_penetrations": float(penetrations.sum()),
                "expected_critical_penetrations": float(penetrations[critical].sum()),
            }
        by_phase.append(phase_summary)
    timings["shadowing_and_integration_seconds"] = time.perf_counter() - clock

    face["expected_impacts"] = sum(face[f"{s}_impacts"] for s in sources)
    face["expected_penetrations"] = sum(face[f"{s}_penetrations"] for s in sources)
    safe_area = np.where(areas > 0, areas, np.inf)
    face["penetrations_per_m2"] = face["expected_penetrations"] / safe_area
    with np.errstate(invalid="ignore", divide="ignore"):
        face["shadowed_fraction"] = np.where(
            open_impacts > 0, 1.0 - face["expected_impacts"] / np.where(open_impacts > 0, open_impacts, 1.0), 0.0
        )
    face["shadowed_fraction"] = np.clip(face["shadowed_fraction"], 0.0, 1.0)
    tag_penetrations = np.bincount(mesh.face_tags, weights=face["expected_penetrations"], minlength=len(mesh.tag_names))
    for t, name in enumerate(mesh.tag_names):
        if tag_penetrations[t] > 0 and outside_validity[t] > 0.01 * tag_penetrations[t]:
            share = outside_validity[t] / tag_penetrations[t]
            warnings.warn(
                f"shield {name!r}: {share:.0%} of its expected penetrations come from impacts outside "
                f"the stated range of {shields[name].equation} ({shields[name].validity_bounds}) and "
                f"are extrapolated; the range's source is in summary.json",
                ModelRangeWarning,
                stacklevel=2,
            )
    return Assessment(
        case=case,
        vehicle=vehicle,
        shields=shields,
        duration=case.duration,
        face=face,
        by_phase=by_phase,
        environment=environment_parameters,
        sources=tuple(sources),
        outside_validity=outside_validity,
        breakdowns={
            source: {
                "size_edges_cm": list(SIZE_EDGES),
                "size_penetrations": b["size"],
                "directions": np.vstack(b["directions"]),
                "direction_penetrations": np.concatenate(b["direction_penetrations"]),
            }
            for source, b in breakdowns.items()
        },
        timings=timings,
        exposures=exposures,
    )
