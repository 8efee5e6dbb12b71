"""Replacing files atomically: kept as a name for the helpers in :mod:`foretype.outputs` (the one place they live)."""

from __future__ import annotations

from ..outputs import remove_quietly, replace_atomically, sync_directory

__all__ = ["remove_quietly", "replace_atomically", "sync_directory"]
