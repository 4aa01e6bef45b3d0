"""``pockmark sweep``: the case run once per value of one key, side by side."""

import logging
import sys
import warnings
from pathlib import Path

import click


@click.command("sweep")
@click.argument("case_file", type=click.Path(path_type=Path))
@click.option("--out", "out_dir", required=True, type=click.Path(path_type=Path),
              help="Folder for sweep.csv, sweep.json and sweep.png.")
@click.option("--vary", required=True, metavar="KEY=V1,V2,...",
              help="A dotted case key and its values, e.g. phases.0.altitude=400,500,600 or "
                   "shields.hull.rear_wall_thickness=0.2,0.3 (TOML values; integers index "
                   "[[arrays]]).")
@click.option("--set", "fixed", multiple=True, metavar="KEY=VALUE",
              help="A key held at another value for every run (repeatable).")
@click.option("--overwrite", is_flag=True, help="Replace the files of an earlier call in --out.")
@click.option("-v", "--verbose", count=True, help="More log output on stderr (repeatable).")
@click.option("-q", "--quiet", count=True, help="Less output: no progress bars.")
def sweep(case_file, out_dir, vary, fixed, overwrite, verbose, quiet):
    """Run CASE_FILE once per value of one key and tabulate PNP and penetrations.

    For sensitivity studies: altitude, duration, solar activity, attitude, a shield's layer,
    a density... Each run is a full analysis (the cached ray shadowing is reused whenever the
    geometry and directions do not change; no half-resolution error run). Writes sweep.csv,
    sweep.json (with each run's manifest) and sweep.png to --out.

    \b
    Examples:
      pockmark sweep models/imager_sat/case.toml --out runs/alt --vary phases.0.altitude=450,550,650
      pockmark sweep case.toml --out runs/flux --vary environment.debris.solar_flux=70,120,200
      pockmark sweep case.toml --out runs/wall --vary shields.hull.rear_wall_thickness=0.1,0.2
    """
    from pockmark.cli._helpers import ProgressBar, configure_logging
    from pockmark.errors import ConfigError, ModelRangeWarning, PockmarkError

    configure_logging(verbose - quiet)
    log = logging.getLogger("pockmark")

    def show_warning(message, category, filename, lineno, file=None, line=None):
        if issubclass(category, ModelRangeWarning):
            log.info("%s", message)  # the same warnings repeat for every value
        else:
            log.debug("%s:%s: %s", filename, lineno, message)

    try:
        from pockmark.io.config import load_case, parse_override
        from pockmark.io.results import prepare_output_dir
        from pockmark.report.summary import build_summary
        from pockmark.report.sweep import SWEEP_FILES, format_sweep, sweep_row, write_sweep
        from pockmark.risk.assess import assess

        key_text, _, value_text = vary.partition("=")
        parsed = [parse_override(f"{key_text}={part}") for part in value_text.split(",")]
        keys = parsed[0][0]
        key = ".".join(str(k) for k in keys)
        values = [value for _, value in parsed]
        if len(values) < 2:
            raise ConfigError(f"--vary {vary!r}: give at least two comma-separated values")
        overrides = [parse_override(text) for text in fixed]
        base = load_case(case_file, overrides)
        prepare_output_dir(out_dir, base.input_files, overwrite=overwrite, files=SWEEP_FILES)
        rows, manifests = [], []
        with warnings.catch_warnings():
            warnings.showwarning = show_warning
            warnings.simplefilter("default")
            for value in values:
                case = load_case(case_file, [*overrides, (keys, value)])
                summary = build_summary(assess(case, progress=ProgressBar(
                    f"{key} = {value}", enabled=quiet == 0)))
                rows.append(sweep_row(value, summary))
                manifests.append({"value": value, **{k: summary[k] for k in
                                                     ("title", "settings", "inputs")}})
        write_sweep(key, rows, Path(out_dir), {"fixed": list(fixed), "runs": manifests,
                                               "versions": summary["versions"]})
    except PockmarkError as error:
        if verbose >= 2:
            raise
        raise click.ClickException(str(error)) from None
    click.echo(f"pockmark sweep: {summary['title']}")
    click.echo(format_sweep(key, rows))
    click.echo(f"\n  Results in {out_dir}: {', '.join(SWEEP_FILES)}")
    sys.stdout.flush()
