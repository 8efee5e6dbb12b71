"""The WebSocket typing session: sequence numbers, latest-wins, learning, and bad messages.

Real clients (the ``websockets`` library) against a uvicorn server on a free
loopback port.  Replies must equal ``foretype suggest --json`` for the same
text; when requests queue behind a slow answer, only the newest is answered.
"""

from __future__ import annotations

import asyncio
import json
from pathlib import Path

import pytest
from service_server import SlowModel, running_service
from websockets.asyncio.client import connect
from websockets.exceptions import InvalidStatus

import foretype

ROOT = Path(__file__).resolve().parents[2]
WORKED_CORPUS = ROOT / "tests" / "data" / "savings" / "worked-corpus.txt"


@pytest.fixture(scope="module")
def model_path(tmp_path_factory: pytest.TempPathFactory) -> Path:
    path = tmp_path_factory.mktemp("session-model") / "worked.model"
    foretype.build([WORKED_CORPUS], vocab_size=None, min_count=1, method="kneser-ney").save(path)
    return path


@pytest.fixture(scope="module")
def service(model_path: Path, tmp_path_factory: pytest.TempPathFactory):
    model = foretype.load(model_path)
    profiles = tmp_path_factory.mktemp("profiles")
    (profiles / "p01").mkdir()
    with running_service({"worked": model, "slow": SlowModel(model, delay=0.5)}, profiles) as running:
        yield running


def run(coroutine):
    return asyncio.run(asyncio.wait_for(coroutine, timeout=60))


async def _receive(ws) -> dict:
    return json.loads(await ws.recv())


def test_each_reply_carries_its_seq_and_equals_suggest(service, model_path, run_cli):
    texts = ["", "see you at the ", "see you at the s", "The tide is "]

    async def talk():
        replies = []
        async with connect(f"{service.ws_url}/api/session?model=worked&k=3") as ws:
            ready = await _receive(ws)
            assert ready["type"] == "ready" and ready["model"] == "worked" and ready["k"] == 3
            for seq, text in enumerate(texts, start=10):
                await ws.send(json.dumps({"seq": seq, "text": text}))
                replies.append(await _receive(ws))  # one at a time: nothing queues, nothing is dropped
        return replies

    for seq, (text, reply) in enumerate(zip(texts, run(talk())), start=10):
        assert reply["type"] == "suggestions" and reply["seq"] == seq and reply["dropped"] == 0
        expected = json.loads(run_cli("suggest", "-m", model_path, text, "-k", "3", "--json").out)
        assert reply["context"] == expected["context"] and reply["prefix"] == expected["prefix"]
        assert [{k: s[k] for k in ("word", "prob", "order")} for s in reply["suggestions"]] == expected["suggestions"]


def test_queued_requests_are_dropped_and_the_latest_is_answered(service):
    # The slow model takes 0.5 s per answer, so the nine requests sent right after the first
    # queue behind it; the service must answer the first, then only the tenth.
    async def talk():
        async with connect(f"{service.ws_url}/api/session?model=slow") as ws:
            await _receive(ws)
            for seq in range(1, 11):
                await ws.send(json.dumps({"seq": seq, "text": "see you at the " + "s" * (seq % 2)}))
            replies = []
            while not replies or replies[-1]["seq"] != 10:
                replies.append(await _receive(ws))
            return replies

    replies = run(talk())
    seqs = [r["seq"] for r in replies]
    assert all(r["type"] == "suggestions" for r in replies)
    assert seqs == sorted(set(seqs)) and seqs[-1] == 10  # never a reply older than one already sent
    assert len(replies) + sum(r["dropped"] for r in replies) == 10  # every request answered or counted as dropped
    assert len(replies) < 10
    assert replies[-1]["prefix"] == ""  # the tenth text ends in a space


def test_a_seq_that_does_not_increase_is_an_error_and_the_session_goes_on(service):
    async def talk():
        async with connect(f"{service.ws_url}/api/session") as ws:
            await _receive(ws)
            await ws.send(json.dumps({"seq": 5, "text": "the "}))
            first = await _receive(ws)
            await ws.send(json.dumps({"seq": 5, "text": "the f"}))
            repeated = await _receive(ws)
            await ws.send(json.dumps({"seq": 6, "text": "the f"}))
            return first, repeated, await _receive(ws)

    first, repeated, after = run(talk())
    assert first["seq"] == 5 and first["type"] == "suggestions"
    assert repeated == {"type": "error", "seq": 5, "code": "bad_request", "message": repeated["message"]}
    assert after["type"] == "suggestions" and after["seq"] == 6 and after["prefix"] == "f"


