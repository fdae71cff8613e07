"""Signalling-question sets as data: the dataclasses a question set is made of.

A question set holds the questions of each domain, the condition under which each is asked,
and each domain's algorithm as ordered rule tables. Parsing and validation of the data are in
robtui.core.question_parsing; reading files in robtui.store.question_sets.

Only the standard library is used here so that `robtui judge` starts fast.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field

from robtui.errors import InputError

# The method's response codes and judgement codes (kept here, not imported from core.model, so
# this module does not pull in pydantic; tests check both lists agree).
RESPONSE_CODES: tuple[str, ...] = ("Y", "PY", "PN", "N", "NI", "NA")
JUDGEMENT_CODES: tuple[str, ...] = ("low", "some_concerns", "high")
# Effects of interest belong to a question set: it declares them ([[effect]] id = ..., label =
# ...) or names them on its domains (effect = ...); ask it with QuestionSet.effects(). What
# follows are only defaults: words for RoB 2's two effects, and the effect of a result or
# record that names none (RoB 2's usual aim, the effect of assignment).
EFFECT_LABELS: dict[str, str] = {
    "assignment": "effect of assignment to intervention (the intention-to-treat effect)",
    "adhering": "effect of adhering to intervention (the per-protocol effect)",
}
DEFAULT_EFFECT = "assignment"
# An effect id: a short lower-case name ("assignment", "starting-dose").
EFFECT_ID_PATTERN = r"[a-z][a-z0-9-]{0,31}"
# RoB 2's two effects (kept for code written before sets declared their own; use
# QuestionSet.effects() instead).
EFFECTS: tuple[str, ...] = tuple(EFFECT_LABELS)
INCOMPLETE = "incomplete"  # a domain whose asked questions are not all answered
# The one table of judgement labels (words for every screen, export and message).
JUDGEMENT_LABELS: dict[str, str] = {
    "low": "Low",
    "some_concerns": "Some concerns",
    "high": "High",
    INCOMPLETE: "Not judged",
}
# An answer that belongs to one effect's variant of a domain is keyed "<effect>:<question id>"
# wherever both variants meet (stashed answers, agreement tables, the ranker's models).
EFFECT_KEY_SEPARATOR = ":"


def condition_phrase(question) -> str:
    """A question's condition as a phrase inside a sentence: 'if Y/PY to 2.3' (the question
    set writes it as a heading, 'If Y/PY to 2.3')."""
    text = question.condition_text.strip()
    return text[:1].lower() + text[1:] if text.startswith("If ") else text


def judgement_label(code: str | None) -> str:
    """Words for a judgement code; anything not judged (None, incomplete) reads "Not judged"."""
    return JUDGEMENT_LABELS.get(code or INCOMPLETE, JUDGEMENT_LABELS[INCOMPLETE])


def effect_key(question_id: str, effect: str) -> str:
    """``"adhering:2.3"``: a question of one effect's variant, spelled the one way."""
    return f"{effect}{EFFECT_KEY_SEPARATOR}{question_id}"


def split_effect_key(key: str) -> tuple[str | None, str]:
    """``"adhering:2.3"`` -> ("adhering", "2.3"); a plain id -> (None, id)."""
    effect, sep, question_id = key.partition(EFFECT_KEY_SEPARATOR)
    return (effect, question_id) if sep else (None, key)


# --- conditions -------------------------------------------------------------------------------


@dataclass(frozen=True)
class AnswerIs:
    """True when question ``question`` was asked and answered with one of ``codes``."""

    question: str
    codes: tuple[str, ...]

    def holds(self, answers: Mapping[str, str]) -> bool:
        return answers.get(self.question) in self.codes

    def questions(self) -> set[str]:
        return {self.question}

    def describe(self) -> str:
        return f"{self.question} is {'/'.join(self.codes)}"


@dataclass(frozen=True)
class Group:
    """All (``mode`` "all") or at least one (``mode`` "any") of ``items`` hold."""

    mode: str
    items: tuple[Condition, ...]

    def holds(self, answers: Mapping[str, str]) -> bool:
        test = all if self.mode == "all" else any
        return test(item.holds(answers) for item in self.items)

    def questions(self) -> set[str]:
        return set().union(*(item.questions() for item in self.items))

    def describe(self) -> str:
        joiner = " and " if self.mode == "all" else " or "
        return joiner.join(_bracket(item) for item in self.items)


Condition = AnswerIs | Group


def _bracket(item: Condition) -> str:
    text = item.describe()
    return text if isinstance(item, AnswerIs) else f"({text})"


# --- the set ----------------------------------------------------------------------------------


@dataclass(frozen=True)
class Question:
    id: str
    domain: str
    text: str
    short: str
    options: tuple[str, ...]
    if_applicable: bool
    asked_if: Condition | None
    condition_text: str
    guidance: str


@dataclass(frozen=True)
class Rule:
    """One row of a rule table: when ``when`` holds, the part's judgement is ``judgement``."""

    when: Condition
    judgement: str
    because: str


@dataclass(frozen=True)
class RuleTable:
    """One part of a domain's algorithm; rows are tried in order, the first match wins."""

    name: str
    rows: tuple[Rule, ...]


@dataclass(frozen=True)
class Domain:
    id: str
    name: str
    short_name: str
    effect: str | None
    questions: tuple[Question, ...]
    # The domain's judgement is the least favourable across its tables.
    rules: tuple[RuleTable, ...]
    key: str | None = None  # the workbench key that goes to this domain (one character)

    def question(self, qid: str) -> Question:
        for q in self.questions:
            if q.id == qid:
                return q
        raise InputError(f"domain {self.id} has no question {qid!r}")

    def question_ids(self) -> list[str]:
        return [q.id for q in self.questions]


