"""The review-wide evidence map: studies x signalling questions, from the prepared suggestions.

Each cell says how strong the best suggested sentence of the study's files is for the question:
strong (calibrated score at least ``STRONG_SCORE``), some (at or above the question's
no-evidence threshold), none (below it: the ranker found nothing, which is not the same as the
report saying nothing), or not prepared yet. A lead reads it before assessing to see which
trials report poorly; it answers no question.
"""

from __future__ import annotations

import csv
import io
from dataclasses import dataclass, field

from robtui.evidence.prepared import STRONG_SCORE, load_prepared

BANDS = ("strong", "some", "none", "not prepared", "not asked")
# Our glyphs: filled for strong, hollow for some, a dot for none, a gap while not prepared, a
# dash where the study's question set has no such question.
GLYPHS = {"strong": "■", "some": "□", "none": "·", "not prepared": " ", "not asked": "–"}
BAND_WORDS = {
    "strong": f"strong evidence (best score >= {STRONG_SCORE:.2f})",
    "some": "some evidence (at or above the no-evidence threshold)",
    "none": "no sentence found (below the no-evidence threshold)",
    "not prepared": "not prepared yet",
    "not asked": "not a question of the study's question set",
}


@dataclass(frozen=True)
class MapCell:
    band: str
    best: float | None = None
    file: str = ""  # the study's file holding the best sentence
    text: str = ""  # that sentence

    @property
    def glyph(self) -> str:
        return GLYPHS[self.band]


@dataclass
class MapRow:
    study_id: str
    label: str
    cells: dict[str, MapCell] = field(default_factory=dict)


@dataclass
class EvidenceMap:
    effect: str
    questions: list[tuple[str, str]]  # (id, short wording)
    rows: list[MapRow]

    def counts(self, question_id: str) -> dict[str, int]:
        out = dict.fromkeys(BANDS, 0)
        for row in self.rows:
            out[row.cells[question_id].band] += 1
        return out

    @property
    def prepared_fraction(self) -> float:
        cells = [c for row in self.rows for c in row.cells.values() if c.band != "not asked"]
        return sum(c.band != "not prepared" for c in cells) / len(cells) if cells else 1.0


def _better(a: MapCell, b: MapCell) -> MapCell:
    if b.best is None:
        return a
    if a.best is None or b.best > a.best:
        return b
    return a


def evidence_map(folder, effect: str = "assignment", question_set=None, sets=None
                 ) -> EvidenceMap:
    """The map for ``effect`` over every study of the review (reads the caches only).

    Columns are the questions of ``question_set`` (default the review's), then those only
    other sets in use have; ``sets`` (ReviewSets) gives each study's set."""
    from robtui.store.question_sets import review_question_sets

    sets = sets or review_question_sets(folder)
    qset = question_set or sets.default
    questions = [(q.id, q.short or q.text) for q in qset.questions(effect)]
    for other in sets.in_use():
        if effect in other.effects():
            known = {qid for qid, _ in questions}
            questions += [(q.id, q.short or q.text) for q in other.questions(effect)
                          if q.id not in known]
    rows = []
    for study in folder.review.studies:
        row = MapRow(study.id, study.label)
        study_set = sets.of(study.id)
        asked = ({q.id for q in study_set.questions(effect)}
                 if effect in study_set.effects() else set())
        found = {qid: MapCell("not prepared" if qid in asked else "not asked")
                 for qid, _ in questions}
        for report in study.reports:
            entry = load_prepared(report.sha256, effect, study_set.id)
            if entry is None:
                continue
            for qid, _ in questions:
                prepared = entry.questions.get(qid)
                if prepared is None or qid not in asked:
                    continue
                top = prepared.suggestions[0] if prepared.suggestions else None
                cell = MapCell(prepared.band, prepared.best, report.path, top.text if top else "")
                current = found[qid]
                if current.band == "not prepared":
                    found[qid] = cell
                else:
                    found[qid] = _better(current, cell)
        row.cells = found
        rows.append(row)
    return EvidenceMap(effect, questions, rows)


def _groups(ids: list[str]) -> list[tuple[str, list[str]]]:
    """Question ids grouped by domain ("1.2" -> domain "1", item "2"), in order."""
    groups: list[tuple[str, list[str]]] = []
    for qid in ids:
        domain, _, item = qid.partition(".")
        if not groups or groups[-1][0] != domain:
            groups.append((domain, []))
        groups[-1][1].append(item or domain)
    return groups


def render_text(emap: EvidenceMap) -> str:
    """The map as a terminal table (fits 80 columns): a row per study, a column per question."""
    ids = [qid for qid, _ in emap.questions]
    groups = _groups(ids)
    label_width = max([len(r.study_id) for r in emap.rows] + [5])
    cell = max(2, *(len(item) + 1 for _, items in groups for item in items))
    domains = " ".join(f"D{d}".ljust(cell * len(items)) for d, items in groups)
    items = " ".join("".join(i.rjust(cell) for i in its) for _, its in groups)
    lines = [f"Evidence map ({emap.effect}): the best suggested sentence per study and question",
             "", " " * label_width + " " + domains, " " * label_width + " " + items]
    for row in emap.rows:
        parts, at = [], 0
        for _, its in groups:
            parts.append("".join(row.cells[q].glyph.rjust(cell) for q in ids[at:at + len(its)]))
            at += len(its)
        lines.append(f"{row.study_id.ljust(label_width)} " + " ".join(parts))
    lines.append("")
    for band in BANDS:
        glyph = GLYPHS[band] if band != "not prepared" else "(blank)"
        if band == "not asked" and not any(c.band == band for r in emap.rows
                                           for c in r.cells.values()):
            continue
        lines.append(f"  {glyph} {BAND_WORDS[band]}")
    lines.append("Candidates for the reviewers to read, not answers: 'none' means the ranker")
    lines.append("found nothing, not that the report says nothing.")
    return "\n".join(lines)


def to_csv(emap: EvidenceMap) -> str:
    """One row per study and question: band, best score, file and the best sentence."""
    from robtui.export.safety import csv_cell

    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow(["study", "label", "effect", "question", "band", "best_score", "file",
                     "best_sentence"])
    for row in emap.rows:
        for qid, _ in emap.questions:
            cell = row.cells[qid]
            writer.writerow([csv_cell(v) for v in (
                row.study_id, row.label, emap.effect, qid, cell.band,
                "" if cell.best is None else f"{cell.best:.4f}", cell.file, cell.text)])
    return out.getvalue()


def to_markdown(emap: EvidenceMap) -> str:
    from robtui.export.safety import md

    ids = [qid for qid, _ in emap.questions]
    lines = [f"# Evidence map ({md(emap.effect)})", "",
             "| Study | " + " | ".join(ids) + " |", "|---|" + "---|" * len(ids)]
    for row in emap.rows:
        cells = []
        for qid in ids:
            cell = row.cells[qid]
            cells.append("" if cell.best is None else f"{cell.band} {cell.best:.2f}")
        lines.append(f"| {md(row.label)} | " + " | ".join(cells) + " |")
    lines += ["", "Bands: " + "; ".join(f"{b}: {BAND_WORDS[b]}" for b in BANDS) + ".",
              ("Suggestions are candidates for the reviewers to read; 'none' means the ranker "
               "found nothing, not that the report says nothing."), ""]
    return "\n".join(lines)


EXPORT_FORMATS = {"csv": to_csv, "md": to_markdown}
