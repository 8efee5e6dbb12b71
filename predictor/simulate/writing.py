"""Writing result files: kept as a name for the helpers in :mod:`foretype.outputs` (the one place they live)."""

from __future__ import annotations

from ..outputs import check_writable_file, prepare_folder, write_text_atomic

__all__ = ["check_writable_file", "prepare_folder", "write_text_atomic"]
