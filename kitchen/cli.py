"""The command line: a thin layer over the package's functions.

``python -m kitchen report SERIES --out DIR`` reduces a series (its effective data: the raw
files with the revisions of its log applied) and writes its results.
``python -m kitchen revise SERIES --specimen ID --field F --value "4.95 in" --reason ...``
records a revision (``--withdraw ID --reason ...`` withdraws one) and says what it changed;
``python -m kitchen history SERIES`` lists the revisions.
``python -m kitchen field-check SERIES [FIELD_TESTS] --out DIR`` judges the field tests of
the built liner against the series' acceptable zone and writes the check report
(:mod:`kitchen.memo.field_report`).
``report`` also writes the memo pack (:mod:`kitchen.memo.pack`): the charts as HTML, PNG and
SVG, ``results.xlsx`` and ``report.html``, printing its progress on stderr. The verdicts of
``report`` and ``revise`` are drawn against ``--criterion`` when it is given, else against
the criterion of the series' project table; with neither, no verdict is drawn, and the
command says so.
Input problems are printed as a list (file, row, column, what was expected) and the
command exits with status 2; it never shows a traceback for bad input. Without Chromium
for the PNG and SVG charts it exits with status 3, naming what to install; out of memory,
it says so and exits with status 3. No output path may be an input: ``report --out`` onto
the series' folder (or inside it) and ``history --out`` onto a raw file or a log are
refused. Everything printed has its control characters shown as escapes (``\x1b``), so
text stored in a log cannot move the cursor or retitle the terminal; warnings of the
package (a torn last row of a log, a folder an export left) are printed as
``kitchen: warning: ...``.
"""

from __future__ import annotations

import argparse
import contextlib
import gc
import io
import sys
import warnings
from pathlib import Path

from kitchen.analysis import CRITERION_KINDS, parse_criterion
from kitchen.io import TABLE_NAMES, SeriesError
from kitchen.memo import ImageExportUnavailable
from kitchen.settings import CAPILLARY_RISE_OPTIONS, FALLING_HEAD_FITS, Settings
from kitchen.uncertainty import PROPAGATION_METHODS
from kitchen.water import VISCOSITY_METHODS

__all__ = ["main", "build_parser"]

EXIT_INPUT = 2
EXIT_ENVIRONMENT = 3
_TYPED = "given on the command line"


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="python -m kitchen",
        description="Hydraulic conductivity of a compacted-soil series from laboratory tests.",
    )
    commands = parser.add_subparsers(dest="command", required=True)
    report = commands.add_parser("report", help="reduce a series and write its results")
    report.add_argument("series", type=Path, help="series folder or .xlsx workbook")
    report.add_argument("--out", type=Path, required=True, help="folder for the results")
    report.add_argument(
        "--reference-temperature",
        type=float,
        default=20.0,
        help="temperature k is corrected to, degC (default 20)",
    )
    report.add_argument(
        "--viscosity",
        choices=sorted(VISCOSITY_METHODS),
        default="kestin",
        help="water viscosity: kestin (Kestin et al. 1978, default), iapws (IAPWS 2008), "
        "d5084 (the ASTM D5084 equation)",
    )
    report.add_argument(
        "--falling-head-fit",
        choices=FALLING_HEAD_FITS,
        default="log_linear",
        help="log_linear (ln h on time, default) or datum (decay to a fitted tailwater datum)",
    )
    report.add_argument(
        "--uncertainty",
        choices=PROPAGATION_METHODS,
        default="first_order",
        help="interval on k: first_order (GUM, JCGM 100:2008, default) or monte_carlo "
        "(JCGM 101:2008)",
    )
    report.add_argument(
        "--capillary-rise",
        choices=CAPILLARY_RISE_OPTIONS,
        default="off",
        help="off (heads as read, default) or jurin (heads less the standpipe's capillary rise)",
    )
    report.add_argument(
        "--datum-uncertainty",
        type=_datum_uncertainty,
        default=Settings.datum_uncertainty,
        metavar="LENGTH",
        help="how far the falling-head tailwater datum may be off, with its unit (default "
        "'20 mm'; '2 mm' for a surveyed datum): it widens the interval of k under the "
        "log-linear fit",
    )
    _add_memo_options(report)
    _add_revision_commands(commands)
    _add_field_check_command(commands)
    return parser


