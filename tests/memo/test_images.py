"""Static chart images: without Chromium the export is refused, naming what to install;
with it, every image is drawn in the same page, never reloaded."""

import os
import re
import shutil
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
    assert "apt-get install chromium" in done.stderr and "--no-images" in done.stderr
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
