"""The pre-specification panel's data for one study and result: the study's registry records,
protocol and report read, their outcomes found, and core/prespecification.py's comparison.

Outcomes are found in a protocol or report in the sentences that declare them ("The primary
outcome was/will be ...", "Secondary outcomes were A, B and C", "A, B and C were secondary
outcomes"), preferring the methods over the abstract; a list of secondary outcomes is split at
commas and "and". This is our heuristic (no source) and the reason the panel shows every
sentence it used: the reviewer checks it by reading.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import date
from pathlib import Path

from robtui.core.prespecification import (
    MATCH_SCORE,
    Passage,
    PlannedOutcome,
    Prespecification,
    Registration,
    ReportedOutcome,
    compare,
    durations,
    similarity,
)
from robtui.errors import RobtuiError

_KIND_WORDS = (("primary", ("primary outcome", "primary end point", "primary endpoint")),
               ("secondary", ("secondary outcome", "secondary end point", "secondary endpoint")))
_VERBS = (" was ", " is ", " will be ", " were ", " are ", " included ", " include ",
          " will include ")
_MEASURE_TAILS = ("measured", "recorded", "assessed", "collected", "completed", "taken",
                  "made", "reported", "rated", "derived")
def is_registry_file(kind: str, path: Path) -> bool:
    """A registry record: added as one (kind naming a registry), or a JSON / XML file."""
    return "registry" in kind or path.suffix.lower() in (".json", ".xml")


def is_plan_file(kind: str) -> bool:
    """A protocol or statistical analysis plan: its declared outcomes were planned."""
    return "protocol" in kind or "plan" in kind


@dataclass
class StudySources:
    """What was read for a study: the passages' documents and any problem met."""

    registry_records: list = field(default_factory=list)  # RegistryRecord, oldest first
    planned: list[PlannedOutcome] = field(default_factory=list)
    reported: list[ReportedOutcome] = field(default_factory=list)
    registration: Registration | None = None
    notes: list[str] = field(default_factory=list)
    files: dict[str, str] = field(default_factory=dict)  # sha256 -> report path (for quotes)


def _after(text: str, start: int) -> str:
    return text[start:].strip(" .;:")


def declared_outcomes(sentence: str) -> list[tuple[str, str]]:
    """(kind, measure) pairs a sentence declares; [] when it declares none."""
    lowered = sentence.lower()
    out: list[tuple[str, str]] = []
    for kind, phrases in _KIND_WORDS:
        for phrase in phrases:
            at = lowered.find(phrase)
            if at < 0:
                continue
            rest = lowered[at + len(phrase):]
            rest_start = at + len(phrase)
            if rest.startswith("s"):
                rest, rest_start = rest[1:], rest_start + 1
            if rest.startswith(" measures"):
                rest, rest_start = rest[9:], rest_start + 9
            elif rest.startswith(" measure"):
                rest, rest_start = rest[8:], rest_start + 8
            verb = next((v for v in _VERBS if rest.startswith(v)), None)
            if verb is not None or rest.startswith(":"):
                body = _after(sentence, rest_start + (len(verb) if verb else 1))
            elif lowered[:at].rstrip().endswith(("were", "were the", "were all", "are")):
                body = sentence[:at].rstrip()
                for word in ("were the", "were all", "were", "are"):
                    if body.lower().endswith(word):
                        body = body[: -len(word)].strip(" ,;")
                        break
            else:
                continue
            items = [body] if kind == "primary" else _split_list(body)
            out += [(kind, _tidy(item)) for item in items if _tidy(item)]
            break
    return out


def _split_list(body: str) -> list[str]:
    """Items of "A, B, and C": split at commas and ' and '; a trailing "recorded by ..." part
    stays with its item."""
    parts: list[str] = []
    for chunk in body.replace(", and ", ", ").replace(" and ", ", ").split(","):
        chunk = chunk.strip()
        if not chunk:
            continue
        if parts and chunk.lower().startswith(_MEASURE_TAILS):
            parts[-1] = f"{parts[-1]}, {chunk}"
        else:
            parts.append(chunk)
    return parts


