"""Writing one result's export in a format: csv, md, html, tex (text) or svg, png, pdf (plots).

Each export holds the traffic-light table, the summary of judgements per domain, the
supporting table (every answer with its justification and quotes with page numbers), the
GRADE suggestion, and the list of studies not judged (drafts, missing assessments), so that
nothing is left out silently. Files go to the review's exports/ folder, atomically.
"""

from __future__ import annotations

import csv
import io
import unicodedata
from collections.abc import Sequence
from pathlib import Path

from robtui.core.model import JUDGEMENTS, Assessment, Consensus
from robtui.core.review_sets import review_sets
from robtui.export.palette import OUTLINE, SWATCHES, swatch
from robtui.export.safety import TEX_FONT_SETUP, csv_cell, export_path, markup, md, tex
from robtui.export.tables import OutcomeExport, build_outcome_export, column_titles
from robtui.files import write_bytes_atomic, write_text_atomic

TEXT_FORMATS = ("csv", "md", "html", "tex")
PLOT_FORMATS = ("svg", "png", "pdf")
FORMATS = TEXT_FORMATS + PLOT_FORMATS
SHARE_CODES = (*JUDGEMENTS, "incomplete")
BOM = "\ufeff"


def _quotes_text(quotes) -> str:
    return " | ".join(
        f"\u201c{q.text}\u201d" + (f" (p. {q.page})" if q.page else " (page not known)")
        for q in quotes
    )


def _title(ex: OutcomeExport) -> str:
    """Outcome, time point and effect, the effect named once (outcomes often name it)."""
    when = f", {ex.time_point}" if ex.time_point else ""
    effect = f"effect of {ex.effect}"
    named = effect.lower() in ex.outcome.lower()
    return f"{ex.outcome}{when}" + ("" if named else f" ({effect})")


def _heading(ex: OutcomeExport) -> str:
    return f"{_title(ex)}, result {ex.result_id}"


def _override_lines(ex: OutcomeExport) -> list[str]:
    """ "Study: D3 Missing outcome data: High (proposed Some concerns): reason", per override."""
    return [f"{row.study_label}: {o}" for row in ex.rows for o in row.overrides]


def _basis_words(ex: OutcomeExport) -> str:
    return "meta-analysis weight" if ex.basis == "weight" else "studies"


# -- csv ---------------------------------------------------------------------------------------
def to_csv(ex: OutcomeExport) -> dict[str, str]:
    """Two CSV files: the judgements (one row per study) and the supporting answers."""
    out = io.StringIO()
    w = csv.writer(out, lineterminator="\n")
    w.writerow(
        ["study", "label", *[h for _, h in ex.columns], "source", "weight", "overrides", "note"]
    )
    notes = _notes_by_study(ex)
    for row in ex.rows:
        w.writerow(
            [
                csv_cell(v)
                for v in (
                    row.study_id,
                    row.study_label,
                    *[_csv_judgement(row, k) for k, _ in ex.columns],
                    row.source,
                    "" if row.weight is None else f"{row.weight:g}",
                    " | ".join(row.overrides),
                    notes.get(row.study_id, ""),
                )
            ]
        )
    answers = io.StringIO()
    w = csv.writer(answers, lineterminator="\n")
    w.writerow(
        [
            "study",
            "source",
            "domain",
            "question",
            "question_text",
            "response",
            "justification",
            "quotes",
            "settled",
        ]
    )
    for s in ex.supporting:
        w.writerow(
            [
                csv_cell(v)
                for v in (
                    s.study_id,
                    s.source,
                    s.domain_id,
                    s.question_id,
                    s.question,
                    s.response,
                    s.justification,
                    _quotes_text(s.quotes),
                    s.settled,
                )
            ]
        )
    # a byte-order mark tells spreadsheets the file is UTF-8 (curly quotes, accents)
    return {"judgements.csv": BOM + out.getvalue(), "answers.csv": BOM + answers.getvalue()}