@dataclass(frozen=True)
class QuestionSet:
    id: str
    version: str
    title: str
    source: str
    licence: str
    domains: tuple[Domain, ...]
    design: str | None = None  # the study design this set serves ("parallel", "cluster", ...)
    effect_labels: Mapping[str, str] = field(default_factory=lambda: dict(EFFECT_LABELS))
    declared_effects: tuple[str, ...] = ()  # the [[effect]] entries, in the file's order

    def domain_ids(self) -> list[str]:
        seen: list[str] = []
        for d in self.domains:
            if d.id not in seen:
                seen.append(d.id)
        return seen

    def has_effect_variants(self, domain_id: str) -> bool:
        """True when the domain is asked differently for each effect of interest."""
        return any(d.id == domain_id and d.effect is not None for d in self.domains)

    def question_key(self, question_id: str, effect: str) -> str:
        """The key of a question across effects: the plain id, or ``"adhering:2.3"`` for a
        question of a domain with effect variants under any effect but the first."""
        domain_id = self._domain_of_question(question_id)
        effects = self.effects()
        if self.has_effect_variants(domain_id) and effects and effect != effects[0]:
            return effect_key(question_id, effect)
        return question_id

    def question_keys(self) -> list[str]:
        """Every question's key (see question_key), in the set's order, effect by effect."""
        keys = [self.question_key(q.id, e) for e in self.effects() or [None] for q in self.questions(e)]
        return list(dict.fromkeys(keys))

    def _domain_of_question(self, question_id: str) -> str:
        for d in self.domains:
            if any(q.id == question_id for q in d.questions):
                return d.id
        raise InputError(f"question set {self.id} has no question {question_id!r}")

    def effect_label(self, effect: str) -> str:
        """Words for an effect of interest (the set's own, else the default)."""
        return self.effect_labels.get(effect) or EFFECT_LABELS.get(effect, effect)

    def domain_keys(self) -> dict[str, str]:
        """Workbench key -> domain id, for the domains that have a key, in the set's order."""
        keys: dict[str, str] = {}
        for d in self.domains:
            if d.key is not None and d.key not in keys:
                keys[d.key] = d.id
        return keys

    def effects(self) -> list[str]:
        """The set's effects of interest: those it declares, else those its domains' variants
        name, in the file's order (e.g. assignment, adhering); [] when no domain varies."""
        if self.declared_effects:
            return list(self.declared_effects)
        return list(dict.fromkeys(d.effect for d in self.domains if d.effect is not None))

    def check_effect(self, effect: str) -> str:
        """``effect`` when the set asks its questions for it (a set without effect variants
        asks the same for any); InputError naming the set's effects otherwise."""
        effects = self.effects()
        if effects and effect not in effects:
            raise InputError(
                f"unknown effect {effect!r}: question set {self.id} offers "
                f"{' or '.join(effects)}"
            )
        return effect

    def default_effect(self) -> str:
        """The effect a question is asked for when none is named: the set's first."""
        effects = self.effects()
        return effects[0] if effects else DEFAULT_EFFECT

    def domain_short_name(self, domain_id: str, effect: str | None = None) -> str:
        """A domain's short name for ``effect``; ``effect=None`` pools the variants (e.g.
        agreement over results of either effect), giving the part of their names they share."""
        if effect is not None:
            return self.domain(domain_id, effect).short_name
        names = sorted({d.short_name for d in self.domains if d.id == domain_id})
        if not names:
            self.domain(domain_id)  # raises the usual "no domain" message
        stems = {name.split(" (", 1)[0] for name in names}
        if len(names) == 1:
            return names[0]
        return stems.pop() if len(stems) == 1 else " / ".join(names)

    def domain_label(self, domain_id: str, effect: str | None = None) -> str:
        """"D2 Deviations (adhering)"-style label (see domain_short_name)."""
        return f"D{domain_id} {self.domain_short_name(domain_id, effect)}"

    def domain(self, domain_id: str, effect: str | None = None) -> Domain:
        effect = effect or self.default_effect()
        matches = [d for d in self.domains if d.id == domain_id]
        if not matches:
            raise InputError(
                f"question set {self.id} has no domain {domain_id!r}; "
                f"choose one of {', '.join(self.domain_ids())}"
            )
        for d in matches:
            if d.effect is None or d.effect == effect:
                return d
        offered = ", ".join(str(d.effect) for d in matches)
        raise InputError(f"domain {domain_id} has no variant for effect {effect!r}; use {offered}")

    def questions(self, effect: str | None = None) -> list[Question]:
        return [q for did in self.domain_ids() for q in self.domain(did, effect).questions]

    def question(self, qid: str, effect: str | None = None) -> Question:
        for q in self.questions(effect):
            if q.id == qid:
                return q
        raise InputError(f"question set {self.id} has no question {qid!r}")


# --- asking and matching -----------------------------------------------------------------------


def is_asked(question: Question, answers: Mapping[str, str]) -> bool:
    """Whether ``question`` is asked given the answers to earlier questions."""
    return question.asked_if is None or question.asked_if.holds(answers)


def first_match(table: RuleTable, answers: Mapping[str, str]) -> Rule | None:
    return next((row for row in table.rows if row.when.holds(answers)), None)
