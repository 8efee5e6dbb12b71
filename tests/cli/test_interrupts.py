"""Ctrl-C during a build that uses the tokenising workers: one line, exit 130, nothing left behind.

A terminal sends SIGINT to the whole foreground process group, so the test does
the same (killpg).  Exit status 128 + signal number for a command stopped by a
signal is shell convention (POSIX sh, "Exit Status"); 130 = 128 + SIGINT (2).
"""

from __future__ import annotations

import os
import random
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

DEMO = Path(__file__).resolve().parents[2] / "demo_vocab" / "corpus.txt"


def _group(pid: int) -> list[str]:
    found = subprocess.run(["pgrep", "-g", str(pid)], capture_output=True, text=True).stdout.split()
    return [p for p in found if p != str(pid)]


def _wait_for_workers(process: subprocess.Popen[bytes], deadline: float) -> bool:
    """Wait until the build has forked its workers (its imports are then done); False if it ended first."""
    while time.monotonic() < deadline and process.poll() is None:
        if _group(process.pid):
            return True
        time.sleep(0.02)
    return False


@pytest.mark.skipif(not hasattr(os, "killpg") or sys.platform != "linux", reason="process groups and pgrep: Linux")
def test_sigint_at_random_moments_of_a_parallel_build(tmp_path: Path) -> None:
    corpus = tmp_path / "corpus.txt"
    corpus.write_text(DEMO.read_text(encoding="utf-8") * 2, encoding="utf-8")  # long enough that most signals land mid-build
    out = tmp_path / "out" / "m.model"
    out.parent.mkdir()
    # the workers are used from 1,000 bytes on, instead of 16 MB
    env = dict(os.environ, FORETYPE_PARALLEL_MIN_BYTES="1000")
    command = [sys.executable, "-m", "foretype", "build", str(corpus), "-o", str(out)]
    subprocess.run(command, env=env, check=True, capture_output=True)
    before = out.read_bytes()
    rng = random.Random(11)
    interrupted = 0
    for _ in range(4):
        process = subprocess.Popen(command, env=env, stdout=subprocess.PIPE, stderr=subprocess.PIPE, start_new_session=True)
        if _wait_for_workers(process, time.monotonic() + 30):
            time.sleep(rng.uniform(0.0, 0.4))
            try:
                os.killpg(process.pid, signal.SIGINT)
            except ProcessLookupError:
                pass
        _, err = process.communicate(timeout=60)
        if process.returncode == 130:
            interrupted += 1
            assert err.decode() == "foretype: interrupted\n"
        elif process.returncode == -signal.SIGINT:
            # The build had finished and the interpreter was shutting down, when Python no longer
            # handles SIGINT and the system's default action ends it: nothing is printed, and the
            # finished model is checked below like any other.
            assert err.decode() == ""
        else:
            assert process.returncode == 0, err.decode()  # finished before the signal
        time.sleep(0.1)
        assert _group(process.pid) == []  # no worker outlives the build
        assert sorted(p.name for p in out.parent.iterdir()) == ["m.model"]  # no temporary file left
        assert out.read_bytes() == before  # the same corpus builds the same model; an interrupted build keeps it
    assert interrupted >= 2


WORKED = Path(__file__).resolve().parents[1] / "data" / "savings"


def test_sigint_while_the_command_line_starts_is_one_line_and_exit_130(tmp_path: Path) -> None:
    """Ctrl-C while the engine's modules load or the model opens: the same one line as at any later moment."""
    model = tmp_path / "m.model"
    subprocess.run([sys.executable, "-m", "foretype", "build", str(WORKED / "worked-corpus.txt"), "-o", str(model)], check=True, capture_output=True)
    # The console script's own lines, with a mark once the interpreter runs them: what comes before
    # (the interpreter starting, Python finding the package) is no code of ours.
    script = "import sys\nprint('started', flush=True)\nfrom foretype.cli import main\nsys.exit(main())\n"
    command = [sys.executable, "-c", script, "score", "-m", str(model), "-t", str(WORKED / "worked-text.txt")]
    started = time.monotonic()
    subprocess.run(command, check=True, capture_output=True)
    whole = time.monotonic() - started
    rng = random.Random(7)
    codes = []
    for _ in range(8):
        process = subprocess.Popen(command, stdout=subprocess.PIPE, stderr=subprocess.PIPE)
        assert process.stdout is not None and process.stdout.readline() == b"started\n"
        time.sleep(rng.uniform(0.1, 0.8 * whole))  # past Python's search for the package, before the command ends
        process.send_signal(signal.SIGINT)
        out, err = process.communicate(timeout=60)
        codes.append(process.returncode)
        if process.returncode == 130:
            assert err.decode() == "foretype: interrupted\n" and out == b""
        elif process.returncode == -signal.SIGINT:
            assert err.decode() == ""  # the interpreter was already shutting down (see the test above)
        else:
            assert process.returncode == 0, err.decode()
    assert codes.count(130) >= 4, codes
