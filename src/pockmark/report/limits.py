"""Ballistic-limit curves of a case's shields: what ``pockmark limits`` writes.

For each shield: the critical diameter against impact speed, one curve per impact angle, as a
PNG plot (log diameter axis, regime boundaries marked, the part outside the equation's stated
range dashed), as rows of one CSV file, and as a plain-text table (speed rows × angle
columns).

Contents
--------
SPEED_RANGE, TABLE_SPEEDS
    Speeds of the curves and of the printed table [km s⁻¹].
limit_curves
    Critical diameter, out-of-range mask and regime boundaries of one shield.
output_files
    Names of the files :func:`write_limits` will write, for the overwrite check.
write_limits
    Write ``limits.csv`` and one ``limits_<tag>.png`` per shield; return the curves.
format_limits
    The printed table of every shield.
"""

import re

import numpy as np

from pockmark.io.results import atomic_path, write_table_csv

#: Speed span of the curves [km s⁻¹].
SPEED_RANGE = (0.5, 20.0)

#: Speeds of the printed table [km s⁻¹].
TABLE_SPEEDS = (0.5, 1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 7.0, 8.0, 10.0, 12.0, 15.0, 20.0)

#: Points per curve (a 0.05 km s⁻¹ step over SPEED_RANGE), plus the regime boundaries.
_CURVE_POINTS = 391

CSV_NAME = "limits.csv"


def limit_curves(shield, angles, projectile_density, speeds=None):
    """Critical diameter of one shield over speed, per angle.

    Parameters
    ----------
    shield : pockmark.ballistics.Shield
    angles : (m,) array-like
        Impact angles from the surface normal [°], each in [0, 90).
    projectile_density : float
        Projectile density [g cm⁻³].
    speeds : (n,) array-like, optional
        Impact speeds [km s⁻¹]; default a 0.05 km s⁻¹ grid over :data:`SPEED_RANGE` with
        the regime boundaries that fall inside it added, so that curves bend exactly there.

    Returns
    -------
    dict
        ``speeds`` (n,), ``angles`` (m,), ``critical_diameter`` (n, m) [cm],
        ``out_of_range`` (n, m) bool, ``evaluated_angles`` (m,) (after the obliquity cap)
        and ``boundaries``: per angle, a list of ``(label, speed [km s⁻¹], d_c [cm])``
        inside the speed span.
    """
    angles = np.asarray(angles, dtype=np.float64)
    boundaries_per_angle = [shield.regime_boundaries(angle) for angle in angles]
    if speeds is None:
        grid = np.linspace(SPEED_RANGE[0], SPEED_RANGE[1], _CURVE_POINTS)
        extra = [
            speed for pairs in boundaries_per_angle for _, speed in pairs
            if SPEED_RANGE[0] < speed < SPEED_RANGE[1]
        ]
        speeds = np.unique(np.concatenate([grid, np.asarray(extra, dtype=np.float64)]))
    speeds = np.asarray(speeds, dtype=np.float64)
    critical = shield.critical_diameter(speeds[:, None], angles[None, :], projectile_density)
    outside = shield.out_of_range(speeds[:, None], angles[None, :], projectile_density)
    boundaries = []
    for angle, pairs in zip(angles, boundaries_per_angle, strict=True):
        inside = [(label, speed) for label, speed in pairs if speeds[0] <= speed <= speeds[-1]]
        values = (
            shield.critical_diameter(np.array([s for _, s in inside]), angle, projectile_density)
            if inside else []
        )
        boundaries.append(
            [(label, speed, float(d)) for (label, speed), d in zip(inside, values, strict=True)]
        )
    evaluated = np.array([float(shield.evaluated_angle(angle)) for angle in angles])
    return {
        "speeds": speeds,
        "angles": angles,
        "critical_diameter": np.asarray(critical, dtype=np.float64),
        "out_of_range": np.asarray(outside, dtype=bool),
        "evaluated_angles": evaluated,
        "boundaries": boundaries,
    }


def _stems(tags):
    """File-name stems ``limits_<tag>``, made safe and unique."""
    stems, used = {}, set()
    for tag in tags:
        base = "limits_" + (re.sub(r"[^A-Za-z0-9_.-]+", "_", tag).strip("._") or "shield")
        stem, number = base, 2
        while stem.lower() in used:
            stem, number = f"{base}_{number}", number + 1
        used.add(stem.lower())
        stems[tag] = stem
    return stems


def output_files(tags):
    """Names of the files :func:`write_limits` writes for these shield tags."""
    return (CSV_NAME, *(f"{stem}.png" for stem in _stems(tags).values()))


