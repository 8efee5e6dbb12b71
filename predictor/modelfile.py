"""The model file: a versioned header and named arrays, memory-mapped on load.

Layout (all integers little-endian)::

    offset 0   8 bytes   magic b"FTMODEL\\x00"
    offset 8   u32       format version
    offset 12  u32       header length H in bytes
    offset 16  u32       CRC-32 of the header bytes
    offset 20  u32       reserved (0)
    offset 24  H bytes   header: UTF-8 JSON {"meta": {...}, "sections": [...]}
    then       sections, each starting at a multiple of 64 bytes

Each section entry records ``name``, ``dtype`` (one of a fixed list), ``shape``,
``offset``, ``nbytes`` and ``crc32``.  Nothing in the file is executed: the
header is plain JSON and the sections are raw arrays viewed with
``numpy.frombuffer`` over a read-only ``mmap``, so load time does not grow with
the model.  Every load checks the header checksum and that each section lies
inside the file with the size its dtype and shape imply; :func:`verify`
additionally checks every section's checksum.

Files are written to a temporary file beside the target, flushed to disk and
renamed over it, so a failed or interrupted write never leaves a half-written
model or destroys the previous one.
"""

from __future__ import annotations

import json
import mmap
import os
import struct
import tempfile
import zlib
from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np

from .errors import ModelFileError, ModelVersionError, OutputError

MAGIC = b"FTMODEL\x00"
FORMAT_VERSION = 1
"""The model-file format version this engine writes and reads."""

_PREAMBLE = struct.Struct("<8sIIII")
_ALIGN = 64
_DTYPES = {"uint8", "uint16", "int32", "uint32", "int64", "uint64", "float32", "float64"}
TEMP_PREFIX = ".foretype-"
"""Temporary files being written start with this name."""


@dataclass
class ModelFile:
    """A loaded model file.

    Attributes:
        meta: the header's ``meta`` object.
        sections: the arrays, read-only views of the mapped file.
        path: where it was loaded from.
        file_bytes: the file's size.
    """

    meta: dict[str, Any]
    sections: dict[str, np.ndarray]
    path: Path | None
    file_bytes: int


def _crc(data: bytes | memoryview | np.ndarray) -> int:
    return zlib.crc32(memoryview(data).cast("B")) & 0xFFFFFFFF


def write_model_file(path: str | os.PathLike[str], meta: Mapping[str, Any], sections: Mapping[str, np.ndarray]) -> int:
    """Write a model file atomically.

    Args:
        path: the target; replaced only once the new file is complete.
        meta: JSON-serialisable header fields.
        sections: named arrays (C-contiguous after conversion).

    Returns:
        The size of the file written.

    Raises:
        OutputError: the file cannot be written (the previous file, if any, stays).
    """
    target = Path(path)
    arrays = {name: np.ascontiguousarray(array) for name, array in sections.items()}
    entries = []
    for name, array in arrays.items():
        if array.dtype.name not in _DTYPES:
            raise ValueError(f"section {name} has unsupported dtype {array.dtype}")
        entries.append({"name": name, "dtype": array.dtype.name, "shape": list(array.shape), "nbytes": int(array.nbytes), "crc32": _crc(array)})
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
    preamble = _PREAMBLE.pack(MAGIC, FORMAT_VERSION, len(header), _crc(header), 0)
    directory = target.parent if str(target.parent) else Path(".")
    try:
        handle, temp_name = tempfile.mkstemp(prefix=TEMP_PREFIX, suffix=".tmp", dir=directory)
    except OSError as error:
        raise OutputError(f"{target}: cannot write ({error.strerror or error})") from None
    try:
        with os.fdopen(handle, "wb") as out:
            out.write(preamble)
            out.write(header)
            written = _PREAMBLE.size + len(header)
            for entry, array in zip(entries, arrays.values()):
                out.write(b"\x00" * (entry["offset"] - written))
                out.write(memoryview(array).cast("B"))
                written = entry["offset"] + entry["nbytes"]
            out.write(b"\x00" * (_align(written) - written))
            out.flush()
            os.fsync(out.fileno())
            size = out.tell()
        os.replace(temp_name, target)
    except OSError as error:
        _remove_quietly(temp_name)
        raise OutputError(f"{target}: cannot write ({error.strerror or error})") from None
    except BaseException:
        _remove_quietly(temp_name)
        raise
    _sync_directory(directory)
    return size


def _align(position: int) -> int:
    return (position + _ALIGN - 1) // _ALIGN * _ALIGN


def _remove_quietly(name: str) -> None:
    try:
        os.unlink(name)
    except OSError:
        pass


