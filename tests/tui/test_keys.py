"""The help screen's key map and the screens' bindings agree."""

from __future__ import annotations

from robtui.tui.keys import KEY_MAP, RESPONSE_KEYS, key_map_markdown
from robtui.tui.screens.assessment import AssessmentScreen
from robtui.tui.screens.compare import CompareScreen
from robtui.tui.screens.overview import OverviewScreen

NAMES = {
    "question_mark": "?",
    "slash": "/",
    "right_square_bracket": "]",
    "left_square_bracket": "[",
    "f1": "F1",
}


def _documented(screen: str) -> set[str]:
    keys: set[str] = set()
    for item in KEY_MAP:
        if item.screen in (screen, "everywhere"):
            keys |= set(item.keys.replace("/", " ").replace("…", " ").split())
    return keys


def test_every_binding_is_in_the_key_map():
    for screen, name in (
        (AssessmentScreen, "assessment"),
        (OverviewScreen, "overview"),
        (CompareScreen, "comparison"),
    ):
        documented = _documented(name) | {"1", "2", "3", "4", "5", "/"}
        for binding in screen.BINDINGS:
            for key in binding.key.split(","):
                shown = NAMES.get(key, key)
                assert shown in documented or key in documented, (name, key)


def test_response_keys_are_one_key_each_and_distinct():
    assert len(set(RESPONSE_KEYS)) == len(RESPONSE_KEYS) == 6
    assert all(len(k) == 1 for k in RESPONSE_KEYS)
    assert sorted(RESPONSE_KEYS.values()) == sorted(["Y", "PY", "PN", "N", "NI", "NA"])
    assert "| assessment | `y p m n i a` |" in key_map_markdown()
