"""What a computing view shows in place of figures it does not have yet for the current
inputs: what is being computed, for which task, and a progress bar.

Given the steps of the work (the ballast choices flown, the sweeps made), the bar shows
how many are done; it moves only when one is, so drawing it never takes the processor
from the computation (an animated bar redrawn 15 times a second slowed the simulated
days by about a fifth on a 2-core machine). Without steps the bar sweeps to and fro.
"""

from __future__ import annotations

import time

from textual.app import ComposeResult
from textual.containers import Vertical
from textual.widgets import ProgressBar, Static


class ProgressText(Static):
    """The notice's words; notes when they are first drawn into a frame while a computation runs."""

    def render_lines(self, crop):
        lines = super().render_lines(crop)
        notice = self.parent
        if isinstance(notice, ProgressNotice) and notice.first_started is not None and notice.first_painted is None:
            notice.first_painted = time.perf_counter()
        return lines


class ProgressNotice(Vertical):
    """A line saying what is computed (or awaited) and a bar that moves while it runs."""

    DEFAULT_CSS = """
    ProgressNotice { height: auto; padding: 0 1; }
    ProgressNotice > Static { height: auto; color: $text-muted; }
    ProgressNotice > ProgressBar { height: 1; }
    """

    def __init__(self, text: str, **kwargs):
        super().__init__(**kwargs)
        self._text = text
        self.started: float | None = None
        self.first_started: float | None = None  # when a computation was first said to run (benchmarks)
        self.first_painted: float | None = None  # when a frame first drew it so (benchmarks)

    def compose(self) -> ComposeResult:
        yield ProgressText(self._text, markup=False, classes="progress-text")
        bar = ProgressBar(total=None, show_eta=False, show_percentage=False, classes="progress-bar")
        bar.display = False
        yield bar

    @property
    def text(self) -> str:
        return self._text

    def say(self, text: str, *, working: bool, done: int = 0, steps: int | None = None) -> None:
        """Show ``text``; ``working``: a computation is running, ``done`` of its ``steps``
        finished (None: steps unknown, the bar sweeps to and fro)."""
        self._text = text
        self.query_one(".progress-text", Static).update(text)
        bar = self.query_one(ProgressBar)
        bar.display = working
        if working:
            bar.update(total=steps, progress=done)
        self.started = time.perf_counter() if working else None
        if working and self.first_started is None:
            self.first_started = self.started
