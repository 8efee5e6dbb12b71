"""The model file: a versioned header and named arrays, memory-mapped on load.

Layout (all integers little-endian)::

    offset 0   8 bytes   magic b"FTMODEL\\x00"
    offset 8   u32       format version
    offset 12  u32       header length H in bytes
    offset 16  u32       CRC-32 of the header bytes
    offset 20  u32       reserved (0)
    offset 24  H bytes   header: UTF-8 JSON {"meta": {...}, "sections": [...]}
    then       sections, each starting at a multiple of 64 bytes

The first 24 bytes keep this layout in every format version, so any engine can
tell a newer file from a damaged one.  Each section entry records ``name``,
``dtype`` (one of a fixed list), ``shape``, ``offset``, ``nbytes`` and
``crc32``.  Nothing in the file is executed: the header is plain JSON and the
sections are raw arrays viewed with ``numpy.frombuffer`` over a read-only
``mmap``.

Every load checks, before any array is used: the file is a regular file; the
magic and version; the header's length and checksum; that the header is the
expected JSON; that each section entry is well formed, has the size its dtype
and shape imply, starts after the header on a 64-byte boundary and lies inside
the file without overlapping another; and every section's CRC-32.  zlib's CRC-32
runs at several GB/s (bench/bench_memory.py prints the figure), a few
milliseconds for a 50 MB model, so no load ever works on bytes that differ from
what was written.

Files are written to a locked temporary file beside the target (named with
:data:`~foretype.counting.scratch.TEMP_PREFIX`), flushed to disk and renamed over it, so
a failed or killed write never leaves a half-written model or destroys the
previous one; the next write into the same folder removes what a killed one
left behind.
"""

from __future__ import annotations

import json
import math
import mmap
import os
import stat
import struct
import zlib
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, BinaryIO

import numpy as np

from ..counting.scratch import TEMP_PREFIX, lock_exclusively, remove_stale
from ..errors import ModelFileError, ModelVersionError, OutputError
from ..outputs import check_output, is_stdout, resolved_target, write_output

MAGIC = b"FTMODEL\x00"
FORMAT_VERSION = 4
"""The model-file format version this engine writes.  Version 2 adds 8-bit values
(``value_encoding`` ``codebook8``: uint8 ``l2.value``/``l3.value`` and float64
``l2.codebook``/``l3.codebook``) and the header's ``shrink`` record.  Version 3
stores level 3's offsets in blocks (``l3.off_base``, ``l3.off_delta``,
``l3.off_wide``; :mod:`foretype.modelfile.blocked`) instead of ``l3.off``.  Version 4
stores word ids of vocabularies above 65,533 words in three bytes (uint8 sections,
:mod:`foretype.modelfile.packed`) and level-3 weights only where they are not derived
from the stored values (``l3.weight_slot``, ``l3.weight_value``; :mod:`foretype.modelfile.weights`)."""
READABLE_VERSIONS = (1, 2, 3, 4)
"""Versions this engine reads: a version-1 file is a version-2 file without codebooks, a version-2
file a version-3 file with plain level-3 offsets, a version-3 file a version-4 file with int32 ids
and every level-3 weight stored."""

MAX_HEADER_BYTES = 1 << 24
"""A header longer than this (16 MiB) is taken as corrupt; real ones hold a few KiB."""

_PREAMBLE = struct.Struct("<8sIIII")
_ALIGN = 64
_DTYPES = {"uint8", "uint16", "int32", "uint32", "int64", "uint64", "float32", "float64"}
_ENTRY_KEYS = {"name", "dtype", "shape", "offset", "nbytes", "crc32"}

__all__ = ["MAGIC", "FORMAT_VERSION", "TEMP_PREFIX", "ModelFile", "check_target", "write_model_file", "read_model_file", "verify", "crc32"]


@dataclass
class ModelFile:
    """A loaded model file.

    Attributes:
        meta: the header's ``meta`` object.
        sections: the arrays, read-only views of the mapped file.
        path: where it was loaded from.
        file_bytes: the file's size.
        checksums: the CRC-32 the header records for each section.
    """

    meta: dict[str, Any]
    sections: dict[str, np.ndarray]
    path: Path | None
    file_bytes: int
    checksums: dict[str, int] = field(default_factory=dict)


