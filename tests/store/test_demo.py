"""The demo builder: layered answers, quotes located by search, both reviewers complete."""

from __future__ import annotations

import tomllib
from pathlib import Path

import pytest

from robtui.cli import main
from robtui.core import assessing
from robtui.core.algorithm import propose_all
from robtui.core.assessing import path_answers
from robtui.core.comparison import differences, pair_assessments
from robtui.core.consensus import pending_questions
from robtui.core.model import Consensus
from robtui.errors import DataFileError, InputError
from robtui.store.demo import DEMO_FILE, build_demo_review, demo_source_dir
from robtui.store.question_sets import builtin_question_set, review_question_sets
from robtui.store.quotes import report_document
from robtui.store.review_folder import ReviewFolder

QSET = builtin_question_set()

TINY_REPORT = (
    "Fernleaf tonic for invented fatigue: a randomised trial.\n"
    "Methods. A statistician generated the allocation sequence by computer.\n"
    "Allocation was concealed with a central telephone service.\n"
    "Baseline characteristics were similar between groups.\n"
)
TINY_SPEC = """
schema_version = 1
title = "Tiny invented review"
lead = "lead"
reviewers = ["ana", "ben"]

[[study]]
id = "Fern2019"
label = "Fern 2019"
files = ["fern.txt"]

[[result]]
id = "fatigue8"
outcome = "Fatigue score"
time_point = "8 weeks"
outcome_type = "subjective"

[[assessment]]
study = "Fern2019"
[assessment.answers]
"1.1" = { code = "Y", why = "computer sequence", quote = "generated the allocation sequence by computer" }
"1.2" = { code = "Y", why = "central telephone", quote = "central telephone service" }
"1.3" = { code = "N", why = "similar groups" }
"2.1" = { code = "N", why = "placebo tonic" }
"2.2" = { code = "N", why = "placebo tonic" }
"2.6" = { code = "Y", why = "all analysed as randomised" }
"3.1" = { code = "Y", why = "all followed up" }
"4.1" = { code = "N", why = "validated scale" }
"4.2" = { code = "N", why = "same scale" }
"4.3" = { code = "N", why = "participants blinded" }
"5.1" = { code = "Y", why = "registered plan" }
"5.2" = { code = "N", why = "one scale" }
"5.3" = { code = "N", why = "one analysis" }
[assessment.reviewer.ben]
"1.2" = { code = "NI", why = "how the service worked is not said" }
"2.1" = { code = "PY", why = "tonic taste may unblind" }
"2.3" = { code = "PN", why = "no sign of deviations" }
[[assessment.override]]
reviewer = "ana"
key = "4"
judgement = "some_concerns"
reason = "self-rated fatigue with a distinctive taste"
"""


@pytest.fixture
def tiny_source(tmp_path: Path) -> Path:
    source = tmp_path / "samples"
    (source / "demo").mkdir(parents=True)
    (source / "fern.txt").write_text(TINY_REPORT, encoding="utf-8")
    (source / DEMO_FILE).write_text(TINY_SPEC, encoding="utf-8")
    return source


def check_demo(folder) -> None:
    """Every assessment complete and valid, every quote equal to the report at its offsets."""
    found, problems = folder.assessments()
    assert problems == []
    expected = (
        len(folder.review.reviewers) * len(folder.review.studies) * len(folder.review.results)
    )
    assert len(found) == expected
    sets = review_question_sets(folder)  # each study's set, chosen by its design
    for a in found:
        qset = sets.of(a.study_id)
        assert (a.question_set, a.question_set_version) == (qset.id, qset.version)
        assert a.status == "complete", (a.reviewer, a.study_id, a.result_id)
        assert assessing.completion_problems(a, qset) == []
        assert assessing.recompute(a, qset).proposed == a.proposed, (
            "proposals come from the algorithm"
        )
        study = folder.review.study(a.study_id)
        for answer in a.answers.values():
            for quote in answer.quotes:
                index = next(
                    i for i, r in enumerate(study.reports) if r.sha256 == quote.document_sha256
                )
                text = report_document(folder, study, index).text
                assert text[quote.start : quote.end] == quote.text


