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
    "sources and are marked so in the code; verify them against the sources before relying on results.",
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
    """The contents of ``summary.json`` as a plain dict."""
    case, mesh, face = assessment.case, assessment.mesh, assessment.face
    areas = mesh.face_areas
    n_tags = len(mesh.tag_names)
    tag_area = sum_by_group(areas, mesh.face_tags, n_tags)
    tag_impacts = sum_by_group(face["expected_impacts"], mesh.face_tags, n_tags)
    tag_penetrations = sum_by_group(face["expected_penetrations"], mesh.face_tags, n_tags)
    by_tag = {}
    for index, name in enumerate(mesh.tag_names):
        entry = _totals(tag_area[index], tag_impacts[index], tag_penetrations[index])
        shield = assessment.shields[name]
        entry.update(
            faces=int(np.count_nonzero(mesh.face_tags == index)),
            equation=shield.equation,
            areal_density_kg_m2=float(shield.areal_density),
        )
        by_tag[name] = entry
    sources = [s for s in ("debris", "meteoroid") if f"{s}_impacts" in face]
    by_source = {
        s: _totals(mesh.area, face[f"{s}_impacts"].sum(), face[f"{s}_penetrations"].sum()) for s in sources
    }
    by_phase = []
    for phase in assessment.by_phase:
        impacts = sum(v["expected_impacts"] for v in phase["by_source"].values())
        penetrations = sum(v["expected_penetrations"] for v in phase["by_source"].values())
        entry = {"name": phase["name"], "duration_years": phase["duration_years"]}
        entry.update(_totals(mesh.area, impacts, penetrations))
        entry["by_source"] = {
            s: _totals(mesh.area, v["expected_impacts"], v["expected_penetrations"])
            for s, v in phase["by_source"].items()
        }
        by_phase.append(entry)
    order = np.argsort(face["expected_penetrations"])[::-1][:10]
    total_penetrations = float(face["expected_penetrations"].sum())
    hotspots = [
        {
            "face": int(i),
            "original_face_id": int(mesh.original_face_ids[i]),
            "tag": mesh.tag_names[mesh.face_tags[i]],
            "centroid_m": [float(x) for x in mesh.face_centroids[i]],
            "area_m2": float(areas[i]),
            "expected_penetrations": float(face["expected_penetrations"][i]),
            "share": float(face["expected_penetrations"][i] / total_penetrations) if total_penetrations > 0 else 0.0,
        }
        for i in order
    ]
    settings = case.analysis
    summary = {
        "title": case.title,
        **_totals(mesh.area, face["expected_impacts"].sum(), total_penetrations),
        "duration_years": float(assessment.duration),
        "impact_diameter_cm": settings.impact_diameter,
        "faces": int(mesh.n_faces),
        "by_tag": by_tag,
        "by_source": by_source,
        "by_phase": by_phase,
        "hotspots": hotspots,
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
            "mesh": {
                "path": str(case.mesh_path),
                "sha256": _file_sha256(case.mesh_path),
                "geometry_sha256": mesh.geometry_hash(),
            },
        },
        "versions": _versions(),
        "timings": {k: round(v, 3) for k, v in assessment.timings.items()},
        "cautions": list(CAUTIONS),
    }
    return summary


def format_summary(summary, out_dir=None):
    """A plain-text table of the summary for the terminal."""
    lines = []
    add = lines.append
    add(f"pockmark {summary['versions']['pockmark']}: {summary['title']}")
    add(
        f"  {summary['faces']} faces, {summary['area_m2']:.2f} m², "
        f"{summary['duration_years']:.2f} years in {len(summary['by_phase'])} phase(s)"
    )
    add("")
    add(f"  Probability of no penetration  PNP = {summary['pnp']:.5f}")
    add(f"  Expected penetrations          N   = {summary['expected_penetrations']:.4g}")
    add(f"  Expected impacts ≥ {summary['impact_diameter_cm'] * 10:g} mm         = {summary['expected_impacts']:.4g}")
    add("")
    header = f"  {'source':<12}{'impacts':>12}{'penetrations':>15}{'PNP':>10}"
    add(header)
    for name, entry in summary["by_source"].items():
        add(f"  {name:<12}{entry['expected_impacts']:>12.4g}{entry['expected_penetrations']:>15.4g}{entry['pnp']:>10.5f}")
    add("")
    total = summary["expected_penetrations"]
    add(f"  {'shield tag':<18}{'area m²':>9}{'impacts':>11}{'penetrations':>14}{'share':>8}{'PNP':>10}")
    ranked = sorted(summary["by_tag"].items(), key=lambda item: -item[1]["expected_penetrations"])
    for name, entry in ranked:
        share = entry["expected_penetrations"] / total if total > 0 else 0.0
        add(
            f"  {name:<18}{entry['area_m2']:>9.2f}{entry['expected_impacts']:>11.4g}"
            f"{entry['expected_penetrations']:>14.4g}{share:>8.1%}{entry['pnp']:>10.5f}"
        )
    add("")
    add("  Highest-risk faces:")
    for spot in summary["hotspots"][:5]:
        x, y, z = spot["centroid_m"]
        add(
            f"    face {spot['face']:>7}  {spot['tag']:<16} at ({x:6.2f}, {y:6.2f}, {z:6.2f}) m  "
            f"N = {spot['expected_penetrations']:.3g}  ({spot['share']:.1%})"
        )
    if out_dir is not None:
        add("")
        add(f"  Results in {out_dir}: summary.json, faces.csv, faces.vtp")
    add("")
    add("  Caution: model estimates, not a certification; see the cautions in summary.json.")
    return "\n".join(lines)
