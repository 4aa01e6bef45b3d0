"""Comparison of two runs: the change in PNP, by component and tag, and face by face."""

import numpy as np

from pockmark.io.results import read_run, write_faces_vtp, write_json

_FACE_COLUMNS = ("face", "face_origin", "side", "original_face_id", "critical", "area_m2", "expected_penetrations")


def _matching_faces(summary_a, columns_a, summary_b, columns_b):
    """Index into run A's faces for each face of run B, or -1 where B has no counterpart.

    Faces of the vehicle mesh (origin 0) match when both runs read the same geometry: by side
    and original face id. Added panels and changed geometry have no counterpart.
    """
    hash_a = summary_a.get("inputs", {}).get("mesh", {}).get("geometry_sha256")
    hash_b = summary_b.get("inputs", {}).get("mesh", {}).get("geometry_sha256")
    match = np.full(len(columns_b["face"]), -1, dtype=np.int64)
    if hash_a is None or hash_a != hash_b:
        return match
    def keys(columns):
        # Vehicle-mesh faces keep their order in every run on the same geometry, and back
        # sides of thin sheets are appended in that order too: the rank within (side) and the
        # original face id identify a face.
        ranks = {0: 0, 1: 0}
        result = []
        for origin, side, original in zip(columns["face_origin"], columns["side"], columns["original_face_id"]):
            if origin != 0:
                result.append(None)
                continue
            side = int(side)
            result.append((side, ranks[side], int(original)))
            ranks[side] += 1
        return result

    index_a = {key: i for i, key in enumerate(keys(columns_a)) if key is not None}
    for i, key in enumerate(keys(columns_b)):
        if key is not None:
            match[i] = index_a.get(key, -1)
    return match


def _delta(entry_a, entry_b):
    a = entry_a or {"pnp": 1.0, "expected_penetrations": 0.0, "area_m2": 0.0}
    b = entry_b or {"pnp": 1.0, "expected_penetrations": 0.0, "area_m2": 0.0}
    return {
        "pnp_a": a["pnp"],
        "pnp_b": b["pnp"],
        "delta_pnp": b["pnp"] - a["pnp"],
        "expected_penetrations_a": a["expected_penetrations"],
        "expected_penetrations_b": b["expected_penetrations"],
        "delta_expected_penetrations": b["expected_penetrations"] - a["expected_penetrations"],
        "area_m2_a": a["area_m2"],
        "area_m2_b": b["area_m2"],
    }


def compare_runs(run_a, run_b, out_dir):
    """Write ``comparison.json`` and ``difference.vtp`` to ``out_dir``; return the comparison."""
    summary_a, columns_a = read_run(run_a, _FACE_COLUMNS)
    summary_b, columns_b = read_run(run_b, _FACE_COLUMNS)
    comparison = {
        "run_a": str(run_a),
        "run_b": str(run_b),
        "title_a": summary_a.get("title"),
        "title_b": summary_b.get("title"),
        "vehicle": _delta(summary_a, summary_b),
        "change_error": _change_uncertainty(summary_a, summary_b),
        "requirement_a": summary_a.get("requirement"),
        "requirement_b": summary_b.get("requirement"),
    }
    for group in ("by_component", "by_tag", "by_source"):
        names = list(dict.fromkeys([*summary_a.get(group, {}), *summary_b.get(group, {})]))
        comparison[group] = {
            name: _delta(summary_a.get(group, {}).get(name), summary_b.get(group, {}).get(name)) for name in names
        }
    areal = {
        run: sum(e["area_m2"] * e.get("areal_density_kg_m2", 0.0) for e in summary["by_tag"].values())
        for run, summary in (("a", summary_a), ("b", summary_b))
    }
    comparison["shield_mass_kg"] = {"a": areal["a"], "b": areal["b"], "delta": areal["b"] - areal["a"]}

    match = _matching_faces(summary_a, columns_a, summary_b, columns_b)
    per_m2_a = columns_a["expected_penetrations"] / np.where(columns_a["area_m2"] > 0, columns_a["area_m2"], np.inf)
    per_m2_b = columns_b["expected_penetrations"] / np.where(columns_b["area_m2"] > 0, columns_b["area_m2"], np.inf)
    matched = match >= 0
    before = np.where(matched, per_m2_a[np.maximum(match, 0)], np.nan)
    comparison["faces"] = {
        "matched": int(matched.sum()),
        "unmatched_in_b": int((~matched).sum()),
        "note": "faces match when both runs read the same vehicle geometry; added panels have no counterpart",
    }
    import pyvista

    mesh_b = pyvista.read(str(run_b / "faces.vtp"))
    write_faces_vtp(
        out_dir / "difference.vtp",
        np.asarray(mesh_b.points),
        np.asarray(mesh_b.regular_faces),
        {
            "penetrations_per_m2_a": before,
            "penetrations_per_m2_b": per_m2_b,
            "delta_penetrations_per_m2": per_m2_b - before,
            "matched": matched.astype(np.int32),
            "shield_tag": np.asarray(mesh_b.cell_data["shield_tag"]),
        },
        field_data={"run_a": str(run_a), "run_b": str(run_b)},
    )
    with np.errstate(invalid="ignore", divide="ignore"):
        relative = np.where(before > 0, per_m2_b / before - 1.0, np.where(per_m2_b > 0, np.inf, 0.0))
    comparison["pictures"] = _difference_pictures(out_dir, mesh_b, relative)
    write_json(out_dir / "comparison.json", comparison)
    return comparison


