"""Run the command line: ``python -m kitchen``.

A command that draws images starts Chromium first, before the package is imported, so that
the browser opens while the imports, the reading and the reduction run
(:func:`kitchen.memo.images.start_for_command`).
"""

import sys

from kitchen.memo.images import start_for_command

start_for_command(sys.argv[1:])

from kitchen.cli import main, return_freed_memory  # noqa: E402  (after Chromium is on its way)

return_freed_memory()
raise SystemExit(main())
