"""Preparing many reports: pool, skipping what the caches hold, failures, resuming, the map."""

from __future__ import annotations

import csv
import io
import json
import os
import threading
from pathlib import Path

import pytest

from robtui.cli import main
from robtui.evidence.prepared import load_prepared
from robtui.paths import bundled_dir
from robtui.workspace.preparing import (
    PrepareProgress,
    describe_progress,
    jobs_for_files,
    prepare,
)

SAMPLES = bundled_dir("sample_reports")
TEXTS = ["alder-migraine.txt", "birch-knee.txt", "cedar-sleep.txt"]


def _texts(tmp_path: Path) -> list[Path]:
    out = []
    for name in TEXTS:
        target = tmp_path / "in" / name
        target.parent.mkdir(exist_ok=True)
        target.write_bytes((SAMPLES / name).read_bytes())
        out.append(target)
    return out


def test_prepares_in_process_keeps_results_and_skips_them_next_time(tmp_path):
    jobs, problems = jobs_for_files(_texts(tmp_path), ("assignment", "adhering"))
    assert not problems
    seen: list[PrepareProgress] = []
    summary = prepare(jobs, workers=0, progress=lambda p: seen.append(
        PrepareProgress(**{k: getattr(p, k) for k in ("total", "skipped", "done", "failed")})))
    assert [o.ok for o in summary.outcomes] == [True, True, True]
    assert [p.done for p in seen] == [0, 1, 2, 3] and seen[-1].total == 3
    for job in jobs:
        for effect in ("assignment", "adhering"):
            entry = load_prepared(job.sha256, effect)
            assert entry is not None and entry.sentences > 50
            assert set(entry.questions) >= {"1.1", "5.1"}
            best = entry.questions["1.1"]
            assert best.suggestions and best.best == best.suggestions[0].score
    again = prepare(jobs, workers=0)
    assert again.skipped == 3 and again.outcomes == []


def test_the_pool_prepares_and_lists_failures_with_reasons(tmp_path):
    paths = _texts(tmp_path)
    empty = tmp_path / "in" / "empty.txt"
    empty.write_text("   \n", encoding="utf-8")
    strange = tmp_path / "in" / "notes.docx"
    strange.write_bytes(b"PK not a report")
    jobs, problems = jobs_for_files([*paths, empty, strange, tmp_path / "missing.txt"])
    assert [Path(p.path).name for p in problems] == ["missing.txt"]
    summary = prepare(jobs, workers=2)
    assert summary.workers == 2
    by_name = {Path(o.path).name: o for o in summary.outcomes}
    assert all(by_name[n].ok for n in TEXTS)
    assert "empty" in by_name["empty.txt"].error
    assert "unsupported file type" in by_name["notes.docx"].error
    assert {o.worker for o in summary.outcomes} - {0}, "worker pids are reported"
    assert all(o.peak_rss_mb > 0 for o in summary.outcomes)


@pytest.mark.skipif(not hasattr(os, "nice"), reason="no process niceness on this platform")
def test_background_workers_give_way_to_the_workbench(tmp_path):
    from robtui.workspace.preparing import BACKGROUND_NICENESS

    jobs, _ = jobs_for_files(_texts(tmp_path)[:2])
    mine = os.nice(0)
    summary = prepare(jobs, workers=1, background=True)
    assert [o.ok for o in summary.outcomes] == [True, True]
    assert {o.niceness for o in summary.outcomes} == {min(19, mine + BACKGROUND_NICENESS)}
    again = prepare(jobs, workers=1, skip_prepared=False)  # robtui prepare: as the caller
    assert {o.niceness for o in again.outcomes} == {mine}


def test_cancelled_run_keeps_finished_reports_and_resumes(tmp_path):
    jobs, _ = jobs_for_files(_texts(tmp_path))
    cancel = threading.Event()

    def stop_after_first(state: PrepareProgress) -> None:
        if state.done == 1:
            cancel.set()

    first = prepare(jobs, workers=0, progress=stop_after_first, cancel=cancel)
    assert first.interrupted and len(first.outcomes) == 1
    second = prepare(jobs, workers=0)
    assert second.skipped == 1 and len(second.prepared) == 2 and not second.interrupted


