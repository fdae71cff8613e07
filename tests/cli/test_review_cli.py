"""A whole assessment from the shell: init, study add, result add, assess, complete, status.

Bad input gives one line `robtui: ...`, exit code 2, and leaves every file as it was.
"""

from __future__ import annotations

import hashlib
import json
from pathlib import Path

import pytest

from robtui.cli import main

REPORT = (
    "Invented trial of a fictional balm.\n"
    "Allocation used a computer-generated list held by the trial pharmacy.\n"
    "Sealed opaque envelopes were opened only after enrolment.\n"
)
LOW = [
    "1.1=Y", "1.2=PY", "1.3=N", "2.1=N", "2.2=N", "2.6=Y", "3.1=Y",
    "4.1=N", "4.2=N", "4.3=N", "5.1=Y", "5.2=N", "5.3=N",
]  # fmt: skip


def robtui(capsys, *argv: str) -> tuple[int, str, str]:
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


def snapshot(root: Path) -> dict[str, str]:
    return {
        str(p.relative_to(root)): hashlib.sha256(p.read_bytes()).hexdigest()
        for p in sorted(root.rglob("*"))
        if p.is_file()
    }


@pytest.fixture
def review(tmp_path: Path, capsys) -> Path:
    report = tmp_path / "balm.txt"
    report.write_text(REPORT, encoding="utf-8")
    root = tmp_path / "rev"
    assert robtui(capsys, "init", root, "--title", "Balm review", "--reviewer", "ana")[0] == 0
    code, out, _ = robtui(
        capsys, "study", "add", root, "--id", "Balm2020", "--label", "Balm 2020", "--report", report
    )
    assert code == 0 and "added study Balm2020" in out
    code, out, _ = robtui(
        capsys, "result", "add", root, "--id", "itch4", "--outcome", "Itch score",
        "--time-point", "4 weeks", "--outcome-type", "subjective", "--weight", "Balm2020=3",
    )  # fmt: skip
    assert code == 0 and "added result itch4" in out
    return root


def assess(capsys, root: Path, *argv: str):
    return robtui(
        capsys, "assess", root, "--reviewer", "ana", "--study", "Balm2020", "--result", "itch4",
        *argv,
    )  # fmt: skip


def test_full_flow(review: Path, capsys):
    code, out, _ = assess(
        capsys, review, *LOW[:3], "--why", "1.1=computer list",
        "--quote", "1.1=computer-generated list held by the trial pharmacy",
    )  # fmt: skip
    assert code == 0
    assert "proposed Low" in out and "still missing:" in out and "domain 2: not answered" in out
    path = review / "assessments" / "ana" / "Balm2020--itch4.json"
    data = json.loads(path.read_text(encoding="utf-8"))
    quote = data["answers"]["1.1"]["quotes"][0]
    assert REPORT[quote["start"] : quote["end"]] == quote["text"]
    assert data["answers"]["1.1"]["justification"] == "computer list"
    before = snapshot(review)
    code, out, _ = assess(capsys, review, "--questions")
    assert code == 0 and "nothing changed" in out
    assert "  1.1   Y   Was the allocation sequence random?" in out
    assert "  2.1   --  " in out and "2.3" not in out  # 2.3 is not asked yet
    assert snapshot(review) == before

    code, out, _ = assess(capsys, review, *LOW[3:])
    assert code == 0 and "nothing missing" in out
    assert out.count("proposed Low") == 6

    code, out, _ = assess(capsys, review, "--complete")
    assert code == 0 and "ana: complete" in out
    assert json.loads(path.read_text(encoding="utf-8"))["status"] == "complete"

    code, out, _ = robtui(capsys, "status", review, "--json")
    rows = json.loads(out)["rows"]
    assert rows == [
        {
            "study": "Balm2020",
            "result": "itch4",
            "reviewer": "ana",
            "status": "complete",
            "answered": 13,
            "asked": 13,
            "overall": "low",
        }
    ]
    code, out, _ = robtui(capsys, "status", review)
    assert code == 0 and "1 of 1 assessments complete" in out


def test_override_with_reason_through_cli(review: Path, capsys):
    assert assess(capsys, review, *LOW)[0] == 0
    code, out, err = assess(capsys, review, "--override", "4=some_concerns")
    assert code == 2 and "every override needs its own reason" in err
    code, out, _ = assess(
        capsys, review, "--override", "4=some_concerns", "--reason", "assessors met patients"
    )
    assert code == 0
    assert "(override: assessors met patients)" in out
    data = json.loads((review / "assessments/ana/Balm2020--itch4.json").read_text("utf-8"))
    assert data["overrides"]["4"] == {
        "judgement": "some_concerns",
        "reason": "assessors met patients",
        "proposed": "low",
    }
    assert data["final"]["overall"] == "some_concerns" and data["proposed"]["4"] == "low"


@pytest.mark.parametrize(
    "argv, message",
    [
        (["1.1=Q"], "unknown response 'Q'"),
        (["3.1=Y", "3.2=N"], "3.2 is not asked"),
        (["9.1=Y"], "unknown question '9.1'"),
        (["1.1"], "write it as Q=CODE"),
        (["--quote", "1.1=words not in the report"], "quote not found"),
        (["--complete"], "cannot mark complete: domain 1: not answered"),
        (["--override", "1=high", "--reason", "x"], "domain 1 is incomplete"),
    ],
)
def test_bad_input_exit_2_and_nothing_changed(review: Path, capsys, argv, message):
    assert assess(capsys, review, "1.1=Y")[0] == 0
    before = snapshot(review)
    code, out, err = assess(capsys, review, *argv)
    assert out == ""
    assert code == 2
    assert err.startswith("robtui: ") and message in err and err.count("\n") == 1
    assert snapshot(review) == before


