"""The optional ``cluster`` extra (Dask, pyarrow, fsspec) and the one line that says how to install it."""

from __future__ import annotations

import importlib.util

from ..errors import OptionError

INSTALL_HINT = "pip install 'foretype[cluster]'"
"""How to install what count stores and Dask counting need."""


def cluster_extra_missing() -> list[str]:
    """The modules of the cluster extra that are not installed."""
    return [name for name in ("dask", "distributed", "pyarrow", "fsspec") if importlib.util.find_spec(name) is None]


def require_cluster_extra(what: str) -> None:
    """Fail in one line when the cluster extra is missing.

    Raises:
        OptionError: a module of the extra is not installed.
    """
    missing = cluster_extra_missing()
    if missing:
        raise OptionError(f"{what} needs {', '.join(missing)}: install them with {INSTALL_HINT}")