def _sync_directory(directory: Path) -> None:
    try:
        fd = os.open(directory, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)


def read_model_file(path: str | os.PathLike[str]) -> ModelFile:
    """Memory-map a model file and view its sections.

    Raises:
        ModelFileError: missing, unreadable, not a model file, or structurally corrupt.
        ModelVersionError: written by a newer (or unknown) format version.
    """
    source = Path(path)
    if source.is_dir():
        raise ModelFileError(f"{source}: is a folder, not a model file")
    try:
        with source.open("rb") as handle:
            size = os.fstat(handle.fileno()).st_size
            if size < _PREAMBLE.size:
                raise ModelFileError(f"{source}: not a foretype model (file too short: {size} bytes)")
            mapped = mmap.mmap(handle.fileno(), 0, access=mmap.ACCESS_READ)
    except FileNotFoundError:
        raise ModelFileError(f"{source}: no such model file") from None
    except OSError as error:
        raise ModelFileError(f"{source}: cannot read ({error.strerror or error})") from None
    magic, version, header_length, header_crc, _ = _PREAMBLE.unpack_from(mapped, 0)
    if magic != MAGIC:
        raise ModelFileError(f"{source}: not a foretype model (wrong magic bytes)")
    if version != FORMAT_VERSION:
        newer = "newer" if version > FORMAT_VERSION else "older"
        raise ModelVersionError(f"{source}: model format version {version} is {newer} than this engine's {FORMAT_VERSION}; rebuild the model")
    if _PREAMBLE.size + header_length > size:
        raise ModelFileError(f"{source}: truncated (header runs past the end of the file)")
    header = mapped[_PREAMBLE.size : _PREAMBLE.size + header_length]
    if _crc(header) != header_crc:
        raise ModelFileError(f"{source}: corrupt header (checksum mismatch)")
    try:
        parsed = json.loads(header.decode("utf-8"))
        meta = parsed["meta"]
        entries = parsed["sections"]
        if not isinstance(meta, dict) or not isinstance(entries, list):
            raise TypeError
    except (ValueError, KeyError, TypeError, UnicodeDecodeError):
        raise ModelFileError(f"{source}: corrupt header (not the expected JSON)") from None
    sections: dict[str, np.ndarray] = {}
    for entry in entries:
        name, array = _view_section(source, mapped, entry, size)
        sections[name] = array
    return ModelFile(meta=meta, sections=sections, path=source, file_bytes=size)


def _view_section(source: Path, mapped: mmap.mmap, entry: Any, size: int) -> tuple[str, np.ndarray]:
    try:
        name = str(entry["name"])
        dtype_name = entry["dtype"]
        shape = tuple(int(d) for d in entry["shape"])
        offset = int(entry["offset"])
        nbytes = int(entry["nbytes"])
        int(entry["crc32"])
    except (KeyError, TypeError, ValueError):
        raise ModelFileError(f"{source}: corrupt header (bad section entry)") from None
    if dtype_name not in _DTYPES:
        raise ModelFileError(f"{source}: corrupt header (section {name} has unknown type {dtype_name!r})")
    dtype = np.dtype(dtype_name)
    count = int(np.prod(shape, dtype=np.int64)) if shape else 1
    if any(d < 0 for d in shape) or count * dtype.itemsize != nbytes:
        raise ModelFileError(f"{source}: corrupt header (section {name} size does not match its shape)")
    if offset % _ALIGN or offset < _PREAMBLE.size or offset + nbytes > size:
        raise ModelFileError(f"{source}: truncated or corrupt (section {name} lies outside the file)")
    array = np.frombuffer(mapped, dtype=dtype, count=count, offset=offset).reshape(shape)
    return name, array


def verify(path: str | os.PathLike[str]) -> ModelFile:
    """Read a model file and check every section's checksum.

    Raises:
        ModelFileError: as :func:`read_model_file`, or a section's checksum fails.
    """
    loaded = read_model_file(path)
    mapped = loaded.sections
    header_entries = _entries(loaded)
    for entry in header_entries:
        array = mapped[entry["name"]]
        if _crc(array) != int(entry["crc32"]):
            raise ModelFileError(f"{loaded.path}: corrupt (section {entry['name']} checksum mismatch)")
    return loaded


def _entries(loaded: ModelFile) -> list[dict[str, Any]]:
    assert loaded.path is not None
    with loaded.path.open("rb") as handle:
        preamble = handle.read(_PREAMBLE.size)
        _, _, header_length, _, _ = _PREAMBLE.unpack(preamble)
        return list(json.loads(handle.read(header_length).decode("utf-8"))["sections"])
