"""Kinds of sentence a reviewer never quotes for some questions, told apart by their wording.

Training teaches the first two as counter-examples (training.train.Settings.pointers); the cue
lexicon's `never` lists (cues.toml) keep each kind out of the suggestions for the questions it
names (ranker.suggestible), while the reader keeps the sentence searchable and quotable.
"""

from __future__ import annotations

import re

DIGIT = re.compile(r"\d")

# The reference a figure's title or a sentence pointing to it opens with ("Figure 1", "Fig. 2:").
FIGURE_REFERENCE = re.compile(
    r"^\s*(?:supplementary\s+|additional\s+)?(?:figure|fig\.?)\s*[a-z]?\d+[a-z]?[.:]?",
    re.IGNORECASE)


def is_pointer(text: str) -> bool:
    """A sentence that only points to a figure: it opens with the reference and carries no
    number of its own ("Figure 1 Trial profile", "Figure 1 shows the trial profile."), where
    "Figure 1 shows the trial profile; 529 patients entered" reports numbers itself. Tables are
    left out on purpose: a table's rows are text a reviewer can quote, and its title names
    that evidence (training, Settings.pointers)."""
    reference = FIGURE_REFERENCE.match(text)
    return reference is not None and not DIGIT.search(text, reference.end())


# Statistical programs as methods sections name them (from memory, no source); the acronyms
# are matched in capitals only.
SOFTWARE = re.compile(
    r"\b(?:SPSS|SAS|Stata|STATA|GraphPad|Prism|Minitab|MedCalc|Epi ?Info|JMP|Statistica"
    r"|R Foundation|R Core Team|R version|(?i:statistical software|software package"
    r"|statistical package for))\b")
# What a sentence naming the program may say besides it and still say nothing of the analysis.
_SOFTWARE_FILLER = frozenset(
    ["a", "all", "an", "analyses", "analysed", "analysis", "analyzed", "and", "by", "carried", "conducted", "data", "did", "done", "for", "in", "inc", "institute", "ibm", "is", "of", "on", "out", "package", "performed", "program", "programme", "results", "science", "sciences", "social", "software", "statistical", "statistics", "the", "undertaken", "used", "using", "version", "was", "we", "were", "windows", "with"])


def is_software_statement(text: str) -> bool:
    """A sentence that only names the statistical program ("Analyses were done with Stata
    10.1.", "Statistical analysis was performed using SPSS (version 16)"): no word left once
    the program, what is in brackets and the filler of such sentences are set aside. Training
    reads it as a pointer (Settings.pointers)."""
    if not SOFTWARE.search(text):
        return False
    bare = SOFTWARE.sub(" ", re.sub(r"\([^)]*\)", " ", text))
    return all(w in _SOFTWARE_FILLER or len(w) < 2 for w in re.findall(r"[a-z]+", bare.lower()))


# Words that report blinding, and the people who analyse or monitor a trial's data (common
# trial reporting, from memory, no source).
_BLINDING = re.compile(r"\b(?:(?:un)?blind\w*|(?:un)?mask\w*|unaware|not aware|without knowledge)\b",
                       re.IGNORECASE)
_ANALYST = re.compile(r"\b(?:(?:bio)?statisticians?|(?:data )?analysts?|data managers?"
                      r"|analy[sz](?:ed|ing) (?:the )?data"
                      r"|data (?:and )?(?:safety )?monitoring (?:committee|board)s?"
                      r"|I?DMCs?|DSMBs?|steering committees?)\b", re.IGNORECASE)
# Anyone else a blinding sentence may name; a role word before "group", "allocation" and the
# like names a group, not a person ("the assigned patient group").
_OTHER_PARTY = re.compile(
    r"\b(?:patients?|participants?|subjects?|volunteers?|child(?:ren)?|parents?|mothers?"
    r"|women|men|infants?|assessors?|investigators?|physicians?|surgeons?|nurses?|staff"
    r"|clinicians?|researchers?|observers?|raters?|evaluators?|examiners?|anaest\w*|anest\w*"
    r"|therapists?|doctors?|carers?|caregivers?|personnel|pharmacists?|teachers?"
    r"|interviewers?|outcomes?|everyone|all)\b", re.IGNORECASE)
_GROUP_OF = re.compile(r"\b\w+(?:'s)? (?:groups?|allocations?|assignments?|arms?)\b", re.IGNORECASE)


def is_analyst_blinding(text: str) -> bool:
    """A sentence of blinding (or unblinding) whose only people are those who analyse or
    monitor the data ("The data were analyzed by a statistician who was not aware of the
    assigned group.", "An independent data monitoring committee reviewed unblinded safety
    data."). The signalling questions on awareness name participants, carers and people
    delivering the intervention, and outcome assessors (RoB 2, Sterne et al., BMJ
    2019;366:l4898; questions 2.1, 2.2, 4.3): an analyst's or a monitoring committee's
    blinding answers none of them. Any other party named keeps the sentence."""
    if not (_BLINDING.search(text) and _ANALYST.search(text)):
        return False
    return not _OTHER_PARTY.search(_GROUP_OF.sub(" ", text))


# Kinds of sentence that are never evidence for a question, by the names the cue lexicon's
# `never` lists use (cues.toml): such a sentence stays searchable and quotable, but is not
# suggested for the questions that name its kind (ranker.suggestible).
NOT_EVIDENCE = {
    "figure_pointer": is_pointer,
    "software_statement": is_software_statement,
    "analyst_blinding": is_analyst_blinding,
}
