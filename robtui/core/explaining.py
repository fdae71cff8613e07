"""A judgement explained in words (pure): the path a domain took, in the reviewer's terms.

``explain_in_words(domain, answers)`` gives, for one domain, the proposed judgement, the
question answers that decided it with the rule's reason ("1.2 answered N: allocation was not
concealed → High"), and the questions still to answer. A judgement that the answers already
determine (every way of answering the remaining questions leads to it, e.g. domain 4 with
4.1 = Y is High whatever 4.2 says) is given before the domain is complete, marked as such.

The workbench, ``robtui judge`` and the exports all use these words, so a reviewer reads the
same reason everywhere. Nothing here changes what the algorithm proposes (robtui.core.algorithm).
"""

from __future__ import annotations

from collections.abc import Iterator, Mapping, Sequence
from dataclasses import dataclass
from functools import lru_cache

from robtui.core import algorithm
from robtui.core.questions import (
    AnswerIs,
    Condition,
    Domain,
    Question,
    Rule,
    RuleTable,
    judgement_label,
)

ARROW = "→"
# Stop looking at ways to finish a domain after this many (no bundled domain comes near it:
# the largest, domain 2 for adhering, has about 21,000 completions from no answers at all).
_MAX_COMPLETIONS = 50_000


@dataclass(frozen=True)
class Reason:
    """One step of the explanation: the answers a rule row looked at, its reason, its verdict."""

    answers: tuple[tuple[str, str], ...]  # (question id, response) in question order
    because: str
    judgement: str
    table: str = ""

    def words(self) -> str:
        said = ", ".join(f"{qid} answered {code}" for qid, code in self.answers)
        head = f"{said}: " if said else ""
        return f"{head}{self.because} {ARROW} {judgement_label(self.judgement)}"


@dataclass(frozen=True)
class DomainExplanation:
    domain_id: str
    judgement: str  # low | some_concerns | high | incomplete (as the algorithm proposes)
    determined: str | None  # the judgement the answers fix already (== judgement when complete)
    reasons: tuple[Reason, ...]
    missing: tuple[Question, ...]  # asked on the current path, not answered yet
    not_asked: int  # questions of the domain not asked on the current path

    @property
    def early(self) -> bool:
        """True when the answers fix the judgement before every asked question is answered."""
        return self.judgement == algorithm.INCOMPLETE and self.determined is not None

    def lines(self) -> list[str]:
        """The explanation as lines of text, as the workbench and `robtui judge` print it."""
        out = [reason.words() for reason in self.reasons]
        if self.early:
            rest = ", ".join(q.id for q in self.missing)
            out.append(f"{judgement_label(self.determined)} whatever the answers to {rest}")
        elif self.determined is None and self.missing:
            n = len(self.missing)
            out.append(
                f"{n} question{'s' if n != 1 else ''} still to answer before a judgement: "
                + ", ".join(q.id for q in self.missing)
            )
        return out


def explain_in_words(domain: Domain, answers: Mapping[str, str]) -> DomainExplanation:
    """The domain's judgement with its reasons in words (see the module docstring)."""
    return _explain(domain, tuple(sorted(answers.items())))


@lru_cache(maxsize=512)
def _explain(domain: Domain, answer_items: tuple[tuple[str, str], ...]) -> DomainExplanation:
    """Cached: the workbench asks for every domain after each keystroke."""
    answers = dict(answer_items)
    result = algorithm.explain_domain(domain, answers)
    not_asked = len(domain.questions) - len(result.asked)
    if result.judgement != algorithm.INCOMPLETE:
        reasons = tuple(
            _reason(part.table, part.rule, result.answers, domain)
            for part in result.parts
            if part.rule is not None
        )
        return DomainExplanation(
            domain.id, result.judgement, result.judgement, reasons, (), not_asked
        )
    determined, rules = _determined(domain, result.answers)
    reasons: tuple[Reason, ...] = ()
    if determined is not None:
        reasons = tuple(_reason(table, rule, result.answers, domain) for table, rule in rules)
        if not reasons:  # different rows decide in different completions: name the answers
            order = domain.question_ids()
            given = sorted(result.answers.items(), key=lambda item: order.index(item[0]))
            reasons = (Reason(tuple(given), "every way of answering the rest", determined),)
    return DomainExplanation(
        domain.id, result.judgement, determined, reasons, result.missing, not_asked
    )


