"""The editor's JSON API, endpoint by endpoint (docs/editor.md), through Starlette's test client.

Independent checks: the live verdict is set against the bar-framework physics of tests/physics.py
(rank and LP, no digraph), and the live cost against a hand sum of the file's prices.
"""

from __future__ import annotations

import json
import math
import random
import re
import time
import tomllib
from pathlib import Path
from typing import Any

import pytest
from starlette.testclient import TestClient

from bracegrid.io import load_project
from bracegrid.mechanics import analyse_frame
from bracegrid.model import Diagonal, Member, MemberKind
from bracegrid.outputs.ramp import OVER_RGB, UNRATED_RGB, hex_colour, utilisation_rgb
from tests.common import project_head
from tests.physics import physically_rigid
from tests.web.helpers import ORIGIN, PAGE, TOKEN, copy_project, editor, frame_edit, load


@pytest.fixture
def shed(tmp_path: Path) -> Path:
    return copy_project(tmp_path)


def test_page_carries_the_token_and_loads_only_its_own_assets(shed: Path) -> None:
    with editor(shed) as (client, _):
        page = client.get(f"/?t={TOKEN}")
        assert page.status_code == 200
        assert page.headers["content-type"].startswith("text/html")
        html = page.text
        assert f'content="{TOKEN}"' in html
        assert f"/static/app.js?t={TOKEN}" in html
        links = re.findall(r'(?:src|href)="([^"]*)"', html)
        assert links
        assert all(u.startswith(("/static/", "data:")) for u in links)
        policy = page.headers["content-security-policy"]
        assert "default-src 'none'" in policy
        assert "connect-src 'self'" in policy
        for name, kind in (("app.js", "text/javascript"), ("style.css", "text/css")):
            got = client.get(f"/static/{name}?t={TOKEN}")
            assert got.status_code == 200
            assert got.headers["content-type"].startswith(kind)
            assert "https://" not in got.text


def test_project_endpoint_gives_frames_sizes_members_and_version(shed: Path) -> None:
    with editor(shed) as (client, session):
        data = load(client)
    assert data["file"] == "orchard-shed.toml"
    assert data["version"] == session.version
    assert len(data["version"]) == 20
    roof = data["frames"][0]
    assert roof["name"] == "roof plan"
    assert roof["widths_mm"] == [4000] * 6
    assert roof["widths"] == [4] * 6
    assert roof["heights_mm"] == [5000] * 4
    assert len(roof["members"]) == 12
    assert roof["openings"][0]["name"] == "rooflight"
    assert roof["blocked_by_openings"] == [[3, 4]]
    assert roof["blocked"] == []
    assert "licensed engineer" in data["caution"]


def _hand_cost(project_file: Path, frame: dict[str, Any], members: list[dict[str, Any]]) -> float:
    """Price of a layout summed by hand from the file's own tables, by the bill's one rounding rule
    (docs/drawings.md): each member (piece + labour + metre x cut length to the mm) to the cent, then summed."""
    costs = tomllib.loads(project_file.read_text(encoding="utf-8"))["costs"]
    total_cents = 0
    for m in members:
        rate = costs[m["kind"]]
        cut_mm = round(math.hypot(frame["widths_mm"][m["col"] - 1], frame["heights_mm"][m["row"] - 1]))
        price = rate["per_piece"] + rate.get("labour_per_piece", 0.0) + rate["per_metre"] * cut_mm / 1000.0
        total_cents += math.floor(price * 100 + 0.5 + 1e-9)  # half up (no demo price sits on a half cent)
    return total_cents / 100


