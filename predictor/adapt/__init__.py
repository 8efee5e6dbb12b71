"""Learning from the person's own text: a user model combined with the base model.

    from foretype.adapt import AdaptedModel, LearnedFile
    adapted = AdaptedModel(base_model)            # in memory: empty user model, nothing blocked
    adapted.learn(["Saltmarrow", "ferry"], after=["the"])
    adapted.suggest(("the",), prefix="sal", k=5)  # exact top-k under the combined model

    with LearnedFile.for_model(base_model) as learned:   # durable: MODEL.learned beside the model
        learned.learn(["Saltmarrow"], after=["the"])      # every change is on disk when this returns
        learned.model.suggest_text("the sal", k=5)        # AdaptedSuggestion(..., learned=True, new_word=...)

A learned user model holds personal text: it stays on this machine (nothing
here sends it anywhere), it can be inspected and exported, and it can be wiped.
"""

from __future__ import annotations

from .combined import AdaptedModel, AdaptedSuggestion
from .listings import LearnedWord
from .never_list import NeverList, is_pattern
from .settings import AdaptSettings
from .store import (
    PRIVACY_NOTE,
    LearnedFile,
    default_learned_path,
    export_learned,
    load_learned,
    save_learned,
    wipe_learned,
)
from .user_model import UserModel

__all__ = [
    "AdaptedModel",
    "AdaptedSuggestion",
    "LearnedWord",
    "AdaptSettings",
    "NeverList",
    "UserModel",
    "LearnedFile",
    "default_learned_path",
    "load_learned",
    "save_learned",
    "export_learned",
    "wipe_learned",
    "PRIVACY_NOTE",
    "is_pattern",
]