def determined_judgement(domain: Domain, answers: Mapping[str, str]) -> str | None:
    """The judgement the answers already fix, or None while it still depends on answers."""
    return explain_in_words(domain, answers).determined


def explain_overall(domain_judgements: Mapping[str, str]) -> list[str]:
    """Why the overall is what it is, from each domain's (final) judgement, in words."""
    judged = {d: j for d, j in domain_judgements.items() if j != algorithm.INCOMPLETE}
    if not judged:
        return ["no domain judged yet"]
    worst = algorithm.least_favourable(list(judged.values()))
    at_worst = [d for d, j in judged.items() if j == worst]
    which = ", ".join(f"domain {d}" for d in at_worst)
    if len(judged) < len(domain_judgements):
        if worst != "high":
            left = [d for d in domain_judgements if d not in judged]
            plural = "s" if len(left) != 1 else ""
            return [f"overall not judged yet: domain{plural} {', '.join(left)} still open"]
        return [f"{which} {judgement_label('high')} {ARROW} overall High whatever the other domains"]
    return [f"least favourable domain: {which} {judgement_label(worst)} {ARROW} overall {judgement_label(worst)}"]


def determined_overall(domain_judgements: Sequence[str]) -> str | None:
    """The overall the domain judgements already fix (a High domain fixes it), or None."""
    if "high" in domain_judgements:
        return "high"
    if algorithm.INCOMPLETE in domain_judgements:
        return None
    return algorithm.least_favourable(list(domain_judgements))


# -- the pieces -------------------------------------------------------------------------------
def _deciding(parts: Sequence[algorithm.PartResult]) -> list[algorithm.PartResult]:
    """The parts whose row gives the domain's judgement (the least favourable parts)."""
    decided = [p for p in parts if p.rule is not None]
    if not decided:
        return []
    worst = algorithm.least_favourable([p.rule.judgement for p in decided])
    return [p for p in decided if p.rule.judgement == worst]


def _reason(table: RuleTable, rule: Rule, answers: Mapping[str, str], domain: Domain) -> Reason:
    order = domain.question_ids()
    looked_at = sorted(
        {leaf.question for leaf in _leaves(rule.when) if leaf.holds(answers)},
        key=order.index,
    )
    return Reason(
        tuple((qid, answers[qid]) for qid in looked_at), rule.because, rule.judgement, table.name
    )


def _leaves(condition: Condition) -> Iterator[AnswerIs]:
    if isinstance(condition, AnswerIs):
        yield condition
    else:
        for item in condition.items:
            yield from _leaves(item)


def _determined(
    domain: Domain, answers: Mapping[str, str]
) -> tuple[str | None, list[tuple[RuleTable, Rule]]]:
    """The one judgement every completion of ``answers`` reaches (None if several), and the
    rows that decide it in every completion (their reasons explain the early judgement)."""
    seen: set[str] = set()
    fired: dict[str, set[int]] = {t.name: set() for t in domain.rules}
    for count, complete in enumerate(_completions(domain, dict(answers)), 1):
        result = algorithm.explain_domain(domain, complete)
        seen.add(result.judgement)
        if len(seen) > 1 or count > _MAX_COMPLETIONS:
            return None, []
        for part in _deciding(result.parts):
            fired[part.table.name].add(part.table.rows.index(part.rule))
    if len(seen) != 1:
        return None, []
    steady = []
    for table in domain.rules:
        rows = fired[table.name]
        if len(rows) == 1:
            rule = table.rows[next(iter(rows))]
            if rule.when.holds(answers):  # decided by answers already given
                steady.append((table, rule))
    return next(iter(seen)), steady


def _completions(domain: Domain, answers: dict[str, str]) -> Iterator[dict[str, str]]:
    """Every way to answer the rest of the domain's path from ``answers`` (depth first)."""
    asked = algorithm.asked_questions(domain, answers)
    open_question = next((q for q in asked if q.id not in answers), None)
    if open_question is None:
        yield answers
        return
    for code in open_question.options:
        yield from _completions(domain, {**answers, open_question.id: code})


def override_in_words(label: str, proposed: str | None, judgement: str, reason: str) -> str:
    """A reviewer's (or the lead's) override as a reviewer reads it: "D2 Deviations: proposed
    Some concerns, judged High instead (reason: ...)"."""
    return (
        f"{label}: proposed {judgement_label(proposed)}, judged {judgement_label(judgement)} "
        f"instead (reason: {reason})"
    )
