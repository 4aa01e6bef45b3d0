"""The self-contained HTML report of a run directory.

:func:`write_report` reads a run directory (``summary.json`` and ``faces.vtp``), draws the
pictures and plots into ``pictures/`` and writes ``report.html``: one file that opens
offline, with every image embedded as base64 PNG and plotly.js inlined for the interactive
3-D view. It depends on the files only, not on the code that computed them, so it can be
rebuilt for any earlier run (``pockmark report RUN_DIR``).

The page leads with the verdict against the PNP requirement when the case states one, then
the headline numbers and where the risk sits; the tables, the environment and settings, the
manifest of inputs and versions, the cautions and the references follow.
"""

import base64
import html
import json
import logging
from concurrent.futures import ThreadPoolExecutor
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from pockmark.errors import FormatError
from pockmark.io.results import atomic_path
from pockmark.report import hotspots as _hotspots
from pockmark.report import pictures as _pictures
from pockmark.report import plots as _plots

log = logging.getLogger(__name__)

#: Most faces drawn in the interactive view; larger meshes are decimated for it (the pictures
#: and tables always use every face).
MAX_VIEW_FACES = 200_000

#: Rows of the hotspot-region and top-face tables.
TABLE_ROWS = 15

#: The references of the README's "References" section, in the same order and numbering.
#: The package can be installed without the README, so the list is kept here; a unit test
#: checks that it mirrors the README.
REFERENCES = (
    'D. J. Kessler, "Orbital debris environment for spacecraft in low Earth orbit," J. Spacecraft '
    "and Rockets 28(3):347–351, 1991, doi:10.2514/3.26250.",
    'D. J. Kessler, "Derivation of the collision probability between orbiting objects: the '
    "lifetimes of Jupiter's outer moons,\" Icarus 48:39–48, 1981, doi:10.1016/0019-1035(81)90151-2.",
    'E. Grün, H. A. Zook, H. Fechtig, R. H. Giese, "The collisional balance of the meteoritic '
    'complex," Icarus 62:244–272, 1985, doi:10.1016/0019-1035(85)90121-6.',
    "NASA SSP 30425 Rev. B, Space Station Program Natural Environment Definition for Design, 1994.",
    "B. J. Anderson, R. E. Smith (eds.), Natural Orbital Environment Guidelines for Use in "
    "Aerospace Vehicle Development, NASA TM-4527, 1994.",
    "ECSS-E-ST-10-04C, Space engineering — Space environment, ESA-ESTEC, 2008.",
    'B. G. Cour-Palais, "Hypervelocity impact in metals, glass and composites," Int. J. Impact '
    "Engineering 5:221–237, 1987, doi:10.1016/0734-743X(87)90040-0.",
    'E. L. Christiansen, "Design and performance equations for advanced meteoroid and debris '
    'shields," Int. J. Impact Engineering 14:145–156, 1993, doi:10.1016/0734-743X(93)90016-Z.',
    "E. L. Christiansen, Meteoroid/Debris Shielding, NASA TP-2003-210788, 2003.",
    'Á. González, "Measurement of areas on a sphere using Fibonacci and latitude–longitude '
    'lattices," Mathematical Geosciences 42:49–64, 2010, doi:10.1007/s11004-009-9257-x.',
    'K. Basu, A. B. Owen, "Low discrepancy constructions in the triangle," SIAM J. Numerical '
    "Analysis 53(2):743–761, 2015, doi:10.1137/140960463 (sample points on each face).",
    'I. Wald, S. Boulos, P. Shirley, "Ray tracing deformable scenes using dynamic bounding volume '
    'hierarchies," ACM Trans. Graphics 26(1), 2007, doi:10.1145/1189762.1206075 (binned SAH '
    "construction of the bounding-volume hierarchy).",
    'T. Möller, B. Trumbore, "Fast, minimum storage ray–triangle intersection," J. Graphics '
    "Tools 2(1):21–28, 1997, doi:10.1080/10867651.1997.10487468.",
    'E. L. Christiansen, J. L. Crews, J. E. Williamsen, J. H. Robinson, A. M. Nolen, "Enhanced '
    'meteoroid and orbital debris shielding," Int. J. Impact Engineering 17:217–228, 1995.',
    'R. Carriere, A. Cherniaev, "Hypervelocity impacts on satellite sandwich structures — a '
    'review of experimental findings and predictive models," Applied Mechanics 2:25–45, 2021, '
    "doi:10.3390/applmech2010003.",
    'B. G. Cour-Palais, J. L. Crews, "A multi-shock concept for spacecraft shielding," Int. J. '
    "Impact Engineering 10:135–146, 1990.",
    'S. Ryan, F. Schäfer, R. Destefanis, M. Lambert, "A ballistic limit equation for '
    'hypervelocity impacts on composite honeycomb sandwich panel satellite structures," '
    "Advances in Space Research 41:1152–1166, 2008, doi:10.1016/j.asr.2007.02.032.",
    'F. Schäfer, S. Ryan, M. Lambert, R. Putzar, "Ballistic limit equation for equipment placed '
    'behind satellite structure walls," Int. J. Impact Engineering 35:1784–1791, 2008, '
    "doi:10.1016/j.ijimpeng.2008.07.074.",
    "E. L. Christiansen et al., Handbook for Designing MMOD Protection, NASA/TM-2009-214785, "
    "2009.",
    "S. Ryan, pyBLOSSUM, an open-source library of ballistic-limit equations (MIT licence, "
    "commit c9aa929): the transcription in which the constants of 16–19 were read, and the "
    "compiled shots used as checks.",
)


@dataclass(frozen=True)
class RunData:
    """What the report reads from a run directory.

    Attributes
    ----------
    run_dir : Path
    summary : dict
        ``summary.json``.
    vertices : (n, 3) float
        Vertex positions [m], body frame.
    triangles : (m, 3) int
        Vertex indices of each face, in the order of ``faces.csv``.
    cells : dict of str to (m,) array
        The cell arrays of ``faces.vtp``.
    """

    run_dir: Path
    summary: dict
    vertices: np.ndarray
    triangles: np.ndarray
    cells: dict

    @property
    def n_faces(self):
        return len(self.triangles)

    @property
    def critical(self):
        """(m,) bool: faces that count towards the PNP."""
        return np.asarray(self.cells.get("critical", np.ones(self.n_faces)), dtype=bool)


