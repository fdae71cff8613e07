"""GRADE helper: a suggested rating for the risk-of-bias domain of certainty (pure).

GRADE rates down certainty for risk of bias as "not serious", "serious" or "very serious"
(Guyatt et al., GRADE guidelines 4: rating the quality of evidence - study limitations (risk
of bias), J Clin Epidemiol 2011;64:407-415). GRADE asks for judgement, not a formula; the
thresholds below are OUR OWN rule of thumb, shown with every suggestion, and the result is a
suggestion for the guideline panel, never a rating.

Rule of thumb (ours): with shares of meta-analysis weight (or of studies, when no weights
are given) among the judged studies,
- "very serious" when results at high risk hold >= 50%;
- "serious" when results at high risk hold >= 20%, or results at high risk or with some
  concerns together hold >= 50%;
- "not serious" otherwise;
- no suggestion while less than half of the weight (or of the studies) is judged: the
  judged part cannot stand for the body of evidence yet.
Shares are shown to one decimal, rounded down, so a shown share never contradicts the rule
(19.96% shows as 19.9%, not as 20%).
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, field

VERY_SERIOUS_HIGH = 0.5
SERIOUS_HIGH = 0.2
SERIOUS_CONCERNS = 0.5
ENOUGH_JUDGED = 0.5

RULE_OF_THUMB = (
    "Our own rule of thumb (not part of GRADE): very serious if >= 50% of the weight is at "
    "high risk; serious if >= 20% is at high risk or >= 50% is at high risk or some concerns; "
    "otherwise not serious; no suggestion while less than half is judged."
)
SUGGESTION_LABEL = (
    "Suggestion for the panel (GRADE guidelines 4, Guyatt et al., J Clin Epidemiol "
    "2011;64:407-415); the panel decides."
)


@dataclass(frozen=True)
class GradeSuggestion:
    rating: str | None  # "not serious" | "serious" | "very serious"; None if nothing judged
    basis: str  # "weight" or "studies"
    share_low: float
    share_some_concerns: float
    share_high: float
    judged: list[str]
    not_judged: list[str]
    rationale: str
    notes: list[str] = field(default_factory=list)
    rule_of_thumb: str = RULE_OF_THUMB
    label: str = SUGGESTION_LABEL

    def to_dict(self) -> dict:
        return {
            "rating": self.rating,
            "basis": self.basis,
            "share_low": round(self.share_low, 4),
            "share_some_concerns": round(self.share_some_concerns, 4),
            "share_high": round(self.share_high, 4),
            "judged": list(self.judged),
            "not_judged": list(self.not_judged),
            "rationale": self.rationale,
            "notes": list(self.notes),
            "rule_of_thumb": self.rule_of_thumb,
            "label": self.label,
        }


def suggest_rob_rating(
    overall: Mapping[str, str | None], weights: Mapping[str, float] | None = None
) -> GradeSuggestion:
    """Suggest a GRADE risk-of-bias rating from each study's overall judgement.

    ``overall`` maps study id -> "low" / "some_concerns" / "high" (None or "incomplete" for
    studies not judged yet: listed, left out of the shares). ``weights`` (study id -> weight)
    switches the basis from counting studies to weighting them; a judged study without a
    weight makes the helper fall back to counting studies, with a note.
    """
    judged = [s for s, j in overall.items() if j in ("low", "some_concerns", "high")]
    not_judged = [s for s in overall if s not in judged]
    notes: list[str] = []
    basis = "studies"
    use = {s: 1.0 for s in judged}
    if weights:
        missing = [s for s in judged if s not in weights]
        if missing:
            notes.append(f"no weight given for {', '.join(missing)}: shares count studies instead")
        else:
            basis = "weight"
            use = {s: float(weights[s]) for s in judged}
    if not_judged:
        notes.append(f"not judged yet (left out of the shares): {', '.join(not_judged)}")
    total = sum(use.values())
    if not judged or total <= 0:
        return GradeSuggestion(
            None,
            basis,
            0.0,
            0.0,
            0.0,
            judged,
            not_judged,
            "No judged study with a positive weight: no suggestion.",
            notes,
        )
    share = {
        code: sum(w for s, w in use.items() if overall[s] == code) / total
        for code in ("low", "some_concerns", "high")
    }
    judged_share = _judged_share(judged, not_judged, weights if basis == "weight" else None)
    studies = f"{len(judged)} judged {'study' if len(judged) == 1 else 'studies'}"
    so_far = (
        f"low {_pct(share['low'])}, some concerns {_pct(share['some_concerns'])}, "
        f"high {_pct(share['high'])} of the judged {basis}"
    )
    rating, why = _rule(share, basis)
    rationale = f"{studies}; {so_far}: {why}."
    if judged_share < ENOUGH_JUDGED:
        rating = None
        rationale = (
            f"Only {_pct(judged_share)} of the {basis} is judged ({studies} of "
            f"{len(overall)}): no suggestion until at least half is; so far {so_far}."
        )
    return GradeSuggestion(
        rating,
        basis,
        share["low"],
        share["some_concerns"],
        share["high"],
        judged,
        not_judged,
        rationale,
        notes,
    )


def _rule(share: Mapping[str, float], basis: str) -> tuple[str, str]:
    """Our rule of thumb: (rating, why) from the shares of the judged part."""
    concerns = share["high"] + share["some_concerns"]
    if share["high"] >= VERY_SERIOUS_HIGH:
        return "very serious", f"{_pct(share['high'])} of the {basis} is at high risk (>= 50%)"
    if share["high"] >= SERIOUS_HIGH:
        return "serious", f"{_pct(share['high'])} of the {basis} is at high risk (>= 20%)"
    if concerns >= SERIOUS_CONCERNS:
        return "serious", (
            f"{_pct(concerns)} of the {basis} is at high risk or some concerns (>= 50%)"
        )
    return "not serious", (
        f"{_pct(share['high'])} of the {basis} is at high risk (< 20%) and "
        f"{_pct(concerns)} at high risk or some concerns (< 50%)"
    )


def _pct(share: float) -> str:
    """A share as a percentage to one decimal, rounded down (so 0.1996 never reads 20.0%)."""
    return f"{math.floor(share * 1000 + 1e-9) / 10:.1f}%"


def _judged_share(judged, not_judged, weights: Mapping[str, float] | None) -> float:
    """The part of the body of evidence judged: by weight when every study has one."""
    if weights and all(s in weights for s in [*judged, *not_judged]):
        total = sum(float(weights[s]) for s in [*judged, *not_judged])
        return sum(float(weights[s]) for s in judged) / total if total > 0 else 0.0
    return len(judged) / max(1, len(judged) + len(not_judged))
