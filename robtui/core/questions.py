"""Signalling-question sets as data: the dataclasses, and a loader that validates on load.

A question set file (TOML, layout described at the top of signalling_questions/rob2-parallel.toml)
holds the questions of each domain, the condition under which each is asked, and each domain's
algorithm as ordered rule tables. Loading proves every rule table total: every combination of
answers a reviewer can reach matches a row, every question can be reached and every row can
fire. A malformed file raises DataFileError naming the file, the entry and the problem.

Only the standard library is used here so that `robtui judge` starts fast.
"""

from __future__ import annotations

import tomllib
from collections.abc import Iterator, Mapping
from dataclasses import dataclass
from functools import cache
from pathlib import Path

from robtui.errors import DataFileError, InputError

# The method's response codes and judgement codes (kept here, not imported from core.model, so
# this module does not pull in pydantic; tests check both lists agree).
RESPONSE_CODES: tuple[str, ...] = ("Y", "PY", "PN", "N", "NI", "NA")
JUDGEMENT_CODES: tuple[str, ...] = ("low", "some_concerns", "high")
EFFECTS: tuple[str, ...] = ("assignment", "adhering")


# --- conditions -------------------------------------------------------------------------------


@dataclass(frozen=True)
class AnswerIs:
    """True when question ``question`` was asked and answered with one of ``codes``."""

    question: str
    codes: tuple[str, ...]

    def holds(self, answers: Mapping[str, str]) -> bool:
        return answers.get(self.question) in self.codes

    def questions(self) -> set[str]:
        return {self.question}

    def describe(self) -> str:
        return f"{self.question} is {'/'.join(self.codes)}"


@dataclass(frozen=True)
class Group:
    """All (``mode`` "all") or at least one (``mode`` "any") of ``items`` hold."""

    mode: str
    items: tuple[Condition, ...]

    def holds(self, answers: Mapping[str, str]) -> bool:
        test = all if self.mode == "all" else any
        return test(item.holds(answers) for item in self.items)

    def questions(self) -> set[str]:
        return set().union(*(item.questions() for item in self.items))

    def describe(self) -> str:
        joiner = " and " if self.mode == "all" else " or "
        return joiner.join(_bracket(item) for item in self.items)


Condition = AnswerIs | Group


def _bracket(item: Condition) -> str:
    text = item.describe()
    return text if isinstance(item, AnswerIs) else f"({text})"


# --- the set ----------------------------------------------------------------------------------


@dataclass(frozen=True)
class Question:
    id: str
    domain: str
    text: str
    short: str
    options: tuple[str, ...]
    if_applicable: bool
    asked_if: Condition | None
    condition_text: str
    guidance: str


@dataclass(frozen=True)
class Rule:
    """One row of a rule table: when ``when`` holds, the part's judgement is ``judgement``."""

    when: Condition
    judgement: str
    because: str


@dataclass(frozen=True)
class RuleTable:
    """One part of a domain's algorithm; rows are tried in order, the first match wins."""

    name: str
    rows: tuple[Rule, ...]


@dataclass(frozen=True)
class Domain:
    id: str
    name: str
    short_name: str
    effect: str | None
    questions: tuple[Question, ...]
    # The domain's judgement is the least favourable across its tables.
    rules: tuple[RuleTable, ...]

    def question(self, qid: str) -> Question:
        for q in self.questions:
            if q.id == qid:
                return q
        raise InputError(f"domain {self.id} has no question {qid!r}")

    def question_ids(self) -> list[str]:
        return [q.id for q in self.questions]