def _tidy(item: str) -> str:
    item = item.strip(" .;:")
    for lead in ("the ", "a ", "an "):
        if item.lower().startswith(lead):
            item = item[len(lead):]
    return item


def _passage(source: str, document, sentence) -> Passage:
    return Passage(source, document.sha256, sentence.start, sentence.end, sentence.text,
                   sentence.page)


def outcomes_in_document(document, source: str) -> list[tuple[str, str, Passage]]:
    """(kind, measure, passage) of every outcome the document declares; methods first, the
    abstract only when the methods declare none."""
    found: dict[str, list[tuple[str, str, Passage]]] = {"methods": [], "other": []}
    for sentence in document.sentences:
        if sentence.block != "body":
            continue
        pairs = declared_outcomes(sentence.text)
        if not pairs:
            continue
        where = "methods" if sentence.section.startswith("methods") else "other"
        found[where] += [(k, m, _passage(source, document, sentence)) for k, m in pairs]
    chosen = found["methods"] or found["other"]
    unique: list[tuple[str, str, Passage]] = []
    for kind, measure, passage in chosen:
        if not any(k == kind and similarity(measure, m) >= MATCH_SCORE for k, m, _ in unique):
            unique.append((kind, measure, passage))
    return unique


def _registry_passages(record, document) -> dict[int, Passage]:
    """The rendered line of each outcome of ``record`` in its document, by outcome index."""
    out = {}
    counters: dict[str, int] = {}
    version = f" ({record.last_update})" if record.last_update else ""
    for index, outcome in enumerate(record.outcomes):
        counters[outcome.kind] = counters.get(outcome.kind, 0) + 1
        line = outcome.line(counters[outcome.kind])
        start = document.text.find(line)
        if start < 0:
            continue
        out[index] = Passage(f"registry {record.registration_number}{version}", document.sha256,
                             start,
                             start + len(line), line)
    return out


def read_study_sources(folder, study) -> StudySources:
    """Read the study's registry records, protocols and reports (the document cache makes a
    prepared study quick); a file that cannot be read becomes a note."""
    from robtui.reading.reader import read_document
    from robtui.reading.registry import outcome_history, read_registry_record

    sources = StudySources()
    records = []
    for report in study.reports:
        path = folder.report_path(report)
        sources.files[report.sha256] = report.path
        problem = folder.check_report(report)
        if problem:
            sources.notes.append(problem)
            continue
        try:
            if is_registry_file(report.kind, path):
                if path.suffix.lower() not in (".json", ".xml"):
                    sources.notes.append(f"{report.path}: a registry record robtui reads is the "
                                         "registry's JSON or XML export; read this one yourself")
                    continue
                records.append((read_registry_record(path), read_document(path)))
            elif is_plan_file(report.kind):
                document = read_document(path)
                for kind, measure, passage in outcomes_in_document(
                        document, f"protocol {Path(report.path).name}"):
                    sources.planned.append(PlannedOutcome("protocol", kind, measure, measure,
                                                          None, passage))
            elif report.kind == "report" and not sources.reported:
                document = read_document(path)
                sources.reported = [ReportedOutcome(kind, measure, passage) for kind, measure,
                                    passage in outcomes_in_document(document, "report")]
        except RobtuiError as error:
            sources.notes.append(str(error))
    records.sort(key=lambda pair: pair[0].last_update.earliest if pair[0].last_update else
                 date.min)
    numbers = {r.registration_number for r, _ in records}
    if len(numbers) > 1:
        sources.notes.append("registry records of different registrations: "
                             f"{', '.join(sorted(numbers))}; each is compared on its own")
    for record, document in records:
        passages = _registry_passages(record, document)
        as_of = record.last_update.earliest if record.last_update else None
        for index, outcome in enumerate(record.outcomes):
            sources.planned.append(PlannedOutcome("registry", outcome.kind, outcome.measure,
                                                  outcome.time_frame, as_of,
                                                  passages.get(index)))
    if records:
        first = records[0][0]
        same = [r for r, _ in records if r.registration_number == first.registration_number]
        history = outcome_history(same) if len(same) > 1 else []
        sources.registry_records = [r.model_copy(update={"history": history})
                                    if r is same[-1] else r for r, _ in records]
        document = records[0][1]
        line_start = document.text.find("Date of registration")
        passage = None
        if line_start >= 0:
            line_end = document.text.find("\n", line_start)
            passage = Passage(f"registry {first.registration_number}", document.sha256,
                              line_start, line_end, document.text[line_start:line_end])
        sources.registration = Registration(
            first.registration_number,
            (first.registered.earliest, first.registered.latest) if first.registered else None,
            (first.first_enrolment.earliest, first.first_enrolment.latest)
            if first.first_enrolment else None,
            first.first_enrolment_anticipated, passage)
    return sources


