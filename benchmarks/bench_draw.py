"""Time the drawing writer: build the sheet, serialise the DXF, render a PNG preview.

Run: .venv/bin/python benchmarks/bench_draw.py
Frames are uniform 2.5 m x 2.0 m bays on a pinned base, every lift with a brace
and a crossed tie pair (an invented layout, stable by construction).
"""

from __future__ import annotations

import resource
import time

from bracegrid.model import Diagonal, Frame, Member, MemberKind, Project, Supports
from bracegrid.outputs.drawing import build_drawing, dxf_bytes
from bracegrid.outputs.preview import PreviewFormat, render_preview


def frame(cols: int, rows: int) -> Frame:
    members = []
    for r in range(1, rows + 1):
        members.append(Member(r, 1 + (r % cols), MemberKind.BRACE, Diagonal.RISING, existing=r % 2 == 0))
        c = 1 + ((r + cols // 2) % cols)
        members.append(Member(r, c, MemberKind.TIE, Diagonal.RISING, existing=False))
        members.append(Member(r, c, MemberKind.TIE, Diagonal.FALLING, existing=False))
    return Frame(f"{cols}x{rows}", (2500,) * cols, (2000,) * rows, supports=Supports.BASE, members=tuple(members))


def main() -> None:
    head = ("frame", "members", "sheet", "scale", "build s", "dxf s", "dxf kB", "png s")
    print("{:>8} {:>8} {:>6} {:>6} {:>8} {:>6} {:>7} {:>6}".format(*head))
    for cols, rows in ((12, 8), (30, 12), (60, 20)):
        project = Project("bench", (frame(cols, rows),))
        t0 = time.perf_counter()
        sheet = build_drawing(project)
        t1 = time.perf_counter()
        data = dxf_bytes(sheet.doc)
        t2 = time.perf_counter()
        render_preview(sheet, PreviewFormat.PNG, dpi=150)
        t3 = time.perf_counter()
        members = len(project.frames[0].members)
        plan = sheet.plan
        print(
            f"{cols}x{rows:<5} {members:>8} {plan.sheet:>6} {'1:' + str(plan.scale):>6} {t1 - t0:>8.2f} "
            f"{t2 - t1:>6.2f} {len(data) / 1024:>7.0f} {t3 - t2:>6.2f}"
        )
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    print(f"peak resident memory: {peak:.0f} MiB")


if __name__ == "__main__":
    main()
