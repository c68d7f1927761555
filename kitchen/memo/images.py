"""Static chart images for the memo: PNG and SVG through kaleido's renderer and Chromium.

One image server runs per process (:func:`start_image_export`): after checking that a
Chromium is there (without one, :class:`ImageExportUnavailable` names what to install), it
opens the browser on a thread of its own and returns at once, so Chromium starts while the
series is read and reduced. ``python -m kitchen report`` starts it before the rest of the
package is even imported (:func:`start_for_command`).

Images are drawn in a page that is never reloaded (:class:`_SamePageRenderer`): plotly.js
draws each figure in a detached element of its own and removes it once the image is made,
so nothing is left in the page from one image to the next, and a reload would only cost
its time (about a quarter of a second an image). A page takes on :data:`IN_FLIGHT`
drawings at once and encodes its PNGs on a worker of its own, so it lays out the next
figure while the last is painted and encoded. The page is served on the loopback
interface and the browser keeps a profile in the cache folder (:mod:`._page_host`), so
Chromium compiles plotly.js once per machine: the page loads in about 0.3 s instead of
1.1-1.5 s, before the first figure is asked for. Up to :data:`PAGES` pages, tabs of the
one browser each with a renderer process of its own, draw at once: ``report`` opens them
all as soon as the browser is open, another caller a second one once more than
:data:`SECOND_PAGE_BACKLOG` images wait. The browser starts with its hidden window's
address-bar popups off (:data:`_BROWSER_ARGUMENTS`), from a shell that hands it the
devtools pipe and gives way to it (:data:`_LAUNCHER`), with no Python wrapper beside it.
:func:`request_image` hands a figure to the server and returns at once, so the next figure
can be prepared while Chromium draws; :func:`figure_image` waits for its image. The first
image is awaited at most :data:`FIRST_IMAGE_TIMEOUT` seconds, so a Chromium that starts but
cannot render is reported instead of waited on for ever.

The PNG and the SVG of one figure come from one drawing (:func:`request_png_svg`): kaleido
would draw the figure twice, once for each format, though the PNG is the SVG painted on a
canvas at :data:`PNG_SCALE`. The figure is drawn with plotly.js's own steps of
``Plotly.toImage`` (:data:`_PNG_SVG_SCRIPT`), the SVG serialised, and that SVG painted for
the PNG, so both are the bytes kaleido makes of the figure in a freshly loaded page
(``tests/memo/test_images.py`` compares them on the pack's own charts).
"""

from __future__ import annotations

import asyncio
import atexit
import itertools
import json
import os
import threading
from concurrent.futures import Future
from concurrent.futures import TimeoutError as FutureTimeout
from pathlib import Path

__all__ = [
    "PNG_SCALE",
    "FIRST_IMAGE_TIMEOUT",
    "ImageExportUnavailable",
    "start_image_export",
    "start_for_command",
    "request_image",
    "request_png_svg",
    "image_result",
    "figure_image",
]

PNG_SCALE = 2
"""PNG pixels per layout pixel: a 980-pixel chart prints 16 cm wide at about 300 dpi."""

_CHROMIUM_HELP = (
    "static chart export (PNG, SVG) needs Chromium and found none: install Debian's "
    "chromium-headless-shell or chromium package (apt-get install chromium-headless-shell), "
    "or set BROWSER_PATH to a Chromium or Chrome executable"
)

PAGES = 2
"""Pages drawing images at once, at most: two, each a tab of the one browser with a
renderer process (and so a thread for its drawings) of its own, so that a two-core machine
draws in both once the command waits for its images. The second is opened when more than
:data:`SECOND_PAGE_BACKLOG` images wait for the first (opening it costs a tab and a load of
the page, about 0.3 s of a core with plotly.js compiled in the profile). Measured on the
shared two-core machine, the clay sample's 32 drawings in one process, a warm page, medians
at a load under 1.5: 2.5 s in one page one at a time, 2.05 s two at a time, 1.8 s in two
pages one at a time each, 1.6 s two at a time each. (Earlier a second page was a browser
of its own, and opening it repaid only a long backlog: a browser's start costs 0.5-0.9 s.)"""

