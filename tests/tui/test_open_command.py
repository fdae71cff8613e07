"""`robtui open`: bad folders and names are refused before the terminal is taken over."""

from __future__ import annotations

from robtui.cli import main


def test_open_a_missing_folder(tmp_path, capsys):
    assert main(["open", str(tmp_path / "nowhere"), "--reviewer", "tess"]) == 2
    err = capsys.readouterr().err
    assert err.startswith("robtui: review folder not found") and "robtui init" in err


def test_open_from_a_folder_that_is_not_inside_a_review(tmp_path, capsys, monkeypatch):
    monkeypatch.chdir(tmp_path)
    assert main(["open"]) == 2
    assert "not a review folder" in capsys.readouterr().err


def test_open_with_a_bad_reviewer_name(demo_dir, capsys):
    assert main(["open", str(demo_dir), "--reviewer", "two words"]) == 2
    assert "reviewer name" in capsys.readouterr().err


def test_open_from_inside_a_review_finds_it(demo_dir, monkeypatch):
    import robtui.tui.app as app_module

    opened = []
    monkeypatch.setattr(app_module.Workbench, "run", lambda self: opened.append(self) or 0)
    monkeypatch.chdir(demo_dir / "reports")
    assert main(["open", "--reviewer", "maren"]) == 0
    assert opened[0].folder.root.resolve() == demo_dir.resolve()
    assert opened[0].reviewer == "maren"
    assert opened[0].freeze_startup_objects, "robtui open keeps its start out of full gc"


def test_open_refuses_a_name_not_on_the_review(demo_dir, capsys, monkeypatch):
    import robtui.tui.app as app_module

    opened = []
    monkeypatch.setattr(app_module.Workbench, "run", lambda self: opened.append(self) or 0)
    before = (demo_dir / "review.toml").read_bytes()
    assert main(["open", str(demo_dir), "--reviewer", "marne"]) == 2
    err = capsys.readouterr().err
    assert "'marne' is not on this review" in err and "maren" in err and "--add-reviewer" in err
    assert not opened and (demo_dir / "review.toml").read_bytes() == before


def test_open_with_add_reviewer_lists_the_new_name(demo_dir, monkeypatch):
    import robtui.tui.app as app_module
    from robtui.store.review_folder import ReviewFolder

    opened = []
    monkeypatch.setattr(app_module.Workbench, "run", lambda self: opened.append(self) or 0)
    assert main(["open", str(demo_dir), "--reviewer", "tess", "--add-reviewer"]) == 0
    assert opened[0].reviewer == "tess"
    assert "tess" in ReviewFolder.open(demo_dir).review.reviewers
