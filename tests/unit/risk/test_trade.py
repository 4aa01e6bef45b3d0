"""Shield trade study: candidates evaluated from the run's stored exposure, and the plan."""

import dataclasses
import math
import warnings

import pytest

from pockmark.errors import ConfigError, ModelRangeWarning
from pockmark.io.config import load_case
from pockmark.report.summary import build_summary
from pockmark.risk.assess import assess
from pockmark.risk.trade import tag_penetrations, trade_study

UPGRADES = """
[[upgrades]]
name = "thick hull wall"
tag = "hull"
changes = { rear_wall_thickness = 0.6 }

[[upgrades]]
tag = "panel"
[upgrades.shield]
equation = "christiansen_1993"
bumper_thickness = 0.1
bumper_material = "Al6061-T6"
standoff = 5.0
rear_wall_thickness = 0.2
rear_wall_material = "Al6061-T6"

[[upgrades]]
name = "same hull"
tag = "hull"
changes = { rear_wall_thickness = 0.3 }
"""


@pytest.fixture
def case(shadowed_box_case):
    with shadowed_box_case.open("a", encoding="utf-8") as handle:
        handle.write(UPGRADES)
    return load_case(shadowed_box_case)


@pytest.fixture
def study(case):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ModelRangeWarning)
        run = assess(case)
        return run, trade_study(run, steps=(1.5, 2.0))


def _by_name(result):
    return {entry["name"]: entry for entry in result["candidates"]}


def test_baseline_is_the_runs_total(study):
    run, result = study
    assert result["baseline"]["expected_penetrations"] == pytest.approx(
        build_summary(run)["expected_penetrations"], rel=1e-12)
    assert sum(t["share"] for t in result["tags"]) == pytest.approx(1.0)


@pytest.mark.parametrize("name, tag, changes", [
    ("thick hull wall", "hull", {"rear_wall_thickness": 0.6}),
    ("panel: christiansen_1993", "panel", None),
])
def test_candidate_equals_a_full_rerun_with_that_shield(case, study, name, tag, changes):
    """The stored exposure reproduces a complete rerun of the case with the tag's shield
    changed (same geometry, directions and sampling): exact to round-off."""
    _, result = study
    entry = _by_name(result)[name]
    upgrade = next(u for u in case.upgrades if u.tag == tag and (changes is None or u.name == name))
    rerun_case = dataclasses.replace(case, shields={**case.shields, tag: upgrade.definition})
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ModelRangeWarning)
        rerun = assess(rerun_case)
    n_rerun = build_summary(rerun)["expected_penetrations"]
    assert result["baseline"]["expected_penetrations"] - entry["penetrations_removed"] == \
        pytest.approx(n_rerun, rel=1e-10)
    assert entry["pnp_alone"] == pytest.approx(math.exp(-n_rerun), rel=1e-10)
    assert tag_penetrations(rerun, tag, rerun.shields[tag]) == pytest.approx(
        entry["tag_penetrations_after"], rel=1e-10)


def test_unchanged_shield_removes_nothing_and_adds_no_mass(study):
    entry = _by_name(study[1])["same hull"]
    assert entry["penetrations_removed"] == pytest.approx(0.0, abs=1e-15)
    assert entry["mass_added_kg"] == pytest.approx(0.0, abs=1e-9)


def test_mass_is_areal_density_times_area(study):
    """Doubling the 3 mm rear wall of 2219 (2.84 g cm⁻³) on the hull's 6 m² adds
    0.3 cm × 2.84 g cm⁻³ = 8.52 kg m⁻² × 6 m² = 51.12 kg (arithmetic)."""
    entry = _by_name(study[1])["thick hull wall"]
    assert entry["mass_added_kg"] == pytest.approx(0.3 * 2.84 * 10 * 6.0, rel=1e-9)
    assert entry["penetrations_removed"] > 0
    assert entry["removed_per_kg"] == pytest.approx(
        entry["penetrations_removed"] / entry["mass_added_kg"])


