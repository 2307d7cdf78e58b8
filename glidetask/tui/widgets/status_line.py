"""The line above the caution: the latest news, or what is wrong with the pilot's input."""

from __future__ import annotations

from rich.text import Text
from textual.widgets import Static


class StatusLine(Static):
    """Shows the app's problems (in the error colour, all of them) or its latest notice."""

    def on_mount(self) -> None:
        self.watch(self.app, "problems", self._refresh_text, init=False)
        self.watch(self.app, "notice", self._refresh_text, init=False)
        self._refresh_text()

    def _refresh_text(self, _value=None) -> None:
        problems = getattr(self.app, "problems", ())
        self.set_class(bool(problems), "-error")
        if problems:
            from glidetask.tui.edits import where_on_screen

            lines = [f"✗ {where_on_screen(p.where)}: {p.what}" if p.file in ("input", "plan")
                     else f"✗ {p.file}: {p.where}: {p.what}" for p in problems]
            self.update(Text("\n".join(lines[:3]) + (f"\n  … and {len(lines) - 3} more" if len(lines) > 3 else "")))
        else:
            self.update(Text(getattr(self.app, "notice", "")))
