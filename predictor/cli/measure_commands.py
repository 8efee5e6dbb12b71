"""Placeholder: commands added by a later change register here."""

from __future__ import annotations

import argparse


def register(commands: argparse._SubParsersAction) -> None:
    """Add this module's commands to the parser (none yet)."""
