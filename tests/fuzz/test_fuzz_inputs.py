"""Fuzzing robtui's readers and review-file loaders: only robtui's own errors may escape.

hypothesis chooses the input kind and the mutations of its seed (robtui.devtools.fuzz). The
default run is bounded to a few seconds for CI; ROBTUI_FUZZ_EXAMPLES=N runs N examples per
test (``robtui bench robustness`` runs 5,000 random ones and prints the figures).
"""

from __future__ import annotations

import os

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from robtui.devtools import fuzz

EXAMPLES = int(os.environ.get("ROBTUI_FUZZ_EXAMPLES", "12"))
FUZZ = settings(
    max_examples=EXAMPLES,
    deadline=None,
    derandomize="ROBTUI_FUZZ_EXAMPLES" not in os.environ,  # CI: the same inputs every run
    suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow],
    database=None,
)

mutations = st.lists(
    st.builds(
        fuzz.Mutation,
        op=st.sampled_from(fuzz.OPS),
        at=st.floats(0, 1),
        size=st.integers(1, 64),
        value=st.integers(0, 255),
    ),
    min_size=1,
    max_size=4,
)


@pytest.fixture(scope="module")
def seeds(tmp_path_factory):
    return fuzz.Seeds(tmp_path_factory.mktemp("seeds"))


@pytest.mark.parametrize("kind", fuzz.KINDS)
def test_seeds_load_cleanly(kind, seeds, tmp_path):
    assert fuzz.try_input(kind, seeds.data[kind], seeds, tmp_path) is None


@pytest.mark.parametrize("kind", fuzz.KINDS)
@FUZZ
@given(changes=mutations)
def test_mutated_inputs_raise_only_robtuis_errors(kind, changes, seeds, tmp_path):
    data = fuzz.mutate(seeds.data[kind], changes)
    escaped = fuzz.try_input(kind, data, seeds, tmp_path)
    assert escaped is None, f"{kind}: {fuzz.describe(escaped)} after {changes}"


@FUZZ
@given(data=st.binary(max_size=2048), kind=st.sampled_from(fuzz.KINDS))
def test_arbitrary_bytes_raise_only_robtuis_errors(data, kind, seeds, tmp_path):
    escaped = fuzz.try_input(kind, data, seeds, tmp_path)
    assert escaped is None, f"{kind}: {fuzz.describe(escaped)}"


def test_a_bug_in_robtuis_own_reader_is_reported_as_one(seeds, tmp_path, monkeypatch):
    """The fuzzing would count it: a robtui bug is never passed off as a damaged file."""
    from robtui.reading import text
    from robtui.reading.normalise import normalise_chars

    def broken(*_args, **_kwargs):
        return normalise_chars(None)  # a slip inside robtui's code: a non-string where text goes

    monkeypatch.setattr(text, "document_from_text", broken)
    escaped = fuzz.try_input("txt", seeds.data["txt"], seeds, tmp_path)
    assert escaped is not None and "bug in robtui itself" in str(escaped)
    assert "robtui/reading/" in str(escaped)
