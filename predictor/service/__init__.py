"""The loopback prediction service: the engine over HTTP/JSON and WebSocket.

    from predictor.service import ServiceSettings, create_app
    app = create_app({"demo": model}, ServiceSettings(profiles_dir=folder))

:func:`create_app` takes models that are already loaded, so tests inject tiny
ones and the command line (``foretype serve``) loads files.  The engine never
imports this package; docs/service.md describes every endpoint and message.
"""

from __future__ import annotations

from .app import create_app
from .settings import Limits, ServiceSettings

__all__ = ["create_app", "ServiceSettings", "Limits"]
