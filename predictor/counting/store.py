"""The count store: a corpus's counts on disk, as a Parquet dataset any data tool reads.

Layout of a store folder::

    manifest.json              tokeniser settings, sentence rule, corpus files
                               (path, bytes, CRC-32), totals, the tables below
    vocabulary.parquet         id (int32), word (model form), count (int64), display
    trigrams/part-NNNNN.parquet  u, v, w (int32 word ids), count (int64)
    heldout/part-NNNNN.parquet   the same for every 20th sentence (a subset of trigrams)

Word ids are canonical: 0 is ``<s>``, 1 is ``</s>``, then every word type by
count descending, ties by model form in code-point order, so a store depends
only on the corpus and the settings, never on how it was counted.  Trigrams
are split into partitions by a hash of their packed key
(:func:`predictor.counting.block_tasks.partition_of`); each partition file is
sorted by (u, v, w) and written in row groups of :data:`ROW_GROUP_ROWS` rows.
Nothing records the time or the machines, so the single-process count and
every Dask count of the same corpus write byte-identical files.

A store is written into a locked ``.foretype-store-*`` folder beside the
target and renamed into place when complete; an existing store at the target
is replaced only then, and anything else there is refused.
"""

from __future__ import annotations

import json
import math
import os
import shutil
import sys
import tempfile
from collections.abc import Iterable, Iterator
from pathlib import Path
from typing import Any

import numpy as np

from ..errors import CorpusError, ModelFileError, OptionError, OutputError
from ..version import __version__
from .cluster_extra import require_cluster_extra
from .counts import CorpusCounts
from .memory import MemoryBudget
from .scratch import TEMP_PREFIX, lock_exclusively, remove_stale
from .tables import MAX_RAW_TYPES, RAW_END, RAW_START, TrigramTable, pack_trigrams, remap_blocks, unpack_trigrams

STORE_FORMAT = "foretype-counts"
STORE_VERSION = 1
MANIFEST = "manifest.json"
VOCABULARY = "vocabulary.parquet"

ROW_GROUP_ROWS = 1 << 20
"""Rows per Parquet row group (20 MiB of columns): the unit a reader holds at a time."""

PARTITION_BYTES = 256 << 20
"""Trigram occurrences (16 bytes each) per partition: partitions hold at most this many table bytes."""

ROW_BYTES = 16


def partitions_for(occurrences: int, partition_bytes: int = PARTITION_BYTES) -> int:
    """How many partitions a count of ``occurrences`` trigram occurrences is split into.

    Distinct trigrams never outnumber occurrences, so no partition's table exceeds
    ``partition_bytes`` (sixteen bytes a row, a key and a count).
    """
    return max(1, math.ceil(occurrences * ROW_BYTES / max(1, partition_bytes)))


def canonical_order(types: list[str], counts: np.ndarray) -> np.ndarray:
    """Raw type ids in store order: the two symbols, then words by count descending, ties by model form."""
    words = sorted(range(2, len(types)), key=lambda t: (-int(counts[t]), types[t]))
    return np.array([RAW_START, RAW_END, *words], dtype=np.int64)


def sentence_rule(wrapped: bool) -> str:
    """The sentence rule a store was counted with, in words."""
    if wrapped:
        return "wrapped: a blank line or a run of . ! ? … ends a sentence; a single line break is a space"
    return "lines: every line break and every run of . ! ? … ends a sentence"


