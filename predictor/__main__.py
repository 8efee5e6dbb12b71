"""``python -m foretype`` runs the ``foretype`` command line."""

from .cli import main

raise SystemExit(main())
