"""``python -m predictor`` runs the ``foretype`` command line."""

from predictor.cli import main

raise SystemExit(main())
