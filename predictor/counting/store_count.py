"""Counting a corpus into a count store: in this process (the default) or on Dask.

:func:`count_to_store` is the entry point.  Without a cluster it runs the
single-process counter (:func:`predictor.counting.count_corpus`) and renumbers
its raw type ids into the store's canonical ids; with ``cluster`` or
``workers`` it counts on Dask (:mod:`predictor.counting.cluster`).  Both write
identical stores.
"""

from __future__ import annotations

import os
import time
import zlib
from collections.abc import Callable, Iterator
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from ..errors import CorpusError, OutputError
from .block_tasks import split_table
from .blocks import BLOCK_BYTES, corpus_files
from .cluster import count_on_dask, dashboard_of, open_client
from .cluster_extra import require_cluster_extra
from .counts import CorpusCounts
from .memory import MemoryBudget
from .run import count_corpus
from .scratch import SpillFolder
from .spill import KeyCounter, Run, sum_duplicates
from .store import PARTITION_BYTES, StoreWriter, canonical_order, check_store_target, file_entry, manifest_for, partitions_for
from .tables import SpilledTrigrams, TrigramTable, pack_trigrams, unpack_trigrams

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
        spill_folder = _LazyFolder(spill_dir)
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
        spill_folder.close()
    except BaseException:
        writer.abort()
        raise
    return writer


class _LazyFolder:
    """A spill folder made on first use (most stores never spill)."""

    def __init__(self, root: str | os.PathLike[str] | None) -> None:
        self.root = root
        self.folder: SpillFolder | None = None

    def __call__(self) -> SpillFolder:
        if self.folder is None:
            try:
                self.folder = SpillFolder(self.root)
            except OSError as error:
                raise OutputError(f"{self.root or 'the temporary folder'}: cannot create a folder for counts ({error.strerror or error})") from None
        return self.folder

    def close(self) -> None:
        if self.folder is not None:
            self.folder.close()


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


def count_to_store(
    paths: list[str | os.PathLike[str]],
    output: str | os.PathLike[str],
    *,
    wrapped: bool = False,
    replace_bad_bytes: bool = False,
    reject_binary: bool = False,
    max_memory: int | None = None,
    spill_dir: str | os.PathLike[str] | None = None,
    cluster: str | None = None,
    workers: int | None = None,
    block_bytes: int = BLOCK_BYTES,
    partition_bytes: int = PARTITION_BYTES,
    progress: Callable[[int, int], None] | None = None,
    on_dashboard: Callable[[str], None] | None = None,
) -> CountSummary:
    """Count a corpus into a count store.

    Args:
        paths: corpus files or folders (local), or fsspec URLs (with Dask).
        output: the store folder (an existing store there is replaced once the new one is complete).
        wrapped: treat single line breaks as spaces.
        replace_bad_bytes: replace invalid UTF-8 instead of failing.
        reject_binary: fail on binary files inside folders.
        max_memory: ceiling on this process's peak memory (None: half of what is available).
        spill_dir: where counts that outgrow memory go on the single-process path.
        cluster: the address of a Dask scheduler to count on (``tcp://host:8786``).
        workers: start a local Dask cluster of this many processes.
        block_bytes: bytes of a file per Dask block.
        partition_bytes: trigram occurrences per partition, in bytes (16 each).
        progress: called with (done, total): bytes on the single-process path, Dask tasks otherwise.
        on_dashboard: called with the Dask dashboard's address, when there is one.

    Returns:
        What was counted and how long each stage took.

    Raises:
        OptionError, CorpusError, EncodingError, CapacityError, OutputError.
    """
    require_cluster_extra("a count store")
    names = [str(p) for p in paths]
    target = Path(output)
    check_store_target(target)
    budget = MemoryBudget.of(max_memory)
    started = time.perf_counter()
    if cluster is None and workers is None:
        writer, manifest, counts = count_locally(
            names,
            target,
            wrapped=wrapped,
            replace_bad_bytes=replace_bad_bytes,
            reject_binary=reject_binary,
            budget=budget,
            spill_dir=spill_dir,
            partition_bytes=partition_bytes,
            progress=progress,
        )
        counts.close()
        writer.commit(manifest)
        seconds = {"count": time.perf_counter() - started}
        return _summary(target, writer, manifest, seconds)
    files, skipped = corpus_files(names, reject_binary=reject_binary)
    client, local = open_client(cluster, workers)
    try:
        link = dashboard_of(client)
        if link and on_dashboard is not None:
            on_dashboard(link)
        writer, manifest, facts = count_on_dask(
            client,
            files,
            skipped,
            str(target),
            wrapped=wrapped,
            replace_bad_bytes=replace_bad_bytes,
            block_bytes=block_bytes,
            partition_bytes=partition_bytes,
            budget=budget,
            progress=progress,
        )
    finally:
        client.close()
        if local is not None:
            local.close()
    writer.commit(manifest)
    summary = _summary(target, writer, manifest, facts["seconds"])
    summary.tasks = facts["tasks"]
    summary.shuffle_bytes = facts["shuffle_bytes"]
    summary.dashboard = link
    return summary


def _summary(target: Path, writer, manifest: dict, seconds: dict[str, float]) -> CountSummary:  # type: ignore[no-untyped-def]
    return CountSummary(
        store=str(target),
        tokens=manifest["tokens"],
        sentences=manifest["sentences"],
        types=manifest["types"],
        trigram_rows=writer.rows["trigrams"],
        files=len(manifest["files"]),
        partitions=writer.partitions,
        seconds=seconds,
    )
