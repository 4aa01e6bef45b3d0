"""Off-screen PNG pictures of the vehicle, coloured by risk, shield tag and shadowing.

The pictures are rendered with pyvista without a display. When ``DISPLAY`` is unset, VTK is
pointed at its EGL render window, which needs only the system's Mesa EGL libraries. A missing
OpenGL backend makes VTK kill the process instead of raising, so :func:`rendering_available`
first tries a tiny scene in a subprocess; callers skip the pictures when it fails.

Views are named by the body axis the camera looks from (``+x``, ``−z``, ...), never by a
mission term, because what the axes mean (flight direction, nadir) is set per case.
"""

import functools
import logging
import os
import subprocess
import sys
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from pockmark.io.results import atomic_path

log = logging.getLogger(__name__)

#: Legend title of the risk pictures and of the interactive view.
RISK_LABEL = "penetrations per m² over the mission"

#: Colour of faces of critical components that no particle penetrates (zero risk).
ZERO_COLOR = "#9da3aa"

#: Colour of faces of shadow-only components (they shadow, but their penetration is no failure).
SHADOW_ONLY_COLOR = "#b9cde2"

#: Colour of text in the pictures.
TEXT_COLOR = "#1f2933"

#: Background of every picture.
BACKGROUND = "#fbfbfd"

#: Qualitative colours for shield tags, distinguishable with the common colour-vision deficiencies
#: (Okabe and Ito's palette, with black replaced by a dark slate and two extra tones).
TAG_COLORS = (
    "#0072b2",
    "#e69f00",
    "#009e73",
    "#cc79a7",
    "#56b4e9",
    "#d55e00",
    "#f0e442",
    "#3c4655",
    "#8c6bb1",
    "#7fc97f",
)

#: The colour scale of the risk pictures spans at most this many decades below the maximum;
#: smaller positive values are drawn in the lowest colour.
RISK_DECADES = 6.0

#: Offset of the back copies of thin sheets along their normals, as a fraction of the bounding-box
#: diagonal, so that each side of a sheet shows its own colour instead of flickering.
BACK_SIDE_OFFSET = 5e-4

#: ``(file suffix, caption label, camera direction seen from, view-up)`` for the risk pictures.
VIEWS = (
    ("xpos", "seen from +x", (1.0, 0.0, 0.0), (0.0, 0.0, 1.0)),
    ("xneg", "seen from −x", (-1.0, 0.0, 0.0), (0.0, 0.0, 1.0)),
    ("zpos", "seen from +z", (0.0, 0.0, 1.0), (1.0, 0.0, 0.0)),
    ("zneg", "seen from −z", (0.0, 0.0, -1.0), (1.0, 0.0, 0.0)),
    ("iso1", "seen from (+x, −y, +z)", (1.0, -1.0, 0.8), (0.0, 0.0, 1.0)),
    ("iso2", "seen from (−x, +y, +z)", (-1.0, 1.0, 0.8), (0.0, 0.0, 1.0)),
)

_PROBE = (
    "import pyvista as pv; p = pv.Plotter(off_screen=True, window_size=(64, 64)); "
    "p.add_mesh(pv.Cube()); img = p.screenshot(return_img=True); p.close(); print(img.shape)"
)


@dataclass(frozen=True)
class Picture:
    """A PNG file written for the report, with what it shows."""

    path: Path
    title: str
    caption: str


def _render_environment():
    env = dict(os.environ)
    if not env.get("DISPLAY"):
        env.setdefault("VTK_DEFAULT_OPENGL_WINDOW", "vtkEGLRenderWindow")
    return env


