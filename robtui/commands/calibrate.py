"""robtui calibrate set|record|discuss|report|stale|trend DIR: calibration rounds and agreement.

The lead chooses a calibration set; both reviewers assess it blind as usual; `record` keeps a
snapshot of their completed assessments as a round (DIR/calibration/round-N.json);
`discuss` shows agreement and the questions ranked by disagreement with both sides' answers;
`report` writes the calibration report; `stale` lists assessments made under an older
answering-rules version; `trend` writes agreement by batches of studies over the review.
"""

from __future__ import annotations

import argparse
from pathlib import Path

from robtui.commands._common import add_reviewer_options, open_workspace


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "calibrate",
        help="calibration rounds: agreement, disagreements, report, stale assessments, trend",
        description="Calibration rounds between two reviewers, and agreement over the review.",
    )
    actions = parser.add_subparsers(dest="calibrate_action", metavar="ACTION", required=True)

    chosen = actions.add_parser("set", help="choose the calibration set (studies)")
    chosen.add_argument("folder", type=Path, metavar="DIR")
    chosen.add_argument(
        "--studies", required=True, metavar="S1,S2", help="study ids, comma-separated"
    )
    chosen.set_defaults(func=run_set)

    record = actions.add_parser(
        "record", help="record a round: snapshot both reviewers' complete assessments of the set"
    )
    record.add_argument("folder", type=Path, metavar="DIR")
    add_reviewer_options(record)
    record.set_defaults(func=run_record)

    discuss = actions.add_parser(
        "discuss", help="agreement and the questions ranked by disagreement, side by side"
    )
    discuss.add_argument("folder", type=Path, metavar="DIR")
    discuss.add_argument("--round", type=int, metavar="N", help="default: the latest round")
    discuss.add_argument("--question", metavar="ID", help="only this question")
    discuss.set_defaults(func=run_discuss)

    report = actions.add_parser("report", help="write the calibration report (md or html)")
    report.add_argument("folder", type=Path, metavar="DIR")
    report.add_argument("--round", type=int, metavar="N", help="the 'after' round (default latest)")
    report.add_argument(
        "--before", type=int, metavar="M", help="the 'before' round (default: the one before N)"
    )
    report.add_argument("--format", choices=("md", "html"), default="md")
    report.add_argument("--name", metavar="NAME", help="file name inside DIR/exports/")
    report.add_argument("--stdout", action="store_true", help="print instead of writing a file")
    report.set_defaults(func=run_report)

    stale = actions.add_parser(
        "stale", help="assessments made under an older answering-rules version (second look)"
    )
    stale.add_argument("folder", type=Path, metavar="DIR")
    stale.add_argument("--reviewer", metavar="NAME", help="only this reviewer's assessments")
    stale.set_defaults(func=run_stale)

    trend = actions.add_parser(
        "trend", help="kappa per domain by batches of studies in assessment order (table + plot)"
    )
    trend.add_argument("folder", type=Path, metavar="DIR")
    add_reviewer_options(trend)
    trend.add_argument("--batch", type=int, default=5, metavar="N", help="studies per batch (5)")
    trend.add_argument("--format", choices=("md", "html"), default="md")
    trend.add_argument("--plot", choices=("png", "svg", "pdf", "none"), default="png")
    trend.add_argument("--name", default="agreement-trend", metavar="NAME")
    trend.set_defaults(func=run_trend)


# --- shared ------------------------------------------------------------------------------------


def _domain_names(qset) -> dict[str, str]:
    return {d: qset.domain(d).name for d in qset.domain_ids()}


def _latest(folder, number: int | None) -> int:
    from robtui.errors import InputError
    from robtui.store.calibration_rounds import round_numbers

    numbers = round_numbers(folder.root)
    if number is not None:
        return number
    if not numbers:
        raise InputError(
            f"no calibration round recorded yet: choose a set with `robtui calibrate set "
            f"{folder.root} --studies S1,S2`, let both reviewers assess it, then "
            f"`robtui calibrate record {folder.root}`"
        )
    return numbers[-1]


def _missing_line(m) -> str:
    return f"{m.study_id}" + (f" / {m.result_id}" if m.result_id else "") + f": {m.problem}"


# --- actions -------------------------------------------------------------------------------------


