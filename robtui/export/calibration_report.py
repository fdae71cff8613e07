"""Calibration report (Markdown and HTML) for a review's methods appendix.

It gives the calibration set, the rounds (which assessments, under which rules version),
agreement per domain and per signalling question before and after the rules changed, the
questions ranked by disagreement with both reviewers' answers, justifications and quotes side
by side, and the answering rules that came out of it. Every user-written text is escaped.

The report is built once as a list of blocks (heading, paragraph, table, list) and rendered
to either format, so both always say the same thing.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

from robtui.core.agreement import AgreementStats
from robtui.core.calibration import (
    CalibrationRound,
    RoundAgreement,
    describe_versions,
    format_figure,
    rules_versions_used,
)
from robtui.core.model import OVERALL, Quote, Review
from robtui.core.rules import AnsweringRule, RuleBook, changes_between
from robtui.export.safety import markup, md

# Checked against the PubMed record of [1] (pubmed 32562833) and the publisher's abstract page
# of [2] (doi:10.1016/j.jclinepi.2021.09.021), found with the project's search tool; the author
# list of [2] was not shown there, hence "et al.".
CITATIONS = (
    (
        "Minozzi S, Cinquini M, Gianola S, Gonzalez-Lorenzo M, Banzi R. The revised Cochrane risk "
        "of bias tool for randomized trials (RoB 2) showed low interrater reliability and "
        "challenges in its application. J Clin Epidemiol 2020;126:37-44."
    ),
    (
        "Minozzi S, et al. Reliability of the revised Cochrane risk-of-bias tool for randomised "
        "trials (RoB2) improved with the use of implementation instruction. J Clin Epidemiol "
        "2022;141:99-105."
    ),
)
BACKGROUND = (
    "Without calibration, agreement between experienced reviewers using RoB 2 was low: Fleiss' "
    "kappa 0.16 for the overall judgement and 0.04 to 0.45 per domain, at a mean of 28 minutes "
    "per result [1]. After a calibration exercise and a review-specific document of answering "
    "rules, overall agreement rose to 0.42 and the mean time per study fell from 168 to 41 "
    "minutes [2]. This report records the same kind of exercise for this review."
)
STATISTICS = (
    "Agreement is given as percent agreement, Cohen's kappa with a large-sample 95% confidence "
    "interval, linearly weighted kappa for the ordered judgements (Low < Some concerns < High) "
    "and the prevalence- and bias-adjusted kappa (PABAK), with the descriptive bands of Landis "
    "and Koch (1977). A signalling question counts for a result when both reviewers' answers "
    "led to it; a question asked of one reviewer only is shown among the disagreements. "
    "Kappa is undefined (shown as \u2013) when both reviewers gave one same answer throughout."
)


# --- blocks ------------------------------------------------------------------------------------


@dataclass(frozen=True)
class Heading:
    text: str
    level: int = 2


@dataclass(frozen=True)
class Para:
    text: str
    note: bool = False


@dataclass(frozen=True)
class Bullets:
    items: tuple[str, ...]


@dataclass(frozen=True)
class Table:
    header: tuple[str, ...]
    rows: tuple[tuple[str, ...], ...]
    cls: str = ""


@dataclass(frozen=True)
class Code:
    text: str


Block = Heading | Para | Bullets | Table | Code


HARD_BREAK = "  \n"  # a Markdown line break inside a paragraph


def render_markdown(blocks: Sequence[Block]) -> str:
    """Markdown text of the blocks; every text is escaped (no raw HTML gets through)."""
    out: list[str] = []
    for b in blocks:
        if isinstance(b, Heading):
            out += ["#" * b.level + " " + md(b.text, " "), ""]
        elif isinstance(b, Para):
            text = md(b.text, HARD_BREAK)
            out += [f"*{text}*" if b.note else text, ""]
        elif isinstance(b, Bullets):
            out += ["- " + md(item, HARD_BREAK) for item in b.items] + [""]
        elif isinstance(b, Table):
            out.append("| " + " | ".join(md(h) for h in b.header) + " |")
            out.append("|" + "|".join("---" for _ in b.header) + "|")
            out += ["| " + " | ".join(md(c) for c in row) + " |" for row in b.rows]
            out.append("")
        elif isinstance(b, Code):
            fence = "````" if "```" in b.text else "```"
            out += [fence, b.text, fence, ""]
    return "\n".join(out).rstrip("\n") + "\n"


_CSS = (
    "body{font-family:system-ui,sans-serif;max-width:70em;margin:2em auto;padding:0 1em;"
    "color:#1d1d1d;line-height:1.4}table{border-collapse:collapse;margin:.5em 0 1.2em}"
    "th,td{border:1px solid #8a8a8a;padding:.25em .5em;vertical-align:top;text-align:left}"
    "th{background:#ececec}.note{color:#4a4a4a;font-size:.9em}"
    "table.side td{max-width:22em}pre{background:#f4f4f4;padding:.5em;white-space:pre-wrap}"
)


def render_html(blocks: Sequence[Block], title: str) -> str:
    """A standalone HTML page of the blocks; every text is escaped."""
    parts = [
        '<!DOCTYPE html><html lang="en"><head><meta charset="utf-8">',
        f"<title>{markup(title)}</title><style>{_CSS}</style></head><body>",
    ]
    for b in blocks:
        if isinstance(b, Heading):
            parts.append(f"<h{b.level}>{markup(b.text)}</h{b.level}>")
        elif isinstance(b, Para):
            cls = ' class="note"' if b.note else ""
            parts.append(f"<p{cls}>{_lines(b.text)}</p>")
        elif isinstance(b, Bullets):
            parts.append("<ul>" + "".join(f"<li>{_lines(i)}</li>" for i in b.items) + "</ul>")
        elif isinstance(b, Table):
            cls = f' class="{markup(b.cls)}"' if b.cls else ""
            parts.append(f"<table{cls}><tr>" + "".join(f"<th>{markup(h)}</th>" for h in b.header))
            parts.append("</tr>")
            for row in b.rows:
                parts.append("<tr>" + "".join(f"<td>{_lines(c)}</td>" for c in row) + "</tr>")
            parts.append("</table>")
        elif isinstance(b, Code):
            parts.append(f"<pre>{markup(b.text)}</pre>")
    parts.append("</body></html>\n")
    return "\n".join(parts)


def _lines(text: str) -> str:
    return markup(text).replace("\r\n", "\n").replace("\n", "<br>")


# --- content -----------------------------------------------------------------------------------


@dataclass(frozen=True)
class RoundFigures:
    round: CalibrationRound
    agreement: RoundAgreement


@dataclass(frozen=True)
class CalibrationReport:
    review: Review
    after: RoundFigures
    before: RoundFigures | None
    rules: RuleBook
    review_dir: str = "DIR"
    domain_names: dict[str, str] = field(default_factory=dict)


def rules_from_calibration(report: CalibrationReport) -> list[AnsweringRule]:
    """Rules added after the first round reported was taken, up to the last one (or now)."""
    start = (report.before or report.after).round.rules_version
    end = report.after.round.rules_version if report.before else report.rules.version
    return list(changes_between(report.rules, start, end).added)


def _stat(s: AgreementStats | None) -> tuple[str, str, str]:
    if s is None or s.n == 0:
        return ("0", "\u2013", "\u2013")
    ci = f" [{format_figure(s.kappa_ci[0])}, {format_figure(s.kappa_ci[1])}]" if s.kappa_ci else ""
    return (str(s.n), f"{format_figure(s.percent_agreement, 0)}%", f"{format_figure(s.kappa)}{ci}")


def _quotes(quotes: Sequence[Quote]) -> str:
    return "\n".join(
        f"\u201c{q.text}\u201d ({'p. ' + str(q.page) if q.page else 'page not known'})"
        for q in quotes
    )


def _label(report: CalibrationReport, key: str) -> str:
    if key == OVERALL:
        return "Overall"
    name = report.domain_names.get(key)
    return f"D{key} {name}" if name else f"Domain {key}"


def _round_rows(report: CalibrationReport) -> list[tuple[str, ...]]:
    rows = []
    for fig in filter(None, (report.before, report.after)):
        r = fig.round
        rows.append(
            (
                str(r.number),
                r.created,
                f"v{r.rules_version}",
                describe_versions(rules_versions_used(r)),
                str(len(r.pairs)),
                str(len(r.missing)),
            )
        )
    return rows


def build_blocks(report: CalibrationReport) -> list[Block]:
    """The report's content, format-independent."""
    after, before = report.after, report.before
    ra, rb = after.round.reviewers
    title = f"Calibration report: {report.review.title}"
    blocks: list[Block] = [Heading(title, 1)]
    blocks.append(
        Para(
            f"Reviewers {ra} and {rb} assessed the calibration set independently, each blind to "
            "the other's answers."
            + (f" Lead: {report.review.lead}." if report.review.lead else "")
            + f" Question set: {after.round.question_set} version "
            f"{after.round.question_set_version}."
        )
    )
    blocks += [Heading("Background"), Para(BACKGROUND), Para(STATISTICS, note=True)]

    blocks.append(Heading("Calibration set"))
    study_rows = []
    for study_id in after.round.studies:
        study = report.review.study(study_id)
        paired = [p.result_id for p in after.round.pairs if p.study_id == study_id]
        study_rows.append((study_id, study.label if study else "(no longer in the review)",
                           ", ".join(paired) or "none"))  # fmt: skip
    blocks.append(Table(("Study", "Label", f"Results compared in round {after.round.number}"),
                        tuple(study_rows)))  # fmt: skip

    blocks.append(Heading("Rounds"))
    blocks.append(
        Table(("Round", "Recorded", "Rules version", "Assessments made under", "Pairs compared",
               "Not compared"),
              tuple(_round_rows(report)))
    )  # fmt: skip
    for fig in filter(None, (before, after)):
        if fig.round.missing:
            blocks.append(Para(f"Not compared in round {fig.round.number}:"))
            blocks.append(Bullets(tuple(
                f"{m.study_id}" + (f" / {m.result_id}" if m.result_id else "") + f": {m.problem}"
                for m in fig.round.missing
            )))  # fmt: skip
    if before is None:
        blocks.append(
            Para(
                "Only one round has been recorded: agreement after the rules changed will appear "
                "here once a second round is recorded (`robtui calibrate record`).",
                note=True,
            )
        )

    blocks += _agreement_blocks(report)
    blocks += _disagreement_blocks(report)

    blocks.append(Heading("Answering rules that came out of the calibration"))
    rules = rules_from_calibration(report)
    if rules:
        blocks.append(Table(
            ("Rule", "Question", "Applies when", "Answer", "Rule text", "Version", "Note"),
            tuple((r.id, r.question_id, r.condition_text(), r.answer or "", r.text,
                   f"v{r.added_in}" + (f" (withdrawn v{r.retired_in})" if r.retired_in else ""),
                   r.note) for r in rules),
        ))  # fmt: skip
    else:
        blocks.append(Para("No answering rules were added in this period."))
    blocks.append(Heading("References"))
    blocks.append(Bullets(tuple(f"[{i}] {c}" for i, c in enumerate(CITATIONS, start=1))))
    return blocks


