"""`pockmark sweep` runs a case once per value of one key and tabulates the results."""

import csv
import json

import pytest
from click.testing import CliRunner

from pockmark.cli.main import cli
from pockmark.io.config import load_case, parse_override
from pockmark.report.summary import build_summary
from pockmark.risk.assess import assess

# The reference runs below repeat the range warnings the sweep already logged.
pytestmark = pytest.mark.filterwarnings("ignore::pockmark.errors.ModelRangeWarning")


def _run(*args):
    return CliRunner().invoke(cli, ["sweep", *(str(a) for a in args)])


def test_rows_equal_separate_runs_of_the_overridden_case(shadowed_box_case, tmp_path):
    """Each row is exactly what a run of the case with that value gives (same pipeline)."""
    out = tmp_path / "sweep"
    result = _run(shadowed_box_case, "--out", out, "--vary", "phases.0.altitude=400,800", "-q",
                  "--set", "analysis.directions=120")
    assert result.exit_code == 0, result.output
    rows = list(csv.DictReader(open(out / "sweep.csv", encoding="utf-8")))
    assert [float(r["phases.0.altitude"]) for r in rows] == [400.0, 800.0]
    for row in rows:
        case = load_case(shadowed_box_case, [(("analysis", "directions"), 120),
                                             (("phases", 0, "altitude"),
                                              float(row["phases.0.altitude"]))])
        summary = build_summary(assess(case))
        # the CSV keeps 9 significant digits
        assert float(row["pnp"]) == pytest.approx(summary["pnp"], rel=1e-8)
        assert float(row["expected_penetrations"]) == pytest.approx(
            summary["expected_penetrations"], rel=1e-8)
    document = json.loads((out / "sweep.json").read_text(encoding="utf-8"))
    assert document["key"] == "phases.0.altitude" and len(document["manifest"]["runs"]) == 2
    assert (out / "sweep.png").read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert "phases.0.altitude" in result.output and "Caution" in result.output


def test_bad_sweeps_are_one_line_errors(shadowed_box_case, tmp_path):
    result = _run(shadowed_box_case, "--out", tmp_path / "a", "--vary", "phases.0.altitude=400")
    assert result.exit_code == 1 and "at least two" in result.output
    result = _run(shadowed_box_case, "--out", tmp_path / "b", "--vary", "phases.4.altitude=1,2")
    assert result.exit_code == 1 and "use an index from 0 to 0" in result.output
    result = _run(shadowed_box_case, "--out", tmp_path / "c", "--vary", "phases.0.altitude=-1,2")
    assert result.exit_code == 1 and "phases.0.altitude: must be > 0" in result.output
    assert "Traceback" not in result.output


def test_override_parsing():
    assert parse_override("phases.0.altitude=500.5") == (("phases", 0, "altitude"), 500.5)
    assert parse_override("analysis.directions=300") == (("analysis", "directions"), 300)
    assert parse_override("environment.meteoroid.vehicle_motion=false")[1] is False
    assert parse_override('environment.debris.projectile_density="kessler_1991"')[1] == "kessler_1991"
