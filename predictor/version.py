"""The engine's version (bump when a change alters what a build produces)."""

__version__ = "0.2.0"
