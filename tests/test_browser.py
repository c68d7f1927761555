"""The notebooks in a real browser: JupyterLab on loopback, driven in headless Chromium.

One JupyterLab server, one Chromium and one JupyterLab page serve every notebook of the module
(module-scoped fixtures; the server boots while Chromium starts). Each notebook is opened in
that page with a kernel of its own, run with Run All Cells, and checked as an engineer would
see it: every cell ran without a traceback, the widgets rendered as controls (not as
text), the plotly figures drew, and in the falling-head notebook moving the reading-window
slider with the keyboard changes the k shown. Screenshots go to ``tests/artifacts/``.

Needs Debian's ``chromium`` (``apt-get install chromium``; Playwright drives it through
``executable_path`` and never downloads a browser). Without it the tests are skipped, or
fail when ``CI=true``.
"""

from __future__ import annotations

import json
import os
import re
import secrets
import shutil
import socket
import subprocess
import sys
import time
import urllib.request
from concurrent.futures import ThreadPoolExecutor
from pathlib import Path

import pytest
from series_files import USER_LOGS

pytestmark = [pytest.mark.browser, pytest.mark.slow]

ROOT = Path(__file__).resolve().parents[1]
ARTIFACTS = ROOT / "tests" / "artifacts"
CHROMIUM = Path(os.environ.get("KITCHEN_CHROMIUM", "/usr/bin/chromium"))
CHROMIUM_FLAGS = [
    "--disable-background-timer-throttling",
    "--disable-renderer-backgrounding",
    "--disable-backgrounding-occluded-windows",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-quic",
    "--no-first-run",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
]
RUN_TIMEOUT = 240_000  # [ms] for one notebook's Run All Cells, cold kernel included


def _require_browser():
    on_ci = os.environ.get("CI", "").strip().lower() == "true"
    problems = []
    if not CHROMIUM.exists():
        problems.append(f"no Chromium at {CHROMIUM} (apt-get install chromium)")
    try:
        import playwright.sync_api  # noqa: F401
    except ImportError:
        problems.append("the playwright package is not installed (pip install '.[test]')")
    if problems:
        reason = "real-browser test needs " + "; ".join(problems)
        if on_ci:
            pytest.fail(reason + " — CI=true, so this is a failure, not a skip")
        pytest.skip(reason)


def _free_port() -> int:
    with socket.socket() as probe:
        probe.bind(("127.0.0.1", 0))
        return probe.getsockname()[1]


@pytest.fixture(scope="module")
def lab_server(tmp_path_factory):
    """JupyterLab starting on 127.0.0.1 with a token, serving a copy of notebooks/ and sample_data/.

    Started, not waited for: :func:`lab` waits until it answers, so that it boots while
    :func:`browser` starts Chromium.
    """
    _require_browser()
    root = tmp_path_factory.mktemp("lab")
    shutil.copytree(ROOT / "notebooks", root / "notebooks",
                    ignore=shutil.ignore_patterns(".ipynb_checkpoints", "working"))  # fmt: skip
    shutil.copytree(  # ../sample_data, as in the repo, without a user's logs
        ROOT / "sample_data", root / "sample_data", ignore=shutil.ignore_patterns(*USER_LOGS)
    )
    config = root / "config"
    (config / "labconfig").mkdir(parents=True)
    (config / "labconfig" / "page_config.json").write_text(
        json.dumps({"disabledExtensions": {"@jupyterlab/apputils-extension:announcements": True}})
    )
    tracker = root / "settings" / "@jupyterlab" / "notebook-extension"
    tracker.mkdir(parents=True)
    # draw every cell, so that figures below the fold render too
    (tracker / "tracker.jupyterlab-settings").write_text(json.dumps({"windowingMode": "none"}))
    port, token = _free_port(), secrets.token_hex(16)
    command = [
        sys.executable, "-m", "jupyter", "lab", "--no-browser", "--ip=127.0.0.1",
        f"--port={port}", f"--IdentityProvider.token={token}",
        f"--ServerApp.root_dir={root / 'notebooks'}",
        f"--LabServerApp.user_settings_dir={root / 'settings'}",
        f"--LabServerApp.workspaces_dir={root / 'workspaces'}",
        "--LabApp.expose_app_in_browser=True",
    ]  # fmt: skip
    if hasattr(os, "geteuid") and os.geteuid() == 0:
        command.append("--allow-root")
    environment = dict(
        {k: v for k, v in os.environ.items() if k != "KITCHEN_WORKING_FOLDER"},
        JUPYTER_CONFIG_DIR=str(config),
        JUPYTER_RUNTIME_DIR=str(root / "runtime"),
        IPYTHONDIR=str(root / "ipython"),
    )
    log_path = ARTIFACTS / "jupyterlab.log"
    ARTIFACTS.mkdir(parents=True, exist_ok=True)
    log = log_path.open("w")
    server = subprocess.Popen(command, stdout=log, stderr=subprocess.STDOUT, env=environment)
    base = f"http://127.0.0.1:{port}"
    try:
        yield {"base": base, "token": token, "root": root, "log": log_path, "server": server}
    finally:
        server.terminate()
        try:
            server.wait(timeout=15)
        except subprocess.TimeoutExpired:
            server.kill()
            server.wait(timeout=5)
        log.close()


