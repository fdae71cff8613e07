"""Answering rules: how this review answers a signalling question (pure, no file I/O).

A rule belongs to one signalling question and may be conditioned on attributes of the result
being assessed (outcome type, self-reported, time point, outcome, effect of interest). Rules are
versioned as a whole: every change makes a new rule book version, and a rule records the
version it was added in and, once withdrawn, the version it was withdrawn in, so the rules in
force at any earlier version can be reconstructed and compared.

Writing review-specific answering rules after a calibration exercise is the practice evaluated
by Minozzi S et al., J Clin Epidemiol 2022;141:99-105 (overall agreement between reviewers
rose to Fleiss' kappa 0.42 from 0.16 in Minozzi S et al., J Clin Epidemiol 2020;126:37-44).
"""

from __future__ import annotations

import re
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field, replace
from typing import Any, Protocol

from robtui.core.model import RESPONSES, Assessment, ResultSpec
from robtui.core.questions import EFFECT_ID_PATTERN

# The result attributes a rule may be conditioned on, with the values each accepts
# (None: free text, compared case-insensitively with the result's field; an effect is any
# effect id, checked against the question set's effects by validate_rulebook).
RULE_ATTRIBUTES: dict[str, tuple[str, ...] | None] = {
    "outcome_type": ("objective", "subjective"),
    "self_reported": ("true", "false"),
    "effect": None,
    "time_point": None,
    "outcome": None,
}

# Attributes copied from a result when a rule is written from it (the one-step rule from a
# calibration discussion): the categorical ones. Outcome name and time point are too specific
# to pre-fill by default; they can be added with explicit conditions.
PREFILL_ATTRIBUTES: tuple[str, ...] = ("outcome_type", "self_reported")

_TRUE_WORDS = {"true", "yes", "y", "1"}
_FALSE_WORDS = {"false", "no", "n", "0"}


class QuestionSetLike(Protocol):
    """What validation needs of a QuestionSet."""

    id: str
    version: str

    def questions(self, effect: str | None = None) -> list[Any]: ...

    def effects(self) -> list[str]: ...


@dataclass(frozen=True)
class AnsweringRule:
    """One rule: for ``question_id``, under the conditions ``when``, answer as ``text`` says."""

    id: str
    question_id: str
    text: str
    when: tuple[tuple[str, str], ...] = ()
    answer: str | None = None  # the response the rule leads to, when it settles one
    note: str = ""  # where it came from, e.g. "calibration round 1"
    author: str | None = None
    added_in: int = 1
    retired_in: int | None = None

    def active_at(self, version: int) -> bool:
        """True when the rule was in force at rule book ``version``."""
        return self.added_in <= version and (self.retired_in is None or self.retired_in > version)

    def condition_text(self) -> str:
        """The conditions as ``attr=value`` joined by commas; "always" when there are none."""
        return ", ".join(f"{k}={v}" for k, v in self.when) or "always"

    def summary(self) -> str:
        """One line for lists and the workbench: id, question, conditions, answer, text."""
        answer = f" -> {self.answer}" if self.answer else ""
        status = f", withdrawn v{self.retired_in}" if self.retired_in else ""
        note = f" [{self.note}]" if self.note else ""
        return (
            f"{self.id} {self.question_id} when {self.condition_text()}{answer}: {self.text} "
            f"(v{self.added_in}{status}){note}"
        )


@dataclass(frozen=True)
class RuleBook:
    """All answering rules of a review, at one version (version 0: no rules written yet)."""

    question_set: str = "rob2-parallel"
    question_set_version: str = "1"
    version: int = 0
    updated: str = ""  # ISO 8601 UTC time of the last change
    rules: tuple[AnsweringRule, ...] = field(default_factory=tuple)

    def active(self, version: int | None = None) -> list[AnsweringRule]:
        """Rules in force at ``version`` (default: the current one)."""
        at = self.version if version is None else version
        return [r for r in self.rules if r.active_at(at)]

    def rule(self, rule_id: str) -> AnsweringRule | None:
        return next((r for r in self.rules if r.id == rule_id), None)


@dataclass(frozen=True)
class RuleProblem:
    """A validation problem; ``entry`` names the rule (or "file" for the whole file)."""

    entry: str
    message: str

    def __str__(self) -> str:
        return self.message if self.entry == "file" else f"{self.entry}: {self.message}"


