"""The self-contained HTML report: content, order, offline-ness and graceful fallbacks."""

import re
import sys
from html.parser import HTMLParser
from pathlib import Path

import pytest

from pockmark.errors import FormatError
from pockmark.report import html as report_html
from pockmark.report import pictures, plots
from pockmark.report.html import REFERENCES, interactive_view, load_run, write_report

ROOT = Path(__file__).resolve().parents[3]


class LinkCollector(HTMLParser):
    """Every src/href-like attribute of the document's tags (script bodies are not tags)."""

    def __init__(self):
        super().__init__()
        self.links, self.ids, self.images = [], set(), 0

    def handle_starttag(self, tag, attrs):
        for name, value in attrs:
            if (
                name in ("src", "href", "xlink:href", "action", "data", "poster", "srcset")
                and value
            ):
                self.links.append((tag, name, value))
            if name == "id":
                self.ids.add(value)
        if tag == "img" and dict(attrs).get("src", "").startswith("data:image/png;base64,"):
            self.images += 1


def external_links(document):
    collector = LinkCollector()
    collector.feed(document)
    return [link for link in collector.links if not link[2].startswith(("data:", "#"))], collector


@pytest.fixture(scope="module")
def report(tmp_path_factory, make_run_dir):
    run_dir = make_run_dir(tmp_path_factory.mktemp("report") / "run")
    path = write_report(run_dir, pictures=False)
    return path, path.read_text(encoding="utf-8")


def test_report_is_written_with_its_plots_and_no_external_links(report):
    path, document = report
    assert path.name == "report.html" and (path.parent / "pictures" / "pareto.png").is_file()
    links, collector = external_links(document)
    assert links == []
    assert collector.images >= 5
    for ident in (
        "verdict",
        "headline",
        "view3d-plot",
        "table-components",
        "table-tags",
        "table-sources",
        "table-phases",
        "table-regions",
        "table-faces",
        "cautions",
        "references",
    ):
        assert ident in collector.ids, ident
    assert "plotly" in document.lower() and 'intensitymode":"cell"' in document.replace(" ", "")


def test_report_leads_with_the_requirement_verdict(report):
    _, document = report
    body = document[document.index("<body") :]
    assert body.index('id="verdict"') < body.index('id="headline"') < body.index('id="view3d"')
    assert "Requirement NOT MET" in body or "Requirement MET" in body
    assert "Test box with a panel" in body and "A test caution." in body


def test_report_holds_every_reference(report):
    _, document = report
    for reference in REFERENCES:
        assert report_html._e(reference) in document


def test_report_without_requirement_or_breakdowns(tmp_path, make_run_dir):
    run_dir = make_run_dir(tmp_path / "run", requirement=False, breakdowns=False)
    stale = run_dir / "pictures" / "risk_by_size.png"
    stale.parent.mkdir()
    stale.write_bytes(b"from an earlier report")
    document = write_report(run_dir, pictures=False).read_text(encoding="utf-8")
    assert 'id="verdict"' not in document
    assert "no size or direction breakdown" in document
    assert "risk_by_size" not in document
    assert not stale.exists()


def test_report_says_so_when_pictures_cannot_be_rendered(run_dir, monkeypatch):
    monkeypatch.setattr(pictures, "rendering_available", lambda: (False, "no OpenGL here"))
    monkeypatch.setattr(plots, "make_plots", lambda summary, pareto, out_dir: [])
    document = write_report(run_dir).read_text(encoding="utf-8")
    assert "No pictures of the vehicle: no OpenGL here." in document


def test_report_without_plotly_says_how_to_get_the_view(run_dir, monkeypatch):
    monkeypatch.setitem(sys.modules, "plotly", None)
    monkeypatch.setattr(plots, "make_plots", lambda summary, pareto, out_dir: [])
    document = write_report(run_dir, pictures=False).read_text(encoding="utf-8")
    assert "pip install plotly" in document and 'id="view3d-plot"' not in document


def test_large_meshes_are_simplified_in_the_interactive_view(run_dir):
    run = load_run(run_dir)
    fragment, note = interactive_view(run, max_faces=60)
    assert f"The mesh has {run.n_faces:,} faces" in note and "simplified surface" in note
    faces_shown = int(re.search(r"surface of ([\d,]+) faces", note).group(1).replace(",", ""))
    assert 0 < faces_shown <= 60
    assert "Mesh3d" in fragment or "mesh3d" in fragment
    assert interactive_view(run)[1] == ""


def test_unreadable_run_directory_is_refused(tmp_path):
    with pytest.raises(FormatError, match=r"no summary\.json; is this a run directory"):
        write_report(tmp_path)


def _readme_references():
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    section = text.split("## References", 1)[1]
    section = re.split(r"\n## ", section, maxsplit=1)[0]
    entries = re.findall(r"^(\d+)\. (.+?)(?=^\d+\. |^\s*$)", section, flags=re.M | re.S)
    return [(int(number), " ".join(body.split())) for number, body in entries]


@pytest.mark.skipif(not (ROOT / "README.md").is_file(), reason="README.md is not in this checkout")
def test_references_mirror_the_readme():
    entries = _readme_references()
    assert entries, "no numbered references found under '## References' in README.md"
    assert [n for n, _ in entries] == list(range(1, len(entries) + 1))
    assert len(REFERENCES) == len(entries), (
        "REFERENCES in report/html.py must have one entry per README reference"
    )
    for (number, body), ours in zip(entries, REFERENCES, strict=True):
        first_author = body.split(",")[0].replace("*", "").strip()
        assert first_author in ours, (
            f"README reference {number} ({first_author}) is not REFERENCES[{number - 1}]"
        )
        doi = re.search(r"doi:(\S+?)[.,]?(?:\s|$)", body)
        if doi:
            assert doi.group(1) in ours, f"README reference {number}: DOI {doi.group(1)} missing"


def test_report_states_the_uncertainty_bands(tmp_path, make_run_dir):
    """The discretisation error and the environment and ballistic-limit bands of the run's
    summary appear among the findings, with their PNP ranges."""
    import json

    run_dir = make_run_dir(tmp_path / "run")
    summary = json.loads((run_dir / "summary.json").read_text(encoding="utf-8"))
    summary["discretisation"] = {"method": "rerun at 0.5 × the resolution", "relative_error": 0.012,
                                 "pnp_range": [0.81, 0.83]}
    summary["environment_band"] = {"factors": {"debris": 3.0}, "pnp_range": [0.5, 0.9]}
    summary["ballistic_limit_band"] = {"factor": 1.2, "pnp_range": [0.7, 0.88]}
    (run_dir / "summary.json").write_text(json.dumps(summary), encoding="utf-8")
    document = write_report(run_dir, pictures=False).read_text(encoding="utf-8")
    assert "Resolution error: about 1.2 %" in document
    assert "Environment band (debris ×/÷3)" in document
    assert "Ballistic-limit band (every critical diameter ×/÷1.2)" in document