def test_progress_rates_and_time_left():
    state = PrepareProgress(total=10, skipped=2, done=4, failed=1, pages=48, elapsed=8.0)
    assert state.pages_per_second == 6.0
    assert state.reports_per_minute == 30.0
    assert state.seconds_left == 12.0
    line = describe_progress(state)
    assert "4/10 reports" in line and "6.0 pages/s" in line and "00:12 left" in line
    assert "1 failed" in line and "2 already prepared" in line
    assert PrepareProgress(total=3, skipped=0).seconds_left is None


def _review(tmp_path: Path, capsys) -> Path:
    root = tmp_path / "rev"
    assert main(["init", str(root), "--title", "T", "--lead", "ines", "--reviewer", "maren"]) == 0
    for study, name in (("A1", "alder-migraine.txt"), ("B1", "birch-knee.txt")):
        assert main(["study", "add", str(root), "--study", study, "--label", study,
                     "--report", str(SAMPLES / name)]) == 0
    capsys.readouterr()
    return root


def test_prepare_command_then_evidence_map_and_its_export(tmp_path, capsys):
    root = _review(tmp_path, capsys)
    assert main(["evidence-map", str(root)]) == 0
    before = capsys.readouterr().out
    assert "not prepared yet: run `robtui prepare" in before
    assert main(["prepare", str(root), "--workers", "0", "--quiet"]) == 0
    out = capsys.readouterr().out
    assert "prepared 2 report(s)" in out
    assert main(["prepare", str(root), "--workers", "0", "--quiet"]) == 0
    assert "2 already prepared" in capsys.readouterr().out
    assert main(["evidence-map", str(root), "--export", "csv", "--export", "md"]) == 0
    out = capsys.readouterr().out
    assert "not prepared" not in out.split("\n\n")[1]  # the grid has no gaps any more
    rows = list(csv.DictReader(io.StringIO(
        (root / "exports" / "evidence-map-assignment.csv").read_text(encoding="utf-8"))))
    assert len(rows) == 2 * 22
    alder = {r["question"]: r for r in rows if r["study"] == "A1"}
    # ALDER's report describes its computer random number generator: strong for 1.1
    assert alder["1.1"]["band"] == "strong" and "random number" in alder["1.1"]["best_sentence"]
    assert {r["band"] for r in rows} <= {"strong", "some", "none"}
    assert "| A1 |" in (root / "exports" / "evidence-map-assignment.md").read_text()


def test_prepare_lists_a_changed_report_and_prepares_the_rest(tmp_path, capsys):
    root = _review(tmp_path, capsys)
    changed = next((root / "reports" / "B1").iterdir())
    changed.write_text("edited by hand\n", encoding="utf-8")
    code = main(["prepare", str(root), "--workers", "0", "--quiet"])
    out, err = capsys.readouterr()
    assert code == 1
    assert "prepared 1 report(s)" in out
    assert "B1: " in err and "changed since it was added" in err


def test_suggest_many_files_writes_json_lines_in_order(tmp_path, capsys):
    paths = _texts(tmp_path)
    listing = tmp_path / "list.txt"
    listing.write_text("# reports\nin/birch-knee.txt\n\nin/nothing-here.txt\n", encoding="utf-8")
    code = main(["suggest", str(tmp_path / "in"), "--list", str(listing), "--top", "2",
                 "--questions", "1.1,1.2", "--workers", "2"])
    out, err = capsys.readouterr()
    lines = [json.loads(line) for line in out.splitlines()]
    assert code == 1 and "1 of 5 file(s) could not be ranked" in err
    assert [Path(o.get("path") or o["document"]["path"]).name for o in lines] == [
        "birch-knee.txt", "nothing-here.txt", *sorted(p.name for p in paths)]
    assert "no such file" in lines[1]["error"]
    ok = lines[0]["questions"]
    assert list(ok) == ["1.1", "1.2"] and all(len(v) == 2 for v in ok.values())


def test_suggest_refuses_unknown_questions_before_ranking(tmp_path, capsys):
    _texts(tmp_path)
    assert main(["suggest", str(tmp_path / "in"), "--questions", "9.9"]) == 2
    assert "unknown question id(s)" in capsys.readouterr().err


