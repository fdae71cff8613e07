"""robtui bench learning: does the review's own model improve ranking as a review goes on?

A simulated reviewer works through development articles in article order. The "shipped" model
is trained on the other half of the articles (so it has never seen the simulated review's);
after each article the reviewer's quotes (the article's gold sentences for each mapped
question, up to three) become positives, the suggestions they read and rejected (non-hits
shown above the first hit in the top five, in the workbench's reading order) negatives, and the other best-scored sentences
they passed over weak negatives, each with the shipped model's log-odds as offset (as
robtui.evidence.review_model.examples_from_assessment does in a real review). After every few
articles the figure (macro recall@1 and MRR on the next unseen articles, judged by the simulated
reviewer's own notion of evidence) is printed for the shipped model alone and for the shipped
model blended with the review model. Both halves take a turn as the simulated review and the
figures are averaged step by step. Two simulated reviewers (PRACTICES): one quotes what the
corpus labels, the other has a broader quoting habit the shipped model was never taught.
Corpus: Kilicoglu et al., J Biomed Inform 2021;116:103717 (CONSORT-TM development split).
"""

from __future__ import annotations

import argparse
import re
import time
from dataclasses import replace
from itertools import pairwise
from pathlib import Path

import numpy as np

# Two simulated reviewers. "consort" quotes exactly the sentences the corpus annotates with the
# question's CONSORT items (the labels the shipped model is trained on). "broad" quotes those
# and also what many reviewers quote beside them (common practice, no source; defined before
# it was first run): for 2.1, 2.2 and 4.3 the trial-design sentence (item 3a) when it states
# the blinding ("double-blind", "open-label"), and for 1.2 a sequence-generation sentence (8a,
# 8b) that names how the allocation was concealed or kept apart (central telephone or web
# service, pharmacy, envelopes, an independent person). The shipped model was never taught the
# broad reviewer's habit: learning it is what the review model is for.
BLINDING = re.compile(r"blind|mask|open[- ]label", re.IGNORECASE)
CONCEALMENT = re.compile(
    r"telephone|web|internet|interactive|central|pharmac|envelope|sealed|opaque|independent",
    re.IGNORECASE,
)
PRACTICES: dict[str, dict[str, tuple[tuple[str, ...], re.Pattern]]] = {
    "consort": {},
    "broad": {
        "1.2": (("8a", "8b"), CONCEALMENT),
        "2.1": (("3a",), BLINDING),
        "2.2": (("3a",), BLINDING),
        "4.3": (("3a",), BLINDING),
    },
}


def with_practice(doc, article, practice: dict[str, tuple[tuple[str, ...], re.Pattern]]):
    """``doc`` (a LabelledDocument) with labels widened by a reviewer's quoting practice."""
    from robtui.evidence.training.corpus import is_hit

    labels, present = dict(doc.labels), dict(doc.present)
    for key, (items, pattern) in practice.items():
        extra = [(g.start, g.end) for g in article.sentences
                 if set(items) & set(g.items) and pattern.search(g.text)]
        if key not in labels or not extra:
            continue
        hit = np.array([span is not None and any(is_hit(span, g) for g in extra)
                        for span in doc.spans], dtype=bool)
        labels[key] = labels[key] | hit
        present[key] = present[key] or bool(hit.any())
    return replace(doc, labels=labels, present=present)


def _parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(prog="robtui bench learning", description=__doc__.split("\n\n")[0])
    p.add_argument("--corpus", type=Path, default=None, help="corpus folder (default ../shared/corpus)")
    p.add_argument("--articles", type=int, default=None, help="first N articles only (quick runs)")
    p.add_argument("--parts", type=int, default=4,
                   help="parts of each half evaluated in turn while the rest is learned (4)")
    p.add_argument("--step", type=int, default=2, help="articles added between reports (2)")
    p.add_argument("--practice", choices=[*PRACTICES, "both"], default="both",
                   help="the simulated reviewer's quoting practice (default: both in turn)")
    return p


