"""Static chart images: without Chromium the export is refused, naming what to install;
with it, every image is drawn in the same page, never reloaded."""

import os
import re
import shutil
import time
from pathlib import Path

import pytest
from cli_runner import run_cli
from series_files import SAMPLES

from kitchen.memo import images

CHROMIUM = Path("/usr/bin/chromium").exists() or shutil.which("chromium") is not None
needs_chromium = pytest.mark.skipif(
    not CHROMIUM and os.environ.get("CI") != "true",
    reason="PNG and SVG export needs Debian's chromium (/usr/bin/chromium)",
)


def test_command_line_without_chromium_names_what_to_install(tmp_path, monkeypatch):
    # as in a fresh process on a machine without Chromium: BROWSER_PATH names none, and no
    # image server runs yet (one started earlier in this process would be used instead)
    monkeypatch.setenv("BROWSER_PATH", str(tmp_path / "no-such-chromium"))
    monkeypatch.setitem(images._image_server, "started", False)
    done = run_cli("report", SAMPLES / "drainage_sand", "--out", tmp_path / "out")
    assert done.returncode == 3
    assert "apt-get install chromium-headless-shell" in done.stderr and "--no-images" in done.stderr
    assert "Traceback" not in done.stderr
    assert not (tmp_path / "out").exists()  # refused before writing anything


@needs_chromium
def test_images_are_drawn_in_one_page_that_is_never_reloaded(monkeypatch):
    # kaleido would reload its page after every image (about 0.25 s each); plotly.js leaves
    # nothing behind in the page, so an image drawn after others is the image drawn first.
    import plotly.graph_objects as go
    from kaleido._kaleido_tab._tab import _KaleidoTab

    images.start_image_export()
    images.figure_image(go.Figure(go.Scatter(x=[0, 1], y=[1, 0])), "png")  # page is ready
    reloads = []
    reload = _KaleidoTab.reload

    async def counted(self):
        reloads.append(self)
        await reload(self)

    monkeypatch.setattr(_KaleidoTab, "reload", counted)
    line = go.Figure(go.Scatter(x=[1, 2, 3], y=[3, 1, 2], name="line"))
    bars = go.Figure(go.Bar(x=[1, 2, 3], y=[2, 3, 1], name="bars"), layout={"width": 500})
    first_png, first_svg = (images.figure_image(line, f) for f in ("png", "svg"))
    pending = [images.request_image(f, e) for f in (bars, line, bars) for e in ("png", "svg")]
    later = [images.image_result(request) for request in pending]
    assert reloads == []
    assert later[2] == first_png  # PNG bytes are the same for the same figure
    assert _without_ids(later[3]) == _without_ids(first_svg)  # SVG ids are random
    assert later[0] != first_png and later[0][:8] == b"\x89PNG\r\n\x1a\n"
    assert int.from_bytes(later[0][16:20], "big") == 500 * images.PNG_SCALE


def _without_ids(svg: bytes) -> bytes:
    """The SVG without the random six-digit ids plotly.js gives each drawing and trace, and
    without empty style attributes, which the browser writes or leaves out of the root
    element from one page to the other (seen once in a full run: ``style=""``, then none)."""
    return re.sub(rb"[0-9a-f]{3,}", b"", re.sub(rb' style=""', b"", svg))


def _pack_figures():
    """Two of the clay sample's pack figures, and a caption to print under them: the
    compaction chart (markers, curves, a legend moved beside the plot) and a test's record
    over time (lines on two axes)."""
    from kitchen import display_units
    from kitchen.memo import memo_charts
    from kitchen.memo.specimen_pages import report_pages
    from kitchen.workspace import Workspace

    workspace = Workspace(SAMPLES / "clay_liner")
    charts, _ = memo_charts(workspace, workspace.analysis(), "m/s", "Mg/m³")
    pages = report_pages(workspace, workspace.results(), display_units.k_unit("m/s"), "k20")
    caption = ["Caution: a caption line under the chart", "kitchen · series clay_liner"]
    return [charts[0][2], pages[0].figure], caption