@functools.lru_cache(maxsize=1)
def rendering_available(timeout=60.0):
    """Whether off-screen rendering works here, tried once per process in a subprocess.

    Returns
    -------
    (bool, str)
        The verdict and, when it fails, why (the end of the subprocess's error output).
    """
    try:
        result = subprocess.run(
            [sys.executable, "-c", _PROBE],
            env=_render_environment(),
            capture_output=True,
            text=True,
            timeout=timeout,
            check=False,
        )
    except subprocess.TimeoutExpired:
        return False, f"the rendering test did not finish within {timeout:g} s"
    except OSError as error:
        return False, f"the rendering test could not start ({error})"
    if result.returncode == 0:
        return True, ""
    lines = [line for line in result.stderr.splitlines() if line.strip()]
    detail = lines[-1] if lines else f"exit status {result.returncode}"
    return False, (
        f"off-screen rendering failed ({detail}); install the EGL libraries "
        "(e.g. `apt-get install libegl1 libegl-mesa0 libgl1-mesa-dri`) or OSMesa (`libosmesa6`)"
    )


def risk_colormap():
    """The colour map of the risk pictures: matplotlib's perceptual 'magma' without its black end."""
    from matplotlib import colormaps
    from matplotlib.colors import ListedColormap

    return ListedColormap(colormaps["magma"](np.linspace(0.12, 0.97, 256)), name="pockmark_risk")


def risk_limits(values, decades=RISK_DECADES):
    """Colour limits of a log-scaled risk picture and the values to draw.

    Parameters
    ----------
    values : (m,) float
        Penetrations per unit area of the faces shown [m⁻²].
    decades : float
        Largest span of the scale below the maximum [decades].

    Returns
    -------
    (clim, shown)
        ``clim`` = ``(low, high)`` from the smallest positive value (raised to ``high`` ×
        10^−decades when the values span more), or None when nothing is positive; ``shown``
        has positive values below ``low`` raised to ``low`` and zeros kept at 0, so that only
        zeros take the "below" colour.
    """
    values = np.asarray(values, dtype=np.float64)
    positive = values[values > 0]
    if positive.size == 0:
        return None, values
    high = float(positive.max())
    low = max(float(positive.min()), high * 10.0**-decades)
    if low >= high:
        low, high = high / 10.0, high * 10.0**0.05
    shown = np.where(values > 0, np.maximum(values, low), 0.0)
    return (low, high), shown


def separate_back_sides(vertices, triangles, sides, fraction=BACK_SIDE_OFFSET):
    """Move the back copies of thin sheets a little behind the sheet, for display only.

    A thin sheet is analysed as two coincident faces with opposite winding (``side`` 1 for the
    back copy). Drawn as they are, the two flicker; shifted along the back copy's own normal by
    ``fraction`` of the bounding-box diagonal, each side shows its own value.

    Returns
    -------
    vertices : (n', 3) float
    triangles : (m, 3) int
        Same faces in the same order; back copies refer to new, shifted vertices.
    """
    vertices = np.asarray(vertices, dtype=np.float64)
    triangles = np.asarray(triangles, dtype=np.int64)
    if sides is None:
        return vertices, triangles
    back = np.flatnonzero(np.asarray(sides) == 1)
    if back.size == 0:
        return vertices, triangles
    corners = vertices[triangles[back]]
    normals = np.cross(corners[:, 1] - corners[:, 0], corners[:, 2] - corners[:, 0])
    lengths = np.linalg.norm(normals, axis=1, keepdims=True)
    normals = np.divide(normals, lengths, out=np.zeros_like(normals), where=lengths > 0)
    shift = fraction * float(np.linalg.norm(np.ptp(vertices, axis=0)))
    moved = (corners + shift * normals[:, None, :]).reshape(-1, 3)
    triangles = triangles.copy()
    triangles[back] = len(vertices) + np.arange(3 * back.size).reshape(-1, 3)
    return np.vstack([vertices, moved]), triangles


def _polydata(vertices, triangles, faces):
    import pyvista

    return pyvista.PolyData.from_regular_faces(vertices, triangles[faces])


def _new_plotter(window_size):
    import pyvista

    if not os.environ.get("DISPLAY"):
        os.environ.setdefault("VTK_DEFAULT_OPENGL_WINDOW", "vtkEGLRenderWindow")
    plotter = pyvista.Plotter(off_screen=True, window_size=window_size)
    plotter.set_background(BACKGROUND)
    plotter.add_axes(line_width=3, color=TEXT_COLOR, viewport=(0.0, 0.0, 0.16, 0.2))
    # No anti-aliasing: on a software renderer it doubles the time per picture for edges that
    # look the same at this size.
    return plotter


