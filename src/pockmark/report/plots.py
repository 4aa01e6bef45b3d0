"""Plots of a run for the report (matplotlib, Agg backend, PNG).

- :func:`plot_risk_by_group`: expected penetrations by component or shield tag, critical
  and shadow-only parts on separate axes (their numbers differ by orders of magnitude, and
  only the first count towards the probability of no penetration);
- :func:`plot_pareto`: cumulative share of critical risk against cumulative share of area;
- :func:`plot_size_breakdown`: which particle sizes cause the penetrations (``by_size``);
- :func:`plot_sky_map`: where the penetrating particles come from in the body frame
  (``by_direction``).

:func:`make_plots` draws every plot whose data the summary holds and skips the rest.
"""

import logging
from pathlib import Path

import numpy as np

from pockmark.io.results import atomic_path
from pockmark.report.pictures import SHADOW_ONLY_COLOR, Picture, risk_colormap

log = logging.getLogger(__name__)

#: Bar colour of critical parts.
CRITICAL_COLOR = "#a3306a"

#: Line colours of the sources, in the order they appear.
SOURCE_COLORS = ("#d55e00", "#0072b2", "#009e73", "#cc79a7", "#e69f00", "#56b4e9")

#: Ink for text, axes and reference lines.
INK = "#1f2933"


def _pyplot():
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    return plt


def _save(figure, path):
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    with atomic_path(path) as temporary:
        figure.savefig(temporary, dpi=110, format="png")
    _pyplot().close(figure)
    return path


def _style(axis):
    axis.spines[["top", "right"]].set_visible(False)
    axis.tick_params(colors=INK)
    axis.grid(True, axis="x", alpha=0.3)


def plot_risk_by_group(summary, path, group="by_component"):
    """Horizontal bars of expected penetrations by component or by shield tag.

    Parameters
    ----------
    summary : dict
        A run's ``summary.json``; uses ``summary[group]`` entries with ``expected_penetrations``
        and ``role`` (``"critical"`` or ``"shadow_only"``).
    path : path-like
        PNG file to write.
    group : {"by_component", "by_tag"}
        Which breakdown to draw.

    Returns
    -------
    Picture or None
        None when the summary has no such breakdown.
    """
    entries = summary.get(group) or {}
    if not entries:
        return None
    plt = _pyplot()
    word = "component" if group == "by_component" else "shield tag"
    total = float(summary.get("expected_penetrations", 0.0))
    critical = sorted(
        ((n, e) for n, e in entries.items() if e.get("role", "critical") == "critical"),
        key=lambda item: item[1]["expected_penetrations"],
    )
    shadow = sorted(
        ((n, e) for n, e in entries.items() if e.get("role", "critical") != "critical"),
        key=lambda item: item[1]["expected_penetrations"],
    )
    panels = [p for p in (("critical", critical), ("shadow", shadow)) if p[1]]
    rows = max(len(critical), len(shadow))
    figure, axes = plt.subplots(
        1,
        len(panels),
        figsize=(5.2 * len(panels) + 1.0, max(2.6, 1.3 + 0.42 * rows)),
        squeeze=False,
    )
    for axis, (kind, items) in zip(axes[0], panels, strict=True):
        names = [n for n, _ in items]
        values = np.array([e["expected_penetrations"] for _, e in items], dtype=float)
        if kind == "critical":
            axis.barh(names, values, color=CRITICAL_COLOR)
            for y, value in enumerate(values):
                share = f"  {value:.3g}" + (f"  ({value / total:.1%})" if total > 0 else "")
                axis.text(value, y, share, va="center", fontsize=8.5, color=INK)
            axis.set_title(f"critical {word}s: count towards the PNP", fontsize=10, color=INK)
        else:
            axis.barh(names, values, color=SHADOW_ONLY_COLOR, hatch="///", edgecolor="#6b7f95")
            for y, value in enumerate(values):
                axis.text(value, y, f"  {value:.3g}", va="center", fontsize=8.5, color=INK)
            axis.set_title(f"shadow-only {word}s: not counted in the PNP", fontsize=10, color=INK)
        axis.set_xlim(0, max(values.max(), 1e-300) * 1.45)
        axis.set_xlabel("expected penetrations over the mission", color=INK)
        _style(axis)
    figure.suptitle(f"Expected penetrations by {word}", color=INK)
    figure.tight_layout()
    return Picture(
        _save(figure, path),
        f"Risk by {word}",
        f"Expected penetrations over the mission by {word}. Only critical {word}s count towards "
        "the probability of no penetration; shadow-only parts are drawn apart, on their own scale, "
        "because they block particles but their own penetration is not a failure.",
    )


