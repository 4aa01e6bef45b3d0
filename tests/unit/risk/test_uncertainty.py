"""Discretisation estimates and environment bands."""

import math

import pytest

from pockmark.risk.uncertainty import discretisation_estimate, environment_band


def test_environment_band_scales_each_source():
    band = environment_band({"debris": 0.1, "meteoroid": 0.02}, {"debris": 3.0, "meteoroid": 2.0})
    assert band["expected_penetrations_range"] == pytest.approx([0.1 / 3 + 0.01, 0.3 + 0.04])
    assert band["pnp_range"] == pytest.approx([math.exp(-0.34), math.exp(-(0.1 / 3 + 0.01))])
    assert environment_band({"debris": 0.1}, {})["pnp_range"] == pytest.approx([math.exp(-0.1)] * 2)


def test_discretisation_estimate_brackets_the_result():
    estimate = discretisation_estimate(0.2, 0.19, 0.5)
    assert estimate["estimated_error"] == pytest.approx(0.01)
    low, high = estimate["pnp_range"]
    assert low < math.exp(-0.2) < high


def test_ballistic_limit_band_equals_reruns_with_scaled_thresholds(tmp_path):
    """With constant-threshold shields, critical diameters ×/÷ f are the same as full reruns
    with thresholds d·f and d/f (exact for the run's discretisation)."""
    import dataclasses
    import warnings

    from pockmark.errors import ModelRangeWarning
    from pockmark.io.config import load_case
    from pockmark.report.summary import build_summary
    from pockmark.risk.assess import assess
    from pockmark.risk.uncertainty import ballistic_limit_band
    from tests.conftest import CASE_TEMPLATE, box, write_parts

    mesh = write_parts(tmp_path / "vehicle.obj", [("hull", box([1.0, 1.0, 1.0], [0, 0, 0])),
                                                  ("panel", box([0.02, 0.6, 0.6], [0.8, 0, 0]))])
    path = tmp_path / "case.toml"
    path.write_text(CASE_TEMPLATE.format(mesh=mesh.name) + "\n[uncertainty]\nballistic_limit = 1.5\n",
                    encoding="utf-8")
    case = load_case(path)
    assert case.ballistic_limit_factor == 1.5

    def with_thresholds(scale):
        shields = {"hull": {"equation": "threshold_diameter", "diameter": 0.2 * scale},
                   "panel": {"equation": "threshold_diameter", "diameter": 0.05 * scale}}
        return dataclasses.replace(case, shields=shields)

    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ModelRangeWarning)
        band = ballistic_limit_band(assess(with_thresholds(1.0)), 1.5)
        weaker = build_summary(assess(with_thresholds(1 / 1.5)))["expected_penetrations"]
        stronger = build_summary(assess(with_thresholds(1.5)))["expected_penetrations"]
    assert band["expected_penetrations_range"] == pytest.approx([stronger, weaker], rel=1e-10)
    assert band["pnp_range"][0] < band["pnp_range"][1]