def load_run(run_dir):
    """Read ``summary.json`` and ``faces.vtp`` of a run directory.

    Raises
    ------
    FormatError
        If a file is missing or unreadable, or lacks the per-face arrays the report needs.
    """
    import pyvista

    run_dir = Path(run_dir)
    summary_path, faces_path = run_dir / "summary.json", run_dir / "faces.vtp"
    for path in (summary_path, faces_path):
        if not path.is_file():
            raise FormatError(
                f"{run_dir}: no {path.name}; is this a run directory written by `pockmark run`?"
            )
    try:
        summary = json.loads(summary_path.read_text(encoding="utf-8"))
    except (OSError, ValueError, UnicodeDecodeError) as error:
        raise FormatError(f"{summary_path}: cannot read it ({error}); rerun the case") from None
    try:
        mesh = pyvista.read(faces_path)
    except Exception as error:  # VTK's readers raise assorted errors on damaged files
        raise FormatError(f"{faces_path}: cannot read it ({error}); rerun the case") from None
    if mesh.n_cells == 0 or not mesh.is_all_triangles:
        raise FormatError(
            f"{faces_path}: expected a triangle mesh with one cell per face; rerun the case"
        )
    cells = {name: np.asarray(mesh.cell_data[name]) for name in mesh.cell_data.keys()}
    required = ("expected_penetrations", "penetrations_per_m2", "shield_tag")
    missing = [name for name in required if name not in cells]
    if missing:
        raise FormatError(
            f"{faces_path}: no cell array {missing[0]!r}; was it written by pockmark?"
        )
    triangles = np.asarray(mesh.faces).reshape(-1, 4)[:, 1:].astype(np.int64)
    return RunData(run_dir, summary, np.asarray(mesh.points, dtype=np.float64), triangles, cells)


def _areas(run):
    if "area_m2" in run.cells:
        return np.asarray(run.cells["area_m2"], dtype=np.float64)
    corners = run.vertices[run.triangles]
    return 0.5 * np.linalg.norm(
        np.cross(corners[:, 1] - corners[:, 0], corners[:, 2] - corners[:, 0]), axis=1
    )


def write_report(run_dir, title=None, *, pictures=True, max_view_faces=MAX_VIEW_FACES):
    """Write ``report.html`` for a run directory, with its pictures in ``pictures/``.

    Parameters
    ----------
    run_dir : path-like
        A directory written by ``pockmark run`` (``summary.json``, ``faces.vtp``).
    title : str, optional
        Page title; default: the case's title.
    pictures : bool
        Render the off-screen vehicle pictures (skipped, with a note in the report, when
        rendering is unavailable here).
    max_view_faces : int
        Most faces in the interactive 3-D view.

    Returns
    -------
    Path
        The report file. Written atomically: an earlier report stays intact until the new
        one is complete.

    Raises
    ------
    FormatError
        If the run directory cannot be read.
    """
    run = load_run(run_dir)
    # The rendering probe takes a second or two in a subprocess; let it run meanwhile.
    with ThreadPoolExecutor(max_workers=1) as executor:
        probe = executor.submit(_pictures.rendering_available) if pictures else None
        return _write_report(run, title, probe, max_view_faces)


def _write_report(run, title, probe, max_view_faces):
    picture_dir = run.run_dir / "pictures"
    picture_dir.mkdir(exist_ok=True)
    areas = _areas(run)
    critical = run.critical
    tags = np.asarray(run.cells["shield_tag"]).astype(str)
    components = np.asarray(run.cells.get("component", tags)).astype(str)
    risk = np.asarray(run.cells["expected_penetrations"], dtype=np.float64)
    pareto = _hotspots.pareto_curve(risk, areas, critical)
    regions = _hotspots.hotspot_regions(
        run.vertices, run.triangles, tags, risk, critical, components, areas, limit=TABLE_ROWS
    )
    faces = _hotspots.top_faces(risk, areas, critical, limit=TABLE_ROWS)

    figures = _plots.make_plots(run.summary, pareto, picture_dir)
    views, view_note = [], ""
    if probe is not None:
        available, reason = probe.result()
        if available:
            try:
                views = _pictures.render_views(run.vertices, run.triangles, run.cells, picture_dir)
            except Exception as error:  # VTK raises assorted errors; the report must still be written
                log.warning("the pictures of the vehicle failed: %s", error)
                view_note = f"The pictures of the vehicle failed: {error}."
        else:
            log.warning("no pictures of the vehicle: %s", reason)
            view_note = f"No pictures of the vehicle: {reason}."
    else:
        view_note = "Pictures of the vehicle were not requested."
    viewer, viewer_note = interactive_view(run, max_view_faces)
    _remove_stale_pictures(picture_dir, [p.path for p in (*views, *figures)])

    page = _page(
        run,
        title or run.summary.get("title") or run.run_dir.name,
        pareto,
        regions,
        faces,
        views,
        view_note,
        figures,
        viewer,
        viewer_note,
    )
    path = run.run_dir / "report.html"
    with atomic_path(path) as temporary:
        temporary.write_text(page, encoding="utf-8")
    log.info("wrote %s (%.1f MB)", path, path.stat().st_size / 1e6)
    return path


def _remove_stale_pictures(picture_dir, kept):
    """Delete pictures an earlier report wrote that this one did not (e.g. a plot now skipped)."""
    kept = {Path(p).resolve() for p in kept}
    for pattern in ("views_*.png", "risk_by_*.png", "pareto.png"):
        for path in picture_dir.glob(pattern):
            if path.resolve() not in kept:
                path.unlink()


# --------------------------------------------------------------------------- 3-D view


