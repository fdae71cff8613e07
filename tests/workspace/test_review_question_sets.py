"""A question set of the review's own (DIR/question_sets/*.toml), chosen by a study's design,
taken through assess, compare, consensus and export by the commands as they are: a new variant
is a data file, with no code change (issue 15's target)."""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pytest

from robtui.cli import main
from robtui.core import algorithm
from robtui.errors import DataFileError, InputError
from robtui.paths import bundled_dir
from robtui.store.question_sets import review_catalogue
from robtui.store.review_folder import ReviewFolder
from robtui.workspace import Workspace

# An invented extra domain (not a published one): a placeholder a review team might add.
EXTRA_DOMAIN = '''
[[domain]]
id = "1x"
name = "Bias from an invented extra source (test placeholder)"
short_name = "Extra"
key = "x"

[[domain.question]]
id = "1x.1"
text = "Was the invented extra source of bias avoided?"
short = "Extra source avoided"
options = ["Y", "PY", "PN", "N", "NI"]
guidance = "Invented for a test."

[[domain.table]]
name = "Extra"

[[domain.table.row]]
when = { q = "1x.1", is = ["Y", "PY"] }
then = "low"
because = "avoided"

[[domain.table.row]]
when = { q = "1x.1", is = ["NI"] }
then = "some_concerns"
because = "no information"

[[domain.table.row]]
when = { q = "1x.1", is = ["PN", "N"] }
then = "high"
because = "not avoided"

'''


def write_extra_set(root: Path, version: str = "1") -> Path:
    """The bundled parallel set with another id, a design of its own and one extra domain."""
    text = (bundled_dir("signalling_questions") / "rob2-parallel.toml").read_text("utf-8")
    text = text.replace('id = "rob2-parallel"', 'id = "team-extra"', 1)
    text = text.replace('version = "1"', f'version = "{version}"', 1)
    text = text.replace('design = "parallel"', 'design = "stepped-wedge"', 1)
    second = text.index("\n[[domain]]\n", text.index("\n[[domain]]\n") + 1) + 1
    text = text[:second] + EXTRA_DOMAIN.lstrip() + "\n" + text[second:]
    path = root / "question_sets" / "team-extra.toml"
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(text, "utf-8")
    return path


def run(capsys, *args) -> tuple[int, str, str]:
    code = main([str(a) for a in args])
    out, err = capsys.readouterr()
    return code, out, err


@pytest.fixture()
def review(tmp_path, capsys) -> Path:
    root = tmp_path / "review"
    report = tmp_path / "report.txt"
    report.write_text("Methods. Schools were randomised in steps by a computer list.\n", "utf-8")
    assert run(capsys, "init", root, "--title", "Own set", "--lead", "lee",
               "--reviewer", "ana", "--reviewer", "ben")[0] == 0
    assert run(capsys, "result", "add", root, "--result", "R1", "--outcome", "Absence")[0] == 0
    assert run(capsys, "study", "add", root, "--study", "P1", "--label", "Parallel one",
               "--report", report)[0] == 0
    write_extra_set(root)
    code, out, err = run(capsys, "study", "add", root, "--study", "W1", "--label", "Wedge one",
                         "--report", report, "--design", "stepped-wedge")
    assert code == 0, err
    assert "design stepped-wedge" in out
    return root


def complete_answers(qset, effect: str, pick) -> dict[str, str]:
    """Answers to every question asked on the path ``pick`` (question -> code) leads along."""
    answers: dict[str, str] = {}
    for domain_id in qset.domain_ids():
        domain = qset.domain(domain_id, effect)
        while True:
            missing = [q for q in algorithm.asked_questions(domain, answers) if q.id not in answers]
            if not missing:
                break
            answers[missing[0].id] = pick(missing[0])
    return answers


def assess(capsys, root: Path, reviewer: str, study: str, answers: dict[str, str]) -> None:
    pairs = [f"{q}={c}" for q, c in answers.items()]
    code, _, err = run(capsys, "assess", root, "--reviewer", reviewer, "--study", study,
                       "--result", "R1", *pairs, "--complete")
    assert code == 0, err