def _figures(ranks: list[dict[str, int | None]], keys: list[str]) -> tuple[float, float]:
    """Macro recall@1 and MRR over ``keys`` of per-article {key: first-hit rank} dicts."""
    by_key: dict[str, list] = {}
    for doc_ranks in ranks:
        for key, r in doc_ranks.items():
            if key in keys:
                by_key.setdefault(key, []).append(r)
    r1 = [np.mean([r == 1 for r in v]) for v in by_key.values()]
    mrr = [np.mean([1.0 / r if r else 0.0 for r in v]) for v in by_key.values()]
    return float(np.mean(r1)), float(np.mean(mrr))


def simulate(ranker, learn_docs, eval_docs, keys, texts, step: int):
    """The review model as a simulated reviewer works through ``learn_docs`` in order.

    Returns, after every ``step`` articles (and at 0), (articles learned, examples, ranks of the
    shipped model alone, ranks blended with the review model) on ``eval_docs``, which stay the
    same throughout; ranks are one {key: first-hit rank} per evaluated article. ``ranker`` is
    the "shipped" model (trained on other articles); the documents' labels are the simulated
    reviewer's notion of evidence (see with_practice).
    """
    from robtui.evidence.ranker import candidate_order, layout_of
    from robtui.evidence.review_model import (
        PASSED_OVER,
        PASSED_OVER_WEIGHT,
        QUOTE_WEIGHT,
        LearnedExample,
        update_review_model,
    )
    from robtui.evidence.training.metrics import first_hit_rank

    def shipped_logits(doc):
        return ranker.logits(ranker.features(doc.document), keys, [texts.get(k, "") for k in keys])

    def texts_of(doc):
        return [s.text for s in doc.document.sentences]

    layouts: dict[str, tuple] = {}  # per article: suggestible per key, sections, headings

    def shown(z, doc, key) -> np.ndarray:  # the order the workbench shows
        if doc.article_id not in layouts:
            sentences = doc.document.sentences
            layouts[doc.article_id] = (ranker.suggestible(sentences), *layout_of(sentences))
        suggestible_for, *layout = layouts[doc.article_id]
        return candidate_order(z, suggestible_for(key), *layout, spread=True)

    evaluated = [(doc, shipped_logits(doc), texts_of(doc)) for doc in eval_docs]

    def ranks(model) -> tuple[list[dict], list[dict]]:
        plain, blended = [], []
        for doc, z_of, sentences in evaluated:
            p, b = {}, {}
            for key in keys:
                if doc.present[key]:
                    z = z_of[key]
                    p[key] = first_hit_rank(z, doc.labels[key], shown(z, doc, key))
                    if model:
                        z = z + model.logit(key, sentences)
                    b[key] = first_hit_rank(z, doc.labels[key], shown(z, doc, key))
            plain.append(p)
            blended.append(b)
        return plain, blended

    model = None
    curve = [(0, 0, *ranks(None))]
    n_examples = 0
    for learned, doc in enumerate(learn_docs, start=1):
        # the reviewer assesses this article, seeing the blended ranking
        shipped, sentences = shipped_logits(doc), texts_of(doc)
        positives, negatives = [], []
        for key in keys:
            base = shipped[key]
            z = base + model.logit(key, sentences) if model else base
            order = shown(z, doc, key)[:5]
            dismissed = set()
            for i in order:
                if doc.labels[key][i]:
                    break
                dismissed.add(int(i))
                negatives.append(LearnedExample(key, sentences[i], False, 1.0, float(base[i])))
            gold = np.nonzero(doc.labels[key])[0][:3]
            positives.extend(LearnedExample(key, sentences[i], True, QUOTE_WEIGHT,
                                            float(base[i])) for i in gold)
            if len(gold):  # the reviewer found the evidence: what else scored high was passed over
                passed = [int(i) for i in np.argsort(-base, kind="stable")
                          if int(i) not in dismissed and not doc.labels[key][i]][:PASSED_OVER]
                negatives.extend(
                    LearnedExample(key, sentences[i], False, PASSED_OVER_WEIGHT, float(base[i]))
                    for i in passed
                )
        n_examples += len(positives) + len(negatives)
        model = update_review_model(model, positives, negatives)
        if learned % step == 0 or learned == len(learn_docs):
            curve.append((learned, n_examples, *ranks(model)))
    return curve


