"""Machine-readable summary and terminal table of an :class:`~pockmark.risk.assess.Assessment`."""

import hashlib
import platform
from importlib import metadata

import numpy as np

from pockmark import __version__
from pockmark.risk.probability import probability_of_no_penetration, sum_by_group

#: Shown in every report: what the numbers rest on and what they are not.
CAUTIONS = (
    "These are model estimates. They depend on the environment models (the 1991 orbital-debris "
    "engineering model and the Grün 1985 meteoroid flux as implemented here), on the ballistic "
    "limit equations and their validity ranges, and on the mesh and its shield tags.",
    "Several model constants in this version were implemented from memory of the published "
    "sources, and those of the multi-layer shield equations were read in a second-hand "
    "transcription; the code marks which. Verify them against the sources before relying on results.",
    "The analytic environment models are dated; for design and certification use the environment "
    "models and standards that your agency or customer prescribes.",
    "Results are not a certification. Protection requirements are verified under the applicable "
    "agency standards with review by licensed or otherwise qualified engineers.",
)


def _totals(area, impacts, penetrations):
    return {
        "area_m2": float(area),
        "expected_impacts": float(impacts),
        "expected_penetrations": float(penetrations),
        "pnp": float(probability_of_no_penetration(penetrations)),
    }


def _file_sha256(path):
    return hashlib.sha256(path.read_bytes()).hexdigest()


def _versions():
    names = ("numpy", "numba", "scipy", "trimesh", "pyvista", "vtk")
    found = {"pockmark": __version__, "python": platform.python_version()}
    for name in names:
        try:
            found[name] = metadata.version(name)
        except metadata.PackageNotFoundError:
            found[name] = None
    return found


