"""robtui suggest: JSON shape, options, exit codes and messages."""

import json

import pytest

from robtui.cli import main
from robtui.evidence.ranker import active_questions


@pytest.fixture
def report(tmp_path, report_text):
    path = tmp_path / "stepwell.txt"
    path.write_text(report_text, encoding="utf-8")
    return path


def _json(capsys, *argv):
    code = main(["suggest", *argv, "--json"])
    out = capsys.readouterr()
    assert code == 0, out.err
    return json.loads(out.out)  # exactly one JSON object: json.loads refuses trailing data


def test_json_shape_every_question_best_first(capsys, report, report_text):
    data = _json(capsys, str(report))
    assert set(data) == {"document", "questions"}
    assert data["document"]["path"].endswith("stepwell.txt")
    assert len(data["document"]["sha256"]) == 64
    assert list(data["questions"]) == [q for q, _ in active_questions("assignment")]
    for qid, items in data["questions"].items():
        assert 1 <= len(items) <= 5, qid
        assert [i["score"] for i in items] == sorted((i["score"] for i in items), reverse=True)
        for item in items:
            assert set(item) == {"start", "end", "page", "section", "score", "text"}
            assert report_text[item["start"] : item["end"]] == item["text"]
            assert item["page"] is None


def test_top_questions_effect_and_threshold(capsys, report):
    data = _json(capsys, str(report), "--top", "2", "--questions", "1.1,1.2")
    assert list(data["questions"]) == ["1.1", "1.2"]
    assert all(len(v) == 2 for v in data["questions"].values())
    data = _json(capsys, str(report), "--effect", "adhering")
    assert list(data["questions"]) == [q for q, _ in active_questions("adhering")]
    data = _json(capsys, str(report), "--threshold", "0.999")
    assert len(data["questions"]) == len(active_questions("assignment"))
    assert all(i["score"] >= 0.999 for v in data["questions"].values() for i in v)
    assert any(v == [] for v in data["questions"].values())


def test_text_output_lists_questions(capsys, report):
    assert main(["suggest", str(report), "--questions", "1.2", "--top", "2"]) == 0
    out = capsys.readouterr().out
    assert "1.2" in out and "envelopes" in out


@pytest.mark.parametrize(
    "argv, message",
    [
        (["--questions", "1.1,9.9"], "9.9"),
        (["--top", "0"], "--top"),
        (["--threshold", "2"], "--threshold"),
    ],
)
def test_bad_options_exit_2(capsys, report, argv, message):
    assert main(["suggest", str(report), *argv]) == 2
    err = capsys.readouterr().err
    assert err.startswith("robtui: ") and message in err and "Traceback" not in err


def test_file_the_reader_rejects_exits_2_with_its_message(capsys, tmp_path):
    assert main(["suggest", str(tmp_path / "absent.txt")]) == 2
    err = capsys.readouterr().err
    assert err.startswith("robtui: ") and "absent.txt" in err
    binary = tmp_path / "image.pdf"
    binary.write_bytes(b"\x89PNG\r\n\x1a\n" + bytes(range(256)) * 4)
    assert main(["suggest", str(binary), "--json"]) == 2
    assert capsys.readouterr().err.startswith("robtui: ")


def test_document_without_sentences_gives_empty_lists_and_says_why(capsys, tmp_path):
    empty = tmp_path / "empty.txt"
    empty.write_text("\n\n", encoding="utf-8")
    code = main(["suggest", str(empty), "--json"])
    out = capsys.readouterr()
    if code == 2:  # the reader may refuse an empty file outright: then its message is shown
        assert out.err.startswith("robtui: ")
        return
    data = json.loads(out.out)
    assert all(v == [] for v in data["questions"].values())
    assert "no sentences" in out.err


def test_damaged_model_file_message(capsys, report, tmp_path):
    bad = tmp_path / "ranker.npz"
    bad.write_bytes(b"garbage")
    assert main(["suggest", str(report), "--model", str(bad)]) == 2
    err = capsys.readouterr().err
    assert "ranker.npz" in err and "train-ranker" in err and "Traceback" not in err


def test_spread_keeps_the_shape_and_the_best_sentence_first(capsys, report):
    plain = _json(capsys, str(report))
    spread = _json(capsys, str(report), "--spread")
    assert list(spread["questions"]) == list(plain["questions"])
    for qid, items in spread["questions"].items():
        assert items[0] == plain["questions"][qid][0]
        assert items[0]["score"] == max(i["score"] for i in items)