@dataclass(frozen=True)
class RuleChanges:
    """What changed between two rule book versions."""

    from_version: int
    to_version: int
    added: tuple[AnsweringRule, ...]
    retired: tuple[AnsweringRule, ...]


# --- conditions -------------------------------------------------------------------------------


def normalise_condition(attribute: str, value: Any) -> tuple[str, str]:
    """Check one condition and return it as ``(attribute, canonical value)``.

    Raises ValueError with a message naming the attribute and the accepted values.
    """
    attr = str(attribute).strip()
    if attr not in RULE_ATTRIBUTES:
        raise ValueError(
            f"unknown attribute {attr!r}; rules may be conditioned on: {', '.join(RULE_ATTRIBUTES)}"
        )
    allowed = RULE_ATTRIBUTES[attr]
    if attr == "self_reported":
        word = str(value).strip().lower()
        if isinstance(value, bool):
            return attr, "true" if value else "false"
        if word in _TRUE_WORDS:
            return attr, "true"
        if word in _FALSE_WORDS:
            return attr, "false"
        raise ValueError(f"self_reported must be true or false, not {value!r}")
    if not isinstance(value, str) or not value.strip():
        raise ValueError(f"{attr} needs a non-empty text value, not {value!r}")
    text = value.strip()
    if attr == "effect":
        if re.fullmatch(EFFECT_ID_PATTERN, text.lower()) is None:
            raise ValueError(f"effect must be an effect id such as assignment, not {value!r}")
        return attr, text.lower()
    if allowed is not None:
        if text.lower() not in allowed:
            raise ValueError(f"{attr} must be one of {', '.join(allowed)}, not {text!r}")
        text = text.lower()
    return attr, text


def parse_condition(text: str) -> tuple[str, str]:
    """Parse ``attr=value`` as typed on the command line (ValueError when malformed)."""
    if "=" not in text:
        raise ValueError(
            f"condition {text!r} must look like attribute=value, e.g. outcome_type=objective"
        )
    attr, _, value = text.partition("=")
    return normalise_condition(attr, value)


def normalise_conditions(pairs: Iterable[tuple[str, Any]]) -> tuple[tuple[str, str], ...]:
    """Canonical, sorted conditions; an attribute given twice is refused."""
    out: dict[str, str] = {}
    for attr, value in pairs:
        key, canonical = normalise_condition(attr, value)
        if key in out and out[key] != canonical:
            raise ValueError(f"{key} is given twice ({out[key]!r} and {canonical!r})")
        out[key] = canonical
    return tuple(sorted(out.items()))


def result_attributes(result: ResultSpec, effect: str | None = None) -> dict[str, str]:
    """The attribute values of a result that rules can test (unknown ones left out)."""
    values: dict[str, str] = {"effect": effect or result.effect, "outcome": result.outcome}
    if result.outcome_type is not None:
        values["outcome_type"] = result.outcome_type
    if result.self_reported is not None:
        values["self_reported"] = "true" if result.self_reported else "false"
    if result.time_point:
        values["time_point"] = result.time_point
    return values


def conditions_from_result(
    result: ResultSpec,
    effect: str | None = None,
    *,
    question_id: str | None = None,
    attributes: Sequence[str] = PREFILL_ATTRIBUTES,
) -> tuple[tuple[str, str], ...]:
    """Conditions pre-filled from a result, for writing a rule from a discussed case.

    The effect of interest is added for domain 2 questions, whose wording depends on it.
    """
    known = result_attributes(result, effect)
    chosen = [a for a in attributes if a in known]
    if question_id is not None and question_id.split(".")[0] == "2":
        chosen.append("effect")
    return normalise_conditions((a, known[a]) for a in dict.fromkeys(chosen))


def rule_applies(rule: AnsweringRule, result: ResultSpec, effect: str | None = None) -> bool:
    """True when every condition of ``rule`` holds for ``result``.

    A condition on an attribute the result leaves unknown (e.g. outcome type not set) does not
    hold: the rule is not shown rather than shown wrongly.
    """
    known = result_attributes(result, effect)
    for attr, value in rule.when:
        actual = known.get(attr)
        if actual is None:
            return False
        if RULE_ATTRIBUTES[attr] is None:
            if " ".join(actual.split()).casefold() != " ".join(value.split()).casefold():
                return False
        elif actual != value:
            return False
    return True


