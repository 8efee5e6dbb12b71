"""The engine's exceptions: one small hierarchy, each class with its own exit code.

The command line turns any of these into a single line on stderr and exits with
``error.exit_code``; the library raises them and never prints.
"""

from __future__ import annotations


class ForetypeError(Exception):
    """Base of every error the engine raises on purpose."""

    exit_code = 1


class OptionError(ForetypeError):
    """An argument or option has a value the engine cannot use."""

    exit_code = 2


class CorpusError(ForetypeError):
    """A corpus or text file is missing, unreadable, not text, or holds no words."""

    exit_code = 3


class EncodingError(CorpusError):
    """A text file is not valid UTF-8 (the message names the file and line)."""

    exit_code = 4


class ModelFileError(ForetypeError):
    """A model file is missing, truncated, corrupt, or not a model file at all."""

    exit_code = 5


class ModelVersionError(ModelFileError):
    """A model file was written by a format version this engine cannot read."""

    exit_code = 6


class CapacityError(ForetypeError):
    """The input exceeds what the model format can represent (ids, counts, offsets)."""

    exit_code = 7


class OutputError(ForetypeError):
    """A result could not be written (unwritable path, full disk)."""

    exit_code = 8
