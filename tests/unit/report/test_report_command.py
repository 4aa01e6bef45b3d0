"""``pockmark report RUN_DIR``: (re)build the HTML report of an existing run."""

from click.testing import CliRunner

from pockmark.cli.report import report
from pockmark.report import plots


def invoke(*args):
    return CliRunner().invoke(report, [str(a) for a in args], catch_exceptions=False)


def test_report_is_written_and_not_overwritten_without_the_flag(run_dir, monkeypatch):
    monkeypatch.setattr(plots, "make_plots", lambda summary, pareto, out_dir: [])
    result = invoke(run_dir, "--no-pictures", "-q")
    assert result.exit_code == 0, result.output
    assert result.output.strip() == str(run_dir / "report.html")
    before = (run_dir / "report.html").stat().st_mtime_ns

    result = invoke(run_dir, "--no-pictures")
    assert result.exit_code == 1 and "--overwrite" in result.output
    assert (run_dir / "report.html").stat().st_mtime_ns == before

    result = invoke(run_dir, "--no-pictures", "--overwrite", "--title", "Second look")
    assert result.exit_code == 0, result.output
    assert "<title>Second look" in (run_dir / "report.html").read_text(encoding="utf-8")


def test_missing_or_empty_run_directory(tmp_path):
    result = invoke(tmp_path / "nowhere")
    assert result.exit_code == 2 and "RUN_DIR" in result.output
    result = invoke(tmp_path)
    assert result.exit_code == 1 and "summary.json" in result.output