def crc32(data: bytes | memoryview | np.ndarray) -> int:
    """The CRC-32 (zlib's) of an array's or buffer's bytes."""
    view = data.data if isinstance(data, np.ndarray) else memoryview(data)
    return zlib.crc32(view.cast("B")) & 0xFFFFFFFF


def write_model_file(path: str | os.PathLike[str], meta: Mapping[str, Any], sections: Mapping[str, np.ndarray], *, force: bool = False) -> int:
    """Write a model file atomically.

    Args:
        path: the target; replaced only once the new file is complete.  An
            existing file that is not a model file is never replaced.
        meta: JSON-serialisable header fields.
        sections: named arrays (C-contiguous after conversion).
        force: replace an existing file even when it is not a model file.

    Returns:
        The size of the file written.

    Raises:
        OutputError: the file cannot be written, or the target is something
            other than a model file (the previous file, if any, stays).
    """
    target = Path(path)
    if not force and not is_stdout(target) and target.exists() and not is_model_path(target) and target.is_file() and target.stat().st_size:
        raise OutputError(f"{target}: exists and is not a foretype model; not replacing it (choose another name, or add --force to replace it)")
    arrays = {name: np.ascontiguousarray(array) for name, array in sections.items()}
    entries = []
    for name, array in arrays.items():
        if array.dtype.name not in _DTYPES:
            raise ValueError(f"section {name} has unsupported dtype {array.dtype}")
        entries.append({"name": name, "dtype": array.dtype.name, "shape": list(array.shape), "nbytes": int(array.nbytes), "crc32": crc32(array)})
    # Offsets depend on the header length and the header holds the offsets:
    # reserve room, and pad the JSON with spaces up to it.
    reserved = 0
    while True:
        position = _align(_PREAMBLE.size + reserved)
        for entry in entries:
            entry["offset"] = position
            position = _align(position + entry["nbytes"])
        header = json.dumps({"meta": dict(meta), "sections": entries}, sort_keys=True, separators=(",", ":")).encode("utf-8")
        if len(header) <= reserved:
            header = header.ljust(_align(_PREAMBLE.size + reserved) - _PREAMBLE.size)
            break
        reserved = len(header) + 64
    preamble = _PREAMBLE.pack(MAGIC, FORMAT_VERSION, len(header), crc32(header), 0)

    def write(out: BinaryIO) -> None:
        out.write(preamble)
        out.write(header)
        written = _PREAMBLE.size + len(header)
        for entry, array in zip(entries, arrays.values()):
            out.write(b"\x00" * (entry["offset"] - written))
            out.write(array.data.cast("B"))
            written = entry["offset"] + entry["nbytes"]
        out.write(b"\x00" * (_align(written) - written))

    if not is_stdout(target):
        remove_stale(_folder_of(resolved_target(target)))
    # The lock tells a cleaner in another process that the temporary file is
    # alive; the rename happens before the file is closed so it is never unlocked.
    return write_output(target, write, on_temp=lock_exclusively, temp_prefix=TEMP_PREFIX)


def is_model_path(path: str | os.PathLike[str]) -> bool:
    """Tell whether a file starts like a model file (so a build may replace it)."""
    try:
        with open(path, "rb") as handle:
            return handle.read(len(MAGIC)) == MAGIC
    except OSError:
        return False


def check_target(path: str | os.PathLike[str], *, inputs: Iterable[str | os.PathLike[str]] = (), force: bool = False) -> None:
    """Check, before any work, that a model can be written to ``path`` (the output policy of :mod:`foretype.outputs`).

    Raises:
        OutputError: the folder is missing or not writable, the target is one of
            ``inputs``, a folder, or a file other than a model file (unless ``force``).
    """
    check_output(path, inputs=inputs, kind=is_model_path, kind_name="foretype model", force=force)


def _folder_of(target: Path) -> Path:
    return target.parent if str(target.parent) else Path(".")


def _align(position: int) -> int:
    return (position + _ALIGN - 1) // _ALIGN * _ALIGN


