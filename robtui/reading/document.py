"""The document model every reader produces and every consumer (ranker, workbench) reads.

Offsets are character offsets into ``Document.text``. For plain-text input the text is the
file's own characters, so ``text[start:end]`` of a sentence is exactly what the file holds.
"""

from __future__ import annotations

from typing import Literal, get_args

from pydantic import BaseModel, ConfigDict, Field

DOCUMENT_SCHEMA_VERSION = 1

# Canonical sections after CONSORT 2010 (Schulz, Altman, Moher; BMJ 2010;340:c332).
# Dotted names nest: "methods.randomisation.allocation_concealment" lies inside "methods".
SECTION_LABELS: tuple[str, ...] = (
    "front",
    "title",
    "abstract",
    "introduction",
    "methods",
    "methods.trial_design",
    "methods.participants",
    "methods.interventions",
    "methods.outcomes",
    "methods.sample_size",
    "methods.randomisation",
    "methods.randomisation.sequence_generation",
    "methods.randomisation.allocation_concealment",
    "methods.randomisation.implementation",
    "methods.blinding",
    "methods.statistical_methods",
    "results",
    "results.participant_flow",
    "results.recruitment",
    "results.baseline_data",
    "results.numbers_analysed",
    "results.outcomes",
    "results.harms",
    "discussion",
    "registration",
    "protocol",
    "funding",
    "references",
    "other",
)

# "figure": the text drawn in a figure (a flowchart's boxes, a chart's labels); searchable and
# quotable like a table, never prose.
BlockKind = Literal["body", "heading", "caption", "table", "figure"]
# The blocks of cells and boxes rather than sentences: never suggested as evidence.
CELL_BLOCKS: tuple[str, ...] = ("table", "figure")
DocumentKind = Literal["pdf", "txt", "md", "html", "registry"]
DOCUMENT_KINDS: tuple[str, ...] = get_args(DocumentKind)


def top_section(label: str) -> str:
    """The top-level section of a dotted label ("methods.blinding" -> "methods")."""
    return label.split(".", 1)[0]


class Sentence(BaseModel):
    model_config = ConfigDict(extra="forbid")

    index: int = Field(ge=0)
    start: int = Field(ge=0)
    end: int = Field(ge=0)
    text: str
    section: str = "other"
    block: BlockKind = "body"
    page: int | None = None  # 1-based, PDF only
    bbox: tuple[float, float, float, float] | None = None  # x0, top, x1, bottom in PDF points


class Document(BaseModel):
    model_config = ConfigDict(extra="forbid")

    schema_version: int = DOCUMENT_SCHEMA_VERSION
    path: str
    sha256: str = Field(pattern=r"^[0-9a-f]{64}$")
    kind: DocumentKind
    text: str
    sentences: list[Sentence] = Field(default_factory=list)
    pages: int | None = None
    warnings: list[str] = Field(default_factory=list)

    def sentence_at(self, offset: int) -> Sentence | None:
        """The sentence containing character ``offset``, if any."""
        for sentence in self.sentences:
            if sentence.start <= offset < sentence.end:
                return sentence
        return None
