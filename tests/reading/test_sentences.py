"""Sentence splitting on the constructions trial reports are full of."""

from __future__ import annotations

import pytest

from robtui.reading.sentences import split_sentences


def sentences(text: str) -> list[str]:
    return [text[a:b] for a, b in split_sentences(text)]


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        (
            "Smith et al. reported a benefit. The trial was large.",
            ["Smith et al. reported a benefit.", "The trial was large."],
        ),
        (
            "Pain fell more with drug vs. placebo (Fig. 2). It then rose.",
            ["Pain fell more with drug vs. placebo (Fig. 2).", "It then rose."],
        ),
        (
            "The drug was given i.v. over 30 min. Patients were observed.",
            ["The drug was given i.v. over 30 min.", "Patients were observed."],
        ),
        (
            "In total n = 45 were analysed. The difference was clear (p < 0.001). Next one.",
            [
                "In total n = 45 were analysed.",
                "The difference was clear (p < 0.001).",
                "Next one.",
            ],
        ),
        (
            "The mean was 3.5 mg. The odds ratio was 2.1 (95% CI 1.2–3.4). Done.",
            ["The mean was 3.5 mg.", "The odds ratio was 2.1 (95% CI 1.2–3.4).", "Done."],
        ),
        (
            "This was shown before.12 The next step followed.3,4 Then we stopped.",
            ["This was shown before.12", "The next step followed.3,4", "Then we stopped."],
        ),
        (
            "It rose with age.[1,2] Because of this, we waited.[3–5] Then we stopped.",
            ["It rose with age.[1,2]", "Because of this, we waited.[3–5]", "Then we stopped."],
        ),
        (
            "It is debated.6 7 In particular, doses vary.18 19 20 21 Whether it helps is unclear.",
            [
                "It is debated.6 7",
                "In particular, doses vary.18 19 20 21",
                "Whether it helps is unclear.",
            ],
        ),
        (
            "See Fig. 3 and Table 2. Results are in Figure 1. Baseline data follow.",
            ["See Fig. 3 and Table 2.", "Results are in Figure 1.", "Baseline data follow."],
        ),
        (
            "Table 1. Baseline characteristics by group.",
            ["Table 1. Baseline characteristics by group."],
        ),
        (
            "Written by J. Smith and A. Jones. They agreed.",
            ["Written by J. Smith and A. Jones.", "They agreed."],
        ),
        ("Was it blinded? Yes! It was.", ["Was it blinded?", "Yes!", "It was."]),
        ("Statistical analysis", ["Statistical analysis"]),
        (
            "It fell by 16%. sPLA2-IIA was reduced. hs-CRP rose.",
            ["It fell by 16%.", "sPLA2-IIA was reduced.", "hs-CRP rose."],
        ),
        (
            "Values were low. *p<0.0001 versus placebo.",
            ["Values were low.", "*p<0.0001 versus placebo."],
        ),
        ("We measured e.g. mRNA levels. Done.", ["We measured e.g. mRNA levels.", "Done."]),
        ('He said "it worked." Then left.', ['He said "it worked."', "Then left."]),
        # keywords parted by full stops standing apart are one list, not a sentence each
        ("Walking . Diaries . Nurse visits . Older adults",
         ["Walking . Diaries . Nurse visits . Older adults"]),
        # but a sentence ending in a stop set apart still ends there
        ("The diagram shows the flow of the walkers . Baseline data were alike.",
         ["The diagram shows the flow of the walkers .", "Baseline data were alike."]),
    ],
)
def test_splitter_cases(text: str, expected: list[str]) -> None:
    assert sentences(text) == expected


def test_spans_are_offsets_into_the_text_and_skip_surrounding_space() -> None:
    text = "  First one.   Second one.  "
    spans = split_sentences(text)
    assert spans == [(2, 12), (15, 26)]
    assert [text[a:b] for a, b in spans] == ["First one.", "Second one."]


def test_splitting_a_slice_keeps_offsets_of_the_whole_text() -> None:
    text = "Heading\nOne sentence. Two sentence."
    spans = split_sentences(text, 8, len(text))
    assert [text[a:b] for a, b in spans] == ["One sentence.", "Two sentence."]
    assert spans[0][0] == 8
