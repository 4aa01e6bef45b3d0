"""Time the design loop: a baseline run with a cold visibility cache, then reruns that reuse it.

For each repeat: a fresh cache folder, the baseline case (rays traced), the baseline again
(everything from the caches) and the variant case, which changes only shield build-ups and
tags and so reuses the baseline's visibility. Prints the median wall time of each, and a last
line ``cold_seconds=X warm_seconds=Y variant_seconds=Z`` for scripts to read. Numba's compiled
kernels are warmed up first so that compilation stays out of the figures.

Run from the repository root:  python scripts/bench_variant.py [--repeats 3]
"""

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path


def _run(case, out, cache):
    env = dict(os.environ, POCKMARK_CACHE_DIR=str(cache))
    started = time.perf_counter()
    subprocess.run(
        [sys.executable, "-m", "pockmark.cli.main", "run", str(case), "--out", str(out), "--overwrite", "--no-report", "-q"],
        check=True, env=env, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
    )
    return time.perf_counter() - started


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--baseline", type=Path, default=Path("models/crew_module/baseline.toml"))
    parser.add_argument("--variant", type=Path, default=Path("models/crew_module/enhanced.toml"))
    parser.add_argument("--repeats", type=int, default=3)
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as folder:
        folder = Path(folder)
        _run(args.baseline, folder / "warmup", folder / "warmup-cache")  # numba compile / load
        times = {"cold": [], "warm": [], "variant": []}
        for repeat in range(args.repeats):
            cache = folder / f"cache{repeat}"
            times["cold"].append(_run(args.baseline, folder / "a", cache))
            times["warm"].append(_run(args.baseline, folder / "b", cache))
            times["variant"].append(_run(args.variant, folder / "c", cache))
    for name, values in times.items():
        print(f"{name:>8}: median {statistics.median(values):6.2f} s  (runs: {', '.join(f'{v:.2f}' for v in values)})")  # noqa: T201
    print(" ".join(f"{name}_seconds={statistics.median(values):.2f}" for name, values in times.items()))  # noqa: T201


if __name__ == "__main__":
    main()
