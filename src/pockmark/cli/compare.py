"""``pockmark compare``: what changed between two runs."""

from pathlib import Path

import click


@click.command()
@click.argument("run_a", type=click.Path(path_type=Path, file_okay=False))
@click.argument("run_b", type=click.Path(path_type=Path, file_okay=False))
@click.option("--out", "out_dir", required=True, type=click.Path(path_type=Path), help="Folder for comparison.json and difference.vtp.")
@click.option("--overwrite", is_flag=True, help="Replace the files of an earlier comparison in --out.")
def compare(run_a, run_b, out_dir, overwrite):
    """Compare the run in RUN_A with the run in RUN_B (B is the new design).

    Prints the change in PNP, by component, shield tag and source, and the shield mass; writes
    comparison.json, difference.vtp (penetrations per m² of A and B and their difference on
    B's faces, for faces that both runs share) and difference_*.png pictures.

    \b
    Examples:
      pockmark compare runs/baseline runs/enhanced --out runs/baseline_vs_enhanced
    """
    from pockmark.errors import PockmarkError
    from pockmark.io.results import prepare_output_dir
    from pockmark.report.compare import compare_runs, format_comparison

    inputs = [run / name for run in (run_a, run_b) for name in ("summary.json", "faces.csv", "faces.vtp")]
    try:
        for path in inputs:
            if not path.is_file():
                raise click.ClickException(f"{path.parent}: holds no {path.name}; is it a pockmark run directory?")
        prepare_output_dir(out_dir, inputs, overwrite=overwrite, files=("comparison.json", "difference.vtp"))
        comparison = compare_runs(run_a, run_b, out_dir)
    except PockmarkError as error:
        raise click.ClickException(str(error)) from None
    click.echo(format_comparison(comparison))
