"""`bracegrid edit`: the first line is the page's URL with its token, Ctrl-C stops cleanly, bad input exits 2."""

from __future__ import annotations

import io
import os
import re
import signal
import socket
import subprocess
import sys
import time
import urllib.error
import urllib.request
from pathlib import Path
from typing import Any

import pytest

from bracegrid.cli import main
from tests.web.helpers import copy_project

URL = re.compile(r"^http://127\.0\.0\.1:(\d+)/\?t=([A-Za-z0-9_-]{32})$")


def _start(*argv: str) -> subprocess.Popen[str]:
    env = {**os.environ, "PYTHONUNBUFFERED": "1"}
    return subprocess.Popen(
        [sys.executable, "-m", "bracegrid", "edit", *argv, "--no-browser"],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        env=env,
    )


def test_first_line_is_the_url_and_ctrl_c_stops_cleanly(tmp_path: Path) -> None:
    project = copy_project(tmp_path)
    proc = _start(str(project), "--port", "0")
    try:
        assert proc.stdout is not None
        first = proc.stdout.readline().strip()
        match = URL.match(first)
        assert match, first
        with urllib.request.urlopen(first, timeout=10) as page:  # the page itself, token in the URL
            assert page.status == 200
            assert "bracegrid" in page.read().decode("utf-8")
        bare = first.split("?")[0]
        with pytest.raises(urllib.error.HTTPError) as refused:
            urllib.request.urlopen(bare, timeout=10)
        assert refused.value.code == 403
        proc.send_signal(signal.SIGINT)
        out, err = proc.communicate(timeout=20)
    finally:
        if proc.poll() is None:
            proc.kill()
            proc.communicate()
    assert proc.returncode == 0, err
    assert "Traceback" not in err
    assert out.strip().splitlines()[-1] == "stopped"
    assert "Ctrl-C stops" in err
    port = int(match.group(1))
    with socket.socket() as probe, pytest.raises(ConnectionRefusedError):  # nothing listens there any more
        probe.connect(("127.0.0.1", port))


def test_bad_project_exits_2_before_serving(tmp_path: Path) -> None:
    bad = tmp_path / "bad.toml"
    bad.write_text("[project]\nname = 'x'\n[[frame]]\nname = 'f'\nwidths = [0]\nheights = [2]\n", encoding="utf-8")
    out, err = io.StringIO(), io.StringIO()
    assert main(["edit", str(bad), "--no-browser"], out=out, err=err) == 2
    assert out.getvalue() == ""
    assert "widths[1]" in err.getvalue()
    assert "costs" in err.getvalue()


@pytest.mark.parametrize(
    ("argv", "words"),
    [
        (["--bind", "0.0.0.0"], "--bind '0.0.0.0' means every interface"),
        (["--bind", "my-laptop"], "--bind 'my-laptop' is not an IP address"),
        (["--port", "70000"], "--port port 70000"),
    ],
)
def test_bad_options_exit_2(tmp_path: Path, argv: list[str], words: str) -> None:
    out, err = io.StringIO(), io.StringIO()
    assert main(["edit", str(copy_project(tmp_path)), "--no-browser", *argv], out=out, err=err) == 2
    assert words in err.getvalue()
    assert out.getvalue() == ""


def test_a_port_in_use_exits_2(tmp_path: Path) -> None:
    with socket.socket() as taken:
        taken.bind(("127.0.0.1", 0))
        taken.listen(1)
        port = taken.getsockname()[1]
        out, err = io.StringIO(), io.StringIO()
        code = main(["edit", str(copy_project(tmp_path)), "--no-browser", "--port", str(port)], out=out, err=err)
    assert code == 2
    assert "cannot listen" in err.getvalue()


def test_another_address_only_when_asked_and_with_a_warning(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]
) -> None:
    served: list[Any] = []
    real_bind = __import__("bracegrid.web", fromlist=["bind_socket"]).bind_socket
    monkeypatch.setattr(
        "bracegrid.cli.bind_socket", lambda host, port: real_bind("127.0.0.1", 0)
    )  # 192.0.2.x is not ours
    monkeypatch.setattr("bracegrid.cli.serve", lambda app, sock: served.append(app))
    out = io.StringIO()
    assert main(["edit", str(copy_project(tmp_path)), "--no-browser", "--bind", "192.0.2.7"], out=out) == 0
    first = out.getvalue().splitlines()[0]
    assert re.match(r"^http://192\.0\.2\.7:\d+/\?t=[A-Za-z0-9_-]{32}$", first)
    assert "warning: the editor listens on 192.0.2.7" in capsys.readouterr().err
    assert len(served) == 1
    # the default is loopback, with no warning
    out = io.StringIO()
    assert main(["edit", str(copy_project(tmp_path)), "--no-browser"], out=out) == 0
    assert out.getvalue().startswith("http://127.0.0.1:")
    assert "warning" not in capsys.readouterr().err


def test_ctrl_c_while_a_job_runs_stops_its_worker(tmp_path: Path) -> None:
    project = copy_project(tmp_path, "mill-lane-roof.toml")
    proc = _start(str(project))
    try:
        assert proc.stdout is not None
        url = proc.stdout.readline().strip()
        match = URL.match(url)
        assert match, url
        base = url.split("?")[0].rstrip("/")
        token = match.group(2)
        body = b'{"frame": {"name": "roof plane"}, "time_limit": 120, "workers": 1}'  # long enough to be running
        request = urllib.request.Request(
            f"{base}/api/optimize",
            data=body,
            headers={"X-Bracegrid-Token": token, "Origin": base, "Content-Type": "application/json"},
            method="POST",
        )
        with urllib.request.urlopen(request, timeout=20) as started:
            assert started.status == 202
        time.sleep(1.0)
        workers = _children(proc.pid)
        assert workers  # the job's worker process (and multiprocessing's helper)
        proc.send_signal(signal.SIGINT)
        _, err = proc.communicate(timeout=30)
    finally:
        if proc.poll() is None:
            proc.kill()
            proc.communicate()
    assert proc.returncode == 0, err
    assert "Traceback" not in err
    time.sleep(0.5)
    assert [pid for pid in workers if _alive(pid)] == []


def _children(pid: int) -> list[int]:
    """Processes whose parent is ``pid`` (from /proc; Linux)."""
    found = []
    for stat in Path("/proc").glob("[0-9]*/stat"):
        try:
            fields = stat.read_text().rsplit(")", 1)[1].split()
        except OSError:
            continue
        if int(fields[1]) == pid:
            found.append(int(stat.parent.name))
    return found


def _alive(pid: int) -> bool:
    try:
        state = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()[0]
    except OSError:
        return False
    return state != "Z"