def test_check_agrees_with_bar_framework_physics_and_hand_cost(shed: Path) -> None:
    rng = random.Random(14)
    with editor(shed) as (client, session):
        roof = load(client)["frames"][0]
        frame = session.project.frame("roof plan")
        open_bays = [(r, c) for r in range(1, 5) for c in range(1, 7) if [r, c] not in roof["blocked_by_openings"]]
        seen = set()
        for _ in range(12):
            members = []
            for r, c in open_bays:
                for d in ("rising", "falling"):
                    if rng.random() < 0.3:
                        members.append({"row": r, "col": c, "kind": rng.choice(["brace", "tie"]), "diagonal": d})
            got = client.post("/api/check", json={"frame": frame_edit(roof, members=members)}, headers=PAGE)
            assert got.status_code == 200, got.text
            body = got.json()
            layout = [Member(m["row"], m["col"], MemberKind(m["kind"]), Diagonal(m["diagonal"])) for m in members]
            assert body["verdict"]["stable"] is physically_rigid(frame, layout)
            seen.add(body["verdict"]["stable"])
            assert body["summary"]["members"] == len(members)
            assert body["summary"]["cost"] == pytest.approx(_hand_cost(shed, roof, members), abs=1e-9)
            assert body["server_ms"] >= 0
    assert seen == {True, False}  # both verdicts were exercised


def test_check_reports_loose_parts_in_words_and_critical_members(shed: Path) -> None:
    with editor(shed) as (client, _):
        roof = load(client)["frames"][0]
        whole = client.post("/api/check", json={"frame": frame_edit(roof)}, headers=PAGE).json()
        assert whole["verdict"]["stable"] is True
        assert len(whole["verdict"]["critical_members"]) == 4
        one = whole["verdict"]["critical_members"][0]
        less = [
            m
            for m in roof["members"]
            if (m["row"], m["col"], m["diagonal"]) != (one["row"], one["col"], one["diagonal"])
        ]
        got = client.post("/api/check", json={"frame": frame_edit(roof, members=less)}, headers=PAGE).json()
    verdict = got["verdict"]
    assert verdict["stable"] is False
    assert verdict["racking_modes"] >= 1
    assert all("can rack" in p["description"] for p in verdict["loose_parts"])
    assert got["summary"]["members"] == 11


def test_check_shows_the_loaders_own_messages_by_field(shed: Path) -> None:
    with editor(shed) as (client, _):
        roof = load(client)["frames"][0]
        bad = frame_edit(roof, widths=["4", "x", -2, 4, 4, 4], supports="sideways")
        got = client.post("/api/check", json={"frame": bad}, headers=PAGE)
    assert got.status_code == 422
    problems = got.json()["problems"]
    fields = {(p["field"], p["index"]) for p in problems}
    assert ("widths", 2) in fields
    assert ("widths", 3) in fields
    assert ("supports", None) in fields
    assert all(p["frame"] == "roof plan" for p in problems)
    text = " ".join(p["message"] for p in problems)
    assert "cannot read 'x' as a length" in text
    assert "size must be positive" in text
    assert "'sideways'" in text


def test_check_takes_lengths_with_units_as_typed(shed: Path) -> None:
    with editor(shed) as (client, _):
        roof = load(client)["frames"][0]
        got = client.post("/api/check", json={"frame": frame_edit(roof, widths=["4000 mm", *[4] * 5])}, headers=PAGE)
    assert got.status_code == 200
    assert got.json()["sizes"]["widths_mm"] == [4000] * 6


def test_member_in_a_blocked_bay_is_refused_with_the_loaders_words(shed: Path) -> None:
    with editor(shed) as (client, _):
        roof = load(client)["frames"][0]
        got = client.post("/api/check", json={"frame": frame_edit(roof, blocked=[[1, 1]])}, headers=PAGE)
    assert got.status_code == 422
    assert any(p["field"] == "members" and "listed in 'blocked'" in p["message"] for p in got.json()["problems"])


def _save(client: TestClient, version: str, frames: list[dict[str, Any]]) -> Any:
    return client.post("/api/save", json={"version": version, "frames": frames}, headers=PAGE)


