"""Map report headings onto the canonical CONSORT 2010 sections and track the current section.

Canonical set: robtui.reading.document.SECTION_LABELS, after the CONSORT 2010 checklist
(Schulz KF, Altman DG, Moher D; BMJ 2010;340:c332). The heading vocabulary below is written
from experience of how trial reports title their sections (common practice, no source);
variants are caught by fuzzy matching (rapidfuzz) and then by keywords.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field

from rapidfuzz import fuzz, process

from robtui.reading.document import top_section

# Headings that name a top-level section wherever they occur (outside a structured abstract).
TOP_LEVEL: dict[str, str] = {
    "title": "title",
    "abstract": "abstract",
    "summary": "abstract",
    "introduction": "introduction",
    "background": "introduction",
    "methods": "methods",
    "method": "methods",
    "materials and methods": "methods",
    "patients and methods": "methods",
    "subjects and methods": "methods",
    "participants and methods": "methods",
    "methods and materials": "methods",
    "research design and methods": "methods",
    "study design and methods": "methods",
    "methodology": "methods",
    "methods/design": "methods",
    "methods / design": "methods",
    "method/design": "methods",
    "methods and design": "methods",
    "design and methods": "methods",
    "results": "results",
    "discussion": "discussion",
    "comment": "discussion",
    "conclusion": "discussion",
    "conclusions": "discussion",
    "references": "references",
    "bibliography": "references",
    "literature cited": "references",
    "funding": "funding",
    "role of the funding source": "funding",
    "source of funding": "funding",
    "financial support": "funding",
    "trial registration": "registration",
    "registration": "registration",
    "trial registration number": "registration",
    "trial register number": "registration",
    "protocol": "protocol",
    "trial protocol": "protocol",
    "acknowledgements": "other",
    "acknowledgments": "other",
    "competing interests": "other",
    "conflicts of interest": "other",
    "declaration of interests": "other",
    "contributors": "other",
    "author contributions": "other",
    "back matter": "other",
    "supplementary material": "other",
    "electronic supplementary material": "other",
    "data sharing": "other",
}

# Subheadings inside methods.
METHODS_SUB: dict[str, str] = {
    "trial design": "methods.trial_design",
    "study design": "methods.trial_design",
    "design": "methods.trial_design",
    "design overview": "methods.trial_design",
    "experimental design": "methods.trial_design",
    "participants": "methods.participants",
    "patients": "methods.participants",
    "subjects": "methods.participants",
    "study population": "methods.participants",
    "population": "methods.participants",
    "study sample": "methods.participants",
    "eligibility criteria": "methods.participants",
    "inclusion and exclusion criteria": "methods.participants",
    "setting": "methods.participants",
    "settings and participants": "methods.participants",
    "setting and participants": "methods.participants",
    "study design and participants": "methods.participants",
    "interventions": "methods.interventions",
    "intervention": "methods.interventions",
    "procedures": "methods.interventions",
    "treatment": "methods.interventions",
    "treatments": "methods.interventions",
    "study treatment": "methods.interventions",
    "outcomes": "methods.outcomes",
    "outcome measures": "methods.outcomes",
    "main outcome measures": "methods.outcomes",
    "endpoints": "methods.outcomes",
    "end points": "methods.outcomes",
    "study outcomes": "methods.outcomes",
    "assessments": "methods.outcomes",
    "sample size": "methods.sample_size",
    "sample size calculation": "methods.sample_size",
    "power calculation": "methods.sample_size",
    "randomisation": "methods.randomisation",
    "randomisation and masking": "methods.randomisation",
    "randomisation and blinding": "methods.randomisation",
    "randomisation and allocation": "methods.randomisation",
    "sequence generation": "methods.randomisation.sequence_generation",
    "random sequence generation": "methods.randomisation.sequence_generation",
    "allocation concealment": "methods.randomisation.allocation_concealment",
    "allocation concealment mechanism": "methods.randomisation.allocation_concealment",
    "concealment of allocation": "methods.randomisation.allocation_concealment",
    "implementation": "methods.randomisation.implementation",
    "blinding": "methods.blinding",
    "masking": "methods.blinding",
    "blinding and masking": "methods.blinding",
    "statistical analysis": "methods.statistical_methods",
    "statistical methods": "methods.statistical_methods",
    "statistics": "methods.statistical_methods",
    "data analysis": "methods.statistical_methods",
    "statistical considerations": "methods.statistical_methods",
}

RESULTS_SUB: dict[str, str] = {
    "participant flow": "results.participant_flow",
    "patient flow": "results.participant_flow",
    "flow of participants": "results.participant_flow",
    "trial profile": "results.participant_flow",
    "patient disposition": "results.participant_flow",
    "recruitment": "results.recruitment",
    "baseline data": "results.baseline_data",
    "baseline characteristics": "results.baseline_data",
    "patient characteristics": "results.baseline_data",
    "participants": "results.participant_flow",
    "patients": "results.participant_flow",
    "numbers analysed": "results.numbers_analysed",
    "outcomes": "results.outcomes",
    "primary outcome": "results.outcomes",
    "secondary outcomes": "results.outcomes",
    "efficacy": "results.outcomes",
    "harms": "results.harms",
    "adverse events": "results.harms",
    "safety": "results.harms",
    "safety and tolerability": "results.harms",
}

# Keyword rules, tried in order when no vocabulary entry matches closely enough.
_METHODS_KEYWORDS: tuple[tuple[str, str], ...] = (
    (r"sequence", "methods.randomisation.sequence_generation"),
    (r"conceal", "methods.randomisation.allocation_concealment"),
    (r"random|allocation|\bbias\b", "methods.randomisation"),
    (r"blind|mask", "methods.blinding"),
    (r"sample size|power", "methods.sample_size"),
    (r"statistic|analys", "methods.statistical_methods"),
    (r"outcome|end ?point|assessment|measure|efficacy|safety|evaluation", "methods.outcomes"),
    (r"intervention|treatment|procedure|dose|drug", "methods.interventions"),
    (
        r"participant|patient|subject|population|eligib|inclusion|recruit|setting",
        "methods.participants",
    ),
    (r"design", "methods.trial_design"),
)
_RESULTS_KEYWORDS: tuple[tuple[str, str], ...] = (
    (r"flow|disposition|profile|follow-up|withdraw", "results.participant_flow"),
    (r"recruit", "results.recruitment"),
    (r"baseline|characteristic|demograph", "results.baseline_data"),
    (r"adverse|safety|harm|tolerab|side effect", "results.harms"),
    (r"analysed|analyzed", "results.numbers_analysed"),
    (r"outcome|end ?point|efficacy|response", "results.outcomes"),
)
_ANYWHERE_KEYWORDS: tuple[tuple[str, str], ...] = (
    (r"\bfunding\b|\bsponsor", "funding"),
    (r"registration|register", "registration"),
    (r"acknowledg|competing|conflict|contributor|supplementa|disclosure", "other"),
)

# Headings that sit inside a structured abstract and do not end it.
ABSTRACT_SUB = frozenset(
    [
        "background",
        "objective",
        "objectives",
        "aim",
        "aims",
        "purpose",
        "context",
        "methods",
        "method",
        "design",
        "setting",
        "settings",
        "participants",
        "patients",
        "interventions",
        "intervention",
        "measurements",
        "main",
        "outcome",
        "measures",
        "measure",
        "results",
        "findings",
        "conclusion",
        "conclusions",
        "interpretation",
        "trial",
        "registration",
        "funding",
        # also seen in journals' structured abstracts (common practice, no source)
        "population",
        "subjects",
        "importance",
        "outcomes",
        "discussion",  # protocols: Background, Methods/Design, Discussion, Trial registration
    ]
)
_ABSTRACT_PHRASES = frozenset(
    {
        "main outcome measures",
        "design setting and participants",
        "trial registration",
        "trial registration number",
        "conclusions and relevance",
        "methods and findings",
        "methodology principal findings",
        "conclusions significance",
        "what is already known on this topic",
        "what this study adds",
    }
)
# The first subheading of a structured abstract printed without an "Abstract" heading (common
# practice, no source); "Background" is left out, since it also opens an introduction.
_ABSTRACT_OPENERS = frozenset(
    {"purpose", "objective", "objectives", "aim", "aims", "context", "importance"}
)
# Past this many words, a structured abstract is over: the next top-level heading ends it.
# Our own setting, no source: chosen above the word limits journals usually set for abstracts
# (that those limits are lower is from memory).
ABSTRACT_MAX_WORDS = 450

# Lowest rapidfuzz ratio for a heading to match a vocabulary entry: our own setting, no source.
FUZZY_CUTOFF = 88.0

# A methods subheading opens a methods subsection only from these sections (a report may lack
# a "Methods" heading); met in results or discussion it names nothing canonical.
_METHODS_REACHABLE_FROM = frozenset({"methods", "front", "title", "abstract", "introduction"})

_NUMBERING = re.compile(r"^\s*(?:(?:\d+(?:\.\d+)*|[ivxlc]+|[a-h])[.)]?\s+)", re.IGNORECASE)


def normalise_heading(title: str) -> str:
    """Lower-case, no numbering or trailing punctuation, British spelling of randomisation."""
    text = _NUMBERING.sub("", title.strip())
    text = text.lower().replace("&", " and ").replace("’", "'")
    text = re.sub(r"randomi[sz]", "randomis", text)
    text = re.sub(r"analy[sz]", "analys", text)
    text = re.sub(r"[^\w\s'/-]", " ", text)
    return " ".join(text.split())


def _vocab_match(norm: str, vocab: dict[str, str]) -> str | None:
    if norm in vocab:
        return vocab[norm]
    found = process.extractOne(norm, vocab.keys(), scorer=fuzz.ratio, score_cutoff=FUZZY_CUTOFF)
    return vocab[found[0]] if found else None


def _keyword_match(norm: str, rules: tuple[tuple[str, str], ...]) -> str | None:
    for pattern, label in rules:
        if re.search(pattern, norm):
            return label
    return None


def match_heading(title: str, current: str = "front", *, keywords: bool = True) -> str | None:
    """The canonical label for heading ``title`` given the ``current`` section, or None.

    None means the heading names nothing canonical (for example "New ulcers"); the caller
    keeps the enclosing top-level section.
    """
    norm = normalise_heading(title)
    if not norm:
        return None
    top = _vocab_match(norm, TOP_LEVEL)
    if top is not None:
        return top  # top-level names switch section wherever they occur
    where = top_section(current)
    if where == "results":
        label = _vocab_match(norm, RESULTS_SUB)
        if label is None and keywords:
            label = _keyword_match(norm, _RESULTS_KEYWORDS)
        if label is not None:
            return label
    label = _vocab_match(norm, METHODS_SUB)
    if label is not None:
        if where == "results" and label == "methods.outcomes":
            return "results.outcomes"
        return label if where in _METHODS_REACHABLE_FROM else None
    if not keywords:
        return None
    label = _keyword_match(norm, _ANYWHERE_KEYWORDS)
    if label is not None:
        return label
    if where == "methods":
        return _keyword_match(norm, _METHODS_KEYWORDS)
    return None


def is_abstract_subheading(title: str) -> bool:
    """True for the headings of a structured abstract ("Objectives", "Methods", ...)."""
    norm = normalise_heading(title)
    if norm in _ABSTRACT_PHRASES:
        return True
    # "Methods/Design", the subheading of protocol abstracts in several journals
    words = norm.replace("/", " ").split()
    return all(word in ABSTRACT_SUB or word in {"and", "of", "the"} for word in words)


# Run-in headings: "Randomisation and masking. Patients were ...".
_RUN_IN_VERBS = re.compile(
    r"\b(was|were|is|are|had|have|has|did|be|been|received|showed|we|our|this|these|there)\b",
    re.IGNORECASE,
)
# Back-matter headings that run into their paragraph without a full stop: "Funding This study".
_RUN_IN_BARE = (
    "role of the funding source",
    "competing interests",
    "trial registration",
    "funding",
    "registration",
    "protocol",
    "data sharing",
    "acknowledgements",
)


def run_in_heading(sentence: str, current: str) -> str | None:
    """The label of a run-in heading ending in a full stop or colon, else None."""
    stripped = sentence.strip()
    if not stripped or stripped[-1] not in ".:" or len(stripped) > 60:
        return None
    words = stripped[:-1].split()
    if not 1 <= len(words) <= 7 or any(ch.isdigit() for ch in stripped):
        return None
    if not words[0][0].isupper() or _RUN_IN_VERBS.search(stripped):
        return None
    return match_heading(stripped[:-1], current)


_RUN_IN_ONLY = frozenset({"introduction", "rationale"})  # opens no abstract as a heading would


def abstract_vocabulary(prefix: str) -> bool:
    """Whether ``prefix`` names a structured abstract's subheading ("Methods", "Main outcome
    measures", "Trial registration", "Introduction"): a run-in heading when set apart."""
    norm = normalise_heading(prefix)
    if not norm or norm.split()[-1] in {"and", "of", "the"} or len(norm.split()) > 4:
        return False
    return norm in _ABSTRACT_PHRASES or norm in _RUN_IN_ONLY or is_abstract_subheading(prefix)


