"""Serve the site locally: build it, serve it on 127.0.0.1, rebuild when sources change."""
from __future__ import annotations

import errno
import functools
import os
import signal
import sys
import tempfile
import threading
import urllib.parse
from collections.abc import Callable
from http import HTTPStatus
from http.server import SimpleHTTPRequestHandler, ThreadingHTTPServer
from pathlib import Path
from typing import TYPE_CHECKING, Any

from builder.problems import InputError, terminal_safe
from builder.site.publish import PACKAGED_SITE_SRC, SERVE_PREFIX, publish_site, shop_site_src, work_folder


class PortUnavailable(OSError):
    """The port cannot be listened on (in use, or not allowed); the message says so plainly."""

if TYPE_CHECKING:
    from builder.history import Analysis


class _QuietHandler(SimpleHTTPRequestHandler):
    def log_message(self, format: str, *args: Any) -> None:  # noqa: A002 (stdlib name)
        pass

    def send_head(self):
        """400 for a path no file can have (a NUL byte, %00) instead of a ValueError in the
        server thread and a dropped connection."""
        path = urllib.parse.unquote(urllib.parse.urlsplit(self.path).path)
        if "\x00" in path:
            self.send_error(HTTPStatus.BAD_REQUEST, "Bad request: the path holds a NUL byte")
            return None
        try:
            return super().send_head()
        except ValueError:
            self.send_error(HTTPStatus.BAD_REQUEST, "Bad request")
            return None


class StaticServer:
    """http.server on a folder in a background thread; `with StaticServer(dir) as s: s.url`."""

    def __init__(self, directory: str | os.PathLike, host: str = "127.0.0.1", port: int = 0):
        handler = functools.partial(_QuietHandler, directory=str(directory))
        try:
            self.httpd = ThreadingHTTPServer((host, port), handler)
        except OSError as error:
            why = ("is in use by another program" if error.errno == errno.EADDRINUSE
                   else f"cannot be used ({error.strerror or error})")
            raise PortUnavailable(f"port {port} on {host} {why}; choose another with --port") from None
        self.thread = threading.Thread(target=self.httpd.serve_forever, daemon=True)

    @property
    def url(self) -> str:
        host, port = self.httpd.server_address[:2]
        return f"http://{host}:{port}/"

    def __enter__(self) -> "StaticServer":
        self.thread.start()
        return self

    def __exit__(self, *exc: object) -> None:
        self.httpd.shutdown()
        self.httpd.server_close()
        self.thread.join()


def source_stamp(folders: list[Path]) -> tuple:
    """What changed-detection compares: every file's path, size and modification time."""
    stamp = []
    for folder in folders:
        for path in sorted(folder.rglob("*")) if folder.is_dir() else ():
            if path.is_file():
                info = path.stat()
                stamp.append((str(path), info.st_size, info.st_mtime_ns))
    return tuple(stamp)


def records_loader(records: str | os.PathLike) -> Callable[[], Analysis]:
    """Load and analyse a records folder afresh on every call."""
    from builder.history import analyse
    from builder.records import load_shop

    return lambda: analyse(load_shop(records))


def serve(analysis_loader: Callable[[], Analysis] | str | os.PathLike, host: str = "127.0.0.1",
          port: int = 8000, site_src: str | os.PathLike | None = None,
          poll_seconds: float = 1.0) -> None:
    """Build the site, serve it at http://host:port/ until interrupted, and rebuild it when
    the records or site sources change. analysis_loader: a function returning a fresh
    Analysis, or a records folder. A rebuild that fails (bad record, strict mkdocs warning)
    is reported and the last good site keeps being served.

    The port is taken first: PortUnavailable, before anything is loaded or built, when it
    cannot be had."""
    if not callable(analysis_loader):
        analysis_loader = records_loader(analysis_loader)
    _stop_on_terminate()
    try:
        with work_folder(Path(tempfile.gettempdir()), SERVE_PREFIX) as work:
            out = work / "site"
            server = StaticServer(out, host, port)  # the port first: fail before building
            try:
                _serve(server, analysis_loader, out, site_src, poll_seconds)
            finally:
                server.httpd.server_close()
    except KeyboardInterrupt:
        pass


def _serve(server: StaticServer, analysis_loader: Callable[[], Analysis], out: Path,
           site_src: str | os.PathLike | None, poll_seconds: float) -> None:
    analysis = analysis_loader()
    publish_site(analysis, out, site_src)
    watched = [Path(analysis.shop.root), PACKAGED_SITE_SRC, shop_site_src(analysis, site_src)]
    stamp = source_stamp(watched)
    with server:
        print(f"Serving the site at {server.url} (Ctrl+C to stop)", file=sys.stderr)
        stop = threading.Event()
        while not stop.wait(poll_seconds):
            now = source_stamp(watched)
            if now == stamp:
                continue
            stamp = now
            try:
                publish_site(analysis_loader(), out, site_src)
                print("Rebuilt the site.", file=sys.stderr)
            except InputError as error:  # PublishError included
                print(f"{terminal_safe(str(error))}\nKept the last good site.", file=sys.stderr)


def _stop_on_terminate() -> None:
    """Let SIGTERM end the server like Ctrl-C, so the temporary site is removed."""
    if threading.current_thread() is threading.main_thread():
        signal.signal(signal.SIGTERM, lambda signum, frame: _interrupt())


def _interrupt() -> None:
    raise KeyboardInterrupt
