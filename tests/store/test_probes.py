"""The probes of a careful tester on a copy of the demo review: stored judgements, codes a
question does not offer, a cut review.toml, unreadable files, symlinks, hostile ids and text."""

from __future__ import annotations

import json
import shutil

import pytest

from robtui.cli import main
from robtui.errors import DataFileError, InputError
from robtui.files import OutsideReviewError
from robtui.store.demo import build_demo_review
from robtui.store.ids import check_id
from robtui.store.review_folder import ReviewFolder


@pytest.fixture(scope="module")
def demo_master(tmp_path_factory):
    return build_demo_review(tmp_path_factory.mktemp("master") / "demo").root


@pytest.fixture
def demo(demo_master, tmp_path):
    root = tmp_path / "demo"
    shutil.copytree(demo_master, root)
    return root


def _assessment_file(root, reviewer="maren"):
    return min((root / "assessments" / reviewer).glob("*.json"))


def _edit_json(path, change):
    data = json.loads(path.read_text(encoding="utf-8"))
    change(data)
    path.write_text(json.dumps(data, indent=2), encoding="utf-8")


def test_stored_judgement_that_disagrees_is_reported_and_never_used(demo, capsys):
    path = _assessment_file(demo)
    computed = json.loads(path.read_text(encoding="utf-8"))["final"]
    flipped = {k: ("low" if v == "high" else "high") for k, v in computed.items()}
    _edit_json(path, lambda d: d.update(final=flipped, proposed=flipped))
    folder = ReviewFolder.open(demo)
    found, problems = folder.assessments("maren")
    record = next(a for a in found if path.name.startswith(a.study_id + "--"))
    assert record.final == computed, "the judgements come from the answers"
    mine = [p for p in problems if str(path) in p]
    assert mine and all("computed from its answers" in p for p in mine)
    assert any("overall" in p for p in mine)
    assert main(["status", str(demo), "--as", "ines"]) == 1
    assert "disagrees" in capsys.readouterr().out


def test_code_not_offered_by_its_question_is_an_error_naming_file_and_question(demo, capsys):
    path = _assessment_file(demo)
    _edit_json(path, lambda d: d["answers"]["1.1"].update(response="NA"))
    folder = ReviewFolder.open(demo)
    study, result = path.stem.split("--")
    with pytest.raises(DataFileError, match=r"S?.*1\.1: answer NA is not offered"):
        folder.load_assessment("maren", study, result)
    _, problems = folder.assessments("maren")
    assert any(str(path) in p and "question 1.1" in p for p in problems)
    assert main(["compare", str(demo), "--as", "ines"]) in (0, 1)
    out, err = capsys.readouterr()
    assert "question 1.1" in err and path.name in err
    # the pair's own line says the file cannot be used, never that there is no assessment
    line = next(ln for ln in out.splitlines() if f"{study} / {result} not compared" in ln)
    assert "maren: the assessment file cannot be used" in line and "no assessment" not in line
    assert main(["agreement", str(demo), "--as", "ines"]) in (0, 1)
    err = capsys.readouterr().err
    line = next(ln for ln in err.splitlines() if f"{study} / {result} not counted" in ln)
    assert "maren: the assessment file cannot be used" in line


def test_cut_review_toml_is_not_silent_and_export_keeps_earlier_exports(demo, capsys):
    assert main(["export", str(demo), "--as", "ines", "--format", "csv"]) == 0
    before = {p: p.read_bytes() for p in (demo / "exports").iterdir()}
    text = (demo / "review.toml").read_text(encoding="utf-8")
    cut = text[: text.index("[[studies]]", text.index("[[studies]]") + 1)]
    (demo / "review.toml").write_text(cut, encoding="utf-8")
    assert main(["status", str(demo), "--as", "ines"]) == 1
    assert "not in" in capsys.readouterr().out
    assert main(["export", str(demo), "--as", "ines", "--format", "csv"]) == 2
    assert "nothing was exported" in capsys.readouterr().err
    assert {p: p.read_bytes() for p in (demo / "exports").iterdir()} == before


