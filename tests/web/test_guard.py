"""Every security rule of the editor (docs/editor.md, "Security"), one or more tests each.

After each refused or malformed request the same server answers a good request: it survives.
"""

from __future__ import annotations

from collections.abc import Iterator
from pathlib import Path
from typing import Any

import pytest
from starlette.testclient import TestClient

from bracegrid.errors import InputError
from bracegrid.web import EditorSession, GuardRules, check_bind_address
from bracegrid.web.guard import refuse
from tests.web.helpers import ORIGIN, PAGE, PORT, TOKEN, copy_project, editor, frame_edit, load


@pytest.fixture
def served(tmp_path: Path) -> Iterator[tuple[TestClient, EditorSession]]:
    with editor(copy_project(tmp_path), max_body=64 * 1024) as pair:
        yield pair


def _still_serves(client: TestClient) -> None:
    assert client.get("/api/project", headers=PAGE).status_code == 200


def _refused(got: Any, status: int, error: str) -> None:
    assert got.status_code == status, got.text
    assert got.headers["content-type"] == "application/json"
    body = got.json()
    assert body["error"] == error
    assert "Traceback" not in got.text


# --- rule 1: loopback by default; another address only when asked, and never "every interface"


def test_bind_address_is_checked() -> None:
    assert check_bind_address("127.0.0.1") == ("127.0.0.1", True)
    assert check_bind_address("::1") == ("::1", True)
    assert check_bind_address("192.0.2.7") == ("192.0.2.7", False)
    for bad in ("0.0.0.0", "::", "localhost", "example.org", "127.0.0.1; rm -rf /"):
        with pytest.raises(InputError):
            check_bind_address(bad)


# --- rule 2: the token on every request


@pytest.mark.parametrize(
    ("method", "path"),
    [
        ("GET", "/"),
        ("GET", "/static/app.js"),
        ("GET", "/api/project"),
        ("POST", "/api/check"),
        ("POST", "/api/save"),
        ("POST", "/api/optimize"),
        ("GET", "/api/jobs/0123456789abcdef/events"),
        ("GET", "/out/0"),
        ("GET", "/no/such/page"),
    ],
)
def test_missing_or_wrong_token_is_403(served: tuple[TestClient, EditorSession], method: str, path: str) -> None:
    client, _ = served
    for headers in ({"Origin": ORIGIN}, {"Origin": ORIGIN, "X-Bracegrid-Token": "wrong"}):
        got = client.request(method, path, headers=headers, json={} if method == "POST" else None)
        _refused(got, 403, "forbidden-token")
    _refused(client.get(f"{path}?t=wrong-{TOKEN}"), 403, "forbidden-token")
    _refused(client.get(f"{path}?t={TOKEN[:-1]}"), 403, "forbidden-token")
    _still_serves(client)


def test_token_in_query_or_header_both_let_in(served: tuple[TestClient, EditorSession]) -> None:
    client, _ = served
    assert client.get(f"/?t={TOKEN}").status_code == 200
    assert client.get("/api/project", headers={"X-Bracegrid-Token": TOKEN}).status_code == 200


def test_each_start_makes_a_new_token() -> None:
    from bracegrid.web import new_token

    tokens = {new_token() for _ in range(50)}
    assert len(tokens) == 50
    assert all(len(t) >= 32 for t in tokens)


# --- rule 3: Host must be the bound address (DNS rebinding) and Origin the page's own (cross-site)


@pytest.mark.parametrize("host", ["evil.example:8765", "localhost:8765", "127.0.0.1:9999", "127.0.0.1", ""])
def test_foreign_host_is_403_even_with_the_token(served: tuple[TestClient, EditorSession], host: str) -> None:
    client, _ = served
    got = client.get(f"/?t={TOKEN}", headers={"Host": host})
    _refused(got, 403, "forbidden-host")
    _still_serves(client)