def test_save_writes_the_layout_atomically_with_one_backup(shed: Path) -> None:
    original = shed.read_bytes()
    with editor(shed) as (client, _):
        data = load(client)
        roof, wall = data["frames"]
        members = [*roof["members"], {"row": 3, "col": 1, "kind": "tie", "diagonal": "rising", "existing": False}]
        got = _save(client, data["version"], [frame_edit(roof, members=members, supports="free")])
        assert got.status_code == 200, got.text
        body = got.json()
        assert body["saved"] == "orchard-shed.toml"
        assert body["backup"] == "orchard-shed.toml.bak"
        assert (shed.parent / "orchard-shed.toml.bak").read_bytes() == original
        saved = load_project(shed)
        assert len(saved.frame("roof plan").members) == 13
        assert Member(3, 1, MemberKind.TIE, Diagonal.RISING, existing=False) in saved.frame("roof plan").members
        assert saved.frame("east wall line") == load_project(shed.parent / "orchard-shed.toml.bak").frame(
            "east wall line"
        )
        # a second save from the new version works and keeps one backup: the previous save
        second_text = shed.read_bytes()
        again = _save(client, body["version"], [frame_edit(wall, supports="base")])
        assert again.status_code == 200
        assert (shed.parent / "orchard-shed.toml.bak").read_bytes() == second_text
    leftovers = sorted(p.name for p in shed.parent.iterdir())
    assert leftovers == ["orchard-shed.toml", "orchard-shed.toml.bak"]  # no temporary files left


def test_save_refuses_when_the_file_changed_on_disk(shed: Path) -> None:
    with editor(shed) as (client, _):
        data = load(client)
        shed.write_text(shed.read_text(encoding="utf-8") + "\n# edited elsewhere\n", encoding="utf-8")
        changed = shed.read_bytes()
        got = _save(client, data["version"], [frame_edit(data["frames"][0], members=[])])
        assert got.status_code == 409
        body = got.json()
        assert body["error"] == "conflict"
        assert "changed on disk" in body["message"]
        assert "reload" in body["message"]
        assert "save a copy" in body["message"]
        assert shed.read_bytes() == changed  # nothing written
        assert not (shed.parent / "orchard-shed.toml.bak").exists()
        # reloading gives the new version, and a save from it goes through
        fresh = load(client)
        assert fresh["version"] == body["disk_version"]
        assert _save(client, fresh["version"], [frame_edit(fresh["frames"][0], members=[])]).status_code == 200


def test_save_refuses_when_another_tab_saved_first(shed: Path) -> None:
    with editor(shed) as (client, _):
        tab_a = load(client)
        tab_b = load(client)
        roof = tab_a["frames"][0]
        assert _save(client, tab_a["version"], [frame_edit(roof, members=roof["members"][:6])]).status_code == 200
        after_a = shed.read_bytes()
        got = _save(client, tab_b["version"], [frame_edit(tab_b["frames"][0], members=[])])
    assert got.status_code == 409
    assert "another tab saved" in got.json()["message"]
    assert shed.read_bytes() == after_a


def test_nothing_invalid_is_ever_written(shed: Path) -> None:
    original = shed.read_bytes()
    with editor(shed) as (client, _):
        data = load(client)
        roof = data["frames"][0]
        got = _save(client, data["version"], [frame_edit(roof, heights=[5, 5, 0, 5])])
        assert got.status_code == 422
        assert got.json()["problems"][0]["field"] == "heights"
        unknown = _save(client, data["version"], [frame_edit(roof, name="no such frame")])
        assert unknown.status_code == 422
        assert "no frame of that name" in unknown.json()["message"]
    assert shed.read_bytes() == original
    assert not (shed.parent / "orchard-shed.toml.bak").exists()


