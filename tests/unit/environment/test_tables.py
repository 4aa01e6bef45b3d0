"""Unit tests of user environment tables: the reader (pockmark.io.environment_table), the
builder (pockmark.environment.tables) and their use in a phase.

All flux values in these tables are invented test numbers, not environment data.
"""

import warnings

import numpy as np
import pytest

from pockmark.constants import SECONDS_PER_YEAR
from pockmark.environment.flux import tabulated_cumulative_flux
from pockmark.environment.phase import (
    Attitude,
    DebrisSpec,
    MeteoroidSpec,
    PhaseSpec,
    phase_fluxes,
)
from pockmark.environment.tables import table_fluxes
from pockmark.errors import FormatError, InputError, ModelRangeWarning
from pockmark.geometry.frames import body_from_orbital
from pockmark.io.environment_table import load_environment_table

X, Y, Z = np.eye(3)

HEADER = """\
## invented test table
# source: test_source
# frame: orbital
# area_convention: cross_section
# flux_unit: m-2 yr-1
# projectile_density: 2.7
"""

# Two cells with the same size distribution (the second is 3 × the first) and one with its own.
DIRECTIONAL = HEADER + """\
azimuth_deg, elevation_deg, speed_km_s, diameter_cm, cumulative_flux
0, 0, 10, 0.01, 1.0e-1
0, 0, 10, 0.1, 1.0e-3
0, 0, 10, 1.0, 0
90, 0, 10, 0.01, 3.0e-1
90, 0, 10, 0.1, 3.0e-3
90, 0, 10, 1.0, 0
0, 0, 5, 0.01, 2.0e-2
0, 0, 5, 0.1, 1.0e-2
0, 0, 5, 1.0, 1.0e-3
"""


@pytest.fixture(autouse=True)
def _cache_in_tmp(tmp_path, monkeypatch):
    monkeypatch.setenv("POCKMARK_CACHE_DIR", str(tmp_path / "cache"))


