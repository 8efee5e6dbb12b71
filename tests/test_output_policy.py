"""Every option that writes a file follows one policy (foretype.outputs).

The expectations are common practice for Unix tools (POSIX rename semantics,
umask-governed creation modes, ``-`` for standard output): an output that is an
input is refused before any work; devices and FIFOs are written into; links are
followed and stay links; a file of another kind is replaced only with --force;
new files get 0666 & ~umask and replaced files keep their mode.
"""

from __future__ import annotations

import json
import os
import stat
import threading
from pathlib import Path

import pytest

import foretype
from foretype.outputs import check_output, write_text_output

DATA = Path(__file__).resolve().parent / "data" / "savings"
CORPUS = DATA / "worked-corpus.txt"
TEXT = DATA / "worked-text.txt"


@pytest.fixture
def model(run_cli, tmp_path: Path) -> Path:
    path = tmp_path / "good.model"
    assert run_cli("build", CORPUS, "-o", path).code == 0
    return path


def _one_line(err: str) -> str:
    lines = err.strip().splitlines()
    assert len(lines) == 1, err
    return lines[0]


# ------------------------------------------------------------ outputs that are inputs
def test_trace_onto_the_model_is_refused_and_the_model_kept(run_cli, model: Path) -> None:
    before = model.read_bytes()
    result = run_cli("savings", "-m", model, "-t", TEXT, "--trace", model)
    assert result.code == foretype.OutputError.exit_code
    assert "is also an input" in _one_line(result.err)
    assert model.read_bytes() == before


def test_trace_onto_the_test_text_is_refused(run_cli, model: Path, tmp_path: Path) -> None:
    text = tmp_path / "small.txt"
    text.write_text(TEXT.read_text(encoding="utf-8"), encoding="utf-8")
    result = run_cli("savings", "-m", model, "-t", text, "--trace", text)
    assert result.code == foretype.OutputError.exit_code and "is also an input" in result.err
    assert text.read_text(encoding="utf-8") == TEXT.read_text(encoding="utf-8")


def test_build_onto_its_own_corpus_is_refused(run_cli, tmp_path: Path) -> None:
    corpus = tmp_path / "c.txt"
    corpus.write_text(CORPUS.read_text(encoding="utf-8"), encoding="utf-8")
    result = run_cli("build", corpus, "-o", corpus, "--force")
    assert result.code == foretype.OutputError.exit_code and "is also an input" in _one_line(result.err)
    assert corpus.read_text(encoding="utf-8") == CORPUS.read_text(encoding="utf-8")


def test_an_input_reached_through_a_link_is_still_an_input(run_cli, model: Path, tmp_path: Path) -> None:
    link = tmp_path / "alias.jsonl"
    link.symlink_to(model)
    result = run_cli("savings", "-m", model, "-t", TEXT, "--trace", link)
    assert result.code == foretype.OutputError.exit_code and "is also an input" in result.err
    assert link.is_symlink()


# ------------------------------------------------------------ files of another kind
def test_trace_does_not_replace_another_kind_of_file_without_force(run_cli, model: Path, tmp_path: Path) -> None:
    notes = tmp_path / "notes.txt"
    notes.write_text("my notes\n", encoding="utf-8")
    result = run_cli("savings", "-m", model, "-t", TEXT, "--trace", notes)
    assert result.code == foretype.OutputError.exit_code
    assert "--force" in _one_line(result.err) and "not a trace" in result.err
    assert notes.read_text(encoding="utf-8") == "my notes\n"
    assert run_cli("savings", "-m", model, "-t", TEXT, "--trace", notes, "--force").code == 0
    assert json.loads(notes.read_text(encoding="utf-8").splitlines()[0])["word"]


def test_a_trace_replaces_a_trace(run_cli, model: Path, tmp_path: Path) -> None:
    trace = tmp_path / "words.jsonl"
    assert run_cli("savings", "-m", model, "-t", TEXT, "--trace", trace).code == 0
    first = trace.read_text(encoding="utf-8")
    assert run_cli("savings", "-m", model, "-t", TEXT, "--trace", trace, "-k", "1").code == 0
    assert trace.read_text(encoding="utf-8") != first