def _decimated(run, target):
    """Fewer faces for the interactive view: quadric decimation of the front faces.

    Each new face takes the values of the nearest original face in position and orientation
    (back copies of thin sheets are left out, their fronts remain).
    """
    import pyvista
    from scipy.spatial import cKDTree

    sides = np.asarray(run.cells.get("side", np.zeros(run.n_faces)))
    front = np.flatnonzero(sides != 1)
    mesh = pyvista.PolyData.from_regular_faces(run.vertices, run.triangles[front]).clean()
    reduction = float(np.clip(1.0 - target / max(mesh.n_cells, 1), 0.0, 0.999))
    reduced = mesh.decimate(reduction) if reduction > 0 else mesh
    vertices = np.asarray(reduced.points, dtype=np.float64)
    triangles = np.asarray(reduced.faces).reshape(-1, 4)[:, 1:].astype(np.int64)

    def centres_and_normals(points, tris):
        corners = points[tris]
        normals = np.cross(corners[:, 1] - corners[:, 0], corners[:, 2] - corners[:, 0])
        lengths = np.linalg.norm(normals, axis=1, keepdims=True)
        return corners.mean(axis=1), np.divide(
            normals, lengths, out=np.zeros_like(normals), where=lengths > 0
        )

    scale = 0.05 * float(np.linalg.norm(np.ptp(run.vertices, axis=0)))
    old_centres, old_normals = centres_and_normals(run.vertices, run.triangles[front])
    new_centres, new_normals = centres_and_normals(vertices, triangles)
    tree = cKDTree(np.hstack([old_centres, scale * old_normals]))
    _, nearest = tree.query(np.hstack([new_centres, scale * new_normals]))
    source = front[nearest]
    cells = {name: np.asarray(values)[source] for name, values in run.cells.items()}
    cells.pop("side", None)
    return vertices, triangles, cells


def interactive_view(run, max_faces=MAX_VIEW_FACES):
    """The interactive 3-D view as an HTML fragment with plotly.js inlined.

    Faces of critical components are coloured by penetrations per m² (log scale, one trace
    per shield tag so that parts can be hidden from the legend); faces with no penetration are
    grey and shadow-only parts pale blue, as in the pictures.

    Returns
    -------
    (str, str)
        The fragment (empty when plotly is missing) and a note for the reader.
    """
    try:
        import plotly.graph_objects as go
        import plotly.io as pio
    except ImportError:
        return (
            "",
            "The interactive view needs plotly: `pip install plotly`, then `pockmark report RUN_DIR --overwrite`.",
        )
    note = ""
    if run.n_faces > max_faces:
        vertices, triangles, cells = _decimated(run, max_faces)
        note = (
            f"The mesh has {run.n_faces:,} faces; this view shows a simplified surface of "
            f"{len(triangles):,} faces, each coloured like the nearest original face (back sides of "
            "thin sheets left out). The pictures, tables and faces.vtp use every face."
        )
    else:
        vertices, triangles = _pictures.separate_back_sides(
            run.vertices, run.triangles, run.cells.get("side")
        )
        cells = run.cells
    n_faces = len(triangles)
    values = np.asarray(cells["penetrations_per_m2"], dtype=np.float64)
    critical = np.asarray(cells.get("critical", np.ones(n_faces)), dtype=bool)
    tags = np.asarray(cells["shield_tag"]).astype(str)
    components = np.asarray(cells.get("component", tags)).astype(str)
    clim, shown = _pictures.risk_limits(values[critical])
    intensity = np.zeros(n_faces)
    if clim is not None:
        intensity[critical] = np.log10(np.where(shown > 0, shown, clim[0]))
    cmap = _pictures.risk_colormap()
    colorscale = [[float(x), _hex(cmap(float(x)))] for x in np.linspace(0.0, 1.0, 11)]
    traces = []
    for tag in dict.fromkeys(tags.tolist()):
        in_tag = tags == tag
        component = components[np.flatnonzero(in_tag)[0]]
        is_critical = bool(critical[in_tag][0])
        label = f"{tag} ({component}{'' if is_critical else ', shadow-only'})"
        groups = []
        if is_critical and clim is not None:
            groups.append(("risk", in_tag & critical & (values > 0)))
            groups.append(("zero", in_tag & critical & ~(values > 0)))
        elif is_critical:
            groups.append(("zero", in_tag & critical))
        groups.append(("shadow", in_tag & ~critical))
        first = True
        for kind, selected in groups:
            faces = np.flatnonzero(selected)
            if faces.size == 0:
                continue
            used, local = np.unique(triangles[faces], return_inverse=True)
            local = local.reshape(-1, 3).astype(np.int32)
            points = vertices[used].astype(np.float32)
            options = dict(
                x=points[:, 0],
                y=points[:, 1],
                z=points[:, 2],
                i=local[:, 0],
                j=local[:, 1],
                k=local[:, 2],
                name=label,
                legendgroup=tag,
                showlegend=first,
                flatshading=True,
                lighting=dict(ambient=0.7, diffuse=0.45, specular=0.02, roughness=0.9, fresnel=0.0),
                hovertemplate=f"{html.escape(label)}<br>x %{{x:.2f}} m, y %{{y:.2f}} m, z %{{z:.2f}} m<extra></extra>",
            )
            if kind == "risk":
                options.update(
                    intensity=intensity[faces].astype(np.float32),
                    intensitymode="cell",
                    coloraxis="coloraxis",
                )
            else:
                options.update(
                    color=_pictures.ZERO_COLOR if kind == "zero" else _pictures.SHADOW_ONLY_COLOR
                )
            traces.append(go.Mesh3d(**options))
            first = False
    layout = dict(
        scene=dict(
            aspectmode="data",
            xaxis_title="x [m]",
            yaxis_title="y [m]",
            zaxis_title="z [m]",
            camera=dict(eye=dict(x=1.5, y=-1.5, z=1.1), up=dict(x=0, y=0, z=1)),
        ),
        margin=dict(l=0, r=0, t=10, b=0),
        height=640,
        paper_bgcolor="#ffffff",
        legend=dict(
            title=dict(text="shield tag (click to hide)"), itemsizing="constant", x=0.0, y=1.0
        ),
        font=dict(family="system-ui, -apple-system, Segoe UI, Helvetica, Arial, sans-serif"),
    )
    if clim is not None:
        low, high = np.log10(clim[0]), np.log10(clim[1])
        ticks = [float(np.log10(t)) for t in _pictures.decade_ticks(*clim)]
        layout["coloraxis"] = dict(
            colorscale=colorscale,
            cmin=low,
            cmax=high,
            colorbar=dict(
                title=dict(text="penetrations<br>per m²", side="top"),
                tickvals=ticks,
                ticktext=[
                    f"1e{int(round(t))}" if abs(t - round(t)) < 1e-9 else f"{10**t:.1e}"
                    for t in ticks
                ],
                len=0.75,
            ),
        )
    figure = go.Figure(data=traces, layout=layout)
    fragment = pio.to_html(
        figure,
        full_html=False,
        include_plotlyjs=True,
        div_id="view3d-plot",
        config={
            "displaylogo": False,
            "responsive": True,
            "toImageButtonOptions": {"filename": "pockmark_view"},
        },
    )
    return fragment, note


