"""``pockmark run``: analyse one case and write its run directory."""

import logging
import sys
import warnings
from pathlib import Path

import click


@click.command()
@click.argument("case_file", type=click.Path(path_type=Path))
@click.option("--out", "out_dir", required=True, type=click.Path(path_type=Path), help="Run directory to write.")
@click.option("--overwrite", is_flag=True, help="Replace the files of an earlier run in --out.")
@click.option(
    "--threads",
    type=click.IntRange(min=0),
    default=None,
    help="Threads for ray shadowing [0 = all cores; default: the case's setting].",
)
@click.option(
    "--convergence",
    is_flag=True,
    help="Also run at double the direction resolution and sampling, and report the change.",
)
@click.option(
    "--report/--no-report",
    default=True,
    help="Write report.html with pictures and plots (the default) or skip it.",
)
@click.option("-v", "--verbose", count=True, help="More log output on stderr (repeatable).")
@click.option("-q", "--quiet", count=True, help="Less output: no progress bar, warnings only.")
def run(case_file, out_dir, overwrite, threads, convergence, report, verbose, quiet):
    """Analyse CASE_FILE and write summary.json, faces.csv, faces.vtp and report.html to --out.

    \b
    Examples:
      pockmark run models/imager_sat/case.toml --out runs/imager_sat
      pockmark run case.toml --out runs/a --overwrite --threads 2 -q
    """
    from pockmark.cli._helpers import ProgressBar, configure_logging
    from pockmark.errors import ModelRangeWarning, PockmarkError

    configure_logging(verbose - quiet)
    log = logging.getLogger("pockmark")

    def show_warning(message, category, filename, lineno, file=None, line=None):
        if issubclass(category, ModelRangeWarning):
            log.warning("%s", message)
        else:
            log.debug("%s:%s: %s", filename, lineno, message)

    try:
        with warnings.catch_warnings():
            warnings.showwarning = show_warning
            warnings.simplefilter("default")
            summary = _run(
                case_file, out_dir, overwrite, threads, convergence, report, lambda label: ProgressBar(label, enabled=quiet == 0)
            )
    except PockmarkError as error:
        if verbose >= 2:
            raise
        raise click.ClickException(str(error)) from None
    from pockmark.report.summary import format_summary

    if quiet == 0:
        click.echo(format_summary(summary, out_dir))
    else:
        click.echo(f"PNP = {summary['pnp']:.6f}")
    sys.stdout.flush()


def _run(case_file, out_dir, overwrite, threads, convergence, report, progress_bar):
    import dataclasses

    from pockmark.errors import ModelRangeWarning
    from pockmark.io.config import load_case
    from pockmark.io.results import prepare_output_dir
    from pockmark.report.files import write_run
    from pockmark.report.summary import build_summary
    from pockmark.risk.assess import assess
    from pockmark.risk.uncertainty import (
        ballistic_limit_band,
        discretisation_estimate,
        environment_band,
        resolution_variant,
    )

    case = load_case(case_file)
    if threads is not None:
        case = dataclasses.replace(case, analysis=dataclasses.replace(case.analysis, threads=threads))
    prepare_output_dir(out_dir, case.input_files, overwrite=overwrite)
    assessment = assess(case, progress=progress_bar("ray shadowing"))
    summary = build_summary(assessment)
    penetrations = summary["expected_penetrations"]
    # The reruns repeat the main run's range warnings; those were shown once already.
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ModelRangeWarning)
        if case.resolution_check == "coarse":
            coarse = build_summary(assess(resolution_variant(case, 0.5), progress=progress_bar("coarse rerun")))
            summary["discretisation"] = discretisation_estimate(penetrations, coarse["expected_penetrations"], 0.5)
        if convergence:
            fine = build_summary(assess(resolution_variant(case, 2.0), progress=progress_bar("convergence run")))
            summary["convergence"] = discretisation_estimate(penetrations, fine["expected_penetrations"], 2.0)
    by_source = {source: entry["expected_penetrations"] for source, entry in summary["by_source"].items()}
    summary["environment_band"] = environment_band(by_source, case.uncertainty_factors or {})
    if case.ballistic_limit_factor is not None:
        summary["ballistic_limit_band"] = ballistic_limit_band(assessment, case.ballistic_limit_factor)
    write_run(assessment, summary, out_dir)
    if report:
        from pockmark.report.html import write_report

        write_report(out_dir)
    return summary
