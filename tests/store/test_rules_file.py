"""rules.toml: round trip, validation messages naming file and entry, safe saves, history."""

import pytest

from robtui.core.rules import RuleBook, add_rule, retire_rule
from robtui.errors import DataFileError, InputError, NewerSchemaError
from robtui.store.question_sets import builtin_question_set
from robtui.store.review_folder import ReviewFolder
from robtui.store.rules_file import (
    hand_edit_warning,
    history_dir,
    load_folder_rules,
    load_rulebook,
    load_rules_safely,
    rules_to_toml,
    save_rulebook,
)

QSET = builtin_question_set()

GOOD = """schema_version = 1
question_set = "rob2-parallel"
question_set_version = "1"
version = 2
updated = "2026-01-01T00:00:00Z"

[[rules]]
id = "R1"
question = "4.4"
text = "Counts of deaths: answer N."
answer = "N"
added_in = 1
when = { outcome_type = "objective", self_reported = false }

[[rules]]
id = "R2"
question = "1.1"
text = "A bare 'randomised' is NI."
added_in = 2
"""


@pytest.fixture()
def folder(tmp_path):
    return ReviewFolder.create(tmp_path / "rev", "Corvane review", reviewers=["ana", "ben"])


def write(folder, text):
    folder.rules_path.write_text(text, encoding="utf-8")
    return folder.rules_path


def test_absent_file_is_version_zero(folder):
    book = load_folder_rules(folder)
    assert book.version == 0 and book.rules == () and book.question_set_version == QSET.version
    assert load_rules_safely(folder) == (book, None)


def test_round_trip_is_stable(folder):
    path = write(folder, GOOD)
    book = load_rulebook(path, QSET)
    assert book.version == 2
    assert book.rules[0].when == (("outcome_type", "objective"), ("self_reported", "false"))
    text = rules_to_toml(book)
    path.write_text(text)
    assert rules_to_toml(load_rulebook(path, QSET)) == text


@pytest.mark.parametrize(
    "edit, expected",
    [
        (('question = "1.1"', 'question = "1.9"'), "rule R2 (entry 2): unknown question id '1.9'"),
        (
            ("outcome_type =", "outcome_kind ="),
            "rule R1 (entry 1): unknown attribute 'outcome_kind'",
        ),
        (('"objective"', '"hard"'), "rule R1 (entry 1): outcome_type must be one of"),
        (('answer = "N"', 'answer = "Maybe"'), "rule R1 (entry 1): answer"),
        (('text = "A bare', 'txt = "A bare'), "rule R2 (entry 2)"),
        (('question_set_version = "1"', 'question_set_version = "0.9"'), "version 0.9"),
        (("added_in = 2", "added_in = 5"), "do not fit the rule book version 2"),
    ],
)
def test_validation_errors_name_file_and_entry(folder, edit, expected):
    path = write(folder, GOOD.replace(*edit))
    with pytest.raises(DataFileError) as caught:
        load_rulebook(path, QSET)
    assert str(path) in str(caught.value)
    assert expected in str(caught.value)
    # the review still opens; the app gets a message, not an exception
    ReviewFolder.open(folder.root)
    book, message = load_rules_safely(folder.root)
    assert (
        book is None and message.startswith("answering rules unavailable") and expected in message
    )


def test_invalid_toml_is_reported_and_never_overwritten(folder):
    broken = GOOD.replace('text = "Counts', "text = Counts")
    path = write(folder, broken)
    with pytest.raises(DataFileError, match="not valid TOML"):
        load_rulebook(path, QSET)
    new = add_rule(RuleBook(), "1.1", "x")
    with pytest.raises(DataFileError, match="left as it is"):
        save_rulebook(path, new, expected_version=0, qset=QSET)
    assert path.read_text() == broken
    assert not history_dir(path).exists()
    book, message = load_rules_safely(folder)
    assert book is None and "not valid TOML" in message


def test_newer_schema_refused(folder):
    path = write(folder, GOOD.replace("schema_version = 1", "schema_version = 99"))
    with pytest.raises(NewerSchemaError, match="newer robtui"):
        load_rulebook(path, QSET)


def test_save_checks_version_on_disk_and_keeps_history(folder):
    path = folder.rules_path
    book = load_folder_rules(folder)
    v1 = save_rulebook(path, add_rule(book, "4.4", "first"), expected_version=0, qset=QSET)
    assert v1.updated.endswith("Z") and load_rulebook(path, QSET).version == 1
    v2 = save_rulebook(path, retire_rule(v1, "R1"), expected_version=1, qset=QSET)
    assert (history_dir(path) / "rules-v1.toml").read_text() == rules_to_toml(v1)
    on_disk = path.read_text()
    # a change made from version 1 while the file moved on to 2: refused, nothing written
    with pytest.raises(InputError, match="changed while"):
        save_rulebook(path, add_rule(v1, "1.1", "late"), expected_version=1, qset=QSET)
    assert path.read_text() == on_disk
    # an invalid book is refused before anything is written
    with pytest.raises(DataFileError, match="unknown question id '9.9'"):
        save_rulebook(path, add_rule(v2, "9.9", "bad"), expected_version=2, qset=QSET)
    assert path.read_text() == on_disk
    # a version that does not go up is refused
    with pytest.raises(InputError, match="version above 2"):
        save_rulebook(path, v2, expected_version=2, qset=QSET)
    loaded = load_rulebook(path, QSET)
    assert [r.id for r in loaded.active(1)] == ["R1"] and loaded.active() == []


def test_hand_edit_without_version_bump_is_kept_in_history(folder):
    path = folder.rules_path
    v1 = save_rulebook(path, add_rule(RuleBook(), "4.4", "first"), expected_version=0, qset=QSET)
    save_rulebook(path, add_rule(v1, "1.1", "second"), expected_version=1, qset=QSET)
    # someone edits version 2 by hand without raising the version, then a tool change follows
    edited = path.read_text().replace("second", "second, edited")
    path.write_text(edited)
    v2 = load_rulebook(path, QSET)
    assert "changed by hand since version 2" in hand_edit_warning(path, v2)
    v3 = save_rulebook(path, add_rule(v2, "1.2", "third"), expected_version=2, qset=QSET)
    kept = history_dir(path)
    assert (kept / "rules-v2.1.toml").read_text() == edited  # the hand edit, kept
    assert "second, edited" not in (kept / "rules-v2.toml").read_text()  # as robtui saved it
    assert (kept / "rules-v3.toml").read_text() == path.read_text()
    assert hand_edit_warning(path, v3) is None
