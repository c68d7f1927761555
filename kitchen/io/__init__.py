"""Reading a series: units at the file boundary, the raw tables, their checks, the series.

The first step of the data's path. A series folder of CSV files, or one workbook, is read
as written (:func:`read_tables`: numbers in the file's units, headers checked), then every
value is checked and converted to SI (:func:`build_series`; :func:`load_series` does both).
Every problem is collected, each an :class:`InputProblem` naming the file, the row and the
column, and a series that cannot be used is refused with one :class:`SeriesError` listing
them all. The revisions of :mod:`kitchen.revisions` are applied between the two steps, so
the loader's checks run on them too. The files the tool writes go through here as well:
whole or not at all, and safe to open in a spreadsheet. Raw data files are never written.

Modules, in the data's order:

- :mod:`.units`: bracketed units in column headers, parsed with pint; columns to SI.
- :mod:`.raw_tables`: the columns each table may hold (``SCHEMAS``); tables read as written.
- :mod:`.table_checks`: each table's values checked and converted to SI, every problem kept.
- :mod:`.logger_readings`: date-times to elapsed time; heads from pressures (h = Δp/(ρw·g))
  or burette levels, and the burettes' volumes.
- :mod:`.condition_checks`: the checks of a flexible-wall test's conditions and B-value checks.
- :mod:`.series`: the validated :class:`Series`, built whole or again for the changed tables.
- :mod:`.files`: atomic writes, one-write appends, the folder lock, spreadsheet-safe CSV.

The public face, which other subpackages import from :mod:`kitchen.io` and never from its
modules: :func:`split_header`, :func:`format_header`, :func:`parse_value`, :func:`to_si`,
:data:`KINDS`, :data:`EXAMPLE_UNITS` and :class:`UnitError` (units); :data:`SCHEMAS`,
:data:`TABLE_NAMES`, :class:`ColumnSpec`, :class:`RawTable`, :func:`read_tables`,
:func:`read_table` (one table on its own: the field tests),
:func:`read_ahead` (a folder's CSV files parsed on a thread while the caller imports),
:class:`InputProblem` and :class:`SeriesError` (the raw tables), :data:`ALTERNATIVE_COLUMNS`
and :data:`CONDITION_TABLES`; :func:`time_zone` (units); :func:`pressure_head`,
:func:`read_date_times`, :data:`STANDARD_GRAVITY` and :data:`GAP_FACTOR` (logger readings);
:data:`FLOW_DIRECTIONS` (condition checks); :func:`head_rise_tolerance`,
:data:`HEAD_RISE_TOLERANCE` and :data:`HEAD_RISE_SCATTERS` (the rise a falling-head reading
may show); :func:`convert_table` and :func:`report_rows` (a table's values checked and
converted, problems named by row); :data:`SPECIMEN_ID_LENGTH` (the longest specimen id);
:class:`Series`, :func:`build_series`, :func:`load_series` and
:func:`rebuild_series`; :func:`atomic_write_bytes`, :func:`atomic_write_text`,
:func:`append_line` (:data:`APPEND_ROOM`), :func:`folder_lock`, :func:`sync_folder`,
:func:`libc_function`,
:func:`write_csv`, :func:`spreadsheet_safe` and :func:`printable`.

References
----------
Rousseeuw, P. J. and Croux, C. (1993), J. Am. Stat. Assoc. 88(424), 1273–1283: the median
absolute deviation, scaled by 1.4826, as a robust estimate of σ (the scatter of successive
heads in :func:`head_rise_tolerance`).
The OWASP advice on CSV injection, for the leading apostrophe of :func:`spreadsheet_safe`.
"""

from kitchen import _lazy

__getattr__, __dir__ = _lazy.lazy_face(
    __name__,
    {
        "append_line": "files",
        "cache_folder": "files",
        "atomic_write_bytes": "files",
        "atomic_write_text": "files",
        "folder_lock": "files",
        "sync_folder": "files",
        "libc_function": "files",
        "printable": "files",
        "APPEND_ROOM": "files",
        "spreadsheet_safe": "files",
        "write_csv": "files",
        "PROJECT_SETTINGS": "project",
        "ProjectSetting": "project",
        "project_settings_path": "project",
        "read_project_settings": "project",
        "FLOW_DIRECTIONS": "condition_checks",
        "GAP_FACTOR": "logger_readings",
        "STANDARD_GRAVITY": "logger_readings",
        "pressure_head": "logger_readings",
        "read_date_times": "logger_readings",
        "ALTERNATIVE_COLUMNS": "raw_tables",
        "CONDITION_TABLES": "raw_tables",
        "SCHEMAS": "raw_tables",
        "TABLE_NAMES": "raw_tables",
        "TEXT_KINDS": "raw_tables",
        "ColumnSpec": "raw_tables",
        "InputProblem": "raw_tables",
        "RawTable": "raw_tables",
        "SeriesError": "raw_tables",
        "read_tables": "raw_tables",
        "read_ahead": "raw_tables",
        "read_table": "raw_tables",
        "Series": "series",
        "build_series": "series",
        "load_series": "series",
        "rebuild_series": "series",
        "HEAD_RISE_SCATTERS": "table_checks",
        "SPECIMEN_ID_LENGTH": "table_checks",
        "HEAD_RISE_TOLERANCE": "table_checks",
        "head_rise_tolerance": "table_checks",
        "convert_table": "table_checks",
        "report_rows": "table_checks",
        "KINDS": "units",
        "EXAMPLE_UNITS": "units",
        "UnitError": "units",
        "format_header": "units",
        "parse_value": "units",
        "split_header": "units",
        "to_si": "units",
        "time_zone": "units",
    },
)

__all__ = [
    "read_ahead",
    "ALTERNATIVE_COLUMNS",
    "CONDITION_TABLES",
    "FLOW_DIRECTIONS",
    "GAP_FACTOR",
    "STANDARD_GRAVITY",
    "pressure_head",
    "read_date_times",
    "time_zone",
    "PROJECT_SETTINGS",
    "ProjectSetting",
    "project_settings_path",
    "read_project_settings",
    "append_line",
    "cache_folder",
    "atomic_write_bytes",
    "atomic_write_text",
    "build_series",
    "ColumnSpec",
    "folder_lock",
    "sync_folder",
    "libc_function",
    "printable",
    "APPEND_ROOM",
    "format_header",
    "HEAD_RISE_SCATTERS",
    "SPECIMEN_ID_LENGTH",
    "HEAD_RISE_TOLERANCE",
    "head_rise_tolerance",
    "convert_table",
    "report_rows",
    "InputProblem",
    "KINDS",
    "EXAMPLE_UNITS",
    "load_series",
    "parse_value",
    "RawTable",
    "read_tables",
    "read_table",
    "rebuild_series",
    "SCHEMAS",
    "TEXT_KINDS",
    "Series",
    "SeriesError",
    "split_header",
    "spreadsheet_safe",
    "TABLE_NAMES",
    "to_si",
    "UnitError",
    "write_csv",
]