def _add_field_check_command(commands) -> None:
    check = commands.add_parser(
        "field-check",
        help="judge field tests of the built liner against the series' acceptable zone",
    )
    check.add_argument("series", type=Path, help="series folder or .xlsx workbook (the zone)")
    check.add_argument(
        "field_tests",
        type=Path,
        nargs="?",
        help="the field tests: a CSV file, a folder holding field_tests.csv, or a workbook "
        "with a sheet field_tests (default: the series' own)",
    )
    check.add_argument("--out", type=Path, required=True, help="folder for the check report")
    check.add_argument(
        "--zone",
        choices=("drawn", "fitted"),
        default="drawn",
        help="the zone the tests are held to: drawn (the memo's acceptable zone, default) or "
        "fitted (where the fit's prediction bound meets the criterion)",
    )
    check.add_argument(
        "--effort",
        help="the laboratory compactive effort whose fitted prediction applies to tests that "
        "name none (default: the least favourable)",
    )
    check.add_argument(
        "--same-location",
        type=float,
        default=1.5,
        help="a later test of a lift within this many metres of an earlier one replaces it "
        "(default 1.5)",
    )
    _add_memo_options(check)


def _datum_uncertainty(text: str) -> float:
    """A length typed with its unit, for --datum-uncertainty, in metres."""
    from kitchen.io.units import UnitError, parse_value

    try:
        value = parse_value(text, "length").si
        Settings(datum_uncertainty=value)
    except (UnitError, ValueError) as error:
        raise argparse.ArgumentTypeError(str(error)) from None
    return value


def _add_memo_options(report) -> None:
    report.add_argument(
        "--criterion",
        action=_CriterionOption,
        help="k limit from the project specification: a number in m/s, or with its unit and "
        "direction as in the notebook ('1e-7 cm/s', '>= 1e-4 m/s'); overrides the criterion "
        "of the series' project table (project.csv, or a sheet 'project'); default: the "
        "series' own, and where it has none, no verdict is drawn",
    )
    _add_criterion_kind(report)
    report.add_argument(
        "--proposed-windows",
        action="store_true",
        help="use the tool's proposed reading window for every specimen, not the windows "
        "recorded in the series' window log (windows.csv)",
    )
    report.add_argument(
        "--k-unit", choices=("m/s", "cm/s"), default="m/s", help="k unit of charts and report"
    )
    report.add_argument(
        "--density-unit",
        choices=("Mg/m3", "kN/m3", "lb/ft3"),
        default="Mg/m3",
        help="density unit of charts and report (kN/m3 shows the dry unit weight)",
    )
    report.add_argument(
        "--no-images",
        action="store_true",
        help="skip the PNG and SVG charts (they need Chromium); HTML charts are still written",
    )
    report.add_argument(
        "--self-contained",
        action="store_true",
        help="inline plotly.js (about 4.8 MB) in every HTML page so each opens on its own; "
        "by default the pack holds it once, in charts/plotly.min.js",
    )


def _add_criterion_kind(command) -> None:
    command.add_argument(
        "--criterion-kind",
        choices=CRITERION_KINDS,
        action=_CriterionOption,
        help="maximum: the largest k allowed (a liner, k <= criterion); minimum: the smallest "
        "k required (a drainage layer, k >= criterion); default: the direction typed with "
        "--criterion, else maximum",
    )


def _criterion(arguments):
    """The criterion of --criterion and --criterion-kind (None without --criterion: then
    the series' own is used, and where it has none, no verdict is drawn)."""
    if getattr(arguments, "criterion", None) is None:
        return None
    return parse_criterion(
        arguments.criterion, getattr(arguments, "criterion_kind", None), unit="m/s"
    )


