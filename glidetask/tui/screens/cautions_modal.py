"""The cautions in full: on first start (until acknowledged) and on f1."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Button, Static

from glidetask import cautions


class CautionsModal(ModalScreen[bool]):
    """Every caution, with a button that records the pilot has read them."""

    BINDINGS = [("enter", "acknowledge", "I have read this"), ("escape", "acknowledge", "Close")]

    def __init__(self, first_start: bool = False):
        super().__init__(id="cautions-modal")
        self.first_start = first_start

    def compose(self) -> ComposeResult:
        lines = [f"• {text}" for text in (*cautions.GENERAL, *cautions.TERRAIN, *cautions.LANDABLES,
                                                          *cautions.AIRSPACE, cautions.FLIGHT_LEVELS)]
        heading = "Before you plan" if self.first_start else "Cautions and the words on screen"
        with Vertical(id="cautions-panel"):
            yield Static(heading, id="cautions-heading", markup=False)
            with VerticalScroll(id="cautions-text"):
                yield Static("\n\n".join(lines), markup=False)
                if not self.first_start:  # f1: the words on screen, beside the cautions
                    from glidetask.tui.glossary import glossary_text

                    yield Static("Words on screen", id="glossary-heading", markup=False)
                    yield Static(glossary_text(), id="glossary", markup=False)
            yield Button("I have read this", id="cautions-ok", variant="warning")
            yield Static("enter: I have read this · ↑↓: scroll", id="cautions-hint", markup=False)

    # rows the panel needs besides the text: border 2, padding 2, heading 2, button 4, hint 1
    FRAME_ROWS = 11

    def on_mount(self) -> None:
        self.query_one("#cautions-ok", Button).focus()

    def on_resize(self, event) -> None:
        # the button and its hint stay on screen however short the terminal: the text scrolls
        self.query_one("#cautions-text").styles.max_height = max(3, min(24, int(event.size.height * 0.9) - self.FRAME_ROWS))

    def key_up(self) -> None:
        self.query_one("#cautions-text").scroll_up()

    def key_down(self) -> None:
        self.query_one("#cautions-text").scroll_down()

    def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        self.action_acknowledge()

    def action_acknowledge(self) -> None:
        from glidetask.tui import config

        config.acknowledge_cautions()
        self.dismiss(True)
