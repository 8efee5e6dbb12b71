"""How much the combined model trusts the user model after one context: the share mu.

Two rules, both built on the online estimate of the user model's worth in the
context's evidence bucket b (:meth:`foretype.adapt.user_model.UserModel.worth`)::

    worth_b = (R_b + prior_worth * beta) / (n_b + beta)

where n_b counts the tokens learned in bucket b and R_b sums their EM
responsibilities (Jelinek & Mercer 1980: the share of each token's
probability the user model supplied, computed just before it was counted).

``online`` (the rule of learned files written before ``share_rule`` existed)::

    mu = worth_b * n_b / (n_b + beta)

``sharpened`` (the default)::

    mu = sharpen(worth_b) * n_b / (n_b + RAMP_TOKENS)
    sharpen(x) = x^p / (x^p + (1 - x)^p),  p = SHARPEN_POWER

where the base model knows both context words; where it does not (a word of
the context is new to its vocabulary, so its prediction is a guess from a
shorter context), ``sharpen`` is left out and mu = worth_b * n_b / (n_b +
RAMP_TOKENS).  Why: the EM worth is the share that maximises the likelihood of
the person's text, and it stays at 0.1 to 0.2 even on text like the base
model's training text, where any such share costs keystrokes (the list is
ranked, and a few recent words pushed up displace the base model's better
guesses).  Raising the odds worth / (1 - worth) to the power p keeps a worth
of 0.5 at 0.5, lifts a high worth and pushes a low one towards 0 (0.15 becomes
0.03), so the share is large only where the person's text says the user model
clearly beats the base model.  The ramp reaches half the worth after
RAMP_TOKENS tokens instead of beta, so learning pays from the first words of a
new topic.  docs/learning.md has the measurements that chose p, the ramp and
beta.
"""

from __future__ import annotations

SHARE_RULES = ("sharpened", "online")
"""The share rules, the default first."""

SHARPEN_POWER = 2.0
"""p: the power the worth's odds are raised to by the sharpened rule."""

RAMP_TOKENS = 5.0
"""The evidence (tokens in the bucket) at which the sharpened rule's share reaches half its worth."""


def sharpen(worth: float, power: float = SHARPEN_POWER) -> float:
    """worth^p / (worth^p + (1 - worth)^p): the worth with its odds raised to the power p (0 <= worth <= 1)."""
    high = worth**power
    low = (1.0 - worth) ** power
    return high / (high + low)


def user_share(rule: str, worth: float, evidence: float, prior_tokens: float, base_knows_context: bool) -> float:
    """The user model's share mu after one context.

    Args:
        rule: ``sharpened`` or ``online`` (see the module docstring).
        worth: worth_b of the context's evidence bucket.
        evidence: n_b, the (decayed) tokens learned in that bucket (0: mu is 0).
        prior_tokens: beta, the online rule's ramp.
        base_knows_context: the base model knows both context words (START counts as known).

    Returns:
        mu in [0, 1).

    Raises:
        ValueError: an unknown rule.
    """
    if evidence <= 0.0:
        return 0.0
    if rule == "online":
        return worth * (evidence / (evidence + prior_tokens))
    if rule == "sharpened":
        trusted = sharpen(worth) if base_knows_context else worth
        return trusted * (evidence / (evidence + RAMP_TOKENS))
    raise ValueError(f"unknown share rule {rule!r}")


__all__ = ["SHARE_RULES", "SHARPEN_POWER", "RAMP_TOKENS", "sharpen", "user_share"]
