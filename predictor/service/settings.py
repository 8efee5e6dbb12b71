"""What a running service is allowed to do: its address, token, trusted names, profiles folder and limits."""

from __future__ import annotations

import ipaddress
from dataclasses import dataclass, field
from pathlib import Path

DEFAULT_HOST = "127.0.0.1"
DEFAULT_PORT = 8470


@dataclass(frozen=True)
class Limits:
    """Bounds on what one request or one connection may ask (each refused with a 4xx JSON error).

    Attributes:
        max_body_bytes: largest HTTP request body.
        max_message_bytes: largest WebSocket message (UTF-8 bytes).
        max_text_chars: longest text before the cursor, sentence or word.
        max_k: most suggestions one request may ask for.
        max_connections: HTTP requests in flight plus open WebSockets, over every client.
        max_context_words: most context words a request may list (only the last two are used).
    """

    max_body_bytes: int = 65_536
    max_message_bytes: int = 65_536
    max_text_chars: int = 10_000
    max_k: int = 50
    max_connections: int = 64
    max_context_words: int = 64

    def to_json(self) -> dict[str, int]:
        """The limits a WebSocket client is told when its session opens."""
        return {"max_message_bytes": self.max_message_bytes, "max_text_chars": self.max_text_chars, "max_k": self.max_k}


@dataclass(frozen=True)
class ServiceSettings:
    """Settings fixed when the service starts.

    Attributes:
        profiles_dir: the one folder holding every profile's learned stores.
        host: the address listened on (for the Host and Origin checks).
        port: the port listened on (for the Origin check; 0 when not yet known).
        token: required on every request and handshake when set.
        allowed_hosts: extra host names the Host header may carry.
        allowed_origins: extra origins (scheme://host[:port]) allowed to call the service.
        limits: request and connection limits.
    """

    profiles_dir: Path
    host: str = DEFAULT_HOST
    port: int = DEFAULT_PORT
    token: str | None = None
    allowed_hosts: tuple[str, ...] = ()
    allowed_origins: tuple[str, ...] = ()
    limits: Limits = field(default_factory=Limits)


def is_loopback(host: str) -> bool:
    """Tell whether an address or name is this machine's loopback (127.0.0.0/8, ::1, localhost)."""
    name = host.strip("[]").lower()
    if name == "localhost" or name.endswith(".localhost"):
        return True
    try:
        return ipaddress.ip_address(name).is_loopback
    except ValueError:
        return False


def is_wildcard(host: str) -> bool:
    """Tell whether an address means every interface (0.0.0.0, ::)."""
    try:
        return ipaddress.ip_address(host.strip("[]")).is_unspecified
    except ValueError:
        return False
