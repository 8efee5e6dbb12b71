"""The counting stage: corpus files → tokens → trigram counts, in bounded memory.

``corpus`` streams files in chunks of whole lines; ``tokenisers`` runs worker
processes for large corpora; ``counter`` numbers word forms and counts every
trigram of the padded sentences; ``tables`` sorts rows and sums counts;
``spill`` and ``scratch`` take counts that outgrow memory to disk; ``memory``
holds the ``--max-memory`` budget.  Nothing here knows about estimators, model
files or queries.
"""

from __future__ import annotations

from .counter import RAW_END, RAW_START, CorpusCounter, CorpusCounts, ProgressCallback, TrigramTable, count_corpus

__all__ = ["count_corpus", "CorpusCounts", "CorpusCounter", "TrigramTable", "ProgressCallback", "RAW_START", "RAW_END"]
