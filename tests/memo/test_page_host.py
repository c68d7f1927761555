"""The image renderer's page served on the loopback interface, and the browser profiles kept
in the cache folder: one per run at once, never one a browser still holds."""

import http.client
import os
import socket
from pathlib import Path

import pytest

from kitchen.memo import _page_host


@pytest.fixture
def cache(tmp_path, monkeypatch):
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path))
    return tmp_path / "kitchen" / "chromium"


def test_the_cache_folder_follows_xdg_cache_home_else_the_home_folder(tmp_path, monkeypatch):
    # XDG Base Directory Specification 0.8: $XDG_CACHE_HOME, by default $HOME/.cache
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "xdg"))
    assert _page_host.cache_folder() == tmp_path / "xdg" / "kitchen" / "chromium"
    monkeypatch.delenv("XDG_CACHE_HOME")
    monkeypatch.setenv("HOME", str(tmp_path / "home"))
    assert _page_host.cache_folder() == tmp_path / "home" / ".cache" / "kitchen" / "chromium"


def test_each_run_at_once_claims_a_profile_of_its_own_and_frees_it(cache):
    first = _page_host.claim_profile()
    second = _page_host.claim_profile()
    assert (first.path, second.path) == (cache / "profile-0", cache / "profile-1")
    first.release()
    first.release()  # a second release does nothing
    again = _page_host.claim_profile()
    assert again.path == cache / "profile-0"
    for claim in (second, again):
        claim.release()


def test_a_lock_held_by_another_process_keeps_the_profile_from_this_one(cache):
    # flock locks belong to the open file description: another process's lock on the same
    # file is seen here as held, as a second report running at the same time would see it
    import subprocess
    import sys

    cache.mkdir(parents=True)
    holder = subprocess.Popen(
        [
            sys.executable,
            "-c",
            "import fcntl, os, sys, time\n"
            f"fd = os.open({str(cache / 'profile-0.lock')!r}, os.O_RDWR | os.O_CREAT)\n"
            "fcntl.flock(fd, fcntl.LOCK_EX)\n"
            "print('held', flush=True)\n"
            "sys.stdin.read()\n",
        ],
        stdin=subprocess.PIPE,
        stdout=subprocess.PIPE,
        text=True,
    )
    try:
        assert holder.stdout.readline().strip() == "held"
        claim = _page_host.claim_profile()
        assert claim.path == cache / "profile-1"
        claim.release()
    finally:
        holder.communicate("", timeout=30)
    claim = _page_host.claim_profile()
    assert claim.path == cache / "profile-0"  # the holder ended: its lock went with it
    claim.release()


def test_every_profile_held_gives_none_and_the_browser_a_temporary_one(cache, monkeypatch):
    monkeypatch.setattr(_page_host, "PROFILE_SLOTS", 2)
    held = [_page_host.claim_profile(), _page_host.claim_profile()]
    assert _page_host.claim_profile() is None
    for claim in held:
        claim.release()


def test_a_cache_folder_that_cannot_be_made_gives_none(tmp_path, monkeypatch):
    (tmp_path / "file").write_text("not a folder")
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "file"))
    assert _page_host.claim_profile() is None


def test_a_profile_a_running_browser_still_marks_is_passed_over(cache):
    # Chromium marks a profile in use with a symbolic link SingletonLock -> HOST-PID
    # (from memory); this process stands for a browser left behind by a killed run
    (cache / "profile-0").mkdir(parents=True)
    os.symlink(f"{socket.gethostname()}-{os.getpid()}", cache / "profile-0" / "SingletonLock")
    claim = _page_host.claim_profile()
    assert claim.path == cache / "profile-1"
    claim.release()


def test_a_mark_left_by_a_browser_that_ended_does_not_hold_the_profile(cache):
    import subprocess
    import sys

    ended = subprocess.run(
        [sys.executable, "-c", "import os; print(os.getpid())"],
        capture_output=True,
        text=True,
        check=True,
    )
    (cache / "profile-0").mkdir(parents=True)
    os.symlink(
        f"{socket.gethostname()}-{ended.stdout.strip()}", cache / "profile-0" / "SingletonLock"
    )
    claim = _page_host.claim_profile()
    assert claim.path == cache / "profile-0"
    claim.release()


def _get(host: _page_host.PageHost, url: str) -> tuple[int, dict, bytes]:
    """GET `url` through the page host as Chromium does through its proxy."""
    address, port = host.proxy.split(":")
    connection = http.client.HTTPConnection(address, int(port), timeout=30)
    try:
        connection.request("GET", url)
        answer = connection.getresponse()
        return answer.status, dict(answer.getheaders()), answer.read()
    finally:
        connection.close()


def test_the_page_host_serves_the_page_and_its_scripts_to_be_kept_and_nothing_else():
    import plotly

    host = _page_host.PageHost()
    try:
        status, headers, page = _get(host, host.index_url)
        assert status == 200 and headers["Content-Type"].startswith("text/html")
        assert b'id="kaleido-image"' in page and b'id="head-style"' in page
        base = host.index_url.rsplit("/", 1)[0]
        for name in ("plotly.min.js", "kaleido_scopes.js"):
            assert f'src="/{host.version}/{name}"'.encode() in page
            status, headers, script = _get(host, f"{base}/{name}")
            assert status == 200 and "immutable" in headers["Cache-Control"]
        # plotly.js as plotly.py ships it, behind V8's hint to compile it whole
        shipped = Path(plotly.__file__).parent / "package_data" / "plotly.min.js"
        served = _get(host, f"{base}/plotly.min.js")[2]
        assert served == _page_host._COMPILE_HINT + shipped.read_bytes()
        assert _get(host, f"{base}/other.js")[0] == 404
        assert _get(host, "http://example.com/")[0] == 404  # nothing is fetched elsewhere
        assert _get(host, f"{_page_host.PAGE_ORIGIN}/0/plotly.min.js")[0] == 404
    finally:
        host.close()
        host.close()  # a second close does nothing


def test_the_scripts_come_under_a_new_address_when_a_file_changes(tmp_path):
    script = tmp_path / "plotly.min.js"
    script.write_text("one")
    before = _page_host._version({"plotly.min.js": script})
    script.write_text("other")
    os.utime(script, ns=(1, 1))
    assert _page_host._version({"plotly.min.js": script}) != before


def test_a_request_the_browser_drops_prints_nothing(capfd):
    # a request whose connection is closed before the answer is written (the browser
    # closing) would have socketserver print a traceback on the command's error output
    host = _page_host.PageHost()
    try:
        address, port = host.proxy.split(":")
        with socket.create_connection((address, int(port))) as connection:
            connection.setsockopt(socket.SOL_SOCKET, socket.SO_LINGER, b"\1\0\0\0\0\0\0\0")
            connection.sendall(b"GET http://example.com/time/1/current HTTP/1.0\r\n\r\n")
        assert _get(host, host.index_url)[0] == 200  # the host still answers
    finally:
        host.close()
    assert "Traceback" not in capfd.readouterr().err


def test_the_page_hands_its_images_over_by_name_and_nowhere_else():
    host = _page_host.PageHost()
    try:
        address, port = host.proxy.split(":")
        base = host.index_url.rsplit("/", 1)[0]
        for url, status in ((f"{base}/drawn/7.png", 204), (f"{base}/other/7.png", 404)):
            connection = http.client.HTTPConnection(address, int(port), timeout=30)
            connection.request("POST", url, body=b"\x89PNG bytes")
            assert connection.getresponse().status == status
            connection.close()
        assert host.received == {"7.png": b"\x89PNG bytes"}
    finally:
        host.close()
