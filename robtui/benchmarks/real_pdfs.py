"""robtui bench real-pdfs: reading and evidence ranking on real published trial PDFs.

Against the hand-made gold of ``../shared/real-pdfs/gold.json`` (short verbatim snippets per
article and signalling question, copied from poppler's ``pdftotext`` output; an empty list where
the article has none). Scoring as that folder's README suggests: a suggestion is a hit when,
after normalising both (NFKC, ligatures, soft and line-end hyphens, quotes and dashes, case,
white space), the snippet occurs in it with rapidfuzz ``partial_ratio`` >= 90 and the
suggestion is at least 0.6 times the snippet's length. Figures: recall@1/3/5 over answerable
pairs (pooled, per question, per article), AUROC of the top score between answerable and
unanswerable pairs, the "no sentence found" flag, references and table cells among the top
three, prose-sentence integrity against ``pdftotext`` (a body sentence of eight or more words is
intact when it occurs as contiguous text there), sections found, reading speed per page beside
``pdftotext``'s. In the same run, a keyword-search baseline: ``pdftotext``, a regex sentence
split and TF-IDF cosine (scikit-learn) between the question's wording and each sentence.
``pdftotext`` (Debian poppler-utils) is a benchmark yardstick only, never a runtime dependency.
"""

from __future__ import annotations

import argparse
import json
import os
import re
import shutil
import subprocess
import sys
import tempfile
import time
import unicodedata
from collections.abc import Sequence
from dataclasses import asdict, dataclass, field
from pathlib import Path

import numpy as np

FOLDER_ENV = "ROBTUI_REAL_PDFS"
# The scoring the gold's README suggests (../shared/real-pdfs/README.md).
MIN_PARTIAL_RATIO = 90.0
MIN_LENGTH_SHARE = 0.6
PROSE_MIN_WORDS = 8
KEY_SECTIONS = ("abstract", "introduction", "methods", "results", "discussion", "references")
TARGETS = ("pooled recall@1 >= 0.75 and recall@3 >= 0.90, ahead of the baseline on every "
           "question; integrity >= 0.97; sections in every article; no reference or table "
           "cell in a top three; AUROC >= 0.85 (issue 13)")


# --------------------------------------------------------------------------- gold and text


def default_folder() -> Path | None:
    """``$ROBTUI_REAL_PDFS``, else ``shared/real-pdfs`` in a folder above the repository (a
    checkout's ``../shared``, or a worktree's further up); None if absent."""
    env = os.environ.get(FOLDER_ENV)
    candidates = [Path(env)] if env else []
    candidates += [p / "shared" / "real-pdfs" for p in Path(__file__).resolve().parents[2:5]]
    for candidate in candidates:
        if (candidate / "gold.json").is_file():
            return candidate
    return None


@dataclass(frozen=True)
class GoldSnippet:
    snippet: str
    where: str
    table: bool


def load_gold(folder: Path) -> dict[str, dict[str, list[GoldSnippet]]]:
    """gold.json as {file: {question: [snippet, ...]}}; DataFileError naming what is wrong."""
    from pydantic import BaseModel, ConfigDict, TypeAdapter, ValidationError

    from robtui.errors import DataFileError

    class _Snippet(BaseModel):
        model_config = ConfigDict(extra="ignore")
        snippet: str
        where: str = "other"
        table: bool = False

    path = Path(folder) / "gold.json"
    try:
        raw = TypeAdapter(dict[str, dict[str, list[_Snippet]]]).validate_json(path.read_bytes())
    except OSError as error:
        raise DataFileError(f"{path}: cannot be read ({error.strerror or error})") from error
    except ValidationError as error:
        raise DataFileError(f"{path}: not a gold file of the expected shape ({error})") from error
    return {name: {q: [GoldSnippet(s.snippet, s.where, s.table) for s in items]
                   for q, items in questions.items()}
            for name, questions in raw.items()}


_QUOTES = str.maketrans({c: "'" for c in "\u2018\u2019\u201a\u201b\u2032\u00b4`"}
                        | {c: '"' for c in "\u201c\u201d\u201e\u201f\u2033"}
                        | {c: "-" for c in "\u2010\u2011\u2012\u2013\u2014\u2015\u2212\ufe63\uff0d"}
                        | {"\u00ad": None, "\u200b": None, "\ufeff": None})
