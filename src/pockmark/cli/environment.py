"""``pockmark environment``: tables and plots of a case's impact environment."""

import logging
from pathlib import Path

import click


@click.command("environment")
@click.argument("case_file", type=click.Path(path_type=Path))
@click.option("--out", "out_dir", required=True, type=click.Path(path_type=Path), help="Folder for the CSV tables and PNG plots.")
@click.option("--overwrite", is_flag=True, help="Replace the files of an earlier call in --out.")
@click.option(
    "--diameter",
    type=click.FloatRange(min=0, min_open=True),
    default=0.1,
    show_default=True,
    help="Particle diameter whose flux the sky maps show [cm].",
)
@click.option("-v", "--verbose", count=True, help="More log output on stderr (repeatable).")
@click.option("-q", "--quiet", count=True, help="Less output.")
def environment(case_file, out_dir, overwrite, diameter, verbose, quiet):
    """Show the impact environment of CASE_FILE: flux vs size, speeds, directions.

    Writes sizes.csv, speeds.csv, directions.csv, flux_phaseN.png and sky_phaseN.png to
    --out and prints the cumulative flux per phase and source.

    \b
    Examples:
      pockmark environment models/imager_sat/case.toml --out runs/imager_sat_env
      pockmark environment case.toml --out env --diameter 0.05 --overwrite
    """
    from pockmark.cli._helpers import configure_logging
    from pockmark.errors import PockmarkError

    configure_logging(verbose - quiet)
    try:
        from pockmark.io.config import load_case
        from pockmark.io.results import prepare_output_dir
        from pockmark.report.environment import format_environment, write_environment
        from pockmark.risk.assess import build_fluxes

        case = load_case(case_file)
        outputs = ("sizes.csv", "speeds.csv", "directions.csv")
        prepare_output_dir(out_dir, case.input_files, overwrite=overwrite, files=outputs)
        fluxes = [build_fluxes(case, index) for index in range(len(case.phases))]
        table = write_environment(out_dir, fluxes, [p.name for p in case.phases], diameter)
    except PockmarkError as error:
        if verbose >= 2:
            raise
        raise click.ClickException(str(error)) from None
    logging.getLogger("pockmark").info("wrote %s", out_dir)
    click.echo(format_environment(table, diameter))
