"""Loopback load test of the prediction service: round trips over HTTP and WebSocket beside the engine's own time.

Run from the repository root::

    .venv/bin/python bench/bench_service.py                  # 4 sessions x 500 requests per channel
    .venv/bin/python bench/bench_service.py --sessions 8 --requests 250 --model chat.model

``foretype serve`` runs in its own process on a free loopback port.  Each
typing session types lines of the demo held-out text one character at a time
and asks for k = 5 suggestions after every keystroke with the whole text
before the cursor, waiting for each answer before the next keystroke (a
closed loop, so nothing queues inside one session and nothing is dropped).
Phases, one after another in one run:

1. **engine**: the same texts answered in this process by ``model.suggest_text``
   (the engine's own query time, no service);
2. **HTTP**: ``POST /api/suggest``, one keep-alive connection per session, with a
   minimal HTTP/1.1 client over asyncio streams (so the client's own cost stays small);
3. **WebSocket**: ``/api/session``, one socket per session (the ``websockets`` client);
4. the engine again, so a machine that changed speed during the run shows.

The server's CPU time per request (user + system, from psutil, over the
phase) is printed beside the engine's mean thread CPU time per query: on a
busy shared machine the round trip waits for the scheduler, and the CPU
figures show what the service itself spends.  Each channel is measured with 1 session (the service's own overhead) and with
``--sessions`` concurrent ones (throughput on a shared machine).  Every reply is
checked: an HTTP status other than 200, an error message, a dropped request or
a reply whose suggestions differ from the engine's own counts as an error, and
errors must be 0 (the script exits 1 otherwise).  The JSON goes to
bench/out/service-<time>.json and bench/out/service-latest.json.
"""

from __future__ import annotations

import argparse
import asyncio
import json
import re
import signal
import subprocess
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

import numpy as np
import psutil

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
sys.path.insert(0, str(HERE.parent))

from machine import describe, finish_facts, machine_facts  # noqa: E402

import foretype  # noqa: E402
from foretype.demo import demo_heldout, demo_model  # noqa: E402

OUT = HERE / "out"
K = 5
FORETYPE = [sys.executable, "-c", "import sys; from foretype.cli import main; sys.exit(main())"]
TARGET_ADDED_MS = 1.0


def keystroke_texts(sessions: int, requests: int) -> list[list[str]]:
    """For each session, ``requests`` texts before the cursor: held-out lines typed one character at a time."""
    lines = [line for line in demo_heldout().read_text(encoding="utf-8").splitlines() if line.strip()]
    texts: list[list[str]] = []
    position = 0
    for _ in range(sessions):
        mine: list[str] = []
        while len(mine) < requests:
            line = lines[position % len(lines)]
            position += 1
            mine.extend(line[: i + 1] for i in range(len(line)))
        texts.append(mine[:requests])
    return texts


def expected_words(model: Any, texts: list[list[str]]) -> dict[str, list[str]]:
    """The engine's own answer (words in order) for every text, to check each reply against."""
    return {text: [s.word for s in model.suggest_text(text, K)] for session in texts for text in session}


def engine_times(model: Any, texts: list[list[str]], cpu: list[int]) -> list[int]:
    """Wall nanoseconds of ``suggest_text`` for every text, in this process (thread CPU nanoseconds appended to ``cpu``)."""
    samples = []
    for session in texts:
        for text in session:
            started, started_cpu = time.perf_counter_ns(), time.thread_time_ns()
            model.suggest_text(text, K)
            samples.append(time.perf_counter_ns() - started)
            cpu.append(time.thread_time_ns() - started_cpu)
    return samples