@pytest.fixture(scope="module")
def lab(lab_server):
    """The JupyterLab of :func:`lab_server` once it answers, for every notebook of the module.

    Kernels of closed notebooks are stopped in the background (:func:`_shut_down_kernels`);
    every stop is awaited, and any failure raised, before the server itself is stopped.
    """
    base, token, server = lab_server["base"], lab_server["token"], lab_server["server"]
    deadline = time.monotonic() + 60
    while True:
        try:
            with urllib.request.urlopen(f"{base}/api/status?token={token}", timeout=2):
                break
        except OSError:
            if server.poll() is not None or time.monotonic() > deadline:
                tail = lab_server["log"].read_text()[-3000:]
                pytest.fail(f"JupyterLab did not start:\n{tail}")
            time.sleep(0.3)
    with ThreadPoolExecutor(max_workers=1) as stopper:
        lab = dict(lab_server, stopper=stopper, stopping={})
        yield lab
    for stop in lab["stopping"].values():
        stop.result()


@pytest.fixture(scope="module")
def browser(lab_server, tmp_path_factory):
    """Headless Chromium, started while JupyterLab boots."""
    from playwright.sync_api import sync_playwright

    ARTIFACTS.mkdir(parents=True, exist_ok=True)
    with sync_playwright() as playwright:
        context = playwright.chromium.launch_persistent_context(
            str(tmp_path_factory.mktemp("chromium-profile")),
            executable_path=str(CHROMIUM),
            headless=True,
            args=CHROMIUM_FLAGS,
            viewport={"width": 1400, "height": 2400},
        )
        try:
            yield context
        finally:
            context.close()


def _delete_session(lab, session_id: str) -> None:
    url = f"{lab['base']}/api/sessions/{session_id}?token={lab['token']}"
    with urllib.request.urlopen(urllib.request.Request(url, method="DELETE"), timeout=30):
        pass  # answered once the kernel has exited


def _shut_down_kernels(lab) -> None:
    """Stop the kernels of the sessions open now, in the background: the next notebook need
    not wait for them to exit. Sessions are listed here, before the next notebook opens, so
    that only kernels of closed notebooks are stopped; each is stopped once."""
    request = urllib.request.Request(f"{lab['base']}/api/sessions?token={lab['token']}")
    with urllib.request.urlopen(request, timeout=10) as answer:
        sessions = json.load(answer)
    for session in sessions:
        if session["id"] not in lab["stopping"]:
            stop = lab["stopper"].submit(_delete_session, lab, session["id"])
            lab["stopping"][session["id"]] = stop


ALL_RAN = """() => {
    const prompts = [...document.querySelectorAll('.jp-CodeCell .jp-InputPrompt')];
    return prompts.length > 0 && prompts.every(p => /\\[\\d+\\]/.test(p.textContent));
}"""
IDLE = ".jp-Notebook-ExecutionIndicator[data-status='idle']"
OPEN = """async (path) => {
    const app = window.jupyterapp;
    const panel = await app.commands.execute('docmanager:open', {path, factory: 'Notebook'});
    await panel.context.ready;
    await panel.sessionContext.ready;
    return panel.sessionContext.session ? panel.sessionContext.session.kernel.name : null;
}"""
CLOSE = """() => {
    const panel = window.jupyterapp.shell.currentWidget;
    if (panel && panel.context) { panel.context.model.dirty = false; panel.dispose(); }
}"""