@needs_chromium
def test_png_and_svg_of_one_drawing_are_kaleidos_own_from_a_fresh_page():
    # the reference is kaleido itself as it ships: a page of its own renderer, reloaded
    # after every image, drawing each format with Plotly.toImage, of the captioned figure;
    # ours are drawn as the pack asks for them, from the captioned figure's dict
    import asyncio

    import kaleido

    from kitchen.charts import add_caption, captioned_dict

    drawn, caption = _pack_figures()
    figures = [add_caption(figure, caption) for figure in drawn]
    requests = [images.request_png_svg(captioned_dict(figure, caption)) for figure in drawn]
    ours = [tuple(images.image_result(r) for r in pair) for pair in requests]

    async def reference():
        drawn = []
        async with kaleido.Kaleido(mathjax=False, n=1) as renderer:
            for figure in figures:
                drawn.append(
                    tuple(
                        [
                            await renderer.calc_fig(
                                figure.to_dict(), opts=images._options(figure.to_dict(), ext)
                            )
                            for ext in ("png", "svg")
                        ]
                    )
                )
        return drawn

    for (png, svg), (their_png, their_svg) in zip(ours, asyncio.run(reference()), strict=True):
        assert png[:8] == b"\x89PNG\r\n\x1a\n"
        assert png == their_png  # the same pixels, encoded alike
        assert svg.startswith(b"<svg") and _without_ids(svg) == _without_ids(their_svg)


def test_a_figure_with_webgl_traces_is_drawn_once_for_each_format(monkeypatch):
    # WebGL's pixel ratio follows the format's scale, so such a figure gets two drawings
    import plotly.graph_objects as go

    asked = []
    monkeypatch.setattr(images, "start_image_export", lambda: None)
    monkeypatch.setattr(images, "request_image", lambda figure, ext: asked.append(ext) or ext)
    for trace in (go.Scattergl(x=[0, 1], y=[1, 0]), go.Splom(), go.Scatter3d(x=[0], y=[0], z=[0])):
        asked.clear()
        assert images.request_png_svg(go.Figure(trace)) == ("png", "svg")
        assert asked == ["png", "svg"]


@pytest.mark.parametrize(
    ("argv", "pages"),
    [
        (["report", "series", "--out", "pack"], images.PAGES),  # a memo pack: many images
        (["field-check", "series", "--out", "check"], 1),
        (["report", "series", "--out", "pack", "--no-images"], None),
        (["report", "--help"], None),
        (["history", "series"], None),
        ([], None),
    ],
)
def test_chromium_is_started_first_only_for_a_command_that_draws_images(monkeypatch, argv, pages):
    calls = []
    monkeypatch.setattr(images, "start_image_export", lambda pages=1: calls.append(pages))
    images.start_for_command(argv)
    assert calls == ([] if pages is None else [pages])


def test_a_machine_without_chromium_starts_nothing_first_and_the_command_says_why(
    tmp_path, monkeypatch
):
    monkeypatch.setenv("BROWSER_PATH", str(tmp_path / "no-such-chromium"))
    monkeypatch.setitem(images._image_server, "started", False)
    images.start_for_command(["report", "series", "--out", "pack"])  # says nothing
    assert images._image_server["started"] is False
    with pytest.raises(
        images.ImageExportUnavailable, match="apt-get install chromium-headless-shell"
    ):
        images.start_image_export()


def _server_and_a_line():
    """The process's image server, a small line chart, and its PNG and SVG drawn alone."""
    import plotly.graph_objects as go

    images.start_image_export()
    line = go.Figure(go.Scatter(x=[1, 2, 3], y=[3, 1, 2]))
    drawn = [images.image_result(r) for r in images.request_png_svg(line)]
    return images._image_server["server"], line, drawn


@needs_chromium
def test_a_long_backlog_opens_a_second_page_and_its_images_are_the_same(monkeypatch):
    server, line, first = _server_and_a_line()
    monkeypatch.setattr(images, "SECOND_PAGE_BACKLOG", 2)
    pending = [images.request_png_svg(line) for _ in range(6)]
    later = [[images.image_result(r) for r in pair] for pair in pending]
    assert len(server.pages) == min(2, images.PAGES)
    assert len({id(page.tab) for page in server.pages}) == len(server.pages)  # tabs of their own
    for png, svg in later:
        assert png == first[0] and _without_ids(svg) == _without_ids(first[1])


