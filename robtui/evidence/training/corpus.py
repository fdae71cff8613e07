"""The annotated development corpus (CONSORT-TM) and the question-to-item mapping.

Source: Kilicoglu H, Rosemblat G, Hoang L, Wadhwa S, Peng Z, Malicki M, Schneider J,
ter Riet G. "Toward assessing clinical trial publications for reporting transparency."
J Biomed Inform 2021;116:103717. Articles from the PubMed Central open-access subset.
Used for training, tests and benchmarks only; never copied into the package or the docs.
"""

from __future__ import annotations

import json
import os
import xml.etree.ElementTree as ET
from dataclasses import dataclass, field
from pathlib import Path

from robtui.errors import DataFileError

CORPUS_ENV = "ROBTUI_CORPUS"


@dataclass(frozen=True)
class GoldSentence:
    start: int
    end: int
    text: str
    items: tuple[str, ...]  # CONSORT 2010 items, e.g. ("8a", "9")


@dataclass(frozen=True)
class GoldSection:
    start: int
    end: int
    title: str
    title_start: int
    title_end: int
    path: tuple[str, ...]  # titles from the top level down to this one


@dataclass(frozen=True)
class Article:
    id: str
    text: str
    sentences: tuple[GoldSentence, ...]
    sections: tuple[GoldSection, ...] = field(default=())


@dataclass(frozen=True)
class ItemMapping:
    """Which CONSORT items carry the evidence for each signalling question."""

    questions: dict[str, tuple[str, ...]]
    hard: tuple[str, ...]
    hit_rule: str


def default_corpus_dir() -> Path | None:
    """``$ROBTUI_CORPUS`` or ``../shared/corpus`` beside the repository; None if absent."""
    env = os.environ.get(CORPUS_ENV)
    candidates = [Path(env)] if env else []
    candidates.append(Path(__file__).resolve().parents[3] / "shared" / "corpus")
    candidates.append(Path.cwd().parent / "shared" / "corpus")
    for candidate in candidates:
        if (candidate / "consort-tm").is_dir():
            return candidate
    return None


def load_article(path: Path) -> Article:
    """Parse one CONSORT-TM XML article."""
    try:
        root = ET.parse(path).getroot()
    except (ET.ParseError, OSError) as error:
        raise DataFileError(f"{path}: not a readable corpus article ({error})") from error
    text_el = root.find("text")
    if text_el is None or text_el.text is None:
        raise DataFileError(f"{path}: corpus article has no <text> element")
    text = text_el.text
    sentences = []
    for el in root.iter("sentence"):
        start, end = (int(x) for x in el.get("charOffset", "0-0").split("-"))
        items = tuple(i.strip() for i in (el.get("selection") or "").split(",") if i.strip())
        sentences.append(GoldSentence(start, end, text[start:end], items))
    sections: list[GoldSection] = []

    def walk(element: ET.Element, trail: tuple[str, ...]) -> None:
        for child in element.findall("section"):
            start, end = (int(x) for x in child.get("textSpan", "0-0").split("-"))
            t_start, t_end = (int(x) for x in child.get("titleSpan", "0-0").split("-"))
            title = child.get("title", "")
            here = trail + (title,)
            sections.append(GoldSection(start, end, title, t_start, t_end, here))
            walk(child, here)

    walk(root, ())
    return Article(root.get("id") or path.stem, text, tuple(sentences), tuple(sections))


def load_corpus(corpus_dir: Path) -> list[Article]:
    """All articles of ``corpus_dir/consort-tm``, sorted by id (a stable article order)."""
    folder = Path(corpus_dir) / "consort-tm"
    if not folder.is_dir():
        raise DataFileError(f"{corpus_dir}: no consort-tm/ folder; pass the corpus folder")
    return [load_article(p) for p in sorted(folder.glob("*.xml"))]


def load_mapping(corpus_dir: Path) -> ItemMapping:
    """The RoB 2 question -> CONSORT item mapping shipped beside the corpus."""
    path = Path(corpus_dir) / "rob2-consort-map.json"
    try:
        raw = json.loads(path.read_text(encoding="utf-8"))
    except (OSError, json.JSONDecodeError) as error:
        raise DataFileError(f"{path}: cannot read the item mapping ({error})") from error
    return ItemMapping(
        questions={q: tuple(items) for q, items in raw["questions"].items()},
        hard=tuple(raw.get("hard", ())),
        hit_rule=raw.get("hit_rule", ""),
    )


def is_hit(span: tuple[int, int], gold: tuple[int, int]) -> bool:
    """The corpus hit rule: overlap of at least half of the shorter of the two spans."""
    overlap = min(span[1], gold[1]) - max(span[0], gold[0])
    shorter = min(span[1] - span[0], gold[1] - gold[0])
    return shorter > 0 and overlap >= shorter / 2


def gold_spans(article: Article, items: tuple[str, ...]) -> list[tuple[int, int]]:
    """Spans of the article's sentences annotated with any of ``items``."""
    wanted = set(items)
    return [(s.start, s.end) for s in article.sentences if wanted.intersection(s.items)]