def build_summary(assessment):
    """The contents of ``summary.json`` as a plain dict.

    ``pnp`` and ``expected_penetrations`` count the faces of critical components only;
    penetrations of shadow-only components are reported under ``shadow_only``. Impacts count
    every face. ``by_tag`` and ``by_component`` give each group's own numbers and its role.
    """
    case, vehicle, face = assessment.case, assessment.vehicle, assessment.face
    mesh = vehicle.mesh
    areas = mesh.face_areas
    critical_components = np.array([c.role == "critical" for c in vehicle.components])
    critical = critical_components[vehicle.face_components]
    tag_role = [vehicle.components[c].role for c in vehicle.component_of_tag()]

    def group_totals(groups, n_groups):
        return (
            sum_by_group(areas, groups, n_groups),
            sum_by_group(face["expected_impacts"], groups, n_groups),
            sum_by_group(face["expected_penetrations"], groups, n_groups),
        )

    by_tag = {}
    for index, (name, values) in enumerate(zip(mesh.tag_names, zip(*group_totals(mesh.face_tags, len(mesh.tag_names))))):
        entry = _totals(*values)
        shield = assessment.shields[name]
        outside = float(assessment.outside_validity[index])
        entry.update(
            role=tag_role[index],
            faces=int(np.count_nonzero(mesh.face_tags == index)),
            equation=shield.equation,
            areal_density_kg_m2=float(shield.areal_density),
            penetrations_outside_validity=outside,
            share_outside_validity=outside / entry["expected_penetrations"] if entry["expected_penetrations"] > 0 else 0.0,
            validity=shield.validity,
        )
        by_tag[name] = entry
    by_component = {}
    n_components = len(vehicle.components)
    tag_component = vehicle.component_of_tag()
    for number, (component, values) in enumerate(
        zip(vehicle.components, zip(*group_totals(vehicle.face_components, n_components)))
    ):
        entry = _totals(*values)
        present = [t for t, c in zip(mesh.tag_names, tag_component) if c == number]
        entry.update(role=component.role, tags=present)
        if component.pnp_requirement is not None:
            entry["requirement"] = _verdict(entry["pnp"], component.pnp_requirement)
        by_component[component.name] = entry
    by_component = {k: v for k, v in by_component.items() if v["tags"]}

    sources = assessment.sources
    by_source = {
        s: _totals(
            areas[critical].sum(), face[f"{s}_impacts"].sum(), face[f"{s}_penetrations"][critical].sum()
        )
        for s in sources
    }
    by_phase = []
    for phase in assessment.by_phase:
        impacts = sum(v["expected_impacts"] for v in phase["by_source"].values())
        penetrations = sum(v["expected_critical_penetrations"] for v in phase["by_source"].values())
        entry = {"name": phase["name"], "duration_years": phase["duration_years"]}
        entry.update(_totals(areas[critical].sum(), impacts, penetrations))
        entry["by_source"] = {
            s: _totals(areas[critical].sum(), v["expected_impacts"], v["expected_critical_penetrations"])
            for s, v in phase["by_source"].items()
        }
        by_phase.append(entry)

    by_size = {
        # The last bin is open-ended; JSON has no infinity, so its upper edge is null.
        source: {
            "edges_cm": [e if np.isfinite(e) else None for e in b["size_edges_cm"]],
            "expected_penetrations": b["size_penetrations"].tolist(),
        }
        for source, b in assessment.breakdowns.items()
    }
    by_direction = {
        source: {"directions": b["directions"].tolist(), "expected_penetrations": b["direction_penetrations"].tolist()}
        for source, b in assessment.breakdowns.items()
    }
    sectors = {name: 0.0 for name in ("+x", "-x", "+y", "-y", "+z", "-z")}
    for b in assessment.breakdowns.values():
        directions = b["directions"]
        axis = np.argmax(np.abs(directions), axis=1)
        sign = np.sign(directions[np.arange(len(directions)), axis])
        for d_axis, d_sign, value in zip(axis, sign, b["direction_penetrations"]):
            sectors[f"{'+' if d_sign >= 0 else '-'}{'xyz'[d_axis]}"] += float(value)
    critical_penetrations = face["expected_penetrations"] * critical
    total_penetrations = float(critical_penetrations.sum())
    order = np.argsort(-critical_penetrations, kind="stable")[:10]
    hotspots = [
        {
            "face": int(i),
            "original_face_id": int(mesh.original_face_ids[i]),
            "tag": mesh.tag_names[mesh.face_tags[i]],
            "component": vehicle.components[vehicle.face_components[i]].name,
            "centroid_m": [float(x) for x in mesh.face_centroids[i]],
            "area_m2": float(areas[i]),
            "expected_penetrations": float(critical_penetrations[i]),
            "share": float(critical_penetrations[i] / total_penetrations) if total_penetrations > 0 else 0.0,
        }
        for i in order
    ]
    settings = case.analysis
    summary = {
        "title": case.title,
        "requirement": None if case.pnp_requirement is None else _verdict(
            float(probability_of_no_penetration(total_penetrations)), case.pnp_requirement
        ),
        **_totals(areas[critical].sum(), face["expected_impacts"].sum(), total_penetrations),
        "duration_years": float(assessment.duration),
        "impact_diameter_cm": settings.impact_diameter,
        "faces": int(mesh.n_faces),
        "total_area_m2": float(mesh.area),
        "bounds_m": mesh.bounds.tolist(),
        "shadow_only": _totals(
            areas[~critical].sum(),
            face["expected_impacts"][~critical].sum(),
            face["expected_penetrations"][~critical].sum(),
        ),
        "by_component": by_component,
        "by_tag": by_tag,
        "by_source": by_source,
        "by_phase": by_phase,
        "hotspots": hotspots,
        "by_size": by_size,
        # Share of the critical penetrations by the body axis nearest to the arrival direction.
        "by_direction_sector": {
            name: (value / total_penetrations if total_penetrations > 0 else 0.0) for name, value in sectors.items()
        },
        "by_direction": by_direction,
        "checks": _conservation_checks(by_tag, by_component, by_source, by_size, by_direction, total_penetrations),
        "environment": assessment.environment,
        "settings": {
            "directions": settings.directions,
            "debris_azimuth_bins": settings.debris_azimuth_bins,
            "samples_per_face": settings.samples_per_face,
            "seed": settings.seed,
            "threads": settings.threads,
            "impact_diameter_cm": settings.impact_diameter,
            "length_unit": case.length_unit,
            "tags_from": case.tags_from,
        },
        "shields": {tag: dict(shield.parameters, equation=shield.equation) for tag, shield in assessment.shields.items()},
        "inputs": {
            "case": {"path": str(case.path), "sha256": case.sha256},
            "files": [{"path": str(p), "sha256": _file_sha256(p)} for p in case.input_files],
            "mesh": {
                "geometry_sha256": vehicle.base_geometry_hash,
                "assembled_geometry_sha256": vehicle.assembled_geometry_hash,
            },
        },
        "versions": _versions(),
        "timings": {k: round(v, 3) for k, v in assessment.timings.items()},
        "cautions": list(CAUTIONS),
    }
    return summary


def _verdict(pnp, required):
    """Met or not, with the margin in PNP and in allowed expected penetrations."""
    return {
        "pnp": required,
        "met": bool(pnp >= required),
        "margin": float(pnp - required),
        "allowed_expected_penetrations": float(-np.log(required)),
    }


def _conservation_checks(by_tag, by_component, by_source, by_size, by_direction, total):
    """Sums of the breakdowns against the total of critical penetrations (relative differences)."""

    def relative(value):
        return abs(value - total) / total if total > 0 else abs(value)

    critical_sum = [e["expected_penetrations"] for e in by_tag.values() if e["role"] == "critical"]
    checks = {
        "by_tag": relative(sum(critical_sum)),
        "by_component": relative(sum(e["expected_penetrations"] for e in by_component.values() if e["role"] == "critical")),
        "by_source": relative(sum(e["expected_penetrations"] for e in by_source.values())),
        "by_size": relative(sum(sum(b["expected_penetrations"]) for b in by_size.values())),
        "by_direction": relative(sum(sum(b["expected_penetrations"]) for b in by_direction.values())),
    }
    tolerance = 1e-9
    failed = [name for name, value in checks.items() if value > tolerance]
    return {"relative_difference": checks, "tolerance": tolerance, "passed": not failed, "failed": failed}


