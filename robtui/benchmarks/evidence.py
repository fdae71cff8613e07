"""robtui bench evidence: how well the ranker finds each question's evidence on unseen articles.

Grouped cross-validation only: for each fold the ranker is trained (settings as shipped, see
the weights' provenance) on the other folds' articles and evaluated on the held-out ones, as
text read by robtui's text reader and as two-column PDFs rendered from the same text and read
by robtui's PDF reader: drawn by robtui's own writer (devtools/pdf_writer.py, the "pdf" route)
and by reportlab's platypus (devtools/platypus_writer.py, the "platypus" route: Times body,
Helvetica-Bold headings, justified columns, a layout the reader was not tuned on), each with
the share of the gold sentences the reading gives back. Beside it, in the same run, a baseline: TF-IDF cosine between the
question's wording and each sentence (the fold's vocabulary). Per mapped question and
macro-averaged: recall@1/3/5, MRR, sentences read before the first hit, AUROC of "evidence
present" from the top score. Then calibration, the no-evidence threshold, the transfer model
(for questions without training data, leave-one-question-out) and speed.
Corpus: Kilicoglu et al., J Biomed Inform 2021;116:103717 (CONSORT-TM development split).
"""

from __future__ import annotations

import argparse
import json
import os
import subprocess
import sys
import tempfile
import time
from dataclasses import asdict, fields
from pathlib import Path

import numpy as np

TARGETS = "recall@1 >= 0.85, recall@3 >= 0.95 (macro); PDF within 0.03; AUROC >= 0.85 (1.2, 2.1, 5.1)"


def _parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(prog="robtui bench evidence", description=__doc__.split("\n\n")[0])
    p.add_argument("--corpus", type=Path, default=None, help="corpus folder (default ../shared/corpus)")
    p.add_argument("--folds", type=int, default=5, help="grouped CV folds (default 5)")
    p.add_argument("--articles", type=int, default=None, help="first N articles only (quick runs)")
    p.add_argument("--no-pdf", action="store_true", help="skip the PDF routes")
    p.add_argument("--writer", choices=("both", "robtui", "platypus"), default="both",
                   help="which PDF routes: robtui's writer, reportlab platypus or both (default)")
    p.add_argument("--no-speed", action="store_true", help="skip the timings")
    p.add_argument("--speed-only", action="store_true",
                   help="only the timings (no cross-validation; about a minute)")
    p.add_argument("--first-stage-only", action="store_true",
                   help="rank without the shipped second stage (evidence/adjustment.py)")
    p.add_argument("--json", type=Path, default=None, help="also write the figures to this file")
    return p


def _settings_from_shipped():
    from robtui.errors import ModelFileError
    from robtui.evidence.model import load_weights
    from robtui.evidence.training.train import Settings

    try:
        shipped = load_weights().provenance.get("settings", {})
    except ModelFileError:
        shipped = {}
    known = {f.name for f in fields(Settings)}
    values = {k: (tuple(v) if isinstance(v, list) else v) for k, v in shipped.items() if k in known}
    return Settings(**values)


def _scores_for(ranker, doc, keys, texts):
    from robtui.evidence.ranker import sigmoid

    feats = ranker.features(doc.document)
    logits = ranker.logits(feats, keys, [texts.get(k, "") for k in keys])
    qvec = ranker._question_vectors([texts.get(k, "") for k in keys])
    baseline = feats.word.dot_columns(qvec) if feats.n else np.zeros((0, len(keys)))
    scores = {k: sigmoid(logits[k]) for k in keys}
    return scores, {k: baseline[:, j] for j, k in enumerate(keys)}, logits