def _hex(rgba):
    return "#" + "".join(f"{int(round(255 * c)):02x}" for c in rgba[:3])


# --------------------------------------------------------------------------- formatting


def _e(text):
    return html.escape(str(text), quote=True)


def _pnp(value):
    if value is None:
        return "–"
    value = float(value)
    return f"{value:.5f}" if value >= 1e-3 else f"{value:.3g}"


def _num(value, digits=4):
    if value is None:
        return "–"
    value = float(value)
    if value == 0:
        return "0"
    return f"{value:.{digits}g}"


def _pct(value):
    return "–" if value is None or not np.isfinite(value) else f"{100 * float(value):.1f} %"


def _xyz(values, digits=2):
    # Round first so that -1e-17 reads 0.00, not -0.00.
    return "(" + ", ".join(f"{round(float(v), digits) + 0.0:.{digits}f}" for v in values) + ")"


def _table(headers, rows, numeric=(), caption=None, table_id=None):
    """An HTML table; ``numeric`` lists the column indices to right-align."""
    right = ' class="num"'
    head = "".join(f"<th{right if i in numeric else ''}>{h}</th>" for i, h in enumerate(headers))
    body = []
    for row in rows:
        cells = "".join(f"<td{right if i in numeric else ''}>{c}</td>" for i, c in enumerate(row))
        body.append(f"<tr>{cells}</tr>")
    ident = f' id="{_e(table_id)}"' if table_id else ""
    cap = f"<caption>{caption}</caption>" if caption else ""
    return (
        f'<div class="table-wrap"><table class="data"{ident}>{cap}<thead><tr>{head}</tr></thead>'
        f"<tbody>{''.join(body)}</tbody></table></div>"
    )


def _image(picture):
    data = base64.b64encode(Path(picture.path).read_bytes()).decode("ascii")
    return (
        f'<figure><img src="data:image/png;base64,{data}" alt="{_e(picture.title)}">'
        f"<figcaption><strong>{_e(picture.title)}.</strong> {_e(picture.caption)}</figcaption></figure>"
    )


def _long(text):
    """A path or hash in monospace that may break anywhere."""
    return f'<code class="long">{_e(text)}</code>'


def _key_values(mapping):
    rows = []
    for key, value in mapping.items():
        if isinstance(value, (dict, list)):
            value = json.dumps(value, ensure_ascii=False)
        rows.append((_e(key), f"<code>{_e(value)}</code>"))
    return _table(("setting", "value"), rows)


# --------------------------------------------------------------------------- page


_CSS = """
:root { --ink:#1f2933; --muted:#5c6b7a; --line:#d9dee4; --accent:#a3306a; --bg:#f6f7f9;
        --good:#1d6b3a; --goodbg:#e3f3e8; --bad:#9b1c1c; --badbg:#fbe6e6; }
* { box-sizing:border-box; }
body { margin:0; font:15px/1.5 system-ui,-apple-system,"Segoe UI",Helvetica,Arial,sans-serif;
       color:var(--ink); background:var(--bg); }
header.top { background:#20262e; color:#f3f4f6; padding:18px 28px 14px; }
header.top h1 { margin:0 0 4px; font-size:22px; font-weight:600; }
header.top p { margin:0; color:#c5ccd4; font-size:13px; }
nav { background:#2b323c; padding:6px 28px; font-size:13px; position:sticky; top:0; z-index:5; }
nav a { color:#dfe5ec; text-decoration:none; margin-right:16px; }
nav a:hover { text-decoration:underline; }
main { max-width:1400px; margin:0 auto; padding:18px 28px 60px; }
section { background:#fff; border:1px solid var(--line); border-radius:8px; padding:16px 22px;
          margin:18px 0; }
h2 { font-size:18px; margin:0 0 10px; }
h3 { font-size:15px; margin:18px 0 6px; }
.verdict { border-radius:8px; padding:14px 20px; margin:18px 0 0; font-size:18px; border:2px solid; }
.verdict.met { background:var(--goodbg); color:var(--good); border-color:var(--good); }
.verdict.not-met { background:var(--badbg); color:var(--bad); border-color:var(--bad); }
.verdict small { display:block; font-size:13px; color:var(--ink); margin-top:4px; }
.cards { display:flex; flex-wrap:wrap; gap:12px; }
.card { flex:1 1 190px; border:1px solid var(--line); border-radius:8px; padding:10px 14px; background:#fbfcfd; }
.card .label { font-size:12px; color:var(--muted); text-transform:uppercase; letter-spacing:.04em; }
.card .value { font-size:24px; font-weight:600; font-variant-numeric:tabular-nums; }
.card .sub { font-size:12px; color:var(--muted); }
ul.findings li { margin:4px 0; }
.note { color:var(--muted); font-size:13px; }
.warn { background:#fff6e0; border-left:4px solid #d99a00; padding:8px 12px; }
.table-wrap { overflow-x:auto; }
table.data { border-collapse:collapse; width:100%; font-size:13px; margin:6px 0 12px; }
table.data caption { text-align:left; color:var(--muted); font-size:12.5px; padding:2px 0 6px; caption-side:top; }
table.data th, table.data td { border-bottom:1px solid var(--line); padding:4px 7px; text-align:left;
                               vertical-align:top; }
table.data th { background:#f0f2f5; font-weight:600; }
table.data th.num { text-align:right; }
table.data td.num { text-align:right; font-variant-numeric:tabular-nums; white-space:nowrap; }
table.data tr:hover td { background:#fafbfc; }
code { font:12px/1.4 ui-monospace,SFMono-Regular,Menlo,Consolas,monospace; }
code.long { word-break:break-all; }
.gallery { display:grid; grid-template-columns:repeat(auto-fill,minmax(520px,1fr)); gap:14px; }
figure { margin:0; }
figure img { width:100%; height:auto; border:1px solid var(--line); border-radius:6px; background:#fff; }
figcaption { font-size:12.5px; color:var(--muted); margin-top:4px; }
#view3d-plot { width:100%; }
details summary { cursor:pointer; color:var(--muted); }
ol.refs li { margin:3px 0; font-size:13.5px; }
footer { color:var(--muted); font-size:12px; text-align:center; padding:10px; }
"""