def read_model_file(path: str | os.PathLike[str], *, checksums: bool = True) -> ModelFile:
    """Memory-map a model file, check its structure and view its sections.

    Args:
        path: the model file.
        checksums: check every section's CRC-32 (the default; only tests and
            tools that inspect damaged files turn it off).

    Returns:
        The header and read-only array views of the mapped file.

    Raises:
        ModelFileError: missing, unreadable, not a model file, truncated, or corrupt
            (the message names the file and what is wrong).
        ModelVersionError: written in a format version this engine does not read.
    """
    source = Path(path)
    mapped, size = _map(source)
    header_length, header_crc = _read_preamble(source, mapped, size)
    header = mapped[_PREAMBLE.size : _PREAMBLE.size + header_length]
    if crc32(header) != header_crc:
        raise ModelFileError(f"{source}: corrupt header (checksum mismatch)")
    meta, entries = _parse_header(source, header)
    layout = [_section_entry(source, entry) for entry in entries]
    _check_layout(source, layout, _PREAMBLE.size + header_length, size)
    sections, recorded = _view_sections(source, mapped, layout, checksums=checksums)
    return ModelFile(meta=meta, sections=sections, path=source, file_bytes=size, checksums=recorded)


def _read_preamble(source: Path, mapped: mmap.mmap, size: int) -> tuple[int, int]:
    """Check the magic, the version and the header's length; returns the header's length and recorded CRC-32."""
    magic, version, header_length, header_crc, _ = _PREAMBLE.unpack_from(mapped, 0)
    if magic != MAGIC:
        raise ModelFileError(f"{source}: not a foretype model ({_what_it_looks_like(mapped)})")
    _check_version(source, version)
    if header_length == 0 or header_length > MAX_HEADER_BYTES:
        raise ModelFileError(f"{source}: corrupt header (implausible length {header_length})")
    if _PREAMBLE.size + header_length > size:
        raise ModelFileError(f"{source}: truncated (header runs past the end of the file)")
    return header_length, header_crc


def _check_version(source: Path, version: int) -> None:
    """Refuse a format version this engine does not read, saying whether to upgrade or to rebuild."""
    if version in READABLE_VERSIONS:
        return
    if version > FORMAT_VERSION:
        raise ModelVersionError(f"{source}: model format version {version}, newer than this engine's {FORMAT_VERSION} (or a damaged file); upgrade foretype or rebuild the model")
    raise ModelVersionError(f"{source}: model format version {version}, which this engine does not read; rebuild the model")


def _parse_header(source: Path, header: bytes) -> tuple[dict[str, Any], list[Any]]:
    """Decode the header JSON into its ``meta`` object and its list of section entries."""
    try:
        parsed = json.loads(header.decode("utf-8"))
        meta = parsed["meta"]
        entries = parsed["sections"]
        if not isinstance(meta, dict) or not isinstance(entries, list):
            raise TypeError
    except (ValueError, KeyError, TypeError, UnicodeDecodeError, RecursionError):
        raise ModelFileError(f"{source}: corrupt header (not the expected JSON)") from None
    return meta, entries


def _view_sections(source: Path, mapped: mmap.mmap, layout: list[_Entry], *, checksums: bool) -> tuple[dict[str, np.ndarray], dict[str, int]]:
    """View each checked section as a read-only array of the mapped file (checking its CRC-32 unless told not to).

    Returns:
        The arrays by name, and the CRC-32 the header records for each.
    """
    sections: dict[str, np.ndarray] = {}
    recorded: dict[str, int] = {}
    for name, dtype, shape, offset, nbytes, crc in layout:
        count = nbytes // dtype.itemsize
        array = np.frombuffer(mapped, dtype=dtype, count=count, offset=offset).reshape(shape)
        if checksums and crc32(array) != crc:
            raise ModelFileError(f"{source}: corrupt (section {name} checksum mismatch)")
        sections[name] = array
        recorded[name] = crc
    return sections, recorded


def _map(source: Path) -> tuple[mmap.mmap, int]:
    """Open and map a model file; refuse folders, pipes and devices before reading."""
    try:
        # O_NONBLOCK: opening a pipe must not wait for a writer; it is refused below.
        fd = os.open(source, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))
    except FileNotFoundError:
        raise ModelFileError(f"{source}: no such model file") from None
    except IsADirectoryError:
        raise ModelFileError(f"{source}: is a folder, not a model file") from None
    except OSError as error:
        raise ModelFileError(f"{source}: cannot read ({error.strerror or error})") from None
    try:
        info = os.fstat(fd)
        if stat.S_ISDIR(info.st_mode):
            raise ModelFileError(f"{source}: is a folder, not a model file")
        if not stat.S_ISREG(info.st_mode):
            raise ModelFileError(f"{source}: not a regular file (a pipe or device), not a model file")
        size = info.st_size
        if size == 0:
            raise ModelFileError(f"{source}: empty file, not a foretype model")
        if size < _PREAMBLE.size:
            raise ModelFileError(f"{source}: not a foretype model (file too short: {size} bytes)")
        try:
            mapped = mmap.mmap(fd, 0, access=mmap.ACCESS_READ)
        except (OSError, ValueError) as error:
            raise ModelFileError(f"{source}: cannot map ({getattr(error, 'strerror', None) or error})") from None
    finally:
        os.close(fd)
    # The mapping's own length: the file may have changed size since fstat.
    if len(mapped) < _PREAMBLE.size:
        raise ModelFileError(f"{source}: not a foretype model (file too short: {len(mapped)} bytes)")
    return mapped, len(mapped)


