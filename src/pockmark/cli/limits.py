"""``pockmark limits``: ballistic-limit curves of a case's shields, as plots, CSV and tables."""

import logging
from pathlib import Path

import click


def _parse_angles(ctx, param, value):
    """``"0,30,45,60"`` → (0.0, 30.0, 45.0, 60.0), each in [0, 90)."""
    parts = [part.strip() for part in value.split(",")]
    angles = []
    for part in parts:
        try:
            angle = float(part)
        except ValueError:
            raise click.BadParameter(
                f"{part!r} is not a number; give comma-separated angles from the surface "
                f"normal in degrees, e.g. 0,30,45,60",
                param_hint="--angles",
            ) from None
        if not 0.0 <= angle < 90.0:
            raise click.BadParameter(
                f"{angle:g} is outside [0, 90) [°]; angles are measured from the surface "
                f"normal and 90° or more cannot hit the face",
                param_hint="--angles",
            )
        angles.append(angle)
    if len(set(angles)) != len(angles):
        raise click.BadParameter(f"{value!r} repeats an angle", param_hint="--angles")
    return tuple(angles)


@click.command("limits")
@click.argument("case_file", type=click.Path(path_type=Path))
@click.option(
    "--out", "out_dir", required=True, type=click.Path(path_type=Path),
    help="Folder for limits.csv and one limits_<TAG>.png per shield.",
)
@click.option(
    "--shield", "tags", multiple=True, metavar="TAG",
    help="Only this shield of the case (repeatable). Default: every shield.",
)
@click.option(
    "--angles", default="0,30,45,60", show_default=True, callback=_parse_angles,
    help="Impact angles from the surface normal, comma-separated [°]; one curve each.",
)
@click.option(
    "--density", type=click.FloatRange(min=0, min_open=True), default=2.8, show_default=True,
    help="Projectile density [g cm⁻³] (orbital debris 2.8; meteoroids often 1.0).",
)
@click.option("--overwrite", is_flag=True, help="Replace the files of an earlier call in --out.")
@click.option("-v", "--verbose", count=True, help="More log output on stderr (repeatable).")
@click.option("-q", "--quiet", count=True, help="Less output.")
def limits(case_file, out_dir, tags, angles, density, overwrite, verbose, quiet):
    """Plot ballistic-limit curves of the shields of CASE_FILE.

    For each shield (or each --shield TAG): critical particle diameter against impact speed
    (0.5-20 km/s), one curve per angle, log diameter axis, regime boundaries marked and the
    part outside the equation's stated range dashed. Writes limits_<TAG>.png and limits.csv
    to --out and prints a table (speed rows × angle columns) per shield.

    \b
    Examples:
      pockmark limits models/imager_sat/case.toml --out runs/imager_sat_limits
      pockmark limits case.toml --out limits --shield hull --angles 0,45,65 --density 1.0
      pockmark limits case.toml --out limits --overwrite
    """
    import warnings

    from pockmark.cli._helpers import configure_logging
    from pockmark.errors import ConfigError, InputError, ModelRangeWarning, PockmarkError

    configure_logging(verbose - quiet)
    logger = logging.getLogger("pockmark")
    try:
        from pockmark.ballistics import make_shield
        from pockmark.io.config import load_case
        from pockmark.io.results import prepare_output_dir
        from pockmark.report.limits import format_limits, output_files, write_limits

        case = load_case(case_file)
        unknown = [tag for tag in tags if tag not in case.shields]
        if unknown:
            raise click.BadParameter(
                f"no shield {unknown[0]!r} in {case.path}; choose from: "
                f"{', '.join(sorted(case.shields))}",
                param_hint="--shield",
            )
        selected = list(dict.fromkeys(tags)) if tags else list(case.shields)
        materials = getattr(case, "materials", None) or {}
        shields = []
        for tag in selected:
            with warnings.catch_warnings(record=True) as caught:
                warnings.simplefilter("always", ModelRangeWarning)
                try:
                    shields.append(make_shield(tag, case.shields[tag], materials))
                except InputError as error:
                    raise ConfigError(f"{case.where('shields', tag)}: {error}") from None
            for warning in caught:
                logger.warning("%s", warning.message)
        prepare_output_dir(
            out_dir, case.input_files, overwrite=overwrite, files=output_files(selected)
        )
        results = write_limits(out_dir, shields, angles, density)
    except PockmarkError as error:
        if verbose >= 2:
            raise
        raise click.ClickException(str(error)) from None
    logger.info("wrote %s", out_dir)
    click.echo(format_limits(results, density))
