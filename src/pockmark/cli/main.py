"""The ``pockmark`` command: a thin layer over the library, one module per subcommand."""

import os

# numpy's BLAS threads compete with numba's for the cores during ray shadowing; the
# shadowing is parallel already, so keep BLAS single-threaded unless the user chose otherwise.
os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")

import click  # noqa: E402

from pockmark import __version__  # noqa: E402
from pockmark.cli.check import check  # noqa: E402
from pockmark.cli.compare import compare  # noqa: E402
from pockmark.cli.environment import environment  # noqa: E402
from pockmark.cli.limits import limits  # noqa: E402
from pockmark.cli.report import report  # noqa: E402
from pockmark.cli.run import run  # noqa: E402
from pockmark.cli.sweep import sweep  # noqa: E402
from pockmark.cli.trade import trade  # noqa: E402


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="pockmark")
def cli():
    """Meteoroid and orbital-debris penetration risk of a spacecraft.

    Reads a case file (TOML) naming a tagged triangle mesh of the vehicle, its shield
    build-ups, the mission and the environment; writes the probability of no penetration
    (PNP) with per-face, per-tag and per-source breakdowns.
    """


cli.add_command(run)
cli.add_command(check)
cli.add_command(environment)
cli.add_command(compare)
cli.add_command(limits)
cli.add_command(report)
cli.add_command(trade)
cli.add_command(sweep)

if __name__ == "__main__":
    cli()