def _criterion_words(criterion, source: str) -> str:
    """The criterion in force and where it comes from, for the printed summary."""
    if criterion is None:
        return (
            "no criterion given (none typed, none in the series' project table): no verdicts "
            "drawn; give one with --criterion or in the series' project table"
        )
    return f"criterion k {criterion.symbol} {float(criterion):g} m/s ({criterion.words}), {source}"


class _CriterionOption(argparse.Action):
    """Stores --criterion or --criterion-kind, refusing at once a criterion that does not
    read (:func:`kitchen.analysis.parse_criterion`), before any work is done."""

    def __call__(self, parser, namespace, values, option_string=None):
        setattr(namespace, self.dest, values)
        try:
            _criterion(namespace)
        except ValueError as error:
            parser.error(str(error))


def _progress(done: int, total: int, what: str) -> None:
    print(f"[{done}/{total}] {what}", file=sys.stderr, flush=True)


def _add_revision_commands(commands) -> None:
    revise = commands.add_parser(
        "revise",
        help="correct one value of a series (the raw files are not touched)",
        description="Append a revision to the series' log (revisions.csv in the series folder, "
        "<stem>.revisions.csv beside a workbook), or withdraw one, and say what it changed.",
    )
    revise.add_argument("series", type=Path, help="series folder or .xlsx workbook")
    revise.add_argument("--specimen", help="specimen id")
    revise.add_argument("--field", help="value to revise: height, diameter, dry_mass, head...")
    revise.add_argument("--value", help='new value with its unit, for example "4.95 in"')
    revise.add_argument(
        "--reading", type=int, help="for a reading: its row number in the file (header = row 1)"
    )
    revise.add_argument("--table", choices=TABLE_NAMES, help="default: specimens, or the readings")
    revise.add_argument("--withdraw", metavar="ID", help="withdraw the revision with this id")
    revise.add_argument("--reason", required=True, help="why (required)")
    revise.add_argument("--who", default="", help="who makes the revision")
    revise.add_argument(
        "--criterion",
        action=_CriterionOption,
        help="k limit, in m/s or with its unit and direction ('>= 1e-4 m/s'), to show each "
        "verdict before and after; default: the criterion of the series' project table, "
        "and where it has none, no verdict",
    )
    _add_criterion_kind(revise)
    window = commands.add_parser(
        "window",
        help="record the falling-head reading window chosen for a specimen",
        description="Append a row to the series' window log (windows.csv in the series "
        "folder, <stem>.windows.csv beside a workbook); report then reduces the specimen with "
        "that window. The readings are named by their row numbers in the readings file.",
    )
    window.add_argument("series", type=Path, help="series folder or .xlsx workbook")
    window.add_argument("--specimen", required=True, help="specimen id")
    window.add_argument("--first-row", type=int, help="file row of the window's first reading")
    window.add_argument("--last-row", type=int, help="file row of its last reading (included)")
    window.add_argument(
        "--proposed", action="store_true", help="hand the specimen back to the tool's proposal"
    )
    window.add_argument("--reason", required=True, help="why this window (required)")
    window.add_argument("--who", default="", help="who chose it")
    keep = commands.add_parser(
        "keep",
        help="keep a test on record despite a failed check, or withdraw a keep",
        description="Append a row to the series' log of tests kept on record (kept_tests.csv "
        "in the series folder, <stem>.kept_tests.csv beside a workbook). A test that failed "
        "a validity check is 'not judged' and left out of the zone and the trends; a test "
        "kept on record with a reason is judged again. Rows are never edited: --withdraw ID "
        "appends a row that withdraws a keep.",
    )
    keep.add_argument("series", type=Path, help="series folder or .xlsx workbook")
    keep.add_argument("--specimen", help="specimen id")
    keep.add_argument(
        "--method",
        choices=("falling_head", "constant_head"),
        default="falling_head",
        help="the test kept (default falling_head)",
    )
    keep.add_argument("--withdraw", metavar="ID", help="withdraw the keep with this id")
    keep.add_argument("--reason", required=True, help="why (required)")
    keep.add_argument("--who", default="", help="who keeps it")
    verify = commands.add_parser(
        "verify",
        help="check a memo pack against its manifest (sizes and SHA-256 of every file)",
    )
    verify.add_argument("pack", type=Path, help="the memo pack's folder")
    history = commands.add_parser("history", help="list a series' revisions")
    history.add_argument("series", type=Path, help="series folder or .xlsx workbook")
    history.add_argument("--out", type=Path, help="also write the history to this CSV file")


