"""Corpus files as blocks of whole lines, for counting on many machines.

A file is cut into byte ranges ``[start, end)`` of a fixed size; a block owns
every line that *starts* inside its range, so it reads from the first line
start at or after ``start`` to the first line start at or after ``end`` (past
``end`` when a line crosses it).  Every line therefore belongs to exactly one
block and is never split, whatever the block size, and each block is read
independently (from a local path or any URL fsspec understands).

Each block also reports the CRC-32 of its raw range; the ranges tile the file,
so the file's CRC-32 follows by combining them (:func:`crc32_combine`), the
same value ``zlib.crc32`` gives over the whole file.
"""

from __future__ import annotations

import os
import zlib
from dataclasses import dataclass

from ..errors import CorpusError
from .corpus import resolve_corpus

BLOCK_BYTES = 32 << 20
"""Default block size (32 MiB of text: several seconds of tokenising, a few hundred MB while counted)."""

_EXTEND_BYTES = 1 << 16
_BOM = b"\xef\xbb\xbf"


@dataclass(frozen=True)
class Block:
    """One block of a corpus file.

    Attributes:
        path: the file (a local path or an fsspec URL).
        index: the block's number in corpus order.
        file_index: the file's number in corpus order.
        start: first byte of the block's range.
        end: byte after the range.
        size: the file's size in bytes.
    """

    path: str
    index: int
    file_index: int
    start: int
    end: int
    size: int

    @property
    def last_in_file(self) -> bool:
        """Whether this is the file's last block."""
        return self.end >= self.size


@dataclass(frozen=True)
class BlockText:
    """The raw bytes a block owns, read as :func:`read_block` reads them.

    Attributes:
        data: the whole lines the block owns (a UTF-8 byte order mark at the file's start removed).
        crc: CRC-32 of the raw range ``[start, end)``.
        length: bytes in the raw range.
    """

    data: bytes
    crc: int
    length: int


def plan_blocks(files: list[tuple[str, int]], block_bytes: int = BLOCK_BYTES) -> list[Block]:
    """Cut files into blocks.

    Args:
        files: (path or URL, size in bytes) of each file, in corpus order.
        block_bytes: the size of each block's range (the last one of a file may be shorter).

    Returns:
        The blocks, in corpus order; an empty file has one empty block.
    """
    block_bytes = max(1, block_bytes)
    blocks: list[Block] = []
    for file_index, (path, size) in enumerate(files):
        start = 0
        while True:
            end = min(size, start + block_bytes)
            blocks.append(Block(path, len(blocks), file_index, start, end, size))
            start = end
            if start >= size:
                break
    return blocks


def _open(path: str):  # type: ignore[no-untyped-def]
    if "://" in path:
        import fsspec

        return fsspec.open(path, "rb").open()
    return open(path, "rb")  # noqa: SIM115 - closed by the caller's with


def read_block(block: Block) -> BlockText:
    """Read the whole lines a block owns.

    Raises:
        CorpusError: the file cannot be read.
    """
    try:
        with _open(block.path) as handle:
            before = 1 if block.start > 0 else 0
            handle.seek(block.start - before)
            data = handle.read(block.end - block.start + before)
            raw = data[before:]
            if len(raw) != block.end - block.start:
                raise CorpusError(f"{block.path}: the file changed while it was read")
            begin = 0
            if before:
                newline = data.find(b"\n")
                if newline < 0 or newline + 1 >= len(data):
                    # No line starts inside the range: an earlier block reads it.
                    return BlockText(b"", zlib.crc32(raw), len(raw))
                begin = newline + 1
            text = data[begin:]
            if not block.last_in_file and not text.endswith(b"\n"):
                pieces = [text]
                while True:
                    more = handle.read(_EXTEND_BYTES)
                    if not more:
                        break
                    newline = more.find(b"\n")
                    if newline >= 0:
                        pieces.append(more[: newline + 1])
                        break
                    pieces.append(more)
                text = b"".join(pieces)
    except OSError as error:
        raise CorpusError(f"{block.path}: cannot read ({getattr(error, 'strerror', None) or error})") from None
    if block.start == 0 and text.startswith(_BOM):
        text = text[len(_BOM) :]
    return BlockText(text, zlib.crc32(raw), len(raw))


