"""Count stores: a corpus counted once, on this machine or on a Dask cluster, kept as Parquet.

``count_to_store`` counts a corpus into a store (single process by default, on
Dask with ``cluster`` or ``workers``; all paths write identical stores);
``open_count_store`` reads one back as the counts that
:func:`predictor.build.build_from_counts` and the sweep estimate from.
"""

from __future__ import annotations

import os
import time
from collections.abc import Callable
from pathlib import Path

from ..memory import MemoryBudget
from .blocks import BLOCK_BYTES, corpus_files
from .extra import INSTALL_HINT, require_cluster_extra
from .local import CountSummary, count_locally
from .store import PARTITION_BYTES, check_store_target, open_count_store, read_manifest, store_wrapped

__all__ = ["BLOCK_BYTES", "PARTITION_BYTES", "INSTALL_HINT", "CountSummary", "count_to_store", "open_count_store", "read_manifest", "store_wrapped"]


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
    from .cluster import count_on_dask, dashboard_of, open_client

    files, skipped = corpus_files(names, reject_binary=reject_binary)
    client, local = open_client(cluster, workers)
    try:
        link = dashboard_of(client)
        if link and on_dashboard is not None:
            on_dashboard(link)
        writer, manifest, facts = count_on_dask(
            client, files, skipped, str(target), wrapped=wrapped, replace_bad_bytes=replace_bad_bytes,
            block_bytes=block_bytes, partition_bytes=partition_bytes, progress=progress,
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
