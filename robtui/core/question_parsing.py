"""Question-set data (parsed TOML) -> QuestionSet, validated.

Parsing proves every rule table total: every combination of answers a reviewer can reach
matches a row, every question can be reached and every row can fire. Malformed data raises
DataFileError naming the file, the entry and the problem.
"""

from __future__ import annotations

import re
from collections.abc import Mapping

from robtui.core.question_paths import answer_paths
from robtui.core.questions import (
    EFFECT_ID_PATTERN,
    EFFECT_LABELS,
    JUDGEMENT_CODES,
    RESPONSE_CODES,
    AnswerIs,
    Condition,
    Domain,
    Group,
    Question,
    QuestionSet,
    Rule,
    RuleTable,
    first_match,
)
from robtui.errors import DataFileError


class _Problem(Exception):
    def __init__(self, entry: str, problem: str) -> None:
        super().__init__(f"{entry}: {problem}")
        self.entry = entry
        self.problem = problem


_SET_KEYS = {"id", "version", "title", "source", "licence", "design"}
_DOMAIN_KEYS = {"id", "name", "short_name", "effect", "key", "question", "table"}
_EFFECT_KEYS = {"id", "label"}
_DESIGN = re.compile(r"^[a-z][a-z0-9-]{0,31}$")
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
    if effect is not None and not _is_effect_id(effect):
        raise _Problem(f"{entry}, effect", f"{effect!r} is not an effect id ({_EFFECT_RULE})")
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
        key=_domain_key(raw, did, entry),
    )
    _prove_total(domain, entry)
    return domain


def _domain_key(raw: Mapping, domain_id: str, entry: str) -> str | None:
    """The domain's workbench key: as given, else its id when that is one character."""
    if "key" not in raw:
        return domain_id if len(domain_id) == 1 else None
    key = raw["key"]
    if not isinstance(key, str) or len(key) != 1 or not (key.isascii() and key.isalnum()):
        raise _Problem(f"{entry}, key", f"must be one letter or digit, got {key!r}")
    return key


def _check_keys_unique(domains: list[Domain]) -> None:
    owner: dict[str, str] = {}
    for d in domains:
        if d.key is None:
            continue
        if owner.setdefault(d.key, d.id) != d.id:
            raise _Problem(f"domain {d.id}, key",
                           f"{d.key!r} already goes to domain {owner[d.key]}; give each its own key")


def _effects(data: Mapping, domains: list[Domain]) -> dict[str, str]:
    """Labels of the effects of interest ([[effect]] id, label), checked against the domains."""
    labels: dict[str, str] = {}
    for index, raw in enumerate(_table_list(data, "effect", "top level"), start=1):
        entry = f"effect entry {index}"
        _check_keys(raw, _EFFECT_KEYS, entry)
        eid = raw.get("id")
        if not _is_effect_id(eid):
            raise _Problem(f"{entry}, id", f"{eid!r} is not an effect id ({_EFFECT_RULE})")
        if eid in labels:
            raise _Problem(f"{entry}, id", f"effect {eid!r} is given twice")
        labels[eid] = _text(raw, "label", entry)
    used = {d.effect for d in domains if d.effect is not None}
    if labels and not used <= set(labels):
        missing = sorted(used - set(labels))
        raise _Problem("[[effect]]", f"domains use effect {', '.join(missing)}, which has no entry")
    unnamed = sorted(used - set(labels) - set(EFFECT_LABELS))
    if unnamed:
        raise _Problem("[[effect]]", f"domains use effect {', '.join(unnamed)}: declare it with an "
                       "[[effect]] entry (id, label) so that screens and exports can name it")
    return labels


_EFFECT_RULE = "a short lower-case name: letters, digits, '-', starting with a letter"


def _is_effect_id(value: object) -> bool:
    return isinstance(value, str) and re.fullmatch(EFFECT_ID_PATTERN, value) is not None


def _design(head: Mapping) -> str | None:
    if "design" not in head:
        return None
    design = head["design"]
    if not isinstance(design, str) or not _DESIGN.match(design):
        raise _Problem("[set], design", "must be a short lower-case name such as \"cluster\" "
                       f"(letters, digits, '-'), got {design!r}")
    return design


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
        _check_keys(data, {"set", "domain", "effect"}, "top level")
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
        _check_keys_unique(domains)
        labels = _effects(data, domains)
        return QuestionSet(
            id=_text(head, "id", "[set]"),
            version=_text(head, "version", "[set]"),
            title=_text(head, "title", "[set]"),
            source=_text(head, "source", "[set]"),
            licence=_text(head, "licence", "[set]"),
            domains=tuple(domains),
            design=_design(head),
            effect_labels={**EFFECT_LABELS, **labels},
            declared_effects=tuple(labels),
        )
    except _Problem as problem:
        raise DataFileError(f"{where}: {problem.entry}: {problem.problem}") from None