@needs_chromium
def test_two_drawings_go_on_in_a_page_at_once_and_none_while_kaleido_draws(monkeypatch):
    # a page lays out one figure while the last is painted and encoded; kaleido's own
    # drawings (figures with WebGL traces, and figure_image) have the first page to
    # themselves, since kaleido may reload it
    server, line, alone = _server_and_a_line()
    in_page: dict = {}
    most: dict = {}
    overlapped = []
    draw, calc_fig = images._draw, type(server.renderer).calc_fig

    async def counted(page, *arguments):
        in_page[id(page)] = in_page.get(id(page), 0) + 1
        most[id(page)] = max(most.get(id(page), 0), in_page[id(page)])
        try:
            return await draw(page, *arguments)
        finally:
            in_page[id(page)] -= 1

    async def kaleido_alone(self, *arguments, **options):
        overlapped.append(in_page.get(id(server.pages[0]), 0))
        return await calc_fig(self, *arguments, **options)

    monkeypatch.setattr(images, "_draw", counted)
    monkeypatch.setattr(type(server.renderer), "calc_fig", kaleido_alone)
    monkeypatch.setattr(images, "SECOND_PAGE_BACKLOG", 10_000)  # one page
    pending = [images.request_png_svg(line) for _ in range(4)]
    by_kaleido = images.request_image(line, "png")
    pending += [images.request_png_svg(line) for _ in range(4)]
    later = [[images.image_result(r) for r in pair] for pair in pending]
    assert images.image_result(by_kaleido) == alone[0]
    assert most[id(server.pages[0])] == images.IN_FLIGHT
    assert overlapped == [0]
    for png, svg in later:
        assert png == alone[0] and _without_ids(svg) == _without_ids(alone[1])


@needs_chromium
def test_the_browser_readies_no_window_furniture_of_its_own():
    # Chromium's headless mode readies its address bar's suggestion popups as pages of
    # their own (about 1 s of a core a run); the images' browser turns them off, so it
    # holds the drawing pages and nothing else
    import asyncio

    images.start_image_export()
    server = images._image_server["server"]
    server.opened.result(120)

    async def targets():
        answer = await server.renderer.send_command("Target.getTargets", params={"filter": [{}]})
        return answer["result"]["targetInfos"]

    found = asyncio.run_coroutine_threadsafe(targets(), server.loop).result(30)
    assert {t["type"] for t in found} <= {"tab", "page", "worker"}  # the PNG encoders
    assert [t["url"] for t in found if t["type"] != "worker" and not _ours(t["url"])] == []


def _ours(url: str) -> bool:
    from kitchen.memo._page_host import PAGE_ORIGIN

    return url.startswith(PAGE_ORIGIN)


def _in_a_fresh_interpreter(script: str, environment: dict | None = None) -> str:
    """What `script` prints, run by this Python in a process of its own; it must succeed."""
    import subprocess
    import sys

    done = subprocess.run(
        [sys.executable, "-c", script],
        capture_output=True,
        text=True,
        timeout=300,
        env=environment,
    )
    assert done.returncode == 0, done.stderr
    return done.stdout


@needs_chromium
def test_one_drawing_needs_no_reload_of_a_freshly_opened_page():
    # in a process of its own, so that no image drawn by kaleido before has reloaded it
    script = (
        "import plotly.graph_objects as go\n"
        "from kitchen.memo import images\n"
        "png, svg = images.request_png_svg(go.Figure(go.Scatter(x=[0, 1], y=[1, 0])))\n"
        "png, svg = images.image_result(png), images.image_result(svg)\n"
        "assert png[:8] == b'\\x89PNG\\r\\n\\x1a\\n' and svg[:4] == b'<svg', (png[:8], svg[:4])\n"
        "print(images._image_server['server'].settled)\n"
    )
    assert _in_a_fresh_interpreter(script).strip() == "False"  # no page was reloaded


def _a_bar_drawn(server) -> tuple[bytes, bytes]:
    """The PNG and SVG of a small bar chart drawn by `server`."""
    return server.request_both('{"data": [{"type": "bar", "y": [1, 2]}]}', 300, 200).result(120)


@needs_chromium
def test_pages_asked_for_at_once_are_opened_before_any_image_waits():
    server = images._ImageServer(pages=images.PAGES)
    try:
        server.opened.result(120)
        for _ in range(600):  # the second page opens on the server's loop
            if len(server.pages) == images.PAGES:
                break
            time.sleep(0.1)
        assert len(server.pages) == images.PAGES and server.waiting == 0
        png, svg = _a_bar_drawn(server)
        assert png[:8] == b"\x89PNG\r\n\x1a\n" and svg.startswith(b"<svg")
    finally:
        server.close()


@needs_chromium
def test_a_profile_chromium_will_not_open_gives_way_to_a_temporary_one(tmp_path, monkeypatch):
    # a kept profile that fails (a newer Chromium's, a broken one) must not cost the images
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path))
    renderer_class = images._renderer_class

    def failing_with_a_profile():
        base = renderer_class()

        class Renderer(base):
            async def open(self):
                if self._profile is not None:
                    raise RuntimeError("the browser seemed to close immediately")
                await super().open()

        return Renderer

    monkeypatch.setattr(images, "_renderer_class", failing_with_a_profile)
    server = images._ImageServer()
    try:
        server.opened.result(120)
        assert server.renderer._profile is None
        png, svg = _a_bar_drawn(server)
        assert png[:8] == b"\x89PNG\r\n\x1a\n" and svg.startswith(b"<svg")
    finally:
        server.close()
    # the profile it gave up is free again for the next run
    from kitchen.memo._page_host import claim_profile

    kind = images.browser_kind(server.path)
    claim = claim_profile(kind)
    assert claim.path == tmp_path / "kitchen" / kind / "profile-0"
    claim.release()