def _csv_judgement(row, key: str) -> str:
    """A cell of the judgements CSV: empty where the study's design has no such domain."""
    if key not in row.judgements:
        return ""
    return row.judgements[key] or "not judged"


def _notes_by_study(ex: OutcomeExport) -> dict[str, str]:
    notes = {}
    for problem in ex.problems:
        study, _, text = problem.partition(": ")
        notes[study] = text
    return notes


# -- markdown ----------------------------------------------------------------------------------
def to_markdown(ex: OutcomeExport, qset) -> str:
    titles = column_titles(qset, ex.effect)
    lines = [f"# Risk of bias: {md(_heading(ex))}", "", f"Review: {md(ex.review_title)}", ""]
    lines += [
        "## Judgements",
        "",
        "| Study | " + " | ".join(md(titles[k]) for k, _ in ex.columns) + " | Source |",
        "|---" * (len(ex.columns) + 2) + "|",
    ]
    for row in ex.rows:
        cells = [_md_mark(row.judgements[k]) if k in row.judgements else "" for k, _ in ex.columns]
        lines.append(f"| {md(row.study_label)} | " + " | ".join(cells) + f" | {md(row.source)} |")
    lines += ["", "Key: " + "; ".join(f"[{s.letter}] {s.label}" for s in SWATCHES.values()), ""]
    overrides = _override_lines(ex)
    if overrides:
        lines += ["## Overridden judgements", ""] + [f"- {md(o)}" for o in overrides] + [""]
    lines += _md_summary(ex, titles) + _md_grade(ex) + _md_not_judged(ex)
    lines += [
        "## Supporting table",
        "",
        "| Study | Source | Question | Answer | Justification | Quotes | Settled |",
        "|---|---|---|---|---|---|---|",
    ]
    for s in ex.supporting:
        lines.append(
            f"| {md(s.study_id)} | {md(s.source)} | {md(s.question_id)} {md(s.question)} | "
            f"{md(s.response)} | {md(s.justification)} | {md(_quotes_text(s.quotes))} | "
            f"{md(s.settled)} |"
        )
    return "\n".join(lines) + "\n"


def _md_mark(code: str | None) -> str:
    sw = swatch(code)
    return f"[{sw.letter}] {sw.label}"


def _with_coverage(ex: OutcomeExport, key: str, title: str) -> str:
    """A summary row's title, with how many studies have the domain when not all do."""
    have = ex.coverage.get(key, len(ex.rows))
    return title if have == len(ex.rows) else f"{title} ({have} of {len(ex.rows)} studies)"


def _md_summary(ex: OutcomeExport, titles) -> list[str]:
    lines = [
        f"## Summary (share of {_basis_words(ex)})",
        "",
        "| Domain | " + " | ".join(swatch(c).label for c in SHARE_CODES) + " |",
        "|---" * (len(SHARE_CODES) + 1) + "|",
    ]
    for key, _ in ex.columns:
        shares = ex.shares[key]
        lines.append(
            f"| {md(_with_coverage(ex, key, titles[key]))} | "
            + " | ".join(f"{shares[c]:.0%}" for c in SHARE_CODES)
            + " |"
        )
    return lines + [""]


def _md_grade(ex: OutcomeExport) -> list[str]:
    g = ex.grade
    rating = g.rating or "no suggestion"
    lines = [
        "## GRADE: risk of bias (suggestion)",
        "",
        f"**Suggested rating: {rating}.** {md(g.rationale)}",
        "",
        f"_{md(g.label)}_ {md(g.rule_of_thumb)}",
    ]
    lines += [f"- {md(n)}" for n in g.notes]
    return lines + [""]


def _md_not_judged(ex: OutcomeExport) -> list[str]:
    if not ex.problems:
        return ["All studies judged.", ""]
    return ["## Not judged or not final", ""] + [f"- {md(p)}" for p in ex.problems] + [""]


