"""``pockmark trade``: which shield upgrade removes the most risk per added kilogram."""

import logging
import sys
import warnings
from pathlib import Path

import click


def _parse_steps(ctx, param, value):
    """``"1.25,1.5,2"`` → (1.25, 1.5, 2.0), each > 1; ``"none"`` → ()."""
    if value.strip().lower() == "none":
        return ()
    steps = []
    for part in value.split(","):
        try:
            factor = float(part)
        except ValueError:
            raise click.BadParameter(
                f"{part.strip()!r} is not a number; give comma-separated thickness factors > 1, "
                f"e.g. 1.25,1.5,2, or none", param_hint="--steps") from None
        if not factor > 1.0:
            raise click.BadParameter(f"{factor:g} is not > 1; a step must thicken the layer",
                                     param_hint="--steps")
        steps.append(factor)
    return tuple(dict.fromkeys(steps))


@click.command("trade")
@click.argument("case_file", type=click.Path(path_type=Path))
@click.option("--out", "out_dir", required=True, type=click.Path(path_type=Path),
              help="Folder for upgrades.csv and upgrades.json.")
@click.option("--steps", default="1.25,1.5,2,3", show_default=True, callback=_parse_steps,
              help="Factors on each resisting layer of every critical tag, tried as candidates "
                   "besides the case's [[upgrades]]; 'none' for the case's upgrades only.")
@click.option("--threads", type=click.IntRange(min=1), default=None,
              help="Threads for ray shadowing (default: the case's setting).")
@click.option("--overwrite", is_flag=True, help="Replace the files of an earlier call in --out.")
@click.option("-v", "--verbose", count=True, help="More log output on stderr (repeatable).")
@click.option("-q", "--quiet", count=True, help="Less output: no progress bar.")
def trade(case_file, out_dir, steps, threads, overwrite, verbose, quiet):
    """Rank candidate shield upgrades of CASE_FILE by risk removed per added mass.

    Runs the case once (reusing cached ray shadowing), then puts each candidate shield on its
    tag and computes the expected penetrations exactly as a rerun would: the case's
    [[upgrades]] tables, and each resisting layer of every critical tag thickened by
    --steps. Prints where the risk is, the candidates best first, and a plan that adds
    them by risk removed per kilogram until the PNP requirement is met; writes
    upgrades.csv and upgrades.json to --out.

    \b
    Examples:
      pockmark trade models/crew_module/baseline.toml --out runs/crew_trade
      pockmark trade case.toml --out trade --steps 1.5,2 --overwrite
      pockmark trade case.toml --out trade --steps none
    """
    import dataclasses

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
        from pockmark.io.config import load_case
        from pockmark.io.results import prepare_output_dir
        from pockmark.report.summary import build_summary
        from pockmark.report.trade import TRADE_FILES, format_trade, write_trade
        from pockmark.risk.assess import assess
        from pockmark.risk.trade import trade_study

        case = load_case(case_file)
        if threads is not None:
            analysis = dataclasses.replace(case.analysis, threads=threads)
            case = dataclasses.replace(case, analysis=analysis)
        prepare_output_dir(out_dir, case.input_files, overwrite=overwrite, files=TRADE_FILES)
        with warnings.catch_warnings():
            warnings.showwarning = show_warning
            warnings.simplefilter("default")
            assessment = assess(case, progress=ProgressBar("ray shadowing", enabled=quiet == 0))
            result = trade_study(assessment, steps=steps)
        summary = build_summary(assessment)
        manifest = {key: summary[key] for key in ("title", "settings", "inputs", "versions")}
        write_trade(result, Path(out_dir), manifest)
    except PockmarkError as error:
        if verbose >= 2:
            raise
        raise click.ClickException(str(error)) from None
    click.echo(f"pockmark trade: {summary['title']}")
    click.echo(format_trade(result))
    click.echo(f"\n  Results in {out_dir}: {', '.join(TRADE_FILES)}")
    sys.stdout.flush()
