"""Trial registry records as reviewers download them, read into one model.

Formats read (parsed with the standard library's ``json``, and ``xml.etree`` through
``defusedxml``, which refuses entity declarations and external references: the Python docs'
"XML security" section says Expat before 2.6.0 may be open to "billion laughs" and "large
tokens" attacks, and the Expat bundled here may be older):

- ClinicalTrials.gov API v2 study JSON (one study, or a search response holding one):
  ``protocolSection.identificationModule.nctId``, ``statusModule.studyFirstSubmitDate``,
  ``startDateStruct{date,type}``, ``lastUpdateSubmitDate`` / ``lastUpdatePostDateStruct``,
  ``outcomesModule.primaryOutcomes[]{measure,description,timeFrame}`` and secondary/other.
  Source: the API's study data structure (clinicaltrials.gov/data-api/about-api/
  study-data-structure, as listed by DesayoEm/Clinexa-ETL-ELT-Pipeline
  documentation/data/single_fields.md) and the Protocol Registration Data Element Definitions
  (clinicaltrials.gov/policy/protocol-definitions).
- ClinicalTrials.gov classic record XML (``<clinical_study>``): ``id_info/nct_id``,
  ``study_first_submitted``, ``start_date`` (type Actual/Anticipated), ``last_update_submitted``,
  ``primary_outcome``/``secondary_outcome``/``other_outcome`` with ``measure``, ``time_frame``,
  ``description``; records saved before May 2018 carry ``firstreceived_date`` and
  ``lastchanged_date`` instead; dates are "Month D, YYYY" or "Month YYYY". Source: NLM's
  public.xsd version 2019.02.14, its change history (08/30/2017 and 05/03/2018 entries) and
  ``variable_date_type`` (copy in lauramiron/CTMetadataAnalysis public.xsd); the element guide
  MoravianCollege/clashboard ClinicalTrialXMLREADME.md.
- WHO ICTRP XML, fields of the WHO Trial Registration Data Set (TRDS v1.3.1, 24 items,
  who.int/clinical-trials-registry-platform/network/who-data-set; items 1-20 numbered as in
  J Biomed Semantics 2017;8:19, Table 1): item 1 (primary registry and trial identifying number),
  2 (date of registration in primary registry), 16 (date of first enrolment), 19 and 20 (primary
  and key secondary outcomes). Two layouts, element names matched whatever their case:

  - the search portal's "Export results to XML" (``<Trials_downloaded_from_ICTRP>`` of
    ``<Trial>`` elements with flat fields): ``TrialID``, ``Source_Register``,
    ``Date_registration`` (YYYY-MM-DD) and ``Date_registration3`` (YYYYMMDD),
    ``Date_enrollement`` (the portal's spelling), ``Last_Refreshed_on`` ("21 September 2026"),
    ``Primary_outcome`` / ``Secondary_outcome`` as free text, outcomes separated by ";" with
    literal ``<br>``. Sources: the portal's field labels (opentrials/collectors
    collectors/ictrp/parser.py: TrialID, Date_registration, Date_enrollement; record.py reads
    the refresh date as "%d %B %Y"); a field list and sample record of a 3,030-trial export
    made on 2026-10-04, kept as a note in a public repository (found by code search, which did
    not name the repository).
  - the data dumps and registry feeds with a ``<main>`` block (``<trials><trial><main>``):
    ``trial_id``, ``reg_name``, ``date_registration`` day first ("03/12/2010" in a file dated
    2010-12-03), ``date_enrolment`` with ``type_enrolment`` (anticipated/actual), or
    ``Date_enrolement`` ("Apr  1 2007"), ``last_updated`` ("3 November 2009"), outcomes as
    ``primary_outcome/prim_outcome``, ``Primary_outcome/Outcome_Name`` and the secondary
    equivalents. Source: bireme/opentrials docs/ictrp/ICTRP_export_2010-12-03.xml and
    docs/ictrp/ICTRPTrials.xml (an "ICTRP Data Dump" of ISRCTN86750102, registered
    10/09/2004).

  Slashed dates: the feeds above write them day first, while the portal's own ``Export_date``
  is month first ("08/28/2026 20:14:44"). So a slashed date whose first two numbers could both
  be a month is read both ways: it spans both readings (``RecordDate.swappable``) and
  registration timing says "cannot tell" when the two readings disagree. The field names and
  forms of other registries' own exports were not checked.

History of changes: none of these single-record exports carries the registry's change log, so
the history comes from comparing versions: several records of the same registration number
(for example each version saved from the registry's history page) give, in update order, every
outcome added, removed or changed and when (:func:`outcome_history`).
"""

