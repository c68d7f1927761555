"""The command line: report, and the revisions (revise, history).

Each command is run in this process (tests/cli_runner.py), which checks what it prints and
its exit status as a user sees them; ``python -m kitchen`` itself is run once in a new
interpreter, as a user runs it, by test_report_writes_results.

The log, the effective data, the recording of revisions and their history are tested beside
their modules, in tests/revisions/.
"""

import subprocess
import sys
from pathlib import Path

import pandas as pd
import pytest
from cli_runner import run_cli
from html_cells import TableCells
from revision_series import log_rows
from series_files import SAMPLES, copy_sample

from kitchen.analysis import NO_CRITERION, parse_criterion
from kitchen.memo import manifest
from kitchen.revisions import revise, revisions_path


def test_report_writes_results(tmp_path):
    # the entry point, in a new interpreter as a user runs it: the one test that does
    def python_m_kitchen(*arguments):
        command = [sys.executable, "-m", "kitchen", *map(str, arguments)]
        return subprocess.run(command, capture_output=True, text=True)

    usage = python_m_kitchen("--help")
    assert usage.returncode == 0, usage.stderr
    assert usage.stdout.startswith("usage: python -m kitchen")
    assert all(command in usage.stdout for command in ("report", "revise", "history"))
    done = python_m_kitchen("report", SAMPLES / "clay_liner", "--out", tmp_path, "--no-images")
    assert done.returncode == 0, done.stderr
    table = pd.read_csv(tmp_path / "results.csv")
    assert len(table) == 14
    assert {"k20 [m/s]", "k20_low [m/s]", "k20_high [m/s]", "valid", "checks"} <= set(table)


def test_report_options(tmp_path):
    done = run_cli(
        "report",
        "--no-images",
        SAMPLES / "drainage_sand",
        "--out",
        tmp_path,
        "--reference-temperature",
        "10",
        "--viscosity",
        "d5084",
    )
    assert done.returncode == 0, done.stderr
    assert "k10 [m/s]" in pd.read_csv(tmp_path / "results.csv").columns


def test_datum_uncertainty_is_typed_with_its_unit_and_reaches_the_interval(tmp_path):
    # a datum known to ±2 mm instead of ±20 mm narrows every falling-head interval; k20
    # itself does not move (the datum's error enters the interval, not the estimate)
    wide = run_cli("report", SAMPLES / "clay_liner", "--out", tmp_path / "wide", "--no-images")
    narrow = run_cli("report", SAMPLES / "clay_liner", "--out", tmp_path / "narrow",
                     "--no-images", "--datum-uncertainty", "0.2 cm")  # fmt: skip
    assert wide.returncode == 0 and narrow.returncode == 0, narrow.stderr
    wide, narrow = (pd.read_csv(tmp_path / name / "results.csv") for name in ("wide", "narrow"))
    falling = wide["method"] == "falling_head"
    assert falling.any()
    assert (wide["k20 [m/s]"] == narrow["k20 [m/s]"]).all()
    width = wide["k20_high [m/s]"] - wide["k20_low [m/s]"]
    narrower = narrow["k20_high [m/s]"] - narrow["k20_low [m/s]"]
    assert (narrower[falling] < width[falling]).all()
    assert (narrower[~falling] == width[~falling]).all()
    refused = run_cli("report", SAMPLES / "clay_liner", "--out", tmp_path / "bad",
                      "--no-images", "--datum-uncertainty", "2 g")  # fmt: skip
    assert refused.returncode == 2 and "Traceback" not in refused.stderr
    assert "--datum-uncertainty" in refused.stderr and not (tmp_path / "bad").exists()


def test_bad_series_lists_problems_without_traceback(tmp_path):
    folder = tmp_path / "bad"
    folder.mkdir()
    (folder / "specimens.csv").write_text(
        "specimen,diameter [mm],height,dry_mass [g],specific_gravity\nA,100,116,1600,2.7\n"
    )
    (folder / "falling_head.csv").write_text("specimen,time [s],head [m]\nA,0,1\nA,60,x\n")
    done = run_cli("report", folder, "--out", tmp_path / "out")
    assert done.returncode == 2
    assert "Traceback" not in done.stderr
    assert "specimens.csv, row 1, column 'height'" in done.stderr
    assert "falling_head.csv, row 3, column 'head [m]': expected a number, found 'x'" in done.stderr
    assert not (tmp_path / "out" / "results.csv").exists()