@pytest.mark.parametrize("argv", [["prepare", "{root}", "--workers", "-1"]])
def test_bad_worker_count_is_refused(tmp_path, capsys, argv):
    root = _review(tmp_path, capsys)
    assert main([a.format(root=root) for a in argv]) == 2
    assert "workers must be 0" in capsys.readouterr().err


def test_the_workbench_opens_prepared_suggestions_without_ranking(tmp_path, capsys,
                                                                   monkeypatch):
    from robtui.evidence.ranker import Ranker
    from robtui.evidence.review_model import ReviewModel, save_review_model
    from robtui.store.review_folder import ReviewFolder
    from robtui.tui.report_loading import load_report

    root = _review(tmp_path, capsys)
    folder = ReviewFolder.open(root)
    report = folder.review.study("A1").reports[0]
    ranked = load_report(folder, report, "assignment")  # not prepared yet: ranked here
    assert main(["prepare", str(root), "--workers", "0", "--quiet"]) == 0

    def no_ranking(*_args, **_kwargs):
        raise AssertionError("a prepared report must not be ranked again")

    monkeypatch.setattr(Ranker, "rank", no_ranking)
    prepared = load_report(folder, report, "assignment")
    assert prepared.suggestions == ranked.suggestions
    assert prepared.no_evidence_threshold == ranked.no_evidence_threshold
    # a reviewer's own learned model changes the order: then it is ranked afresh
    learned = tmp_path / "learned"
    save_review_model(ReviewModel(weights={"1.1": {0: 0.5}}), learned)
    with pytest.raises(AssertionError, match="must not be ranked"):
        load_report(folder, report, "assignment", learned_dir=learned)


def test_a_report_prepared_meanwhile_by_another_process_is_not_done_again(tmp_path):
    from robtui.workspace.preparing import prepare_one

    jobs, _ = jobs_for_files(_texts(tmp_path)[:1])
    first = prepare_one(jobs[0])
    assert first.ok and not first.already and first.pages == 0 and first.sentences > 50
    again = prepare_one(jobs[0])
    assert again.ok and again.already and again.sentences == 0


def test_the_workbench_reads_a_long_pdf_in_another_process(tmp_path, capsys, monkeypatch):
    """A long PDF not prepared yet is read and ranked apart (PDF parsing in the workbench's
    thread would take turns with the interface); a short one is read in the thread."""
    from robtui.reading import reader
    from robtui.store.review_folder import ReviewFolder
    from robtui.tui.report_loading import APART_MIN_PAGES, load_report, pdf_pages

    root = tmp_path / "rev"
    assert main(["init", str(root), "--title", "T", "--lead", "ines", "--reviewer", "maren"]) == 0
    for study, name in (("G1", "grove-neuropathy.pdf"), ("A1", "alder-migraine.pdf")):
        assert main(["study", "add", str(root), "--study", study, "--label", study,
                     "--report", str(SAMPLES / name)]) == 0
    capsys.readouterr()
    folder = ReviewFolder.open(root)
    long, short = folder.review.study("G1").reports[0], folder.review.study("A1").reports[0]
    assert pdf_pages(folder.report_path(long)) >= APART_MIN_PAGES
    assert pdf_pages(folder.report_path(short)) < APART_MIN_PAGES

    parse = reader._parse
    parsed_here = []

    def counted(path, *args, **kwargs):
        parsed_here.append(path.name)
        return parse(path, *args, **kwargs)

    monkeypatch.setattr(reader, "_parse", counted)  # this process only, not the spawned one
    loaded = load_report(folder, long, "assignment")
    assert loaded.problem is None and loaded.document.pages >= APART_MIN_PAGES
    assert loaded.suggestions and parsed_here == []
    assert load_prepared(loaded.document.sha256, "assignment") is not None
    load_report(folder, short, "assignment")
    assert parsed_here == ["alder-migraine.pdf"]
    # the workbench closing while a long PDF is read apart: that reading stops, nothing is
    # read here instead
    monkeypatch.setenv("ROBTUI_CACHE_DIR", str(tmp_path / "other-cache"))
    closing = threading.Event()
    closing.set()
    stopped = load_report(folder, long, "assignment", cancel=closing)
    assert stopped.document is None and "closed" in stopped.problem
    assert parsed_here == ["alder-migraine.pdf"]
