"""`pockmark trade` ranks candidate upgrades and writes upgrades.csv and upgrades.json."""

import csv
import json

import pytest
from click.testing import CliRunner

from pockmark.cli.main import cli

UPGRADE = ('\n[[upgrades]]\nname = "thick hull wall"\ntag = "hull"\n'
           "changes = { rear_wall_thickness = 0.6 }\n")


def _run(*args):
    return CliRunner().invoke(cli, ["trade", *(str(a) for a in args)])


def test_writes_ranked_candidates_and_a_plan(shadowed_box_case, tmp_path):
    with shadowed_box_case.open("a", encoding="utf-8") as handle:
        handle.write('\n[requirement]\npnp = 0.999999\n' + UPGRADE)
    out = tmp_path / "trade"
    result = _run(shadowed_box_case, "--out", out, "--steps", "1.5,2", "-q")
    assert result.exit_code == 0, result.output
    assert "requirement PNP >= 0.999999: NOT MET" in result.output
    assert "thick hull wall" in result.output and "Plan (greedy" in result.output
    assert "Caution:" in result.output
    with open(out / "upgrades.csv", newline="", encoding="utf-8") as handle:
        rows = list(csv.DictReader(handle))
    document = json.loads((out / "upgrades.json").read_text(encoding="utf-8"))
    assert [row["name"] for row in rows] == [c["name"] for c in document["candidates"]]
    assert len(rows) == 1 + 3 * 2  # the case's upgrade; hull bumper and rear wall, panel wall
    assert document["manifest"]["inputs"] and document["cautions"]
    assert not list(out.glob(".*"))  # no temporary files left


def test_case_upgrades_only_and_bad_steps(shadowed_box_case, tmp_path):
    with shadowed_box_case.open("a", encoding="utf-8") as handle:
        handle.write(UPGRADE)
    result = _run(shadowed_box_case, "--out", tmp_path / "a", "--steps", "none", "-q")
    assert result.exit_code == 0, result.output
    rows = list(csv.DictReader(open(tmp_path / "a" / "upgrades.csv", encoding="utf-8")))
    assert [row["name"] for row in rows] == ["thick hull wall"]
    result = _run(shadowed_box_case, "--out", tmp_path / "b", "--steps", "0.5")
    assert result.exit_code == 2 and "is not > 1" in result.output
    # an earlier result is not overwritten without --overwrite
    result = _run(shadowed_box_case, "--out", tmp_path / "a", "--steps", "none", "-q")
    assert result.exit_code == 1 and "already holds upgrades.csv" in result.output


@pytest.mark.slow
def test_demo_trade_meets_the_crew_module_requirement(tmp_path):
    """The crew-module demo misses its requirement; its [[upgrades]] and the thickness steps
    give a plan that meets it."""
    from pathlib import Path

    root = Path(__file__).resolve().parents[2]
    result = _run(root / "models/crew_module/baseline.toml", "--out", tmp_path / "t", "-q")
    assert result.exit_code == 0, result.output
    document = json.loads((tmp_path / "t" / "upgrades.json").read_text(encoding="utf-8"))
    assert document["baseline"]["pnp"] < document["requirement"]
    assert document["plan"]["met"] is True