def _what_it_looks_like(mapped: mmap.mmap) -> str:
    start = mapped[:256]
    if start[:4] == b"PK\x03\x04":
        return "it is a zip archive"
    if start[:2] == b"\x1f\x8b":
        return "it is gzip-compressed"
    if start[:6] == b"\x93NUMPY":
        return "it is a numpy array file"
    try:
        text = start.decode("utf-8")
    except UnicodeDecodeError:
        try:
            text = start[:-3].decode("utf-8")
        except UnicodeDecodeError:
            return "wrong magic bytes"
    if text and all(c.isprintable() or c in "\t\r\n" for c in text):
        return "it looks like a text file; make a model with 'foretype build'"
    return "wrong magic bytes"


_Entry = tuple[str, np.dtype, tuple[int, ...], int, int, int]


def _section_entry(source: Path, entry: Any) -> _Entry:
    """Validate one header entry: exact keys and types, size matching dtype and shape."""

    def whole(value: Any) -> bool:
        return isinstance(value, int) and not isinstance(value, bool) and value >= 0

    if not isinstance(entry, dict) or set(entry) != _ENTRY_KEYS:
        raise ModelFileError(f"{source}: corrupt header (bad section entry)")
    name, dtype_name, shape = entry["name"], entry["dtype"], entry["shape"]
    offset, nbytes, crc = entry["offset"], entry["nbytes"], entry["crc32"]
    if not isinstance(name, str) or not name:
        raise ModelFileError(f"{source}: corrupt header (bad section name)")
    if not isinstance(dtype_name, str) or dtype_name not in _DTYPES:
        raise ModelFileError(f"{source}: corrupt header (section {name} has unknown type {dtype_name!r})")
    if not isinstance(shape, list) or len(shape) > 8 or not all(whole(d) for d in shape):
        raise ModelFileError(f"{source}: corrupt header (section {name} has a bad shape)")
    if not (whole(offset) and whole(nbytes) and whole(crc) and crc <= 0xFFFFFFFF):
        raise ModelFileError(f"{source}: corrupt header (section {name} has a bad offset, size or checksum)")
    dtype = np.dtype(dtype_name)
    # Python integers: a lying shape cannot overflow into a plausible size.
    if math.prod(shape) * dtype.itemsize != nbytes:
        raise ModelFileError(f"{source}: corrupt header (section {name} size does not match its shape)")
    return name, dtype, tuple(shape), offset, nbytes, crc


def _check_layout(source: Path, layout: list[_Entry], header_end: int, size: int) -> None:
    """Sections must be uniquely named, aligned, after the header, inside the file and disjoint."""
    names = [entry[0] for entry in layout]
    if len(set(names)) != len(names):
        raise ModelFileError(f"{source}: corrupt header (a section name repeats)")
    end_of_previous = header_end
    for name, _, _, offset, nbytes, _ in sorted(layout, key=lambda e: e[3]):
        if offset % _ALIGN or offset < end_of_previous:
            raise ModelFileError(f"{source}: corrupt header (section {name} overlaps the header or another section)")
        if offset + nbytes > size:
            raise ModelFileError(f"{source}: truncated or corrupt (section {name} runs past the end of the file)")
        end_of_previous = offset + nbytes


def verify(path: str | os.PathLike[str]) -> ModelFile:
    """Read a model file and check the header and every section's checksum.

    Loading already does this; the model-level checks of
    :func:`foretype.query.verify.verify_model` go further.

    Raises:
        ModelFileError: as :func:`read_model_file`.
    """
    return read_model_file(path, checksums=True)