def _add_mesh(plotter, mesh, **options):
    # More ambient light than pyvista's default so that colours on faces turned from the light
    # stay readable against the legend.
    return plotter.add_mesh(mesh, ambient=0.3, diffuse=0.75, specular=0.0, render=False, **options)


def _text(plotter, text, x, y, size=17, centred=True):
    """A text line at a normalised viewport position (not scaled with the window)."""
    import vtk

    actor = vtk.vtkTextActor()
    actor.SetInput(text)
    properties = actor.GetTextProperty()
    properties.SetFontSize(size)
    properties.SetColor(*_rgb(TEXT_COLOR))
    if centred:
        properties.SetJustificationToCentered()
    actor.GetPositionCoordinate().SetCoordinateSystemToNormalizedViewport()
    actor.GetPositionCoordinate().SetValue(x, y)
    plotter.add_actor(actor, render=False)
    return actor


def _rgb(color):
    from matplotlib.colors import to_rgb

    return to_rgb(color)


def _color_bar(plotter, key, title, ticks, fmt, below_label=None):
    """Place the colour bar of the actor added under ``key``: ticks below, title above."""
    import vtk

    bar = plotter.scalar_bars[key]
    bar.SetTitle("")
    labels = vtk.vtkDoubleArray()
    for tick in ticks:
        labels.InsertNextValue(float(tick))
    bar.SetNumberOfLabels(len(ticks))
    bar.SetUseCustomLabels(True)
    bar.SetCustomLabels(labels)
    bar.SetLabelFormat(fmt)
    bar.SetTextPad(4)
    bar.SetTextPositionToPrecedeScalarBar()
    if below_label is not None:
        bar.SetBelowRangeAnnotation(below_label)
    _text(plotter, title, 0.5, 0.115)


def _bar_arguments(key, below=False):
    return {
        "title": key,
        "vertical": False,
        "position_x": 0.27,
        "position_y": 0.03,
        "width": 0.46,
        "height": 0.075,
        "title_font_size": 1,
        "label_font_size": 15,
        "color": TEXT_COLOR,
        "below_label": "0" if below else None,
    }


def _legend(plotter, entries, top=0.97):
    """A legend box of colour swatches with dark text, in the upper right corner.

    VTK's legend colours each label like its symbol, which makes pale or yellow entries
    unreadable; swatch images keep the text dark.
    """
    import vtk
    from vtkmodules.util.numpy_support import numpy_to_vtk

    legend = vtk.vtkLegendBoxActor()
    legend.SetNumberOfEntries(len(entries))
    for index, (label, color) in enumerate(entries):
        swatch = np.empty((16, 16, 3), dtype=np.uint8)
        swatch[:] = np.round(np.asarray(_rgb(color)) * 255).astype(np.uint8)
        swatch[[0, -1], :] = swatch[:, [0, -1]] = 70
        image = vtk.vtkImageData()
        image.SetDimensions(16, 16, 1)
        image.GetPointData().SetScalars(
            numpy_to_vtk(swatch.reshape(-1, 3), deep=True, array_type=vtk.VTK_UNSIGNED_CHAR)
        )
        legend.SetEntry(index, image, f" {label}", _rgb(TEXT_COLOR))
    legend.GetEntryTextProperty().SetColor(*_rgb(TEXT_COLOR))
    legend.UseBackgroundOn()
    legend.SetBackgroundColor(1.0, 1.0, 1.0)
    legend.SetBackgroundOpacity(0.9)
    legend.BorderOff()
    legend.SetPadding(4)
    height = min(0.8, 0.036 * len(entries) + 0.01)
    width = min(0.4, 0.03 + 0.0095 * max(len(str(label)) for label, _ in entries))
    legend.GetPositionCoordinate().SetCoordinateSystemToNormalizedViewport()
    legend.GetPositionCoordinate().SetValue(0.99 - width, top - height)
    legend.GetPosition2Coordinate().SetCoordinateSystemToNormalizedViewport()
    legend.GetPosition2Coordinate().SetValue(width, height)
    plotter.add_actor(legend, render=False)
    return legend


