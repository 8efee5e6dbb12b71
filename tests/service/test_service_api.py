"""The prediction service's HTTP API against the engine and the command line, through a real server.

A uvicorn server answers on a free loopback port; an httpx client asks it.
The suggestions must be exactly what ``foretype suggest --json`` prints for the
same model and text (with a profile: ``--adapt --user`` its learned file), and
both must equal a brute-force ranking of every vocabulary word (score each
with ``prob``, sort by probability descending then word ascending; the
definition of exact top-k in docs/models.md "Suggestions are exact").
"""

from __future__ import annotations

import json
import math
import threading
from pathlib import Path

import httpx
import pytest
from service_server import SlowModel, running_service

import foretype
from foretype.text import model_form
from foretype.version import __version__

ROOT = Path(__file__).resolve().parents[2]
WORKED_CORPUS = ROOT / "tests" / "data" / "savings" / "worked-corpus.txt"
TEXTS = ["", "see you at the ", "see you at the sta", "The ferry is ", "the tide is hi", "Gorbalt wrote to the ", "x", "at the harbour. Se", "  "]


@pytest.fixture(scope="module")
def models(tmp_path_factory: pytest.TempPathFactory) -> dict[str, Path]:
    folder = tmp_path_factory.mktemp("service-models")
    lines = (ROOT / "demo_vocab" / "corpus.txt").read_text(encoding="utf-8").splitlines()[:3000]
    corpus = folder / "corpus.txt"
    corpus.write_text("\n".join(lines) + "\n", encoding="utf-8")
    paths = {"ferry": folder / "ferry.model", "worked": folder / "worked.model"}
    foretype.build([corpus], vocab_size=None, min_count=1, method="kneser-ney").save(paths["ferry"])
    foretype.build([WORKED_CORPUS], vocab_size=None, min_count=1, method="mle").save(paths["worked"])
    return paths


@pytest.fixture(scope="module")
def service(models: dict[str, Path], tmp_path_factory: pytest.TempPathFactory):
    loaded = {name: foretype.load(path) for name, path in models.items()}
    with running_service(loaded, tmp_path_factory.mktemp("profiles")) as running:
        yield running


@pytest.fixture
def client(service):
    with httpx.Client(base_url=service.url, timeout=30) as c:
        yield c


def brute_force(model: foretype.LanguageModel, context: list[str], prefix: str, k: int) -> list[tuple[str, float]]:
    """Every vocabulary word with the prefix, scored one by one, best k (probability descending, word ascending)."""
    typed = model_form(prefix)
    scored = [(model.prob(w, context), w) for w in model.vocabulary if w.startswith(typed)]
    scored.sort(key=lambda pair: (-pair[0], pair[1]))
    return [(w, p) for p, w in scored[:k]]


@pytest.mark.parametrize("text", TEXTS)
@pytest.mark.parametrize("k", [1, 5, 12])
def test_suggestions_equal_the_command_line_and_brute_force(client, models, run_cli, text, k):
    answer = client.post("/api/suggest", json={"model": "ferry", "text": text, "k": k})
    assert answer.status_code == 200, answer.text
    got = answer.json()
    printed = run_cli("suggest", "-m", models["ferry"], text, "-k", str(k), "--json")
    assert printed.code == 0, printed.err
    expected = json.loads(printed.out)
    assert got["context"] == expected["context"] and got["prefix"] == expected["prefix"]
    assert [{key: s[key] for key in ("word", "prob", "order")} for s in got["suggestions"]] == expected["suggestions"]
    assert all(s["learned"] is False and s["new_word"] is False for s in got["suggestions"])
    assert got["model"] == "ferry" and got["profile"] is None and got["user_share"] is None
    model = foretype.load(models["ferry"])
    reference = brute_force(model, got["context"], got["prefix"], k)
    assert [model_form(s["word"]) for s in got["suggestions"]] == [w for w, _ in reference]
    assert [s["prob"] for s in got["suggestions"]] == [p for _, p in reference]


