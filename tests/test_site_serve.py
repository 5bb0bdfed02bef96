"""`fitment site serve` end to end: serves on 127.0.0.1, rebuilds on change, cleans up."""
from __future__ import annotations

import os
import re
import shutil
import signal
import socket
import subprocess
import sys
import time
import urllib.request
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def free_port() -> int:
    with socket.socket() as probe:
        probe.bind(("127.0.0.1", 0))
        return probe.getsockname()[1]


def wait_for(predicate, limit: float = 120.0) -> bool:
    """Poll until predicate() holds; a bound on waiting, not a timing assertion."""
    end = time.monotonic() + limit
    while time.monotonic() < end:
        if predicate():
            return True
        time.sleep(0.3)
    return False


def test_serve_rebuilds_on_change_and_removes_its_folder_on_sigterm(tmp_path: Path):
    shop = tmp_path / "shop"
    shutil.copytree(ROOT / "records", shop / "records")
    scratch = tmp_path / "scratch"
    scratch.mkdir()
    log = tmp_path / "serve.log"
    port = free_port()
    env = dict(os.environ, TMPDIR=str(scratch))
    with open(log, "w") as out:
        server = subprocess.Popen(
            [sys.executable, "-m", "builder.cli", "--records", str(shop / "records"),
             "site", "serve", "--port", str(port)],
            stdout=out, stderr=subprocess.STDOUT, env=env)
    try:
        assert wait_for(lambda: "Serving the site" in log.read_text()), log.read_text()
        page = urllib.request.urlopen(f"http://127.0.0.1:{port}/builds/HW-0105/").read()
        assert b"HW-0105" in page
        record = next((shop / "records" / "builds").rglob("HW-0105.yaml"))
        record.write_text(re.sub(r"(?m)^outcome: ", "outcome: served again, ",
                                 record.read_text()))
        assert wait_for(lambda: "Rebuilt the site." in log.read_text()), log.read_text()
        page = urllib.request.urlopen(f"http://127.0.0.1:{port}/builds/HW-0105/").read()
        assert b"served again" in page
    finally:
        server.send_signal(signal.SIGTERM)
        server.wait(timeout=60)
    assert "Traceback" not in log.read_text()
    assert not any(scratch.iterdir())  # the temporary site went with the server