#: Runs first: records script errors so that the page can say when something failed to show.
_ERROR_RECORDER = """
(function () {
  var seen = [];
  function record(kind, text) {
    seen.push(kind + ": " + text);
    var box = document.getElementById("page-errors");
    if (box) { box.hidden = false; box.textContent = "This page reported errors while loading: " + seen.join(" | "); }
    if (document.body) { document.body.setAttribute("data-page-errors", String(seen.length)); }
  }
  window.addEventListener("error", function (event) { record("error", event.message || String(event)); });
  window.addEventListener("unhandledrejection", function (event) { record("rejected", String(event.reason)); });
  var original = console.error;
  console.error = function () {
    record("console", Array.prototype.join.call(arguments, " "));
    return original.apply(console, arguments);
  };
})();
"""

#: Runs after the 3-D view's script: marks the page when the view has drawn, or says it did not.
_VIEW_WATCH = """
(function () {
  var tries = 0;
  function check() {
    var plot = document.getElementById("view3d-plot");
    if (plot && plot.querySelector("canvas") && plot._fullLayout) {
      document.body.setAttribute("data-view3d", "rendered");
      return;
    }
    if (++tries < 150) { setTimeout(check, 200); return; }
    document.body.setAttribute("data-view3d", "failed");
    var status = document.getElementById("view3d-status");
    if (status) {
      status.hidden = false;
      status.textContent = "The 3-D view did not draw: this browser may lack WebGL. The pictures below show the same colours.";
    }
  }
  check();
})();
"""


def _verdict(summary):
    requirement = summary.get("requirement")
    if not isinstance(requirement, dict) or "met" not in requirement:
        return ""
    met = bool(requirement["met"])
    word = "MET" if met else "NOT MET"
    required = requirement.get("pnp")
    margin = requirement.get("margin")
    allowed = requirement.get("allowed_expected_penetrations")
    detail = [f"PNP {_pnp(summary.get('pnp'))} against the required {_pnp(required)}"]
    if margin is not None:
        detail.append(f"margin {float(margin):+.5f} in PNP")
    if allowed is not None:
        detail.append(
            f"expected penetrations {_num(summary.get('expected_penetrations'))} against at most {_num(allowed)} allowed"
        )
    return (
        f'<div class="verdict {"met" if met else "not-met"}" id="verdict">'
        f"<strong>Requirement {word}</strong>: the probability of no penetration must be at least "
        f"{_pnp(required)}.<small>{_e('; '.join(detail))}.</small></div>"
    )


def _cards(summary, pareto):
    duration = summary.get("duration_years")
    diameter = summary.get("impact_diameter_cm")
    cards = [
        (
            "Probability of no penetration",
            _pnp(summary.get("pnp")),
            "critical components, whole mission",
        ),
        (
            "Expected penetrations",
            _num(summary.get("expected_penetrations")),
            "critical components",
        ),
        (
            "Expected impacts",
            _num(summary.get("expected_impacts")),
            f"particles ≥ {float(diameter) * 10:g} mm, every face"
            if diameter is not None
            else "every face",
        ),
        (
            "Mission",
            f"{float(duration):.3g} yr" if duration is not None else "–",
            f"{len(summary.get('by_phase', []))} phase(s)",
        ),
    ]
    if pareto.total_risk > 0:
        cards.append(
            (
                "Risk concentration",
                _pct(pareto.area_for(0.5)),
                "of the critical area carries half of the risk",
            )
        )
    return (
        '<div class="cards">'
        + "".join(
            f'<div class="card"><div class="label">{_e(a)}</div><div class="value">{_e(b)}</div>'
            f'<div class="sub">{_e(c)}</div></div>'
            for a, b, c in cards
        )
        + "</div>"
    )


