"""`pockmark limits` writes ballistic-limit plots and curves and prints the tables."""

import csv
import subprocess
import sys

import numpy as np
import pytest
from click.testing import CliRunner

from pockmark.ballistics import make_shield
from pockmark.cli.limits import limits

STUFFED = """
[shields.module]
equation = "christiansen_1995"
bumper_thickness = 0.2
bumper_material = "Al6061-T6"
nextel_layers = 6
nextel_material = "Nextel-AF62"
kevlar_layers = 6
kevlar_material = "Kevlar-KM2"
standoff = 11.4
rear_wall_thickness = 0.48
rear_wall_material = "Al2219-T87"
angle_cap = 65
"""


@pytest.fixture
def case(shadowed_box_case):
    """The shared test case (shields 'hull' = Whipple, 'panel' = single wall) plus a stuffed
    Whipple with an obliquity cap."""
    with shadowed_box_case.open("a", encoding="utf-8") as handle:
        handle.write(STUFFED)
    return shadowed_box_case


def _run(*args):
    return CliRunner().invoke(limits, [str(a) for a in args])


def _rows(path):
    with open(path, newline="", encoding="utf-8") as handle:
        return list(csv.DictReader(handle))


def test_writes_png_and_csv_and_prints_tables(case, tmp_path):
    out = tmp_path / "limits"
    result = _run(case, "--out", out)
    assert result.exit_code == 0, result.output
    for name in ("limits.csv", "limits_hull.png", "limits_panel.png", "limits_module.png"):
        assert (out / name).stat().st_size > 0
    assert (out / "limits_hull.png").read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert not list(out.glob(".*"))  # no temporary files left behind
    for tag, equation in (("hull", "christiansen_1993"), ("panel", "cour_palais_1987"),
                          ("module", "christiansen_1995")):
        assert f"Shield {tag!r}: {equation}" in result.output
    lines = result.output.splitlines()
    header = next(line for line in lines if "V [km/s]" in line)
    for angle in ("0°", "30°", "45°", "60°"):
        assert angle in header
    # 13 speed rows (0.5 ... 20 km/s) per shield
    assert sum(1 for line in lines if line.strip().startswith("0.5 ")) == 3
    assert sum(1 for line in lines if line.strip().startswith("20 ")) == 3
    assert "angles above 65° are evaluated at the cap" in result.output


def test_csv_curves_match_the_library(case, tmp_path):
    out = tmp_path / "limits"
    assert _run(case, "--out", out, "--shield", "hull", "--angles", "0,45").exit_code == 0
    rows = _rows(out / "limits.csv")
    assert {row["shield"] for row in rows} == {"hull"}
    assert {float(row["impact_angle_deg"]) for row in rows} == {0.0, 45.0}
    speeds = np.array(
        [float(r["impact_speed_km_s"]) for r in rows if r["impact_angle_deg"] == "45"]
    )
    assert speeds.min() == 0.5 and speeds.max() == 20.0
    assert np.all(np.diff(speeds) > 0)
    # the regime boundaries at 45° (Vn = 3 and 7 km/s) are points of the curve
    for boundary in (3 / np.cos(np.radians(45)), 7 / np.cos(np.radians(45))):
        assert np.min(np.abs(speeds - boundary)) < 1e-6
    shield = make_shield("hull", {
        "equation": "christiansen_1993", "bumper_thickness": 0.1, "bumper_material": "Al6061-T6",
        "standoff": 10.0, "rear_wall_thickness": 0.3, "rear_wall_material": "Al2219-T87",
    })
    for row in rows[::37]:
        v, a = float(row["impact_speed_km_s"]), float(row["impact_angle_deg"])
        assert float(row["critical_diameter_cm"]) == pytest.approx(
            float(shield.critical_diameter(v, a, 2.8)), rel=1e-8
        )
        assert row["out_of_range"] == ("1" if v > 8.0 else "0")


def test_angle_cap_and_density_in_csv(case, tmp_path):
    out = tmp_path / "limits"
    result = _run(case, "--out", out, "--shield", "module", "--angles", "30,80", "--density", "1")
    assert result.exit_code == 0, result.output
    rows = _rows(out / "limits.csv")
    assert {row["projectile_density_g_cm3"] for row in rows} == {"1"}
    capped = [row for row in rows if row["impact_angle_deg"] == "80"]
    assert {row["evaluated_angle_deg"] for row in capped} == {"65"}
    assert all(row["out_of_range"] == "1" for row in capped)  # 80° > 65° tested range


