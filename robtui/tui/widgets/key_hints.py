"""The bar of key hints at the bottom of every screen (click a hint to run it).

Built once from the screen's bindings, so it costs nothing when focus moves.
"""

from __future__ import annotations

from textual.binding import Binding
from textual.content import Content
from textual.widgets import Static


class KeyHints(Static):
    """The shown bindings of the screen (and the app's), as 'key what' pairs."""

    def on_mount(self) -> None:
        self.update(self._hints())

    def _hints(self) -> Content:
        parts: list[Content] = []
        seen: set[str] = set()
        for namespace, bindings in (("screen", self.screen.BINDINGS), ("app", self.app.BINDINGS)):
            for binding in bindings:
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
                hint = Content.assemble(
                    (f" {key} ", "bold reverse"), (f" {binding.description} ", "")
                )
                parts.append(hint.stylize(f"@click={action}"))
        return Content(" ").join(parts)
