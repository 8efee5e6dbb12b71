"""How a user model learns and how much its counts weigh against the base model."""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass, fields, replace
from typing import Any

from ..errors import OptionError


@dataclass(frozen=True)
class AdaptSettings:
    """The learning settings, stored in the learned file beside the counts.

    Attributes:
        learning: learn from accepted and typed words; when off nothing is
            learned and every suggestion is the base model's.
        min_uses: a word the base vocabulary lacks is suggested once it has
            been typed this many times (one use is often a typo).
        weight_max: the largest share the user model can take (mu_max below).
        weight_half: the user token count at which the share reaches half of
            ``weight_max`` (beta below).
        half_life: decay of old counts, in learned tokens: a count halves after
            this many further tokens (None: no decay).

    The combined probability (README "Learning from your own text")::

        P(w | u v) = (1 - mu) * P_base(w | u' v') + mu * P_user(w | u v)
        mu = weight_max * n / (n + weight_half),   n = the user's (decayed) token count

    where u' v' is the context with learned-only words read as UNKNOWN.

    Raises:
        OptionError: a value is out of range.
    """

    learning: bool = True
    min_uses: int = 2
    weight_max: float = 0.85
    weight_half: float = 200.0
    half_life: float | None = None

    def __post_init__(self) -> None:
        if not isinstance(self.learning, bool):
            raise OptionError(f"learning must be on or off, not {self.learning!r}")
        if not isinstance(self.min_uses, int) or isinstance(self.min_uses, bool) or self.min_uses < 1:
            raise OptionError(f"min uses must be a whole number of at least 1, not {self.min_uses!r}")
        if not (isinstance(self.weight_max, (int, float)) and 0.0 <= self.weight_max < 1.0):
            raise OptionError(f"the largest user share must be at least 0 and below 1, not {self.weight_max!r}")
        if not (isinstance(self.weight_half, (int, float)) and math.isfinite(self.weight_half) and self.weight_half > 0):
            raise OptionError(f"the half-share token count must be a positive number, not {self.weight_half!r}")
        if self.half_life is not None and not (isinstance(self.half_life, (int, float)) and math.isfinite(self.half_life) and self.half_life > 0):
            raise OptionError(f"the half-life must be a positive number of tokens, not {self.half_life!r}")

    def share(self, tokens: float) -> float:
        """The user model's share mu after ``tokens`` (decayed) learned tokens."""
        if not self.learning or tokens <= 0:
            return 0.0
        return self.weight_max * tokens / (tokens + self.weight_half)

    def to_json(self) -> dict[str, Any]:
        """The settings as a JSON object."""
        return asdict(self)

    @staticmethod
    def from_json(data: Any) -> AdaptSettings:
        """Settings from a JSON object; unknown keys are ignored, missing ones take defaults.

        Raises:
            OptionError: a value is out of range or of the wrong type.
        """
        if not isinstance(data, dict):
            raise OptionError("the learning settings are not a JSON object")
        known = {f.name for f in fields(AdaptSettings)}
        values = {key: value for key, value in data.items() if key in known}
        if "min_uses" in values and isinstance(values["min_uses"], float) and values["min_uses"].is_integer():
            values["min_uses"] = int(values["min_uses"])
        return AdaptSettings(**values)

    def changed(self, **changes: Any) -> AdaptSettings:
        """A copy with some settings changed (validated)."""
        return replace(self, **changes)