def rotations(review: list, parts: int) -> list[tuple[list, list]]:
    """(articles learned in order, fixed evaluation articles): each of ``parts`` consecutive
    parts of ``review`` in turn is evaluated while the others are learned."""
    bounds = np.linspace(0, len(review), parts + 1).round().astype(int)
    return [(review[:lo] + review[hi:], review[lo:hi]) for lo, hi in pairwise(bounds)]


def main(argv: list[str] | None = None) -> int:
    from robtui.benchmarks.evidence import _settings_from_shipped
    from robtui.errors import InputError
    from robtui.evidence.training.corpus import default_corpus_dir, load_corpus, load_mapping
    from robtui.evidence.training.corpus_docs import labelled_documents
    from robtui.evidence.training.train import question_texts

    args = _parser().parse_args(argv)
    corpus_dir = args.corpus or default_corpus_dir()
    if corpus_dir is None:
        raise InputError("no corpus found: pass --corpus PATH (the folder holding consort-tm/)")
    mapping = load_mapping(corpus_dir)
    articles = load_corpus(corpus_dir)
    articles = articles[: args.articles] if args.articles else articles
    if len(articles) < 4 * args.parts:
        raise InputError(f"too few articles ({len(articles)}) for {args.parts} parts per half")
    keys = list(mapping.questions)
    texts = question_texts()
    settings = _settings_from_shipped()
    t0 = time.perf_counter()
    docs = labelled_documents(articles, mapping, "txt")
    half = len(docs) // 2
    print("Learning from the reviewer: simulated review in article order "
          "(corpus: Kilicoglu et al., J Biomed Inform 2021;116:103717)")
    print(f"{len(docs)} articles read in {time.perf_counter() - t0:.1f} s. Each half in turn is "
          "the review and the other half trains the 'shipped' model; within the review, each of "
          f"{args.parts} parts in turn stays unseen and is evaluated while the reviewer works "
          "through the other articles in order. Figures pool every article's evaluation.\n")
    from robtui.evidence.ranker import Ranker
    from robtui.evidence.training.train import fit_weights

    # the "shipped" model of each turn, trained on the other half with the corpus labels
    shipped = [Ranker(fit_weights(train, keys, settings, texts, item_map=mapping.questions))
               for train in (docs[half:], docs[:half])]
    practices = list(PRACTICES) if args.practice == "both" else [args.practice]
    for name in practices:
        widened = [with_practice(d, a, PRACTICES[name]) for d, a in zip(docs, articles)]
        curves = [simulate(ranker, learn, evaluate, keys, texts, args.step)
                  for ranker, review in zip(shipped, (widened[:half], widened[half:]))
                  for learn, evaluate in rotations(review, args.parts)]
        changed = sorted(PRACTICES[name])
        for report in ([keys, changed] if changed else [keys]):
            _print_curve(name, curves, changed, report)
    return 0


def _print_curve(name: str, curves: list[list[tuple]], changed: list[str],
                 report: list[str]) -> None:
    print(f"Reviewer practice: {name}"
          + (f" (differs from the corpus labels on {', '.join(changed)})" if changed else
             " (the corpus labels the shipped model was trained on)")
          + "; figures over "
          + (", ".join(report) if report == changed else f"the {len(report)} mapped questions"))
    steps = min(len(c) for c in curves)
    print("articles  examples   recall@1 shipped  recall@1 blended   MRR shipped  MRR blended")
    table = []
    for s in range(steps):
        rows = [c[s] for c in curves]
        plain = [r for row in rows for r in row[2]]
        blended = [r for row in rows for r in row[3]]
        (p1, pm), (b1, bm) = _figures(plain, report), _figures(blended, report)
        table.append((b1 - p1, bm - pm))
        print(f"{rows[0][0]:>8}  {np.mean([r[1] for r in rows]):>8.0f}   {p1:>16.3f}  "
              f"{b1:>16.3f}   {pm:>11.3f}  {bm:>11.3f}")
    later = table[len(table) // 2 :]
    if later:
        print(f"second half of the review: blended minus shipped, recall@1 "
              f"{np.mean([g[0] for g in later]):+.3f}, MRR {np.mean([g[1] for g in later]):+.3f} "
              "(mean over its steps)\n")
