"""Helpers shared by the subcommands: logging set-up and a progress bar bound to stderr."""

import logging
import sys
import time


def configure_logging(verbosity):
    """Map ``-v``/``-q`` counts to the level of pockmark's log on stderr."""
    level = {-2: logging.ERROR, -1: logging.ERROR, 0: logging.WARNING, 1: logging.INFO}.get(
        max(-2, min(verbosity, 2)), logging.DEBUG
    )
    handler = logging.StreamHandler(sys.stderr)
    handler.setFormatter(logging.Formatter("%(levelname)s: %(message)s"))
    root = logging.getLogger("pockmark")
    root.handlers[:] = [handler]
    root.setLevel(level)


class ProgressBar:
    """A one-line progress bar with time left, on stderr.

    On a terminal the line is redrawn in place; otherwise a line is written at every tenth
    of the work so that logs stay short. ``enabled=False`` (``-q``) silences it.
    """

    def __init__(self, label, enabled=True, stream=None):
        self.label = label
        self.stream = stream or sys.stderr
        self.enabled = enabled
        self.tty = self.stream.isatty()
        self.started = time.perf_counter()
        self.last_tenth = -1

    def __call__(self, done, total):
        if not self.enabled or total <= 0:
            return
        fraction = min(1.0, done / total)
        elapsed = time.perf_counter() - self.started
        left = elapsed * (1 - fraction) / fraction if fraction > 0 else float("nan")
        eta = f"{left:5.0f} s left" if fraction < 1 else f"{elapsed:5.1f} s    "
        if self.tty:
            width = 30
            filled = int(round(width * fraction))
            bar = "#" * filled + "." * (width - filled)
            self.stream.write(f"\r{self.label} [{bar}] {fraction:6.1%} {eta}")
            if fraction >= 1:
                self.stream.write("\n")
            self.stream.flush()
        else:
            tenth = int(fraction * 10)
            if tenth > self.last_tenth:
                self.last_tenth = tenth
                self.stream.write(f"{self.label}: {fraction:.0%} ({eta.strip()})\n")
                self.stream.flush()
