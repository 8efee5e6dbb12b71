"""What every route and session of one service shares: its models, profiles and settings."""

from __future__ import annotations

from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import dataclass
from typing import Any

from starlette.concurrency import run_in_threadpool
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

    async def answer(self, function: Any, served: ServedModel, profile: str | None, **kwargs: Any) -> dict[str, Any]:
        """``function(served, source, limits, profile=..., **kwargs)`` with engine errors as :class:`ApiError`.

        A model alone answers on the event loop: a query takes tens of
        microseconds, less than a hand-off to a worker thread.  A profile's
        store may wait for its lock or the disk, so it answers in a worker thread.
        """
        if profile is None:
            return engine_call(function, served, served.model, self.settings.limits, profile=None, **kwargs)

        def with_store() -> dict[str, Any]:
            with self.source(served, profile) as source:
                return engine_call(function, served, source, self.settings.limits, profile=profile, **kwargs)

        return await run_in_threadpool(with_store)


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
