"""The browser keyboard: an on-screen keyboard page and the copy-task endpoints of ``foretype serve``.

A face over the prediction service (which answers the page's suggestions over
its WebSocket) and over :mod:`predictor.study` (which owns the session log and
its measures).  :func:`study_router` gives the router that owns ``/`` and
``/api/study/...``; the page itself is static HTML, CSS and JavaScript shipped
in ``static/``, with no build step and nothing fetched from elsewhere.
"""

from __future__ import annotations

from .routes import StudySettings, study_router

__all__ = ["StudySettings", "study_router"]
