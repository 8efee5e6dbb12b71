"""What the model format can represent."""

from __future__ import annotations

MAX_VOCABULARY = 2_000_000
"""The largest vocabulary a model file stores (word ids of V + 3 symbols fit 21 bits, the width counting packs)."""