@dataclass(frozen=True)
class QuestionSet:
    id: str
    version: str
    title: str
    source: str
    licence: str
    domains: tuple[Domain, ...]

    def domain_ids(self) -> list[str]:
        seen: list[str] = []
        for d in self.domains:
            if d.id not in seen:
                seen.append(d.id)
        return seen

    def effects(self) -> list[str]:
        """Effects of interest the set offers variants for (e.g. assignment, adhering)."""
        return [e for e in EFFECTS if any(d.effect == e for d in self.domains)]

    def domain_short_name(self, domain_id: str, effect: str | None = None) -> str:
        """A domain's short name for ``effect``; ``effect=None`` pools the variants (e.g.
        agreement over results of either effect), giving the part of their names they share."""
        if effect is not None:
            return self.domain(domain_id, effect).short_name
        names = sorted({d.short_name for d in self.domains if d.id == domain_id})
        if not names:
            self.domain(domain_id)  # raises the usual "no domain" message
        stems = {name.split(" (", 1)[0] for name in names}
        if len(names) == 1:
            return names[0]
        return stems.pop() if len(stems) == 1 else " / ".join(names)

    def domain_label(self, domain_id: str, effect: str | None = None) -> str:
        """"D2 Deviations (adhering)"-style label (see domain_short_name)."""
        return f"D{domain_id} {self.domain_short_name(domain_id, effect)}"

    def domain(self, domain_id: str, effect: str = "assignment") -> Domain:
        matches = [d for d in self.domains if d.id == domain_id]
        if not matches:
            raise InputError(
                f"question set {self.id} has no domain {domain_id!r}; "
                f"choose one of {', '.join(self.domain_ids())}"
            )
        for d in matches:
            if d.effect is None or d.effect == effect:
                return d
        offered = ", ".join(str(d.effect) for d in matches)
        raise InputError(f"domain {domain_id} has no variant for effect {effect!r}; use {offered}")

    def questions(self, effect: str = "assignment") -> list[Question]:
        return [q for did in self.domain_ids() for q in self.domain(did, effect).questions]

    def question(self, qid: str, effect: str = "assignment") -> Question:
        for q in self.questions(effect):
            if q.id == qid:
                return q
        raise InputError(f"question set {self.id} has no question {qid!r}")


# --- answer paths (used by the loader's totality proof and by tests) --------------------------


def is_asked(question: Question, answers: Mapping[str, str]) -> bool:
    """Whether ``question`` is asked given the answers to earlier questions."""
    return question.asked_if is None or question.asked_if.holds(answers)


def _leaves(condition: Condition | None) -> Iterator[AnswerIs]:
    if condition is None:
        return
    if isinstance(condition, AnswerIs):
        yield condition
    else:
        for item in condition.items:
            yield from _leaves(item)


def representative_codes(domain: Domain) -> dict[str, tuple[str, ...]]:
    """Per question, one code for each group of codes that no condition or rule tells apart.

    Every condition is built from "answer is one of these codes" tests, so two codes that sit
    in exactly the same tests behave identically everywhere; enumerating one of them is enough.
    """
    leaves = [leaf for q in domain.questions for leaf in _leaves(q.asked_if)]
    leaves += [leaf for t in domain.rules for row in t.rows for leaf in _leaves(row.when)]
    chosen: dict[str, tuple[str, ...]] = {}
    for q in domain.questions:
        tests = [leaf.codes for leaf in leaves if leaf.question == q.id]
        seen: dict[tuple[bool, ...], str] = {}
        for code in q.options:
            seen.setdefault(tuple(code in codes for codes in tests), code)
        chosen[q.id] = tuple(seen.values())
    return chosen


def answer_paths(domain: Domain, *, representatives: bool = False) -> Iterator[dict[str, str]]:
    """Every complete set of answers a reviewer can give in ``domain``, asked questions only.

    With ``representatives`` only one code of each group that no rule tells apart is used
    (the same behaviours, far fewer paths: this is what the loader's proof walks).
    """
    codes_of = (
        representative_codes(domain)
        if representatives
        else {q.id: q.options for q in domain.questions}
    )

    def walk(index: int, answers: dict[str, str]) -> Iterator[dict[str, str]]:
        if index == len(domain.questions):
            yield dict(answers)
            return
        q = domain.questions[index]
        if not is_asked(q, answers):
            yield from walk(index + 1, answers)
            return
        for code in codes_of[q.id]:
            answers[q.id] = code
            yield from walk(index + 1, answers)
            del answers[q.id]

    yield from walk(0, {})