class Tally:
    """Ranks, lengths, top scores and presence per question, to turn into figures."""

    def __init__(self):
        self.rows: dict[str, list[tuple]] = {}

    def add(self, key, scores, labels, present, order):
        """One (article, question): ``order`` is the candidates' order (ranker.candidate_order),
        so the top score is that of the first suggestion."""
        from robtui.evidence.training.metrics import first_hit_rank

        rank = first_hit_rank(scores, labels, order) if present else None
        top = float(scores[order[0]]) if len(order) else 0.0
        self.rows.setdefault(key, []).append((rank, len(scores), top, present))

    def figures(self):
        from robtui.evidence.training.metrics import QuestionFigures

        return {
            k: QuestionFigures.from_ranks([r[0] for r in v], [r[1] for r in v],
                                          [r[2] for r in v], [r[3] for r in v])
            for k, v in self.rows.items()
        }


def _fmt(x) -> str:
    return "   -" if x is None or (isinstance(x, float) and np.isnan(x)) else f"{x:.2f}"


def _print_table(title: str, columns: dict[str, dict], keys: list[str]) -> None:
    from robtui.evidence.training.metrics import macro

    print(f"\n{title}")
    names = list(columns)
    head = "question   n  " + "  ".join(f"{n:^38}" for n in names)
    print(head)
    print("              " + "  ".join("  R@1   R@3   R@5   MRR  read  AUROC " for _ in names))
    for key in keys + ["macro"]:
        parts = []
        n = None
        for name in names:
            figs = columns[name]
            if key == "macro":
                vals = [macro(figs, a) for a in ("recall1", "recall3", "recall5", "mrr",
                                                  "read_before", "auroc")]
            else:
                f = figs.get(key)
                if f is None:
                    vals = [None] * 6
                else:
                    n = f.n
                    vals = [f.recall1, f.recall3, f.recall5, f.mrr, f.read_before, f.auroc]
            parts.append(" ".join(f"{_fmt(v):>5}" for v in vals[:4]) + f" {_fmt(vals[4]):>5}"
                         + f" {_fmt(vals[5]):>6} ")
        label = f"{key:<8} {n if n is not None else '':>3}  "
        print(label + "  ".join(parts))


def _calibration(pairs: list[tuple[float, bool]]) -> dict:
    s = np.array([p for p, _ in pairs])
    y = np.array([t for _, t in pairs], dtype=float)
    bins = np.minimum((s * 10).astype(int), 9)
    ece = 0.0
    table = []
    for b in range(10):
        m = bins == b
        if m.any():
            ece += m.mean() * abs(s[m].mean() - y[m].mean())
            table.append((b / 10, int(m.sum()), float(s[m].mean()), float(y[m].mean())))
    return {"ece": float(ece), "brier": float(np.mean((s - y) ** 2)), "bins": table}


PDF_ROUTES = {"pdf": "robtui", "platypus": "platypus"}  # route -> the writer drawing its PDFs


def _read_pdfs(corpus, mapping, writer: str) -> tuple[list, dict]:
    """The corpus drawn by ``writer``, read and labelled, with how many gold sentences the
    readings give back (bench reading's measure, averaged over the articles)."""
    from robtui.benchmarks._corpus_pdf import labelled_pdf_documents
    from robtui.benchmarks.reading import sentence_recovery

    t0 = time.perf_counter()
    with tempfile.TemporaryDirectory() as tmp:
        docs = labelled_pdf_documents(corpus, mapping, Path(tmp), writer)
    seconds = time.perf_counter() - t0
    found = [sentence_recovery(a, d.document) for a, d in zip(corpus, docs, strict=True)]
    n = max(1, len(found))
    recovery = {
        "writer": writer, "seconds": seconds,
        "recovered": sum(r.recovered for r in found) / n,
        "as_one": sum(r.as_one for r in found) / n,
        "exact_f1": sum(r.exact_f1 for r in found) / n,
        "unaligned": sum(s is None for d in docs for s in d.spans),
        "sentences": sum(len(d.spans) for d in docs),
    }
    return docs, recovery