def bare_run_in(paragraph: str) -> str | None:
    """The label of a back-matter heading that runs into its paragraph without a stop."""
    lowered = paragraph.lower()
    for phrase in _RUN_IN_BARE:
        if lowered.startswith(phrase + " ") and len(paragraph) > len(phrase) + 1:
            following = paragraph[len(phrase) + 1 :]
            if following[:1].isupper():
                return TOP_LEVEL.get(phrase)
    return None


def joined_abstract_subheading(title: str) -> str | None:
    """For one heading that joins the abstract's own heading to its first subheading
    ("Abstract Objectives", "Summary Background", "Abstract OBJECTIVES:"), that subheading;
    else None. Two short heading lines in a row read as one heading in a PDF column."""
    words = title.split()
    if len(words) < 2 or TOP_LEVEL.get(normalise_heading(words[0])) != "abstract":
        return None
    rest = " ".join(words[1:])
    norm = normalise_heading(rest)
    if not norm or norm.split()[0] in {"and", "of", "the"}:  # "Summary of the findings"
        return None
    return rest if is_abstract_subheading(rest) else None


# Top-level names that open a section again in an article of several studies (a feasibility
# study, then the trial, each with its own methods and results), printed on one heading line
# with the first subheading: "METHODS Recruitment and randomisation".
_REOPENING = frozenset({"methods", "method", "results", "discussion"})


