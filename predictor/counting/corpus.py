"""Reading corpus files: streaming, UTF-8 checking, and folders of files.

Files are read in chunks of whole lines, so a corpus of any size streams with
bounded memory; only a line longer than a chunk plus :data:`LINE_EXTENSION_BYTES`
(a file with no line breaks, say) is cut, before a word where it can be.  A file
that is not valid UTF-8 is reported with its name and line number unless bad
bytes are to be replaced.
"""

from __future__ import annotations

import os
import sys
from collections.abc import Iterable, Iterator
from dataclasses import dataclass, field
from pathlib import Path

from ..errors import CorpusError, EncodingError

CHUNK_BYTES = 1 << 22
"""How many bytes one chunk holds before it is extended to the next line break (4 MiB)."""

LINE_EXTENSION_BYTES = 1 << 20
"""How far past a chunk (at least) a line is read to its end before it is cut (1 MiB)."""

_SNIFF_BYTES = 8192
_WIDE_TEXT_MARKS = {b"\xff\xfe": "UTF-16", b"\xfe\xff": "UTF-16", b"\xff\xfe\x00\x00": "UTF-32", b"\x00\x00\xfe\xff": "UTF-32"}


@dataclass
class CorpusFiles:
    """The text files a list of corpus paths names, after folders are expanded.

    Attributes:
        files: the files to read, in order.
        skipped: files inside folders that were passed over as binary.
    """

    files: list[Path] = field(default_factory=list)
    skipped: list[Path] = field(default_factory=list)


def looks_binary(path: Path) -> bool:
    """Tell whether a file looks like binary data (a NUL byte in its first 8 KiB)."""
    with path.open("rb") as handle:
        return b"\x00" in handle.read(_SNIFF_BYTES)


def _not_text_reason(path: Path) -> str:
    """Why a file named directly is refused: binary data, or text in a wide encoding."""
    try:
        with path.open("rb") as handle:
            head = handle.read(4)
    except OSError:
        head = b""
    for mark in sorted(_WIDE_TEXT_MARKS, key=len, reverse=True):
        if head.startswith(mark):
            name = _WIDE_TEXT_MARKS[mark]
            return f"{name} text, and foretype reads UTF-8 (convert it first, e.g. iconv -f {name} -t UTF-8)"
    return "binary file, not text"


def resolve_corpus(paths: Iterable[str | os.PathLike[str]], *, reject_binary: bool = False) -> CorpusFiles:
    """Expand corpus paths into the list of files to read.

    A folder stands for every non-hidden file below it, in sorted order; binary
    files found there are skipped and counted (or rejected with ``reject_binary``).
    A binary file named directly is always an error.

    Args:
        paths: files or folders.
        reject_binary: fail on a binary file inside a folder instead of skipping it.

    Returns:
        The files to read and the files skipped.

    Raises:
        CorpusError: a path is missing or unreadable, names a binary file, or no
            text file remains.
    """
    result = CorpusFiles()
    for raw in paths:
        path = Path(raw)
        if path.is_dir():
            _add_folder(result, path, reject_binary=reject_binary)
        else:
            result.files.append(_named_file(path))
    if not result.files:
        raise CorpusError("no text files to read" + (f" ({len(result.skipped)} binary files skipped)" if result.skipped else ""))
    return result


def _add_folder(result: CorpusFiles, folder: Path, *, reject_binary: bool) -> None:
    """Add every non-hidden file below a folder, in sorted order: text to the files, binary to the skipped (or an error)."""
    for found in sorted(p for p in folder.rglob("*") if p.is_file()):
        if any(part.startswith(".") for part in found.relative_to(folder).parts):
            continue
        if _readable_binary(found):
            if reject_binary:
                raise CorpusError(f"{found}: binary file inside a corpus folder")
            result.skipped.append(found)
        else:
            result.files.append(found)


def _named_file(path: Path) -> Path:
    """Check a path named directly (not a folder): it must be an existing regular text file."""
    if not path.exists():
        raise CorpusError(f"{path}: no such file or folder")
    if not path.is_file():
        raise CorpusError(f"{path}: not a regular file (a pipe or device)")
    if _readable_binary(path):
        raise CorpusError(f"{path}: {_not_text_reason(path)}")
    return path