def test_tiny_demo_builds_with_disagreements(tiny_source: Path, tmp_path: Path):
    folder = build_demo_review(tmp_path / "demo", source=tiny_source)
    check_demo(folder)
    ana = folder.load_assessment("ana", "Fern2019", "fatigue8")
    ben = folder.load_assessment("ben", "Fern2019", "fatigue8")
    assert ana.final == {"1": "low", "2": "low", "3": "low", "4": "some_concerns", "5": "low",
                         "overall": "some_concerns"}  # fmt: skip
    assert ana.overrides["4"].proposed == "low"
    # NI on concealment with no baseline imbalance: Some concerns (RoB 2 domain 1 algorithm)
    assert ben.proposed["1"] == "some_concerns"
    assert ben.answers["2.3"].response == "PN" and "2.3" not in ana.answers
    quote = ana.answers["1.1"].quotes[0]
    assert TINY_REPORT[quote.start : quote.end] == "generated the allocation sequence by computer"


def test_demo_refuses_non_empty_folder(tiny_source: Path, tmp_path: Path):
    dest = tmp_path / "busy"
    dest.mkdir()
    (dest / "keep.txt").write_text("mine", encoding="utf-8")
    with pytest.raises(InputError, match="not empty"):
        build_demo_review(dest, source=tiny_source)
    assert [p.name for p in dest.iterdir()] == ["keep.txt"]


@pytest.mark.parametrize(
    "change, message",
    [
        (('"1.3" = { code = "N", why = "similar groups" }', ""), "not answered: 1.3"),
        (("central telephone service", "a courier on a bicycle"), "quote not found"),
        (('"2.3" = { code = "PN"', '"2.3" = { code = "XX"'), "unknown response"),
        (("schema_version = 1", "schema_version = 2"), "schema_version must be 1"),
    ],
)
def test_bad_demo_description_named(tiny_source: Path, tmp_path: Path, change, message):
    spec = tiny_source / DEMO_FILE
    spec.write_text(TINY_SPEC.replace(*change), encoding="utf-8")
    with pytest.raises(DataFileError, match=message) as info:
        build_demo_review(tmp_path / "demo", source=tiny_source)
    assert str(spec) in str(info.value)


def test_demo_command_copy_to(tmp_path: Path, capsys, monkeypatch, tiny_source: Path):
    monkeypatch.setattr("robtui.store.demo.demo_source_dir", lambda: tiny_source)
    dest = tmp_path / "copy"
    assert main(["demo", "--copy-to", str(dest)]) == 0
    out = capsys.readouterr().out
    assert f"demo review built in {dest}" in out and "next: robtui " in out
    assert main(["demo", "--copy-to", str(dest)]) == 2
    assert "not empty" in capsys.readouterr().err


def test_same_demo_every_build(tmp_path: Path):
    one = build_demo_review(tmp_path / "one")
    two = build_demo_review(tmp_path / "two")
    files = sorted(p.relative_to(one.root) for p in one.root.rglob("*") if p.is_file())
    assert files == sorted(p.relative_to(two.root) for p in two.root.rglob("*") if p.is_file())
    for rel in files:
        assert (one.root / rel).read_bytes() == (two.root / rel).read_bytes(), rel


def test_failed_build_leaves_nothing(tiny_source: Path, tmp_path: Path):
    spec = tiny_source / DEMO_FILE
    spec.write_text(TINY_SPEC.replace('"5.3" = { code = "N", why = "one analysis" }', ""), "utf-8")
    with pytest.raises(DataFileError, match="not answered: 5.3"):
        build_demo_review(tmp_path / "demo", source=tiny_source)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["samples"]


