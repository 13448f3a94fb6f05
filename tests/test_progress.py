"""Progress of long stages (generator/build.py Progress.counter): a bar with counts and time
left on a terminal, plain lines each quarter of the way otherwise."""

from __future__ import annotations

import io
import re
import time

from generator.build import Progress


class Terminal(io.StringIO):
    def isatty(self) -> bool:
        return True


def test_on_a_terminal_a_bar_shows_the_count_and_the_time_left():
    stream = Terminal()
    report = Progress(stream).counter("stability", "big", "perturbed reruns")
    for done in range(1, 11):
        time.sleep(0.12)  # tqdm redraws at most ten times a second
        report(done, 10)
    text = stream.getvalue()
    # tqdm's bar on the way: the share, the count, the time so far and the time left
    assert re.search(r"stability big:\s+\d+%\|[^|]*\| [1-9]/10 \[\d\d:\d\d<\d\d:\d\d", text)
    assert text.rstrip().endswith("stability big: 10/10 perturbed reruns")


def test_without_a_terminal_a_line_each_quarter_with_the_time_left():
    stream = io.StringIO()
    report = Progress(stream).counter("significance", "big", "samples")
    for done in range(1, 9):
        report(done, 8)
    lines = stream.getvalue().splitlines()
    assert [line.split(",")[0] for line in lines] == [
        f"significance big: {k}/8 samples" for k in (2, 4, 6, 8)]
    assert all(re.search(r", about \d+ s left$", line) for line in lines[:-1])
    assert lines[-1] == "significance big: 8/8 samples"


def test_quick_stages_and_quiet_builds_stay_silent():
    stream = io.StringIO()
    report = Progress(stream).counter("communities", "big", "runs", after=60.0)
    for done in range(1, 21):
        report(done, 20)
    quiet = Progress(stream, quiet=True).counter("significance", "big", "samples")
    quiet(1, 1)
    assert stream.getvalue() == ""