def _readable_binary(path: Path) -> bool:
    """Tell whether a file looks binary; a file that cannot be read is a CorpusError."""
    try:
        return looks_binary(path)
    except OSError as error:
        raise CorpusError(f"{path}: cannot read ({error.strerror or error})") from None


def iter_chunks(path: Path, *, replace_bad_bytes: bool = False, chunk_bytes: int = CHUNK_BYTES) -> Iterator[str]:
    """Yield a text file as decoded chunks of whole lines.

    A chunk is extended to the end of its last line, by at most
    ``max(chunk_bytes, LINE_EXTENSION_BYTES)``; a longer line is cut before its
    last word that fits (or, without a space, at a character boundary) and
    continues in the next chunk.

    Args:
        path: the file.
        replace_bad_bytes: replace invalid UTF-8 with U+FFFD instead of failing.
        chunk_bytes: the chunk size before extending to the next line break.

    Raises:
        EncodingError: the file is not valid UTF-8 (names the file and line).
        CorpusError: the file cannot be read.
    """
    errors = "replace" if replace_bad_bytes else "strict"
    extension = max(chunk_bytes, LINE_EXTENSION_BYTES)
    line_number = 1
    try:
        handle = path.open("rb")
    except OSError as error:
        raise CorpusError(f"{path}: cannot read ({error.strerror or error})") from None
    with handle:
        first = True
        left_over = b""
        while True:
            try:
                data = left_over + handle.read(max(1, chunk_bytes - len(left_over)))
                left_over = b""
                if data and not data.endswith(b"\n"):
                    tail = handle.readline(extension)
                    data += tail
                    if len(tail) == extension and not tail.endswith(b"\n"):
                        cut = _cut_long_line(data)
                        data, left_over = data[:cut], data[cut:]
            except OSError as error:
                raise CorpusError(f"{path}: cannot read ({error.strerror or error})") from None
            if not data:
                return
            if first and data.startswith(b"\xef\xbb\xbf"):
                data = data[3:]
            first = False
            try:
                text = data.decode("utf-8", errors)
            except UnicodeDecodeError as error:
                line = line_number + data.count(b"\n", 0, error.start)
                bad = data[error.start]
                raise EncodingError(f"{path}:{line}: not valid UTF-8 (byte 0x{bad:02x}); pass --replace-bad-bytes to replace such bytes") from None
            line_number += data.count(b"\n")
            yield text


def _cut_long_line(data: bytes) -> int:
    """Where to cut a chunk that ends inside a very long line: before its last word, else at a character start."""
    space = max(data.rfind(b" "), data.rfind(b"\t"))
    while 0 <= space < len(data) - 1 and data[space + 1] in b" \t":
        space += 1
    if space > 0 and space < len(data) - 1:
        return space + 1
    cut = len(data) - 1
    while cut > 0 and data[cut] & 0xC0 == 0x80:  # a UTF-8 continuation byte
        cut -= 1
    return cut if cut > 0 else len(data)


def read_text_file(path: str, *, replace_bad_bytes: bool = False) -> str:
    """Read a UTF-8 text file for scoring or simulation (``-``: standard input).

    Args:
        path: the file, or ``-`` for standard input.
        replace_bad_bytes: replace invalid UTF-8 with U+FFFD instead of failing.

    Raises:
        CorpusError / EncodingError: missing, binary or invalid UTF-8.
    """
    if str(path) == "-":
        data = sys.stdin.buffer.read()
        try:
            return data.decode("utf-8", "replace" if replace_bad_bytes else "strict")
        except UnicodeDecodeError as error:
            line = data[: error.start].count(b"\n") + 1
            raise EncodingError(f"standard input: not valid UTF-8 at line {line} (add --replace-bad-bytes to read it anyway)") from None
    found = resolve_corpus([path])
    return "".join(chunk for file in found.files for chunk in iter_chunks(Path(file), replace_bad_bytes=replace_bad_bytes))