def test_bundled_demo_builds_and_validates(tmp_path: Path):
    folder = build_demo_review(tmp_path / "demo")
    check_demo(folder)
    assert len(folder.review.studies) == 7
    assert len(folder.review.reviewers) == 2
    a, b = folder.review.reviewers
    differing = 0
    for study in folder.review.studies:
        for result in folder.review.results:
            x = folder.load_assessment(a, study.id, result.id)
            y = folder.load_assessment(b, study.id, result.id)
            qids = set(x.answers) | set(y.answers)
            differing += sum(
                (x.answers.get(q) and x.answers[q].response)
                != (y.answers.get(q) and y.answers[q].response)
                for q in qids
            )
    assert 3 <= differing <= 40, differing
    quotes = [q for a in folder.assessments()[0] for ans in a.answers.values() for q in ans.quotes]
    assert len(quotes) >= 30


def test_plain_demo_builds_fresh_folder_and_opens_workbench(tmp_path, capsys, monkeypatch):
    import robtui.tui.app

    calls = []
    monkeypatch.setattr("platformdirs.user_data_dir", lambda app: str(tmp_path / "data" / app))
    monkeypatch.setattr(
        robtui.tui.app,
        "run_workbench",
        lambda folder, reviewer=None: calls.append((folder, reviewer)) or 0,
    )
    assert main(["demo", "--reviewer", "tobias"]) == 0
    out = capsys.readouterr().out
    [(folder, reviewer)] = calls
    assert reviewer == "tobias"
    assert folder.parent == tmp_path / "data" / "robtui" / "demo"
    assert f"demo review built in {folder}" in out
    assert (folder / "review.toml").is_file()


# -- the lead's consensus records -------------------------------------------------------------
TINY_CONSENSUS = """
[[consensus]]
study = "Fern2019"
result = "fatigue8"
status = "complete"
[consensus.settle]
"1.2" = { take = "ana", note = "the service is named; how it worked does not change that" }
"""


TINY_NEW_ANSWER = '"2.1" = { answer = "PN", note = "the taste was matched, as the methods say" }'
TINY_CONSENSUS += TINY_NEW_ANSWER + "\n"


def _tiny_with_consensus(tiny_source: Path, text: str = TINY_CONSENSUS) -> None:
    (tiny_source / DEMO_FILE).write_text(TINY_SPEC + text, encoding="utf-8")


def test_tiny_consensus_through_the_consensus_functions(tiny_source: Path, tmp_path: Path):
    _tiny_with_consensus(tiny_source)
    folder = build_demo_review(tmp_path / "demo", source=tiny_source)
    [record], problems = folder.consensus_records()
    assert problems == []
    assert record.status == "complete" and record.lead == "lead"
    assert record.reviewers == ("ana", "ben")
    assert record.decisions["1.2"].source == "a" and record.decisions["1.2"].response == "Y"
    assert record.decisions["2.1"].source == "new" and record.decisions["2.1"].response == "PN"
    assert record.decisions["1.1"].source == "agreed"
    # 2.1 PN and 2.2 N: 2.3 is not asked (RoB 2 domain 2, effect of assignment), so ben's
    # PN on it is off the agreed path and nothing is left open.
    assert "2.3" not in path_answers(QSET, record.effect, record.answers)
    assert record.proposed == propose_all(
        QSET, record.effect, path_answers(QSET, record.effect, record.answers)
    )