_LINE_END_HYPHEN = re.compile(r"-[ \t]*\n[ \t]*")
_SPACE = re.compile(r"\s+")


def normalise(text: str) -> str:
    """Text as the scoring compares it: NFKC (ligatures spelled out), soft hyphens dropped,
    quotes and dashes unified, hyphens dropped (so a line-end hyphen rejoined either way reads
    the same), combining marks composed, lower case, white space collapsed."""
    text = unicodedata.normalize("NFKC", text).translate(_QUOTES)
    text = _LINE_END_HYPHEN.sub("", text).replace("-", "")
    return _SPACE.sub(" ", text).strip().lower()


def contains_snippet(candidate: str, snippet: str) -> bool:
    """The hit rule on normalised texts: the snippet occurs in the candidate, fuzzily, and the
    candidate holds at least MIN_LENGTH_SHARE of the snippet's length."""
    from rapidfuzz import fuzz

    if not snippet or len(candidate) < MIN_LENGTH_SHARE * len(snippet):
        return False
    return fuzz.partial_ratio(snippet, candidate, score_cutoff=MIN_PARTIAL_RATIO) >= MIN_PARTIAL_RATIO


def hit_labels(candidates: Sequence[str], snippets: Sequence[str]) -> np.ndarray:
    """Per normalised candidate, whether it contains any of the normalised snippets."""
    return np.array([any(contains_snippet(c, s) for s in snippets) for c in candidates], dtype=bool)


def first_hit(order: Sequence[int], labels: np.ndarray) -> int | None:
    """1-based place of the first labelled candidate in ``order``; None when there is none."""
    for place, i in enumerate(order, 1):
        if labels[int(i)]:
            return place
    return None


def pdftotext(path: Path) -> tuple[str, float] | None:
    """poppler's reading of ``path`` and the seconds it took; None when it is not installed."""
    exe = shutil.which("pdftotext")
    if exe is None:
        return None
    t = time.perf_counter()
    done = subprocess.run([exe, "-enc", "UTF-8", str(path), "-"], capture_output=True, check=False)
    seconds = time.perf_counter() - t
    if done.returncode != 0:
        return None
    return done.stdout.decode("utf-8", "replace"), seconds


# A keyword search's sentence split (common practice, no source): end punctuation, space, then
# a capital, digit or opening bracket/quote.
_SPLIT = re.compile(r"(?<=[.!?])\s+(?=[A-Z0-9(\[\"'\u2018\u201c])")


def baseline_sentences(text: str) -> list[str]:
    """A plain keyword search's sentences of a ``pdftotext`` reading: line-end hyphens before a
    lower-case letter rejoined, white space collapsed, split after end punctuation."""
    flat = _SPACE.sub(" ", re.sub(r"-\n(?=[a-z])", "", text)).strip()
    return [s for s in _SPLIT.split(flat) if s.strip()]


def baseline_scores(sentences: Sequence[str], wordings: Sequence[str]) -> np.ndarray:
    """(sentences, questions) TF-IDF cosine, the vocabulary fitted on the article's sentences
    (scikit-learn TfidfVectorizer with its defaults)."""
    from sklearn.feature_extraction.text import TfidfVectorizer
    from sklearn.metrics.pairwise import linear_kernel

    if not sentences:
        return np.zeros((0, len(wordings)))
    vectoriser = TfidfVectorizer().fit(sentences)
    return linear_kernel(vectoriser.transform(sentences), vectoriser.transform(wordings))


# Independent checks of what a suggestion is (common practice, no source): a reference entry
# carries a citation pattern or stands after the reference list's heading in pdftotext's
# reading; a table cell is mostly numbers or has fewer than three words of three letters.
_CITATION = re.compile(r"\bdoi\b|doi\.org|\b(19|20)\d\d\s*;\s*\d+\s*(\(\w+\))?\s*:\s*\d+|"
                       r"\bet al\b.{0,120}\b(19|20)\d\d\b.{0,40}\b\d+\s*[-:]\s*\d+")
_REFERENCE_HEADING = re.compile(r"^\s*(references|bibliography|literature cited)\s*$",
                                re.IGNORECASE | re.MULTILINE)
_WORD = re.compile(r"[^\W\d_]{3,}")
_NUMBER = re.compile(r"^[(\[]?[-+<>=±]?\d[\d.,:%]*[)\]]?[.,;]?$")


