"""The single-process path to a count store: today's counter, then the store's canonical ids."""

from __future__ import annotations

import os
import zlib
from collections.abc import Callable, Iterator
from dataclasses import dataclass

import numpy as np

from ..counting import CorpusCounts, SpilledTrigrams, TrigramTable, count_corpus, pack_trigrams, unpack_trigrams
from ..errors import CorpusError, OutputError
from ..memory import MemoryBudget
from ..scratch import SpillFolder
from ..spill import KeyCounter, Run, sum_duplicates
from .blocks import corpus_files
from .store import StoreWriter, canonical_order, file_entry, manifest_for, partitions_for
from .tasks import split_table

_READ_BYTES = 1 << 20
_BLOCK_ROWS = 1 << 20


@dataclass
class CountSummary:
    """What a count into a store did.

    Attributes:
        store: the store folder.
        tokens: word tokens counted.
        sentences: sentences counted.
        types: word types (the two symbols included).
        trigram_rows: distinct trigrams stored.
        files: corpus files read.
        partitions: trigram partitions.
        seconds: time per stage (``count``, ``write``; with Dask ``pass1``, ``vocabulary``, ``pass2``, ``write``).
        tasks: Dask tasks run (0 on the single-process path).
        shuffle_bytes: bytes each Dask worker sent to others (empty on the single-process path).
        dashboard: the Dask dashboard's address, if there was one.
    """

    store: str
    tokens: int
    sentences: int
    types: int
    trigram_rows: int
    files: int
    partitions: int
    seconds: dict[str, float]
    tasks: int = 0
    shuffle_bytes: dict[str, int] | None = None
    dashboard: str | None = None


def file_crc(path: str) -> int:
    """The CRC-32 of a local file.

    Raises:
        CorpusError: it cannot be read.
    """
    crc = 0
    try:
        with open(path, "rb") as handle:
            while piece := handle.read(_READ_BYTES):
                crc = zlib.crc32(piece, crc)
    except OSError as error:
        raise CorpusError(f"{path}: cannot read ({error.strerror or error})") from None
    return crc


def store_from_counts(
    counts: CorpusCounts,
    writer_target: str | os.PathLike[str],
    *,
    files: list[tuple[str, int]],
    wrapped: bool,
    replace_bad_bytes: bool,
    partition_bytes: int,
    budget: MemoryBudget,
    spill_dir: str | os.PathLike[str] | None,
) -> StoreWriter:
    """Write counts taken in this process as a store (committed by the caller).

    The raw type ids of the count are renumbered canonically; each partition's
    rows are re-sorted through a :class:`~predictor.spill.KeyCounter`, which
    spills to ``spill_dir`` when a partition outgrows its share of the budget.
    """
    order = canonical_order(counts.types, counts.type_counts)
    mapping = np.empty(len(order), dtype=np.int64)
    mapping[order] = np.arange(len(order))
    parts = partitions_for(counts.corpus_tokens + counts.sentences, partition_bytes)
    writer = StoreWriter(writer_target, parts)
    try:
        writer.write_vocabulary([counts.types[t] for t in order.tolist()], counts.type_counts[order], [counts.display[t] for t in order.tolist()])
        folder: list[SpillFolder] = []

        def spill_folder() -> SpillFolder:
            if not folder:
                try:
                    folder.append(SpillFolder(spill_dir))
                except OSError as error:
                    raise OutputError(f"{spill_dir or 'the temporary folder'}: cannot create a folder for counts ({error.strerror or error})") from None
            return folder[0]

        for kind, table in (("trigrams", counts.table), ("heldout", counts.heldout)):
            counters = [KeyCounter(max(1 << 14, budget.table_rows // parts), spill_folder) for _ in range(parts)]
            for keys, block_counts in _raw_blocks(table):
                u, v, w = unpack_trigrams(keys)
                renumbered = pack_trigrams(mapping[u], mapping[v], mapping[w])
                del u, v, w
                for part, piece in enumerate(split_table(*sum_duplicates(renumbered, block_counts), parts)):
                    counters[part].add(*piece)
            for part, counter in enumerate(counters):
                result = counter.finish()
                writer.write_partition(kind, part, _result_blocks(result))
                if isinstance(result, Run):
                    result.delete()
        for made in folder:
            made.close()
    except BaseException:
        writer.abort()
        raise
    return writer


def _raw_blocks(table: TrigramTable | SpilledTrigrams) -> Iterator[tuple[np.ndarray, np.ndarray]]:
    if isinstance(table, SpilledTrigrams):
        yield from table.blocks()
        return
    for start in range(0, len(table), _BLOCK_ROWS):
        stop = start + _BLOCK_ROWS
        yield pack_trigrams(table.u[start:stop], table.v[start:stop], table.w[start:stop]), table.n[start:stop]


def _result_blocks(result: tuple[np.ndarray, np.ndarray] | Run) -> Iterator[tuple[np.ndarray, np.ndarray]]:
    if isinstance(result, Run):
        yield from result.blocks(_BLOCK_ROWS)
    else:
        yield result


def count_locally(
    paths: list[str],
    output: str | os.PathLike[str],
    *,
    wrapped: bool,
    replace_bad_bytes: bool,
    reject_binary: bool,
    budget: MemoryBudget,
    spill_dir: str | os.PathLike[str] | None,
    partition_bytes: int,
    progress: Callable[[int, int], None] | None,
) -> tuple[StoreWriter, dict, CorpusCounts]:
    """Count in this process (:func:`predictor.counting.count_corpus`) and write the store's files.

    Returns:
        The writer (to commit), the manifest, and the counts (to close).
    """
    if any("://" in str(p) for p in paths):
        raise CorpusError("a corpus named by URL is counted with --workers N or --cluster ADDRESS")
    files, skipped = corpus_files(paths, reject_binary=reject_binary)
    counts = count_corpus(paths, wrapped=wrapped, replace_bad_bytes=replace_bad_bytes, reject_binary=reject_binary, progress=progress, budget=budget, spill_dir=spill_dir)
    try:
        entries = [file_entry(path, size, file_crc(path)) for path, size in files]
        writer = store_from_counts(
            counts, output, files=files, wrapped=wrapped, replace_bad_bytes=replace_bad_bytes, partition_bytes=partition_bytes, budget=budget, spill_dir=spill_dir
        )
    except BaseException:
        counts.close()
        raise
    manifest = manifest_for(
        files=entries,
        skipped_files=skipped,
        wrapped=wrapped,
        replace_bad_bytes=replace_bad_bytes,
        tokens=counts.corpus_tokens,
        sentences=counts.sentences,
        types=len(counts.types),
        unlisted_tokens=counts.unlisted_tokens,
        partition_bytes=partition_bytes,
    )
    return writer, manifest, counts
