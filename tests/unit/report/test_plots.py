"""The report's matplotlib plots: drawn when their data exist, skipped when not."""

import json
import logging

import numpy as np
import pytest
from matplotlib.image import imread

from pockmark.report.hotspots import pareto_curve
from pockmark.report.plots import make_plots, plot_size_breakdown, plot_sky_map


@pytest.fixture
def summary(run_dir):
    return json.loads((run_dir / "summary.json").read_text())


def test_every_plot_is_drawn_when_the_summary_has_the_data(summary, tmp_path):
    curve = pareto_curve([1.0, 3.0, 0.5], [1.0, 1.0, 2.0])
    made = make_plots(summary, curve, tmp_path)
    names = sorted(p.path.name for p in made)
    assert names == [
        "pareto.png",
        "risk_by_component.png",
        "risk_by_direction.png",
        "risk_by_size.png",
        "risk_by_tag.png",
    ]
    for picture in made:
        image = imread(picture.path)
        assert image.shape[0] > 200 and image.shape[1] > 300
        assert picture.title and picture.caption
    pareto = next(p for p in made if p.path.name == "pareto.png")
    assert "50% of the critical risk lies on" in pareto.caption


def test_size_and_direction_plots_are_skipped_without_their_keys(summary, tmp_path):
    del summary["by_size"], summary["by_direction"]
    made = make_plots(summary, pareto_curve([1.0], [1.0]), tmp_path)
    assert sorted(p.path.name for p in made) == [
        "pareto.png",
        "risk_by_component.png",
        "risk_by_tag.png",
    ]
    assert not (tmp_path / "risk_by_size.png").exists()


def test_pareto_plot_is_skipped_without_critical_risk(summary, tmp_path):
    made = make_plots(summary, pareto_curve([0.0], [1.0]), tmp_path)
    assert "pareto.png" not in [p.path.name for p in made]


def test_malformed_breakdowns_are_skipped_with_a_warning(tmp_path, caplog):
    with caplog.at_level(logging.WARNING, logger="pockmark"):
        assert (
            plot_size_breakdown(
                {"debris": {"edges_cm": [0.1, 1.0], "expected_penetrations": [1, 2]}},
                tmp_path / "s.png",
            )
            is None
        )
        assert (
            plot_sky_map(
                {"debris": {"directions": [[1, 0, 0]], "expected_penetrations": [1, 2]}},
                tmp_path / "d.png",
            )
            is None
        )
    assert "2 edges for 2 bins" in caplog.text and "1 directions for 2 values" in caplog.text
    assert not list(tmp_path.iterdir())


def test_sky_map_of_directions_filling_the_sphere(tmp_path):
    n = 300
    k = np.arange(n) + 0.5
    polar, azimuth = np.arccos(1 - 2 * k / n), np.pi * (1 + 5**0.5) * k
    directions = np.c_[
        np.cos(azimuth) * np.sin(polar), np.sin(azimuth) * np.sin(polar), np.cos(polar)
    ]
    values = np.maximum(directions[:, 0], 0.0)
    picture = plot_sky_map(
        {"meteoroid": {"directions": directions.tolist(), "expected_penetrations": values}},
        tmp_path / "sky.png",
    )
    assert picture is not None and picture.path.is_file()


def test_size_breakdown_starting_at_zero_is_drawn(tmp_path, caplog):
    # build_summary's bins start at 0 cm ("every size below the first edge") and end open.
    edges = [0.0, 0.001, 0.01, 0.1, 1.0, None]
    with caplog.at_level(logging.WARNING, logger="pockmark"):
        picture = plot_size_breakdown(
            {"debris": {"edges_cm": edges, "expected_penetrations": [0.0, 0.1, 0.5, 0.3, 0.1]}},
            tmp_path / "s.png",
        )
    assert picture is not None and (tmp_path / "s.png").stat().st_size > 0
    assert "not drawn" not in caplog.text
