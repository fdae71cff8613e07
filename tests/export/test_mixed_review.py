"""A review mixing parallel-group, cluster-randomised and crossover trials.

Each study is assessed with its design's question set; agreement per domain counts only the
studies whose set has the domain; the traffic-light table has the extra domains' columns with
no cell for studies without them; the summary shares, supporting table and GRADE suggestion
follow the same rule.
"""

from __future__ import annotations

import csv
import io

import pytest

from robtui.benchmarks.review import answer_everything
from robtui.core import assessing
from robtui.core.comparison import pair_assessments, review_agreement
from robtui.core.model import ResultSpec, Review, Study
from robtui.core.review_sets import ReviewSets, merged_order
from robtui.export.tables import build_outcome_export, column_titles
from robtui.export.writers import to_csv, to_html, to_markdown, to_tex
from robtui.store.question_sets import builtin_question_set

PARALLEL = builtin_question_set("rob2-parallel")
CLUSTER = builtin_question_set("rob2-cluster")
CROSSOVER = builtin_question_set("rob2-crossover")
DESIGNS = {"P1": PARALLEL, "C1": CLUSTER, "X1": CROSSOVER, "P2": PARALLEL}
SETS = ReviewSets(PARALLEL, DESIGNS)


def test_merged_order_keeps_every_sets_order():
    assert merged_order([["1", "2", "3"], ["1", "1b", "2", "3"], ["1", "S", "2", "3"]]) == [
        "1", "1b", "S", "2", "3",
    ]
    assert merged_order([["a", "c"], ["b", "c", "d"], ["a", "b"]]) == ["a", "b", "c", "d"]
    assert SETS.domain_ids() == ["1", "1b", "S", "2", "3", "4", "5"]
    assert SETS.domain_ids(["P1", "P2"]) == PARALLEL.domain_ids()
    assert not SETS.is_mixed(["P1", "P2"]) and SETS.is_mixed(["P1", "X1"])
    combined = SETS.combined()
    assert combined.domain_ids() == SETS.domain_ids()
    assert combined.domain("1b").name == CLUSTER.domain("1b").name
    assert combined.domain("S").name == CROSSOVER.domain("S").name
    assert SETS.combined(["P2"]) is PARALLEL
    keys = SETS.question_keys()
    assert keys[:10] == ["1.1", "1.2", "1.3", "1b.1", "1b.2", "1b.3", "S.1", "S.2", "S.3", "2.1"]
    assert keys.index("2.1a") < keys.index("2.2") < keys.index("3.1") < keys.index("3.1a")
    assert keys[-6:] == [f"adhering:2.{i}" for i in range(1, 7)]
    for qset in (PARALLEL, CLUSTER, CROSSOVER):
        assert ReviewSets(qset).question_keys() == qset.question_keys()


def _review() -> Review:
    return Review(
        title="Mixed designs",
        reviewers=["ana", "ben"],
        results=[ResultSpec(id="r", outcome="Absence", weights={"P1": 4, "C1": 3, "X1": 2,
                                                                 "P2": 1})],
        studies=[Study(id=s, label=f"{s} trial") for s in DESIGNS],
    )


def _assessment(review, study, reviewer, pick):
    qset = DESIGNS[study]
    a = assessing.new_assessment(review, study, "r", reviewer, qset)
    a = answer_everything(a, qset, pick)
    return assessing.mark_complete(a, qset)


def _first(q):
    return q.options[0]


def _last(q):
    return q.options[-1]


@pytest.fixture(scope="module")
def records():
    review = _review()
    ana = [_assessment(review, s, "ana", _first) for s in DESIGNS]
    # ben agrees except on the cluster trial's domain 1b (answers 1b.1 differently)
    ben = []
    for s in DESIGNS:
        if s == "C1":
            b = assessing.new_assessment(review, s, "r", "ben", CLUSTER)
            b = assessing.set_response(b, CLUSTER, "1b.1", "N")
            ben.append(assessing.mark_complete(answer_everything(b, CLUSTER, _first), CLUSTER))
        else:
            ben.append(_assessment(review, s, "ben", _first))
    return review, ana, ben


def test_each_study_is_judged_on_its_own_sets_domains(records):
    _review, ana, _ben = records
    keys = {a.study_id: set(a.final) for a in ana}
    assert keys["C1"] == {"1", "1b", "2", "3", "4", "5", "overall"}
    assert keys["X1"] == {"1", "S", "2", "3", "4", "5", "overall"}
    assert keys["P1"] == {"1", "2", "3", "4", "5", "overall"}