# -- html --------------------------------------------------------------------------------------
_CSS = """
body{font-family:system-ui,sans-serif;color:#1a1a1a;max-width:72rem;margin:2rem auto;padding:0 1rem}
table{border-collapse:separate;border-spacing:3px}
th{font-weight:600;text-align:left;padding:.2rem .5rem}
td.j{width:7.5rem;text-align:center;font-weight:600;padding:.3rem .2rem;border-radius:4px}
td.overall{outline:2px solid #1a1a1a}
td.none{border:1px dashed %(outline)s}
.bar{display:flex;width:28rem;height:1.5rem;border:1px solid #1a1a1a}
.bar span{display:flex;align-items:center;justify-content:center;font-size:.8rem;overflow:hidden}
table.support td{vertical-align:top;border-bottom:1px solid #ddd;padding:.3rem .5rem}
.grade{border-left:6px solid #3D1A4F;padding:.5rem 1rem;background:#f6f4f8}
.note{color:#444;font-size:.9rem}
"""


def to_html(ex: OutcomeExport, qset) -> str:
    titles = column_titles(qset, ex.effect)
    css = _CSS % {"outline": OUTLINE}
    styles = "".join(
        f".k-{code}{{background:{sw.fill};color:{sw.ink}}}" for code, sw in SWATCHES.items()
    )
    parts = [
        '<!DOCTYPE html><html lang="en"><head><meta charset="utf-8">',
        f"<title>Risk of bias: {markup(_title(ex))}</title><style>{css}{styles}</style></head>",
        f"<body><h1>Risk of bias: {markup(_heading(ex))}</h1>",
        f'<p class="note">Review: {markup(ex.review_title)}</p>',
        "<h2>Judgements</h2><table><tr><th>Study</th>",
    ]
    parts += [f"<th>{markup(titles[k])}</th>" for k, _ in ex.columns] + ["<th>Source</th></tr>"]
    for row in ex.rows:
        parts.append(f"<tr><th>{markup(row.study_label)}</th>")
        for key, _ in ex.columns:
            if key not in row.judgements:  # the study's design has no such domain
                parts.append('<td class="j na"></td>')
                continue
            code = row.judgements[key] or "incomplete"
            sw = swatch(code)
            extra = (" overall" if key == "overall" else "") + (
                " none" if code == "incomplete" else ""
            )
            parts.append(
                f'<td class="j k-{code}{extra}" title="{markup(sw.label)}">'
                f"{markup(sw.letter)} {markup(sw.label)}</td>"
            )
        parts.append(f'<td class="note">{markup(row.source)}</td></tr>')
    parts.append("</table>")
    overrides = _override_lines(ex)
    if overrides:
        parts.append(
            "<h2>Overridden judgements</h2><ul>"
            + "".join(f"<li>{markup(o)}</li>" for o in overrides)
            + "</ul>"
        )
    parts.append(f"<h2>Summary: share of {_basis_words(ex)} at each judgement</h2><table>")
    for key, _ in ex.columns:
        parts.append(
            f'<tr><th>{markup(_with_coverage(ex, key, titles[key]))}</th><td><div class="bar">'
        )
        for code in SHARE_CODES:
            share = ex.shares[key][code]
            if share <= 0:
                continue
            sw = swatch(code)
            label = f"{sw.letter} {share:.0%}" if share >= 0.08 else ""
            parts.append(
                f'<span class="k-{code}" style="width:{share * 100:.2f}%" '
                f'title="{markup(sw.label)} {share:.0%}">{label}</span>'
            )
        parts.append("</div></td></tr>")
    parts.append(
        '</table><p class="note">Key: '
        + "; ".join(f"{markup(s.letter)} = {markup(s.label)}" for s in SWATCHES.values())
        + "</p>"
    )
    g = ex.grade
    parts.append(
        f'<h2>GRADE: risk of bias</h2><div class="grade"><p><strong>Suggested rating: '
        f"{markup(g.rating or 'no suggestion')}</strong>. {markup(g.rationale)}</p>"
        f'<p class="note">{markup(g.label)} {markup(g.rule_of_thumb)}</p>'
        + "".join(f'<p class="note">{markup(n)}</p>' for n in g.notes)
        + "</div>"
    )
    if ex.problems:
        parts.append(
            "<h2>Not judged or not final</h2><ul>"
            + "".join(f"<li>{markup(p)}</li>" for p in ex.problems)
            + "</ul>"
        )
    parts.append(
        '<h2>Supporting table</h2><table class="support"><tr><th>Study</th>'
        "<th>Question</th><th>Answer</th><th>Justification</th><th>Quotes</th>"
        "<th>Settled</th></tr>"
    )
    for s in ex.supporting:
        quotes = "".join(
            f'<blockquote>{markup(q.text)} <span class="note">'
            f"({'p. ' + str(q.page) if q.page else 'page not known'})</span></blockquote>"
            for q in s.quotes
        )
        parts.append(
            f'<tr><td>{markup(s.study_id)}<br><span class="note">{markup(s.source)}</span></td>'
            f"<td>{markup(s.question_id)} {markup(s.question)}</td><td>{markup(s.response)}</td>"
            f"<td>{markup(s.justification)}</td><td>{quotes}</td><td>{markup(s.settled)}</td></tr>"
        )
    parts.append("</table></body></html>\n")
    return "".join(parts)


