"""The workbench's working state, without any Textual: what the screens show and change.

A ``ReviewSession`` is one reviewer's view of a review folder. Blinding lives here: it only
ever loads this reviewer's own assessment files (``ReviewFolder.load_assessment`` with the
reviewer's name); another reviewer's answers reach the screen only through the lead's
comparison (``ReviewSession.comparison_pairs``), which refuses anyone but the review's lead.

An ``AssessmentSession`` wraps one assessment: every change goes through
robtui.core.assessing, is shown at once and queued to be saved in order
(robtui.tui.save_queue; the workbench writes the queue in a worker thread, so a slow disk never
holds up the keys). ``ReviewFolder.save_assessment`` is atomic and refuses a file another
process changed since it was read; then the file is read again, the same changes are applied
on top of the other process's work and saved, and the screen is told (``on_reloaded``):
neither writer's answers are lost.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from pathlib import Path

from robtui.core import algorithm, assessing
from robtui.core.explaining import DomainExplanation, explain_in_words, override_in_words
from robtui.core.model import Assessment, Consensus, DismissedSuggestion, Quote, ReportFile
from robtui.core.questions import Domain, Question, QuestionSet
from robtui.core.rules import (
    AnsweringRule,
    RuleBook,
    rules_for,
    stale_assessments,
    stamp_rules_version,
)
from robtui.errors import DataFileError, InputError, RobtuiError
from robtui.store.progress import assessment_progress, override_notes
from robtui.store.review_folder import ReviewFolder
from robtui.tui.save_queue import SaveQueue, WriteReport
from robtui.workspace import Workspace, check_reviewer_name

STATUS_NOT_STARTED = "not started"
STATUS_DRAFT = "draft"
STATUS_COMPLETE = "complete"
STATUS_UNREADABLE = "unreadable"
SECOND_LOOK = "rules changed"  # made under an older version of the answering rules
FILE_PROBLEMS = "file problems"  # a report missing or changed, or an unreadable assessment
STATUS_FILTERS: tuple[str, ...] = (
    "all",
    STATUS_NOT_STARTED,
    STATUS_DRAFT,
    STATUS_COMPLETE,
    FILE_PROBLEMS,
    SECOND_LOOK,
)


@dataclass(frozen=True)
class ResultRow:
    """One line of the overview: a study's result and this reviewer's work on it."""

    study_id: str
    study_label: str
    result_id: str
    result_label: str
    status: str
    effect: str
    final: Mapping[str, str]
    answered: int
    asked: int
    problems: tuple[str, ...] = ()
    second_look: str | None = None  # why: made under an older answering-rules version
    overridden: tuple[str, ...] = ()  # domain ids / "overall" the reviewer overrode
    override_words: tuple[str, ...] = ()  # each override: which, the proposal, why

    @property
    def key(self) -> str:
        return f"{self.study_id}--{self.result_id}"


class ReviewSession:
    """One reviewer's session on a review folder."""

    def __init__(self, folder: ReviewFolder | Workspace, reviewer: str) -> None:
        self.workspace = folder if isinstance(folder, Workspace) else Workspace(folder)
        self.folder = self.workspace.folder
        self.reviewer = check_reviewer_name(reviewer)
        self.qset: QuestionSet = self.workspace.qset  # the review's default set
        # Read once: the rules shown are the ones every save of this session is stamped with.
        self.rules: RuleBook | None
        self.rules_unavailable: str | None
        self.rules, self.rules_unavailable = self.workspace.rules_safely()

    def qset_for(self, study_id: str) -> QuestionSet:
        """The question set a study is assessed with (chosen by its design)."""
        return self.workspace.question_set_for(study_id)

    @property
    def sets(self):
        """Every study's question set (robtui.core.review_sets.ReviewSets)."""
        return self.workspace.sets

    @property
    def review(self):
        return self.folder.review

    @property
    def is_lead(self) -> bool:
        return bool(self.review.lead) and self.review.lead == self.reviewer

    def report_problems(self, study_id: str) -> list[str]:
        """Problems with a study's report files (missing, changed), as sentences."""
        study = self.review.study(study_id)
        if study is None:
            return [f"study {study_id} is not in review.toml"]
        problems = []
        if not study.reports:
            problems.append("no report file recorded for this study")
        for report in study.reports:
            problem = self.folder.check_report(report)
            if problem:
                problems.append(problem)
        return problems

    def rows(self) -> list[ResultRow]:
        """Every study × result with this reviewer's progress (never another reviewer's)."""
        rows = []
        for study in self.review.studies:
            report_problems = tuple(self.report_problems(study.id))
            for result in self.review.results:
                rows.append(self._row(study, result, report_problems))
        return rows

    def _row(self, study, result, report_problems: tuple[str, ...]) -> ResultRow:
        label = result.outcome + (f" ({result.time_point})" if result.time_point else "")
        status, effect, final, answered, asked = STATUS_NOT_STARTED, result.effect, {}, 0, 0
        problems = report_problems
        try:
            assessment = self.workspace.load_assessment(self.reviewer, study.id, result.id)
        except RobtuiError as error:
            assessment = None
            status, problems = STATUS_UNREADABLE, (str(error), *report_problems)
        second_look = None
        overridden: tuple[str, ...] = ()
        override_words: tuple[str, ...] = ()
        if assessment is not None:
            status, effect, final = assessment.status, assessment.effect, dict(assessment.final)
            overridden = tuple(assessment.overrides)
            notes = override_notes(assessment, self.qset_for(study.id))
            override_words = tuple(
                override_in_words(o.label, o.proposed, o.judgement, o.reason) for o in notes
            )
            answered, asked = assessment_progress(assessment, self.qset_for(study.id))
            second_look = self.second_look(assessment)
        return ResultRow(
            study_id=study.id,
            study_label=study.label,
            result_id=result.id,
            result_label=label,
            status=status,
            effect=effect,
            final=final,
            answered=answered,
            asked=asked,
            problems=problems,
            second_look=second_look,
            overridden=overridden,
            override_words=override_words,
        )

    def second_look(self, assessment: Assessment) -> str | None:
        """Why the assessment deserves a second look (made under older rules), or None."""
        if self.rules is None:
            return None
        results = {r.id: r for r in self.review.results}
        stale = stale_assessments([assessment], self.rules, results)
        if not stale:
            return None
        made = stale[0].made_under
        since = "rules version not recorded" if made is None else f"made under rules v{made}"
        new = ", ".join(f"{r.id} ({r.question_id})" for r in stale[0].new_rules)
        gone = ", ".join(f"{r.id} ({r.question_id})" for r in stale[0].retired_rules)
        text = f"{since}, now v{self.rules.version}; new rules: {new or 'none that apply'}"
        return text + (f"; withdrawn: {gone}" if gone else "")

    @property
    def learned_dir(self) -> Path:
        """This reviewer's own learned ranker: it learns from nobody else's quotes (blinding)."""
        return self.folder.learned_dir_for(self.reviewer)

    def load(self, study_id: str, result_id: str) -> AssessmentSession | None:
        """This reviewer's assessment of the result, or None when not started.

        Raises DataFileError when the file is unreadable (it is left untouched).
        """
        assessment = self.workspace.load_assessment(self.reviewer, study_id, result_id)
        if assessment is None:
            return None
        return AssessmentSession(self, assessment)

    def start(self, study_id: str, result_id: str) -> AssessmentSession:
        """Begin a new assessment, with the result's effect of interest, and save it."""
        if self.folder.load_assessment(self.reviewer, study_id, result_id) is not None:
            raise InputError(f"{self.reviewer} has already started {study_id} / {result_id}")
        qset = self.qset_for(study_id)
        assessment = assessing.new_assessment(self.review, study_id, result_id, self.reviewer, qset)
        session = AssessmentSession(self, assessment)
        session.save()
        return session

    def comparison_pairs(self, reviewer_a: str, reviewer_b: str):
        """Both reviewers' assessments paired per study × result: the lead's view only.

        Pairs where a side is missing or still a draft are kept, with the reason
        (``AssessmentPair.problem``); only complete pairs are compared.
        """
        self.require_lead()
        return self.workspace.pairs((reviewer_a, reviewer_b))

    def require_lead(self) -> None:
        if not self.is_lead:
            raise InputError(
                f"only the review's lead ({self.review.lead or 'none named'}) may compare "
                "reviewers' assessments; open the review as the lead"
            )

    def load_consensus(self, study_id: str, result_id: str) -> Consensus | None:
        """The lead's consensus record of a result (None when not started; lead only).

        Raises DataFileError when the file is unreadable (it is left untouched).
        """
        self.require_lead()
        return self.workspace.load_consensus(study_id, result_id)

    def save_consensus(self, consensus: Consensus) -> Path:
        """Write a consensus record (atomic), apart from both reviewers' files; lead only."""
        self.require_lead()
        return self.folder.save_consensus(consensus)

    def change_consensus(self, shown: Consensus, change) -> Consensus:
        """Apply one of the lead's changes (robtui.workspace.consensus_changes) to the stored
        record of ``shown``'s result under the review's lock; ``shown`` is where it starts
        when nothing is stored yet. Lead only; the saved record is returned."""
        from robtui.workspace.consensus_changes import change_consensus

        self.require_lead()
        return change_consensus(
            self.workspace, shown.study_id, shown.result_id, change, unsaved=shown
        )

    def comparable_reviewers(self) -> list[str]:
        """Reviewers who could be compared: named in the review or with files on disk."""
        names = [n for n in self.review.reviewers if n != self.review.lead]
        names += [n for n in self.folder.reviewers_on_disk() if n not in names]
        return names


