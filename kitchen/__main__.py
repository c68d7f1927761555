"""Run the command line: ``python -m kitchen``.

The cyclic garbage collector is paused while the package and the libraries a command needs
are imported, which make hundreds of thousands of objects and no garbage; the command
resumes it once they are (:func:`kitchen.cli.imports_done`).

A command that draws images starts Chromium first, before the package is imported, so that
the browser opens while the imports, the reading and the reduction run
(:func:`kitchen.memo.images.start_for_command`).

numpy's advice that the system back each large array with huge pages
(``madvise(MADV_HUGEPAGE)`` on arrays of 4 MB and more) is turned off before numpy is
imported, unless ``NUMPY_MADVISE_HUGEPAGE`` is already set (numpy's documented switch,
read when numpy is imported; numpy reference, "Global state"). On the 2-core VM of the
README, after it had been up and in use for 17 hours, each huge page a fresh array
faulted in cost milliseconds of the kernel's time zeroing it (a ``perf`` profile: 11 % of
a report's samples in ``clear_page_erms`` under the huge-page fault, with no compaction
stall counted in ``/proc/vmstat``; likely memory the virtual machine's host had taken
back, which a huge page claims 2 MB at a time): a ``report`` on 10⁷ readings took
6.5-9.1 s with 3.5-5.8 s of it in the kernel, and 3.7-4.0 s (0.85-1.0 s in the kernel)
without the advice, at a peak of 0.78-0.86 GB either way; the extra time of 10⁶ readings
over 10², 0.44 s against 0.29 s (medians of 11 rounds in turn). On the same machine
earlier, the two were within the noise.
"""

import gc
import os
import sys

os.environ.setdefault("NUMPY_MADVISE_HUGEPAGE", "0")  # before numpy is imported

gc.disable()  # while the package and its libraries are imported (kitchen.cli.imports_done)

from kitchen.memo.images import start_for_command  # noqa: E402

start_for_command(sys.argv[1:])

from kitchen.cli import main, return_freed_memory  # noqa: E402  (after Chromium is on its way)

return_freed_memory()
raise SystemExit(main())