def settle_one(capsys, root: Path, study: str, question: str, take: str, note: str) -> None:
    """The lead starts the consensus of result R1, settles one question and completes it."""
    target = ["--study", study, "--result", "R1"]
    assert run(capsys, "consensus", "start", root, *target)[0] == 0
    code, _, err = run(capsys, "consensus", "settle", root, *target, "--question", question,
                       "--take", take, "--note", note)
    assert code == 0, err
    code, _, err = run(capsys, "consensus", "complete", root, *target)
    assert code == 0, err


def test_an_own_set_goes_through_assess_compare_consensus_and_export(review, capsys, monkeypatch):
    ws = Workspace.open(review)
    extra = ws.question_set_for("W1")
    assert extra.id == "team-extra" and "1x" in extra.domain_ids()
    assert ws.question_set_for("P1").id == "rob2-parallel"
    assert extra.domain_keys()["x"] == "1x"

    def first(q):
        return q.options[0]

    ana = complete_answers(extra, "assignment", first)
    ben = dict(ana, **{"1x.1": "N"})  # the two reviewers differ on the new question only
    assess(capsys, review, "ana", "W1", ana)
    assess(capsys, review, "ben", "W1", ben)
    stored = ReviewFolder.open(review).load_assessment("ana", "W1", "R1")
    assert (stored.question_set, stored.question_set_version) == ("team-extra", "1")
    assert stored.final["1x"] == "low" and "1x" in stored.proposed

    monkeypatch.setenv("ROBTUI_REVIEWER", "lee")  # from here the lead asks (core/blinding.py)
    code, out, err = run(capsys, "compare", review, "--study", "W1", "--json")
    assert code == 0, err
    [pair] = json.loads(out)["pairs"]
    differing = [q["id"] for q in pair["questions"] if q["differs"]]
    assert differing == ["1x.1"]

    code, out, err = run(capsys, "agreement", review, "--json")
    assert code == 0, err
    assert "1x" in json.loads(out)["domains"] and "1x.1" in json.loads(out)["questions"]

    settle_one(capsys, review, "W1", "1x.1", "ben", "the report says steps were not concealed")
    record = json.loads((review / "consensus" / "W1--R1.json").read_text("utf-8"))
    assert record["question_set"] == "team-extra" and record["final"]["1x"] == "high"

    code, out, err = run(capsys, "export", review, "--format", "csv", "--format", "md")
    assert code == 0, err
    judgements = (review / "exports" / "R1-judgements.csv").read_text("utf-8-sig").splitlines()
    assert judgements[0].startswith("study,label,D1,D1x,D2,D3,D4,D5,Overall"), judgements[0]
    rows = {line.split(",")[0]: line.split(",") for line in judgements[1:]}
    assert rows["W1"][3] == "high" and rows["P1"][3] == ""  # no cell where a set has no 1x
    answers = (review / "exports" / "R1-answers.csv").read_text("utf-8-sig")
    assert "W1,consensus,1x,1x.1,Was the invented extra source of bias avoided?,N" in answers
    markdown = (review / "exports" / "R1.md").read_text("utf-8")
    assert "| Wedge one | [S] Some concerns | [H] High |" in markdown


def test_records_are_checked_against_their_studys_set(review, capsys):
    ws = Workspace.open(review)
    answers = complete_answers(ws.question_set_for("W1"), "assignment", lambda q: q.options[0])
    assess(capsys, review, "ana", "W1", answers)
    # The team edits the set and raises its version: the old assessment no longer fits.
    write_extra_set(review, version="2")
    ws = Workspace.open(review)
    with pytest.raises(DataFileError, match="made with question set team-extra version 1, but "
                       "the study now uses team-extra version 2"):
        ws.load_assessment("ana", "W1", "R1")
    found, problems = ws.assessments("ana")
    assert found == [] and "version 1" in problems[0]
    code, _, err = run(capsys, "assess", review, "--reviewer", "ana", "--study", "W1",
                       "--result", "R1")
    assert code == 2 and "`robtui upgrade REVIEW_DIR` shows what carrying it" in err