def _report(arguments) -> int:
    from kitchen.io import read_ahead

    # the series' CSV files are parsed on a thread while the modules that check and reduce
    # it are imported (Chromium, for the images, is already starting)
    with _warnings_restored():
        parsing = read_ahead(arguments.series)
        from kitchen.memo import export_memo_pack, start_image_export
        from kitchen.revisions import windows_path
        from kitchen.workspace import Workspace

        if not arguments.no_images:
            start_image_export()
        if parsing is not None:
            parsing.join()
    settings = Settings(
        arguments.reference_temperature,
        arguments.viscosity,
        uncertainty_method=arguments.uncertainty,
        falling_head_fit=arguments.falling_head_fit,
        capillary_rise=arguments.capillary_rise,
        datum_uncertainty=arguments.datum_uncertainty,
    )
    workspace = Workspace(
        arguments.series, settings, windows_on_record=not arguments.proposed_windows
    )
    imports_done()  # after the reading's own first imports (pint's registry)
    series, windows = workspace.series, workspace.windows
    given = _criterion(arguments)
    criterion, source = workspace.criterion_in_force(given)
    if given is not None:
        source = _TYPED
    pack = export_memo_pack(
        workspace,
        arguments.out,
        criterion=given,
        criterion_source=source if given is not None else None,
        k_unit=arguments.k_unit,
        density_unit=arguments.density_unit,
        images=not arguments.no_images,
        self_contained=arguments.self_contained,
        progress=_progress,
    )
    effective = workspace.effective
    path = arguments.out / "results.csv"
    print(f"{len(workspace.results())} result row(s) for {series.name} written to {path}")
    print(f"memo pack: {len(pack)} file(s) in {arguments.out} ({pack.seconds:.1f} s)")
    if effective.log_path is not None and Path(effective.log_path).exists():
        print(f"{effective.revision_count} revision(s) applied from {effective.log_path}")
    else:
        print("no revisions: the series has no revision log; its raw files are used as written")
    print(_criterion_words(criterion, source))
    if windows:
        print(f"{len(windows)} reading window(s) chosen, from {windows_path(arguments.series)}")
    return 0


def _revise(arguments, parser) -> int:
    from kitchen.revisions import revise, withdraw
    from kitchen.workspace import Workspace, revision_effect

    value_options = ("specimen", "field", "value", "reading", "table")
    if arguments.withdraw:
        given = [f"--{name}" for name in value_options if getattr(arguments, name) is not None]
        if given:
            parser.error(f"--withdraw takes only --reason and --who, not {', '.join(given)}")
        row = withdraw(
            arguments.series, arguments.withdraw, reason=arguments.reason, who=arguments.who
        )
        print(f"recorded withdrawal {row.id} of revision {row.withdraws}")
    else:
        needed = ("specimen", "field", "value")
        missing = [f"--{name}" for name in needed if getattr(arguments, name) is None]
        if missing:
            parser.error(f"revise needs {', '.join(missing)} (or --withdraw ID)")
        row = revise(
            arguments.series,
            specimen=arguments.specimen,
            field=arguments.field,
            value=arguments.value,
            reason=arguments.reason,
            reading=arguments.reading,
            table=arguments.table,
            who=arguments.who,
        )
        print(f"recorded revision {row.id}")
    print(f"  {row.describe()}")
    try:
        typed = _criterion(arguments)
        criterion, source = Workspace(arguments.series).criterion_in_force(typed)
        moved = revision_effect(arguments.series, row.id, criterion=criterion)
    except Exception as error:  # the revision stands; only the summary failed
        print(
            f"kitchen: revision {row.id} is recorded, but what it changed could not be worked "
            f"out: {type(error).__name__}: {error}",
            file=sys.stderr,
        )
        return 0
    print(_criterion_words(criterion, _TYPED if typed is not None else source))
    if moved.empty:
        print("no result moved")
    for _, change in moved.iterrows():
        print(f"  {change['specimen']} {change['method']}: " + _change_words(change))
    return 0


