"""Running the prediction service for tests: a real uvicorn server on a free loopback port, in a thread."""

from __future__ import annotations

import socket
import threading
import time
from collections.abc import Iterator, Mapping
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import uvicorn

from foretype.query.model import LanguageModel
from foretype.service import Limits, ServiceSettings, create_app


@dataclass
class Running:
    """A service answering on loopback."""

    url: str
    ws_url: str
    port: int
    app: Any
    server: uvicorn.Server


@contextmanager
def running_service(models: Mapping[str, LanguageModel], profiles: Path, *, limits: Limits | None = None, **settings: Any) -> Iterator[Running]:
    """Start the service on a free port of 127.0.0.1 in a background thread; stop it on exit."""
    listener = socket.socket(socket.AF_INET, socket.SOCK_STREAM)
    listener.bind(("127.0.0.1", 0))
    listener.listen(64)
    port = listener.getsockname()[1]
    app = create_app(models, ServiceSettings(profiles_dir=profiles, host="127.0.0.1", port=port, limits=limits or Limits(), **settings))
    server = uvicorn.Server(uvicorn.Config(app, log_level="warning", lifespan="on", timeout_graceful_shutdown=10))
    thread = threading.Thread(target=server.run, kwargs={"sockets": [listener]}, daemon=True)
    thread.start()
    deadline = time.monotonic() + 30
    while not server.started:
        if not thread.is_alive() or time.monotonic() > deadline:
            raise RuntimeError("the service did not start")
        time.sleep(0.01)
    try:
        yield Running(f"http://127.0.0.1:{port}", f"ws://127.0.0.1:{port}", port, app, server)
    finally:
        server.should_exit = True
        thread.join(timeout=30)
        listener.close()


class SlowModel:
    """A model whose suggestions take ``delay`` seconds longer (to make requests queue); everything else delegates."""

    def __init__(self, model: LanguageModel, delay: float) -> None:
        self._model = model
        self._delay = delay

    def __getattr__(self, name: str) -> Any:
        return getattr(self._model, name)

    def suggest_text(self, text: str, k: int = 5) -> Any:
        time.sleep(self._delay)
        return self._model.suggest_text(text, k)