def joined_top_subheading(title: str) -> tuple[str, str] | None:
    """For one heading that joins a top-level name to its first subheading ("METHODS
    Recruitment and randomisation", "Results Participant flow"), (top-level label, subheading);
    else None. The name must be set apart: in capitals, or followed by a capitalised word."""
    words = title.split()
    if len(words) < 2:
        return None
    first = normalise_heading(words[0])
    if first not in _REOPENING:
        return None
    rest = " ".join(words[1:])
    if not (words[0].isupper() or words[1][:1].isupper()):
        return None
    norm = normalise_heading(rest)
    if not norm or norm.split()[0] in {"and", "of", "the", "for", "in", "on", "from", "to"}:
        return None
    return TOP_LEVEL[first], rest


@dataclass
class SectionTracker:
    """Follows the headings of a document and says which section the text is in."""

    current: str = "front"
    in_abstract: bool = False
    abstract_words: int = 0
    abstract_headings: set[str] = field(default_factory=set)
    seen_top: set[str] = field(default_factory=set)

    def heading(self, title: str) -> str:
        """Take a heading; return the section the heading itself belongs to."""
        norm = normalise_heading(title)
        if (
            self.in_abstract
            and norm in _RUN_IN_ONLY
            and not self.abstract_words
            and not self.abstract_headings
        ):
            # "Abstract" then at once "Introduction": the abstract's own first subheading.
            self.abstract_headings.add(norm)
            return self.current
        if self.in_abstract and is_abstract_subheading(title):
            ended = norm in self.abstract_headings or self.abstract_words > ABSTRACT_MAX_WORDS
            if not ended:
                self.abstract_headings.add(norm)
                return self.current
            self.in_abstract = False
        joined = None if self.in_abstract else joined_abstract_subheading(title)
        if joined is None and self._opens_unlabelled_abstract(norm):
            joined = title  # "Purpose:" first on the page, with no "Abstract" above it
        label = "abstract" if joined else match_heading(title, self.current)
        reopened = None if joined or self.in_abstract else joined_top_subheading(title)
        if reopened is not None and (label is None or top_section(label) != reopened[0]):
            top, rest = reopened
            label = match_heading(rest, top) or top
            if top_section(label) != top:  # "METHODS Funding": the subheading is not in methods
                label = top
        if label is None:
            # Unknown subheading: stay in the enclosing top-level section.
            self.current = top_section(self.current)
            return self.current
        if label == "abstract":
            self.in_abstract = True
            self.abstract_words = 0
            self.abstract_headings = {normalise_heading(joined)} if joined else set()
        elif self.in_abstract and top_section(label) != "abstract":
            self.in_abstract = False
        self.current = label
        self.seen_top.add(top_section(label))
        return label

    def _opens_unlabelled_abstract(self, norm: str) -> bool:
        """A structured abstract's first subheading before any section: the abstract."""
        return (
            not self.in_abstract
            and not self.seen_top
            and top_section(self.current) in ("front", "title")
            and norm in _ABSTRACT_OPENERS
        )

    def run_in(self, label: str) -> None:
        """A run-in heading opens section ``label``."""
        if self.in_abstract:
            return
        self.current = label

    def text(self, words: int) -> str:
        """Take body text of ``words`` words; return its section."""
        if self.in_abstract:
            self.abstract_words += words
        return self.current