def first_match(table: RuleTable, answers: Mapping[str, str]) -> Rule | None:
    return next((row for row in table.rows if row.when.holds(answers)), None)


# --- loading ----------------------------------------------------------------------------------


class _Problem(Exception):
    def __init__(self, entry: str, problem: str) -> None:
        super().__init__(f"{entry}: {problem}")
        self.entry = entry
        self.problem = problem


_SET_KEYS = {"id", "version", "title", "source", "licence"}
_DOMAIN_KEYS = {"id", "name", "short_name", "effect", "question", "table"}
_QUESTION_KEYS = {
    "id", "text", "short", "options", "if_applicable", "asked_if", "condition_text", "guidance",
}
_TABLE_KEYS = {"name", "row"}
_ROW_KEYS = {"when", "then", "because"}


def _check_keys(raw: Mapping, allowed: set[str], entry: str) -> None:
    unknown = sorted(set(raw) - allowed)
    if unknown:
        raise _Problem(entry, f"unknown key {unknown[0]!r} (allowed: {', '.join(sorted(allowed))})")


def _text(raw: Mapping, key: str, entry: str, *, required: bool = True) -> str:
    value = raw.get(key, "")
    if not isinstance(value, str):
        raise _Problem(f"{entry}, {key}", "must be a text string")
    if required and not value.strip():
        raise _Problem(f"{entry}, {key}", "is missing or empty")
    return value


def _table_list(raw: Mapping, key: str, entry: str) -> list[Mapping]:
    value = raw.get(key, [])
    if not isinstance(value, list) or not all(isinstance(v, dict) for v in value):
        raise _Problem(f"{entry}, {key}", f"must be a list of [[...{key}]] tables")
    return value


def _condition(
    raw: object, entry: str, earlier: Mapping[str, Question], which: str = "an earlier question"
) -> Condition:
    """Parse a condition; it may mention only questions in ``earlier``, with their options."""
    if not isinstance(raw, dict):
        raise _Problem(entry, "a condition must be a table: { q = ..., is = [...] }, { all = [...] }"
                       " or { any = [...] }")
    if set(raw) == {"q", "is"}:
        qid, codes = raw["q"], raw["is"]
        if qid not in earlier:
            raise _Problem(entry, f"refers to question {qid!r}, which is not {which} of this domain")
        if not isinstance(codes, list) or not codes:
            raise _Problem(entry, f"'is' for {qid} must be a non-empty list of response codes")
        for code in codes:
            if code not in earlier[qid].options:
                raise _Problem(entry, f"code {code!r} is not an option of question {qid} "
                               f"(its options: {', '.join(earlier[qid].options)})")
        return AnswerIs(qid, tuple(codes))
    if len(raw) == 1 and next(iter(raw)) in ("all", "any"):
        kind, items = next(iter(raw.items()))
        if not isinstance(items, list) or not items:
            raise _Problem(entry, f"'{kind}' must be a non-empty list of conditions")
        parsed = tuple(_condition(item, entry, earlier, which) for item in items)
        return Group(kind, parsed)
    raise _Problem(entry, f"a condition needs keys q and is, or one key all/any; got "
                   f"{', '.join(sorted(map(str, raw))) or 'nothing'}")


