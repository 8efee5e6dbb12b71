"""The engine never loads the interface.

Common practice for a library with an optional interface: importing the
engine, or running any command other than the typing pad, must not import
Textual or the pad (``foretype.tui``) (checked in a fresh interpreter, where
sys.modules shows exactly what was loaded).
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import foretype

PROBE = """
import json, sys
{body}
loaded = sorted(m for m in sys.modules if m.split(".")[0] == "textual" or m == "foretype.tui" or m.startswith("foretype.tui."))
print(json.dumps(loaded))
"""


def loaded_interface_modules(body: str) -> list[str]:
    done = subprocess.run([sys.executable, "-c", PROBE.format(body=body)], capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, done.stderr
    return json.loads(done.stdout.strip().splitlines()[-1])


def test_importing_the_engine_loads_neither_textual_nor_tui():
    assert loaded_interface_modules("import foretype, foretype.cli") == []


def test_running_engine_commands_loads_neither_textual_nor_tui(tmp_path: Path):
    corpus = tmp_path / "corpus.txt"
    corpus.write_text("In the beginning God created the heaven and the earth.\nAnd the earth was without form.\n", encoding="utf-8")
    model = tmp_path / "tiny.model"
    body = f"""
from foretype.cli import main
import contextlib, io
with contextlib.redirect_stdout(io.StringIO()):
    for args in (["build", {str(corpus)!r}, "-o", {str(model)!r}], ["suggest", "-m", {str(model)!r}, "and the "],
                 ["score", "-m", {str(model)!r}, "-t", {str(corpus)!r}], ["info", "-m", {str(model)!r}], ["check", "-m", {str(model)!r}]):
        assert main(args) == 0, args
"""
    assert loaded_interface_modules(body) == []
    assert foretype.load(model).vocab_size > 0


def test_the_probe_would_see_textual_if_it_were_imported():
    # Guards the check itself: the same probe reports textual once something imports it.
    assert "textual" in loaded_interface_modules("import textual")
