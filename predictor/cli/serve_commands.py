"""The serve command: the engine as a loopback prediction service (HTTP/JSON and WebSocket).

The service package (FastAPI, uvicorn) is imported only when ``serve`` runs,
so every other command starts without it.
"""

from __future__ import annotations

import argparse
import importlib
import os
import signal
import socket
import sys
from pathlib import Path
from typing import Any

from ..errors import OptionError
from ..query.model import LanguageModel
from .output import open_model, positive_int

SIGTERM_EXIT = 0
"""Exit code after SIGTERM: a requested, clean stop."""
INTERRUPT_EXIT = 130
"""Exit code after Ctrl-C (SIGINT), as for every interrupted command."""
GRACE_SECONDS = 10
"""How long requests in flight may take to finish after a stop is asked for."""
ROUTER_MODULES: tuple[str, ...] = ()
"""Modules (under ``foretype``) whose ``router`` the service includes beside its own API, e.g. a page at ``/``."""


def register(commands: argparse._SubParsersAction) -> None:
    """Add the serve command to the parser."""
    p = commands.add_parser(
        "serve",
        help="serve models to prototype keyboards over HTTP/JSON and WebSocket (loopback)",
        description="Serve one or more models to a prototype keyboard in any language: HTTP/JSON suggestions, "
        "probabilities, model facts and learning events, and a WebSocket per typing session (docs/service.md). "
        "Listens on 127.0.0.1 unless told otherwise; any other address requires a token. "
        "Example: foretype serve -m chat.model -m other.model --port 8470",
    )
    p.add_argument(
        "-m",
        "--model",
        dest="models",
        action="append",
        default=[],
        metavar="MODEL",
        help="a model file, or NAME=FILE; repeat for each model (default: the bundled demo model, as 'demo'); the first is the default",
    )
    p.add_argument("--host", default="127.0.0.1", help="address to listen on (default 127.0.0.1; any other needs a token)")
    p.add_argument("--port", type=_port, default=8470, help="port (default 8470; 0: any free port)")
    p.add_argument("--token", default=None, help="require this token on every request (default: $FORETYPE_TOKEN; generated when not on loopback)")
    p.add_argument("--allow-host", action="append", default=[], metavar="NAME", help="also answer requests whose Host is NAME (repeatable)")
    p.add_argument("--allow-origin", action="append", default=[], metavar="URL", help="also accept requests from pages at URL, e.g. http://localhost:5173 (repeatable)")
    p.add_argument("--profiles", default=None, metavar="DIR", help="folder of named profiles' learned stores (default: ~/.local/share/foretype/profiles)")
    p.add_argument("--max-body", type=positive_int, default=65_536, metavar="BYTES", help="largest request body (default 65536)")
    p.add_argument("--max-message", type=positive_int, default=65_536, metavar="BYTES", help="largest WebSocket message (default 65536)")
    p.add_argument("--max-text", type=positive_int, default=10_000, metavar="CHARS", help="longest text before the cursor (default 10000)")
    p.add_argument("--max-k", type=positive_int, default=50, metavar="N", help="most suggestions per request (default 50)")
    p.add_argument("--max-connections", type=positive_int, default=64, metavar="N", help="concurrent requests and sockets (default 64)")
    p.add_argument("--access-log", action=argparse.BooleanOptionalAction, default=False, help="log every request line on stderr (paths only, never text; default off)")
    p.add_argument(
        "--phrases",
        default=None,
        metavar="FILE",
        help="target phrases for the keyboard page's copy task, one per line (default: the bundled demo phrases); session logs go to PROFILES/NAME/study/",
    )
    p.set_defaults(handler=run_serve)


def _port(text: str) -> int:
    """argparse type: a TCP port, 0 to 65535."""
    try:
        value = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a port number, got {text!r}") from None
    if not 0 <= value <= 65535:
        raise argparse.ArgumentTypeError(f"a port is 0 to 65535, not {value}")
    return value


def default_profiles_folder() -> Path:
    """Where profiles live unless ``--profiles`` says: ``$XDG_DATA_HOME/foretype/profiles`` or ``~/.local/share/...``."""
    data = os.environ.get("XDG_DATA_HOME")
    return (Path(data) if data else Path.home() / ".local" / "share") / "foretype" / "profiles"


def model_arguments(values: list[str]) -> dict[str, str | None]:
    """Name each MODEL argument: ``NAME=FILE``, or the file name without its extension; none: the demo.

    Raises:
        OptionError: two models with one name.
    """
    if not values:
        return {"demo": None}
    named: dict[str, str | None] = {}
    for value in values:
        name, sep, path = value.partition("=")
        if not sep or not name or os.sep in name:
            path, name = value, Path(value).stem
        if name in named:
            raise OptionError(f"two models named {name!r}: name them with NAME=FILE")
        named[name] = path
    return named


def load_models(named: dict[str, str | None]) -> dict[str, LanguageModel]:
    """Load every model (the demo model for a None path)."""
    return {name: open_model(path) for name, path in named.items()}