def rules_for(
    rules: RuleBook | Sequence[AnsweringRule] | None,
    question_id: str,
    result: ResultSpec,
    effect: str | None = None,
) -> list[AnsweringRule]:
    """The rules in force for ``question_id`` that apply to ``result`` (for the workbench)."""
    if rules is None:
        return []
    pool = rules.active() if isinstance(rules, RuleBook) else list(rules)
    return [r for r in pool if r.question_id == question_id and rule_applies(r, result, effect)]


def rules_beside_question(
    rules: RuleBook | None,
    unavailable: str | None,
    question_id: str,
    result: ResultSpec,
    effect: str | None = None,
) -> list[str]:
    """Lines for the workbench's panel beside a question, from ``load_rules_safely``'s pair:
    the applying rules (answer first, then text), or the reason the rules are unavailable."""
    if rules is None:
        return [unavailable or "answering rules unavailable"]
    lines = []
    for r in rules_for(rules, question_id, result, effect):
        answer = f"{r.answer}: " if r.answer else ""
        lines.append(f"{r.id} (rules v{rules.version}, when {r.condition_text()}) {answer}{r.text}")
    return lines


# --- validation -------------------------------------------------------------------------------


def question_index(qset: QuestionSetLike) -> dict[str, dict[str, Any]]:
    """Question id -> {effect: Question}, across the set's effects of interest (a set without
    effect variants: under its default effect, and any effect asks the same)."""
    index: dict[str, dict[str, Any]] = {}
    for effect in qset.effects() or [None]:
        for question in qset.questions(effect):
            index.setdefault(question.id, {})[effect] = question
    return index


def validate_rulebook(book: RuleBook, qset: QuestionSetLike) -> list[RuleProblem]:
    """Problems of ``book`` against the review's question set (empty list: valid)."""
    problems: list[RuleProblem] = []
    if book.question_set != qset.id or str(book.question_set_version) != str(qset.version):
        problems.append(
            RuleProblem(
                "file",
                f"the rules were written for question set {book.question_set} version "
                f"{book.question_set_version}, but this review uses {qset.id} version "
                f"{qset.version}; check each rule against the current questions, then set "
                f'question_set = "{qset.id}" and question_set_version = "{qset.version}"',
            )
        )
        return problems
    index = question_index(qset)
    seen: set[str] = set()
    for position, rule in enumerate(book.rules, start=1):
        entry = f"rule {rule.id} (entry {position})"
        if rule.id in seen:
            problems.append(RuleProblem(entry, f"rule id {rule.id} is used twice"))
        seen.add(rule.id)
        by_effect = index.get(rule.question_id)
        if by_effect is None:
            problems.append(
                RuleProblem(
                    entry,
                    f"unknown question id {rule.question_id!r} for question set {qset.id} "
                    f"version {qset.version}",
                )
            )
            continue
        effect = dict(rule.when).get("effect")
        if effect is not None and qset.effects() and effect not in by_effect:
            problems.append(
                RuleProblem(
                    entry, f"question {rule.question_id} is not asked for the effect of {effect}"
                )
            )
            continue
        if rule.answer is not None:
            options = {
                code
                for q in by_effect.values()
                for code in (getattr(q, "options", None) or RESPONSES)
            }
            if rule.answer not in options:
                problems.append(
                    RuleProblem(
                        entry,
                        f"answer {rule.answer!r} is not an option of question {rule.question_id} "
                        f"({', '.join(sorted(options))})",
                    )
                )
        if rule.added_in > book.version or (
            rule.retired_in is not None and not rule.added_in < rule.retired_in <= book.version
        ):
            problems.append(
                RuleProblem(
                    entry,
                    f"added_in {rule.added_in} / retired_in {rule.retired_in} do not fit the "
                    f"rule book version {book.version}",
                )
            )
    return problems


# --- changes (each returns a new RuleBook, one version up) ------------------------------------