def run_set(args: argparse.Namespace) -> int:
    from robtui.store.calibration_rounds import set_calibration_set
    from robtui.store.review_folder import ReviewFolder

    folder = ReviewFolder.open(args.folder)
    chosen = set_calibration_set(folder, args.studies.split(","))
    print(f"calibration set: {', '.join(chosen)} ({len(chosen)} studies)")
    print("next: both reviewers assess these studies; then robtui calibrate record DIR")
    return 0


def run_record(args: argparse.Namespace) -> int:
    from robtui.core.calibration import build_round, describe_versions, rules_versions_used
    from robtui.core.model import utc_now
    from robtui.errors import InputError
    from robtui.store.calibration_rounds import next_round_number, save_round

    ws = open_workspace(args.folder)
    folder = ws.folder
    reviewers = ws.choose_reviewers(args.reviewers)
    book = ws.rules()  # a round records the rules version: they must be readable
    found, problems = folder.assessments()
    try:
        r = build_round(
            next_round_number(folder.root),
            folder.review,
            reviewers,
            found,
            rules_version=book.version,
            created=utc_now().isoformat().replace("+00:00", "Z"),
        )
    except ValueError as error:
        raise InputError(str(error)) from None
    for problem in problems:
        print(f"unreadable, left out: {problem}")
    if not r.pairs:
        lines = "; ".join(_missing_line(m) for m in r.missing) or "no assessments"
        raise InputError(f"nothing to record: no complete pair of assessments yet ({lines})")
    path = save_round(folder.root, r)
    print(
        f"round {r.number} recorded in {path}: {len(r.pairs)} pair(s) of {reviewers[0]} and "
        f"{reviewers[1]}, rules version {r.rules_version} (assessments made under: "
        f"{describe_versions(rules_versions_used(r))})"
    )
    for m in r.missing:
        print(f"  not compared: {_missing_line(m)}")
    return 0


def _side_lines(name: str, response: str, answer) -> list[str]:
    lines = [
        f"    {name}: {response}"
        + (f"  {answer.justification}" if answer and answer.justification else "")
    ]
    for q in answer.quotes if answer else ():
        page = f"p. {q.page}" if q.page else "page not known"
        lines.append(f"      \u201c{q.text}\u201d ({page})")
    return lines


def run_discuss(args: argparse.Namespace) -> int:
    from robtui.core.calibration import format_figure, round_agreement
    from robtui.store.calibration_rounds import load_round

    ws = open_workspace(args.folder)
    folder, qset = ws.folder, ws.qset
    r = load_round(folder.root, _latest(folder, args.round))
    ag = round_agreement(r.pairs, qset)
    ra, rb = r.reviewers
    print(
        f"round {r.number} (rules version {r.rules_version}): {ra} vs {rb}, {len(r.pairs)} pair(s)"
    )
    for m in r.missing:
        print(f"  not compared: {_missing_line(m)}")
    names = _domain_names(qset)
    print("agreement per domain:")
    for key, s in ag.domains.items():
        label = "Overall" if key == "overall" else f"D{key} {names.get(key, '')}"
        pct = format_figure(s.percent_agreement, 0)
        print(f"  {label:<58} n={s.n:<3} {pct:>4}%  kappa {format_figure(s.kappa)}  ({s.band})")
    ranked = [d for d in ag.ranked if args.question in (None, d.question_id.split("@")[0])]
    if not ranked:
        print("no disagreements" + (f" on {args.question}" if args.question else ""))
        return 0
    print("questions ranked by disagreement:")
    for d in ranked:
        print(
            f"{d.question_id} {d.text}  ({len(d.cases)} differ; "
            f"{format_figure(d.stats.percent_agreement, 0)}% agreement where both were asked)"
        )
        for c in d.cases:
            print(f"  {c.study_id} / {c.result_id}")
            print("\n".join(_side_lines(ra, c.response_a, c.answer_a)))
            print("\n".join(_side_lines(rb, c.response_b, c.answer_b)))
        print(
            f"  write a rule: robtui rules add {args.folder} --question "
            f'{d.question_id.split("@")[0]} --from-result {d.cases[0].result_id} --text "..."'
        )
    return 0


