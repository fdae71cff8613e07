"""Plain text into a Document whose offsets are offsets into the text itself.

A block is a line, or several lines when a paragraph was hard-wrapped (the line before does not
end a sentence and the next line carries on in lower case). Blank lines always end a block.
"""

from __future__ import annotations

import hashlib
import re
from pathlib import Path

from robtui.errors import ReadingError
from robtui.reading.assemble import Block, build_sentences, is_caption, looks_like_heading
from robtui.reading.document import Document
from robtui.reading.sections import match_heading

_CELL_SEPARATOR = re.compile(r"\t|\s\|\s")
_WIDE_GAP = re.compile(r" {3,}")


def _is_table_row(line: str) -> bool:
    """Cells split by tabs or bars, or by wide gaps between short (non-sentence) cells."""
    if _CELL_SEPARATOR.search(line):
        return True
    cells = [c for c in _WIDE_GAP.split(line.strip()) if c]
    return len(cells) >= 3 and max(len(c) for c in cells) <= 40


def _lines(text: str) -> list[tuple[int, int]]:
    """(start, end) of each line, end before the line break."""
    spans = []
    pos = 0
    for line in text.splitlines(keepends=True):
        body = line.rstrip("\r\n")
        spans.append((pos, pos + len(body)))
        pos += len(line)
    return spans


def _wraps(text: str, prev: tuple[int, int], nxt: tuple[int, int]) -> bool:
    """True when line ``nxt`` continues the paragraph of line ``prev`` (a hard wrap)."""
    before = text[prev[0] : prev[1]].rstrip()
    after = text[nxt[0] : nxt[1]].lstrip()
    if len(before) < 40 or not after or before[-1] in ".?!:":
        return False
    return after[0].islower() or after[0].isdigit() or after[0] in "(,;–-"


def blocks_from_text(text: str) -> list[Block]:
    """Blocks of ``text`` with their kind: heading, caption, table or body."""
    groups: list[list[tuple[int, int]]] = []
    for span in _lines(text):
        a, b = span
        while a < b and text[a].isspace():
            a += 1
        while b > a and text[b - 1].isspace():
            b -= 1
        if a == b:
            groups.append([])
            continue
        if groups and groups[-1] and _wraps(text, groups[-1][-1], (a, b)):
            groups[-1].append((a, b))
        else:
            groups.append([(a, b)])
    blocks: list[Block] = []
    groups = [g for g in groups if g]
    in_front = True  # before the first heading that names a section (Abstract, Methods, ...)
    for i, group in enumerate(groups):
        start, end = group[0][0], group[-1][1]
        body = text[start:end]
        if is_caption(body):
            kind = "caption"
        elif len(group) == 1 and _is_table_row(body) and not body.rstrip().endswith("."):
            kind = "table"
        elif len(group) == 1 and i + 1 < len(groups) and looks_like_heading(body):
            kind = "heading"
            if i == 0:  # the title, or a report that opens with a section
                in_front = match_heading(body, keywords=False) is None
            elif in_front:
                # Between the title and the first section the short capitalised lines are the
                # byline and affiliations, not headings; only a named section is one there.
                in_front = match_heading(body, keywords=False) is None
                kind = "body" if in_front else "heading"
        else:
            kind = "body"
        blocks.append(Block(start, end, kind))
    return _merge_table_rows(blocks)


def _merge_table_rows(blocks: list[Block]) -> list[Block]:
    """Consecutive table rows form one table block."""
    merged: list[Block] = []
    for block in blocks:
        if block.kind == "table" and merged and merged[-1].kind == "table":
            merged[-1].end = block.end
        else:
            merged.append(block)
    return merged


def document_from_text(
    text: str, *, path: str = "<text>", kind: str = "txt", sha256: str | None = None
) -> Document:
    """A Document of ``text``: sentences and sections, offsets into ``text`` itself."""
    digest = sha256 or hashlib.sha256(text.encode("utf-8")).hexdigest()
    sentences = build_sentences(text, blocks_from_text(text))
    return Document(path=path, sha256=digest, kind=kind, text=text, sentences=sentences)


# Bytes that never occur in text files; a handful of them means the file is binary.
_BINARY_BYTES = set(range(9)) | {11} | set(range(14, 32)) - {27}