def plot_pareto(pareto, path):
    """The Pareto curve of critical risk against area, with the 50 % and 90 % marks.

    Parameters
    ----------
    pareto : Pareto
        From :func:`pockmark.report.hotspots.pareto_curve`.
    path : path-like
        PNG file to write.

    Returns
    -------
    Picture or None
        None when there is no critical risk to draw.
    """
    if pareto.total_risk <= 0:
        return None
    plt = _pyplot()
    figure, axis = plt.subplots(figsize=(6.4, 5.0))
    axis.plot(
        [0, 100], [0, 100], color="#9aa5b1", lw=1, ls="--", label="risk spread evenly over the area"
    )
    axis.plot(
        100 * pareto.area_share,
        100 * pareto.risk_share,
        color=CRITICAL_COLOR,
        lw=2,
        label="faces, densest risk first",
    )
    notes = []
    for level, marker in ((0.5, "o"), (0.9, "s")):
        area = pareto.area_for(level)
        axis.plot([100 * area], [100 * level], marker=marker, color=INK, ms=7, ls="none")
        axis.plot([100 * area, 100 * area], [0, 100 * level], color=INK, lw=0.8, ls=":")
        axis.plot([0, 100 * area], [100 * level, 100 * level], color=INK, lw=0.8, ls=":")
        axis.annotate(
            f"{level:.0%} of the risk on {area:.1%} of the area",
            (100 * area, 100 * level),
            xytext=(10, -14 if level > 0.6 else -16),
            textcoords="offset points",
            fontsize=9,
            color=INK,
        )
        notes.append(f"{level:.0%} of the critical risk lies on {area:.1%} of the critical area")
    axis.set(
        xlim=(0, 100),
        ylim=(0, 101),
        xlabel="cumulative share of the critical area [%]",
        ylabel="cumulative share of critical expected penetrations [%]",
    )
    axis.set_title("Where the risk is concentrated", color=INK)
    axis.legend(loc="lower right", frameon=False, fontsize=9)
    axis.grid(True, alpha=0.3)
    axis.spines[["top", "right"]].set_visible(False)
    figure.tight_layout()
    return Picture(
        _save(figure, path),
        "Pareto curve of risk against area",
        "Faces of critical components sorted by expected penetrations per m², densest first; "
        f"the curve shows what share of the risk the first share of the area carries. {'; '.join(notes)}.",
    )


def _size_edges(edges):
    """Bin edges closed for drawing on a log axis: an open-ended last bin (``None`` or
    infinity) ends one bin ratio above its lower edge, and a first bin starting at 0 (every
    size below the next edge) starts one bin ratio below its upper edge."""
    edges = [float("inf") if e is None else float(e) for e in edges]
    shown = np.array(edges, dtype=float)
    open_end = not np.isfinite(shown[-1])
    if open_end:
        shown[-1] = shown[-2] * (shown[-2] / shown[-3] if len(shown) > 2 and shown[-3] > 0 else 3.0)
    if len(shown) > 2 and shown[0] == 0.0 and 0.0 < shown[1] < shown[2]:
        shown[0] = shown[1] / (shown[2] / shown[1])
    return shown, open_end


def plot_size_breakdown(by_size, path):
    """Expected critical penetrations per particle-size bin, one line per source.

    Parameters
    ----------
    by_size : dict
        ``{source: {"edges_cm": [...], "expected_penetrations": [...]}}`` with one more edge
        than values [cm]; the last edge may be None (open-ended bin).
    path : path-like
        PNG file to write.

    Returns
    -------
    Picture or None
        None when no source has usable data.
    """
    plt = _pyplot()
    figure, axis = plt.subplots(figsize=(7.2, 4.4))
    drawn = 0
    total = sum(float(np.sum(v.get("expected_penetrations", []))) for v in (by_size or {}).values())
    open_edges = []
    for index, (source, entry) in enumerate((by_size or {}).items()):
        values = np.asarray(entry.get("expected_penetrations", []), dtype=float)
        edges = entry.get("edges_cm", [])
        if len(values) == 0 or len(edges) != len(values) + 1:
            log.warning(
                "size breakdown of %r has %d edges for %d bins; not drawn",
                source,
                len(edges),
                len(values),
            )
            continue
        shown, open_end = _size_edges(edges)
        if np.any(shown[:-1] <= 0) or np.any(np.diff(shown) <= 0):
            log.warning(
                "size breakdown of %r: edges must be positive and increasing; not drawn", source
            )
            continue
        if open_end:
            open_edges.append(shown[-2])
        share = values / total if total > 0 else values
        color = SOURCE_COLORS[index % len(SOURCE_COLORS)]
        axis.stairs(100 * share, shown, color=color, lw=1.8, label=source, fill=False)
        axis.stairs(100 * share, shown, color=color, alpha=0.15, fill=True)
        drawn += 1
    if not drawn:
        plt.close(figure)
        return None
    axis.set_xscale("log")
    axis.set(xlabel="particle diameter [cm]", ylabel="share of critical expected penetrations [%]")
    axis.set_title("Which particle sizes cause the penetrations", color=INK)
    for edge in sorted(set(open_edges)):
        axis.axvline(edge, color="#9aa5b1", lw=0.8, ls=":")
        axis.text(
            edge, axis.get_ylim()[1] * 0.96, f" ≥ {edge:g} cm", fontsize=8, color=INK, va="top"
        )
    axis.legend(frameon=False)
    axis.grid(True, which="both", alpha=0.25)
    axis.spines[["top", "right"]].set_visible(False)
    figure.tight_layout()
    return Picture(
        _save(figure, path),
        "Risk by particle size",
        "Share of the critical expected penetrations caused by particles in each diameter bin, per "
        "source (all shares together make 100 %)."
        + (" The last bin of a source is open-ended." if open_edges else ""),
    )


