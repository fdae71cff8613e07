"""robtui bench calibration: rounds, calibration report, stale listing, trend on a synthetic review.

Builds the invented two-reviewer review of `robtui bench review` (fictional "Trial-001" ...),
writes a rule book of R rules, and times: loading and pairing, recording a round of the
calibration set, agreement per domain and question, the report in Markdown and HTML, the stale
listing, the rules shown beside every question of every result (the workbench's lookup), and
the agreement-over-review table and plot. No target is set by the issue; figures are printed.
"""

from __future__ import annotations

import argparse
import importlib
import tempfile
import time
from collections.abc import Sequence
from pathlib import Path


def main(argv: Sequence[str] | None = None) -> int:
    parser = argparse.ArgumentParser(prog="robtui bench calibration", description=__doc__)
    parser.add_argument("--studies", type=int, default=100)
    parser.add_argument("--results", type=int, default=2, help="outcomes per study")
    parser.add_argument("--calibration", type=int, default=10, help="studies in the set")
    parser.add_argument("--rules", type=int, default=40, help="rules in the rule book")
    parser.add_argument("--batch", type=int, default=10, help="studies per trend batch")
    args = parser.parse_args(list(argv or []))

    from robtui.benchmarks.review import build_synthetic_review
    from robtui.core.calibration import (
        agreement_by_batch,
        build_round,
        pair_complete,
        round_agreement,
    )
    from robtui.core.rules import RuleBook, add_rule, rules_for, stale_assessments
    from robtui.export.agreement_trend import render_trend_plot, trend_markdown
    from robtui.export.calibration_report import (
        CalibrationReport,
        RoundFigures,
        calibration_html,
        calibration_markdown,
    )
    from robtui.store.calibration_rounds import save_round, set_calibration_set
    from robtui.store.question_sets import builtin_question_set
    from robtui.store.rules_file import load_folder_rules, save_rulebook

    qset = builtin_question_set()
    questions = [q.id for q in qset.questions("assignment")]
    figures: dict[str, float] = {}
    with tempfile.TemporaryDirectory(prefix="robtui-bench-calibration-") as tmp:
        t0 = time.perf_counter()
        folder = build_synthetic_review(
            Path(tmp) / "review", studies=args.studies, results=args.results
        )
        build = time.perf_counter() - t0
        book = RuleBook(question_set=qset.id, question_set_version=qset.version)
        for i in range(args.rules):
            when = [("outcome_type", "objective")] if i % 2 else []
            book = add_rule(book, questions[i % len(questions)], f"Invented rule {i}", when=when)
        save_rulebook(folder.rules_path, book, expected_version=0, qset=qset)
        set_calibration_set(folder, [s.id for s in folder.review.studies[: args.calibration]])
        reviewers = tuple(folder.review.reviewers[:2])

        t = time.perf_counter()
        book = load_folder_rules(folder)
        figures["load rules.toml"] = time.perf_counter() - t

        t = time.perf_counter()
        found, _ = folder.assessments()
        figures["load assessments"] = time.perf_counter() - t

        t = time.perf_counter()
        r = build_round(
            1, folder.review, reviewers, found, rules_version=book.version, created="bench"
        )
        save_round(folder.root, r)
        figures["record a round"] = time.perf_counter() - t

        t = time.perf_counter()
        ag = round_agreement(r.pairs, qset)
        figures["round agreement"] = time.perf_counter() - t

        t = time.perf_counter()
        report = CalibrationReport(folder.review, RoundFigures(r, ag), None, book)
        md, page = calibration_markdown(report), calibration_html(report)
        figures["report md + html"] = time.perf_counter() - t

        t = time.perf_counter()
        results = {x.id: x for x in folder.review.results}
        stale = stale_assessments(found, book, results)
        figures["stale listing"] = time.perf_counter() - t

        t = time.perf_counter()
        shown = sum(
            len(rules_for(book, qid, spec)) for spec in folder.review.results for qid in questions
        )
        lookups = len(folder.review.results) * len(questions)
        figures[f"rules_for x{lookups}"] = time.perf_counter() - t

        t = time.perf_counter()
        pairs, _ = pair_complete(found, reviewers, folder.review)
        batches = agreement_by_batch(pairs, qset.domain_ids(), args.batch)
        table = trend_markdown(batches, {}, args.batch, title="bench")
        figures["trend table"] = time.perf_counter() - t

        t = time.perf_counter()
        ag_all = round_agreement(pairs, qset)
        figures[f"agreement, all {len(pairs)} pairs"] = time.perf_counter() - t

        t = time.perf_counter()
        importlib.import_module("matplotlib.figure")  # once per process
        importlib.import_module("matplotlib.backends.backend_agg")
        figures["import matplotlib"] = time.perf_counter() - t

        t = time.perf_counter()
        png = render_trend_plot(batches, {}, "png")
        figures["trend plot png"] = time.perf_counter() - t

    print(
        f"synthetic review: {args.studies} studies x {args.results} outcomes x 2 reviewers "
        f"(built in {build:.2f} s, not timed); rules: {args.rules}; calibration set: "
        f"{args.calibration} studies ({len(r.pairs)} pairs)"
    )
    print(
        f"disputed questions: {len(ag.ranked)} in the round, {len(ag_all.ranked)} over the "
        f"review; stale assessments: {len(stale)}; rules shown: "
        f"{shown}; report {len(md)} + {len(page)} chars; trend {len(batches)} batches, "
        f"{len(table)} chars, plot {len(png)} bytes"
    )
    for name, seconds in figures.items():
        print(f"  {name:<26} {seconds * 1000:8.1f} ms")
    print(f"  {'total':<26} {sum(figures.values()) * 1000:8.1f} ms")
    return 0