def reference_tail(reference: str) -> str:
    """The normalised part of a pdftotext reading after its last reference-list heading."""
    heads = list(_REFERENCE_HEADING.finditer(reference))
    return normalise(reference[heads[-1].end():]) if heads else ""


def looks_like_reference(text: str, tail: str) -> bool:
    norm = normalise(text)
    return bool(_CITATION.search(text)) or (len(norm) >= 30 and norm[:80] in tail)


def looks_like_table_cell(text: str) -> bool:
    tokens = text.split()
    if len(_WORD.findall(text)) < 3:
        return True
    numbers = sum(bool(_NUMBER.match(t)) for t in tokens)
    return numbers / max(len(tokens), 1) >= 0.4


# --------------------------------------------------------------------------- measuring


@dataclass
class Pair:
    """One (article, question): where the first hit came for robtui and for the baseline."""

    article: str
    question: str
    answerable: bool
    rank: int | None  # by score (as `robtui suggest`)
    spread_rank: int | None  # reading order (as the workbench)
    no_sections_rank: int | None  # every section and heading removed: the reader failed
    top_score: float
    flagged: bool  # "no sentence found": top score below the question's threshold
    top3_reference: int  # reader-labelled or independently reference-like, among the first 3
    top3_table: int
    baseline_rank: int | None
    baseline_top: float
    top_text: str = ""
    snippets: tuple[str, ...] = ()


@dataclass
class Reading:
    """One article's reading quality and speed."""

    article: str
    pages: int
    sentences: int
    prose: int
    intact: int
    sections: list[str]
    read_s: float  # in-process read, no cache
    pdftotext_s: float | None
    suggest_s: float | None  # `robtui suggest --json` in a new process with an empty cache
    warnings: list[str] = field(default_factory=list)
    broken: list[str] = field(default_factory=list)

    @property
    def integrity(self) -> float:
        return self.intact / self.prose if self.prose else float("nan")


def _without_sections(document):
    """The document as a reader that found no structure would give it."""
    sentences = [s.model_copy(update={"section": "other", "block": "body"}
                              if s.block == "heading" else {"section": "other"})
                 for s in document.sentences]
    return document.model_copy(update={"sentences": sentences})


def _suggest_process_seconds(path: Path) -> float:
    with tempfile.TemporaryDirectory() as tmp:
        env = dict(os.environ, ROBTUI_CACHE_DIR=tmp)
        t = time.perf_counter()
        subprocess.run([sys.executable, "-m", "robtui", "suggest", str(path), "--json"],
                       capture_output=True, check=True, env=env)
        return time.perf_counter() - t


def measure_article(path: Path, gold: dict[str, list[GoldSnippet]], ranker, wordings: dict[str, str],
                    *, process: bool = True) -> tuple[Reading, list[Pair]]:
    """Read one PDF, rank every gold question, and score both robtui and the baseline."""
    from robtui.reading.document import top_section
    from robtui.reading.reader import read_document

    questions = list(gold)
    reference = pdftotext(path)
    ref_text, ref_s = reference if reference is not None else ("", None)
    t = time.perf_counter()
    document = read_document(path, use_cache=False)
    read_s = time.perf_counter() - t
    suggest_s = _suggest_process_seconds(path) if process else None

    norm_ref = normalise(ref_text)
    prose = [s for s in document.sentences if s.block == "body"
             and top_section(s.section) != "references" and len(s.text.split()) >= PROSE_MIN_WORDS]
    broken = [s.text for s in prose if normalise(s.text) not in norm_ref] if ref_text else []
    found = sorted({top_section(s.section) for s in document.sentences} & set(KEY_SECTIONS),
                   key=KEY_SECTIONS.index)
    reading = Reading(path.name, document.pages or 0, len(document.sentences), len(prose),
                      len(prose) - len(broken) if ref_text else 0, found, read_s, ref_s,
                      suggest_s, list(document.warnings), broken)

    by_score = ranker.rank(document, questions, top=None)
    spread = ranker.rank(document, questions, top=None, spread=True)
    bare = ranker.rank(_without_sections(document), questions, top=None)
    sentence_norm = [normalise(s.text) for s in document.sentences]
    base_sentences = baseline_sentences(ref_text)
    base_norm = [normalise(s) for s in base_sentences]
    base = baseline_scores(base_sentences, [wordings[q] for q in questions])
    tail = reference_tail(ref_text)
    pairs = []
    for j, q in enumerate(questions):
        snippets = [normalise(g.snippet) for g in gold[q]]
        labels = hit_labels(sentence_norm, snippets)
        order = [s.sentence_index for s in by_score[q]]
        top3 = by_score[q][:3]
        base_order = np.argsort(-base[:, j], kind="stable") if len(base_sentences) else []
        base_labels = hit_labels(base_norm, snippets)
        top = by_score[q][0] if by_score[q] else None
        pairs.append(Pair(
            article=path.name, question=q, answerable=bool(snippets),
            rank=first_hit(order, labels),
            spread_rank=first_hit([s.sentence_index for s in spread[q]], labels),
            no_sections_rank=first_hit([s.sentence_index for s in bare[q]], labels),
            top_score=top.score if top else 0.0,
            flagged=top is None or top.score < ranker.threshold_for(q),
            top3_reference=sum(
                top_section(s.section) == "references" or looks_like_reference(s.text, tail)
                for s in top3),
            top3_table=sum(document.sentences[s.sentence_index].block == "table"
                           or looks_like_table_cell(s.text) for s in top3),
            baseline_rank=first_hit(base_order, base_labels),
            baseline_top=float(base[base_order[0], j]) if len(base_sentences) else 0.0,
            top_text=top.text if top else "",
            snippets=tuple(g.snippet for g in gold[q]),
        ))
    return reading, pairs


