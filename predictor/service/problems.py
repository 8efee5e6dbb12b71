"""The service's one error type and its JSON body: ``{"error": {"code": ..., "message": ...}}``."""

from __future__ import annotations

import json
from typing import Any


class ApiError(Exception):
    """A request the service refuses: an HTTP status, a stable code and one readable sentence.

    Attributes:
        status: the HTTP status (4xx).
        code: a short stable name clients can test (docs/service.md lists them).
        message: what was wrong, for a person.
    """

    def __init__(self, status: int, code: str, message: str) -> None:
        super().__init__(message)
        self.status = status
        self.code = code
        self.message = message

    def body(self) -> dict[str, Any]:
        """The JSON error body."""
        return error_body(self.code, self.message)


def error_body(code: str, message: str) -> dict[str, Any]:
    """The JSON body every error response carries."""
    return {"error": {"code": code, "message": message}}


def error_bytes(code: str, message: str) -> bytes:
    """The error body encoded, for responses sent below the framework (middleware)."""
    return json.dumps(error_body(code, message), ensure_ascii=False, separators=(",", ":")).encode("utf-8")
