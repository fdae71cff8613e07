"""Bad input found in the QA audit: each gives one line `robtui: ...`, exit code 2, no traceback.

The folder that cannot be made sits under a plain file, so the check holds for any user
(permission bits do not stop root).
"""

from __future__ import annotations

from pathlib import Path

from robtui.cli import main


def robtui(capsys, *argv: str) -> tuple[int, str, str]:
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


def _blocked_path(tmp_path: Path) -> tuple[Path, Path]:
    plain = tmp_path / "plain.txt"
    plain.write_text("not a folder\n", encoding="utf-8")
    return plain, plain / "review"


def test_init_in_a_folder_that_cannot_be_made(tmp_path, capsys):
    plain, target = _blocked_path(tmp_path)
    code, _out, err = robtui(capsys, "init", target, "--title", "T")
    assert code == 2
    assert err.startswith("robtui: cannot make the review folder")
    assert "choose a folder you can write to" in err
    assert len(err.strip().splitlines()) == 1
    assert "Traceback" not in err
    assert plain.read_text(encoding="utf-8") == "not a folder\n"


def test_demo_copy_to_a_folder_that_cannot_be_made(tmp_path, capsys):
    plain, target = _blocked_path(tmp_path)
    code, _out, err = robtui(capsys, "demo", "--copy-to", target)
    assert code == 2
    assert err.startswith("robtui: cannot build the demo in")
    assert "new or empty folder you can write to" in err
    assert len(err.strip().splitlines()) == 1
    assert plain.read_text(encoding="utf-8") == "not a folder\n"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["plain.txt"]


def test_export_when_exports_is_not_a_folder(tmp_path, capsys):
    review = tmp_path / "review"
    assert robtui(capsys, "init", review, "--title", "T", "--reviewer", "ana")[0] == 0
    added = robtui(capsys, "result", "add", review, "--result", "pain", "--outcome", "Pain")
    assert added[0] == 0
    exports = review / "exports"
    exports.rmdir()
    exports.write_text("a file where the exports folder should be\n", encoding="utf-8")
    code, _out, err = robtui(capsys, "export", review, "--as", "ana", "--format", "csv")
    assert code == 2
    assert err.startswith("robtui: cannot write the csv export of pain")
    assert "make sure exports/ is a folder you can write to" in err
    assert "Traceback" not in err
    assert exports.read_text(encoding="utf-8") == "a file where the exports folder should be\n"


def _review_with_a_result(tmp_path: Path, capsys) -> Path:
    review = tmp_path / "review"
    made = robtui(capsys, "init", review, "--title", "T", "--reviewer", "ana", "--reviewer", "ben")
    assert made[0] == 0
    assert robtui(capsys, "result", "add", review, "--result", "pain", "--outcome", "Pain")[0] == 0
    return review


def _blocked(folder: Path) -> str:
    """Replace a folder of the review by a plain file; returns the file's text."""
    text = "a file where a folder should be\n"
    if folder.exists():
        folder.rmdir()
    folder.parent.mkdir(parents=True, exist_ok=True)
    folder.write_text(text, encoding="utf-8")
    return text


def test_study_add_when_reports_is_not_a_folder(tmp_path, capsys):
    review = _review_with_a_result(tmp_path, capsys)
    report = tmp_path / "trial.txt"
    report.write_text("An invented trial of a fictional balm.\n", encoding="utf-8")
    text = _blocked(review / "reports")
    before = (review / "review.toml").read_text(encoding="utf-8")
    code, _out, err = robtui(
        capsys, "study", "add", review, "--study", "S1", "--label", "S 1", "--report", report
    )
    assert code == 2
    assert err.startswith("robtui: ") and "you may write there" in err
    assert len(err.strip().splitlines()) == 1
    assert (review / "reports").read_text(encoding="utf-8") == text
    assert (review / "review.toml").read_text(encoding="utf-8") == before


def test_calibrate_trend_and_assess_when_folders_are_files(tmp_path, capsys):
    review = tmp_path / "demo"
    assert robtui(capsys, "demo", "--copy-to", review)[0] == 0
    exports = _blocked(review / "exports")
    code, _out, err = robtui(capsys, "calibrate", "trend", review)
    assert code == 2
    assert err.startswith("robtui: ") and "you may write there" in err
    assert len(err.strip().splitlines()) == 1
    assert (review / "exports").read_text(encoding="utf-8") == exports
    assert "maren" in (review / "review.toml").read_text(encoding="utf-8")
    for old in (review / "assessments" / "maren").iterdir():
        old.unlink()
    mine = _blocked(review / "assessments" / "maren")
    code, _out, err = robtui(
        capsys, "assess", review, "--reviewer", "maren", "--study", "ALDER2031",
        "--result", "primary-itt", "1.1=Y",
    )  # fmt: skip
    assert code == 2
    assert err.startswith("robtui: ") and "you may write there" in err
    assert (review / "assessments" / "maren").read_text(encoding="utf-8") == mine


def test_status_shows_an_unreadable_assessment_as_unreadable_and_leaves_it(tmp_path, capsys):
    review = tmp_path / "demo"
    assert robtui(capsys, "demo", "--copy-to", review)[0] == 0
    victim = next((review / "assessments" / "maren").glob("*.json"))
    victim.write_text("{ broken", encoding="utf-8")
    code, out, err = robtui(capsys, "status", review, "--reviewer", "maren")
    study, result = victim.stem.split("--")
    row = next(line for line in out.splitlines() if line.startswith(study) and result in line)
    assert "unreadable" in row and "not started" not in row
    assert str(victim) in out + err  # the problem names the file
    assert code != 0
    assert victim.read_text(encoding="utf-8") == "{ broken"