SECOND_PAGE_BACKLOG = 8
"""Images waiting for a page above which a second page is opened (see :data:`PAGES`): a
field check's two charts are drawn in one page. ``python -m kitchen report`` opens both
pages as soon as the browser is open (:func:`start_for_command`), before the first figure
is asked for: the clay sample's pack with images in 4.38-4.50 s against 4.47-4.63 s with
the second page opened once images wait (in turn, four rounds each, quiet machine)."""

IN_FLIGHT = 2
"""Drawings going on in one page at once: while one waits (for its SVG to be painted, its
PNG encoded or its images sent), the page lays out the next. Two rather than one drew the
clay sample's 32 figures in 2.05 s rather than 2.5 s in a warm page; three, no sooner."""

COLLECT_EVERY = 128
"""Drawings a page makes between two full garbage collections of its script heap
(:meth:`_ImageServer._collect`). Each drawing leaves canvases and a decoded image behind
for the collector, and V8 counts their pixels too little to collect them soon: drawing
the 2 004 images of a 1 000-specimen pack, Chromium's processes reached 5.4 GB together
(the sum of their resident memory), 2.6 GB with a collection every 128 drawings and
1.5 GB with one every 32. A collection costs more than its own 0.1 s: the page runs its
next drawings slower for a while (every 32 drawings, the 100-specimen pack took 19.3 s
against 18.1 s without, 36.7 against 34.7 core-seconds, medians of 3 in turn). At 128
the clay pack's 16 drawings a page and the 100-specimen pack's 102 have none, and the
1 000-specimen pack took 229 s against 240 s without (one run each)."""

FIRST_IMAGE_TIMEOUT = 180.0
"""Seconds to wait for Chromium to render the first image before giving up. [s]"""


_ENCODER_SCRIPT = """(() => {
  // a worker of the page's own that encodes each painted bitmap as PNG and sends it to
  // the page host, so that the page's one thread goes on to lay out the next figure while
  // the last is encoded (Chromium encodes a canvas's PNG for toBlob on the page's thread,
  // in its idle time)
  const source = `onmessage = (event) => {
    const {bitmap, address, key} = event.data;
    const canvas = new OffscreenCanvas(bitmap.width, bitmap.height);
    canvas.getContext("bitmaprenderer").transferFromImageBitmap(bitmap);
    canvas.convertToBlob({type: "image/png"})
      .then((png) => fetch(address, {method: "POST", body: png}))
      .then((answer) => postMessage({key, ok: answer.ok}),
            (error) => postMessage({key, ok: false, error: String(error)}));
  };`;
  const worker = new Worker(URL.createObjectURL(new Blob([source], {type: "text/javascript"})));
  const waiting = new Map();
  worker.onmessage = (event) => {
    const {key, ok, error} = event.data;
    const [done, failed] = waiting.get(key);
    waiting.delete(key);
    if (error === undefined) { done(ok); } else { failed(new Error(error)); }
  };
  worker.onerror = (event) => {
    for (const [, failed] of waiting.values()) { failed(new Error(event.message)); }
    waiting.clear();
  };
  return (bitmap, address, key) => new Promise((done, failed) => {
    waiting.set(key, [done, failed]);
    worker.postMessage({bitmap, address: new URL(address, location.href).href, key}, [bitmap]);
  });
})()"""
"""The page's PNG encoder (:data:`_PNG_SVG_SCRIPT` makes it once per page): a function of
(bitmap, address, key) that encodes the bitmap as PNG on a worker thread, sends it to the
page host at `address`, and resolves to whether the host took it. A PNG encoded this way
(``OffscreenCanvas.convertToBlob``) is the same bytes as the canvas's ``toBlob`` gives
(``tests/memo/test_images.py`` compares them with kaleido's own)."""