def plot_sky_map(by_direction, path):
    """Where the penetrating particles come from, per source, in body-frame azimuth and elevation.

    Parameters
    ----------
    by_direction : dict
        ``{source: {"directions": (k, 3) unit vectors toward where particles come from,
        "expected_penetrations": (k,)}}``.
    path : path-like
        PNG file to write.

    Returns
    -------
    Picture or None
        None when no source has usable data.
    """
    import matplotlib.colors

    # The same spreading of discrete directions into a per-steradian map as the environment
    # sky maps, so both read alike.
    from pockmark.report.environment import SKY_CELL, _sky_grid

    usable = {}
    for source, entry in (by_direction or {}).items():
        values = np.asarray(entry.get("expected_penetrations", []), dtype=float).reshape(-1)
        try:
            directions = np.asarray(entry.get("directions", []), dtype=float).reshape(-1, 3)
        except ValueError:
            directions = np.zeros((0, 3))
        if len(values) == 0 or len(directions) != len(values):
            log.warning(
                "direction breakdown of %r has %d directions for %d values; not drawn",
                source,
                len(directions),
                len(values),
            )
            continue
        norms = np.linalg.norm(directions, axis=1, keepdims=True)
        keep = norms[:, 0] > 0
        usable[source] = (directions[keep] / norms[keep], values[keep])
    if not usable:
        return None
    plt = _pyplot()
    total = sum(float(v.sum()) for _, v in usable.values())
    figure, axes = plt.subplots(
        len(usable), 1, figsize=(8.6, 3.5 * len(usable) + 0.4), squeeze=False
    )
    az_edges = np.arange(-180.0, 180.0 + SKY_CELL, SKY_CELL)
    el_edges = np.arange(-90.0, 90.0 + SKY_CELL, SKY_CELL)
    cmap = risk_colormap()
    for axis, (source, (directions, values)) in zip(axes[:, 0], usable.items(), strict=True):
        grid = _sky_grid(directions, values, az_edges, el_edges)
        positive = grid[grid > 0]
        shown = np.where(grid > 0, grid, np.nan)
        norm = (
            matplotlib.colors.LogNorm(vmin=positive.max() * 1e-4, vmax=positive.max())
            if positive.size
            else None
        )
        mesh = axis.pcolormesh(az_edges, el_edges, shown, cmap=cmap, norm=norm)
        axis.set_facecolor("#eef0f3")
        if positive.size:
            figure.colorbar(mesh, ax=axis, label="critical penetrations per sr")
        share = (
            f"{values.sum() / total:.1%} of the critical risk" if total > 0 else "no critical risk"
        )
        axis.set(
            xlabel="azimuth in the body x–y plane from +x toward +y [°]",
            ylabel="elevation toward +z [°]",
            xlim=(-180, 180),
            ylim=(-90, 90),
            xticks=np.arange(-180, 181, 45),
            yticks=np.arange(-90, 91, 30),
        )
        axis.set_title(f"{source}: {share}", fontsize=10, color=INK)
        for x, label in ((0, "+x"), (90, "+y"), (-90, "−y"), (180, "−x")):
            axis.text(x, 84, label, ha="center", va="top", fontsize=8, color=INK)
    figure.suptitle("Where the penetrating particles come from (body frame)", color=INK)
    figure.tight_layout()
    return Picture(
        _save(figure, path),
        "Risk by direction",
        "Critical expected penetrations per steradian by the direction the particles come from, in "
        "the vehicle's body axes (azimuth 0° = +x, 90° = +y; elevation 90° = +z); grey cells "
        "contribute nothing. Log colour scale over four decades.",
    )


def make_plots(summary, pareto, out_dir):
    """Draw every plot the run's data allow into ``out_dir``.

    Parameters
    ----------
    summary : dict
        The run's ``summary.json``.
    pareto : Pareto
        The run's Pareto curve.
    out_dir : path-like
        Folder for the PNG files.

    Returns
    -------
    list of Picture
        The plots drawn: ``risk_by_component.png``, ``risk_by_tag.png``, ``pareto.png`` and,
        when the summary has ``by_size`` / ``by_direction``, ``risk_by_size.png`` /
        ``risk_by_direction.png``.
    """
    out_dir = Path(out_dir)
    made = [
        plot_risk_by_group(summary, out_dir / "risk_by_component.png", "by_component"),
        plot_risk_by_group(summary, out_dir / "risk_by_tag.png", "by_tag"),
        plot_pareto(pareto, out_dir / "pareto.png"),
    ]
    if summary.get("by_size"):
        made.append(plot_size_breakdown(summary["by_size"], out_dir / "risk_by_size.png"))
    if summary.get("by_direction"):
        made.append(plot_sky_map(summary["by_direction"], out_dir / "risk_by_direction.png"))
    return [picture for picture in made if picture is not None]
