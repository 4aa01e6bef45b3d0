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
    assert case.mesh_paths == ((folder / "vehicle.obj").resolve(),)
    assert case.phases[0].perigee_altitude == case.phases[0].apogee_altitude == 400.0
    assert case.phases[0].start == dt.date(2030, 1, 1) and case.phases[0].attitude == "fixed"
    assert case.phases[0].start_year == 2030.0
    assert case.debris.projectile_density == 2.8  # default
    assert case.meteoroid.vehicle_motion is True  # default
    assert case.analysis.directions == 200
    assert case.duration == 2.0
    assert set(case.shields) == {"hull", "panel"}


def test_vehicle_motion_can_be_switched_off(folder):
    line = "projectile_density = 1.0"
    text = make_case_text(**{line: line + "\nvehicle_motion = false"})
    assert load_case(write(folder, text)).meteoroid.vehicle_motion is False
    text = make_case_text(**{line: line + '\nvehicle_motion = "no"'})
    with pytest.raises(ConfigError, match="environment.meteoroid.vehicle_motion.*must be a bool"):
        load_case(write(folder, text))


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
        ("solar_flux = 100.0", "solar_flux = { 2030 = -1 }", "environment.debris.solar_flux", "positive values"),

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


@pytest.mark.parametrize(
    ("old", "new", "line", "words"),
    [
        ('nadir_axis = "-z"', 'nadir_axis = "-z"\nattitude = "spinning"', "[[phases]]", "phases.0.spin_axis: missing"),
        ("altitude = 400.0", "altitude = 400.0\napogee_altitude = 900.0", "apogee_altitude = 900.0", "either altitude"),
    ],
)
def test_orbit_and_attitude_mistakes(folder, old, new, line, words):
    text = make_case_text(**{old: new})
    path = write(folder, text)
    with pytest.raises(ConfigError) as caught:
        load_case(path)
    assert f"{path}:{line_of(text, line)}: " in str(caught.value) and words in str(caught.value)


def test_missing_key_and_missing_mesh(folder):
    text = make_case_text(**{"duration = 2.0": ""})
    with pytest.raises(ConfigError, match=r"phases\.0\.duration: missing"):
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


EXTRAS = """
[components.shell]
tags = ["hull"]
role = "critical"

[components.wings]
tags = ["panel", "panel_back"]
role = "shadow_only"
closed = false

[thin.panel]
back_tag = "panel_back"

[[panels]]
mesh = "vehicle.obj"
tag = "ram_panel"

[[retag]]
tag = "hull_heavy"
tags = ["hull"]
box = [[0.4, -1, -1], [1, 1, 1]]
"""


def test_components_thin_panels_and_retags(folder):
    case = load_case(write(folder, make_case_text() + EXTRAS))
    assert [c.name for c in case.components] == ["shell", "wings"]
    assert case.components[1].role == "shadow_only" and not case.components[1].closed
    assert case.thin == {"panel": "panel_back"}
    assert case.panels[0].tag == "ram_panel" and case.panels[0].length_unit == "m"
    rule = case.retags[0]
    assert rule.tag == "hull_heavy" and rule.tags == ("hull",) and rule.box == ((0.4, -1, -1), (1, 1, 1))
    components, index = case.component_of_tags(("hull", "panel", "panel_back", "ram_panel"))
    assert [components[i].name for i in index] == ["shell", "wings", "wings", "ram_panel"]
    assert components[-1].role == "critical"
    assert case.input_files[:2] == [case.path, case.mesh_paths[0]]


@pytest.mark.parametrize(
    ("old", "new", "key", "words"),
    [
        ('role = "shadow_only"', 'role = "ignored"', "components.wings.role", "must be one of critical, shadow_only"),
        ('tags = ["panel", "panel_back"]', 'tags = ["hull"]', "components.wings.tags", "already in component 'shell'"),
        ("box = [[0.4, -1, -1], [1, 1, 1]]", "box = [[1, 1, 1], [0, 0, 0]]", "retag.0.box", "min <= max"),
        ('tags = ["hull"]\nbox', 'tagz = ["hull"]\nbox', "retag.0.tagz", "unknown key"),
    ],
)
def test_extra_section_mistakes(folder, old, new, key, words):
    text = make_case_text() + EXTRAS.replace(old, new)
    path = write(folder, text)
    with pytest.raises(ConfigError) as caught:
        load_case(path)
    assert f": {key}: " in str(caught.value) and words in str(caught.value)


def test_retag_needs_a_criterion(folder):
    text = make_case_text() + '\n[[retag]]\ntag = "x"\n'
    with pytest.raises(ConfigError, match=r"retag\.0: select faces with at least one of"):
        load_case(write(folder, text))


