"""The signalling questions of one domain that are asked on the current path.

Questions whose condition is not met are not listed; a conditional question that is listed
says why it is asked (the question set's condition_text).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any

from rich.table import Table
from rich.text import Text
from textual.widgets import OptionList
from textual.widgets.option_list import Option

RESPONSE_STYLE = "bold #111111 on #d9d9d9"


@dataclass(frozen=True)
class QuestionLine:
    """What the list shows of one question."""

    question: Any  # robtui.core.questions.Question
    response: str | None
    justification: str
    quote_pages: tuple[str, ...]
    suggestions: int
    best_score: float | None = None
    no_evidence_threshold: float | None = None
    guidance: str = ""  # shown under the question when the reviewer asks for it (g)


def asked_because(condition_text: str) -> str:
    """'If Y/PY to 2.3' -> '↳ asked if Y/PY to 2.3' (the reason a conditional question shows)."""
    text = condition_text.strip()
    if text.startswith("If "):
        return "↳ asked if " + text[3:]
    return "↳ asked: " + text


def question_prompt(line: QuestionLine) -> Table:
    q = line.question
    body = Text(q.text)
    if q.condition_text:
        body.append(f"\n{asked_because(q.condition_text)}", style="italic dim")
    if line.guidance:
        body.append(f"\nGuidance: {line.guidance}", style="italic")
    if line.justification:
        shown = line.justification
        if len(shown) > 160:
            shown = shown[:157] + "…"
        body.append(f"\n✎ {shown}")
    details = []
    if line.quote_pages:
        n = len(line.quote_pages)
        details.append(f"❝ {n} quote{'s' if n != 1 else ''} ({', '.join(line.quote_pages)})")
    if line.suggestions:
        n = line.suggestions
        suggested = f"{n} suggested sentence{'s' if n != 1 else ''}"
        if line.best_score is not None:
            suggested += f", best {line.best_score:.2f}"
            low = line.no_evidence_threshold
            # compared as shown (two decimals), so 0.40 is never "below" a level of 0.40
            if low is not None and round(line.best_score, 2) < round(low, 2):
                suggested += " (below the ranker's no-evidence level: the report may not say)"
        details.append(suggested)
    if details:
        body.append("\n" + " · ".join(details), style="dim")
    response = (
        Text(f" {line.response:^3} ", style=RESPONSE_STYLE)
        if line.response
        else Text(" ·· ", style="dim")
    )
    grid = Table.grid(padding=(0, 1))
    grid.add_column(width=4, style="bold")
    grid.add_column(width=5)
    grid.add_column(ratio=1)
    grid.add_row(Text(q.id, style="bold"), response, body)
    return grid


class QuestionList(OptionList):
    """One option per asked question; the highlighted one is the focused question."""

    def __init__(self, **kwargs: Any) -> None:
        super().__init__(markup=False, **kwargs)

    def show(self, lines: Sequence[QuestionLine], keep: str | None = None) -> None:
        """Replace the questions, keeping the highlight on ``keep`` when it is still asked."""
        current = keep or self.focused_question
        self.set_options([Option(question_prompt(line), id=line.question.id) for line in lines])
        ids = [line.question.id for line in lines]
        if current in ids:
            self.highlighted = ids.index(current)
        elif ids:
            self.highlighted = 0

    @property
    def focused_question(self) -> str | None:
        if self.highlighted is None or not self.options:
            return None
        return self.options[self.highlighted].id


def quote_pages(quotes: Sequence[Any]) -> tuple[str, ...]:
    return tuple(f"p.{q.page}" if q.page else "no page" for q in quotes)


def line_for(
    question: Any,
    answers: Mapping[str, Any],
    suggestions: Sequence[Any] = (),
    no_evidence_threshold: float | None = None,
    *,
    show_guidance: bool = False,
) -> QuestionLine:
    answer = answers.get(question.id)
    return QuestionLine(
        question=question,
        response=answer.response if answer else None,
        justification=answer.justification if answer else "",
        quote_pages=quote_pages(answer.quotes) if answer else (),
        suggestions=len(suggestions),
        best_score=max((s.score for s in suggestions), default=None),
        no_evidence_threshold=no_evidence_threshold,
        guidance=question.guidance if show_guidance else "",
    )