def test_refuses_to_overwrite(case, tmp_path):
    out = tmp_path / "limits"
    assert _run(case, "--out", out, "--shield", "panel").exit_code == 0
    again = _run(case, "--out", out, "--shield", "panel")
    assert again.exit_code == 1
    assert "--overwrite" in again.output and "limits.csv" in again.output
    assert _run(case, "--out", out, "--shield", "panel", "--overwrite").exit_code == 0


def test_unknown_shield_names_the_flag(case, tmp_path):
    result = _run(case, "--out", tmp_path / "o", "--shield", "bumper")
    assert result.exit_code == 2
    assert "--shield" in result.output and "'bumper'" in result.output and "hull" in result.output


@pytest.mark.parametrize("angles, needle", [("0,x", "'x'"), ("0,90", "90"), ("30,30", "repeats")])
def test_bad_angles_name_the_flag(case, tmp_path, angles, needle):
    result = _run(case, "--out", tmp_path / "o", "--angles", angles)
    assert result.exit_code == 2
    assert "--angles" in result.output and needle in result.output


def test_bad_density_names_the_flag(case, tmp_path):
    result = _run(case, "--out", tmp_path / "o", "--density", "0")
    assert result.exit_code == 2 and "--density" in result.output


def test_invalid_shield_definition_is_one_line_with_file_and_line(shadowed_box_case, tmp_path):
    text = shadowed_box_case.read_text(encoding="utf-8")
    text = text.replace("standoff = 10.0", "standof = 10.0")
    shadowed_box_case.write_text(text, encoding="utf-8")
    result = _run(shadowed_box_case, "--out", tmp_path / "o")
    assert result.exit_code == 1
    message = result.output.strip().splitlines()
    assert len(message) == 1
    assert f"{shadowed_box_case}:" in message[0] and "unknown key 'standof'" in message[0]
    assert not (tmp_path / "o" / "limits.csv").exists()


def test_missing_case_file(tmp_path):
    result = _run(tmp_path / "nope.toml", "--out", tmp_path / "o")
    assert result.exit_code == 1 and "no such case file" in result.output


def test_help_ends_with_examples():
    result = CliRunner().invoke(limits, ["--help"])
    assert result.exit_code == 0
    assert "Examples:" in result.output and "[g cm⁻³]" in result.output and "[°]" in result.output


def test_import_is_light():
    """Heavy imports (matplotlib, numpy models) happen inside the command body."""
    code = (
        "import sys, pockmark.cli.limits; "
        "print(any(m in sys.modules for m in ('matplotlib', 'pockmark.report.limits')))"
    )
    result = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                            check=True)
    assert result.stdout.strip() == "False"


NEW_FORMS = {
    "christiansen_1995_multi_shock": """
bumper_layers = 4
bumper_material = "Nextel-AF62"
standoff = 15.0
rear_wall_thickness = 0.16
rear_wall_material = "Al2219-T87"
""",
    "ryan_2008_cfrp": """
front_sheet_thickness = 0.1
front_sheet_material = "CFRP"
core_thickness = 2.5
core_density = 0.05
rear_sheet_thickness = 0.1
rear_sheet_material = "CFRP"
mli_areal_density = 0.05
""",
    "schafer_2008_aluminium": """
outer_sheet_thickness = 0.04
outer_sheet_material = "Al2024-T3"
core_thickness = 2.5
core_density = 0.05
inner_sheet_thickness = 0.04
inner_sheet_material = "Al2024-T3"
gap = 10.0
wall_thickness = 0.15
wall_material = "Al6061-T6"
""",
    "christiansen_2009_mli": """
wall_thickness = 0.1
wall_material = "Al6061-T6"
""",
}


@pytest.mark.parametrize("equation", sorted(NEW_FORMS))
def test_every_build_up_can_be_plotted(shadowed_box_case, tmp_path, equation):
    """A shield of each multi-layer form defined in a case file gives curves, a PNG and a
    table row per speed; the curve is finite and positive wherever particles hit."""
    with shadowed_box_case.open("a", encoding="utf-8") as handle:
        handle.write(f'\n[shields.extra]\nequation = "{equation}"\n{NEW_FORMS[equation]}')
    out = tmp_path / "limits"
    result = _run(shadowed_box_case, "--out", out)
    assert result.exit_code == 0, result.output
    assert f"Shield 'extra': {equation}" in result.output
    assert (out / "limits_extra.png").read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    rows = [row for row in _rows(out / "limits.csv") if row["shield"] == "extra"]
    values = np.array([float(row["critical_diameter_cm"]) for row in rows])
    angles = np.array([float(row["impact_angle_deg"]) for row in rows])
    assert len(values) > 10
    assert np.all(np.isfinite(values[angles < 90.0]) & (values[angles < 90.0] > 0.0))
