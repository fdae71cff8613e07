"""robtui judge: batch (JSON Lines, order kept, one bad line does not stop the rest) and single use.

Expected judgements are from the published algorithms (Sterne JAC et al. BMJ 2019;366:l4898;
RoB 2 full guidance and template, 22 August 2019); every path is covered in
tests/core/test_algorithm.py, these tests cover the command's behaviour.
"""

from __future__ import annotations

import io
import json
import subprocess
import sys

import pytest

from robtui.cli import main
from robtui.commands.judge import run_batch


def _batch(lines: list[str]) -> subprocess.CompletedProcess:
    return subprocess.run(
        [sys.executable, "-m", "robtui", "judge", "--batch"],
        input="".join(line + "\n" for line in lines),
        capture_output=True,
        text=True,
        check=False,
        timeout=60,
    )


def test_batch_keeps_order_and_reports_bad_lines_while_the_rest_go_on():
    lines = [
        # domain 4, low (4.3 Y, 4.4 N): template algorithm for domain 4
        '{"tool": "rob2", "domain": 4, "answers": {"4.1": "N", "4.2": "N", "4.3": "Y", "4.4": "N"}}',
        "this is not json",
        '{"tool": "rob2", "overall": ["low", "some_concerns", "high", "low", "low"]}',
        '{"tool": "rob2", "domain": 1, "answers": {"1.1": "Y", "1.2": "Y", "1.3": "MAYBE"}}',
        '{"tool": "rob2", "domain": 3, "answers": {"3.1": "N", "3.9": "Y"}}',
        '{"tool": "rob2", "domain": 3, "answers": {"3.1": "N", "3.2": "NI"}}',
        '{"tool": "rob2", "domain": 3, "answers": {"3.1": "Y", "3.2": "N"}}',
        json.dumps({"tool": "rob2", "domain": 2, "effect": "adhering", "answers": {
            "2.1": "N", "2.2": "N", "2.4": "NA", "2.5": "PY", "2.6": "Y"}}),
        '{"tool": "rob2", "domain": 2, "answers": {"2.1": "N", "2.2": "N"}}',
        '{"tool": "other", "domain": 1, "answers": {}}',
        "",
        '{"tool": "rob2", "overall": ["low", "low", "low", "low", "low"]}',
        '{"tool": "rob2", "overall": ["low", "low"]}',
        '{"tool": "rob2", "domain": 2, "effect": "sideways", "answers": {}}',
        "[1, 2]",
        '{"tool": "rob2", "domain": 5, "answers": {"5.1": "N", "5.2": "N", "5.3": "N"}}',
    ]
    run = _batch(lines)
    assert run.returncode == 0, run.stderr
    out = [json.loads(line) for line in run.stdout.splitlines()]
    assert len(out) == len(lines)
    assert out[0] == {"judgement": "low"}
    assert "not valid JSON" in out[1]["error"]
    assert out[2] == {"judgement": "high"}
    assert "unknown answer code 'MAYBE'" in out[3]["error"]
    assert "unknown question '3.9'" in out[4]["error"]
    assert "NI is not an option" in out[5]["error"]
    assert "3.2 is answered but not asked" in out[6]["error"]
    assert out[7] == {"judgement": "some_concerns"}  # adhering: 2.5 PY, 2.6 Y
    assert out[8] == {"judgement": "incomplete"}  # 2.6 still to answer
    assert "unknown tool 'other'" in out[9]["error"]
    assert "empty line" in out[10]["error"]
    assert out[11] == {"judgement": "low"}
    assert "list of 5" in out[12]["error"]
    assert "unknown effect 'sideways'" in out[13]["error"]
    assert "JSON object" in out[14]["error"]
    assert out[15] == {"judgement": "some_concerns"}  # 5.1 N, no selection
    assert all(set(o) in ({"judgement"}, {"error"}) for o in out)


def test_batch_on_empty_input_writes_nothing():
    run = _batch([])
    assert run.returncode == 0 and run.stdout == ""


def test_single_use_prints_judgement_and_path(capsys):
    assert main(["judge", "--domain", "4", "4.1=N", "4.2=N", "4.3=Y", "4.4=N"]) == 0
    out = capsys.readouterr().out.splitlines()
    assert out[0] == "Domain 4 (Bias in measurement of the outcome): Low"
    assert out[1] == "path: 4.1=N 4.2=N 4.3=Y 4.4=N"
    assert out[2] == (
        "why: 4.2 answered N, 4.4 answered N: comparable measurement that knowledge of the "
        "intervention could not sway → Low"
    )


def test_single_use_adhering_and_incomplete(capsys):
    args = ["judge", "--domain", "2", "--effect", "adhering", "2.1=Y", "2.2=n", "2.3=NA",
            "2.4=N", "2.5=Y"]
    assert main(args) == 0
    out = capsys.readouterr().out
    assert "effect of adhering): Not judged" in out  # the one label table (core.questions)
    assert "path: 2.1=Y 2.2=N 2.3=NA 2.4=N 2.5=Y 2.6=?" in out
    assert "still to answer: 2.6" in out
    assert "why: 1 question still to answer before a judgement: 2.6" in out


def test_single_use_says_a_judgement_the_answers_already_decide(capsys):
    # RoB 2 domain 4 algorithm (Sterne et al. BMJ 2019;366:l4898): an inappropriate
    # measurement method (4.1 Y/PY) gives High whatever the other answers.
    assert main(["judge", "--domain", "4", "4.1=Y"]) == 0
    out = capsys.readouterr().out.splitlines()
    assert out[0] == (
        "Domain 4 (Bias in measurement of the outcome): High (already decided by the answers given)"
    )
    assert "still to answer: 4.2 (" in out[2]
    assert out[3] == "why: 4.1 answered Y: inappropriate method of measuring the outcome → High"
    assert out[4] == "why: High whatever the answers to 4.2"