# --------------------------------------------------------------------------- figures


def recall(ranks: Sequence[int | None], k: int) -> float:
    return sum(r is not None and r <= k for r in ranks) / len(ranks) if ranks else float("nan")


def pooled(pairs: Sequence[Pair]) -> dict:
    """Pooled figures over the answerable pairs; AUROC over all pairs."""
    from robtui.evidence.training.metrics import auroc

    answerable = [p for p in pairs if p.answerable]
    out = {"pairs": len(pairs), "answerable": len(answerable)}
    for name in ("rank", "spread_rank", "no_sections_rank", "baseline_rank"):
        ranks = [getattr(p, name) for p in answerable]
        out[name] = {f"recall@{k}": recall(ranks, k) for k in (1, 3, 5)}
    out["auroc"] = auroc([p.top_score for p in pairs], [p.answerable for p in pairs])
    out["baseline_auroc"] = auroc([p.baseline_top for p in pairs], [p.answerable for p in pairs])
    first_right = [p for p in answerable if p.rank == 1]
    out["flagged_correct_first"] = [sum(p.flagged for p in first_right), len(first_right)]
    out["flagged_answerable"] = [sum(p.flagged for p in answerable), len(answerable)]
    unanswerable = [p for p in pairs if not p.answerable]
    out["flagged_unanswerable"] = [sum(p.flagged for p in unanswerable), len(unanswerable)]
    out["top3_reference_pairs"] = sum(p.top3_reference > 0 for p in pairs)
    out["top3_table_pairs"] = sum(p.top3_table > 0 for p in pairs)
    return out


def _fmt(x: float | None) -> str:
    return "    -" if x is None or np.isnan(x) else f"{x:5.2f}"


def _recalls(ranks: Sequence[int | None]) -> str:
    return " ".join(_fmt(recall(ranks, k)) for k in (1, 3, 5))


