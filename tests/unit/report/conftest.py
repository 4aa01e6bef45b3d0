"""A small run directory made by hand, so the report tests need no risk computation."""

import json

import numpy as np
import pytest
import trimesh

from pockmark.io.results import write_faces_vtp


def _box(extents, centre):
    part = trimesh.creation.box(extents=extents)
    part.apply_translation(centre)
    return np.asarray(part.vertices), np.asarray(part.faces)


def make_run(run_dir, *, requirement=True, breakdowns=True):
    """Write summary.json and faces.vtp of a hull (critical) with a thin panel (shadow-only).

    The panel is a single sheet whose back side is a reversed copy (``side`` 1), as the
    assembly writes thin sheets. Risk falls off from the +x face of the hull; the −x face
    carries none, so the pictures have zeros to draw in grey.
    """
    run_dir.mkdir(parents=True, exist_ok=True)
    hull_v, hull_f = _box([1.0, 1.0, 1.0], [0.0, 0.0, 0.0])
    hull = trimesh.Trimesh(hull_v, hull_f, process=False).subdivide().subdivide()
    hull_v, hull_f = np.asarray(hull.vertices), np.asarray(hull.faces)
    panel_v = np.array([[0.9, -0.3, -0.3], [0.9, 0.3, -0.3], [0.9, 0.3, 0.3], [0.9, -0.3, 0.3]])
    panel_f = np.array([[0, 1, 2], [0, 2, 3]])
    vertices = np.vstack([hull_v, panel_v])
    panel_f = panel_f + len(hull_v)
    faces = np.vstack([hull_f, panel_f, panel_f[:, ::-1]])
    n_hull = len(hull_f)
    corners = vertices[faces]
    cross = np.cross(corners[:, 1] - corners[:, 0], corners[:, 2] - corners[:, 0])
    areas = 0.5 * np.linalg.norm(cross, axis=1)
    normals = cross / np.linalg.norm(cross, axis=1, keepdims=True)
    tags = np.array(["hull"] * n_hull + ["panel_front"] * 2 + ["panel_back"] * 2)
    critical = np.array([1] * n_hull + [0] * 4)
    components = np.where(critical == 1, "body", "panel")
    per_m2 = np.where(critical == 1, 1e-3 * np.exp(3.0 * normals[:, 0]), 5e-2)
    per_m2[(critical == 1) & (normals[:, 0] < -0.9)] = 0.0
    penetrations = per_m2 * areas
    debris = 0.8 * penetrations
    impacts = penetrations * 1e3
    cells = {
        "original_face_id": np.concatenate([np.arange(n_hull), [0, 1, 0, 1]]),
        "face_origin": np.array([0] * n_hull + [1] * 4),
        "side": np.array([0] * (n_hull + 2) + [1] * 2),
        "shield_tag": tags,
        "component": components,
        "critical": critical,
        "area_m2": areas,
        "expected_impacts": impacts,
        "expected_penetrations": penetrations,
        "penetrations_per_m2": per_m2,
        "shadowed_fraction": np.clip(0.5 - 0.5 * normals[:, 0], 0.0, 1.0),
        "debris_impacts": 0.6 * impacts,
        "debris_penetrations": debris,
        "meteoroid_impacts": 0.4 * impacts,
        "meteoroid_penetrations": penetrations - debris,
    }
    write_faces_vtp(run_dir / "faces.vtp", vertices, faces, cells)

    crit = critical == 1
    total = float(penetrations[crit].sum())

    def totals(selected, role="critical"):
        n_pen = float(penetrations[selected].sum())
        return {
            "area_m2": float(areas[selected].sum()),
            "expected_impacts": float(impacts[selected].sum()),
            "expected_penetrations": n_pen,
            "pnp": float(np.exp(-n_pen)),
            "role": role,
        }

    summary = {
        "title": "Test box with a panel",
        "requirement": {
            "pnp": 0.99,
            "met": bool(np.exp(-total) >= 0.99),
            "margin": float(np.exp(-total) - 0.99),
            "allowed_expected_penetrations": float(-np.log(0.99)),
        }
        if requirement
        else None,
        "area_m2": float(areas[crit].sum()),
        "expected_impacts": float(impacts.sum()),
        "expected_penetrations": total,
        "pnp": float(np.exp(-total)),
        "duration_years": 2.0,
        "impact_diameter_cm": 0.01,
        "faces": int(len(faces)),
        "total_area_m2": float(areas.sum()),
        "by_component": {
            "body": dict(totals(crit), tags=["hull"]),
            "panel": dict(totals(~crit, "shadow_only"), tags=["panel_front", "panel_back"]),
        },
        "by_tag": {
            name: dict(
                totals(tags == name, "critical" if name == "hull" else "shadow_only"),
                faces=int((tags == name).sum()),
                equation="christiansen_1993",
                areal_density_kg_m2=3.5,
            )
            for name in ("hull", "panel_front", "panel_back")
        },
        "by_source": {
            "debris": {
                "expected_impacts": float(0.6 * impacts.sum()),
                "expected_penetrations": 0.8 * total,
                "pnp": float(np.exp(-0.8 * total)),
            },
            "meteoroid": {
                "expected_impacts": float(0.4 * impacts.sum()),
                "expected_penetrations": 0.2 * total,
                "pnp": float(np.exp(-0.2 * total)),
            },
        },
        "by_phase": [
            {
                "name": "low orbit",
                "duration_years": 2.0,
                "expected_impacts": float(impacts.sum()),
                "expected_penetrations": total,
                "pnp": float(np.exp(-total)),
                "by_source": {
                    "debris": {"expected_penetrations": 0.8 * total},
                    "meteoroid": {"expected_penetrations": 0.2 * total},
                },
            }
        ],
        "environment": {
            "low orbit": {
                "debris": [
                    {
                        "model": "kessler_1991",
                        "parameters": {"altitude": 400.0},
                        "mean_speed_km_s": 9.1,
                        "impact_flux_per_m2_year": 12.0,
                        "directions": 36,
                    }
                ]
            }
        },
        "settings": {"directions": 200, "seed": 3, "samples_per_face": 1},
        "shields": {"hull": {"equation": "christiansen_1993", "standoff": 10.0}},
        "inputs": {
            "case": {"path": "case.toml", "sha256": "ab" * 32},
            "files": [{"path": "vehicle.obj", "sha256": "cd" * 32}],
        },
        "versions": {"pockmark": "0.1.0", "python": "3.11"},
        "timings": {"load_seconds": 0.01},
        "checks": {
            "relative_difference": {"by_tag": 0.0},
            "tolerance": 1e-9,
            "passed": True,
            "failed": [],
        },
        "cautions": ["A test caution."],
    }
    if breakdowns:
        azimuth = np.radians(np.arange(0.0, 360.0, 10.0))
        weights = np.exp(np.cos(azimuth) * 2.0)
        summary["by_size"] = {
            "debris": {
                "edges_cm": [0.001, 0.01, 0.1, 1.0, None],
                "expected_penetrations": list(0.8 * total * np.array([0.1, 0.5, 0.3, 0.1])),
            },
            "meteoroid": {
                "edges_cm": [0.001, 0.01, 0.1, 1.0, None],
                "expected_penetrations": list(0.2 * total * np.array([0.2, 0.6, 0.2, 0.0])),
            },
        }
        summary["by_direction"] = {
            "debris": {
                "directions": np.c_[np.cos(azimuth), np.sin(azimuth), 0 * azimuth].tolist(),
                "expected_penetrations": list(0.8 * total * weights / weights.sum()),
            },
        }
    (run_dir / "summary.json").write_text(json.dumps(summary), encoding="utf-8")
    return run_dir


@pytest.fixture
def run_dir(tmp_path):
    return make_run(tmp_path / "run")


@pytest.fixture(scope="session")
def make_run_dir():
    """``make_run`` itself, for tests that need other variants or a wider scope."""
    return make_run
