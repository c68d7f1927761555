"""FACE-DOCSTRING"""

from .files import (
    append_line,
    atomic_write_bytes,
    atomic_write_text,
    folder_lock,
    spreadsheet_safe,
    write_csv,
)
from .raw_tables import (
    SCHEMAS,
    TABLE_NAMES,
    ColumnSpec,
    InputProblem,
    RawTable,
    SeriesError,
    read_tables,
)
from .series import (
    Series,
    build_series,
    load_series,
    rebuild_series,
)
from .table_checks import (
    HEAD_RISE_SCATTERS,
    HEAD_RISE_TOLERANCE,
    head_rise_tolerance,
)
from .units import (
    KINDS,
    UnitError,
    format_header,
    parse_value,
    split_header,
    to_si,
)

__all__ = [
    "append_line",
    "atomic_write_bytes",
    "atomic_write_text",
    "build_series",
    "ColumnSpec",
    "folder_lock",
    "format_header",
    "HEAD_RISE_SCATTERS",
    "HEAD_RISE_TOLERANCE",
    "head_rise_tolerance",
    "InputProblem",
    "KINDS",
    "load_series",
    "parse_value",
    "RawTable",
    "read_tables",
    "rebuild_series",
    "SCHEMAS",
    "Series",
    "SeriesError",
    "split_header",
    "spreadsheet_safe",
    "TABLE_NAMES",
    "to_si",
    "UnitError",
    "write_csv",
]
