"""Counting a corpus on Dask: two passes over blocks of whole lines, tree reductions, a store.

Why two passes.  A trigram key packs three word ids, and the ids must be the
same on every worker, which needs the whole corpus's vocabulary first.  Pass 1
tokenises every block and counts its written forms; the form tables are
merged by a tree reduction (eight at a time, Dask's own default fan-in) in
parts split by a hash of the model form, and each part picks its types'
counts and display forms on the cluster.  The client receives only the types
(model form, count, display), numbers them canonically (see
:mod:`predictor.counting.store`) and broadcasts the numbering once to every
worker.  Pass 2 tokenises every block again, counts its trigrams by id with
numpy and splits the sorted table into partitions by a hash of the key; each
partition's pieces are merged by another eight-way tree reduction, so no task
ever receives the whole table and nothing is shuffled all-to-all.  The client
then fetches each partition in row groups and writes it.

The alternative, keeping each block's table over block-local ids between the
passes and renumbering it instead of tokenising again, trades the second
tokenisation for holding every block's table on the workers (about the
corpus's size again); ``bench/bench_count.py`` measures what each pass costs.

Sentences are numbered across the corpus (every 20th is held out), and in
``--wrapped`` text a sentence may cross a block boundary: pass 1 reports how
each block's sentences begin and end (:class:`~predictor.counting.block_tasks.BlockScan`),
from which the client numbers every sentence and tells pass 2 whether a
sentence is open at each block's start; the few sentences that cross a
boundary come back as id arrays and are counted on the client.

Every task is a deterministic function of its inputs, so when a worker dies
Dask recomputes what it held and the store is unchanged.
"""

from __future__ import annotations

import logging
import sys
import threading
import time
from collections.abc import Callable
from typing import Any

import numpy as np

from ..errors import CapacityError, CorpusError, EncodingError, OptionError
from ..text import model_form
from .block_tasks import (
    BlockPlan,
    BlockScan,
    choose_types,
    count_block,
    count_keys,
    merge_forms,
    merge_partition,
    part_of_form,
    piece,
    scan_block,
    sentence_keys,
    table_rows,
    table_slice,
)
from .blocks import Block, crc32_combine, plan_blocks
from .counter import TYPE_ENTRY_BYTES
from .counts import UNLISTED
from .memory import MemoryBudget, format_size
from .store import ROW_GROUP_ROWS, StoreWriter, canonical_order, file_entry, manifest_for, partitions_for
from .tables import MAX_RAW_TYPES, RAW_END

SPLIT_EVERY = 8
"""Inputs merged by one task of a tree reduction (Dask's default for its own tree reductions)."""

TaskProgress = Callable[[int, int], None]
"""Called with (Dask tasks done, tasks submitted so far)."""


class _Tracker:
    """Counts submitted and finished tasks and reports them."""

    def __init__(self, progress: TaskProgress | None) -> None:
        self.progress = progress
        self.total = 0
        self.done = 0
        self._lock = threading.Lock()

    def add(self, futures: list[Any]) -> list[Any]:
        with self._lock:
            self.total += len(futures)
        for future in futures:
            future.add_done_callback(self._finished)
        return futures

    def _finished(self, _future: Any) -> None:
        with self._lock:
            self.done += 1
            done, total = self.done, self.total
        if self.progress is not None:
            self.progress(done, total)


def open_client(cluster: str | None, workers: int | None) -> tuple[Any, Any]:
    """Connect to a scheduler, or start a local cluster of ``workers`` processes.

    Returns:
        (client, local cluster or None); close both when done.

    Raises:
        OptionError: the scheduler cannot be reached or the worker count is not positive.
    """
    from distributed import Client, LocalCluster

    if cluster is not None:
        try:
            return Client(cluster, timeout="20s"), None
        except (OSError, TimeoutError, ValueError) as error:
            raise OptionError(f"--cluster {cluster}: cannot reach a Dask scheduler there ({error})") from None
    if workers is None or workers < 1:
        raise OptionError("--workers must be at least 1")
    local = LocalCluster(
        n_workers=workers,
        threads_per_worker=1,
        processes=True,
        host="127.0.0.1",
        dashboard_address="127.0.0.1:0",
        silence_logs=logging.ERROR,
    )
    return Client(local), local


