"""Run the command line: ``python -m kitchen``.

The cyclic garbage collector is paused while the package and the libraries a command needs
are imported, which make hundreds of thousands of objects and no garbage; the command
resumes it once they are (:func:`kitchen.cli.imports_done`).

A command that draws images starts Chromium first, before the package is imported, so that
the browser opens while the imports, the reading and the reduction run
(:func:`kitchen.memo.images.start_for_command`).
"""

import gc
import sys

gc.disable()  # while the package and its libraries are imported (kitchen.cli.imports_done)

from kitchen.memo.images import start_for_command  # noqa: E402

start_for_command(sys.argv[1:])

from kitchen.cli import main, return_freed_memory  # noqa: E402  (after Chromium is on its way)

return_freed_memory()
raise SystemExit(main())
