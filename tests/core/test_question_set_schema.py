"""The question-set file's optional fields: design, domain keys, effect labels (DEVELOPERS.md,
"Adding a question set"). Each is checked on load with a message naming file, entry, problem."""

from __future__ import annotations

from pathlib import Path

import pytest

from robtui.core.questions import EFFECT_LABELS
from robtui.errors import DataFileError, InputError
from robtui.store.question_sets import builtin_question_set, load_question_set

MINIMAL = (Path(__file__).resolve().parents[1] / "data" / "question_sets" / "valid-minimal.toml")


def _variant(tmp_path: Path, *, head: str = "", domain: str = "", tail: str = "") -> Path:
    text = MINIMAL.read_text("utf-8")
    text = text.replace('licence = "MIT"\n', f'licence = "MIT"\n{head}')
    text = text.replace('short_name = "Mini"\n', f'short_name = "Mini"\n{domain}')
    path = tmp_path / "variant.toml"
    path.write_text(text + tail, "utf-8")
    return path


def _refused(path: Path, entry: str, problem: str) -> None:
    with pytest.raises(DataFileError) as caught:
        load_question_set(path)
    assert str(caught.value).startswith(f"{path}: {entry}"), caught.value
    assert problem in str(caught.value)


def test_defaults_keep_old_files_loading():
    mini = load_question_set(MINIMAL)
    assert mini.design is None
    assert mini.domain_keys() == {"1": "1"}  # a one-character id is its own key
    assert mini.effect_label("assignment") == EFFECT_LABELS["assignment"]


def test_design_key_and_effect_labels_are_read(tmp_path):
    path = _variant(
        tmp_path,
        head='design = "stepped-wedge"\n',
        domain='key = "w"\n',
    )
    mini = load_question_set(path)
    assert mini.design == "stepped-wedge"
    assert mini.domain_keys() == {"w": "1"}


def test_a_long_domain_id_has_no_key_unless_given(tmp_path):
    text = MINIMAL.read_text("utf-8").replace('id = "1"', 'id = "1b"').replace('"1.', '"1b.')
    path = tmp_path / "long-id.toml"
    path.write_text(text, "utf-8")
    assert load_question_set(path).domain_keys() == {}


def test_effect_labels_from_the_file(tmp_path):
    tail = '\n[[effect]]\nid = "assignment"\nlabel = "our words for it"\n'
    mini = load_question_set(_variant(tmp_path, tail=tail))
    assert mini.effect_label("assignment") == "our words for it"
    assert mini.effect_label("adhering") == EFFECT_LABELS["adhering"]


@pytest.mark.parametrize(
    ("head", "domain", "tail", "entry", "problem"),
    [
        ('design = "Cluster Trials"\n', "", "", "[set], design", "short lower-case name"),
        ("", 'key = "ab"\n', "", "domain 1, key", "one letter or digit"),
        ("", 'key = " "\n', "", "domain 1, key", "one letter or digit"),
        ("", 'key = "?"\n', "", "domain 1, key", "one letter or digit"),
        ("", "", '\n[[effect]]\nid = "Per Protocol"\nlabel = "x"\n', "effect entry 1, id",
         "'Per Protocol' is not an effect id"),
        ("", 'effect = "starting"\n', "", "[[effect]]",
         "domains use effect starting: declare it with an [[effect]] entry"),
        ("", "", '\n[[effect]]\nid = "assignment"\nwords = "x"\n', "effect entry 1",
         "unknown key 'words'"),
    ],
)
def test_bad_optional_fields_are_named(tmp_path, head, domain, tail, entry, problem):
    _refused(_variant(tmp_path, head=head, domain=domain, tail=tail), entry, problem)


def test_two_domains_may_not_share_a_key(tmp_path):
    text = MINIMAL.read_text("utf-8")
    second = text[text.index("[[domain]]"):].replace('id = "1"', 'id = "2"').replace('"1.', '"2.')
    path = tmp_path / "two.toml"
    path.write_text(text + "\n" + second.replace('short_name = "Mini"\n',
                                                  'short_name = "Mini"\nkey = "1"\n'), "utf-8")
    _refused(path, "domain 2, key", "'1' already goes to domain 1")


def test_bundled_sets_declare_their_design():
    designs = {builtin_question_set(s).design for s in
               ("rob2-parallel", "rob2-cluster", "rob2-crossover")}
    assert designs == {"parallel", "cluster", "crossover"}


def _two_effects(tmp_path: Path, declared: str) -> Path:
    """The minimal set with its domain asked two ways, for effects of the file's own."""
    text = MINIMAL.read_text("utf-8")
    domain = text[text.index("[[domain]]"):]
    first = domain.replace('short_name = "Mini"\n', 'short_name = "Mini"\neffect = "starting"\n')
    second = domain.replace('short_name = "Mini"\n', 'short_name = "Mini"\neffect = "sustaining"\n')
    path = tmp_path / "own-effects.toml"
    path.write_text(text[: text.index("[[domain]]")] + first + "\n" + second + declared, "utf-8")
    return path


OWN_EFFECTS = (
    '\n[[effect]]\nid = "starting"\nlabel = "effect of starting the programme"\n'
    '\n[[effect]]\nid = "sustaining"\nlabel = "effect of keeping to the programme"\n'
)


def test_a_set_declares_effects_of_its_own(tmp_path):
    own = load_question_set(_two_effects(tmp_path, OWN_EFFECTS))
    assert own.effects() == ["starting", "sustaining"]  # the file's order
    assert own.default_effect() == "starting"
    assert own.effect_label("sustaining") == "effect of keeping to the programme"
    assert own.domain("1").effect == "starting"  # no effect named: the set's first
    assert own.domain("1", "sustaining").effect == "sustaining"
    assert own.question_key("1.1", "starting") == "1.1"
    assert own.question_key("1.1", "sustaining") == "sustaining:1.1"
    assert own.check_effect("sustaining") == "sustaining"
    with pytest.raises(InputError, match="unknown effect 'assignment': question set mini offers "
                       "starting or sustaining"):
        own.check_effect("assignment")


def test_rob2_sets_keep_their_two_effects_and_a_plain_set_takes_any():
    parallel = builtin_question_set("rob2-parallel")
    assert parallel.effects() == ["assignment", "adhering"]
    assert parallel.default_effect() == "assignment"
    mini = load_question_set(MINIMAL)  # no domain varies with the effect
    assert mini.effects() == [] and mini.default_effect() == "assignment"
    assert mini.check_effect("anything-else") == "anything-else"