def _findings(summary, pareto, regions):
    items = []
    if regions:
        top = regions[0]
        items.append(
            f"The largest hotspot is a region of <strong>{_e(top.tag)}</strong> on "
            f"<strong>{_e(top.component)}</strong> facing {_e(_hotspots.facing_label(top.normal))}, centred at "
            f"{_xyz(top.centroid)} m ({_num(top.area, 3)} m²): it carries {_pct(top.share)} of the critical "
            "expected penetrations."
        )
        count = next((r.rank for r in regions if r.cumulative_share >= 0.8), None)
        if count is not None and count > 1:
            items.append(
                f"The top {count} regions carry {_pct(regions[count - 1].cumulative_share)} of the critical risk."
            )
    if pareto.total_risk > 0:
        items.append(
            f"Half of the critical risk lies on {_pct(pareto.area_for(0.5))} of the critical area, and 90 % on "
            f"{_pct(pareto.area_for(0.9))}: shielding there first buys the most."
        )
    sources = summary.get("by_source") or {}
    total = float(summary.get("expected_penetrations") or 0.0)
    if sources and total > 0:
        name, entry = max(
            sources.items(), key=lambda item: item[1].get("expected_penetrations", 0.0)
        )
        items.append(
            f"{_e(name.capitalize())} causes {_pct(entry['expected_penetrations'] / total)} of the critical penetrations."
        )
    items += _uncertainty_findings(summary)
    components = summary.get("by_component") or {}
    for name, entry in components.items():
        requirement = entry.get("requirement")
        if isinstance(requirement, dict) and "met" in requirement:
            word = "meets" if requirement["met"] else "does <strong>not</strong> meet"
            items.append(
                f"Component {_e(name)} {word} its requirement: PNP {_pnp(entry.get('pnp'))} against "
                f"{_pnp(requirement.get('pnp'))}."
            )
    checks = summary.get("checks")
    if isinstance(checks, dict) and checks.get("passed") is False:
        items.append(
            '<span class="warn">The breakdowns do not add up to the total ('
            f"{_e(', '.join(checks.get('failed', [])))}); treat the breakdowns with suspicion and report this.</span>"
        )
    if not items:
        return ""
    return '<ul class="findings">' + "".join(f"<li>{item}</li>" for item in items) + "</ul>"


def _uncertainty_findings(summary):
    """One line per uncertainty the run states: discretisation, environment, ballistic limits."""
    items = []
    for key, label in (("discretisation", "Resolution error"), ("convergence", "Convergence check")):
        entry = summary.get(key)
        if isinstance(entry, dict) and "pnp_range" in entry:
            low, high = entry["pnp_range"]
            items.append(f"{label}: about {_pct(entry.get('relative_error'))} of the expected "
                         f"penetrations ({_e(entry.get('method', ''))}), PNP {_pnp(low)}–{_pnp(high)}.")
    band = summary.get("environment_band")
    if isinstance(band, dict) and any(f != 1.0 for f in (band.get("factors") or {}).values()):
        low, high = band["pnp_range"]
        factors = ", ".join(f"{_e(s)} ×/÷{f:g}" for s, f in band["factors"].items())
        items.append(f"Environment band ({factors}): PNP {_pnp(low)}–{_pnp(high)}.")
    band = summary.get("ballistic_limit_band")
    if isinstance(band, dict):
        low, high = band["pnp_range"]
        items.append(f"Ballistic-limit band (every critical diameter ×/÷{band['factor']:g}): "
                     f"PNP {_pnp(low)}–{_pnp(high)}.")
    return items


def _group_table(summary, group, word, table_id):
    entries = summary.get(group) or {}
    total = float(summary.get("expected_penetrations") or 0.0)
    ranked = sorted(
        entries.items(),
        key=lambda item: (
            item[1].get("role") != "critical",
            -item[1].get("expected_penetrations", 0.0),
        ),
    )
    with_requirement = any("requirement" in e for e in entries.values())
    headers = [word, "role"]
    if group == "by_component":
        headers.append("shield tags")
    else:
        headers += ["faces", "equation", "areal density [kg m⁻²]"]
    headers += [
        "area [m²]",
        "expected impacts",
        "expected penetrations",
        "share of critical",
        "PNP",
    ]
    if with_requirement:
        headers.append("requirement")
    rows = []
    for name, entry in ranked:
        critical = entry.get("role", "critical") == "critical"
        row = [f"<strong>{_e(name)}</strong>", _e(entry.get("role", "critical").replace("_", "-"))]
        if group == "by_component":
            row.append(_e(", ".join(entry.get("tags", []))))
        else:
            row += [
                _e(entry.get("faces", "–")),
                _e(entry.get("equation", "–")),
                _num(entry.get("areal_density_kg_m2"), 3),
            ]
        share = entry["expected_penetrations"] / total if critical and total > 0 else None
        row += [
            _num(entry.get("area_m2"), 3),
            _num(entry.get("expected_impacts")),
            _num(entry.get("expected_penetrations")),
            _pct(share) if critical else "not counted",
            _pnp(entry.get("pnp")),
        ]
        if with_requirement:
            requirement = entry.get("requirement")
            if isinstance(requirement, dict) and "met" in requirement:
                row.append(
                    f"≥ {_pnp(requirement.get('pnp'))}: {'met' if requirement['met'] else '<strong>NOT MET</strong>'}"
                )
            else:
                row.append("–")
        rows.append(row)
    numeric = {
        i
        for i, h in enumerate(headers)
        if h not in (word, "role", "shield tags", "equation", "requirement")
    }
    return _table(headers, rows, numeric, table_id=table_id)


def _source_table(summary):
    total = float(summary.get("expected_penetrations") or 0.0)
    rows = [
        (
            f"<strong>{_e(name)}</strong>",
            _num(e.get("expected_impacts")),
            _num(e.get("expected_penetrations")),
            _pct(e["expected_penetrations"] / total) if total > 0 else "–",
            _pnp(e.get("pnp")),
        )
        for name, e in (summary.get("by_source") or {}).items()
    ]
    return _table(
        ("source", "expected impacts", "expected penetrations", "share", "PNP"),
        rows,
        {1, 2, 3, 4},
        caption="Penetrations and PNP count critical components; impacts count every face.",
        table_id="table-sources",
    )


def _phase_table(summary):
    phases = summary.get("by_phase") or []
    sources = list(dict.fromkeys(s for p in phases for s in (p.get("by_source") or {})))
    headers = ["phase", "duration [yr]", "expected impacts", "expected penetrations", "PNP"]
    headers += [f"{s} penetrations" for s in sources]
    rows = []
    for phase in phases:
        row = [
            f"<strong>{_e(phase.get('name', '–'))}</strong>",
            _num(phase.get("duration_years"), 3),
            _num(phase.get("expected_impacts")),
            _num(phase.get("expected_penetrations")),
            _pnp(phase.get("pnp")),
        ]
        row += [
            _num((phase.get("by_source") or {}).get(s, {}).get("expected_penetrations"))
            for s in sources
        ]
        rows.append(row)
    return _table(headers, rows, set(range(1, len(headers))), table_id="table-phases")