def write_limits(out_dir, shields, angles, projectile_density):
    """Write ``limits.csv`` and a PNG per shield into ``out_dir``; return the curves.

    Parameters
    ----------
    out_dir : pathlib.Path
        Existing output folder (checked with ``prepare_output_dir`` beforehand).
    shields : list of pockmark.ballistics.Shield
    angles : (m,) array-like
        Impact angles [°].
    projectile_density : float
        Projectile density [g cm⁻³].

    Returns
    -------
    list of (Shield, dict)
        Each shield with its :func:`limit_curves` on the curve grid, plus the key
        ``table`` holding :func:`limit_curves` at :data:`TABLE_SPEEDS`.
    """
    results = []
    rows = {name: [] for name in (
        "shield", "equation", "projectile_density_g_cm3", "impact_angle_deg",
        "evaluated_angle_deg", "impact_speed_km_s", "critical_diameter_cm", "out_of_range",
    )}
    stems = _stems([shield.tag for shield in shields])
    for shield in shields:
        curves = limit_curves(shield, angles, projectile_density)
        curves["table"] = limit_curves(shield, angles, projectile_density, TABLE_SPEEDS)
        results.append((shield, curves))
        for j, angle in enumerate(curves["angles"]):
            n = curves["speeds"].size
            rows["shield"] += [shield.tag] * n
            rows["equation"] += [shield.equation] * n
            rows["projectile_density_g_cm3"] += [float(projectile_density)] * n
            rows["impact_angle_deg"] += [float(angle)] * n
            rows["evaluated_angle_deg"] += [float(curves["evaluated_angles"][j])] * n
            rows["impact_speed_km_s"] += curves["speeds"].tolist()
            rows["critical_diameter_cm"] += curves["critical_diameter"][:, j].tolist()
            rows["out_of_range"] += [int(x) for x in curves["out_of_range"][:, j]]
    columns = {
        name: np.asarray(values, dtype=object if name in ("shield", "equation") else None)
        for name, values in rows.items()
    }
    write_table_csv(out_dir / CSV_NAME, columns)
    _plot(out_dir, results, stems, projectile_density)
    return results


def _plot(out_dir, results, stems, projectile_density):
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    for shield, curves in results:
        figure, axis = plt.subplots(figsize=(8.0, 5.2))
        speeds = curves["speeds"]
        marked = dashed = False
        for j, angle in enumerate(curves["angles"]):
            diameter = curves["critical_diameter"][:, j]
            outside = curves["out_of_range"][:, j]
            label = f"{angle:g}°"
            if curves["evaluated_angles"][j] != angle:
                label += f" (at cap {curves['evaluated_angles'][j]:g}°)"
            inside = np.where(outside, np.nan, diameter)
            (line,) = axis.plot(speeds, inside, label=label)
            # dashed where outside the stated range, overlapping one point to join the line
            edge = outside | np.r_[outside[1:], False] | np.r_[False, outside[:-1]]
            if outside.any():
                axis.plot(speeds, np.where(edge, diameter, np.nan), linestyle="--",
                          color=line.get_color())
            for _, speed, d in curves["boundaries"][j]:
                axis.plot([speed], [d], marker="o", markerfacecolor="none",
                          color=line.get_color(), linestyle="none")
                marked = True
            dashed = dashed or bool(outside.any())
        if marked:
            axis.plot([], [], marker="o", markerfacecolor="none", color="0.3", linestyle="none",
                      label="regime boundary")
        if dashed:
            axis.plot([], [], linestyle="--", color="0.3", label="outside stated range")
        axis.set_yscale("log")
        axis.set(
            xlabel="impact speed [km s⁻¹]",
            ylabel="critical diameter d_c [cm]",
            xlim=(speeds[0], speeds[-1]),
            title=f"{shield.tag}: {shield.equation}, projectile {projectile_density:g} g cm⁻³",
        )
        axis.grid(True, which="both", alpha=0.3)
        axis.legend(title="impact angle", fontsize="small")
        note = "dashed: outside the equation's stated range (extrapolated)"
        if shield.angle_cap is not None:
            note += f"; angles above {shield.angle_cap:g}° evaluated at the cap"
        figure.text(0.01, 0.01, note + "; constants from memory, unverified",
                    fontsize="x-small", color="0.35")
        figure.tight_layout(rect=(0, 0.03, 1, 1))
        with atomic_path(out_dir / f"{stems[shield.tag]}.png") as temporary:
            figure.savefig(temporary, dpi=110, format="png")
        plt.close(figure)


def format_limits(results, projectile_density):
    """Plain-text tables: per shield, critical diameter [cm] at :data:`TABLE_SPEEDS` × angle."""
    lines = []
    for shield, curves in results:
        table = curves["table"]
        lines.append(
            f"Shield {shield.tag!r}: {shield.equation}, areal density "
            f"{shield.areal_density:.4g} kg m⁻², projectile {projectile_density:g} g cm⁻³"
        )
        lines.append(f"  validity: {shield.validity}")
        if shield.angle_cap is not None:
            lines.append(f"  angles above {shield.angle_cap:g}° are evaluated at the cap")
        lines.append("  critical diameter [cm]; * = outside the stated range")
        head = "".join(f"{angle:>11g}°" for angle in table["angles"])
        lines.append(f"  {'V [km/s]':>9}{head}")
        for i, speed in enumerate(table["speeds"]):
            cells = "".join(
                f"{d:>11.4g}{'*' if outside else ' '}"
                for d, outside in zip(
                    table["critical_diameter"][i], table["out_of_range"][i], strict=True
                )
            )
            lines.append(f"  {speed:>9g}{cells}")
        lines.append("")
    lines.append(
        "  Caution: ballistic-limit constants are from memory of the cited sources; verify "
        "them before relying on these numbers."
    )
    return "\n".join(lines)
