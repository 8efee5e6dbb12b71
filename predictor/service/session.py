"""The WebSocket channel: one socket per typing session, the latest suggest request wins.

``/api/session?model=M&k=5&profile=P&learn=true``.  Each client message is a
JSON object with a ``seq`` that increases through the session; a ``suggest``
message carries the whole text before the cursor, so answering it never
depends on the messages before it.  A reader takes messages off the socket as
they arrive and keeps only the newest unanswered ``suggest``; one answerer
replies to it, so when requests queue (a person typing faster than answers
return) the older ones are dropped unanswered and the reply says how many.
Every reply carries its request's ``seq``; a client ignores a reply older
than the last request it sent.  ``learn`` messages are applied in order and
never dropped.  An error in one message is answered with an ``error`` message
and the session stays open.
"""

from __future__ import annotations

import asyncio
import contextlib
import json
import logging
from dataclasses import dataclass
from typing import Any

from starlette.concurrency import run_in_threadpool
from starlette.responses import JSONResponse
from starlette.websockets import WebSocket, WebSocketDisconnect, WebSocketState

from . import answers
from .asgi import WEBSOCKET_DENIAL
from .catalogue import ServedModel
from .problems import ApiError
from .state import ServiceState, engine_call, service_state

log = logging.getLogger(__name__)

SESSION_PARAMETERS = ("model", "k", "profile", "learn", "token")
"""The query parameters a session is opened with."""
MESSAGE_FIELDS = {"suggest": {"type", "seq", "text", "k", "leave_out"}, "learn": {"type", "seq", "event", "word", "context"}}
"""The fields each kind of client message may carry."""
TRUE, FALSE = ("true", "1", "yes", "on"), ("false", "0", "no", "off", "")


@dataclass(frozen=True)
class SessionOptions:
    """What a session was opened with."""

    served: ServedModel
    k: int
    profile: str | None
    learn: bool


def session_options(state: ServiceState, query: dict[str, str]) -> SessionOptions:
    """Read and check a session's query parameters.

    Raises:
        ApiError: an unknown parameter, model or profile, a bad k, or learn without a profile.
    """
    unknown = sorted(set(query) - set(SESSION_PARAMETERS))
    if unknown:
        raise ApiError(422, "unknown_field", f"unknown query parameter {unknown[0]!r} (a session takes {', '.join(SESSION_PARAMETERS)})")
    served = state.catalogue.get(query.get("model"))
    try:
        k = int(query.get("k", "5"))
    except ValueError:
        raise ApiError(422, "bad_k", f"k must be a whole number, not {query['k']!r}") from None
    answers.check_k(k, state.settings.limits)
    learn_text = query.get("learn", "false").lower()
    if learn_text not in TRUE + FALSE:
        raise ApiError(422, "bad_field", f"learn must be true or false, not {query['learn']!r}")
    profile = query.get("profile")
    if profile is not None:
        state.profiles.require(profile)
    learn = learn_text in TRUE
    if learn and profile is None:
        raise ApiError(422, "bad_request", "learn=true needs a profile to learn into")
    return SessionOptions(served, k, profile, learn)


async def session_endpoint(websocket: WebSocket) -> None:
    """Open a typing session, or refuse the handshake with a JSON error."""
    state = service_state(websocket)
    try:
        options = session_options(state, dict(websocket.query_params))
    except ApiError as error:
        if WEBSOCKET_DENIAL in websocket.scope.get("extensions", {}):
            await websocket.send_denial_response(JSONResponse(error.body(), status_code=error.status))
        else:
            await websocket.close(code=1008, reason=error.code)
        return
    await websocket.accept()
    await Session(websocket, state, options).run()


