"""``python -m predictor`` runs the ``foretype`` command line."""

from foretype.cli import main

raise SystemExit(main())
