"""The models a service answers with, by name; fixed when the service starts."""

from __future__ import annotations

import re
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

from ..errors import OptionError
from ..query.model import LanguageModel
from .problems import ApiError

MODEL_NAME_RE = re.compile(r"[A-Za-z0-9][A-Za-z0-9._-]{0,63}")
"""A model's name: letters, digits, '.', '_' and '-', starting with a letter or digit."""


@dataclass(frozen=True)
class ServedModel:
    """One model and the facts ``foretype info`` gives about it."""

    name: str
    model: LanguageModel
    facts: dict[str, Any]


class Catalogue:
    """The served models by name; the first is the default."""

    def __init__(self, models: Mapping[str, LanguageModel]) -> None:
        """Args:
        models: name → loaded model, the default first.

        Raises:
            OptionError: no model, or a name that is not of the allowed form.
        """
        if not models:
            raise OptionError("the service needs at least one model")
        self.models: dict[str, ServedModel] = {}
        for name, model in models.items():
            if not MODEL_NAME_RE.fullmatch(name):
                raise OptionError(f"model name {name!r}: use letters, digits, '.', '_' and '-' (at most 64, starting with a letter or digit)")
            self.models[name] = ServedModel(name, model, {"name": name, **model.info()})
        self.default = next(iter(self.models))

    @property
    def names(self) -> list[str]:
        """The served names, the default first."""
        return list(self.models)

    def get(self, name: str | None) -> ServedModel:
        """The model of a name (None: the default).

        Raises:
            ApiError: 404 ``unknown_model``.
        """
        if name is None:
            return self.models[self.default]
        found = self.models.get(name)
        if found is None:
            raise ApiError(404, "unknown_model", f"no model named {name!r} (this service has: {', '.join(self.models)})")
        return found
