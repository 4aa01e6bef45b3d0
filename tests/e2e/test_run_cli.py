"""`pockmark run` end to end on a small mesh, and on the demo case (slow)."""

import csv
import json
import math
from pathlib import Path

import numpy as np
import pytest
import pyvista
from click.testing import CliRunner

from pockmark.cli.main import cli

pytestmark = pytest.mark.e2e

ROOT = Path(__file__).resolve().parents[2]


def run(*args):
    return CliRunner().invoke(cli, [str(a) for a in args], catch_exceptions=False)


def test_small_case_writes_consistent_outputs(shadowed_box_case, tmp_path):
    out = tmp_path / "run"
    result = run("run", shadowed_box_case, "--out", out, "--threads", 1)
    assert result.exit_code == 0, result.output
    assert "Probability of no penetration" in result.output

    summary = json.loads((out / "summary.json").read_text())
    for key in ("pnp", "expected_penetrations", "expected_impacts", "area_m2", "duration_years"):
        assert key in summary
    assert summary["pnp"] == pytest.approx(math.exp(-summary["expected_penetrations"]))
    assert 0 < summary["pnp"] < 1 and summary["duration_years"] == 2.0
    # Breakdowns add up to the totals.
    for group in ("by_tag", "by_source"):
        entries = summary[group].values()
        assert set(next(iter(entries))) >= {"area_m2", "expected_impacts", "expected_penetrations", "pnp"}
        for key in ("expected_impacts", "expected_penetrations"):
            assert sum(e[key] for e in entries) == pytest.approx(summary[key], rel=1e-12)
    assert set(summary["by_source"]) == {"debris", "meteoroid"}
    assert sum(e["area_m2"] for e in summary["by_tag"].values()) == pytest.approx(summary["area_m2"])
    assert sum(summary["by_direction_sector"].values()) == pytest.approx(1.0)
    assert summary["checks"]["passed"]
    assert len(summary["inputs"]["case"]["sha256"]) == 64 and summary["settings"]["seed"] == 3

    # The VTK file reads back with every per-face array, equal to the CSV.
    faces = pyvista.read(out / "faces.vtp")
    with open(out / "faces.csv", newline="") as handle:
        rows = list(csv.DictReader(handle))
    assert faces.n_cells == len(rows) == summary["faces"]
    for name in ("expected_impacts", "expected_penetrations", "penetrations_per_m2", "shadowed_fraction"):
        np.testing.assert_allclose(faces.cell_data[name], [float(r[name]) for r in rows], rtol=1e-8)
    assert list(faces.cell_data["shield_tag"]) == [r["shield_tag"] for r in rows]
    assert faces.cell_data["expected_penetrations"].sum() == pytest.approx(summary["expected_penetrations"])

    # The panel standing off the ram face shadows part of the hull's ram face; the hull's
    # ram-facing faces are the ones whose normal is +x.
    normal_x = np.array([float(r["normal_x"]) for r in rows])
    tags = np.array([r["shield_tag"] for r in rows])
    shadow = faces.cell_data["shadowed_fraction"]
    assert shadow[(tags == "hull") & (normal_x > 0.99)].max() > 0.3
    assert shadow[(tags == "panel") & (normal_x > 0.99)].max() == pytest.approx(0.0, abs=1e-12)

    # Rerunning into the same folder needs --overwrite; with it the numbers are identical.
    again = run("run", shadowed_box_case, "--out", out, "--threads", 2)
    assert again.exit_code == 1 and "--overwrite" in again.output
    again = run("run", shadowed_box_case, "--out", out, "--overwrite", "-q")
    assert again.exit_code == 0, again.output
    rerun = json.loads((out / "summary.json").read_text())
    assert rerun["pnp"] == summary["pnp"] and rerun["by_tag"] == summary["by_tag"]


def test_bad_input_is_one_line_without_traceback(shadowed_box_case, tmp_path):
    text = shadowed_box_case.read_text().replace("[shields.panel]", "[shields.pannel]")
    shadowed_box_case.write_text(text)
    result = run("run", shadowed_box_case, "--out", tmp_path / "run")
    assert result.exit_code == 1
    assert "Traceback" not in result.output
    assert "'panel'" in result.output and "no definition" in result.output
    assert not (tmp_path / "run" / "summary.json").exists()


def test_output_never_replaces_an_input(shadowed_box_case):
    folder = shadowed_box_case.parent
    mesh = folder / "faces.vtp"  # an input that happens to carry an output's name
    (folder / "vehicle.obj").rename(mesh)
    before = mesh.read_bytes()
    shadowed_box_case.write_text(shadowed_box_case.read_text().replace('"vehicle.obj"', '"faces.vtp"'))
    result = run("run", shadowed_box_case, "--out", folder, "--overwrite")
    assert result.exit_code == 1 and "would replace the input" in result.output
    assert mesh.read_bytes() == before


def test_help_lists_commands():
    result = run("--help")
    assert result.exit_code == 0 and "run" in result.output


@pytest.mark.slow
def test_demo_case_end_to_end(tmp_path, caplog):
    """The README's demo command: the committed demo vehicle and case run and look plausible."""
    out = tmp_path / "demo"
    result = run("run", ROOT / "models/imager_sat/case.toml", "--out", out)
    assert result.exit_code == 0, result.output
    # Every picture and plot of the report is drawn from the run's own summary.
    assert "not drawn" not in caplog.text
    assert (out / "pictures" / "risk_by_size.png").is_file()
    summary = json.loads((out / "summary.json").read_text())
    # Plausibility only (common practice, no source): a small LEO satellite over five years
    # has a PNP well inside (0.5, 1) and the ram-facing parts carry most debris risk.
    assert 0.5 < summary["pnp"] < 1.0
    assert summary["by_source"]["debris"]["expected_impacts"] > 0
    assert summary["by_source"]["meteoroid"]["expected_impacts"] > 0
    faces = pyvista.read(out / "faces.vtp")
    assert faces.n_cells == summary["faces"]


@pytest.mark.slow
def test_crew_module_baseline_and_enhanced_variant(tmp_path):
    """The second demo: the enhanced variant meets the requirement the baseline misses."""
    base, enhanced = tmp_path / "base", tmp_path / "enhanced"
    assert run("run", ROOT / "models/crew_module/baseline.toml", "--out", base, "-q").exit_code == 0
    assert run("run", ROOT / "models/crew_module/enhanced.toml", "--out", enhanced, "-q").exit_code == 0
    a = json.loads((base / "summary.json").read_text())
    b = json.loads((enhanced / "summary.json").read_text())
    assert not a["requirement"]["met"] and b["requirement"]["met"]
    assert b["checks"]["passed"] and a["checks"]["passed"]
    result = run("compare", base, enhanced, "--out", tmp_path / "cmp")
    assert result.exit_code == 0 and "NOT MET" in result.output
