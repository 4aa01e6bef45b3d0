"""``pockmark report``: (re)build the HTML report of an existing run directory."""

import logging
from pathlib import Path

import click


@click.command("report")
@click.argument("run_dir", type=click.Path(path_type=Path))
@click.option("--overwrite", is_flag=True, help="Replace an existing report.html and its pictures.")
@click.option("--title", default=None, help="Page title [default: the case's title].")
@click.option(
    "--no-pictures", is_flag=True, help="Skip the off-screen pictures of the vehicle (faster)."
)
@click.option("-v", "--verbose", count=True, help="More log output on stderr (repeatable).")
@click.option("-q", "--quiet", count=True, help="Less output: warnings only.")
def report(run_dir, overwrite, title, no_pictures, verbose, quiet):
    """Write RUN_DIR/report.html from the run's summary.json and faces.vtp.

    The report is one self-contained file that opens offline: the verdict against the PNP
    requirement, the headline numbers, an interactive 3-D view, pictures and plots, the
    breakdown and hotspot tables, the settings, the manifest, the cautions and the references.
    Its pictures are also written as PNG files to RUN_DIR/pictures/.

    \b
    Examples:
      pockmark report runs/imager_sat
      pockmark report runs/imager_sat --overwrite --no-pictures
    """
    from pockmark.cli._helpers import configure_logging
    from pockmark.errors import PockmarkError

    configure_logging(verbose - quiet)
    if not run_dir.is_dir():
        raise click.BadParameter(
            f"{run_dir}: no such directory; give the --out directory of `pockmark run`",
            param_hint="RUN_DIR",
        )
    target = run_dir / "report.html"
    if target.exists() and not overwrite:
        raise click.ClickException(
            f"{target}: already exists; it won't be overwritten without --overwrite"
        )
    try:
        from pockmark.report.html import write_report

        path = write_report(run_dir, title=title, pictures=not no_pictures)
    except PockmarkError as error:
        if verbose >= 2:
            raise
        raise click.ClickException(str(error)) from None
    logging.getLogger("pockmark").info("wrote %s", path)
    click.echo(str(path))
