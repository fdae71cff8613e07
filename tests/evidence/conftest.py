"""Shared fixtures: an invented trial report (fictional drug, trial and people)."""

import pytest

# Invented for these tests; not taken from any article.
REPORT = """Title
Velorin versus placebo for chronic heel pain: the invented STEPWELL randomised trial
Abstract
Background Heel pain is common. We tested Velorin, an invented topical gel.
Methods In this double-blind trial, 120 adults were randomly assigned to Velorin or placebo.
Trial registration The trial was registered at the Invented Trials Registry, number ITR-2040-117.
Methods
Randomisation
A statistician not involved in recruitment generated the allocation sequence with a computer random number generator in permuted blocks of four.
Allocation was concealed using sequentially numbered, sealed, opaque envelopes opened by the pharmacy after enrolment.
Blinding
Participants and the physiotherapists who applied the gel were unaware of group assignment because the placebo gel was identical in appearance.
Outcome assessors were masked to treatment allocation.
Outcomes
The primary outcome was heel pain at 12 weeks measured on a 100 mm visual analogue scale.
Statistical analysis
All randomised participants were analysed in the groups to which they were assigned (intention to treat).
Results
Of 120 participants randomised, 114 completed follow-up; four were lost to follow-up and two withdrew.
Baseline characteristics were similar in the two groups (table 1).
Pain fell more with Velorin than with placebo.
Discussion
The gel was well tolerated and the town library hosted the patient meetings on Tuesdays.
"""


@pytest.fixture
def report_text() -> str:
    return REPORT


@pytest.fixture(scope="session")
def ranker():
    from robtui.evidence.ranker import load_ranker

    return load_ranker()