def test_a_design_no_set_declares_is_refused_with_the_choices(review, capsys):
    code, _, err = run(capsys, "study", "add", review, "--study", "X1", "--label", "X",
                       "--design", "factorial")
    assert code == 2
    assert "no question set or design named 'factorial'" in err
    assert "stepped-wedge" in err and "cluster" in err and "team-extra" in err
    assert ReviewFolder.open(review).review.study("X1") is None


def test_a_broken_or_clashing_own_set_is_named(review):
    bad = review / "question_sets" / "broken.toml"
    bad.write_text('[set]\nid = "broken"\n', "utf-8")
    with pytest.raises(DataFileError, match=r"broken\.toml: top level: the file has no"):
        Workspace.open(review)
    bad.unlink()
    shutil.copy(bundled_dir("signalling_questions") / "rob2-cluster.toml",
                review / "question_sets" / "copy.toml")
    with pytest.raises(DataFileError, match="is the id of a bundled set"):
        review_catalogue(review)


def test_review_toml_naming_an_unknown_design_names_the_study(review):
    path = review / "review.toml"
    path.write_text(path.read_text("utf-8").replace('design = "stepped-wedge"',
                                                    'design = "nowhere"'), "utf-8")
    with pytest.raises(DataFileError, match="study W1, design: no question set or design"):
        Workspace.open(review)
    with pytest.raises(InputError):
        review_catalogue(review).resolve("nowhere")


def test_the_ranker_is_given_the_studys_set_and_ranks_its_new_questions(review):
    """New questions have no model of their own: the transfer model (cue lexicon and wording)
    ranks them, and the workbench's report loading asks for the study's set."""
    from robtui.evidence.ranker import load_ranker
    from robtui.reading.text import document_from_text
    from robtui.tui.report_loading import load_report

    extra = Workspace.open(review).question_set_for("W1")
    ranker = load_ranker()
    assert not ranker.is_trained("1x.1")
    text = (bundled_dir("sample_reports") / "birch-knee.txt").read_text("utf-8")
    document = document_from_text(text, path="birch-knee.txt", kind="txt")
    ranked = ranker.rank(document, effect="adhering", question_set=extra)
    assert set(ranked) == {q.id for q in extra.questions("adhering")}
    assert len(ranked["1x.1"]) == 5 and ranked["1x.1"][0].score > 0
    # the same trained models serve the questions the set shares with the bundled one
    bundled = ranker.rank(document, effect="adhering")
    assert [s.sentence_index for s in ranked["2.3"]] == [s.sentence_index for s in bundled["2.3"]]
    with pytest.raises(InputError, match="unknown question id"):
        ranker.rank(document, ["1x.1"], effect="adhering")  # not a question of the default set

    folder = ReviewFolder.open(review)
    report = folder.review.study("W1").reports[0]
    loaded = load_report(folder, report, "assignment", question_set=extra)
    assert loaded.suggestions.get("1x.1")


def test_status_counts_each_study_with_its_own_set(review, capsys):
    answers = complete_answers(Workspace.open(review).question_set_for("W1"), "assignment",
                               lambda q: q.options[0])
    assess(capsys, review, "ana", "W1", answers)
    code, out, _ = run(capsys, "status", review, "--json", "--as", "ana")  # her own counts
    rows = {(r["study"], r["reviewer"]): r for r in json.loads(out)["rows"]}
    row = rows[("W1", "ana")]
    assert row["answered"] == row["asked"] == len(answers)  # 1x.1 counted too
    stored = ReviewFolder.open(review).load_assessment("ana", "W1", "R1")
    assert row["overall"] == stored.final["overall"]
    write_extra_set(review, version="2")
    code, out, _ = run(capsys, "status", review, "--json", "--as", "ana")
    data = json.loads(out)
    # a problem makes status exit 1, with --json too (nothing silent)
    assert code == 1 and any("team-extra version 1" in p for p in data["problems"])


# --- a set that declares effects of interest of its own ------------------------------------------
OWN_EFFECTS = """
[[effect]]
id = "starting"
label = "effect of starting the programme (invented for a test)"

[[effect]]
id = "sustaining"
label = "effect of keeping to the programme (invented for a test)"
"""


