"""Run the command line: ``python -m kitchen``."""

from kitchen.cli import main

raise SystemExit(main())
