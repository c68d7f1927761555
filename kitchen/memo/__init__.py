"""The memo pack: every chart, table and the report a reviewer needs, written in one go.

The last step of the data's path. :func:`export_memo_pack` writes into one folder the
results as CSV and as a workbook, every chart as interactive HTML and as PNG and SVG, the
report page (the specimens, the charts, the methods and their sources, the criteria
applied, the cautions and the provenance), plotly.js once for the whole pack, and last a
manifest of every file with its size and SHA-256, so that a pack with a manifest is a
whole pack and a reviewer can check the pack received is the pack exported. The pack is
built in a folder beside the one asked for and swapped in whole, so that folder holds the
previous pack or the new one, never a mixture. The pages make no request to the network;
every item carries the cautions.

Modules, in the order a pack is made:

- :mod:`.figures`: the charts the data allow, with the results' windows and rises.
- :mod:`.images`: PNG and SVG through kaleido and Chromium, one image server per process
  (:mod:`._page_host`: its page served on the loopback interface, and the browser
  profiles kept in the cache folder, where Chromium keeps plotly.js compiled).
- :mod:`.tables`: the specimens with their verdicts, the fits, the checks, the revisions
  and the tests kept on record.
- :mod:`.workbook`: ``results.xlsx`` with its ``cautions`` sheet.
- :mod:`.provenance`: which tool, when, with what settings, from which bytes.
- :mod:`.markup`: the markup the pages share: style, escaping, tables, the page skeleton.
- :mod:`.pages`: the report page and one page per chart, built as escaped text.
- :mod:`.specimen_pages`: one page per test holding every item a test report holds,
  each stated or marked "not recorded", with the test's record over time.
- :mod:`.manifest`: ``manifest.csv``, written last; the pack built beside its folder and
  swapped in whole (:class:`StagedPack`); checking a pack received.
- :mod:`.documents`: the memo and the field-check report as ``.docx`` (python-docx).
- :mod:`.pack`: the export of the whole pack in one call.
- :mod:`.field_report`: the field-check report (field tests judged against the zone), with
  the same provenance, manifest and cautions.

The public face, which other subpackages import from :mod:`kitchen.memo` and never from its
modules: :func:`export_memo_pack` (:class:`MemoPack`), :data:`CHART_SCRIPT` and
:data:`PACK_SPECIMEN_LIMIT`;
:func:`memo_charts`; :func:`start_image_export`, :func:`figure_image`,
:class:`ImageExportUnavailable`, :data:`PNG_SCALE` and :data:`FIRST_IMAGE_TIMEOUT`;
:func:`specimens_table`, :func:`fits_table`, :func:`checks_table`, :func:`revisions_table`,
:func:`kept_tests_table`, :data:`FIT_COLUMNS`, :data:`REVISION_COLUMNS` and
:data:`KEPT_TEST_COLUMNS`;
:func:`workbook_bytes`, :func:`setting_texts`, :data:`SETTING_UNITS`; :func:`memo_provenance`,
:class:`Provenance`, :class:`InputFile` and :func:`file_sha256`; :func:`report_page`,
:func:`chart_page`, :func:`provenance_markup`, :data:`REDUCTION_METHODS` and
:data:`VERDICT_MARKS`; :func:`table_markup`
(the notebook panels build their tables with it too); :func:`report_items`
(:class:`ReportItem`, :data:`NOT_RECORDED`), :func:`report_pages` (:class:`ReportPage`),
:func:`specimen_page`, :func:`specimen_links` and :func:`page_name`;
:class:`StagedPack`, :class:`PackFolderError`, :data:`PACK_MARK`, :func:`interrupted_exports`,
:func:`manifest_bytes`, :func:`read_manifest`, :func:`verify_pack`, :data:`MANIFEST` and
:data:`MANIFEST_COLUMNS`; :func:`document_bytes` and :func:`memo_document` (the ``.docx``);
:func:`export_field_check` (:class:`FieldReport`), :func:`field_tests_table` and
:func:`lifts_table` (the field check).

The memo rests on no standard of its own: the methods and sources the report page lists
(:data:`REDUCTION_METHODS`) are those of :mod:`kitchen.reduction` and
:mod:`kitchen.uncertainty`, and the cautions cite theirs in :mod:`kitchen.cautions`.
"""

from kitchen import _lazy

__getattr__, __dir__ = _lazy.lazy_face(
    __name__,
    {
        "memo_charts": "figures",
        "document_bytes": "documents",
        "memo_document": "documents",
        "FieldReport": "field_report",
        "export_field_check": "field_report",
        "field_tests_table": "field_report",
        "lifts_table": "field_report",
        "FIRST_IMAGE_TIMEOUT": "images",
        "PNG_SCALE": "images",
        "ImageExportUnavailable": "images",
        "figure_image": "images",
        "start_image_export": "images",
        "MANIFEST": "manifest",
        "MANIFEST_COLUMNS": "manifest",
        "PACK_MARK": "manifest",
        "PackFolderError": "manifest",
        "StagedPack": "manifest",
        "interrupted_exports": "manifest",
        "manifest_bytes": "manifest",
        "read_manifest": "manifest",
        "verify_pack": "manifest",
        "table_markup": "markup",
        "CHART_SCRIPT": "pack",
        "PACK_SPECIMEN_LIMIT": "pack",
        "MemoPack": "pack",
        "export_memo_pack": "pack",
        "REDUCTION_METHODS": "pages",
        "VERDICT_MARKS": "pages",
        "chart_page": "pages",
        "provenance_markup": "pages",
        "report_page": "pages",
        "NOT_RECORDED": "specimen_pages",
        "ReportItem": "specimen_pages",
        "ReportPage": "specimen_pages",
        "page_name": "specimen_pages",
        "report_items": "specimen_pages",
        "report_pages": "specimen_pages",
        "specimen_links": "specimen_pages",
        "specimen_page": "specimen_pages",
        "InputFile": "provenance",
        "Provenance": "provenance",
        "file_sha256": "provenance",
        "memo_provenance": "provenance",
        "FIT_COLUMNS": "tables",
        "KEPT_TEST_COLUMNS": "tables",
        "REVISION_COLUMNS": "tables",
        "checks_table": "tables",
        "fits_table": "tables",
        "kept_tests_table": "tables",
        "revisions_table": "tables",
        "specimens_table": "tables",
        "workbook_bytes": "workbook",
        "setting_texts": "workbook",
        "SETTING_UNITS": "workbook",
    },
)

__all__ = [
    "document_bytes",
    "export_field_check",
    "FieldReport",
    "field_tests_table",
    "lifts_table",
    "memo_document",
    "provenance_markup",
    "chart_page",
    "NOT_RECORDED",
    "ReportItem",
    "ReportPage",
    "page_name",
    "report_items",
    "report_pages",
    "specimen_links",
    "specimen_page",
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
    "KEPT_TEST_COLUMNS",
    "kept_tests_table",
    "MANIFEST",
    "MANIFEST_COLUMNS",
    "manifest_bytes",
    "interrupted_exports",
    "memo_charts",
    "memo_provenance",
    "MemoPack",
    "PACK_MARK",
    "PACK_SPECIMEN_LIMIT",
    "PackFolderError",
    "PNG_SCALE",
    "Provenance",
    "read_manifest",
    "REDUCTION_METHODS",
    "report_page",
    "REVISION_COLUMNS",
    "revisions_table",
    "specimens_table",
    "StagedPack",
    "start_image_export",
    "table_markup",
    "VERDICT_MARKS",
    "verify_pack",
    "workbook_bytes",
    "setting_texts",
    "SETTING_UNITS",
]