def _snap(plotter, path, direction, view_up, label):
    # Each render of a large mesh costs about a second on a software renderer: render once,
    # for the screenshot.
    plotter.view_vector(direction, viewup=view_up, render=False)
    plotter.reset_camera(render=False)
    plotter.camera.zoom(1.15)
    text = _text(plotter, label, 0.01, 0.955, size=16, centred=False)
    plotter.render()
    with atomic_path(path) as temporary:
        plotter.screenshot(str(temporary))
    plotter.remove_actor(text, render=False)


def decade_ticks(low, high):
    """Powers of ten within ``[low, high]`` (both ends if there are fewer than two)."""
    first, last = int(np.ceil(np.log10(low) - 1e-9)), int(np.floor(np.log10(high) + 1e-9))
    ticks = [10.0**k for k in range(first, last + 1)]
    return ticks if len(ticks) >= 2 else [low, high]


def render_views(
    vertices, triangles, cells, out_dir, views=VIEWS, window_size=(1000, 760), prefix="views_"
):
    """Render the risk, tag and shadowing pictures of a vehicle into ``out_dir``.

    Parameters
    ----------
    vertices : (n, 3) float
        Vertex positions [m] in the body frame.
    triangles : (m, 3) int
        Vertex indices of each face.
    cells : dict of str to (m,) array
        Per-face arrays as in ``faces.vtp``. Uses ``penetrations_per_m2`` [m⁻²] and, when
        present, ``critical``, ``side``, ``shield_tag`` and ``shadowed_fraction`` [unitless].
    out_dir : path-like
        Folder for the PNG files (created if needed).
    views : sequence
        ``(suffix, label, direction, view_up)`` of each risk picture; see :data:`VIEWS`.
    window_size : (int, int)
        Picture size [px].
    prefix : str
        Start of every file name.

    Returns
    -------
    list of Picture
        The files written: ``<prefix>risk_<suffix>.png`` for each view, then
        ``<prefix>tags_iso1.png`` and ``<prefix>shadowed_iso1.png`` when the arrays exist.
    """
    out_dir = Path(out_dir)
    out_dir.mkdir(parents=True, exist_ok=True)
    n_faces = len(triangles)
    if "penetrations_per_m2" not in cells:
        raise KeyError(
            "cells has no 'penetrations_per_m2' array; pass the cell arrays of a run's faces.vtp"
        )
    critical = np.asarray(cells.get("critical", np.ones(n_faces)), dtype=bool)
    vertices, triangles = separate_back_sides(vertices, triangles, cells.get("side"))
    pictures = []
    plotter = _new_plotter(window_size)
    try:
        pictures += _risk_pictures(
            plotter, vertices, triangles, cells, critical, out_dir, views, prefix
        )
    finally:
        plotter.close()
    iso = next((v for v in views if v[0] == "iso1"), VIEWS[4])
    if "shield_tag" in cells:
        plotter = _new_plotter(window_size)
        try:
            pictures.append(_tag_picture(plotter, vertices, triangles, cells, out_dir, iso, prefix))
        finally:
            plotter.close()
    if "shadowed_fraction" in cells:
        plotter = _new_plotter(window_size)
        try:
            pictures.append(
                _shadow_picture(plotter, vertices, triangles, cells, out_dir, iso, prefix)
            )
        finally:
            plotter.close()
    return pictures