def report(readings: Sequence[Reading], pairs: Sequence[Pair]) -> dict:
    """Print every table; return the figures for JSON."""
    figures = pooled(pairs)
    n = figures["answerable"]
    print(f"\nPooled over {n} answerable (article, question) pairs of {figures['pairs']}")
    print("                                         R@1   R@3   R@5")
    for label, name in (("robtui, by score (suggest)", "rank"),
                        ("robtui, reading order (workbench)", "spread_rank"),
                        ("robtui, every section removed", "no_sections_rank"),
                        ("baseline: pdftotext + TF-IDF", "baseline_rank")):
        r = figures[name]
        print(f"  {label:<37} " + " ".join(_fmt(r[f"recall@{k}"]) for k in (1, 3, 5)))
    print(f"  AUROC of the top score, answerable vs not: robtui {_fmt(figures['auroc'])}, "
          f"baseline {_fmt(figures['baseline_auroc'])}")
    c, a, u = (figures[k] for k in ("flagged_correct_first", "flagged_answerable",
                                    "flagged_unanswerable"))
    print(f"  'no sentence found' flag: {c[0]}/{c[1]} correct first suggestions, "
          f"{a[0]}/{a[1]} answerable pairs, {u[0]}/{u[1]} unanswerable pairs")
    print(f"  pairs with a reference among the top 3: {figures['top3_reference_pairs']}; "
          f"with a table cell: {figures['top3_table_pairs']} (reader's label or the "
          "independent check)")

    questions = list(dict.fromkeys(p.question for p in pairs))
    print("\nPer question (answerable pairs)   robtui R@1   R@3   R@5 | baseline R@1  R@3   R@5")
    per_question = {}
    for q in questions:
        mine = [p for p in pairs if p.question == q and p.answerable]
        ours, theirs = [p.rank for p in mine], [p.baseline_rank for p in mine]
        per_question[q] = {"n": len(mine), "recall": [recall(ours, k) for k in (1, 3, 5)],
                           "baseline": [recall(theirs, k) for k in (1, 3, 5)]}
        print(f"  {q:<5} n={len(mine):<3}                  {_recalls(ours)} |         "
              f"{_recalls(theirs)}")

    print("\nPer article      pairs  R@1   R@3   R@5 | base R@1 R@3 | integrity sections"
          "            pages  s/page pdftotext ratio suggest")
    per_article = {}
    for r in readings:
        mine = [p for p in pairs if p.article == r.article and p.answerable]
        ours, theirs = [p.rank for p in mine], [p.baseline_rank for p in mine]
        per_page = r.read_s / max(r.pages, 1)
        ref = r.pdftotext_s / max(r.pages, 1) if r.pdftotext_s else None
        ratio = r.read_s / r.pdftotext_s if r.pdftotext_s else None
        short = "".join(c if s in r.sections else "." for s, c in zip(KEY_SECTIONS, "AIMRDB"))
        per_article[r.article] = {"answerable": len(mine),
                                  "recall": [recall(ours, k) for k in (1, 3, 5)],
                                  "baseline": [recall(theirs, k) for k in (1, 3, 5)],
                                  "integrity": r.integrity, "sections": r.sections,
                                  "pages": r.pages, "read_s": r.read_s,
                                  "pdftotext_s": r.pdftotext_s, "suggest_s": r.suggest_s}
        print(f"  {r.article[:16]:<16} {len(mine):>3} {_recalls(ours)} | "
              f"{_fmt(recall(theirs, 1))} {_fmt(recall(theirs, 3))} |   {_fmt(r.integrity)}   "
              f"{short:<6} ({len(r.sections)}/{len(KEY_SECTIONS)})  {r.pages:>4}  {per_page:6.3f}"
              f"  {'-' if ref is None else f'{ref:.4f}':>8} {'-' if ratio is None else f'{ratio:.0f}x':>5}"
              f" {'-' if r.suggest_s is None else f'{r.suggest_s:.2f}':>7}")
    prose = sum(r.prose for r in readings)
    intact = sum(r.intact for r in readings)
    print("  sections: A abstract, I introduction, M methods, R results, D discussion, "
          "B references (bibliography); s/page: robtui's reader in process, no cache")
    with_both = sum({"methods", "results"} <= set(r.sections) for r in readings)
    print(f"  prose-sentence integrity, pooled: {intact}/{prose} = {_fmt(intact / prose if prose else None)}"
          f"; articles with methods and results found: {with_both}/{len(readings)}")
    read = [r.read_s / max(r.pages, 1) for r in readings]
    ref = [r.pdftotext_s / max(r.pages, 1) for r in readings if r.pdftotext_s]
    line = f"  read seconds per page (in process, no cache): median {np.median(read):.3f}"
    if ref:
        line += (f", pdftotext {np.median(ref):.4f} (ratio of medians "
                 f"{np.median(read) / np.median(ref):.0f}x)")
    print(line)
    cold = [r.suggest_s for r in readings if r.suggest_s is not None]
    if cold:
        print(f"  cold `robtui suggest --json` (new process, empty cache): median "
              f"{np.median(cold):.2f} s per article, longest {max(cold):.2f} s")
    figures.update(per_question=per_question, per_article=per_article,
                   integrity=intact / prose if prose else None)
    print(f"\nTargets: {TARGETS}")
    return figures