@pytest.fixture(scope="module")
def lab_page(browser, lab):
    """One JupyterLab page for every notebook: the app and plotly.js load once."""
    page = browser.new_page()
    page.on(
        "console",
        lambda message: (
            message.type in ("error", "warning")
            and CONSOLE.append(f"{message.type}: {message.text[:300]}")
        ),
    )
    page.goto(f"{lab['base']}/lab?token={lab['token']}&reset")
    page.wait_for_function("() => window.jupyterapp !== undefined", timeout=90_000)
    page.evaluate("async () => { await window.jupyterapp.restored; }")
    # fold the file browser away: more room for the panels
    page.evaluate("() => window.jupyterapp.commands.execute('application:toggle-left-area')")
    yield page
    page.close()


def _ran(page, lab, name: str):
    """Open a notebook in the page, run all its cells and check them; return the page."""
    from playwright.sync_api import TimeoutError as PlaywrightTimeout

    kernel = page.evaluate(OPEN, name)
    if kernel is None:  # on a loaded machine JupyterLab may ask for the kernel: take Python 3
        choose = page.locator(".jp-Dialog:has-text('Select Kernel') .jp-mod-accept")
        try:
            choose.click(timeout=10_000)
        except PlaywrightTimeout:
            pass
    try:
        page.wait_for_selector(IDLE, timeout=90_000)
        page.evaluate("() => window.jupyterapp.commands.execute('notebook:run-all-cells')")
        page.wait_for_function(ALL_RAN, timeout=RUN_TIMEOUT)
        page.wait_for_selector(IDLE, timeout=RUN_TIMEOUT)
    except Exception:
        page.screenshot(path=str(ARTIFACTS / f"{Path(name).stem}_failed.png"))
        raise
    stderr = page.locator(".jp-OutputArea-output[data-mime-type='application/vnd.jupyter.stderr']")
    texts = stderr.all_inner_texts()
    failures = [text for text in texts if "Traceback" in text or "Error" in text]
    assert not failures, f"{name}: a cell failed:\n" + "\n".join(failures)[:3000]
    # widgets render as controls, never as their text fallback
    plain = page.locator(".jp-OutputArea-output[data-mime-type='text/plain']").all_inner_texts()
    fallbacks = [text for text in plain if re.match(r"^(VBox|HBox|Tab)\(", text)]
    assert not fallbacks, f"{name}: a widget was shown as text: {fallbacks[0][:200]}"
    problems = page.locator(".kitchen-problem").all_inner_texts()
    assert not problems, f"{name}: the panel reports a problem: {problems}"
    return page


@pytest.fixture()
def notebook(lab_page, lab):
    """Run a notebook (``notebook(name)``); close it and stop its kernel afterwards."""
    opened = []

    def run(name: str):
        opened.append(name)
        return _ran(lab_page, lab, name)

    yield run
    if opened:
        lab_page.evaluate(CLOSE)
        _shut_down_kernels(lab)


def _plotly_drawn(page, figures: int) -> None:
    """Wait until `figures` plotly figures are drawn, each with data in it."""
    try:
        _wait_drawn(page, figures)
    except Exception as error:
        page.screenshot(path=str(ARTIFACTS / "plotly_not_drawn.png"))
        console = "\n".join(CONSOLE[-20:])
        raise AssertionError(
            f"{figures} figure(s) not drawn; browser console:\n{console}"
        ) from error


CONSOLE: list[str] = []
"""The browser console's errors and warnings, for a failure's message."""


def _wait_drawn(page, figures: int) -> None:
    page.wait_for_function(
        """(figures) => {
            const drawn = [...document.querySelectorAll('.js-plotly-plot')].filter(
                plot => plot.querySelectorAll('.scatterlayer .trace').length > 0);
            return drawn.length >= figures;
        }""",
        arg=figures,
        timeout=90_000,
    )


def _fill_and_press(page, typed: dict, button: str) -> None:
    """Type each value in the text box of that label, leave the last box, press `button`."""
    for label, value in typed.items():
        box = page.locator(f".widget-text:has(label:text-is('{label}')) input")
        box.fill(value)
    box.press("Tab")
    page.locator("button", has_text=button).click()


def _wait_for_text(page, selector: str, pattern: str, timeout: int) -> None:
    """Wait until an element of `selector` holds text matching the regular expression."""
    page.wait_for_function(
        "([selector, pattern]) => [...document.querySelectorAll(selector)]"
        ".some(e => new RegExp(pattern).test(e.textContent))",
        arg=[selector, pattern],
        timeout=timeout,
    )