# -- tex ---------------------------------------------------------------------------------------
def brk(text: object, every: int = 12) -> str:
    """TeX for user text in a narrow column: escaped, with a break allowed inside any word
    longer than ``every`` characters, so long ids and addresses stay inside their column."""
    words = []
    for word in ("" if text is None else str(text)).split(" "):
        pieces = [word[i : i + every] for i in range(0, len(word), every)] or [""]
        words.append(r"\allowbreak{}".join(tex(p) for p in pieces))
    return " ".join(words)


def _width_units(ch: str) -> int:
    """A rough width of a character in the .tex (wide East Asian characters, and characters
    pdfLaTeX may print as a code point, count more than a Latin letter)."""
    if ord(ch) < 0x250:
        return 1
    return 2 if unicodedata.east_asian_width(ch) in "WF" else 3


def row_pieces(text: str, budget: int = 900) -> list[str]:
    """``text`` cut at spaces into pieces of about ``budget`` width units (a word longer than
    that is cut inside), each short enough for one table row on a page; at least one piece."""
    pieces, current, used = [], [], 0
    for word in (text or "").split(" "):
        size = sum(_width_units(ch) for ch in word) + 1
        if used + size > budget and current:
            pieces.append(" ".join(current))
            current, used = [], 0
        while size > budget:  # one long word (no spaces, as in CJK text)
            cut, taken = 0, 0
            while cut < len(word) and taken + _width_units(word[cut]) <= budget:
                taken += _width_units(word[cut])
                cut += 1
            pieces.append(word[:cut])
            word = word[cut:]
            size = sum(_width_units(ch) for ch in word) + 1
        current.append(word)
        used += size
    pieces.append(" ".join(current))
    return pieces


def _col(width: str, align: str = r"\raggedright") -> str:
    """A paragraph column of ``width`` (a TeX length) with its own alignment."""
    return f">{{{align}\\arraybackslash}}p{{{width}}}"


def _share(fraction: float) -> str:
    """A column width as a share of the line, less the padding either side of the column."""
    return f"\\dimexpr{fraction:.3f}\\linewidth-2\\tabcolsep\\relax"


_TEX_PREAMBLE = [
    r"\documentclass[a4paper,10pt]{article}",
    *TEX_FONT_SETUP,  # pdfLaTeX, or LuaLaTeX/XeLaTeX with fallback fonts for any Unicode
    r"\usepackage[table]{xcolor}",
    r"\usepackage{array,longtable}",
    r"\usepackage[margin=20mm]{geometry}",
    r"\setlength{\tabcolsep}{3pt}",
    r"\setlength{\LTleft}{0pt}\setlength{\LTright}{0pt}",
]


