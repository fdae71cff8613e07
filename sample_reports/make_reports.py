"""Generate the invented sample trial reports as two-column PDFs with their text versions.

Every trial, intervention, site, author and registry number here is fictional (the "Registry of
Invented Trials", ids RIT-…); no sentence is taken from a real report. Run from the repo root:

    .venv/bin/python sample_reports/make_reports.py

Each report is written as <id>.pdf (robtui.devtools.pdf_writer, reportlab) and <id>.txt (one
paragraph, heading, caption or table row per line, blocks separated by blank lines).
"""

from __future__ import annotations

import sys
from dataclasses import dataclass, field
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent))

from robtui.devtools.pdf_writer import PdfBlock, render_blocks_as_pdf
from robtui.files import write_text_atomic

JOURNAL = "Journal of Invented Clinical Trials"


@dataclass
class Trial:
    id: str
    title: str
    authors: str
    affiliation: str
    issue: str
    condition: str
    intervention: str
    comparator: str
    background: list[str]
    design: list[str]
    participants: list[str]
    interventions: list[str]
    outcomes: list[str]
    sample_size: list[str]
    randomisation: list[tuple[str, str]]  # (run-in heading or "", paragraph)
    randomisation_heading: str
    statistics: list[str]
    flow: list[str]
    baseline_table: list[list[str]]
    primary: list[str]
    secondary: list[str]
    figure_caption: str
    harms: list[str]
    discussion: list[str]
    registration: str
    funding: str
    references: list[str]
    abstract: dict[str, str]
    extra_results: list[tuple[str, list[str]]] = field(default_factory=list)
    extra_methods: list[tuple[str, list[str]]] = field(default_factory=list)
    outcome_table: list[list[str]] = field(default_factory=list)
    reviewer_meets: str = ""


def blocks(trial: Trial) -> list[tuple[str, object, bool]]:
    """(kind, text or rows, full width) in reading order."""
    out: list[tuple[str, object, bool]] = [
        ("title", trial.title, True),
        ("authors", trial.authors, True),
        ("authors", trial.affiliation, True),
        ("heading", "Abstract", True),
    ]
    for head, text in trial.abstract.items():
        out.append(("para", f"{head}: {text}", True))
    out.append(("heading", "Introduction", False))
    out += [("para", p, False) for p in trial.background]
    out.append(("heading", "Methods", False))
    for head, paras in (
        ("Study design", trial.design),
        ("Participants", trial.participants),
        ("Interventions", trial.interventions),
        ("Outcomes", trial.outcomes),
        ("Sample size", trial.sample_size),
    ):
        out.append(("heading", head, False))
        out += [("para", p, False) for p in paras]
    for head, paras in trial.extra_methods:
        out.append(("heading", head, False))
        out += [("para", p, False) for p in paras]
    out.append(("heading", trial.randomisation_heading, False))
    for run_in, para in trial.randomisation:
        out.append(("para", f"{run_in}. {para}" if run_in else para, False))
    out.append(("heading", "Statistical analysis", False))
    out += [("para", p, False) for p in trial.statistics]
    out.append(("heading", "Results", False))
    out.append(("heading", "Participant flow", False))
    out += [("para", p, False) for p in trial.flow]
    out.append(("caption", "Table 1. Baseline characteristics by randomised group.", False))
    out.append(("table", trial.baseline_table, False))
    out.append(("heading", "Primary outcome", False))
    out += [("para", p, False) for p in trial.primary]
    out.append(("figure", "", False))
    out.append(("caption", trial.figure_caption, False))
    out.append(("heading", "Secondary outcomes", False))
    out += [("para", p, False) for p in trial.secondary]
    if trial.outcome_table:
        out.append(
            ("caption", "Table 2. Primary and secondary outcomes at the final visit.", False)
        )
        out.append(("table", trial.outcome_table, False))
    for head, paras in trial.extra_results:
        out.append(("heading", head, False))
        out += [("para", p, False) for p in paras]
    out.append(("heading", "Adverse events", False))
    out += [("para", p, False) for p in trial.harms]
    out.append(("heading", "Discussion", False))
    out += [("para", p, False) for p in trial.discussion]
    out.append(("heading", "Registration", False))
    out.append(("para", trial.registration, False))
    out.append(("heading", "Funding", False))
    out.append(("para", trial.funding, False))
    out.append(("heading", "References", False))
    out += [("para", f"{i}. {ref}", False) for i, ref in enumerate(trial.references, start=1)]
    return out


def as_text(trial: Trial) -> str:
    lines = []
    for kind, content, _full in blocks(trial):
        if kind == "figure":
            continue
        if kind == "table":
            lines.append("\n".join(" | ".join(row) for row in content))  # type: ignore[union-attr]
        else:
            lines.append(str(content))
    return "\n\n".join(lines) + "\n"


def as_pdf(trial: Trial, out: Path) -> int:
    pdf_blocks = []
    for kind, content, full in blocks(trial):
        if kind == "table":
            pdf_blocks.append(PdfBlock("table", rows=content, full_width=full))  # type: ignore[arg-type]
        else:
            pdf_blocks.append(PdfBlock(kind, str(content), full_width=full))  # type: ignore[arg-type]
    header = f"{JOURNAL} · {trial.issue} · invented sample report"
    return render_blocks_as_pdf(pdf_blocks, out, header=header, title=trial.title)


def main() -> int:
    from trials import TRIALS  # the invented reports, beside this script

    lines = ["# Sample reports (invented)", ""]
    for trial in TRIALS:
        pages = as_pdf(trial, HERE / f"{trial.id}.pdf")
        write_text_atomic(HERE / f"{trial.id}.txt", as_text(trial))
        print(f"{trial.id}: {pages} pages")
        lines.append(f"- `{trial.id}` ({pages} pages): {trial.reviewer_meets}")
    lines += [
        "",
        "- `registry/` and `protocols/`: invented registry records (WHO ICTRP XML export layout) and",
        "  protocols for ALDER (registered before enrolment, outcomes as planned), CEDAR (registered after",
        "  enrolment began; one reported outcome not pre-specified) and ELM (two saved versions of the",
        "  record: the primary outcome switched after enrolment began; one secondary outcome dropped)",
        "",
        "All trials, interventions, sites, authors and registry numbers are fictional.",
        "Regenerate with `.venv/bin/python sample_reports/make_reports.py`.",
        "",
    ]
    write_text_atomic(HERE / "README.md", "\n".join(lines))
    return 0


if __name__ == "__main__":
    sys.path.insert(0, str(HERE))
    raise SystemExit(main())