def _screenshot(page, name: str) -> None:
    page.wait_for_timeout(500)  # let plotly finish its transitions
    page.screenshot(path=str(ARTIFACTS / f"{name}.png"))


def test_open_a_series(notebook, lab):
    page = notebook("01_open_a_series.ipynb")
    box = page.locator(".kitchen-series-chooser .widget-text input").first
    working = lab["root"] / "notebooks" / "working"
    assert Path(box.input_value()) == working / "clay_liner"  # the sample's working copy
    table = page.locator(".kitchen-table").first
    assert "QF-14" in table.inner_text()
    progress = page.locator(".widget-label", has_text="14 specimens")
    assert progress.count() == 1
    page.locator(".widget-text").first.scroll_into_view_if_needed()
    _screenshot(page, "01_open_a_series")


def test_falling_head_slider_changes_k(notebook, lab):
    page = notebook("02_falling_head.ipynb")
    _plotly_drawn(page, 2)
    titles = " ".join(page.locator(".js-plotly-plot .gtitle").all_text_contents())
    assert "Specimen QF-02" in titles
    page.locator(".kitchen-falling-head").scroll_into_view_if_needed()
    _screenshot(page, "02_falling_head_proposed")
    shown = page.locator(".kitchen-k")
    label = page.locator(".kitchen-window-times")
    k_before, times_before = shown.inner_text(), label.inner_text()
    assert k_before.endswith("m/s")
    handle = page.locator(".noUi-handle-lower").first
    handle.focus()
    for _ in range(12):  # twelve readings earlier: into QF-02's early transient
        page.keyboard.press("ArrowLeft")
    page.wait_for_function(
        "([before]) => document.querySelector('.kitchen-k').textContent !== before",
        arg=[k_before],
        timeout=90_000,
    )
    assert label.inner_text() != times_before
    k_after = shown.inner_text()
    assert k_after != k_before and k_after.endswith("m/s")
    _screenshot(page, "02_falling_head_moved")


def test_constant_head(notebook, lab):
    page = notebook("03_constant_head.ipynb")
    _plotly_drawn(page, 1)
    titles = " ".join(page.locator(".js-plotly-plot .gtitle").all_text_contents())
    assert "Specimen DL-A" in titles
    assert page.locator(".kitchen-k").inner_text().endswith("m/s")
    page.locator(".js-plotly-plot").first.scroll_into_view_if_needed()
    _screenshot(page, "03_constant_head")


def test_series_chart(notebook, lab):
    page = notebook("04_series_chart.ipynb")
    _plotly_drawn(page, 1)
    verdicts = page.locator(".kitchen-criterion")
    assert verdicts.inner_text() == "1.00 × 10⁻⁹ m/s"
    page.locator(".js-plotly-plot").first.scroll_into_view_if_needed()
    _screenshot(page, "04_series_chart_compaction")
    page.locator(".widget-toggle-button", has_text="k and void ratio").click()
    page.wait_for_function(
        "() => [...document.querySelectorAll('.js-plotly-plot .gtitle')]"
        ".some(t => /void ratio/i.test(t.textContent))",
        timeout=90_000,
    )
    _plotly_drawn(page, 1)
    page.wait_for_timeout(800)
    _screenshot(page, "04_series_chart_void_ratio")
    # then the export, images included, as the engineer presses it: drawn by the kernel's
    # own image server (a browser started from the shell launcher), the progress line
    # naming the files written, every chart and test page with its PNG at two pixels a
    # layout pixel and its SVG
    folder = lab["root"] / "notebooks" / "exported_in_the_browser"
    _fill_and_press(page, {"Memo pack folder": str(folder)}, "Export memo pack")
    written = r"file\(s\) written to"
    _wait_for_text(page, ".widget-html, .widget-label, p, small", written, 180_000)
    assert not page.locator(".kitchen-problem").count()
    pngs = sorted(folder.rglob("*.png"))
    pages = sorted(folder.glob("specimens/*.html")) + sorted(folder.glob("charts/*.html"))
    assert len(pngs) == len(pages) == len(list(folder.rglob("*.svg"))) > 0
    for png in pngs:
        head = png.read_bytes()[:24]
        assert head[:8] == b"\x89PNG\r\n\x1a\n"
        assert int.from_bytes(head[16:20], "big") >= 2 * 900  # at least 900 layout pixels
    page.locator("button", has_text="Export memo pack").scroll_into_view_if_needed()
    _screenshot(page, "04_series_chart_exported")