def test_build_replaces_a_model_but_not_a_text_file(run_cli, model: Path, tmp_path: Path) -> None:
    assert run_cli("build", CORPUS, "-o", model, "--vocab-size", "5").code == 0
    notes = tmp_path / "notes.txt"
    notes.write_text("keep me\n", encoding="utf-8")
    result = run_cli("build", CORPUS, "-o", notes)
    assert result.code == foretype.OutputError.exit_code and "--force" in _one_line(result.err)
    assert notes.read_text(encoding="utf-8") == "keep me\n"
    assert run_cli("build", CORPUS, "-o", notes, "--force").code == 0
    assert foretype.load(notes).info()["vocab_size"] > 0


def test_learned_export_does_not_replace_another_file(run_cli, model: Path, tmp_path: Path) -> None:
    other = tmp_path / "other.json"
    other.write_text('{"mine": 1}\n', encoding="utf-8")
    result = run_cli("learned", "export", "-m", model, "-o", other)
    assert result.code == foretype.OutputError.exit_code and "--force" in _one_line(result.err)
    assert other.read_text(encoding="utf-8") == '{"mine": 1}\n'
    export = tmp_path / "export.json"
    assert run_cli("learned", "export", "-m", model, "-o", export).code == 0
    assert run_cli("learned", "export", "-m", model, "-o", export).code == 0  # an export replaces an export
    assert not list(tmp_path.glob("*.lock"))


def test_save_user_refuses_another_file_and_leaves_no_lock(run_cli, model: Path, tmp_path: Path) -> None:
    other = tmp_path / "keep.txt"
    other.write_text("keep\n", encoding="utf-8")
    result = run_cli("savings", "-m", model, "-t", TEXT, "--adapt", "--save-user", other)
    assert result.code == foretype.OutputError.exit_code and "--force" in _one_line(result.err)
    assert other.read_text(encoding="utf-8") == "keep\n"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["good.model", "keep.txt"]