def test_missing_series_is_named(tmp_path):
    done = run_cli("report", tmp_path / "nowhere", "--out", tmp_path / "out")
    assert done.returncode == 2
    assert "not found" in done.stderr and "Traceback" not in done.stderr


def test_criterion_is_typed_as_in_the_notebook(tmp_path):
    # one reading of a criterion (kitchen.analysis.parse_criterion) for the notebook and the
    # command line: with its unit and direction; 1e-2 cm/s is 1e-4 m/s (SI, common practice,
    # no source); the invented drainage sand meets it (sample_data/drainage_sand/truth.json)
    done = run_cli("report", SAMPLES / "drainage_sand", "--out", tmp_path, "--no-images",
                   "--criterion", ">= 1e-2 cm/s")  # fmt: skip
    assert done.returncode == 0, done.stderr
    report = (tmp_path / "report.html").read_text()
    assert "k20 ≥ 1×10⁻⁴ m/s (smallest k required)" in report and "meets: 4" in report


@pytest.mark.parametrize(
    ("typed", "words"),
    # 1e-7 cm/s is 1e-9 m/s (SI, common practice, no source); the invented clay of the
    # sample has specimens on both sides of it (sample_data/clay_liner/truth.json)
    [("1e-7 cm/s", "k20 ≤ 1×10⁻⁹ m/s (largest k allowed)"),
     ("≥ 1e-4 m/s", "k20 ≥ 1×10⁻⁴ m/s (smallest k required)"),
     ("k <= 1e-9 m/s", "k20 ≤ 1×10⁻⁹ m/s (largest k allowed)")],
)  # fmt: skip
def test_the_command_line_reads_a_criterion_as_the_panel_does(tmp_path, typed, words):
    done = run_cli("report", SAMPLES / "clay_liner", "--out", tmp_path, "--no-images",
                   "--criterion", typed)  # fmt: skip
    assert done.returncode == 0, done.stderr
    assert words in (tmp_path / "report.html").read_text()
    assert parse_criterion(typed) == pytest.approx(1e-9 if "≤" in words else 1e-4)


@pytest.mark.parametrize(
    ("arguments", "message"),
    [
        (("--criterion", "fast"), "criterion 'fast': expected a number and its unit"),
        (("--criterion", "1e-9 m"), "has unit 'm'; expected one of m/s, cm/s"),
        (("--criterion", "0"), "expected a positive"),
        (("--criterion", ">= 1e-4 m/s", "--criterion-kind", "maximum"), "its kind is given as"),
        (("--criterion-kind", "maximum", "--criterion", "min 1e-4"), "its kind is given as"),
    ],
)
def test_a_criterion_that_does_not_read_is_refused_before_any_work(tmp_path, arguments, message):
    out = tmp_path / "out"
    done = run_cli("report", SAMPLES / "drainage_sand", "--out", out, "--no-images", *arguments)
    assert done.returncode == 2 and message in done.stderr
    assert "Traceback" not in done.stderr and not out.exists()


# --- revisions: revise, history, and a report that applies them -----------------------------


@pytest.fixture
def clay(tmp_path):
    return copy_sample(SAMPLES / "clay_liner", tmp_path / "clay_liner")


def test_command_line_revise_history_report(clay, tmp_path):
    def main(*arguments):
        done = run_cli(*arguments)
        assert done.returncode == 0, done.stderr
        return done.stdout

    out = main("revise", clay, "--specimen", "QF-01", "--field", "height", "--value", "4.95 in",
               "--reason", "re-measured after test", "--who", "R. Okafor", "--criterion", "1e-9")  # fmt: skip
    [row] = log_rows(clay)
    assert f"recorded revision {row['id']}" in out
    # 116.27 mm -> 125.73 mm: rho_d falls by 116.27/125.73 (rho_d = Ms/(A L); Das)
    assert "QF-01 falling_head: dry density 1.7049 -> 1.5767 Mg/m3" in out
    main("revise", clay, "--specimen", "QF-01", "--field", "head", "--reading", "3",
         "--value", "184.5 cm", "--reason", "typo")  # fmt: skip
    out = main("history", clay, "--out", tmp_path / "history.csv")
    assert "2 row(s)" in out and "reading row 3 head: 184.7 cm -> 184.5 cm" in out
    assert pd.read_csv(tmp_path / "history.csv")["status"].tolist() == ["in force"] * 2
    out = main("report", clay, "--out", tmp_path / "out", "--no-images")
    assert "2 revision(s) applied" in out
    table = pd.read_csv(tmp_path / "out" / "results.csv")
    assert table.loc[0, "dry_density [Mg/m3]"] == pytest.approx(1.5767, abs=1e-4)
    out = main("revise", clay, "--withdraw", row["id"], "--reason", "wrong specimen")
    assert f"of revision {row['id']}" in out