def test_revise(notebook, lab):
    page = notebook("05_revise.ipynb")
    assert page.get_by_text("No revisions yet").count() >= 1
    _plotly_drawn(page, 2)  # the specimen's chart and the series chart, before any revision
    typed = {"New value": "4.8 in", "Reason": "re-measured after test"}
    _fill_and_press(page, typed, "Record revision")
    _wait_for_text(page, "p", r"Revision [0-9a-f]{8} recorded", 90_000)
    assert not page.locator(".kitchen-problem").count()
    assert "QF-01" in page.locator(".kitchen-table").first.inner_text()
    # the copy was revised, never the sample data in the served folder
    assert not (lab["root"] / "sample_data" / "clay_liner" / "revisions.csv").exists()
    page.locator("button", has_text="Record revision").scroll_into_view_if_needed()
    _screenshot(page, "05_revise")
    # the specimen's chart and the series chart, redrawn in place after the revision
    _plotly_drawn(page, 2)
    titles = " ".join(page.locator(".js-plotly-plot .gtitle").all_text_contents())
    assert "Specimen QF-01" in titles and "Compaction and hydraulic conductivity" in titles
    assert page.locator("small", has_text="Recorded, reduced and redrawn in").count() == 1
    page.locator(".js-plotly-plot").last.scroll_into_view_if_needed()
    _screenshot(page, "05_revise_charts")


SHOWN_FIGURE = """() => {
    const plots = [...document.querySelectorAll('.kitchen-chart-box .js-plotly-plot')]
        .filter(plot => getComputedStyle(plot).visibility !== 'hidden');
    if (plots.length !== 1) return null;
    const plot = plots[0];
    const legend = [...plot.querySelectorAll('.legendtext')].map(t => t.textContent);
    const traces = (plot.data || []).map(t => ({name: t.name || null, y: t.y ? [...t.y] : []}));
    const title = plot.querySelector('.gtitle');
    return {legend, traces, title: title ? title.textContent : ''};
}"""


def _shown_figure(page):
    """The legend and traces of the chart the series panel shows, as the browser drew it."""
    page.wait_for_timeout(700)  # the refresh's messages and plotly's redraw
    page.wait_for_function(
        f"() => {{ const shown = ({SHOWN_FIGURE})(); return shown && shown.traces.length > 0; }}",
        timeout=30_000,
    )
    shown = page.evaluate(SHOWN_FIGURE)
    assert shown is not None, "the chart box shows no drawn figure, or more than one"
    return shown


def _assert_whole(shown, criterion_y: float):
    """Every legend entry is a name of ours (never plotly's "trace N") and the criterion
    line is drawn where it belongs."""
    unnamed = [text for text in shown["legend"] if re.fullmatch(r"trace \d+", text)]
    assert not unnamed, f"legend lost its names: {shown['legend']}"
    assert all(trace["name"] for trace in shown["traces"]), shown["traces"]
    lines = [t for t in shown["traces"] if t["name"] and t["name"].startswith("criterion k")]
    assert len(lines) == 1, f"no criterion line among {[t['name'] for t in shown['traces']]}"
    assert lines[0]["y"] == pytest.approx([criterion_y, criterion_y], rel=1e-9)
    assert any(t["name"] in shown["legend"] for t in shown["traces"] if "criterion" in t["name"])


def _typed(page, criterion: str, shown_as: str, screenshot: str):
    """Type a criterion in the series panel's box; the chart shown once the verdict line
    says it (its screenshot saved)."""
    box = page.locator(".widget-text:has(label:text-is('k criterion')) input")
    box.fill(criterion)
    box.press("Enter")
    page.wait_for_function(
        "(start) => document.querySelector('.kitchen-criterion').textContent.startsWith(start)",
        arg=shown_as,
        timeout=60_000,
    )
    shown = _shown_figure(page)
    page.locator(".kitchen-chart-box").scroll_into_view_if_needed()
    _screenshot(page, screenshot)
    return shown


