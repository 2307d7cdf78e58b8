"""What a computing view shows in place of figures it does not have yet for the current
inputs: what is being computed, for which task, and a moving progress bar."""

from __future__ import annotations

import time

from textual.app import ComposeResult
from textual.containers import Vertical
from textual.widgets import ProgressBar, Static


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
        self.first_started: float | None = None  # when a computation was first shown running (benchmarks)

    def compose(self) -> ComposeResult:
        yield Static(self._text, markup=False, classes="progress-text")
        bar = ProgressBar(total=None, show_eta=False, show_percentage=False, classes="progress-bar")
        bar.display = False
        yield bar

    @property
    def text(self) -> str:
        return self._text

    def say(self, text: str, *, working: bool) -> None:
        """Show ``text``; ``working``: a computation is running (the bar moves)."""
        self._text = text
        self.query_one(".progress-text", Static).update(text)
        self.query_one(ProgressBar).display = working
        self.started = time.perf_counter() if working else None
        if working and self.first_started is None:
            self.first_started = self.started
