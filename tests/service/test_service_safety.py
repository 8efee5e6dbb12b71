"""The prediction service's safety: token, Host and Origin checks, limits, bad input, profile names.

Each refusal must be a 4xx with a JSON error body, and the service must go on
answering others afterwards.  Host and Origin checks follow the usual defence
against DNS rebinding and cross-site requests (common practice: a local
service answers only its own names and its own origin).
"""

from __future__ import annotations

import asyncio
import json
import os
import subprocess
import sys
from pathlib import Path

import httpx
import pytest
from service_server import running_service
from websockets.asyncio.client import connect
from websockets.exceptions import InvalidStatus

import foretype
from foretype.service import Limits

ROOT = Path(__file__).resolve().parents[2]
WORKED_CORPUS = ROOT / "tests" / "data" / "savings" / "worked-corpus.txt"
TOKEN = "s3cret-token-for-tests"


@pytest.fixture(scope="module")
def model(tmp_path_factory: pytest.TempPathFactory) -> foretype.LanguageModel:
    path = tmp_path_factory.mktemp("safety-model") / "worked.model"
    foretype.build([WORKED_CORPUS], vocab_size=None, min_count=1, method="kneser-ney").save(path)
    return foretype.load(path)


@pytest.fixture(scope="module")
def service(model, tmp_path_factory: pytest.TempPathFactory):
    limits = Limits(max_body_bytes=2048, max_text_chars=300, max_k=10)
    with running_service({"worked": model}, tmp_path_factory.mktemp("profiles"), limits=limits, allowed_origins=("http://localhost:5173",)) as running:
        yield running


def still_serving(url: str) -> bool:
    return httpx.get(f"{url}/api/health").json()["status"] == "ok"


def run(coroutine):
    return asyncio.run(asyncio.wait_for(coroutine, timeout=60))


def handshake_refusal(url: str, **options) -> tuple[int, str]:
    async def attempt():
        with pytest.raises(InvalidStatus) as refused:
            async with connect(url, **options):
                pass
        return refused.value.response

    response = run(attempt())
    return response.status_code, json.loads(bytes(response.body))["error"]["code"]


@pytest.mark.parametrize(
    "body, status, code",
    [
        (b'{"text": "see', 400, "bad_json"),
        (b"[]", 400, "bad_json"),
        (b'{"text": "caf\xe9"}', 400, "bad_utf8"),
        (b'{"text": "x", "colour": "red"}', 422, "unknown_field"),
        (b'{"text": 5}', 422, "bad_field"),
        (b'{"k": "5"}', 422, "bad_field"),
        (b'{"k": 0}', 422, "bad_k"),
        (b'{"k": 11}', 422, "bad_k"),
        (b'{"text": "' + b"a" * 301 + b'"}', 422, "text_too_long"),
        (b'{"text": "' + b"a" * 3000 + b'"}', 413, "body_too_large"),
        (b'{"model": "nothing"}', 404, "unknown_model"),
        (b'{"profile": "nobody"}', 404, "unknown_profile"),
        (b'{"text": "the ", "prefix": "f"}', 422, "bad_request"),
    ],
)
def test_bad_requests_get_a_json_4xx_and_the_service_goes_on(service, body, status, code):
    answer = httpx.post(f"{service.url}/api/suggest", content=body, headers={"content-type": "application/json"})
    assert answer.status_code == status, answer.text
    assert answer.json()["error"]["code"] == code
    assert still_serving(service.url)


@pytest.mark.parametrize(
    "method, path, status, code",
    [("GET", "/nowhere", 404, "not_found"), ("DELETE", "/api/suggest", 405, "method_not_allowed"), ("GET", "/api/session", 426, "websocket_only"), ("GET", "/api/models/nothing", 404, "unknown_model")],
)
def test_wrong_paths_and_methods_get_json_errors(service, method, path, status, code):
    answer = httpx.request(method, f"{service.url}{path}")
    assert answer.status_code == status and answer.json()["error"]["code"] == code


