"""The counting stage: corpus files → tokens → trigram counts, in bounded memory.

``corpus`` streams files in chunks of whole lines; ``tokenisers`` runs worker
processes for large corpora; ``counter`` numbers word forms and counts every
trigram of the padded sentences; ``tables`` sorts rows and sums counts;
``spill`` and ``scratch`` take counts that outgrow memory to disk; ``memory``
holds the ``--max-memory`` budget.  A count can also be kept on disk as a
count store (``store``: Parquet tables and a manifest), written by
``store_count`` in this process or on a Dask cluster (``cluster``, which runs
``block_tasks`` on ``blocks`` of whole lines; ``cluster_extra`` says how to
install what it needs).  Nothing here knows about estimators, model files or
queries.
"""

from __future__ import annotations

from .counter import RAW_END, RAW_START, CorpusCounter, CorpusCounts, ProgressCallback, TrigramTable, count_corpus
from .store import open_count_store
from .store_count import count_to_store

__all__ = ["count_corpus", "count_to_store", "open_count_store", "CorpusCounts", "CorpusCounter", "TrigramTable", "ProgressCallback", "RAW_START", "RAW_END"]
