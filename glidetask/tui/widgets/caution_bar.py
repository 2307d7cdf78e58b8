"""The compact caution, always on screen (glidetask.cautions.COMPACT)."""

from __future__ import annotations

from textual.widgets import Static

from glidetask import cautions


class CautionBar(Static):
    """One or two lines of the compact caution; f1 shows them in full."""

    def __init__(self, **kwargs):
        super().__init__(f"⚠ {cautions.COMPACT} (f1: in full)", markup=False, **kwargs)
