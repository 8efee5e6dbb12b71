"""What a worker does with one block of a corpus: the two counting passes and the merges.

Pass 1 (:func:`scan_block`) tokenises a block and returns its written forms
with their counts (split into parts by a hash of the model form, so the
reduction of the vocabulary runs in parallel too) and a :class:`BlockScan`:
how the block's sentences begin and end, so the client can tell which
sentences cross block boundaries and number every sentence of the corpus.

Pass 2 (:func:`count_block`) tokenises the block again, maps every word to its
id in the vocabulary the client chose, counts the trigrams of every sentence
that starts and ends inside the block with numpy (one int64 key per trigram,
no Python object per n-gram), and splits the sorted table into partitions by
a hash of the key.  The few sentences that cross a block boundary come back as
id arrays and are counted by the client.

Every function here is deterministic, so a task Dask reruns after losing a
worker gives exactly the same result.
"""

from __future__ import annotations

import zlib
from dataclasses import dataclass

import numpy as np

from ..text import are_words, model_form, tokens
from .blocks import Block, read_block
from .counter import HELDOUT_EVERY
from .spill import sum_duplicates
from .tables import RAW_END, RAW_START, pack_trigrams

Table = tuple[np.ndarray, np.ndarray]
"""Sorted unique int64 trigram keys and their int64 counts."""

FormCounts = dict[str, list[int]]
"""Written form -> [occurrences, sentence-initial occurrences, first position (block index << 32 | word number)]."""

_EMPTY = np.zeros(0, dtype=np.int64)
_HASH = np.uint64(0x9E3779B97F4A7C15)


@dataclass(frozen=True)
class BlockScan:
    """What pass 1 learns about a block besides its forms.

    Attributes:
        index: the block's number.
        file_index: its file's number.
        crc: CRC-32 of the block's raw byte range.
        length: bytes in that range.
        newlines: line breaks in the text the block owns.
        bad: (line within the block, byte value) of the first invalid UTF-8, or None.
        words: word tokens.
        has_end: the block holds a sentence end.
        head_words: words before the first sentence end (all words without one).
        closed_inside: sentence ends after the first one that close a sentence (follow a word).
        tail_words: words after the last sentence end.
        head_form: the block's first token when it is a word (its sentence-initial
            count depends on the block before), else None.
    """

    index: int
    file_index: int
    crc: int
    length: int
    newlines: int
    bad: tuple[int, int] | None
    words: int
    has_end: bool
    head_words: int
    closed_inside: int
    tail_words: int
    head_form: str | None


def part_of_form(form: str, parts: int) -> int:
    """The vocabulary part a model form belongs to (a hash stable across processes)."""
    return zlib.crc32(form.encode("utf-8", "surrogatepass")) % parts


def _block_tokens(block: Block, wrapped: bool, replace_bad_bytes: bool) -> tuple[list[str] | None, int, int, int, tuple[int, int] | None]:
    read = read_block(block)
    newlines = read.data.count(b"\n")
    try:
        text = read.data.decode("utf-8", "replace" if replace_bad_bytes else "strict")
    except UnicodeDecodeError as error:
        line = read.data.count(b"\n", 0, error.start) + 1
        return None, read.crc, read.length, newlines, (line, read.data[error.start])
    return tokens(text, wrapped=wrapped), read.crc, read.length, newlines, None