class Session:
    """One open typing session."""

    def __init__(self, websocket: WebSocket, state: ServiceState, options: SessionOptions) -> None:
        self.websocket = websocket
        self.state = state
        self.options = options
        self.limits = state.settings.limits
        self.last_seq: int | None = None
        self.pending: dict[str, Any] | None = None
        self.dropped = 0
        self.wake = asyncio.Event()
        self.sending = asyncio.Lock()

    async def run(self) -> None:
        """Greet the client, then read until it goes away; replies come from a second task."""
        options = self.options
        await self.send({"type": "ready", "model": options.served.name, "profile": options.profile, "learn": options.learn, "k": options.k, "limits": self.limits.to_json()})
        answerer = asyncio.create_task(self.answer_latest())
        try:
            await self.read()
        finally:
            answerer.cancel()
            with contextlib.suppress(asyncio.CancelledError):
                await answerer

    # ------------------------------------------------------------ reading
    async def read(self) -> None:
        """Take messages as they come: keep the newest suggest, apply learn events in order."""
        while True:
            message = await self.websocket.receive()
            if message["type"] == "websocket.disconnect":
                return
            seq = None
            try:
                request = self.parse(message.get("text"), message.get("bytes"))
                seq = request["seq"]
                if request["type"] == "suggest":
                    if self.pending is not None:
                        self.dropped += 1
                    self.pending = request
                    self.wake.set()
                else:
                    await self.send(await run_in_threadpool(self.learn, request))
            except ApiError as error:
                seq = seq if seq is not None else getattr(error, "seq", None)
                await self.send({"type": "error", "seq": seq, "code": error.code, "message": error.message})

    def parse(self, text: str | None, data: bytes | None) -> dict[str, Any]:
        """Check one client message: size, UTF-8, JSON object, known fields, types, increasing seq.

        Raises:
            ApiError: with the message's ``seq`` attached when it could be read.
        """
        limit = self.limits.max_message_bytes
        if text is None:
            data = data or b""
            if len(data) > limit:
                raise ApiError(413, "message_too_large", f"the message has {len(data):,} bytes; the limit is {limit:,}")
            try:
                text = data.decode("utf-8")
            except UnicodeDecodeError as error:
                raise ApiError(400, "bad_utf8", f"the message is not valid UTF-8 (byte {error.start})") from None
        elif len(text) > limit or len(text.encode("utf-8")) > limit:
            raise ApiError(413, "message_too_large", f"the message has more than {limit:,} bytes, the limit")
        try:
            request = json.loads(text)
        except ValueError as error:
            raise ApiError(400, "bad_json", f"the message is not JSON ({error})") from None
        if not isinstance(request, dict):
            raise ApiError(400, "bad_json", "the message must be a JSON object")
        seq = request.get("seq")
        try:
            return self._checked(request)
        except ApiError as error:
            error.seq = seq if isinstance(seq, int) and not isinstance(seq, bool) else None  # type: ignore[attr-defined]
            raise

    def _checked(self, request: dict[str, Any]) -> dict[str, Any]:
        kind = request.setdefault("type", "suggest")
        if kind not in MESSAGE_FIELDS:
            raise ApiError(422, "bad_field", f"type must be suggest or learn, not {kind!r}")
        unknown = sorted(set(request) - MESSAGE_FIELDS[kind])
        if unknown:
            raise ApiError(422, "unknown_field", f"unknown field {unknown[0]!r} in a {kind} message (it takes {', '.join(sorted(MESSAGE_FIELDS[kind]))})")
        seq = request.get("seq")
        if isinstance(seq, bool) or not isinstance(seq, int) or seq < 0:
            raise ApiError(422, "bad_field", "seq must be a whole number of at least 0")
        if self.last_seq is not None and seq <= self.last_seq:
            raise ApiError(422, "bad_request", f"seq {seq} does not increase (the last was {self.last_seq})")
        _expect(request, "text", str)
        _expect(request, "k", int)
        _expect(request, "event", str)
        _expect(request, "word", str)
        context = _expect(request, "context", list)
        if context is not None and not all(isinstance(w, str) for w in context):
            raise ApiError(422, "bad_field", "context must be a list of words (strings)")
        self.last_seq = seq
        return request

    # ------------------------------------------------------------ answering
    async def answer_latest(self) -> None:
        """Answer the newest pending suggest request, again and again."""
        while True:
            await self.wake.wait()
            self.wake.clear()
            request, dropped = self.pending, self.dropped
            self.pending, self.dropped = None, 0
            if request is None:
                continue
            try:
                payload = await self.suggest(request)
                reply = {"type": "suggestions", "seq": request["seq"], "dropped": dropped, **payload}
            except ApiError as error:
                reply = {"type": "error", "seq": request["seq"], "code": error.code, "message": error.message}
            except Exception:  # noqa: BLE001 - one failed answer must not end the session
                log.exception("suggest failed")
                reply = {"type": "error", "seq": request["seq"], "code": "internal_error", "message": "the service failed to answer (see its log)"}
            await self.send(reply)

    async def suggest(self, request: dict[str, Any]) -> dict[str, Any]:
        """Answer one suggest message (see :meth:`ServiceState.answer` for where it runs)."""
        options = self.options
        return await self.state.answer(
            answers.suggest, options.served, options.profile, text=request.get("text", ""), k=request.get("k", options.k), leave_out=request.get("leave_out")
        )

    def learn(self, request: dict[str, Any]) -> dict[str, Any]:
        """Apply one learn message (in a worker thread)."""
        options = self.options
        if not options.learn or options.profile is None:
            raise ApiError(409, "learning_not_enabled", "this session was opened without learn=true and a profile; open one with ?profile=NAME&learn=true")
        with self.state.profiles.store(options.profile, options.served) as learned:
            payload = engine_call(
                answers.learn,
                learned,
                options.served,
                self.limits,
                profile=options.profile,
                event=request.get("event", ""),
                word=request.get("word"),
                context=request.get("context", []),
            )
        return {"type": "learned", "seq": request["seq"], **{k: v for k, v in payload.items() if k not in ("model", "profile")}}

    async def send(self, message: dict[str, Any]) -> None:
        """Send one JSON message; a client that has gone away is not an error."""
        async with self.sending:
            if self.websocket.application_state != WebSocketState.CONNECTED:
                return
            with contextlib.suppress(WebSocketDisconnect, RuntimeError, OSError):
                await self.websocket.send_text(json.dumps(message, ensure_ascii=False, allow_nan=False))


def _expect(request: dict[str, Any], name: str, kind: type) -> Any:
    value = request.get(name)
    if value is None:
        return None
    if isinstance(value, bool) or not isinstance(value, kind):
        raise ApiError(422, "bad_field", f"{name} must be {'a string' if kind is str else 'a whole number' if kind is int else 'a list'}")
    return value
