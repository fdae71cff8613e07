"""What review.toml lists: reviewers, studies (with their reports and design) and results,
each added or changed through ReviewFolder.edit_review. Mixed into ReviewFolder."""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

from robtui.core.model import ReportFile, ResultSpec, Review, Study
from robtui.errors import InputError
from robtui.store.ids import check_id
from robtui.store.records import validated
from robtui.store.report_copies import with_kinds


class ReviewContents:
    """Reviewers, studies and results of a ReviewFolder's review (uses ``review``,
    ``edit_review``, ``reload_review`` and the report copies)."""

    def is_unlisted_reviewer(self, name: str) -> bool:
        """True when the review names its reviewers (or a lead) and ``name`` is not one."""
        known = [*self.review.reviewers, *([self.review.lead] if self.review.lead else [])]
        return bool(known) and name not in known

    def refuse_unlisted_reviewer(self, name: str) -> None:
        """Refuse a name the review does not list: a misspelt one would start new files."""
        if self.is_unlisted_reviewer(name):
            raise InputError(
                f"reviewer {name!r} is not on this review (reviewers: "
                f"{', '.join(self.review.reviewers) or 'none'}): check the spelling, or add "
                "--add-reviewer to list them"
            )

    def add_reviewer(self, name: str) -> None:
        """List a reviewer in review.toml (no change when already listed)."""
        check_id(name, "reviewer")
        if name in self.review.reviewers and not self.reload_review():
            return

        def add(review: Review) -> None:
            if name not in review.reviewers:
                review.reviewers.append(name)

        self.edit_review(add)

    def add_study(
        self,
        study_id: str,
        label: str,
        files: Sequence[Path | tuple[Path, str]],
        design: str | None = None,
    ) -> Study:
        """Add a study, copying its files into reports/<study_id>/ with their sha256; each file
        is a path (a report) or (path, kind).

        ``design`` (a design a question set declares, or a set id) chooses the study's
        question set; it must name a set the review can use, and that set must offer the
        effect of interest of every result already listed.
        """
        check_id(study_id, "study")
        fields = {"id": study_id, "label": label}
        if design is not None:
            from robtui.store.question_sets import review_catalogue

            qset = review_catalogue(self.root).resolve(design)  # InputError lists the choices
            for result in self.review.results:
                try:
                    qset.check_effect(result.effect)
                except InputError as error:
                    raise InputError(f"result {result.id} cannot be assessed in this study: "
                                     f"{error}; choose another design") from None
            fields["design"] = design
        study = validated(Study, fields, f"study {study_id}")

        def add(review: Review) -> None:
            if review.study(study_id) is not None:
                raise InputError(
                    f"study {study_id!r} is already in the review: choose another id, or add "
                    "a report to it with `robtui study report`"
                )
            study.reports = self._copy_reports(study_id, with_kinds(files), existing=[])
            review.studies.append(study)

        self.edit_review(add)
        return self.review.study(study_id)

    def add_report(self, study_id: str, file: Path, kind: str = "report") -> ReportFile:
        """Add one more source document to an existing study."""
        return self.add_reports(study_id, [(file, kind)])[0]

    def add_reports(
        self, study_id: str, files: Sequence[Path | tuple[Path, str]]
    ) -> list[ReportFile]:
        """Add more source documents to an existing study (path, or (path, kind)), under the
        lock on review.toml as it is now."""
        added: list[ReportFile] = []

        def add(review: Review) -> None:
            study = review.study(study_id)
            if study is None:
                self.study_or_error(study_id)  # raises with the list of studies
            added[:] = self._copy_reports(study_id, with_kinds(files), existing=study.reports)
            study.reports.extend(added)

        self.edit_review(add)
        return added

    def add_result(self, spec: ResultSpec) -> None:
        """Add a result to assess (refuses an id already used, and an effect of interest
        the review's question sets do not offer)."""
        check_id(spec.id, "result")
        spec = validated(ResultSpec, spec.model_dump(), f"result {spec.id}")
        self.question_sets().check_effect(spec.effect, self.study_ids())

        def add(review: Review) -> None:
            if review.result(spec.id) is not None:
                raise InputError(
                    f"result {spec.id!r} is already in the review: choose another id"
                )
            unknown = [s for s in spec.weights if review.study(s) is None]
            if unknown:
                raise InputError(
                    f"result {spec.id}: weights name unknown studies ({', '.join(unknown)}): "
                    "add the studies first"
                )
            review.results.append(spec)

        self.edit_review(add)

    def set_result_effect(self, result_id: str, effect: str, by: str) -> None:
        """The lead changes a result's effect of interest (nobody else: every reviewer answers
        the same questions). Assessments follow it when next opened; answers are kept."""
        lead = self.review.lead
        if not lead or by != lead:
            raise InputError(
                f"only the review's lead ({lead or 'none named'}) changes a result's effect of "
                f"interest; {by!r} may not: ask the lead"
            )
        self.result_or_error(result_id)
        self.question_sets().check_effect(effect, self.study_ids())

        def change(review: Review) -> None:
            spec = review.result(result_id)
            if spec is None:
                self.result_or_error(result_id)
            review.results[review.results.index(spec)] = validated(
                ResultSpec, {**spec.model_dump(), "effect": effect}, f"result {result_id}"
            )

        self.edit_review(change)

    def study_ids(self) -> list[str]:
        return [s.id for s in self.review.studies]

    def question_sets(self):
        """Each study's question set (store.question_sets.ReviewSets), read now."""
        from robtui.store.question_sets import review_question_sets

        return review_question_sets(self)

    def study_or_error(self, study_id: str) -> Study:
        study = self.review.study(study_id)
        if study is None:
            known = ", ".join(s.id for s in self.review.studies) or "none yet"
            raise InputError(
                f"no study {study_id!r} in this review (studies: {known}): add it with "
                "`robtui study add`"
            )
        return study

    def result_or_error(self, result_id: str) -> ResultSpec:
        result = self.review.result(result_id)
        if result is None:
            known = ", ".join(r.id for r in self.review.results) or "none yet"
            raise InputError(
                f"no result {result_id!r} in this review (results: {known}): add it with "
                "`robtui result add`"
            )
        return result