def test_series_chart_survives_tab_unit_and_criterion_switches(notebook, lab):
    """The sequence that once broke the chart: another tab, back, a new criterion, a unit."""
    page = notebook("04_series_chart.ipynb")
    errors = []
    page.on("console", lambda message: message.type == "error" and errors.append(message.text))
    _plotly_drawn(page, 1)
    _assert_whole(_shown_figure(page), 1e-9)
    tab = page.locator(".widget-toggle-button", has_text="k and void ratio")
    back = page.locator(".widget-toggle-button", has_text="Compaction and k")
    tab.click()
    assert "void ratio" in _shown_figure(page)["title"].lower()
    back.click()
    _assert_whole(_shown_figure(page), 1e-9)
    _assert_whole(_typed(page, "3e-9 m/s", "3.00", "04_series_chart_after_tab_and_criterion"), 3e-9)
    page.locator(".widget-toggle-button", has_text="cm/s").click()
    page.wait_for_function(
        "() => document.querySelector('.kitchen-criterion').textContent.endsWith('cm/s')",
        timeout=60_000,
    )
    _assert_whole(_shown_figure(page), 3e-7)
    tab.click()
    page.locator(".widget-toggle-button", has_text="k and dry density").click()
    back.click()
    _assert_whole(_typed(page, "1e-7 cm/s", "1.00", "04_series_chart_after_switches"), 1e-7)
    tab.click()
    shown = _shown_figure(page)
    assert "void ratio" in shown["title"].lower()
    assert not [t for t in shown["legend"] if re.fullmatch(r"trace \d+", t)], shown["legend"]
    state = [e for e in errors if "Error setting state" in e or "reading 'length'" in e]
    assert not state, f"the browser console reports: {state}"


def _choose_series(page, option: str) -> None:
    """Choose a series in the chooser of the open notebook and press Open."""
    page.locator(".kitchen-series-chooser select").select_option(label=option)
    page.locator(".kitchen-series-chooser button", has_text="Open").click()


def test_the_series_chosen_in_one_notebook_opens_in_the_next(lab_page, lab):
    """No code to edit: the series is chosen in 01 with the chooser, and 03 and 04 open on
    it; the samples themselves are never written."""
    samples = lab["root"] / "sample_data"
    before = sorted(p.name for p in samples.rglob("*"))
    working = lab["root"] / "notebooks" / "working"
    page = _ran(lab_page, lab, "01_open_a_series.ipynb")
    _choose_series(page, "sample drainage sand (constant head, 4 specimens)")
    page.wait_for_function(
        "() => document.querySelector('.kitchen-table') &&"
        " document.querySelector('.kitchen-table').textContent.includes('DL-A')",
        timeout=90_000,
    )
    chosen = json.loads((working / "chosen_series.json").read_text())["series"]
    assert Path(chosen) == (working / "drainage_sand").resolve()
    page.locator(".kitchen-series-chooser").scroll_into_view_if_needed()
    _screenshot(page, "01_chosen_drainage_sand")
    page.evaluate(CLOSE)
    _shut_down_kernels(lab)
    page = _ran(lab_page, lab, "04_series_chart.ipynb")
    _plotly_drawn(page, 1)
    box = page.locator(".kitchen-series-chooser .widget-text input").first
    assert Path(box.input_value()) == (working / "drainage_sand").resolve()
    shown = _shown_figure(page)
    assert "void ratio" in shown["title"].lower()  # the sand has no compaction plane
    assert "DL-A" in page.locator(".kitchen-table").first.inner_text()
    page.locator(".kitchen-series-chooser").scroll_into_view_if_needed()
    _screenshot(page, "04_opened_on_the_chosen_series")
    _choose_series(page, "sample clay liner (falling head, 14 specimens)")
    page.wait_for_function(
        "() => [...document.querySelectorAll('.kitchen-table')]"
        ".some(t => t.textContent.includes('QF-14'))",
        timeout=90_000,
    )
    page.evaluate(CLOSE)
    _shut_down_kernels(lab)
    chosen = json.loads((working / "chosen_series.json").read_text())["series"]
    assert Path(chosen) == (working / "clay_liner").resolve()
    assert sorted(p.name for p in samples.rglob("*")) == before