def _chromium_using(folder: Path) -> list[str]:
    """Command lines of the processes running with a profile under `folder`."""
    found = []
    for entry in Path("/proc").iterdir():
        try:
            arguments = (entry / "cmdline").read_bytes().replace(b"\0", b" ").decode()
        except OSError:
            continue
        if f"--user-data-dir={folder}" in arguments:
            found.append(arguments)
    return found


@needs_chromium
def test_two_reports_at_once_both_draw_and_a_later_one_loads_plotly_from_the_cache(tmp_path):
    # each run claims a kept profile of its own; from the third run on a profile, Chromium
    # compiles plotly.js no more and the page host serves no script; no browser outlives
    # its command
    import subprocess
    import sys

    environment = {**os.environ, "XDG_CACHE_HOME": str(tmp_path / "cache")}
    command = [sys.executable, "-m", "kitchen", "report", str(SAMPLES / "drainage_sand")]
    runs = [
        subprocess.Popen(
            [*command, "--out", str(tmp_path / f"pack-{n}")],
            env=environment,
            stdout=subprocess.DEVNULL,
            stderr=subprocess.PIPE,
            text=True,
        )
        for n in (1, 2)
    ]
    for run in runs:
        _, said = run.communicate(timeout=300)
        assert run.returncode == 0, said
    profiles = tmp_path / "cache" / "kitchen" / images.browser_kind(images._browser_path())
    assert sorted(p.name for p in profiles.iterdir() if p.is_dir()) == ["profile-0", "profile-1"]
    for n in (1, 2):
        pngs = list((tmp_path / f"pack-{n}" / "charts").glob("*.png"))
        assert pngs and all(p.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n" for p in pngs)
    assert _chromium_using(profiles) == []

    script = (
        "import plotly.graph_objects as go\n"
        "from kitchen.memo import images\n"
        "png, svg = images.request_png_svg(go.Figure(go.Scatter(x=[0, 1], y=[1, 0])))\n"
        "assert images.image_result(png)[:8] == b'\\x89PNG\\r\\n\\x1a\\n'\n"
        "print(' '.join(images._image_server['server'].host.served))\n"
    )
    served = _in_a_fresh_interpreter(script, environment)
    assert "plotly.min.js" not in served and "index.html" not in served, served
    assert _chromium_using(profiles) == []


@needs_chromium
def test_the_image_server_thread_imports_nothing(tmp_path):
    # two threads importing at once can each wait on a module the other holds
    # (DEVELOPERS.md): what the server's thread runs is imported on the command's own
    # thread, before the thread starts; checked in a fresh interpreter with an audit hook
    script = (
        "import runpy, sys, threading\n"
        "seen = set()\n"
        "def hook(event, arguments):\n"
        "    if event == 'import' and threading.current_thread() is not threading.main_thread():\n"
        "        seen.add((threading.current_thread().name, arguments[0]))\n"
        "sys.addaudithook(hook)\n"
        f"sys.argv = ['kitchen', 'report', {str(SAMPLES / 'drainage_sand')!r}, '--out', "
        f"{str(tmp_path / 'pack')!r}]\n"
        "try:\n"
        "    runpy.run_module('kitchen', run_name='__main__')\n"
        "except SystemExit as end:\n"
        "    assert not end.code, end.code\n"
        "print(sorted(seen))\n"
    )
    said = _in_a_fresh_interpreter(script)
    assert list((tmp_path / "pack" / "charts").glob("*.png"))
    assert said.strip().splitlines()[-1] == "[]"


@needs_chromium
def test_chromium_is_started_without_a_python_wrapper_and_ends_with_the_server():
    # choreographer starts Chromium from a Python script of its own that waits beside it
    # (an interpreter started and ended in every run); the images' browser is started by a
    # shell that hands it the devtools pipe and gives way to Chromium itself
    import sys

    import choreographer

    wrapper = Path(choreographer.__file__).parent / "browsers" / "_unix_pipe_chromium_wrapper.py"
    assert wrapper.exists()  # a choreographer without it would leave its command line as is
    given = [sys.executable, str(wrapper), "/usr/bin/chromium", "--headless"]
    assert images._launched_directly(given) == [*images._LAUNCHER, *given[2:]]
    assert images._launched_directly(given[2:]) == given[2:]  # no wrapper (Windows)
    server = images._ImageServer()
    try:
        server.opened.result(120)
        process = server.renderer.subprocess
        started = Path(os.readlink(f"/proc/{process.pid}/exe")).name
        assert "chrom" in started and "python" not in started
    finally:
        server.close()
    assert process.poll() is not None  # the browser has ended, not only its pipe


def test_the_headless_shell_is_chosen_before_the_whole_browser_and_browser_path_before_both(
    tmp_path, monkeypatch
):
    # Chromium's headless shell draws the same pages without the browser's hidden windows;
    # a browser named in BROWSER_PATH (choreographer's own variable) is taken as it is
    # (common practice, no source)
    import shutil

    shell = tmp_path / "chromium-headless-shell"
    shell.write_text("#!/bin/sh\n")
    shell.chmod(0o755)
    monkeypatch.delenv("BROWSER_PATH", raising=False)
    real_which = shutil.which
    monkeypatch.setattr(
        shutil,
        "which",
        lambda name, *a, **k: str(shell) if name == "chromium-headless-shell" else None,
    )
    assert images._browser_path() == str(shell)
    assert images.browser_kind(str(shell)) == "chromium-headless-shell"
    assert images.browser_kind("/usr/bin/chromium") == "chromium"
    monkeypatch.setenv("BROWSER_PATH", "/opt/some/chrome")
    assert images._browser_path() == "/opt/some/chrome"
    monkeypatch.setattr(shutil, "which", real_which)
    monkeypatch.delenv("BROWSER_PATH")
    from choreographer.browsers.chromium import Chromium

    monkeypatch.setattr(images, "_HEADLESS_SHELLS", ())
    assert images._browser_path() == Chromium.find_browser(skip_local=False)


@needs_chromium
def test_a_headless_shell_that_will_not_open_gives_way_to_the_whole_browser(tmp_path, monkeypatch):
    # a shell package half installed must not cost the images: the whole browser draws
    # them; a browser named in BROWSER_PATH is never replaced (common practice, no source)
    broken = tmp_path / "chromium-headless-shell"
    broken.write_text("#!/bin/sh\necho 'a library is missing' >&2\nexit 127\n")
    broken.chmod(0o755)
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    monkeypatch.delenv("BROWSER_PATH", raising=False)
    monkeypatch.setattr(images, "_HEADLESS_SHELLS", (str(broken),))
    server = images._ImageServer(path=images._browser_path())  # as start_image_export does
    try:
        server.opened.result(120)
        assert images.browser_kind(server.path) == "chromium" and server.path != str(broken)
        png, svg = _a_bar_drawn(server)
        assert png[:8] == b"\x89PNG\r\n\x1a\n" and svg.startswith(b"<svg")
    finally:
        server.close()
    assert (tmp_path / "cache" / "kitchen" / "chromium" / "profile-0").is_dir()

    monkeypatch.setenv("BROWSER_PATH", str(broken))
    named = images._ImageServer()
    try:
        with pytest.raises(RuntimeError):
            named.opened.result(120)
        assert named.path == str(broken)
    finally:
        named.close()


@needs_chromium
def test_a_page_has_its_script_heap_collected_every_so_many_drawings(monkeypatch):
    # each drawing leaves canvases and a decoded image for V8's collector, which ran too
    # seldom for a pack of many tests (measured: images.COLLECT_EVERY); the collection is
    # the devtools protocol's HeapProfiler.collectGarbage, and drawing goes on after it
    monkeypatch.setattr(images, "COLLECT_EVERY", 2)
    server = images._ImageServer()
    try:
        server.opened.result(120)
        tab = server.pages[0].tab
        sent = []
        send = tab.send_command

        async def recorded(method, *arguments, **options):
            sent.append(method)
            return await send(method, *arguments, **options)

        tab.send_command = recorded
        for _ in range(5):
            _a_bar_drawn(server)
        for _ in range(100):  # the collections are sent without waiting for them
            if sent.count("HeapProfiler.collectGarbage") >= 2:
                break
            time.sleep(0.1)
        assert sent.count("HeapProfiler.collectGarbage") == 2  # after the 2nd and 4th
        assert sent.count("Runtime.evaluate") == 5
        png, svg = _a_bar_drawn(server)
        assert png[:8] == b"\x89PNG\r\n\x1a\n" and svg.startswith(b"<svg")
    finally:
        server.close()