@pytest.mark.parametrize("origin", ["http://evil.example", "http://127.0.0.1:9999", "https://127.0.0.1:8765", "null"])
def test_foreign_origin_is_403(served: tuple[TestClient, EditorSession], origin: str) -> None:
    client, session = served
    frame = load(client)["frames"][0]
    headers = {"X-Bracegrid-Token": TOKEN, "Origin": origin}
    before = session.paths.project.read_bytes()
    got = client.post("/api/save", json={"version": session.version, "frames": [frame_edit(frame)]}, headers=headers)
    _refused(got, 403, "forbidden-origin")
    _refused(client.get("/api/project", headers=headers), 403, "forbidden-origin")
    assert session.paths.project.read_bytes() == before
    _still_serves(client)


def test_state_changing_request_without_origin_is_403(served: tuple[TestClient, EditorSession]) -> None:
    client, session = served
    frame = load(client)["frames"][0]
    for path, body in (
        ("/api/save", {"version": session.version, "frames": [frame_edit(frame, members=[])]}),
        ("/api/save-copy", {"frames": [frame_edit(frame)]}),
        ("/api/optimize", {"frame": frame_edit(frame)}),
        ("/api/check", {"frame": frame_edit(frame)}),
    ):
        _refused(client.post(path, json=body, headers={"X-Bracegrid-Token": TOKEN}), 403, "forbidden-origin")
    assert not session.paths.out.exists()
    assert not session.paths.backup.exists()
    _still_serves(client)


def test_other_methods_are_refused(served: tuple[TestClient, EditorSession]) -> None:
    client, _ = served
    for method in ("PUT", "DELETE", "PATCH", "OPTIONS"):
        got = client.request(method, "/api/save", headers=PAGE)
        assert got.status_code == 405
        assert got.json()["error"] == "method"
    assert client.get("/api/save", headers=PAGE).status_code == 405  # a POST endpoint does not answer GET
    _still_serves(client)


def test_every_answer_keeps_the_page_to_its_own_origin(served: tuple[TestClient, EditorSession]) -> None:
    client, _ = served
    for got in (client.get(f"/?t={TOKEN}"), client.get("/api/project", headers=PAGE), client.get("/")):
        assert "default-src 'none'" in got.headers["content-security-policy"]
        assert got.headers["x-content-type-options"] == "nosniff"
        assert got.headers["referrer-policy"] == "no-referrer"
        assert got.headers["x-frame-options"] == "DENY"


def test_refuse_rules_directly() -> None:
    rules = GuardRules.bound("127.0.0.1", PORT, TOKEN)
    ok = {"host": f"127.0.0.1:{PORT}", "origin": ORIGIN}
    assert refuse(rules, method="POST", headers=ok, query=f"t={TOKEN}") is None
    assert refuse(rules, method="POST", headers={**ok, "content-length": "x"}, query=f"t={TOKEN}").status == 400
    too_big = str(rules.max_body + 1)
    assert refuse(rules, method="POST", headers={**ok, "content-length": too_big}, query=f"t={TOKEN}").status == 413
    v6 = GuardRules.bound("::1", PORT, TOKEN)
    assert v6.host == f"[::1]:{PORT}"
    assert refuse(v6, method="GET", headers={"host": f"[::1]:{PORT}"}, query=f"t={TOKEN}") is None


# --- rule 4: no path from a request reaches the file system


@pytest.mark.parametrize(
    "path",
    [
        "/static/../session.py",
        "/static/%2e%2e/session.py",
        "/static/..%2fsession.py",
        "/static/index.html",  # the template is served only as the page
        "/static/app.js/..",
        "/out/-1",
        "/out/..%2f..%2forchard-shed.toml",
        "/out/0",  # nothing written yet
        "/etc/passwd",
        "/api/project/../../etc/passwd",
    ],
)
def test_request_paths_never_reach_files(served: tuple[TestClient, EditorSession], path: str) -> None:
    client, _ = served
    got = client.get(path, headers=PAGE)
    assert got.status_code == 404
    assert got.json()["error"] == "not-found"
    _still_serves(client)


