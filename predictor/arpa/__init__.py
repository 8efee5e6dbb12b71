"""The ARPA back-off text format: export a model to it, import one from it (orders 1 to 3).

* :mod:`.syntax`: what both directions share (symbols, log zero, number format,
  the comment lines that carry display forms).
* :mod:`.writer`: a model's probabilities and back-off weights as ARPA text.
* :mod:`.reader`: streaming parse of an ARPA file into sorted n-gram tables.
* :mod:`.tables`: those tables, spilled to disk when they outgrow memory.
* :mod:`.levels`: from those tables to the model's level arrays.
* :mod:`.convert`: the whole import, ending in a model file written atomically.

docs/arpa.md explains what is exact and why.
"""

from __future__ import annotations

from .convert import ImportSummary, import_arpa, model_from_arpa
from .writer import ExportSummary, export_arpa, refusal_reason

__all__ = ["export_arpa", "refusal_reason", "ExportSummary", "import_arpa", "model_from_arpa", "ImportSummary"]
