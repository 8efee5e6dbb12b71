"""Who may talk to the service: the token, and Host and Origin checks (DNS rebinding, cross-site pages).

One ASGI middleware checks every HTTP request and every WebSocket handshake,
routers added by an embedding application included:

* **Host**: a web page on another site whose name is made to resolve to
  127.0.0.1 (DNS rebinding) still sends its own name as Host, so only loopback
  names and addresses, the address listened on, any IP address when listening
  on every interface, and names added explicitly are answered.
* **Origin**: a browser names the page behind every cross-site request and
  every WebSocket handshake; only the service's own origin and origins added
  explicitly pass.  Requests without an Origin (curl, native apps) pass.
* **Token**: when set, ``Authorization: Bearer TOKEN`` or ``?token=TOKEN``
  (browsers cannot set headers on a WebSocket), compared in constant time.
"""

from __future__ import annotations

import ipaddress
import secrets
from urllib.parse import parse_qsl, urlsplit

from .asgi import ASGIApp, Receive, Scope, Send, header, refuse
from .settings import ServiceSettings, is_loopback, is_wildcard


def new_token() -> str:
    """A fresh random token (about 190 bits) for a service that listens beyond loopback."""
    return secrets.token_urlsafe(24)


def _host_name(value: str) -> str:
    """The name part of a Host header or an origin's netloc: lower case, port and brackets removed."""
    value = value.strip().lower()
    if value.startswith("["):
        return value[1 : value.find("]")] if "]" in value else value
    if value.count(":") == 1:
        value = value.split(":", 1)[0]
    return value


def _is_ip(name: str) -> bool:
    try:
        ipaddress.ip_address(name)
    except ValueError:
        return False
    return True


class AccessGuard:
    """ASGI middleware refusing requests with a wrong Host, a foreign Origin or a missing or wrong token."""

    def __init__(self, app: ASGIApp, settings: ServiceSettings) -> None:
        """Args:
        app: the application to guard.
        settings: the address, port, token and extra names and origins allowed.
        """
        self.app = app
        self.token = settings.token
        self.bound = _host_name(settings.host)
        self.any_ip = is_wildcard(settings.host)
        self.extra_hosts = {_host_name(h) for h in settings.allowed_hosts}
        self.port = settings.port
        self.extra_origins = {o.rstrip("/").lower() for o in settings.allowed_origins}

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if scope["type"] not in ("http", "websocket"):
            await self.app(scope, receive, send)
            return
        problem = self.problem(scope)
        if problem is not None:
            await refuse(scope, receive, send, *problem)
            return
        await self.app(scope, receive, send)

    def problem(self, scope: Scope) -> tuple[int, str, str] | None:
        """Why a request is refused (status, code, message), or None when it may pass."""
        host = header(scope, b"host")
        if host is None or not self.host_allowed(_host_name(host)):
            shown = "no Host header" if host is None else f"Host {host!r}"
            return 403, "host_not_allowed", f"{shown} is not a name this service answers to (start it with --allow-host NAME to add one)"
        origin = header(scope, b"origin")
        if origin is not None and not self.origin_allowed(origin):
            return 403, "origin_not_allowed", f"requests from pages at {origin!r} are not allowed (start the service with --allow-origin {origin} to allow them)"
        if self.token is not None and not self.token_matches(scope):
            return 401, "bad_token", "this service requires its token: send 'Authorization: Bearer TOKEN' or ?token=TOKEN"
        return None

    def host_allowed(self, name: str) -> bool:
        """Tell whether a Host name (without port) is one this service answers to."""
        return is_loopback(name) or name == self.bound or name in self.extra_hosts or (self.any_ip and _is_ip(name))

    def origin_allowed(self, origin: str) -> bool:
        """Tell whether a page's origin may call the service: its own origin, or one added explicitly."""
        origin = origin.strip().rstrip("/").lower()
        if origin in self.extra_origins:
            return True
        try:
            parts = urlsplit(origin)
            port = parts.port
        except ValueError:
            return False
        if parts.scheme != "http" or parts.hostname is None or port != self.port:
            return False
        name = parts.hostname
        return is_loopback(name) or name == self.bound or name in self.extra_hosts

    def token_matches(self, scope: Scope) -> bool:
        """Tell whether the request carries the service's token (header or query), compared in constant time."""
        assert self.token is not None
        given = None
        authorization = header(scope, b"authorization")
        if authorization is not None and authorization[:7].lower() == "bearer ":
            given = authorization[7:].strip()
        if given is None:
            query = scope.get("query_string", b"").decode("latin-1")
            for key, value in parse_qsl(query):
                if key == "token":
                    given = value
        return given is not None and secrets.compare_digest(given.encode("utf-8"), self.token.encode("utf-8"))
