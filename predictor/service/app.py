"""Assembling the service: ``create_app(models, settings, routers=...)``.

Layers, outermost first: the access guard (Host, Origin, token), the
connection limit, the body limit, CORS for origins added explicitly, then the
routes: ``/api/...`` (:mod:`.routes`), the WebSocket ``/api/session``
(:mod:`.session`), and any routers an embedding application adds (the browser
keyboard page owns ``/`` and ``/api/study/...``).  Every error is a JSON body
``{"error": {"code", "message"}}``.
"""

from __future__ import annotations

import logging
from collections.abc import AsyncIterator, Mapping, Sequence
from contextlib import asynccontextmanager
from typing import Any

from fastapi import APIRouter, FastAPI, Request
from fastapi.exceptions import RequestValidationError
from fastapi.responses import JSONResponse
from starlette.concurrency import run_in_threadpool
from starlette.exceptions import HTTPException as StarletteHTTPException
from starlette.middleware.cors import CORSMiddleware

from ..errors import ForetypeError
from ..query.model import LanguageModel
from ..version import __version__
from .catalogue import Catalogue
from .limits import BodyLimit, ConnectionLimit
from .problems import ApiError, error_body
from .profiles import Profiles
from .routes import router
from .security import AccessGuard
from .session import session_endpoint
from .settings import ServiceSettings
from .state import ServiceState, as_api_error

log = logging.getLogger(__name__)

OPENAPI_PATH = "/api/openapi.json"


def create_app(models: Mapping[str, LanguageModel], settings: ServiceSettings, *, routers: Sequence[APIRouter] = ()) -> FastAPI:
    """Build the service over models that are already loaded.

    Args:
        models: name → model; the first is the default.
        settings: address, token, trusted names, profiles folder and limits.
        routers: more routers to include as they are (behind the same checks
            and limits); they find the models and profiles on
            ``request.app.state.service`` (:class:`~predictor.service.state.ServiceState`).

    Returns:
        The ASGI application.  Its shutdown closes every learned store it opened.

    Raises:
        OptionError: no model, or a model name that is not allowed.
    """
    state = ServiceState(Catalogue(models), Profiles(settings.profiles_dir), settings)

    @asynccontextmanager
    async def lifespan(_: FastAPI) -> AsyncIterator[None]:
        try:
            yield
        finally:
            await run_in_threadpool(state.profiles.close_all)

    app = FastAPI(
        title="foretype prediction service",
        version=__version__,
        description="Exact top-k word predictions from foretype models, for prototype keyboards (docs/service.md).",
        openapi_url=OPENAPI_PATH,
        docs_url=None,  # the interactive pages load scripts from the internet; the description is enough
        redoc_url=None,
        lifespan=lifespan,
    )
    app.state.service = state
    app.include_router(router)
    app.add_api_websocket_route("/api/session", session_endpoint)
    for extra in routers:
        app.include_router(extra)
    _add_error_handlers(app)
    if settings.allowed_origins:
        app.add_middleware(CORSMiddleware, allow_origins=list(settings.allowed_origins), allow_methods=["GET", "POST"], allow_headers=["authorization", "content-type"])
    app.add_middleware(BodyLimit, limits=settings.limits)
    app.add_middleware(ConnectionLimit, limits=settings.limits)
    app.add_middleware(AccessGuard, settings=settings)  # added last: the outermost layer
    return app


def _add_error_handlers(app: FastAPI) -> None:
    @app.exception_handler(ApiError)
    async def api_error(_: Request, error: ApiError) -> JSONResponse:
        return JSONResponse(error.body(), status_code=error.status)

    @app.exception_handler(ForetypeError)
    async def engine_error(_: Request, error: ForetypeError) -> JSONResponse:
        problem = as_api_error(error)
        return JSONResponse(problem.body(), status_code=problem.status)

    @app.exception_handler(RequestValidationError)
    async def invalid(_: Request, error: RequestValidationError) -> JSONResponse:
        status, code, message = describe_invalid(error.errors())
        return JSONResponse(error_body(code, message), status_code=status)

    @app.exception_handler(StarletteHTTPException)
    async def http_error(request: Request, error: StarletteHTTPException) -> JSONResponse:
        code = {404: "not_found", 405: "method_not_allowed"}.get(error.status_code, "http_error")
        message = str(error.detail)
        if error.status_code == 404:
            message = f"no such path: {request.url.path} (the endpoints are listed at {OPENAPI_PATH})"
        elif error.status_code == 405:
            message = f"{request.method} is not allowed on {request.url.path} (see {OPENAPI_PATH})"
        return JSONResponse(error_body(code, message), status_code=error.status_code, headers=getattr(error, "headers", None))

    @app.exception_handler(Exception)
    async def internal(_: Request, error: Exception) -> JSONResponse:
        log.exception("internal error")
        return JSONResponse(error_body("internal_error", f"the service failed: {type(error).__name__} (see its log)"), status_code=500)


def describe_invalid(errors: Sequence[Mapping[str, Any]]) -> tuple[int, str, str]:
    """Turn the framework's validation errors into one (status, code, message) for the client."""
    first = errors[0] if errors else {"type": "", "loc": (), "msg": "invalid request"}
    kind = str(first.get("type", ""))
    loc = [str(p) for p in first.get("loc", ()) if p != "body"]
    where = ".".join(loc) or "the body"
    if kind == "json_invalid":
        return 400, "bad_json", f"the body is not valid JSON ({first.get('msg')})"
    if kind in ("model_attributes_type", "dict_type", "model_type") and not loc:
        return 400, "bad_json", "the body must be a JSON object"
    if kind == "extra_forbidden":
        return 422, "unknown_field", f"unknown field {where!r}"
    if kind == "missing":
        return 422, "bad_field", f"missing field {where!r}"
    return 422, "bad_field", f"{where}: {first.get('msg')}"