@pytest.mark.parametrize(
    ("arguments", "message"),
    [
        (
            ["--specimen", "QF-99", "--field", "height", "--value", "4.95 in"],
            "unknown specimen 'QF-99'",
        ),
        (
            ["--specimen", "QF-01", "--field", "height", "--value", "4.95 g"],
            "unit 'g' is not a length",
        ),
        (["--specimen", "QF-01", "--field", "height"], "revise needs --value"),
        (["--withdraw", "abcdef12", "--specimen", "QF-01"], "--withdraw takes only --reason"),
        (["--withdraw", "abcdef12"], "no revision 'abcdef12'"),
    ],
)
def test_command_line_bad_input_exits_2_and_writes_nothing(clay, arguments, message):
    done = run_cli("revise", clay, *arguments, "--reason", "r")  # usage errors exit 2 too
    assert done.returncode == 2
    assert message in done.stderr
    assert not revisions_path(clay).exists()


def test_command_line_bad_input_shows_no_traceback(clay):
    done = run_cli("revise", clay, "--specimen", "QF-01", "--field", "height", "--value", "-1 mm",
                   "--reason", "r")  # fmt: skip
    assert done.returncode == 2 and "Traceback" not in done.stderr
    assert "must be greater than zero; nothing was written" in done.stderr
    assert not revisions_path(clay).exists()


def _snapshot(folder: Path) -> dict[str, bytes]:
    return {str(p.relative_to(folder)): p.read_bytes() for p in folder.rglob("*") if p.is_file()}


def test_export_failure_leaves_the_previous_report(clay, tmp_path, monkeypatch):
    out = tmp_path / "out"
    done = run_cli("report", clay, "--out", out, "--no-images")
    assert done.returncode == 0, done.stderr
    previous = _snapshot(out)
    assert "results.csv" in previous
    revise(clay, specimen="QF-01", field="height", value="4.95 in", reason="re-measured")

    class FullDisk:  # the pack's first file: created, then the disk is full mid-write
        def __init__(self, path, mode):
            self.stream = open(path, mode)  # noqa: SIM115 - closed in __exit__

        def __enter__(self):
            return self

        def __exit__(self, *details):
            self.stream.close()

        def write(self, data):
            self.stream.write(data[:100])
            raise OSError(28, "No space left on device")

    def opened(path, mode="r", *arguments, **keywords):  # the pack's new files only
        if mode == "xb":
            return FullDisk(path, mode)
        return open(path, mode, *arguments, **keywords)  # noqa: SIM115 - the caller's

    monkeypatch.setattr(manifest, "open", opened, raising=False)
    done = run_cli("report", clay, "--out", out, "--no-images")
    monkeypatch.undo()
    assert done.returncode == 2
    assert "no room on the disk for the pack (results.csv could not be" in done.stderr
    assert _snapshot(out) == previous  # every file as it was, and no temporary left behind


# --- the criterion belongs to the project -------------------------------------------------


def _specimens_of(page: str) -> list[dict[str, str]]:
    """The data cells of the report's specimens table, row by row."""
    table = page.split("<h2>Specimens</h2>", 1)[1].split("</table>", 1)[0]
    parser = TableCells()
    parser.feed(table)
    header = [text for tag, _, text in parser.cells if tag == "th"]
    cells = [text for tag, _, text in parser.cells if tag == "td"]
    return [dict(zip(header, cells[i : i + len(header)], strict=True)) for i in
            range(0, len(cells), len(header))]  # fmt: skip