_PNG_SVG_SCRIPT = """(figure, width, height, scale, key) => {
  // the steps of Plotly.toImage (plotly.js, src/plot_api/to_image.js) with kaleido's
  // config, drawn once: the SVG as toImage makes it at scale 1, then the same SVG without
  // its viewBox (the one attribute toImage adds for an SVG only) painted at `scale` as
  // Plotly.Snapshot.svgToImg paints it (src/snapshot/svgtoimg.js); its PNG is encoded on
  // the page's worker (window.kitchenEncodePng), the bytes svgToImg's toDataURL would
  // give, not turned to base64 text; both are sent to the page host as `key`.png and
  // `key`.svg
  const encode = window.kitchenEncodePng || (window.kitchenEncodePng = ENCODER);
  const snapshot = Plotly.Snapshot;
  const gd = document.createElement("div");
  gd.style.position = "absolute";
  gd.style.left = "-5000px";
  document.body.appendChild(gd);
  const layout = Object.assign({}, figure.layout || {}, {width: width, height: height});
  const config = Object.assign(
    {mapboxAccessToken: null, plotGlPixelRatio: scale * 2}, figure.config,
    {_exportedPlot: true, staticPlot: true, setBackground: ""});
  let svg;
  return Plotly.newPlot(gd, figure.data || [], layout, config)
    .then(snapshot.getRedrawFunc(gd))
    .then(() => new Promise((done) => setTimeout(done, snapshot.getDelay(gd._fullLayout))))
    .then(() => {
      svg = snapshot.toSVG(gd, "svg", 1);
      const w = gd._fullLayout.width, h = gd._fullLayout.height;
      Plotly.purge(gd);
      document.body.removeChild(gd);
      const painted = svg.replace(/^(<svg[^>]*?) viewBox="[^"]*"/, "$1");
      const url = URL.createObjectURL(
        new Blob([painted], {type: "image/svg+xml;charset=utf-8"}));
      const image = new Image();
      return new Promise((done, failed) => {
        image.onload = () => {
          URL.revokeObjectURL(url);
          const canvas = new OffscreenCanvas(scale * w, scale * h);
          canvas.getContext("2d").drawImage(image, 0, 0, scale * w, scale * h);
          done(canvas.transferToImageBitmap());
        };
        image.onerror = () => {
          URL.revokeObjectURL(url);
          failed(new Error("the SVG could not be painted"));
        };
        image.src = url;
      });
    })
    .then((bitmap) => Promise.all([
      encode(bitmap, "drawn/" + key + ".png", key),
      fetch("drawn/" + key + ".svg", {method: "POST", body: svg}).then((a) => a.ok)]))
    .then((answers) => answers.every((ok) => ok));
}""".replace("ENCODER", _ENCODER_SCRIPT)
"""The drawing of :func:`request_png_svg`, run in a page of kaleido's renderer, where
plotly.js is loaded; up to :data:`IN_FLIGHT` run in one page at once.

It relies on ``Plotly.Snapshot`` (``toSVG``, ``getRedrawFunc``, ``getDelay``), the
functions ``Plotly.toImage`` itself is built of, which plotly.js exports but does not
document, on the steps of its ``svgToImg`` repeated here, and on a page of kaleido's
renderer holding plotly.js (``_KaleidoTab.tab``, kaleido's documented handle of the page):
a plotly.js or kaleido that changed them would fail ``tests/memo/test_images.py``, which
compares its images with kaleido's own. The images go to the page host
(:class:`._page_host.PageHost`, the page's own origin) as the bytes they are: returned
through the devtools pipe, the PNG went as base64 text inside JSON, encoded in the page,
decoded in Python (the clay pack's 32 figures: 3.1-3.5 s drawn this way, 3.5-4.4 s that
way, in turn in one page at a load of 4). Figures with WebGL traces are drawn by kaleido,
once for each format (their pixel ratio depends on the format's scale)."""

_IMAGE_TIMEOUT = 90.0
"""Seconds one drawing may take, as kaleido allows one image. [s]"""


class ImageExportUnavailable(RuntimeError):
    """Static images cannot be made on this machine (no Chromium for kaleido)."""


_HEADLESS_SHELLS = (
    "/usr/lib/chromium/chromium-headless-shell",
    "chromium-headless-shell",
    "chrome-headless-shell",
)
"""Chromium's headless shell, looked for before the whole browser (Debian's package
``chromium-headless-shell`` puts its executable at the first path, and a wrapper script
under the second name on the PATH): the shell is Chromium's page engine without the
browser's windows, tabs strip and address bar, which its headless mode still builds and
hides. The same pages draw the same images in it, and the command starts and ends sooner:
the clay sample's pack with images took 4.07 s against 4.46 s (medians of seven rounds in
turn, on a two-core machine), the browser process 0.29 s of a core against 0.74 s."""