def test_variant_extends_a_baseline(folder):
    write(folder, make_case_text())
    sub = folder / "variants"
    sub.mkdir()
    variant = sub / "heavy.toml"
    variant.write_text(
        'extends = "../case.toml"\ntitle = "heavier hull"\n\n[requirement]\npnp = 0.95\n\n'
        "[shields.hull]\nrear_wall_thickness = 0.5\n\n"
        '[[retag]]\ntag = "panel"\nbox = [[0, 0, 0], [1, 1, 1]]\n',
        encoding="utf-8",
    )
    case = load_case(variant)
    # Paths of the base resolve against the base's folder; tables merge key by key.
    assert case.mesh_paths == ((folder / "vehicle.obj").resolve(),)
    assert case.shields["hull"]["rear_wall_thickness"] == 0.5
    assert case.shields["hull"]["bumper_thickness"] == 0.1
    assert case.title == "heavier hull" and case.pnp_requirement == 0.95
    assert len(case.retags) == 1 and case.phases[0].perigee_altitude == 400.0
    assert [p for p, _ in case.sources] == [variant.resolve(), (folder / "case.toml").resolve()]
    # An error in a key the base states is located in the base file.
    assert case.where("phases", 0, "altitude").startswith(f"{(folder / 'case.toml').resolve()}:")
    assert case.where("shields", "hull", "rear_wall_thickness") == f"{variant.resolve()}:8"


def test_extends_loops_and_missing_bases(folder):
    a, b = folder / "a.toml", folder / "b.toml"
    a.write_text('extends = "b.toml"\n', encoding="utf-8")
    b.write_text('extends = "a.toml"\n', encoding="utf-8")
    with pytest.raises(ConfigError, match="extends itself"):
        load_case(a)
    a.write_text('extends = "nowhere.toml"\n', encoding="utf-8")
    with pytest.raises(ConfigError, match=r"a.toml:1: extends: .*does not exist"):
        load_case(a)


def test_requirements(folder):
    text = make_case_text() + "\n[requirement]\npnp = 0.99\n\n[components.shell]\ntags = [\"hull\"]\npnp_requirement = 0.995\n"
    case = load_case(write(folder, text))
    assert case.pnp_requirement == 0.99 and case.components[0].pnp_requirement == 0.995
    with pytest.raises(ConfigError, match=r"requirement\.pnp: must be a probability"):
        load_case(write(folder, make_case_text() + "\n[requirement]\npnp = 1.5\n"))


@pytest.mark.parametrize(
    ("body", "key", "words"),
    [
        ('tag = "wing"\nchanges = { wall_thickness = 0.2 }', "upgrades.0.tag", "no [shields.wing] table"),
        ('tag = "panel"', "upgrades.0", "give either changes"),
        ('tag = "panel"\nchanges = { wall_thickness = 0.2 }\nshield = { equation = "threshold_diameter", diameter = 0.1 }',
         "upgrades.0", "not both"),
        ('tag = "panel"\nchanges = {}', "upgrades.0.changes", "is empty"),
        ('tag = "panel"\nchanges = { equation = "christiansen_1993" }', "upgrades.0.changes", "cannot change 'equation'"),
        ('tag = "panel"\nchanges = { wall_thickness = 0.2 }\ncolour = "red"', "upgrades.0.colour", "unknown key"),
    ],
)
def test_upgrade_mistakes(folder, body, key, words):
    path = write(folder, make_case_text() + f"\n[[upgrades]]\n{body}\n")
    with pytest.raises(ConfigError) as caught:
        load_case(path)
    assert f": {key}: " in str(caught.value) or f": {key} " in str(caught.value)
    assert words in str(caught.value)


def test_upgrades_apply_changes_and_add_up_across_variants(folder):
    write(folder, make_case_text() + '\n[[upgrades]]\ntag = "panel"\nchanges = { wall_thickness = 0.2 }\n')
    variant = folder / "variant.toml"
    variant.write_text('extends = "case.toml"\n\n[[upgrades]]\nname = "hull B"\ntag = "hull"\n'
                       'shield = { equation = "threshold_diameter", diameter = 0.5 }\n'
                       '\n[[upgrades]]\nname = "hull B"\ntag = "hull"\nchanges = { standoff = 20.0 }\n',
                       encoding="utf-8")
    with pytest.raises(ConfigError, match="repeats the upgrade name 'hull B'"):
        load_case(variant)
    variant.write_text(variant.read_text(encoding="utf-8").replace('name = "hull B"\ntag = "hull"\nchanges',
                                                                   'tag = "hull"\nchanges'), encoding="utf-8")
    case = load_case(variant)
    panel, hull_b, hull_c = case.upgrades
    assert panel.definition == {**case.shields["panel"], "wall_thickness": 0.2}
    assert panel.name == "panel: wall_thickness = 0.2"
    assert hull_b.definition == {"equation": "threshold_diameter", "diameter": 0.5}
    assert hull_c.definition["standoff"] == 20.0 and hull_c.definition["bumper_thickness"] == 0.1


def test_density_laws_by_name(folder):
    text = make_case_text(**{"solar_flux = 100.0": 'solar_flux = 100.0\nprojectile_density = "kessler_1991"',
                             "projectile_density = 1.0": 'projectile_density = "ssp_30425"'})
    case = load_case(write(folder, text))
    assert case.debris.projectile_density == "kessler_1991"
    assert case.meteoroid.projectile_density == "ssp_30425"
    text = make_case_text(**{"projectile_density = 1.0": 'projectile_density = "kessler_1991"'})
    with pytest.raises(ConfigError, match=r"environment.meteoroid.projectile_density: must be a "
                                          r"density in g cm⁻³ or one of: ssp_30425"):
        load_case(write(folder, text))