@pytest.mark.parametrize(
    "extra",
    [{"path": "/etc/passwd"}, {"file": "x.toml"}, {"out": "/tmp"}, {"folder": ".."}, {"name_of_file": "a"}],
)
def test_a_path_in_the_body_is_an_unknown_field(
    served: tuple[TestClient, EditorSession], extra: dict[str, str]
) -> None:
    client, session = served
    data = load(client)
    frame = data["frames"][0]
    for endpoint, body in (
        ("/api/save", {"version": data["version"], "frames": [frame_edit(frame)], **extra}),
        ("/api/save-copy", {"frames": [frame_edit(frame, **extra)]}),
        ("/api/check", {"frame": frame_edit(frame), **extra}),
        ("/api/compare", {"frame": frame_edit(frame), **extra}),
    ):
        got = client.post(endpoint, json=body, headers=PAGE)
        _refused(got, 422, "invalid-request")
        assert "unknown field" in got.json()["message"]
    assert not session.paths.backup.exists()
    assert not session.paths.out.exists()


def test_only_the_project_its_backup_and_the_output_folder_are_touched(tmp_path: Path) -> None:
    path = copy_project(tmp_path)
    (tmp_path / "neighbour.txt").write_text("leave me", encoding="utf-8")
    with editor(path) as (client, session):
        data = load(client)
        frame = data["frames"][0]
        saved = client.post("/api/save", json={"version": data["version"], "frames": [frame_edit(frame)]}, headers=PAGE)
        assert saved.status_code == 200
        copied = client.post("/api/save-copy", json={"frames": [frame_edit(frame)]}, headers=PAGE)
        assert copied.status_code == 200
    names = sorted(str(p.relative_to(tmp_path)) for p in tmp_path.rglob("*"))
    copy_name = copied.json()["saved"]
    assert names == sorted(
        [
            "neighbour.txt",
            "orchard-shed.toml",
            "orchard-shed.toml.bak",
            "orchard-shed-edit",
            f"orchard-shed-edit/{copy_name}",
        ]
    )
    assert (tmp_path / "neighbour.txt").read_text(encoding="utf-8") == "leave me"
    assert session.paths.out == tmp_path / "orchard-shed-edit"


# --- rule 5: bodies limited in size


def test_oversize_body_is_413_by_declared_length(served: tuple[TestClient, EditorSession]) -> None:
    client, _ = served
    got = client.post(
        "/api/check", content=b"x" * (64 * 1024 + 1), headers={**PAGE, "Content-Type": "application/json"}
    )
    _refused(got, 413, "too-large")
    _still_serves(client)


def test_oversize_body_is_413_when_streamed_without_a_length(served: tuple[TestClient, EditorSession]) -> None:
    client, _ = served

    def chunks() -> Iterator[bytes]:
        for _ in range(20):
            yield b" " * 8192

    got = client.post("/api/check", content=chunks(), headers={**PAGE, "Content-Type": "application/json"})
    _refused(got, 413, "too-large")
    _still_serves(client)


# --- rule 6: every request validated; errors are JSON 4xx, never a traceback; the server goes on


