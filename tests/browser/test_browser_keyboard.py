"""The browser keyboard in a real headless browser: Debian's Chromium driven by Playwright.

``foretype serve`` runs as a separate process on a free loopback port with a
small model and a phrase file; the page is typed on by clicking keys and by
keyboard events, under Playwright's fake clock so every event's time is known.
The session log's measures are checked against values worked by hand for the
script of events (formulas: Soukoreff & MacKenzie, CHI 2003).  Nothing is
downloaded: the browser is /usr/bin/chromium (``.ci/run`` installs it).
"""

from __future__ import annotations

import json
import os
import socket
import subprocess
import sys
import time
import urllib.error
import urllib.request
from collections.abc import Iterator
from dataclasses import dataclass
from pathlib import Path

import pytest

CHROMIUM = Path("/usr/bin/chromium")
CHROMIUM_ARGS = [
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--no-first-run",
]
CORPUS = "See you at the slipway.\nSee you at the harbour.\nThe ferry is late.\nThe ferry leaves at noon.\nSee you at the slipway!\n"
PHRASES = "See you at the slipway\nThe ferry is late\n"
STEP_MS = 500

pytestmark = pytest.mark.skipif(
    not CHROMIUM.exists() and not os.environ.get("CI"),
    reason="Debian's chromium is not installed (apt-get install chromium; .ci/run does this)",
)


@dataclass
class Server:
    """A running ``foretype serve`` process."""

    process: subprocess.Popen[bytes]
    base: str
    profiles: Path

    def logs(self, profile: str) -> list[Path]:
        return sorted((self.profiles / profile / "study").glob("*.jsonl"))


def _free_port() -> int:
    with socket.socket() as probe:
        probe.bind(("127.0.0.1", 0))
        return int(probe.getsockname()[1])


