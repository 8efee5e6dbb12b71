"""Fixtures shared by the whole suite (keep this file small and general)."""

from __future__ import annotations

import os
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

import pytest


@pytest.fixture(scope="session", autouse=True)
def isolated_demo_cache(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """Point the demo-model cache at a temporary folder, so tests never touch the user's cache."""
    folder = tmp_path_factory.mktemp("foretype-cache")
    previous = os.environ.get("FORETYPE_CACHE")
    os.environ["FORETYPE_CACHE"] = str(folder)
    yield folder
    if previous is None:
        os.environ.pop("FORETYPE_CACHE", None)
    else:
        os.environ["FORETYPE_CACHE"] = previous


@pytest.fixture
def write_file(tmp_path: Path) -> Callable[..., Path]:
    """Return ``write(content, name="corpus.txt")``: writes text (UTF-8) or bytes under tmp_path."""

    def write(content: str | bytes, name: str = "corpus.txt") -> Path:
        path = tmp_path / name
        path.parent.mkdir(parents=True, exist_ok=True)
        if isinstance(content, bytes):
            path.write_bytes(content)
        else:
            path.write_text(content, encoding="utf-8")
        return path

    return write


@dataclass
class CliResult:
    """What one in-process run of the command line produced."""

    code: int
    out: str
    err: str


@pytest.fixture
def run_cli(capsys: pytest.CaptureFixture[str]) -> Callable[..., CliResult]:
    """Return ``run(*args)``: runs ``foretype.cli.main`` in-process; returns its exit code and output."""
    from foretype.cli import main

    def run(*args: str | os.PathLike[str]) -> CliResult:
        capsys.readouterr()
        try:
            code = main([str(a) for a in args])
        except SystemExit as stop:  # argparse usage errors and --help exit this way
            code = stop.code if isinstance(stop.code, int) else 1
        captured = capsys.readouterr()
        return CliResult(code, captured.out, captured.err)

    return run
