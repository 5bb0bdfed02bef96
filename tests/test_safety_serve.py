"""Issue 10, `site serve`: a port in use is said at once, before any building; a request
for a path holding a NUL byte is answered 400 (RFC 9110, 15.5.1: a request the server
will not process because of a client error), not a traceback in the server thread.
"""
from __future__ import annotations

import http.client
import os
import shutil
import signal
import socket
import subprocess
import sys
import time
from pathlib import Path

from click.testing import CliRunner

from builder.cli import main
from builder.site.serve import StaticServer

ROOT = Path(__file__).resolve().parents[1]


def test_a_port_in_use_fails_at_once_before_building(tmp_path, monkeypatch):
    shutil.copytree(ROOT / "records", tmp_path / "records")
    loaded = []
    import builder.records

    monkeypatch.setattr(builder.records, "load_shop", lambda *a, **k: loaded.append(a) or 1 / 0)
    with socket.socket() as taken:
        taken.bind(("127.0.0.1", 0))
        taken.listen()
        port = taken.getsockname()[1]
        result = CliRunner().invoke(main, ["--records", str(tmp_path / "records"), "site", "serve",
                                           "--port", str(port)])
    assert result.exit_code == 2, result.output
    assert isinstance(result.exception, SystemExit), repr(result.exception)
    assert f"port {port} on 127.0.0.1 is in use by another program; choose another with --port" in result.output
    assert "Traceback" not in result.output
    assert loaded == []  # nothing was loaded, let alone built


def _status(port: int, target: str) -> int:
    connection = http.client.HTTPConnection("127.0.0.1", port, timeout=30)
    try:
        connection.request("GET", target)
        return connection.getresponse().status
    finally:
        connection.close()


def test_a_nul_byte_in_the_path_is_a_400(tmp_path, capfd):
    (tmp_path / "index.html").write_text("<p>home</p>")
    with StaticServer(tmp_path) as server:
        port = server.httpd.server_address[1]
        assert _status(port, "/%00") == 400
        assert _status(port, "/index.html%00.txt") == 400
        assert _status(port, "/index.html") == 200  # and it still serves
    assert "Traceback" not in capfd.readouterr().err


def test_serve_end_to_end_answers_400_and_says_no_traceback(tmp_path):
    shutil.copytree(ROOT / "records", tmp_path / "records")
    for extra in sorted((tmp_path / "records" / "builds").rglob("*.yaml"))[6:]:
        extra.unlink()
    with socket.socket() as probe:
        probe.bind(("127.0.0.1", 0))
        port = probe.getsockname()[1]
    log = tmp_path / "serve.log"
    scratch = tmp_path / "scratch"
    scratch.mkdir()
    with open(log, "w") as out:
        server = subprocess.Popen([sys.executable, "-m", "builder.cli", "--records", str(tmp_path / "records"),
                                   "site", "serve", "--port", str(port)], stdout=out, stderr=subprocess.STDOUT,
                                  env=dict(os.environ, TMPDIR=str(scratch)), cwd=ROOT)
    try:
        deadline = time.monotonic() + 180
        while "Serving the site" not in log.read_text():  # a bound on waiting, not a timing assertion
            assert server.poll() is None and time.monotonic() < deadline, log.read_text()
            time.sleep(0.2)
        assert _status(port, "/%00") == 400
        assert _status(port, "/") == 200
    finally:
        server.send_signal(signal.SIGTERM)
        server.wait(timeout=60)
    assert "Traceback" not in log.read_text()
    assert not any(scratch.iterdir())
