"""robtui suggest --question-set: the questions of another set are ranked (new ones through the
transfer model), on an invented sample report."""

from __future__ import annotations

import json

from robtui.cli import main
from robtui.paths import bundled_dir

REPORT = bundled_dir("sample_reports") / "fir-handwashing.txt"  # invented cluster trial


def test_cluster_questions_are_ranked_by_design_name(capsys):
    assert main(["suggest", str(REPORT), "--question-set", "cluster", "--json", "--top", "3"]) == 0
    ranked = json.loads(capsys.readouterr().out)["questions"]
    assert {"1b.1", "1b.2", "1b.3", "2.1a", "2.1b"} <= set(ranked)
    assert all(len(ranked[q]) == 3 for q in ("1b.1", "1b.2", "1b.3"))
    assert main(["suggest", str(REPORT), "--question-set", "rob2-crossover", "--questions", "S.1",
                 "--json"]) == 0
    assert list(json.loads(capsys.readouterr().out)["questions"]) == ["S.1"]


def test_unknown_set_or_question_is_refused_with_the_choices(capsys):
    assert main(["suggest", str(REPORT), "--question-set", "factorial"]) == 2
    err = capsys.readouterr().err
    assert "no question set or design named 'factorial'" in err and "cluster" in err
    assert main(["suggest", str(REPORT), "--questions", "1b.1"]) == 2  # not a parallel question
    assert "unknown question id(s)" in capsys.readouterr().err