def _change_words(change) -> str:
    def pair(name, scale, form, unit=""):
        old, new = change[f"{name}_before"], change[f"{name}_after"]
        words = {True: "yes", False: "no"}
        text = [
            format(v * scale, form) if isinstance(v, float) else words.get(v, str(v))
            for v in (old, new)
        ]
        return f"{text[0]} -> {text[1]}{unit}"

    words = [
        f"dry density {pair('dry_density', 1e-3, '.4f', ' Mg/m3')}",
        f"void ratio {pair('void_ratio', 1.0, '.4f')}",
        f"k20 {pair('k_reference', 1.0, '.3g', ' m/s')}",
        f"valid {pair('valid', 1, '')}",
    ]
    if not change.isna()["verdict_after"]:
        words.append(f"verdict {pair('verdict', 1, '')}")
    return "; ".join(words)


def _window(arguments, parser) -> int:
    from kitchen.revisions import (
        choose_window,
        clear_window,
        read_window_choices,
        standing_choices,
        windows_path,
    )
    from kitchen.workspace import Workspace

    given = arguments.first_row is not None, arguments.last_row is not None
    if arguments.proposed == any(given) or (not arguments.proposed and not all(given)):
        parser.error("give --first-row and --last-row, or --proposed")
    if arguments.proposed:
        row = clear_window(
            arguments.series, arguments.specimen, reason=arguments.reason, who=arguments.who
        )
    else:
        row = choose_window(
            arguments.series,
            arguments.specimen,
            arguments.first_row,
            arguments.last_row,
            reason=arguments.reason,
            who=arguments.who,
            series=Workspace(arguments.series).series,
        )
    print(f"recorded window {row.id} in {windows_path(arguments.series)}: {row.describe()}")
    standing = [c for c in standing_choices(read_window_choices(arguments.series)).values()]
    chosen = [c.describe() for c in standing if not c.proposed]
    print(f"windows on record: {'; '.join(chosen) if chosen else 'none (all proposed)'}")
    return 0


def _verify(arguments) -> int:
    from kitchen.memo import MANIFEST, read_manifest, verify_pack

    problems = verify_pack(arguments.pack)
    if problems:
        for problem in problems:
            print(f"kitchen: {arguments.pack}: {problem}", file=sys.stderr)
        return EXIT_INPUT
    files = len(read_manifest(arguments.pack))
    print(f"{arguments.pack}: all {files} file(s) of {MANIFEST} present and as exported")
    return 0


def _refuse_input_as_output(out: Path, series: Path) -> None:
    """Refuse an output file that is the series itself, a file of its folder, or a log."""
    from kitchen.revisions import kept_tests_path, revisions_path, windows_path

    target, source = out.resolve(), series.resolve()
    logs = {p(series).resolve() for p in (revisions_path, windows_path, kept_tests_path)}
    inside = source.is_dir() and source in target.parents and target.exists()
    if target == source or target in logs or inside or target.is_dir():
        raise ValueError(
            f"{out}: is the series, one of its files or logs, or a folder; the tool never "
            "writes over its inputs: give a new file outside the series folder"
        )


def _history(arguments) -> int:
    from kitchen.io import write_csv
    from kitchen.revisions import format_history, history_table, read_revisions, revisions_path

    if not arguments.series.exists():
        raise ValueError(f"{arguments.series}: not found: expected a series folder or .xlsx")
    if arguments.out is not None:
        _refuse_input_as_output(arguments.out, arguments.series)
    revisions = read_revisions(arguments.series)
    table = history_table(revisions)
    standing = int((table["status"] == "in force").sum())
    log = revisions_path(arguments.series)
    if log.exists():
        print(f"{len(table)} row(s) in {log}: {standing} in force")
    else:
        print(f"no revisions yet: {arguments.series} has no revision log ({log.name} is written "
              "beside it by the first `revise`)")  # fmt: skip
    print(format_history(revisions))
    if arguments.out is not None:
        print(f"history written to {write_csv(arguments.out, table)}")
    return 0