@pytest.mark.parametrize(
    ("body", "status", "error"),
    [
        (b"{not json", 400, "bad-request"),
        (b"", 400, "bad-request"),
        (b"\xff\xfe\x00", 400, "bad-request"),
        (b"[1, 2, 3]", 400, "bad-request"),
        (b'"frame"', 400, "bad-request"),
        (b'{"frame": NaN}', 400, "bad-request"),
        (b"[" * 5000 + b"]" * 5000, 400, "bad-request"),
        (b"{}", 422, "invalid-request"),
        (b'{"frame": 3}', 422, "invalid-request"),
        (b'{"frame": {"name": "roof plan", "widths": "4,4"}}', 422, "invalid-request"),
        (b'{"frame": {"name": "roof plan", "widths": [1e308]}}', 422, "invalid-request"),
        (b'{"frame": {"name": "roof plan", "widths": [[[4]]]}}', 422, "invalid-request"),
        (b'{"frame": {"name": "roof plan", "members": [{"row": 1}]}}', 422, "invalid-request"),
        (b'{"frame": {"name": "roof plan", "members": [{"row": true, "col": 1, "kind": "tie", "diagonal": "r"}]}}', 422,
         "invalid-request"),
        (b'{"frame": {"name": "roof plan", "blocked": [[1, 2, 3]]}}', 422, "invalid-request"),
        (b'{"frame": {"name": "roof plan", "members": [{"row": 9, "col": 1, "kind": "tie", "diagonal": "up"}]}}', 422,
         "invalid"),
        (b'{"frame": {"name": "nowhere"}}', 422, "invalid"),
        (b'{"frame": {"name": "roof plan", "supports": ""}}', 422, "invalid-request"),
    ],
)  # fmt: skip
def test_malformed_bodies_get_json_errors(
    served: tuple[TestClient, EditorSession], body: bytes, status: int, error: str
) -> None:
    client, _ = served
    got = client.post("/api/check", content=body, headers={**PAGE, "Content-Type": "application/json"})
    _refused(got, status, error)
    _still_serves(client)


@pytest.mark.parametrize(
    ("changes", "field"),
    [
        ({"time_limit": 0}, "time_limit"),
        ({"time_limit": 1e6}, "time_limit"),
        ({"time_limit": "10"}, "time_limit"),
        ({"workers": 3}, "workers"),
        ({"workers": 0}, "workers"),
        ({"seed": -1}, "seed"),
        ({"seed": 2**40}, "seed"),
        ({"allow": ["steel"]}, "allow"),
        ({"allow": []}, "allow"),
    ],
)
def test_solver_options_are_validated(
    served: tuple[TestClient, EditorSession], changes: dict[str, Any], field: str
) -> None:
    client, _ = served
    frame = load(client)["frames"][0]
    got = client.post("/api/optimize", json={"frame": frame_edit(frame), **changes}, headers=PAGE)
    _refused(got, 422, "invalid-request")
    assert got.json()["field"] == field
    _still_serves(client)


@pytest.mark.parametrize(
    "without",
    [
        [],
        "r1c1",
        [{"row": 1, "col": 1}],
        [{"row": 1, "col": 1, "diagonal": "sideways"}],
        [{"row": 0, "col": 1, "diagonal": "rising"}],
    ],
)
def test_repair_selection_is_validated(served: tuple[TestClient, EditorSession], without: Any) -> None:
    client, _ = served
    frame = load(client)["frames"][0]
    got = client.post("/api/repair", json={"frame": frame_edit(frame), "without": without}, headers=PAGE)
    _refused(got, 422, "invalid-request")
    _still_serves(client)


def test_save_request_is_validated(served: tuple[TestClient, EditorSession]) -> None:
    client, session = served
    data = load(client)
    frame = frame_edit(data["frames"][0])
    for body in (
        {"frames": [frame]},
        {"version": data["version"]},
        {"version": 7, "frames": [frame]},
        {"version": data["version"], "frames": [frame, frame]},
    ):
        got = client.post("/api/save", json=body, headers=PAGE)
        _refused(got, 422, "invalid-request")
    assert not session.paths.backup.exists()
    _still_serves(client)


def test_an_unexpected_failure_is_a_json_500_and_the_server_goes_on(
    served: tuple[TestClient, EditorSession], monkeypatch: pytest.MonkeyPatch
) -> None:
    client, _ = served
    frame = load(client)["frames"][0]

    def broken(*args: Any, **kwargs: Any) -> Any:
        msg = "simulated bug"
        raise ZeroDivisionError(msg)

    monkeypatch.setattr("bracegrid.web.app.check_frame_any", broken)
    got = client.post("/api/check", json={"frame": frame_edit(frame)}, headers=PAGE)
    _refused(got, 500, "internal")
    assert "simulated bug" in got.json()["message"]
    monkeypatch.undo()
    assert client.post("/api/check", json={"frame": frame_edit(frame)}, headers=PAGE).status_code == 200
