"""Markdown and HTML full text into a Document (offsets into the extracted plain text)."""

from __future__ import annotations

import re
from html.parser import HTMLParser
from pathlib import Path

from robtui.errors import ReadingError
from robtui.reading.assemble import Block, build_sentences, is_caption
from robtui.reading.document import Document
from robtui.reading.normalise import normalise_chars
from robtui.reading.text import blocks_from_text, decode_text_file

_MD_HEADING = re.compile(r"^\s{0,3}#{1,6}\s+(.*?)\s*#*\s*$")
_MD_TABLE_RULE = re.compile(r"^\s*\|?\s*:?-{3,}:?\s*(\|\s*:?-{3,}:?\s*)*\|?\s*$")
# Every repeated part is bounded: an unbounded lazy or negated class re-scans the rest of the
# paragraph from each opening mark, which is quadratic on a line of unclosed marks ("*a *a ...",
# "![![![..."). Longer spans than these are left as written (the marks stay in the text).
_MD_INLINE = [
    (re.compile(r"!\[([^\]\n]{0,500})\]\([^)\s]{0,2000}\)"), r"\1"),
    (re.compile(r"\[([^\]\n]{1,500})\]\([^)\s]{0,2000}\)"), r"\1"),
    (re.compile(r"(\*\*|__)([^\n]{1,500}?)\1"), r"\2"),
    (re.compile(r"(?<![\w*])([*_])(?!\s)([^\n]{1,500}?)(?<!\s)\1(?![\w*])"), r"\2"),
    (re.compile(r"`([^`]{1,2000})`"), r"\1"),
]


def _inline_md(text: str) -> str:
    for pattern, repl in _MD_INLINE:
        text = pattern.sub(repl, text)
    return text


class _Blocks(list):
    """(kind, text) blocks that count their characters and stop the reading (ReadingError)
    once the text passes what robtui reads for one report."""

    def __init__(self, path: str) -> None:
        super().__init__()
        self.path = path
        self.chars = 0

    def append(self, block: tuple[str, str]) -> None:
        from robtui.reading.reader import check_text_length

        self.chars += len(block[1]) + 2  # the blank line joining blocks
        check_text_length(self.path, self.chars)
        super().append(block)


def markdown_blocks(source: str, path: str = "<markdown>") -> list[tuple[str, str]]:
    """(kind, text) blocks of a Markdown document."""
    blocks = _Blocks(path)
    paragraph: list[str] = []
    table: list[str] = []

    def flush() -> None:
        if paragraph:
            blocks.append(("body", _inline_md(" ".join(paragraph))))
            paragraph.clear()
        if table:
            blocks.append(("table", "\n".join(table)))
            table.clear()

    for raw in source.splitlines():
        line = raw.strip()
        if not line or line.startswith("```") or re.fullmatch(r"[-*_]{3,}", line):
            flush()
            continue
        heading = _MD_HEADING.match(raw)
        if heading:
            flush()
            blocks.append(("heading", _inline_md(heading.group(1))))
            continue
        if line.startswith("|"):
            if paragraph:
                flush()
            if not _MD_TABLE_RULE.match(line):
                cells = [c.strip() for c in line.strip("|").split("|")]
                table.append(" | ".join(_inline_md(c) for c in cells))
            continue
        if table:
            flush()
        item = re.match(r"^(?:[-*+]|\d+[.)])\s+(.*)$", line)
        if item:
            flush()
            paragraph.append(item.group(1))
            flush()
            continue
        paragraph.append(line.lstrip("> "))
    flush()
    return blocks


_BLOCK_TAGS = {"p", "div", "li", "blockquote", "section", "article", "dd", "dt", "pre", "tr", "br"}
_SKIP_TAGS = {"script", "style", "head", "noscript", "svg", "nav"}


