"""Developer tool: snapshot every user-visible output on the demo projects, and diff two snapshots.

Used to prove that a refactoring changes no output: run ``snapshot`` before and after, then
``diff``. It runs the installed ``bracegrid`` command line (one CP-SAT worker, fixed seed, so
answers are deterministic) and keeps:

* the JSON of ``check``, ``optimize`` and ``compare`` (the ``seconds`` fields dropped: wall time);
* the written project of ``optimize --write`` and the bill CSVs;
* every DXF, compared entity by entity (handles kept; the header's GUIDs and timestamps,
  which ezdxf sets fresh on every save, dropped);
* every PNG, compared pixel by pixel;
* ``report.html`` (solve times blanked).

Usage::

    python tools/snapshot_outputs.py snapshot DIR
    python tools/snapshot_outputs.py diff DIR_A DIR_B
"""

from __future__ import annotations

import argparse
import json
import re
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
PROJECTS = ("quayside-scaffold", "orchard-shed", "mill-lane-roof", "harrow-depot")
SOLVER = ["--workers", "1", "--seed", "0", "--time-limit", "20"]
_VOLATILE_HEADER = {"$TDCREATE", "$TDUCREATE", "$TDUPDATE", "$TDUUPDATE", "$TDINDWG", "$TDUSRTIMER",
                    "$FINGERPRINTGUID", "$VERSIONGUID"}  # fmt: skip


def _run(args: list[str], out: Path | None = None) -> None:
    # Previews are repeatable (fixed hatch-origin shift, no dates), so no seeding is needed.
    boot = "import sys; from bracegrid.cli import main; sys.exit(main())"
    cmd = [sys.executable, "-c", boot, *args]
    proc = subprocess.run(cmd, cwd=ROOT, capture_output=True, text=True, check=False)
    if out is not None:
        out.write_text(proc.stdout, encoding="utf-8")
        out.with_name(out.name + ".rc").write_text(str(proc.returncode), encoding="utf-8")
    elif proc.returncode:
        print(f"{' '.join(args)}: exit {proc.returncode}: {proc.stderr.strip()}")


def _strip_seconds(value: object) -> object:
    if isinstance(value, dict):
        return {k: _strip_seconds(v) for k, v in value.items() if k != "seconds"}
    if isinstance(value, list):
        return [_strip_seconds(v) for v in value]
    return value


def snapshot(folder: Path) -> None:
    folder.mkdir(parents=True, exist_ok=True)
    for name in PROJECTS:
        src = f"projects/{name}.toml"
        _run(["check", src, "--json"], folder / f"{name}.check.json")
        _run(["optimize", src, "--json", *SOLVER, "--write", str(folder / f"{name}.braced.toml")],
             folder / f"{name}.optimize.json")  # fmt: skip
        _run(["draw", str(folder / f"{name}.braced.toml"), "--out", str(folder / f"{name}-draw")])
        _run(["draw", src, "--per-frame", "--out", str(folder / f"{name}-perframe")])
    _run(["check", "projects/orchard-shed.toml", "--frame", "roof plan", "--without", "r3c3", "--json"],
         folder / "orchard-without.check.json")  # fmt: skip
    _run(["optimize", "projects/orchard-shed.toml", "--frame", "roof plan", "--without", "r3c3", "--keep-clear",
          "--json", *SOLVER], folder / "orchard-repair.optimize.json")  # fmt: skip
    _run(["optimize", "projects/quayside-scaffold.toml", "--redundancy", "1", "--json", *SOLVER],
         folder / "quayside-n1.optimize.json")  # fmt: skip
    for name in ("quayside-scaffold", "orchard-shed"):
        _run(["compare", f"projects/{name}.toml", "--json", *SOLVER, "--out", str(folder / f"{name}-compare")],
             folder / f"{name}.compare.json")  # fmt: skip
    for path in folder.rglob("*.json"):
        text = path.read_text(encoding="utf-8")
        if text.strip():
            data = _strip_seconds(json.loads(text))
            if isinstance(data, dict) and "files" in data:
                data["files"] = [Path(f).name for f in data["files"]]
            path.write_text(json.dumps(data, indent=1, sort_keys=True), encoding="utf-8")


def _dxf_entities(path: Path) -> list[str]:
    import ezdxf

    doc = ezdxf.readfile(path)
    out = []
    for key in sorted(doc.header.varnames()):
        if key not in _VOLATILE_HEADER:
            out.append(f"HEADER {key} {doc.header.get(key)!r}")
    for table in (doc.layers, doc.linetypes, doc.styles, doc.dimstyles, doc.appids):
        for entry in table:
            out.append(f"TABLE {entry.dxftype()} {sorted(entry.dxfattribs().items())!r}")
    for block in doc.blocks:
        for e in block:
            out.append(f"BLOCK {block.name} {e.dxftype()} {sorted(e.dxfattribs().items())!r}")
    return out


def _png_pixels(path: Path) -> bytes:
    from PIL import Image

    with Image.open(path) as img:
        return img.size.__repr__().encode() + img.convert("RGBA").tobytes()


def _html(path: Path) -> str:
    text = path.read_text(encoding="utf-8")
    ids: dict[str, str] = {}

    def rename(match: re.Match[str]) -> str:
        return ids.setdefault(match.group(0), f"ID{len(ids)}")

    text = re.sub(r"<dc:date>[^<]*</dc:date>", "<dc:date/>", text)  # matplotlib's render time
    text = re.sub(r"<td>\d+\.\d\d</td></tr>", "<td>(seconds)</td></tr>", text)  # solve times
    return re.sub(r"[0-9a-f]{10,}", rename, text)


def _csv(path: Path) -> list[dict[str, str]]:
    import csv

    with path.open(encoding="utf-8", newline="") as handle:
        return [{k: v for k, v in row.items() if k != "seconds"} for row in csv.DictReader(handle)]


def diff(a: Path, b: Path) -> int:
    names_a = {p.relative_to(a) for p in a.rglob("*") if p.is_file()}
    names_b = {p.relative_to(b) for p in b.rglob("*") if p.is_file()}
    bad = 0
    for name in sorted(names_a ^ names_b):
        print(f"only in one snapshot: {name}")
        bad += 1
    for name in sorted(names_a & names_b):
        pa, pb = a / name, b / name
        if name.suffix == ".dxf":
            same = _dxf_entities(pa) == _dxf_entities(pb)
        elif name.suffix == ".png":
            same = _png_pixels(pa) == _png_pixels(pb)
        elif name.suffix == ".html":
            same = _html(pa) == _html(pb)
        elif name.suffix == ".csv":
            same = _csv(pa) == _csv(pb)
        elif name.suffix in {".svg", ".pdf"}:
            continue  # matplotlib stamps dates and random ids; the PNG of the same sheet is compared
        else:
            same = pa.read_bytes() == pb.read_bytes()
        if not same:
            print(f"differs: {name}")
            bad += 1
    print(f"{len(names_a & names_b)} files compared, {bad} differences")
    return 1 if bad else 0


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    sub = parser.add_subparsers(dest="cmd", required=True)
    s = sub.add_parser("snapshot")
    s.add_argument("folder", type=Path)
    d = sub.add_parser("diff")
    d.add_argument("a", type=Path)
    d.add_argument("b", type=Path)
    args = parser.parse_args()
    if args.cmd == "snapshot":
        snapshot(args.folder)
        return 0
    return diff(args.a, args.b)


if __name__ == "__main__":
    raise SystemExit(main())