# ------------------------------------------------------------ -, links, FIFOs, modes
def test_dash_is_standard_output_for_a_trace(run_cli, model: Path, tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(tmp_path)
    result = run_cli("savings", "-m", model, "-t", TEXT, "--trace", "-")
    assert result.code == 0
    assert not (tmp_path / "-").exists()
    lines = result.out.splitlines()
    assert lines and all(json.loads(line)["word"] for line in lines)  # stdout holds the trace alone
    assert "keystroke" in result.err.lower()  # the report moved to stderr


def test_dash_is_standard_output_for_a_model(tmp_path: Path, model: Path) -> None:
    import subprocess
    import sys

    out = tmp_path / "piped.model"
    with out.open("wb") as sink:
        done = subprocess.run([sys.executable, "-m", "foretype", "build", str(CORPUS), "-o", "-"], stdout=sink, stderr=subprocess.PIPE, cwd=tmp_path)
    assert done.returncode == 0, done.stderr
    assert foretype.load(out).info()["vocab_size"] == foretype.load(model).info()["vocab_size"]
    assert not (tmp_path / "-").exists()


def test_a_symlinked_output_stays_a_link_and_its_target_is_written(run_cli, model: Path, tmp_path: Path) -> None:
    target = tmp_path / "real.jsonl"
    link = tmp_path / "link.jsonl"
    link.symlink_to(target)
    assert run_cli("savings", "-m", model, "-t", TEXT, "--trace", link).code == 0
    assert link.is_symlink() and os.readlink(link) == str(target)
    assert json.loads(target.read_text(encoding="utf-8").splitlines()[0])["word"]


def test_a_fifo_is_written_into_not_replaced(model: Path, tmp_path: Path, run_cli) -> None:
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    received: list[bytes] = []
    reader = threading.Thread(target=lambda: received.append(fifo.read_bytes()))
    reader.start()
    result = run_cli("savings", "-m", model, "-t", TEXT, "--trace", fifo)
    reader.join(timeout=30)
    assert result.code == 0, result.err
    assert stat.S_ISFIFO(fifo.lstat().st_mode)
    assert json.loads(received[0].decode("utf-8").splitlines()[0])["word"]


def test_new_files_follow_the_umask_and_replaced_files_keep_their_mode(tmp_path: Path) -> None:
    old = os.umask(0o027)
    try:
        fresh = tmp_path / "fresh.txt"
        write_text_output(fresh, "a\n")
        assert stat.S_IMODE(fresh.stat().st_mode) == 0o640  # 0666 & ~0027, POSIX creat() semantics
    finally:
        os.umask(old)
    kept = tmp_path / "kept.txt"
    kept.write_text("x\n", encoding="utf-8")
    kept.chmod(0o600)
    write_text_output(kept, "y\n")
    assert stat.S_IMODE(kept.stat().st_mode) == 0o600 and kept.read_text(encoding="utf-8") == "y\n"


def test_a_model_gets_umask_permissions(run_cli, tmp_path: Path) -> None:
    old = os.umask(0o022)
    try:
        out = tmp_path / "m.model"
        assert run_cli("build", CORPUS, "-o", out).code == 0
    finally:
        os.umask(old)
    assert stat.S_IMODE(out.stat().st_mode) == 0o644


def test_check_output_refuses_a_folder_and_a_missing_folder(tmp_path: Path) -> None:
    with pytest.raises(foretype.OutputError, match="is a folder"):
        check_output(tmp_path)
    with pytest.raises(foretype.OutputError, match="does not exist"):
        check_output(tmp_path / "nowhere" / "x.txt")
    check_output("-")


# ------------------------------------------------------------ the sweep's folder
def test_sweep_refuses_a_folder_whose_parent_is_missing(run_cli, tmp_path: Path) -> None:
    out = tmp_path / "missing" / "deeper" / "out"
    result = run_cli("sweep", CORPUS, "--test", TEXT, "--vocab-sizes", "5", "-o", out)
    assert result.code == foretype.OutputError.exit_code and "does not exist" in _one_line(result.err)
    assert not (tmp_path / "missing").exists()


def test_sweep_refuses_a_folder_of_other_files_and_its_own_inputs(run_cli, tmp_path: Path) -> None:
    busy = tmp_path / "busy"
    busy.mkdir()
    (busy / "thesis.txt").write_text("mine\n", encoding="utf-8")
    result = run_cli("sweep", CORPUS, "--test", TEXT, "--vocab-sizes", "5", "-o", busy)
    assert result.code == foretype.OutputError.exit_code and "--force" in _one_line(result.err)
    assert sorted(p.name for p in busy.iterdir()) == ["thesis.txt"]
    result = run_cli("sweep", busy, "--test", TEXT, "--vocab-sizes", "5", "-o", busy)
    assert result.code == foretype.OutputError.exit_code and "is also an input" in result.err


def test_sweep_rewrites_its_own_earlier_folder(run_cli, tmp_path: Path) -> None:
    out = tmp_path / "out"
    assert run_cli("sweep", CORPUS, "--test", TEXT, "--vocab-sizes", "5,5", "-o", out).code == 0
    assert run_cli("sweep", CORPUS, "--test", TEXT, "--vocab-sizes", "4", "-o", out).code == 0
    assert json.loads((out / "sweep.json").read_text(encoding="utf-8"))["rows"][0]["vocab_size"] == 4


# ------------------------------------------------------------ the pad's save dialog
def test_the_pads_save_writes_into_a_fifo_and_never_replaces_a_file(tmp_path: Path) -> None:
    from foretype.tui.files import save_new_text

    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    received: list[bytes] = []
    reader = threading.Thread(target=lambda: received.append(fifo.read_bytes()))
    reader.start()
    save_new_text(fifo, "ferry at noon\n")
    reader.join(timeout=30)
    assert received == [b"ferry at noon\n"] and stat.S_ISFIFO(fifo.lstat().st_mode)
    kept = tmp_path / "kept.txt"
    kept.write_text("mine\n", encoding="utf-8")
    with pytest.raises(foretype.OutputError, match="already exists"):
        save_new_text(kept, "other\n")
    assert kept.read_text(encoding="utf-8") == "mine\n"
    old = os.umask(0o022)
    try:
        fresh = save_new_text(tmp_path / "new.txt", "x\n")
    finally:
        os.umask(old)
    assert stat.S_IMODE(fresh.stat().st_mode) == 0o644  # 0666 & ~022, common practice


def _lock_files(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if p.name.endswith(".lock"))


def test_a_learned_files_lock_goes_when_its_writer_is_done(run_cli, model: Path, tmp_path: Path) -> None:
    for change in (["block", "dam*"], ["forget", "ferry"], ["off"], ["on"]):
        assert run_cli("learned", change[0], "-m", model, *change[1:]).code == 0
        assert _lock_files(tmp_path) == [] and Path(f"{model}.learned").is_file()
    after = tmp_path / "after.learned"
    assert run_cli("savings", "-m", model, "-t", TEXT, "--adapt", "--save-user", after).code == 0
    assert after.is_file() and _lock_files(tmp_path) == []


@pytest.mark.parametrize("action", [["show"], ["block", "dam*"], ["wipe"]])
def test_no_lock_file_beside_a_refused_learned_path_and_nothing_of_it_touched(run_cli, model: Path, tmp_path: Path, action: list[str]) -> None:
    notes = tmp_path / "notes.txt"
    notes.write_text("my own notes\n", encoding="utf-8")
    result = run_cli("learned", action[0], "-m", model, "--user", notes, *action[1:])
    assert result.code == foretype.ModelFileError.exit_code and _one_line(result.err) == f"foretype: {notes}: not a foretype learned file"
    assert notes.read_text(encoding="utf-8") == "my own notes\n" and _lock_files(tmp_path) == []


def test_a_learned_file_cannot_go_to_standard_output_and_leaves_nothing_named_dash(run_cli, model: Path, tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(tmp_path)
    before = sorted(p.name for p in tmp_path.iterdir())
    saved = run_cli("savings", "-m", model, "-t", TEXT, "--adapt", "--save-user", "-")
    assert saved.code == foretype.OptionError.exit_code and "cannot be '-'" in _one_line(saved.err)
    kept = run_cli("learned", "block", "-m", model, "--user", "-", "dam*")
    assert kept.code == foretype.OptionError.exit_code and "cannot be '-'" in _one_line(kept.err)
    assert sorted(p.name for p in tmp_path.iterdir()) == before


def test_a_learned_export_to_dash_goes_to_standard_output(run_cli, model: Path, tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(tmp_path)
    assert run_cli("learned", "block", "-m", model, "dam*").code == 0
    result = run_cli("learned", "export", "-m", model, "-o", "-")
    assert result.code == 0 and json.loads(result.out)["never_suggest"] == ["dam*"]
    assert "exported to standard output" in result.err and not (tmp_path / "-").exists()


def test_a_second_writer_is_refused_while_the_first_holds_the_lock(run_cli, model: Path, tmp_path: Path) -> None:
    from foretype.adapt.store import LearnedFile

    with LearnedFile(Path(f"{model}.learned"), foretype.load(model)):
        refused = run_cli("learned", "block", "-m", model, "dam*")
        assert refused.code == foretype.OutputError.exit_code and "in use by another foretype process" in _one_line(refused.err)
        assert _lock_files(tmp_path) == [f"{model.name}.learned.lock"]  # the holder's lock stays while it writes
    assert _lock_files(tmp_path) == []
    assert run_cli("learned", "block", "-m", model, "dam*").code == 0 and _lock_files(tmp_path) == []