class _HtmlBlocks(HTMLParser):
    def __init__(self, path: str = "<html>") -> None:
        super().__init__(convert_charrefs=True)
        self.blocks: list[tuple[str, str]] = _Blocks(path)
        self.buffer: list[str] = []
        self.kind = "body"
        self.skip = 0
        self.table_depth = 0
        self.caption_depth = 0
        self.rows: list[str] = []
        self.cells: list[str] = []

    def _flush(self) -> None:
        text = " ".join("".join(self.buffer).split())
        self.buffer.clear()
        if not text:
            return
        if self.table_depth and not self.caption_depth:
            self.cells.append(text)
            return
        kind = "caption" if self.caption_depth else self.kind
        self.blocks.append((kind, text))

    def handle_starttag(self, tag: str, attrs) -> None:
        if tag in _SKIP_TAGS:
            self.skip += 1
            return
        if re.fullmatch(r"h[1-6]", tag):
            self._flush()
            self.kind = "heading"
        elif tag in ("caption", "figcaption"):
            self._flush()
            self.caption_depth += 1
        elif tag == "table":
            self._flush()
            self.table_depth += 1
        elif tag in ("td", "th") or tag in _BLOCK_TAGS:
            self._flush()

    def handle_endtag(self, tag: str) -> None:
        if tag in _SKIP_TAGS:
            self.skip = max(0, self.skip - 1)
            return
        if re.fullmatch(r"h[1-6]", tag):
            self._flush()
            self.kind = "body"
        elif tag in ("caption", "figcaption"):
            self._flush()
            self.caption_depth = max(0, self.caption_depth - 1)
        elif tag in ("td", "th"):
            self._flush()
        elif tag == "tr" and self.table_depth:
            self._flush()
            if self.cells:
                self.rows.append(" | ".join(self.cells))
                self.cells = []
        elif tag == "table":
            self._flush()
            self.table_depth = max(0, self.table_depth - 1)
            if not self.table_depth and self.rows:
                self.blocks.append(("table", "\n".join(self.rows)))
                self.rows = []
        elif tag in _BLOCK_TAGS:
            self._flush()

    def handle_data(self, data: str) -> None:
        if not self.skip:
            self.buffer.append(data)

    def close(self) -> None:
        super().close()
        self._flush()


def html_blocks(source: str, path: str = "<html>") -> list[tuple[str, str]]:
    """(kind, text) blocks of an HTML document: headings, paragraphs, captions, tables.

    The parser is fed a megabyte at a time, so a page with more text than robtui reads stops
    there (its text so far, never the whole page's, is held)."""
    parser = _HtmlBlocks(path)
    step = 1 << 20
    for start in range(0, len(source), step):
        parser.feed(source[start : start + step])
    parser.close()
    return parser.blocks


def document_from_blocks(
    pieces: list[tuple[str, str]], *, path: str, kind: str, sha256: str
) -> Document:
    """Join (kind, text) blocks with blank lines and read them as one document."""
    parts: list[str] = []
    blocks: list[Block] = []
    length = 0
    for block_kind, raw in pieces:
        text = normalise_chars(raw).strip()
        if not text:
            continue
        if parts:
            parts.append("\n\n")
            length += 2
        if block_kind == "body" and is_caption(text):
            block_kind = "caption"
        parts.append(text)
        blocks.append(Block(length, length + len(text), block_kind))  # type: ignore[arg-type]
        length += len(text)
    text = "".join(parts)
    return Document(
        path=path, sha256=sha256, kind=kind, text=text, sentences=build_sentences(text, blocks)
    )


def read_markup(path: Path, data: bytes, digest: str, kind: str) -> Document:
    """A Markdown or HTML file as a Document."""
    source, warnings = decode_text_file(path, data)
    if kind == "md":
        pieces = markdown_blocks(source, str(path))
    else:
        pieces = html_blocks(source, str(path))
    if kind == "html" and not pieces and "<" not in source:
        pieces = [(b.kind, source[b.start : b.end]) for b in blocks_from_text(source)]
    document = document_from_blocks(pieces, path=str(path), kind=kind, sha256=digest)
    if not document.sentences:
        raise ReadingError(f"{path}: no text found in the file")
    document.warnings.extend(warnings)
    return document
