"""The bundled demo review, built through the store API from sample_reports/.

sample_reports/demo/demo_review.toml describes the review: title, lead, reviewers, studies
(which sample report files), results to assess, and the answers of both reviewers. Answers
are layered so the file stays short: each ``[[assessment]]`` block gives answers for one
study (and the results it names, default all), ``[assessment.reviewer.NAME]`` changes
answers for one reviewer only (where the two reviewers disagree; ``code = ""`` takes a
shared answer away), and
``[[assessment.override]]`` records a reviewer's override with its reason. Quotes are given
as text; their offsets are found by searching the report. Proposed judgements are always
computed by the algorithm.

``[[consensus]]`` blocks give the lead's consensus for one study and result: each entry of
``[consensus.settle]`` settles one question by taking a reviewer's answer (``take = NAME``)
or giving a new one (``answer = CODE``), always with a ``note``; ``status = "complete"``
marks the record complete (refused while a question is still open), ``"draft"`` leaves the
rest for the lead. Records are made with the comparison module's consensus functions from
the two reviewers' saved assessments, so their judgements too come from the algorithm.
"""

from __future__ import annotations

import os
import shutil
import tempfile
import tomllib
from collections.abc import Mapping
from pathlib import Path

from robtui.core import assessing
from robtui.core.comparison import differences, pair_assessments
from robtui.core.consensus import complete_consensus, pending_questions, settle, start_consensus
from robtui.core.model import ResultSpec
from robtui.core.questions import QuestionSet
from robtui.core.review_sets import ReviewSets
from robtui.errors import DataFileError, InputError, RobtuiError
from robtui.paths import bundled_dir
from robtui.store.question_sets import review_question_sets
from robtui.store.quotes import find_quote
from robtui.store.review_folder import ReviewFolder

DEMO_FILE = Path("demo") / "demo_review.toml"
DEMO_SCHEMA = 1
_TOP_KEYS = {
    "schema_version", "title", "lead", "reviewers", "assessed_at", "settled_at", "study", "result",
    "assessment", "consensus",
}  # fmt: skip
# [[study]] keys naming further files of a study, and the kind each is added as.
_MORE_FILES = {"protocols": "protocol", "registry_records": "registry"}
_STUDY_KEYS = {"id", "label", "files", "design", *_MORE_FILES}
_BLOCK_KEYS = {"study", "results", "answers", "reviewer", "override"}
_ANSWER_KEYS = {"code", "why", "quote", "quotes"}
# Quotes from the PDF when the passage is found there (they then carry a page number).
QUOTE_ORDER = (".pdf", ".txt")
_OVERRIDE_KEYS = {"reviewer", "key", "judgement", "reason"}
_CONSENSUS_KEYS = {"study", "result", "status", "settle"}
_SETTLE_KEYS = {"take", "answer", "note"}
CONSENSUS_STATUSES = ("draft", "complete")


def demo_source_dir() -> Path:
    """The bundled sample_reports folder (holds demo/demo_review.toml and the reports)."""
    return bundled_dir("sample_reports")


def build_demo_review(dest: Path, *, source: Path | None = None) -> ReviewFolder:
    """Build the demo review in ``dest`` (new or empty folder) and return it."""
    source = Path(source) if source is not None else demo_source_dir()
    dest = Path(dest)
    if dest.exists() and (not dest.is_dir() or any(dest.iterdir())):
        raise InputError(f"{dest} is not empty: give a new or empty folder for the demo")
    spec_path = source / DEMO_FILE
    data = _read_spec(spec_path)
    # Built beside the destination and moved in whole, so a failure leaves nothing half-made.
    dest.parent.mkdir(parents=True, exist_ok=True)
    work = Path(tempfile.mkdtemp(prefix=f".{dest.name}.", dir=dest.parent))
    try:
        _build(work / "review", source, data, spec_path)
        if dest.exists():
            dest.rmdir()  # empty, checked above
        os.replace(work / "review", dest)
    except RobtuiError as error:
        if isinstance(error, DataFileError):
            raise
        raise DataFileError(f"{spec_path}: {error}") from None
    finally:
        shutil.rmtree(work, ignore_errors=True)
    return ReviewFolder.open(dest)


