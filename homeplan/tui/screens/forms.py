"""Modal screens: a generic field form, a confirmation with named choices, a text panel."""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from typing import Any

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Button, Input, Label, Select, Static, Switch

__all__ = ["ChoiceScreen", "FieldSpec", "FormError", "FormScreen", "TextScreen", "parse_value"]

Kind = str  # "text" | "int" | "float" | "choice" | "bool"


@dataclass(frozen=True)
class FieldSpec:
    """One field of a form. ``key`` is what the caller gets back (often a document path)."""

    key: Any
    label: str
    kind: Kind = "text"
    value: Any = None
    choices: Sequence[tuple[str, Any]] = field(default_factory=tuple)
    optional: bool = False
    help: str = ""
    unit: str = ""
    placeholder: str = ""   # shown in an empty text field (default: "(optional)"/"(blank: default)")


class FormError(ValueError):
    def __init__(self, index: int, message: str):
        self.index = index
        super().__init__(message)


def parse_value(spec: FieldSpec, raw: Any) -> Any:
    """The typed value of one field from what was typed; raises ValueError with a plain message."""
    if spec.kind in ("choice", "bool"):
        return raw
    text = str(raw or "").strip()
    if not text:
        if spec.optional:
            return None
        raise ValueError(f"{spec.label}: a value is needed")
    if spec.kind == "text":
        return text
    clean = text.replace(",", "").replace("$", "").replace("_", "").strip()
    try:
        if spec.kind == "int":
            number = float(clean)
            if number != int(number):
                raise ValueError
            return int(number)
        return float(clean)
    except ValueError:
        kind = "a whole number" if spec.kind == "int" else "a number"
        raise ValueError(f"{spec.label}: '{text}' is not {kind}") from None


def _blank(value: Any) -> str:
    if value is None:
        return ""
    if isinstance(value, float) and value == int(value) and abs(value) >= 100:
        return str(int(value))
    return str(value)