from __future__ import annotations

import calendar
import hashlib
import itertools
import json
import re
import xml.etree.ElementTree as ET
from datetime import date, datetime
from pathlib import Path
from typing import Literal

from pydantic import BaseModel, ConfigDict, Field

from robtui.errors import ReadingError

OutcomeKind = Literal["primary", "secondary", "other"]
REGISTRY_SUFFIXES = (".json", ".xml")


class RecordDate(BaseModel):
    """A date as precise as the record gives it (some registries give only month and year)."""

    model_config = ConfigDict(extra="forbid", frozen=True)

    year: int
    month: int | None = None
    day: int | None = None
    text: str = ""  # as written in the record
    swappable: bool = False  # a slashed date that reads as a date month first too

    @property
    def other_reading(self) -> date | None:
        """The date with day and month swapped, when the record's form allows both."""
        return date(self.year, self.day, self.month) if self.swappable else None

    @property
    def earliest(self) -> date:
        first = date(self.year, self.month or 1, self.day or 1)
        return min(first, self.other_reading or first)

    @property
    def latest(self) -> date:
        month = self.month or 12
        last = date(self.year, month, self.day or calendar.monthrange(self.year, month)[1])
        return max(last, self.other_reading or last)

    def __str__(self) -> str:
        if self.swappable:
            return (f"{self.year:04d}-{self.month:02d}-{self.day:02d} or "
                    f"{self.other_reading.isoformat()} (written {self.text})")
        if self.day:
            return f"{self.year:04d}-{self.month:02d}-{self.day:02d}"
        if self.month:
            return f"{self.year:04d}-{self.month:02d}"
        return f"{self.year:04d}"


class RegisteredOutcome(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True)

    kind: OutcomeKind
    measure: str
    time_frame: str = ""
    description: str = ""

    def line(self, number: int) -> str:
        """How the outcome reads in the record's text rendering (quotable)."""
        frame = f" (time frame: {self.time_frame})" if self.time_frame else ""
        return f"{self.kind.capitalize()} outcome {number}: {self.measure}{frame}".rstrip(".") + "."


class RecordChange(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True)

    date: RecordDate | None
    what: str


class RegistryRecord(BaseModel):
    """What a reviewer needs from a registry record for domain 5 and the pre-specified plan."""

    model_config = ConfigDict(extra="forbid")

    source_format: Literal["ctgov-json", "ctgov-xml", "who-ictrp-xml"]
    registry: str
    registration_number: str
    title: str = ""
    registered: RecordDate | None = None
    first_enrolment: RecordDate | None = None
    first_enrolment_anticipated: bool | None = None  # True: a planned date, not the actual one
    last_update: RecordDate | None = None
    outcomes: list[RegisteredOutcome] = Field(default_factory=list)
    history: list[RecordChange] = Field(default_factory=list)
    path: str = ""
    sha256: str = ""

    def of_kind(self, kind: OutcomeKind) -> list[RegisteredOutcome]:
        return [o for o in self.outcomes if o.kind == kind]


# -- dates ------------------------------------------------------------------------------------
_DAY_FORMATS = ("%Y-%m-%d", "%B %d, %Y", "%b %d, %Y", "%B %d %Y", "%b %d %Y", "%d %B %Y",
                "%d %b %Y", "%d/%m/%Y", "%d.%m.%Y", "%Y%m%d", "%d-%m-%Y", "%Y/%m/%d")
_SLASHED = ("%d/%m/%Y", "%d-%m-%Y", "%d.%m.%Y")  # day first in the ICTRP feeds (sources above)
_MONTH_FORMATS = ("%Y-%m", "%B %Y", "%b %Y", "%m/%Y", "%Y/%m")


def parse_record_date(text: str | None) -> RecordDate | None:
    """A registry date in any of the formats registries write; None when empty or unknown.

    Slashed dates are read day first (``14/03/2031``), as the ICTRP feeds write them; one whose
    day could also be a month (``04/03/2030``) is marked ``swappable`` and spans both readings
    (see the module's sources). A time after the date (``2031-03-14T10:00``) is ignored.
    """
    if not text or not text.strip():
        return None
    raw = " ".join(text.split())
    value = raw.split("T")[0] if raw[:4].isdigit() else raw
    for fmt in _DAY_FORMATS:
        try:
            d = datetime.strptime(value, fmt)
        except ValueError:
            continue
        swappable = fmt in _SLASHED and d.day <= 12 and d.day != d.month
        return RecordDate(year=d.year, month=d.month, day=d.day, text=raw, swappable=swappable)
    for fmt in _MONTH_FORMATS:
        try:
            d = datetime.strptime(value, fmt)
        except ValueError:
            continue
        return RecordDate(year=d.year, month=d.month, text=raw)
    if value.isdigit() and len(value) == 4:
        return RecordDate(year=int(value), text=raw)
    return None


