"""The line above the caution: the latest news, or what is wrong with the pilot's input."""

from __future__ import annotations

from rich.text import Text
from textual.widgets import Static


class StatusLine(Static):
    """Shows the app's problems (in the error colour, all of them) or its latest notice."""

    def on_mount(self) -> None:
        self.watch(self.app, "problems", self._refresh_text, init=False)
        self.watch(self.app, "notice", self._refresh_text, init=False)
        self.watch(self.app, "invalid_fields", self._refresh_text, init=False)
        self._refresh_text()

    def _refresh_text(self, _value=None) -> None:
        problems = getattr(self.app, "problems", ())
        self.set_class(bool(problems), "-error")
        if problems:
            from glidetask.tui.edits import where_on_screen

            lines = [f"✗ {where_on_screen(p.where)}: {p.what}" if p.file in ("input", "plan")
                     else f"✗ {p.file}: {p.where}: {p.what}" for p in problems]
            last_valid = self._last_valid()
            room = 3 if not last_valid else 2
            text = "\n".join(lines[:room]) + (f"\n  … and {len(lines) - room} more" if len(lines) > room else "")
            self.update(Text(text + (f"\n{last_valid}" if last_valid else "")))
        else:
            self.update(Text(getattr(self.app, "notice", "")))

    def _last_valid(self) -> str:
        """While a field holds a refused value: which input the figures on screen are for."""
        from glidetask.tui.edits import FIELDS, field_shown

        session = getattr(self.app, "session", None)
        if session is None or not session.pending:
            return ""
        shown = [field_shown(session.scenario, f, self.app.units) for f in session.pending if f in FIELDS]
        return "  figures are for the last valid input: " + "; ".join(shown) if shown else ""