def test_a_sand_reported_without_a_criterion_is_not_judged_against_a_liners_limit(tmp_path):
    # the drainage sand carries no criterion (sample_data/README.md): no verdict is drawn,
    # and the report says so, rather than a liner's 1e-9 m/s maximum (US 40 CFR 258.40)
    # failing every sand specimen of k20 2.6e-4 to 8.3e-4 m/s (its truth.json)
    done = run_cli("report", SAMPLES / "drainage_sand", "--out", tmp_path, "--no-images")
    assert done.returncode == 0, done.stderr
    assert "no criterion given" in done.stdout and "no verdicts drawn" in done.stdout
    page = (tmp_path / "report.html").read_text()
    judged = page.split("<h2>Methods and their sources</h2>", 1)[0]  # the methods cite 1e-9
    assert "does not meet" not in judged and "1×10⁻⁹" not in judged
    rows = _specimens_of(page)
    assert len(rows) == 4 and all("no criterion given" in row["verdict"] for row in rows)
    assert "no criterion given: no verdicts and no acceptable zone" in page
    sheet = pd.read_excel(tmp_path / "results.xlsx", sheet_name="specimens")
    assert set(sheet["verdict"]) == {NO_CRITERION} and sheet["valid"].all()


def test_a_smallest_k_says_at_least_and_claims_no_zone_it_does_not_draw(tmp_path):
    # 1e-4 m/s as the smallest k of a drainage layer (common practice, no source); the sand
    # has no water contents, so no acceptable zone is drawn, and no row may say it lies
    # outside one
    done = run_cli("report", SAMPLES / "drainage_sand", "--out", tmp_path, "--no-images",
                   "--criterion", "1e-4", "--criterion-kind", "minimum")  # fmt: skip
    assert done.returncode == 0, done.stderr
    page = (tmp_path / "report.html").read_text()
    rows = _specimens_of(page)
    assert [row["verdict"] for row in rows] == ["● meets"] * 4
    assert all(row["in acceptable zone"] != "no" for row in rows)
    assert "at least 1×10⁻⁴ m/s" in page and "at most" not in page
    sheet = pd.read_excel(tmp_path / "results.xlsx", sheet_name="specimens")
    assert sheet["in_acceptable_zone"].isna().all()


def test_the_series_criterion_is_used_and_the_command_line_overrides_it(tmp_path):
    folder = copy_sample(SAMPLES / "drainage_sand", tmp_path / "sand")
    (folder / "project.csv").write_text("setting,value\ncriterion,>= 1e-4 m/s\n")
    done = run_cli("report", folder, "--out", tmp_path / "own", "--no-images")
    assert done.returncode == 0, done.stderr
    page = (tmp_path / "own" / "report.html").read_text()
    assert "meets: 4" in page and "project.csv, row 2" in page
    # a liner's limit typed on the command line overrides the series' own (every sand k20
    # is above 1e-9 m/s, truth.json)
    done = run_cli("report", folder, "--out", tmp_path / "typed", "--no-images",
                   "--criterion", "1e-9")  # fmt: skip
    page = (tmp_path / "typed" / "report.html").read_text()
    assert "does not meet: 4" in page and "given on the command line" in page


def test_revise_judges_against_the_series_criterion_unless_one_is_typed(clay, tmp_path):
    # QF-03 (true k20 6.39e-10 m/s) meets the clay liner's 1e-9 m/s of its project table;
    # a height of 4.8 in keeps it meeting, 1e-10 m/s typed makes it fail (README.md)
    done = run_cli("revise", clay, "--specimen", "QF-03", "--field", "height", "--value",
                   "4.8 in", "--reason", "re-measured")  # fmt: skip
    assert done.returncode == 0, done.stderr
    assert "verdict meets -> meets" in done.stdout
    done = run_cli("revise", clay, "--specimen", "QF-03", "--field", "height", "--value",
                   "4.7 in", "--reason", "again", "--criterion", "1e-10")  # fmt: skip
    assert "verdict does not meet -> does not meet" in done.stdout
    (clay / "project.csv").unlink()
    done = run_cli("revise", clay, "--specimen", "QF-03", "--field", "height", "--value",
                   "4.6 in", "--reason", "once more")  # fmt: skip
    assert done.returncode == 0 and "; verdict" not in done.stdout
    assert "no criterion given" in done.stdout


def test_a_project_criterion_that_does_not_read_is_named_where_it_stands(tmp_path):
    folder = copy_sample(SAMPLES / "drainage_sand", tmp_path / "sand")
    (folder / "project.csv").write_text("setting,value\ncriterion,>= 1e-4\n")
    done = run_cli("report", folder, "--out", tmp_path / "out", "--no-images")
    assert done.returncode == 2 and "Traceback" not in done.stderr
    assert "project.csv, row 2, column 'value': criterion" in done.stderr
    assert not (tmp_path / "out").exists()
    # a criterion typed on the command line stands in for it
    done = run_cli("report", folder, "--out", tmp_path / "typed", "--no-images",
                   "--criterion", ">= 1e-4 m/s")  # fmt: skip
    assert done.returncode == 0, done.stderr