def _read_spec(path: Path) -> dict:
    try:
        data = tomllib.loads(path.read_text(encoding="utf-8"))
    except FileNotFoundError:
        raise DataFileError(
            f"demo description not found: {path}: reinstall robtui (the demo is bundled)"
        ) from None
    except (tomllib.TOMLDecodeError, UnicodeDecodeError) as error:
        raise DataFileError(f"{path}: not valid TOML ({error})") from None
    _keys(data, _TOP_KEYS, path, "top level")
    if data.get("schema_version") != DEMO_SCHEMA:
        raise DataFileError(f"{path}: schema_version must be {DEMO_SCHEMA}")
    return data


def _keys(table: Mapping, allowed: set[str], path: Path, entry: str) -> None:
    unknown = sorted(set(table) - allowed)
    if unknown:
        raise DataFileError(f"{path}: {entry}: unknown key {unknown[0]!r}")


def _build(dest: Path, source: Path, data: dict, path: Path) -> None:
    folder = ReviewFolder.create(
        dest, data["title"], lead=data.get("lead"), reviewers=data.get("reviewers", [])
    )
    for study in data.get("study", []):
        _keys(study, _STUDY_KEYS, path, f"study {study.get('id')}")
        files = [source / name for name in study.get("files", [])]
        folder.add_study(study["id"], study["label"], files, design=study.get("design"))
        for key, kind in _MORE_FILES.items():  # protocols and registry records
            for name in study.get(key, []):
                folder.add_report(study["id"], source / name, kind=kind)
    for result in data.get("result", []):
        folder.add_result(ResultSpec.model_validate(result))
    sets = review_question_sets(folder)  # each study's set, chosen by its design
    for reviewer in folder.review.reviewers:
        for study in folder.review.studies:
            for result in folder.review.results:
                layers = _layers(data.get("assessment", []), study.id, result.id, reviewer, path)
                a = _assess(folder, sets.of(study.id), reviewer, study.id, result.id, layers)
                if "assessed_at" in data:  # fixed times: the same demo every time it is built
                    a = a.model_copy(
                        update={"created": data["assessed_at"], "updated": data["assessed_at"]}
                    )
                folder.save_assessment(a)
    for index, block in enumerate(data.get("consensus", []), start=1):
        record = _consensus(folder, sets, block, path, f"consensus {index}")
        if "settled_at" in data:  # fixed, like the assessments' times
            record = record.model_copy(update={"updated": data["settled_at"]})
        folder.save_consensus(record)


def _layers(blocks: list, study_id: str, result_id: str, reviewer: str, path: Path):
    """Answers and overrides for one reviewer's assessment, later blocks winning."""
    answers: dict[str, dict] = {}
    overrides: list[dict] = []
    for index, block in enumerate(blocks, start=1):
        entry = f"assessment {index} ({block.get('study')})"
        _keys(block, _BLOCK_KEYS, path, entry)
        if block.get("study") != study_id:
            continue
        if result_id not in block.get("results", [result_id]):
            continue
        answers.update(block.get("answers", {}))
        answers.update(block.get("reviewer", {}).get(reviewer, {}))
        overrides += [o for o in block.get("override", []) if o.get("reviewer") == reviewer]
    for qid, answer in answers.items():
        _keys(answer, _ANSWER_KEYS, path, f"study {study_id}, answer {qid}")
        if "code" not in answer:
            raise DataFileError(f"{path}: study {study_id}, answer {qid}: no code given")
    for o in overrides:
        _keys(o, _OVERRIDE_KEYS, path, f"study {study_id}, override")
    # code = "" in a reviewer's layer takes a shared answer away (a question that reviewer's
    # path does not ask).
    return {q: a for q, a in answers.items() if a["code"]}, overrides


