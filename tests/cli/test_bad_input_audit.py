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
    added = robtui(capsys, "result", "add", review, "--id", "pain", "--outcome", "Pain")
    assert added[0] == 0
    exports = review / "exports"
    exports.rmdir()
    exports.write_text("a file where the exports folder should be\n", encoding="utf-8")
    code, _out, err = robtui(capsys, "export", review, "--format", "csv")
    assert code == 2
    assert err.startswith("robtui: cannot write the csv export of pain")
    assert "make sure exports/ is a folder you can write to" in err
    assert "Traceback" not in err
    assert exports.read_text(encoding="utf-8") == "a file where the exports folder should be\n"