def _browser_path() -> str | None:
    """The browser that draws the images: ``BROWSER_PATH`` when it is set, else a headless
    shell (:data:`_HEADLESS_SHELLS`), else the Chromium or Chrome choreographer finds."""
    import shutil

    if os.environ.get("BROWSER_PATH"):
        return os.environ["BROWSER_PATH"]
    for name in _HEADLESS_SHELLS:
        found = shutil.which(name)
        if found is not None:
            return found
    return _whole_browser_path()


def _whole_browser_path() -> str | None:
    """The Chromium or Chrome choreographer finds (kaleido's own choice), or None."""
    from choreographer.browsers.chromium import Chromium

    try:
        return Chromium.find_browser(skip_local=False)
    except (RuntimeError, ValueError, OSError):
        return None


def browser_kind(path: str) -> str:
    """``chromium-headless-shell`` for a headless shell, else ``chromium``: the browsers
    keep profiles of their own (:func:`._page_host.claim_profile`): Chromium did not take
    the compiled plotly.js the shell had left in a profile, and compiled it again (its
    page open 1.78 s after the start against 1.06 s in a profile of its own)."""
    return "chromium-headless-shell" if "headless-shell" in Path(path).name else "chromium"


_BROWSER_ARGUMENTS = (
    "--disable-features=WebUIOmniboxPopup,WebUIOmniboxAimPopup,WebUIOmniboxFullPopup",
)
"""Arguments added to Chromium's command line. Its headless mode is the whole browser
with a window no one sees, and Chromium 156 readies that window's address-bar suggestion
popups ahead of use as web pages (``chrome://omnibox-popup.top-chrome``) in a renderer
process of their own: about 1 s of a core in every run, as much as drawing a third of the
clay pack's images (measured with the process's CPU time). The three features (their names
read from that Chromium's binary) turn them off; Chromium ignores feature names it does
not know, and merges these with the features it turns off itself (``PaintHolding`` in
headless mode)."""


_LAUNCHER = ("/bin/sh", "-c", 'exec "$0" "$@" 3<&0 4>&1')
"""How the browser is started on a POSIX system: a shell that gives Chromium the devtools
pipe on descriptors 3 and 4, where ``--remote-debugging-pipe`` reads and writes it, and
replaces itself with Chromium (``exec``). choreographer starts Chromium from a Python
script of its own that does the same and waits for it: a Python interpreter started and
left running beside the browser, about 0.05 s of a core to start and 0.06 s to end after
the browser has, in every run (measured with the command's and the browser's exit)."""


def _launched_directly(arguments: list[str]) -> list[str]:
    """choreographer's command line for Chromium with its Python wrapper script replaced by
    :data:`_LAUNCHER`; a command line without that script (Windows), or a system without
    the shell, is left as it is."""
    wrapped = len(arguments) > 2 and Path(arguments[1]).name == "_unix_pipe_chromium_wrapper.py"
    if wrapped and Path(_LAUNCHER[0]).exists():
        return [*_LAUNCHER, *arguments[2:]]
    return list(arguments)