def open_socket(host: str, port: int) -> socket.socket:
    """Bind the listening socket before the service starts, so the port is known and errors are one line.

    Raises:
        OptionError: the address cannot be used (taken, not this machine's, not an address).
    """
    try:
        infos = socket.getaddrinfo(host, port, type=socket.SOCK_STREAM, flags=socket.AI_PASSIVE)
        family, kind, proto, _, address = infos[0]
        listener = socket.socket(family, kind, proto)
        listener.setsockopt(socket.SOL_SOCKET, socket.SO_REUSEADDR, 1)
        if family == socket.AF_INET6:
            listener.setsockopt(socket.IPPROTO_IPV6, socket.IPV6_V6ONLY, 1)
        listener.bind(address)
        listener.listen(128)
    except OSError as error:
        hint = " (choose another --port, or --port 0 for any free one)" if getattr(error, "errno", None) == 98 else ""
        raise OptionError(f"cannot listen on {host} port {port}: {error.strerror or error}{hint}") from None
    listener.set_inheritable(True)
    return listener


def token_for(host: str, given: str | None) -> tuple[str | None, bool]:
    """The token a service on ``host`` requires: the one given, else a new one off loopback, else none.

    Returns:
        (token or None, whether it was generated here).
    """
    from ..service.security import new_token
    from ..service.settings import is_loopback

    if given is not None:
        return given, False
    if is_loopback(host):
        return None, False
    return new_token(), True


def run_serve(args: argparse.Namespace) -> int:
    """foretype serve."""
    from ..service import Limits, ServiceSettings, create_app

    limits = Limits(
        max_body_bytes=args.max_body,
        max_message_bytes=args.max_message,
        max_text_chars=args.max_text,
        max_k=args.max_k,
        max_connections=args.max_connections,
    )
    token, generated = token_for(args.host, args.token or os.environ.get("FORETYPE_TOKEN") or None)
    from ..browser import StudySettings, study_router
    from ..study import demo_phrases, read_phrases

    phrases = read_phrases(args.phrases) if args.phrases else demo_phrases()
    models = load_models(model_arguments(args.models))
    profiles = Path(args.profiles) if args.profiles else default_profiles_folder()
    listener = open_socket(args.host, args.port)
    port = listener.getsockname()[1]
    settings = ServiceSettings(
        profiles_dir=profiles,
        host=args.host,
        port=port,
        token=token,
        allowed_hosts=tuple(args.allow_host),
        allowed_origins=tuple(args.allow_origin),
        limits=limits,
    )
    study = StudySettings(
        phrases=tuple(phrases),
        phrase_source=Path(args.phrases).name if args.phrases else "demo phrases",
        profiles_dir=profiles,
        model=next(iter(models)),
    )
    routers = [study_router(study)]
    routers += [importlib.import_module(f"{__package__.rsplit('.', 1)[0]}.{name}").router for name in ROUTER_MODULES]
    app = create_app(models, settings, routers=routers)
    shown = f"[{args.host}]" if ":" in args.host else args.host
    url = f"http://{shown}:{port}"
    names = ", ".join(f"{n} (default)" if i == 0 else n for i, n in enumerate(models))
    print(f"serving {names} on {url}  (API: {url}/api/openapi.json; WebSocket: ws://{shown}:{port}/api/session)", flush=True)
    print(f"keyboard page: {url}/  ({len(phrases)} copy-task phrases; session logs under PROFILES/NAME/study/)", flush=True)
    print(f"profiles: {profiles}  (learned stores and session logs are personal: they stay on this machine)", flush=True)
    if token is not None:
        print(f"token{' (generated)' if generated else ''}: {token}  (send 'Authorization: Bearer TOKEN' or ?token=TOKEN)", flush=True)
    print("Ctrl-C or SIGTERM stops it after requests in flight finish", flush=True)
    stopped_by = _serve(app, listener, access_log=args.access_log)
    print(f"stopped ({'interrupted' if stopped_by == signal.SIGINT else 'terminated' if stopped_by == signal.SIGTERM else 'done'})", file=sys.stderr, flush=True)
    return INTERRUPT_EXIT if stopped_by == signal.SIGINT else SIGTERM_EXIT


def _serve(app: Any, listener: socket.socket, *, access_log: bool) -> int | None:
    """Run uvicorn on the bound socket until a signal; returns the signal that stopped it (None: none)."""
    import uvicorn

    class Server(uvicorn.Server):
        """uvicorn's server, reporting the stopping signal instead of raising it again after shutdown."""

        stopped_by: int | None = None

        def handle_exit(self, sig: int, frame: Any) -> None:
            if self.stopped_by is None:
                self.stopped_by = sig
            super().handle_exit(sig, frame)

        def capture_signals(self):  # type: ignore[no-untyped-def, override]
            import contextlib

            @contextlib.contextmanager
            def captured():  # type: ignore[no-untyped-def]
                handled = (signal.SIGINT, signal.SIGTERM)
                previous = {sig: signal.signal(sig, self.handle_exit) for sig in handled}
                try:
                    yield
                finally:
                    for sig, handler in previous.items():
                        signal.signal(sig, handler)

            return captured()

    config = uvicorn.Config(
        app,
        log_level="warning",
        access_log=access_log,
        lifespan="on",
        ws_max_size=max(app.state.service.settings.limits.max_message_bytes * 16, 1 << 20),
        timeout_graceful_shutdown=GRACE_SECONDS,
        server_header=False,
    )
    server = Server(config)
    server.run(sockets=[listener])
    return server.stopped_by