def test_save_copy_goes_into_the_output_folder_and_is_served_by_number(shed: Path) -> None:
    original = shed.read_bytes()
    with editor(shed) as (client, session):
        data = load(client)
        got = client.post("/api/save-copy", json={"frames": [frame_edit(data["frames"][0], members=[])]}, headers=PAGE)
        assert got.status_code == 200, got.text
        body = got.json()
        copy = session.paths.out / body["saved"]
        assert copy.parent == shed.parent / "orchard-shed-edit"
        assert load_project(copy).frame("roof plan").members == ()
        served = client.get(f"{body['href']}?t={TOKEN}")
        assert served.status_code == 200
        assert served.content == copy.read_bytes()
        assert client.get(f"/out/99?t={TOKEN}").status_code == 404
    assert shed.read_bytes() == original


def _wait(client: TestClient, job: str, *, seconds: float = 60.0) -> dict[str, Any]:
    end = time.monotonic() + seconds
    while time.monotonic() < end:
        state: dict[str, Any] = client.get(f"/api/jobs/{job}", headers=PAGE).json()
        if state["state"] != "running":
            return state
        time.sleep(0.1)
    pytest.fail(f"job {job} still running after {seconds} s")


def test_optimize_streams_progress_then_a_proposal_that_is_stable(shed: Path) -> None:
    with editor(shed) as (client, session):
        roof = load(client)["frames"][0]
        start = client.post(
            "/api/optimize", json={"frame": frame_edit(roof, members=[]), "time_limit": 10, "workers": 1}, headers=PAGE
        )
        assert start.status_code == 202, start.text
        job = start.json()["job"]
        with client.stream("GET", f"/api/jobs/{job}/events?t={TOKEN}") as stream:
            assert stream.headers["content-type"].startswith("text/event-stream")
            events = [json.loads(line[6:]) for line in stream.iter_lines() if line.startswith("data: ")]
        state = _wait(client, job)
        assert session.paths.out.exists() is False  # optimize writes nothing
    assert state["state"] == "done"
    assert events[-1]["type"] == "done"
    assert any(e["type"] == "progress" for e in events)
    progress = next(e for e in events if e["type"] == "progress")
    assert {"cost", "bound", "gap", "seconds", "stage"} <= set(progress)
    done = events[-1]
    assert done["removed"] == []
    assert len(done["added"]) == len(done["solution"]["members"])
    frame = session.project.frame("roof plan")
    layout = [Member(m["row"], m["col"], MemberKind(m["kind"]), Diagonal(m["diagonal"])) for m in done["added"]]
    assert physically_rigid(frame, layout)  # independent check of the proposal


def test_repair_takes_out_the_picked_members_and_adds_the_cheapest_fix(shed: Path) -> None:
    with editor(shed) as (client, session):
        roof = load(client)["frames"][0]
        body = {
            "frame": frame_edit(roof),
            "without": [{"row": 3, "col": 3, "diagonal": "rising"}],
            "keep_clear": True,
            "time_limit": 10,
            "workers": 1,
        }
        start = client.post("/api/repair", json=body, headers=PAGE)
        assert start.status_code == 202, start.text
        state = _wait(client, start.json()["job"])
        bad = client.post(
            "/api/repair", json={**body, "without": [{"row": 1, "col": 2, "diagonal": "rising"}]}, headers=PAGE
        )
    done = state["events"][-1]
    assert state["state"] == "done", done
    assert done["removed"] == [{"row": 3, "col": 3, "kind": "brace", "diagonal": "rising", "existing": True}]
    assert [3, 3] in done["blocked"]
    assert all((m["row"], m["col"]) != (3, 3) for m in done["added"])
    kept = [m for m in roof["members"] if (m["row"], m["col"]) != (3, 3)]
    layout = [Member(m["row"], m["col"], MemberKind(m["kind"]), Diagonal(m["diagonal"])) for m in kept + done["added"]]
    assert physically_rigid(session.project.frame("roof plan"), layout)
    assert bad.status_code == 422
    assert "no such member" in bad.json()["message"]