def cross_validate(corpus_dir: Path, folds: int, articles: int | None, pdf: bool,
                   second_stage: bool = True, writers: tuple[str, ...] = ("robtui", "platypus"),
                   ) -> dict:
    """Grouped CV on the corpus: each fold's first stage trained on the other articles; the
    shipped second stage (learned on the real PDFs, none of them in the corpus) on top of it
    unless ``second_stage`` is False. ``writers``: which PDF routes (PDF_ROUTES) when ``pdf``."""
    from sklearn.model_selection import GroupKFold

    from robtui.evidence.adjustment import load_adjustment
    from robtui.evidence.ranker import (
        Ranker,
        candidate_order,
        generic_block,
        layout_of,
        sigmoid,
    )
    from robtui.evidence.training.corpus import load_corpus, load_mapping
    from robtui.evidence.training.corpus_docs import labelled_documents
    from robtui.evidence.training.train import fit_weights, prepare, question_texts

    adjustment = load_adjustment() if second_stage else None
    if adjustment is None:
        print("second stage: none (first stage alone)")
    else:
        routes = ("txt", "pdf") if pdf else ("txt",)  # every PDF route is a PDF report
        print("second stage: the shipped one (weights/adjustment.npz) on each fold's first stage, "
              f"for {', '.join(adjustment.domains)} reports only: "
              + ", ".join(f"{r} route {'with' if adjustment.applies_to(r) else 'without'} it"
                          for r in routes))
    mapping = load_mapping(corpus_dir)
    corpus = load_corpus(corpus_dir)
    corpus = corpus[:articles] if articles else corpus
    keys = list(mapping.questions)
    texts = question_texts()
    settings = _settings_from_shipped()
    t0 = time.perf_counter()
    txt_docs = labelled_documents(corpus, mapping, "txt")
    print(f"read {len(txt_docs)} articles as text in {time.perf_counter() - t0:.1f} s")
    routes_docs: dict[str, list] = {"txt": txt_docs}
    recovery: dict[str, dict] = {}
    for route, writer in PDF_ROUTES.items():
        if not pdf or writer not in writers:
            continue
        routes_docs[route], recovery[route] = _read_pdfs(corpus, mapping, writer)
        r = recovery[route]
        print(f"{route} route: drew ({writer}) and read {len(corpus)} two-column PDFs in "
              f"{r['seconds']:.1f} s; gold sentences recovered {r['recovered']:.3f}, as one "
              f"sentence {r['as_one']:.3f}, exact sentence-text F1 {r['exact_f1']:.3f} "
              f"({r['unaligned']} of {r['sentences']} PDF sentences not aligned to the source "
              "text; they count as non-hits)")
    tallies = {f"{kind} {route}": Tally() for kind in ("model", "spread", "baseline")
               for route in routes_docs}
    tallies["transfer txt"] = Tally()
    calib: list[tuple[float, bool]] = []
    thresholds = []
    # per route: [flagged as no evidence, total], with each route's own cut (threshold_for)
    flagged = {route: {"with": [0, 0], "without": [0, 0]} for route in ("txt", *PDF_ROUTES)}
    groups = np.arange(len(txt_docs))
    for fold, (train, test) in enumerate(GroupKFold(n_splits=folds).split(txt_docs, groups=groups)):
        t0 = time.perf_counter()
        train_docs = [txt_docs[i] for i in train]
        prep = prepare(train_docs, keys, settings, texts)
        weights = fit_weights(train_docs, keys, settings, texts, prepared=prep,
                              item_map=mapping.questions)
        ranker = Ranker(weights, adjustment=adjustment)
        thresholds.append(weights.no_evidence_threshold)
        # transfer model, leave one question (and those sharing its items) out
        from sklearn.linear_model import LogisticRegression

        transfer = {}
        for key in keys:
            others = [k for k in keys if set(mapping.questions[k]) != set(mapping.questions[key])]
            gx = np.vstack([prep.generic_X[k] for k in others])
            gy = np.concatenate([prep.y[k] for k in others])
            transfer[key] = LogisticRegression(C=1.0, solver="liblinear",
                                               random_state=settings.seed).fit(gx, gy)
        for i in test:
            for route, docs in routes_docs.items():
                doc = docs[i]
                scores, base, logits = _scores_for(ranker, doc, keys, texts)
                # every column ranks the same candidates as `suggest`: no bare topic headings
                layout = layout_of(doc.document.sentences)
                suggestible_for = ranker.suggestible(doc.document.sentences)
                for key in keys:
                    keep = suggestible_for(key)
                    labels, present = doc.labels[key], doc.present[key]
                    by_score = candidate_order(logits[key], keep, *layout, spread=False)
                    tallies[f"model {route}"].add(key, scores[key], labels, present, by_score)
                    tallies[f"spread {route}"].add(
                        key, scores[key], labels, present,
                        candidate_order(logits[key], keep, *layout, spread=True))
                    tallies[f"baseline {route}"].add(
                        key, base[key], labels, present,
                        candidate_order(base[key], keep, *layout, spread=False))
                    if route == "txt":
                        calib.extend(zip(scores[key].tolist(), labels.tolist()))
                    top = float(scores[key][by_score[0]]) if len(by_score) else 0.0
                    side = flagged[route]["with" if present else "without"]
                    side[0] += top < ranker.threshold_for(key, origin=doc.document.kind)
                    side[1] += 1
                if route == "txt":
                    feats = ranker.features(doc.document)
                    blocks = ranker.question_blocks(feats, keys, [texts.get(k, "") for k in keys])
                    for key in keys:
                        gx = generic_block(blocks[key], feats.shared)
                        z = transfer[key].decision_function(gx) if len(gx) else np.zeros(0)
                        tallies["transfer txt"].add(
                            key, sigmoid(z), doc.labels[key], doc.present[key],
                            candidate_order(z, keep, *layout, spread=False))
        print(f"fold {fold + 1}/{folds}: trained on {len(train)} articles, evaluated on "
              f"{len(test)} ({time.perf_counter() - t0:.1f} s)")
    return {
        "keys": keys,
        "figures": {name: t.figures() for name, t in tallies.items() if t.rows},
        "calibration": _calibration(calib),
        "thresholds": thresholds,
        "flagged": flagged,
        "recovery": recovery,
        "settings": asdict(settings),
    }


