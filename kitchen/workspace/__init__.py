"""FACE-DOCSTRING"""

from .changes import (
    revision_effect,
    what_changed,
)
from .digests import (
    frame_digest,
)
from .workspace import (
    Workspace,
)

__all__ = [
    "frame_digest",
    "revision_effect",
    "what_changed",
    "Workspace",
]
