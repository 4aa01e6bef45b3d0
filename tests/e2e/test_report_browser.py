"""The HTML report opened in a real headless browser with the network off (issue 7).

Debian's chromium loads ``report.html`` from a ``file://`` URL, runs its scripts and dumps the
DOM. The test checks that the 3-D view drew (plotly's WebGL scene with a canvas), that the
tables and the plot images are there, that nothing outside the file was referenced, and that
the page logged no errors. The network is off: chromium runs in an empty network namespace
where ``unshare`` allows it, and is pointed at an unreachable proxy and resolver in any case.
"""

import json
import re
import shutil
import subprocess
from html.parser import HTMLParser
from pathlib import Path

import numpy as np
import pytest
import trimesh

from pockmark.io.results import write_faces_vtp
from pockmark.report.html import write_report

pytestmark = pytest.mark.e2e

CHROMIUM = shutil.which("chromium") or (
    "/usr/bin/chromium" if Path("/usr/bin/chromium").exists() else None
)

#: Console lines from the page that are browser performance notes, not errors of the page.
BENIGN = ("GL Driver Message", "willReadFrequently", "Slow network is detected")


def write_run(run_dir):
    """A box hull whose risk falls off from +x (−x carries none), as a run directory."""
    run_dir.mkdir(parents=True)
    box = trimesh.creation.box(extents=[1.0, 0.6, 0.8]).subdivide().subdivide()
    vertices, faces = np.asarray(box.vertices), np.asarray(box.faces)
    normals, areas = np.asarray(box.face_normals), np.asarray(box.area_faces)
    per_m2 = np.where(normals[:, 0] < -0.9, 0.0, 1e-3 * np.exp(3.0 * normals[:, 0]))
    penetrations = per_m2 * areas
    tags = np.where(normals[:, 2] > 0.9, "radiator", "wall")
    n = len(faces)
    write_faces_vtp(
        run_dir / "faces.vtp",
        vertices,
        faces,
        {
            "original_face_id": np.arange(n),
            "face_origin": np.zeros(n, int),
            "side": np.zeros(n, int),
            "shield_tag": tags,
            "component": np.full(n, "body"),
            "critical": np.ones(n, int),
            "area_m2": areas,
            "expected_impacts": 1e3 * penetrations,
            "expected_penetrations": penetrations,
            "penetrations_per_m2": per_m2,
            "shadowed_fraction": np.zeros(n),
        },
    )
    total = float(penetrations.sum())

    def group(selected):
        value = float(penetrations[selected].sum())
        return {
            "area_m2": float(areas[selected].sum()),
            "expected_impacts": 1e3 * value,
            "expected_penetrations": value,
            "pnp": float(np.exp(-value)),
            "role": "critical",
        }

    summary = {
        "title": "Browser test box",
        "pnp": float(np.exp(-total)),
        "expected_penetrations": total,
        "expected_impacts": 1e3 * total,
        "duration_years": 1.0,
        "impact_diameter_cm": 0.01,
        "faces": n,
        "requirement": {"pnp": 0.999, "met": False, "margin": float(np.exp(-total) - 0.999)},
        "by_component": {"body": dict(group(np.ones(n, bool)), tags=["radiator", "wall"])},
        "by_tag": {
            t: dict(group(tags == t), faces=int((tags == t).sum())) for t in ("wall", "radiator")
        },
        "by_source": {
            "debris": {
                "expected_impacts": 1e3 * total,
                "expected_penetrations": total,
                "pnp": float(np.exp(-total)),
            }
        },
        "by_phase": [
            {
                "name": "one",
                "duration_years": 1.0,
                "expected_impacts": 1e3 * total,
                "expected_penetrations": total,
                "pnp": float(np.exp(-total)),
            }
        ],
        "by_size": {
            "debris": {
                "edges_cm": [0.01, 0.1, 1.0, None],
                "expected_penetrations": [0.2 * total, 0.7 * total, 0.1 * total],
            }
        },
        "cautions": ["Browser test caution."],
    }
    (run_dir / "summary.json").write_text(json.dumps(summary), encoding="utf-8")
    return run_dir