# CRC-32 combination, after zlib's crc32_combine: the CRC of A+B from crc(A), crc(B) and len(B),
# by applying len(B) zero bytes to crc(A) as powers of the CRC's GF(2) shift matrix.
_POLY = 0xEDB88320


def _times(matrix: list[int], vector: int) -> int:
    total = 0
    row = 0
    while vector:
        if vector & 1:
            total ^= matrix[row]
        vector >>= 1
        row += 1
    return total


def _square(matrix: list[int]) -> list[int]:
    return [_times(matrix, matrix[n]) for n in range(32)]


def crc32_combine(crc_a: int, crc_b: int, length_b: int) -> int:
    """The CRC-32 of the concatenation A + B, from the CRC-32 of each and B's length."""
    if length_b <= 0:
        return crc_a
    odd = [_POLY] + [1 << n for n in range(31)]  # the operator for one zero bit
    even = _square(odd)  # two zero bits
    odd = _square(even)  # four zero bits
    while True:
        even = _square(odd)  # one zero byte first, then doubling
        if length_b & 1:
            crc_a = _times(even, crc_a)
        length_b >>= 1
        if not length_b:
            break
        odd = _square(even)
        if length_b & 1:
            crc_a = _times(odd, crc_a)
        length_b >>= 1
        if not length_b:
            break
    return crc_a ^ crc_b


def local_size(path: str) -> int:
    """A local file's size (0 if it cannot be read; reading it then reports the error)."""
    try:
        return os.path.getsize(path)
    except OSError:
        return 0


def corpus_files(paths: list[str], *, reject_binary: bool = False) -> tuple[list[tuple[str, int]], int]:
    """The files a list of corpus paths and URLs names, with their sizes.

    Local paths follow :func:`predictor.corpus.resolve_corpus` (folders expanded,
    binary files in folders skipped); a URL (``scheme://...``) names a file, or a
    folder whose non-hidden files are read in sorted order.

    Returns:
        (path or URL, size) of each file in corpus order, and how many binary files were skipped.

    Raises:
        CorpusError: a path is missing, unreadable or binary, or no text file remains.
    """
    found: list[tuple[str, int]] = []
    skipped = 0
    for raw in paths:
        if "://" not in str(raw):
            local = resolve_corpus([raw], reject_binary=reject_binary)
            found.extend((str(p), local_size(str(p))) for p in local.files)
            skipped += len(local.skipped)
            continue
        remote, more = _remote_files(str(raw), reject_binary)
        found.extend(remote)
        skipped += more
    return found, skipped


def _remote_files(url: str, reject_binary: bool) -> tuple[list[tuple[str, int]], int]:
    import fsspec

    try:
        fs, root = fsspec.core.url_to_fs(url)
        if fs.isdir(root):
            names = sorted(p for p in fs.find(root) if not any(part.startswith(".") for part in p[len(root) :].split("/")))
            inside = True
        elif fs.exists(root):
            names, inside = [root], False
        else:
            raise CorpusError(f"{url}: no such file or folder")
        files: list[tuple[str, int]] = []
        skipped = 0
        for name in names:
            with fs.open(name, "rb") as handle:
                binary = b"\x00" in handle.read(8192)
            full = fs.unstrip_protocol(name)
            if binary:
                if not inside or reject_binary:
                    raise CorpusError(f"{full}: binary file, not text")
                skipped += 1
                continue
            files.append((full, int(fs.size(name))))
    except (OSError, ValueError, ImportError) as error:
        raise CorpusError(f"{url}: cannot read ({error})") from None
    if not files:
        raise CorpusError(f"{url}: no text files to read")
    return files, skipped
