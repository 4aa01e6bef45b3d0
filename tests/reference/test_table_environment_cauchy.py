"""A user environment table through the whole run, checked against Cauchy's theorem.

A convex body in an isotropic flux Φ per unit cross-section is hit Φ · S · T / 4 times
(Cauchy's surface-area formula, mean projected area = S/4; V. Vouk, Nature 162:330, 1948).
The table's numbers are invented for the test; the check is the geometric identity.
"""

import json

import pytest
from click.testing import CliRunner

from pockmark.cli.main import cli
from tests.conftest import box, write_parts

pytestmark = [pytest.mark.reference, pytest.mark.e2e]

TABLE = """\
# source: test_stream
# frame: orbital
# area_convention: cross_section
# flux_unit: m-2 yr-1
# projectile_density: 2.0
# directionality: isotropic
# speed_km_s: 12.0
diameter_cm, cumulative_flux
0.01, 10.0
0.1, 0.5
1.0, 0.001
"""

CASE = """\
[vehicle]
mesh = "box.obj"
length_unit = "m"

[shields.hull]
equation = "threshold_diameter"
diameter = 0.1

[[phases]]
altitude = 500.0
inclination = 51.6
start = 2030-01-01
duration = 3.0
attitude = "tumbling"

[environment]
tables = ["stream.csv"]

[analysis]
directions = 3000
samples_per_face = 1
impact_diameter = 0.01
"""


def test_isotropic_table_on_a_convex_box_follows_cauchy(tmp_path):
    write_parts(tmp_path / "box.obj", [("hull", box([2.0, 1.0, 0.5], [0, 0, 0]))])
    (tmp_path / "stream.csv").write_text(TABLE, encoding="utf-8")
    (tmp_path / "case.toml").write_text(CASE, encoding="utf-8")
    result = CliRunner().invoke(cli, ["run", str(tmp_path / "case.toml"), "--out", str(tmp_path / "run"), "-q"])
    assert result.exit_code == 0, result.output
    summary = json.loads((tmp_path / "run" / "summary.json").read_text())
    area = 2 * (2.0 * 1.0 + 2.0 * 0.5 + 1.0 * 0.5)
    assert summary["area_m2"] == pytest.approx(area)
    # Fibonacci quadrature of max(0, n·u) over 3000 directions: well under 0.3 % per face.
    assert summary["expected_penetrations"] == pytest.approx(0.5 * area * 3.0 / 4.0, rel=3e-3)
    assert summary["expected_impacts"] == pytest.approx(10.0 * area * 3.0 / 4.0, rel=3e-3)
    assert list(summary["by_source"]) == ["test_stream"]