def _renderer_class():
    """kaleido's renderer, made to keep its page between images and to load it from the
    page host with a kept profile (:mod:`._page_host`); imported when needed."""
    import kaleido
    from kaleido._kaleido_tab._tab import _KaleidoTab

    class _SamePageRenderer(kaleido.Kaleido):
        """A kaleido renderer that hands its page back without reloading it.

        kaleido reloads the page after every image to start the next from a clean page;
        plotly.js's ``toImage``, which draws each figure, already leaves none of it behind
        (the figure is drawn in a detached element and purged), so the page is handed back
        as it is. ``tests/memo/test_images.py`` checks that no page is reloaded and that
        the images are those of a freshly loaded page.

        The page is kaleido's own page served by `host` (:class:`._page_host.PageHost`,
        the browser's proxy) rather than written to a temporary file, and the browser runs
        with the profile folder `profile` when one is given (Chromium keeps plotly.js
        compiled there), else with kaleido's temporary one. More pages of the same
        browser are opened with :meth:`new_page`.
        """

        def __init__(self, host, profile: Path | None, path: str | None = None) -> None:
            super().__init__(mathjax=False, n=1, proxy_server=host.proxy, path=path)
            self._page_url, self._profile = host.index_url, profile

        async def open(self) -> None:
            del self._saved_page_arg  # kaleido's page file: the page is served instead
            self._index = self._page_url
            browser = self._browser_impl
            arguments, profile = browser.get_cli, self._profile

            def ours() -> list[str]:
                kept = _launched_directly(arguments())
                if profile is not None:  # else kaleido's temporary profile
                    kept = [a for a in kept if not a.startswith("--user-data-dir=")]
                    kept.append(f"--user-data-dir={profile}")
                return [*kept, *_BROWSER_ARGUMENTS]

            browser.get_cli = ours
            await super(kaleido.Kaleido, self).open()  # the browser's own opening

        async def _return_kaleido_tab(self, tab) -> None:
            await self.tabs_ready.put(tab)

        async def new_page(self):
            """Another page of this browser, a tab with a renderer process of its own,
            loaded as kaleido loads its first (kaleido's ``_conform_tabs``) and kept out of
            kaleido's queue of pages: kaleido draws in its first page only."""
            page = _KaleidoTab(await self.create_tab(url="", window=True), headers=self._headers)
            await page.navigate(self._index)
            return page

    return _SamePageRenderer


_DRAWINGS = itertools.count()
"""Numbers naming each drawing's images as the page sends them to the page host."""


async def _draw(page, received: dict, figure_json: str, width, height) -> tuple[bytes, bytes]:
    """The PNG and SVG of a figure (JSON) drawn by :data:`_PNG_SVG_SCRIPT` in `page` (a
    page of kaleido's renderer); the page sends them to the page host, which keeps them in
    `received` by name."""
    key = f"{next(_DRAWINGS)}"
    answer = await asyncio.wait_for(
        page.tab.send_command(
            "Runtime.evaluate",
            params={
                "expression": f"({_PNG_SVG_SCRIPT})({figure_json}, "
                f"{json.dumps(width)}, {json.dumps(height)}, {PNG_SCALE}, "
                f"{json.dumps(key)})",
                "awaitPromise": True,
                "returnByValue": True,
            },
        ),
        _IMAGE_TIMEOUT,
    )
    png, svg = received.pop(f"{key}.png", None), received.pop(f"{key}.svg", None)
    result = answer.get("result", {})
    if "error" in answer or "exceptionDetails" in result:
        details = answer.get("error") or result["exceptionDetails"]
        raise RuntimeError(f"plotly.js could not draw the figure: {details}")
    if result.get("result", {}).get("value") is not True or png is None or svg is None:
        raise RuntimeError("the page could not hand its images over to the page host")
    return png, svg