def test_context_and_prefix_give_the_same_list_as_the_text(client):
    by_text = client.post("/api/suggest", json={"model": "ferry", "text": "see you at the sta", "k": 7}).json()
    by_words = client.post("/api/suggest", json={"model": "ferry", "context": ["see", "you", "at", "the"], "prefix": "sta", "k": 7}).json()
    assert by_words["context"] == ["at", "the"] and by_words["prefix"] == "sta"
    assert by_words["suggestions"] == by_text["suggestions"]


@pytest.mark.parametrize(("text", "leave_out"), [("see you at the sta", ["station", "Start", "nobody"]), ("", ["The", "I"]), ("the tide is hi", ["high"])])
def test_words_left_out_are_removed_before_the_top_k_is_taken(client, models, text, leave_out):
    # Brute force: the full ranking, minus the left-out words (as model forms), first k; a sentence's first word capitalised.
    answer = client.post("/api/suggest", json={"model": "ferry", "text": text, "k": 5, "leave_out": leave_out})
    assert answer.status_code == 200, answer.text
    got = answer.json()
    model = foretype.load(models["ferry"])
    gone = {model_form(w) for w in leave_out}
    reference = [(w, p) for w, p in brute_force(model, got["context"], got["prefix"], 10_000) if w not in gone][:5]
    assert [model_form(s["word"]) for s in got["suggestions"]] == [w for w, _ in reference]
    assert [s["prob"] for s in got["suggestions"]] == [p for _, p in reference]
    if not got["context"]:
        assert all(s["word"][:1].isupper() for s in got["suggestions"])
    plain = client.post("/api/suggest", json={"model": "ferry", "text": text, "k": 5}).json()["suggestions"]
    assert any(model_form(s["word"]) in gone for s in plain)  # the words left out were on the plain list


@pytest.mark.parametrize("leave_out", ["station", ["ok", 3], ["w"] * 1001])
def test_a_bad_leave_out_is_refused(client, leave_out):
    answer = client.post("/api/suggest", json={"model": "ferry", "text": "the ", "k": 5, "leave_out": leave_out})
    assert answer.status_code == 422, answer.text


def test_the_default_model_is_the_first(client):
    assert client.post("/api/suggest", json={"text": "the "}).json()["model"] == "ferry"


def test_word_probability_matches_counts_by_hand(client):
    # The worked corpus (docs/savings.md "Worked example"): 3 of 6 sentences start with "the", 2 of them
    # continue "ferry": P(ferry | <s> the) = 2/3 under maximum likelihood, counted by hand.
    got = client.post("/api/probability", json={"model": "worked", "word": "ferry", "context": ["the"]}).json()
    assert got["prob"] == pytest.approx(2 / 3, rel=1e-6)
    # "the ferry" is followed by "leaves", "is" and the sentence end once each: 1/3 each.
    got = client.post("/api/probability", json={"model": "worked", "word": "is", "context": ["the", "ferry"]}).json()
    assert got["prob"] == pytest.approx(1 / 3, rel=1e-6)
    got = client.post("/api/probability", json={"model": "worked", "word": "</s>", "context": ["the", "ferry"]}).json()
    assert got["prob"] == pytest.approx(1 / 3, rel=1e-6)


def test_sentence_probability_is_the_chain_rule(client, models):
    # log2 P(w1..wn </s>) = sum of log2 P(w_i | w_{i-2} w_{i-1}) (the chain rule of a trigram model).
    got = client.post("/api/probability", json={"model": "worked", "sentence": "See you at the ferry."}).json()
    assert got["words"] == ["See", "you", "at", "the", "ferry"] and got["tokens"] == 6
    # By hand: "see" starts 3 of 6 sentences, then you, at, the follow with certainty; "at the" is
    # followed by harbour, ferry, slipway (1/3 each); "the ferry" by leaves, is, the end (1/3 each).
    assert got["prob"] == pytest.approx(1 / 2 * 1 / 3 * 1 / 3, rel=1e-6)
    assert got["perplexity"] == pytest.approx(18 ** (1 / 6), rel=1e-6)
    model = foretype.load(models["worked"])
    assert got["log2_prob"] == pytest.approx(model.logprob(got["words"]), abs=1e-12)


