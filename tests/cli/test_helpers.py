"""The progress bar writes to its stream only, as tenths when the stream is not a terminal."""

import io

from pockmark.cli._helpers import ProgressBar


def test_progress_lines_on_a_pipe():
    stream = io.StringIO()
    bar = ProgressBar("ray shadowing", stream=stream)
    for done in range(0, 101, 5):
        bar(done, 100)
    lines = stream.getvalue().splitlines()
    assert lines[0].startswith("ray shadowing: 0%") and lines[-1].startswith("ray shadowing: 100%")
    assert len(lines) == 11


def test_disabled_progress_is_silent():
    stream = io.StringIO()
    ProgressBar("x", enabled=False, stream=stream)(5, 10)
    assert stream.getvalue() == ""