def scan_block(block: Block, wrapped: bool, replace_bad_bytes: bool, parts: int) -> tuple[BlockScan, list[FormCounts]]:
    """Pass 1: the block's sentence structure and its written forms' counts.

    Args:
        block: the block.
        wrapped: treat single line breaks as spaces.
        replace_bad_bytes: replace invalid UTF-8 instead of reporting it.
        parts: how many parts the forms are split into (by :func:`part_of_form` of the model form).

    Returns:
        The scan and, per part, the forms' counts (the block's first word is not
        counted as sentence-initial; the client adds that when it applies).
    """
    found, crc, length, newlines, bad = _block_tokens(block, wrapped, replace_bad_bytes)
    empty: list[FormCounts] = [{} for _ in range(parts)]
    if found is None or not found:
        return BlockScan(block.index, block.file_index, crc, length, newlines, bad, 0, False, 0, 0, 0, None), empty
    is_word = np.array(are_words(found), dtype=bool)
    ends = np.flatnonzero(~is_word)
    words = int(is_word.sum())
    has_end = len(ends) > 0
    head_words = int(ends[0]) if has_end else words
    tail_words = len(found) - 1 - int(ends[-1]) if has_end else 0
    if has_end:
        later = ends[1:]
        closed_inside = int(is_word[later - 1].sum())
    else:
        closed_inside = 0
    initial = np.zeros(len(found), dtype=bool)
    initial[1:] = is_word[1:] & ~is_word[:-1]
    word_positions = np.flatnonzero(is_word)
    written = [found[i] for i in word_positions.tolist()]
    numbers = {form: number for number, form in enumerate(dict.fromkeys(written))}
    number = np.fromiter(map(numbers.__getitem__, written), dtype=np.int64, count=len(written))
    totals = np.bincount(number, minlength=len(numbers)).tolist()
    initials = np.bincount(number, weights=initial[word_positions], minlength=len(numbers)).astype(np.int64).tolist()
    _, first = np.unique(number, return_index=True)
    base = block.index << 32
    for form, total, first_initial, position in zip(numbers, totals, initials, first.tolist()):
        empty[part_of_form(model_form(form), parts)][form] = [total, first_initial, base | position]
    head_form = found[0] if is_word[0] else None
    scan = BlockScan(block.index, block.file_index, crc, length, newlines, bad, words, has_end, head_words, closed_inside, tail_words, head_form)
    return scan, empty


def merge_forms(*tables: FormCounts) -> FormCounts:
    """Sum form counts of several blocks (keeping each form's earliest position)."""
    merged: FormCounts = {}
    for table in tables:
        for form, (total, initial, first) in table.items():
            mine = merged.get(form)
            if mine is None:
                merged[form] = [total, initial, first]
            else:
                mine[0] += total
                mine[1] += initial
                if first < mine[2]:
                    mine[2] = first
    return merged


def choose_types(forms: FormCounts, extra_initial: dict[str, int]) -> list[tuple[str, int, str]]:
    """The word types of one vocabulary part: (model form, count, display form).

    The display form is the type's written form with the most non-initial
    occurrences, then the most initial ones, then the earliest; a form seen only
    at sentence starts that is just the model form capitalised is shown in the
    model form (the rule of :meth:`predictor.counting.CorpusCounter._display_forms`).

    Args:
        forms: the part's merged form counts.
        extra_initial: sentence-initial occurrences the client found at block starts.
    """
    by_type: dict[str, list] = {}
    for form, (total, initial, first) in forms.items():
        initial += extra_initial.get(form, 0)
        rank = (total - initial, initial, -first)
        model = model_form(form)
        entry = by_type.get(model)
        if entry is None:
            by_type[model] = [total, rank, form]
        else:
            entry[0] += total
            if rank > entry[1]:
                entry[1] = rank
                entry[2] = form
    result = []
    for model, (count, rank, form) in by_type.items():
        if rank[0] == 0 and form[:1].lower() + form[1:] == model:
            form = model
        result.append((model, count, form))
    return result


def sentence_keys(ids: np.ndarray, first_sentence: int) -> tuple[np.ndarray, np.ndarray, int]:
    """Trigram keys of complete sentences, as :class:`predictor.counting.CorpusCounter` counts them.

    Args:
        ids: int32 word ids; the array starts at a sentence start and ends with a
            sentence end (:data:`RAW_END`); an end right after an end closes an
            empty sentence and is dropped.
        first_sentence: the corpus-wide number of the first sentence.

    Returns:
        Packed keys (int64, one per trigram occurrence), whether each belongs to
        a held-out sentence (every :data:`HELDOUT_EVERY`-th), and the number of sentences.
    """
    is_end = ids == RAW_END
    after_end = np.empty_like(is_end)
    if len(ids):
        after_end[0] = True
        after_end[1:] = is_end[:-1]
    keep = ~(is_end & after_end)
    ids, is_end = ids[keep], is_end[keep]
    if len(ids) == 0:
        return _EMPTY, np.zeros(0, dtype=bool), 0
    widths = np.where(is_end, 3, 1)
    slot = 2 + np.cumsum(widths) - widths
    padded = np.full(2 + int(widths.sum()), RAW_START, dtype=np.int32)
    padded[slot] = ids
    u, v, w = padded[:-2], padded[1:-1], padded[2:]
    valid = w != RAW_START
    sentence_of = np.cumsum(padded == RAW_END)[2:] - (w == RAW_END) + first_sentence
    keys = pack_trigrams(u[valid], v[valid], w[valid])
    held = sentence_of[valid] % HELDOUT_EVERY == HELDOUT_EVERY - 1
    return keys, held, int(is_end.sum())


