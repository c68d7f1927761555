"""FACE-DOCSTRING"""

from .figures import (
    memo_charts,
)
from .images import (
    FIRST_IMAGE_TIMEOUT,
    PNG_SCALE,
    ImageExportUnavailable,
    figure_image,
    start_image_export,
)
from .manifest import (
    MANIFEST,
    MANIFEST_COLUMNS,
    read_manifest,
    verify_pack,
    write_manifest,
)
from .pack import (
    CHART_SCRIPT,
    MemoPack,
    export_memo_pack,
)
from .pages import (
    REDUCTION_METHODS,
    VERDICT_MARKS,
    chart_page,
    report_page,
)
from .provenance import (
    InputFile,
    Provenance,
    file_sha256,
    memo_provenance,
)
from .tables import (
    FIT_COLUMNS,
    checks_table,
    fits_table,
    specimens_table,
)
from .workbook import (
    MEMO_CAUTIONS,
    workbook_bytes,
)

__all__ = [
    "chart_page",
    "CHART_SCRIPT",
    "checks_table",
    "export_memo_pack",
    "figure_image",
    "file_sha256",
    "FIRST_IMAGE_TIMEOUT",
    "FIT_COLUMNS",
    "fits_table",
    "ImageExportUnavailable",
    "InputFile",
    "MANIFEST",
    "MANIFEST_COLUMNS",
    "MEMO_CAUTIONS",
    "memo_charts",
    "memo_provenance",
    "MemoPack",
    "PNG_SCALE",
    "Provenance",
    "read_manifest",
    "REDUCTION_METHODS",
    "report_page",
    "specimens_table",
    "start_image_export",
    "VERDICT_MARKS",
    "verify_pack",
    "workbook_bytes",
    "write_manifest",
]