class StoreWriter:
    """Writes a store into a temporary folder beside the target, then renames it into place."""

    def __init__(self, target: str | os.PathLike[str], partitions: int) -> None:
        """Check the target and open the temporary folder.

        Raises:
            OutputError: the target exists and is not a count store, or its folder cannot be written.
        """
        require_cluster_extra("a count store")
        self.target = Path(target)
        self.partitions = partitions
        check_store_target(self.target)
        parent = self.target.parent
        try:
            remove_stale(parent)
            self.folder = Path(tempfile.mkdtemp(prefix=TEMP_PREFIX + "store-", dir=parent))
            self._lock = os.open(self.folder / ".lock", os.O_RDWR | os.O_CREAT, 0o600)
            lock_exclusively(self._lock)
            (self.folder / "trigrams").mkdir()
            (self.folder / "heldout").mkdir()
        except OSError as error:
            raise OutputError(f"{parent}: cannot write the count store here ({error.strerror or error})") from None
        self.rows = {"trigrams": 0, "heldout": 0}

    def write_vocabulary(self, words: list[str], counts: np.ndarray, display: list[str]) -> None:
        """Write the vocabulary table (ids are the row numbers)."""
        import pyarrow as pa

        table = pa.table(
            {
                "id": pa.array(np.arange(len(words), dtype=np.int32)),
                "word": pa.array(words, type=pa.string()),
                "count": pa.array(np.asarray(counts, dtype=np.int64)),
                "display": pa.array(display, type=pa.string()),
            }
        )
        self._write(self.folder / VOCABULARY, [table])

    def write_partition(self, kind: str, part: int, blocks: Iterable[tuple[np.ndarray, np.ndarray]]) -> None:
        """Write one partition from (sorted keys, counts) blocks in key order."""
        import pyarrow as pa

        def tables() -> Iterator[Any]:
            for keys, counts in _rechunk(blocks, ROW_GROUP_ROWS):
                u, v, w = unpack_trigrams(keys)
                self.rows[kind] += len(keys)
                yield pa.table({"u": u, "v": v, "w": w, "count": counts})

        self._write(self.folder / kind / partition_name(part), tables(), schema=_trigram_schema())

    def _write(self, path: Path, tables: Iterable[Any], schema: Any = None) -> None:
        import pyarrow.parquet as pq

        writer = None
        try:
            for table in tables:
                if writer is None:
                    writer = pq.ParquetWriter(path, schema or table.schema, compression="zstd")
                writer.write_table(table, row_group_size=ROW_GROUP_ROWS)
            if writer is None:
                writer = pq.ParquetWriter(path, schema, compression="zstd")
            writer.close()
        except OSError as error:
            raise OutputError(f"{path}: cannot write the count store ({error.strerror or error})") from None

    def commit(self, manifest: dict[str, Any]) -> None:
        """Write the manifest and move the store into place (replacing an older store there)."""
        manifest = {**manifest, "trigram_rows": self.rows["trigrams"], "heldout_rows": self.rows["heldout"], "partitions": self.partitions}
        try:
            (self.folder / MANIFEST).write_text(json.dumps(manifest, indent=2, ensure_ascii=False) + "\n", encoding="utf-8")
            old = None
            if self.target.exists():
                old = Path(tempfile.mkdtemp(prefix=TEMP_PREFIX + "old-store-", dir=self.target.parent))
                os.rename(self.target, old / "store")
            os.rename(self.folder, self.target)
            os.close(self._lock)
            self._lock = -1
            os.unlink(self.target / ".lock")
            if old is not None:
                shutil.rmtree(old, ignore_errors=True)
        except OSError as error:
            raise OutputError(f"{self.target}: cannot write the count store ({error.strerror or error})") from None

    def abort(self) -> None:
        """Remove the temporary folder (after a failure)."""
        if self._lock >= 0:
            shutil.rmtree(self.folder, ignore_errors=True)
            os.close(self._lock)
            self._lock = -1


def partition_name(part: int) -> str:
    """The file name of a partition."""
    return f"part-{part:05d}.parquet"


def _trigram_schema() -> Any:
    import pyarrow as pa

    return pa.schema([("u", pa.int32()), ("v", pa.int32()), ("w", pa.int32()), ("count", pa.int64())])


def _rechunk(blocks: Iterable[tuple[np.ndarray, np.ndarray]], rows: int) -> Iterator[tuple[np.ndarray, np.ndarray]]:
    """The same rows in blocks of exactly ``rows`` (the last one shorter), whatever blocks come in."""
    keys: list[np.ndarray] = []
    counts: list[np.ndarray] = []
    held = 0
    for block_keys, block_counts in blocks:
        keys.append(block_keys)
        counts.append(block_counts)
        held += len(block_keys)
        if held >= rows:
            all_keys, all_counts = np.concatenate(keys), np.concatenate(counts)
            cut = held - held % rows
            for start in range(0, cut, rows):
                yield all_keys[start : start + rows], all_counts[start : start + rows]
            keys, counts, held = [all_keys[cut:]], [all_counts[cut:]], held - cut
    if held:
        yield np.concatenate(keys), np.concatenate(counts)


