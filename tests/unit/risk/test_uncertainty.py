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