def to_tex(ex: OutcomeExport, qset) -> str:
    titles = column_titles(qset, ex.effect)
    colours = "\n".join(
        f"\\definecolor{{rt{code.replace('_', '')}}}{{HTML}}{{{sw.fill[1:]}}}"
        f"\\definecolor{{rt{code.replace('_', '')}ink}}{{HTML}}{{{sw.ink[1:]}}}"
        for code, sw in SWATCHES.items()
    )
    # Study | one narrow column per domain, a wider one for overall | Source: fills the line
    cells = len(ex.columns)
    cell, wide = "7mm", "11mm"
    rest = f"\\dimexpr\\linewidth-{cells - 1}\\dimexpr{cell}+2\\tabcolsep\\relax-{wide}\\relax"
    study = f"\\dimexpr0.55{rest}-4\\tabcolsep\\relax"
    source = f"\\dimexpr0.45{rest}-2\\tabcolsep\\relax"
    spec = (
        _col(study)
        + "".join(_col(wide if key == "overall" else cell, r"\centering") for key, _ in ex.columns)
        + _col(source)
    )
    lines = [
        *_TEX_PREAMBLE,
        colours,
        r"\begin{document}",
        r"\raggedright",
        f"\\section*{{Risk of bias: {tex(_title(ex))}}}",
        f"Review: {tex(ex.review_title)}. Result: {brk(ex.result_id)}.",
        r"\subsection*{Judgements}",
        r"{\small\begin{longtable}{" + spec + "}",
        "Study & " + " & ".join(tex(h) for _, h in ex.columns) + r" & Source \\ \hline",
        r"\endhead",
    ]
    for row in ex.rows:
        marks = []
        for key, _ in ex.columns:
            if key not in row.judgements:
                marks.append("")  # the study's design has no such domain
                continue
            code = (row.judgements[key] or "incomplete").replace("_", "")
            sw = swatch(row.judgements[key])
            marks.append(f"\\cellcolor{{rt{code}}}\\textcolor{{rt{code}ink}}{{{tex(sw.letter)}}}")
        lines.append(
            f"{brk(row.study_label)} & " + " & ".join(marks) + f" & {brk(row.source)} \\\\"
        )
    lines += [
        r"\end{longtable}}",
        r"\par\small Key: "
        + "; ".join(f"{tex(s.letter)} = {tex(s.label)}" for s in SWATCHES.values())
        + ". "
        + "; ".join(f"{tex(h)} = {tex(titles[k])}" for k, h in ex.columns if k != "overall")
        + r".\par\normalsize",
    ]
    overrides = _override_lines(ex)
    if overrides:
        lines += [r"\subsection*{Overridden judgements}", r"\begin{itemize}"]
        lines += [f"\\item {brk(o)}" for o in overrides] + [r"\end{itemize}"]
    lines += [
        f"\\subsection*{{Summary: share of {_basis_words(ex)}}}",
        r"\begin{tabular}{l" + "r" * len(SHARE_CODES) + "}",
        "Domain & " + " & ".join(tex(swatch(c).label) for c in SHARE_CODES) + r" \\ \hline",
    ]
    for key, _ in ex.columns:
        lines.append(
            tex(_with_coverage(ex, key, titles[key]))
            + " & "
            + " & ".join(tex(f"{ex.shares[key][c]:.0%}") for c in SHARE_CODES)
            + r" \\"
        )
    g = ex.grade
    lines += [
        r"\end{tabular}",
        r"\subsection*{GRADE: risk of bias (suggestion)}",
        (
            f"\\textbf{{Suggested rating: {tex(g.rating or 'no suggestion')}.}} "
            f"{tex(g.rationale)}\\par {tex(g.label)} {tex(g.rule_of_thumb)}"
        ),
    ]
    lines += [f"\\par {brk(n)}" for n in g.notes]
    if ex.problems:
        lines += [r"\subsection*{Not judged or not final}", r"\begin{itemize}"]
        lines += [f"\\item {brk(p)}" for p in ex.problems] + [r"\end{itemize}"]
    widths = (0.13, 0.25, 0.08, 0.27, 0.27)
    lines += [
        r"\subsection*{Supporting table}",
        r"{\small\begin{longtable}{" + "".join(_col(_share(w)) for w in widths) + "}",
        r"Study & Question & Answer & Justification & Quotes \\ \hline",
        r"\endhead",
    ]
    for s in ex.supporting:
        settled = f"\\newline\\emph{{Settled: {brk(s.settled)}}}" if s.settled else ""
        # A table row cannot break across pages: a long justification or long quotes go on in
        # continuation rows, so no row is taller than a page (TeX would push it off the page,
        # or stop with "Dimension too large").
        justification, quotes = row_pieces(s.justification), row_pieces(_quotes_text(s.quotes))
        count = max(len(justification), len(quotes))
        for i in range(count):
            head = (
                f"{brk(s.study_id, 6)} & {tex(s.question_id)} {brk(s.question)} & "
                f"{tex(s.response)}"
                if i == 0
                else r" & \emph{(continued)} & "
            )
            j = brk(justification[i]) if i < len(justification) else ""
            q = brk(quotes[i]) if i < len(quotes) else ""
            lines.append(f"{head} & {j}{settled if i == count - 1 else ''} & {q} \\\\")
    lines += [r"\end{longtable}}", r"\end{document}"]
    return "\n".join(lines) + "\n"