def check_store_target(target: Path) -> None:
    """Refuse a target that exists and is not a count store, or whose folder is missing.

    Raises:
        OutputError: see above.
    """
    if target.exists() and not (target.is_dir() and (target / MANIFEST).is_file()):
        raise OutputError(f"{target}: exists and is not a count store (refusing to replace it)")
    parent = target.parent
    if not parent.is_dir() or not os.access(parent, os.W_OK | os.X_OK):
        raise OutputError(f"{parent}: not a writable folder for the count store")


def manifest_for(
    *,
    files: list[dict[str, Any]],
    skipped_files: int,
    wrapped: bool,
    replace_bad_bytes: bool,
    tokens: int,
    sentences: int,
    types: int,
    unlisted_tokens: int,
    partition_bytes: int,
) -> dict[str, Any]:
    """The manifest of a store (rows and partitions are added when it is committed)."""
    return {
        "format": STORE_FORMAT,
        "format_version": STORE_VERSION,
        "foretype_version": __version__,
        "tokeniser": {
            "normalisation": "NFC",
            "words": "runs of letters, digits and combining marks, joined by ' ’ - (and . , : between digits)",
            "model_form": "lower case, ’ written as '",
            "wrapped": wrapped,
            "replace_bad_bytes": replace_bad_bytes,
        },
        "sentence_rule": sentence_rule(wrapped),
        "padding": "<s> <s> w1 .. wn </s>; ids 0 = <s>, 1 = </s>",
        "heldout": "every 20th sentence of the corpus (the 20th, 40th, ...), also counted in trigrams",
        "files": files,
        "skipped_files": skipped_files,
        "tokens": tokens,
        "sentences": sentences,
        "types": types,
        "unlisted_tokens": unlisted_tokens,
        "partition_bytes": partition_bytes,
        "tables": {"vocabulary": VOCABULARY, "trigrams": "trigrams/", "heldout": "heldout/"},
    }


def file_entry(path: str, size: int, crc: int) -> dict[str, Any]:
    """A corpus file as the manifest lists it."""
    return {"path": path, "bytes": size, "crc32": f"{crc:08x}"}


class StoreTable:
    """A trigram table read from a store's partition files, as estimation uses a corpus table.

    Offers :meth:`remap` (stream the partitions, keep only the table over a chosen
    vocabulary in memory, checked against the memory budget) and ``len``.
    """

    def __init__(self, paths: list[Path], rows: int, budget: MemoryBudget, dictionary_bytes: int) -> None:
        """Wrap partition files holding ``rows`` rows in all."""
        self.paths = paths
        self.rows = rows
        self._budget = budget
        self._dictionary_bytes = dictionary_bytes

    def __len__(self) -> int:
        return self.rows

    def blocks(self) -> Iterator[tuple[np.ndarray, np.ndarray]]:
        """Yield (packed keys, counts) one row group at a time (sorted within a partition)."""
        import pyarrow.parquet as pq

        for path in self.paths:
            try:
                handle = pq.ParquetFile(path)
                for group in range(handle.num_row_groups):
                    table = handle.read_row_group(group)
                    columns = [table.column(name).to_numpy() for name in ("u", "v", "w", "count")]
                    yield pack_trigrams(*columns[:3]), columns[3].astype(np.int64, copy=False)
            except (OSError, ValueError, KeyError) as error:
                raise ModelFileError(f"{path}: not a readable count store table ({error})") from None

    def remap(self, mapping: np.ndarray, base: int) -> TrigramTable:
        """Map every id through ``mapping`` and merge rows that become equal.

        Raises:
            CapacityError: the table over the new ids would not fit the memory budget.
        """
        return remap_blocks(self.blocks(), mapping, base, self._budget, self._dictionary_bytes)

    def close(self) -> None:
        """Nothing to release (the store stays on disk)."""