def next_rule_id(book: RuleBook) -> str:
    """``R<n>`` one above the highest number used, so an id is never reused, even once retired."""
    numbers = [int(r.id[1:]) for r in book.rules if r.id[:1] == "R" and r.id[1:].isdigit()]
    return f"R{max(numbers, default=0) + 1}"


def add_rule(
    book: RuleBook,
    question_id: str,
    text: str,
    *,
    when: Iterable[tuple[str, Any]] = (),
    answer: str | None = None,
    note: str = "",
    author: str | None = None,
    updated: str = "",
) -> RuleBook:
    """A new book, one version up, with the rule added (ValueError on a blank text or bad code)."""
    if not text.strip():
        raise ValueError("a rule needs a text saying how the question is answered")
    if answer is not None and answer not in RESPONSES:
        raise ValueError(f"answer must be one of {', '.join(RESPONSES)}, not {answer!r}")
    version = book.version + 1
    rule = AnsweringRule(
        id=next_rule_id(book),
        question_id=question_id.strip(),
        text=text.strip(),
        when=normalise_conditions(when),
        answer=answer,
        note=note.strip(),
        author=author,
        added_in=version,
    )
    return replace(book, version=version, updated=updated, rules=(*book.rules, rule))


def retire_rule(book: RuleBook, rule_id: str, *, updated: str = "") -> RuleBook:
    """A new book, one version up, with the rule withdrawn (kept, so history stays readable)."""
    rule = book.rule(rule_id)
    if rule is None:
        raise ValueError(f"there is no rule {rule_id}; `robtui rules list` shows the ids")
    if rule.retired_in is not None:
        raise ValueError(f"rule {rule_id} was already withdrawn in version {rule.retired_in}")
    version = book.version + 1
    rules = tuple(replace(r, retired_in=version) if r.id == rule_id else r for r in book.rules)
    return replace(book, version=version, updated=updated, rules=rules)


def changes_between(
    book: RuleBook, from_version: int, to_version: int | None = None
) -> RuleChanges:
    """Rules added and withdrawn after ``from_version`` up to ``to_version`` (default: current)."""
    to = book.version if to_version is None else to_version
    before = {r.id for r in book.active(from_version)}
    after = {r.id for r in book.active(to)}
    return RuleChanges(
        from_version=from_version,
        to_version=to,
        added=tuple(r for r in book.rules if r.id in after - before),
        retired=tuple(r for r in book.rules if r.id in before - after),
    )


# --- assessments and rule versions ------------------------------------------------------------


def stamp_rules_version(assessment: Assessment, rulebook: RuleBook | None) -> Assessment:
    """A copy of ``assessment`` recording the rule book version it is being saved under.

    With the rules unavailable (``rulebook`` None) the version is recorded as unknown (None),
    so the assessment is listed for a second look once the rules are readable again.
    """
    version = None if rulebook is None else rulebook.version
    if assessment.rules_version == version:
        return assessment
    return assessment.model_copy(update={"rules_version": version})


@dataclass(frozen=True)
class StaleAssessment:
    """An assessment made under an older rule book version, with the rules new since then."""

    assessment: Assessment
    made_under: int | None
    new_rules: tuple[AnsweringRule, ...]  # added since, applying to this result
    retired_rules: tuple[AnsweringRule, ...]  # withdrawn since, that applied to this result


def stale_assessments(
    assessments: Iterable[Assessment], book: RuleBook, results: Mapping[str, ResultSpec]
) -> list[StaleAssessment]:
    """Assessments whose recorded rules version is older than ``book`` (or not recorded)."""
    out: list[StaleAssessment] = []
    for a in assessments:
        made = a.rules_version
        if book.version == 0 or (made is not None and made >= book.version):
            continue
        changes = changes_between(book, made or 0)
        result = results.get(a.result_id)

        def applies(rule: AnsweringRule, result: ResultSpec | None = result, a=a) -> bool:
            return result is None or rule_applies(rule, result, a.effect)

        out.append(
            StaleAssessment(
                assessment=a,
                made_under=made,
                new_rules=tuple(r for r in changes.added if applies(r)),
                retired_rules=tuple(r for r in changes.retired if applies(r)),
            )
        )
    out.sort(key=lambda s: (s.assessment.study_id, s.assessment.result_id, s.assessment.reviewer))
    return out