def result_outcome(result, sources: StudySources) -> tuple[str, str, Passage | None]:
    """The result's outcome in the report's words, its time point, and the passage: the
    reported outcome that matches the result's outcome; for a result named only as "the
    primary outcome", the report's primary outcome."""
    best = max(((r, similarity(result.outcome, r.measure)) for r in sources.reported),
               key=lambda x: x[1], default=(None, 0.0))
    chosen = best[0] if best[1] >= MATCH_SCORE else None
    if chosen is None and "primary" in result.outcome.lower():
        chosen = next((r for r in sources.reported if r.kind == "primary"), None)
    if chosen is None:
        return result.outcome, result.time_point, None
    time_point = result.time_point if durations(result.time_point) else chosen.measure
    return chosen.measure, time_point, chosen.passage


def prespecification(folder, study_id: str, result_id: str) -> tuple[Prespecification,
                                                                      StudySources]:
    """The panel's comparison for one study and result (reads files; nothing is written)."""
    study = folder.study_or_error(study_id)
    result = folder.result_or_error(result_id)
    sources = read_study_sources(folder, study)
    outcome, time_point, passage = result_outcome(result, sources)
    found = compare(outcome, time_point, sources.reported, sources.planned, sources.registration,
                    result_passage=passage)
    if not any(p.source == "registry" for p in sources.planned):
        sources.notes.append("no registry record among the study's files: add the registry's "
                             "JSON or XML export with `robtui study report DIR --study ID "
                             "--registry FILE`")
    if not any(p.source == "protocol" for p in sources.planned):
        sources.notes.append("no protocol outcomes found (no file of kind protocol, or no "
                             "sentence declaring its outcomes)")
    return found, sources


def attach_passage(folder, reviewer: str, study_id: str, result_id: str, question_id: str,
                   passage: Passage) -> Path:
    """Attach ``passage`` as a quote to the reviewer's answer to ``question_id`` (the reviewer
    still answers; nothing else changes). Returns the assessment file written."""
    from robtui.core import assessing
    from robtui.core.model import Quote
    from robtui.core.rules import stamp_rules_version
    from robtui.workspace.workspace import Workspace

    folder.refuse_unlisted_reviewer(reviewer)
    ws = Workspace(folder)
    qset = ws.question_set_for(study_id)  # the study's set, by its design
    stored = ws.load_assessment(reviewer, study_id, result_id)
    a = stored or assessing.new_assessment(folder.review, study_id, result_id, reviewer, qset)
    quote = Quote(document_sha256=passage.document_sha256, start=passage.start, end=passage.end,
                  page=passage.page, text=passage.text)
    changed = assessing.add_quote(assessing.recompute(a, qset), qset, question_id, quote)
    changed = stamp_rules_version(changed, ws.rules_safely()[0])
    return folder.save_assessment(changed)
