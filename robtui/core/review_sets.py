"""The question sets of a review that mixes trial designs (pure).

Each study is assessed with the set of its design (parallel-group, cluster-randomised,
crossover, or a set of the review's own). What covers the whole review - the columns of the
traffic-light table, agreement per domain, the summary plot - is the union of the sets in use:
domains in an order every set agrees with (a set's extra domain sits where that set puts it),
and a domain counted only over the studies whose set has it.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field

from robtui.core.questions import QuestionSet
from robtui.errors import InputError


def merged_order(sequences: Iterable[Sequence[str]]) -> list[str]:
    """One order of every item of ``sequences`` that keeps each sequence's own order where
    they agree: an item new to the order goes just before the next item of its sequence that
    is already placed (or at the end). ``[1,2,3]`` and ``[1,1b,2,3]`` and ``[1,S,2,3]`` give
    ``[1,1b,S,2,3]``."""
    order: list[str] = []
    for seq in sequences:
        for i, item in enumerate(seq):
            if item in order:
                continue
            successor = next((later for later in seq[i + 1 :] if later in order), None)
            order.insert(order.index(successor) if successor else len(order), item)
    return order


def is_earlier_version(made: str, current: str) -> bool:
    """True when version ``made`` is a whole number below ``current`` (the bundled sets
    number their versions 1, 2, ...); any other version cannot be placed."""
    made, current = str(made), str(current)
    return made.isdigit() and current.isdigit() and int(made) < int(current)


@dataclass(frozen=True)
class ReviewSets:
    """Which question set each study of a review is assessed with."""

    default: QuestionSet  # for studies not listed in by_study
    by_study: Mapping[str, QuestionSet] = field(default_factory=dict)

    def of(self, study_id: str) -> QuestionSet:
        """The set a study is assessed with."""
        return self.by_study.get(study_id, self.default)

    def set_mismatch(self, record) -> str | None:
        """Why a stored record (an assessment or consensus: ``study_id``, ``question_set``,
        ``question_set_version``) does not fit its study's set, or None when it does."""
        qset = self.of(record.study_id)
        made = (record.question_set, str(record.question_set_version))
        if made == (qset.id, str(qset.version)):
            return None
        said = (
            f"was made with question set {made[0]} version {made[1]}, but the study now uses "
            f"{qset.id} version {qset.version}"
        )
        if self.can_carry(record):
            said += (
                ": nothing is lost: `robtui upgrade REVIEW_DIR` shows what carrying it to "
                f"version {qset.version} keeps, sets aside and changes, and `robtui upgrade "
                "REVIEW_DIR --apply` carries it (answers kept, judgements recomputed)"
            )
        return said

    def can_carry(self, record) -> bool:
        """True when ``record`` was made with an earlier version of its study's set (see
        robtui.core.set_versions)."""
        qset = self.of(record.study_id)
        return record.question_set == qset.id and is_earlier_version(
            record.question_set_version, qset.version
        )

    def in_use(self, study_ids: Iterable[str] | None = None) -> list[QuestionSet]:
        """The distinct sets of ``study_ids`` (default: every listed study and the default set),
        the default first, then in study order."""
        ids = list(self.by_study) if study_ids is None else list(study_ids)
        sets = ([self.default] if study_ids is None else []) + [self.of(s) for s in ids]
        unique: dict[tuple[str, str], QuestionSet] = {}
        for qset in sets:
            unique.setdefault((qset.id, qset.version), qset)
        return list(unique.values()) or [self.default]

    def effects(self, study_ids: Iterable[str] | None = None) -> list[str]:
        """The effects of interest the sets in use declare, in one order all of them agree
        with ([] when no set has effect variants)."""
        return merged_order(qset.effects() for qset in self.in_use(study_ids))

    def _assessed(self, study_ids: Iterable[str]) -> list[QuestionSet]:
        """The sets ``study_ids`` are assessed with (the review's default while it has none)."""
        return self.in_use(study_ids) if list(study_ids) else [self.default]

    def default_effect(self, study_ids: Iterable[str] = ()) -> str:
        """The effect a new result gets when none is named: the first study's set's default."""
        return self._assessed(list(study_ids))[0].default_effect()

    def check_effect(self, effect: str, study_ids: Iterable[str] = ()) -> str:
        """``effect`` when the set of every study in ``study_ids`` asks its questions for it
        (a result is assessed in every study); InputError naming the set and its effects."""
        for qset in self._assessed(list(study_ids)):
            qset.check_effect(effect)
        return effect

    def is_mixed(self, study_ids: Iterable[str] | None = None) -> bool:
        return len(self.in_use(study_ids)) > 1

    def domain_ids(self, study_ids: Iterable[str] | None = None) -> list[str]:
        """Every domain of the sets in use, in one order all of them agree with."""
        return merged_order(qset.domain_ids() for qset in self.in_use(study_ids))

    def question_keys(self, study_ids: Iterable[str] | None = None) -> list[str]:
        """Every question key (QuestionSet.question_key) of the sets in use: effect by effect,
        domain by domain in :meth:`domain_ids` order, each domain's questions merged likewise
        (one set alone: its own ``question_keys()`` order)."""
        sets = self.in_use(study_ids)
        keys: list[str] = []
        effects = self.effects(study_ids) or [sets[0].default_effect()]
        for effect in effects:
            for domain_id in self.domain_ids(study_ids):
                per_set = [
                    [qset.question_key(q.id, effect) for q in qset.domain(domain_id, effect).questions]
                    for qset in sets
                    if domain_id in qset.domain_ids() and effect in (qset.effects() or [effect])
                ]
                keys += [k for k in merged_order(per_set) if k not in keys]
        return keys

    def combined(self, study_ids: Iterable[str] | None = None) -> QuestionSet:
        """One set holding every domain of the sets in use, for names and labels of columns
        (each domain as the first set in use that has it defines it). Never assess with it:
        assess each study with :meth:`of`."""
        sets = self.in_use(study_ids)
        if len(sets) == 1:
            return sets[0]
        order = merged_order(qset.domain_ids() for qset in sets)
        domains = []
        for domain_id in order:
            first = next(qset for qset in sets if domain_id in qset.domain_ids())
            domains += [d for d in first.domains if d.id == domain_id]
        return QuestionSet(
            id=" + ".join(qset.id for qset in sets),
            version=" + ".join(qset.version for qset in sets),
            title="; ".join(qset.title for qset in sets),
            source=" | ".join(dict.fromkeys(qset.source for qset in sets)),
            licence=" | ".join(dict.fromkeys(qset.licence for qset in sets)),
            domains=tuple(domains),
        )


def review_sets(sets: QuestionSet | ReviewSets) -> ReviewSets:
    """``sets`` as ReviewSets (a single QuestionSet: every study uses it)."""
    if isinstance(sets, ReviewSets):
        return sets
    if isinstance(sets, QuestionSet):
        return ReviewSets(sets)
    raise InputError(f"expected a question set or the review's sets, not {type(sets).__name__}")
