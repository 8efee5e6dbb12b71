"""Fixtures for the typing pad's tests: a tiny fixed model and an app factory.

The model is a maximum-likelihood trigram model (REFERENCES.md, "Trigram model
(standard definition)": q(w | u, v) = c(u, v, w) / c(u, v)) over five invented
sentences, stored as float32 so probabilities are exact fractions.  Counts
worked out by hand from CORPUS:

* sentence starts: "the" 4 times, "tide" once: P(the | <s> <s>) = 4/5, P(tide | <s> <s>) = 1/5;
* after "<s> the": ferry 3, fare 1: P(ferry) = 3/4, P(fare) = 1/4;
* after "the ferry": leaves 2, is 1: P(leaves) = 2/3, P(is) = 1/3;
* after "ferry leaves": at 1, early 1: 1/2 each (ties listed by word ascending);
* an unseen context word backs off to the unigram c(w) / N, N = 27 words + 5 ends = 32.
"""

from __future__ import annotations

import asyncio
import inspect
import shutil
from collections.abc import Callable, Iterator
from pathlib import Path

import pytest

import foretype
from foretype.query.model import LanguageModel

CORPUS = """\
the ferry leaves at noon
the ferry is late today
the fare is paid on board
the ferry leaves early
tide tables are posted at the pier
"""
"""Five invented sentences (the demo scenario's ferry)."""

DATA = Path(__file__).resolve().parent / "data"
"""Fixture files: a text to replay and a sweep result."""

CLOCK_STEP_NS = 1500
"""Each reading of the fake clock is this much later than the last: every query takes 1.5 µs."""


@pytest.hookimpl(tryfirst=True)
def pytest_pyfunc_call(pyfuncitem: pytest.Function) -> bool | None:
    """Run ``async def`` tests in a fresh event loop (Pilot needs one; no asyncio plugin is installed)."""
    if not inspect.iscoroutinefunction(pyfuncitem.obj):
        return None
    arguments = {name: pyfuncitem.funcargs[name] for name in pyfuncitem._fixtureinfo.argnames}
    asyncio.run(pyfuncitem.obj(**arguments))
    return True


class FakeClock:
    """A nanosecond clock that advances a fixed step at every reading."""

    def __init__(self, step: int = CLOCK_STEP_NS) -> None:
        self.now = 0
        self.step = step

    def __call__(self) -> int:
        self.now += self.step
        return self.now


@pytest.fixture(scope="session")
def tiny_corpus(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """CORPUS written to a file."""
    path = tmp_path_factory.mktemp("tiny") / "corpus.txt"
    path.write_text(CORPUS, encoding="utf-8")
    return path


@pytest.fixture(scope="session")
def tiny_model(tiny_corpus: Path) -> LanguageModel:
    """The maximum-likelihood model of CORPUS, in memory."""
    return foretype.build([tiny_corpus], method="mle", encoding="float32")


@pytest.fixture(scope="session")
def tiny_model_file(tiny_model: LanguageModel, tmp_path_factory: pytest.TempPathFactory) -> Path:
    """The tiny model saved to a file."""
    path = tmp_path_factory.mktemp("models") / "tiny.model"
    tiny_model.save(path)
    return path


@pytest.fixture
def model_copy(tiny_model_file: Path, tmp_path: Path) -> LanguageModel:
    """The tiny model copied into this test's tmp folder and loaded: its learned file goes beside the copy."""
    copy = tmp_path / "tiny.model"
    shutil.copy(tiny_model_file, copy)
    return foretype.load(copy)


@pytest.fixture
def in_data_folder(monkeypatch: pytest.MonkeyPatch) -> Path:
    """Run in the fixture folder, so file trees and relative paths are the same on every machine."""
    monkeypatch.chdir(DATA)
    return DATA


@pytest.fixture
def make_app(tiny_model: LanguageModel, in_data_folder: Path) -> Iterator[Callable[..., object]]:
    """Return ``make(**options)``: a PadApp on the tiny model with a fake clock and no blinking."""
    from foretype.tui.app import PadApp

    def make(**options: object) -> PadApp:
        settings: dict[str, object] = {"clock": FakeClock(), "cursor_blink": False, "folder": Path(".")}
        settings.update(options)
        model = settings.pop("model", tiny_model)
        return PadApp(model, **settings)  # type: ignore[arg-type]

    yield make
