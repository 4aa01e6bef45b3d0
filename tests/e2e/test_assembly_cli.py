"""Components, thin sheets, added panels and re-tagging through `pockmark run`."""

import csv
import json

import numpy as np
import pytest
import trimesh
from click.testing import CliRunner

from pockmark.cli.main import cli
from tests.conftest import box, write_parts

pytestmark = pytest.mark.e2e

CASE = """\
title = "assembly test"

[vehicle]
mesh = "vehicle.obj"
length_unit = "m"

[shields.hull]
equation = "cour_palais_1987"
wall_thickness = 0.3
wall_material = "Al6061-T6"

[shields.cells]
equation = "cour_palais_1987"
wall_thickness = 0.05
wall_material = "Al6061-T6"

[shields.substrate]
equation = "cour_palais_1987"
wall_thickness = 0.08
wall_material = "Al6061-T6"

[shields.ram_panel]
equation = "cour_palais_1987"
wall_thickness = 0.2
wall_material = "Al6061-T6"

[shields.hull_heavy]
equation = "cour_palais_1987"
wall_thickness = 0.6
wall_material = "Al6061-T6"

[components.wing]
tags = ["cells"]
role = "shadow_only"
closed = false

[thin.cells]
back_tag = "substrate"

[[phases]]
altitude = 400.0
inclination = 51.6
start = 2030-01-01
duration = 1.0

[environment.debris]
solar_flux = 100.0

[environment.meteoroid]

[analysis]
directions = 150
debris_azimuth_bins = 24
samples_per_face = 1
"""


def _sheet():
    """A 1 m × 2 m open sheet in the x-z plane at y = 1.5 (a solar wing seen edge-on to ram)."""
    vertices = [[-0.5, 1.5, -1.0], [0.5, 1.5, -1.0], [0.5, 1.5, 1.0], [-0.5, 1.5, 1.0]]
    return trimesh.Trimesh(vertices, [[0, 1, 2], [0, 2, 3]], process=False)


@pytest.fixture
def folder(tmp_path):
    write_parts(tmp_path / "vehicle.obj", [("hull", box([1, 1, 1], [0, 0, 0])), ("cells", _sheet())])
    write_parts(tmp_path / "panel.obj", [("anything", box([0.02, 0.8, 0.8], [0.7, 0, 0]))])
    return tmp_path


def _run(folder, text, out):
    (folder / "case.toml").write_text(text, encoding="utf-8")
    result = CliRunner().invoke(cli, ["run", str(folder / "case.toml"), "--out", str(out), "-q"])
    assert result.exit_code == 0, result.output
    summary = json.loads((out / "summary.json").read_text())
    with open(out / "faces.csv", newline="") as handle:
        rows = list(csv.DictReader(handle))
    return summary, rows


def test_components_and_thin_sheets(folder):
    summary, rows = _run(folder, CASE, folder / "base")
    tags = [r["shield_tag"] for r in rows]
    # The sheet's two faces get reversed copies tagged with the back tag, at the end.
    assert tags[-2:] == ["substrate", "substrate"] and [r["side"] for r in rows[-2:]] == ["1", "1"]
    assert summary["by_component"]["wing"]["tags"] == ["cells", "substrate"]
    assert summary["by_component"]["wing"]["role"] == "shadow_only"
    # PNP counts the critical hull only; the wing's penetrations are reported apart.
    hull = summary["by_tag"]["hull"]["expected_penetrations"]
    wing = summary["by_component"]["wing"]["expected_penetrations"]
    assert summary["expected_penetrations"] == pytest.approx(hull, rel=1e-12)
    assert summary["shadow_only"]["expected_penetrations"] == pytest.approx(wing, rel=1e-12)
    assert wing > 0 and summary["pnp"] == pytest.approx(np.exp(-hull))
    assert sum(s["expected_penetrations"] for s in summary["by_source"].values()) == pytest.approx(hull)


def test_panel_shadows_and_retag_by_earlier_run(folder):
    base, _ = _run(folder, CASE, folder / "base")
    with_panel = CASE + '\n[[panels]]\nmesh = "panel.obj"\ntag = "ram_panel"\n'
    summary, rows = _run(folder, with_panel, folder / "panel")
    assert summary["by_tag"]["ram_panel"]["faces"] == 12
    # The panel in front of the ram face takes debris the hull used to take.
    assert summary["by_tag"]["hull"]["expected_impacts"] < base["by_tag"]["hull"]["expected_impacts"]
    assert {r["face_origin"] for r in rows if r["shield_tag"] == "ram_panel"} == {"1"}

    retagged = with_panel + '\n[[retag]]\ntag = "hull_heavy"\nhighest_risk = { run = "panel", count = 3 }\n'
    after, rows = _run(folder, retagged, folder / "retag")
    assert after["by_tag"]["hull_heavy"]["faces"] == 3
    assert after["expected_penetrations"] < summary["expected_penetrations"]
    hotspots = json.loads((folder / "panel" / "summary.json").read_text())["hotspots"]
    heavy = {int(r["face"]) for r in rows if r["shield_tag"] == "hull_heavy"}
    assert heavy == {h["face"] for h in hotspots[:3]}


def test_retag_from_a_run_on_another_mesh_is_refused(folder):
    _run(folder, CASE, folder / "base")
    text = CASE + '\n[[panels]]\nmesh = "panel.obj"\n\n[shields.anything]\nequation = "threshold_diameter"\ndiameter = 1.0\n'
    text += '\n[[retag]]\ntag = "hull_heavy"\nhighest_risk = { run = "base", count = 3 }\n'
    (folder / "case.toml").write_text(text, encoding="utf-8")
    result = CliRunner().invoke(cli, ["run", str(folder / "case.toml"), "--out", str(folder / "x")])
    assert result.exit_code == 1 and "different mesh" in result.output and "retag" in result.output