def run_report(args: argparse.Namespace) -> int:
    from robtui.core.calibration import round_agreement
    from robtui.errors import InputError
    from robtui.export.calibration_report import (
        CalibrationReport,
        RoundFigures,
        calibration_html,
        calibration_markdown,
    )
    from robtui.export.safety import export_path
    from robtui.files import write_text_atomic
    from robtui.store.calibration_rounds import load_round, round_numbers

    ws = open_workspace(args.folder)
    folder, qset = ws.folder, ws.qset
    after_no = _latest(folder, args.round)
    after = load_round(folder.root, after_no)
    earlier = [n for n in round_numbers(folder.root) if n < after_no]
    before_no = args.before if args.before is not None else (earlier[-1] if earlier else None)
    if before_no is not None and before_no >= after_no:
        raise InputError(f"--before {before_no} must be a round before round {after_no}")
    before = load_round(folder.root, before_no) if before_no is not None else None
    report = CalibrationReport(
        review=folder.review,
        after=RoundFigures(after, round_agreement(after.pairs, qset)),
        before=RoundFigures(before, round_agreement(before.pairs, qset)) if before else None,
        rules=ws.rules(),
        review_dir=str(args.folder),
        domain_names=_domain_names(qset),
    )
    text = calibration_html(report) if args.format == "html" else calibration_markdown(report)
    if args.stdout:
        print(text, end="")
        return 0
    name = args.name or f"calibration-round-{after_no}.{args.format}"
    path = export_path(folder.exports_dir, name)
    write_text_atomic(path, text)
    print(f"calibration report written: {path}")
    return 0


def run_stale(args: argparse.Namespace) -> int:
    from robtui.core.rules import stale_assessments
    from robtui.errors import InputError
    from robtui.store.rules_file import hand_edit_warning

    ws = open_workspace(args.folder)
    folder = ws.folder
    book, message = ws.rules_safely()
    if book is None:
        raise InputError(f"cannot tell which assessments are stale: {message}")
    found, problems = folder.assessments(args.reviewer)
    results = {r.id: r for r in folder.review.results}
    stale = stale_assessments(found, book, results)
    for problem in problems:
        print(f"unreadable, not checked: {problem}")
    warning = hand_edit_warning(folder.rules_path, book)
    if warning:
        print(f"warning: {warning}")
    if not stale:
        print(f"no assessment was made under an older rules version (rules version {book.version})")
        return 0
    print(f"{len(stale)} assessment(s) made under an older rules version (now {book.version}):")
    for s in stale:
        a = s.assessment
        made = (
            "rules version not recorded" if s.made_under is None else f"made under v{s.made_under}"
        )
        new = ", ".join(f"{r.id} ({r.question_id})" for r in s.new_rules) or "none that apply"
        line = f"  {a.reviewer} {a.study_id} / {a.result_id} [{a.status}] {made}; new rules: {new}"
        if s.retired_rules:
            line += "; withdrawn: " + ", ".join(
                f"{r.id} ({r.question_id})" for r in s.retired_rules
            )
        print(line)
    return 0


def run_trend(args: argparse.Namespace) -> int:
    from robtui.core.calibration import agreement_by_batch, pair_complete
    from robtui.errors import InputError
    from robtui.export.agreement_trend import render_trend_plot, trend_html, trend_markdown
    from robtui.export.safety import export_path
    from robtui.files import write_bytes_atomic, write_text_atomic

    ws = open_workspace(args.folder)
    folder, qset = ws.folder, ws.qset
    reviewers = ws.choose_reviewers(args.reviewers)
    if args.batch < 1:
        raise InputError(f"--batch must be 1 or more, not {args.batch}")
    found, problems = folder.assessments()
    pairs, missing = pair_complete(found, reviewers, folder.review)
    if not pairs:
        raise InputError("no complete pair of assessments yet: nothing to show")
    batches = agreement_by_batch(pairs, qset.domain_ids(), args.batch)
    names = _domain_names(qset)
    title = f"Agreement over the review: {folder.review.title}"
    render = trend_html if args.format == "html" else trend_markdown
    table_path = export_path(folder.exports_dir, f"{args.name}.{args.format}")
    write_text_atomic(table_path, render(batches, names, args.batch, title=title))
    print(f"table written: {table_path} ({len(batches)} batch(es), {len(pairs)} pair(s))")
    if args.plot != "none":
        plot_path = export_path(folder.exports_dir, f"{args.name}.{args.plot}")
        short = {d: qset.domain_short_name(d) for d in qset.domain_ids()}
        write_bytes_atomic(plot_path, render_trend_plot(batches, short, args.plot))
        print(f"plot written: {plot_path}")
    for m in missing:
        print(f"  not compared: {_missing_line(m)}")
    for problem in problems:
        print(f"  unreadable, left out: {problem}")
    return 0
