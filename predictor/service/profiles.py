"""Profiles: names mapped to folders inside one profiles folder, each holding learned stores.

A profile's learned store for model ``M`` is ``PROFILES/NAME/M.learned``.  A
name is a plain word (letters, digits, '-', '_'), so it cannot hold a path
separator, '..' or a leading dot, and the resolved folder is checked to lie
directly inside the profiles folder (a symbolic link pointing elsewhere is
refused).  Stores are opened through the public API of :mod:`predictor.adapt`
on first use, held (one writer at a time) until :meth:`Profiles.close_all`,
and used by one thread at a time.
"""

from __future__ import annotations

import re
import threading
from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import dataclass, field
from pathlib import Path

from ..adapt import LearnedFile
from ..errors import ModelFileError, OutputError
from .catalogue import ServedModel
from .problems import ApiError

PROFILE_NAME_RE = re.compile(r"[A-Za-z0-9][A-Za-z0-9_-]{0,63}")
"""A profile's name: letters, digits, '_' and '-', starting with a letter or digit, at most 64."""
SUFFIX = ".learned"


@dataclass
class _Store:
    learned: LearnedFile
    lock: threading.Lock = field(default_factory=threading.Lock)


class Profiles:
    """The profiles folder and the learned stores the service has open."""

    def __init__(self, folder: Path) -> None:
        """Args:
        folder: the profiles folder (created when the first profile is).
        """
        self.folder = Path(folder)
        self._stores: dict[tuple[str, str], _Store] = {}
        self._opening = threading.Lock()
        self._closed = False

    # ------------------------------------------------------------ names
    def folder_of(self, name: str) -> Path:
        """The folder of a profile name, checked to be a plain name inside the profiles folder.

        Raises:
            ApiError: 422 ``bad_profile_name``.
        """
        if not isinstance(name, str) or not PROFILE_NAME_RE.fullmatch(name):
            raise ApiError(422, "bad_profile_name", f"profile name {name!r}: use 1 to 64 letters, digits, '-' and '_', starting with a letter or digit")
        home = self.folder.resolve()
        path = (home / name).resolve()
        if path.parent != home:
            raise ApiError(422, "bad_profile_name", f"profile {name!r} points outside the profiles folder")
        return path

    def names(self) -> list[str]:
        """Every profile in the profiles folder, sorted."""
        try:
            entries = list(self.folder.iterdir())
        except OSError:
            return []
        found = []
        for entry in entries:
            if PROFILE_NAME_RE.fullmatch(entry.name) and entry.is_dir():
                try:
                    self.folder_of(entry.name)
                except ApiError:
                    continue
                found.append(entry.name)
        return sorted(found)

    def create(self, name: str) -> bool:
        """Create a profile's folder; returns False if it existed.

        Raises:
            ApiError: a bad name (422), or the folder cannot be made (409 ``profile_unavailable``).
        """
        path = self.folder_of(name)
        if path.is_dir():
            return False
        try:
            self.folder.mkdir(parents=True, exist_ok=True)
            path.mkdir(exist_ok=False)
        except FileExistsError:
            return False
        except OSError as error:
            raise ApiError(409, "profile_unavailable", f"cannot create profile {name!r} ({error.strerror or error})") from None
        return True

    def require(self, name: str) -> Path:
        """The folder of an existing profile.

        Raises:
            ApiError: a bad name (422) or no such profile (404 ``unknown_profile``).
        """
        path = self.folder_of(name)
        if not path.is_dir():
            raise ApiError(404, "unknown_profile", f"no profile named {name!r} (create it with POST /api/profiles)")
        return path

    # ------------------------------------------------------------ stores
    @contextmanager
    def store(self, name: str, served: ServedModel) -> Iterator[LearnedFile]:
        """Use a profile's learned store for a model, alone (other threads wait).

        Raises:
            ApiError: bad name, no such profile, or the store cannot be opened
                (409 ``profile_unavailable``: another process writes it, or it is damaged).
        """
        entry = self._open(name, served)
        with entry.lock:
            yield entry.learned

    def _open(self, name: str, served: ServedModel) -> _Store:
        key = (name, served.name)
        entry = self._stores.get(key)
        if entry is not None:
            return entry
        folder = self.require(name)
        with self._opening:
            entry = self._stores.get(key)
            if entry is None:
                if self._closed:
                    raise ApiError(409, "profile_unavailable", "the service is stopping")
                try:
                    entry = _Store(LearnedFile(folder / f"{served.name}{SUFFIX}", served.model))
                except (OutputError, ModelFileError) as error:
                    raise ApiError(409, "profile_unavailable", f"profile {name!r}: {error}") from None
                self._stores[key] = entry
        return entry

    def close_all(self) -> None:
        """Close every open store (each waits for its current user); later opens are refused."""
        with self._opening:
            self._closed = True
            stores = list(self._stores.values())
            self._stores.clear()
        for entry in stores:
            with entry.lock:
                entry.learned.close()
