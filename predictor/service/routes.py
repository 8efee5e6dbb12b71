"""The HTTP/JSON endpoints under ``/api`` (docs/service.md lists them with examples).

Queries of a model alone answer on the event loop (they take tens of
microseconds); anything that touches a profile's learned store runs in a
worker thread (plain functions, or :meth:`ServiceState.answer`), so a store
waiting for its lock or the disk never holds up other clients.
"""

from __future__ import annotations

from typing import Any

from fastapi import APIRouter, Request
from fastapi.responses import JSONResponse

from ..version import __version__
from . import answers
from .problems import ApiError
from .schemas import (
    ErrorResponse,
    HealthResponse,
    LearnRequest,
    LearnResponse,
    ModelFacts,
    ModelsResponse,
    ProbabilityRequest,
    ProfileRequest,
    ProfileResponse,
    ProfilesResponse,
    SentenceProbability,
    SuggestRequest,
    SuggestResponse,
    WordProbability,
)
from .state import engine_call, service_state

ERRORS: dict[int | str, dict[str, Any]] = {
    status: {"model": ErrorResponse, "description": text}
    for status, text in {
        400: "malformed JSON or bad UTF-8",
        401: "a token is required",
        403: "Host or Origin not allowed",
        404: "unknown model or profile",
        413: "request body too large",
        422: "unknown field, bad value, or a limit exceeded",
        429: "too many connections",
    }.items()
}

router = APIRouter(prefix="/api", responses=ERRORS)


def _json(payload: dict[str, Any], status: int = 200) -> JSONResponse:
    # Returning a response skips a second validation of the payload: answers.py builds it to the schema.
    return JSONResponse(payload, status_code=status)


@router.get("/health", response_model=HealthResponse, summary="the service is up; which models it serves")
async def health(request: Request) -> JSONResponse:
    catalogue = service_state(request).catalogue
    return _json({"status": "ok", "version": __version__, "models": catalogue.names, "default_model": catalogue.default})


@router.get("/models", response_model=ModelsResponse, summary="facts about every served model")
async def models(request: Request) -> JSONResponse:
    catalogue = service_state(request).catalogue
    return _json({"default_model": catalogue.default, "models": [m.facts for m in catalogue.models.values()]})


@router.get("/models/{name}", response_model=ModelFacts, summary="facts about one model (as foretype info --json)")
async def model_facts(name: str, request: Request) -> JSONResponse:
    return _json(service_state(request).catalogue.get(name).facts)


@router.post("/suggest", response_model=SuggestResponse, summary="exact top-k suggestions for the text before the cursor")
async def suggest(body: SuggestRequest, request: Request) -> JSONResponse:
    state = service_state(request)
    served = state.catalogue.get(body.model)
    return _json(await state.answer(answers.suggest, served, body.profile, text=body.text, context=body.context, prefix=body.prefix, k=body.k, leave_out=body.leave_out))


@router.post("/probability", response_model=WordProbability | SentenceProbability, summary="probability of a word after a context, or of one sentence")
async def probability(body: ProbabilityRequest, request: Request) -> JSONResponse:
    state = service_state(request)
    served = state.catalogue.get(body.model)
    return _json(await state.answer(answers.probability, served, body.profile, word=body.word, context=body.context, sentence=body.sentence))


@router.get("/session", include_in_schema=False)
async def session_over_http() -> JSONResponse:
    raise ApiError(426, "websocket_only", "/api/session is a WebSocket: connect with ws://HOST:PORT/api/session (docs/service.md)")


@router.get("/profiles", response_model=ProfilesResponse, summary="the profiles in the profiles folder")
def profiles(request: Request) -> JSONResponse:
    return _json({"profiles": service_state(request).profiles.names()})


@router.post("/profiles", response_model=ProfileResponse, status_code=201, summary="create a profile (200 if it existed)")
def create_profile(body: ProfileRequest, request: Request) -> JSONResponse:
    created = service_state(request).profiles.create(body.name)
    return _json({"name": body.name, "created": created}, 201 if created else 200)


@router.post("/learn", response_model=LearnResponse, summary="a learning event into a profile's learned store")
def learn(body: LearnRequest, request: Request) -> JSONResponse:
    state = service_state(request)
    served = state.catalogue.get(body.model)
    with state.profiles.store(body.profile, served) as learned:
        payload = engine_call(
            answers.learn,
            learned,
            served,
            state.settings.limits,
            profile=body.profile,
            event=body.event,
            word=body.word,
            context=body.context,
        )
    return _json(payload)