def dashboard_of(client: Any) -> str | None:
    """The cluster's dashboard address, when it serves one."""
    try:
        import bokeh  # noqa: F401 - the dashboard is only served with bokeh installed
    except ImportError:
        return None
    link = getattr(client, "dashboard_link", None)
    return str(link) if link else None


def _tree(client: Any, tracker: _Tracker, function: Callable[..., Any], leaves: list[Any]) -> Any:
    """Reduce futures with ``function`` in a tree of fan-in :data:`SPLIT_EVERY`."""
    while len(leaves) > 1:
        leaves = tracker.add([client.submit(function, *leaves[i : i + SPLIT_EVERY]) for i in range(0, len(leaves), SPLIT_EVERY)])
    return leaves[0]


def count_on_dask(
    client: Any,
    files: list[tuple[str, int]],
    skipped_files: int,
    output: str,
    *,
    wrapped: bool,
    replace_bad_bytes: bool,
    block_bytes: int,
    partition_bytes: int,
    budget: MemoryBudget,
    progress: TaskProgress | None = None,
) -> tuple[StoreWriter, dict[str, Any], dict[str, Any]]:
    """Count corpus files on a Dask cluster and write the store's files.

    Args:
        client: a connected ``distributed.Client``.
        files: (path or URL, size) of every file, in corpus order.
        skipped_files: binary files skipped in folders (for the manifest).
        output: the store folder.
        wrapped, replace_bad_bytes: tokeniser settings.
        block_bytes: bytes per block.
        partition_bytes: see :func:`predictor.counting.store.partitions_for`.
        budget: this process's memory budget: the vocabulary must fit its dictionary
            share; everything else the client holds is a row group at a time.
        progress: called with (tasks done, tasks submitted so far).

    Returns:
        The writer (to commit), the manifest, and facts about the run
        (``seconds`` per stage, ``tasks``, ``shuffle_bytes`` per worker).

    Raises:
        CorpusError, EncodingError: a file cannot be read, is not UTF-8, or holds no words.
    """
    tracker = _Tracker(progress)
    seconds: dict[str, float] = {}
    started = time.perf_counter()
    before = _sent_bytes(client)
    blocks = plan_blocks(files, block_bytes)
    parts = max(1, min(32, len(blocks) // SPLIT_EVERY))

    # Pass 1: forms and sentence structure.
    scans = tracker.add([client.submit(scan_block, block, wrapped, replace_bad_bytes, parts) for block in blocks])
    infos = tracker.add([client.submit(piece, scan, 0) for scan in scans])
    form_roots = [_tree(client, tracker, merge_forms, tracker.add([client.submit(piece, scan, 1, q) for scan in scans])) for q in range(parts)]
    del scans
    summaries: list[BlockScan] = client.gather(infos)
    del infos
    _check_encoding(blocks, summaries)
    plans, corrections, entries, tokens, sentences, ends = _plan(blocks, summaries, files, parts)
    if tokens == 0:
        raise CorpusError("the corpus holds no words")
    seconds["pass1"] = time.perf_counter() - started

    # The vocabulary: types chosen per part on the cluster, numbered on the client.
    started = time.perf_counter()
    type_parts = tracker.add([client.submit(choose_types, form_roots[q], corrections[q]) for q in range(parts)])
    del form_roots
    types: list[tuple[str, int, str]] = [("<s>", 0, "<s>"), ("</s>", sentences, "</s>")]
    for found in client.gather(type_parts):
        types.extend(found)
    del type_parts
    words, counts, display, unlisted_tokens = _numbered(types)
    del types
    held = sum(map(sys.getsizeof, words)) + sum(map(sys.getsizeof, display)) + TYPE_ENTRY_BYTES * len(words)
    if held > budget.dictionary_bytes:
        raise CapacityError(
            f"the corpus's {len(words):,} word types need about {format_size(held)} on this machine, more than the "
            f"{format_size(budget.dictionary_bytes)} --max-memory {format_size(budget.limit)} allows for them; pass a larger --max-memory"
        )
    vocabulary = {word: number for number, word in enumerate(words)}
    unlisted = vocabulary.get(UNLISTED, RAW_END)
    # One future for the whole numbering (scattering a dict would make a future per word).
    [shared] = client.scatter([vocabulary], broadcast=True, hash=False)
    del vocabulary
    partitions = partitions_for(tokens + sentences, partition_bytes)
    seconds["vocabulary"] = time.perf_counter() - started

    # Pass 2: trigrams by id, partitioned, merged by trees per partition.
    started = time.perf_counter()
    counted = tracker.add([client.submit(count_block, block, wrapped, replace_bad_bytes, shared, unlisted, plans[block.index], partitions) for block in blocks])
    edges = tracker.add([client.submit(piece, result, where) for result in counted for where in (2, 3)])
    roots = {
        kind: [_tree(client, tracker, merge_partition, tracker.add([client.submit(piece, result, slot, p) for result in counted])) for p in range(partitions)]
        for slot, kind in ((0, "trigrams"), (1, "heldout"))
    }
    del counted
    pieces = client.gather(edges)
    del edges
    boundary_table, boundary_heldout = _boundary_sentences(blocks, summaries, plans, pieces, ends, partitions)
    del pieces
    finals = {}
    for kind, extra in (("trigrams", boundary_table), ("heldout", boundary_heldout)):
        scattered = client.scatter(extra, hash=False)
        finals[kind] = tracker.add([client.submit(merge_partition, roots[kind][p], scattered[p]) for p in range(partitions)])
    del roots
    _wait(finals)
    seconds["pass2"] = time.perf_counter() - started

    # The store: vocabulary, then each partition fetched in row groups.
    started = time.perf_counter()
    writer = StoreWriter(output, partitions)
    try:
        writer.write_vocabulary(words, counts, display)
        for kind in ("trigrams", "heldout"):
            for p, final in enumerate(finals[kind]):
                writer.write_partition(kind, p, _fetch(client, final))
                finals[kind][p] = None
    except BaseException:
        writer.abort()
        raise
    seconds["write"] = time.perf_counter() - started
    after = _sent_bytes(client)
    shuffle = {worker: after.get(worker, 0) - before.get(worker, 0) for worker in after}
    manifest = manifest_for(
        files=entries,
        skipped_files=skipped_files,
        wrapped=wrapped,
        replace_bad_bytes=replace_bad_bytes,
        tokens=tokens,
        sentences=sentences,
        types=len(words),
        unlisted_tokens=unlisted_tokens,
        partition_bytes=partition_bytes,
    )
    return writer, manifest, {"seconds": seconds, "tasks": tracker.total, "shuffle_bytes": shuffle, "partitions": partitions}


def _wait(finals: dict[str, list[Any]]) -> None:
    from distributed import wait

    wait(finals["trigrams"] + finals["heldout"])


def _fetch(client: Any, final: Any) -> Any:
    """Yield a partition's rows a row group at a time (the client never holds a whole partition)."""
    rows = client.submit(table_rows, final).result()
    for start in range(0, rows, ROW_GROUP_ROWS):
        yield client.submit(table_slice, final, start, start + ROW_GROUP_ROWS).result()


def _sent_bytes(client: Any) -> dict[str, int]:
    """Bytes each worker has sent to other workers so far."""

    def sent(dask_worker: Any) -> int:
        return int(getattr(dask_worker, "transfer_outgoing_bytes_total", 0))

    try:
        return {str(k): int(v) for k, v in client.run(sent).items()}
    except Exception:  # noqa: BLE001 - a figure for the benchmark only
        return {}


def _check_encoding(blocks: list[Block], summaries: list[BlockScan]) -> None:
    """Raise the first invalid UTF-8 in corpus order, with its file's line number."""
    lines = 0
    for block, scan in zip(blocks, summaries):
        if block.start == 0:
            lines = 0
        if scan.bad is not None:
            line, byte = scan.bad
            raise EncodingError(f"{block.path}:{lines + line}: not valid UTF-8 (byte 0x{byte:02x}); pass --replace-bad-bytes to replace such bytes")
        lines += scan.newlines


def _plan(
    blocks: list[Block], summaries: list[BlockScan], files: list[tuple[str, int]], parts: int
) -> tuple[list[BlockPlan], list[dict[str, int]], list[dict[str, Any]], int, int, list[int]]:
    """Number every sentence and find where sentences cross block boundaries.

    Returns:
        Each block's plan, the sentence-initial corrections per vocabulary part,
        the manifest's file entries, tokens, sentences, and for each file the
        number of the sentence its end closes (-1 when none is open there).
    """
    plans: list[BlockPlan] = []
    corrections: list[dict[str, int]] = [{} for _ in range(parts)]
    crcs = [0] * len(files)
    closes_at_end = [-1] * len(files)
    sentences = 0
    tokens = 0
    carry = False
    for block, scan in zip(blocks, summaries):
        if block.start == 0:
            carry = False
        crcs[block.file_index] = crc32_combine(crcs[block.file_index], scan.crc, scan.length)
        tokens += scan.words
        plans.append(BlockPlan(carry, sentences + (1 if carry and scan.has_end else 0)))
        if scan.head_form is not None and not carry:
            part = corrections[part_of_form(model_form(scan.head_form), parts)]
            part[scan.head_form] = part.get(scan.head_form, 0) + 1
        if scan.has_end:
            sentences += scan.closed_inside + (1 if scan.head_words > 0 or carry else 0)
            carry = scan.tail_words > 0
        else:
            carry = carry or scan.words > 0
        if block.last_in_file and carry:
            closes_at_end[block.file_index] = sentences
            sentences += 1
            carry = False
    entries = [file_entry(path, size, crcs[i]) for i, (path, size) in enumerate(files)]
    return plans, corrections, entries, tokens, sentences, closes_at_end


def _numbered(types: list[tuple[str, int, str]]) -> tuple[list[str], np.ndarray, list[str], int]:
    """Canonical numbering of the types; beyond the id space the rarest become one unlisted type."""
    words = [t[0] for t in types]
    counts = np.array([t[1] for t in types], dtype=np.int64)
    order = canonical_order(words, counts)
    unlisted_tokens = 0
    if len(order) > MAX_RAW_TYPES:
        kept, dropped = order[: MAX_RAW_TYPES - 1], order[MAX_RAW_TYPES - 1 :]
        unlisted_tokens = int(counts[dropped].sum())
        words = [words[t] for t in kept.tolist()] + [UNLISTED]
        display = [types[t][2] for t in kept.tolist()] + [UNLISTED]
        counts = np.append(counts[kept], unlisted_tokens)
        order = canonical_order(words, counts)
        return [words[t] for t in order.tolist()], counts[order], [display[t] for t in order.tolist()], unlisted_tokens
    return [words[t] for t in order.tolist()], counts[order], [types[t][2] for t in order.tolist()], 0


def _boundary_sentences(
    blocks: list[Block], summaries: list[BlockScan], plans: list[BlockPlan], pieces: list[np.ndarray], ends: list[int], partitions: int
) -> tuple[list[Any], list[Any]]:
    """Count the sentences that cross block boundaries (or end at a file's end without an end mark)."""
    keys: list[np.ndarray] = []
    held: list[np.ndarray] = []
    open_ids: list[np.ndarray] = []
    for block, scan, plan in zip(blocks, summaries, plans):
        head, tail = pieces[2 * block.index], pieces[2 * block.index + 1]
        if block.start == 0:
            open_ids = []
        if plan.carry_in:
            if scan.has_end:
                found, flags, _ = sentence_keys(np.concatenate([*open_ids, head]), plan.first_sentence - 1)
                keys.append(found)
                held.append(flags)
                open_ids = []
            else:
                open_ids.append(head)
        if len(tail):
            open_ids.append(tail)
        if block.last_in_file and open_ids:
            closing = np.concatenate([*open_ids, np.array([RAW_END], dtype=np.int32)])
            found, flags, _ = sentence_keys(closing, ends[block.file_index])
            keys.append(found)
            held.append(flags)
            open_ids = []
    all_keys = np.concatenate(keys) if keys else np.zeros(0, dtype=np.int64)
    all_held = np.concatenate(held) if held else np.zeros(0, dtype=bool)
    return count_keys(all_keys, all_held, partitions)