@dataclass
class AssessmentSession:
    """One assessment being worked on; every change is saved at once."""

    review_session: ReviewSession
    assessment: Assessment
    unsaved_error: str | None = field(default=None)  # why the last write failed
    # Called with a sentence when the file had changed on disk and was read again.
    on_reloaded: Callable[[str], None] | None = None
    # Set by a front end that writes the queue off its interface thread: starts a writer
    # (a worker calling ``saves.write``); None: each change is written at once, here.
    start_writer: Callable[[], None] | None = None
    _saves: SaveQueue = field(init=False, repr=False)

    def __post_init__(self) -> None:
        self._saves = SaveQueue(self.folder, self.assessment)  # as read from disk

    @property
    def folder(self) -> ReviewFolder:
        return self.review_session.folder

    @property
    def qset(self) -> QuestionSet:
        return self.review_session.qset_for(self.assessment.study_id)

    @property
    def study(self):
        return self.review_session.review.study(self.assessment.study_id)

    @property
    def result(self):
        return self.review_session.review.result(self.assessment.result_id)

    @property
    def effect(self) -> str:
        return self.assessment.effect

    @property
    def is_complete(self) -> bool:
        return self.assessment.status == "complete"

    # -- reading the state -------------------------------------------------------------
    def domain_ids(self) -> list[str]:
        return self.qset.domain_ids()

    def domain(self, domain_id: str) -> Domain:
        return self.qset.domain(domain_id, self.effect)

    def domain_of(self, question_id: str) -> str:
        return self.question(question_id).domain

    def question(self, question_id: str) -> Question:
        return self.qset.question(question_id, self.effect)

    def asked(self, domain_id: str) -> list[Question]:
        answers = assessing.effective_answers(self.assessment, self.qset, domain_id)
        return algorithm.asked_questions(self.domain(domain_id), answers)

    def response(self, question_id: str) -> str | None:
        answer = self.assessment.answers.get(question_id)
        return answer.response if answer else None

    def answer(self, question_id: str):
        return self.assessment.answers.get(question_id)

    def proposed(self, key: str) -> str:
        return self.assessment.proposed.get(key, "incomplete")

    def final(self, key: str) -> str:
        return self.assessment.final.get(key, self.proposed(key))

    def override(self, key: str):
        return self.assessment.overrides.get(key)

    def may_raise_overall(self) -> bool:
        judgements = [self.final(d) for d in self.domain_ids()]
        return algorithm.may_raise_overall(judgements)

    def explanation(self, domain_id: str) -> DomainExplanation:
        """The domain's proposal in words, with the questions still to answer."""
        answers = assessing.effective_answers(self.assessment, self.qset, domain_id)
        return explain_in_words(self.domain(domain_id), answers)

    def shown_judgement(self, domain_id: str) -> str:
        """What the domain stands at: the final judgement, or the proposal its answers
        already decide before every question is answered."""
        final = self.final(domain_id)
        if final != algorithm.INCOMPLETE:
            return final
        return self.explanation(domain_id).determined or final

    def completion_problems(self) -> list[str]:
        return assessing.completion_problems(self.assessment, self.qset)

    def reports(self) -> list[tuple[ReportFile, str | None]]:
        """The study's report files with their problem (None when the file is sound)."""
        study = self.study
        if study is None:
            return []
        return [(report, self.folder.check_report(report)) for report in study.reports]

    def answering_rules(self, question_id: str) -> list[AnsweringRule]:
        """The review's rules in force for the question that apply to this result."""
        result = self.result
        if result is None:
            return []
        return rules_for(self.review_session.rules, question_id, result, self.effect)

    def is_dismissed(self, question_id: str, sha256: str, start: int, end: int) -> bool:
        return any(
            d.question_id == question_id
            and d.document_sha256 == sha256
            and d.start == start
            and d.end == end
            for d in self.assessment.dismissed
        )

    # -- changing it (each saves) ------------------------------------------------------
    @property
    def saves(self) -> SaveQueue:
        """This assessment's changes not yet on disk (robtui.tui.save_queue)."""
        return self._saves

    def save(self) -> Path:
        """Write the assessment as it is now (a new one: ``ReviewSession.start``)."""
        self.assessment = stamp_rules_version(self.assessment, self.review_session.rules)
        try:
            path = self.folder.save_assessment(self.assessment)
        except (RobtuiError, OSError) as error:
            raise DataFileError(f"could not save the assessment: {error}") from error
        self._saves = SaveQueue(self.folder, self.assessment)
        return path

    def _commit(self, change: Callable[[Assessment], Assessment], *, stamp: bool = True) -> None:
        """Apply ``change`` to what the screen shows (an InputError leaves everything as it
        was) and queue it to be saved. The rules version the session read is recorded with
        every change (``stamp``); a move of the reviewer's position alone keeps the version
        the answers were made under.

        With ``start_writer`` set, the front end writes the queue off its interface thread
        and hands each report to ``settle``; without, it is written now, here (and a failed
        or reloaded write raises or calls ``on_reloaded`` as ``settle`` says)."""
        rules = self.review_session.rules

        def step(a: Assessment) -> Assessment:
            return stamp_rules_version(change(a), rules) if stamp else change(a)

        self.assessment = step(self.assessment)
        if not self.saves.add(step):
            return  # the writer under way takes it in its next write
        if self.start_writer is not None:
            self.start_writer()
            return
        for report in self.saves.write():
            self.settle(report, raise_error=True)

    def settle(self, report: WriteReport, *, raise_error: bool = False) -> None:
        """Take a write's report (on the interface's thread): what is shown is built again
        when another process's work was read, the panel's 'not saved' line follows the
        write, and ``on_reloaded`` says what the other process changed."""
        self.unsaved_error = report.error
        if report.changed_view:
            self.assessment = self.saves.view()
        if report.reloaded and self.on_reloaded:
            self.on_reloaded(report.reloaded)
        if raise_error and report.error:
            raise DataFileError(report.error)
        if raise_error and report.refused:
            raise InputError("; ".join(report.refused))

    def _editable(self) -> None:
        if self.is_complete:
            raise InputError("this assessment is marked complete: reopen it (c) to change it")

    def set_response(self, question_id: str, response: str | None) -> None:
        self._editable()
        question = self.question(question_id)
        if response == "NA" and not question.if_applicable:
            raise InputError(
                f"NA is only for questions asked 'if applicable'; {question_id} is not"
            )
        if response is not None and response not in question.options:
            allowed = ", ".join(question.options)
            raise InputError(f"{response} is not an option for {question_id} (choose {allowed})")
        self._commit(
            lambda a: assessing.set_response(_at(a, question_id), self.qset, question_id, response)
        )

    def set_justification(self, question_id: str, text: str) -> None:
        self._editable()
        answer = self.answer(question_id)
        if (answer.justification if answer else "") == text:
            return
        self._commit(
            lambda a: assessing.set_justification(_at(a, question_id), self.qset, question_id, text)
        )

    def toggle_quote(self, question_id: str, quote: Quote) -> bool:
        """Attach ``quote`` to the question, or detach it when already there; True if added."""
        self._editable()
        added: list[bool] = []

        def toggle(a: Assessment) -> Assessment:
            added.clear()
            answer = a.answers.get(question_id)
            for index, existing in enumerate(answer.quotes if answer else []):
                if (existing.document_sha256, existing.start, existing.end) == (
                    quote.document_sha256,
                    quote.start,
                    quote.end,
                ):
                    added.append(False)
                    return assessing.remove_quote(_at(a, question_id), self.qset, question_id, index)
            added.append(True)
            return assessing.add_quote(_at(a, question_id), self.qset, question_id, quote)

        self._commit(toggle)
        return added[-1]

    def dismiss(self, question_id: str, sha256: str, start: int, end: int) -> None:
        """Record that a suggested sentence does not answer the question."""
        self._editable()
        if self.is_dismissed(question_id, sha256, start, end):
            return
        record = DismissedSuggestion(
            question_id=question_id, document_sha256=sha256, start=start, end=end
        )

        def dismiss(a: Assessment) -> Assessment:
            if record in a.dismissed:
                return a
            return _at(a, question_id).model_copy(update={"dismissed": [*a.dismissed, record]})

        self._commit(dismiss)

    @property
    def effect_differs(self) -> str | None:
        """The result's effect when this assessment was made for another one (an older file,
        or the lead changed the result since), else None."""
        result = self.result
        if result is None or result.effect == self.effect:
            return None
        return result.effect

    def follow_result_effect(self) -> bool:
        """Switch a draft to the result's effect of interest (answers to the other variant
        are kept); True when it changed. A complete assessment follows when reopened."""
        wanted = self.effect_differs
        if wanted is None or self.is_complete:
            return False
        self._commit(lambda a: assessing.set_effect(a, self.qset, wanted))
        return True

    def set_override(self, key: str, judgement: str, reason: str) -> None:
        self._editable()
        if not reason.strip():
            raise InputError("an override needs a reason: say why the judgement differs")
        self._commit(lambda a: assessing.set_override(a, self.qset, key, judgement, reason))

    def set_support_and_direction(
        self, key: str, support: str | None, direction: str | None
    ) -> None:
        """The RoB 2 form's support of a domain judgement (None: leave it) and the optional
        predicted direction of bias of a domain or the overall."""
        self._editable()

        def change(a: Assessment) -> Assessment:
            if support is not None:
                a = assessing.set_support(a, self.qset, key, support)
            return assessing.set_direction(a, self.qset, key, direction)

        if change(self.assessment) is not self.assessment:
            self._commit(change)

    def clear_override(self, key: str) -> None:
        self._editable()
        if key in self.assessment.overrides:
            self._commit(lambda a: assessing.clear_override(a, self.qset, key))

    def remember_position(self, question_id: str) -> None:
        """Record where the reviewer is, so reopening resumes there (saved)."""
        if self.assessment.last_question == question_id:
            return
        self._commit(lambda a: _at(a, question_id), stamp=False)

    def mark_complete(self) -> None:
        """Mark complete; InputError listing what is missing when it cannot be."""
        self._commit(lambda a: assessing.mark_complete(a, self.qset))

    def reopen(self) -> None:
        self._commit(assessing.reopen)
        self.follow_result_effect()


def _at(a: Assessment, question_id: str) -> Assessment:
    """``a`` with the reviewer's position at ``question_id``."""
    if a.last_question == question_id:
        return a
    return a.model_copy(update={"last_question": question_id})