def read_manifest(path: str | os.PathLike[str]) -> dict[str, Any]:
    """Read and check a store's manifest.

    Raises:
        ModelFileError: not a count store, or one of a format this engine cannot read.
    """
    folder = Path(path)
    try:
        manifest = json.loads((folder / MANIFEST).read_text(encoding="utf-8"))
    except FileNotFoundError:
        raise ModelFileError(f"{folder}: not a count store (no {MANIFEST})") from None
    except (OSError, ValueError) as error:
        raise ModelFileError(f"{folder}: unreadable count store manifest ({error})") from None
    if not isinstance(manifest, dict) or manifest.get("format") != STORE_FORMAT:
        raise ModelFileError(f"{folder}: not a count store")
    if manifest.get("format_version") != STORE_VERSION:
        raise ModelFileError(f"{folder}: count store format version {manifest.get('format_version')}, this engine reads {STORE_VERSION}; count the corpus again")
    return manifest


def open_count_store(path: str | os.PathLike[str], *, max_memory: int | None = None) -> tuple[CorpusCounts, dict[str, Any]]:
    """Open a count store as the counts a build or sweep estimates from.

    Args:
        path: the store folder.
        max_memory: the ceiling on peak memory while models are estimated (None: the default).

    Returns:
        The counts (trigram tables stay on disk and stream during estimation) and the manifest.

    Raises:
        OptionError: the cluster extra is not installed.
        ModelFileError: not a readable count store.
        CapacityError: the vocabulary alone exceeds the budget.
    """
    require_cluster_extra("a count store")
    import pyarrow.parquet as pq

    manifest = read_manifest(path)
    folder = Path(path)
    budget = MemoryBudget.of(max_memory)
    try:
        vocabulary = pq.read_table(folder / VOCABULARY)
        words = vocabulary.column("word").to_pylist()
        display = vocabulary.column("display").to_pylist()
        counts = vocabulary.column("count").to_numpy().astype(np.int64)
    except (OSError, ValueError, KeyError) as error:
        raise ModelFileError(f"{folder / VOCABULARY}: not a readable vocabulary table ({error})") from None
    if len(words) < 2 or words[0] != "<s>" or words[1] != "</s>" or len(words) > MAX_RAW_TYPES:
        raise ModelFileError(f"{folder / VOCABULARY}: not a count store vocabulary")
    dictionary_bytes = sum(map(sys.getsizeof, words)) + sum(map(sys.getsizeof, display)) + 32 * len(words)
    parts = manifest.get("partitions", 0)
    tables = {}
    for kind in ("trigrams", "heldout"):
        paths = [folder / kind / partition_name(p) for p in range(parts)]
        missing = [p for p in paths if not p.is_file()]
        if missing:
            raise ModelFileError(f"{missing[0]}: missing from the count store")
        tables[kind] = StoreTable(paths, int(manifest.get(f"{'trigram' if kind == 'trigrams' else 'heldout'}_rows", 0)), budget, dictionary_bytes)
    result = CorpusCounts(
        types=words,
        display=display,
        type_counts=counts,
        table=tables["trigrams"],  # type: ignore[arg-type]
        heldout=tables["heldout"],  # type: ignore[arg-type]
        corpus_tokens=int(manifest["tokens"]),
        sentences=int(manifest["sentences"]),
        files=len(manifest["files"]),
        skipped_files=int(manifest.get("skipped_files", 0)),
        unlisted_tokens=int(manifest.get("unlisted_tokens", 0)),
        dictionary_bytes=dictionary_bytes,
        budget=budget,
    )
    return result, manifest


def store_wrapped(manifest: dict[str, Any]) -> bool:
    """Whether a store was counted with ``--wrapped``."""
    return bool(manifest.get("tokeniser", {}).get("wrapped", False))


def require_corpus_free(corpus: list[str], counts: str | None) -> None:
    """A build or sweep takes a corpus or a count store, not both and not neither.

    Raises:
        OptionError: both or neither given.
    """
    if counts is not None and corpus:
        raise OptionError("give either corpus files or --counts, not both")
    if counts is None and not corpus:
        raise CorpusError("no corpus given (name corpus files or folders, or a count store with --counts)")