def _region_table(regions):
    if not regions:
        return '<p class="note">No face of a critical component carries risk.</p>'
    rows = [
        (
            r.rank,
            f"<strong>{_e(r.tag)}</strong>",
            _e(r.component),
            _e(_hotspots.facing_label(r.normal)),
            _xyz(r.centroid),
            _xyz(r.extent),
            len(r.faces),
            _num(r.area, 3),
            _pct(r.area_share),
            _num(r.expected_penetrations),
            _pct(r.share),
            _pct(r.cumulative_share),
            _num(r.penetrations_per_m2, 3),
        )
        for r in regions
    ]
    headers = (
        "#",
        "shield tag",
        "component",
        "facing",
        "centroid [m]",
        "extent x, y, z [m]",
        "faces",
        "area [m²]",
        "share of area",
        "expected penetrations",
        "share of risk",
        "cumulative",
        "per m²",
    )
    return _table(headers, rows, {0, 4, 5, 6, 7, 8, 9, 10, 11, 12}, table_id="table-regions")


def _face_table(run, faces):
    if not faces:
        return '<p class="note">No face of a critical component carries risk.</p>'
    corners = run.vertices[run.triangles[[f["face"] for f in faces]]]
    centroids = corners.mean(axis=1)
    rows = []
    tags = np.asarray(run.cells["shield_tag"]).astype(str)
    components = np.asarray(run.cells.get("component", tags)).astype(str)
    original = run.cells.get("original_face_id")
    sides = run.cells.get("side")
    for rank, (face, centroid) in enumerate(zip(faces, centroids, strict=True), start=1):
        index = face["face"]
        rows.append(
            (
                rank,
                index,
                "–" if original is None else int(original[index]),
                "back" if sides is not None and int(sides[index]) == 1 else "front",
                f"<strong>{_e(tags[index])}</strong>",
                _e(components[index]),
                _xyz(centroid, 3),
                _num(face["area_m2"], 3),
                _num(face["expected_penetrations"]),
                _num(face["penetrations_per_m2"], 3),
                _pct(face["share"]),
            )
        )
    headers = (
        "#",
        "face",
        "face in file",
        "side",
        "shield tag",
        "component",
        "centroid [m]",
        "area [m²]",
        "expected penetrations",
        "per m²",
        "share of risk",
    )
    return _table(headers, rows, {0, 1, 2, 6, 7, 8, 9, 10}, table_id="table-faces")


def _environment_section(summary):
    parts = []
    settings = summary.get("settings")
    if settings:
        parts.append("<h3>Analysis settings</h3>" + _key_values(settings))
    environment = summary.get("environment") or {}
    rows = []
    for phase, sources in environment.items():
        for source, fluxes in (sources or {}).items():
            for flux in fluxes if isinstance(fluxes, list) else [fluxes]:
                parameters = flux.get("parameters", {}) if isinstance(flux, dict) else {}
                simple = ", ".join(
                    f"{k} = {v}"
                    for k, v in parameters.items()
                    if isinstance(v, (int, float, str, bool)) or v is None
                )
                rows.append(
                    (
                        _e(phase),
                        _e(source),
                        f"<code>{_e(flux.get('model', '–'))}</code>",
                        _num(flux.get("mean_speed_km_s"), 3),
                        _num(flux.get("impact_flux_per_m2_year"), 3),
                        _e(flux.get("directions", "–")),
                        _e(simple),
                    )
                )
    if rows:
        parts.append(
            "<h3>Environment</h3>"
            + _table(
                (
                    "phase",
                    "source",
                    "model",
                    "mean speed [km s⁻¹]",
                    "impact flux [m⁻² yr⁻¹]",
                    "directions",
                    "parameters",
                ),
                rows,
                {3, 4, 5},
                caption="The impact flux is that of particles at least the impact diameter across a unit cross-section.",
            )
        )
        parts.append(
            "<details><summary>Every environment parameter (JSON)</summary><pre><code>"
            f"{_e(json.dumps(environment, indent=1, ensure_ascii=False))}</code></pre></details>"
        )
    shields = summary.get("shields") or {}
    if shields:
        rows = [
            (
                f"<strong>{_e(tag)}</strong>",
                f"<code>{_e(p.get('equation', '–'))}</code>",
                _e(", ".join(f"{k} = {v}" for k, v in p.items() if k != "equation")),
            )
            for tag, p in shields.items()
        ]
        parts.append(
            "<h3>Shield build-ups</h3>"
            + _table(("shield tag", "ballistic-limit equation", "parameters"), rows)
        )
    return "".join(parts) or '<p class="note">The summary holds no settings.</p>'


def _manifest_section(summary):
    parts = []
    inputs = summary.get("inputs") or {}
    rows = []
    case = inputs.get("case")
    if isinstance(case, dict):
        rows.append(("case file", _long(case.get("path", "–")), _long(case.get("sha256", "–"))))
    for item in inputs.get("files", []) or []:
        rows.append(("input file", _long(item.get("path", "–")), _long(item.get("sha256", "–"))))
    for key, value in (inputs.get("mesh") or {}).items():
        rows.append(("mesh", _e(key.replace("_", " ")), _long(value)))
    if rows:
        parts.append(
            "<h3>Inputs</h3>"
            + _table(
                ("kind", "path or item", "SHA-256"),
                rows,
                caption="Rerunning the case with these inputs and versions reproduces the run.",
            )
        )
    versions = summary.get("versions")
    if versions:
        parts.append(
            "<h3>Versions</h3>"
            + _table(
                ("package", "version"),
                [(_e(k), _e(v if v is not None else "not installed")) for k, v in versions.items()],
            )
        )
    checks = summary.get("checks")
    if isinstance(checks, dict):
        differences = checks.get("relative_difference", {}) or {}
        rows = [(_e(k.replace("_", " ")), f"{float(v):.1e}") for k, v in differences.items()]
        verdict = (
            "passed" if checks.get("passed") else f"FAILED ({', '.join(checks.get('failed', []))})"
        )
        parts.append(
            f"<h3>Consistency checks: {_e(verdict)}</h3>"
            + _table(
                ("breakdown", "relative difference from the total"),
                rows,
                {1},
                caption=f"Each breakdown must add up to the total within {checks.get('tolerance', '–')}.",
            )
        )
    timings = summary.get("timings")
    if timings:
        parts.append(
            "<h3>Timings</h3>"
            + _table(
                ("step", "seconds"),
                [(_e(k.replace("_", " ")), _e(v)) for k, v in timings.items()],
                {1},
            )
        )
    return "".join(parts) or '<p class="note">The summary holds no manifest.</p>'


