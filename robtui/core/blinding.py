"""Who may see or change whose work (pure): blinding as robtui enforces it.

Two reviewers assess each result independently; neither should see the other's answers or
judgements while the assessments are being made. robtui enforces this in what it shows and
changes, given who is asking; it cannot make plain files secret (that is the folder's
permissions' job, or separate copies of the review: see the README).

- A reviewer always sees and changes their own work.
- The lead sees reviewers' complete work (comparison, agreement, consensus, exports); a
  reviewer's unfinished work, or changing it, takes the explicit override (``unblind``).
- Nobody else sees another reviewer's work through robtui, and no one unnamed does.
"""

from __future__ import annotations

from robtui.core.model import Review
from robtui.errors import InputError

ASKER_ENV = "ROBTUI_REVIEWER"
HOW_TO_SAY = f"say who is asking with --as NAME (or set {ASKER_ENV}=NAME in your shell)"


def _lead_words(review: Review) -> str:
    return f"the lead ({review.lead})" if review.lead else "the lead (the review names none)"


def require_asker(asker: str | None, review: Review, what: str) -> str:
    """The asker, who must be named and be on the review (InputError otherwise)."""
    if not asker:
        raise InputError(f"{what} shows reviewers' work: {HOW_TO_SAY}")
    known = [*review.reviewers, *([review.lead] if review.lead else [])]
    if asker not in known:
        raise InputError(
            f"{asker!r} is not on this review (reviewers: {', '.join(review.reviewers) or 'none'}"
            f"; lead: {review.lead or 'none'}): {HOW_TO_SAY}"
        )
    return asker


def require_lead(asker: str | None, review: Review, what: str) -> str:
    """Commands that show both reviewers' work (compare, agreement, consensus, export) are
    the lead's; a review without a lead lets any of its reviewers run them."""
    asker = require_asker(asker, review, what)
    if review.lead and asker != review.lead:
        raise InputError(
            f"{what} shows both reviewers' work, which only {_lead_words(review)} may see; "
            f"you asked as {asker}. Each reviewer sees their own work with "
            "`robtui assess` or `robtui status`"
        )
    return asker


def may_see(
    asker: str | None, owner: str, review: Review, *, complete: bool, unblind: bool = False
) -> bool:
    """Whether ``asker`` may see ``owner``'s assessment (complete or not)."""
    if asker is None:
        return False
    if asker == owner:
        return True
    if review.lead and asker == review.lead:
        return complete or unblind
    return False


def require_may_use(
    asker: str, owner: str, review: Review, *, complete: bool, unblind: bool, changing: bool
) -> None:
    """InputError unless ``asker`` may see (or, ``changing``, change) ``owner``'s work."""
    if asker == owner:
        return
    if review.lead and asker == review.lead:
        if unblind:
            return
        state = "complete" if complete else "not complete"
        if complete and not changing:
            return
        raise InputError(
            f"{owner}'s assessment is {state}: the lead {'changes' if changing else 'sees'} "
            f"another reviewer's work only with the explicit override --unblind (you asked as "
            f"{asker})"
        )
    raise InputError(
        f"this is {owner}'s assessment: only {owner}, or {_lead_words(review)} with --unblind, "
        f"may see or change it through robtui (you asked as {asker}; {HOW_TO_SAY})"
    )