def _question(raw: Mapping, domain_id: str, entry: str, earlier: Mapping[str, Question]) -> Question:
    qid = raw.get("id")
    if not isinstance(qid, str) or not qid.startswith(f"{domain_id}."):
        raise _Problem(f"{entry}, id", f"must be a text id starting with '{domain_id}.', got {qid!r}")
    entry = f"{entry.rsplit(',', 1)[0]}, question {qid}"
    _check_keys(raw, _QUESTION_KEYS, entry)
    if qid in earlier:
        raise _Problem(entry, "question id used twice in this domain")
    options = raw.get("options")
    if not isinstance(options, list) or not options:
        raise _Problem(f"{entry}, options", "must be a non-empty list of response codes")
    for code in options:
        if code not in RESPONSE_CODES:
            raise _Problem(f"{entry}, options",
                           f"{code!r} is not a response code (use {', '.join(RESPONSE_CODES)})")
    if len(set(options)) != len(options):
        raise _Problem(f"{entry}, options", "a code is listed twice")
    if_applicable = raw.get("if_applicable", False)
    if not isinstance(if_applicable, bool):
        raise _Problem(f"{entry}, if_applicable", "must be true or false")
    if if_applicable != ("NA" in options):
        raise _Problem(f"{entry}, options", "NA must be offered exactly when if_applicable = true")
    asked_if = None
    if "asked_if" in raw:
        asked_if = _condition(raw["asked_if"], f"{entry}, asked_if", earlier)
        if not _text(raw, "condition_text", entry, required=False).strip():
            raise _Problem(f"{entry}, condition_text", "is needed when asked_if is given")
    return Question(
        id=qid,
        domain=domain_id,
        text=_text(raw, "text", entry),
        short=_text(raw, "short", entry),
        options=tuple(options),
        if_applicable=if_applicable,
        asked_if=asked_if,
        condition_text=_text(raw, "condition_text", entry, required=False),
        guidance=_text(raw, "guidance", entry),
    )


def _tables(raw_tables: list[Mapping], entry: str, questions: Mapping[str, Question]
            ) -> tuple[RuleTable, ...]:
    if not raw_tables:
        raise _Problem(f"{entry}, table", "the domain has no rule table (its algorithm)")
    tables = []
    for t_index, raw in enumerate(raw_tables, start=1):
        t_entry = f"{entry}, table {t_index}"
        _check_keys(raw, _TABLE_KEYS, t_entry)
        rows = []
        raw_rows = _table_list(raw, "row", t_entry)
        if not raw_rows:
            raise _Problem(t_entry, "has no rows")
        for r_index, raw_row in enumerate(raw_rows, start=1):
            r_entry = f"{t_entry}, row {r_index}"
            _check_keys(raw_row, _ROW_KEYS, r_entry)
            if "when" not in raw_row:
                raise _Problem(r_entry, "has no 'when' condition")
            when = _condition(raw_row["when"], f"{r_entry}, when", questions, "a question")
            then = raw_row.get("then")
            if then not in JUDGEMENT_CODES:
                raise _Problem(f"{r_entry}, then",
                               f"{then!r} is not a judgement (use {', '.join(JUDGEMENT_CODES)})")
            rows.append(Rule(when, then, _text(raw_row, "because", r_entry)))
        tables.append(RuleTable(_text(raw, "name", t_entry), tuple(rows)))
    return tuple(tables)


def _prove_total(domain: Domain, entry: str) -> None:
    """Enumerate every answer path: each must match a row of every table; nothing may be dead."""
    reached_questions: set[str] = set()
    fired: set[tuple[int, int]] = set()
    for answers in answer_paths(domain, representatives=True):
        reached_questions.update(answers)
        for t_index, table in enumerate(domain.rules, start=1):
            rule = first_match(table, answers)
            if rule is None:
                path = ", ".join(f"{k}={v}" for k, v in answers.items())
                raise _Problem(f"{entry}, table {t_index}",
                               f"no row matches the answers {path} (the table must be total)")
            fired.add((t_index, table.rows.index(rule) + 1))
    for q in domain.questions:
        if q.id not in reached_questions:
            raise _Problem(f"{entry}, question {q.id}",
                           "is never asked: its condition cannot be met by any answers")
    for t_index, table in enumerate(domain.rules, start=1):
        for r_index in range(1, len(table.rows) + 1):
            if (t_index, r_index) not in fired:
                raise _Problem(f"{entry}, table {t_index}, row {r_index}",
                               "can never apply (earlier rows or the conditions always win)")


