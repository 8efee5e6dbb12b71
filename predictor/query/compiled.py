"""Which query path answers: the compiled core where the install built it, else numpy.

The compiled core (``_core``, built from ``_core.pyx`` by ``pip install`` where
a C compiler exists) answers top-k queries, probabilities and orders exactly
as the numpy path does, ten or more times faster.  Without it, or with the
environment variable ``FORETYPE_PURE=1``, the numpy path answers; it is also
the reference the exactness tests compare the core against.
"""

from __future__ import annotations

import os
from typing import Any

from ..modelfile.encoding import value_table
from ..modelfile.model_arrays import ModelArrays

PURE_ENV = "FORETYPE_PURE"
"""Set to 1 to make every model answer on the numpy path."""

COMPILED = "compiled"
NUMPY = "numpy"

try:
    from ._core import QueryCore
except ImportError:  # not built: no compiler at install time, or an unusual platform
    QueryCore = None  # type: ignore[assignment,misc]


def compiled_available() -> bool:
    """Whether the compiled core was built and imports."""
    return QueryCore is not None


def forced_pure() -> bool:
    """Whether ``FORETYPE_PURE`` asks for the numpy path."""
    return os.environ.get(PURE_ENV, "").strip() not in ("", "0")


def default_path() -> str:
    """The path a model answers on unless told otherwise: ``compiled`` or ``numpy``."""
    return COMPILED if compiled_available() and not forced_pure() else NUMPY


def describe_path(path: str) -> str:
    """One phrase for ``foretype info``, ``--version`` and the pad: which path answers, and why."""
    if path == COMPILED:
        return "the compiled core"
    if not compiled_available():
        return "the numpy path (the compiled core is not built)"
    if forced_pure():
        return f"the numpy path ({PURE_ENV} is set)"
    return "the numpy path"


def make_core(arrays: ModelArrays, interpolated: bool, totals2: Any = None) -> Any:
    """A compiled core over a model's arrays (which passed the load checks or were just built).

    ``totals2``: for a back-off model with derived level-3 weights, P2 summed over every outcome per context word
    (:attr:`foretype.query.scoring.ScoringCore.totals2`).

    Raises:
        RuntimeError: the compiled core is not built.
        ValueError: the arrays have a layout the core does not read.
    """
    if QueryCore is None:
        raise RuntimeError("the compiled query core is not built")
    return QueryCore(arrays, interpolated, value_table(arrays.l2_value, arrays.l2_codebook), value_table(arrays.l3_value, arrays.l3_codebook), totals2)