def test_keep_puts_a_test_back_among_those_judged_and_withdraw_takes_it_out(clay, tmp_path):
    # QF-04 fails the trend check (the sample generator makes it drift): not judged until
    # the engineer keeps it on record with a reason; the keep is appended, never edited
    def verdict_of(out):
        assert run_cli("report", clay, "--out", out, "--no-images").returncode == 0
        book = pd.read_excel(out / "results.xlsx", sheet_name="specimens")
        return book.set_index("specimen").at["QF-04", "verdict"]

    assert verdict_of(tmp_path / "before") == "not judged (test not valid)"
    run = run_cli("keep", clay, "--specimen", "QF-04", "--reason", "drift from the bath, k steady")
    assert run.returncode == 0 and "kept on record" in run.stdout
    kept_id = run.stdout.split()[1]
    assert verdict_of(tmp_path / "kept") in ("meets", "does not meet", "not conclusive")
    run = run_cli("keep", clay, "--withdraw", kept_id, "--reason", "second look at the bath log")
    assert run.returncode == 0 and "withdrawn" in run.stdout
    assert verdict_of(tmp_path / "after") == "not judged (test not valid)"
    assert len((clay / "kept_tests.csv").read_text().splitlines()) == 3  # header and 2 rows


@pytest.mark.parametrize(
    ("arguments", "message"),
    [
        (["--specimen", "QF-99"], "has no falling head test"),
        ([], "give --specimen"),
        (["--withdraw", "00000000"], "no keep '00000000' in force"),
    ],
)
def test_keep_refuses_in_words_and_writes_nothing(clay, arguments, message):
    run = run_cli("keep", clay, *arguments, "--reason", "because")
    assert run.returncode == 2 and message in run.stderr and "Traceback" not in run.stderr
    assert not (clay / "kept_tests.csv").exists()


def test_a_series_without_a_revision_log_is_said_so_never_named(clay, tmp_path):
    """The terminal never names a revisions file that is not there."""
    assert not revisions_path(clay).exists()
    report = run_cli("report", clay, "--out", tmp_path / "out", "--no-images")
    assert report.returncode == 0, report.stderr
    assert "revisions.csv" not in report.stdout
    assert "no revisions: the series has no revision log" in report.stdout
    history = run_cli("history", clay)
    assert history.returncode == 0, history.stderr
    assert f"no revisions yet: {clay} has no revision log" in history.stdout
    assert "0 row(s) in" not in history.stdout
    assert not revisions_path(clay).exists()


@pytest.mark.parametrize(
    "target", ["specimens.csv", "falling_head.csv", "revisions.csv", "windows.csv", "."]
)
def test_history_never_writes_over_an_input(clay, target):
    # the case: history --out specimens.csv once overwrote the raw table
    before = {p.name: p.read_bytes() for p in clay.iterdir() if p.is_file()}
    code, _, err = run_cli("history", clay, "--out", clay / target)
    assert code == 2 and "never writes over its inputs" in err
    assert {p.name: p.read_bytes() for p in clay.iterdir() if p.is_file()} == before


def test_control_characters_stored_in_a_log_are_shown_as_escapes(clay):
    # a log edited by hand, or received: the terminal shows the escape codes as text,
    # so they cannot recolour, clear or retitle it (ECMA-48 control functions)
    from kitchen.revisions import revise, revisions_path

    revise(clay, specimen="QF-01", field="height", value="116.3 mm", reason="re-measured")
    log = revisions_path(clay)
    log.write_bytes(
        log.read_bytes().replace(b"re-measured", b"\x1b]0;owned\x07\x1b[2J\xe2\x80\xae")
    )
    code, out, _ = run_cli("history", clay)
    assert code == 0 and "\x1b" not in out and "\x07" not in out and "\u202e" not in out
    assert "\\x1b]0;owned\\x07\\x1b[2J\\u202e" in out


def test_field_check_writes_the_report_and_prints_the_counts(tmp_path):
    code, out, err = run_cli(
        "field-check", SAMPLES / "clay_liner", "--out", tmp_path, "--no-images"
    )
    assert code == 0, err
    assert "field test(s) inside the acceptable zone (drawn)" in out
    assert "lift 2:" in out and "all lifts:" in out
    assert (tmp_path / "field_check.docx").exists() and (tmp_path / "manifest.csv").exists()


