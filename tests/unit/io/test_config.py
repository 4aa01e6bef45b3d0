"""Case files: a valid one loads; each mistake is reported with file, line and key."""

import datetime as dt

import pytest

from pockmark.errors import ConfigError
from pockmark.io.config import load_case
from tests.conftest import make_case_text, write_parts, box


@pytest.fixture
def folder(tmp_path):
    write_parts(tmp_path / "vehicle.obj", [("hull", box([1, 1, 1], [0, 0, 0]))])
    return tmp_path


def write(folder, text):
    path = folder / "case.toml"
    path.write_text(text.replace("{mesh}", "vehicle.obj"), encoding="utf-8")
    return path


def test_valid_case_loads(folder):
    case = load_case(write(folder, make_case_text()))
    assert case.mesh_path == (folder / "vehicle.obj").resolve()
    assert case.phases[0].altitude == 400.0 and case.phases[0].start == dt.date(2030, 1, 1)
    assert case.phases[0].start_year == 2030.0
    assert case.debris.projectile_density == 2.8  # default
    assert case.analysis.directions == 200
    assert case.duration == 2.0
    assert set(case.shields) == {"hull", "panel"}


def line_of(text, needle):
    return text.splitlines().index(needle) + 1


@pytest.mark.parametrize(
    ("old", "new", "key", "words"),
    [
        ("altitude = 400.0", "altitude = -5.0", "phases.0.altitude", "must be > 0"),
        ("altitude = 400.0", 'altitude = "low"', "phases.0.altitude", "must be a float"),
        ('flight_axis = "+x"', 'flight_axis = "forward"', "phases.0.flight_axis", "must be one of +x"),
        ('nadir_axis = "-z"', 'nadir_axis = "-x"', "phases.0.nadir_axis", "perpendicular"),
        ("samples_per_face = 1", "samples_per_face = 0", "analysis.samples_per_face", "must be > 0"),
        ("seed = 3", "sead = 3", "analysis.sead", "unknown key"),
        ('length_unit = "m"', 'length_unit = "furlong"', "vehicle.length_unit", "must be one of mm"),
        ("duration = 2.0", "duration = 0", "phases.0.duration", "must be > 0"),
    ],
)
def test_mistakes_name_file_line_and_key(folder, old, new, key, words):
    text = make_case_text(**{old: new})
    path = write(folder, text)
    with pytest.raises(ConfigError) as caught:
        load_case(path)
    message = str(caught.value)
    assert f"{path}:{line_of(text, new)}: {key}: " in message
    assert words in message


def test_missing_key_and_missing_mesh(folder):
    text = make_case_text(**{"solar_flux = 100.0": ""})
    with pytest.raises(ConfigError, match=r"environment\.debris\.solar_flux: missing"):
        load_case(write(folder, text))
    text = make_case_text(**{'mesh = "{mesh}"': 'mesh = "nowhere.obj"'})
    with pytest.raises(ConfigError, match="does not exist"):
        load_case(write(folder, text))


def test_invalid_toml_and_wrong_paths(folder):
    with pytest.raises(ConfigError, match="invalid TOML"):
        load_case(write(folder, "title = \n"))
    with pytest.raises(ConfigError, match="is a directory"):
        load_case(folder)
    with pytest.raises(ConfigError, match="no such case file"):
        load_case(folder / "absent.toml")