def _page(run, title, pareto, regions, faces, views, view_note, figures, viewer, viewer_note):
    summary = run.summary
    version = (summary.get("versions") or {}).get("pockmark", "")
    area = summary.get("total_area_m2")
    subtitle = (
        f"Run directory {run.run_dir.name} · {summary.get('faces', run.n_faces):,} faces"
        + (f", {float(area):.3g} m²" if area is not None else "")
        + (f" · report by pockmark {version}" if version else "")
    )
    nav = [
        ("headline", "Headline"),
        ("view3d", "3-D view"),
        ("pictures", "Pictures"),
        ("plots", "Plots"),
        ("tables", "Tables"),
        ("hotspots", "Hotspots"),
        ("environment", "Environment"),
        ("manifest", "Manifest"),
        ("cautions", "Cautions"),
        ("references", "References"),
    ]
    out = [
        "<!DOCTYPE html>",
        '<html lang="en"><head><meta charset="utf-8">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f"<title>{_e(title)} — penetration risk report</title>",
        f"<style>{_CSS}</style>",
        f"<script>{_ERROR_RECORDER}</script></head><body>",
        f'<header class="top"><h1>{_e(title)}</h1><p>{_e(subtitle)}</p></header>',
        "<nav>" + "".join(f'<a href="#{a}">{_e(b)}</a>' for a, b in nav) + "</nav>",
        "<main>",
        '<p class="warn" id="page-errors" hidden></p>',
        _verdict(summary),
        '<section id="headline"><h2>Headline</h2>',
        _cards(summary, pareto),
        _findings(summary, pareto, regions),
        '<p class="note">PNP counts penetrations of critical components only; shadow-only parts '
        "(for example solar arrays whose damage is tolerated) shield the rest of the vehicle but their own "
        "penetration is not a failure. These are model estimates; read the cautions below.</p>",
        "</section>",
        '<section id="view3d"><h2>Interactive 3-D view</h2>',
        '<p class="note">Drag to turn, scroll to zoom, click a shield tag in the legend to hide it. '
        "Colour: expected penetrations per m² over the mission on faces of critical components (log scale); "
        "grey: no penetration expected; pale blue: shadow-only parts. Axes are the vehicle's body axes.</p>",
        f'<p class="note">{_e(viewer_note)}</p>' if viewer_note else "",
        '<p class="warn" id="view3d-status" hidden></p>',
        viewer + f"<script>{_VIEW_WATCH}</script>"
        if viewer
        else '<p class="warn">No interactive view in this report.</p>',
        "</section>",
        '<section id="pictures"><h2>Pictures of the vehicle</h2>',
        f'<p class="warn">{_e(view_note)}</p>' if view_note else "",
        '<div class="gallery">' + "".join(_image(p) for p in views) + "</div>" if views else "",
        "</section>",
        '<section id="plots"><h2>Plots</h2>',
        '<div class="gallery">' + "".join(_image(p) for p in figures) + "</div>"
        if figures
        else '<p class="note">No plot could be drawn from this run.</p>',
        ""
        if (summary.get("by_size") and summary.get("by_direction"))
        else '<p class="note">This run\'s summary has no size or direction breakdown, so those plots are left out.</p>',
        "</section>",
        '<section id="tables"><h2>Breakdowns</h2>',
        "<h3>By component</h3>",
        _group_table(summary, "by_component", "component", "table-components"),
        "<h3>By shield tag</h3>",
        _group_table(summary, "by_tag", "shield tag", "table-tags"),
        "<h3>By source</h3>",
        _source_table(summary),
        "<h3>By phase</h3>",
        _phase_table(summary),
        "</section>",
        '<section id="hotspots"><h2>Hotspots</h2>',
        "<h3>Regions</h3>",
        '<p class="note">A region is a connected patch of faces of one shield tag: faces sharing an edge '
        "(after merging coincident vertices) whose normals differ by at most "
        f"{_hotspots.CREASE_ANGLE:g}°, so the sides of a box are separate regions. Ranked by the critical "
        "expected penetrations they carry; facing is the region's mean outward normal in body axes.</p>",
        _region_table(regions),
        "<h3>Faces</h3>",
        '<p class="note">"face" is the row of faces.csv and the cell of faces.vtp; "face in file" the face\'s '
        "index in the mesh file it came from.</p>",
        _face_table(run, faces),
        "</section>",
        '<section id="environment"><h2>Environment and settings</h2>',
        _environment_section(summary),
        "</section>",
        '<section id="manifest"><h2>Manifest</h2>',
        _manifest_section(summary),
        "</section>",
        '<section id="cautions"><h2>Cautions</h2><ul>',
        "".join(f"<li>{_e(c)}</li>" for c in summary.get("cautions", [])),
        "<li>The pictures and the interactive view show the values of faces.vtp; the hotspot regions are "
        "computed from them when the report is built.</li>",
        "</ul></section>",
        '<section id="references"><h2>References</h2><ol class="refs">',
        "".join(f"<li>{_e(r)}</li>" for r in REFERENCES),
        "</ol></section>",
        "</main>",
        f"<footer>pockmark {_e(version)} · self-contained report: every picture and script is inside this file.</footer>",
        "</body></html>",
    ]
    return "\n".join(part for part in out if part)