# ------------------------------------------------------------------ HTTP
async def http_session(port: int, texts: list[str], expected: dict[str, list[str]], errors: list[str]) -> list[int]:
    """One keep-alive connection; one POST per keystroke; returns round-trip nanoseconds."""
    reader, writer = await asyncio.open_connection("127.0.0.1", port)
    samples = []
    head = f"POST /api/suggest HTTP/1.1\r\nHost: 127.0.0.1:{port}\r\nContent-Type: application/json\r\n"
    length_re = re.compile(rb"content-length: *(\d+)", re.IGNORECASE)
    try:
        for text in texts:
            body = json.dumps({"text": text, "k": K}).encode("utf-8")
            request = (head + f"Content-Length: {len(body)}\r\n\r\n").encode("latin-1") + body
            started = time.perf_counter_ns()
            writer.write(request)
            headers = await reader.readuntil(b"\r\n\r\n")
            length = int(length_re.search(headers).group(1))  # type: ignore[union-attr]
            payload = await reader.readexactly(length)
            samples.append(time.perf_counter_ns() - started)
            if not headers.startswith(b"HTTP/1.1 200"):
                errors.append(f"HTTP {headers[:40]!r}: {payload[:200]!r}")
            elif [s["word"] for s in json.loads(payload)["suggestions"]] != expected[text]:
                errors.append(f"HTTP answer differs from the engine's for {text!r}")
    finally:
        writer.close()
    return samples


# ------------------------------------------------------------- WebSocket
async def ws_session(port: int, texts: list[str], expected: dict[str, list[str]], errors: list[str]) -> list[int]:
    """One socket; one message per keystroke, each answered before the next; returns round-trip nanoseconds."""
    from websockets.asyncio.client import connect

    samples = []
    async with connect(f"ws://127.0.0.1:{port}/api/session?k={K}", compression=None) as ws:
        ready = json.loads(await ws.recv())
        if ready.get("type") != "ready":
            errors.append(f"session did not open: {ready}")
            return samples
        for seq, text in enumerate(texts, start=1):
            message = json.dumps({"seq": seq, "text": text})
            started = time.perf_counter_ns()
            await ws.send(message)
            reply = json.loads(await ws.recv())
            samples.append(time.perf_counter_ns() - started)
            if reply.get("type") != "suggestions" or reply.get("seq") != seq or reply.get("dropped"):
                errors.append(f"WebSocket reply {str(reply)[:200]}")
            elif [s["word"] for s in reply["suggestions"]] != expected[text]:
                errors.append(f"WebSocket answer differs from the engine's for {text!r}")
    return samples


async def load_phase(kind: str, port: int, texts: list[list[str]], expected: dict[str, list[str]]) -> dict[str, Any]:
    """All sessions at once over one channel; returns round trips, requests per second and errors."""
    errors: list[str] = []
    run = http_session if kind == "http" else ws_session
    started = time.perf_counter()
    results = await asyncio.gather(*(run(port, session, expected, errors) for session in texts), return_exceptions=True)
    seconds = time.perf_counter() - started
    samples: list[int] = []
    for result in results:
        if isinstance(result, BaseException):
            errors.append(f"{type(result).__name__}: {result}")
        else:
            samples.extend(result)
    return {"samples": samples, "seconds": seconds, "errors": errors}


def summary(samples: list[int], seconds: float | None = None) -> dict[str, Any]:
    """Median, p99 (ms) and count; requests per second when the phase's wall time is given."""
    array = np.asarray(samples, dtype=np.float64) / 1e6
    out: dict[str, Any] = {"requests": len(samples), "p50_ms": float(np.percentile(array, 50)) if len(array) else None, "p99_ms": float(np.percentile(array, 99)) if len(array) else None}
    if seconds is not None:
        out["requests_per_second"] = len(samples) / seconds if seconds > 0 else None
    return out