@pytest.mark.parametrize(
    "message, code",
    [
        ("not json", "bad_json"),
        ("[1, 2]", "bad_json"),
        (json.dumps({"seq": 1, "text": "a", "colour": "red"}), "unknown_field"),
        (json.dumps({"seq": "1", "text": "a"}), "bad_field"),
        (json.dumps({"seq": 1, "text": 7}), "bad_field"),
        (json.dumps({"seq": 1, "type": "shout"}), "bad_field"),
        (json.dumps({"seq": 1, "text": "a", "k": 0}), "bad_k"),
        (json.dumps({"seq": 1, "text": "a", "k": 51}), "bad_k"),
        (json.dumps({"seq": 1, "text": "a" * 10_001}), "text_too_long"),
        (json.dumps({"seq": 1, "text": "a", "leave_out": "ab"}), "bad_leave_out"),
        (json.dumps({"seq": 1, "text": "a" * 70_000}), "message_too_large"),
        (b"\xff\xfe{}", "bad_utf8"),
        (json.dumps({"seq": 1, "type": "learn", "event": "typed", "word": "ferry"}), "learning_not_enabled"),
    ],
)
def test_bad_messages_get_an_error_and_the_session_keeps_answering(service, message, code):
    async def talk():
        async with connect(f"{service.ws_url}/api/session", max_size=None) as ws:
            await _receive(ws)
            await ws.send(message)
            error = await _receive(ws)
            await ws.send(json.dumps({"seq": 100, "text": "see you at the "}))
            return error, await _receive(ws)

    error, after = run(talk())
    assert error["type"] == "error" and error["code"] == code, error
    assert after["type"] == "suggestions" and after["seq"] == 100


def test_a_learning_session_learns_in_order_and_suggests_the_new_word(service, model_path, run_cli):
    async def talk():
        async with connect(f"{service.ws_url}/api/session?model=worked&profile=p01&learn=true") as ws:
            ready = await _receive(ws)
            replies = []
            seq = 0
            for _ in range(2):
                for event in ({"event": "typed", "word": "Wendlecombe", "context": ["at", "the"]}, {"event": "sentence_end", "context": ["the", "Wendlecombe"]}):
                    seq += 1
                    await ws.send(json.dumps({"type": "learn", "seq": seq, **event}))
                    replies.append(await _receive(ws))
            await ws.send(json.dumps({"seq": seq + 1, "text": "see you at the w"}))
            return ready, replies, await _receive(ws)

    ready, learned, suggested = run(talk())
    assert ready["profile"] == "p01" and ready["learn"] is True
    assert [r["seq"] for r in learned] == [1, 2, 3, 4] and [r["tokens"] for r in learned] == [1, 2, 3, 4]
    assert suggested["suggestions"][0]["word"] == "Wendlecombe" and suggested["suggestions"][0]["new_word"] is True
    learned_file = service.app.state.service.profiles.folder / "p01" / "worked.learned"
    expected = json.loads(run_cli("suggest", "-m", model_path, "see you at the w", "--adapt", "--user", learned_file, "--json").out)
    assert suggested["suggestions"] == expected["suggestions"] and suggested["user_share"] == expected["user_share"]


@pytest.mark.parametrize(
    "query, status, code",
    [
        ("model=nothing", 404, "unknown_model"),
        ("profile=nobody", 404, "unknown_profile"),
        ("profile=..%2Fescape", 422, "bad_profile_name"),
        ("learn=true", 422, "bad_request"),
        ("k=0", 422, "bad_k"),
        ("colour=red", 422, "unknown_field"),
    ],
)
def test_a_bad_session_is_refused_at_the_handshake_with_a_json_error(service, query, status, code):
    async def talk():
        with pytest.raises(InvalidStatus) as refused:
            async with connect(f"{service.ws_url}/api/session?{query}"):
                pass
        return refused.value.response

    response = run(talk())
    assert response.status_code == status
    assert json.loads(bytes(response.body))["error"]["code"] == code