def _speed(corpus_dir: Path | None) -> dict:
    """Model load, ranking a 400-sentence document, and a cold whole-process suggest on a PDF."""
    from robtui.devtools.pdf_writer import render_text_as_pdf
    from robtui.evidence.training.corpus import load_corpus
    from robtui.reading.text import document_from_text

    out: dict[str, float] = {}
    code = ("import time; t=time.perf_counter(); from robtui.evidence.ranker import load_ranker; "
            "t1=time.perf_counter(); load_ranker(); t2=time.perf_counter(); print(t2-t, t2-t1)")
    runs = [[float(x) for x in subprocess.run([sys.executable, "-c", code], capture_output=True,
                                              text=True, check=True).stdout.split()]
            for _ in range(3)]
    out["load_with_imports_s_median_of_3"] = float(np.median([r[0] for r in runs]))
    out["load_s_median_of_3"] = float(np.median([r[1] for r in runs]))

    from robtui.evidence.ranker import load_ranker

    corpus = load_corpus(corpus_dir) if corpus_dir else []
    if corpus:
        text = "\n".join(a.text for a in corpus[:3])
    else:
        text = "\n".join(f"Sentence {i} about allocation and follow-up of participants." for i in range(400))
    doc = document_from_text(text)
    doc = doc.model_copy(update={"sentences": doc.sentences[:400]})
    ranker = load_ranker()
    t = time.perf_counter()
    ranker.rank(doc)
    out["rank_400_first_call_s"] = time.perf_counter() - t
    times = []
    for _ in range(15):
        t = time.perf_counter()
        ranker.rank(doc)
        times.append(time.perf_counter() - t)
    out["rank_400_median_of_15_s"] = float(np.median(times))
    out["rank_400_fastest_s"] = float(min(times))
    out["rank_400_sentences"] = len(doc.sentences)
    # A 15-page PDF: article texts joined until the rendering reaches 15 pages.
    with tempfile.TemporaryDirectory() as tmp:
        pdf = Path(tmp) / "long.pdf"
        parts = [a.text for a in corpus] or [text]
        from robtui.reading.reader import read_document

        pages = 0
        for n in range(1, len(parts) + 1):
            render_text_as_pdf("\n".join(parts[:n]), pdf, full_width_lines=3)
            pages = read_document(pdf, use_cache=False).pages or 0
            if pages >= 15:
                break
        env = dict(os.environ, ROBTUI_CACHE_DIR=str(Path(tmp) / "cache"))
        cold = []
        for run in range(3):
            env["ROBTUI_CACHE_DIR"] = str(Path(tmp) / f"cache{run}")  # empty cache: cold read
            t = time.perf_counter()
            subprocess.run([sys.executable, "-m", "robtui", "suggest", str(pdf), "--json"],
                           capture_output=True, check=True, env=env)
            cold.append(time.perf_counter() - t)
        out["suggest_pdf_pages"] = pages
        out["suggest_pdf_cold_s_median_of_3"] = float(np.median(cold))
    return out