def test_compare_writes_its_files_into_the_output_folder_with_links(shed: Path) -> None:
    with editor(shed) as (client, session):
        wall = load(client)["frames"][1]
        start = client.post(
            "/api/compare", json={"frame": frame_edit(wall), "time_limit": 5, "workers": 1}, headers=PAGE
        )
        assert start.status_code == 202, start.text
        state = _wait(client, start.json()["job"], seconds=120)
        done = state["events"][-1]
        assert state["state"] == "done", done
        steps = [e for e in state["events"] if e["type"] == "progress"]
        assert [e["step"] for e in steps] == [1, 2, 3, 4, 5, 6]
        names = [f["name"] for f in done["files"]]
        assert "report.html" in names
        assert "orchard-shed-compare.csv" in names
        assert {p.name for p in session.paths.out.iterdir()} == set(names)
        report = next(f for f in done["files"] if f["name"] == "report.html")
        page = client.get(f"{report['href']}?t={TOKEN}")
        assert page.status_code == 200
        assert page.headers["content-type"].startswith("text/html")
        assert "script-src" not in page.headers["content-security-policy"]  # the report may run nothing
        dxf = next(f for f in done["files"] if f["name"].endswith(".dxf"))
        assert "attachment" in client.get(f"{dxf['href']}?t={TOKEN}").headers["content-disposition"]
    strategies = done["frames"][0]["strategies"]
    assert [s["key"] for s in strategies] == [
        "braces-only",
        "ties-only",
        "mixed",
        "stable-only",
        "mixed-redundant",
        "baseline",
    ]


def test_cancel_stops_the_worker_at_once_and_a_second_job_waits(tmp_path: Path) -> None:
    big = tmp_path / "big.toml"
    rows = "\n".join(
        f"[[frame.member]]\nrow = {r}\ncol = {c}\nkind = 'tie'\ndiagonal = 'rising'\n"
        for r in range(1, 41, 3)
        for c in range(1, 41, 4)
    )
    big.write_text(
        "[project]\nname = 'big'\n[costs.brace]\nper_piece = 25.0\nper_metre = 8.0\n"
        "[costs.tie]\nper_piece = 14.0\nper_metre = 5.0\n"
        f"[[frame]]\nname = 'face'\nwidths = [{', '.join(str(2.0 + (k % 3) * 0.4) for k in range(40))}]\n"
        f"heights = [{', '.join(str(1.5 + (k % 4) * 0.3) for k in range(40))}]\nblocked = [[5, 5], [9, 17], [20, 20]]\n"
        + rows,
        encoding="utf-8",
    )
    with editor(big) as (client, _):
        face = load(client)["frames"][0]
        body = {"frame": frame_edit(face), "time_limit": 120, "workers": 1}
        start = client.post("/api/optimize", json=body, headers=PAGE)
        assert start.status_code == 202
        job = start.json()["job"]
        busy = client.post("/api/optimize", json=body, headers=PAGE)
        assert busy.status_code == 409
        assert busy.json()["error"] == "busy"
        time.sleep(3.0)  # let it get into the search
        before = time.monotonic()
        cancel = client.post(f"/api/jobs/{job}/cancel", json={}, headers=PAGE)
        took = time.monotonic() - before
        assert cancel.status_code == 200
        assert cancel.json() == {"job": job, "cancelled": True, "state": "cancelled"}
        assert took < 5.0
        state = client.get(f"/api/jobs/{job}", headers=PAGE).json()
        assert state["state"] == "cancelled"
        assert state["events"][-1]["type"] == "cancelled"
        again = client.post(f"/api/jobs/{job}/cancel", json={}, headers=PAGE)
        assert again.json()["cancelled"] is False
        # the board is free again: a new job starts
        small = dict(body, time_limit=1)
        restarted = client.post("/api/optimize", json=small, headers=PAGE)
        assert restarted.status_code == 202
        client.post(f"/api/jobs/{restarted.json()['job']}/cancel", json={}, headers=PAGE)