def test_single_use_domain2_both_parts_shown(capsys):
    assert main(["judge", "--domain", "2", "2.1=Y", "2.2=Y", "2.3=NI", "2.6=N", "2.7=PN"]) == 0
    out = capsys.readouterr().out
    assert "): Some concerns" in out
    assert out.count("why: ") == 2  # one reason per part of the domain's algorithm
    assert "why: 2.7 answered PN: analysis not appropriate" in out


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (["--domain", "3", "3.1=N", "3.2=NI"], "3.2: NI is not an option"),
        (["--domain", "3", "3.1=Y", "3.2=N"], "3.2 is answered but not asked"),
        (["--domain", "3", "3.1"], "answers are written ID=CODE"),
        (["--domain", "3", "3.1=Y", "3.1=N"], "answered twice"),
        (["--domain", "8", "8.1=Y"], "no domain '8'"),
        (["4.1=N"], "say what to judge"),
        (["--batch", "--domain", "1"], "--batch reads its input from stdin"),
        (["--domain", "1", "--question-set", "nope"], "no question set or design named 'nope' in the bundled sets"),
    ],
)
def test_single_use_bad_input_one_line_exit_2(args, message):
    run = subprocess.run(
        [sys.executable, "-m", "robtui", "judge", *args],
        capture_output=True, text=True, check=False, timeout=60,
    )
    assert run.returncode == 2
    assert run.stdout == ""
    lines = run.stderr.splitlines()
    assert len(lines) == 1 and lines[0].startswith("robtui: "), run.stderr
    assert message in lines[0]


def test_batch_via_main_in_process(monkeypatch, capsys):
    monkeypatch.setattr("sys.stdin", io.StringIO(
        '{"tool": "rob2", "domain": "1", "answers": {"1.1": "N", "1.2": "Y", "1.3": "N"}}\n'
    ))
    assert main(["judge", "--batch"]) == 0
    assert json.loads(capsys.readouterr().out) == {"judgement": "some_concerns"}


def test_judge_imports_no_heavy_modules():
    # The judge command and the core it uses need only the standard library (fast start).
    # Other commands are imported by the CLI's parser too; they keep heavy imports inside run.
    code = (
        "import sys, argparse\n"
        "import robtui.commands.judge as j\n"
        "p = argparse.ArgumentParser(); s = p.add_subparsers(); j.register(s)\n"
        "a = p.parse_args(['judge', '--domain', '5', '5.1=Y', '5.2=N', '5.3=N'])\n"
        "a.func(a)\n"
        "heavy = [m for m in ('pydantic', 'textual', 'sklearn', 'numpy', 'matplotlib',"
        " 'pdfplumber') if m in sys.modules]\n"
        "print('HEAVY', heavy)\n"
    )
    run = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=False, timeout=60)
    assert "): Low" in run.stdout, run.stdout + run.stderr
    assert "HEAVY []" in run.stdout, run.stdout + run.stderr


def test_single_use_overall_and_may_raise_note(capsys):
    # Overall = least favourable domain; with several some-concerns domains the guidance lets
    # reviewers judge High (template, overall criteria): the command only points this out.
    assert main(["judge", "--overall", "low,some_concerns,some_concerns,low,low"]) == 0
    out = capsys.readouterr().out.splitlines()
    assert out[0] == "Overall: Some concerns"
    assert out[1].startswith("note: several domains have some concerns")
    assert main(["judge", "--overall", "low,some_concerns,high,low,low"]) == 0
    assert capsys.readouterr().out == "Overall: High\n"


def test_overall_bad_input_exit_2(capsys):
    assert main(["judge", "--overall", "low,high"]) == 2
    assert "needs 5 domain judgements" in capsys.readouterr().err
    assert main(["judge", "--overall", "low,low,low,low,fine"]) == 2
    assert "unknown judgement 'fine'" in capsys.readouterr().err


def test_batch_line_without_tool_is_an_error(monkeypatch, capsys):
    monkeypatch.setattr("sys.stdin", io.StringIO('{"domain": 1, "answers": {}}\n'))
    assert main(["judge", "--batch"]) == 0
    assert "missing 'tool'" in json.loads(capsys.readouterr().out)["error"]


def test_other_sets_by_design_or_id(capsys):
    # domain 1b of the cluster set: 1b.1 = N leads to 1b.3 (invented answers; the path itself
    # is tested against the published algorithm in tests/core/test_variant_sets.py)
    assert main(["judge", "--question-set", "cluster", "--domain", "1b", "1b.1=Y"]) == 0
    assert "Domain 1b" in capsys.readouterr().out
    line = json.dumps({"tool": "rob2", "question_set": "rob2-crossover", "domain": "S",
                       "answers": {}})
    out = io.StringIO()
    assert run_batch(io.StringIO(line + "\n"), out) == 0
    assert json.loads(out.getvalue()) == {"judgement": "incomplete"}
    line = json.dumps({"tool": "rob2", "question_set": "factorial", "domain": 1, "answers": {}})
    out = io.StringIO()
    run_batch(io.StringIO(line + "\n"), out)
    assert "no question set or design named 'factorial'" in json.loads(out.getvalue())["error"]
