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
        capsys, "study", "add", root, "--study", "Balm2020", "--label", "Balm 2020", "--report", report
    )
    assert code == 0 and "added study Balm2020" in out
    code, out, _ = robtui(
        capsys, "result", "add", root, "--result", "itch4", "--outcome", "Itch score",
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

    code, out, _ = robtui(capsys, "status", review, "--as", "ana", "--json")
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
            "overrides": [],  # each: key, label, proposed, judgement, reason
        }
    ]
    code, out, _ = robtui(capsys, "status", review, "--as", "ana")
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
        (["--result", "itch4", "--outcome", "Itch"], "already in the review"),
        (["--result", "r2", "--outcome", "Itch", "--weight", "Balm2020"], "write STUDY=NUMBER"),
        (["--result", "r2", "--outcome", "Itch", "--weight", "Other=1"], "unknown studies"),
        (["--result", "r2", "--outcome", "Itch", "--weight", "Balm2020=-1"], "zero or positive"),
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


def test_clear_reopen_and_remove_quote(review: Path, capsys):
    path = review / "assessments" / "ana" / "Balm2020--itch4.json"
    quote = "Sealed opaque envelopes were opened only after enrolment."
    assert assess(capsys, review, *LOW, "--quote", f"1.2={quote}")[0] == 0
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


def test_a_pasted_quote_matches_despite_case_quotes_and_line_breaks(review: Path, capsys):
    """What a PDF viewer's copy gives: other case, a line break, doubled spaces, curly quote."""
    pasted = "ALLOCATION used a computer-\ngenerated  list held by the trial’s"
    code, out, err = assess(capsys, review, "1.1=Y", "--quote", f"1.1={pasted}")
    assert code == 0 and err == ""
    assert "1.1: quote matched in Balm2020/balm.txt" in out
    data = json.loads((review / "assessments" / "ana" / "Balm2020--itch4.json").read_text())
    quote = data["answers"]["1.1"]["quotes"][0]
    assert REPORT[quote["start"] : quote["end"]] == quote["text"]
    assert quote["text"].startswith("Allocation used a computer-generated list held by the trial")


def test_a_near_copy_is_matched_fuzzily_and_said_so(review: Path, capsys):
    code, out, _ = assess(capsys, review, "--quote", "1.2=Sealed opaque envelops were opened only after enrolment")
    assert code == 0 and "a near copy (similarity" in out
    assert "'Sealed opaque envelopes were opened only after enrolment" in out


def test_a_quote_not_in_the_report_keeps_the_rest_of_the_command(review: Path, capsys):
    code, out, err = assess(
        capsys, review, "1.1=Y", "1.2=PY", "--why", "1.1=computer list",
        "--quote", "1.2=the trial used a telephone randomisation service",
    )  # fmt: skip
    assert code == 1 and "saved" in out  # the answers and the justification were kept
    assert "1.2: quote not attached: quote not found" in err and "the closest passage" in err
    data = json.loads((review / "assessments" / "ana" / "Balm2020--itch4.json").read_text())
    assert data["answers"]["1.1"]["response"] == "Y" and data["answers"]["1.2"]["response"] == "PY"
    assert data["answers"]["1.1"]["justification"] == "computer list"
    assert data["answers"]["1.2"]["quotes"] == []


def test_support_and_direction_of_bias_are_stored_and_shown(review: Path, capsys):
    code, out, _ = assess(
        capsys, review, "1.1=Y", "--support", "1=central allocation, groups alike",
        "--direction", "1=towards_null", "--direction", "overall=unpredictable",
    )  # fmt: skip
    assert code == 0
    assert "predicted direction of bias: Towards null" in out
    assert "support: central allocation, groups alike" in out
    data = json.loads((review / "assessments" / "ana" / "Balm2020--itch4.json").read_text())
    assert data["support"] == {"1": "central allocation, groups alike"}
    assert data["direction"] == {"1": "towards_null", "overall": "unpredictable"}
    code, _, err = assess(capsys, review, "--direction", "1=sideways")
    assert code == 2 and "unknown direction of bias 'sideways'" in err
    assert assess(capsys, review, "--direction", "1=", "--support", "1=")[0] == 0
    data = json.loads((review / "assessments" / "ana" / "Balm2020--itch4.json").read_text())
    assert data["support"] == {} and data["direction"] == {"overall": "unpredictable"}


@pytest.mark.parametrize(
    "argv, hint",
    [
        (["study", "add", "{root}", "--id", "S2", "--label", "S"], "--id is now --study"),
        (["study", "add", "{root}", "--study", "S2", "--label", "S", "--kind", "protocol"],
         "--kind is gone: give each file with its kind"),
        (["study", "report", "{root}", "--study", "Balm2020", "{file}"],
         "give the file with its kind, e.g. --protocol FILE"),
        (["result", "add", "{root}", "--id", "r2", "--outcome", "Itch"], "--id is now --result"),
        (["assess", "{root}", "--reviewer", "ana", "--study", "Balm2020", "--result", "itch4",
          "--effect", "adhering"], "the effect of interest belongs to the result"),
    ],
)
def test_old_spellings_are_refused_with_a_hint(review: Path, capsys, argv, hint):
    file = review.parent / "balm.txt"
    before = snapshot(review)
    code, out, err = robtui(capsys, *[a.format(root=review, file=file) for a in argv])
    assert code == 2 and hint in err and out == ""
    assert snapshot(review) == before


def test_report_kinds_are_set_at_study_add_and_listed(review: Path, tmp_path: Path, capsys):
    plan = tmp_path / "plan.txt"
    plan.write_text("Statistical analysis plan of an invented trial.\n", encoding="utf-8")
    supplement = tmp_path / "extra.txt"
    supplement.write_text("Supplementary tables.\n", encoding="utf-8")
    code, out, _ = robtui(
        capsys, "study", "add", review, "--study", "S2", "--label", "S 2",
        "--report", review.parent / "balm.txt", "--analysis-plan", plan,
    )  # fmt: skip
    assert code == 0 and "report balm.txt, statistical analysis plan plan.txt" in out
    code, out, _ = robtui(capsys, "study", "report", review, "--study", "S2", "--supplement", supplement)
    assert code == 0 and "supplement extra.txt" in out
    code, out, _ = robtui(capsys, "study", "list", review)
    assert "statistical analysis plan" in out and "supplement" in out


def test_only_the_lead_changes_a_results_effect(tmp_path: Path, capsys):
    root = tmp_path / "led"
    assert robtui(capsys, "init", root, "--title", "T", "--lead", "lea", "--reviewer", "ana")[0] == 0
    assert robtui(capsys, "result", "add", root, "--result", "r1", "--outcome", "Pain")[0] == 0
    code, _, err = robtui(capsys, "result", "set-effect", root, "--result", "r1",
                          "--effect", "adhering", "--reviewer", "ana")
    assert code == 2 and "only the review's lead (lea)" in err
    code, out, _ = robtui(capsys, "result", "set-effect", root, "--result", "r1",
                          "--effect", "adhering", "--reviewer", "lea")
    assert code == 0 and "(effect of adhering)" in out


def test_study_add_help_names_each_file_kind_with_its_article(capsys):
    """The help reads 'an analysis plan file', not 'a analysis plan file'."""
    with pytest.raises(SystemExit):
        main(["study", "add", "--help"])
    help_text = " ".join(capsys.readouterr().out.split())
    assert "an analysis plan file of the study" in help_text
    assert "a protocol file of the study" in help_text
    assert "a analysis" not in help_text
