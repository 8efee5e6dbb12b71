"""Without the compiled core every command still works, on the numpy path, with the same answers.

A child process runs the command line with the extension made unavailable (its
module name is blocked, as if the install had found no compiler); its outputs
must equal this process's outputs (reference: the same commands on the default
path), apart from the facts that name the path.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

import foretype
from foretype.query import compiled

DATA = Path(__file__).parents[1] / "data" / "savings"

CHILD = """
import contextlib, io, json, sys
sys.modules["foretype.query._core"] = None  # blocked: importing it now fails
from foretype.cli import main
from foretype.query import compiled
assert not compiled.compiled_available()
results = []
for args in json.loads(sys.argv[1]):
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        try:
            code = main(args)
        except SystemExit as stop:
            code = stop.code
    results.append([code, out.getvalue(), err.getvalue()])
print(json.dumps(results))
"""

PATH_FACTS = ("query_path", "query_path_note")
TIMES = ("latency_us", "seconds", "elapsed_seconds")


def without(value, keys):
    """A JSON value with the named keys dropped at every depth."""
    if isinstance(value, dict):
        return {k: without(v, keys) for k, v in value.items() if k not in keys}
    if isinstance(value, list):
        return [without(v, keys) for v in value]
    return value


def commands(folder: Path, tag: str) -> list[list[str]]:
    model = folder / f"{tag}.model"
    corpus, text = DATA / "worked-corpus.txt", DATA / "worked-text.txt"
    return [
        ["build", str(corpus), "-o", str(model)],
        ["info", "-m", str(model), "--json"],
        ["check", "-m", str(model), "--json"],
        ["suggest", "-m", str(model), "the ", "--json"],
        ["suggest", "-m", str(model), "the f", "-k", "3", "--json"],
        ["score", "-m", str(model), "-t", str(text), "--json"],
        ["savings", "-m", str(model), "-t", str(text), "--json"],
        ["sweep", str(corpus), "--test", str(text), "--vocab-sizes", "5,10", "-o", str(folder / f"{tag}-sweep")],
        ["learned", "show", "-m", str(model)],
        ["--version"],
    ]


@pytest.mark.skipif(not compiled.compiled_available(), reason="the compiled core is not built here, so every run is already on the numpy path")
def test_every_command_works_on_the_numpy_path_when_the_extension_is_missing(tmp_path, run_cli):
    child = subprocess.run(
        [sys.executable, "-c", CHILD, json.dumps(commands(tmp_path, "numpy"))], capture_output=True, text=True, timeout=600, cwd=tmp_path
    )
    assert child.returncode == 0, child.stderr
    fallback = json.loads(child.stdout)
    reference = [run_cli(*args) for args in commands(tmp_path, "compiled")]
    for args, (code, out, err), mine in zip(commands(tmp_path, "numpy"), fallback, reference):
        assert code == 0 == mine.code, (args, err)
        assert "Traceback" not in err
        if "--json" in args:
            theirs, ours = json.loads(out.replace("numpy.model", "compiled.model")), json.loads(mine.out)
            if args[0] == "info":
                assert theirs["query_path"] == "numpy" and ours["query_path"] == "compiled"
            assert without(theirs, PATH_FACTS + TIMES) == without(ours, PATH_FACTS + TIMES), args
    assert "numpy" in fallback[-1][1] and "compiled" in reference[-1].out
    loaded = foretype.load(tmp_path / "numpy.model")
    assert loaded.query_path == "compiled"  # the file itself is the same on either path
    assert (tmp_path / "numpy.model").read_bytes() == (tmp_path / "compiled.model").read_bytes()


def test_the_numpy_path_can_be_forced_by_the_environment(monkeypatch, tmp_path):
    corpus = DATA / "worked-corpus.txt"
    monkeypatch.setenv(compiled.PURE_ENV, "1")
    model = foretype.build([corpus])
    assert model.query_path == "numpy" and model.info()["query_path"] == "numpy"
    assert compiled.PURE_ENV in model.info()["query_path_note"] or not compiled.compiled_available()
    monkeypatch.setenv(compiled.PURE_ENV, "0")
    assert foretype.build([corpus]).query_path == compiled.default_path()
