"""The image renderer's page served over loopback HTTP, and the browser profiles kept between
runs, so that Chromium compiles plotly.js once per machine rather than once per command.

Loading plotly.js (4.8 MB) into a page costs about 1.1 s of a core, nearly all of it V8
compiling the functions the script runs as it loads (measured in the renderer's page:
compiling and running it 0.85 s the first time, 0.025 s running it again). Chromium keeps
compiled scripts in its code cache, but only for scripts fetched over HTTP(S), and only in
the browser profile, which kaleido's browser makes afresh in a temporary folder each time.
Here the page, plotly.js and kaleido's own script are served by a small HTTP server on the
loopback interface (:class:`PageHost`), which Chromium reaches as its proxy under one
address that never changes (:data:`PAGE_ORIGIN`), and the browser keeps a profile of its
own in the cache folder (:func:`claim_profile`), so from the third run on a machine the
page loads in about 0.3 s instead of 1.1-1.5 s (Chromium keeps compiled code for a script
on its second load and uses it from the third).

The cache folder is ``$XDG_CACHE_HOME/kitchen/chromium`` (``~/.cache/kitchen/chromium``
without XDG_CACHE_HOME): :data:`PROFILE_SLOTS` profiles of about 11 MB each, one for each
report running at once, each claimed with a lock held while its browser runs (Chromium
refuses a profile another browser is using). Deleting the folder is safe: the next runs
rebuild it. When the folder cannot be written or every profile is in use, the browser gets
a temporary profile, as kaleido gives it, and loads plotly.js without the cache.
"""

from __future__ import annotations

import fcntl
import hashlib
import os
import socket
import threading
from http.server import BaseHTTPRequestHandler, ThreadingHTTPServer
from pathlib import Path
from urllib.parse import urlsplit

from kitchen.io import cache_folder as tool_cache

__all__ = ["PAGE_ORIGIN", "PROFILE_SLOTS", "PageHost", "cache_folder", "claim_profile"]

PAGE_ORIGIN = "http://kitchen-images.invalid"
"""Where Chromium finds the page: a name that no resolver answers (``.invalid``, RFC 2606
§2), reached only through the loopback server set as the browser's proxy, so the address
and with it Chromium's cache keys stay the same from run to run whatever port the server
has."""

PROFILE_SLOTS = 4
"""Browser profiles kept in the cache folder, that many reports drawing images at once;
a report beyond them draws with a temporary profile."""

_IMMUTABLE = "public, max-age=31536000, immutable"

_COMPILE_HINT = b"//# allFunctionsCalledOnLoad\n"
"""A comment put before plotly.js as it is served: V8 then compiles every function of the
script as it loads it, and Chromium's code cache keeps them all, instead of compiling each
function the first time it runs (V8's explicit compile hints, Chromium 136 and later, from
memory; an older Chromium reads a comment). The first drawings in a page otherwise compile
the drawing code as they go: the first test page took 0.45-0.55 s instead of 0.09 s, with
the hint 0.18-0.24 s. (A warm-up figure drawn in the page as soon as it opened was
measured too and left out: the first figures drew no sooner after it.)"""


def _scripts() -> dict[str, Path]:
    """The page's scripts: plotly.js as plotly.py ships it, and kaleido's own."""
    import plotly
    from kaleido._page_generator import KJS_PATH

    return {
        "plotly.min.js": Path(plotly.__file__).parent / "package_data" / "plotly.min.js",
        "kaleido_scopes.js": KJS_PATH,
    }


def _version(scripts: dict[str, Path]) -> str:
    """A name for this set of scripts that changes when any of them changes.

    Chromium keeps the scripts in its HTTP cache as never changing, so another plotly.js
    must come under another address; the sizes and modification times of the files mark
    a new install without reading 4.8 MB each run.
    """
    marks = []
    for name, path in sorted(scripts.items()):
        stat = path.stat()
        marks.append(f"{name}:{stat.st_size}:{stat.st_mtime_ns}")
    marks.append(_COMPILE_HINT.decode())
    return hashlib.sha256("\n".join(marks).encode()).hexdigest()[:16]


def _index(version: str) -> bytes:
    """The page kaleido's renderer draws in: kaleido's own page (its style element and
    image element, which its script uses) with the scripts served here."""
    return (
        "<!DOCTYPE html>\n<html>\n<head>\n"
        '<meta charset="utf-8">\n<style id="head-style"></style>\n<title>kitchen images</title>\n'
        f'<script src="/{version}/plotly.min.js" charset="utf-8"></script>\n'
        f'<script src="/{version}/kaleido_scopes.js" charset="utf-8"></script>\n'
        "</head>\n"
        '<body style="{margin: 0; padding: 0;}"><img id="kaleido-image" /></body>\n</html>\n'
    ).encode()


class _QuietServer(ThreadingHTTPServer):
    """An HTTP server that keeps its troubles to itself.

    socketserver prints a traceback on the command's error output whenever a request
    fails, as when the browser drops one of its own background requests while it closes
    (a broken pipe); the page's own requests failing show as a drawing that fails."""

    daemon_threads = True

    def handle_error(self, request, client_address) -> None:
        pass