def partition_of(keys: np.ndarray, partitions: int) -> np.ndarray:
    """Each key's partition: a multiplicative hash of the key, modulo ``partitions`` (int64 array)."""
    mixed = (keys.astype(np.uint64) * _HASH) >> np.uint64(32)
    return (mixed % np.uint64(partitions)).astype(np.int64)


def split_table(keys: np.ndarray, counts: np.ndarray, partitions: int) -> list[Table]:
    """Split a sorted table into ``partitions`` sorted tables by :func:`partition_of`."""
    if partitions == 1:
        return [(keys, counts)]
    part = partition_of(keys, partitions)
    order = np.argsort(part, kind="stable")
    bounds = np.searchsorted(part[order], np.arange(1, partitions))
    return list(zip(np.split(keys[order], bounds), np.split(counts[order], bounds)))


def count_keys(keys: np.ndarray, held: np.ndarray, partitions: int) -> tuple[list[Table], list[Table]]:
    """Count trigram keys and split the table and its held-out part into partitions."""
    table = sum_duplicates(keys)
    heldout = sum_duplicates(keys[held])
    return split_table(*table, partitions), split_table(*heldout, partitions)


@dataclass(frozen=True)
class BlockPlan:
    """What the client tells pass 2 about a block, from every block's pass 1.

    Attributes:
        carry_in: a sentence from earlier blocks is still open when the block starts.
        first_sentence: the corpus-wide number of the first sentence that starts in the block.
    """

    carry_in: bool
    first_sentence: int


def count_block(
    block: Block, wrapped: bool, replace_bad_bytes: bool, vocabulary: dict[str, int], unlisted: int, plan: BlockPlan, partitions: int
) -> tuple[list[Table], list[Table], np.ndarray, np.ndarray]:
    """Pass 2: count the trigrams of the sentences inside a block, split into partitions.

    Args:
        block: the block.
        wrapped: treat single line breaks as spaces.
        replace_bad_bytes: replace invalid UTF-8.
        vocabulary: model form -> word id (ids 0 and 1 are the start and end symbols).
        unlisted: the id of a model form missing from ``vocabulary``.
        plan: the block's place among the corpus's sentences.
        partitions: how many partitions the keys are split into.

    Returns:
        The trigram table's partitions, the held-out table's partitions, the
        ids before the block's first sentence end (inclusive) when a sentence
        was open at its start (all its ids if it holds no end), and the ids after
        its last sentence end (the client counts these across blocks).
    """
    found, _, _, _, _ = _block_tokens(block, wrapped, replace_bad_bytes)
    none = np.zeros(0, dtype=np.int32)
    if not found:
        empty = [(_EMPTY, _EMPTY)] * partitions
        return empty, list(empty), none, none
    get = vocabulary.get
    flags = are_words(found)
    lookup = {token: (get(model_form(token), unlisted) if word else RAW_END) for token, word in zip(found, flags)}
    ids = np.fromiter(map(lookup.__getitem__, found), dtype=np.int32, count=len(found))
    del found, lookup
    ends = np.flatnonzero(ids == RAW_END)
    head = none
    start = 0
    if plan.carry_in:
        if not len(ends):
            empty = [(_EMPTY, _EMPTY)] * partitions
            return empty, list(empty), ids, none
        start = int(ends[0]) + 1
        head = ids[:start]
    stop = int(ends[-1]) + 1 if len(ends) and ends[-1] >= start else start
    tail = ids[stop:]
    keys, held, _ = sentence_keys(ids[start:stop], plan.first_sentence)
    table, heldout = count_keys(keys, held, partitions)
    return table, heldout, head, tail


def merge_partition(*tables: Table) -> Table:
    """Merge sorted tables of one partition, summing the counts of equal keys."""
    tables = tuple(t for t in tables if len(t[0]))
    if not tables:
        return _EMPTY, _EMPTY
    if len(tables) == 1:
        return tables[0]
    return sum_duplicates(np.concatenate([k for k, _ in tables]), np.concatenate([c for _, c in tables]))


def table_rows(table: Table) -> int:
    """Rows of a table."""
    return len(table[0])


def table_slice(table: Table, start: int, stop: int) -> Table:
    """Rows ``start:stop`` of a table (what the client fetches at a time)."""
    return table[0][start:stop].copy(), table[1][start:stop].copy()


def piece(result: tuple, *where: int):  # type: ignore[no-untyped-def]
    """``result[where[0]][where[1]]...``: one piece of a task's result, as its own task."""
    for index in where:
        result = result[index]
    return result