def _assess(folder, qset: QuestionSet, reviewer, study_id, result_id, layers):
    answers, overrides = layers
    where = f"{reviewer}, {study_id} / {result_id}"
    a = assessing.new_assessment(folder.review, study_id, result_id, reviewer, qset)
    order = {q.id: i for i, q in enumerate(qset.questions(a.effect))}
    unknown = [qid for qid in answers if qid not in order]
    if unknown:
        raise InputError(f"{where}: unknown question {unknown[0]}")
    try:
        for qid in sorted(answers, key=order.__getitem__):
            answer = answers[qid]
            a = assessing.set_response(a, qset, qid, answer["code"])
            a = assessing.set_justification(a, qset, qid, answer.get("why", ""))
            texts = answer.get("quotes", []) + ([answer["quote"]] if "quote" in answer else [])
            for text in texts:
                quote = find_quote(folder, study_id, text, prefer=QUOTE_ORDER)
                a = assessing.add_quote(a, qset, qid, quote)
        for o in overrides:
            a = assessing.set_override(a, qset, o["key"], o["judgement"], o["reason"])
        a = assessing.mark_complete(a, qset)
    except InputError as error:
        raise InputError(f"{where}: {error}") from None
    return a.model_copy(update={"last_question": None})


def _consensus(folder: ReviewFolder, sets: ReviewSets, block: Mapping, path: Path, entry: str):
    """The lead's consensus record for one ``[[consensus]]`` block, settled question by question
    through the comparison module (in question order) from both reviewers' saved assessments."""
    _keys(block, _CONSENSUS_KEYS, path, entry)
    study_id, result_id = str(block.get("study", "")), str(block.get("result", ""))
    qset = sets.of(study_id)
    try:
        pair = _saved_pair(folder, study_id, result_id)
        status = block.get("status", "draft")
        if status not in CONSENSUS_STATUSES:
            raise InputError(f"status must be one of {', '.join(CONSENSUS_STATUSES)}")
        record = start_consensus(pair, folder.review.lead, qset)
        disputed = {q.question_id for q in differences(pair, qset) if q.differs}
        entries = block.get("settle", {})
        order = {q.id: i for i, q in enumerate(qset.questions(record.effect))}
        unknown = sorted(set(entries) - set(order))
        if unknown:
            raise InputError(f"unknown question {unknown[0]}")
        for qid in sorted(entries, key=order.__getitem__):
            _keys(entries[qid], _SETTLE_KEYS, path, f"{entry}, settle {qid}")
            record = _settle_one(record, qset, pair, qid, entries[qid], disputed)
        if status == "complete":
            record = complete_consensus(record, qset)
    except InputError as error:
        raise InputError(f"{entry} ({study_id} / {result_id}): {error}") from None
    return record


def _saved_pair(folder: ReviewFolder, study_id: str, result_id: str):
    """The two reviewers' (other than the lead) saved assessments of one study and result."""
    lead = folder.review.lead
    if not lead:
        raise InputError("a consensus needs the review's lead: add lead = NAME")
    folder.study_or_error(study_id)
    folder.result_or_error(result_id)
    names = [r for r in folder.review.reviewers if r != lead]
    if len(names) != 2:
        raise InputError("a consensus needs exactly two reviewers besides the lead")
    found = [folder.load_assessment(name, study_id, result_id) for name in names]
    [pair] = pair_assessments(
        [found[0]] if found[0] else [],
        [found[1]] if found[1] else [],
        reviewer_a=names[0],
        reviewer_b=names[1],
        expected=[(study_id, result_id)],
    )
    return pair


def _settle_one(record, qset, pair, qid: str, entry: Mapping, disputed: set[str]):
    """Settle one question as the demo description says (take a reviewer, or a new answer)."""
    if qid not in disputed and qid not in pending_questions(record, qset):
        raise InputError(f"{qid}: both reviewers gave the same answer: nothing to settle")
    if ("take" in entry) == ("answer" in entry):
        raise InputError(f"{qid}: give either take = REVIEWER or answer = CODE")
    note = entry.get("note", "")
    if "answer" in entry:
        return settle(record, qset, qid, "new", entry["answer"], note)
    sides = {pair.reviewer_a: "a", pair.reviewer_b: "b"}
    if entry["take"] not in sides:
        raise InputError(
            f"{qid}: take = {entry['take']!r}: use {pair.reviewer_a} or {pair.reviewer_b}"
        )
    return settle(record, qset, qid, sides[entry["take"]], note=note, pair=pair)