def test_field_check_names_every_bad_cell_and_exits_2(tmp_path):
    tests = tmp_path / "site.csv"
    tests.write_text(
        "test,date,lift,x [m],y [m],water_content [%],dry_density,method\n"
        "T1,2025-06-02,1,0,0,nineteen,1.7,nuclear gauge\n"
    )
    code, out, err = run_cli(
        "field-check", SAMPLES / "clay_liner", tests, "--out", tmp_path / "out", "--no-images"
    )
    assert code == 2 and "Traceback" not in err
    assert "site.csv, row 2, column 'water_content [%]', test T1: expected a number" in err
    assert "site.csv, row 1, column 'dry_density': 'dry_density' has a dimension" in err
    assert not (tmp_path / "out").exists()


_FREED_SCRIPT = """
import sys, numpy as np
from kitchen.cli import return_freed_memory
def resident():
    return int(next(l for l in open('/proc/self/status') if l.startswith('VmRSS')).split()[1])
if sys.argv[1] == "fixed":
    assert return_freed_memory()
keep = []
for _ in range(3):  # each freed 24 MB array raises glibc's threshold past the next one
    a = np.ones(3_000_000); keep.append(np.ones(100)); del a
before = resident(); a = np.ones(3_000_000); keep.append(np.ones(100)); during = resident()
del a
print(during - resident())
"""


@pytest.mark.skipif(not sys.platform.startswith("linux"), reason="glibc's allocator only")
def test_freed_arrays_go_back_to_the_system_in_the_command_line_process():
    # mallopt(M_MMAP_THRESHOLD) fixes glibc's threshold (man 3 mallopt) at 16 MiB: a freed
    # array of 24 MB is then unmapped at once and the resident memory falls by it; left to
    # itself, glibc keeps it in the heap for reuse. Each case in a process of its own.
    def returned(case: str) -> int:
        run = subprocess.run(
            [sys.executable, "-c", _FREED_SCRIPT, case], capture_output=True, text=True, check=True
        )
        return int(run.stdout)  # KiB given back when the array was freed

    assert returned("fixed") > 22_000 > returned("default")
    main_text = (Path(__file__).parents[1] / "kitchen" / "__main__.py").read_text()
    assert "return_freed_memory()" in main_text


def test_the_warnings_filters_are_put_back_after_the_series_is_parsed_ahead():
    # pandas sets and restores the warnings filters around its calls; with the series
    # parsed on a thread meanwhile, one thread's restore can undo the other's and leave a
    # filter of pandas' in place (here: ignore every UserWarning), which would hide the
    # command's own warnings ("kitchen: warning: ...") to the end of the command
    import threading
    import warnings

    from kitchen.cli import _warnings_restored

    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        before, outer = list(warnings.filters), warnings.filters
        with _warnings_restored():
            left = list(warnings.filters)

            def interleaved():  # enters, and leaves after the other thread has restored
                warnings.filters = left
                warnings.simplefilter("ignore", UserWarning)

            worker = threading.Thread(target=interleaved)
            worker.start()
            worker.join()
            outer.insert(0, ("ignore", None, Warning, None, 0))  # the list it puts back, too
        assert warnings.filters == before
        warnings.warn("a torn last row", UserWarning, stacklevel=1)
    assert [str(w.message) for w in caught] == ["a torn last row"]


def test_the_command_line_turns_numpys_huge_page_advice_off_unless_told_otherwise():
    # numpy reads NUMPY_MADVISE_HUGEPAGE once, when imported (numpy reference, "Global
    # state"); `python -m kitchen` sets it before the package imports numpy, and leaves a
    # value the user set as it is
    import os

    script = (
        "import runpy, sys\n"
        "sys.argv = ['kitchen', '--help']\n"
        "try:\n"
        "    runpy.run_module('kitchen', run_name='__main__')\n"
        "except SystemExit:\n"
        "    pass\n"
        "from numpy._core import multiarray\n"
        "print(multiarray._get_madvise_hugepage())\n"
    )
    for given, expected in ((None, "False"), ("1", "True")):
        environment = {k: v for k, v in os.environ.items() if k != "NUMPY_MADVISE_HUGEPAGE"}
        if given is not None:
            environment["NUMPY_MADVISE_HUGEPAGE"] = given
        done = subprocess.run(
            [sys.executable, "-c", script], capture_output=True, text=True, env=environment
        )
        assert done.returncode == 0, done.stderr
        assert done.stdout.strip().splitlines()[-1] == expected
