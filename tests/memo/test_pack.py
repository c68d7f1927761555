"""The memo pack: the files exist and parse, carry the cautions, and name their inputs.

Tests that make PNG and SVG, or open the pack in a browser, need Debian's chromium (and
the browser test the playwright package). Where it is missing they are skipped, saying
so, except in continuous integration (CI=true), where they run and fail: the CI script
installs chromium.

plotly.js is checked against plotly's own bundled copy, ``plotly.offline.get_plotlyjs()``.
"""

import hashlib
import html
import math
import os
import re
import shutil
import xml.etree.ElementTree as ElementTree
import zipfile
from pathlib import Path
from urllib.parse import urlsplit

import pandas as pd
import pytest
from cli_runner import run_cli
from html_cells import TableCells
from openpyxl import load_workbook
from plotly.offline import get_plotlyjs, get_plotlyjs_version
from series_files import SAMPLES, copy_sample

from kitchen import __version__
from kitchen.analysis import MEETS, NOT_JUDGED, parse_criterion
from kitchen.cautions import CAUTIONS
from kitchen.memo import CHART_SCRIPT, export_memo_pack
from kitchen.reduction import results_table, series_results
from kitchen.revisions import keep_test, load_effective_series, revise, withdraw
from kitchen.settings import Settings
from kitchen.workspace import Workspace

CHROMIUM = Path("/usr/bin/chromium").exists() or shutil.which("chromium") is not None
needs_chromium = pytest.mark.skipif(
    not CHROMIUM and os.environ.get("CI") != "true",
    reason="PNG and SVG export needs Debian's chromium (/usr/bin/chromium): apt-get install "
    "chromium; CI installs it and runs these tests",
)
PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"  # PNG specification (ISO/IEC 15948), section 5.2
# the revision log and the tests kept on record are listed, each on a sheet of its own
SHEETS = ["specimens", "tests", "fits", "checks", "revisions", "kept tests", "cautions"]
PLOTLY_JS = get_plotlyjs().encode("utf-8")  # plotly's own bundled plotly.min.js
SCRIPT_SOURCE = re.compile(r"<script\b[^>]*\bsrc=\"([^\"]*)\"")


def table_rows(markup: str, width: int) -> list[list[str]]:
    """The data cells of an HTML table, row by row, read back by html.parser."""
    parser = TableCells()
    parser.feed(markup)
    cells = [text for tag, _, text in parser.cells if tag == "td"]
    return [cells[i : i + width] for i in range(0, len(cells), width)]


