"""What was planned, beside what was reported: one result's outcome against the registry's and
the protocol's pre-specified outcomes (pure: plain data in, findings out).

Matching: outcome names are compared with rapidfuzz's ``token_set_ratio`` over their content
words (lower case, punctuation dropped by ``rapidfuzz.utils.default_process``, function words
and time words left out, since the time point is compared on its own), so "dyspnoea score" meets
"Dyspnea score" and "sleep quality" meets "self-rated sleep quality on the Larkspur Sleep
Scale". ``MATCH_SCORE`` (80 of 100) is our choice, checked on the demo and the tests; no source.
Time frames are normalised to days ("12 weeks", "week 12", "weeks 9 to 12", "3 months") and
match when a day count agrees within 10%, so "12 weeks" meets "3 months" (a month is
30.44 days, a year 365.25; our choice, no source).

Registration timing follows the ICMJE's requirement of registration "at or before the time of
first patient enrollment", using the date registration was first submitted (ICMJE
Recommendations, Clinical Trial Registration, icmje.org); WHO TRDS item 16 is the "anticipated
or actual date of enrollment of the first participant".

Findings are for the reviewer to read and, if they choose, to attach as quotes to 5.1-5.3; they
answer no signalling question.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass, field
from datetime import date
from typing import Literal

from rapidfuzz import fuzz
from rapidfuzz.utils import default_process

MATCH_SCORE = 80.0
TIME_TOLERANCE = 0.10

Kind = Literal["primary", "secondary", "other", "unstated"]
Status = Literal["primary", "secondary", "not pre-specified", "changed", "no plan given"]
Timing = Literal["prospective", "retrospective", "cannot tell", "no dates"]

# Function words and words of time or counting that say nothing about what was measured.
_STOP = frozenset("""
a an the of in on at by for to from with and or over during after before within between up until
per each all any its their his her was were is are will be been being as than then this that these
those who which whose it we our participant participants patient patients people group groups
number proportion change changes from baseline mean total rate rates measured recorded assessed
collected completed taken using via day days week weeks month months year years time timepoint
frame point visit end treatment follow followup up weekly monthly daily
zero one two three four five six seven eight nine ten eleven twelve
""".split())  # noqa: SIM905 - a word list reads better as text

_NUMBER_WORDS = {
    "one": 1, "two": 2, "three": 3, "four": 4, "five": 5, "six": 6, "seven": 7, "eight": 8,
    "nine": 9, "ten": 10, "eleven": 11, "twelve": 12, "sixteen": 16, "eighteen": 18,
}
_TENS = {"twenty": 20, "thirty": 30, "forty": 40, "fifty": 50, "sixty": 60}
_UNIT_DAYS = {"day": 1.0, "week": 7.0, "wk": 7.0, "month": 30.4375, "mo": 30.4375,
              "year": 365.25, "yr": 365.25}


@dataclass(frozen=True)
class Passage:
    """A place in a source document a reviewer can read and quote."""

    source: str  # e.g. "registry RIT-2030-00412", "protocol alder-protocol.txt", "report"
    document_sha256: str
    start: int
    end: int
    text: str
    page: int | None = None


@dataclass(frozen=True)
class PlannedOutcome:
    """One pre-specified outcome: from a registry record version or a protocol."""

    source: Literal["registry", "protocol"]
    kind: Kind
    measure: str
    time_frame: str = ""
    as_of: date | None = None  # the record version's date (registry) or None (protocol)
    passage: Passage | None = None


@dataclass(frozen=True)
class ReportedOutcome:
    """An outcome the report names (and whether it calls it primary or secondary)."""

    kind: Kind
    measure: str
    passage: Passage | None = None


@dataclass(frozen=True)
class Registration:
    registration_number: str
    registered: tuple[date, date] | None  # earliest and latest day the record's date allows
    first_enrolment: tuple[date, date] | None
    first_enrolment_anticipated: bool | None = None
    passage: Passage | None = None


@dataclass(frozen=True)
class Finding:
    """One thing the reviewer should see, with the passages behind it."""

    topic: Literal["registration", "status", "time point", "switched", "added", "dropped",
                   "changed"]
    text: str
    passages: tuple[Passage, ...] = ()


@dataclass
class Prespecification:
    """Everything the panel shows for one result of one study."""

    outcome: str  # the result's outcome as compared (the report's words when it names it)
    time_point: str
    status: Status
    timing: Timing
    findings: list[Finding] = field(default_factory=list)
    planned_matches: list[tuple[PlannedOutcome, float]] = field(default_factory=list)
    side_by_side: list[tuple[Passage | None, Passage | None]] = field(default_factory=list)


# -- words and times ------------------------------------------------------------------------------
def content_words(text: str) -> str:
    """The words that say what was measured, in order (see the module docstring)."""
    words = default_process(text).split()
    return " ".join(w for w in words if w not in _STOP and not w.isdigit())


def similarity(a: str, b: str) -> float:
    """0-100: how far two outcome names name the same thing: token_set_ratio of their content
    words, scaled down when under two thirds of the shorter name's words have a counterpart
    (rapidfuzz ratio >= 85) in the other, so one shared word ("quality of life" and "sleep
    quality") is not a match."""
    wa, wb = content_words(a), content_words(b)
    if not wa or not wb:
        return 0.0
    score = float(fuzz.token_set_ratio(wa, wb))
    short, long = sorted((wa.split(), wb.split()), key=len)
    covered = sum(any(fuzz.ratio(w, v) >= 85 for v in long) for w in short) / len(short)
    return score if covered >= 2 / 3 else score * covered


def _number(token: str) -> float | None:
    token = token.strip("()[],.;:")
    if token in _NUMBER_WORDS:
        return float(_NUMBER_WORDS[token])
    if token in _TENS:
        return float(_TENS[token])
    try:
        return float(token)
    except ValueError:
        return None


def _unit(token: str) -> float | None:
    token = token.strip("()[],.;:-")
    for name, days in _UNIT_DAYS.items():
        if token in (name, name + "s"):
            return days
    return None


def durations(text: str) -> frozenset[int]:
    """Day counts a time frame names: "12 weeks" and "week 12" give 84; "weeks 9 to 12" gives
    63 and 84; "3 months" 91. Empty when the text names no duration ("end of treatment")."""
    tokens = text.lower().replace("-", " ").replace("–", " ").split()
    found: set[int] = set()
    for i, token in enumerate(tokens):
        days = _unit(token)
        if days is None:
            continue
        before = _number(tokens[i - 1]) if i > 0 else None
        if before is not None and before < 10 and i > 1 and tokens[i - 2] in _TENS:
            before += _TENS[tokens[i - 2]]  # "twenty-four weeks"
        if before is not None:
            found.add(round(before * days))
            continue
        for ahead in tokens[i + 1:i + 4]:  # "week 12", "weeks 9 to 12"
            value = _number(ahead)
            if value is not None:
                found.add(round(value * days))
            elif ahead not in ("to", "and", "through", "or"):
                break
    return frozenset(found)


def same_time(a: str, b: str) -> bool | None:
    """True/False when both name durations; None when either names none (cannot compare)."""
    da, db = durations(a), durations(b)
    if not da or not db:
        return None
    return any(abs(x - y) <= TIME_TOLERANCE * max(x, y) for x in da for y in db)


def outcome_changes(before: list[tuple[str, str, str]], after: list[tuple[str, str, str]]
                    ) -> list[str]:
    """What changed between two versions' outcomes, each given as (kind, measure, time frame):
    outcomes added, removed, moved between primary and secondary, or given another time frame.
    Outcomes are the same when their content words match (:func:`similarity`)."""
    def find(measure: str, pool: list[tuple[str, str, str]]):
        return next((o for o in pool if similarity(measure, o[1]) >= MATCH_SCORE), None)

    changes = []
    for kind, measure, frame in after:
        old = find(measure, before)
        if old is None:
            changes.append(f"{kind} outcome added: {measure}")
        elif old[0] != kind:
            changes.append(f"{measure}: {old[0]} -> {kind} outcome")
        elif old[2] != frame:
            changes.append(f"{measure}: time frame {old[2] or '(none)'} -> {frame or '(none)'}")
    changes += [f"{kind} outcome removed: {measure}" for kind, measure, _frame in before
                if find(measure, after) is None]
    return changes


# -- registration timing ------------------------------------------------------------------------
def registration_timing(reg: Registration | None) -> tuple[Timing, str]:
    """Prospective (registered at or before first enrolment), retrospective, or cannot tell.

    The ICMJE asks for registration at or before first patient enrolment (its clinical trial
    registration recommendation, as cited by ictr.johnshopkins.edu "When to register"); the
    ICTRP's own flag is stricter
    (registration date prior to first enrolment, ICTRP search portal search tips). A same-day
    registration counts as prospective here and the dates are shown, so a reviewer can apply
    either.
    """
    if reg is None or reg.registered is None or reg.first_enrolment is None:
        if reg is None:
            return "no dates", "No registry record was given: registration timing unknown."
        return "no dates", "The registry record gives no date of registration or first enrolment."
    (reg_first, reg_last), (enr_first, enr_last) = reg.registered, reg.first_enrolment
    planned = " (an anticipated date)" if reg.first_enrolment_anticipated else ""
    dates = (f"registered {_span(reg.registered)}, first enrolment "
             f"{_span(reg.first_enrolment)}{planned}")
    if reg_last <= enr_first:
        return "prospective", f"Registered at or before first enrolment: {dates}."
    if reg_first > enr_last:
        days = (reg_first - enr_last).days
        return "retrospective", (f"Registered after enrolment began ({days} days or more "
                                 f"later): {dates}.")
    return "cannot tell", f"The dates overlap at the precision given: {dates}."


def _span(pair: tuple[date, date]) -> str:
    first, last = pair
    if first == last:
        return first.isoformat()
    if first.year == last.year and first.month == last.month:
        return first.strftime("%Y-%m")
    return f"{first.isoformat()} to {last.isoformat()}"


# -- matching -----------------------------------------------------------------------------------
def best_match(measure: str, planned: list[PlannedOutcome]) -> tuple[PlannedOutcome | None, float]:
    scored = [(p, similarity(measure, p.measure)) for p in planned]
    scored = [s for s in scored if s[1] >= MATCH_SCORE]
    if not scored:
        return None, 0.0
    return max(scored, key=lambda s: (s[1], s[0].kind == "primary"))


def _versions(planned: list[PlannedOutcome]) -> list[date | None]:
    return sorted({p.as_of for p in planned if p.source == "registry"},
                  key=lambda d: d or date.min)


def _latest_registry(planned: list[PlannedOutcome]) -> list[PlannedOutcome]:
    versions = _versions(planned)
    return [p for p in planned if p.source == "registry" and p.as_of == versions[-1]] \
        if versions else []


def _earliest_registry(planned: list[PlannedOutcome]) -> list[PlannedOutcome]:
    versions = _versions(planned)
    return [p for p in planned if p.source == "registry" and p.as_of == versions[0]] \
        if versions else []


def compare(
    outcome: str,
    time_point: str,
    reported: list[ReportedOutcome],
    planned: list[PlannedOutcome],
    registration: Registration | None = None,
    *,
    result_passage: Passage | None = None,
) -> Prespecification:
    """Compare the result's outcome (and all the report's outcomes) with what was planned.

    ``outcome`` is the result's outcome in the report's words; ``reported`` every outcome the
    report names; ``planned`` every pre-specified outcome of every registry version and
    protocol. Nothing here decides an answer: the findings say what differs and where.
    """
    timing, timing_text = registration_timing(registration)
    findings = [Finding("registration", timing_text,
                        (registration.passage,) if registration and registration.passage else ())]
    protocol = [p for p in planned if p.source == "protocol"]
    earliest, latest = _earliest_registry(planned), _latest_registry(planned)
    sources = [("registry", latest), ("protocol", protocol)]
    if earliest and earliest != latest:
        sources.insert(0, ("first registry version", earliest))

    matches: list[tuple[str, PlannedOutcome | None, float]] = []
    for name, outcomes in sources:
        if outcomes:
            match, score = best_match(outcome, outcomes)
            matches.append((name, match, score))
    kinds = {name: (m.kind if m else "not pre-specified") for name, m, _ in matches}
    reported_kind = _reported_kind(outcome, reported)

    status: Status
    distinct = {k for k in kinds.values() if k != "unstated"}
    if not matches:
        status = "no plan given"
    elif distinct == {"not pre-specified"}:
        status = "not pre-specified"
    elif len(distinct) > 1 or (reported_kind in ("primary", "secondary")
                                and distinct - {"not pre-specified"} != {reported_kind}):
        status = "changed"
    else:
        status = next(iter(distinct))  # primary / secondary (other counts as secondary)
        status = "secondary" if status == "other" else status
    if status == "changed":
        where = "; ".join(f"{name}: {kind}" for name, kind in kinds.items())
        said = f"; the report calls it {reported_kind}" if reported_kind != "unstated" else ""
        findings.append(Finding("changed", f"The outcome's status differs between sources "
                                f"({where}{said}).", _passages(matches, result_passage)))
    elif status == "no plan given":
        findings.append(Finding("status", "No registry record or protocol outcomes were given: "
                                "there is nothing to compare this outcome with."))
    elif status == "not pre-specified":
        findings.append(Finding("status", "No registry or protocol outcome matches this "
                                "outcome: not pre-specified in the sources given.",
                                (result_passage,) if result_passage else ()))
    else:
        findings.append(Finding("status", f"Pre-specified as a {status} outcome "
                                f"({', '.join(name for name, m, _ in matches if m)}).",
                                _passages(matches, result_passage)))

    for name, match, _score in matches:
        if match is None or not match.time_frame:
            continue
        agree = same_time(time_point, match.time_frame)
        if agree is False:
            findings.append(Finding("time point", (
                f"Time point differs: the result is at '{time_point}', the {name} gives "
                f"'{match.time_frame}'."), _passages([(name, match, 0.0)], result_passage)))
        elif agree is None and time_point:
            findings.append(Finding("time point", (
                f"Time point not comparable: '{time_point}' against the {name}'s "
                f"'{match.time_frame}': check by reading."), _passages([(name, match, 0.0)],
                                                                      result_passage)))

    findings += _registry_versions(planned, registration)
    findings += _switched(reported, earliest or latest, protocol)
    findings += _added_and_dropped(reported, latest or earliest, protocol)
    side = [(m.passage if m else None, result_passage) for _name, m, _ in matches]
    return Prespecification(outcome, time_point, status, timing, findings,
                            [(m, s) for _n, m, s in matches if m], side)


def _registry_versions(planned: list[PlannedOutcome], registration: Registration | None
                       ) -> list[Finding]:
    """Changes of the registry's outcomes from one saved version to the next, dated, and
    whether they came after first enrolment."""
    versions = _versions(planned)
    findings = []
    enrolled = registration.first_enrolment[1] if registration and \
        registration.first_enrolment else None
    for old, new in itertools.pairwise(versions):
        before = [p for p in planned if p.source == "registry" and p.as_of == old]
        after = [p for p in planned if p.source == "registry" and p.as_of == new]
        changes = outcome_changes([(p.kind, p.measure, p.time_frame) for p in before],
                                  [(p.kind, p.measure, p.time_frame) for p in after])
        if not changes:
            continue
        late = (" after first enrolment" if enrolled and new and new > enrolled else "")
        passages = tuple(p.passage for p in before + after
                         if p.passage is not None and p.kind == "primary")
        findings.append(Finding("changed", (
            f"The registry record's outcomes changed between its versions of {old or 'undated'}"
            f" and {new or 'undated'}{late}: {'; '.join(changes)}."), passages))
    return findings


def _reported_kind(outcome: str, reported: list[ReportedOutcome]) -> Kind:
    best = max(((r, similarity(outcome, r.measure)) for r in reported), key=lambda x: x[1],
               default=(None, 0.0))
    return best[0].kind if best[0] is not None and best[1] >= MATCH_SCORE else "unstated"


def _passages(matches, result_passage: Passage | None) -> tuple[Passage, ...]:
    out = [m.passage for _n, m, _s in matches if m is not None and m.passage is not None]
    if result_passage is not None:
        out.append(result_passage)
    return tuple(dict.fromkeys(out))


def _switched(reported: list[ReportedOutcome], registry: list[PlannedOutcome],
              protocol: list[PlannedOutcome]) -> list[Finding]:
    """The report's primary outcome against the first pre-specified primary outcome(s)."""
    findings = []
    report_primary = [r for r in reported if r.kind == "primary"]
    for name, planned in (("registry", registry), ("protocol", protocol)):
        planned_primary = [p for p in planned if p.kind == "primary"]
        if not report_primary or not planned_primary:
            continue
        for r in report_primary:
            if any(similarity(r.measure, p.measure) >= MATCH_SCORE for p in planned_primary):
                continue
            match, _ = best_match(r.measure, planned)
            was = f"pre-specified as {match.kind}" if match else "not pre-specified"
            planned_names = "; ".join(p.measure for p in planned_primary)
            passages = tuple(x for x in (r.passage, *(p.passage for p in planned_primary))
                             if x is not None)
            findings.append(Finding("switched", (
                f"Primary outcome switched against the {name}: the report's primary "
                f"'{r.measure}' was {was}; the {name}'s primary was '{planned_names}'."),
                passages))
    return findings


def _added_and_dropped(reported: list[ReportedOutcome], registry: list[PlannedOutcome],
                       protocol: list[PlannedOutcome]) -> list[Finding]:
    findings = []
    planned = registry + protocol
    if not planned:
        return findings
    for r in reported:
        if best_match(r.measure, planned)[0] is None:
            findings.append(Finding("added", (
                f"Reported outcome not pre-specified in the registry or protocol: "
                f"'{r.measure}' ({r.kind} in the report)."),
                (r.passage,) if r.passage else ()))
    seen: list[str] = []
    for p in planned:
        if any(similarity(p.measure, other) >= MATCH_SCORE for other in seen):
            continue
        seen.append(p.measure)
        if not any(similarity(p.measure, r.measure) >= MATCH_SCORE for r in reported):
            findings.append(Finding("dropped", (
                f"Pre-specified {p.kind} outcome not among the report's outcomes: "
                f"'{p.measure}' ({p.source}); search the report before concluding."),
                (p.passage,) if p.passage else ()))
    return findings