def _domain(raw: Mapping, index: int) -> Domain:
    did = raw.get("id")
    if not isinstance(did, str) or not did.strip():
        raise _Problem(f"domain entry {index}, id", "must be a text id such as \"1\"")
    effect = raw.get("effect")
    entry = f"domain {did}" + (f" ({effect})" if effect else "")
    _check_keys(raw, _DOMAIN_KEYS, entry)
    if effect is not None and effect not in EFFECTS:
        raise _Problem(f"{entry}, effect", f"{effect!r} is not an effect (use {', '.join(EFFECTS)})")
    questions: dict[str, Question] = {}
    raw_questions = _table_list(raw, "question", entry)
    if not raw_questions:
        raise _Problem(entry, "has no questions")
    for q_index, raw_q in enumerate(raw_questions, start=1):
        q = _question(raw_q, did, f"{entry}, question entry {q_index}", questions)
        questions[q.id] = q
    domain = Domain(
        id=did,
        name=_text(raw, "name", entry),
        short_name=_text(raw, "short_name", entry),
        effect=effect,
        questions=tuple(questions.values()),
        rules=_tables(_table_list(raw, "table", entry), entry, questions),
    )
    _prove_total(domain, entry)
    return domain


def _check_variants(domains: list[Domain]) -> None:
    by_id: dict[str, list[Domain]] = {}
    for d in domains:
        by_id.setdefault(d.id, []).append(d)
    for did, variants in by_id.items():
        effects = [d.effect for d in variants]
        if len(variants) > 1 and None in effects:
            raise _Problem(f"domain {did}", "is given more than once; each variant needs an effect")
        if len(set(effects)) != len(effects):
            raise _Problem(f"domain {did}", f"effect {effects[0]!r} is given twice")


def parse_question_set(data: Mapping, where: str) -> QuestionSet:
    """Build a QuestionSet from parsed TOML ``data``; ``where`` names the file in errors."""
    try:
        _check_keys(data, {"set", "domain"}, "top level")
        head = data.get("set")
        if not isinstance(head, dict):
            raise _Problem("[set]", "the file needs a [set] table with id, version, title, source,"
                           " licence")
        _check_keys(head, _SET_KEYS, "[set]")
        raw_domains = _table_list(data, "domain", "top level")
        if not raw_domains:
            raise _Problem("top level", "the file has no [[domain]] entries")
        domains = [_domain(raw, i) for i, raw in enumerate(raw_domains, start=1)]
        _check_variants(domains)
        return QuestionSet(
            id=_text(head, "id", "[set]"),
            version=_text(head, "version", "[set]"),
            title=_text(head, "title", "[set]"),
            source=_text(head, "source", "[set]"),
            licence=_text(head, "licence", "[set]"),
            domains=tuple(domains),
        )
    except _Problem as problem:
        raise DataFileError(f"{where}: {problem.entry}: {problem.problem}") from None


def load_question_set(path: Path) -> QuestionSet:
    """Read and validate a question set file (raises DataFileError naming file, entry, problem)."""
    path = Path(path)
    try:
        raw = path.read_bytes()
    except OSError as error:
        raise DataFileError(f"{path}: cannot read the question set ({error.strerror or error})")
    try:
        data = tomllib.loads(raw.decode("utf-8"))
    except UnicodeDecodeError:
        raise DataFileError(f"{path}: not UTF-8 text; save the file as UTF-8") from None
    except tomllib.TOMLDecodeError as error:
        raise DataFileError(f"{path}: not valid TOML ({error})") from None
    return parse_question_set(data, str(path))


def _bundled_folder() -> Path:
    from robtui.paths import bundled_dir

    return bundled_dir("signalling_questions")


def available_question_sets() -> list[str]:
    """Ids of the bundled question sets (file names without .toml)."""
    folder = _bundled_folder()
    return sorted(p.stem for p in folder.glob("*.toml")) if folder.is_dir() else []


@cache
def builtin_question_set(set_id: str = "rob2-parallel") -> QuestionSet:
    """A bundled question set by id (loaded once, validated)."""
    names = available_question_sets()
    if set_id not in names:
        raise InputError(
            f"no bundled question set named {set_id!r}; available: {', '.join(names) or 'none'}"
        )
    return load_question_set(_bundled_folder() / f"{set_id}.toml")