class _ImageServer:
    """The browser, its pages and the event loop that drives them, on a thread of their own.

    Each page takes on up to :data:`IN_FLIGHT` drawings at once: :attr:`slots` holds a
    page for each drawing it may still take on, and a drawing takes one and gives it back.
    Figures with WebGL traces are drawn by kaleido itself, in the first page only, with
    all of that page's slots held (:meth:`_image`): kaleido may reload it first.
    """

    def __init__(self, pages: int = 1, path: str | None = None) -> None:
        # what the loop's thread needs is imported here, on the caller's thread: two
        # threads importing at once can each wait on a module the other holds
        from . import _page_host

        self.path = path or _browser_path()  # the browser (None: kaleido's own choice)
        # a headless shell found by _browser_path, not named in BROWSER_PATH
        self.shell_chosen = not os.environ.get("BROWSER_PATH") and (
            browser_kind(self.path or "") == "chromium-headless-shell"
        )
        self.claim_profile = _page_host.claim_profile
        self.renderer_class = _renderer_class()
        self.host = _page_host.PageHost()
        self.loop = asyncio.new_event_loop()
        self.thread = threading.Thread(
            target=self.loop.run_forever, name="kitchen-images", daemon=True
        )
        self.thread.start()
        self.renderer = None  # the browser (kaleido's renderer), once opening
        self.claim = None  # the profile it holds, freed once it is closed
        self.pages: list = []  # pages open for drawings, the first kaleido's own
        self.opening = 0  # pages asked for and not yet open
        self.settled = False  # kaleido may draw in the first page
        self.answered = False
        self.waiting = 0  # images asked for and not yet drawing (counted on the loop)
        self.drawn: dict[int, int] = {}  # drawings made in each page, by id(page)
        self.slots: asyncio.Queue | None = None
        self.kaleido_turn: asyncio.Lock | None = None  # one kaleido drawing at a time
        self.opened: Future = asyncio.run_coroutine_threadsafe(
            self._open_first(min(max(pages, 1), PAGES)), self.loop
        )

    async def _open_first(self, pages: int) -> None:
        self.slots, self.kaleido_turn = asyncio.Queue(), asyncio.Lock()
        self.opening = 1
        self.renderer = await self._open_browser()
        page = await self.renderer.tabs_ready.get()  # kaleido's page, left in its queue
        self.renderer.tabs_ready.put_nowait(page)
        self._add_page(page)
        for _ in range(pages - 1):  # opened at once, without waiting for a backlog
            self._open_another()

    async def _open_browser(self):
        """The browser, opened with a kept profile of its kind when one can be had.

        A headless shell this server chose (:func:`_browser_path`) that will not open (a
        package half installed, a library missing) gives way to the whole browser, which
        draws the same images a little later; a browser named in ``BROWSER_PATH`` is not
        replaced.
        """
        self.claim = self.claim_profile(browser_kind(self.path or "chromium"))
        try:
            return await self._open_renderer(self.claim)
        except Exception:
            whole = _whole_browser_path() if self.shell_chosen else None
            if whole is None:
                raise
        if self.renderer is not None:
            await asyncio.gather(self.renderer.close(), return_exceptions=True)
        if self.claim is not None:
            self.claim.release()
        self.path, self.shell_chosen = whole, False
        self.claim = self.claim_profile(browser_kind(whole))
        return await self._open_renderer(self.claim)

    async def _open_renderer(self, claim):
        """A renderer whose page is loaded, with the claimed profile when there is one.

        A profile Chromium will not open (one a browser left behind by a killed run still
        holds, or one a newer Chromium wrote) is given up for a temporary one.
        """
        renderer = self.renderer_class(self.host, None if claim is None else claim.path, self.path)
        self.renderer = renderer  # closed at the end even when half open
        try:
            await renderer.open()
        except Exception:
            if claim is None:
                raise
            await asyncio.gather(renderer.close(), return_exceptions=True)
            self.renderer = None
            claim.release()
            self.claim = None
            return await self._open_renderer(None)
        return renderer

    def _add_page(self, page) -> None:
        self.opening -= 1
        self.pages.append(page)
        for _ in range(IN_FLIGHT):
            self.slots.put_nowait(page)

    async def _open_page(self) -> None:
        """Another page of the browser, for drawings only (kaleido draws in the first)."""
        try:
            page = await self.renderer.new_page()
        except Exception:  # drawn without it
            self.opening -= 1
            raise
        self._add_page(page)

    def _second_page(self) -> None:
        """Open another page when the backlog repays it."""
        if self.waiting > SECOND_PAGE_BACKLOG and len(self.pages) + self.opening < PAGES:
            self._open_another()

    def _open_another(self) -> None:
        """Begin opening another page; one that fails is done without."""
        self.opening += 1
        self._in_background(self._open_page())

    async def _slot(self, images: int):
        """A page with a drawing free, once the first is open; `images` wait meanwhile."""
        self.waiting += images
        try:
            await asyncio.wrap_future(self.opened)
            self._second_page()
            return await self.slots.get()
        finally:
            self.waiting -= images

    async def _first_page_held(self) -> list:
        """Hold every slot of the first page (waiting for its drawings to end); returns
        the slots taken, to be given back, with those of other pages taken on the way."""
        await asyncio.wrap_future(self.opened)
        first, held = self.pages[0], []
        while sum(page is first for page in held) < IN_FLIGHT:
            held.append(await self._slot(1))
        return held

    async def _settle(self) -> None:
        """Reload the first page once, before kaleido first draws in it.

        kaleido takes a page's script context from the first one reported after it
        navigates, which can be the blank page's it replaces (then no image is drawn); one
        reload, once, takes the context of the page itself. The drawings of
        :func:`request_png_svg` run in the page's own context and need none, so a pack
        without WebGL figures never pays for it (a page's load costs about 0.3 s again).
        """
        if not self.settled:
            await self.pages[0].reload()
            self.settled = True

    async def _image(self, figure_dict: dict, options: dict) -> bytes:
        async with self.kaleido_turn:
            held = await self._first_page_held()
            try:
                await self._settle()
                return await self.renderer.calc_fig(figure_dict, opts=options)
            finally:
                for page in held:
                    self.slots.put_nowait(page)

    async def _png_svg(self, figure_json: str, width, height) -> tuple[bytes, bytes]:
        page = await self._slot(2)
        try:
            return await _draw(page, self.host.received, figure_json, width, height)
        finally:
            self.slots.put_nowait(page)
            self._collect(page)

    def _collect(self, page) -> None:
        """Count a drawing of `page`; after :data:`COLLECT_EVERY` of them, have its script
        heap collected in full (the devtools protocol's ``HeapProfiler.collectGarbage``),
        without waiting for it: the page runs it between its drawings' steps."""
        drawn = self.drawn[id(page)] = self.drawn.get(id(page), 0) + 1
        if drawn % COLLECT_EVERY == 0:
            self._in_background(page.tab.send_command("HeapProfiler.collectGarbage"))

    def _in_background(self, coroutine) -> None:
        """Run `coroutine` on the loop without waiting for it; a failure is left unsaid
        (the drawings go on without what it would have done)."""
        task = self.loop.create_task(coroutine)
        task.add_done_callback(lambda done: done.cancelled() or done.exception())

    def request(self, figure_dict: dict, options: dict) -> Future:
        return asyncio.run_coroutine_threadsafe(self._image(figure_dict, options), self.loop)

    def request_both(self, figure_json: str, width, height) -> Future:
        return asyncio.run_coroutine_threadsafe(
            self._png_svg(figure_json, width, height), self.loop
        )

    def close(self) -> None:
        """Close the browser and stop the loop; once (a later call does nothing)."""
        if not self.thread.is_alive():
            return

        async def shut() -> None:
            closing = [asyncio.to_thread(self.host.close)]
            if self.renderer is not None:
                closing.append(self.renderer.close())
            await asyncio.gather(*closing, return_exceptions=True)
            if self.claim is not None:  # after its browser has closed
                self.claim.release()

        try:
            asyncio.run_coroutine_threadsafe(shut(), self.loop).result(10)
        except Exception:  # the process is ending: a browser that will not close is left
            pass
        self.loop.call_soon_threadsafe(self.loop.stop)
        self.thread.join(10)


