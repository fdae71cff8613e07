"""Calibration report and agreement-over-review exports: content, figures, escaping, plot."""

import warnings

import pytest
from sklearn.metrics import cohen_kappa_score

from robtui.core.calibration import (
    agreement_by_batch,
    format_figure,
    pair_complete,
    round_agreement,
)
from robtui.core.comparison import AssessmentPair
from robtui.core.model import Quote
from robtui.devtools.calibration_scenario import REVIEWERS, RULE_TEXT, run_scripted_calibration
from robtui.export.agreement_trend import render_trend_plot, trend_html, trend_markdown
from robtui.export.calibration_report import (
    CalibrationReport,
    RoundFigures,
    calibration_html,
    calibration_markdown,
    rules_from_calibration,
)
from robtui.store.calibration_rounds import load_round
from robtui.store.question_sets import builtin_question_set

QSET = builtin_question_set()
NAMES = {d: QSET.domain(d).name for d in QSET.domain_ids()}
EVIL = '<script>alert("x")</script> | & done'


@pytest.fixture(scope="module")
def scenario(tmp_path_factory):
    return run_scripted_calibration(tmp_path_factory.mktemp("rep") / "review")


def _with_evil_text(r):
    """A copy of round ``r`` whose first pair's justifications and quote text are hostile."""
    p = r.pairs[0]
    answers = dict(p.a.answers)
    quote = Quote(document_sha256="0" * 64, start=0, end=9, page=3, text="<i>Blinded</i> assessors")
    answers["4.4"] = answers["4.4"].model_copy(update={"justification": EVIL, "quotes": [quote]})
    a = p.a.model_copy(update={"answers": answers})
    first = AssessmentPair(p.study_id, p.result_id, p.reviewer_a, p.reviewer_b, a, p.b)
    return type(r)(**{**r.__dict__, "pairs": (first, *r.pairs[1:])})


def _report(folder, book, before_round=1, after_round=2, evil=False):
    after = load_round(folder.root, after_round)
    before = load_round(folder.root, before_round) if before_round else None
    if evil and before is not None:
        before = _with_evil_text(before)
    return CalibrationReport(
        review=folder.review,
        after=RoundFigures(after, round_agreement(after.pairs, QSET)),
        before=RoundFigures(before, round_agreement(before.pairs, QSET)) if before else None,
        rules=book,
        domain_names=NAMES,
    )


def _sk(pairs):
    a, b = zip(*pairs)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return cohen_kappa_score(a, b)


def test_markdown_report_holds_set_rounds_figures_rules_and_sources(scenario):
    folder, book = scenario
    text = calibration_markdown(_report(folder, book))
    for study in ("S1", "S2", "S3", "S4", "S5"):
        assert f"| {study} | Corvane trial {study[1]} |" in text
    assert "S5 / mort: ben: draft, not marked complete" in text  # listed, not dropped
    assert "| 1 | 2026-03-03T09:00:00Z | v0 | v0 x8 | 4 | 1 |" in text
    assert "| 2 | 2026-03-04T09:00:00Z | v1 | v1 x8 | 4 | 1 |" in text
    # domain 4 row: before and after kappas equal scikit-learn's on the same pairs
    r1, r2 = load_round(folder.root, 1), load_round(folder.root, 2)
    k1 = _sk([(p.a.final["4"], p.b.final["4"]) for p in r1.pairs])
    k2 = _sk([(p.a.final["4"], p.b.final["4"]) for p in r2.pairs])
    row = next(line for line in text.splitlines() if line.startswith("| D4 "))
    cells = [c.strip() for c in row.strip("|").split("|")]
    assert cells[1:3] == ["50%", format_figure(k1)]
    assert cells[3] == "100%" and cells[4].startswith(format_figure(k2))
    # the methods name PABAK, so the table has it, for both rounds, by its definition
    head = next(line for line in text.splitlines() if line.startswith("| Domain "))
    assert "PABAK r1" in head and "PABAK r2" in head
    p_o = sum(p.a.final["4"] == p.b.final["4"] for p in r1.pairs) / len(r1.pairs)
    assert cells[6] == format_figure((3 * p_o - 1) / 2)  # Byrt, Bishop & Carlin (1993), k = 3
    # a row's notes sit in the row (degenerate kappa, few pairs), not in a pooled list
    assert "only 4 pairs" in row or "no confidence interval" in row
    # ranked disagreements: 4.4 first, both sides side by side, with a ready rule command
    ranked = text.index("## Questions ranked by disagreement (round 1)")
    assert text.index("### 4.4 ", ranked) < text.index("### 1.2 ", ranked)
    assert "| S1 / mort | N | ana: Could be influenced -> N |" in text
    assert "--question 4.4 --from-result mort" in text
    # the rule that came out of it, and the published sources
    assert [r.id for r in rules_from_calibration(_report(folder, book))] == ["R1"]
    assert RULE_TEXT in text and "outcome_type=objective, self_reported=false" in text
    assert "J Clin Epidemiol 2020;126:37-44" in text and "J Clin Epidemiol 2022;141:99-105" in text
    assert "0.16" in text and "0.42" in text


def test_single_round_report_says_so(scenario):
    folder, book = scenario
    text = calibration_markdown(_report(folder, book, before_round=None, after_round=1))
    assert "Only one round has been recorded" in text
    # rules written since that round are the ones that came out of it
    assert RULE_TEXT in text


def test_user_text_is_escaped_in_both_formats(scenario):
    folder, book = scenario
    report = _report(folder, book, evil=True)
    page = calibration_html(report)
    assert "<script>" not in page
    assert "&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; | &amp; done" in page
    text = calibration_markdown(report)
    assert "<script>" not in text.replace(r"\<script>", "")  # escaped: \<script> is text
    assert r"\<script>" in text and r"\| & done" in text  # the pipe cannot split a cell
    assert "&lt;" not in text and "&gt;" not in text and "&#x27;" not in text  # no entities
    # quotes sit beside their answer, with the page, escaped
    assert "\u201c&lt;i&gt;Blinded&lt;/i&gt; assessors\u201d (p. 3)" in page
    assert "\u201c\\<i>Blinded\\</i> assessors\u201d (p. 3)" in text
    assert page.startswith("<!DOCTYPE html>") and page.rstrip().endswith("</html>")


def test_trend_table_and_plot(scenario):
    folder, _ = scenario
    found, _ = folder.assessments()
    pairs, missing = pair_complete(found, REVIEWERS, folder.review)
    assert [m.study_id for m in missing] == ["S5"]
    batches = agreement_by_batch(pairs, QSET.domain_ids(), 2)
    text = trend_markdown(batches, NAMES, 2, title="Trend <b>")
    rows = [line for line in text.splitlines() if line.startswith("| ") and line[2].isdigit()]
    assert len(rows) == len(batches) == 2
    assert rows[0].startswith("| 1 | S1, S2 | 2 |")
    assert r"Trend \<b>" in text and "<b>" not in text.replace(r"\<b>", "")
    assert "<table>" in trend_html(batches, NAMES, 2, title="t")
    png = render_trend_plot(batches, NAMES, "png")
    assert png[:8] == b"\x89PNG\r\n\x1a\n" and len(png) > 5000
    svg = render_trend_plot(batches, NAMES, "svg").decode()
    assert "<svg" in svg and "kappa" in svg
    with pytest.raises(ValueError, match="plot format"):
        render_trend_plot(batches, NAMES, "gif")