def test_a_body_without_a_content_type_is_read_as_json(service):
    # curl -d sends form encoding and fetch(string) sends text/plain: both carry JSON here.
    for kind in ("application/x-www-form-urlencoded", "text/plain;charset=UTF-8"):
        answer = httpx.post(f"{service.url}/api/suggest", content=b'{"text": "see you at the "}', headers={"content-type": kind})
        assert answer.status_code == 200 and answer.json()["suggestions"], answer.text


def test_a_websocket_message_above_the_limit_is_refused_and_the_session_goes_on(model, tmp_path):
    async def talk(url):
        async with connect(f"{url}/api/session", max_size=None) as ws:
            await ws.recv()
            await ws.send(json.dumps({"seq": 1, "text": "a" * 2000}))
            error = json.loads(await ws.recv())
            await ws.send(json.dumps({"seq": 2, "text": "the "}))
            return error, json.loads(await ws.recv())

    with running_service({"worked": model}, tmp_path, limits=Limits(max_message_bytes=1024)) as running:
        error, after = run(talk(running.ws_url))
    assert error["code"] == "message_too_large" and error["seq"] is None
    assert after["seq"] == 2 and after["type"] == "suggestions"


@pytest.mark.parametrize("host", ["evil.example", "evil.example:8470", "127.0.0.1.evil.example", "localhost.evil.example"])
def test_a_foreign_host_is_refused_dns_rebinding(service, host):
    answer = httpx.get(f"{service.url}/api/health", headers={"host": host})
    assert answer.status_code == 403 and answer.json()["error"]["code"] == "host_not_allowed"
    # The URI names the foreign host (so it is the Host header); the connection goes to loopback.
    name = host if ":" in host else f"{host}:{service.port}"
    assert handshake_refusal(f"ws://{name}/api/session", host="127.0.0.1", port=service.port) == (403, "host_not_allowed")


@pytest.mark.parametrize("host", ["127.0.0.1", "localhost", "[::1]"])
def test_loopback_names_are_answered(service, host):
    answer = httpx.get(f"{service.url}/api/health", headers={"host": f"{host}:{service.port}"})
    assert answer.status_code == 200


@pytest.mark.parametrize("origin", ["http://evil.example", "https://127.0.0.1", "http://127.0.0.1:1", "null", "http://localhost:5174"])
def test_a_page_from_another_origin_is_refused_over_http_and_websocket(service, origin):
    answer = httpx.post(f"{service.url}/api/suggest", json={"text": "the "}, headers={"origin": origin})
    assert answer.status_code == 403 and answer.json()["error"]["code"] == "origin_not_allowed"
    assert handshake_refusal(f"{service.ws_url}/api/session", origin=origin) == (403, "origin_not_allowed")


def test_the_services_own_origin_and_added_origins_are_accepted(service):
    for origin in (f"http://127.0.0.1:{service.port}", f"http://localhost:{service.port}", "http://localhost:5173"):
        answer = httpx.post(f"{service.url}/api/suggest", json={"text": "the "}, headers={"origin": origin})
        assert answer.status_code == 200, (origin, answer.text)

        async def talk(origin=origin):
            async with connect(f"{service.ws_url}/api/session", origin=origin) as ws:
                return json.loads(await ws.recv())["type"]

        assert run(talk()) == "ready"
    preflight = httpx.options(f"{service.url}/api/suggest", headers={"origin": "http://localhost:5173", "access-control-request-method": "POST", "access-control-request-headers": "content-type"})
    assert preflight.headers["access-control-allow-origin"] == "http://localhost:5173"


