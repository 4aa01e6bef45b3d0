"""Off-screen pictures of the vehicle (skipped where off-screen rendering does not work)."""

import numpy as np
import pytest
from matplotlib.image import imread

from pockmark.report import pictures
from pockmark.report.html import load_run


def test_risk_limits_start_at_the_smallest_positive_value_and_keep_zeros():
    clim, shown = pictures.risk_limits(np.array([0.0, 1e-3, 1e-2, 0.0]))
    assert clim == (1e-3, 1e-2)
    np.testing.assert_array_equal(shown, [0.0, 1e-3, 1e-2, 0.0])


def test_risk_limits_span_at_most_the_set_number_of_decades():
    clim, shown = pictures.risk_limits(np.array([1e-12, 1.0, 0.0]), decades=6)
    assert clim == pytest.approx((1e-6, 1.0))
    # A tiny positive value is raised to the bottom of the scale, not shown as zero.
    np.testing.assert_allclose(shown, [1e-6, 1.0, 0.0])
    assert pictures.risk_limits(np.zeros(3))[0] is None


def test_decade_ticks():
    assert pictures.decade_ticks(2e-6, 1.4) == pytest.approx([1e-5, 1e-4, 1e-3, 1e-2, 1e-1, 1.0])
    assert pictures.decade_ticks(2.0, 3.0) == [2.0, 3.0]


def test_back_sides_of_thin_sheets_move_behind_the_sheet():
    vertices = np.array([[0.0, 0, 0], [1, 0, 0], [0, 1, 0]])
    triangles = np.array([[0, 1, 2], [0, 2, 1]])
    moved_vertices, moved = pictures.separate_back_sides(vertices, triangles, [0, 1], fraction=0.01)
    np.testing.assert_array_equal(moved[0], [0, 1, 2])
    # The back copy (normal −z) now sits a little below the sheet, on its own vertices.
    assert set(moved[1]) == {3, 4, 5}
    np.testing.assert_allclose(moved_vertices[moved[1]][:, 2], -0.01 * np.sqrt(2))


@pytest.fixture(scope="module")
def can_render():
    available, reason = pictures.rendering_available()
    if not available:
        pytest.skip(f"off-screen rendering is not available here: {reason}")


def _grey_pixels(image):
    rgb = image[..., :3]
    neutral = (np.ptp(rgb, axis=-1) < 0.05) & (rgb.mean(axis=-1) > 0.25) & (rgb.mean(axis=-1) < 0.8)
    return int(neutral.sum())


def test_pictures_are_rendered_off_screen(can_render, run_dir, tmp_path):
    run = load_run(run_dir)
    views = [v for v in pictures.VIEWS if v[0] in ("xpos", "xneg", "iso1")]
    made = pictures.render_views(
        run.vertices, run.triangles, run.cells, tmp_path, views=views, window_size=(480, 360)
    )
    names = [p.path.name for p in made]
    assert names == [
        "views_risk_xpos.png",
        "views_risk_xneg.png",
        "views_risk_iso1.png",
        "views_tags_iso1.png",
        "views_shadowed_iso1.png",
    ]
    images = {p.path.name: imread(p.path) for p in made}
    for image in images.values():
        assert image.shape[:2] == (360, 480)
        # Not a blank frame: the vehicle, legend and colour bar bring many colours.
        colours = np.unique((image[..., :3] * 255).astype(np.uint8).reshape(-1, 3), axis=0)
        assert len(colours) > 20
    # The hull's −x side carries no risk: seen from −x it is grey, seen from +x it is coloured.
    assert _grey_pixels(images["views_risk_xneg.png"]) > 5 * _grey_pixels(
        images["views_risk_xpos.png"]
    )
    assert "Grey (0 on the scale)" in made[0].caption