# A record of 10^6 readings, made by the benchmark's generator, in a notebook of its own
_LOGGER_NOTEBOOK = {
    "cells": [
        {
            "cell_type": "code",
            "execution_count": None,
            "id": "logger-00",
            "metadata": {},
            "outputs": [],
            "source": [
                "import sys\n",
                f"sys.path.insert(0, {str(ROOT / 'tests' / 'benchmarks')!r})\n",
                "from pathlib import Path\n",
                "import logger_records\n",
                "folder = logger_records.write_record_series(\n",
                "    Path('logger_record'), logger_records.logger_record(1_000_000))",
            ],
        },
        {
            "cell_type": "code",
            "execution_count": None,
            "id": "logger-01",
            "metadata": {},
            "outputs": [],
            "source": [
                "from kitchen.panels import falling_head_panel\n",
                "panel = falling_head_panel(folder)\n",
                "panel.widget",
            ],
        },
    ],
    "metadata": {
        "kernelspec": {"display_name": "Python 3", "language": "python", "name": "python3"}
    },
    "nbformat": 4,
    "nbformat_minor": 5,
}

_WATCH_REDRAW = """() => {
    // the time of each redraw of the head chart (the first plotly figure of the panel opened
    // last: a notebook closed before may leave its panel in the page), and of the next frame
    // painted with it: a message posted from that frame's animation callback is answered
    // once the frame's style, layout and paint are done
    const panels = document.querySelectorAll('.kitchen-falling-head');
    const chart = panels[panels.length - 1].querySelector('.js-plotly-plot');
    window.kitchenRedraws = [];
    window.kitchenOnScreen = [];
    chart.on('plotly_afterplot', () => {
        window.kitchenRedraws.push(performance.now());
        requestAnimationFrame(() => {
            const channel = new MessageChannel();
            channel.port1.onmessage = () => window.kitchenOnScreen.push(performance.now());
            channel.port2.postMessage(null);
        });
    });
    window.kitchenHeadChart = chart;
}"""
_POINTS = """() => {
    // the points each trace of the head chart holds, and the plot's width in pixels
    const chart = window.kitchenHeadChart;
    return [chart._fullData.map(trace => trace._length), chart._fullLayout._size.w];
}"""


def test_slider_on_a_record_of_a_million_readings(notebook, lab, lab_page):
    # Printed, not asserted: the time from a slider step (a key press, which the slider
    # takes as a release) to the head chart redrawn with the new window (plotly's
    # afterplot), and to the next frame painted with it (the chart on screen).
    from playwright.sync_api import expect

    from kitchen.charts import PLOT_WIDTH

    lab_page.evaluate(CLOSE)  # a notebook a failed test left open would be measured too
    _shut_down_kernels(lab)
    (lab["root"] / "notebooks" / "logger_record.ipynb").write_text(json.dumps(_LOGGER_NOTEBOOK))
    page = notebook("logger_record.ipynb")
    _plotly_drawn(page, 2)
    page.evaluate(_WATCH_REDRAW)
    panel = page.locator(".kitchen-falling-head").last
    label = panel.locator(".widget-html-content", has_text="Readings").first
    handle = panel.locator(".noUi-handle-lower").first
    handle.focus()
    redrawn, shown, redraws = [], [], []
    for _ in range(5):
        before = label.inner_text()
        count = page.evaluate("() => window.kitchenRedraws.length")
        pressed = page.evaluate("() => performance.now()")
        page.keyboard.press("ArrowRight")  # one reading later: the window label changes
        page.wait_for_function(
            "([count]) => window.kitchenOnScreen.length > count", arg=[count], timeout=90_000
        )
        expect(label).not_to_have_text(before, timeout=90_000)  # the new window is shown
        page.wait_for_timeout(500)  # a move may redraw twice (data, then axes): take the last
        times = page.evaluate("() => [window.kitchenRedraws, window.kitchenOnScreen]")
        redrawn.append(times[0][-1] - pressed)
        shown.append(times[1][-1] - pressed)
        redraws.append(len(times[0]) - count)
    points, width = page.evaluate(_POINTS)
    assert points and max(points) <= 2 * PLOT_WIDTH  # two points a pixel column, at most

    def spread(times):
        times = sorted(times)
        return (
            f"median {times[len(times) // 2]:.0f} ms (all: {', '.join(f'{t:.0f}' for t in times)}"
            " ms)"
        )

    print(
        f"\nslider step on 10^6 readings, key press to the head chart redrawn: {spread(redrawn)}; "
        f"to the next frame painted: {spread(shown)}; redraws a step {redraws}; points a trace "
        f"{points} on a plot {width:.0f} px wide"
    )
    _screenshot(page, "02_logger_record_moved")
