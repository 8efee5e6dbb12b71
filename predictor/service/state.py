"""What every route and session of one service shares: its models, profiles and settings."""

from __future__ import annotations

from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import dataclass
from typing import Any

from starlette.requests import HTTPConnection

from ..adapt import AdaptedModel
from ..errors import ForetypeError, OptionError
from ..query.model import LanguageModel
from .catalogue import Catalogue, ServedModel
from .problems import ApiError
from .profiles import Profiles
from .settings import ServiceSettings


@dataclass
class ServiceState:
    """The service's models, profiles and settings (kept on ``app.state.service``)."""

    catalogue: Catalogue
    profiles: Profiles
    settings: ServiceSettings

    @contextmanager
    def source(self, served: ServedModel, profile: str | None) -> Iterator[LanguageModel | AdaptedModel]:
        """The model to answer from: the model itself, or its combination with a profile's store (held alone)."""
        if profile is None:
            yield served.model
            return
        with self.profiles.store(profile, served) as learned:
            yield learned.model


def service_state(connection: HTTPConnection) -> ServiceState:
    """The shared state of the application serving a request or WebSocket."""
    return connection.app.state.service


def as_api_error(error: ForetypeError) -> ApiError:
    """An engine error met while answering, as the JSON error a client gets."""
    if isinstance(error, OptionError):
        return ApiError(422, "bad_request", str(error))
    return ApiError(409, "profile_unavailable", str(error))


def engine_call(function: Any, *args: Any, **kwargs: Any) -> Any:
    """Call the engine, turning its errors into :class:`ApiError`."""
    try:
        return function(*args, **kwargs)
    except ForetypeError as error:
        raise as_api_error(error) from None