def _print_speed(speed: dict) -> None:
    print("\nSpeed (targets: load <= 0.3 s; rank 400 sentences <= 0.05 s; cold suggest on a "
          "15-page PDF <= 2.5 s)")
    print(f"  model load, load_ranker() in a fresh process: {speed['load_s_median_of_3']:.3f} s "
          f"({speed['load_with_imports_s_median_of_3']:.3f} s with importing numpy, pydantic "
          "and the ranker's modules)")
    print(f"  rank every question, {speed['rank_400_sentences']} sentences: first call "
          f"{speed['rank_400_first_call_s'] * 1000:.1f} ms, then median "
          f"{speed['rank_400_median_of_15_s'] * 1000:.1f} ms of 15 (fastest "
          f"{speed['rank_400_fastest_s'] * 1000:.1f} ms)")
    print(f"  `robtui suggest --json` on a {speed['suggest_pdf_pages']}-page PDF, cold "
          f"(new process, empty reader cache): {speed['suggest_pdf_cold_s_median_of_3']:.2f} s")


def main(argv: list[str] | None = None) -> int:
    from robtui.errors import InputError
    from robtui.evidence.training.corpus import default_corpus_dir

    args = _parser().parse_args(argv)
    corpus = args.corpus or default_corpus_dir()
    if corpus is None:
        raise InputError("no corpus found: pass --corpus PATH (the folder holding consort-tm/)")
    if args.folds < 2:
        raise InputError("--folds must be at least 2")
    if args.speed_only and args.no_speed:
        raise InputError("--speed-only and --no-speed exclude each other: give one of them")
    if args.speed_only:
        speed = _speed(Path(corpus))
        _print_speed(speed)
        _write_json(args.json, {"speed": speed})
        return 0
    print("Evidence ranking on unseen articles (grouped cross-validation by article)")
    print("Corpus: CONSORT-TM development split; Kilicoglu et al., J Biomed Inform 2021;116:103717")
    writers = ("robtui", "platypus") if args.writer == "both" else (args.writer,)
    result = cross_validate(Path(corpus), args.folds, args.articles, not args.no_pdf,
                            second_stage=not args.first_stage_only, writers=writers)
    figs = result["figures"]
    keys = result["keys"]
    routes = ("txt", *PDF_ROUTES)

    def columns(kind: str) -> dict:
        return {f"{kind} {r}": figs[f"{kind} {r}"] for r in routes if f"{kind} {r}" in figs}

    _print_table("Ranker (trained on the other folds), sentences by score", columns("model"), keys)
    _print_table("The same ranker in reading order (spread over sections, as the workbench and "
                 "`suggest --spread` show it)", columns("spread"), keys)
    _print_table("Baseline: TF-IDF cosine of question wording and sentence (same run)",
                 columns("baseline"), keys)
    print("  pdf = drawn by robtui's writer; platypus = drawn by reportlab platypus")
    _print_table("Transfer model (used for questions without training data), leave-one-question-out",
                 {"transfer txt": figs["transfer txt"]}, keys)
    print("  read = mean sentences read before the first hit; AUROC = evidence present vs absent "
          "from the top score")
    c = result["calibration"]
    print(f"\nCalibration of held-out sentence scores (txt): ECE {c['ece']:.3f}, Brier {c['brier']:.4f}")
    for lo, n, mean_p, rate in c["bins"]:
        print(f"  score {lo:.1f}-{lo + 0.1:.1f}: {n:5d} sentences, mean score {mean_p:.3f}, "
              f"observed evidence rate {rate:.3f}")
    f = result["flagged"]["txt"]
    print(f"No-evidence threshold per fold: {', '.join(f'{t:.3f}' for t in result['thresholds'])}; "
          f"flagged 'no sentence found' for {f['without'][0]}/{f['without'][1]} (article, question) "
          f"pairs without gold evidence and {f['with'][0]}/{f['with'][1]} with it")
    for route in PDF_ROUTES:
        f = result["flagged"][route]
        if f["with"][1] + f["without"][1]:
            print(f"  {route} route, each question's cut for a PDF (the second stage's, fitted on "
                  f"the real PDFs, for the questions it was fitted on): flagged {f['without'][0]}/"
                  f"{f['without'][1]} pairs without gold evidence and {f['with'][0]}/"
                  f"{f['with'][1]} with it")
    from robtui.evidence.training.metrics import macro

    m = {n: {a: macro(figs[n], a) for a in ("recall1", "recall3")} for n in figs}
    print(f"\nTargets: {TARGETS}")
    for name in [f"{kind} {r}" for kind in ("model", "spread") for r in routes]:
        if name in m:
            print(f"  {name}: macro recall@1 {m[name]['recall1']:.3f}, recall@3 {m[name]['recall3']:.3f}")
    for route in PDF_ROUTES:
        name = f"model {route}"
        if name in m:
            print(f"  {route} - txt: recall@1 {m[name]['recall1'] - m['model txt']['recall1']:+.3f}, "
                  f"recall@3 {m[name]['recall3'] - m['model txt']['recall3']:+.3f}")
    for route, r in result["recovery"].items():
        print(f"  {route} reading: gold sentences recovered {r['recovered']:.3f}, as one sentence "
              f"{r['as_one']:.3f}")
    for key in ("1.2", "2.1", "5.1"):
        if key in figs["model txt"]:
            print(f"  AUROC {key}: " + ", ".join(
                f"{r} {_fmt(figs[f'model {r}'][key].auroc)}" for r in routes
                if f"model {r}" in figs))
    speed = {} if args.no_speed else _speed(Path(corpus))
    if speed:
        _print_speed(speed)
    _write_json(args.json, {
        "figures": {n: {k: asdict(v) for k, v in f.items()} for n, f in figs.items()},
        "calibration": result["calibration"], "speed": speed, "settings": result["settings"],
        "recovery": result["recovery"],
    })
    return 0


def _write_json(path: Path | None, payload: dict) -> None:
    """The figures as JSON at ``path`` (atomically), when one was asked for."""
    if path is None:
        return
    from robtui.files import write_text_atomic

    write_text_atomic(path, json.dumps(payload, indent=2) + "\n")