def print_misses(pairs: Sequence[Pair]) -> None:
    """Each answerable pair whose gold is not first: the gold and what came first instead."""
    print("\nMisses (answerable pairs without a hit first; rank by score, or '-' if never found)")
    for p in pairs:
        if p.answerable and p.rank != 1:
            print(f"  {p.article[:24]} {p.question}: rank {p.rank or '-'}, reading order "
                  f"{p.spread_rank or '-'}, baseline {p.baseline_rank or '-'}")
            print(f"    first: {' '.join(p.top_text.split())[:150]}")
            for s in p.snippets:
                print(f"    gold:  {s}")


def print_broken(readings: Sequence[Reading], limit: int) -> None:
    print(f"\nProse sentences not found as contiguous text in pdftotext's reading (first {limit} "
          "per article; judge by eye, poppler's order is itself imperfect)")
    for r in readings:
        print(f"  {r.article}: {len(r.broken)} of {r.prose}")
        for text in r.broken[:limit]:
            print(f"    {' '.join(text.split())[:160]}")


# --------------------------------------------------------------------------- command


def _parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(prog="robtui bench real-pdfs", description=__doc__.split("\n\n")[0])
    p.add_argument("--folder", type=Path, default=None,
                   help="folder holding the PDFs and gold.json (default ../shared/real-pdfs)")
    p.add_argument("--articles", default=None, metavar="NAMES",
                   help="comma-separated file names or prefixes (default: every article in gold.json)")
    p.add_argument("--no-process", action="store_true",
                   help="skip the cold whole-process `robtui suggest` timing")
    p.add_argument("--misses", action="store_true", help="list each miss with its gold snippets")
    p.add_argument("--broken", type=int, default=0, metavar="N",
                   help="list up to N prose sentences per article not intact in pdftotext's reading")
    p.add_argument("--model", type=Path, default=None, help="ranker weights file (default: shipped)")
    p.add_argument("--json", type=Path, default=None, help="also write the figures to this file")
    return p


def main(argv: list[str] | None = None) -> int:
    from robtui.errors import InputError
    from robtui.evidence.ranker import active_questions, load_ranker

    args = _parser().parse_args(argv)
    folder = args.folder or default_folder()
    if folder is None:
        raise InputError(f"no real-PDF folder found: pass --folder PATH (the folder holding "
                         f"gold.json) or set ${FOLDER_ENV}")
    gold = load_gold(folder)
    names = list(gold)
    if args.articles:
        wanted = [w.strip() for w in args.articles.split(",") if w.strip()]
        names = [n for n in names if any(n.startswith(w) for w in wanted)]
        if not names:
            raise InputError(f"--articles {args.articles!r} matches no article of {folder}/gold.json")
    missing = [n for n in names if not (Path(folder) / n).is_file()]
    if missing:
        raise InputError(f"{folder}: gold.json names files that are not there: {', '.join(missing)}")
    if shutil.which("pdftotext") is None:
        print("pdftotext is not installed (Debian: poppler-utils): no integrity, no baseline, "
              "no speed ratio", file=sys.stderr)
    ranker = load_ranker(args.model)
    wordings = dict(active_questions("assignment"))
    print("Real published trial PDFs against hand-made gold snippets "
          f"({folder}; cite each article by the DOI in its MANIFEST.tsv)")
    readings, pairs = [], []
    for name in names:
        t = time.perf_counter()
        reading, found = measure_article(Path(folder) / name, gold[name], ranker, wordings,
                                         process=not args.no_process)
        readings.append(reading)
        pairs.extend(found)
        print(f"  {name}: {reading.pages} pages, {reading.sentences} sentences "
              f"({time.perf_counter() - t:.1f} s)", flush=True)
    figures = report(readings, pairs)
    if args.misses:
        print_misses(pairs)
    if args.broken:
        print_broken(readings, args.broken)
    if args.json is not None:
        from robtui.files import write_text_atomic

        payload = {"figures": figures, "pairs": [asdict(p) for p in pairs],
                   "provenance": ranker.provenance.get("settings", {})}
        write_text_atomic(args.json, json.dumps(payload, indent=2, default=str) + "\n")
    return 0
