"""A series held open: the one way to open a series, recomputed only where its inputs change.

The command line, every panel, the revise summary and the memo pack open a series through
a :class:`Workspace`: the series' tables as written, its revision log, its window log and
its effective data, with each specimen's reduction kept under a digest of what it was
computed from (the specimen's row, its readings or collections, the settings, its reading
window and capillary rise). After a revision only the table it names is validated again
and only the specimens whose inputs changed are reduced again; the results are those of
:func:`kitchen.reduction.series_results` on the effective series, row for row. Like the
rest of the core, nothing here draws: :meth:`Workspace.sync` says which specimens changed,
so that a panel redraws only their charts.

Modules:

- :mod:`.digests`: digests of a specimen's inputs, and where each specimen's rows lie.
- :mod:`.workspace`: the :class:`Workspace` and its cache of reductions.
- :mod:`.changes`: what a revision changed: the specimens whose results or verdict moved.

The public face, which other subpackages import from :mod:`kitchen.workspace` and never
from its modules: :class:`Workspace`, :func:`frame_digest`, :func:`what_changed` and
:func:`revision_effect`.
"""

from kitchen import _lazy

__getattr__, __dir__ = _lazy.lazy_face(
    __name__,
    {
        "revision_effect": "changes",
        "what_changed": "changes",
        "frame_digest": "digests",
        "Workspace": "workspace",
    },
)

__all__ = [
    "frame_digest",
    "revision_effect",
    "what_changed",
    "Workspace",
]