def test_an_infeasible_request_fails_with_the_reason_in_words(tmp_path: Path) -> None:
    path = tmp_path / "shut.toml"
    path.write_text(
        project_head("shut") + "[[frame]]\nname = 'f'\nwidths = [3, 3]\nheights = [2, 2]\nblocked = [[2, 1], [2, 2]]\n",
        encoding="utf-8",
    )
    with editor(path) as (client, _):
        frame = load(client)["frames"][0]
        start = client.post(
            "/api/optimize", json={"frame": frame_edit(frame), "time_limit": 5, "workers": 1}, headers=PAGE
        )
        state = _wait(client, start.json()["job"])
    last = state["events"][-1]
    assert state["state"] == "failed"
    assert last["error"] == "infeasible"
    assert "row 2" in last["message"]


def test_unknown_job_is_404_not_a_crash(shed: Path) -> None:
    with editor(shed) as (client, _):
        for path in ("/api/jobs/0123456789abcdef", "/api/jobs/nothex", "/api/jobs/..%2f..%2fetc/events"):
            got = client.get(path, headers=PAGE)
            assert got.status_code == 404
            assert got.json()["error"] == "not-found"
        assert client.post("/api/jobs/0123456789abcdef/cancel", json={}, headers=PAGE).status_code == 404


# --------------------------------------------------------------------------- forces (utilisation colouring)


def test_forces_endpoint_gives_the_librarys_envelope_and_the_sheets_colours(shed: Path) -> None:
    """The page colours exactly what ``bracegrid forces`` computes: same bars, forces, cases and ramp colours."""
    project = load_project(shed)
    with editor(shed) as (client, _):
        data = load(client)
        for f in data["frames"]:
            got = client.post("/api/forces", headers=PAGE, json={"frame": frame_edit(f)})
            assert got.status_code == 200, got.text
            body = got.json()
            frame = project.frame(f["name"])
            assert f["load_cases"] == [c.name for c in frame.loads]
            if not frame.loads:
                assert body["available"] is False
                assert "no load cases" in body["reason"]
                continue
            want = analyse_frame(frame, project.strength)
            assert body["available"] is bool(want.envelope)
            assert body["ok"] is want.ok
            assert [c["title"] for c in body["cases"]] == [c.title for c in want.cases]
            assert len(body["bars"]) == len(want.envelope)
            for bar, entry in zip(body["bars"], want.envelope, strict=True):
                m = entry.member
                assert bar["label"] == m.label
                assert bar["force_kn"] == pytest.approx(m.force_kn, abs=1e-6)
                assert bar["case"] == entry.case
                if m.utilisation is None:
                    assert bar["colour"] == hex_colour(UNRATED_RGB)
                elif m.over:
                    assert bar["colour"] == hex_colour(OVER_RGB)
                else:
                    assert bar["colour"] == hex_colour(utilisation_rgb(m.utilisation))
            assert "licensed engineer" in body["caution"]
            assert "first-order" in body["model_limits"].lower()


def test_forces_of_a_mechanism_colour_nothing_and_say_why(shed: Path) -> None:
    with editor(shed) as (client, _):
        roof = load(client)["frames"][0]
        got = client.post("/api/forces", headers=PAGE, json={"frame": frame_edit(roof, members=[])})
    assert got.status_code == 200, got.text
    body = got.json()
    assert body["available"] is False
    assert "mechanism" in body["reason"]


def test_forces_of_an_invalid_edit_is_the_loaders_message(shed: Path) -> None:
    with editor(shed) as (client, _):
        roof = load(client)["frames"][0]
        got = client.post("/api/forces", headers=PAGE, json={"frame": frame_edit(roof, widths=["-3"])})
    assert got.status_code == 422
    assert got.json()["problems"]


def test_forces_needs_the_token(shed: Path) -> None:
    with editor(shed) as (client, _):
        roof = load(client)["frames"][0]
        got = client.post("/api/forces", headers={"Origin": ORIGIN}, json={"frame": frame_edit(roof)})
    assert got.status_code == 403
