"""What a view shows while the engine part it draws on is not there yet (or has no data)."""

from __future__ import annotations

from textual.widgets import Static


class NeedsNotice(Static):
    """A calm panel saying what this view needs before it can show anything."""

    def __init__(self, text: str, **kwargs):
        super().__init__(text, classes="needs-notice", markup=False, **kwargs)