# -- reading ------------------------------------------------------------------------------------
def read_registry_record(path: Path) -> RegistryRecord:
    """Read one registry record file (JSON or XML); ReadingError names the file and problem."""
    path = Path(path)
    try:
        data = path.read_bytes()
    except OSError as error:
        raise ReadingError(f"{path}: cannot be read ({error.strerror or error})") from error
    return parse_registry_record(data, str(path))


def parse_registry_record(data: bytes, name: str = "<record>") -> RegistryRecord:
    """The record in ``data``, whichever supported format it is in."""
    digest = hashlib.sha256(data).hexdigest()
    head = data.lstrip()[:1]
    if head in (b"{", b"["):
        record = _from_ctgov_json(_json(data, name), name)
    elif head == b"<":
        record = _from_xml(_xml(data, name), name)
    else:
        raise ReadingError(f"{name}: not a registry record robtui reads (expected the JSON of "
                           "a ClinicalTrials.gov study, its classic XML, or a WHO ICTRP XML "
                           "export)")
    return record.model_copy(update={"path": name, "sha256": digest})


def is_registry_record(data: bytes) -> bool:
    """True when ``data`` parses as one of the supported registry formats."""
    try:
        parse_registry_record(data)
    except ReadingError:
        return False
    return True


def _json(data: bytes, name: str):
    try:
        return json.loads(data.decode("utf-8-sig"))
    except (UnicodeDecodeError, ValueError) as error:
        raise ReadingError(f"{name}: not valid JSON ({error})") from error


def _xml(data: bytes, name: str) -> ET.Element:
    from defusedxml import DefusedXmlException
    from defusedxml.ElementTree import fromstring

    try:
        return fromstring(data)
    except ET.ParseError as error:
        raise ReadingError(f"{name}: not well-formed XML ({error})") from error
    except DefusedXmlException as error:
        raise ReadingError(f"{name}: the XML declares entities or external references, which "
                           f"a registry export never needs; refused for safety ({error})") from error


def _get(obj, *keys, default=None):
    for key in keys:
        if not isinstance(obj, dict) or key not in obj:
            return default
        obj = obj[key]
    return obj


def _text(value) -> str:
    return " ".join(str(value).split()) if value is not None else ""


def _from_ctgov_json(raw, name: str) -> RegistryRecord:
    studies = raw.get("studies") if isinstance(raw, dict) and "studies" in raw else None
    if isinstance(raw, list):
        studies = raw
    if studies is not None:
        if len(studies) != 1:
            raise ReadingError(f"{name}: holds {len(studies)} study records; save one study "
                               "per file")
        raw = studies[0]
    protocol = _get(raw, "protocolSection")
    if not isinstance(protocol, dict):
        raise ReadingError(f"{name}: JSON without protocolSection: not a ClinicalTrials.gov "
                           "study record")
    ident = _get(protocol, "identificationModule", default={})
    status = _get(protocol, "statusModule", default={})
    number = _text(ident.get("nctId"))
    if not number:
        raise ReadingError(f"{name}: the record has no identificationModule.nctId")
    outcomes = []
    for key, kind in (("primaryOutcomes", "primary"), ("secondaryOutcomes", "secondary"),
                      ("otherOutcomes", "other")):
        for item in _get(protocol, "outcomesModule", key, default=[]) or []:
            measure = _text(item.get("measure"))
            if measure:
                outcomes.append(RegisteredOutcome(
                    kind=kind, measure=measure, time_frame=_text(item.get("timeFrame")),
                    description=_text(item.get("description"))))
    start_type = _text(_get(status, "startDateStruct", "type")).upper()
    return RegistryRecord(
        source_format="ctgov-json", registry="ClinicalTrials.gov", registration_number=number,
        title=_text(ident.get("officialTitle") or ident.get("briefTitle")),
        registered=parse_record_date(status.get("studyFirstSubmitDate")),
        first_enrolment=parse_record_date(_get(status, "startDateStruct", "date")),
        first_enrolment_anticipated=(start_type in ("ESTIMATED", "ANTICIPATED")
                                     if start_type else None),
        last_update=parse_record_date(status.get("lastUpdateSubmitDate")
                                      or _get(status, "lastUpdatePostDateStruct", "date")),
        outcomes=outcomes,
    )