def test_unreadable_file_is_unreadable_not_missing(demo, capsys):
    path = _assessment_file(demo)
    path.write_text("{ not json", encoding="utf-8")
    assert main(["export", str(demo), "--as", "ines", "--format", "md"]) == 2
    err = capsys.readouterr().err
    assert "not valid JSON" in err and str(path) in err
    # exported anyway on request: the row says the file cannot be used, never "no assessment"
    study, result = path.stem.split("--")
    (demo / "consensus" / path.name).unlink(missing_ok=True)
    assert main(["export", str(demo), "--as", "ines", "--format", "md", "--result", result,
                 "--despite-problems"]) == 1  # fmt: skip
    text = (demo / "exports" / f"{result}.md").read_text(encoding="utf-8")
    assert f"{study}: assessment file of maren cannot be used" in text
    assert "no assessment by maren" not in text


def test_symlinked_reviewer_folder_is_refused_and_nothing_lands_outside(demo, tmp_path, capsys):
    outside = tmp_path / "outside"
    outside.mkdir()
    (demo / "assessments" / "zed").symlink_to(outside, target_is_directory=True)
    folder = ReviewFolder.open(demo)
    folder.edit_review(lambda r: r.reviewers.append("zed"))
    code = main(
        ["assess", str(demo), "--reviewer", "zed", "--study", folder.review.studies[0].id,
         "--result", folder.review.results[0].id, "1.1=Y"]
    )
    assert code == 2
    assert "symbolic link" in capsys.readouterr().err
    assert list(outside.iterdir()) == []


def test_symlinked_report_folder_is_refused(demo, tmp_path):
    folder = ReviewFolder.open(demo)
    study = folder.review.studies[0]
    target = demo / "reports" / study.id
    moved = tmp_path / "elsewhere"
    shutil.move(target, moved)
    target.symlink_to(moved, target_is_directory=True)
    with pytest.raises(OutsideReviewError):
        folder.report_path(study.reports[0])
    assert "symbolic link" in folder.check_report(study.reports[0])


@pytest.mark.parametrize("bad", ["../../x.txt", "/etc/passwd", "S1/../../x"])
def test_report_paths_outside_reports_are_refused_on_open(demo, bad):
    text = (demo / "review.toml").read_text(encoding="utf-8")
    first = text.index('path = "') + len('path = "')
    end = text.index('"', first)
    (demo / "review.toml").write_text(text[:first] + bad + text[end:], encoding="utf-8")
    with pytest.raises(DataFileError, match="leads outside"):
        ReviewFolder.open(demo)


@pytest.mark.parametrize(
    "bad", ["ana\n", "ana\r", "CON", "con.txt", "LPT1", "nul", "a--b", "ana.", "", "-x", "a/b"]
)
def test_ids_are_matched_in_full(bad):
    with pytest.raises(InputError):
        check_id(bad, "reviewer")


def test_init_refuses_an_id_with_a_trailing_newline(tmp_path, capsys):
    code = main(["init", str(tmp_path / "r"), "--title", "T", "--reviewer", "ana\n"])
    assert code == 2
    assert "not allowed" in capsys.readouterr().err
    assert not (tmp_path / "r" / "review.toml").exists()


@pytest.mark.parametrize(
    "argv",
    [
        ["study", "add", "{root}", "--study", "S1\n", "--label", "x"],
        ["result", "add", "{root}", "--result", "r1\n", "--outcome", "pain"],
        ["assess", "{root}", "--reviewer", "ana\n", "--study", "S1", "--result", "r1"],
    ],
)
def test_every_command_names_an_id_with_a_trailing_newline_the_same_way(tmp_path, capsys, argv):
    root = tmp_path / "r"
    assert main(["init", str(root), "--title", "T", "--lead", "ines", "--reviewer", "ana"]) == 0
    capsys.readouterr()
    assert main([a.replace("{root}", str(root)) for a in argv]) == 2
    err = capsys.readouterr().err
    assert "\\n' is not allowed: use 1-64 letters" in err, err
    assert "String should match" not in err


def test_terminal_output_strips_control_characters(demo, capsys):
    folder = ReviewFolder.open(demo)

    def relabel(review):
        review.studies[0].label = "ALDER\x1b]0;owned\x07\x1b[2J 2031\x9b31m"

    folder.edit_review(relabel)
    assert main(["study", "list", str(demo)]) in (0, 1)
    out = capsys.readouterr().out
    assert "ALDER]0;owned[2J 2031" in out
    assert not any(ch in out for ch in "\x1b\x07\x9b")
