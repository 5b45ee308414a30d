"""The one progress display: a bar on a terminal, plain lines at most every few seconds otherwise.

(common practice, no source: progress goes to stderr, never into results.)
"""

from __future__ import annotations

import io
import pathlib

from cyclewright.cli.progress import PLAIN_INTERVAL, ProgressDisplay, messages
from cyclewright.cycles.progress import ProgressEvent

COMMANDS = pathlib.Path(__file__).resolve().parents[1] / "cyclewright" / "cli" / "commands"


def test_plain_lines_are_rare():
    out = io.StringIO()
    clock = [0.0]
    show = ProgressDisplay(out, tty=False, clock=lambda: clock[0])
    for i in range(1000):  # 1000 events over 20 s: at most one line per interval
        clock[0] = i * 0.02
        show(ProgressEvent("scan", i, 1000, "starts"))
    lines = out.getvalue().splitlines()
    assert 1 <= len(lines) <= 20 / PLAIN_INTERVAL
    assert all(line.startswith("progress: scan: ") for line in lines)


def test_quick_work_prints_nothing():
    out = io.StringIO()
    with ProgressDisplay(out, tty=False) as show:
        show(ProgressEvent("sweep", 1, 2, "types"))
        show(ProgressEvent("sweep", 2, 2, "types"))
    assert out.getvalue() == ""


def test_terminal_bar_draws_and_goes_away():
    out = io.StringIO()
    with ProgressDisplay(out, tty=True) as show:
        show(ProgressEvent("scan", 5, 10, "starts", "positive"))
        show(ProgressEvent("scan", 10, 10, "starts", "positive"))
        show(ProgressEvent("study", 1, None, "analyses", "census"))
        assert show._bar is not None
    assert show._bar is None


def test_study_messages_become_events():
    seen = []
    say = messages(seen.append, "study", "analyses")
    say("sweep 3x+1")
    say("census 3x+1 to length 60")
    assert [str(e) for e in seen] == [
        "study: 0 analyses (sweep 3x+1)",
        "study: 1 analyses (census 3x+1 to length 60)",
    ]


def test_no_command_keeps_its_own_progress_printer():
    for path in COMMANDS.glob("*_cmd.py"):
        text = path.read_text()
        assert "isatty" not in text and 'end="\\r"' not in text, path.name
