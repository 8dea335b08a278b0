"""The key bar: the screen's keys on its last line, in the order the screen declares them.

Textual's footer lists bindings in the order of their keys, so a binding remapped from the
keymap file moves to the end, and at 80 columns whatever is at the end is cut off. Here the
order is the screen's ``BINDINGS`` (by binding id, so remapping never moves a key), help and
quit are always shown, and when the line is too narrow the keys that do not fit are left out
rather than cut in half, and help reads ``? more``: it lists them all.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import ClassVar

from rich.style import Style
from rich.text import Text
from textual import events
from textual.binding import Binding
from textual.widget import Widget

ALWAYS = ("help", "quit")  # action names never left out: help lists whatever is


@dataclass(frozen=True)
class Item:
    keys: str  # what the bar shows for the key(s), e.g. "s" or "[ ]"
    press: str  # the key a click presses
    description: str
    action: str
    enabled: bool = True

    @property
    def width(self) -> int:
        return len(self.keys) + 1 + len(self.description)


def _order(screen: object) -> dict[str, int]:
    declared = [b for b in getattr(type(screen), "BINDINGS", []) if isinstance(b, Binding)]
    out: dict[str, int] = {}
    for i, b in enumerate(declared):
        out.setdefault(b.id or b.action, i)
    return out


def items_of(screen: object, key_display: object) -> list[Item]:
    """The shown bindings of ``screen``, one item per binding id (or group), in declared order."""
    order = _order(screen)
    slots: dict[str, list[tuple[str, Binding, bool]]] = {}
    for active in screen.active_bindings.values():  # type: ignore[attr-defined]
        binding: Binding = active.binding
        if not binding.show or not binding.description:
            continue
        group = binding.group.description if binding.group is not None else ""
        slot = f"group:{group}" if group else (binding.id or binding.action)
        slots.setdefault(slot, []).append(
            (key_display(binding), binding, active.enabled))  # type: ignore[operator]

    def rank(slot: str) -> int:
        return min(order.get(b.id or b.action, len(order)) for _, b, _ in slots[slot])

    items = []
    for slot in sorted(slots, key=rank):
        entries = slots[slot]
        keys = list(dict.fromkeys(k for k, _, _ in entries))
        first = entries[0][1]
        grouped = slot.startswith("group:")
        items.append(Item(" ".join(keys) if grouped else "/".join(keys), first.key,
                          slot[len("group:"):] if grouped else first.description,
                          first.action, any(e for _, _, e in entries)))
    return items


MORE = "more"  # help's word when keys are left out: ? lists them


def fit(items: list[Item], width: int) -> list[Item]:
    """The items that fit in ``width`` cells: help and quit always, then others in order.

    When some are left out, help reads "? more" (as wide as "? help"), so the bar says that
    it does not show every key and where the rest are.
    """
    def base(action: str) -> str:
        return action.split("(", 1)[0]

    def total(chosen: list[Item]) -> int:
        return sum(i.width for i in chosen) + max(0, len(chosen) - 1)

    if total(items) <= width:
        return items
    kept = [i for i in items if base(i.action) in ALWAYS]
    used = total(kept)
    chosen = set(map(id, kept))
    for item in items:
        if id(item) in chosen:
            continue
        if used + 1 + item.width <= width:
            chosen.add(id(item))
            used += 1 + item.width
    return [replace(i, description=MORE) if base(i.action) == "help" else i
            for i in items if id(i) in chosen]


class KeyBar(Widget):
    """One line of keys for the screen it is on; click a key to press it."""

    COMPONENT_CLASSES: ClassVar[set[str]] = {"key-bar--key", "key-bar--description"}
    DEFAULT_CSS = """
    KeyBar {
        dock: bottom;
        height: 1;
        background: $footer-background;
        color: $footer-foreground;
        .key-bar--key { color: $footer-key-foreground; text-style: bold; }
        .key-bar--description { color: $footer-description-foreground; }
    }
    """

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(id=id)
        self._spans: list[tuple[int, int, str]] = []

    def on_mount(self) -> None:
        self.screen.bindings_updated_signal.subscribe(self, lambda _screen: self.refresh())

    def on_unmount(self) -> None:
        self.screen.bindings_updated_signal.unsubscribe(self)

    def shown(self) -> list[Item]:
        width = self.size.width or self.app.size.width
        return fit(items_of(self.screen, self.app.get_key_display), width)

    def render(self) -> Text:
        key_style = self.get_component_rich_style("key-bar--key")
        text_style = self.get_component_rich_style("key-bar--description")
        out = Text(no_wrap=True, overflow="crop", end="")
        self._spans = []
        for item in self.shown():
            if out:
                out.append(" ")
            start = len(out)
            dim = Style() if item.enabled else Style(dim=True)
            out.append(item.keys, key_style + dim)
            out.append(" " + item.description, text_style + dim)
            self._spans.append((start, len(out), item.press))
        return out

    def on_click(self, event: events.Click) -> None:
        for start, end, key in self._spans:
            if start <= event.x < end:
                self.app.simulate_key(key)
                return

    def on_resize(self) -> None:
        self.refresh()
