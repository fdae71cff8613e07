"""Workspace: one review folder opened with its question set and answering rules."""

from __future__ import annotations

from pathlib import Path

from robtui.core.comparison import AssessmentPair, pair_assessments
from robtui.core.consensus import changed_since
from robtui.core.questions import QuestionSet
from robtui.core.rules import RuleBook
from robtui.store.question_sets import review_question_set
from robtui.store.review_folder import ReviewFolder
from robtui.store.rules_file import load_folder_rules, load_rules_safely
from robtui.workspace.reviewers import choose_reviewers


class Workspace:
    """A review opened for work: the folder, its question set, its rules (read on demand)."""

    def __init__(self, folder: ReviewFolder) -> None:
        self.folder = folder
        self.qset: QuestionSet = review_question_set(folder)

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
            found, trouble = self.folder.assessments(name)
            sides.append([x for x in found if (x.study_id, x.result_id) in wanted])
            problems += trouble
        pairs = pair_assessments(
            sides[0], sides[1], reviewer_a=reviewers[0], reviewer_b=reviewers[1], expected=expected
        )
        return pairs, problems

    def stale_consensus(self, pairs: list[AssessmentPair]) -> dict[tuple[str, str], list[str]]:
        """(study, result) -> what a reviewer changed since the consensus of that pair took
        up their answers ("ben: 1.1 Y -> N"); pairs without a stale consensus are left out."""
        stale = {}
        for p in pairs:
            record = self.folder.load_consensus(p.study_id, p.result_id)
            if record is not None and set(record.reviewers) == {p.reviewer_a, p.reviewer_b}:
                changes = changed_since(record, p, self.qset)
                if changes:
                    stale[p.key] = changes
        return stale
