"""Run the command line: ``python -m kitchen``."""

from .cli import main

raise SystemExit(main())
