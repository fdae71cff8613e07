"""Records made with an earlier version of their question set are carried to the current one
(robtui upgrade; robtui.workspace.set_upgrades): nothing lost, judgements recomputed with the
new rules, a concurrent writer refused, and the refusal on load naming the command."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from test_review_question_sets import (  # noqa: F401  (review is a fixture)
    EXTRA_DOMAIN,
    assess,
    complete_answers,
    review,
    run,
    settle_one,
    write_extra_set,
)

from robtui.core.model import Assessment
from robtui.core.set_versions import carry_forward
from robtui.errors import DataFileError, InputError
from robtui.files import StaleFileError
from robtui.workspace import Workspace
from robtui.workspace.set_upgrades import apply_carries, plan_carries

# Version 2 of the invented extra domain: a new question 1x.2, asked when 1x.1 is NI, and
# with it a changed rule (NI alone no longer gives some concerns).
EXTRA_DOMAIN_V2 = EXTRA_DOMAIN.replace(
    '''[[domain.table]]''',
    '''[[domain.question]]
id = "1x.2"
text = "Was the invented extra source checked another way?"
short = "Checked another way"
options = ["Y", "PY", "PN", "N", "NI"]
guidance = "Invented for a test."

[[domain.table]]''',
).replace(
    '''when = { q = "1x.1", is = ["NI"] }
then = "some_concerns"
because = "no information"''',
    '''when = { all = [{ q = "1x.1", is = ["NI"] }, { q = "1x.2", is = ["Y", "PY"] }] }
then = "some_concerns"
because = "no information, checked another way"

[[domain.table.row]]
when = { all = [{ q = "1x.1", is = ["NI"] }, { q = "1x.2", is = ["PN", "N", "NI"] }] }
then = "high"
because = "no information, not checked another way"''',
)


def write_version_2(root: Path) -> None:
    path = write_extra_set(root, version="2")
    text = path.read_text("utf-8")
    assert EXTRA_DOMAIN.lstrip() in text
    path.write_text(text.replace(EXTRA_DOMAIN.lstrip(), EXTRA_DOMAIN_V2.lstrip()), "utf-8")


def first_options(qset) -> dict[str, str]:
    answers = complete_answers(qset, "assignment", lambda q: q.options[0])
    answers["1x.1"] = "NI"  # some concerns under version 1; version 2 asks 1x.2 then
    return answers


def edit(path: Path, change) -> dict:
    data = json.loads(path.read_text("utf-8"))
    change(data)
    path.write_text(json.dumps(data, indent=2), "utf-8")
    return data


@pytest.fixture()
def old_review(review, capsys, monkeypatch) -> Path:  # noqa: F811  (the imported fixture)
    """ana and ben assessed W1 under version 1 (ana with an override on 1x and an answer to a
    question no version has: a retired one), the lead settled a consensus; then the team
    raised the set to version 2."""
    answers = first_options(Workspace.open(review).question_set_for("W1"))
    assess(capsys, review, "ana", "W1", answers)
    assess(capsys, review, "ben", "W1", dict(answers, **{"1.1": "N"}))
    monkeypatch.setenv("ROBTUI_REVIEWER", "lee")  # the lead settles (core/blinding.py)
    settle_one(capsys, review, "W1", "1.1", "ana", "sequence was computer-made")
    monkeypatch.delenv("ROBTUI_REVIEWER")

    def old_style(data: dict) -> None:
        assert data["question_set_version"] == "1" and data["proposed"]["1x"] == "some_concerns"
        data["answers"]["1x.0"] = {"response": "Y", "justification": "asked in version 0",
                                   "quotes": []}
        data["overrides"]["1x"] = {"judgement": "low", "reason": "checked with the authors",
                                   "proposed": "some_concerns"}
        data["final"]["1x"] = "low"

    edit(review / "assessments" / "ana" / "W1--R1.json", old_style)
    write_version_2(review)
    return review


def test_a_version_1_record_is_carried_to_version_2_with_nothing_lost(old_review, capsys):
    path = old_review / "assessments" / "ana" / "W1--R1.json"
    before = json.loads(path.read_text("utf-8"))

    # the lead, with --unblind: every record (dry run: says, writes nothing)
    code, out, err = run(capsys, "upgrade", old_review, "--as", "lee", "--unblind")
    assert code == 0, err
    assert json.loads(path.read_text("utf-8")) == before
    assert "ana's assessment of W1 / R1 (team-extra)" in out
    assert "1x.0 = Y" in out  # the retired answer, reported
    assert "questions now asked that have no answer: 1x.2" in out
    assert "domain 1x: proposed judgement Some concerns -> Not judged" in out
    assert "domain 1x: the override is kept with its reason" in out
    assert "status complete -> draft" in out
    assert "consensus of W1 / R1" in out and "nothing written (dry run)" in out

    code, out, err = run(capsys, "upgrade", old_review, "--as", "lee", "--unblind", "--apply")
    assert code == 0, err
    assert "carried 3 record(s)" in out  # ana, ben and the consensus of W1
    ws = Workspace.open(old_review)
    carried = ws.load_assessment("ana", "W1", "R1")  # usable again
    assert carried.question_set_version == "2"
    kept = {k: v for k, v in before["answers"].items() if k != "1x.0"}
    assert {k: v.model_dump() for k, v in carried.answers.items()} == kept
    [note] = carried.set_upgrades
    assert (note.from_version, note.to_version) == ("1", "2")
    assert note.retired_answers["1x.0"].justification == "asked in version 0"
    assert note.unanswered == ["1x.2"]
    assert (note.changed["1x"].before, note.changed["1x"].after) == ("some_concerns", "incomplete")
    assert note.to_confirm == ["1x"]
    assert carried.overrides["1x"].reason == "checked with the authors"
    assert carried.proposed["1x"] == "incomplete" and carried.status == "draft"

    # judgements are derived with the new rules: answering 1x.2 decides the domain
    code, _, err = run(capsys, "assess", old_review, "--reviewer", "ben", "--study", "W1",
                       "--result", "R1", "--reopen", "1x.2=N")
    ben = Workspace.open(old_review).load_assessment("ben", "W1", "R1")
    assert code == 0, err
    assert ben.proposed["1x"] == "high"  # version 1 said some concerns for 1x.1 = NI
    consensus = ws.load_consensus("W1", "R1")
    assert consensus.question_set_version == "2" and consensus.set_upgrades[0].unanswered == [
        "1x.2"
    ]
    assert run(capsys, "upgrade", old_review, "--as", "lee")[1].startswith(
        "no record needs carrying"
    )


def test_a_writer_in_between_is_refused_and_nothing_is_written(old_review):
    ws = Workspace.open(old_review)
    plans, problems = plan_carries(ws, study="W1")
    assert problems == [] and len(plans) == 3
    ana = old_review / "assessments" / "ana" / "W1--R1.json"
    ben = old_review / "assessments" / "ben" / "W1--R1.json"
    # another process changes ben's file after it was read
    edit(ben, lambda d: d["answers"]["1.2"].update(justification="changed meanwhile"))
    ana_before = ana.read_bytes()
    with pytest.raises(StaleFileError, match="changed by another process"):
        apply_carries(ws, plans)
    assert ana.read_bytes() == ana_before  # the batch is refused whole
    assert json.loads(ben.read_text("utf-8"))["answers"]["1.2"]["justification"] == (
        "changed meanwhile"
    )


def test_the_refusal_on_load_names_the_command(old_review, capsys):
    with pytest.raises(DataFileError, match=r"robtui upgrade REVIEW_DIR"):
        Workspace.open(old_review).load_assessment("ana", "W1", "R1")
    code, _, err = run(capsys, "assess", old_review, "--reviewer", "ana", "--study", "W1",
                       "--result", "R1")
    assert code == 2 and "`robtui upgrade REVIEW_DIR --apply` carries it" in err


def test_an_unknown_version_is_refused_and_left_alone(old_review, capsys):
    path = old_review / "assessments" / "ana" / "W1--R1.json"
    edit(path, lambda d: d.update(question_set_version="7"))
    before = path.read_bytes()
    code, out, _ = run(capsys, "upgrade", old_review, "--as", "ana", "--apply")
    assert code == 1 and "not carried: its version 7 of team-extra is unknown here" in out
    assert path.read_bytes() == before
    record = Assessment.model_validate_json(before)
    with pytest.raises(InputError, match="version 7 of team-extra is unknown"):
        carry_forward(record, Workspace.open(old_review).question_set_for("W1"))


def test_blinding_holds_a_reviewer_carries_only_their_own(old_review, capsys):
    code, out, err = run(capsys, "upgrade", old_review, "--as", "ana", "--apply")
    assert code == 1, err  # the records ana may not carry are named
    assert "carried 1 record(s)" in out and "ana's assessment of W1 / R1" in out
    assert "ben's assessment of" not in out and out.count("version 1 -> 2") == 1  # ana's only
    assert "assessments/ben/W1--R1.json: not carried: this is ben's assessment" in out
    assert "consensus/W1--R1.json: not carried: a consensus record is the lead's (lee)" in out
    ws = Workspace.open(old_review)
    assert ws.load_assessment("ana", "W1", "R1").question_set_version == "2"
    with pytest.raises(DataFileError, match="robtui upgrade"):
        ws.load_assessment("ben", "W1", "R1")
    code, _, err = run(capsys, "upgrade", old_review)  # nobody named: refused, says how
    assert code == 2 and "--as NAME" in err
