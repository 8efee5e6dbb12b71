"""The routes of the browser keyboard: the page at ``/`` and the copy-task log under ``/api/study/``.

============  =====================================  ==============================================
method        path                                   what it does
============  =====================================  ==============================================
GET           ``/``                                  the keyboard page
GET           ``/api/study/assets/{name}``           its stylesheet and script
GET           ``/api/study/config``                  the default model, the WebSocket path, phrases
POST          ``/api/study/sessions``                start a copy-task session: a new log under the
                                                     profile's folder; answers with the phrases
POST          ``/api/study/sessions/{id}/events``    append events to the session's log
GET           ``/api/study/sessions/{id}/report``    the session's measures so far
============  =====================================  ==============================================

A session log lives at ``PROFILES/NAME/study/SESSION.jsonl``, beside the
profile's learned stores; each batch of events is validated whole, then
written line by line, flushed and fsynced before the reply.  Errors use the
service's JSON body, ``{"error": {"code": ..., "message": ...}}``.
"""

from __future__ import annotations

import json
import re
import secrets
import threading
from dataclasses import dataclass, field
from datetime import datetime, timezone
from importlib import resources
from pathlib import Path
from typing import Any
from urllib.parse import quote

from fastapi import APIRouter, Request
from fastapi.responses import HTMLResponse, JSONResponse, Response

from ..study import SessionLogError, SessionLogWriter, check_event, session_report

ASSETS = {"keyboard.css": "text/css; charset=utf-8", "keyboard.js": "text/javascript; charset=utf-8"}
"""The page's files besides ``index.html``, with their content types."""

PROFILE_NAME = re.compile(r"[A-Za-z0-9][A-Za-z0-9_-]{0,63}\Z")
"""A profile name: the service's rule (letters, digits, ``-`` and ``_``; 1 to 64; no path)."""

MAX_EVENTS_PER_BATCH = 500
"""The most events one request may append."""

PLACEMENTS = ("left", "right", "under")
LAYOUTS = ("alphabetic", "typewriter", "frequency")


@dataclass(frozen=True)
class StudySettings:
    """What the keyboard page and its copy task are given at start.

    Attributes:
        phrases: the target phrases, presented in order.
        phrase_source: where they came from (a file name, or ``demo``), shown on the page and logged.
        profiles_dir: the service's profiles folder; logs go to ``NAME/study/`` inside it.
        model: the model the page asks for suggestions (the service's default).
        k: the page's default number of suggestions (1 to 9).
        websocket: the service's per-keystroke WebSocket path.
    """

    phrases: tuple[str, ...]
    phrase_source: str
    profiles_dir: Path
    model: str
    k: int = 5
    websocket: str = "/api/session"


@dataclass
class _Session:
    writer: SessionLogWriter
    path: Path
    lock: threading.Lock = field(default_factory=threading.Lock)


def _problem(status: int, code: str, message: str) -> JSONResponse:
    return JSONResponse({"error": {"code": code, "message": message}}, status_code=status)


def _static(name: str) -> bytes:
    return resources.files(__package__).joinpath("static").joinpath(name).read_bytes()


async def _json_object(request: Request) -> dict[str, Any] | JSONResponse:
    raw = await request.body()
    try:
        body = json.loads(raw.decode("utf-8")) if raw else {}
    except UnicodeDecodeError:
        return _problem(400, "bad_utf8", "the body is not valid UTF-8")
    except ValueError:
        return _problem(400, "bad_json", "the body is not JSON")
    if not isinstance(body, dict):
        return _problem(400, "bad_json", "the body is not a JSON object")
    return body


def _session_choice(body: dict[str, Any], settings: StudySettings) -> tuple[str, int, str, str, Path] | JSONResponse:
    """Validate a session start: (profile, k, placement, layout, log folder), or the error to answer."""
    extra = sorted(set(body) - {"profile", "k", "placement", "layout"})
    if extra:
        return _problem(422, "unknown_field", f"unknown field {extra[0]!r}")
    profile = body.get("profile", "pilot")
    if not isinstance(profile, str) or not PROFILE_NAME.match(profile):
        return _problem(422, "bad_profile_name", "a profile name is 1 to 64 letters, digits, '-' or '_', starting with a letter or digit")
    k = body.get("k", settings.k)
    if isinstance(k, bool) or not isinstance(k, int) or not 1 <= k <= 9:
        return _problem(422, "bad_k", "k must be a whole number from 1 to 9")
    placement = body.get("placement", "left")
    layout = body.get("layout", "alphabetic")
    if placement not in PLACEMENTS or layout not in LAYOUTS:
        return _problem(422, "bad_field", f"placement is one of {', '.join(PLACEMENTS)}; layout one of {', '.join(LAYOUTS)}")
    root = settings.profiles_dir.resolve()
    folder = (root / profile / "study").resolve()
    if root not in folder.parents:
        return _problem(422, "bad_profile_name", "the profile name leaves the profiles folder")
    return profile, k, placement, layout, folder


