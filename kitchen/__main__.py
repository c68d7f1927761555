"""Run the command line: ``python -m kitchen``."""

from kitchen.cli import main, return_freed_memory

return_freed_memory()
raise SystemExit(main())