def test_steps_thicken_each_resisting_layer(study):
    names = _by_name(study[1])
    for tag, key, value in (("hull", "bumper_thickness", 0.1), ("hull", "rear_wall_thickness", 0.3),
                            ("panel", "wall_thickness", 0.1)):
        for factor in (1.5, 2.0):
            assert f"{tag}: {key} {value:g} -> {value * factor:.4g} cm" in names


def test_candidates_are_ranked_and_the_plan_is_consistent(study):
    _, result = study
    scores = [e["removed_per_kg"] for e in result["candidates"]
              if e["removed_per_kg"] is not None and e["penetrations_removed"] > 0]
    assert scores == sorted(scores, reverse=True)
    plan = result["plan"]
    n = result["baseline"]["expected_penetrations"]
    mass = 0.0
    for step in plan["steps"]:
        n -= step["penetrations_removed"]
        mass += step["mass_added_kg"]
        assert step["penetrations_removed"] > 0
        assert step["expected_penetrations"] == pytest.approx(n)
        assert step["cumulative_mass_added_kg"] == pytest.approx(mass)
        assert step["pnp"] == pytest.approx(math.exp(-n))
    # without a requirement the plan runs until no candidate removes more risk
    assert plan["met"] is None and plan["steps"]


def test_plan_stops_at_the_requirement(case):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ModelRangeWarning)
        run = assess(case)
        open_ended = trade_study(run, steps=(1.5, 2.0))
        target = open_ended["plan"]["steps"][0]["pnp"]
        run.case = dataclasses.replace(case, pnp_requirement=target * (1 - 1e-12))
        result = trade_study(run, steps=(1.5, 2.0))
    assert result["plan"]["met"] is True and len(result["plan"]["steps"]) == 1


def test_shadow_only_tags_are_not_traded(shadowed_box_case):
    with shadowed_box_case.open("a", encoding="utf-8") as handle:
        handle.write(UPGRADES + '\n[components.shade]\ntags = ["panel"]\nrole = "shadow_only"\n')
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ModelRangeWarning)
        result = trade_study(assess(load_case(shadowed_box_case)), steps=(1.5,))
    assert all(entry["tag"] == "hull" for entry in result["candidates"])
    assert any("'panel' does not count toward any requirement" in note for note in result["notes"])


def test_invalid_upgrade_shield_names_file_and_line(shadowed_box_case):
    with shadowed_box_case.open("a", encoding="utf-8") as handle:
        handle.write('\n[[upgrades]]\ntag = "hull"\nchanges = { standof = 3.0 }\n')
    case = load_case(shadowed_box_case)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ModelRangeWarning)
        run = assess(case)
    with pytest.raises(ConfigError, match=r"case\.toml:\d+: shield 'hull': unknown key 'standof'"):
        trade_study(run)


def test_plan_meets_a_component_requirement(shadowed_box_case):
    """With only a component requirement, the plan upgrades only that component's tags
    and stops when its PNP reaches the requirement."""
    with shadowed_box_case.open("a", encoding="utf-8") as handle:
        handle.write(UPGRADES)
    case = load_case(shadowed_box_case)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ModelRangeWarning)
        run = assess(case)
        hull_n = tag_penetrations(run, "hull", run.shields["hull"])
        need = math.exp(-0.5 * hull_n)  # half the hull's risk must go
        with shadowed_box_case.open("a", encoding="utf-8") as handle:
            handle.write(f'\n[components.shell]\ntags = ["hull"]\npnp_requirement = {need!r}\n')
        run = assess(load_case(shadowed_box_case))
        result = trade_study(run, steps=(1.5, 2.0, 4.0, 8.0))
    assert result["component_requirements"] == {"shell": need}
    plan = result["plan"]
    assert plan["met"] is True and plan["steps"]
    assert {step["tag"] for step in plan["steps"]} == {"hull"}
    (shell,) = [t for t in plan["targets"] if t["target"] == "component shell"]
    assert shell["met"] and shell["pnp"] >= need
