"""How a user model learns and how much its counts weigh against the base model."""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass, fields, replace
from typing import Any

from ..errors import OptionError
from .share_rule import SHARE_RULES


@dataclass(frozen=True)
class AdaptSettings:
    """The learning settings, stored in the learned file beside the counts.

    Attributes:
        learning: learn from accepted and typed words; when off nothing is
            learned and every suggestion is the base model's.
        min_uses: a word the base vocabulary lacks is suggested once it has
            been typed this many times.
        hold_slips: a new word that at its first use lies one edit from a
            word the person has used (so may be a typo of it) waits for a second use
            (:mod:`foretype.adapt.slips`; docs/learning.md has the figures).
        prior_tokens: beta, the number of tokens the prior of the worth
            estimate weighs (and, under the ``online`` rule, the evidence at
            which the share reaches half of the worth).
        prior_worth: the worth assumed before any evidence (the EM prior).
        half_life: decay of old counts, in learned tokens: a count halves after
            this many further tokens (None: no decay).
        share_rule: how the share mu follows from the worth estimate:
            ``sharpened`` (default) or ``online`` (:mod:`foretype.adapt.share_rule`).

    The combined probability (README "Learning from your own text" and
    :mod:`foretype.adapt.combined`)::

        P(w | u v) = (1 - mu) * P_base(w | u' v') + mu * P_user(w | u v)
        mu = user_share(share_rule, worth_b, n_b, ...)   (foretype.adapt.share_rule)
        worth_b = (R_b + prior_worth * beta) / (n_b + beta)

    for the context's evidence bucket b; n_b counts the tokens learned in
    bucket b and R_b sums their responsibilities (one EM step per token).

    Raises:
        OptionError: a value is out of range.
    """

    learning: bool = True
    min_uses: int = 1
    hold_slips: bool = True
    prior_tokens: float = 60.0
    prior_worth: float = 0.5
    half_life: float | None = None
    share_rule: str = SHARE_RULES[0]

    def __post_init__(self) -> None:
        if not isinstance(self.learning, bool):
            raise OptionError(f"learning must be on or off, not {self.learning!r}")
        if not isinstance(self.hold_slips, bool):
            raise OptionError(f"holding possible slips must be on or off, not {self.hold_slips!r}")
        if not isinstance(self.min_uses, int) or isinstance(self.min_uses, bool) or self.min_uses < 1:
            raise OptionError(f"min uses must be a whole number of at least 1, not {self.min_uses!r}")
        if not (isinstance(self.prior_tokens, (int, float)) and math.isfinite(self.prior_tokens) and self.prior_tokens > 0):
            raise OptionError(f"the prior token count must be a positive number, not {self.prior_tokens!r}")
        if not (isinstance(self.prior_worth, (int, float)) and 0.0 < self.prior_worth < 1.0):
            raise OptionError(f"the prior worth must lie strictly between 0 and 1, not {self.prior_worth!r}")
        if self.share_rule not in SHARE_RULES:
            raise OptionError(f"unknown share rule {self.share_rule!r}; choose one of {', '.join(SHARE_RULES)}")
        if self.half_life is not None and not (isinstance(self.half_life, (int, float)) and math.isfinite(self.half_life) and self.half_life > 0):
            raise OptionError(f"the half-life must be a positive number of tokens, not {self.half_life!r}")

    def to_json(self) -> dict[str, Any]:
        """The settings as a JSON object (``hold_slips`` only when on, ``share_rule`` only when not
        ``online``: a file without them reads as before they existed)."""
        data = asdict(self)
        if not self.hold_slips:
            del data["hold_slips"]
        if self.share_rule == "online":
            del data["share_rule"]
        return data

    @staticmethod
    def from_json(data: Any) -> AdaptSettings:
        """Settings from a JSON object; unknown keys are ignored, missing ones take defaults
        (except ``hold_slips``: off, and ``share_rule``: ``online``, the behaviour before they existed).

        Raises:
            OptionError: a value is out of range or of the wrong type.
        """
        if not isinstance(data, dict):
            raise OptionError("the learning settings are not a JSON object")
        known = {f.name for f in fields(AdaptSettings)}
        values = {key: value for key, value in data.items() if key in known}
        # Settings stored before the slip check existed keep the behaviour they were written with.
        values.setdefault("hold_slips", False)
        values.setdefault("share_rule", "online")
        if "min_uses" in values and isinstance(values["min_uses"], float) and values["min_uses"].is_integer():
            values["min_uses"] = int(values["min_uses"])
        return AdaptSettings(**values)

    def changed(self, **changes: Any) -> AdaptSettings:
        """A copy with some settings changed (validated)."""
        return replace(self, **changes)