@pytest.mark.parametrize(
    "change, message",
    [
        (('take = "ana"', 'take = "zoe"'), "use ana or ben"),
        (('"1.2" = { take', '"1.1" = { take'), "1.1: both reviewers gave the same answer"),
        (('"2.1" = { answer = "PN"', '"2.1" = { answer = "XX"'), "must be one of"),
        (('note = "the taste was matched, as the methods say"', 'note = ""'), "needs a note"),
        ((TINY_NEW_ANSWER, ""), "not finished: settle 2.1"),
        (('result = "fatigue8"', 'result = "fatigue9"'), "no result 'fatigue9'"),
        (('status = "complete"', 'status = "done"'), "status must be one of"),
        (('take = "ana",', 'take = "ana", answer = "Y",'), "either take"),
        (('"1.2" = { take', '"9.9" = { take'), "unknown question 9.9"),
    ],
)
def test_bad_consensus_description_named(tiny_source: Path, tmp_path: Path, change, message):
    _tiny_with_consensus(tiny_source, TINY_CONSENSUS.replace(*change))
    with pytest.raises(DataFileError, match=message) as info:
        build_demo_review(tmp_path / "demo", source=tiny_source)
    assert str(tiny_source / DEMO_FILE) in str(info.value)
    assert "consensus 1 (Fern2019" in str(info.value)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["samples"]  # nothing half-made


@pytest.fixture(scope="module")
def bundled_demo(tmp_path_factory) -> ReviewFolder:
    return build_demo_review(tmp_path_factory.mktemp("bundled") / "demo")


def test_bundled_demo_consensus_records(bundled_demo: ReviewFolder):
    folder = bundled_demo
    records, problems = folder.consensus_records()
    assert problems == []
    by_key = {(r.study_id, r.result_id): r for r in records}
    studies = [s.id for s in folder.review.studies]
    lead = folder.review.lead
    assert lead == "ines"
    sets = review_question_sets(folder)
    for study_id in studies:
        record = by_key[(study_id, "primary-itt")]
        assert record.status == "complete", study_id
        assert pending_questions(record, sets.of(study_id)) == []
    drafts = [r for r in records if r.result_id == "primary-adh"]
    assert len(drafts) == 1 and drafts[0].status == "draft"
    settled = [d for d in drafts[0].decisions.values() if d.source != "agreed"]
    assert settled and pending_questions(drafts[0], sets.of(drafts[0].study_id))  # still open
    sources = set()
    for record in records:
        qset = sets.of(record.study_id)
        path = folder.consensus_path(record.study_id, record.result_id)
        assert Consensus.model_validate_json(path.read_text(encoding="utf-8")) == record
        assert record.lead == lead
        assert record.reviewers == tuple(r for r in folder.review.reviewers if r != lead)
        agreed = path_answers(qset, record.effect, record.answers)
        assert record.proposed == propose_all(qset, record.effect, agreed), "from the algorithm"
        assert record.final == record.proposed  # no override by the lead in the demo
        pair = [
            folder.load_assessment(name, record.study_id, record.result_id)
            for name in record.reviewers
        ]
        differing = {
            q.question_id
            for q in differences(pair_assessments([pair[0]], [pair[1]]).pop(), qset)
            if q.differs
        }
        for qid, decision in record.decisions.items():
            sources.add(decision.source)
            if decision.source == "agreed":
                assert qid not in differing
                continue
            assert decision.note.strip(), (record.study_id, qid)
            if decision.source in ("a", "b"):
                side = pair[0] if decision.source == "a" else pair[1]
                taken = path_answers(qset, side.effect, side.answers).get(qid)
                assert agreed.get(qid) == taken == decision.response
            else:
                assert agreed[qid] == decision.response
        # every difference on the agreed path of a complete record was settled with a note
        if record.status == "complete":
            for qid in differing & set(agreed):
                assert record.decisions[qid].source != "agreed"
    assert sources == {"agreed", "a", "b", "new"}