def sha256(path: Path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


def html_pages(folder: Path) -> list[Path]:
    return sorted(folder.rglob("*.html"))


@pytest.fixture(scope="module")
def clay_pack(tmp_path_factory):
    out = tmp_path_factory.mktemp("clay_pack")
    calls = []
    workspace = Workspace(SAMPLES / "clay_liner")
    pack = export_memo_pack(
        workspace, out, images=False, progress=lambda *call: calls.append(call), k_unit="cm/s"
    )
    return workspace.series, pack, calls


def test_pack_files_and_progress(clay_pack):
    series, pack, calls = clay_pack
    names = sorted(str(p.relative_to(pack.folder)) for p in pack)
    charts = [
        "compaction_conductivity",
        "conductivity_void_ratio",
        "conductivity_dry_density",
        "conductivity_water_content",
    ] + [f"specimen_{s}_falling_head" for s in series.specimen_ids()]
    assert names == sorted(
        ["results.csv", "results.xlsx", "report.html", "report.docx", CHART_SCRIPT]
        + [f"charts/{c}.html" for c in charts]
        + [f"specimens/{s}_falling_head.html" for s in series.specimen_ids()]
    )
    assert all(p.is_file() and p.stat().st_size > 0 for p in pack)
    assert [c[0] for c in calls] == list(range(1, len(pack) + 1))
    assert {c[1] for c in calls} == {len(pack)}
    assert calls[0][2] == "table results.csv" and calls[-1][2] == "document report.docx"
    assert "chart charts/compaction_conductivity.html" in [c[2] for c in calls]
    steps = [c[2] for c in calls]
    first_page = min(i for i, step in enumerate(steps) if step.endswith(".html"))
    assert steps.index(f"script {CHART_SCRIPT}") < first_page  # written before any page


def test_plotly_js_is_written_once_for_the_whole_pack(clay_pack):
    _, pack, _ = clay_pack
    everything = [p for p in pack.folder.rglob("*") if p.is_file()]
    copies = {
        p.relative_to(pack.folder).as_posix(): p.read_bytes().count(PLOTLY_JS) for p in everything
    }
    assert sum(copies.values()) == 1 and copies[CHART_SCRIPT] == 1
    assert (pack.folder / CHART_SCRIPT).read_bytes() == PLOTLY_JS  # the file, byte for byte
    total = sum(p.stat().st_size for p in everything)
    assert len(html_pages(pack.folder)) > 2  # inlined in each page, as many copies as pages
    assert total < 2 * len(PLOTLY_JS)  # one copy and the rest, not one copy a page


def test_every_page_loads_plotly_js_by_a_relative_path_inside_the_pack(clay_pack):
    _, pack, _ = clay_pack
    root = pack.folder.resolve()
    for page in html_pages(pack.folder):
        sources = SCRIPT_SOURCE.findall(page.read_text())
        assert len(sources) == 1, page
        parts = urlsplit(sources[0])
        assert not parts.scheme and not parts.netloc and not sources[0].startswith("/"), page
        target = (page.parent / sources[0]).resolve()
        assert target.is_relative_to(root) and target == (root / CHART_SCRIPT), page
        assert target in {p.resolve() for p in pack}
    chart = (pack.folder / "charts" / "compaction_conductivity.html").read_text()
    report = (pack.folder / "report.html").read_text()
    assert 'src="plotly.min.js"' in chart and 'src="charts/plotly.min.js"' in report


def test_chart_pages_hold_their_data(clay_pack):
    series, pack, _ = clay_pack
    page = (pack.folder / "charts" / "compaction_conductivity.html").read_text()
    assert get_plotlyjs()[:300] not in page  # loaded from the pack, not inlined
    assert 'id="chart-compaction_conductivity"' in page and page.count("Plotly.newPlot") == 1
    assert 'id="chart-script-missing" hidden' in page  # shown only when plotly.js is missing
    for specimen in series.specimen_ids():
        assert specimen in page
    for caution in CAUTIONS:
        assert html.escape(caution) in page
    single = (pack.folder / "charts" / "specimen_QF-01_falling_head.html").read_text()
    assert "readings in the window" in single
    for caution in CAUTIONS:
        assert html.escape(caution) in single


def test_report_is_traceable(clay_pack):
    series, pack, _ = clay_pack
    page = (pack.folder / "report.html").read_text()
    assert get_plotlyjs()[:300] not in page
    assert page.count("Plotly.newPlot") == len(html_pages(pack.folder / "charts"))
    for caution in CAUTIONS:
        assert html.escape(caution) in page
    for path in series.input_files:
        assert sha256(path) in page  # provenance hashes are those of the inputs
    # the inputs, and the project table that carries the series' criterion
    project = SAMPLES / "clay_liner" / "project.csv"
    assert [f.sha256 for f in pack.provenance.input_files] == [
        sha256(p) for p in (*series.input_files, project)
    ]
    assert f"kitchen {__version__}" in page and "revisions applied" in page
    assert "k20 [cm/s]" in page and "Methods and their sources" in page
    script = pack.folder / CHART_SCRIPT  # the script the pages run, as written
    assert (
        f"plotly.js {get_plotlyjs_version()}, <code>{CHART_SCRIPT}</code>, "
        f"{script.stat().st_size} bytes, SHA-256 "
        f'<span class="hash">{sha256(script)}</span>'
    ) in page


def test_workbook_sheets(clay_pack):
    series, pack, _ = clay_pack
    book = load_workbook(pack.folder / "results.xlsx")
    assert book.sheetnames == SHEETS
    expected = results_table(series_results(series), Settings())
    header = [cell.value for cell in book["tests"][1]]
    assert header == list(expected.columns)
    assert book["tests"].max_row == len(expected) + 1
    k_column = header.index("k20 [m/s]")
    values = [row[k_column] for row in book["tests"].iter_rows(min_row=2, values_only=True)]
    assert values == pytest.approx(list(expected["k20 [m/s]"]))
    notes = [row[1] for row in book["cautions"].iter_rows(min_row=2, values_only=True)]
    for caution in CAUTIONS:
        assert caution in notes
    assert any(sha256(series.input_files[0]) in str(n) for n in notes)
    assert book.properties.description == " ".join(CAUTIONS)
    specimens = pd.read_excel(pack.folder / "results.xlsx", sheet_name="specimens")
    assert list(specimens["specimen"]) == series.specimen_ids()


def test_results_csv_matches_the_tests_sheet(clay_pack):
    series, pack, _ = clay_pack
    table = pd.read_csv(pack.folder / "results.csv")
    assert len(table) == 14 and "k20 [m/s]" in table


def test_revisions_are_counted_and_their_log_hashed(tmp_path):
    folder = tmp_path / "clay"
    copy_sample(SAMPLES / "clay_liner", folder)
    revise(folder, specimen="QF-02", field="height", value="116.38 mm", reason="re-measured")
    effective = load_effective_series(folder)
    pack = export_memo_pack(Workspace(folder), tmp_path / "out", images=False)
    page = (tmp_path / "out" / "report.html").read_text()
    log_hash = sha256(folder / "revisions.csv")
    assert pack.provenance.revision_count == 1 and pack.provenance.revision_log_sha256 == log_hash
    assert log_hash in page and "1 revision(s) applied" in page
    for path in effective.series.input_files:  # the raw files, untouched by the revision
        assert sha256(path) == sha256(SAMPLES / "clay_liner" / path.name)
        assert sha256(path) in page


def test_the_validity_stands_beside_the_verdict_in_the_workbook_and_the_report(clay_pack):
    # QF-04 fails its trend check (its k drifts by design, sample_data/README.md): it is
    # never "meets", and both the specimens sheet and the report's table say why
    _, pack, _ = clay_pack
    sheet = pd.read_excel(pack.folder / "results.xlsx", sheet_name="specimens")
    columns = list(sheet.columns)
    assert columns.index("valid") + 2 == columns.index("verdict")  # kept_on_record between
    row = sheet.set_index("specimen").loc["QF-04"]
    assert not row["valid"] and row["verdict"] == NOT_JUDGED
    assert (sheet["verdict"] == NOT_JUDGED).sum() == 1 and (sheet["verdict"] == MEETS).sum() == 7
    page = (pack.folder / "report.html").read_text()
    specimens = page.split("<h2>Specimens</h2>", 1)[1].split("</table>", 1)[0]
    assert "<th>valid</th><th>verdict</th>" in specimens
    cells = specimens.split(">QF-04<", 1)[1].split("</tr>", 1)[0]
    assert ">no<" in cells and f"◍ {html.escape(NOT_JUDGED)}" in cells and "meets" not in cells
    assert f"◍ {html.escape(NOT_JUDGED)}: 1" in page  # counted apart in the summary
    notes = pd.read_excel(pack.folder / "results.xlsx", sheet_name="cautions")
    counts = notes.loc[notes["item"] == "verdicts", "text"].tolist()
    assert counts == [f"{MEETS}: 7", "does not meet: 6", "not conclusive: 0", f"{NOT_JUDGED}: 1"]


def test_every_revision_withdrawal_and_kept_test_is_listed(tmp_path):
    folder = tmp_path / "clay"
    copy_sample(SAMPLES / "clay_liner", folder)
    when = "2025-05-02T14:30:00+02:00"
    first = revise(folder, specimen="QF-02", field="height", value="116.38 mm",
                   reason="re-measured after extrusion", who="A. Tester", when=when)  # fmt: skip
    second = revise(folder, specimen="QF-03", field="height", value="4.58 in",
                    reason="caliper slipped", who="B. Checker", when=when)  # fmt: skip
    back = withdraw(folder, second.id, reason="the first reading was right", who="C. Lead")
    kept = keep_test(folder, "QF-04", "falling_head", reason="drift within the series scatter",
                     who="C. Lead", when=when, series=Workspace(folder).series)  # fmt: skip
    export_memo_pack(Workspace(folder), tmp_path / "out", images=False)
    page = (tmp_path / "out" / "report.html").read_text()
    listed = page.split("<h2>Revisions and tests kept on record</h2>", 1)[1].split("<h2>")[0]
    revisions_html, kept_html = listed.split("</table>")[:2]
    assert table_rows(revisions_html, 11) == [
        [first.id, "in force", when, "A. Tester", "specimens", "QF-02", "", "height",
         "116.41 mm → 116.38 mm", "", "re-measured after extrusion"],
        [second.id, f"withdrawn by {back.id}", when, "B. Checker", "specimens", "QF-03", "",
         "height", "116.14 mm → 116.332 mm", "4.58 in", "caliper slipped"],
        [back.id, f"withdraws {second.id}", back.when, "C. Lead", "specimens", "QF-03", "",
         "height", "116.332 mm → 116.14 mm", "", "the first reading was right"],
    ]  # fmt: skip
    assert table_rows(kept_html, 7) == [
        [kept.id, "in force", when, "C. Lead", "QF-04", "falling head", kept.reason]
    ]
    assert "1 revision(s) in force and 1 withdrawn" in listed
    book = load_workbook(tmp_path / "out" / "results.xlsx")
    rows = list(book["revisions"].iter_rows(min_row=2, values_only=True))
    assert [r[:2] for r in rows] == [
        (first.id, "in force"),
        (second.id, f"withdrawn by {back.id}"),
        (back.id, f"withdraws {second.id}"),
    ]
    assert [r[-1] for r in rows] == [first.reason, second.reason, back.reason]
    assert list(book["kept tests"].iter_rows(min_row=2, values_only=True)) == [
        (kept.id, "in force", when, "C. Lead", "QF-04", "falling head", kept.reason)
    ]
    # kept on record, QF-04 is judged again: its k meets the criterion
    sheet = pd.read_excel(tmp_path / "out" / "results.xlsx", sheet_name="specimens")
    row = sheet.set_index("specimen").loc["QF-04"]
    assert not row["valid"] and row["verdict"] == MEETS and kept.id in row["kept_on_record"]


# --- with chromium: the command line writes PNG and SVG ------------------------------------


@pytest.fixture(scope="module")
def cli_pack(tmp_path_factory):
    out = tmp_path_factory.mktemp("cli_pack")
    done = run_cli(
        "report",
        SAMPLES / "drainage_sand",
        "--out",
        out,
        "--criterion",
        "1e-4",
        "--k-unit",
        "cm/s",
        "--density-unit",
        "lb/ft3",
    )
    return out, done


@needs_chromium
def test_command_line_writes_the_pack_with_images(cli_pack):
    out, done = cli_pack
    assert done.returncode == 0, done.stderr
    progress = [line for line in done.stderr.splitlines() if line.startswith("[")]
    total = int(re.match(r"\[1/(\d+)\] table results.csv$", progress[0]).group(1))
    assert len(progress) == total
    # the test pages' images come last, drawn while the report and the document are written
    tests = sorted(out.glob("specimens/*.html"))
    later = total - 2 * len(tests)
    assert progress[later - 1] == f"[{later}/{total}] document report.docx"
    assert progress[-1] == f"[{total}/{total}] test page specimens/{tests[-1].stem}.svg"
    assert progress[2] == f"[3/{total}] script {CHART_SCRIPT}"
    assert f"[6/{total}] chart charts/conductivity_void_ratio.svg" in progress
    pngs, svgs = sorted(out.glob("charts/*.png")), sorted(out.glob("charts/*.svg"))
    assert len(pngs) == len(svgs) == 6  # two series charts, four specimens
    for png in pngs:
        data = png.read_bytes()
        assert data[:8] == PNG_SIGNATURE
        assert int.from_bytes(data[16:20], "big") == 980 * 2  # IHDR width: 2 px a layout px
    for svg in svgs:
        root = ElementTree.fromstring(svg.read_bytes())
        assert root.tag.endswith("svg")
        text = " ".join(root.itertext())
        assert "licensed engineer" in text and "cm/s" in text
    report = (out / "report.html").read_text()
    assert "criterion k20 ≤ 0.01 cm/s" in report and "ρd [lb/ft³]" in report


@needs_chromium
def test_static_images_carry_the_cautions(cli_pack):
    out, _ = cli_pack
    text = " ".join(
        ElementTree.fromstring(
            (out / "charts" / "conductivity_void_ratio.svg").read_bytes()
        ).itertext()
    )
    text = " ".join(text.split())  # the caption is wrapped into lines of its own
    for caution in CAUTIONS:
        assert f"Caution: {caution}" in text


@needs_chromium
def test_every_image_is_asked_for_before_the_first_file_is_written(tmp_path, monkeypatch):
    # Chromium draws while the tables and pages are written, instead of waiting for them
    from kitchen.memo import images
    from kitchen.memo._export import PackWriter

    events = []
    request = images.request_png_svg
    write = PackWriter.__call__

    def asked(figure):
        events.append("image")
        return request(figure)

    def written(self, relative, kind, data):
        events.append(relative)
        return write(self, relative, kind, data)

    monkeypatch.setattr(images, "request_png_svg", asked)
    monkeypatch.setattr(PackWriter, "__call__", written)
    pack = export_memo_pack(Workspace(SAMPLES / "drainage_sand"), tmp_path / "pack")
    first_file = next(i for i, event in enumerate(events) if event != "image")
    drawn = [p for p in pack.files if p.suffix == ".png"]
    assert events[:first_file] == ["image"] * len(drawn)  # one drawing gives PNG and SVG
    assert "image" not in events[first_file:]
    assert len(drawn) == len([p for p in pack.files if p.suffix == ".svg"]) > 0


def test_each_figure_is_copied_to_a_dict_once_for_its_pages_and_images(tmp_path, monkeypatch):
    # a chart's page, the report page and its images share one dict and one fragment, the
    # fragment the one plotly's own figure.to_html makes (plotly as the reference)
    import plotly.basedatatypes

    from kitchen.memo import memo_charts
    from kitchen.memo._export import PlainFigures

    copied = []
    to_dict = plotly.basedatatypes.BaseFigure.to_dict

    def counted(self):
        copied.append(id(self))
        return to_dict(self)

    monkeypatch.setattr(plotly.basedatatypes.BaseFigure, "to_dict", counted)
    pack = export_memo_pack(Workspace(SAMPLES / "drainage_sand"), tmp_path / "pack")
    drawn = [p for p in pack.files if p.suffix == ".png"]
    assert len(copied) == len(set(copied)) == len(drawn) > 0
    monkeypatch.undo()
    charts, _ = memo_charts(Workspace(SAMPLES / "drainage_sand"), pack.analysis)
    figure = charts[0][2]
    plain = PlainFigures()
    assert plain.dict_of(figure) is plain.dict_of(figure)
    assert plain.html(figure, "one") == figure.to_html(
        full_html=False,
        include_plotlyjs=False,
        div_id="chart-one",
        config={"displaylogo": False, "responsive": False},
    )


def test_command_line_without_images(tmp_path, monkeypatch):
    monkeypatch.setenv("BROWSER_PATH", str(tmp_path / "no-such-chromium"))
    done = run_cli("report", SAMPLES / "drainage_sand", "--out", tmp_path, "--no-images")
    assert done.returncode == 0, done.stderr
    assert (tmp_path / "report.html").exists() and (tmp_path / "results.xlsx").exists()
    assert not list(tmp_path.glob("charts/*.png")) and list(tmp_path.glob("charts/*.html"))


def test_command_line_drainage_criterion_is_a_smallest_k(tmp_path):
    # the invented drainage sand meets a smallest k of 1e-4 m/s (truth.json: k20 of 1.5e-4
    # to 3.5e-3 m/s); the report, the workbook and every chart say which way the limit goes
    done = run_cli("report", SAMPLES / "drainage_sand", "--out", tmp_path, "--no-images",
                   "--criterion", "1e-4", "--criterion-kind", "minimum")  # fmt: skip
    assert done.returncode == 0, done.stderr
    report = (tmp_path / "report.html").read_text()
    assert "k20 ≥ 1×10⁻⁴ m/s (smallest k required)" in report
    assert "meets: 4" in report and "lower end of the 95 % interval" in report
    notes = pd.read_excel(tmp_path / "results.xlsx", sheet_name="cautions")
    assert "minimum" in notes.to_string()
    for chart in tmp_path.glob("charts/*.html"):
        text = chart.read_text()
        if "criterion k" in text:
            assert "criterion k \\u2265" in text and "\\u2264" not in text, chart.name
    bad = run_cli("report", SAMPLES / "drainage_sand", "--out", tmp_path / "x", "--no-images",
                  "--criterion-kind", "least")  # fmt: skip
    assert bad.returncode == 2 and "invalid choice: 'least'" in bad.stderr


def test_command_line_self_contained_pages_stand_alone(tmp_path):
    done = run_cli("report", SAMPLES / "drainage_sand", "--out", tmp_path, "--no-images",
                   "--self-contained")  # fmt: skip
    assert done.returncode == 0, done.stderr
    assert not (tmp_path / CHART_SCRIPT).exists() and "script" not in done.stderr
    pages = html_pages(tmp_path)
    # report, six charts (two series charts, four specimens) and four test report pages
    assert len(pages) == 11
    for page in pages:
        data = page.read_bytes()
        assert data.count(PLOTLY_JS) == 1, page  # plotly's own file, inlined whole, once
        assert not SCRIPT_SOURCE.search(data.decode()), page  # nothing to load
        assert b"chart-script-missing" not in data
    report = (tmp_path / "report.html").read_text()
    digest = hashlib.sha256(PLOTLY_JS).hexdigest()
    assert f"plotly.js {get_plotlyjs_version()}, inlined in every page" in report
    assert digest in report


# --- in a browser: the pack, zipped and unzipped elsewhere, draws its charts offline -------


def _require_playwright():
    problems = [] if CHROMIUM else ["Debian's chromium (apt-get install chromium)"]
    try:
        import playwright.sync_api  # noqa: F401
    except ImportError:
        problems.append("the playwright package (pip install '.[test]')")
    if problems:
        reason = "opening the pack in a browser needs " + " and ".join(problems)
        if os.environ.get("CI") == "true":
            pytest.fail(reason + " — CI=true, so this is a failure, not a skip")
        pytest.skip(reason)


def _open_pages(paths):
    """Each page from file://, in headless Chromium: requests, charts drawn, notice shown."""
    from playwright.sync_api import sync_playwright

    seen = []
    with sync_playwright() as playwright:
        browser = playwright.chromium.launch(
            executable_path=shutil.which("chromium") or "/usr/bin/chromium",
            headless=True,
            args=["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
                  "--disable-background-networking", "--disable-component-update",
                  "--disable-sync"],
        )  # fmt: skip
        try:
            page = browser.new_page()
            requests = []
            page.on("request", lambda request: requests.append(request.url))
            for path in paths:
                requests.clear()
                page.goto(path.resolve().as_uri(), wait_until="load")
                seen.append(
                    dict(
                        requests=list(requests),
                        plotly=page.evaluate("typeof Plotly !== 'undefined'"),
                        drawn=page.locator(".js-plotly-plot .main-svg").count(),
                        notice=page.locator("#chart-script-missing").is_visible(),
                    )
                )
        finally:
            browser.close()
    return seen


@pytest.mark.browser
@pytest.mark.slow
def test_zipped_pack_opens_offline_elsewhere_and_a_lone_page_says_why_it_cannot(
    clay_pack, tmp_path
):
    _require_playwright()
    _, pack, _ = clay_pack
    archive = tmp_path / "pack.zip"
    with zipfile.ZipFile(archive, "w") as bundle:
        for path in pack:
            bundle.write(path, path.relative_to(pack.folder).as_posix())
    moved = tmp_path / "elsewhere" / "memo"
    with zipfile.ZipFile(archive) as bundle:
        bundle.extractall(moved)
    lone = tmp_path / "mailed" / "conductivity_void_ratio.html"
    lone.parent.mkdir()
    shutil.copy(moved / "charts" / lone.name, lone)
    charts = len(html_pages(moved / "charts"))
    report, chart, alone = _open_pages(
        [moved / "report.html", moved / "charts" / "compaction_conductivity.html", lone]
    )
    for opened in (report, chart, alone):
        assert all(url.startswith("file://") for url in opened["requests"]), opened["requests"]
    assert report["plotly"] and report["drawn"] >= charts and not report["notice"]
    assert chart["plotly"] and chart["drawn"] >= 1 and not chart["notice"]
    assert not alone["plotly"] and alone["drawn"] == 0 and alone["notice"]


# --- the criterion in force -----------------------------------------------------------------


def _cautions_sheet(folder: Path) -> pd.DataFrame:
    return pd.read_excel(folder / "results.xlsx", sheet_name="cautions")


def test_the_pack_takes_the_series_criterion_and_names_where_it_came_from(clay_pack):
    # the clay liner's project table says 1e-9 m/s (sample_data/README.md)
    _, pack, _ = clay_pack
    assert pack.analysis.criterion == 1e-9
    settings = _cautions_sheet(pack.folder).query("item == 'setting'")["text"].tolist()
    where = "from the series' project table (project.csv, row 2, column 'value')"
    assert f"criterion from = {where}" in settings and "criterion [m/s] = 1e-09" in settings
    page = (pack.folder / "report.html").read_text()
    assert html.escape(where) in page


def test_a_series_without_a_criterion_is_exported_with_no_verdict(tmp_path):
    pack = export_memo_pack(Workspace(SAMPLES / "drainage_sand"), tmp_path, images=False)
    assert pack.analysis.criterion is None
    sheet = pd.read_excel(tmp_path / "results.xlsx", sheet_name="specimens")
    assert set(sheet["verdict"]) == {"no criterion given"}
    assert sheet["in_acceptable_zone"].isna().all()  # no zone: nothing to lie in, or not
    notes = _cautions_sheet(tmp_path)
    assert notes.query("item == 'criterion'")["text"].tolist() == [
        "no criterion given: no verdicts drawn"
    ]
    assert notes.query("item == 'verdicts'")["text"].tolist() == [
        "no criterion given: 4",
        f"{NOT_JUDGED}: 0",
    ]
    assert "criterion from = none given" in notes["text"].tolist()
    for chart in tmp_path.glob("charts/conductivity_*.html"):
        assert "criterion k" not in chart.read_text()  # no criterion line, no legend entry
    # a criterion given for the export overrides the series' (here absent) own
    given = export_memo_pack(
        Workspace(SAMPLES / "drainage_sand"),
        tmp_path / "given",
        images=False,
        criterion=parse_criterion(">= 1e-4 m/s"),
        criterion_source="typed in the panel",
    )
    assert given.analysis.counts[MEETS] == 4  # sand k20 2.6e-4 to 8.3e-4 m/s, truth.json
    settings = _cautions_sheet(tmp_path / "given")["text"].tolist()
    assert "criterion from = typed in the panel" in settings


def _many_specimens(folder: Path, count: int) -> Path:
    """A falling-head series of `count` specimens, six readings each, written without the
    package (heads falling as h0·exp(-a t), an arbitrary steady decay)."""
    folder.mkdir()
    ids = [f"M{number:05d}" for number in range(count)]
    specimens = ["specimen,effort,water_content [%],diameter [mm],height [mm],dry_mass [g],"
                 "specific_gravity,standpipe_diameter [mm]"]  # fmt: skip
    specimens += [f"{i},standard,16.0,101.6,116.4,1620.0,2.70,5.0" for i in ids]
    readings = ["specimen,time [min],head [cm],temperature [degC]"]
    readings += [
        f"{i},{t},{180.0 * math.exp(-0.002 * t):.3f},20.0" for i in ids for t in range(0, 60, 10)
    ]
    (folder / "specimens.csv").write_text("\n".join(specimens) + "\n", encoding="utf-8")
    (folder / "falling_head.csv").write_text("\n".join(readings) + "\n", encoding="utf-8")
    return folder


def test_ten_thousand_specimens_are_refused_before_any_work_naming_the_limit(tmp_path):
    series = _many_specimens(tmp_path / "many", 10_000)
    out = tmp_path / "pack"
    code, _, err = run_cli("report", series, "--out", out, "--no-images")
    assert code == 2 and "10000 specimens, more than the 1000 one memo pack holds" in err
    assert "[1/" not in err  # refused before the first file, not after reducing them all
    assert not out.exists() and list(tmp_path.iterdir()) == [series]


def test_hostile_text_edited_into_a_log_is_escaped_wherever_the_pack_shows_it(tmp_path):
    # the tool refuses such text at entry; a log edited by hand (or received) may hold it:
    # formula-leading text (OWASP, CSV injection), escape codes (ECMA-48) and markup
    from kitchen.revisions import revise, revisions_path

    series = copy_sample(SAMPLES / "clay_liner", tmp_path / "clay")
    revise(series, specimen="QF-01", field="height", value="116.3 mm", reason="re-measured")
    log = revisions_path(series)
    hostile = b'"=HYPERLINK(""http://x"",""y"") \x1b[2J\x07 <script>alert(1)</script>"'
    log.write_bytes(log.read_bytes().replace(b"re-measured", hostile))
    code, _, err = run_cli("report", series, "--out", tmp_path / "pack", "--no-images")
    assert code == 0, err
    book = load_workbook(tmp_path / "pack" / "results.xlsx")
    cells = [cell for sheet in book for row in sheet.iter_rows() for cell in row]
    assert not [cell for cell in cells if cell.data_type == "f"]
    (reason,) = [c.value for c in cells if isinstance(c.value, str) and "HYPERLINK" in c.value]
    assert reason == '\'=HYPERLINK("http://x","y") \\x1b[2J\\x07 <script>alert(1)</script>'
    page = (tmp_path / "pack" / "report.html").read_text(encoding="utf-8")
    assert "\x1b" not in page and "<script>alert" not in page
    assert "=HYPERLINK(&quot;http://x&quot;,&quot;y&quot;) \\x1b[2J\\x07 &lt;script&gt;" in page
