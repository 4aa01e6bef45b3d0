"""`pockmark environment` writes its tables and plots and prints the flux table."""

import csv

import numpy as np
import pytest
from click.testing import CliRunner

from pockmark.cli.main import cli

pytestmark = pytest.mark.e2e


def test_environment_tables_and_plots(shadowed_box_case, tmp_path):
    out = tmp_path / "env"
    result = CliRunner().invoke(cli, ["environment", str(shadowed_box_case), "--out", str(out)])
    assert result.exit_code == 0, result.output
    assert "debris" in result.output and "meteoroid" in result.output
    for name in ("sizes.csv", "speeds.csv", "directions.csv", "flux_phase1.png", "sky_phase1.png"):
        assert (out / name).stat().st_size > 0
    with open(out / "speeds.csv", newline="") as handle:
        rows = list(csv.DictReader(handle))
    for source in ("debris", "meteoroid"):
        fractions = [float(r["fraction"]) for r in rows if r["source"] == source]
        assert sum(fractions) == pytest.approx(1.0)
    speeds = np.array([float(r["speed_km_s"]) for r in rows if r["source"] == "debris"])
    # Debris closing speeds in a circular LEO are at most twice the circular speed, 2 × 7.67 km/s
    # at 400 km (shared/reference/environment.md §3.2; ECSS-E-ST-10-04C Annex J.2.2.1.3 "≈15.5").
    assert speeds.max() <= 2 * 7.6686 + 1e-9
    again = CliRunner().invoke(cli, ["environment", str(shadowed_box_case), "--out", str(out)])
    assert again.exit_code == 1 and "--overwrite" in again.output