def format_summary(summary, out_dir=None):
    """A plain-text table of the summary for the terminal."""
    lines = []
    add = lines.append
    add(f"pockmark {summary['versions']['pockmark']}: {summary['title']}")
    low, high = summary["bounds_m"]
    extent = " × ".join(f"{b - a:.3g}" for a, b in zip(low, high))
    add(
        f"  {summary['faces']} faces, {summary['total_area_m2']:.3g} m², bounding box {extent} m; "
        f"{summary['duration_years']:.2f} years in {len(summary['by_phase'])} phase(s)"
    )
    add("")
    requirement = summary.get("requirement")
    if requirement is not None:
        verdict = "MET" if requirement["met"] else "NOT MET"
        add(
            f"  Requirement PNP ≥ {requirement['pnp']:.5f}: {verdict} "
            f"(margin {requirement['margin']:+.5f}; allowed N ≤ {requirement['allowed_expected_penetrations']:.4g})"
        )
        if not requirement["met"]:
            add("  (`pockmark trade CASE --out DIR` ranks shield upgrades by risk removed per added kg)")
    for name, entry in summary["by_component"].items():
        if "requirement" in entry:
            verdict = "met" if entry["requirement"]["met"] else "NOT MET"
            add(f"  Component {name}: PNP {entry['pnp']:.5f} against ≥ {entry['requirement']['pnp']:.5f}: {verdict}")
    if not summary["checks"]["passed"]:
        add(f"  WARNING: breakdowns do not add up to the total ({', '.join(summary['checks']['failed'])}); please report this")
    add(f"  Probability of no penetration  PNP = {summary['pnp']:.5f}   (critical components)")
    add(f"  Expected penetrations          N   = {summary['expected_penetrations']:.4g}")
    for key, label in (("discretisation", "resolution"), ("convergence", "convergence")):
        if key in summary:
            entry = summary[key]
            low, high = entry["pnp_range"]
            add(f"    {label} error ≈ {entry['relative_error']:.1%} of N ({entry['method']}): PNP {low:.5f}–{high:.5f}")
    band = summary.get("environment_band")
    if band and any(f != 1.0 for f in band["factors"].values()):
        low, high = band["pnp_range"]
        factors = ", ".join(f"{s} ×/÷{f:g}" for s, f in band["factors"].items())
        add(f"    environment band ({factors}): PNP {low:.5f}–{high:.5f}")
    band = summary.get("ballistic_limit_band")
    if band:
        low, high = band["pnp_range"]
        add(f"    ballistic-limit band (critical diameters ×/÷{band['factor']:g}): PNP {low:.5f}–{high:.5f}")
    add(f"  Expected impacts ≥ {summary['impact_diameter_cm'] * 10:g} mm         = {summary['expected_impacts']:.4g}")
    add("")
    header = f"  {'source':<12}{'impacts':>12}{'penetrations':>15}{'PNP':>10}"
    add(header)
    for name, entry in summary["by_source"].items():
        add(f"  {name:<12}{entry['expected_impacts']:>12.4g}{entry['expected_penetrations']:>15.4g}{entry['pnp']:>10.5f}")
    add("")
    total = summary["expected_penetrations"]
    for group, label in (("by_component", "component"), ("by_tag", "shield tag")):
        add(f"  {label:<18}{'area m²':>9}{'impacts':>11}{'penetrations':>14}{'share':>8}{'PNP':>10}")
        ranked = sorted(summary[group].items(), key=lambda item: -item[1]["expected_penetrations"])
        for name, entry in ranked:
            critical = entry["role"] == "critical"
            share = f"{entry['expected_penetrations'] / total:8.1%}" if critical and total > 0 else "  shadow"
            add(
                f"  {name:<18}{entry['area_m2']:>9.2f}{entry['expected_impacts']:>11.4g}"
                f"{entry['expected_penetrations']:>14.4g}{share}{entry['pnp']:>10.5f}"
            )
        add("")
    shares = ", ".join(f"{k} {v:.0%}" for k, v in summary["by_direction_sector"].items() if v >= 0.005)
    add(f"  Arriving from (nearest body axis): {shares}")
    add("")
    add("  Highest-risk faces:")
    for spot in summary["hotspots"][:5]:
        x, y, z = spot["centroid_m"]
        add(
            f"    face {spot['face']:>7}  {spot['component']:<14} {spot['tag']:<16} at ({x:6.2f}, {y:6.2f}, {z:6.2f}) m  "
            f"N = {spot['expected_penetrations']:.3g}  ({spot['share']:.1%})"
        )
    if out_dir is not None:
        add("")
        add(f"  Results in {out_dir}: summary.json, faces.csv, faces.vtp, report.html")
    add("")
    add("  Caution: model estimates, not a certification; see the cautions in summary.json.")
    return "\n".join(lines)
