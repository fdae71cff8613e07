"""robtui bench learning: does the review's own model improve ranking as a review goes on?

A simulated reviewer works through development articles in article order. The "shipped" model
is trained on the other half of the articles (so it has never seen the simulated review's);
after each article the reviewer's quotes (the article's gold sentences for each mapped
question, up to three) become positives, the suggestions they read and rejected (non-hits
ranked above the first hit in the top five) negatives, and the other best-scored sentences
they passed over weak negatives, each with the shipped model's log-odds as offset (as
robtui.evidence.review_model.examples_from_assessment does in a real review). After every few articles the figure —
macro recall@1 and MRR over the mapped questions on the next unseen articles — is printed for
the shipped model alone and for the shipped model blended with the review model. Both halves
take a turn as the simulated review and the figures are averaged step by step.
Corpus: Kilicoglu et al., J Biomed Inform 2021;116:103717 (CONSORT-TM development split).
"""

from __future__ import annotations

import argparse
import time
from pathlib import Path

import numpy as np


def _parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(prog="robtui bench learning", description=__doc__.split("\n\n")[0])
    p.add_argument("--corpus", type=Path, default=None, help="corpus folder (default ../shared/corpus)")
    p.add_argument("--articles", type=int, default=None, help="first N articles only (quick runs)")
    p.add_argument("--window", type=int, default=4, help="unseen articles evaluated at each step (4)")
    p.add_argument("--step", type=int, default=2, help="articles added between reports (2)")
    return p


def _figures(ranks: list[dict[str, int | None]]) -> tuple[float, float]:
    by_key: dict[str, list] = {}
    for doc_ranks in ranks:
        for key, r in doc_ranks.items():
            by_key.setdefault(key, []).append(r)
    r1 = [np.mean([r == 1 for r in v]) for v in by_key.values()]
    mrr = [np.mean([1.0 / r if r else 0.0 for r in v]) for v in by_key.values()]
    return float(np.mean(r1)), float(np.mean(mrr))


def simulate(train_docs, review_docs, keys, texts, settings, window: int, step: int,
             item_map=None):
    """Curve of (articles learned, examples, shipped r@1, blended r@1, shipped MRR, blended MRR)."""
    from robtui.evidence.metrics import first_hit_rank
    from robtui.evidence.ranker import Ranker
    from robtui.evidence.review_model import (
        PASSED_OVER,
        PASSED_OVER_WEIGHT,
        QUOTE_WEIGHT,
        LearnedExample,
        update_review_model,
    )
    from robtui.evidence.train import fit_weights

    ranker = Ranker(fit_weights(train_docs, keys, settings, texts, item_map=item_map))
    shipped = []
    for doc in review_docs:
        feats = ranker.features(doc.document)
        shipped.append(ranker.logits(feats, keys, [texts.get(k, "") for k in keys]))
    sentence_texts = [[s.text for s in d.document.sentences] for d in review_docs]

    def ranks(i: int, model) -> tuple[dict, dict]:
        plain, blended = {}, {}
        for key in keys:
            doc = review_docs[i]
            if not doc.present[key]:
                continue
            z = shipped[i][key]
            plain[key] = first_hit_rank(z, doc.labels[key])
            extra = model.logit(key, sentence_texts[i]) if model else 0.0
            blended[key] = first_hit_rank(z + extra, doc.labels[key])
        return plain, blended

    model = None
    curve = []
    n_examples = 0
    for learned in range(len(review_docs) - window + 1):
        if learned % step == 0:
            upcoming = range(learned, learned + window)
            pairs = [ranks(i, model) for i in upcoming]
            p1, pm = _figures([p for p, _ in pairs])
            b1, bm = _figures([b for _, b in pairs])
            curve.append((learned, n_examples, p1, b1, pm, bm))
        # the reviewer assesses article `learned`, seeing the blended ranking
        doc = review_docs[learned]
        positives, negatives = [], []
        for key in keys:
            z = shipped[learned][key]
            if model:
                z = z + model.logit(key, sentence_texts[learned])
            base = shipped[learned][key]
            order = np.argsort(-z, kind="stable")[:5]
            dismissed = set()
            for i in order:
                if doc.labels[key][i]:
                    break
                dismissed.add(int(i))
                negatives.append(LearnedExample(key, sentence_texts[learned][i], False, 1.0,
                                                float(base[i])))
            gold = np.nonzero(doc.labels[key])[0][:3]
            positives.extend(LearnedExample(key, sentence_texts[learned][i], True, QUOTE_WEIGHT,
                                            float(base[i])) for i in gold)
            if len(gold):  # the reviewer found the evidence: what else scored high was passed over
                passed = [int(i) for i in np.argsort(-base, kind="stable")
                          if int(i) not in dismissed and not doc.labels[key][i]][:PASSED_OVER]
                negatives.extend(
                    LearnedExample(key, sentence_texts[learned][i], False, PASSED_OVER_WEIGHT,
                                   float(base[i]))
                    for i in passed
                )
        n_examples += len(positives) + len(negatives)
        model = update_review_model(model, positives, negatives)
    return curve


