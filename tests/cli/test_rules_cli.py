"""`robtui rules` and `robtui calibrate`: the scripted calibration end to end, and bad input.

Bad input exits 2 with `robtui: <message>` and leaves every file as it was.
"""

import json
import warnings

import pytest
from sklearn.metrics import cohen_kappa_score

from robtui.cli import main
from robtui.devtools.calibration_scenario import (
    ROUND_1,
    ROUND_2,
    assess_round,
    build_calibration_review,
)
from robtui.store.review_folder import ReviewFolder
from robtui.store.rules_file import load_folder_rules, load_rules_safely


def run(capsys, *argv):
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


@pytest.fixture()
def review(tmp_path):
    folder = build_calibration_review(tmp_path / "review")
    assess_round(folder, ROUND_1, round_no=1, rulebook=load_folder_rules(folder))
    return folder.root


def snapshot(root):
    return {p: p.read_bytes() for p in sorted(root.rglob("*")) if p.is_file()}


def test_scripted_calibration_through_the_cli(review, capsys):
    code, out, _ = run(capsys, "calibrate", "record", review)
    assert code == 0 and "round 1 recorded" in out and "S5 / mort: ben: draft" in out
    code, out, _ = run(capsys, "calibrate", "discuss", review)
    assert code == 0
    ranked = out[out.index("questions ranked by disagreement") :]
    assert ranked.splitlines()[1].startswith("4.4 ")
    assert "ana: N" in ranked and "ben: PY" in ranked
    assert "robtui rules add" in ranked and "--question 4.4 --from-result mort" in ranked

    # one step from the discussion: conditions pre-filled from the result
    code, out, _ = run(
        capsys, "rules", "add", review, "--question", "4.4", "--from-result", "mort",
        "--answer", "n", "--text", "Deaths are counted from records: answer N.",
        "--note", "calibration round 1",
    )  # fmt: skip
    assert code == 0, out
    assert "when outcome_type=objective, self_reported=false -> N" in out
    assert "rules version 0 -> 1" in out and "10 assessment(s) made under an older" in out
    code, out, _ = run(capsys, "calibrate", "stale", review)
    assert code == 0 and out.count("made under v0; new rules: R1 (4.4)") == 10

    # second look under the new rules, then round 2
    folder = ReviewFolder.open(review)
    assess_round(folder, ROUND_2, round_no=2, rulebook=load_folder_rules(folder))
    code, out, _ = run(capsys, "calibrate", "stale", review)
    assert "no assessment was made under an older rules version (rules version 1)" in out
    code, out, _ = run(capsys, "calibrate", "record", review)
    assert code == 0 and "round 2 recorded" in out and "rules version 1" in out

    code, out, _ = run(capsys, "calibrate", "report", review)
    assert code == 0
    text = (review / "exports" / "calibration-round-2.md").read_text()
    rounds = [json.loads((review / "calibration" / f"round-{n}.json").read_text()) for n in (1, 2)]
    for rnd, col in ((rounds[0], 2), (rounds[1], 4)):
        pairs = [(p["a"]["final"]["overall"], p["b"]["final"]["overall"]) for p in rnd["pairs"]]
        a, b = zip(*pairs)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            expected = f"{cohen_kappa_score(a, b):.2f}"
        row = next(line for line in text.splitlines() if line.startswith("| Overall "))
        assert row.strip("|").split("|")[col].strip().startswith(expected)
    code, out, _ = run(capsys, "calibrate", "report", review, "--format", "html")
    assert code == 0 and (review / "exports" / "calibration-round-2.html").exists()
    code, out, _ = run(capsys, "calibrate", "trend", review, "--batch", "2", "--plot", "svg")
    assert code == 0
    assert (review / "exports" / "agreement-trend.md").exists()
    assert (review / "exports" / "agreement-trend.svg").read_text().lstrip().startswith("<?xml")


def test_assess_records_the_rules_version(review, capsys):
    run(capsys, "rules", "add", review, "--question", "4.4", "--text", "x")
    assert ReviewFolder.open(review).load_assessment("ana", "S1", "mort").rules_version == 0
    code, out, err = run(
        capsys, "assess", review, "--reviewer", "ana", "--study", "S1", "--result", "mort",
        "--reopen",
    )  # fmt: skip
    assert code == 0, err
    assert ReviewFolder.open(review).load_assessment("ana", "S1", "mort").rules_version == 1
    code, out, _ = run(capsys, "calibrate", "stale", review, "--reviewer", "ana")
    assert "ana S1 / mort" not in out and "ana S2 / mort" in out


def test_rules_list_check_retire_changes(review, capsys):
    run(capsys, "rules", "add", review, "--question", "1.1", "--text", "Bare 'randomised': NI.")
    run(capsys, "rules", "add", review, "--question", "4.4", "--when", "outcome_type=subjective",
        "--text", "Self-assessed: PY.")  # fmt: skip
    code, out, _ = run(capsys, "rules", "list", review, "--result", "mort")
    assert code == 0 and "R1" in out and "R2" not in out  # mortality is objective
    code, out, _ = run(capsys, "rules", "retire", review, "R1")
    assert code == 0 and "rules version 2 -> 3" in out
    code, out, _ = run(capsys, "rules", "list", review, "--at-version", "1")
    assert "R1" in out
    code, out, _ = run(capsys, "rules", "changes", review, "--since", "1")
    assert "added     R2" in out and "withdrawn R1" in out
    code, out, _ = run(capsys, "rules", "check", review)
    assert code == 0 and "valid; version 3, 1 rule(s) in force" in out and "warning" not in out
    rules = review / "rules.toml"
    rules.write_text(rules.read_text().replace("Self-assessed: PY.", "Self-assessed: N."))
    code, out, _ = run(capsys, "rules", "check", review)
    assert code == 0 and "warning:" in out and "raise `version` to 4" in out
    code, out, _ = run(capsys, "calibrate", "stale", review)
    assert "warning:" in out


