"""``foretype serve`` as a person runs it: start, ask, stop with SIGTERM or Ctrl-C, and its errors.

The service runs in its own process (``python -m foretype serve ... --port 0``),
prints its address, and is asked with real HTTP and WebSocket clients.  Exit
codes follow README "Exit codes": 0 after SIGTERM, 130 after Ctrl-C (the
usual code for an interrupted command, 128 + SIGINT; common practice), 2 for a
bad option, 5 for a missing model file.
"""

from __future__ import annotations

import asyncio
import json
import os
import re
import signal
import socket
import subprocess
import sys
from pathlib import Path

import httpx
import pytest
from websockets.asyncio.client import connect

import foretype
from foretype.adapt import LearnedFile
from foretype.cli.serve_commands import model_arguments, token_for
from foretype.errors import OptionError

ROOT = Path(__file__).resolve().parents[2]
WORKED_CORPUS = ROOT / "tests" / "data" / "savings" / "worked-corpus.txt"
FORETYPE = [sys.executable, "-c", "import sys; from foretype.cli import main; sys.exit(main())"]
"""The command line in a fresh interpreter (as the installed ``foretype`` script runs it)."""


@pytest.fixture(scope="module")
def model_path(tmp_path_factory: pytest.TempPathFactory) -> Path:
    path = tmp_path_factory.mktemp("cli-model") / "harbour.model"
    foretype.build([WORKED_CORPUS], vocab_size=None, min_count=1, method="kneser-ney").save(path)
    return path


def start(*args: str | Path) -> tuple[subprocess.Popen, str]:
    """Start ``foretype serve`` on a free port; returns the process and its base URL once it listens."""
    process = subprocess.Popen(
        [*FORETYPE, "serve", "--port", "0", *map(str, args)],
        stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, env=dict(os.environ),
    )
    assert process.stdout is not None
    first = process.stdout.readline()
    found = re.search(r"on (http://127\.0\.0\.1:\d+)", first)
    if found is None:
        process.kill()
        raise AssertionError(f"no address in {first!r}; stderr: {process.stderr.read() if process.stderr else ''}")
    return process, found.group(1)


def stop(process: subprocess.Popen, sig: int) -> tuple[int, str]:
    process.send_signal(sig)
    _, err = process.communicate(timeout=60)
    return process.returncode, err


def test_serve_answers_then_sigterm_closes_the_store_and_exits_0(model_path, tmp_path):
    profiles = tmp_path / "profiles"
    (profiles / "p01").mkdir(parents=True)
    process, url = start("-m", model_path, "--profiles", profiles)
    try:
        assert httpx.get(f"{url}/api/health").json()["models"] == ["harbour"]
        assert httpx.post(f"{url}/api/suggest", json={"text": "see you at the "}).json()["suggestions"]

        async def learn():
            async with connect(url.replace("http", "ws") + "/api/session?profile=p01&learn=true") as ws:
                await ws.recv()
                await ws.send(json.dumps({"type": "learn", "seq": 1, "event": "typed", "word": "Brackwater", "context": ["at", "the"]}))
                return json.loads(await ws.recv())

        assert asyncio.run(asyncio.wait_for(learn(), 60))["tokens"] == 1
    finally:
        code, err = stop(process, signal.SIGTERM)
    assert code == 0, err
    assert err.strip().splitlines()[-1] == "stopped (terminated)"
    # The store was closed: another writer may open it at once, and it holds the word learned.
    with LearnedFile(profiles / "p01" / "harbour.learned", foretype.load(model_path)) as learned:
        assert learned.model.user.raw_tokens == 1 and learned.model.user.holds("Brackwater")


def test_ctrl_c_exits_130(model_path, tmp_path):
    process, url = start("-m", model_path, "--profiles", tmp_path)
    assert httpx.get(f"{url}/api/health").status_code == 200
    code, err = stop(process, signal.SIGINT)
    assert code == 130, err
    assert "Traceback" not in err


def test_two_models_by_name_behind_a_given_token(model_path, tmp_path):
    process, url = start("-m", f"a={model_path}", "-m", f"b={model_path}", "--profiles", tmp_path, "--token", "t0ken")
    try:
        assert httpx.get(f"{url}/api/health").status_code == 401
        with httpx.Client(headers={"authorization": "Bearer t0ken"}) as client:
            assert client.get(f"{url}/api/health").json()["models"] == ["a", "b"]
            assert client.post(f"{url}/api/suggest", json={"model": "b", "text": "the "}).json()["model"] == "b"
    finally:
        stop(process, signal.SIGTERM)


def test_a_port_in_use_is_one_line_and_exit_2(model_path, tmp_path):
    taken = socket.socket()
    taken.bind(("127.0.0.1", 0))
    taken.listen(1)
    try:
        done = subprocess.run([*FORETYPE, "serve", "-m", str(model_path), "--port", str(taken.getsockname()[1])], capture_output=True, text=True, timeout=120)
    finally:
        taken.close()
    assert done.returncode == 2
    assert len(done.stderr.strip().splitlines()) == 1 and "cannot listen" in done.stderr


def test_bad_arguments_exit_with_their_codes(run_cli, model_path, tmp_path):
    missing = run_cli("serve", "-m", tmp_path / "missing.model", "--port", "0")
    assert missing.code == 5 and len(missing.err.strip().splitlines()) == 1
    twice = run_cli("serve", "-m", model_path, "-m", model_path, "--port", "0")
    assert twice.code == 2 and "two models named 'harbour'" in twice.err
    assert run_cli("serve", "--port", "70000").code == 2


def test_model_names_and_tokens():
    assert model_arguments([]) == {"demo": None}
    assert model_arguments(["x/chat.model", "b=x/chat.model"]) == {"chat": "x/chat.model", "b": "x/chat.model"}
    with pytest.raises(OptionError):
        model_arguments(["a/chat.model", "b/chat.model"])
    assert token_for("127.0.0.1", None) == (None, False)
    assert token_for("localhost", "given") == ("given", False)
    token, generated = token_for("192.0.2.10", None)  # any address off loopback needs a token
    assert generated and len(token) >= 32
