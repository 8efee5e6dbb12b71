"""The installed package claims one name, lists every package folder, and has one version.

Common practice for Python distributions: a project installs under one
top-level import name, so it cannot collide with another installed package.
"""

from __future__ import annotations

import importlib.metadata
from pathlib import Path

import tomllib

import foretype
import foretype.version

ROOT = Path(__file__).resolve().parent.parent
FOLDERS = {"foretype": "predictor", "foretype.tui": "tui", "foretype.demo_vocab": "demo_vocab"}


def pyproject() -> dict:
    return tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))


def package_folders() -> set[str]:
    found = set()
    for name, folder in FOLDERS.items():
        root = ROOT / folder
        for init in root.rglob("__init__.py"):
            if "__pycache__" in init.parts:
                continue
            relative = init.parent.relative_to(root).parts
            found.add(".".join([name, *relative]))
    return found


def test_every_package_folder_is_installed_and_nothing_else():
    listed = set(pyproject()["tool"]["setuptools"]["packages"])
    assert listed == package_folders()


def test_everything_installs_under_one_top_level_name():
    setuptools = pyproject()["tool"]["setuptools"]
    assert {name.split(".")[0] for name in setuptools["packages"]} == {"foretype"}
    assert setuptools["package-dir"] == FOLDERS


def test_the_version_has_one_source():
    assert pyproject()["tool"]["setuptools"]["dynamic"]["version"] == {"attr": "foretype.version.__version__"}
    assert importlib.metadata.version("foretype") == foretype.version.__version__


def test_the_engine_is_the_documented_entry_point():
    assert callable(foretype.build) and callable(foretype.load)