class PageHost:
    """The renderer's page and its scripts, served on the loopback interface on a thread.

    Chromium is pointed at it as its proxy (:attr:`proxy`) and opens :attr:`index_url`;
    every other address it asks for (its own background requests) is answered 404, so
    nothing leaves the machine. The page sends each drawing's PNG and SVG back to it
    (``POST`` to ``drawn/NAME``), kept in :attr:`received` by name until taken.
    """

    def __init__(self) -> None:
        scripts = _scripts()
        self.version = _version(scripts)
        files = {
            f"/{self.version}/{name}": (path, "text/javascript; charset=utf-8")
            for name, path in scripts.items()
        }
        index = _index(self.version)
        self.index_url = f"{PAGE_ORIGIN}/{self.version}/index.html"
        self.served: list[str] = []  # the paths asked for, in order
        self.received: dict[str, bytes] = {}  # what the page sent, by name
        host = self

        class Handler(BaseHTTPRequestHandler):
            def log_message(self, *_):  # the command's output is its own
                pass

            def do_GET(self):  # noqa: N802  (the name http.server calls)
                parts = urlsplit(self.path)
                origin = f"{parts.scheme}://{parts.netloc}" if parts.netloc else PAGE_ORIGIN
                host.served.append(parts.path)
                if origin != PAGE_ORIGIN:
                    body, kind = None, None
                elif parts.path == f"/{host.version}/index.html":
                    body, kind = index, "text/html; charset=utf-8"
                elif parts.path in files:
                    path, kind = files[parts.path]
                    body = path.read_bytes()
                    if path.name == "plotly.min.js":
                        body = _COMPILE_HINT + body
                else:
                    body, kind = None, None
                if body is None:
                    self.send_error(404)
                    return
                self.send_response(200)
                self.send_header("Content-Type", kind)
                self.send_header("Content-Length", str(len(body)))
                self.send_header("Cache-Control", _IMMUTABLE)
                self.end_headers()
                self.wfile.write(body)

            def do_POST(self):  # noqa: N802  (the name http.server calls)
                parts = urlsplit(self.path)
                prefix = f"/{host.version}/drawn/"
                if not parts.path.startswith(prefix):
                    self.send_error(404)
                    return
                body = self.rfile.read(int(self.headers.get("Content-Length", 0)))
                host.received[parts.path[len(prefix) :]] = body
                self.send_response(204)
                self.end_headers()

        self.server = _QuietServer(("127.0.0.1", 0), Handler)
        self.proxy = f"127.0.0.1:{self.server.server_address[1]}"
        self.thread = threading.Thread(
            target=self.server.serve_forever,
            args=(0.05,),  # seconds between looks for shutdown: closing waits at most that
            name="kitchen-page-host",
            daemon=True,
        )
        self.thread.start()

    def close(self) -> None:
        """Stop serving and free the port; once (a later call does nothing)."""
        if self.thread.is_alive():
            self.server.shutdown()
            self.thread.join(5)
        self.server.server_close()


def cache_folder(browser: str = "chromium") -> Path:
    """Where the profiles of `browser` (a name of its kind, ``chromium`` or
    ``chromium-headless-shell``) are kept: ``$XDG_CACHE_HOME/kitchen/<browser>``, or
    ``~/.cache/kitchen/<browser>`` (:func:`kitchen.io.cache_folder`)."""
    return tool_cache(browser)


class ProfileClaim:
    """A browser profile in the cache folder, held by a lock until :meth:`release`."""

    def __init__(self, path: Path, lock: int):
        self.path, self._lock = path, lock

    def release(self) -> None:
        """Free the profile for another run; once (a later call does nothing)."""
        if self._lock >= 0:
            os.close(self._lock)  # closing the descriptor drops its lock
            self._lock = -1


def claim_profile(browser: str = "chromium") -> ProfileClaim | None:
    """The first profile of `browser` (:func:`cache_folder`) no other run holds, locked;
    None when none can be had.

    Each profile ``profile-N`` has a lock file ``profile-N.lock`` beside it, locked with
    ``flock`` while a browser uses it: the lock goes with the process, so a run that was
    killed leaves none behind. None when the cache folder cannot be made or written, or
    when all :data:`PROFILE_SLOTS` are held by runs going on at the same time.
    """
    folder = cache_folder(browser)
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except OSError:
        return None
    for slot in range(PROFILE_SLOTS):
        try:
            lock = os.open(folder / f"profile-{slot}.lock", os.O_RDWR | os.O_CREAT, 0o600)
        except OSError:
            return None
        try:
            fcntl.flock(lock, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except OSError:  # another run holds it
            os.close(lock)
            continue
        if _browser_holds(folder / f"profile-{slot}"):
            os.close(lock)
            continue
        return ProfileClaim(folder / f"profile-{slot}", lock)
    return None


def _browser_holds(profile: Path) -> bool:
    """Whether a browser still running holds `profile` without its lock (one left behind
    by a run that was killed): Chromium marks a profile in use with a symbolic link
    ``SingletonLock`` naming its host and process, ``HOST-PID``; a browser started on it
    would hand over to that one and stop (a few seconds lost before the temporary profile)."""
    try:
        mark = os.readlink(profile / "SingletonLock")
    except OSError:  # no mark: the profile is free
        return False
    host, _, pid = mark.rpartition("-")
    if host != socket.gethostname() or not pid.isdigit():
        return True  # another machine's browser on a shared folder
    try:
        os.kill(int(pid), 0)
    except ProcessLookupError:  # a mark left by a browser that ended: Chromium clears it
        return False
    except PermissionError:  # a process of another user
        return True
    return True
