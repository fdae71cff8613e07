"""Comparing two reviewers' assessments (pure); settling them is robtui.core.consensus.

Only assessments marked complete are compared; a pair where one side is missing or still a
draft is kept in the list with the reason (``AssessmentPair.problem``), never dropped.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from robtui.core.agreement import agreement
from robtui.core.assessing import path_answers
from robtui.core.model import (
    JUDGEMENTS,
    OVERALL,
    RESPONSES,
    Answer,
    Assessment,
    Quote,
)
from robtui.core.questions import QuestionSet
from robtui.core.review_sets import ReviewSets, review_sets
from robtui.errors import InputError

SOURCES = ("a", "b", "new")
AGREEMENT_METHOD = {
    "pairs": "assessments marked complete by both reviewers; domain and overall judgements are "
    "the final ones (overrides included); a signalling question counts only where both "
    "reviewers were asked it on their answer path; in a review mixing designs a domain counts "
    "only over the studies whose question set has it",
    "percent_agreement": "share of pairs with the same answer, in percent",
    "kappa": "Cohen (1960)",
    "kappa_ci": "kappa +/- 1.96 SE, large-sample SE of Fleiss, Cohen & Everitt (1969), "
    "clipped to [-1, 1]",
    "weighted_kappa": "linear agreement weights over low < some_concerns < high (Cohen 1968)",
    "pabak": "(k p_o - 1) / (k - 1), Byrt, Bishop & Carlin (1993); k = number of categories "
    "(3 judgements; a question's response options)",
    "band": "Landis & Koch (1977)",
    "unit": "one pair per study: a study with several results compared counts with its first "
    "result in the review's order (its results are not independent); by_result: each result",
}


@dataclass(frozen=True)
class AssessmentPair:
    """Reviewer A's and B's assessments of one result of one study (either may be None)."""

    study_id: str
    result_id: str
    reviewer_a: str
    reviewer_b: str
    a: Assessment | None
    b: Assessment | None
    # reviewers whose file exists but cannot be used (unreadable, or refused on load)
    unusable: tuple[str, ...] = ()

    @property
    def problem(self) -> str | None:
        """Why this pair cannot be compared, or None when both sides are complete."""
        issues = []
        for name, side in ((self.reviewer_a, self.a), (self.reviewer_b, self.b)):
            if side is None and name in self.unusable:
                issues.append(f"{name}: the assessment file cannot be used (problem above)")
            elif side is None:
                issues.append(f"{name}: no assessment")
            elif side.status != "complete":
                issues.append(f"{name}: draft, not marked complete")
        if not issues and self.a.effect != self.b.effect:
            issues.append(
                f"effects differ ({self.reviewer_a}: {self.a.effect}, "
                f"{self.reviewer_b}: {self.b.effect}): agree the effect of interest first"
            )
        return "; ".join(issues) or None

    @property
    def comparable(self) -> bool:
        return self.problem is None

    @property
    def key(self) -> tuple[str, str]:
        return (self.study_id, self.result_id)


@dataclass(frozen=True)
class QuestionDifference:
    """One signalling question, both sides: response (None = not answered / not asked)."""

    question_id: str
    domain_id: str
    text: str
    short: str
    response_a: str | None
    response_b: str | None
    justification_a: str
    justification_b: str
    quotes_a: tuple[Quote, ...]
    quotes_b: tuple[Quote, ...]

    @property
    def differs(self) -> bool:
        return self.response_a != self.response_b


@dataclass(frozen=True)
class JudgementRow:
    """A domain (or overall) judgement, both sides: proposal, final, override reason."""

    key: str
    label: str
    proposed_a: str | None
    final_a: str | None
    override_a: str | None
    proposed_b: str | None
    final_b: str | None
    override_b: str | None
    direction_a: str | None = None  # optional predicted direction of bias (DIRECTION_LABELS)
    direction_b: str | None = None
    support_a: str = ""  # free-text support of the domain judgement (domains only)
    support_b: str = ""

    @property
    def differs(self) -> bool:
        return self.final_a != self.final_b

    @property
    def direction_differs(self) -> bool:
        """Both gave a direction of bias, and not the same one (it is optional)."""
        return None not in (self.direction_a, self.direction_b) and (
            self.direction_a != self.direction_b
        )


@dataclass(frozen=True)
class PairComparison:
    pair: AssessmentPair
    questions: list[QuestionDifference]  # differences first, then agreements, question order
    judgements: list[JudgementRow]  # domains in order, then overall

    @property
    def n_differences(self) -> int:
        return sum(q.differs for q in self.questions)

    def to_dict(self) -> dict:
        return {
            "study": self.pair.study_id,
            "result": self.pair.result_id,
            "reviewers": [self.pair.reviewer_a, self.pair.reviewer_b],
            "effect": self.pair.a.effect,
            "differences": self.n_differences,
            "judgements": [
                {
                    "key": j.key,
                    "label": j.label,
                    "a": {
                        "proposed": j.proposed_a,
                        "final": j.final_a,
                        "override": j.override_a,
                        "direction": j.direction_a,
                        "support": j.support_a,
                    },
                    "b": {
                        "proposed": j.proposed_b,
                        "final": j.final_b,
                        "override": j.override_b,
                        "direction": j.direction_b,
                        "support": j.support_b,
                    },
                    "differs": j.differs,
                    "direction_differs": j.direction_differs,
                }
                for j in self.judgements
            ],
            "questions": [
                {
                    "id": q.question_id,
                    "domain": q.domain_id,
                    "text": q.text,
                    "differs": q.differs,
                    "a": _side(q.response_a, q.justification_a, q.quotes_a),
                    "b": _side(q.response_b, q.justification_b, q.quotes_b),
                }
                for q in self.questions
            ],
        }


def _side(response: str | None, justification: str, quotes: Sequence[Quote]) -> dict:
    return {
        "response": response,
        "justification": justification,
        "quotes": [{"text": q.text, "page": q.page} for q in quotes],
    }


# -- pairing -------------------------------------------------------------------------------------
def pair_assessments(
    a: list[Assessment],
    b: list[Assessment],
    *,
    reviewer_a: str | None = None,
    reviewer_b: str | None = None,
    expected: Sequence[tuple[str, str]] = (),
) -> list[AssessmentPair]:
    """Pair A's and B's assessments by (study, result).

    ``expected`` lists the (study, result) keys the review asks for, so that a result neither
    reviewer has started shows up too. Order: ``expected`` first, then any other keys sorted.
    """
    name_a = reviewer_a or (a[0].reviewer if a else "A")
    name_b = reviewer_b or (b[0].reviewer if b else "B")
    by_a = {(x.study_id, x.result_id): x for x in a}
    by_b = {(x.study_id, x.result_id): x for x in b}
    keys = list(dict.fromkeys(expected))
    keys += sorted((set(by_a) | set(by_b)) - set(keys))
    return [
        AssessmentPair(s, r, name_a, name_b, by_a.get((s, r)), by_b.get((s, r))) for s, r in keys
    ]


def answer_of(record, qid: str) -> Answer:
    return record.answers.get(qid) or Answer()


def differences(pair: AssessmentPair, qset) -> list[QuestionDifference]:
    """Every signalling question of the pair, both sides; differences first."""
    require_comparable(pair)
    effect = pair.a.effect
    eff_a = path_answers(qset, effect, pair.a.answers)
    eff_b = path_answers(qset, effect, pair.b.answers)
    rows = []
    for question in qset.questions(effect):
        ans_a, ans_b = answer_of(pair.a, question.id), answer_of(pair.b, question.id)
        on_a, on_b = question.id in eff_a, question.id in eff_b
        rows.append(
            QuestionDifference(
                question_id=question.id,
                domain_id=question.domain,
                text=question.text,
                short=question.short,
                response_a=eff_a.get(question.id),
                response_b=eff_b.get(question.id),
                justification_a=ans_a.justification if on_a else "",
                justification_b=ans_b.justification if on_b else "",
                quotes_a=tuple(ans_a.quotes) if on_a else (),
                quotes_b=tuple(ans_b.quotes) if on_b else (),
            )
        )
    return [r for r in rows if r.differs] + [r for r in rows if not r.differs]


def judgement_keys(qset, effect: str | None = None) -> list[tuple[str, str]]:
    keys = []
    for domain_id in qset.domain_ids():
        keys.append((domain_id, qset.domain_label(domain_id, effect)))
    keys.append((OVERALL, "Overall"))
    return keys


def judgement_rows(pair: AssessmentPair, qset) -> list[JudgementRow]:
    """Domain and overall judgements of both sides, in order."""
    require_comparable(pair)
    rows = []
    for key, label in judgement_keys(qset, pair.a.effect):
        over_a, over_b = pair.a.overrides.get(key), pair.b.overrides.get(key)
        rows.append(
            JudgementRow(
                key=key,
                label=label,
                proposed_a=pair.a.proposed.get(key),
                final_a=pair.a.final.get(key),
                override_a=over_a.reason if over_a else None,
                proposed_b=pair.b.proposed.get(key),
                final_b=pair.b.final.get(key),
                override_b=over_b.reason if over_b else None,
                direction_a=pair.a.direction.get(key),
                direction_b=pair.b.direction.get(key),
                support_a=pair.a.support.get(key, ""),
                support_b=pair.b.support.get(key, ""),
            )
        )
    return rows


def compare_pair(pair: AssessmentPair, qset) -> PairComparison:
    """Everything a comparison screen shows for one pair (both sides complete)."""
    return PairComparison(pair, differences(pair, qset), judgement_rows(pair, qset))


def require_comparable(pair: AssessmentPair) -> None:
    if pair.problem:
        raise InputError(
            f"{pair.study_id} / {pair.result_id} cannot be compared: {pair.problem}; "
            "both reviewers must mark their assessments complete first"
        )


# -- agreement over the review ---------------------------------------------------------------------
def review_agreement(pairs: Sequence[AssessmentPair], sets: QuestionSet | ReviewSets) -> dict:
    """Agreement per domain, overall and per signalling question (the agreement JSON shape).

    Only comparable pairs count; the others are listed under "not_compared". ``sets`` gives
    each study's question set (one QuestionSet: the same for all); in a review mixing designs a
    domain, or a question, counts only over the studies whose set has it.

    Pairs are independent only across studies: a study's results share one report and mostly
    the same answers. When a study has several results compared, the review-level figures
    count each study once (its first result in the review's order) and say so under
    "analysis"; "by_result" gives every result on its own.
    """
    sets = review_sets(sets)
    usable = [p for p in pairs if p.comparable]
    reviewers = [pairs[0].reviewer_a, pairs[0].reviewer_b] if pairs else []
    study_ids = list(dict.fromkeys(p.study_id for p in pairs))
    first: dict[str, AssessmentPair] = {}
    for p in usable:
        first.setdefault(p.study_id, p)
    shared = sorted({p.study_id for p in usable if first[p.study_id] is not p})
    if shared:
        counted = list(first.values())
        analysis = {
            "unit": "study",
            "reason": (
                f"{len(shared)} of {len(first)} studies have several results compared; a study's "
                "results share one report and mostly the same answers, so counting each as an "
                "independent pair would inflate n and narrow the intervals. Each study counts "
                "once, with its first result in the review's order; see by_result for each "
                "result on its own"
            ),
            "results_used": {p.study_id: p.result_id for p in counted},
        }
    else:
        counted = usable
        analysis = {
            "unit": "result",
            "reason": "each study has at most one result compared: every pair is its own study",
        }
    results = list(dict.fromkeys(p.result_id for p in usable))
    by_result = {}
    if len(results) > 1:
        for rid in results:
            mine = [p for p in usable if p.result_id == rid]
            by_result[rid] = {"compared": len(mine), **_agreement_tables(mine, sets, study_ids)}
    return {
        "reviewers": reviewers,
        "compared": len(usable),
        "studies": len(first),
        "not_compared": [
            {"study": p.study_id, "result": p.result_id, "problem": p.problem}
            for p in pairs
            if not p.comparable
        ],
        "analysis": analysis,
        **_agreement_tables(counted, sets, study_ids),
        "by_result": by_result,
        "method": AGREEMENT_METHOD,
    }


def _agreement_tables(usable: Sequence[AssessmentPair], sets: ReviewSets, study_ids) -> dict:
    """{"domains": ..., "questions": ...} over the given comparable pairs."""
    domains: dict[str, dict] = {}
    for key in [*sets.domain_ids(study_ids), OVERALL]:
        judged = [
            (p.a.final.get(key), p.b.final.get(key))
            for p in usable
            if key == OVERALL or key in sets.of(p.study_id).domain_ids()
            if p.a.final.get(key) in JUDGEMENTS and p.b.final.get(key) in JUDGEMENTS
        ]
        domains[key] = agreement(judged, JUDGEMENTS, ordered=True).to_dict()
    question_pairs: dict[str, list[tuple[str, str]]] = {}
    question_cats: dict[str, list[str]] = {}
    for p in usable:
        effect = p.a.effect
        qset = sets.of(p.study_id)
        eff_a = path_answers(qset, effect, p.a.answers)
        eff_b = path_answers(qset, effect, p.b.answers)
        for question in qset.questions(effect):
            if question.id not in eff_a or question.id not in eff_b:
                continue  # asked of one reviewer only: shows in the comparison, not in kappa
            key = qset.question_key(question.id, effect)
            question_pairs.setdefault(key, []).append((eff_a[question.id], eff_b[question.id]))
            question_cats.setdefault(key, list(question.options))
    order = sets.question_keys(study_ids)
    order += [k for k in question_pairs if k not in order]
    questions = {}
    for key in [k for k in order if k in question_pairs]:
        qpairs = question_pairs[key]
        seen = [v for pair in qpairs for v in pair]
        cats = list(dict.fromkeys([*question_cats[key], *[c for c in RESPONSES if c in seen]]))
        questions[key] = agreement(qpairs, cats).to_dict()
    return {"domains": domains, "questions": questions}