_image_server: dict = {"started": False, "server": None}


def start_image_export(pages: int = 1) -> None:
    """Start the image server once per process, after checking for Chromium.

    Returns at once: the browser opens on the server's thread, and the first image waits
    for it. `pages` are opened as soon as the browser is (at most :data:`PAGES`; one more
    is opened later when images wait, :data:`SECOND_PAGE_BACKLOG`): a caller about to ask
    for many images passes :data:`PAGES`.

    Raises
    ------
    ImageExportUnavailable
        When no Chromium is found, naming what to install.
    """
    if _image_server["started"]:
        return
    path = _browser_path()
    if path is None or not Path(path).exists():
        raise ImageExportUnavailable(_CHROMIUM_HELP)
    server = _ImageServer(pages, path)
    atexit.register(server.close)
    _image_server.update(started=True, server=server)


def start_for_command(argv: list[str]) -> None:
    """Start the image server first thing for a command that will draw images.

    ``python -m kitchen`` calls this before it imports the rest of the package, so that
    Chromium opens while the imports, the reading and the reduction run: `argv` are the
    command's arguments, and the server starts when they name ``report`` or
    ``field-check`` without ``--no-images`` (nor a request for help); for ``report``,
    whose memo pack draws two images a chart, with all its pages at once. Without Chromium
    nothing is started and nothing is said here: the command itself refuses, naming what
    to install.
    """
    if not argv or argv[0] not in ("report", "field-check"):
        return
    if {"--no-images", "-h", "--help"} & set(argv):
        return
    try:
        start_image_export(PAGES if argv[0] == "report" else 1)
    except ImageExportUnavailable:
        pass