def test_a_zero_probability_sentence_has_no_perplexity(client):
    got = client.post("/api/probability", json={"model": "worked", "sentence": "the ferry leaves late"}).json()
    assert got["prob"] == 0.0 and got["log2_prob"] is None and got["perplexity"] is None


def test_model_facts_are_those_of_info(client, models, run_cli):
    printed = json.loads(run_cli("info", "-m", models["worked"], "--json").out)
    got = client.get("/api/models/worked").json()
    assert got["name"] == "worked"
    for key in ("method", "vocab_size", "ngrams", "corpus_tokens", "value_encoding"):
        assert got[key] == printed[key]
    listed = client.get("/api/models").json()
    assert listed["default_model"] == "ferry" and [m["name"] for m in listed["models"]] == ["ferry", "worked"]
    assert client.get("/api/health").json() == {"status": "ok", "version": __version__, "models": ["ferry", "worked"], "default_model": "ferry"}


def test_openapi_description_lists_every_endpoint(client):
    spec = client.get("/api/openapi.json").json()
    assert spec["openapi"].startswith("3.")
    for path in ("/api/health", "/api/models", "/api/models/{name}", "/api/suggest", "/api/probability", "/api/profiles", "/api/learn"):
        assert path in spec["paths"], path
    request = spec["components"]["schemas"]["SuggestRequest"]
    assert set(request["properties"]) == {"model", "text", "context", "prefix", "k", "profile", "leave_out"}


def test_learning_events_then_suggestions_equal_suggest_adapt(client, service, models, run_cli):
    assert client.post("/api/profiles", json={"name": "p07"}).status_code == 201
    assert client.post("/api/profiles", json={"name": "p07"}).json() == {"name": "p07", "created": False}
    for _ in range(3):
        for event in ({"event": "typed", "word": "Quillon", "context": ["at", "the"]}, {"event": "taken", "word": "quay", "context": ["the", "Quillon"]}, {"event": "sentence_end", "context": ["Quillon", "quay"]}):
            answer = client.post("/api/learn", json={"model": "ferry", "profile": "p07", **event})
            assert answer.status_code == 200, answer.text
    assert answer.json()["tokens"] == 9 and answer.json()["learning"] is True
    got = client.post("/api/suggest", json={"model": "ferry", "profile": "p07", "text": "see you at the Q", "k": 5}).json()
    learned_file = service.app.state.service.profiles.folder / "p07" / "ferry.learned"
    printed = run_cli("suggest", "-m", models["ferry"], "see you at the Q", "--adapt", "--user", learned_file, "--json")
    expected = json.loads(printed.out)
    assert got["suggestions"] == expected["suggestions"] and got["user_share"] == expected["user_share"]
    assert got["suggestions"][0]["word"] == "Quillon" and got["suggestions"][0]["new_word"] is True
    assert client.get("/api/profiles").json()["profiles"] == ["p07"]


def test_a_request_in_flight_finishes_when_the_service_stops(models, tmp_path):
    slow = SlowModel(foretype.load(models["worked"]), delay=1.0)
    with running_service({"slow": slow}, tmp_path) as running:
        result: dict[str, httpx.Response] = {}

        def ask() -> None:
            result["answer"] = httpx.post(f"{running.url}/api/suggest", json={"text": "the "}, timeout=30)

        asker = threading.Thread(target=ask)
        asker.start()
        for _ in range(3000):  # until the server holds the request (uvicorn's own task list)
            if running.server.server_state.tasks:
                break
            threading.Event().wait(0.01)
        assert running.server.server_state.tasks
        running.server.should_exit = True  # as after SIGTERM: stop accepting, let the request finish
        asker.join(timeout=30)
    assert result["answer"].status_code == 200
    assert [s["word"] for s in result["answer"].json()["suggestions"]][:1] == ["ferry"]


def test_nan_free_json_and_finite_probabilities(client):
    got = client.post("/api/suggest", json={"model": "ferry", "text": "the ", "k": 50}).json()
    assert all(math.isfinite(s["prob"]) and 0 < s["prob"] <= 1 for s in got["suggestions"])