def _keep(arguments, parser) -> int:
    from kitchen.revisions import keep_test, kept_tests_path, withdraw_kept_test
    from kitchen.workspace import Workspace

    if (arguments.withdraw is None) == (arguments.specimen is None):
        parser.error("give --specimen (to keep a test) or --withdraw ID, not both")
    if arguments.withdraw is not None:
        row = withdraw_kept_test(
            arguments.series, arguments.withdraw, reason=arguments.reason, who=arguments.who
        )
    else:
        row = keep_test(
            arguments.series,
            arguments.specimen,
            arguments.method,
            reason=arguments.reason,
            who=arguments.who,
            series=Workspace(arguments.series).series,
        )
    print(f"recorded {row.id} in {kept_tests_path(arguments.series)}: {row.describe()}")
    return 0


def _field_check(arguments) -> int:
    from kitchen.memo import export_field_check
    from kitchen.workspace import Workspace

    workspace = Workspace(arguments.series, windows_on_record=not arguments.proposed_windows)
    given = _criterion(arguments)
    report = export_field_check(
        workspace,
        arguments.field_tests or arguments.series,
        arguments.out,
        criterion=given,
        criterion_source=_TYPED if given is not None else None,
        zone=arguments.zone,
        effort=arguments.effort,
        same_location=arguments.same_location,
        k_unit=arguments.k_unit,
        density_unit=arguments.density_unit,
        images=not arguments.no_images,
        self_contained=arguments.self_contained,
        progress=_progress,
    )
    check = report.check
    print(f"{check.summary}")
    for _, lift in check.lifts.iterrows():
        outside = f"; outside: {lift['outside']}" if lift["outside"] else ""
        name = lift["lift"] if lift["lift"] == "all lifts" else f"lift {lift['lift']}"
        print(f"  {name}: {lift['inside']} of {lift['tests']} inside{outside}")
    for note in check.notes:
        print(f"  note: {note}")
    print(f"check report: {len(report.files)} file(s) in {arguments.out} ({report.seconds:.1f} s)")
    return 0


def shown(text: str) -> str:
    """`text` as printed: each control character as an escape (:func:`kitchen.io.printable`),
    line feeds and tabs kept."""
    from kitchen.io import printable

    return printable(text)


MMAP_THRESHOLD = 1 << 24
"""Bytes from which the C allocator maps a block of its own: 16 MiB, an array of 2·10⁶
readings (glibc starts at 128 KiB and raises it up to 32 MiB as mapped blocks are freed)."""


@contextlib.contextmanager
def _warnings_restored():
    """The warnings filters and their recorder as they were, once the block is done.

    pandas sets and restores the filters around many of its calls
    (``warnings.catch_warnings``), which is not safe while two threads use pandas: one
    thread's restore can undo the other's and leave a filter of pandas' in place, or the
    recorder of :func:`main` replaced. Around the block in which the series is parsed on a
    thread (:func:`kitchen.io.read_ahead`), whose end joins that thread, everything is put
    back as it was; nothing in the block depends on a warning meanwhile (rows with a cell
    too many are found without the parser's).
    """
    filters = list(warnings.filters)
    with warnings.catch_warnings():  # restores the recorder and the filters' list
        yield
    if warnings.filters != filters:  # the list itself changed under another thread
        warnings.filters[:] = filters
        with warnings.catch_warnings():  # which has the interpreter read them again
            pass


def imports_done() -> None:
    """Resume the cyclic garbage collector that ``python -m kitchen`` paused for its imports.

    Importing the package and the libraries that read and reduce a series (pandas,
    scipy, pint) makes some 150,000 objects that live as long as the process, yet the
    collector would walk them again and again. They are
    moved out of its reach (``gc.freeze``) and the collector resumed, for the command's
    own objects. Nothing is collected first (one pass over them costs as much): a frozen
    cycle is never freed, but the imports leave next to none, and parsing a series' CSV
    files, which ``report`` does on a thread meanwhile (:func:`kitchen.io.read_ahead`),
    leaves none (``tests/workspace/test_workspace.py``). Where the collector was not paused (the
    command line called from Python, as the tests do) this does nothing.
    """
    if not gc.isenabled():
        gc.freeze()
        gc.enable()


