"""The counting stage: corpus files → tokens → trigram counts, in bounded memory.

``corpus`` streams files in chunks of whole lines; ``tokenisers`` runs worker
processes for large corpora; ``run`` reads a corpus end to end, feeding the
workers or the ``counter``, which numbers word forms and counts every trigram
of the padded sentences; ``tables`` holds trigram tables and row sums;
``counts`` the result and the choice of a vocabulary from it; ``spill`` and
``scratch`` take counts that outgrow memory to disk; ``memory`` holds the
``--max-memory`` budget.  Nothing here knows about estimators, model files or
queries.
"""

from __future__ import annotations

from .counter import CorpusCounter
from .counts import UNLISTED, CorpusCounts
from .run import ProgressCallback, count_corpus
from .tables import RAW_END, RAW_START, TrigramTable

__all__ = ["count_corpus", "CorpusCounts", "CorpusCounter", "TrigramTable", "ProgressCallback", "RAW_START", "RAW_END", "UNLISTED"]