def write(tmp_path, text, name="table.csv"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def face_integral(fluxes, normal, diameter):
    """Σ_fluxes Σ_jk w_jk max(0, n·u_j) Φ0(≥ d) for a unit face [m⁻² yr⁻¹]."""
    return sum(np.maximum(0.0, f.directions @ normal) @ f.weights.sum(axis=1)
               * f.cumulative_flux(diameter) for f in fluxes)


# ---------------------------------------------------------------- reader


def test_read_directional_table(tmp_path):
    table = load_environment_table(write(tmp_path, DIRECTIONAL))
    assert table.header["source"] == "test_source" and table.header["frame"] == "orbital"
    assert table.header["projectile_density"] == 2.7
    assert table.header["directionality"] == "directional"
    np.testing.assert_array_equal(table.diameters, [0.01, 0.1, 1.0])
    assert table.cumulative_flux.shape == (3, 3)
    np.testing.assert_allclose(table.directions, [[1, 0, 0], [0, 1, 0], [1, 0, 0]], atol=1e-15)
    np.testing.assert_array_equal(table.speeds, [10, 10, 5])
    np.testing.assert_array_equal(table.cell_lines, [8, 11, 14])
    assert table.speed_fractions is None


def test_read_vector_columns_any_order_and_rows_in_any_order(tmp_path):
    text = HEADER + """\
speed_km_s, diameter_cm, cumulative_flux, x, y, z
# comments after the column header are ignored
7, 1.0, 0, 0.6, 0.0, 0.8
7, 0.1, 2e-3, 0.6, 0.0, 0.8

7, 0.01, 2e-1, 0.6, 0.0, 0.8
"""
    table = load_environment_table(write(tmp_path, text))
    np.testing.assert_allclose(table.directions, [[0.6, 0.0, 0.8]], rtol=1e-15)
    np.testing.assert_array_equal(table.cumulative_flux, [[2e-1, 2e-3, 0.0]])


def test_read_vectors_are_normalised_within_tolerance(tmp_path):
    text = HEADER + "x, y, z, speed_km_s, diameter_cm, cumulative_flux\n" + "".join(
        f"0.577, 0.577, 0.577, 9, {d}, {f}\n" for d, f in ((0.1, 1e-3), (1.0, 1e-5)))
    table = load_environment_table(write(tmp_path, text))
    assert np.linalg.norm(table.directions[0]) == pytest.approx(1.0, abs=1e-15)


def test_read_isotropic_with_speed_header_and_with_speed_block(tmp_path):
    base = HEADER + "# directionality: isotropic\n"
    sizes = "diameter_cm, cumulative_flux\n0.001, 1e-6\n0.01, 1e-9\n"
    table = load_environment_table(write(tmp_path, base + "# speed_km_s: 20\n" + sizes))
    assert table.directions is None
    np.testing.assert_array_equal(table.speeds, [20.0])
    np.testing.assert_array_equal(table.speed_fractions, [1.0])
    block = "speed_km_s, fraction\n15, 0.5\n25, 0.3001\n40, 0.2\n"
    table = load_environment_table(write(tmp_path, base + sizes + block, "b.csv"))
    np.testing.assert_array_equal(table.speeds, [15, 25, 40])
    assert table.speed_fractions.sum() == pytest.approx(1.0, abs=1e-15)


ROW = "0, 0, 10, {d}, {f}\n"
COLUMNS = "azimuth_deg, elevation_deg, speed_km_s, diameter_cm, cumulative_flux\n"
GOOD_ROWS = ROW.format(d=0.1, f=1e-3) + ROW.format(d=1.0, f=1e-5)


@pytest.mark.parametrize(
    "text, line, match",
    [
        (HEADER + "# sourc: x\n" + COLUMNS + GOOD_ROWS, 7, "unknown header key 'sourc'"),
        (HEADER.replace("# flux_unit: m-2 yr-1\n", "") + COLUMNS + GOOD_ROWS, 1,
         "missing header line.*flux_unit"),
        (HEADER.replace("m-2 yr-1", "cm-2 yr-1") + COLUMNS + GOOD_ROWS, 5,
         "flux_unit must be one of m-2 yr-1, m-2 s-1"),
        (HEADER.replace("cross_section", "sphere") + COLUMNS + GOOD_ROWS, 4,
         "area_convention must be one of"),
        (HEADER.replace("orbital", "inertial") + COLUMNS + GOOD_ROWS, 3, "frame must be one of"),
        (HEADER.replace("2.7", "-2.7") + COLUMNS + GOOD_ROWS, 6, "projectile_density must be "
                                                                  "positive"),
        (HEADER + "# source: again\n" + COLUMNS + GOOD_ROWS, 7, "given twice"),
        (HEADER + COLUMNS + ROW.format(d=0.1, f=1e-5) + ROW.format(d=1.0, f=1e-3), 9,
         "rises from 1e-05 at 0.1 cm .*must not increase with diameter"),
        (HEADER + COLUMNS + ROW.format(d=0.1, f=-1e-3) + ROW.format(d=1.0, f=0), 8,
         "cumulative_flux must be >= 0"),
        (HEADER + COLUMNS + ROW.format(d=0.1, f="nan") + ROW.format(d=1.0, f=0), 8,
         "cumulative_flux must be a finite number"),
        (HEADER + COLUMNS + ROW.format(d=0.0, f=1e-3) + ROW.format(d=1.0, f=0), 8,
         "diameter_cm must be positive"),
        (HEADER + COLUMNS + ROW.format(d="x", f=1e-3) + ROW.format(d=1.0, f=0), 8,
         "diameter_cm must be a number"),
        (HEADER + COLUMNS + GOOD_ROWS + "5, 0, 10, 0.1, 1e-3\n", 10,
         r"cell \(azimuth_deg 5, elevation_deg 0, speed_km_s 10\) "
         r"has no row for diameter\(s\) 1 cm"),
        (HEADER + COLUMNS + GOOD_ROWS + ROW.format(d=1.0, f=1e-5), 10, "gives diameter 1 cm twice"),
        (HEADER + COLUMNS + "400, 0, 10, 0.1, 1e-3\n400, 0, 10, 1.0, 0\n", 8,
         "azimuth_deg must be in"),
        (HEADER + COLUMNS + "0, 95, 10, 0.1, 1e-3\n0, 95, 10, 1.0, 0\n", 8,
         "elevation_deg must be in"),
        (HEADER + COLUMNS + "0, 0, 0, 0.1, 1e-3\n0, 0, 0, 1.0, 0\n", 8,
         "speed_km_s must be positive"),
        (HEADER + "x, y, z, speed_km_s, diameter_cm, cumulative_flux\n1.2, 0, 0, 9, 0.1, 1e-3\n",
         8, "unit vector .*got norm 1.2"),
        (HEADER + "azimuth, elevation, speed, d, flux\n" + GOOD_ROWS, 7, "columns must be"),
        (HEADER + COLUMNS + "0, 0, 10, 0.1\n", 8, "expected 5 values"),
        (HEADER + COLUMNS + ROW.format(d=0.1, f=1e-3), 8, "at least two diameters"),
        (HEADER + COLUMNS, 7, "no data rows"),
        (HEADER + GOOD_ROWS, 7, "data row before the column header"),
        (HEADER + "# speed_km_s: 10\n" + COLUMNS + GOOD_ROWS, 7, "only for isotropic tables"),
        (HEADER + "# directionality: isotropic\ndiameter_cm, cumulative_flux\n0.1, 1\n1, 0\n", 8,
         "needs its speed"),
        (HEADER + "# directionality: isotropic\ndiameter_cm, cumulative_flux\n0.1, 1\n1, 0\n"
         "speed_km_s, fraction\n10, 0.5\n20, 0.4\n", 11, "fractions must sum to 1"),
        (HEADER + COLUMNS + GOOD_ROWS + "speed_km_s, fraction\n10, 1\n", 10,
         "a directional table has one column header"),
    ],
)
def test_reader_errors_name_file_line_and_fix(tmp_path, text, line, match):
    path = write(tmp_path, text)
    with pytest.raises(FormatError, match=match) as error:
        load_environment_table(path)
    message = str(error.value)
    assert message.startswith(f"{path}:{line}: "), message
    assert "\n" not in message


def test_reader_missing_file(tmp_path):
    with pytest.raises(FormatError, match="not found"):
        load_environment_table(tmp_path / "absent.csv")


# ---------------------------------------------------------------- builder


def test_cells_with_the_same_shape_share_one_flux(tmp_path):
    fluxes = table_fluxes(load_environment_table(write(tmp_path, DIRECTIONAL)))
    assert [f.parameters["cells"] for f in fluxes] == [2, 1]
    first, second = fluxes
    assert first.source == "test_source" and first.model == "user_table"
    assert first.projectile_density == 2.7
    # shares 1 : 3 at 10 km/s from ram (+x) and from the left (+y)
    np.testing.assert_allclose(first.directions, [[0, 1, 0], [1, 0, 0]], atol=1e-15)
    np.testing.assert_allclose(first.weights, [[0.75], [0.25]], rtol=1e-12)
    np.testing.assert_allclose(first.cumulative_flux(np.array([0.01, 0.1])), [0.4, 4e-3],
                               rtol=1e-12)
    np.testing.assert_array_equal(second.speeds, [5.0])
    for flux in fluxes:
        assert flux.weights.sum() == pytest.approx(1.0, abs=1e-15)


@pytest.mark.parametrize("diameter", [0.01, 0.1, 1.0])
def test_face_integrals_reproduce_the_cells_at_tabulated_diameters(tmp_path, diameter):
    table = load_environment_table(write(tmp_path, DIRECTIONAL))
    fluxes = table_fluxes(table)
    column = list(table.diameters).index(diameter)
    for normal in (X, Y, -X, np.array([0.6, 0.8, 0.0])):
        expected = np.maximum(0.0, table.directions @ normal) @ table.cumulative_flux[:, column]
        assert face_integral(fluxes, normal, diameter) == pytest.approx(expected, rel=1e-12,
                                                                         abs=1e-300)


def test_unit_and_area_conventions(tmp_path):
    plain = table_fluxes(load_environment_table(write(tmp_path, DIRECTIONAL)))
    text = DIRECTIONAL.replace("m-2 yr-1", "m-2 s-1").replace("cross_section", "random_plate")
    converted = table_fluxes(load_environment_table(write(tmp_path, text, "b.csv")))
    d = np.array([0.01, 0.1])
    # Julian year (constants.SECONDS_PER_YEAR) and ×4 for a one-sided random plate
    # (environment.md §1.8: a randomly oriented plate sees ¼ of the cross-sectional flux)
    np.testing.assert_allclose(converted[0].cumulative_flux(d),
                               4 * SECONDS_PER_YEAR * plain[0].cumulative_flux(d), rtol=1e-14)
    assert converted[0].parameters["conversion_factor"] == 4 * SECONDS_PER_YEAR


def test_isotropic_table_flux(tmp_path):
    text = HEADER + "# directionality: isotropic\ndiameter_cm, cumulative_flux\n0.01, 1e-2\n" \
        "0.1, 1e-4\nspeed_km_s, fraction\n15, 0.25\n25, 0.75\n"
    (flux,) = table_fluxes(load_environment_table(write(tmp_path, text)), directions=200)
    assert flux.weights.shape == (200, 2)
    np.testing.assert_allclose(flux.weights.sum(axis=0), [0.25, 0.75], rtol=1e-12)
    assert flux.mean_speed() == pytest.approx(22.5, rel=1e-12)
    assert flux.parameters["direction_grid"].startswith("fibonacci")


def test_table_needs_its_fields():
    with pytest.raises(InputError, match="header"):
        table_fluxes({"diameters": [0.1, 1.0]})


# ---------------------------------------------------------------- size interpolation


def test_power_law_is_interpolated_exactly():
    diameters = np.array([0.01, 0.1, 1.0, 10.0])
    fluxes = 1e-5 * diameters**-2.5  # invented power law
    d = np.geomspace(0.01, 10.0, 37)
    np.testing.assert_allclose(tabulated_cumulative_flux(diameters, fluxes, d), 1e-5 * d**-2.5,
                               rtol=1e-12)


def test_outside_the_table():
    diameters, fluxes = np.array([0.1, 1.0, 2.0]), np.array([1e-2, 1e-4, 0.0])
    with pytest.warns(ModelRangeWarning, match="below the smallest tabulated 0.1 cm"):
        below = tabulated_cumulative_flux(diameters, fluxes, 0.01)
    assert below == pytest.approx(1.0, rel=1e-12)  # the first interval's d⁻² continued
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # a zero flux at the end: exactly 0 beyond, no warning
        assert tabulated_cumulative_flux(diameters, fluxes, 5.0) == 0.0
        # on the interval ending at zero the flux falls linearly in d
        assert tabulated_cumulative_flux(diameters, fluxes, 1.5) == pytest.approx(5e-5)
        assert tabulated_cumulative_flux(diameters, fluxes, np.inf) == 0.0
        assert np.isnan(tabulated_cumulative_flux(diameters, fluxes, np.nan))
    with pytest.warns(ModelRangeWarning, match="its flux 0.0001 .* is held"):
        above = tabulated_cumulative_flux(diameters[:2], fluxes[:2], np.array([2.0, 3.0]))
    np.testing.assert_array_equal(above, [1e-4, 1e-4])
    with pytest.raises(InputError, match="diameter must be positive"):
        tabulated_cumulative_flux(diameters, fluxes, 0.0)


# ---------------------------------------------------------------- in a phase


def _phase(attitude=None):
    return PhaseSpec("table phase", 2030.0, 1.0, 400.0, 400.0, 51.6, attitude or Attitude())


def test_orbital_table_follows_the_attitude(tmp_path):
    table = load_environment_table(write(tmp_path, DIRECTIONAL))
    attitude = Attitude(flight_axis="+y", nadir_axis="+z")
    result = phase_fluxes(_phase(attitude), tables=[table])
    assert list(result) == ["test_source"] and len(result["test_source"]) == 2
    rotation = body_from_orbital("+y", "+z")
    for flux, raw in zip(result["test_source"], table_fluxes(table), strict=True):
        np.testing.assert_allclose(flux.directions, raw.directions @ rotation.T, atol=0)
        assert flux.parameters["frame"] == "body"
    # a single ram cell seen on the body face that points along the flight direction (+y)
    expected = table.cumulative_flux[0, 0] + table.cumulative_flux[2, 0]
    assert face_integral(result["test_source"], Y, 0.01) == pytest.approx(expected, rel=1e-12)


def test_body_and_isotropic_tables_ignore_the_attitude(tmp_path):
    body_text = DIRECTIONAL.replace("# frame: orbital", "# frame: body")
    table = load_environment_table(write(tmp_path, body_text))
    for attitude in (Attitude(flight_axis="-x", nadir_axis="+y"), Attitude(mode="tumbling")):
        (flux, _) = phase_fluxes(_phase(attitude), tables=[table])["test_source"]
        np.testing.assert_array_equal(flux.directions, table_fluxes(table)[0].directions)
    iso = HEADER + "# directionality: isotropic\n# speed_km_s: 20\ndiameter_cm, cumulative_flux\n" \
        "0.01, 1e-2\n0.1, 1e-4\n"
    iso_table = load_environment_table(write(tmp_path, iso, "iso.csv"))
    spun = phase_fluxes(_phase(Attitude(mode="spinning", spin_axis="+x")), tables=[iso_table])
    np.testing.assert_array_equal(spun["test_source"][0].directions,
                                  table_fluxes(iso_table)[0].directions)


def test_tumbling_orbital_table_becomes_isotropic(tmp_path):
    table = load_environment_table(write(tmp_path, DIRECTIONAL))
    fluxes = phase_fluxes(_phase(Attitude(mode="tumbling")), tables=[table])["test_source"]
    for flux in fluxes:
        assert len(flux.directions) == 600
        assert flux.weights.sum() == pytest.approx(1.0, abs=1e-12)


def test_table_source_names(tmp_path):
    debris_named = load_environment_table(write(tmp_path, DIRECTIONAL.replace(
        "# source: test_source", "# source: debris")))
    with pytest.raises(InputError, match="names its source 'debris'.*rename"):
        phase_fluxes(_phase(), debris=DebrisSpec(), tables=[debris_named])
    # replacing a disabled model is allowed, and two tables of one source add up
    result = phase_fluxes(_phase(), meteoroid=MeteoroidSpec(), tables=[debris_named] * 2)
    assert list(result) == ["meteoroid", "debris"] and len(result["debris"]) == 4


def test_cache_key_follows_the_table_contents(tmp_path):
    first = load_environment_table(write(tmp_path, DIRECTIONAL))
    second = load_environment_table(write(tmp_path, DIRECTIONAL.replace("1.0e-3", "2.0e-3"),
                                          "other.csv"))
    a = phase_fluxes(_phase(), tables=[first])
    b = phase_fluxes(_phase(), tables=[second])
    assert len(list((tmp_path / "cache").glob("*.npz"))) == 2
    assert a["test_source"][0].cumulative_flux(0.1) != b["test_source"][0].cumulative_flux(0.1)
    again = phase_fluxes(_phase(), tables=[first])
    assert again["test_source"][0].parameters == a["test_source"][0].parameters