def main(argv: list[str] | None = None) -> int:
    from robtui.benchmarks.corpus import default_corpus_dir, load_corpus, load_mapping
    from robtui.benchmarks.evidence import _settings_from_shipped
    from robtui.errors import InputError
    from robtui.evidence.corpus_docs import labelled_documents
    from robtui.evidence.train import question_texts

    args = _parser().parse_args(argv)
    corpus_dir = args.corpus or default_corpus_dir()
    if corpus_dir is None:
        raise InputError("no corpus found: pass --corpus PATH (the folder holding consort-tm/)")
    mapping = load_mapping(corpus_dir)
    articles = load_corpus(corpus_dir)
    articles = articles[: args.articles] if args.articles else articles
    if len(articles) < 2 * (args.window + args.step):
        raise InputError(f"too few articles ({len(articles)}) for window {args.window}")
    keys = list(mapping.questions)
    texts = question_texts()
    settings = _settings_from_shipped()
    t0 = time.perf_counter()
    docs = labelled_documents(articles, mapping, "txt")
    half = len(docs) // 2
    first, second = docs[:half], docs[half:]
    print("Learning from the reviewer: simulated review in article order "
          "(corpus: Kilicoglu et al., J Biomed Inform 2021;116:103717)")
    print(f"{len(docs)} articles read in {time.perf_counter() - t0:.1f} s; each half in turn is "
          f"the review, the other half trains the 'shipped' model; figures on the next "
          f"{args.window} unseen articles, averaged over the two turns\n")
    curves = [simulate(second, first, keys, texts, settings, args.window, args.step,
                       mapping.questions),
              simulate(first, second, keys, texts, settings, args.window, args.step,
                       mapping.questions)]
    steps = min(len(c) for c in curves)
    print("articles  examples   recall@1 shipped  recall@1 blended   MRR shipped  MRR blended")
    table = []
    for s in range(steps):
        rows = [c[s] for c in curves]
        learned = rows[0][0]
        ex = np.mean([r[1] for r in rows])
        vals = [np.mean([r[j] for r in rows]) for j in (2, 3, 4, 5)]
        table.append(vals)
        print(f"{learned:>8}  {ex:>8.0f}   {vals[0]:>16.3f}  {vals[1]:>16.3f}   {vals[2]:>11.3f}"
              f"  {vals[3]:>11.3f}")
    later = [v for v in table[len(table) // 2 :]]
    if later:
        gain1 = np.mean([v[1] - v[0] for v in later])
        gain_mrr = np.mean([v[3] - v[2] for v in later])
        print(f"\nsecond half of the review: blended minus shipped, recall@1 {gain1:+.3f}, "
              f"MRR {gain_mrr:+.3f} (mean over its steps)")
    return 0
