"""The report, sentence by sentence under its section headings, with page numbers.

One option per sentence (so the cursor, the mouse and scrolling all work per sentence);
section headings are disabled options. The focused signalling question's suggested sentences
carry their rank and score; sentences quoted for it carry a quote mark.
"""

from __future__ import annotations

import textwrap
from collections.abc import Iterable, Sequence
from typing import Any

from rich.text import Text
from textual.widgets import OptionList
from textual.widgets.option_list import Option

from robtui.reading.document import Document, Sentence

SUGGESTION_STYLE = "bold #111111 on #f2c078"
QUOTE_MARK = "❝"
PASSAGE_MARK = "┃"  # a sentence inside the passage being marked (v ... q)
HEADING_STYLE = "bold #6fa8dc"
# A report is laid out only as far as the reviewer can reach soon: FIRST entries (sentences and
# section lines; several screens even on a tall terminal) when it opens, then AHEAD more each
# time the view comes within two screens of the end of what is laid out, or a move (search,
# suggestion, End) goes further. Laying a whole long report out as it opened had Textual wrap,
# measure and repaint the view once per batch while the reviewer was typing.
FIRST = 80
AHEAD = 60
GUTTER = 7  # page number column, then the sentence


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
        self.passage_start: int | None = None  # sentence a passage being marked starts at (v)
        self._in_passage: set[int] = set()
        self._built_width = self._width = 0
        self._entries: list[Sentence | str] = []  # what the options show, in order

    # -- content -----------------------------------------------------------------------
    def show_document(self, document: Document) -> None:
        self.document = document
        self.passage_start, self._in_passage = None, set()
        self._marks = {}
        self._quoted = set()
        self._sentences = {s.index: s for s in document.sentences}
        self._build()
        first = next(iter(self._index_of.values()), None)
        if first is not None:
            self.highlighted = first

    def _build(self) -> None:
        """Lay the report's first screens out at the current width (the rest follows as the
        reviewer moves toward it: ``_lay_out_to``)."""
        assert self.document is not None
        self._built_width = self._width = self._text_width
        entries: list[Sentence | str] = []  # a sentence, or the label of a section heading
        self._index_of = {}
        section = None
        for sentence in self.document.sentences:
            if sentence.section != section:
                section = sentence.section
                if sentence.block != "heading":  # a heading of its own names the section
                    entries.append(section)
            self._index_of[sentence.index] = len(entries)
            entries.append(sentence)
        self._entries = entries
        self.set_options(self._options_between(0, FIRST))

    def _options_between(self, start: int, stop: int) -> list[Option]:
        """The options of entries ``start:stop``, with the marks of the moment."""
        return [
            Option(self._section_prompt(entry), disabled=True) if isinstance(entry, str)
            else Option(self._prompt(entry), id=f"s{entry.index}")
            for entry in self._entries[start:stop]
        ]

    def _lay_out_to(self, entry_index: int) -> None:
        """Lay the report out up to ``entry_index`` and AHEAD entries beyond (or to its end)."""
        stop = min(len(self._entries), entry_index + AHEAD)
        if stop > self.option_count:
            self.add_options(self._options_between(self.option_count, stop))

    def watch_scroll_y(self, old_value: float, new_value: float) -> None:
        super().watch_scroll_y(old_value, new_value)
        if self.option_count < len(self._entries) and (
            new_value + 2 * self.size.height >= self.virtual_size.height
        ):  # near the end of what is laid out: the next entries, once this scroll is drawn
            self.call_later(self._lay_out_to, self.option_count)

    def action_last(self) -> None:
        """End: the report's last sentence (laying out what is left)."""
        self._lay_out_to(len(self._entries))
        super().action_last()

    @property
    def laid_out(self) -> bool:
        """True once the report's first screens are in the view (the rest is laid out as
        the reviewer moves toward it)."""
        return self.document is None or self.option_count >= min(FIRST, len(self._entries))

    def show_message(self, text: str) -> None:
        self.document = None
        self._index_of = {}
        self.set_options([Option(Text(text), disabled=True)])

    @property
    def _text_width(self) -> int:
        # From the widget's own width, keeping room for the scrollbar whether or not it shows,
        # so its appearing does not lay the whole report out again.
        width = self.size.width or 80
        return max(20, width - GUTTER - self.styles.scrollbar_size_vertical - 2)

    def _section_prompt(self, label: str) -> Text:
        return Text(" " * GUTTER + f"§ {section_title(label)}", style=HEADING_STYLE)

    def _prompt(self, sentence: Sentence) -> Text:
        """The sentence wrapped to the view's width under its page number (hanging indent)."""
        marks = Text()
        mark = self._marks.get(sentence.index)
        if mark:
            rank, score = mark
            marks.append(f" #{rank} {score:.2f} ", style=SUGGESTION_STYLE)
            marks.append(" ")
        if sentence.index in self._quoted:
            marks.append(f"{QUOTE_MARK} ", style="bold")
        if sentence.index in self._in_passage:
            marks.append(f"{PASSAGE_MARK} ", style="bold reverse")
        heading = sentence.block == "heading"
        if heading:
            marks.append("§ ", style=HEADING_STYLE)
        body_style = HEADING_STYLE if heading else ""
        if mark:
            body_style = (body_style + " underline").strip()
        lines = textwrap.wrap(
            " ".join(sentence.text.split()),
            width=self._width,
            initial_indent=" " * marks.cell_len,
            break_on_hyphens=False,
        ) or [" " * marks.cell_len]
        page = f"p.{sentence.page}" if sentence.page else ""
        text = Text(f"{page:>{GUTTER - 1}} ", style="dim")
        text.append_text(marks)
        text.append(lines[0][marks.cell_len :], style=body_style)
        for line in lines[1:]:
            text.append("\n" + " " * GUTTER)
            text.append(line, style=body_style)
        return text

    def on_resize(self) -> None:
        if self.document is not None and self._built_width != self._text_width:
            here = self.highlighted_sentence
            self._build()
            if here is not None:  # the sentence again a third of the way down (laid out up
                self.go_to_sentence(here.index)  # to it first when it lies further on)
                self.call_after_refresh(self.go_to_sentence, here.index)

    def mark(self, suggestions: Sequence[Any], quoted: Iterable[int]) -> None:
        """Show ``suggestions`` (rank order) and the ``quoted`` sentence indexes."""
        if self.document is None:
            return
        new_marks = {s.sentence_index: (rank, s.score) for rank, s in enumerate(suggestions, 1)}
        new_quoted = set(quoted)
        changed = set(self._marks) ^ set(new_marks) | (self._quoted ^ new_quoted)
        changed |= {i for i in new_marks if self._marks.get(i) != new_marks[i]}
        self._marks, self._quoted = new_marks, new_quoted
        self._redraw(changed)

    # -- a passage across sentences (v marks where it starts) ----------------------------
    def start_passage(self) -> bool:
        """Start a passage at the highlighted sentence, or drop the one being marked; True
        when a passage is now being marked."""
        here = self.highlighted_sentence
        self.passage_start = None if self.passage_start is not None or here is None else here.index
        self._show_passage()
        return self.passage_start is not None

    @property
    def passage(self) -> tuple[Sentence, Sentence] | None:
        """First and last sentence of the passage being marked (cursor and anchor, ordered)."""
        here = self.highlighted_sentence
        if self.passage_start is None or here is None or self.passage_start not in self._sentences:
            return None
        first, last = sorted((self.passage_start, here.index))
        return self._sentences[first], self._sentences[last]

    def _show_passage(self) -> None:
        span = self.passage
        inside = set(range(span[0].index, span[1].index + 1)) if span else set()
        changed, self._in_passage = inside ^ self._in_passage, inside
        self._redraw(changed)

    def on_option_list_option_highlighted(self) -> None:
        if self.passage_start is not None:
            self._show_passage()
        if self.highlighted is not None and self.highlighted + AHEAD // 2 >= self.option_count:
            self._lay_out_to(self.highlighted)  # the cursor nears the end of what is laid out

    def _redraw(self, sentence_indexes: Iterable[int]) -> None:
        for sentence_index in sentence_indexes:
            option_index = self._index_of.get(sentence_index)
            if option_index is None:
                continue
            if option_index < self.option_count:  # else its chunk brings the new marks
                self.replace_option_prompt_at_index(
                    option_index, self._prompt(self._sentences[sentence_index]))

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
            self._lay_out_to(option_index)  # with some context after it
            self.highlighted = option_index
            self._centre(option_index)

    def _centre(self, option_index: int) -> None:
        """Scroll so the sentence sits a third of the way down, with its context above."""
        line = self._index_to_line.get(option_index)  # OptionList's own line map
        if line is not None:
            self.scroll_to(y=max(0, line - self.size.height // 3), animate=False, immediate=True)

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