def _checked_batch(body: dict[str, Any]) -> list[dict[str, Any]] | JSONResponse:
    """Validate a batch of events whole: the events in order, or the error to answer."""
    if set(body) != {"events"} or not isinstance(body["events"], list):
        return _problem(422, "bad_field", 'the body is {"events": [EVENT, ...]}')
    events = body["events"]
    if len(events) > MAX_EVENTS_PER_BATCH:
        return _problem(413, "too_many_events", f"at most {MAX_EVENTS_PER_BATCH} events per request")
    checked = []
    for number, event in enumerate(events, start=1):
        if not isinstance(event, dict):
            return _problem(422, "bad_event", f"event {number} is not an object")
        try:
            checked.append(check_event(event))
        except ValueError as error:
            return _problem(422, "bad_event", f"event {number}: {error}")
    return checked


def study_router(settings: StudySettings) -> APIRouter:
    """Build the router for ``/`` and ``/api/study/...``.

    Args:
        settings: the phrases, profiles folder and defaults.

    Returns:
        A FastAPI router for ``create_app(..., routers=[...])``.
    """
    routes = _StudyRoutes(settings)
    router = APIRouter()
    router.add_api_route("/", routes.keyboard_page, methods=["GET"], include_in_schema=False)
    router.add_api_route("/api/study/assets/{name}", routes.asset, methods=["GET"], include_in_schema=False)
    router.add_api_route("/api/study/config", routes.config, methods=["GET"])
    router.add_api_route("/api/study/sessions", routes.start_session, methods=["POST"], status_code=201)
    router.add_api_route("/api/study/sessions/{session}/events", routes.append_events, methods=["POST"])
    router.add_api_route("/api/study/sessions/{session}/report", routes.report, methods=["GET"])
    return router


class _StudyRoutes:
    """The handlers, sharing the settings, the page's files and the open sessions."""

    def __init__(self, settings: StudySettings) -> None:
        self.settings = settings
        self.sessions: dict[str, _Session] = {}
        self.lock = threading.Lock()
        self.page = _static("index.html")
        self.assets = {name: _static(name) for name in ASSETS}

    def keyboard_page(self, request: Request) -> Response:
        """The keyboard page."""
        body = self.page
        token = request.query_params.get("token")
        if token:
            # A service that requires its token was opened as /?token=TOKEN: the page's own files need it too.
            suffix = ("?token=" + quote(token, safe="")).encode("ascii")
            for name in ASSETS:
                body = body.replace(f"/api/study/assets/{name}".encode("ascii"), f"/api/study/assets/{name}".encode("ascii") + suffix)
        return HTMLResponse(body, headers={"Cache-Control": "no-store"})

    def asset(self, name: str) -> Response:
        """The page's stylesheet or script."""
        if name not in self.assets:
            return _problem(404, "not_found", f"no asset named {name!r}")
        return Response(self.assets[name], media_type=ASSETS[name], headers={"Cache-Control": "no-store"})

    def config(self) -> dict[str, Any]:
        """The page's starting point: model, WebSocket path, default k, and how many phrases the copy task has."""
        settings = self.settings
        return {
            "model": settings.model,
            "websocket": settings.websocket,
            "k": settings.k,
            "phrases": len(settings.phrases),
            "phrase_source": settings.phrase_source,
            "placements": list(PLACEMENTS),
            "layouts": list(LAYOUTS),
        }

    async def start_session(self, request: Request) -> Any:
        """Start a copy-task session for a profile: its log is created and the phrases are returned."""
        settings = self.settings
        body = await _json_object(request)
        if isinstance(body, JSONResponse):
            return body
        choice = _session_choice(body, settings)
        if isinstance(choice, JSONResponse):
            return choice
        profile, k, placement, layout, folder = choice
        folder.mkdir(parents=True, exist_ok=True)
        started = datetime.now(timezone.utc)
        session = f"{started:%Y%m%d-%H%M%S}-{secrets.token_hex(3)}"
        path = folder / f"{session}.jsonl"
        header = {
            "session": session,
            "started": started.isoformat(timespec="seconds").replace("+00:00", "Z"),
            "profile": profile,
            "model": settings.model,
            "k": k,
            "placement": placement,
            "layout": layout,
            "phrases": len(settings.phrases),
            "phrase_source": settings.phrase_source,
        }
        writer = SessionLogWriter(path, header)
        with self.lock:
            self.sessions[session] = _Session(writer, path)
        return {"session": session, "phrases": list(settings.phrases), "log": f"{profile}/study/{session}.jsonl"}

    def _find(self, session: str) -> _Session | None:
        with self.lock:
            return self.sessions.get(session)

    async def append_events(self, session: str, request: Request) -> Any:
        """Append a batch of events (``{"events": [...]}``) to a session's log, each as one line."""
        found = self._find(session)
        if found is None:
            return _problem(404, "unknown_session", f"no session {session!r} is open on this service")
        body = await _json_object(request)
        if isinstance(body, JSONResponse):
            return body
        checked = _checked_batch(body)
        if isinstance(checked, JSONResponse):
            return checked
        with found.lock:
            found.writer.write_many(checked)
        return {"written": len(checked)}

    def report(self, session: str) -> Any:
        """The session's measures as ``foretype study report --json`` gives them for its log."""
        found = self._find(session)
        if found is None:
            return _problem(404, "unknown_session", f"no session {session!r} is open on this service")
        try:
            with found.lock:
                measured = session_report(found.path)
        except SessionLogError as error:
            return _problem(409, "bad_log", str(error))
        data = measured.to_json()
        data["log"] = found.path.name
        return data