def test_consensus_leaves_the_reviewers_files_unchanged(bundled_demo: ReviewFolder, tmp_path):
    import shutil

    import tomli_w

    source = tmp_path / "samples"
    shutil.copytree(demo_source_dir(), source)
    spec = tomllib.loads((source / DEMO_FILE).read_text(encoding="utf-8"))
    assert spec.pop("consensus")
    (source / DEMO_FILE).write_text(tomli_w.dumps(spec), encoding="utf-8")
    plain = build_demo_review(tmp_path / "plain", source=source)
    assert plain.consensus_records() == ([], [])

    def reviewers_files(folder):
        root = folder.root / "assessments"
        return {str(p.relative_to(root)): p.read_bytes() for p in sorted(root.rglob("*"))
                if p.is_file()}  # fmt: skip

    assert reviewers_files(bundled_demo) == reviewers_files(plain)
    assert len(reviewers_files(plain)) == 2 * 7 * 2


def test_export_of_the_demo_judges_every_study_of_primary_itt(bundled_demo, tmp_path, capsys):
    import shutil

    root = tmp_path / "demo"
    shutil.copytree(bundled_demo.root, root)
    assert main(["export", str(root), "--as", "ines", "--format", "html", "--result", "primary-itt"]) == 0
    page = (root / "exports" / "primary-itt.html").read_text(encoding="utf-8")
    assert "not judged" not in capsys.readouterr().err
    assert "· Not judged</td>" not in page and 'class="j k-incomplete' not in page
    for study in bundled_demo.review.studies:
        assert study.label in page
    # the traffic-light table's source column: every row from a complete consensus
    assert page.count('<td class="note">consensus</td>') == len(bundled_demo.review.studies)
    # the same check fails where the user still has to settle: primary-adh is mostly open
    assert main(["export", str(root), "--as", "ines", "--format", "html", "--result", "primary-adh"]) == 0
    assert "not judged" in capsys.readouterr().err
    assert "· Not judged</td>" in (root / "exports" / "primary-adh.html").read_text("utf-8")


def test_the_demo_mixes_designs_each_assessed_with_its_own_set(bundled_demo: ReviewFolder):
    """FIR is cluster-randomised and HAZEL a crossover trial: their reviewers answered the
    extra domains (1b; S), and the consensus settles a difference in each."""
    sets = review_question_sets(bundled_demo)
    designs = {s.id: s.design for s in bundled_demo.review.studies}
    assert designs["FIR2030"] == "cluster" and designs["HAZEL2031"] == "crossover"
    assert {k: v for k, v in designs.items() if v} == {"FIR2030": "cluster",
                                                        "HAZEL2031": "crossover"}
    assert sets.of("FIR2030").id == "rob2-cluster" and sets.of("HAZEL2031").id == "rob2-crossover"
    assert sets.domain_ids() == ["1", "1b", "S", "2", "3", "4", "5"]
    for reviewer in ("maren", "tobias"):
        fir = bundled_demo.load_assessment(reviewer, "FIR2030", "primary-itt")
        hazel = bundled_demo.load_assessment(reviewer, "HAZEL2031", "primary-itt")
        assert "1b" in fir.final and "S" not in fir.final
        assert "S" in hazel.final and "1b" not in hazel.final
        assert fir.answers["1b.1"].quotes and fir.answers["1b.3"].quotes
    maren = bundled_demo.load_assessment("maren", "FIR2030", "primary-itt")
    tobias = bundled_demo.load_assessment("tobias", "FIR2030", "primary-itt")
    # Parents opting out after the allocation was known (RoB 2 CRT, domain 1b algorithm):
    # selection likely knew the allocation -> high; not likely, with imbalance -> some concerns
    assert maren.final["1b"] == "high" and tobias.final["1b"] == "some_concerns"
    fir_consensus = bundled_demo.load_consensus("FIR2030", "primary-itt")
    assert fir_consensus.decisions["1b.2"].source in ("a", "b")
    assert fir_consensus.final["1b"] == "high" and fir_consensus.final["overall"] == "high"
    hazel_consensus = bundled_demo.load_consensus("HAZEL2031", "primary-itt")
    assert hazel_consensus.final["S"] == "low"
    assert bundled_demo.load_assessment("tobias", "HAZEL2031", "primary-itt").final["S"] == "high"