def start_service(model_path: str | None, profiles: Path) -> tuple[subprocess.Popen, int]:
    """``foretype serve`` on a free loopback port, in its own process."""
    command = [*FORETYPE, "serve", *(["-m", model_path] if model_path else []), "--port", "0", "--profiles", str(profiles)]
    process = subprocess.Popen(command, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    first = process.stdout.readline() if process.stdout else ""
    found = re.search(r"http://127\.0\.0\.1:(\d+)", first)
    if found is None:
        process.kill()
        raise SystemExit(f"the service did not start: {first!r} {process.stderr.read() if process.stderr else ''}")
    return process, int(found.group(1))


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--model", default=None, help="model file (default: the demo model)")
    parser.add_argument("--sessions", type=int, default=4, help="concurrent typing sessions (default 4)")
    parser.add_argument("--requests", type=int, default=500, help="requests per session and channel (default 500)")
    args = parser.parse_args(argv)

    results: dict[str, Any] = {"machine": machine_facts(), "settings": {"sessions": args.sessions, "requests_per_session": args.requests, "k": K, "model": args.model or "demo"}}
    model = foretype.load(args.model) if args.model else demo_model()
    texts = keystroke_texts(args.sessions, args.requests)
    expected = expected_words(model, texts)
    engine_cpu: list[int] = []
    engine_before = engine_times(model, texts, engine_cpu)
    phases: dict[str, Any] = {}
    with tempfile.TemporaryDirectory() as profiles:
        process, port = start_service(args.model, Path(profiles))
        server = psutil.Process(process.pid)
        try:
            for kind in ("http", "ws"):
                asyncio.run(load_phase(kind, port, texts[:1], expected))  # warm-up: connections, caches
                for label, sessions in (("1 session", texts[:1]), (f"{args.sessions} sessions", texts)):
                    cpu_before = sum(server.cpu_times()[:2])
                    phase = asyncio.run(load_phase(kind, port, sessions, expected))
                    cpu_ms = (sum(server.cpu_times()[:2]) - cpu_before) * 1e3 / max(1, len(phase["samples"]))
                    phases[f"{kind}, {label}"] = {**summary(phase["samples"], phase["seconds"]), "server_cpu_ms_per_request": cpu_ms, "errors": len(phase["errors"]), "first_errors": phase["errors"][:5]}
        finally:
            process.send_signal(signal.SIGTERM)
            code = process.wait(timeout=60)
    engine_after = engine_times(model, texts, engine_cpu)
    finish_facts(results["machine"])
    engine = summary(engine_before + engine_after)
    engine["cpu_mean_ms"] = float(np.mean(engine_cpu)) / 1e6
    results.update(engine=engine, engine_before=summary(engine_before), engine_after=summary(engine_after), phases=phases, service_exit_code=code)
    errors = sum(p["errors"] for p in phases.values())
    added = {name: p["p50_ms"] - engine["p50_ms"] for name, p in phases.items()}
    results.update(added_at_median_ms=added, errors=errors, target_added_ms=TARGET_ADDED_MS)

    print(describe(results["machine"]["yardstick_at_start"]))
    print(f"{'channel':<22} {'requests':>8} {'req/s':>8} {'p50 ms':>8} {'p99 ms':>8} {'+ over engine p50':>18} {'CPU ms/req':>10} {'errors':>6}")
    print(f"{'engine (in process)':<22} {engine['requests']:>8} {'':>8} {engine['p50_ms']:>8.3f} {engine['p99_ms']:>8.3f} {'':>18} {engine['cpu_mean_ms']:>10.3f} {'':>6}")
    for name, p in phases.items():
        print(f"{name:<22} {p['requests']:>8} {p['requests_per_second']:>8.0f} {p['p50_ms']:>8.3f} {p['p99_ms']:>8.3f} {added[name]:>17.3f}  {p['server_cpu_ms_per_request']:>10.3f} {p['errors']:>6}")
    print(f"engine p50 before / after the service phases: {results['engine_before']['p50_ms']:.3f} / {results['engine_after']['p50_ms']:.3f} ms; service exit code {code}")
    single = [added[name] for name in added if "1 session" in name]
    print(f"aim: the service adds at most {TARGET_ADDED_MS} ms at the median (1 session): {'met' if max(single) <= TARGET_ADDED_MS else 'missed'}")
    OUT.mkdir(exist_ok=True)
    stamp = time.strftime("%Y%m%d-%H%M%S")
    text = json.dumps(results, indent=2)
    (OUT / f"service-{stamp}.json").write_text(text, encoding="utf-8")
    (OUT / "service-latest.json").write_text(text, encoding="utf-8")
    if errors:
        for phase in phases.values():
            for line in phase["first_errors"]:
                print(f"error: {line}", file=sys.stderr)
        return 1
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