class FormScreen(ModalScreen[dict | None]):
    """Fields in a column; Enter applies, Escape backs out without changing anything.

    ``check`` receives the parsed values and returns an error message to keep the form open, or
    None to accept (the screen then dismisses with the values).
    """

    BINDINGS = [
        Binding("escape", "cancel", "Cancel"),
        Binding("ctrl+s", "apply", "Apply", show=False),
    ]
    AUTO_FOCUS = "#field-0"  # keys typed while the form opens go to its first field

    def __init__(self, title: str, fields: Sequence[FieldSpec],
                 check: Callable[[dict], str | None] | None = None, note: str = "",
                 apply_label: str = "Apply", id: str | None = None):
        super().__init__(id=id)
        self.form_title = title
        self.fields = list(fields)
        self.check = check
        self.note = note
        self.apply_label = apply_label
        self._opened_with: list | None = None

    def compose(self) -> ComposeResult:
        with Vertical(id="form-box", classes="modal-box"):
            yield Static(Text(self.form_title, style="bold"), classes="modal-title")
            if self.note:
                yield Static(Text(self.note), classes="form-note")
            with VerticalScroll(id="form-fields", can_focus=False):
                for i, spec in enumerate(self.fields):
                    with Horizontal(classes="form-row"):
                        unit = f" ({spec.unit})" if spec.unit else ""
                        yield Label(Text(spec.label + unit), classes="form-label")
                        yield self._widget(i, spec)
                    if spec.help:
                        yield Static(Text(spec.help), classes="form-help")
            yield Static("", id="form-error")
            yield Static(Text("enter in a text field or ctrl+s: apply · tab: next field · "
                              "esc: cancel", style="dim"), classes="modal-foot")
            with Horizontal(classes="modal-buttons"):
                yield Button(self.apply_label, id="apply", variant="primary", compact=True)
                yield Button("Cancel", id="cancel", compact=True)

    def _widget(self, i: int, spec: FieldSpec):
        wid = f"field-{i}"
        if spec.kind == "choice":
            options = [(label, value) for label, value in spec.choices]
            values = [v for _, v in options]
            value = spec.value if spec.value in values else values[0]
            return Select(options, value=value, allow_blank=False, id=wid, classes="form-input",
                          compact=True)
        if spec.kind == "bool":
            return Switch(value=bool(spec.value), id=wid, classes="form-input")
        inp = Input(_blank(spec.value), id=wid, classes="form-input", compact=True,
                    placeholder=spec.placeholder or (("(optional)" if spec.kind == "text" else
                                                      "(blank: default)") if spec.optional else ""))
        inp.cursor_blink = False
        return inp

    def on_mount(self) -> None:
        self._size_fields()
        if self.fields:
            self.query_one("#field-0").focus()
        self._opened_with = self._raw()

    def on_resize(self) -> None:
        self._size_fields()

    def _size_fields(self) -> None:
        """As tall as the fields need, leaving room for the title, note and buttons."""
        rows = sum(1 + (len(f.help) // 44 + 1 if f.help else 0) for f in self.fields)
        room = self.app.size.height - 12 - (2 if self.note else 0)
        self.query_one("#form-fields").styles.height = max(3, min(rows, room))

    def values(self) -> dict:
        out: dict = {}
        for i, spec in enumerate(self.fields):
            w = self.query_one(f"#field-{i}")
            raw = w.value
            try:
                out[spec.key] = parse_value(spec, raw)
            except ValueError as exc:
                raise FormError(i, str(exc)) from None
        return out

    def show_error(self, message: str) -> None:
        error = self.query_one("#form-error", Static)
        error.update(Text(message))
        error.set_class(bool(message), "-shown")

    def action_apply(self) -> None:
        try:
            values = self.values()
        except FormError as err:
            self.show_error(str(err))
            self.query_one(f"#field-{err.index}").focus()
            return
        if self.check is not None:
            problem = self.check(values)
            if problem:
                self.show_error(problem)
                return
        self.dismiss(values)

    def _raw(self) -> list:
        return [self.query_one(f"#field-{i}").value for i in range(len(self.fields))]

    def typed(self) -> bool:
        """Whether anything differs from what the form opened with."""
        return self._opened_with is not None and self._raw() != self._opened_with

    def action_cancel(self) -> None:
        """Escape: back out; when something was typed, ask first (typing is never lost
        silently)."""
        if not self.typed():
            self.dismiss(None)
            return

        def answer(choice: str | None) -> None:
            if choice == "d":
                self.dismiss(None)

        self.app.push_screen(ChoiceScreen(
            "Discard what you typed?", f"The changes in '{self.form_title}' are not applied yet.",
            [("d", "Discard them"), ("escape", "Keep editing")]), answer)

    @on(Input.Submitted)
    def _submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self.action_apply()

    @on(Button.Pressed, "#apply")
    def _apply_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        self.action_apply()

    @on(Button.Pressed, "#cancel")
    def _cancel_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        self.action_cancel()


class ChoiceScreen(ModalScreen[str | None]):
    """A question with a few named answers, each on its own key. Escape answers None."""

    BINDINGS = [Binding("escape", "answer(None)", "Back")]

    def __init__(self, title: str, message: str, choices: Sequence[tuple[str, str]]):
        super().__init__()
        self.title_text = title
        self.message = message
        self.choices = list(choices)  # (key, label)

    def compose(self) -> ComposeResult:
        with Vertical(classes="modal-box choice-box"):
            yield Static(Text(self.title_text, style="bold"), classes="modal-title")
            yield Static(Text(self.message), classes="choice-message")
            with Horizontal(classes="modal-buttons"):
                for key, label in self.choices:
                    yield Button(f"{label} ({key})", id=f"choice-{key}", compact=True)

    def on_mount(self) -> None:
        self.query(Button).first().focus()

    def on_key(self, event) -> None:
        for key, _ in self.choices:
            if event.key == key:
                event.stop()
                self.dismiss(key)
                return

    def action_answer(self, key: str | None) -> None:
        self.dismiss(key)

    @on(Button.Pressed)
    def _pressed(self, event: Button.Pressed) -> None:
        event.stop()
        self.dismiss((event.button.id or "").removeprefix("choice-"))


class TextScreen(ModalScreen[None]):
    """A scrollable panel of text (details, where numbers come from, help)."""

    BINDINGS = [Binding("escape", "close", "Close"), Binding("enter", "close", "Close", show=False),
                Binding("q", "close", "Close", show=False)]

    def __init__(self, title: str, body: Any):
        super().__init__()
        self.title_text = title
        self.body = body

    def compose(self) -> ComposeResult:
        with Vertical(classes="modal-box text-box"):
            yield Static(Text(self.title_text, style="bold"), classes="modal-title")
            with VerticalScroll(id="text-body"):
                yield Static(self.body)
            yield Static(Text("esc: close", style="dim"), classes="modal-foot")

    def on_mount(self) -> None:
        self.query_one("#text-body").focus()

    def action_close(self) -> None:
        self.dismiss(None)
