"""Tables and plots of a case's impact environment: what ``pockmark environment`` writes.

For every phase and source: the cumulative flux against particle diameter, the distribution
of impact speeds, and a sky map of where the flux comes from in the vehicle's body frame.
"""

import warnings

import numpy as np

from pockmark.errors import ModelRangeWarning
from pockmark.io.results import atomic_path, write_table_csv

#: Diameters at which the cumulative flux is tabulated and printed [cm].
TABLE_DIAMETERS = (0.001, 0.003, 0.01, 0.03, 0.1, 0.3, 1.0, 3.0, 10.0)

#: Sky-map cell size in azimuth and elevation [°].
SKY_CELL = 5.0


def _group_curves(group, diameters):
    """Time-weighted cumulative flux of a list of fluxes: Σ total weight × Φ0(≥ d)."""
    return sum(float(np.sum(f.weights)) * np.asarray(f.cumulative_flux(diameters), dtype=float) for f in group)


def environment_tables(phase_fluxes, phase_names, reference_diameter):
    """Rows of the three CSV tables: size distribution, speed distribution, directions."""
    diameters = np.geomspace(1e-4, 100.0, 61)
    size_rows, speed_rows, direction_rows = [], [], []
    for name, fluxes in zip(phase_names, phase_fluxes):
        for source, group in fluxes.items():
            curve = _group_curves(group, diameters)
            for d, value in zip(diameters, curve):
                size_rows.append((name, source, d, value, value / 4.0))
            speeds = np.concatenate([f.speeds for f in group])
            weights = np.concatenate([np.sum(f.weights, axis=0) for f in group])
            order = np.argsort(speeds, kind="stable")
            for v, w in zip(speeds[order], weights[order]):
                speed_rows.append((name, source, v, w / weights.sum()))
            for f in group:
                flux_ref = float(f.cumulative_flux(np.array(reference_diameter)))
                per_direction = np.sum(f.weights, axis=1)
                x, y, z = f.directions.T
                azimuth = np.degrees(np.arctan2(y, x))
                elevation = np.degrees(np.arcsin(np.clip(z, -1, 1)))
                for row in zip(x, y, z, azimuth, elevation, per_direction, per_direction * flux_ref):
                    direction_rows.append((name, source, *row))
    return size_rows, speed_rows, direction_rows


def write_environment(out_dir, phase_fluxes, phase_names, reference_diameter):
    """Write ``sizes.csv``, ``speeds.csv``, ``directions.csv`` and the PNG plots; return the summary rows.

    The curves span 1 µm to 1 m on purpose, beyond the models' stated size ranges, so that the
    whole of each curve can be seen; the models' range warnings are therefore not repeated here.
    """
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ModelRangeWarning)
        return _write_environment(out_dir, phase_fluxes, phase_names, reference_diameter)


def _write_environment(out_dir, phase_fluxes, phase_names, reference_diameter):
    sizes, speeds, directions = environment_tables(phase_fluxes, phase_names, reference_diameter)

    def columns(rows, names):
        data = list(zip(*rows)) if rows else [[] for _ in names]
        return {n: np.asarray(c, dtype=object if i < 2 else float) for i, (n, c) in enumerate(zip(names, data))}

    write_table_csv(
        out_dir / "sizes.csv",
        columns(sizes, ["phase", "source", "diameter_cm", "flux_cross_section_m2_yr", "flux_random_plate_m2_yr"]),
    )
    write_table_csv(out_dir / "speeds.csv", columns(speeds, ["phase", "source", "speed_km_s", "fraction"]))
    write_table_csv(
        out_dir / "directions.csv",
        columns(
            directions,
            ["phase", "source", "x", "y", "z", "azimuth_deg", "elevation_deg", "weight",
             f"flux_ge_{reference_diameter:g}cm_m2_yr"],
        ),
    )
    _plot(out_dir, phase_fluxes, phase_names, reference_diameter)
    table = []
    for name, fluxes in zip(phase_names, phase_fluxes):
        for source, group in fluxes.items():
            speeds_all = np.concatenate([f.speeds for f in group])
            weights_all = np.concatenate([np.sum(f.weights, axis=0) for f in group])
            mean = float(np.sum(speeds_all * weights_all) / np.sum(weights_all))
            curve = _group_curves(group, np.asarray(TABLE_DIAMETERS))
            table.append({"phase": name, "source": source, "mean_speed_km_s": mean, "flux": curve.tolist()})
    return table


