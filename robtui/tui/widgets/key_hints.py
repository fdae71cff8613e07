"""The bar of key hints at the bottom of every screen (click a hint to run it).

A screen with a ``key_hints()`` method (key label, what, action) lists exactly those, in order,
so that keys bound one by one (j and k, 1 to 5) read as one hint and the list can follow the
screen's state; otherwise the screen's shown bindings and the app's are listed. While a text field has focus the bar shows that field's keys instead
(``show_field``), so the workbench's keys are not offered where they would type letters.
The hints wrap onto as many lines as the terminal's width needs.
"""

from __future__ import annotations

from collections.abc import Sequence

from textual.binding import Binding
from textual.content import Content
from textual.widgets import Static

FIELD_KEYS: tuple[tuple[str, str], ...] = (
    ("enter", "done"),
    ("ctrl+j", "new line"),
    ("esc", "leave the field"),
)
INPUT_KEYS: tuple[tuple[str, str], ...] = (("enter", "done"), ("esc", "leave the field"))


def hint(key: str, what: str, action: str | None = None) -> Content:
    """One 'key what' pair; clicking it runs ``action`` when given."""
    text = Content.assemble((f" {key} ", "bold reverse"), (what, ""))
    return text.stylize(f"@click={action}") if action else text


class KeyHints(Static):
    """The screen's keys as 'key what' pairs, or the focused text field's keys."""

    def on_mount(self) -> None:
        self.update(self._hints())

    def show_field(self, keys: Sequence[tuple[str, str]] | None) -> None:
        """Show a text field's keys (``None``: the screen's keys again)."""
        if keys is None:
            self.update(self._hints())
        else:
            self.update(Content("  ").join([hint(k, w) for k, w in keys]))

    def _hints(self) -> Content:
        listing = getattr(self.screen, "key_hints", None)
        listed = listing() if callable(listing) else None
        if listed:
            parts = [
                hint(key, what, action if "." in action else f"screen.{action}")
                for key, what, action in listed
            ]
        else:
            parts = [hint(k, w, a) for k, w, a in self._shown_bindings(("screen", "app"))]
        return Content(" ").join(parts)

    def _shown_bindings(self, namespaces: Sequence[str]) -> list[tuple[str, str, str]]:
        found: list[tuple[str, str, str]] = []
        seen: set[str] = set()
        sources = {"screen": self.screen.BINDINGS, "app": self.app.BINDINGS}
        for namespace in namespaces:
            for binding in sources[namespace]:
                if not isinstance(binding, Binding) or not binding.show:
                    continue
                name = binding.action.removeprefix("app.").removeprefix("screen.")
                if name in seen:
                    continue
                seen.add(name)
                first = Binding(binding.key.split(",")[0].strip(), binding.action)
                key = binding.key_display or self.app.get_key_display(first)
                action = (
                    binding.action if "." in binding.action else f"{namespace}.{binding.action}"
                )
                found.append((key, binding.description, action))
        return found
