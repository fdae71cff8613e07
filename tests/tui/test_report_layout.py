"""A long report is laid out only as far as the reviewer can reach soon, and every sentence
is still reached: by moving down, by scrolling, by a search or a jump, by End."""

from __future__ import annotations

from textual.app import App, ComposeResult

from robtui.reading.document import Document, Sentence
from robtui.tui.widgets.report_view import AHEAD, FIRST, ReportView


def _long_document(count: int = 600) -> Document:
    sentences, text = [], ""
    for i in range(count):
        body = (f"Sentence {i} of a long invented report, long enough to wrap over two "
                f"lines of the view when the terminal is narrow{' (last)' if i == count - 1 else ''}.")
        start = len(text)
        text += body + " "
        sentences.append(Sentence(index=i, start=start, end=start + len(body), text=body,
                                  section=f"part_{i // 50}", page=1 + i // 40))
    return Document(path="long.pdf", sha256="0" * 64, kind="pdf", text=text,
                    sentences=sentences, pages=15)


class _Holder(App[None]):
    def compose(self) -> ComposeResult:
        yield ReportView(id="report")


async def test_a_long_report_opens_with_its_first_screens_and_reaches_every_sentence():
    document = _long_document()
    app = _Holder()
    async with app.run_test(size=(80, 24)) as pilot:
        view = app.query_one(ReportView)
        view.focus()
        view.show_document(document)
        await pilot.pause()
        entries = len(view._entries)
        assert view.laid_out and view.option_count == FIRST < entries  # not all of it at once

        # moving down with the cursor lays out ahead of it
        for _ in range(FIRST):
            await pilot.press("down")
        await pilot.pause()
        assert view.option_count > FIRST and view.highlighted_sentence is not None

        # a search (or ] to a suggestion) far on: laid out up to it, the cursor on it
        view.go_to_sentence(450)
        await pilot.pause()
        assert view.highlighted_sentence.index == 450
        assert view.option_count <= view._index_of[450] + AHEAD

        # scrolling to the end of what is laid out brings more
        before = view.option_count
        view.scroll_end(animate=False, immediate=True)
        await pilot.pause()
        await pilot.pause()
        assert view.option_count > before

        # End: the last sentence, whatever is laid out
        await pilot.press("end")
        await pilot.pause()
        assert view.option_count == entries
        assert view.highlighted_sentence.text.endswith("(last).")
        # each sentence exactly once, in order
        shown = [o.id for o in view.options if o.id]
        assert shown == [f"s{i}" for i in range(len(document.sentences))]


async def test_marks_reach_sentences_laid_out_later():
    """A suggestion beyond the first screens carries its rank once it is laid out."""
    from types import SimpleNamespace

    document = _long_document()
    app = _Holder()
    async with app.run_test(size=(80, 24)) as pilot:
        view = app.query_one(ReportView)
        view.show_document(document)
        far = SimpleNamespace(sentence_index=500, score=0.42)
        view.mark([far], [])
        await pilot.pause()
        assert view._index_of[500] >= view.option_count  # not laid out yet
        view.go_to_sentence(500)
        await pilot.pause()
        assert "#1 0.42" in str(view.options[view.highlighted].prompt)
