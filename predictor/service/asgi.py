"""Small ASGI helpers shared by the middlewares: headers, JSON refusals for HTTP and WebSocket handshakes."""

from __future__ import annotations

from collections.abc import Awaitable, Callable, MutableMapping
from typing import Any

from .problems import error_bytes

Scope = MutableMapping[str, Any]
Message = MutableMapping[str, Any]
Receive = Callable[[], Awaitable[Message]]
Send = Callable[[Message], Awaitable[None]]
ASGIApp = Callable[[Scope, Receive, Send], Awaitable[None]]

WEBSOCKET_DENIAL = "websocket.http.response"
"""The ASGI extension that lets a refused WebSocket handshake carry an HTTP status and body."""


def header(scope: Scope, name: bytes) -> str | None:
    """The first value of a request header (``name`` in lower case), decoded as Latin-1; None if absent."""
    for key, value in scope.get("headers", ()):
        if key == name:
            return value.decode("latin-1")
    return None


async def refuse(scope: Scope, receive: Receive, send: Send, status: int, code: str, message: str) -> None:
    """Answer a request, or refuse a WebSocket handshake, with a JSON error body.

    A handshake is refused with the HTTP status and body when the server
    supports the denial extension (uvicorn does), else closed with 1008.
    """
    body = error_bytes(code, message)
    headers = [(b"content-type", b"application/json"), (b"content-length", str(len(body)).encode())]
    if scope["type"] == "websocket":
        await receive()  # the websocket.connect message
        if WEBSOCKET_DENIAL in scope.get("extensions", {}):
            await send({"type": "websocket.http.response.start", "status": status, "headers": headers})
            await send({"type": "websocket.http.response.body", "body": body})
        else:
            await send({"type": "websocket.close", "code": 1008, "reason": code})
        return
    await send({"type": "http.response.start", "status": status, "headers": headers})
    await send({"type": "http.response.body", "body": body})