def _child_text(element: ET.Element, tag: str) -> str:
    found = element.find(tag)
    return _text("".join(found.itertext())) if found is not None else ""


def _from_xml(root: ET.Element, name: str) -> RegistryRecord:
    tag = root.tag.lower()
    if tag == "clinical_study":
        return _from_ctgov_xml(root, name)
    if tag == "trial":
        return _from_ictrp(root, name)
    if tag.startswith("trials"):
        trials = [child for child in root if child.tag.lower() == "trial"]
        if len(trials) != 1:
            raise ReadingError(f"{name}: holds {len(trials)} trials; export one trial per file")
        return _from_ictrp(trials[0], name)
    raise ReadingError(f"{name}: XML <{root.tag}> is not a registry record robtui reads "
                       "(<clinical_study> of ClinicalTrials.gov or a WHO ICTRP <Trial> export)")


def _from_ctgov_xml(root: ET.Element, name: str) -> RegistryRecord:
    number = _child_text(root, "id_info/nct_id")
    if not number:
        raise ReadingError(f"{name}: <clinical_study> without id_info/nct_id")
    outcomes = []
    for tag, kind in (("primary_outcome", "primary"), ("secondary_outcome", "secondary"),
                      ("other_outcome", "other")):
        for item in root.findall(tag):
            measure = _child_text(item, "measure")
            if measure:
                outcomes.append(RegisteredOutcome(
                    kind=kind, measure=measure, time_frame=_child_text(item, "time_frame"),
                    description=_child_text(item, "description")))
    start = root.find("start_date")
    start_type = (start.get("type") or "").lower() if start is not None else ""
    return RegistryRecord(
        source_format="ctgov-xml", registry="ClinicalTrials.gov", registration_number=number,
        title=_child_text(root, "official_title") or _child_text(root, "brief_title"),
        registered=parse_record_date(_child_text(root, "study_first_submitted")
                                     or _child_text(root, "firstreceived_date")),
        first_enrolment=parse_record_date(_child_text(root, "start_date")),
        first_enrolment_anticipated=(start_type == "anticipated") if start_type else None,
        last_update=parse_record_date(_child_text(root, "last_update_submitted")
                                      or _child_text(root, "lastchanged_date")),
        outcomes=outcomes,
    )


_LINE_BREAK = re.compile(r"<br\s*/?>", re.IGNORECASE)  # literal in the ICTRP export's text
_TIME_LABELS = ("time frame:", "timeframe:", "timepoints:", "timepoint:", "time points:",
                "time point:")


def split_outcome_text(text: str) -> list[tuple[str, str]]:
    """(measure, time frame) pairs of a free-text outcome field (ICTRP): one outcome per line
    or per semicolon; a "time frame:" / "timepoint:" label inside an outcome starts its time
    frame."""
    out = []
    for line in _LINE_BREAK.sub("\n", text).splitlines():
        for part in line.split(";"):
            part = " ".join(part.split()).strip(" .")
            if not part:
                continue
            lowered = part.lower()
            label = next((lb for lb in _TIME_LABELS if lb in lowered), None)
            if label is not None:
                cut = lowered.index(label)
                measure = part[:cut].strip(" ,.[]()")
                frame = part[cut + len(label):].strip(" ,.[]()")
                if not measure and out and not out[-1][1]:
                    out[-1] = (out[-1][0], frame)  # "...; Time frame: 12 weeks"
                else:
                    out.append((measure, frame))
            elif (out and not out[-1][1] and len(part.split()) <= 6
                  and lowered.startswith(("at ", "over ", "during ", "after "))):
                out[-1] = (out[-1][0], part)  # "...; at 12 weeks" belongs to the outcome
            else:
                out.append((part, ""))
    return [(m, t) for m, t in out if m]


def _ictrp_fields(trial: ET.Element) -> dict[str, ET.Element]:
    """A trial's field elements by lower-cased name (the ``main`` block's first)."""
    main = next((child for child in trial if child.tag.lower() == "main"), None)
    fields: dict[str, ET.Element] = {}
    for parent in (main, trial):
        if parent is not None:
            for child in parent:
                fields.setdefault(child.tag.lower(), child)
    return fields


