"""The workbench's key map: one table feeds the bindings, the help screen and the README.

Response keys (our own scheme): y Y, p PY ("probably yes"), m PN ("maybe not"), n N,
i NI ("no information"), a NA ("not applicable", only for questions asked if applicable).
"""

from __future__ import annotations

from dataclasses import dataclass

RESPONSE_KEYS: dict[str, str] = {"y": "Y", "p": "PY", "m": "PN", "n": "N", "i": "NI", "a": "NA"}

RESPONSE_NAMES: dict[str, str] = {
    "Y": "Yes",
    "PY": "Probably yes",
    "PN": "Probably no",
    "N": "No",
    "NI": "No information",
    "NA": "Not applicable",
}


DOMAIN_KEYS = "domain keys"  # the KEY_MAP row that the question set in use fills in


@dataclass(frozen=True)
class KeyHelp:
    screen: str
    keys: str
    what: str


KEY_MAP: tuple[KeyHelp, ...] = (
    KeyHelp("everywhere", "?  F1", "this help"),
    KeyHelp("everywhere", "ctrl+p", "command palette (all main actions by name)"),
    KeyHelp("everywhere", "ctrl+q", "quit (all work is already saved)"),
    KeyHelp("overview", "up/down  enter", "choose a result / open it to assess"),
    KeyHelp(
        "overview",
        "f",
        "filter by status: all, not started, draft, complete, file problems (a report missing "
        "or changed, a file unreadable), rules changed (made "
        "under older answering rules)",
    ),
    KeyHelp("overview", "v", "the lead's comparison of two reviewers (lead only)"),
    KeyHelp("overview", "e", "evidence map: studies x questions, where the prepared reports "
            "hold strong evidence and where none (t: effect, x: export csv)"),
    KeyHelp("assessment", "y p m n i a", "answer Y, PY, PN, N, NI, NA to the focused question"),
    KeyHelp("assessment", "backspace", "clear the focused question's response"),
    KeyHelp("assessment", "j / k", "next / previous question"),
    KeyHelp(  # replaced on the help screen by the keys of the study's question set
        "assessment",
        DOMAIN_KEYS,
        "go to a domain: each question set names its domains' keys (the parallel-group set: "
        "1 … 5)",
    ),
    KeyHelp("assessment", "tab", "move between the report and the questions"),
    KeyHelp(
        "assessment",
        "] / [",
        "next / previous suggested sentence for the focused question "
        "(best first, then spread over the report's sections)",
    ),
    KeyHelp(
        "assessment",
        "q",
        "attach the report's highlighted sentence, or the passage marked with v, as a quote "
        "(again: detach)",
    ),
    KeyHelp(
        "assessment",
        "v",
        "mark a passage across sentences from the highlighted one (move to its end, then q)",
    ),
    KeyHelp(
        "assessment",
        "Q",
        "quote part of the highlighted sentence or passage (shift+arrows select, enter quotes)",
    ),
    KeyHelp(
        "assessment",
        "x",
        "mark the highlighted suggestion not relevant (it does not answer the question)",
    ),
    KeyHelp(
        "assessment",
        "e",
        "write the justification of the focused answer (enter: done, ctrl+j: new line)",
    ),
    KeyHelp("assessment", "/", "search the report (enter: next match, escape: close)"),
    KeyHelp(
        "assessment", "o / O", "override the domain / overall judgement (a reason is required)"
    ),
    KeyHelp("assessment", "g", "show / hide the focused question's guidance"),
    KeyHelp(
        "assessment",
        "r / R",
        "support for the domain's judgement and its predicted direction of bias / the overall "
        "direction of bias (optional, as on the RoB 2 form)",
    ),
    KeyHelp("assessment", "s", "domain summary: answers, quotes, judgement"),
    KeyHelp("assessment", "t", "the result's effect of interest (set by the review, not here)"),
    KeyHelp("assessment", "c", "mark complete (lists what is missing) / reopen"),
    KeyHelp("assessment", "d", "next document of the study (when it has several)"),
    KeyHelp("assessment", "w", "what was planned: the result's outcome beside the registry's "
            "and protocol's (q attaches a passage to the focused question as a quote)"),
    KeyHelp("assessment", "escape", "back to the overview (from a text field: leave the field)"),
    KeyHelp("comparison", "up/down  r", "choose a result / compare another pair of reviewers"),
    KeyHelp(
        "comparison",
        "tab  shift+tab",
        "the results, the differences to settle, both sides in full (support and direction, "
        "every question; a narrow terminal shows one at a time); back",
    ),
    KeyHelp(
        "comparison",
        "a / b",
        "settle the focused difference with reviewer A's / B's answer (a note is required)",
    ),
    KeyHelp("comparison", "n", "settle it with a new answer (a note is required)"),
    KeyHelp(
        "comparison",
        "o",
        "override a consensus judgement (domain or overall) with a reason; again: change or "
        "remove it",
    ),
    KeyHelp(
        "comparison",
        "s",
        "settle a judgement's support text and predicted direction of bias (both reviewers' "
        "shown)",
    ),
    KeyHelp(
        "comparison",
        "c",
        "mark the consensus complete (nothing left to settle) / reopen it (asks first)",
    ),
    KeyHelp(
        "comparison",
        "f",
        "only the results that need the lead (stale consensus, then those to settle) / all",
    ),
    KeyHelp("comparison", "escape", "back to the overview"),
)


def domain_bindings(qset, taken: set[str]) -> dict[str, str]:
    """Key -> domain id from the question set (QuestionSet.domain_keys), leaving out keys the
    screen already uses for something else."""
    return {k: d for k, d in qset.domain_keys().items() if k not in taken}


def keys_label(keys: list[str]) -> str:
    """Domain keys for the footer: consecutive digits as a range, others after ("1-5 b")."""
    digits = [k for k in keys if k.isdigit()]
    others = [k for k in keys if not k.isdigit()]
    run = digits and [int(k) for k in digits] == list(range(int(digits[0]), int(digits[-1]) + 1))
    head = f"{digits[0]}-{digits[-1]}" if run and len(digits) > 1 else "/".join(digits)
    return " ".join(part for part in (head, "/".join(others)) if part)


def domain_key_rows(sets, taken: set[str]) -> list[KeyHelp]:
    """The help rows for the domain keys of the question sets in use (``sets``: one set on
    the assessment screen, every set of the review elsewhere), each key with its domain,
    leaving out keys the assessment screen uses for something else (``taken``)."""
    rows = []
    for qset in sets:
        keys = domain_bindings(qset, taken)
        what = "go to " + "; ".join(f"{key}: {qset.domain_label(d)}" for key, d in keys.items())
        if len(sets) > 1:
            what += f" ({qset.title})"
        rows.append(KeyHelp("assessment", keys_label(list(keys)), what))
    return rows


def key_map_for(sets, taken: set[str]) -> tuple[KeyHelp, ...]:
    """KEY_MAP with the domain-key row naming the keys of ``sets`` (see domain_key_rows)."""
    rows: list[KeyHelp] = []
    for item in KEY_MAP:
        rows += domain_key_rows(sets, taken) if item.keys == DOMAIN_KEYS and sets else [item]
    return tuple(rows)


def key_map_markdown() -> str:
    """The key map as a Markdown table (for the README)."""
    lines = ["| Where | Keys | What |", "| --- | --- | --- |"]
    lines += [f"| {k.screen} | `{k.keys}` | {k.what} |" for k in KEY_MAP]
    return "\n".join(lines) + "\n"