def test_agreement_counts_a_domain_only_over_studies_that_have_it(records):
    _review, ana, ben = records
    pairs = pair_assessments(ana, ben, reviewer_a="ana", reviewer_b="ben")
    stats = review_agreement(pairs, SETS)
    assert list(stats["domains"]) == ["1", "1b", "S", "2", "3", "4", "5", "overall"]
    n = {key: d["n"] for key, d in stats["domains"].items()}
    assert n == {"1": 4, "1b": 1, "S": 1, "2": 4, "3": 4, "4": 4, "5": 4, "overall": 4}
    assert stats["domains"]["1b"]["percent_agreement"] == 0.0  # Y vs N on 1b.1: low vs not low
    assert stats["domains"]["S"]["percent_agreement"] == 100.0
    qn = {key: q["n"] for key, q in stats["questions"].items()}
    assert qn["1.1"] == 4 and qn["1b.1"] == 1 and qn["S.1"] == 1
    assert qn["2.1"] == 3 and qn["2.1a"] == 1  # the cluster set asks 2.1a/2.1b instead of 2.1
    assert "1b.2" not in qn  # asked of ben only (after 1b.1 = N): in the comparison, not kappa
    # one set for all: the old call still works and knows nothing of 1b
    parallel_only = [p for p in pairs if p.study_id in ("P1", "P2")]
    assert list(review_agreement(parallel_only, PARALLEL)["domains"]) == [
        "1", "2", "3", "4", "5", "overall",
    ]


@pytest.fixture(scope="module")
def export(records):
    review, ana, _ben = records
    return build_outcome_export(review, "r", SETS, ana, [])


def test_traffic_light_rows_have_cells_only_for_their_domains(export):
    assert [k for k, _ in export.columns] == ["1", "1b", "S", "2", "3", "4", "5", "overall"]
    rows = {r.study_id: r for r in export.rows}
    assert "1b" in rows["C1"].judgements and "S" not in rows["C1"].judgements
    assert "S" in rows["X1"].judgements and "1b" not in rows["X1"].judgements
    assert not {"1b", "S"} & set(rows["P1"].judgements)
    assert all(r.judgements["overall"] for r in export.rows)
    assert export.coverage == {"1": 4, "1b": 1, "S": 1, "2": 4, "3": 4, "4": 4, "5": 4,
                               "overall": 4}


def test_summary_shares_count_only_studies_with_the_domain(export):
    rows = {r.study_id: r for r in export.rows}
    for key in ("1b", "S"):
        shares = export.shares[key]
        assert sum(shares.values()) == pytest.approx(1.0)
        owner = "C1" if key == "1b" else "X1"
        assert shares[rows[owner].judgements[key]] == pytest.approx(1.0)
    assert sum(export.shares["1"].values()) == pytest.approx(1.0)
    assert export.basis == "weight"


def test_supporting_table_uses_each_studys_questions(export):
    by_study: dict[str, set[str]] = {}
    for s in export.supporting:
        by_study.setdefault(s.study_id, set()).add(s.question_id)
    assert {"1b.1", "2.1a"} <= by_study["C1"] and "2.1" not in by_study["C1"]
    assert "S.1" in by_study["X1"] and "1b.1" not in by_study["X1"]
    assert not any(q.startswith(("1b", "S")) for q in by_study["P1"])


def test_grade_suggestion_says_the_sets_differ(records, export):
    assert any("rob2-cluster (C1)" in note and "rob2-crossover (X1)" in note
               for note in export.grade.notes)
    review, ana, _ben = records
    single = build_outcome_export(
        review.model_copy(update={"studies": review.studies[:1]}), "r", SETS, ana, []
    )
    assert not any("different question sets" in note for note in single.grade.notes)


def test_every_text_format_leaves_the_missing_domains_blank(export):
    titles = column_titles(SETS.combined(), export.effect)
    assert titles["1b"] == "D1b Recruitment timing" and titles["S"] == "DS Period and carryover"
    table = list(csv.reader(io.StringIO(to_csv(export)["judgements.csv"])))
    header, rows = table[0], {row[0]: row for row in table[1:]}
    assert header[2:10] == ["D1", "D1b", "DS", "D2", "D3", "D4", "D5", "Overall"]
    assert rows["P1"][3] == "" and rows["P1"][4] == ""
    assert rows["C1"][3] in ("low", "some_concerns", "high") and rows["C1"][4] == ""
    md = to_markdown(export, SETS.combined())
    assert "D1b Recruitment timing (1 of 4 studies)" in md
    assert "DS Period and carryover (1 of 4 studies)" in md
    p1_line = next(line for line in md.splitlines() if line.startswith("| P1 trial |"))
    assert p1_line.split(" | ")[2:4] == ["", ""]  # D1b and DS: no cell
    html = to_html(export, SETS.combined())
    assert html.count('<td class="j na"></td>') == 2 * 2 + 1 + 1  # P1, P2: 2; C1: S; X1: 1b
    tex_text = to_tex(export, SETS.combined())
    assert "D1b Recruitment timing (1 of 4 studies)" in tex_text


def test_figures_have_the_extra_columns_and_say_how_many_studies_have_them(export):
    from robtui.export.figures import figure_files

    files = figure_files(export, SETS.combined(), "svg")
    lights = files["-lights.svg"].decode()
    summary = files["-summary.svg"].decode()
    # fonts are drawn as outlines: the words sit in the SVG's text comments / ids
    for text in (lights, summary):
        assert "Bias arising from the timing of identification or recruitment" in text
        assert "Bias arising from period and carryover effects" in text
    assert "D1b (1 of 4)" in summary and "DS (1 of 4)" in summary