def start_server(folder: Path, model: Path, *extra: str) -> Server:
    """Start ``foretype serve MODEL --phrases FILE`` and wait until it answers its health check."""
    phrases = folder / "phrases.txt"
    phrases.write_text(PHRASES, encoding="utf-8")
    profiles = folder / "profiles"
    profiles.mkdir()
    port = _free_port()
    command = [sys.executable, "-c", "from foretype.cli import main; raise SystemExit(main())", "serve", "-m", str(model), "--port", str(port), "--profiles", str(profiles), "--phrases", str(phrases), *extra]
    process = subprocess.Popen(command, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    base = f"http://127.0.0.1:{port}"
    for _ in range(1200):  # up to two minutes on a busy two-core machine
        if process.poll() is not None:
            raise AssertionError(f"serve exited with {process.returncode}: {process.stderr.read().decode() if process.stderr else ''}")
        try:
            with urllib.request.urlopen(base + "/api/health", timeout=1) as answer:
                if answer.status == 200:
                    return Server(process, base, profiles)
        except urllib.error.HTTPError:
            return Server(process, base, profiles)  # it answers (a service with a token refuses the bare check)
        except OSError:
            time.sleep(0.1)
    process.kill()
    raise AssertionError("serve did not answer within two minutes")


def stop(server: Server) -> None:
    if server.process.poll() is None:
        server.process.terminate()
        try:
            server.process.wait(timeout=15)
        except subprocess.TimeoutExpired:
            server.process.kill()
            server.process.wait()


@pytest.fixture(scope="module")
def model(tmp_path_factory: pytest.TempPathFactory) -> Path:
    from foretype.cli import main

    folder = tmp_path_factory.mktemp("keyboard-model")
    corpus = folder / "corpus.txt"
    corpus.write_text(CORPUS, encoding="utf-8")
    path = folder / "tiny.model"
    assert main(["build", str(corpus), "-o", str(path), "--min-count", "1"]) == 0
    return path


@pytest.fixture(scope="module")
def server(tmp_path_factory: pytest.TempPathFactory, model: Path) -> Iterator[Server]:
    """One service for the tests that leave it running (each uses its own profile)."""
    running = start_server(tmp_path_factory.mktemp("keyboard-serve"), model)
    yield running
    stop(running)


@pytest.fixture
def own_server(tmp_path: Path, model: Path) -> Iterator[Server]:
    """A service of the test's own, for a test that stops it."""
    running = start_server(tmp_path, model)
    yield running
    stop(running)


@pytest.fixture(scope="module")
def browser() -> Iterator[object]:
    from playwright.sync_api import sync_playwright

    with sync_playwright() as playwright:
        launched = playwright.chromium.launch(executable_path=str(CHROMIUM), args=CHROMIUM_ARGS)
        yield launched
        launched.close()


def page_state(page) -> dict:
    return page.evaluate("window.foretypeKeyboard.state()")


def settle(page) -> dict:
    """Wait (in real time) until the latest suggestion request is answered and every logged event is written."""
    for _ in range(400):
        state = page_state(page)
        if state["seq"] == state["shownSeq"] and state["pending"] == 0:
            return state
        time.sleep(0.025)
    raise AssertionError(f"the page did not settle: {page_state(page)}")


def open_page(browser, server: Server, query: str = "?k=3&placement=left&layout=alphabetic&profile=p01"):
    context = browser.new_context(viewport={"width": 1100, "height": 900})
    page = context.new_page()
    errors: list[str] = []
    page.on("pageerror", lambda error: errors.append(str(error)))
    page.clock.install(time=0)
    page.goto(server.base + "/" + query)
    page.wait_for_selector("body[data-ready='1']")
    page.clock.pause_at(60_000)  # from here on the page's time moves only when the test says so
    settle(page)
    return context, page, errors


def step(page, action) -> dict:
    """Advance the page's clock by STEP_MS, do one action, wait for its answer."""
    page.clock.run_for(STEP_MS)
    action()
    return settle(page)


def tally(page) -> tuple[str, str, str, str]:
    return tuple(page.inner_text(f"#t-{name}") for name in ("chars", "keys", "ksr", "taken"))  # type: ignore[return-value]


def read_log(path: Path) -> list[dict]:
    return [json.loads(line) for line in path.read_text(encoding="utf-8").splitlines()]


def test_a_session_typed_by_clicks_keys_and_suggestions(browser, server: Server) -> None:
    from foretype.study import session_report

    context, page, errors = open_page(browser, server)
    page.click("#start-study")
    settle(page)
    assert page.inner_text("#target") == "See you at the slipway"
    # Phrase 1, twelve keystrokes STEP_MS apart: "See" taken by a click, "you " typed on the physical keyboard,
    # a, r, backspace, t, space clicked on the screen keys, "the" taken with Tab, "slipway" with alt+1.
    step(page, lambda: page.click("#rail .suggestion:has-text('See')"))
    for char in "you ":
        step(page, lambda char=char: page.keyboard.press("Space" if char == " " else char))
    for name in ("a", "r", "backspace", "t", " "):
        step(page, lambda name=name: page.click(f'.key[data-key="{name}"]'))
    assert page_state(page)["text"] == "See you at "
    step(page, lambda: page.keyboard.press("Tab"))
    state = step(page, lambda: page.keyboard.press("Alt+1"))
    assert state["text"] == "See you at the slipway "
    assert page.inner_text("#text-body") == "See you at the slipway "
    # The tally, by hand: 22 characters (the trailing automatic space is not counted), 12 keystrokes,
    # savings 1 - 12/22 = 45.5%, 3 words taken.
    assert tally(page) == ("22", "12", "45.5%", "3")
    step(page, lambda: page.keyboard.press("Enter"))
    assert page.inner_text("#target") == "The ferry is late"
    assert tally(page) == ("0", "0", "—", "0")
    # Phrase 2 typed in full on the keyboard with one uncorrected slip ("lste"), 17 keys.
    for char in "The ferry is lste":
        step(page, lambda char=char: page.keyboard.press("Space" if char == " " else char))
    step(page, lambda: page.keyboard.press("Enter"))
    page.wait_for_selector("#done:not([hidden])")
    page.wait_for_function("document.getElementById('done-summary').textContent.includes('phrases')")
    summary = page.inner_text("#done-summary")
    context.close()
    assert errors == []

    (log_path,) = server.logs("p01")
    events = read_log(log_path)
    assert events[0]["kind"] == "session_start" and events[0]["k"] == 3 and events[0]["layout"] == "alphabetic"
    assert events[-1]["kind"] == "session_end"
    takes = [(e["word"], e["rank"]) for e in events if e["kind"] == "take"]
    assert takes == [("See", 1), ("the", 1), ("slipway", 1)]
    assert all(len(e["words"]) <= 3 for e in events if e["kind"] == "list")
    report = session_report(log_path)
    first, second = report.phrases
    # Hand values, phrase 1: T = "See you at the slipway" (22), 12 keystrokes, S = 11 x 0.5 s = 5.5 s,
    # WPM = 21 / 5.5 x 60 / 5 = 45.82; KSPC = 12/22; the erased "r" is IF = 1, MSD = 0, so C = 22 and
    # total error rate = 1/23 (Soukoreff & MacKenzie 2003).
    assert (first.characters, first.keystrokes, first.taken, first.backspaces) == (22, 12, 3, 1)
    assert first.seconds == pytest.approx(5.5)
    assert first.wpm == pytest.approx(21 / 5.5 * 12)
    assert first.kspc == pytest.approx(12 / 22)
    assert first.ksr == pytest.approx(10 / 22)
    assert (first.errors.correct, first.errors.incorrect_not_fixed, first.errors.incorrect_fixed) == (22, 0, 1)
    assert first.errors.total_error_rate == pytest.approx(1 / 23)
    # Phrase 2: "The ferry is lste" (17) for "The ferry is late": 17 keys over 16 x 0.5 = 8 s, WPM = 16 / 8 x 12 = 24;
    # MSD = 1 (one substitution), C = 16, INF = 1, IF = 0: MSD error rate 1/17, total 1/17, uncorrected 1/17.
    assert (second.characters, second.keystrokes, second.taken) == (17, 17, 0)
    assert second.wpm == pytest.approx(24.0)
    assert second.errors.msd_error_rate == pytest.approx(1 / 17)
    assert second.errors.uncorrected_error_rate == pytest.approx(1 / 17)
    assert second.errors.corrected_error_rate == 0.0
    s = report.session
    assert (s.phrases, s.characters, s.keystrokes) == (2, 39, 29)
    assert s.wpm == pytest.approx((21 / 5.5 * 12 + 24.0) / 2)
    assert s.ksr == pytest.approx(1 - 29 / 39)
    # The page's closing summary comes from the same measures.
    assert summary.startswith("2 phrases")
    assert f"keystroke savings {100 * (1 - 29 / 39):.1f}%" in summary


def test_the_designer_changes_count_placement_and_layout(browser, server: Server) -> None:
    context, page, errors = open_page(browser, server, "?k=5")
    page.click("#toggle-design")
    page.select_option("#placement", "under")
    page.select_option("#layout", "typewriter")
    page.fill("#k", "2")
    page.dispatch_event("#k", "input")
    settle(page)
    # Two suggestions, as chips under the text; no column beside the keys; the first key row starts with q.
    assert page.locator("#chips-under .suggestion").count() == 2
    assert page.locator("#rail .suggestion").count() == 0
    assert page.locator("#chips-under").is_visible()
    assert page.locator(".row").first.locator(".key").first.inner_text() == "q"
    page.fill("#k", "9")
    page.dispatch_event("#k", "input")
    settle(page)
    assert 2 < page.locator("#chips-under .suggestion").count() <= 9
    context.close()
    assert errors == []


def test_browser_closed_mid_phrase_leaves_a_whole_log(browser, server: Server, run_cli) -> None:
    context, page, _ = open_page(browser, server, "?k=3&profile=p05")
    page.click("#start-study")
    settle(page)
    for char in "See y":
        step(page, lambda char=char: page.keyboard.press("Space" if char == " " else char))
    context.close()  # the participant closes the page mid-phrase
    (log_path,) = server.logs("p05")
    raw = log_path.read_bytes()
    assert raw.endswith(b"\n")
    from foretype.study import read_session_log

    log = read_session_log(log_path)
    assert not log.torn_last_line and not log.ended
    assert log.cut_short == [0]
    assert log.phrases[0].last_text == "See y"
    result = run_cli("study", "report", log_path)
    assert result.code == 0
    assert "phrase 1 was cut short" in result.out


def test_server_stopped_mid_session_leaves_a_whole_log(browser, own_server: Server, run_cli) -> None:
    context, page, _ = open_page(browser, own_server)
    page.click("#start-study")
    settle(page)
    for char in "See you at the slipway":
        step(page, lambda char=char: page.keyboard.press("Space" if char == " " else char))
    step(page, lambda: page.keyboard.press("Enter"))
    for char in "The f":
        step(page, lambda char=char: page.keyboard.press("Space" if char == " " else char))
    own_server.process.kill()  # the server dies mid-session, without any chance to tidy up
    own_server.process.wait()
    context.close()
    (log_path,) = own_server.logs("p01")
    from foretype.study import read_session_log, session_report

    log = read_session_log(log_path)
    assert not log.torn_last_line
    assert log.cut_short == [1]
    assert log.phrases[1].last_text == "The f"
    report = session_report(log)
    first = report.phrases[0]
    # Phrase 1 typed in full: 22 keys over 21 x 0.5 s, WPM = 21 / 10.5 x 12 = 24.0, KSPC 1, no errors.
    assert first.complete and first.transcribed == "See you at the slipway"
    assert first.keystrokes == 22 and first.wpm == pytest.approx(24.0)
    assert first.errors.total_error_rate == 0.0
    assert report.session.phrases == 1
    result = run_cli("study", "report", log_path)
    assert result.code == 0 and "phrase 2 was cut short" in result.out


def _call(server: Server, method: str, path: str, body: bytes | None = None) -> tuple[int, dict]:
    request = urllib.request.Request(server.base + path, data=body, method=method, headers={"Content-Type": "application/json"})
    try:
        with urllib.request.urlopen(request, timeout=10) as answer:
            return answer.status, json.loads(answer.read())
    except urllib.error.HTTPError as error:
        return error.code, json.loads(error.read())


def test_study_endpoints_refuse_bad_input(server: Server) -> None:
    status, config = _call(server, "GET", "/api/study/config")
    assert status == 200 and config["phrases"] == 2 and config["phrase_source"] == "phrases.txt"
    # A profile name that would leave the profiles folder, and other bad starts.
    for body, code in (
        ({"profile": "../escape"}, "bad_profile_name"),
        ({"profile": "a/b"}, "bad_profile_name"),
        ({"profile": "p01", "k": 12}, "bad_k"),
        ({"profile": "p01", "colour": "red"}, "unknown_field"),
    ):
        status, answer = _call(server, "POST", "/api/study/sessions", json.dumps(body).encode())
        assert status == 422 and answer["error"]["code"] == code
    assert not (server.profiles.parent / "escape").exists()
    assert _call(server, "POST", "/api/study/sessions", b"{not json")[0] == 400
    status, started = _call(server, "POST", "/api/study/sessions", json.dumps({"profile": "p02", "k": 4}).encode())
    assert status == 201 and started["phrases"] == ["See you at the slipway", "The ferry is late"]
    events = f"/api/study/sessions/{started['session']}/events"
    good = {"t": 10, "kind": "phrase_start", "phrase": 0, "target": "See you at the slipway"}
    # One bad event refuses the whole batch: nothing of it is written.
    for bad in ({"t": 11, "kind": "shout"}, {"t": -1, "kind": "backspace", "text": ""}, {"t": 12, "kind": "key", "char": "ab", "text": "ab"}):
        status, answer = _call(server, "POST", events, json.dumps({"events": [good, bad]}).encode())
        assert status == 422 and answer["error"]["code"] == "bad_event"
    assert _call(server, "POST", "/api/study/sessions/nope/events", json.dumps({"events": [good]}).encode())[0] == 404
    assert _call(server, "POST", events, json.dumps({"events": [good]}).encode()) == (200, {"written": 1})
    (log_path,) = server.logs("p02")
    assert [json.loads(line)["kind"] for line in log_path.read_text(encoding="utf-8").splitlines()] == ["session_start", "phrase_start"]
    status, report = _call(server, "GET", f"/api/study/sessions/{started['session']}/report")
    assert status == 200 and report["cut_short"] == [0] and report["k"] == 4


def test_the_page_works_on_a_service_that_requires_its_token(browser, tmp_path: Path, model: Path) -> None:
    guarded = start_server(tmp_path, model, "--token", "s3cret-token")
    try:
        with urllib.request.urlopen(guarded.base + "/api/study/config", timeout=10) as answer:
            raise AssertionError(f"answered {answer.status} without the token")
    except urllib.error.HTTPError as error:
        assert error.code == 401
    try:
        context, page, errors = open_page(browser, guarded, "?k=2&token=s3cret-token&profile=p03")
        # The page, its stylesheet and script, its WebSocket and its log all passed the token check.
        assert page.locator("#rail .suggestion").count() == 2
        page.click("#start-study")
        settle(page)
        step(page, lambda: page.keyboard.press("S"))
        context.close()
        assert errors == []
        (log_path,) = guarded.logs("p03")
        assert [json.loads(line)["kind"] for line in log_path.read_text(encoding="utf-8").splitlines()][-1] in ("key", "list")
    finally:
        stop(guarded)


def test_a_space_right_after_a_taken_word_is_absorbed_as_in_the_pad(browser, server: Server) -> None:
    # The typing pad and the simulated typist absorb it (tests/tui/test_pad_typing.py); the page must count alike.
    context, page, errors = open_page(browser, server)
    page.click("#start-study")
    settle(page)
    step(page, lambda: page.click("#rail .suggestion:has-text('See')"))
    state = step(page, lambda: page.keyboard.press("Space"))
    assert state["text"] == "See " and tally(page) == ("3", "1", "66.7%", "1")
    state = step(page, lambda: page.click('.key[data-key=" "]'))  # a second space is typed as usual
    assert state["text"] == "See  " and tally(page) == ("3", "2", "33.3%", "1")
    context.close()
    assert errors == []


def test_words_typed_past_are_left_out_within_the_word_and_come_back_after_backspace(browser, server: Server) -> None:
    # The pad's and the simulated typist's default (tests/query/test_passed_over.py): a word shown and passed
    # over by typing the next letter is not offered again within that word.
    context, page, errors = open_page(browser, server)
    page.click("#start-study")
    start = settle(page)["suggestions"]
    assert "See" in start
    after_s = step(page, lambda: page.keyboard.press("s"))["suggestions"]
    assert after_s and not set(start) & set(after_s)
    after_se = step(page, lambda: page.keyboard.press("e"))["suggestions"]
    assert not (set(start) | set(after_s)) & set(after_se)
    again = step(page, lambda: page.keyboard.press("Backspace"))["suggestions"]
    assert "See" in again  # a backspace starts the word afresh: the plain top k for "s"
    context.close()
    assert errors == []