# Byte-order marks, longest first (a UTF-32 LE mark starts like a UTF-16 LE one).
_BOMS = (
    (b"\xff\xfe\x00\x00", "utf-32-le", "UTF-32"),
    (b"\x00\x00\xfe\xff", "utf-32-be", "UTF-32"),
    (b"\xef\xbb\xbf", "utf-8", "UTF-8"),
    (b"\xff\xfe", "utf-16-le", "UTF-16"),
    (b"\xfe\xff", "utf-16-be", "UTF-16"),
)


def _wide_encoding(sample: bytes) -> str | None:
    """UTF-16 or UTF-32 without a byte-order mark, told by where the zero bytes fall (text
    in Latin script has a zero high byte in nearly every code unit)."""
    n = len(sample) - len(sample) % 4
    if n < 8:
        return None
    zeros = [sum(1 for i in range(k, n, 4) if sample[i] == 0) for k in range(4)]
    units = n // 4
    if zeros[1] > 0.7 * units and zeros[2] > 0.7 * units and zeros[3] > 0.7 * units:
        return "utf-32-le"
    if zeros[0] > 0.7 * units and zeros[1] > 0.7 * units and zeros[2] > 0.7 * units:
        return "utf-32-be"
    odd, even = zeros[1] + zeros[3], zeros[0] + zeros[2]
    if odd > 0.7 * 2 * units and even < 0.1 * 2 * units:
        return "utf-16-le"
    if even > 0.7 * 2 * units and odd < 0.1 * 2 * units:
        return "utf-16-be"
    return None


def decode_text_file(path: Path, data: bytes) -> tuple[str, list[str]]:
    """The characters of a text file and any warnings; ReadingError for binary data.

    UTF-8 (with or without a byte-order mark), UTF-16 and UTF-32 (with a mark, or told by
    their zero bytes), else cp1252 / latin-1 with a warning.
    """
    if not data.strip():
        raise ReadingError(f"{path}: the file is empty; nothing to read")
    if data.startswith(b"%PDF"):
        raise ReadingError(f"{path}: this is a PDF with a text-file name; rename it to .pdf")
    for bom, codec, name in _BOMS:
        if data.startswith(bom):
            try:
                text = data[len(bom) :].decode(codec)
            except UnicodeDecodeError as error:
                raise ReadingError(
                    f"{path}: {name} text (by its byte-order mark) that does not decode at byte "
                    f"{error.start + len(bom)}: save it again as UTF-8"
                ) from None
            note = "a UTF-8 byte-order mark was dropped" if codec == "utf-8" else f"the file is {name}"
            return _checked_text(path, text), [f"{note}; offsets count its characters after the mark"]
    sample = data[:8192]
    if b"\x00" in sample:
        codec = _wide_encoding(sample)
        if codec is None:
            raise ReadingError(
                f"{path}: binary data, not text (it holds NUL bytes); open the original report "
                "instead"
            )
        try:
            text = data.decode(codec)
        except UnicodeDecodeError as error:
            raise ReadingError(
                f"{path}: looks like {codec.upper()} text without a byte-order mark but does not "
                f"decode at byte {error.start}: save it again as UTF-8"
            ) from None
        return _checked_text(path, text), [
            f"the file is {codec.upper()} without a byte-order mark; offsets count its characters"
        ]
    odd = sum(1 for byte in sample if byte in _BINARY_BYTES)
    if odd > max(4, len(sample) // 100):
        raise ReadingError(f"{path}: binary data, not text; open the original report instead")
    try:
        return data.decode("utf-8"), []
    except UnicodeDecodeError as error:
        utf8_error = error
    try:
        text = data.decode("cp1252")
        encoding = "cp1252 (Windows Western)"
    except UnicodeDecodeError:
        text = data.decode("latin-1")
        encoding = "latin-1"
    warning = (
        f"not UTF-8 (byte {utf8_error.start}); read as {encoding}. Save the file as UTF-8 so "
        "quotes match exactly"
    )
    return text, [warning]


def _checked_text(path: Path, text: str) -> str:
    odd = sum(1 for ch in text[:8192] if ord(ch) in _BINARY_BYTES)
    if odd > max(4, len(text[:8192]) // 100):
        raise ReadingError(f"{path}: binary data, not text; open the original report instead")
    return text


def read_text_file(path: Path, data: bytes, digest: str) -> Document:
    """A .txt file as a Document (offsets into the file's decoded characters)."""
    from robtui.reading.reader import check_text_length

    text, warnings = decode_text_file(path, data)
    check_text_length(path, len(text))
    document = document_from_text(text, path=str(path), kind="txt", sha256=digest)
    if not document.sentences:
        raise ReadingError(f"{path}: no text found in the file")
    document.warnings.extend(warnings)
    return document