def _plot(out_dir, phase_fluxes, phase_names, reference_diameter):
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    diameters = np.geomspace(1e-4, 100.0, 121)
    for index, (name, fluxes) in enumerate(zip(phase_names, phase_fluxes)):
        figure, (sizes, speeds) = plt.subplots(1, 2, figsize=(11, 4.2))
        for source, group in fluxes.items():
            curve = _group_curves(group, diameters)
            positive = curve > 0
            sizes.loglog(diameters[positive], curve[positive], label=source)
            v = np.concatenate([f.speeds for f in group])
            w = np.concatenate([np.sum(f.weights, axis=0) for f in group])
            bins = np.arange(0.0, max(75.0, v.max() + 1.0), 1.0)
            speeds.hist(v, bins=bins, weights=w / w.sum(), histtype="step", label=source)
        sizes.set(xlabel="particle diameter d [cm]", ylabel="flux of particles ≥ d [m⁻² yr⁻¹]",
                  title="cumulative flux per unit cross-section")
        sizes.grid(True, which="both", alpha=0.3)
        sizes.legend()
        speeds.set(xlabel="impact speed [km s⁻¹]", ylabel="fraction of flux per 1 km s⁻¹",
                   title="impact speeds relative to the vehicle")
        speeds.legend()
        figure.suptitle(f"phase {name!r}")
        figure.tight_layout()
        _save(figure, out_dir / f"flux_phase{index + 1}.png")
        plt.close(figure)

        sources = list(fluxes)
        figure, axes = plt.subplots(len(sources), 1, figsize=(9, 3.6 * len(sources)), squeeze=False)
        az_edges = np.arange(-180.0, 180.0 + SKY_CELL, SKY_CELL)
        el_edges = np.arange(-90.0, 90.0 + SKY_CELL, SKY_CELL)
        for axis, source in zip(axes[:, 0], sources):
            grid = np.zeros((len(el_edges) - 1, len(az_edges) - 1))
            for f in fluxes[source]:
                values = np.sum(f.weights, axis=1) * float(f.cumulative_flux(np.array(reference_diameter)))
                grid += _sky_grid(f.directions, values, az_edges, el_edges)
            shown = np.where(grid > 0, grid, np.nan)
            positive = grid[grid > 0]
            norm = matplotlib.colors.LogNorm(vmin=positive.max() * 1e-4, vmax=positive.max()) if positive.size else None
            mesh = axis.pcolormesh(az_edges, el_edges, shown, cmap="cividis", norm=norm)
            figure.colorbar(mesh, ax=axis, label=f"flux ≥ {reference_diameter:g} cm [m⁻² yr⁻¹ sr⁻¹]")
            axis.set(xlabel="azimuth in the body x-y plane from +x [°]", ylabel="elevation toward +z [°]",
                     title=f"{source}: where particles come from (body frame)", xlim=(-180, 180), ylim=(-90, 90))
        figure.tight_layout()
        _save(figure, out_dir / f"sky_phase{index + 1}.png")
        plt.close(figure)


def _sky_grid(directions, values, az_edges, el_edges):
    """Flux per steradian on an azimuth-elevation grid from flux per discrete direction.

    Directions that fill the sphere (a direction grid) are spread over their spherical Voronoi
    cells; directions confined to a plane (debris in the local horizontal) are binned.
    """
    from scipy.spatial import SphericalVoronoi, cKDTree

    az_centres = np.radians(0.5 * (az_edges[1:] + az_edges[:-1]))
    el_centres = np.radians(0.5 * (el_edges[1:] + el_edges[:-1]))
    planar = np.linalg.matrix_rank(directions - directions.mean(axis=0), tol=1e-6) < 3 or len(directions) < 8
    if not planar:
        try:
            cells = SphericalVoronoi(directions, threshold=1e-9).calculate_areas()
        except ValueError:
            planar = True
    if planar:
        x, y, z = directions.T
        histogram, _, _ = np.histogram2d(
            np.degrees(np.arcsin(np.clip(z, -1, 1))), np.degrees(np.arctan2(y, x)),
            bins=(el_edges, az_edges), weights=values,
        )
        area = np.radians(np.diff(az_edges))[None, :] * np.diff(np.sin(np.radians(el_edges)))[:, None]
        return histogram / area
    elevation, azimuth = np.meshgrid(el_centres, az_centres, indexing="ij")
    centres = np.stack(
        [np.cos(elevation) * np.cos(azimuth), np.cos(elevation) * np.sin(azimuth), np.sin(elevation)], axis=-1
    )
    nearest_distance, nearest = cKDTree(directions).query(centres.reshape(-1, 3))
    intensity = (values / cells)[nearest]
    # Cells farther from every direction than a typical cell radius lie in a gap (e.g. the
    # Earth's cone) and carry no flux.
    radius = 2.0 * np.sqrt(np.median(cells) / np.pi)
    intensity[nearest_distance > radius] = 0.0
    return intensity.reshape(elevation.shape)


def _save(figure, path):
    with atomic_path(path) as temporary:
        figure.savefig(temporary, dpi=110, format="png")


def format_environment(table, reference_diameter):
    """Plain-text table of the cumulative flux per phase and source."""
    head = "".join(f"{d:>10g}" for d in TABLE_DIAMETERS)
    lines = [
        "Cumulative flux per unit cross-section, particles ≥ d [m⁻² yr⁻¹] (÷4 for a randomly oriented plate)",
        f"  {'phase':<18}{'source':<12}{'mean V':>8}   d [cm] ={head}",
    ]
    for row in table:
        values = "".join(f"{v:>10.3g}" for v in row["flux"])
        lines.append(f"  {row['phase'][:17]:<18}{row['source']:<12}{row['mean_speed_km_s']:>8.2f}{'':>12}{values}")
    lines.append("")
    lines.append("  Caution: model estimates; verify constants marked 'from memory' before relying on them.")
    return "\n".join(lines)