def _change_uncertainty(summary_a, summary_b):
    """Error scale of the change in expected penetrations from both runs' discretisation estimates.

    The two runs' errors are treated as independent and added in quadrature; the environment
    factors are left out because both runs share the same environment model, so its error
    largely cancels in the difference.
    """
    errors = [s.get("discretisation", {}).get("estimated_error") for s in (summary_a, summary_b)]
    if any(e is None for e in errors):
        return None
    return float(np.hypot(*errors))


def _difference_pictures(out_dir, mesh, relative):
    """PNGs of the relative change in penetrations per m² (blue: less risk in B, red: more), or [].

    A relative scale shows a halved risk on a wall as clearly as on a radiator whose absolute
    risk is a hundred times larger; increases are capped at +100 % in the colours.
    """
    from pockmark.report.pictures import VIEWS, rendering_available

    available, _ = rendering_available()
    if not available:
        return []
    import os

    import pyvista

    if not os.environ.get("DISPLAY"):
        os.environ.setdefault("VTK_DEFAULT_OPENGL_WINDOW", "vtkEGLRenderWindow")
    shown = mesh.copy()
    shown.cell_data["change"] = 100.0 * np.clip(np.nan_to_num(relative, nan=0.0, posinf=1.0), -1.0, 1.0)
    limit = 100.0
    written = []
    for suffix, label, direction, up in VIEWS:
        plotter = pyvista.Plotter(off_screen=True, window_size=(900, 700))
        plotter.set_background("#f7f7f4")
        plotter.add_mesh(
            shown, scalars="change", cmap="RdBu_r", clim=[-limit, limit], nan_color="#b0b0b0",
            scalar_bar_args={"title": "change in penetrations per m², B against A [%]", "position_x": 0.2, "position_y": 0.04, "width": 0.6},
        )
        plotter.add_text(f"{label} (body axes); blue: B is safer", font_size=11, color="#222222")
        plotter.view_vector(direction, viewup=up)
        path = out_dir / f"difference_{suffix}.png"
        plotter.screenshot(str(path))
        plotter.close()
        written.append(path.name)
    return written


def format_comparison(comparison):
    """Plain-text table of a comparison."""
    lines = [f"A: {comparison['run_a']}  ({comparison['title_a']})", f"B: {comparison['run_b']}  ({comparison['title_b']})", ""]
    vehicle = comparison["vehicle"]
    lines.append(
        f"  PNP  A {vehicle['pnp_a']:.5f}  ->  B {vehicle['pnp_b']:.5f}   change {vehicle['delta_pnp']:+.5f}"
        f"   (N {vehicle['expected_penetrations_a']:.4g} -> {vehicle['expected_penetrations_b']:.4g})"
    )
    error = comparison.get("change_error")
    if error is None:
        lines.append("  uncertainty of the change: unknown (a run without its resolution check)")
    else:
        change = vehicle["delta_expected_penetrations"]
        verdict = "larger" if abs(change) > 2 * error else "NOT larger"
        lines.append(
            f"  change in N {change:+.4g} ± {error:.2g} (discretisation, both runs): {verdict} than twice its error"
        )
    for key, label in (("requirement_a", "A"), ("requirement_b", "B")):
        requirement = comparison[key]
        if requirement:
            lines.append(
                f"  requirement PNP ≥ {requirement['pnp']:.5f} in {label}: {'met' if requirement['met'] else 'NOT MET'}"
                f" (margin {requirement['margin']:+.5f})"
            )
    mass = comparison["shield_mass_kg"]
    lines.append(f"  shield mass (areal density × area)  A {mass['a']:.1f} kg  ->  B {mass['b']:.1f} kg  ({mass['delta']:+.1f} kg)")
    for group, label in (("by_component", "component"), ("by_tag", "shield tag"), ("by_source", "source")):
        lines.append("")
        lines.append(f"  {label:<20}{'N in A':>12}{'N in B':>12}{'change':>12}{'PNP A':>10}{'PNP B':>10}")
        for name, d in sorted(comparison[group].items(), key=lambda item: item[1]["delta_expected_penetrations"]):
            lines.append(
                f"  {name:<20}{d['expected_penetrations_a']:>12.4g}{d['expected_penetrations_b']:>12.4g}"
                f"{d['delta_expected_penetrations']:>+12.4g}{d['pnp_a']:>10.5f}{d['pnp_b']:>10.5f}"
            )
    faces = comparison["faces"]
    lines.append("")
    lines.append(f"  faces compared one to one: {faces['matched']}; faces of B with no counterpart in A: {faces['unmatched_in_b']}")
    if comparison.get("pictures"):
        lines.append(f"  pictures of the change: {', '.join(comparison['pictures'])}")
    lines.append("  Caution: model estimates; both runs inherit the environment and ballistic-limit assumptions.")
    return "\n".join(lines)
