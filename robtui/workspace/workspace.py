"""Workspace: one review folder opened with its question sets and answering rules."""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

from robtui.core.comparison import AssessmentPair, pair_assessments
from robtui.core.consensus import changed_since
from robtui.core.model import Assessment, Consensus
from robtui.core.questions import QuestionSet
from robtui.core.review_sets import ReviewSets
from robtui.core.rules import RuleBook
from robtui.errors import DataFileError
from robtui.store.question_sets import QUESTION_SETS_DIR, review_question_sets
from robtui.store.review_folder import ReviewFolder
from robtui.store.rules_file import load_folder_rules, load_rules_safely
from robtui.workspace.reviewers import choose_reviewers


class Workspace:
    """A review opened for work: the folder, the question set of each study (``sets``: the
    review's own set files and the bundled ones, chosen by each study's design), the review's
    default set (``qset``) and its answering rules (read on demand)."""

    def __init__(self, folder: ReviewFolder) -> None:
        self.folder = folder
        self.sets: ReviewSets = review_question_sets(folder)
        self.qset: QuestionSet = self.sets.default

    def question_set_for(self, study_id: str) -> QuestionSet:
        """The set a study is assessed with (its design's, else the review's)."""
        return self.sets.of(study_id)

    # -- records checked against their study's set -----------------------------------------------
    def record_problem(self, record: Assessment | Consensus) -> str | None:
        """Why a stored assessment or consensus record cannot be used with its study's set
        (made with another set or version), or None."""
        mismatch = self.sets.set_mismatch(record)
        if mismatch is None:
            return None
        who = f"{record.reviewer}'s assessment" if isinstance(record, Assessment) else "consensus"
        if self.sets.can_carry(record):
            return f"{who} of {record.study_id} / {record.result_id} {mismatch}"
        return (
            f"{who} of {record.study_id} / {record.result_id} {mismatch}: restore that set (a "
            f"review's own sets live in {QUESTION_SETS_DIR}/) or the study's design, or assess "
            "the result again"
        )

    def load_assessment(self, reviewer: str, study_id: str, result_id: str) -> Assessment | None:
        """One stored assessment, checked against its study's set (DataFileError if it does
        not match; the file is left untouched)."""
        found = self.folder.load_assessment(reviewer, study_id, result_id)
        if found is not None:
            self.require_usable(found, self.folder.assessment_path(reviewer, study_id, result_id))
        return found

    def load_consensus(self, study_id: str, result_id: str) -> Consensus | None:
        """The consensus record of a result, checked likewise."""
        found = self.folder.load_consensus(study_id, result_id)
        if found is not None:
            self.require_usable(found, self.folder.consensus_path(study_id, result_id))
        return found

    def assessments(self, reviewer: str | None = None) -> tuple[list[Assessment], list[str]]:
        """Stored assessments (one reviewer's or all) that match their study's set, and the
        problems of the rest (unreadable, or made with another set): reported, never hidden."""
        found, problems = self.folder.assessments(reviewer)
        usable = []
        for a in found:
            problem = self.record_problem(a)
            if problem is None:
                usable.append(a)
            else:
                problems.append(problem)
        return usable, problems

    def require_usable(self, record: Assessment | Consensus, path: Path) -> None:
        problem = self.record_problem(record)
        if problem is not None:
            raise DataFileError(f"{path}: {problem}")

    @classmethod
    def open(cls, root: Path) -> Workspace:
        """Open the review folder at ``root`` (errors say what is wrong and what to do)."""
        return cls(ReviewFolder.open(Path(root)))

    @property
    def review(self):
        return self.folder.review

    @property
    def root(self) -> Path:
        return self.folder.root

    # -- rules ---------------------------------------------------------------------------------
    def rules(self) -> RuleBook:
        """The validated answering rules (DataFileError when they are unusable)."""
        return load_folder_rules(self.folder, self.qset)

    def rules_safely(self) -> tuple[RuleBook | None, str | None]:
        """``(rules, None)``, or ``(None, message)``: rules that fail validation must never
        block opening a review."""
        return load_rules_safely(self.folder, self.qset)

    # -- two reviewers -------------------------------------------------------------------------
    def choose_reviewers(self, named: list[str] | None = None) -> tuple[str, str]:
        """The two reviewers to compare: as named, else the review's two (never the lead)."""
        return choose_reviewers(
            list(self.review.reviewers), self.folder.reviewers_on_disk(), self.review.lead, named
        )

    def pairs(
        self, reviewers: tuple[str, str], study: str | None = None, result: str | None = None
    ) -> tuple[list[AssessmentPair], list[str]]:
        """The two reviewers' assessments paired for every study x result (optionally one
        study or result), plus problems with unreadable files (reported, never hidden).

        Pairs where a side is missing or still a draft are kept with the reason
        (``AssessmentPair.problem``); only complete pairs are compared.
        """
        if study is not None:
            self.folder.study_or_error(study)
        if result is not None:
            self.folder.result_or_error(result)
        expected = [
            (s.id, r.id)
            for s in self.review.studies
            for r in self.review.results
            if (study is None or s.id == study) and (result is None or r.id == result)
        ]
        wanted = set(expected)
        sides, problems = [], []
        for name in reviewers:
            found, trouble = self.assessments(name)
            sides.append([x for x in found if (x.study_id, x.result_id) in wanted])
            problems += trouble
        pairs = pair_assessments(
            sides[0], sides[1], reviewer_a=reviewers[0], reviewer_b=reviewers[1], expected=expected
        )
        # a side with a file that could not be used is "unusable", never "no assessment"
        for i, pair in enumerate(pairs):
            unusable = tuple(
                name
                for name, side in ((pair.reviewer_a, pair.a), (pair.reviewer_b, pair.b))
                if side is None
                and self.folder.assessment_path(name, pair.study_id, pair.result_id).exists()
            )
            if unusable:
                pairs[i] = replace(pair, unusable=unusable)
        return pairs, problems

    def pair_of(self, record: Consensus) -> AssessmentPair:
        """The two reviewers' assessments a consensus record was built from, paired."""
        [pair], problems = self.pairs(tuple(record.reviewers), record.study_id, record.result_id)
        if problems:
            raise DataFileError("; ".join(problems))
        return pair

    def stale_consensus(self, pairs: list[AssessmentPair]) -> dict[tuple[str, str], list[str]]:
        """(study, result) -> what a reviewer changed since the consensus of that pair took
        up their answers ("ben: 1.1 Y -> N"); pairs without a stale consensus are left out."""
        stale = {}
        for p in pairs:
            record = self.folder.load_consensus(p.study_id, p.result_id)
            if record is not None and set(record.reviewers) == {p.reviewer_a, p.reviewer_b}:
                changes = changed_since(record, p, self.question_set_for(p.study_id))
                if changes:
                    stale[p.key] = changes
        return stale