def network_off_prefix():
    """A command prefix that runs a program without any network, or [] where none works."""
    if not shutil.which("unshare"):
        return []
    for prefix in (["unshare", "--net"], ["unshare", "--net", "--map-root-user"]):
        try:
            if subprocess.run([*prefix, "true"], capture_output=True, timeout=10).returncode == 0:
                return prefix
        except (OSError, subprocess.TimeoutExpired):
            continue
    return []


class DomScan(HTMLParser):
    def __init__(self):
        super().__init__()
        self.links, self.ids, self.classes, self.canvases, self.images = [], set(), set(), 0, 0
        self.body = {}
        self.table_rows = {}
        self._table = None

    def handle_starttag(self, tag, attrs):
        attributes = dict(attrs)
        for name in ("src", "href", "xlink:href", "action", "poster", "srcset"):
            value = attributes.get(name)
            if value and not value.startswith(("data:", "#", "blob:")):
                self.links.append((tag, name, value[:80]))
        if "id" in attributes:
            self.ids.add(attributes["id"])
        self.classes.update((attributes.get("class") or "").split())
        if tag == "body":
            self.body = attributes
        if tag == "canvas":
            self.canvases += 1
        if tag == "img" and (attributes.get("src") or "").startswith("data:image/png;base64,"):
            self.images += 1
        if tag == "table":
            self._table = attributes.get("id")
            self.table_rows[self._table] = 0
        if tag == "tr" and self._table is not None:
            self.table_rows[self._table] += 1


@pytest.mark.skipif(
    CHROMIUM is None, reason="chromium is not installed (apt-get install chromium; .ci/run does)"
)
def test_report_renders_offline_in_headless_chromium(tmp_path):
    run_dir = write_run(tmp_path / "run")
    report = write_report(run_dir, pictures=False)
    command = [
        *network_off_prefix(),
        CHROMIUM,
        "--headless",
        "--no-sandbox",
        "--disable-gpu",
        "--use-angle=swiftshader",
        "--enable-unsafe-swiftshader",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
        "--no-first-run",
        "--disable-extensions",
        "--proxy-server=http://127.0.0.1:9",
        "--host-resolver-rules=MAP * ~NOTFOUND",
        f"--user-data-dir={tmp_path / 'profile'}",
        "--enable-logging=stderr",
        "--v=0",
        "--virtual-time-budget=30000",
        "--dump-dom",
        report.as_uri(),
    ]
    result = subprocess.run(command, capture_output=True, text=True, timeout=120, check=False)
    assert result.returncode == 0, result.stderr[-3000:]
    dom = result.stdout
    scan = DomScan()
    scan.feed(dom)

    # The 3-D view drew: plotly laid out its scene and WebGL canvas, and the page's watcher saw it.
    assert scan.body.get("data-view3d") == "rendered", scan.body
    assert {"main-svg", "gl-container"} <= scan.classes and scan.canvases >= 1
    # Tables with rows, and the plots as embedded images.
    for table in (
        "table-components",
        "table-tags",
        "table-sources",
        "table-phases",
        "table-regions",
        "table-faces",
    ):
        assert scan.table_rows.get(table, 0) >= 2, table
    assert scan.images >= 4 and "Browser test box" in dom and 'id="verdict"' in dom
    # Nothing outside the file, before or after the scripts ran.
    assert scan.links == []

    # No errors: none caught by the page's own recorder, none in chromium's console log.
    assert "data-page-errors" not in scan.body
    page_lines = [
        line
        for line in result.stderr.splitlines()
        if ":CONSOLE" in line and report.as_uri() in line and not any(b in line for b in BENIGN)
    ]
    errors = [
        line
        for line in page_lines
        if re.search(r"Uncaught|Error|error|Failed|Refused|blocked", line)
    ]
    assert errors == [], "\n".join(errors)
    assert not re.search(r"net::ERR_\w+.*" + re.escape(report.name), result.stderr)