def test_a_token_is_required_on_http_and_websocket(model, tmp_path):
    with running_service({"worked": model}, tmp_path, token=TOKEN) as running:
        for headers in ({}, {"authorization": "Bearer wrong"}, {"authorization": TOKEN}):
            answer = httpx.get(f"{running.url}/api/health", headers=headers)
            assert answer.status_code == 401 and answer.json()["error"]["code"] == "bad_token"
        assert httpx.get(f"{running.url}/api/health", headers={"authorization": f"Bearer {TOKEN}"}).status_code == 200
        assert httpx.get(f"{running.url}/api/health?token={TOKEN}").status_code == 200
        assert handshake_refusal(f"{running.ws_url}/api/session") == (401, "bad_token")
        assert handshake_refusal(f"{running.ws_url}/api/session?token=wrong") == (401, "bad_token")

        async def talk(url, **options):
            async with connect(url, **options) as ws:
                return json.loads(await ws.recv())["type"]

        assert run(talk(f"{running.ws_url}/api/session?token={TOKEN}")) == "ready"
        assert run(talk(f"{running.ws_url}/api/session", additional_headers={"Authorization": f"Bearer {TOKEN}"})) == "ready"


def test_connections_beyond_the_limit_are_refused_until_one_closes(model, tmp_path):
    async def scenario(running):
        first = await connect(f"{running.ws_url}/api/session")
        second = await connect(f"{running.ws_url}/api/session")
        await first.recv()
        await second.recv()
        with pytest.raises(InvalidStatus) as refused:
            await connect(f"{running.ws_url}/api/session")
        async with httpx.AsyncClient() as client:
            busy = await client.get(f"{running.url}/api/health")
            await first.close()
            for _ in range(500):  # the server sees the close shortly after
                freed = await client.get(f"{running.url}/api/health")
                if freed.status_code == 200:
                    break
                await asyncio.sleep(0.01)
        await second.close()
        return refused.value.response, busy, freed

    with running_service({"worked": model}, tmp_path, limits=Limits(max_connections=2)) as running:
        refused, busy, freed = run(scenario(running))
    assert refused.status_code == 429 and json.loads(bytes(refused.body))["error"]["code"] == "too_many_connections"
    assert busy.status_code == 429 and busy.json()["error"]["code"] == "too_many_connections"
    assert freed.status_code == 200


@pytest.mark.parametrize("name", ["..", "../outside", "a/b", ".hidden", "-x", "a b", "x" * 65, "", "a\\b", "%2e%2e"])
def test_a_profile_name_cannot_name_a_path(service, name):
    before = sorted(p.name for p in service.app.state.service.profiles.folder.parent.iterdir())
    answer = httpx.post(f"{service.url}/api/profiles", json={"name": name})
    assert answer.status_code == 422 and answer.json()["error"]["code"] == "bad_profile_name"
    answer = httpx.post(f"{service.url}/api/learn", json={"profile": name, "event": "typed", "word": "ferry"})
    assert answer.status_code == 422 and answer.json()["error"]["code"] == "bad_profile_name"
    assert sorted(p.name for p in service.app.state.service.profiles.folder.parent.iterdir()) == before


def test_a_profile_linked_outside_the_folder_is_refused(model, tmp_path):
    profiles, outside = tmp_path / "profiles", tmp_path / "outside"
    profiles.mkdir()
    outside.mkdir()
    (profiles / "sneaky").symlink_to(outside, target_is_directory=True)
    with running_service({"worked": model}, profiles) as running:
        answer = httpx.post(f"{running.url}/api/learn", json={"profile": "sneaky", "event": "typed", "word": "ferry"})
        assert answer.status_code == 422 and answer.json()["error"]["code"] == "bad_profile_name"
        assert httpx.get(f"{running.url}/api/profiles").json()["profiles"] == []
    assert list(outside.iterdir()) == []


def test_the_engine_and_other_commands_never_load_the_service():
    # Common practice for a library with optional faces: the engine does not import them.
    probe = "import json, sys, foretype, foretype.cli, foretype.adapt\n" "print(json.dumps(sorted(m for m in sys.modules if m.split('.')[0] in ('fastapi', 'uvicorn', 'starlette') or m.startswith('foretype.service'))))"
    done = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True, timeout=120, env={**os.environ})
    assert done.returncode == 0, done.stderr
    assert json.loads(done.stdout) == []