def _risk_pictures(plotter, vertices, triangles, cells, critical, out_dir, views, prefix):
    values = np.asarray(cells["penetrations_per_m2"], dtype=np.float64)
    critical_faces = np.flatnonzero(critical)
    shadow_faces = np.flatnonzero(~critical)
    clim, shown = risk_limits(values[critical_faces])
    legend = []
    if critical_faces.size:
        mesh = _polydata(vertices, triangles, critical_faces)
        if clim is None:
            _add_mesh(plotter, mesh, color=ZERO_COLOR)
            legend.append(["no critical penetration", ZERO_COLOR])
        else:
            mesh.cell_data["risk"] = shown
            _add_mesh(
                plotter,
                mesh,
                scalars="risk",
                cmap=risk_colormap(),
                log_scale=True,
                clim=list(clim),
                below_color=ZERO_COLOR,
                scalar_bar_args=_bar_arguments("risk", below=True),
            )
            _color_bar(plotter, "risk", RISK_LABEL, decade_ticks(*clim), "%.0e")
    if shadow_faces.size:
        _add_mesh(plotter, _polydata(vertices, triangles, shadow_faces), color=SHADOW_ONLY_COLOR)
        legend.append(["shadow-only part (not in PNP)", SHADOW_ONLY_COLOR])
    if legend:
        _legend(plotter, legend)
    floor = ""
    if clim is not None and np.any(
        (values[critical_faces] > 0) & (values[critical_faces] < clim[0])
    ):
        floor = f" Values below {clim[0]:.1e} m⁻² are drawn in the lowest colour."
    zero = (
        " Grey (0 on the scale): no penetration expected."
        if clim is not None and np.any(shown == 0)
        else ""
    )
    pictures = []
    for suffix, label, direction, view_up in views:
        path = out_dir / f"{prefix}risk_{suffix}.png"
        _snap(plotter, path, direction, view_up, f"{label} (body axes)")
        pictures.append(
            Picture(
                path,
                f"Risk per unit area, {label}",
                f"Expected penetrations per m² of each face of a critical component over the mission, "
                f"log scale, {label} in the vehicle's body axes.{zero}{floor}",
            )
        )
    return pictures


def _tag_picture(plotter, vertices, triangles, cells, out_dir, view, prefix):
    tags = np.asarray(cells["shield_tag"]).astype(str)
    legend = []
    for index, name in enumerate(dict.fromkeys(tags.tolist())):
        color = TAG_COLORS[index % len(TAG_COLORS)]
        _add_mesh(
            plotter, _polydata(vertices, triangles, np.flatnonzero(tags == name)), color=color
        )
        legend.append([name, color])
    _legend(plotter, legend)
    suffix, label, direction, view_up = view
    path = out_dir / f"{prefix}tags_{suffix}.png"
    _snap(plotter, path, direction, view_up, f"shield tags, {label} (body axes)")
    return Picture(
        path, f"Shield tags, {label}", "Each face coloured by the shield build-up assigned to it."
    )


def _shadow_picture(plotter, vertices, triangles, cells, out_dir, view, prefix):
    from matplotlib import colormaps
    from matplotlib.colors import ListedColormap

    mesh = _polydata(vertices, triangles, np.arange(len(triangles)))
    mesh.cell_data["shadowed"] = np.asarray(cells["shadowed_fraction"], dtype=np.float64)
    cmap = ListedColormap(colormaps["cividis"](np.linspace(0.0, 1.0, 256)), name="pockmark_shadow")
    _add_mesh(
        plotter,
        mesh,
        scalars="shadowed",
        cmap=cmap,
        clim=[0.0, 1.0],
        scalar_bar_args=_bar_arguments("shadowed"),
    )
    _color_bar(
        plotter,
        "shadowed",
        "share of impacts blocked by other parts of the vehicle",
        [0.0, 0.25, 0.5, 0.75, 1.0],
        "%.2f",
    )
    suffix, label, direction, view_up = view
    path = out_dir / f"{prefix}shadowed_{suffix}.png"
    _snap(plotter, path, direction, view_up, f"shadowing, {label} (body axes)")
    return Picture(
        path,
        f"Shadowing, {label}",
        "Share of each face's impacts that other parts of the vehicle block (0 = fully exposed, "
        "1 = fully shadowed), all sources together.",
    )
