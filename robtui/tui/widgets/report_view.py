"""The report, sentence by sentence under its section headings, with page numbers.

One option per sentence (so the cursor, the mouse and scrolling all work per sentence);
section headings are disabled options. The focused signalling question's suggested sentences
carry their rank and score; sentences quoted for it carry a quote mark.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from typing import Any

from rich.table import Table
from rich.text import Text
from textual.widgets import OptionList
from textual.widgets.option_list import Option

from robtui.reading.document import Document, Sentence

SUGGESTION_STYLE = "bold #111111 on #f2c078"
QUOTE_MARK = "❝"
PAGE_WIDTH = 5


def section_title(label: str) -> str:
    """'methods.randomisation.sequence_generation' -> 'Methods › Randomisation › Sequence generation'."""
    parts = [p.replace("_", " ") for p in label.split(".") if p]
    return " › ".join(p[:1].upper() + p[1:] for p in parts) or "Other"


class ReportView(OptionList):
    """The report's sentences; ``highlighted_sentence`` is the one a quote would take."""

    def __init__(self, **kwargs: Any) -> None:
        super().__init__(markup=False, **kwargs)
        self.document: Document | None = None
        self._index_of: dict[int, int] = {}  # sentence index -> option index
        self._marks: dict[int, tuple[int, float]] = {}  # sentence index -> (rank, score)
        self._quoted: set[int] = set()
        self._sentences: dict[int, Sentence] = {}

    # -- content -----------------------------------------------------------------------
    def show_document(self, document: Document) -> None:
        self.document = document
        self._marks = {}
        self._quoted = set()
        self._sentences = {s.index: s for s in document.sentences}
        options: list[Option] = []
        self._index_of = {}
        section = None
        for sentence in document.sentences:
            if sentence.section != section:
                section = sentence.section
                options.append(Option(self._section_prompt(section), disabled=True))
            self._index_of[sentence.index] = len(options)
            options.append(Option(self._prompt(sentence), id=f"s{sentence.index}"))
        self.set_options(options)
        first = next(iter(self._index_of.values()), None)
        if first is not None:
            self.highlighted = first

    def show_message(self, text: str) -> None:
        self.document = None
        self._index_of = {}
        self.set_options([Option(Text(text), disabled=True)])

    @staticmethod
    def _section_prompt(label: str) -> Table:
        grid = Table.grid(padding=(0, 1))
        grid.add_column(width=PAGE_WIDTH)
        grid.add_column(ratio=1)
        grid.add_row("", Text(f"§ {section_title(label)}", style="bold #6fa8dc"))
        return grid

    def _prompt(self, sentence: Sentence) -> Table:
        page = f"p.{sentence.page}" if sentence.page else ""
        text = Text()
        mark = self._marks.get(sentence.index)
        if mark:
            rank, score = mark
            text.append(f" #{rank} {score:.2f} ", style=SUGGESTION_STYLE)
            text.append(" ")
        if sentence.index in self._quoted:
            text.append(f"{QUOTE_MARK} ", style="bold")
        body_style = "bold" if sentence.block == "heading" else ""
        if mark:
            body_style = (body_style + " underline").strip()
        text.append(sentence.text.replace("\n", " "), style=body_style)
        grid = Table.grid(padding=(0, 1))
        grid.add_column(width=PAGE_WIDTH, justify="right", style="dim")
        grid.add_column(ratio=1)
        grid.add_row(page, text)
        return grid

    def mark(self, suggestions: Sequence[Any], quoted: Iterable[int]) -> None:
        """Show ``suggestions`` (rank order) and the ``quoted`` sentence indexes."""
        if self.document is None:
            return
        new_marks = {s.sentence_index: (rank, s.score) for rank, s in enumerate(suggestions, 1)}
        new_quoted = set(quoted)
        changed = set(self._marks) ^ set(new_marks) | (self._quoted ^ new_quoted)
        changed |= {i for i in new_marks if self._marks.get(i) != new_marks[i]}
        self._marks, self._quoted = new_marks, new_quoted
        for sentence_index in changed:
            option_index = self._index_of.get(sentence_index)
            if option_index is None:
                continue
            sentence = self._sentences[sentence_index]
            self.replace_option_prompt_at_index(option_index, self._prompt(sentence))

    # -- cursor ------------------------------------------------------------------------
    @property
    def highlighted_sentence(self) -> Sentence | None:
        if self.document is None or self.highlighted is None:
            return None
        option = self.options[self.highlighted]
        if option.id is None or not option.id.startswith("s"):
            return None
        return self._sentences.get(int(option.id[1:]))

    def go_to_sentence(self, sentence_index: int) -> None:
        option_index = self._index_of.get(sentence_index)
        if option_index is not None:
            self.highlighted = option_index
            self.scroll_to_highlight(top=False)

    def find(self, query: str, *, backwards: bool = False) -> tuple[int, int] | None:
        """Move to the next sentence containing ``query``; (position, count) of matches."""
        if self.document is None or not query.strip():
            return None
        needle = query.casefold()
        hits = [s.index for s in self.document.sentences if needle in s.text.casefold()]
        if not hits:
            return None
        current = self.highlighted_sentence
        here = current.index if current else -1
        if backwards:
            before = [i for i in hits if i < here]
            target = before[-1] if before else hits[-1]
        else:
            after = [i for i in hits if i > here]
            target = after[0] if after else hits[0]
        self.go_to_sentence(target)
        return hits.index(target) + 1, len(hits)
