"""The files of a run directory: per-face table, VTK PolyData and the JSON summary."""

import json

import numpy as np

from pockmark.io.results import write_faces_vtp, write_json, write_table_csv

#: Per-face quantities written to both faces.csv and faces.vtp, besides the per-source ones.
FACE_QUANTITIES = ("expected_impacts", "expected_penetrations", "penetrations_per_m2", "shadowed_fraction")


def face_columns(assessment):
    """Per-face columns ``{name: (m,) array}`` in the order they are written."""
    vehicle, face = assessment.vehicle, assessment.face
    mesh = vehicle.mesh
    components = vehicle.components
    columns = {
        "face": np.arange(mesh.n_faces),
        "original_face_id": mesh.original_face_ids,
        "face_origin": mesh.face_origins,
        "side": mesh.face_sides,
        "shield_tag": np.asarray(mesh.tag_of_faces(), dtype=str),
        "component": np.asarray([c.name for c in components], dtype=str)[vehicle.face_components],
        "critical": np.asarray([c.role == "critical" for c in components], dtype=np.int64)[vehicle.face_components],
        "area_m2": mesh.face_areas,
    }
    for axis, name in enumerate("xyz"):
        columns[f"centroid_{name}_m"] = mesh.face_centroids[:, axis]
    for axis, name in enumerate("xyz"):
        columns[f"normal_{name}"] = mesh.face_normals[:, axis]
    columns.update({name: face[name] for name in FACE_QUANTITIES})
    for source in assessment.sources:
        for kind in ("impacts", "penetrations"):
            columns[f"{source}_{kind}"] = face[f"{source}_{kind}"]
    return columns


def write_run(assessment, summary, out_dir):
    """Write ``faces.csv``, ``faces.vtp`` and ``summary.json`` (last, so it marks completion)."""
    mesh = assessment.mesh
    columns = face_columns(assessment)
    write_table_csv(out_dir / "faces.csv", columns)
    skip = ("face",)
    cells = {
        name: values
        for name, values in columns.items()
        if name not in skip and not name.startswith(("centroid_", "normal_"))
    }
    cells["shield_tag_id"] = mesh.face_tags.astype(np.int32)
    cells["component_id"] = assessment.vehicle.face_components.astype(np.int32)
    headline = {key: summary[key] for key in ("title", "pnp", "expected_penetrations", "duration_years")}
    write_faces_vtp(
        out_dir / "faces.vtp",
        mesh.vertices,
        mesh.faces,
        cells,
        field_data={
            "pockmark_summary": json.dumps(headline),
            "shield_tags": list(mesh.tag_names),
            "components": [c.name for c in assessment.vehicle.components],
        },
    )
    for group in ("by_component", "by_tag", "by_source"):
        write_table_csv(out_dir / f"{group}.csv", _group_columns(summary[group]))
    write_json(out_dir / "summary.json", summary)


def _group_columns(entries):
    """Columns of one breakdown of the summary: a row per group, the scalar fields as columns."""
    names = list(entries)
    fields = [k for k, v in next(iter(entries.values()), {}).items() if isinstance(v, (int, float, str, bool))]
    columns = {"name": np.asarray(names, dtype=object)}
    for field in fields:
        columns[field] = np.asarray([entries[n].get(field) for n in names], dtype=object)
    return columns
