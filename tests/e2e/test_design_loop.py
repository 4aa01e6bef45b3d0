"""The design loop: a variant that extends a baseline, and `pockmark compare`."""

import json

import numpy as np
import pytest
import pyvista
from click.testing import CliRunner

from pockmark.cli.main import cli

pytestmark = pytest.mark.e2e


def _run(case, out):
    result = CliRunner().invoke(cli, ["run", str(case), "--out", str(out), "-q"])
    assert result.exit_code == 0, result.output
    return json.loads((out / "summary.json").read_text())


def test_variant_that_changes_nothing_gives_identical_results(shadowed_box_case, tmp_path):
    same = tmp_path / "same.toml"
    same.write_text(f'extends = "{shadowed_box_case.name}"\n', encoding="utf-8")
    base = _run(shadowed_box_case, tmp_path / "a")
    variant = _run(same, tmp_path / "b")
    for key in ("pnp", "expected_penetrations", "expected_impacts", "by_tag", "by_component", "by_source"):
        assert variant[key] == base[key]


def test_compare_a_heavier_variant(shadowed_box_case, tmp_path):
    heavier = tmp_path / "heavier.toml"
    heavier.write_text(
        f'extends = "{shadowed_box_case.name}"\n\n[requirement]\npnp = 0.5\n\n'
        "[shields.hull]\nbumper_thickness = 0.3\n",
        encoding="utf-8",
    )
    base = _run(shadowed_box_case, tmp_path / "a")
    variant = _run(heavier, tmp_path / "b")
    assert variant["expected_penetrations"] < base["expected_penetrations"]
    result = CliRunner().invoke(cli, ["compare", str(tmp_path / "a"), str(tmp_path / "b"), "--out", str(tmp_path / "c")])
    assert result.exit_code == 0, result.output
    comparison = json.loads((tmp_path / "c" / "comparison.json").read_text())
    assert comparison["vehicle"]["delta_pnp"] == pytest.approx(variant["pnp"] - base["pnp"])
    assert comparison["by_tag"]["panel"]["delta_expected_penetrations"] == pytest.approx(0.0)
    assert comparison["shield_mass_kg"]["delta"] > 0
    difference = pyvista.read(tmp_path / "c" / "difference.vtp")
    assert difference.n_cells == variant["faces"] and difference.cell_data["matched"].all()
    # The face-by-face differences add up to the change of the vehicle's total.
    areas = difference.compute_cell_sizes().cell_data["Area"]
    total = np.nansum(difference.cell_data["delta_penetrations_per_m2"] * areas)
    delta = variant["expected_penetrations"] - base["expected_penetrations"]
    assert total == pytest.approx(delta, rel=1e-6)
    missing = CliRunner().invoke(cli, ["compare", str(tmp_path / "a"), str(tmp_path), "--out", str(tmp_path / "d")])
    assert missing.exit_code == 1 and "summary.json" in missing.output
