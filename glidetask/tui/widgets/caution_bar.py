"""The compact caution, always on screen (glidetask.cautions.COMPACT)."""

from __future__ import annotations

from textual.widgets import Static

from glidetask import cautions


class CautionBar(Static):
    """The compact caution (two lines at 80 columns); f1 shows them in full."""

    def __init__(self, **kwargs):
        super().__init__(cautions.COMPACT, markup=False, **kwargs)