# -- writing -----------------------------------------------------------------------------------
def export_outcome(
    folder,
    qset,
    result_id: str,
    fmt: str,
    *,
    name: str | None = None,
    assessments: Sequence[Assessment] | None = None,
    consensus: Sequence[Consensus] | None = None,
    figure_width: str = "page",
) -> tuple[list[Path], OutcomeExport]:
    """Write one result's export in ``fmt`` under exports/; returns the paths and the data."""
    from robtui.errors import InputError

    if fmt not in FORMATS:
        raise InputError(f"unknown export format {fmt!r}: choose one of {', '.join(FORMATS)}")
    folder.result_or_error(result_id)
    if assessments is None:
        assessments, _ = folder.assessments()
    if consensus is None:
        consensus, _ = folder.consensus_records()
    sets = review_sets(qset)
    qset = sets.combined([s.id for s in folder.review.studies])  # names of every column
    present = {(a.reviewer, a.study_id) for a in assessments if a.result_id == result_id}
    unusable = frozenset(
        (reviewer, study.id)
        for reviewer in folder.review.reviewers
        for study in folder.review.studies
        if (reviewer, study.id) not in present
        and folder.assessment_path(reviewer, study.id, result_id).exists()
    )
    ex = build_outcome_export(folder.review, result_id, sets, assessments, consensus, unusable)
    stem = name or result_id
    written: list[Path] = []

    def put(suffix: str, data: str | bytes) -> None:
        path = export_path(folder.exports_dir, f"{stem}{suffix}", folder.root)
        if isinstance(data, bytes):
            write_bytes_atomic(path, data)
        else:
            write_text_atomic(path, data)
        written.append(path)

    if fmt == "csv":
        for suffix, text in to_csv(ex).items():
            put(f"-{suffix}", text)
    elif fmt == "md":
        put(".md", to_markdown(ex, qset))
    elif fmt == "html":
        put(".html", to_html(ex, qset))
    elif fmt == "tex":
        put(".tex", to_tex(ex, qset))
    else:
        from robtui.export.figures import figure_files

        for suffix, data in figure_files(ex, qset, fmt, figure_width).items():
            put(suffix, data)
    return written, ex
