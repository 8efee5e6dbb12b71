"""The counting stage: corpus files → tokens → trigram counts, in bounded memory.

``corpus`` streams files in chunks of whole lines; ``tokenisers`` runs worker
processes for large corpora; ``run`` reads a corpus end to end, feeding the
workers or the ``counter``, which numbers word forms and counts every trigram
of the padded sentences; ``tables`` holds trigram tables and row sums;
``counts`` the result and the choice of a vocabulary from it; ``spill`` and
``scratch`` take counts that outgrow memory to disk; ``memory`` holds the
``--max-memory`` budget.  A count can also be kept on disk as a count store
(``store``: Parquet tables and a manifest), written by ``store_count`` in this
process or on a Dask cluster (``cluster``, which runs ``block_tasks`` on
``blocks`` of whole lines; ``cluster_extra`` says how to install what it
needs).  Nothing here knows about estimators, model files or queries.
"""

from __future__ import annotations

from .counter import CorpusCounter
from .counts import UNLISTED, CorpusCounts
from .run import ProgressCallback, count_corpus
from .store import open_count_store
from .store_count import count_to_store
from .tables import RAW_END, RAW_START, TrigramTable

__all__ = ["count_corpus", "count_to_store", "open_count_store", "CorpusCounts", "CorpusCounter", "TrigramTable", "ProgressCallback", "RAW_START", "RAW_END", "UNLISTED"]