def test_unknown_reviewer_study_result(review: Path, capsys):
    before = snapshot(review)
    for argv, message in [
        (["--reviewer", "zed", "--study", "Balm2020", "--result", "itch4"], "not on this review"),
        (["--reviewer", "ana", "--study", "Nope", "--result", "itch4"], "no study 'Nope'"),
        (["--reviewer", "ana", "--study", "Balm2020", "--result", "nope"], "no result 'nope'"),
        (["--reviewer", "a b", "--study", "Balm2020", "--result", "itch4"], "not allowed"),
    ]:
        code, _, err = robtui(capsys, "assess", review, *argv, "1.1=Y")
        assert code == 2 and message in err, err
    assert snapshot(review) == before
    code, _, _ = robtui(
        capsys, "assess", review, "--reviewer", "zed", "--study", "Balm2020", "--result", "itch4",
        "1.1=Y", "--add-reviewer",
    )  # fmt: skip
    assert code == 0
    assert '"zed"' in (review / "review.toml").read_text("utf-8")


def test_missing_folder_and_not_a_review(tmp_path: Path, capsys):
    code, _, err = robtui(capsys, "status", tmp_path / "absent")
    assert code == 2 and "review folder not found" in err and "robtui init" in err
    code, _, err = robtui(capsys, "status", tmp_path)
    assert code == 2 and "not a review folder" in err


def test_newer_schema_and_broken_files(review: Path, capsys):
    assert assess(capsys, review, "1.1=Y")[0] == 0
    path = review / "assessments" / "ana" / "Balm2020--itch4.json"
    data = json.loads(path.read_text("utf-8"))
    data["schema_version"] = 5
    path.write_text(json.dumps(data), encoding="utf-8")
    before = snapshot(review)
    code, _, err = assess(capsys, review, "1.2=Y")
    assert code == 2 and "newer robtui (schema 5" in err and "upgrade robtui" in err
    path.write_text("{broken", encoding="utf-8")
    before = snapshot(review)
    code, _, err = assess(capsys, review, "1.2=Y")
    assert code == 2 and "not valid JSON" in err and str(path) in err
    assert snapshot(review) == before
    # status lists the broken file and goes on
    code, out, _ = robtui(capsys, "status", review)
    assert code == 1 and "problem:" in out and str(path) in out

    toml = review / "review.toml"
    toml.write_text("title = ", encoding="utf-8")
    code, _, err = robtui(capsys, "status", review)
    assert code == 2 and "not valid TOML" in err


def test_init_refuses_existing_review_and_bad_ids(review: Path, tmp_path: Path, capsys):
    before = snapshot(review)
    code, _, err = robtui(capsys, "init", review, "--title", "Again")
    assert code == 2 and "already holds a review" in err
    assert snapshot(review) == before
    code, _, err = robtui(capsys, "init", tmp_path / "x", "--title", "T", "--reviewer", "a/b")
    assert code == 2 and "not allowed" in err
    assert not (tmp_path / "x").exists()


def test_result_add_bad_input(review: Path, capsys):
    before = snapshot(review)
    for argv, message in [
        (["--id", "itch4", "--outcome", "Itch"], "already in the review"),
        (["--id", "r2", "--outcome", "Itch", "--weight", "Balm2020"], "write STUDY=NUMBER"),
        (["--id", "r2", "--outcome", "Itch", "--weight", "Other=1"], "unknown studies"),
        (["--id", "r2", "--outcome", "Itch", "--weight", "Balm2020=-1"], "zero or positive"),
    ]:
        code, _, err = robtui(capsys, "result", "add", review, *argv)
        assert code == 2 and message in err, err
    assert snapshot(review) == before


def test_study_list_reports_changed_file(review: Path, capsys):
    code, out, _ = robtui(capsys, "study", "list", review)
    assert code == 0 and "Balm2020/balm.txt  ok" in out
    (review / "reports" / "Balm2020" / "balm.txt").write_text("edited", encoding="utf-8")
    code, out, _ = robtui(capsys, "study", "list", review)
    assert code == 1 and "changed since it was added" in out


def test_clear_effect_reopen_and_remove_quote(review: Path, capsys):
    path = review / "assessments" / "ana" / "Balm2020--itch4.json"
    quote = "Sealed opaque envelopes were opened only after enrolment."
    assert assess(capsys, review, *LOW, "--quote", f"1.2={quote}")[0] == 0
    code, out, _ = assess(capsys, review, "--effect", "adhering", "--json")
    data = json.loads(out)
    assert code == 0 and data["effect"] == "adhering"
    assert data["answers"]["assignment:2.6"]["response"] == "Y" and "2.6" not in data["answers"]
    assert data["proposed"]["2"] == "incomplete"
    assert json.loads(path.read_text("utf-8")) == data
    assert assess(capsys, review, "--effect", "assignment")[0] == 0
    code, out, _ = assess(capsys, review, "1.3=")  # clears the answer
    assert code == 0 and "domain 1: not answered: 1.3" in out
    assert json.loads(path.read_text("utf-8"))["answers"]["1.3"]["response"] is None
    assert assess(capsys, review, "1.3=N", "--complete")[0] == 0
    code, _, err = assess(capsys, review, "1.1=PY")
    assert code == 2 and "reopen it first" in err
    code, out, _ = assess(capsys, review, "--reopen", "--remove-quote", "1.2=1")
    data = json.loads(path.read_text("utf-8"))
    assert code == 0 and data["status"] == "draft" and data["answers"]["1.2"]["quotes"] == []
    code, _, err = assess(capsys, review, "--remove-quote", "1.2=1")
    assert code == 2 and "no quote number 1" in err
