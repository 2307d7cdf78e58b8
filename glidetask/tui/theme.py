"""The colours of glidetask: an evening moorland palette of our own."""

from textual.theme import Theme

GLIDETASK_THEME = Theme(
    name="glidetask-dusk",
    primary="#5fb3a1",  # heather-green: focus, headings
    secondary="#7a9cc6",  # slate-blue: the task path
    accent="#e0b15a",  # amber: cautions, the final glide
    warning="#e0b15a",
    error="#e06c5a",
    success="#8cc66d",
    foreground="#d8dde6",
    background="#12161c",
    surface="#1a1f27",
    panel="#242b36",
    dark=True,
)