def _ictrp_outcomes(element: ET.Element | None) -> list[str]:
    """An outcome field's free texts: the element's own text, or each child's (one outcome per
    ``Outcome_Name`` / ``prim_outcome`` / ``sec_outcome``)."""
    if element is None:
        return []
    children = list(element)
    if not children:
        return ["".join(element.itertext())]
    return ["".join(child.itertext()) for child in children]


def _from_ictrp(trial: ET.Element, name: str) -> RegistryRecord:
    fields = _ictrp_fields(trial)

    def field(*names: str) -> str:
        for key in names:
            found = fields.get(key)
            value = _text("".join(found.itertext())) if found is not None else ""
            if value:
                return value
        return ""

    number = field("trialid", "trial_id")
    if not number:
        raise ReadingError(f"{name}: WHO ICTRP <Trial> without TrialID")
    outcomes = []
    for tag, kind in (("primary_outcome", "primary"), ("secondary_outcome", "secondary")):
        for text in _ictrp_outcomes(fields.get(tag)):
            for measure, frame in split_outcome_text(text):
                outcomes.append(RegisteredOutcome(kind=kind, measure=measure, time_frame=frame))
    enrolment_type = field("type_enrolment").lower()
    return RegistryRecord(
        source_format="who-ictrp-xml",
        registry=field("source_register", "reg_name") or "WHO ICTRP",
        registration_number=number,
        title=field("scientific_title", "public_title"),
        registered=parse_record_date(field("date_registration", "date_registration3")),
        first_enrolment=parse_record_date(field("date_enrollement", "date_enrolement",
                                                "date_enrolment", "date_enrollment")),
        first_enrolment_anticipated=({"anticipated": True, "actual": False}
                                     .get(enrolment_type)),
        last_update=parse_record_date(field("last_refreshed_on", "last_updated")),
        outcomes=outcomes,
    )


# -- versions ---------------------------------------------------------------------------------
def outcome_history(records: list[RegistryRecord]) -> list[RecordChange]:
    """Changes of the pre-specified outcomes between versions of one registration, oldest
    first (see core.prespecification.outcome_changes). Records are ordered by their last update
    (a record without one counts as oldest)."""
    from robtui.core.prespecification import outcome_changes

    numbers = {r.registration_number for r in records}
    if len(numbers) > 1:
        raise ReadingError(f"versions of different registrations cannot be compared: "
                           f"{', '.join(sorted(numbers))}")
    ordered = sorted(records, key=lambda r: r.last_update.earliest if r.last_update else date.min)
    changes: list[RecordChange] = []
    for before, after in itertools.pairwise(ordered):
        for what in outcome_changes([(o.kind, o.measure, o.time_frame) for o in before.outcomes],
                                    [(o.kind, o.measure, o.time_frame) for o in after.outcomes]):
            changes.append(RecordChange(date=after.last_update, what=what))
    return changes


# -- as a document ------------------------------------------------------------------------------
def record_text(record: RegistryRecord) -> str:
    """The record as plain text, one fact per line, so its lines can be read and quoted."""
    lines = [f"Registry record {record.registration_number} ({record.registry})"]
    if record.title:
        lines.append(f"Title: {record.title}".rstrip(".") + ".")
    lines += ["", "Registration"]
    if record.registered:
        lines.append(f"Date of registration: {record.registered}.")
    if record.first_enrolment:
        planned = {True: " (anticipated)", False: " (actual)"}.get(
            record.first_enrolment_anticipated, "")
        lines.append(f"Date of first enrolment: {record.first_enrolment}{planned}.")
    if record.last_update:
        lines.append(f"Last update: {record.last_update}.")
    for kind, heading in (("primary", "Primary outcomes"), ("secondary", "Secondary outcomes"),
                          ("other", "Other outcomes")):
        items = record.of_kind(kind)
        if not items:
            continue
        lines += ["", heading]
        for number, outcome in enumerate(items, 1):
            lines.append(outcome.line(number))
            if outcome.description:
                lines.append(f"Description: {outcome.description}".rstrip(".") + ".")
    if record.history:
        lines += ["", "History of changes"]
        lines += [f"{change.date or 'undated'}: {change.what}." for change in record.history]
    return "\n".join(lines) + "\n"


def read_registry_document(path: Path, data: bytes, digest: str):
    """A registry record file as a Document of its text rendering (for the report pane,
    suggestions and quotes); offsets are into that rendering."""
    from robtui.reading.reader import check_text_length
    from robtui.reading.text import document_from_text

    record = parse_registry_record(data, str(path))
    text = record_text(record)
    check_text_length(path, len(text))
    return document_from_text(text, path=str(path), kind="registry", sha256=digest)