def return_freed_memory() -> bool:
    """Have the C allocator give large freed blocks back to the system at once.

    glibc raises its threshold for mapping a block of its own each time such a block is
    freed (up to 32 MiB), so after the CSV parser's first chunks the arrays of a logger
    record are carved out of the heap, which is not given back while anything above them
    lives: a ``report`` on 10⁷ readings then peaks some 100 MB higher. Fixing the threshold
    (``mallopt(M_MMAP_THRESHOLD, 16 MiB)``, documented in ``man 3 mallopt``) keeps every
    array of 16 MiB or more (the record's own arrays from 2·10⁶ readings on) in a mapping
    of its own, returned when freed. Smaller arrays come from the heap and are reused
    without the page faults of a fresh mapping: fixed at 128 KiB, a report on 10⁶ readings
    took 34,000 more faults (102,700 against 68,900) and 0.03-0.05 s longer, for a peak on
    10⁷ readings 7 MiB lower (963 against 970 MiB). Called once by ``python -m kitchen``;
    elsewhere (another C library, another system) it does nothing and returns False.
    """
    from kitchen.io import libc_function

    mallopt = libc_function("mallopt")
    if mallopt is None:
        return False
    m_mmap_threshold = -3  # from glibc's malloc.h
    return bool(mallopt(m_mmap_threshold, MMAP_THRESHOLD))


def main(argv: list[str] | None = None) -> int:
    """Entry point; returns the exit status.

    What the command prints goes through :func:`shown`, and the package's warnings are
    printed as ``kitchen: warning: ...`` on stderr.
    """

    class _Shown(io.TextIOBase):
        def __init__(self, target):
            self.target = target

        def write(self, text):
            self.target.write(shown(text))
            return len(text)

        def flush(self):
            self.target.flush()

    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        with contextlib.redirect_stdout(_Shown(sys.stdout)):
            with contextlib.redirect_stderr(_Shown(sys.stderr)):
                code = _main(argv)
                said = set()
                for warning in caught:
                    text = str(warning.message)
                    if issubclass(warning.category, UserWarning) and text not in said:
                        said.add(text)
                        print(f"kitchen: warning: {text}", file=sys.stderr)
    return code


def _main(argv: list[str] | None) -> int:
    parser = build_parser()
    arguments = parser.parse_args(argv)
    if arguments.command != "report":  # which resumes it after its own imports
        imports_done()
    try:
        if arguments.command == "report":
            return _report(arguments)
        if arguments.command == "revise":
            return _revise(arguments, parser)
        if arguments.command == "verify":
            return _verify(arguments)
        if arguments.command == "window":
            return _window(arguments, parser)
        if arguments.command == "history":
            return _history(arguments)
        if arguments.command == "keep":
            return _keep(arguments, parser)
        if arguments.command == "field-check":
            return _field_check(arguments)
    except SeriesError as error:
        print(f"kitchen: {arguments.series}: {error}", file=sys.stderr)
        return EXIT_INPUT
    except ImageExportUnavailable as error:
        print(f"kitchen: {error} (or pass --no-images)", file=sys.stderr)
        return EXIT_ENVIRONMENT
    except (ValueError, OSError) as error:
        print(f"kitchen: {error}", file=sys.stderr)
        return EXIT_INPUT
    except MemoryError:
        print(
            f"kitchen: out of memory working on {getattr(arguments, 'series', None) or ''}: "
            "the data are larger than this machine's memory (or its limit) allows; split a "
            "long record of readings, or run on a machine with more memory. Nothing was "
            "written",
            file=sys.stderr,
        )
        return EXIT_ENVIRONMENT
    parser.error(f"unknown command {arguments.command!r}")
    return EXIT_INPUT