def write_own_effects_set(root: Path) -> Path:
    """The bundled parallel set with another id and design, its domain 2 asked for two effects
    of interest the file declares itself (invented: not RoB 2's)."""
    text = (bundled_dir("signalling_questions") / "rob2-parallel.toml").read_text("utf-8")
    text = text.replace('id = "rob2-parallel"', 'id = "team-effects"', 1)
    text = text.replace('design = "parallel"', 'design = "programme"', 1)
    text = text.replace('effect = "assignment"', 'effect = "starting"', 1)
    text = text.replace('effect = "adhering"', 'effect = "sustaining"', 1)
    path = root / "question_sets" / "team-effects.toml"
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(text + OWN_EFFECTS, "utf-8")
    return path


def test_a_set_with_effects_of_its_own_goes_through_assess_compare_consensus_and_export(
        tmp_path, capsys, monkeypatch):
    root = tmp_path / "review"
    report = tmp_path / "report.txt"
    report.write_text("Methods. Villages were randomised by a computer list.\n", "utf-8")
    assert run(capsys, "init", root, "--title", "Own effects", "--lead", "lee",
               "--reviewer", "ana", "--reviewer", "ben")[0] == 0
    write_own_effects_set(root)
    code, _, err = run(capsys, "study", "add", root, "--study", "V1", "--label", "Villages",
                       "--report", report, "--design", "programme")
    assert code == 0, err
    # No --effect: the result takes the study's set's first effect, not RoB 2's.
    assert run(capsys, "result", "add", root, "--result", "R1", "--outcome", "Uptake")[0] == 0
    assert ReviewFolder.open(root).review.result("R1").effect == "starting"
    code, _, err = run(capsys, "result", "add", root, "--result", "R2", "--outcome", "Uptake",
                       "--effect", "adhering")
    assert code == 2 and "unknown effect 'adhering': question set team-effects offers starting or sustaining" in err

    qset = Workspace.open(root).question_set_for("V1")
    assert qset.effects() == ["starting", "sustaining"]
    ana = complete_answers(qset, "starting", lambda q: q.options[0])
    ben = dict(ana, **{"2.1": "N"})
    for reviewer, answers in (("ana", ana), ("ben", ben)):
        pairs = [f"{q}={c}" for q, c in answers.items()]
        code, _, err = run(capsys, "assess", root, "--reviewer", reviewer, "--study", "V1",
                           "--result", "R1", *pairs, "--complete")
        assert code == 0, err
    stored = ReviewFolder.open(root).load_assessment("ana", "V1", "R1")
    assert stored.effect == "starting" and stored.question_set == "team-effects"

    monkeypatch.setenv("ROBTUI_REVIEWER", "lee")
    code, out, err = run(capsys, "compare", root, "--study", "V1", "--json")
    assert code == 0, err
    [pair] = json.loads(out)["pairs"]
    assert [q["id"] for q in pair["questions"] if q["differs"]] == ["2.1"]
    settle_one(capsys, root, "V1", "2.1", "ana", "the report says villagers were told")
    code, _, err = run(capsys, "export", root, "--format", "csv", "--format", "md")
    assert code == 0, err
    markdown = (root / "exports" / "R1.md").read_text("utf-8")
    assert markdown.startswith("# Risk of bias: Uptake (effect of starting), result R1")
    judgements = (root / "exports" / "R1-judgements.csv").read_text("utf-8-sig").splitlines()
    assert judgements[0].startswith("study,label,D1,D2,D3,D4,D5,Overall"), judgements[0]

    # The lead moves the result to the set's other effect; a study whose set lacks it is refused.
    code, _, err = run(capsys, "result", "set-effect", root, "--result", "R1",
                       "--effect", "sustaining", "--reviewer", "lee")
    assert code == 0, err
    assert ReviewFolder.open(root).review.result("R1").effect == "sustaining"
    code, _, err = run(capsys, "study", "add", root, "--study", "P1", "--label", "Parallel",
                       "--report", report, "--design", "parallel")
    assert code == 2 and "result R1 cannot be assessed in this study" in err