def _figure_dict(figure) -> dict:
    """A figure as a plain dict (``figure.to_dict()``, a copy); a dict is taken as it is."""
    return figure if isinstance(figure, dict) else figure.to_dict()


def _options(figure_dict: dict, image_format: str) -> dict:
    layout = figure_dict.get("layout", {})
    return dict(
        format=image_format,
        width=layout.get("width") or 980,
        height=layout.get("height") or 620,
        scale=PNG_SCALE if image_format == "png" else 1,
    )


def request_image(figure, image_format: str) -> Future:
    """Hand a figure (or its plain dict, ``figure.to_dict()``) to the image server and
    return at once.

    Returns a future of the PNG or SVG bytes; :func:`image_result` waits for it. A figure
    is copied to a plain dict here, so it may change afterwards; a dict is taken as it is,
    and must be left as it is until the image is back.
    """
    start_image_export()
    figure_dict = _figure_dict(figure)
    return _image_server["server"].request(figure_dict, _options(figure_dict, image_format))


_WEBGL_TRACES = frozenset(
    (
        "splom",
        "parcoords",
        "scatter3d",
        "surface",
        "mesh3d",
        "cone",
        "streamtube",
        "volume",
        "isosurface",
        "scattermap",
        "choroplethmap",
        "densitymap",
        "scattermapbox",
        "choroplethmapbox",
        "densitymapbox",
    )
)
"""Trace types plotly.js draws with WebGL beside those named ``...gl`` (plotly.js's trace
list, from memory)."""


def _webgl(figure_dict: dict) -> bool:
    kinds = {str(trace.get("type", "scatter")) for trace in figure_dict.get("data", ())}
    return any("gl" in kind or kind in _WEBGL_TRACES for kind in kinds)


def request_png_svg(figure) -> tuple[Future, Future]:
    """Hand a figure (or its plain dict, as :func:`request_image` takes it) to the image
    server for its PNG and its SVG, drawn once; return at once.

    Returns futures of the PNG and of the SVG bytes, the same as :func:`request_image` of
    each format gives (:data:`_PNG_SVG_SCRIPT`); :func:`image_result` waits for each.
    """
    from plotly.utils import PlotlyJSONEncoder

    start_image_export()
    figure_dict = _figure_dict(figure)
    if _webgl(figure_dict):
        return request_image(figure_dict, "png"), request_image(figure_dict, "svg")
    options = _options(figure_dict, "svg")
    both = _image_server["server"].request_both(
        json.dumps(figure_dict, cls=PlotlyJSONEncoder), options["width"], options["height"]
    )
    png, svg = Future(), Future()

    def hand_on(done: Future) -> None:
        error = done.exception()
        for index, part in enumerate((png, svg)):
            if error is not None:
                part.set_exception(error)
            else:
                part.set_result(done.result()[index])

    both.add_done_callback(hand_on)
    return png, svg


def image_result(request: Future) -> bytes:
    """The bytes of a requested image; the first waits at most FIRST_IMAGE_TIMEOUT seconds.

    A Chromium that starts but cannot render would otherwise leave the call waiting for
    ever; after the first image has come back, results are awaited without a bound (each
    image has kaleido's own bound of 90 s).
    """
    server = _image_server["server"]
    if server.answered:
        return request.result()
    try:
        image = request.result(FIRST_IMAGE_TIMEOUT)
    except FutureTimeout:
        reason = f"no answer within {FIRST_IMAGE_TIMEOUT:g} s"
    except Exception as error:  # named to the caller below
        reason = error
    else:
        server.answered = True
        return image
    raise ImageExportUnavailable(
        f"Chromium was found but did not render a chart ({reason}); check that it starts "
        "headless on this machine (chromium --headless --no-sandbox)"
    )


def figure_image(figure, image_format: str) -> bytes:
    """A figure as PNG or SVG bytes through the image server (started when needed)."""
    return image_result(request_image(figure, image_format))
