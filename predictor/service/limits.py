"""Limits every client shares: concurrent connections, request body size, UTF-8 bodies.

Both are plain ASGI middlewares, so the refusals are JSON errors like every
other and nothing above them is reached; the limits on text length, k and
WebSocket messages are checked where those are read (:mod:`.answers`,
:mod:`.session`).
"""

from __future__ import annotations

from .asgi import ASGIApp, Message, Receive, Scope, Send, header, refuse
from .settings import Limits

JSON_PATHS = "/api/"
"""Bodies sent to the service's own endpoints are read as JSON whatever content type the client named."""
FOREIGN_PATHS = "/api/study/"
"""Paths owned by an embedding application's router: bodies pass as sent."""


class ConnectionLimit:
    """Refuse requests and WebSocket handshakes beyond ``max_connections`` at once (429)."""

    def __init__(self, app: ASGIApp, limits: Limits) -> None:
        self.app = app
        self.limit = limits.max_connections
        self.active = 0

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if scope["type"] not in ("http", "websocket"):
            await self.app(scope, receive, send)
            return
        if self.active >= self.limit:
            await refuse(scope, receive, send, 429, "too_many_connections", f"the service is handling {self.limit} connections, its limit; try again shortly")
            return
        self.active += 1  # one event loop: no lock needed
        try:
            await self.app(scope, receive, send)
        finally:
            self.active -= 1


class BodyLimit:
    """Read an HTTP body up to ``max_body_bytes`` (413 beyond), refuse one that is not UTF-8 (400).

    Bodies for the service's JSON endpoints are also marked as JSON, so
    ``curl -d`` and a ``fetch`` with a string body work without a content type.
    """

    def __init__(self, app: ASGIApp, limits: Limits) -> None:
        self.app = app
        self.limit = limits.max_body_bytes

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if scope["type"] != "http" or scope["method"] in ("GET", "HEAD", "OPTIONS"):
            await self.app(scope, receive, send)
            return
        body = await self._read_body(scope, receive, send)
        if body is None:
            return
        path = scope.get("path", "")
        ours = path.startswith(JSON_PATHS) and not path.startswith(FOREIGN_PATHS)
        if ours or _is_text(header(scope, b"content-type")):
            try:
                body.decode("utf-8")
            except UnicodeDecodeError as error:
                await refuse(scope, receive, send, 400, "bad_utf8", f"the request body is not valid UTF-8 (byte {error.start})")
                return
        if ours:
            headers = [(k, v) for k, v in scope.get("headers", ()) if k != b"content-type"]
            scope = dict(scope, headers=[*headers, (b"content-type", b"application/json")])
        replayed = False

        async def replay() -> Message:
            nonlocal replayed
            if not replayed:
                replayed = True
                return {"type": "http.request", "body": body, "more_body": False}
            return await receive()

        await self.app(scope, replay, send)

    async def _read_body(self, scope: Scope, receive: Receive, send: Send) -> bytes | None:
        """The whole body, or None once a refusal was sent (too large) or the client went away."""
        declared = header(scope, b"content-length")
        if declared is not None and declared.strip().isdigit() and int(declared) > self.limit:
            await refuse(scope, receive, send, 413, "body_too_large", f"the request body has {int(declared):,} bytes; the limit is {self.limit:,}")
            return None
        chunks: list[bytes] = []
        size = 0
        while True:
            message = await receive()
            if message["type"] != "http.request":
                return None  # the client went away
            chunk = message.get("body", b"")
            size += len(chunk)
            if size > self.limit:
                await refuse(scope, receive, send, 413, "body_too_large", f"the request body has more than {self.limit:,} bytes, the limit")
                return None
            chunks.append(chunk)
            if not message.get("more_body", False):
                return b"".join(chunks)


def _is_text(content_type: str | None) -> bool:
    if content_type is None:
        return False
    kind = content_type.split(";", 1)[0].strip().lower()
    return kind.startswith("text/") or kind.endswith("json")