@pytest.mark.parametrize(
    "argv, message",
    [
        (["--question", "4.9", "--text", "x"], "unknown question id '4.9'"),
        (
            ["--question", "4.4", "--text", "x", "--when", "colour=red"],
            "unknown attribute 'colour'",
        ),
        (["--question", "4.4", "--text", "x", "--when", "outcome_type"], "attribute=value"),
        (["--question", "4.4", "--text", "  "], "needs a text"),
        (["--question", "4.4", "--text", "x", "--answer", "maybe"], "answer must be one of"),
        (["--question", "4.4", "--text", "x", "--from-result", "nope"], "no result 'nope'"),
    ],
)
def test_rules_add_bad_input_changes_nothing(review, capsys, argv, message):
    before = snapshot(review)
    code, _out, err = run(capsys, "rules", "add", review, *argv)
    assert code == 2 and err.startswith("robtui: ") and message in err
    assert "Traceback" not in err
    assert snapshot(review) == before and not (review / "rules.toml").exists()


def test_invalid_toml_rules_file(review, capsys):
    rules = review / "rules.toml"
    rules.write_text('schema_version = 1\nquestion_set = "rob2-parallel\n', encoding="utf-8")
    before = snapshot(review)
    for argv in (
        ["rules", "check", review],
        ["rules", "add", review, "--question", "4.4", "--text", "x"],
        ["calibrate", "stale", review],
        ["calibrate", "record", review],
    ):
        code, _, err = run(capsys, *argv)
        assert code == 2 and str(rules) in err and "not valid TOML" in err, argv
    assert snapshot(review) == before
    # the review still opens; the app is told why the rules are unavailable
    assert ReviewFolder.open(review).review.title
    book, message = load_rules_safely(review)
    assert book is None and "not valid TOML" in message


def test_rules_for_another_question_set_version(review, capsys):
    run(capsys, "rules", "add", review, "--question", "4.4", "--text", "x")
    rules = review / "rules.toml"
    rules.write_text(
        rules.read_text().replace('question_set_version = "1"', 'question_set_version = "7"')
    )
    code, _, err = run(capsys, "rules", "check", review)
    assert code == 2 and "written for question set rob2-parallel version 7" in err
    assert "this review uses rob2-parallel version 1" in err


def test_calibrate_bad_input(review, capsys):
    before = snapshot(review)
    code, _, err = run(capsys, "calibrate", "set", review, "--studies", "S1,S99")
    assert code == 2 and "S99" in err and "nothing was changed" in err
    code, _, err = run(capsys, "calibrate", "discuss", review)
    assert code == 2 and "no calibration round recorded yet" in err
    code, _, err = run(capsys, "calibrate", "report", review, "--round", "9")
    assert code == 2 and "no calibration round 9" in err
    code, _, err = run(capsys, "calibrate", "record", review, "--reviewers", "ana", "ana")
    assert code == 2 and "--reviewers names ana twice" in err
    assert snapshot(review) == before
    run(capsys, "calibrate", "record", review)
    code, _, err = run(capsys, "calibrate", "report", review, "--name", "../outside.md")
    assert code == 2 and "'..'" in err and not (review / "outside.md").exists()
    code, _out, _ = run(capsys, "calibrate", "set", review, "--studies", "S1,S2")
    assert code == 0 and ReviewFolder.open(review).review.calibration_studies == ["S1", "S2"]


def test_record_refuses_when_no_pair_is_complete(tmp_path, capsys):
    folder = build_calibration_review(tmp_path / "empty")
    code, _, err = run(capsys, "calibrate", "record", folder.root)
    assert code == 2 and "nothing to record" in err and "not assessed by either reviewer" in err
    assert not (folder.root / "calibration").exists()


def test_corrupt_round_file_is_reported_and_kept(review, capsys):
    run(capsys, "calibrate", "record", review)
    path = review / "calibration" / "round-1.json"
    path.write_text(path.read_text()[:200], encoding="utf-8")
    broken = path.read_bytes()
    code, _, err = run(capsys, "calibrate", "discuss", review)
    assert code == 2 and str(path) in err and "not valid JSON" in err
    code, out, _ = run(capsys, "calibrate", "record", review)  # a new round, never over round 1
    assert code == 0 and "round 2 recorded" in out
    assert path.read_bytes() == broken
    code, _, err = run(capsys, "calibrate", "report", review)  # round 2 against broken round 1
    assert code == 2 and "not valid JSON" in err
    code, _, _ = run(capsys, "calibrate", "report", review, "--round", "2", "--before", "2")
    assert code == 2