def _agreement_blocks(report: CalibrationReport) -> list[Block]:
    after, before = report.after, report.before
    n_after = after.round.number
    if before is None:
        head = ("Domain", "n", "% agreement", "kappa [95% CI]", "weighted kappa", "PABAK", "band",
                "Notes")  # fmt: skip
        rows = []
        for key, s in after.agreement.domains.items():
            n, pct, kap = _stat(s)
            rows.append((_label(report, key), n, pct, kap, format_figure(s.weighted_kappa),
                         format_figure(s.pabak), s.band, _notes(s)))  # fmt: skip
        qhead = ("Question", "n", "% agreement", "kappa [95% CI]", "PABAK", "Notes")
        qrows = [
            (key, *_stat(s), format_figure(s.pabak), _notes(s))
            for key, s in after.agreement.questions.items()
        ]
    else:
        b = before.round.number
        head = (
            "Domain",
            f"% agreement r{b}",
            f"kappa r{b}",
            f"% agreement r{n_after}",
            f"kappa [95% CI] r{n_after}",
            f"weighted kappa r{n_after}",
            f"PABAK r{b}",
            f"PABAK r{n_after}",
            f"band r{n_after}",
            f"Notes r{n_after}",
        )
        rows = []
        for key in dict.fromkeys([*before.agreement.domains, *after.agreement.domains]):
            s0, s1 = before.agreement.domains.get(key), after.agreement.domains.get(key)
            _, p0, k0 = _stat(s0)
            _, p1, k1 = _stat(s1)
            rows.append((_label(report, key), p0, k0.split(" [")[0], p1, k1,
                         format_figure(s1.weighted_kappa if s1 else None),
                         format_figure(s0.pabak if s0 else None),
                         format_figure(s1.pabak if s1 else None),
                         s1.band if s1 else "undefined", _notes(s1)))  # fmt: skip
        qhead = ("Question", f"n r{b}", f"% r{b}", f"kappa r{b}", f"PABAK r{b}", f"n r{n_after}",
                 f"% r{n_after}", f"kappa r{n_after}", f"PABAK r{n_after}",
                 f"Notes r{n_after}")  # fmt: skip
        qrows = []
        for key in dict.fromkeys([*before.agreement.questions, *after.agreement.questions]):
            s0, s1 = before.agreement.questions.get(key), after.agreement.questions.get(key)
            n0, p0, k0 = _stat(s0)
            n1, p1, k1 = _stat(s1)
            qrows.append((key, n0, p0, k0.split(" [")[0], format_figure(s0.pabak if s0 else None),
                          n1, p1, k1.split(" [")[0], format_figure(s1.pabak if s1 else None),
                          _notes(s1)))  # fmt: skip
    return [
        Heading("Agreement per domain and overall judgement"),
        Table(head, tuple(rows)),
        Heading("Agreement per signalling question"),
        Table(qhead, tuple(qrows)),
    ]


