"""What the assessment screen says about one assessment, as rich Text (no widgets, no I/O).

Each function reads an AssessmentSession and returns the text of one part of the screen: the
domain heading, the reasons beside the judgements, the support and direction fields, the
review's answering rules for a question, the question line above the report, the domain
summary.
"""

from __future__ import annotations

from rich.text import Text

from robtui.core.explaining import explain_overall
from robtui.core.model import DIRECTION_LABELS, OVERALL
from robtui.tui.palette import badge
from robtui.tui.session import AssessmentSession

OVERRIDE_MARK = "*"  # beside a judgement the reviewer overrode (explained where it shows)


def heading_text(s: AssessmentSession, domain_id: str) -> Text:
    """The domain's name, what its path leaves out, and the assessment's state."""
    domain = s.domain(domain_id)
    heading = Text(f"D{domain.id} {domain.name}", style="bold")
    if domain.effect:
        heading.append(f" · effect of {s.effect} (set for this result)", style="dim")
    result = s.result
    measuring = any("outcome assessor" in q.text for q in domain.questions)
    if result is not None and result.self_reported and measuring:
        heading.append(
            "\nSelf-reported outcome: the participants are the outcome assessors",
            style="bold",
        )
    words = s.explanation(domain_id)
    if words.not_asked:
        n = words.not_asked
        heading.append(f"\n{n} question{'s' if n != 1 else ''} not asked on this path", style="dim")
    if s.is_complete:
        heading.append("\n✓ marked complete — c reopens it for changes", style="bold")
    if s.effect_differs:
        heading.append(
            f"\n⚠ made for the effect of {s.effect}, but the result is assessed for the "
            f"effect of {s.effect_differs}: c reopens it, and it follows the result",
            style="bold",
        )
    return heading


def rules_text(s: AssessmentSession, question_id: str | None) -> Text:
    """The review's answering rules for a question; empty when the review has none at all."""
    review = s.review_session
    if review.rules is None:
        text = Text("⚠ ", style="bold")
        text.append(review.rules_unavailable or "answering rules unavailable", style="bold")
        text.append("\n  Answer as usual; everything else works.", style="dim")
        return text
    if question_id is None or not review.rules.active():
        return Text("")
    rules = s.answering_rules(question_id)
    version = f"rules v{review.rules.version}"
    if not rules:
        return Text(f"Answering rules ({version}): none for {question_id}", style="dim")
    text = Text(f"Answering rules for {question_id} ({version}):", style="bold")
    for rule in rules:
        text.append(f"\n{rule.id} ", style="bold")
        if rule.answer:
            text.append(f"→ {rule.answer} ", style="bold reverse")
        text.append(rule.text)
        text.append(f"  (when {rule.condition_text()})", style="dim")
    return text


def form_fields(s: AssessmentSession, key: str) -> Text:
    """The support and predicted direction of bias given for a judgement (r / R)."""
    a = s.assessment
    text = Text()
    if a.support.get(key):
        text.append(f"\n  support: {a.support[key]}", style="italic")
    if a.direction.get(key):
        text.append(f"\n  direction of bias: {DIRECTION_LABELS[a.direction[key]]}")
    return text


def reasons_text(s: AssessmentSession, domain_id: str, shown: dict[str, str]) -> Text:
    """What is left to answer and whether it is saved (first: it stays in view on a small
    terminal), then why the domain and the overall stand where they do."""
    words = s.explanation(domain_id)
    left_here = len(words.missing)
    left_all = sum(len(s.explanation(d).missing) for d in s.domain_ids())
    status = "✓ complete (c reopens)" if s.is_complete else "draft (c completes)"
    text = Text(f"{left_here} to answer here · {left_all} in all · {status}", style="dim")
    if s.unsaved_error:
        text.append(f"\n⚠ not saved: {s.unsaved_error}", style="bold reverse")
    else:
        text.append(" · saved", style="dim")
    text.append(f"\nD{domain_id}: ", style="bold")
    text.append_text(badge(shown[domain_id]))
    if words.early:
        text.append(" already decided by your answers", style="italic")
    elif shown[domain_id] == "incomplete":
        text.append(" (not judged yet)", style="dim")
    override = s.override(domain_id)
    if override:
        text.append(f"  your override{OVERRIDE_MARK}: ", style="bold")
        text.append_text(badge(override.judgement))
    for line in words.lines():
        text.append(f"\n  {line}")
    if override:
        text.append(f"\n  {OVERRIDE_MARK} your reason: {override.reason}", style="italic")
    text.append_text(form_fields(s, domain_id))
    text.append("\nOverall: ", style="bold")
    text.append_text(badge(shown[OVERALL]))
    finals = {d: shown[d] for d in s.domain_ids()}
    text.append("  " + "; ".join(explain_overall(finals)), style="dim")
    override = s.override(OVERALL)
    if override:
        text.append(f"\n  {OVERRIDE_MARK} your override: {override.reason}", style="italic")
    text.append_text(form_fields(s, OVERALL))
    if s.may_raise_overall() and not override:
        text.append(
            "\n  several domains have some concerns: you may raise the overall to High (O)",
            style="dim",
        )
    return text


def report_question_text(s: AssessmentSession, question_id: str | None) -> Text:
    """The focused question and its answer, above the report (which fills a narrow screen)."""
    if question_id is None:
        return Text("")
    text = Text(f"{question_id} ", style="bold")
    text.append(s.question(question_id).short)
    response = s.response(question_id)
    text.append("  answer: ")
    text.append(f" {response} " if response else " ·· ", style="bold reverse")
    text.append("  y p m n i a · q quote · tab questions", style="dim")
    return text


def domain_summary(s: AssessmentSession, domain_id: str) -> Text:
    """A domain's answers with justifications and quotes, its judgement and form fields."""
    domain = s.domain(domain_id)
    text = Text(f"{domain.name}\n", style="bold")
    for question in s.asked(domain_id):
        answer = s.answer(question.id)
        text.append(f"\n{question.id} ", style="bold")
        text.append(
            f"{answer.response if answer and answer.response else 'not answered'}", style="bold"
        )
        text.append(f"  {question.text}\n")
        if answer and answer.justification:
            text.append(f"   ✎ {answer.justification}\n")
        for quote in answer.quotes if answer else []:
            page = f"p.{quote.page}" if quote.page else "no page"
            text.append(f"   ❝ {quote.text}", style="italic")
            text.append(f" ({page})\n", style="dim")
    text.append("\nProposed: ")
    text.append_text(badge(s.proposed(domain_id)))
    override = s.override(domain_id)
    if override:
        text.append("   your judgement: ")
        text.append_text(badge(override.judgement))
        text.append(f"\nReason: {override.reason}")
    text.append_text(form_fields(s, domain_id))
    return text