def _notes(stats) -> str:
    """A row's own notes (degenerate kappa, no interval, few pairs), beside its figures."""
    return "; ".join(stats.notes) if stats is not None else ""


def _side(answer: Any, response: str) -> tuple[str, str, str]:
    if answer is None:
        return (response, "", "")
    return (response, answer.justification, _quotes(answer.quotes))


def _disagreement_blocks(report: CalibrationReport) -> list[Block]:
    fig = report.before or report.after
    ra, rb = fig.round.reviewers
    blocks: list[Block] = [Heading(f"Questions ranked by disagreement (round {fig.round.number})")]
    if not fig.agreement.ranked:
        return blocks + [Para("The reviewers gave the same answer to every question.")]
    for d in fig.agreement.ranked:
        blocks.append(Heading(f"{d.question_id} {d.text}", 3))
        blocks.append(
            Para(
                f"{len(d.cases)} result(s) answered differently; percent agreement "
                f"{format_figure(d.stats.percent_agreement, 0)}%, "
                f"kappa {format_figure(d.stats.kappa)}."
            )
        )
        rows = []
        for c in d.cases:
            rows.append((f"{c.study_id} / {c.result_id}", *_side(c.answer_a, c.response_a),
                         *_side(c.answer_b, c.response_b)))  # fmt: skip
        blocks.append(Table(
            ("Study / result", f"{ra}", f"{ra}: justification", f"{ra}: quotes",
             f"{rb}", f"{rb}: justification", f"{rb}: quotes"),
            tuple(rows), cls="side",
        ))  # fmt: skip
        first = d.cases[0]
        question = d.question_id.split("@")[0]
        blocks.append(Para("To write a rule from the discussion (conditions pre-filled from the "
                           "result):", note=True))  # fmt: skip
        blocks.append(Code(
            f"robtui rules add {report.review_dir} --question {question} "
            f'--from-result {first.result_id} --text "..."'
        ))  # fmt: skip
    return blocks


def calibration_markdown(report: CalibrationReport) -> str:
    return render_markdown(build_blocks(report))


def calibration_html(report: CalibrationReport) -> str:
    return render_html(build_blocks(report), f"Calibration report: {report.review.title}")
